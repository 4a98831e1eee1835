//! The snap-back probe: a characteristic length too large for the fracture energy.
//!
//! In a crack band (Bažant & Oh 1983, from memory as REFERENCES.md lists it) a softening point stands for a band of width L, and the
//! energy it dissipates per unit volume to full failure is G_f/L. The energy per unit volume
//! already stored when softening starts, W₀ (½ σ₀ ε₀ for a linear response up to the peak), is
//! a lower bound of that: with linear softening the stress falls to zero at the strain
//! ε_f = 2 G_f/(σ₀ L), which lies beyond ε₀ only when G_f/L > W₀. A longer band would need the
//! strain to go back while the stress falls — the softening branch snaps back. Hence the
//! largest admissible length L_max = G_f/W₀, which is 2 E G_f/σ₀² for a bar of modulus E and
//! strength σ₀ (REFERENCES.md, "Explicit dynamics, softening regularisation": derived).
//!
//! The probe walks the path, finds the increment where a declared damage variable
//! (`"damage"`) first grows, locates the onset inside it by bisection of the increment, and
//! measures W₀ = ∫ σ·dε up to there (trapezoid rule, exact while the response is linear). The
//! fracture energy is the declared `fracture_energy`, or W·L measured along a path to full
//! failure. With `"length"` (a property index):
//! - the routine refuses the given L: reported with L_max (measured at the largest accepted
//!   L/2ᵏ) and the routine's own message — a failure, the manifest's length cannot be used;
//! - L > L_max and the routine accepts it without a word: a failure, with L_max;
//! - L ≤ L_max: the routine must refuse L = 1.05 L_max on the same path (it may refuse
//!   shorter lengths, when another mode has a smaller bound); accepting it fails.
//!
//! Without `length` (a cohesive law, whose strain is a separation) the fracture energy itself
//! must be at least W₀ (δ_f > δ₀ for a bilinear law, G_c > t₀²/(2K)); W₀ is then the smallest
//! admissible fracture energy. Tolerance `tol` (relative, default 1e-3). Skipped without
//! `damage`, without `length` and `fracture_energy`, or when the damage does not grow.

use super::regularisation::WorkMeter;
use super::{walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::probe::Needs;
use crate::routine::{Caller, Fault};

pub struct SnapBack;

const DEFAULT_TOL: f64 = 1e-3;
/// The length, relative to L_max, at which the routine must refuse.
const BEYOND: f64 = 1.05;
/// Halvings of a refused length tried before giving up.
const HALVINGS: usize = 30;

/// What one walk measured.
struct Walked {
    /// Work per unit volume up to the onset of damage growth, if it grew.
    onset_work: Option<f64>,
    /// Increment of the onset.
    onset_increment: usize,
    /// Work per unit volume along the whole path.
    work: f64,
    /// The stress is gone at the end.
    failed: bool,
}

fn grows(d: &crate::driver::Driver, indices: &[usize]) -> bool {
    indices.iter().any(|&i| d.base.state[i] > d.start().state[i])
}

/// Walk `env.path` with `props`, measuring the work and the onset of damage growth.
fn measure(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
    props: &[f64],
    indices: &[usize],
) -> Result<Walked, (usize, Fault)> {
    let env2 = ProbeEnv { props, ..*env };
    let mut meter = WorkMeter::new(&caller.info().convention.clone());
    let mut out = Walked { onset_work: None, onset_increment: 0, work: 0.0, failed: false };
    walk(caller, &env2, |k, d, c| {
        if out.onset_work.is_none() && grows(d, indices) {
            // Bisect the fraction of the increment at which the damage starts to grow.
            let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
            let mut s_lo = d.start().stress.clone();
            for _ in 0..50 {
                let mid = 0.5 * (lo + hi);
                d.rescale(mid);
                d.base_call(c)?;
                if grows(d, indices) {
                    hi = mid;
                } else {
                    lo = mid;
                    s_lo.copy_from_slice(&d.base.stress);
                }
            }
            d.rescale(1.0);
            d.base_call(c)?;
            out.onset_work = Some(meter.work + meter.part(&d.start().stress, &s_lo, d.dstrain(), lo));
            out.onset_increment = k;
        }
        meter.add(d);
        Ok(())
    })?;
    out.work = meter.work;
    out.failed = meter.stress_gone();
    Ok(out)
}

impl Probe for SnapBack {
    fn name(&self) -> &'static str {
        "snap-back"
    }
    fn needs(&self) -> Needs {
        Needs::DAMAGE_INDICES.union(Needs::LENGTH_OR_FRACTURE_ENERGY)
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        self.run_checked(caller, env).map_err(CoreError::ProbeInput)
    }
}

