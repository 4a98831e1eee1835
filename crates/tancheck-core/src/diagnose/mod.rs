//! Diagnosis of a failing check: step studies, kinks, and ranked cause hypotheses.
//!
//! A check at one step can both miss a small wrong entry and cry wolf near a kink or with
//! noisy inner solves. When a check fails, the diagnosis looks closer:
//! 1. a kink probe: forward against backward derivatives at shrinking steps;
//! 2. step studies: how the discrepancy behaves as the step shrinks;
//! 3. the twin: its real part against the real outputs, its derivative against the real schemes;
//! 4. for a failure, the usual causes tested one by one and ranked.
//!
//! The routine calls only collect evidence; [`decide::decide`] (no I/O, no routine calls)
//! turns it into the finding.

use serde::{Deserialize, Serialize};

use crate::compare::{compare, compare_along, compare_dtemp_floor};
use crate::convention::Convention;
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;
use crate::settings::Settings;

pub mod causes;
pub mod corner;
pub mod decide;
mod dtemp_start;
pub mod kink;
mod refine;
pub mod settle;
mod stiffness;
use stiffness::{elastic_at_end, initial_stiffness};
pub mod study;
pub mod temp_kink;

pub use causes::{Cause, Hypothesis, Refinement};
pub use decide::{decide, Decision, Observed, TwinEvidence, NON_FINITE_FINDING, TWIN_FINDING};
pub use kink::{Kink, KinkColumn, Side};
pub use study::{Behaviour, StepStudy};
pub use temp_kink::TempKink;

/// Fractions of the increment used to show a continuum tangent.
const REFINE: [f64; 3] = [0.125, 0.0625, 0.03125];

/// The diagnosis of one increment.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
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
    /// `dtemp-partial`, `twin-not-complex-step-safe`, `non-finite-derivative`, `unexplained` or
    /// `none`.
    pub finding: String,
    /// The complex-step twin is not complex-step safe: its results were set aside.
    #[serde(default)]
    pub twin_unsafe: bool,
}

impl Diagnosis {
    /// The closer look given up because the routine refused one of its calls with a status
    /// (`refusal`, with the call): a step far larger than the check's, or an increment off the
    /// path, that the routine may well refuse as a solver's cut-back. The checks stand; no
    /// cause is named.
    pub fn stopped(refusal: &str) -> Diagnosis {
        Diagnosis {
            kink: None,
            studies: Vec::new(),
            pass: false,
            reason: format!(
                "the closer look stopped: {refusal}; the routine may refuse such a call (a larger step or \
                 an increment off the path), so it is no fault, and the failed checks stand"
            ),
            causes: Vec::new(),
            dtemp_causes: Vec::new(),
            refinement: None,
            finding: "unexplained".into(),
            twin_unsafe: false,
        }
    }
}

/// What the increment's checks already showed.
pub struct Context<'a> {
    pub returned: &'a [f64],
    /// ∂σ/∂T returned and its numerical estimate, when the ∂σ/∂T check failed.
    pub dtemp: Option<(&'a [f64], &'a [f64])>,
    /// The complex-step ∂σ/∂T check, when it ran: its error and tolerance.
    pub dtemp_complex: Option<(f64, f64)>,
    /// The absolute floor of the ∂σ/∂T comparison ([`crate::compare::dtemp_floor`]).
    pub dtemp_floor: f64,
    /// The complex-step check, when it ran: its error and tolerance.
    pub complex: Option<(f64, f64)>,
    /// The closest real scheme's ∂σ/∂T check, when one ran: its error and tolerance.
    pub dtemp_real: Option<(f64, f64)>,
    /// The largest gap between the twin's real part and the real stress over the increment's
    /// complex calls, relative to the stress scale.
    pub twin_real_gap: Option<f64>,
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
    /// Where a real scheme's perturbed calls at the default step returned stresses that are
    /// not finite numbers, the base call's being finite ([`decide::Observed::non_finite_quotient`]).
    pub non_finite_quotient: Option<String>,
}

