//! The softening probe: softening is expected, not a failure, while declared damage grows.
//! At each probed increment the symmetric part of the returned tangent (Mandel form) and the
//! acoustic tensor are assessed with the stability probe's measures
//! ([`super::stability::assess`]). A negative eigenvalue of the symmetric part in an increment
//! where a declared damage variable (`"damage": [state indices]`) grows is reported as
//! information; loss of ellipticity is reported with the band normal, as the stability probe
//! does. A negative eigenvalue where no declared damage grows (elastic loading, unloading,
//! reloading below the largest load, closure) fails: a damage law that does not grow is
//! secant-like there, so softening means the tangent carries a growth term the update did
//! not take (or damage that heals, which the irreversibility probe names).
//!
//! Negative means λ_min/s < −`tol` (default 1e-10; s the largest |eigenvalue| of the symmetric
//! part): a zero eigenvalue, as in a fully failed mode whose stiffness is gone, is not
//! softening. Without `damage`: skipped with that reason.

use super::stability::{assess, probed_tangent, walk_ended, Assessment};
use super::{walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::probe::Needs;
use crate::routine::Caller;

pub struct Softening;

const DEFAULT_TOL: f64 = 1e-10;

fn vector(n: &[f64; 3]) -> String {
    format!("({:.4}, {:.4}, {:.4})", n[0], n[1], n[2])
}

/// What the walk saw at one increment.
struct Seen {
    increment: usize,
    growth: bool,
    branch: i32,
    assessment: Assessment,
    /// No declared damage grows in the increment, but a step [`FURTHER`] beyond its end along
    /// it makes one grow: the increment ends exactly where damage starts (again) to grow.
    onset: bool,
}

/// How far beyond an increment's end (relative to the strain scale) the probe looks for damage
/// starting to grow. Why 1e-7: far above the kink tolerances routines use (1e-12 of the strain
/// is common practice) and rounding, far below any increment a path would take.
const FURTHER: f64 = 1e-7;

/// Whether a step [`FURTHER`] beyond the end of the driver's increment, along it, makes a state
/// variable of `indices` grow from the increment's start (the driver is the probe's own copy).
/// An increment that ends exactly on the damage surface (a reload to the largest load so far,
/// a load to the onset) may return the loading side's tangent, which softens: the check accepts
/// either side's at such a kink (a correct damage law failed here at a reload exactly to its
/// largest equivalent strain; a user-style sweep).
fn grows_further(
    d: &mut crate::driver::Driver,
    caller: &mut Caller<'_>,
    indices: &[usize],
    step_floor: f64,
) -> Result<bool, crate::routine::Fault> {
    let size = d.dstrain().iter().fold(0.0f64, |a, x| a.max(x.abs()));
    if size == 0.0 || !size.is_finite() {
        return Ok(false);
    }
    let factor = 1.0 + FURTHER * d.strain_scale(step_floor) / size;
    let further: Vec<f64> = d.dstrain().iter().map(|x| x * factor).collect();
    let (dtemp, dtime) = (d.dtemp(), d.dtime());
    d.set_increment(&further, dtemp, dtime);
    d.base_call(caller)?;
    Ok(indices.iter().any(|&i| d.base.state[i] > d.start().state[i]))
}

impl Probe for Softening {
    fn name(&self) -> &'static str {
        "softening"
    }
    fn needs(&self) -> Needs {
        Needs::TANGENT.union(Needs::DAMAGE_INDICES)
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        self.run_checked(caller, env).map_err(CoreError::ProbeInput)
    }
}