impl SnapBack {
    fn run_checked(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, String> {
        let name = self.name();
        let Some(indices) = env.spec.damage.as_ref().filter(|v| !v.is_empty()) else {
            return Ok(ProbeResult::skipped(
                name,
                "no damage variables declared (\"damage\": [state indices]): no softening to judge",
            ));
        };
        let nstate = caller.info().nstate;
        if let Some(&bad) = indices.iter().find(|&&i| i >= nstate) {
            return Err(format!(
                "snap-back: damage index {bad} is not a state variable (the routine has {nstate})"
            ));
        }
        let (length, declared) = (env.spec.length, env.spec.fracture_energy);
        if length.is_none() && declared.is_none() {
            return Ok(ProbeResult::skipped(name, "neither \"length\" nor \"fracture_energy\" declared"));
        }
        if let Some(i) = length {
            if i >= env.props.len() || !env.props[i].is_finite() || env.props[i] <= 0.0 {
                return Err(format!("snap-back: \"length\" {i} is not a positive property"));
            }
        }
        if let Some(g) = declared {
            if !(g.is_finite() && g > 0.0) {
                return Err(format!("snap-back: \"fracture_energy\" is {g}; it must be positive"));
            }
        }
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        // The given length, or the largest L/2^k the routine accepts.
        let mut props = env.props.to_vec();
        let mut refused: Option<(usize, String)> = None;
        let walked = loop {
            match measure(caller, env, &props, indices) {
                Ok(w) => break w,
                Err((k, f)) => {
                    let Some(i) = length else {
                        return Ok(refusal(name, k, &f, None));
                    };
                    if refused.is_none() {
                        refused = Some((k, f.to_string()));
                    }
                    if props[i] < env.props[i] / 2f64.powi(HALVINGS as i32) {
                        return Ok(refusal(name, k, &f, Some(env.props[i])));
                    }
                    props[i] *= 0.5;
                }
            }
        };
        let Some(w0) = walked.onset_work.filter(|w| *w > 0.0) else {
            return Ok(ProbeResult::skipped(
                name,
                "no onset of softening on this path to measure (the declared damage does not grow, or grows from its first call)",
            ));
        };
        let l_used = length.map_or(1.0, |i| props[i]);
        let g =
            match declared {
                Some(g) => g,
                None if walked.failed => walked.work * l_used,
                None => return Ok(ProbeResult::skipped(
                    name,
                    "no \"fracture_energy\" declared and the path does not reach full failure to measure it",
                )),
            };
        let g_from = if declared.is_some() { "declared" } else { "measured as W·L to full failure" };
        // A cohesive law's strain is a separation: its work is per unit area.
        let per = if length.is_some() { "per unit volume" } else { "per unit area" };
        let mut details = vec![
            format!(
                "damage starts to grow in increment {} after W₀ = {w0:.6e} {per}",
                walked.onset_increment
            ),
            format!("fracture energy G_f = {g:.6e} ({g_from})"),
        ];
        let Some(i) = length else {
            // A cohesive law: G_c itself must cover the energy to the onset.
            let mut r = if g >= w0 * (1.0 - tol) {
                ProbeResult::new(
                    name,
                    ProbeStatus::Pass,
                    format!(
                        "no snap-back: the fracture energy {g:.6e} exceeds the energy to the onset of softening \
                         {w0:.6e} (smallest admissible fracture energy)"
                    ),
                )
            } else if declared.is_some() {
                // The declared value is the suite's word, not a property the routine was given:
                // the failure says so (it read "the routine accepts it without a word" about a
                // value only the suite held; a user-style sweep).
                ProbeResult::new(
                    name,
                    ProbeStatus::Fail,
                    format!(
                        "the declared fracture energy {g:.6e} (the suite's fracture_energy) is below the energy \
                         to the onset of softening {w0:.6e}, the smallest admissible fracture energy: with that \
                         toughness the softening branch snaps back; if the routine's own toughness is another, \
                         declare it (or leave fracture_energy out to measure it along a path to full failure)"
                    ),
                )
            } else {
                ProbeResult::new(
                    name,
                    ProbeStatus::Fail,
                    format!(
                        "the softening branch snaps back: the fracture energy {g:.6e} is below the energy to the \
                         onset of softening {w0:.6e}, the smallest admissible fracture energy; the routine accepts \
                         it without a word"
                    ),
                )
            };
            r.value = Some(w0 / g);
            r.tol = Some(tol);
            r.details = details;
            return Ok(r);
        };
        let l_max = g / w0;
        let l = env.props[i];
        details.push(format!(
            "largest admissible length L_max = G_f/W₀ = {l_max:.6e} (2 E G_f/σ₀² for a linear response to the peak)"
        ));
        let mut r = if let Some((k, msg)) = &refused {
            details.push(format!("measured with L = {l_used:.6e}, the largest L/2^k the routine accepts"));
            let why = if l > l_max * (1.0 + tol) {
                "too large for the fracture energy: the softening branch snaps back"
            } else {
                "admissible on this path, so the routine's bound comes from another mode or is too strict"
            };
            let mut r = ProbeResult::new(
                name,
                ProbeStatus::Fail,
                format!(
                    "the routine refuses L = {l:.6e} (increment {k}: {msg}); L is {why}; largest admissible \
                     length on this path L_max = {l_max:.6e}"
                ),
            );
            r.increment = Some(*k);
            r
        } else if l > l_max * (1.0 + tol) {
            ProbeResult::new(
                name,
                ProbeStatus::Fail,
                format!(
                    "L = {l:.6e} is too large for the fracture energy: the softening branch snaps back; largest \
                     admissible length L_max = {l_max:.6e}; the routine accepts it without a word"
                ),
            )
        } else {
            // The routine must refuse a length just beyond the bound.
            let mut beyond = env.props.to_vec();
            beyond[i] = BEYOND * l_max;
            match measure(caller, env, &beyond, indices) {
                Err((k, f)) => {
                    details
                        .push(format!("at L = {:.6e} the routine refuses (increment {k}): {f}", beyond[i]));
                    ProbeResult::new(
                        name,
                        ProbeStatus::Pass,
                        format!(
                            "L = {l:.6e} is admissible: largest admissible length L_max = {l_max:.6e}, and the \
                             routine refuses {BEYOND} L_max"
                        ),
                    )
                }
                Ok(_) => ProbeResult::new(
                    name,
                    ProbeStatus::Fail,
                    format!(
                        "L = {l:.6e} is admissible (L_max = {l_max:.6e}), but the routine accepts L = {:.6e} \
                         ({BEYOND} L_max), where the softening branch snaps back, without a word",
                        beyond[i]
                    ),
                ),
            }
        };
        r.value = Some(l / l_max);
        r.tol = Some(tol);
        r.details = details;
        Ok(r)
    }
}

/// The routine refused every call the probe could try.
fn refusal(name: &str, k: usize, f: &Fault, length: Option<f64>) -> ProbeResult {
    let mut r = ProbeResult::new(
        name,
        ProbeStatus::Fail,
        match length {
            Some(l) => format!(
                "the routine fails at increment {k} with L = {l:.6e} and every L/2^k down to 2^-{HALVINGS} L: {f}"
            ),
            None => format!("the routine fails at increment {k}: {f}"),
        },
    );
    r.increment = Some(k);
    r
}