/// Every strain column of `scheme` at step `h` into `out` (column-major, n × n).
pub(crate) fn tangent(
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

/// Diagnose the current increment of `driver` (its base call made): collect the evidence
/// with routine calls, then let [`decide::decide`] find.
pub fn run(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &Convention,
    ctx: &Context<'_>,
    settings: &Settings,
) -> Result<Diagnosis, Fault> {
    let n = conv.ncomp();
    let ef = settings.entry_floor;
    repeats(driver, caller)?;
    let scale = driver.strain_scale(settings.step_floor);
    let norm = |v: &[f64]| v.iter().map(|x| x * x).sum::<f64>().sqrt();
    let stress_size = norm(&driver.base.stress) + norm(ctx.returned) * scale;
    let query = |returned, scale| kink::KinkQuery {
        conv,
        returned,
        scale,
        tol: settings.forward.tol,
        entry_floor: ef,
        stress_size,
    };
    let mut kink = kink::probe(driver, caller, &query(ctx.returned, scale))?;
    // A column on neither side of its kink: the point may be a corner, whose branch the
    // returned tangent belongs to lies along another direction.
    if kink.detected && kink.columns.iter().any(|c| c.matches == Side::Neither) {
        kink.corner = corner::search(driver, caller, &query(ctx.returned, scale));
    }
    let mut studies = Vec::new();
    for scheme in [Scheme::Central, Scheme::Forward] {
        let tol = settings.scheme(scheme).tol;
        studies.push(study::run(driver, caller, conv, ctx.returned, scheme, scale, tol, ef)?);
    }
    // The twin against the cleanest real reference (Richardson at a moderate step), away from
    // a kink, when the complex step disagreed with the returned tangent.
    let mut twin = None;
    let mut richardson: Option<Vec<f64>> = None;
    if ctx.has_twin && ctx.complex.is_some() {
        let mut derivative_gap = None;
        if !kink.detected && ctx.complex.is_some_and(|(e, tol)| e > tol) {
            let mut cs = vec![0.0; n * n];
            let mut rich = vec![0.0; n * n];
            tangent(driver, caller, Scheme::ComplexStep, settings.complex_step.rel_step * scale, &mut cs)?;
            tangent(driver, caller, Scheme::Richardson, settings.richardson.rel_step * scale, &mut rich)?;
            // Measured as the check measured the returned tangent against the complex step:
            // along the complex tangent's own soft directions and the increment's direction,
            // relative to its response there. A twin that is off makes its tangent soft where the true one is not, and
            // the check's error is largest along such a direction; measured along the real
            // reference's directions the twin's gap looked small beside it.
            let limits = crate::compare::Limits::new(1.0, ef, 0);
            derivative_gap = Some(compare_along(conv, &rich, &cs, limits, Some(driver.dstrain())).error());
            richardson = Some(rich);
        }
        twin = Some(decide::TwinEvidence { real_part_gap: ctx.twin_real_gap.unwrap_or(0.0), derivative_gap });
    }
    // A failed ∂σ/∂T check: probe for a kink in the temperature; at one, the causes are
    // ranked against the closer one-sided derivative, not the straddling difference.
    let dtemp_kink = match ctx.dtemp {
        Some((ret, _)) => {
            let ts = driver.temp_scale(settings.temp_floor);
            Some(temp_kink::probe(driver, caller, &query(ret, ts), ctx.dtemp_floor)?)
        }
        None => None,
    };
    // Only the complex step's ∂σ/∂T failed, a real scheme's passed: the twin's ∂σ/∂T against a
    // real reference, away from a kink in the temperature.
    let dtemp_twin = match (ctx.dtemp_complex, ctx.dtemp_real) {
        (Some((e, tol)), Some(real))
            if ctx.has_twin
                && ctx.dtemp.is_some()
                && e > tol
                && real.0 <= real.1
                && !dtemp_kink.as_ref().is_some_and(|k| k.detected) =>
        {
            let ts = driver.temp_scale(settings.temp_floor);
            let (mut cs, mut rich) = ([0.0; 6], [0.0; 6]);
            let t = Direction::Temperature;
            Scheme::ComplexStep.column(
                driver,
                caller,
                t,
                settings.complex_step.rel_step * ts,
                &mut cs[..n],
            )?;
            Scheme::Richardson.column(
                driver,
                caller,
                t,
                settings.richardson.rel_step * ts,
                &mut rich[..n],
            )?;
            let limits = crate::compare::Limits::new(1.0, ef, 0);
            let gap = compare_dtemp_floor(conv, &rich[..n], &cs[..n], limits, ctx.dtemp_floor).error();
            Some(decide::DtempTwin { real, gap })
        }
        _ => None,
    };
    let dtemp_causes = match ctx.dtemp {
        Some((ret, num)) => {
            let reference = dtemp_kink.as_ref().filter(|k| k.detected).map_or(num, |k| k.closest_side());
            let mut hs =
                causes::rank_dtemp(conv, ret, reference, &driver.base.stress, settings.central.tol, ef);
            // Taken at the start temperature (see `dtemp_start`), away from a kink in the
            // temperature: named first, the shapes it leaves behind no longer explaining.
            if !dtemp_kink.as_ref().is_some_and(|k| k.detected) {
                let full = compare_dtemp_floor(
                    conv,
                    ret,
                    num,
                    crate::compare::Limits::new(1.0, ef, 0),
                    ctx.dtemp_floor,
                )
                .error();
                let branch = driver.base.outcome.branch;
                if let Some(mut h) =
                    dtemp_start::trial(driver, caller, settings, full, branch, ctx.dtemp_floor)?
                {
                    // The shapes it leaves behind no longer explain, but for those that explain
                    // at least as exactly: at zero strain from the reference temperature a term
                    // missing from ∂σ/∂T shrinks with the temperature increment too, and the two
                    // cannot be told apart there (they read "error left 0 (does not explain
                    // it)"; a user-style sweep).
                    let mut also = false;
                    for x in hs.iter_mut() {
                        x.explains &= x.error_left <= h.error_left;
                        also |= x.explains;
                    }
                    if also {
                        h.detail.push_str(
                            "; here a term of ∂σ/∂T proportional to the thermal strain (as C′(T):(ε − ε_th) at zero \
                             strain from the reference temperature) shrinks so too, and the causes after it explain the \
                             increment as exactly: a path with strain, or from another temperature, tells them apart",
                        );
                    }
                    hs.insert(0, h);
                }
            }
            hs
        }
        None => Vec::new(),
    };
    let mut observed = decide::Observed {
        kink: Some(kink),
        studies,
        complex: ctx.complex,
        twin,
        failed_tol: ctx.failed_tol,
        tangent_checks_pass: ctx.tangent_checks_pass,
        dtemp_failed: ctx.dtemp.is_some(),
        dtemp_causes,
        dtemp_kink,
        dtemp_complex: ctx.dtemp_complex,
        dtemp_twin,
        causes: None,
        non_finite_quotient: ctx.non_finite_quotient.clone(),
    };
    let mut decision = decide::decide(&observed);
    let mut refinement = None;
    if decision.needs_causes {
        let (hs, rf, symmetry) =
            cause_trials(driver, caller, conv, ctx, settings, &observed, &decision, richardson)?;
        observed.causes = Some(hs);
        refinement = rf;
        decision = decide::decide(&observed);
        if let (Some(note), false) = (symmetry, decision.pass) {
            decision.reason = format!("{}; {note}", decision.reason);
        }
    }
    // A failed tangent whose update did not settle: that, not a term of the tangent, is what
    // to fix first (see `settle`).
    let tangent_finding = decision.finding == "unexplained"
        || causes::Cause::BY_SPECIFICITY.iter().any(|c| c.name() == decision.finding);
    if !decision.pass && tangent_finding {
        if let Some((moved, state_moved)) = settle::unsettled(driver, caller) {
            decision.reason = format!("{}; {}", settle::words(moved, state_moved), decision.reason);
            decision.finding = settle::UNSETTLED_FINDING.into();
        }
    }
    // A stress that jumps across the point: no tangent describes it, whatever the verdict on
    // the tangent (a discontinuous law cleared "on a closer look" with no word of it; a
    // user-style sweep).
    if let Some(k) = observed.kink.as_ref() {
        let jumps = k.jumps(conv);
        if !jumps.is_empty() {
            decision.reason = format!(
                "{}; the stress jumps across this point in strain direction {} (its one-sided difference quotients grow as 1/h and exceed the tangent): a \
                 discontinuous response, which no tangent describes and across which a Newton iteration \
                 cannot converge",
                decision.reason,
                jumps.join(", ")
            );
        }
    }
    // A ∂σ/∂T failure not held against the routine (a kink in the temperature) has no causes.
    let excused = decide::dtemp_excuse(&observed).is_some();
    let decide::Observed { kink, studies, causes, mut dtemp_causes, .. } = observed;
    if excused {
        dtemp_causes.clear();
    }
    Ok(Diagnosis {
        kink,
        studies,
        pass: decision.pass,
        reason: decision.reason,
        causes: causes.unwrap_or_default(),
        dtemp_causes,
        refinement,
        finding: decision.finding,
        twin_unsafe: decision.twin_unsafe,
    })
}

/// The base call made again, after the check's perturbed calls, must give the same outputs bit
/// for bit: a routine whose results depend on the calls before it (a static or SAVE variable)
/// gives every piece of evidence below from another state, and read as a kink on every
/// increment. A fault then, as the first calls' repeat under the full guards finds it (which a
/// check without `first_calls` does not make). One call per diagnosed increment.
fn repeats(driver: &mut Driver, caller: &mut Caller<'_>) -> Result<(), Fault> {
    let bits = |d: &Driver| -> Vec<u64> {
        d.base.stress.iter().chain(&d.base.state).chain(&d.base.tangent).map(|x| x.to_bits()).collect()
    };
    let before = bits(driver);
    driver.base_call(caller)?;
    if bits(driver) != before {
        return Err(Fault::Misbehaved {
            what:
                "gave different results for two identical calls (the base call of an increment, made again \
                   after its perturbed calls): its results depend on the history of calls (a static or SAVE \
                   variable)"
                    .into(),
        });
    }
    Ok(())
}

/// Fraction of the increment's time the elastic tangent's unloading step takes. Why 1e-6:
/// a creep or relaxation increment scales with the time, so a millionth leaves a millionth of
/// it, below the trials' margins, and a routine dividing by the time increment still gets a
/// normal number.
const ELASTIC_TIME: f64 = 1e-6;

/// The scheme the cause trials measure a tangent with, at a driver's current increment.
type BestTangent<'b> = dyn Fn(&mut Driver, &mut Caller<'_>, &mut [f64]) -> Result<(), Fault> + 'b;

