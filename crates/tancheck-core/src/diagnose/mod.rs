//! Diagnosis of a failing check: step studies, kinks, and ranked cause hypotheses.
//!
//! A check at one step can both miss a small wrong entry and cry wolf near a kink or with
//! noisy inner solves. When a check fails, the diagnosis looks closer:
//! 1. a kink probe: forward against backward derivatives at shrinking steps;
//! 2. step studies: how the discrepancy behaves as the step shrinks;
//! 3. the verdict of the increment from both;
//! 4. for a failure, the usual causes tested one by one and ranked.

use serde::{Deserialize, Serialize};

use crate::compare::compare;
use crate::convention::Convention;
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;
use crate::settings::Settings;

pub mod causes;
pub mod kink;
pub mod study;

pub use causes::{Cause, Hypothesis, Refinement};
pub use kink::{Kink, Side};
pub use study::{Behaviour, StepStudy};

/// Fractions of the increment used to show a continuum tangent.
const REFINE: [f64; 3] = [0.125, 0.0625, 0.03125];

/// The diagnosis of one increment.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Diagnosis {
    pub kink: Option<Kink>,
    pub studies: Vec<StepStudy>,
    /// The verdict of the increment after the closer look.
    pub pass: bool,
    pub reason: String,
    /// Ranked causes of a wrong tangent (empty when it passes).
    pub causes: Vec<Hypothesis>,
    /// Ranked causes of a wrong ∂σ/∂T.
    pub dtemp_causes: Vec<Hypothesis>,
    pub refinement: Option<Refinement>,
    /// One word for what was found: the first cause's name, `kink-neither-side`, `dtemp`,
    /// or `none`.
    pub finding: String,
}

/// What the increment's checks already showed.
pub struct Context<'a> {
    pub returned: &'a [f64],
    /// ∂σ/∂T returned and its numerical estimate, when the ∂σ/∂T check failed.
    pub dtemp: Option<(&'a [f64], &'a [f64])>,
    /// Whether the complex-step check ran and passed.
    pub complex_pass: Option<bool>,
    /// Whether every tangent check passed (the failure is only in ∂σ/∂T).
    pub tangent_checks_pass: bool,
    pub previous: Option<&'a [f64]>,
    pub state_changed: bool,
    pub reported_branch: i32,
    pub has_twin: bool,
    /// The smallest tolerance among the tangent checks that failed: a step study clears the
    /// increment only when it reaches that (a forward study at its own, looser tolerance must
    /// not clear a failed central check).
    pub failed_tol: f64,
}

fn tangent(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    scheme: Scheme,
    h: f64,
    out: &mut [f64],
) -> Result<(), Fault> {
    let n = driver.ncomp();
    for j in 0..n {
        scheme.column(driver, caller, Direction::Strain(j), h, &mut out[j * n..(j + 1) * n])?;
    }
    Ok(())
}

