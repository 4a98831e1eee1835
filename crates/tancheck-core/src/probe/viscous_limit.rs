//! The viscous-limit probe: a routine with viscous regularisation (a viscosity property,
//! `"viscosity": property index`) must converge to its rate-independent update as the
//! viscosity goes to zero, and its tangent must be the consistent one at every viscosity —
//! the viscous tangent depends on the time increment (Duvaut–Lions type, backward Euler:
//! the growth term carries Δt/(η + Δt); REFERENCES.md, "softening regularisation").
//!
//! The path is walked with η = 0 (the reference) and with η = η₀, η₀/10, …, η₀/10⁴, where
//! η₀ is the declared value or, when that is 0, the largest time increment of the path; while
//! the difference is still above `tol` and falls steadily, further decades follow, down to
//! η₀/10¹⁰ (an overstress exponent m converges as η^(1/m): slowly, but surely). At
//! each level the largest stress difference from the reference, relative to the largest
//! reference stress, must not grow as η falls, and at the smallest level it must be at most
//! `tol` (default 1e-3: backward Euler leaves a difference of order η/Δt). At each level,
//! the reference included, the tangent check of [`crate::check`] runs along the path with its
//! time increments (at the increments of `at`). Without `viscosity`, or on a path without time
//! increments: skipped with the reason.

use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::check;
use crate::error::CoreError;
use crate::probe::Needs;
use crate::routine::{Caller, Fault};
use crate::Verdict;

pub struct ViscousLimit;

const DEFAULT_TOL: f64 = 1e-3;
/// Viscosity levels below η₀, each a tenth of the one before.
const LEVELS: i32 = 4;
/// Levels at most, while the difference falls steadily and is still above the tolerance.
const MAX_LEVELS: i32 = 10;

/// The differences of the last three levels each fall by at least a factor 1.5 a decade (a
/// convergence of order 0.18 or more; η^(1/m) for an overstress exponent m up to 5 falls by
/// 1.58 a decade).
fn falling_steadily(diffs: &[(f64, f64)]) -> bool {
    diffs.len() >= 3 && diffs[diffs.len() - 3..].windows(2).all(|w| w[1].1 > 0.0 && w[0].1 >= 1.5 * w[1].1)
}

/// The stress at the end of every increment of the path with `props`.
fn stresses(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
    props: &[f64],
) -> Result<Vec<Vec<f64>>, (usize, Fault)> {
    let env2 = ProbeEnv { props, ..*env };
    let mut out = Vec::with_capacity(env.path.increments.len());
    walk(caller, &env2, |_, d, _| {
        out.push(d.base.stress.clone());
        Ok(())
    })?;
    Ok(out)
}

fn norm(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum::<f64>().sqrt()
}

impl Probe for ViscousLimit {
    fn name(&self) -> &'static str {
        "viscous-limit"
    }
    fn needs(&self) -> Needs {
        Needs::TANGENT
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        self.run_checked(caller, env).map_err(CoreError::ProbeInput)
    }
}

