//! The tangent probe: the returned tangent against the derivative of the stress update
//! (the check of [`crate::check`], with its diagnosis), at every increment of the path.

use super::Needs;
use super::{Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::check;
use crate::error::CoreError;
use crate::routine::Caller;
use crate::Verdict;

pub struct Tangent;

impl Probe for Tangent {
    fn name(&self) -> &'static str {
        "tangent"
    }
    fn needs(&self) -> Needs {
        // The twin is used when there is one (complex-step checks), not required.
        Needs::TANGENT
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut settings = env.settings.clone();
        if let Some(t) = env.spec.tol {
            for s in crate::Scheme::ALL {
                settings.scheme_mut(s).tol = t;
            }
        }
        let report = check::run(caller, env.props, env.start.clone(), env.path, &settings)?;
        let checked: Vec<_> = report.increments.iter().filter(|i| env.spec.runs_at(i.index)).collect();
        let failed: Vec<_> = checked.iter().filter(|i| !i.passed()).collect();
        let worst =
            report.summary.iter().map(|s| s.worst_norm_error.max(s.worst_entry_error)).fold(0.0, f64::max);
        let status = match report.verdict {
            Verdict::RoutineFault => ProbeStatus::Fail,
            _ if failed.is_empty() => ProbeStatus::Pass,
            _ => ProbeStatus::Fail,
        };
        let summary = if let Some((k, f)) = report.first_fault_at() {
            format!("the routine failed at increment {k}: {}", f.message)
        } else if failed.is_empty() {
            // The worst error counts increments whose failed check the closer look cleared (a
            // kink, a poor default step): say so, or a pass would quote a large error bare.
            // The worst error of the increments that passed as they were, and the cleared
            // ones' apart (a pass quoting "worst error 1.00e0" read as a contradiction; a
            // user-style sweep).
            let is_cleared =
                |i: &&&crate::report::IncrementResult| i.diagnosis.as_ref().is_some_and(|d| d.pass);
            let error_of = |i: &&&crate::report::IncrementResult| {
                i.checks
                    .iter()
                    .filter_map(|c| match &c.tangent {
                        crate::report::CheckOutcome::Compared(x) => {
                            Some(x.norm_error.max(x.worst_entry_error).max(x.soft_error))
                        }
                        _ => None,
                    })
                    .fold(0.0, f64::max)
            };
            let cleared: Vec<f64> = checked.iter().filter(is_cleared).map(|i| error_of(&i)).collect();
            let plain = checked.iter().filter(|i| !is_cleared(i)).map(|i| error_of(&i)).fold(0.0, f64::max);
            let aside = if cleared.is_empty() {
                String::new()
            } else {
                format!(
                    "; {} more cleared on a closer look (a kink or a poor default step), their default checks' worst error {:.2e}",
                    cleared.len(),
                    cleared.iter().cloned().fold(0.0, f64::max)
                )
            };
            let k = checked.len() - cleared.len();
            format!(
                "consistent at {k} increment{} (worst error {plain:.2e}{aside})",
                if k == 1 { "" } else { "s" }
            )
        } else if failed.iter().all(|i| {
            i.non_finite.is_empty()
                && i.fault.is_none()
                && i.checks
                    .iter()
                    .all(|c| !matches!(&c.tangent, crate::report::CheckOutcome::Compared(x) if !x.pass))
        }) {
            // Only ∂σ/∂T failed: said as the check says it (the probe line read "wrong at 12 of
            // 12 increments" beside a check whose verdict said the tangent agrees; a user-style
            // sweep).
            format!(
                "∂σ/∂T wrong at {} of {} increments (the tangent agrees); finding: {}",
                failed.len(),
                checked.len(),
                report.finding()
            )
        } else {
            format!(
                "wrong at {} of {} increments; finding: {}",
                failed.len(),
                checked.len(),
                report.finding()
            )
        };
        let mut r = ProbeResult::new("tangent", status, summary);
        r.fault = report.verdict == Verdict::RoutineFault;
        r.value = Some(worst);
        r.increment = failed.first().map(|i| i.index);
        for b in &report.branches {
            r.details.push(format!("branch {}: {} failed of {}", b.branch, b.failed, b.increments));
        }
        r.details.extend(report.coverage.iter().map(|c| format!("coverage warning: {c}")));
        Ok(r)
    }
}
