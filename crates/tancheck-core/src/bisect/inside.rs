//! Inside the failing increment: the increment scaled by s in (0, 1], each scaled call judged
//! and classed; a grid, then bisection, finds where the error takes its class ([`locate`]).

use super::outcome::{CallClass, Crossing, Inside, Judgement, Located, Sample, StepFinding};
use super::settings::BisectSettings;
use super::walk::{driver_at, first_failure};
use crate::call_check;
use crate::diagnose::study;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::Path;
use crate::report::{CheckOutcome, Report};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;
use crate::settings::Settings;

/// The increment as set, to scale from: strain and temperature increments, and for an
/// increment that holds stresses the held components (routine order), their targets and the
/// start stress there.
struct Full {
    dstrain: Vec<f64>,
    dtemp: f64,
    held: Option<Held>,
}

struct Held {
    controlled: Vec<usize>,
    targets: Vec<f64>,
    start: Vec<f64>,
}

/// Judge the increment scaled by `s` (strain and temperature increments alike; for an
/// increment that holds stresses, its prescribed strains and the held stresses' changes, the
/// held components' strains solved for again).
fn classify(driver: &mut Driver, caller: &mut Caller<'_>, judge: &Settings, full: &Full, s: f64) -> Sample {
    let set = scale(driver, caller, judge, full, s);
    // Each scaled call is judged on its own: a guard that found a fault before finds it again.
    caller.forget_guard_findings();
    let (class, error) = match set.and_then(|()| call_check::check_call(driver, caller, judge, None)) {
        Err(_) => {
            (CallClass { reported_branch: None, state_changed: false, judgement: Judgement::Fault }, 0.0)
        }
        Ok(c) => {
            let tangent_ok =
                c.checks.iter().all(|s| !matches!(&s.tangent, CheckOutcome::Compared(x) if !x.pass));
            let judgement = if !c.non_finite.is_empty() {
                Judgement::NonFinite
            } else if c.faulted() {
                Judgement::Fault
            } else if c.passed() {
                Judgement::Agrees
            } else if tangent_ok {
                Judgement::DtempDiffers
            } else {
                Judgement::Differs
            };
            // Where only ∂σ/∂T fails, its error is the one that tells the classes apart.
            let error = if judgement == Judgement::DtempDiffers {
                c.checks
                    .iter()
                    .filter_map(|s| match &s.dstress_dtemp {
                        Some(CheckOutcome::Compared(x)) => Some(x.error()),
                        _ => None,
                    })
                    .fold(0.0, f64::max)
            } else {
                c.worst_error()
            };
            (
                CallClass { reported_branch: c.reported_branch, state_changed: c.state_changed, judgement },
                error,
            )
        }
    };
    Sample { fraction: s, class, error }
}

/// Set the increment scaled by `s` on the driver. An increment that holds stresses is the
/// fraction s of the increment asked for: its prescribed strains scaled, each held stress at
/// start + s (target − start), and the held components' strains solved for as the check solves
/// them (from s times the full increment's); scaling the full increment's solved strains
/// instead put the yield of a plane-stress point held at σ22 = 0 at 0.516 of its increment,
/// where σ22 was 10.6, against 0.527 under the held stress (a user-style sweep). At s = 1 the
/// full increment as the check solved it.
fn scale(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    judge: &Settings,
    full: &Full,
    s: f64,
) -> Result<(), Fault> {
    let d: Vec<f64> = full.dstrain.iter().map(|x| s * x).collect();
    driver.set_increment_keep_count(&d, s * full.dtemp);
    match &full.held {
        Some(h) if s != 1.0 => {
            let targets: Vec<f64> = h.targets.iter().zip(&h.start).map(|(t, a)| a + s * (t - a)).collect();
            crate::mixed::solve(driver, caller, &h.controlled, &targets, &judge.mixed, true).map(|_| ())
        }
        _ => Ok(()),
    }
}

