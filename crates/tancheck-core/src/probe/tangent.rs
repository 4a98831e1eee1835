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
            let cleared = checked.iter().filter(|i| i.diagnosis.as_ref().is_some_and(|d| d.pass)).count();
            let aside = if cleared > 0 {
                format!("; {cleared} of them cleared on a closer look (a kink or a poor default step), which the worst error counts")
            } else {
                String::new()
            };
            format!("consistent at {} increments (worst error {worst:.2e}{aside})", checked.len())
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