/// Diagnose the current increment of `driver` (its base call made).
pub fn run(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &Convention,
    ctx: &Context<'_>,
    settings: &Settings,
) -> Result<Diagnosis, Fault> {
    let n = conv.ncomp();
    let ef = settings.entry_floor;
    let scale = driver.strain_scale(settings.step_floor);
    let kink = kink::probe(driver, caller, conv, ctx.returned, scale, settings.forward.tol, ef)?;
    let mut studies = Vec::new();
    for scheme in [Scheme::Central, Scheme::Forward] {
        let tol = settings.scheme(scheme).tol;
        studies.push(study::run(driver, caller, conv, ctx.returned, scheme, scale, tol, ef)?);
    }
    let clears = |s: &StepStudy| s.behaviour == Behaviour::Converges && s.best_error <= ctx.failed_tol;
    let fd_converges = studies.iter().any(clears);

    let (mut pass, mut reason) = if kink.detected {
        match kink.returned_matches {
            Side::Neither => (
                false,
                "the point sits on a kink and the returned tangent matches neither one-sided derivative"
                    .to_string(),
            ),
            side => (
                true,
                format!(
                    "the point sits on a kink; the returned tangent is the {} derivative",
                    if side == Side::Forward { "forward (right-hand)" } else { "backward (left-hand)" }
                ),
            ),
        }
    } else if fd_converges && ctx.complex_pass != Some(false) {
        let s = studies.iter().find(|s| clears(s)).expect("one converges");
        (true, format!("the {} difference converges to the returned tangent (error {:.2e} at relative step {:.0e}); the default step was poor for this routine", s.scheme.name(), s.best_error, s.best_rel_step))
    } else if fd_converges {
        (false, "finite differences converge to the returned tangent but the complex twin disagrees: is the twin complex-step safe (real-part comparisons, no conjugates, abs/max/min on real parts)?".to_string())
    } else {
        let plateau = studies.iter().find_map(|s| s.plateau);
        (false, match plateau {
            Some(p) => format!("the discrepancy levels off at {p:.2e} as the step shrinks: the returned tangent is not the derivative"),
            None => "no step brings the difference approximation to the returned tangent".to_string(),
        })
    };
    if ctx.complex_pass == Some(true) && !kink.detected {
        // The complex step is exact to rounding for complex-step-safe code.
        pass = true;
        reason = "the complex-step derivative equals the returned tangent".to_string();
    }
    let mut dtemp_causes = Vec::new();
    if let Some((ret, num)) = ctx.dtemp {
        dtemp_causes = causes::rank_dtemp(conv, ret, num, settings.central.tol, ef);
        if ctx.tangent_checks_pass || pass {
            pass = false;
            reason =
                "∂σ/∂T differs from the derivative of the stress with respect to the temperature increment"
                    .into();
        }
    }

    let mut causes = Vec::new();
    let mut refinement = None;
    let only_dtemp = ctx.tangent_checks_pass && ctx.dtemp.is_some();
    if !pass && !only_dtemp {
        // The best numerical tangent at the full increment.
        let mut num = vec![0.0; n * n];
        if kink.detected {
            num.copy_from_slice(if kink.forward_error <= kink.backward_error {
                &kink.forward
            } else {
                &kink.backward
            });
        } else if ctx.has_twin {
            tangent(driver, caller, Scheme::ComplexStep, settings.complex_step.rel_step * scale, &mut num)?;
        } else {
            let rel = studies[0].best_rel_step;
            let rel = if rel.is_finite() { rel } else { settings.central.rel_step };
            tangent(driver, caller, Scheme::Central, rel * scale, &mut num)?;
        }
        let best = |driver: &mut Driver, caller: &mut Caller<'_>, out: &mut [f64]| {
            let sc = driver.strain_scale(settings.step_floor);
            if ctx.has_twin {
                tangent(driver, caller, Scheme::ComplexStep, settings.complex_step.rel_step * sc, out)
            } else {
                tangent(driver, caller, Scheme::Central, settings.central.rel_step * sc, out)
            }
        };
        let strain_end: Vec<f64> =
            driver.start().strain.iter().zip(driver.dstrain()).map(|(a, b)| a + b).collect();
        let stress_end = driver.base.stress.clone();
        // The elastic tangent: the derivative along an unloading step from the start state.
        let mut elastic = vec![0.0; n * n];
        driver.rescale(-0.5);
        let elastic_ok = driver.base_call(caller).is_ok() && best(driver, caller, &mut elastic).is_ok();
        // The discrepancy at smaller increments.
        let mut errors = Vec::new();
        let mut same_branch = true;
        let mut num_s = vec![0.0; n * n];
        for s in REFINE {
            driver.rescale(s);
            if driver.base_call(caller).is_err() {
                same_branch = false;
                break;
            }
            let changed = driver.base.state.iter().zip(&driver.start().state).any(|(a, b)| a != b);
            same_branch &= driver.base.outcome.branch == ctx.reported_branch && changed == ctx.state_changed;
            let ret = driver.base.tangent.clone();
            if best(driver, caller, &mut num_s).is_err() {
                same_branch = false;
                break;
            }
            let c = compare(conv, &ret, &num_s, 1.0, ef, 0);
            errors.push(c.norm_error.max(c.worst_entry_error));
        }
        driver.rescale(1.0);
        driver.base_call(caller)?;
        let rf = Refinement { fractions: REFINE[..errors.len()].to_vec(), errors, same_branch };
        let tol = if ctx.has_twin { settings.complex_step.tol } else { settings.central.tol };
        let ev = causes::Evidence {
            conv,
            returned: ctx.returned,
            numerical: &num,
            elastic: elastic_ok.then_some(&elastic[..]),
            previous: ctx.previous,
            refinement: Some(&rf),
            strain_end: &strain_end,
            stress_end: &stress_end,
            state_changed: ctx.state_changed,
            tol: tol.max(1e-9),
            entry_floor: ef,
        };
        causes = causes::rank(&ev);
        refinement = Some(rf);
    }
    let finding = if pass {
        "none".to_string()
    } else if kink.detected && kink.returned_matches == Side::Neither {
        "kink-neither-side".to_string()
    } else if ctx.dtemp.is_some() && (ctx.tangent_checks_pass || causes.is_empty()) {
        "dtemp".to_string()
    } else {
        causes.iter().find(|h| h.explains).map_or("unexplained".to_string(), |h| h.cause.name().to_string())
    };
    Ok(Diagnosis { kink: Some(kink), studies, pass, reason, causes, dtemp_causes, refinement, finding })
}