impl ViscousLimit {
    fn run_checked(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, String> {
        let name = self.name();
        let Some(iv) = env.spec.viscosity else {
            return Ok(ProbeResult::skipped(
                name,
                "no viscosity declared (\"viscosity\": property index): the routine is taken as rate independent",
            ));
        };
        if iv >= env.props.len() || !env.props[iv].is_finite() || env.props[iv] < 0.0 {
            return Err(format!(
                "viscous-limit: \"viscosity\" {iv} is not a property holding a viscosity >= 0 (the routine has {} properties)",
                env.props.len()
            ));
        }
        let dt = env.path.increments.iter().map(|i| i.dtime).fold(0.0, f64::max);
        if dt <= 0.0 {
            return Ok(ProbeResult::skipped(
                name,
                "the path has no time increments (dtime), so a viscosity has no effect",
            ));
        }
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let eta0 = if env.props[iv] > 0.0 { env.props[iv] } else { dt };
        let with_eta = |eta: f64| {
            let mut p = env.props.to_vec();
            p[iv] = eta;
            p
        };
        let reference = match stresses(caller, env, &with_eta(0.0)) {
            Ok(s) => s,
            Err((k, f)) => return Ok(faulted(name, k, &f)),
        };
        let scale = reference.iter().map(|s| norm(s)).fold(0.0, f64::max).max(f64::MIN_POSITIVE);
        let mut details = vec![format!("reference: η = 0; largest stress {scale:.6e}")];
        // Tangent check at every level, the reference included.
        let mut tangent_trouble: Option<String> = None;
        let mut diffs: Vec<(f64, f64)> = Vec::new();
        // Level −1 is the reference (η = 0); the levels go on past LEVELS while the difference
        // is above the tolerance and falls steadily (a slow but sure convergence, as a
        // Perzyna overstress with exponent m gives, η^(1/m)), up to MAX_LEVELS.
        let mut level: i32 = -1;
        loop {
            let eta = if level < 0 { 0.0 } else { eta0 * 10f64.powi(-level) };
            let props = with_eta(eta);
            if eta > 0.0 {
                let s = match stresses(caller, env, &props) {
                    Ok(s) => s,
                    Err((k, f)) => {
                        let mut r = faulted(name, k, &f);
                        r.summary = format!("at η = {eta:.3e}: {}", r.summary);
                        return Ok(r);
                    }
                };
                let e = s
                    .iter()
                    .zip(&reference)
                    .map(|(a, b)| a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt())
                    .fold(0.0, f64::max)
                    / scale;
                diffs.push((eta, e));
            }
            let report = check::run(caller, &props, env.start.clone(), env.path, env.settings)
                .map_err(|e| e.to_string())?;
            let failed: Vec<_> =
                report.increments.iter().filter(|i| env.spec.runs_at(i.index) && !i.passed()).collect();
            let line = if report.verdict == Verdict::RoutineFault {
                let what = report.first_fault().map_or_else(String::new, |f| f.message.clone());
                format!("η = {eta:.3e}: the routine failed during the tangent check: {what}")
            } else if failed.is_empty() {
                format!("η = {eta:.3e}: tangent consistent along the path")
            } else {
                format!(
                    "η = {eta:.3e}: tangent wrong at {} increment(s), first {}; finding: {}",
                    failed.len(),
                    failed[0].index,
                    report.finding()
                )
            };
            if tangent_trouble.is_none() && (report.verdict == Verdict::RoutineFault || !failed.is_empty()) {
                tangent_trouble = Some(line.clone());
            }
            details.push(line);
            level += 1;
            let above = diffs.last().is_some_and(|&(_, e)| e > tol);
            if level > LEVELS && !(level <= MAX_LEVELS && above && falling_steadily(&diffs)) {
                break;
            }
        }
        for (eta, e) in &diffs {
            details.push(format!("η = {eta:.3e}: stress differs from the reference by {e:.3e}"));
        }
        let rising = diffs.windows(2).find_map(|w| {
            let ((_, e0), (eta1, e1)) = (w[0], w[1]);
            (e1 > e0 * (1.0 + 1e-6) + 1e-13).then_some((eta1, e0, e1))
        });
        let (eta_min, e_min) = *diffs.last().expect("levels");
        let rate = diffs
            .iter()
            .rev()
            .nth(1)
            .filter(|(_, e)| *e > 0.0 && e_min > 0.0)
            .map(|(_, e)| (e / e_min).log10());
        let mut problems = Vec::new();
        if let Some((eta, e0, e1)) = rising {
            problems.push(format!(
                "the stress moves away from the rate-independent one as η falls (difference {e0:.3e}, then {e1:.3e} at η = {eta:.3e})"
            ));
        }
        if e_min > tol && falling_steadily(&diffs) {
            problems.push(format!(
                "the stress converges to the rate-independent one only slowly ({} per decade of η) and at \
                 η = {eta_min:.3e}, {} decades below η₀, still differs from it by {e_min:.3e} (> {tol:.1e})",
                rate.map_or_else(|| "-".into(), |p| format!("order {p:.2}")),
                MAX_LEVELS
            ));
        } else if e_min > tol {
            problems.push(format!(
                "at η = {eta_min:.3e} the stress still differs from the rate-independent one by {e_min:.3e} \
                 (> {tol:.1e}): the update does not converge to the rate-independent limit"
            ));
        }
        if let Some(t) = &tangent_trouble {
            problems.push(format!("the tangent is not consistent at every viscosity ({t})"));
        }
        let mut r = if problems.is_empty() {
            ProbeResult::new(
                name,
                ProbeStatus::Pass,
                format!(
                    "converges to the rate-independent update (difference {e_min:.2e} at η = {eta_min:.2e}{}) \
                     and the tangent is consistent at η = 0 and {} viscosities",
                    rate.map_or_else(String::new, |p| format!(", order {p:.2} per decade")),
                    diffs.len()
                ),
            )
        } else {
            ProbeResult::new(name, ProbeStatus::Fail, problems.join("; "))
        };
        r.value = Some(e_min);
        r.tol = Some(tol);
        r.details = details;
        Ok(r)
    }
}
