//! The energy probe: elastic cycles do no net work, dissipation never decreases, and the
//! reported energies agree with the work done.
//! - Closed elastic cycles (a small square loop in every pair of components from the start
//!   state) do no net work: |∮σ·dε| ≤ 1e-10 of the work done on the way (trapezoid rule, exact for a
//!   linear response).
//! - Dissipation is never negative (Clausius–Duhem): the dissipated energy a routine reports
//!   never decreases along the path.
//! - Reported energies agree with the work: ΔΨ + ΔD = ∫σ·dε over each increment (Simpson's
//!   rule over the increment's own straight strain path from its start; default tolerance
//!   1e-4 of the energy scale), at isothermal increments.
//!
//! Work uses the work-conjugate dot product of the routine's convention (a tensor shear
//! component counts twice).

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::routine::{provides, Caller, Fault};
use crate::ShearMeasure;

pub struct Energy;

fn dot(w: &[f64], s: &[f64], e: &[f64]) -> f64 {
    w.iter().zip(s).zip(e).map(|((w, s), e)| w * s * e).sum()
}

/// ∫₀¹ σ(s·Δε)·Δε ds over the current increment by Simpson's rule (calls from the start).
/// The call at s is the fraction s of the increment at its rates: s·Δε in s·Δt (and s·ΔT).
/// With the whole Δt for s·Δε, a rate-dependent routine's stress along the way was that of
/// slower loading, and a correct viscoelastic routine's exact energies read as a mismatch of
/// 3e-2 (a user-style sweep).
fn work_along(d: &mut Driver, c: &mut Caller<'_>, w: &[f64], n: usize) -> Result<f64, Fault> {
    let full = d.dstrain().to_vec();
    let mut sum = 0.0;
    for k in 0..=n {
        let s = k as f64 / n as f64;
        d.rescale(s);
        d.base_call(c)?;
        let f = dot(w, &d.base.stress, &full);
        let weight = if k == 0 || k == n {
            1.0
        } else if k % 2 == 1 {
            4.0
        } else {
            2.0
        };
        sum += weight * f;
    }
    d.rescale(1.0);
    d.base_call(c)?;
    Ok(sum / (3.0 * n as f64))
}

/// What a closed cycle found: the net work relative to the work done on the way (trapezoid
/// rule), whether the state variables stayed as they started at every step (an elastic
/// cycle), and, where the cycle started from the routine's own stress instead of the start
/// stress given, the largest entry of that stress.
struct Cycle {
    net: f64,
    elastic: bool,
    own_start: Option<f64>,
    /// The two components of the loop whose net work is the largest.
    pair: (&'static str, &'static str),
}

/// The name of a path slot for a point of `kind`.
fn slot_label(kind: crate::PointKind, slot: usize) -> &'static str {
    if kind.is_cohesive() {
        ["n", "s1", "s2"].get(slot).copied().unwrap_or("?")
    } else {
        crate::path::SLOT_NAMES.get(slot).copied().unwrap_or("?")
    }
}

/// Closed cycles of amplitude `a` from the start, one square loop in every pair of the
/// kind's components: the worst loop's net work. A law with a stored-energy function does no
/// net work around any of them; a stress that is no derivative of one (a coupling of two
/// components that is not mutual) does around the loop in those two. A loop in the first two
/// components alone missed a law whose σ12 depended on ε11 without σ11 depending on γ12 (a
/// user-style sweep): it is the pair's own loop that encloses the work.
fn closed_cycles(
    caller: &mut Caller<'_>,
    info: &crate::routine::RoutineInfo,
    env: &ProbeEnv<'_>,
    w: &[f64],
    a: f64,
) -> Result<Cycle, Fault> {
    let kind = info.convention.kind();
    let slots = kind.path_slots();
    let mut worst: Option<Cycle> = None;
    let mut elastic = true;
    for (k, &p) in slots.iter().enumerate() {
        for &q in &slots[k + 1..] {
            let mut c = closed_cycle(caller, info, env, w, a, (p, q))?;
            elastic &= c.elastic;
            c.pair = (slot_label(kind, p), slot_label(kind, q));
            if worst.as_ref().is_none_or(|x| c.net > x.net) {
                worst = Some(c);
            }
        }
    }
    let mut c = worst.unwrap_or(Cycle { net: 0.0, elastic: true, own_start: None, pair: ("", "") });
    c.elastic = elastic;
    Ok(c)
}