impl Softening {
    fn run_checked(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, String> {
        let name = self.name();
        let Some(indices) = env.spec.damage.as_ref().filter(|v| !v.is_empty()) else {
            return Ok(ProbeResult::skipped(
                name,
                "no damage variables declared (\"damage\": [state indices]), so softening is not expected anywhere",
            ));
        };
        let nstate = caller.info().nstate;
        if let Some(&bad) = indices.iter().find(|&&i| i >= nstate) {
            return Err(format!(
                "softening: damage index {bad} is not a state variable (the routine has {nstate})"
            ));
        }
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let conv = caller.info().convention.clone();
        let mut seen: Vec<Seen> = Vec::new();
        let walked = walk(caller, env, |k, d, caller| {
            let Some(tangent) = probed_tangent(env, k, d)? else {
                return Ok(());
            };
            let growth = indices.iter().any(|&i| d.base.state[i] > d.start().state[i]);
            let (branch, assessment) = (d.base.outcome.branch, assess(&conv, tangent));
            let onset = !growth
                && assessment.eigen_ratio() < -tol
                && grows_further(d, caller, indices, env.settings.step_floor)?;
            seen.push(Seen { increment: k, growth, branch, assessment, onset });
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(walk_ended(name, k, &f));
        }
        if seen.is_empty() {
            return Ok(ProbeResult::skipped(name, "no increment of the path is probed (see `at`)"));
        }
        let soft = |s: &&Seen| s.assessment.eigen_ratio() < -tol;
        let expected: Vec<&Seen> = seen.iter().filter(|s| s.growth).filter(soft).collect();
        let unexpected: Vec<&Seen> = seen.iter().filter(|s| !s.growth && !s.onset).filter(soft).collect();
        let onsets: Vec<&Seen> = seen.iter().filter(|s| s.onset).collect();
        let growth = seen.iter().filter(|s| s.growth).count();
        let loss = seen.iter().find(|s| s.assessment.det_ratio().is_some_and(|q| q <= tol));
        let mut parts = Vec::new();
        match expected.first() {
            Some(s) => parts.push(format!(
                "softening during damage growth at {} of {growth} growth increment(s), from increment {} \
                 (expected, not a failure)",
                expected.len(),
                s.increment
            )),
            None if growth > 0 => {
                parts.push(format!("no softening in the {growth} increment(s) of damage growth"))
            }
            None => parts.push("declared damage does not grow on this path (a weak test)".into()),
        }
        if let Some(s) = onsets.first() {
            parts.push(format!(
                "softening at {} increment(s) that end exactly where damage starts to grow, from increment {} (a \
                 step {FURTHER:.0e} of the strain further grows it: the tangent there may be the loading side's; \
                 not a failure)",
                onsets.len(),
                s.increment
            ));
        }
        if let Some(s) = loss {
            let a = s.assessment.acoustic.expect("a loss has an acoustic tensor");
            parts.push(format!(
                "ellipticity lost at increment {}{}, band normal {} at {:.1}° from axis 1",
                s.increment,
                if s.growth { " (damage growth)" } else { "" },
                vector(&a.normal),
                a.angle_from_axis1()
            ));
        }
        let mut r = match unexpected.first() {
            None => {
                parts.push("positive semi-definite wherever damage does not grow".into());
                ProbeResult::new(name, ProbeStatus::Pass, parts.join("; "))
            }
            Some(s) => {
                let mut r = ProbeResult::new(
                    name,
                    ProbeStatus::Fail,
                    format!(
                        "the tangent softens (λmin/s = {:.3e}) at increment {} (branch {}) where no declared \
                         damage grows — {} such increment(s); {}",
                        s.assessment.eigen_ratio(),
                        s.increment,
                        s.branch,
                        unexpected.len(),
                        parts.join("; ")
                    ),
                );
                r.increment = Some(s.increment);
                r
            }
        };
        r.value = Some(seen.iter().map(|s| s.assessment.eigen_ratio()).fold(f64::INFINITY, f64::min));
        r.tol = Some(tol);
        for s in &seen {
            let mut line = format!(
                "increment {} (branch {}{}): λmin/s = {:.3e}",
                s.increment,
                s.branch,
                if s.growth {
                    ", damage grows"
                } else if s.onset {
                    ", ends where damage starts to grow"
                } else {
                    ""
                },
                s.assessment.eigen_ratio()
            );
            if let (Some(a), Some(q)) = (s.assessment.acoustic, s.assessment.det_ratio()) {
                line.push_str(&format!(", min det Q/s^{} = {q:.3e} at n = {}", a.dim, vector(&a.normal)));
            }
            r.details.push(line);
        }
        Ok(r)
    }
}
