//! A tangent check along a path: the pipeline driver → schemes → comparison → report. Each
//! increment is checked by [`judge::check_call`], the same per-call check bisection uses.

use crate::call_check as judge;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::first_calls;
use crate::mixed;
use crate::path::Path;
use crate::report::{
    CallCounts, Collector, IncrementResult, Keep, Report, RoutineSummary, Verdict, CAUTIONS,
};
use crate::routine::Caller;
use crate::schemes::Scheme;
use crate::settings::Settings;

/// Check the routine behind `caller` along `path` from `start`.
///
/// Errors are bad input (wrong sizes, bad settings); a crashing or failing routine is a
/// [`Verdict::RoutineFault`] in the report, not an error.
pub fn run(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    settings: &Settings,
) -> Result<Report, CoreError> {
    run_with(caller, props, start, path, settings, Keep::All, &mut |_| {})
}

/// [`run`], keeping the full detail of the increments `keep` says (every increment gets its
/// fixed-size record), and telling `progress` the number of each increment once it is checked.
pub fn run_with(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    settings: &Settings,
    keep: Keep,
    progress: &mut dyn FnMut(usize),
) -> Result<Report, CoreError> {
    settings.validate()?;
    path.validate()?;
    let info = caller.info().clone();
    let conv = info.convention.clone();
    let n = conv.ncomp();
    let mut driver = Driver::new(&info, props, start)?;
    let has_twin = caller.has_complex();
    let mut notes = Vec::new();
    if settings.schemes.contains(&Scheme::ComplexStep) && !has_twin {
        notes.push(format!(
            "complex-step checks skipped: {} has no complex twin (build it with `tancheck build`, \
             which compiles the same source with TC_COMPLEX and exports <symbol>_cx)",
            info.name
        ));
    }
    let (real0, cplx0) = (caller.real_calls, caller.complex_calls);
    let mut dstrain = vec![0.0; n];
    // The best numerical tangent at the end of the previous increment (the tangent at the
    // start of this one), for the stale-tangent hypothesis.
    let mut previous: Option<Vec<f64>> = None;
    // Whether some increment's strain increment opposed the stress at its start (unloading).
    let mut unloaded = false;
    let mut increments = Collector::new(settings, keep, path.increments.len());
    // Cheap looks at first calls (see `first_calls`): a zero increment, full guards per branch.
    let mut reached = first_calls::Branches::default();
    if settings.first_calls {
        let dtime = path.increments.first().map_or(1.0, |i| i.dtime);
        if let Some(r) = first_calls::zero_increment(caller, &info, props, driver.start(), dtime)? {
            notes.push(
                "increment 0 is a zero strain increment from the start state (made by every default check)"
                    .into(),
            );
            increments.push(r);
        }
    }
    let mut conventions_seen = false;

    for (k, inc) in path.increments.iter().enumerate() {
        if increments.last_faulted() {
            break;
        }
        if k > 0 {
            progress(k);
        }
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        driver.set_increment(&dstrain, inc.dtemp, inc.dtime);
        // Mixed control first: the held stresses decide the strain increment to check.
        let mut solve_log = None;
        let mut solved = Ok(());
        if let Some(hold) = &inc.hold_stress {
            let (controlled, targets) = held_components(&conv, hold);
            match mixed::solve(&mut driver, caller, &controlled, &targets, &settings.mixed, true) {
                Ok(log) => {
                    if !log.converged {
                        notes.push(format!(
                            "increment {}: the mixed-control solve did not converge (residuals {:?}); the increment is checked where it stopped",
                            k + 1,
                            log.residuals
                        ));
                    }
                    solve_log = Some(log);
                }
                Err(f) => solved = Err(f),
            }
        }
        let work: f64 = (0..n).map(|i| driver.start().stress[i] * driver.dstrain()[i]).sum();
        unloaded |= work < 0.0;
        // The base call, every scheme, and the diagnosis of a failure: one call's check.
        let checked =
            solved.and_then(|()| judge::check_call(&mut driver, caller, settings, previous.as_deref()));
        match checked {
            Err(fault) => {
                increments.push(IncrementResult {
                    index: k + 1,
                    reported_branch: None,
                    state_changed: false,
                    strain: driver.start().strain.clone(),
                    stress: driver.start().stress.clone(),
                    checks: Vec::new(),
                    non_finite: Vec::new(),
                    non_finite_call: None,
                    solve: solve_log,
                    diagnosis: None,
                    fault: Some(judge::fault_record(&fault, &driver, None)),
                });
                break;
            }
            Ok(cc) => {
                let guarded = if settings.first_calls && reached.first(cc.reported_branch, cc.state_changed) {
                    first_calls::full_guard(&mut driver, caller).err()
                } else {
                    None
                };
                // The first elastic increment's numerical tangent tells a wrong declared
                // convention, at no cost in calls.
                if !conventions_seen && !cc.state_changed {
                    conventions_seen = true;
                    if let Some((_, t)) = &cc.best {
                        let f = crate::convention_fit::analyse(&conv, t, crate::convention_fit::DEFAULT_TOL);
                        if f.mismatch() {
                            notes.push(format!(
                                "conventions warning: the elastic response {}; the tangent check cannot see a wrong \
                                 declaration (the `conventions` probe shows the evidence)",
                                f.sentence()
                            ));
                        }
                    }
                }
                if let Some(fault) = guarded {
                    increments.push(IncrementResult {
                        index: k + 1,
                        reported_branch: cc.reported_branch,
                        state_changed: cc.state_changed,
                        strain: driver.start().strain.clone(),
                        stress: driver.start().stress.clone(),
                        checks: cc.checks,
                        non_finite: cc.non_finite,
                        non_finite_call: None,
                        solve: solve_log,
                        diagnosis: cc.diagnosis,
                        fault: Some(*fault),
                    });
                    break;
                }
                previous = cc.best.map(|(_, t)| t);
                // Non-finite outputs carry the inputs of the call, as a crash does.
                let non_finite_call = (!cc.non_finite.is_empty()).then(|| judge::call_record(&driver, None));
                driver.advance();
                increments.push(IncrementResult {
                    index: k + 1,
                    reported_branch: cc.reported_branch,
                    state_changed: cc.state_changed,
                    strain: driver.start().strain.clone(),
                    stress: driver.start().stress.clone(),
                    checks: cc.checks,
                    non_finite: cc.non_finite,
                    non_finite_call,
                    solve: solve_log,
                    diagnosis: cc.diagnosis,
                    fault: None,
                });
            }
        }
    }

    progress(path.increments.len());
    let mut coverage = Vec::new();
    // A path that stopped at a fault says nothing about what the rest would have reached.
    let stopped = increments.stopped_at;
    if let Some(k) = stopped {
        coverage.push(format!(
            "the path stopped at a fault at increment {k} of {}: the increments after it were not checked",
            path.increments.len()
        ));
    }
    let stopped = stopped.is_some();
    // A routine without state variables has no inelastic branch to reach.
    if info.nstate > 0 && !stopped && !increments.is_empty() && !increments.state_ever_changed {
        coverage.push(
            "the path never changed the state variables: only the elastic (or stateless) branch was checked; \
             load further, or start from an inelastic state"
                .to_string(),
        );
    }
    if !unloaded && !stopped && increments.len() > 1 {
        coverage.push(
            "the path never unloaded (the strain increment never opposed the stress): tangents after a load \
             reversal were not checked"
                .to_string(),
        );
    }
    let verdict = if increments.any_fault {
        Verdict::RoutineFault
    } else if !increments.all_passed {
        Verdict::TangentFailure
    } else if increments.twin_unsafe {
        Verdict::TwinNotSafe
    } else {
        Verdict::Pass
    };
    let Collector { records, increments, summary, branches, .. } = increments;
    Ok(Report {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        routine: RoutineSummary {
            name: info.name.clone(),
            kind: conv.kind().name().into(),
            order: conv.order().iter().map(|c| c.label().to_string()).collect(),
            shear: match conv.shear() {
                crate::ShearMeasure::Engineering => "engineering".into(),
                crate::ShearMeasure::Tensor => "tensor".into(),
            },
            nstate: info.nstate,
            nprop: info.nprop,
            complex_twin: has_twin,
        },
        path: path.name.clone(),
        settings: settings.clone(),
        kept: keep,
        records,
        increments,
        summary,
        branches,
        coverage,
        calls: CallCounts { real: caller.real_calls - real0, complex: caller.complex_calls - cplx0 },
        verdict,
        notes,
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
        guard: None,
    })
}

/// Routine positions and targets of the stress components a mixed-control increment holds.
pub fn held_components(conv: &crate::Convention, hold: &[Option<f64>; 6]) -> (Vec<usize>, Vec<f64>) {
    let mut controlled = Vec::new();
    let mut targets = Vec::new();
    for (i, c) in conv.order().iter().enumerate() {
        if let Some(t) = hold[crate::convention::canonical_slot(*c)] {
            controlled.push(i);
            targets.push(t);
        }
    }
    (controlled, targets)
}