/// A closed cycle of amplitude `a` in the components `pair` (path slots) from the start.
///
/// A start stress of zero that the routine does not return for a zero increment from the start
/// (a total-form thermal law at a start temperature away from its reference holds a thermal
/// stress there) is replaced by the routine's own, when the zero increment leaves the state
/// variables as they were: else the first step's work counts the mismatch (a correct law failed
/// so; a user-style sweep). The zero-increment probe says what to give as the start.
fn closed_cycle(
    caller: &mut Caller<'_>,
    info: &crate::routine::RoutineInfo,
    env: &ProbeEnv<'_>,
    w: &[f64],
    a: f64,
    pair: (usize, usize),
) -> Result<Cycle, Fault> {
    let conv = &info.convention;
    let n = conv.ncomp();
    let fresh =
        || Driver::new(info, env.props, env.start.clone()).map_err(|e| Fault::Unsupported(e.to_string()));
    let mut d = fresh()?;
    let mut own_start = None;
    if env.start.stress.iter().all(|&x| x == 0.0) {
        d.set_increment(&vec![0.0; n], 0.0, 1.0);
        d.base_call(caller)?;
        let largest = d.base.stress.iter().fold(0.0f64, |m, x| m.max(x.abs()));
        if largest > 0.0 && largest.is_finite() && d.base.state == env.start.state {
            own_start = Some(largest);
            d.advance();
        } else {
            d = fresh()?;
        }
    }
    let (mut net, mut gross) = (0.0, 0.0);
    let mut elastic = true;
    let legs = [(pair.0, 1.0), (pair.1, 1.0), (pair.0, -1.0), (pair.1, -1.0)];
    let steps = 8;
    for (comp, sign) in legs {
        let mut canon = [0.0; 6];
        canon[comp] = sign * a / steps as f64;
        let mut de = vec![0.0; n];
        conv.strain_from_canonical(&canon, &mut de);
        for _ in 0..steps {
            d.set_increment(&de, 0.0, 1.0);
            d.base_call(caller)?;
            elastic &= d.base.state == env.start.state;
            let s0 = d.start().stress.clone();
            let dw = 0.5 * (dot(w, &s0, &de) + dot(w, &d.base.stress, &de));
            net += dw;
            gross += dw.abs();
            d.advance();
        }
    }
    Ok(Cycle { net: if gross > 0.0 { net.abs() / gross } else { 0.0 }, elastic, own_start, pair: ("", "") })
}

