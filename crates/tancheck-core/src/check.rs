//! A tangent check along a path: the pipeline driver → schemes → comparison → report.

use crate::compare::{compare, compare_dtemp};
use crate::diagnose::{self, Context};
use crate::driver::{Direction, Driver, PointState};
use crate::mixed;
use crate::path::Path;
use crate::report::{
    BranchSummary, CallCounts, CallRecord, CheckOutcome, FaultRecord, IncrementResult, Report,
    RoutineSummary, SchemeCheck, SchemeSummary, Verdict, CAUTIONS,
};
use crate::routine::{provides, Caller, Fault};
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
) -> Result<Report, String> {
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
    let mut numerical = vec![0.0; n * n];
    let mut dtemp_num = vec![0.0; n];
    let mut dstrain = vec![0.0; n];
    // The best numerical tangent at the end of the previous increment (the tangent at the
    // start of this one), for the stale-tangent hypothesis.
    let mut previous: Option<Vec<f64>> = None;
    // Whether some increment's strain increment opposed the stress at its start (unloading).
    let mut unloaded = false;
    let mut increments = Vec::with_capacity(path.increments.len());

    for (k, inc) in path.increments.iter().enumerate() {
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        driver.set_increment(&dstrain, inc.dtemp, inc.dtime);
        let mut solve_log = None;
        let base = match &inc.hold_stress {
            None => driver.base_call(caller),
            Some(hold) => {
                let (controlled, targets) = held_components(&conv, hold);
                match mixed::solve(&mut driver, caller, &controlled, &targets, &settings.mixed, true) {
                    Ok(log) => {
                        solve_log = Some(log);
                        Ok(())
                    }
                    Err(f) => Err(f),
                }
            }
        };
        let work: f64 = (0..n).map(|i| driver.start().stress[i] * driver.dstrain()[i]).sum();
        unloaded |= work < 0.0;
        if let Some(log) = &solve_log {
            if !log.converged {
                notes.push(format!(
                    "increment {}: the mixed-control solve did not converge (residuals {:?}); the increment is checked where it stopped",
                    k + 1,
                    log.residuals
                ));
            }
        }
        if let Err(fault) = base {
            increments.push(IncrementResult {
                index: k + 1,
                reported_branch: None,
                state_changed: false,
                strain: driver.start().strain.clone(),
                stress: driver.start().stress.clone(),
                checks: Vec::new(),
                non_finite: Vec::new(),
                solve: solve_log,
                diagnosis: None,
                fault: Some(fault_record(&fault, &driver, None)),
            });
            break;
        }
        let returned = driver.base.tangent.clone();
        let returned_dtemp =
            driver.base.outcome.provides(provides::DSTRESS_DTEMP).then(|| driver.base.dstress_dtemp.clone());
        let reported = driver.base.outcome.branch;
        let state_changed = driver.base.state.iter().zip(&driver.start().state).any(|(a, b)| a != b);
        let h_strain_scale = driver.strain_scale(settings.step_floor);
        let h_temp_scale = driver.temp_scale(settings.temp_floor);
        let mut checks = Vec::with_capacity(settings.schemes.len());
        let mut best_numerical: Option<(Scheme, Vec<f64>)> = None;
        let mut failed_dtemp: Option<Vec<f64>> = None;
        for &scheme in &settings.schemes {
            let ss = settings.scheme(scheme);
            let h = ss.rel_step * h_strain_scale;
            if scheme == Scheme::ComplexStep && !has_twin {
                checks.push(SchemeCheck {
                    scheme,
                    step: h,
                    tangent: CheckOutcome::Skipped { reason: "no complex twin".into() },
                    dstress_dtemp: None,
                });
                continue;
            }
            let mut tangent = None;
            for j in 0..n {
                if let Err(f) = scheme.column(
                    &mut driver,
                    caller,
                    Direction::Strain(j),
                    h,
                    &mut numerical[j * n..(j + 1) * n],
                ) {
                    let what = format!(
                        "dstrain[{j}] {} {h:.3e}",
                        if scheme == Scheme::ComplexStep { "+ i" } else { "±" }
                    );
                    tangent = Some(CheckOutcome::Fault(fault_record(&f, &driver, Some(what))));
                    break;
                }
            }
            let tangent = match tangent {
                Some(t) => t,
                None => {
                    let better = match &best_numerical {
                        None => true,
                        Some((s, _)) => {
                            scheme == Scheme::ComplexStep
                                || (*s != Scheme::ComplexStep && scheme.order() > s.order())
                        }
                    };
                    if better {
                        best_numerical = Some((scheme, numerical.clone()));
                    }
                    CheckOutcome::Compared(compare(
                        &conv,
                        &returned,
                        &numerical,
                        ss.tol,
                        settings.entry_floor,
                        settings.worst_entries,
                    ))
                }
            };
            let dstress_dtemp = match &returned_dtemp {
                None => None,
                Some(ret) => {
                    let ht = ss.rel_step * h_temp_scale;
                    Some(
                        match scheme.column(&mut driver, caller, Direction::Temperature, ht, &mut dtemp_num) {
                            Ok(()) => {
                                let c = compare_dtemp(
                                    &conv,
                                    ret,
                                    &dtemp_num,
                                    ss.tol,
                                    settings.entry_floor,
                                    settings.worst_entries,
                                );
                                if !c.pass && failed_dtemp.is_none() {
                                    failed_dtemp = Some(dtemp_num.clone());
                                }
                                CheckOutcome::Compared(c)
                            }
                            Err(f) => CheckOutcome::Fault(fault_record(
                                &f,
                                &driver,
                                Some(format!("dtemp ± {ht:.3e}")),
                            )),
                        },
                    )
                }
            };
            checks.push(SchemeCheck { scheme, step: h, tangent, dstress_dtemp });
        }
        let any_fault = checks.iter().any(|c| {
            matches!(c.tangent, CheckOutcome::Fault(_))
                || matches!(c.dstress_dtemp, Some(CheckOutcome::Fault(_)))
        });
        let mut non_finite = Vec::new();
        for (what, v) in [
            ("stress", &driver.base.stress),
            ("state", &driver.base.state),
            ("tangent", &driver.base.tangent),
        ] {
            if let Some(i) = v.iter().position(|x| !x.is_finite()) {
                let count = v.iter().filter(|x| !x.is_finite()).count();
                non_finite.push(format!(
                    "{what}[{i}] = {}{}",
                    v[i],
                    if count > 1 { format!(" and {} more", count - 1) } else { String::new() }
                ));
            }
        }
        let mut diagnosis = None;
        let mut fault = None;
        if settings.diagnose && non_finite.is_empty() && !any_fault && !checks.iter().all(SchemeCheck::passed)
        {
            let tangent_ok = |c: &SchemeCheck| !matches!(&c.tangent, CheckOutcome::Compared(x) if !x.pass);
            let complex_pass =
                checks.iter().find(|c| c.scheme == Scheme::ComplexStep).and_then(|c| match &c.tangent {
                    CheckOutcome::Compared(x) => Some(x.pass),
                    _ => None,
                });
            let ctx = Context {
                returned: &returned,
                dtemp: returned_dtemp.as_deref().zip(failed_dtemp.as_deref()),
                complex_pass,
                tangent_checks_pass: checks.iter().all(tangent_ok),
                previous: previous.as_deref(),
                state_changed,
                reported_branch: reported,
                has_twin,
            };
            match diagnose::run(&mut driver, caller, &conv, &ctx, settings) {
                Ok(d) => diagnosis = Some(d),
                Err(f) => fault = Some(fault_record(&f, &driver, Some("a call of the diagnosis".into()))),
            }
        }
        previous = best_numerical.map(|(_, t)| t);
        driver.advance();
        increments.push(IncrementResult {
            index: k + 1,
            reported_branch: (reported >= 0).then_some(reported),
            state_changed,
            strain: driver.start().strain.clone(),
            stress: driver.start().stress.clone(),
            checks,
            non_finite,
            solve: solve_log,
            diagnosis,
            fault,
        });
        if increments.last().is_some_and(|i| i.fault.is_some()) {
            break;
        }
    }

    let summary = summarise(&increments, settings);
    let branches = branch_summary(&increments);
    let mut coverage = Vec::new();
    // A routine without state variables has no inelastic branch to reach.
    if info.nstate > 0 && !increments.is_empty() && increments.iter().all(|i| !i.state_changed) {
        coverage.push(
            "the path never changed the state variables: only the elastic (or stateless) branch was checked; \
             load further, or start from an inelastic state"
                .to_string(),
        );
    }
    if !unloaded && increments.len() > 1 {
        coverage.push(
            "the path never unloaded (the strain increment never opposed the stress): tangents after a load \
             reversal were not checked"
                .to_string(),
        );
    }
    let fault = increments.iter().any(|i| {
        i.fault.is_some()
            || i.checks.iter().any(|c| {
                matches!(c.tangent, CheckOutcome::Fault(_))
                    || matches!(c.dstress_dtemp, Some(CheckOutcome::Fault(_)))
            })
    });
    let verdict = if fault {
        Verdict::RoutineFault
    } else if increments.iter().all(IncrementResult::passed) {
        Verdict::Pass
    } else {
        Verdict::TangentFailure
    };
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
        increments,
        summary,
        branches,
        coverage,
        calls: CallCounts { real: caller.real_calls - real0, complex: caller.complex_calls - cplx0 },
        verdict,
        notes,
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
    })
}