/// What the cause trials give: the ranked causes, the refined increments, and a word on
/// symmetry (see [`causes::symmetry_note`]).
type Trials = (Vec<Hypothesis>, Option<Refinement>, Option<String>);

/// The cause trials: the cleanest numerical tangent (the one-sided derivatives column by
/// column at a kink; the complex step when the twin is trusted; else Richardson at a moderate
/// step, never a tiny-step difference), the elastic tangent, refined increments.
#[allow(clippy::too_many_arguments)]
fn cause_trials(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &Convention,
    ctx: &Context<'_>,
    settings: &Settings,
    observed: &decide::Observed,
    decision: &decide::Decision,
    richardson: Option<Vec<f64>>,
) -> Result<Trials, Fault> {
    let n = conv.ncomp();
    let ef = settings.entry_floor;
    let scale = driver.strain_scale(settings.step_floor);
    let use_twin = ctx.has_twin && decision.trust_twin;
    let kink = observed.kink.as_ref().filter(|k| k.detected);
    let mut num = vec![0.0; n * n];
    if let Some(k) = kink {
        num = k.closest_sides(n);
    } else if use_twin {
        tangent(driver, caller, Scheme::ComplexStep, settings.complex_step.rel_step * scale, &mut num)?;
    } else if let Some(r) = richardson {
        num = r;
    } else {
        tangent(driver, caller, Scheme::Richardson, settings.richardson.rel_step * scale, &mut num)?;
    }
    let best = |driver: &mut Driver, caller: &mut Caller<'_>, out: &mut [f64]| {
        let sc = driver.strain_scale(settings.step_floor);
        if use_twin {
            tangent(driver, caller, Scheme::ComplexStep, settings.complex_step.rel_step * sc, out)
        } else {
            tangent(driver, caller, Scheme::Richardson, settings.richardson.rel_step * sc, out)
        }
    };
    let initial = initial_stiffness(driver, caller, &best);
    let elastic_end = if ctx.state_changed { elastic_at_end(driver, caller, &best) } else { None };
    let strain_end: Vec<f64> =
        driver.start().strain.iter().zip(driver.dstrain()).map(|(a, b)| a + b).collect();
    let stress_end = driver.base.stress.clone();
    // The derivative with the temperature held at the start of the increment (its temperature
    // increment left out), when it has one; the increment is set back after.
    let start_temperature = if driver.dtemp() != 0.0 {
        let (full, dtemp) = (driver.dstrain().to_vec(), driver.dtemp());
        driver.set_increment_keep_count(&full, 0.0);
        let mut t = vec![0.0; n * n];
        let ok = driver.base_call(caller).is_ok() && best(driver, caller, &mut t).is_ok();
        driver.set_increment_keep_count(&full, dtemp);
        (ok && t.iter().all(|x| x.is_finite())).then_some(t)
    } else {
        None
    };
    // The discrepancy at fractions of the temperature increment alone, the strain increment
    // kept: one that comes from the temperature increment (terms of the tangent taken at the
    // start temperature) shrinks with it; a continuum tangent's, driven by the strain, does not.
    let temp_refinement = if driver.dtemp() != 0.0 {
        let (full, dtemp) = (driver.dstrain().to_vec(), driver.dtemp());
        let mut errors = Vec::new();
        let mut num_t = vec![0.0; n * n];
        for s in REFINE {
            driver.set_increment_keep_count(&full, dtemp * s);
            if driver.base_call(caller).is_err() || driver.base.outcome.branch != ctx.reported_branch {
                break;
            }
            let ret = driver.base.tangent.clone();
            if best(driver, caller, &mut num_t).is_err() {
                break;
            }
            errors.push(compare(conv, &ret, &num_t, 1.0, ef, 0).error());
        }
        driver.set_increment_keep_count(&full, dtemp);
        (errors.len() == REFINE.len()).then(|| Refinement {
            fractions: REFINE.to_vec(),
            errors,
            same_branch: true,
            past: 0.0,
        })
    } else {
        None
    };
    // The elastic tangent: the derivative along an unloading step from the start state, taken
    // in a millionth of the time: a rate-dependent routine (creep, viscoplasticity, a
    // viscoelastic relaxation) relaxes as little as the routine allows during it, and one that
    // does not depend on time gives the same (its step over the increment's time crept:
    // a creep routine returning its elastic stiffness was named after another stiffness).
    // Half the increment back, or a tenth or a hundredth of it where half changes the state (from
    // a virgin state it yielded the other way, and a first plastic increment returning the
    // elastic tangent read `initial-stiffness`; a user-style sweep).
    let mut elastic = vec![0.0; n * n];
    let back = |driver: &mut Driver, caller: &mut Caller<'_>, f: f64| {
        driver.rescale(f);
        driver.rescale_time(ELASTIC_TIME);
        driver.base_call(caller).is_ok()
    };
    let mut elastic_base = false;
    for f in [-0.5, -0.05, -0.005] {
        elastic_base = back(driver, caller, f);
        if elastic_base && driver.base.state == driver.start().state {
            break;
        }
        if f == -0.005 {
            // None kept the state: the half, as for a routine whose state moves at every step.
            elastic_base = back(driver, caller, -0.5);
        }
    }
    let elastic_returned = driver.base.tangent.clone();
    let mut elastic_ok = elastic_base && best(driver, caller, &mut elastic).is_ok();
    // Where it differs at a tenth of that time (a relaxation over the step), the tangent of
    // Δt → 0, the instantaneous one, from the two by linear extrapolation in the time: a
    // Prony-series routine returning its instantaneous stiffness was off its elastic trial by
    // 4e-7 at Δt = 1 (growing with Δt) and read `shear-modulus`; a user-style sweep.
    if elastic_ok && driver.dtime() > 0.0 {
        let mut tenth = vec![0.0; n * n];
        driver.rescale_time(0.1 * ELASTIC_TIME);
        elastic_ok = driver.base_call(caller).is_ok() && best(driver, caller, &mut tenth).is_ok();
        if elastic_ok && tenth != elastic {
            for (e, t) in elastic.iter_mut().zip(&tenth) {
                *e = (10.0 * t - *e) / 9.0;
            }
        }
    }
    // The discrepancy at smaller increments (see `refine`).
    let rf = refine::strain_refinement(driver, caller, conv, ctx, ef, &best)?;
    let tol = if use_twin { settings.complex_step.tol } else { settings.central.tol };
    let ev = causes::Evidence {
        conv,
        returned: ctx.returned,
        numerical: &num,
        elastic: elastic_ok.then_some(&elastic[..]),
        elastic_returned: elastic_ok.then_some(&elastic_returned[..]),
        elastic_end: elastic_end.as_deref(),
        initial: initial.as_deref(),
        start_temperature: start_temperature.as_deref(),
        temp_refinement: temp_refinement.as_ref(),
        // A zero increment starts and ends at one point: "the tangent at its start" says
        // nothing there (the tangent of the increment before, a loading branch's, read
        // `stale-tangent` where a growth term was kept in unloading; a user-style sweep).
        // A hold step that changes the state (relaxation at Δε = 0) is no single point: kept.
        previous: ctx.previous.filter(|_| {
            driver.dstrain().iter().any(|&x| x != 0.0) || driver.dtemp() != 0.0 || ctx.state_changed
        }),
        refinement: Some(&rf),
        strain_end: &strain_end,
        stress_end: &stress_end,
        state_changed: ctx.state_changed,
        tol: tol.max(1e-9),
        entry_floor: ef,
    };
    Ok((causes::rank(&ev), Some(rf), causes::symmetry_note(conv, ctx.returned, &num)))
}