/// Locate the first failure of `report` (the check of `path` from `start`): its increment,
/// the fraction inside it where the error takes its class, and the step studies of the full
/// increment. `None` when every increment passed.
pub fn locate(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    report: &Report,
    settings: &Settings,
    bisect: &BisectSettings,
) -> Result<Option<Located>, CoreError> {
    bisect.validate()?;
    // The increments of a report checked on a cut path are that path's.
    let path = report.checked_path.as_ref().unwrap_or(path);
    let Some(failed) = first_failure(report) else { return Ok(None) };
    let index = failed.index;
    let calls0 = caller.real_calls + caller.complex_calls;
    let (mut driver, _) = driver_at(caller, props, start, path, index, settings)?;
    let has_twin = caller.has_complex();
    let judge = call_check::sharpest(settings, has_twin);
    let held = path.increments[index - 1].hold_stress.as_ref().map(|hold| {
        let (controlled, targets) = crate::mixed::held_components(&caller.info().convention, hold);
        let start = controlled.iter().map(|&i| driver.start().stress[i]).collect();
        Held { controlled, targets, start }
    });
    let whole = Full { dstrain: driver.dstrain().to_vec(), dtemp: driver.dtemp(), held };
    let mut samples = Vec::new();
    let full = classify(&mut driver, caller, &judge, &whole, 1.0);
    samples.push(full);
    let target = full.class;
    // The grid, from the top down: the last class change before s = 1.
    let g = bisect.grid;
    let mut upper = full;
    let mut lower = None;
    for k in (1..g).rev() {
        let s = classify(&mut driver, caller, &judge, &whole, k as f64 / g as f64);
        samples.push(s);
        if s.class != target {
            lower = Some(s);
            break;
        }
        upper = s;
    }
    if lower.is_none() {
        let s = classify(&mut driver, caller, &judge, &whole, bisect.smallest_fraction);
        samples.push(s);
        if s.class != target {
            lower = Some(s);
        }
    }
    let inside = match lower {
        None => Inside::Throughout { smallest: bisect.smallest_fraction },
        Some(mut lo) => {
            let mut hi = upper;
            while hi.fraction - lo.fraction > bisect.fraction_tol {
                let mid = classify(&mut driver, caller, &judge, &whole, 0.5 * (lo.fraction + hi.fraction));
                samples.push(mid);
                if mid.class == target {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            Inside::Crossing(Crossing {
                below: lo.fraction,
                above: hi.fraction,
                class_below: lo.class,
                class_above: hi.class,
                error_below: lo.error,
                error_above: hi.error,
            })
        }
    };
    // The step studies of the full increment.
    scale(&mut driver, caller, &judge, &whole, 1.0).expect("the full increment is set, not solved");
    let conv = caller.info().convention.clone();
    // The smallest tolerance among the failed checks: the level a study must reach to clear.
    let failed_tol = failed
        .checks
        .iter()
        .filter_map(|c| match &c.tangent {
            crate::report::CheckOutcome::Compared(x) if !x.pass => Some(x.tol),
            _ => None,
        })
        .fold(f64::INFINITY, f64::min);
    let failed_tol = if failed_tol.is_finite() { failed_tol } else { settings.central.tol };
    // The studies measure the strain columns: they speak to a failed tangent only, not to a
    // fault (a guard finding, a crash) or a failure of ∂σ/∂T alone, where their "converges"
    // read as "truncation of the default step, not a mismatch".
    // Nor to outputs that are not finite numbers: a study of them read as noise ("neither
    // converges nor levels off", best error inf; a user-style sweep).
    let tangent_failed = failed.fault.is_none()
        && failed.non_finite.is_empty()
        && failed.checks.iter().any(|c| matches!(&c.tangent, CheckOutcome::Compared(x) if !x.pass));
    let step = match driver.base_call(caller) {
        _ if !tangent_failed => None,
        Err(_) => None,
        // The check's own studies of this increment, when its diagnosis ran: the same
        // evidence and the same classification give the same finding.
        Ok(()) if failed.diagnosis.as_ref().is_some_and(|d| !d.studies.is_empty()) => {
            let studies = failed.diagnosis.as_ref().map(|d| d.studies.clone()).unwrap_or_default();
            Some(StepFinding::from_studies(studies, failed_tol))
        }
        Ok(()) => {
            let returned = driver.base.tangent.clone();
            let strain_scale = driver.strain_scale(settings.step_floor);
            let mut studies = Vec::new();
            for scheme in [Scheme::Central, Scheme::Forward] {
                let tol = settings.scheme(scheme).tol;
                // A study cut short by a faulting call says nothing; the others still do.
                if let Ok(s) = study::run(
                    &mut driver,
                    caller,
                    &conv,
                    &returned,
                    scheme,
                    strain_scale,
                    tol,
                    settings.entry_floor,
                ) {
                    studies.push(s);
                }
            }
            (!studies.is_empty()).then(|| StepFinding::from_studies(studies, failed_tol))
        }
    };
    scale(&mut driver, caller, &judge, &whole, 1.0).expect("the full increment is set, not solved");
    Ok(Some(Located {
        increment: index,
        of: path.increments.len(),
        branch: if failed.fault.is_some() {
            "none (the call faulted)".to_string()
        } else {
            failed.branch_label()
        },
        finding: if failed.fault.is_some() {
            crate::call_check::FAULT_FINDING.to_string()
        } else {
            failed.finding().to_string()
        },
        call: call_check::call_record(&driver, None),
        judged_by: judge.schemes[0],
        inside,
        samples,
        step,
        calls: caller.real_calls + caller.complex_calls - calls0,
    }))
}