fn fault_record(f: &Fault, d: &Driver, perturbation: Option<String>) -> FaultRecord {
    let s = d.start();
    FaultRecord {
        message: f.to_string(),
        signal: match f {
            Fault::Crashed { signal, .. } => Some(*signal),
            _ => None,
        },
        call: CallRecord {
            increment: d.increment(),
            perturbation,
            props: d.props().to_vec(),
            strain: s.strain.clone(),
            dstrain: d.dstrain().to_vec(),
            temp: s.temp,
            dtemp: d.dtemp(),
            stress0: s.stress.clone(),
            state0: s.state.clone(),
            time: s.time,
            dtime: d.dtime(),
        },
    }
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

fn branch_summary(increments: &[IncrementResult]) -> Vec<BranchSummary> {
    let mut out: Vec<BranchSummary> = Vec::new();
    for inc in increments {
        let label = inc.branch_label();
        let worst = inc
            .checks
            .iter()
            .filter_map(|c| match &c.tangent {
                CheckOutcome::Compared(x) => Some(x.norm_error.max(x.worst_entry_error)),
                _ => None,
            })
            .fold(0.0, f64::max);
        let b = match out.iter_mut().position(|b| b.branch == label) {
            Some(k) => &mut out[k],
            None => {
                out.push(BranchSummary { branch: label, increments: 0, failed: 0, worst_error: 0.0 });
                out.last_mut().expect("just pushed")
            }
        };
        b.increments += 1;
        b.failed += (!inc.passed()) as usize;
        b.worst_error = b.worst_error.max(worst);
    }
    out
}

fn summarise(increments: &[IncrementResult], settings: &Settings) -> Vec<SchemeSummary> {
    settings
        .schemes
        .iter()
        .map(|&scheme| {
            let mut s = SchemeSummary {
                scheme,
                checks: 0,
                failed: 0,
                skipped: 0,
                worst_norm_error: 0.0,
                worst_entry_error: 0.0,
                tol: settings.scheme(scheme).tol,
            };
            for c in increments.iter().flat_map(|i| &i.checks).filter(|c| c.scheme == scheme) {
                match &c.tangent {
                    CheckOutcome::Compared(cmp) => {
                        s.checks += 1;
                        s.worst_norm_error = s.worst_norm_error.max(cmp.norm_error);
                        s.worst_entry_error = s.worst_entry_error.max(cmp.worst_entry_error);
                    }
                    CheckOutcome::Skipped { .. } => s.skipped += 1,
                    CheckOutcome::Fault(_) => s.checks += 1,
                }
                if !c.passed() {
                    s.failed += 1;
                }
            }
            s
        })
        .collect()
}
