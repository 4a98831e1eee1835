//! Running one check for the C API, and its result.

use std::ffi::CString;
use std::fmt::Write as _;

use tancheck_abi::signal_guard::{ComplexFn, RealFn};
use tancheck_abi::{GuardFinding, GuardLevel, LibraryRoutine, LoadError};
use tancheck_core::{Caller, Report, Verdict};

use crate::options::Plan;
use crate::status::{code, Failure};

/// The twin as the header passes it: a generic function pointer.
pub type TwinFn = unsafe extern "C" fn();

/// `tck_result`: what one check gave, with its strings ready for C.
#[derive(Debug)]
pub struct CheckResult {
    pub report: Report,
    pub findings: Vec<GuardFinding>,
    pub guard_level: GuardLevel,
    pub guard_calls: u64,
    pub(crate) json: CString,
    pub(crate) summary: CString,
    pub(crate) finding_texts: Vec<CString>,
}

impl CheckResult {
    pub fn verdict(&self) -> Verdict {
        self.report.verdict
    }

    pub fn json(&self) -> &str {
        self.json.to_str().expect("made from a String")
    }

    pub fn summary(&self) -> &str {
        self.summary.to_str().expect("made from a String")
    }
}

fn c_string(s: String) -> CString {
    CString::new(s.replace('\0', " ")).expect("NUL bytes were replaced")
}

/// Check the routine at `real` (and its twin) as `plan` says.
///
/// # Safety
/// `real` must have the routine ABI's real signature and `twin`, when given, the complex one.
pub unsafe fn check(real: RealFn, twin: Option<TwinFn>, plan: Plan) -> Result<CheckResult, Failure> {
    // SAFETY: the caller promises the twin's complex signature; fn pointers have one size.
    let twin = twin.map(|t| unsafe { std::mem::transmute::<TwinFn, ComplexFn>(t) });
    // SAFETY: the caller's contract on both pointers.
    let mut routine =
        unsafe { LibraryRoutine::from_fn_pointers(plan.info, real, twin) }.map_err(|e| match e {
            LoadError::Guard { .. } => Failure::new(code::ERROR_GUARD, e.to_string()),
            other => Failure::invalid(other.to_string()),
        })?;
    routine.set_guard_level(plan.guard_level);
    if plan.fp_traps {
        routine.set_fp_traps(true).map_err(|e| Failure::invalid(format!("tck_options.fp_traps: {e}")))?;
    }
    let run = |routine: &mut tancheck_abi::LibraryRoutine, settings: &tancheck_core::Settings| {
        let mut caller = Caller::new(routine);
        // The compact report, as the command line writes it: a record per increment, the full
        // detail of the failing ones.
        tancheck_core::check::run_with(
            &mut caller,
            &plan.properties,
            plan.start.clone(),
            &plan.path,
            settings,
            tancheck_core::report::Keep::Failures,
            &mut |_| {},
        )
        .map(|mut r| {
            // As the command line: the cause the path agrees on named first where it explains.
            let n = r.routine.order.len();
            tancheck_core::report::agree::agree_on_causes(&mut r.increments, n);
            r
        })
        .map_err(|e| Failure::invalid(e.to_string()))
    };
    let mut report = run(&mut routine, &plan.settings)?;
    if tancheck_core::concurrent::redo_on_one_thread(
        &report,
        !routine.findings().is_empty(),
        plan.path.increments.len(),
    ) {
        // As the command line does (session.rs): the check again on one thread.
        routine.take_findings();
        routine.reset_guard_calls();
        let threaded = std::mem::replace(
            &mut report,
            run(&mut routine, &tancheck_core::Settings { jobs: 1, ..plan.settings.clone() })?,
        );
        report.notes.extend(tancheck_core::concurrent::redo_note(
            &threaded,
            &report,
            !routine.findings().is_empty(),
        ));
    }
    let findings = routine.take_findings();
    Ok(finish(report, findings, plan.guard_level, routine.guard_calls()))
}

/// The result: guard findings make the verdict a routine fault (the report's own verdict
/// cannot say so yet) and are listed in the notes and in the JSON's "guard" object.
pub fn finish(
    mut report: Report,
    findings: Vec<GuardFinding>,
    level: GuardLevel,
    guard_calls: u64,
) -> CheckResult {
    tancheck_abi::memory_guards::report::add_to_report(&mut report, level, guard_calls, &findings);
    let json = tancheck_core::report::document::to_string(
        tancheck_core::report::document::Kind::Check,
        &tancheck_core::report::document::CheckDocument::of(&report),
    );
    let summary = summary(&report, &findings);
    CheckResult {
        finding_texts: findings.iter().map(|f| c_string(f.to_string())).collect(),
        json: c_string(json),
        summary: c_string(summary),
        report,
        findings,
        guard_level: level,
        guard_calls,
    }
}

/// One line: verdict, routine, each scheme's result, the first fault or finding.
fn summary(report: &Report, findings: &[GuardFinding]) -> String {
    let mut s = format!("{} {}", report.verdict.word(), report.routine.name);
    let mut parts = Vec::new();
    for sc in &report.summary {
        let mut p = format!("{}: {} of {} checks failed", sc.scheme.name(), sc.failed, sc.checks);
        if sc.checks > 0 {
            let _ = write!(
                p,
                ", worst error {:.2e} (tol {:.0e})",
                // With the soft-direction error, which can fail a check alone (the line quoted
                // 4.67e-2 beside a check that failed at 1.08; a user-style sweep).
                sc.worst_error.max(sc.worst_norm_error).max(sc.worst_entry_error),
                sc.tol
            );
        }
        if sc.cleared > 0 {
            let _ = write!(p, ", {} cleared on a closer look", sc.cleared);
        }
        if sc.skipped > 0 {
            let _ = write!(p, ", {} skipped", sc.skipped);
        }
        parts.push(p);
    }
    if !parts.is_empty() {
        let _ = write!(s, ": {}", parts.join("; "));
    }
    if let Some((k, f)) = report.first_fault_at() {
        // Increment 0 is the look at a zero increment from the start state, which the routine
        // is told is increment 1 (beside a guard finding "told increment 1" it read as two
        // answers; a user-style sweep).
        let which = if k == 0 {
            "increment 0 (the zero increment from the start state; the routine was told increment 1)"
                .to_string()
        } else {
            format!("increment {k}")
        };
        let _ = write!(s, "; fault in {which}: {}", f.message);
    }
    // Why a failed check failed: outputs that are not finite numbers (the counts above may
    // then show no failed comparison), or the finding over the path.
    if report.verdict == Verdict::TangentFailure {
        match report.increments.iter().find(|i| !i.non_finite.is_empty()) {
            Some(i) => {
                let _ = write!(
                    s,
                    "; increment {}: the routine returned values that are not finite numbers ({})",
                    i.index,
                    i.non_finite.join(", ")
                );
            }
            None => {
                let _ = write!(s, "; finding {}", report.finding());
            }
        }
    }
    if let Some(f) = findings.first() {
        let more =
            if findings.len() > 1 { format!(" (and {} more)", findings.len() - 1) } else { String::new() };
        let _ = write!(s, "; memory guard{more}: {f}");
    }
    // What the path did not reach: a pass along a path that never left the elastic branch
    // read as a plain pass (a continuum tangent passed so; a user-style sweep).
    if let Some(c) = report.coverage.first() {
        let more = if report.coverage.len() > 1 {
            format!(" (and {} more)", report.coverage.len() - 1)
        } else {
            String::new()
        };
        let _ = write!(s, "; coverage warning{more}: {c}");
    }
    s
}