impl Probe for Energy {
    fn name(&self) -> &'static str {
        "energy"
    }
    fn needs(&self) -> Needs {
        // The energy outputs are read where a call fills them in (Outcome::provides); the
        // stress-update parts run without them.
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let info = caller.info().clone();
        let conv = info.convention.clone();
        let w: Vec<f64> = conv
            .order()
            .iter()
            .map(|c| if c.is_shear() && conv.shear() == ShearMeasure::Tensor { 2.0 } else { 1.0 })
            .collect();
        let mut details = Vec::new();
        let mut fail: Option<(usize, String)> = None;

        // 1. The closed elastic cycle from the start state. It must stay elastic: when a state
        // variable changes on the way (a stiff law whose elastic range is smaller than the
        // amplitude, e.g. a cohesive penalty of 1e8 N/mm³ with onset below 1e-6 mm), the
        // amplitude is cut by 10 and the cycle run again, up to 8 times.
        let asked = env.spec.amplitude.unwrap_or(1e-5);
        let mut a = asked;
        let mut cycle = 0.0;
        let mut elastic = false;
        let mut own_start = None;
        let mut pair = ("", "");
        for _ in 0..=8 {
            match closed_cycles(caller, &info, env, &w, a) {
                Err(f) => {
                    return Ok(super::faulted_in(
                        "energy",
                        "in the closed elastic cycle from the start state",
                        &f,
                    ))
                }
                Ok(c) => {
                    cycle = c.net;
                    elastic = c.elastic;
                    own_start = c.own_start;
                    pair = c.pair;
                }
            }
            if elastic {
                break;
            }
            a /= 10.0;
        }
        if !elastic {
            a *= 10.0;
        }
        if let Some(largest) = own_start {
            details.push(format!(
                "the start stress given is zero, and a zero increment from the start gives another (largest \
                 entry {largest:.3e}): the cycle starts from the routine's own stress at the start (a total-form \
                 law away from its reference temperature holds a thermal stress there; see the zero-increment \
                 probe)"
            ));
        }
        if elastic {
            let loops = if pair.0.is_empty() {
                "one component: no loop to close".to_string()
            } else {
                format!("a loop in every pair of components, the most in {} and {}", pair.0, pair.1)
            };
            details.push(format!(
                "closed elastic cycles of amplitude {a:.3e}{} ({loops}): net work {cycle:.2e} of the work done",
                if a != asked {
                    format!(" (cut from {asked:.3e} so that the state variables stay put)")
                } else {
                    String::new()
                }
            ));
            // Why 1e-10: the trapezoid rule is exact for a linear response, so only rounding of
            // the sums (well under 1e-12 of the work) is left; 1e-10 keeps a margin of 100.
            if cycle > 1e-10 {
                fail = Some((
                    0,
                    format!(
                        "a closed elastic cycle in {} and {} does net work {cycle:.2e} of the work done on the way: \
                         the stress is no derivative of a stored energy (a coupling of the two that is not \
                         mutual; the symmetry probe shows the tangent's unsymmetric part)",
                        pair.0, pair.1
                    ),
                ));
            }
        } else {
            details.push(format!(
                "the state variables changed at every amplitude down to {a:.3e} (from {asked:.3e}): no closed \
                 cycle is elastic here, and the net work of one is not checked"
            ));
        }

        // 2 and 3. Along the path.
        let tol = env.spec.tol.unwrap_or(1e-4);
        let mut reports = true;
        let mut prev_diss: Option<f64> = None;
        let mut prev_stored: Option<f64> = None;
        let mut worst_balance = 0.0f64;
        let mut scale = 0.0f64;
        // For the plot: the work done along the path beside the reported stored and dissipated
        // energies: in each increment whose balance is judged the work the balance used
        // (Simpson's rule within the increment), elsewhere the trapezoid rule (no extra calls).
        // The trapezoid rule alone drew a gap of 1.5 % on a routine whose balance held to
        // 1e-10 (a user-style sweep).
        let (mut work, mut work_curve, mut stored_curve, mut diss_curve) =
            (0.0, Vec::new(), Vec::new(), Vec::new());
        let walked = walk(caller, env, |k, d, c| {
            let trapezoid =
                0.5 * (dot(&w, &d.start().stress, d.dstrain()) + dot(&w, &d.base.stress, d.dstrain()));
            if !d.base.outcome.provides(provides::ENERGY) {
                work += trapezoid;
                work_curve.push([k as f64, work]);
                reports = false;
                return Ok(());
            }
            let (stored, diss) = (d.base.energy[0], d.base.energy[1]);
            stored_curve.push([k as f64, stored]);
            diss_curve.push([k as f64, diss]);
            scale = scale.max(stored.abs()).max(diss.abs());
            if let Some(p) = prev_diss {
                // Why 1e-12 of the energy scale: rounding of a sum of energies; a real decrease
                // of dissipation is far larger.
                if diss < p - 1e-12 * scale.max(1e-300) && fail.is_none() {
                    fail = Some((
                        k,
                        format!("the dissipated energy decreases at increment {k}: {p:e} to {diss:e}"),
                    ));
                }
            }
            // The balance holds for isothermal increments; heating changes the stored energy
            // without mechanical work.
            let mut increment_work = trapezoid;
            if env.spec.runs_at(k) && d.dtemp() == 0.0 {
                if let (Some(s0), Some(d0)) = (prev_stored, prev_diss) {
                    let change = stored - s0 + diss - d0;
                    increment_work = work_along(d, c, &w, 16)?;
                    let mut bal = (change - increment_work).abs();
                    // Simpson's rule over a kink inside the increment (yield, damage onset)
                    // converges only as the square of the interval: look again with finer ones
                    // before calling a mismatch.
                    if bal > 0.1 * tol * scale {
                        increment_work = work_along(d, c, &w, 256)?;
                        bal = (change - increment_work).abs();
                    }
                    worst_balance = worst_balance.max(bal);
                }
            }
            work += increment_work;
            work_curve.push([k as f64, work]);
            prev_diss = Some(diss);
            prev_stored = Some(stored);
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("energy", k, &f));
        }
        if reports {
            let rel = worst_balance / scale.max(1e-300);
            details.push(format!(
                "energy balance ΔΨ + ΔD = ∫σ·dε: worst mismatch {rel:.2e} of the energy scale"
            ));
            if rel > tol && fail.is_none() {
                fail = Some((
                    0,
                    format!("reported energies disagree with the work by {rel:.2e} of the energy scale"),
                ));
            }
        } else {
            details
                .push("the routine reports no energies: dissipation and energy balance not checked".into());
        }
        let mut r = match &fail {
            None => ProbeResult::new("energy", ProbeStatus::Pass, {
                // A cycle that never stayed elastic was not judged: the summary says so
                // instead of quoting its net work.
                let closed = if elastic {
                    format!("closed cycle {cycle:.1e}")
                } else {
                    "no elastic cycle to close".into()
                };
                if reports {
                    format!("{closed}; dissipation never negative; energies match the work")
                } else {
                    format!("{closed}; no energies reported (dissipation not checked)")
                }
            }),
            Some((k, why)) => {
                let mut r = ProbeResult::new("energy", ProbeStatus::Fail, why.clone());
                r.increment = (*k > 0).then_some(*k);
                r
            }
        };
        r.value = Some(cycle);
        r.details = details;
        let curve = |name: &str, points: Vec<[f64; 2]>| super::ProbeSeries {
            name: name.into(),
            x: "increment".into(),
            y: "energy per unit volume".into(),
            log_y: false,
            points,
        };
        if reports && !stored_curve.is_empty() && !work_curve.is_empty() {
            // The start energies are not reported: match the sum to the work at increment 1.
            let offset = work_curve[0][1] - stored_curve[0][1] - diss_curve[0][1];
            let total: Vec<[f64; 2]> =
                stored_curve.iter().zip(&diss_curve).map(|(s, d)| [s[0], s[1] + d[1] + offset]).collect();
            r.series.push(curve("Ψ + D reported (matched to the work at increment 1)", total));
            r.series.push(curve("dissipated D reported", diss_curve));
        }
        r.series.push(curve(
            "work ∫σ·dε (as the balance is judged: Simpson's rule within each increment)",
            work_curve,
        ));
        Ok(r)
    }
}
