//! The report model: one structure that every reporter (terminal, JSON, ...) renders.

use serde::{Deserialize, Serialize};

use crate::compare::Comparison;
use crate::diagnose::Diagnosis;
use crate::schemes::Scheme;
use crate::settings::Settings;

pub mod agree;
pub mod document;
pub mod gave_way;
pub mod record;

pub use record::{Collector, IncrementRecord, Keep, PassedIncrement, RECORD_SCHEMES};

/// The finding of an increment or a case whose call crashed or returned a failed status.
pub const FAULT_FINDING: &str = "routine-fault";

/// The cautions every report carries.
pub const CAUTIONS: [&str; 2] = [
    "A consistent tangent shows that the routine differentiates its own stress update; it does \
     not validate the material model against test data.",
    "Structural use of any material model follows the applicable codes and licensed engineering \
     judgement.",
];

/// The overall verdict, which sets the exit code.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Verdict {
    /// Every check passed.
    Pass,
    /// At least one tangent check failed.
    TangentFailure,
    /// The routine crashed, was flagged by the memory guards, or reported that it could not
    /// compute an increment.
    RoutineFault,
    /// The tangent agrees with the real difference schemes, but the complex-step twin is not
    /// complex-step safe (its results were set aside).
    TwinNotSafe,
}

impl Verdict {
    /// Exit code: 0 pass, 1 tangent failure, 3 the routine crashed or failed, 4 the tangent
    /// is right but the complex-step twin is not complex-step safe (2 is bad input or usage,
    /// decided before a report exists).
    pub fn exit_code(self) -> i32 {
        match self {
            Verdict::Pass => 0,
            Verdict::TangentFailure => 1,
            Verdict::RoutineFault => 3,
            Verdict::TwinNotSafe => 4,
        }
    }

    pub fn word(self) -> &'static str {
        match self {
            Verdict::Pass => "PASS",
            Verdict::TangentFailure => "FAIL",
            Verdict::RoutineFault => "FAULT",
            Verdict::TwinNotSafe => "TWIN",
        }
    }
}

/// What was checked.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct RoutineSummary {
    pub name: String,
    pub kind: String,
    pub order: Vec<String>,
    /// `engineering` or `tensor`; `none (slips)` for a cohesive point.
    pub shear: String,
    pub nstate: usize,
    pub nprop: usize,
    pub complex_twin: bool,
}

/// The inputs of one call, kept when the call went wrong so it can be rerun.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct CallRecord {
    /// The increment number the routine was told (its `call->increment`). For the increments
    /// of the path it is their index in the report; the zero increment from the start state
    /// (index 0) is told 1, as the first call of an analysis would be.
    pub increment: i32,
    /// Which input was perturbed, and by how much, if any: e.g. "dstrain[3] + 1.2e-9".
    pub perturbation: Option<String>,
    pub props: Vec<f64>,
    pub strain: Vec<f64>,
    pub dstrain: Vec<f64>,
    pub temp: f64,
    pub dtemp: f64,
    pub stress0: Vec<f64>,
    pub state0: Vec<f64>,
    pub time: f64,
    pub dtime: f64,
}

/// A call that produced no usable result.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FaultRecord {
    pub message: String,
    /// The signal number when the routine crashed.
    pub signal: Option<i32>,
    pub call: CallRecord,
}

/// The outcome of one scheme at one increment.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case", tag = "outcome")]
pub enum CheckOutcome {
    Compared(Comparison),
    Skipped { reason: String },
    Fault(FaultRecord),
}

/// One scheme at one increment: the tangent and, when the routine returns it, ∂σ/∂T.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct SchemeCheck {
    pub scheme: Scheme,
    /// Absolute step in strain units.
    pub step: f64,
    pub tangent: CheckOutcome,
    pub dstress_dtemp: Option<CheckOutcome>,
    /// Absolute step of the ∂σ/∂T column in temperature units, when it was measured.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temperature_step: Option<f64>,
}

impl SchemeCheck {
    pub fn passed(&self) -> bool {
        let ok = |o: &CheckOutcome| match o {
            CheckOutcome::Compared(c) => c.pass,
            CheckOutcome::Skipped { .. } => true,
            CheckOutcome::Fault(_) => false,
        };
        ok(&self.tangent) && self.dstress_dtemp.as_ref().is_none_or(ok)
    }

    /// Whether a call of this scheme (tangent or ∂σ/∂T) faulted.
    pub fn faulted(&self) -> bool {
        matches!(self.tangent, CheckOutcome::Fault(_))
            || matches!(self.dstress_dtemp, Some(CheckOutcome::Fault(_)))
    }
}

/// A branch as every report names it: the routine's own number (when it reports one) and
/// whether the state changed, e.g. `#1 (state changed)`.
pub fn branch_label(reported: Option<i32>, state_changed: bool) -> String {
    let changed = if state_changed { "state changed" } else { "state unchanged" };
    match reported {
        Some(b) => format!("#{b} ({changed})"),
        None => changed.to_string(),
    }
}

/// One increment of the path.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct IncrementResult {
    /// 1-based.
    pub index: usize,
    /// The branch the routine reported (its own id), if it reported one.
    pub reported_branch: Option<i32>,
    /// Whether the state variables changed in this increment.
    pub state_changed: bool,
    /// Strain at the end of the increment, routine order.
    pub strain: Vec<f64>,
    /// Stress at the end of the increment, routine order.
    pub stress: Vec<f64>,
    pub checks: Vec<SchemeCheck>,
    /// Outputs of the base call that are not finite numbers, e.g. "stress[0]" (the
    /// increment fails whatever the derivatives say).
    pub non_finite: Vec<String>,
    /// The inputs of the base call when it returned values that are not finite numbers, so
    /// that call can be rerun like a crash.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub non_finite_call: Option<CallRecord>,
    /// The mixed-control solve of this increment, when it holds some stresses.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub solve: Option<crate::mixed::SolveLog>,
    /// The closer look taken when a check failed: kink, step studies, ranked causes.
    pub diagnosis: Option<Diagnosis>,
    /// The base call (or a call of the diagnosis) failed: the path stopped here.
    pub fault: Option<FaultRecord>,
}

/// The label of an increment whose base call faulted: it gave no outputs, so no branch.
pub const NO_BRANCH_FAULTED: &str = "none (call faulted)";

impl IncrementResult {
    /// The branch as [`branch_label`] names it, or [`NO_BRANCH_FAULTED`] when the base call
    /// faulted (the routine's outputs, its branch among them, were not used).
    pub fn branch_label(&self) -> String {
        if self.fault.is_some() {
            return NO_BRANCH_FAULTED.to_string();
        }
        branch_label(self.reported_branch, self.state_changed)
    }

    /// The verdict of the increment: every check passed, or the diagnosis cleared it (a
    /// kink with the returned tangent on one side, or a step the default missed).
    pub fn passed(&self) -> bool {
        self.fault.is_none()
            && self.non_finite.is_empty()
            && match &self.diagnosis {
                Some(d) => d.pass,
                None => self.checks.iter().all(SchemeCheck::passed),
            }
    }

    /// What the diagnosis found (`none` when the increment passed).
    pub fn finding(&self) -> &str {
        match &self.diagnosis {
            Some(d) => &d.finding,
            None if self.passed() => "none",
            // No diagnosis is made of outputs that are not finite numbers: that is the finding.
            None if !self.non_finite.is_empty() => "non-finite-output",
            // Nor of a call that faulted: the fault is (the HTML page said "undiagnosed" where
            // the terminal said routine-fault; a user-style sweep).
            None if self.fault.is_some() || self.checks.iter().any(SchemeCheck::faulted) => FAULT_FINDING,
            None => "undiagnosed",
        }
    }
}

/// Number of routine calls made.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct CallCounts {
    pub real: u64,
    pub complex: u64,
}

/// Best (largest) error seen per scheme, over the whole path.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct SchemeSummary {
    pub scheme: Scheme,
    pub checks: usize,
    /// Checks that failed at an increment that failed (or faulted).
    pub failed: usize,
    /// Checks that failed at an increment the diagnosis cleared on a closer look (a kink with
    /// the returned tangent on one side, a step the default missed, a twin set aside): not
    /// failures of the tangent, and not in `failed`.
    #[serde(default)]
    pub cleared: usize,
    pub skipped: usize,
    pub worst_norm_error: f64,
    pub worst_entry_error: f64,
    /// The largest error of the checks as each increment gives it: the largest of the norm,
    /// entry and soft-direction errors (the soft-direction error can exceed both others).
    #[serde(default)]
    pub worst_error: f64,
    pub tol: f64,
    /// Of `failed`, the checks whose ∂σ/∂T differed (their tangent may have agreed: the
    /// norm and entry errors above are the tangent's).
    #[serde(default)]
    pub dtemp_failed: usize,
    /// The largest ∂σ/∂T error of those checks (0 when none failed).
    #[serde(default)]
    pub dtemp_worst_error: f64,
    /// Checks that compared a returned ∂σ/∂T (0: the routine returned none, or the path
    /// made no such check).
    #[serde(default)]
    pub dtemp_checks: usize,
}

/// The tangent error per branch over the path.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct BranchSummary {
    /// The branch label of [`IncrementResult::branch_label`] (for reading; the numbers are
    /// `reported_branch` and `state_changed`).
    pub branch: String,
    /// The branch the routine reported, if it reported one.
    #[serde(default)]
    pub reported_branch: Option<i32>,
    /// Whether the state variables changed in these increments.
    #[serde(default)]
    pub state_changed: bool,
    pub increments: usize,
    pub failed: usize,
    /// Increments that passed although a check failed: the closer look cleared them (a kink
    /// with the returned tangent on one side, a poor default step, a twin set aside). Their
    /// errors count in `worst_error`.
    #[serde(default)]
    pub cleared: usize,
    /// The largest error of any compared tangent in this branch.
    pub worst_error: f64,
}

/// The whole report of one check.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Report {
    pub tool: String,
    pub routine: RoutineSummary,
    pub path: String,
    /// The increments of the path (of the cut path when `checked_path` is set): a path that
    /// stopped at a fault or at outputs that are not finite has records of fewer.
    #[serde(default)]
    pub path_increments: usize,
    pub settings: Settings,
    /// Which increments `increments` holds in full: all, or only those that failed, faulted
    /// or were looked at more closely (`records` has every one).
    #[serde(default)]
    pub kept: Keep,
    /// One fixed-size record per increment, in path order (increment 0 first when made).
    #[serde(default)]
    pub records: Vec<IncrementRecord>,
    /// The full detail of the increments `kept` says.
    pub increments: Vec<IncrementResult>,
    pub summary: Vec<SchemeSummary>,
    pub branches: Vec<BranchSummary>,
    /// Warnings about what the path did not reach (never left the elastic branch, never
    /// unloaded): the blind spots of many hand-written tangent tests.
    pub coverage: Vec<String>,
    pub calls: CallCounts,
    pub verdict: Verdict,
    /// Things the user should know that are not failures (e.g. a scheme skipped).
    pub notes: Vec<String>,
    pub cautions: Vec<String>,
    /// What the memory guards of a loaded library saw (absent for a model).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub guard: Option<GuardSummary>,
    /// The regression cases replayed with the check (`tancheck check --cases`), when asked
    /// for: a case that still fails or faults fails the check ([`Report::join_cases`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cases: Option<CaseTally>,
    /// How a check asked for on several threads gave way to one, when it did (see
    /// [`gave_way::GaveWay`]); not written (the notes say it).
    #[serde(skip)]
    pub gave_way: Option<gave_way::GaveWay>,
    /// The path the increments were checked on, when it is not the one given: cut where the
    /// routine asked for smaller increments ([`crate::cutback`]); the increment numbers are
    /// its. Not written (the notes and `path` say it).
    #[serde(skip)]
    pub checked_path: Option<crate::path::Path>,
    /// Strain and stress at the start of the path (routine order): the first point of the
    /// page's response curves (they began at the first increment's end; a user-style sweep).
    /// Not written.
    #[serde(skip)]
    pub start_point: Option<(Vec<f64>, Vec<f64>)>,
}

/// The regression cases replayed with a check, by file.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct CaseTally {
    /// The folder the case files were read from.
    pub folder: String,
    /// Cases whose call passes its check now.
    pub passed: Vec<String>,
    /// Cases whose call still fails (or faults).
    pub failed: Vec<FailedCase>,
    /// Files that could not be run, each with why.
    pub broken: Vec<String>,
}

/// A regression case that still fails: its file, what the check of its call found now, and
/// the exit code of its replay.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FailedCase {
    pub file: String,
    pub finding: String,
    pub exit_code: i32,
}

/// The memory guards of a loaded library over one check.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct GuardSummary {
    /// off, light or full.
    pub level: String,
    /// Calls the guards made besides the check's (reruns at the full level).
    pub extra_calls: u64,
    pub findings: Vec<GuardFindingRecord>,
}

/// One kind of misbehaviour on one array, as the guards saw it.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct GuardFindingRecord {
    /// overrun, input-written, unwritten, over-read or unrepeatable.
    pub kind: String,
    /// The array: stress, state, tangent, strain, ...
    pub array: String,
    /// Entries of the array.
    pub length: usize,
    /// The first offending index, 0-based.
    pub index: usize,
    /// Entries affected in the first call that showed it.
    pub entries: usize,
    /// The increment of that call.
    pub increment: i32,
    /// Whether that call was to the complex-step twin.
    pub complex: bool,
    /// Calls that showed it.
    pub calls: u64,
    pub message: String,
}

impl Report {
    /// The increments that did not pass, in full detail (in every `kept` mode).
    pub fn failing(&self) -> impl Iterator<Item = &IncrementResult> {
        self.increments.iter().filter(|i| !i.passed())
    }

    /// The number of increments checked (the records; the full list for older reports).
    pub fn increment_count(&self) -> usize {
        if self.records.is_empty() {
            self.increments.len()
        } else {
            self.records.len()
        }
    }

    pub fn exit_code(&self) -> i32 {
        self.verdict.exit_code()
    }

    /// Join the regression cases replayed with the check: a case that faults makes the verdict
    /// a fault, one that fails makes a passing (or twin) verdict a failure; the cases are kept
    /// in the report, so every view (terminal, JSON, JUnit, HTML) gives the same verdict and
    /// the exit code follows it.
    pub fn join_cases(&mut self, tally: CaseTally) {
        if tally.failed.iter().any(|c| c.exit_code == Verdict::RoutineFault.exit_code()) {
            self.verdict = Verdict::RoutineFault;
        } else if !tally.failed.is_empty() && self.verdict != Verdict::RoutineFault {
            self.verdict = Verdict::TangentFailure;
        }
        self.cases = Some(tally);
    }

    /// The regression cases that still fail, none when no case was replayed.
    pub fn failed_cases(&self) -> &[FailedCase] {
        self.cases.as_ref().map_or(&[], |c| &c.failed)
    }

    /// What the report found, in one word: `none` when it passed, `routine-fault` when the
    /// routine crashed or failed, else the finding named at the most failing increments (each
    /// increment's own: its first-ranked cause, or `kink-neither-side`,
    /// `non-finite-derivative`, `unsettled-update`, `dtemp`; ties go to the more specific
    /// cause), or
    /// `unexplained` when no increment names one or more increments are unexplained than name
    /// any one finding (`undiagnosed` likewise, for increments the check was told not to
    /// diagnose) (but a finding named at two increments or more and at a third as many as
    /// are unexplained comes first). Only the first-ranked cause counts: the
    /// general ones (`rank-two`, a rank-one term) also explain most discrepancies a specific
    /// cause explains, and counted at every increment they would outnumber it.
    pub fn finding(&self) -> String {
        use crate::diagnose::Cause;
        match self.verdict {
            Verdict::Pass => return "none".into(),
            Verdict::RoutineFault => return "routine-fault".into(),
            Verdict::TwinNotSafe => return crate::diagnose::TWIN_FINDING.into(),
            Verdict::TangentFailure => {}
        }
        let mut counts: Vec<(String, usize, usize)> = Vec::new();
        let mut add = |name: &str, rank: usize| match counts.iter_mut().find(|c| c.0 == name) {
            Some(c) => c.1 += 1,
            None => counts.push((name.to_string(), 1, rank)),
        };
        for inc in self.increments.iter().filter(|i| !i.passed()) {
            if !inc.non_finite.is_empty() {
                add("non-finite-output", 0);
            }
            let Some(d) = &inc.diagnosis else {
                // A failing increment the check was told not to diagnose (the C API's
                // `diagnose = 0`): counted as unexplained ones are, under its own word (the
                // whole read `unexplained` beside increments saying `undiagnosed`).
                if inc.finding() == "undiagnosed" {
                    add("undiagnosed", usize::MAX);
                }
                continue;
            };
            if d.finding == "kink-neither-side"
                || d.finding == crate::diagnose::NON_FINITE_FINDING
                || d.finding == crate::diagnose::settle::UNSETTLED_FINDING
                || d.finding.starts_with("dtemp")
            {
                add(&d.finding, 0);
            } else if let Some(c) = Cause::BY_SPECIFICITY.iter().position(|c| c.name() == d.finding) {
                add(&d.finding, 1 + c);
            } else if d.finding == "undiagnosed" {
                add("undiagnosed", usize::MAX);
            } else if d.finding == "unexplained" {
                // Counted as the causes are, last in a tie: a cause named at one increment
                // does not stand for eleven that nothing explains.
                add("unexplained", usize::MAX);
            }
        }
        if counts.is_empty() {
            // The path's increments passed: the failure is a regression case's.
            if let Some(c) = self.failed_cases().first() {
                return c.finding.clone();
            }
        }
        counts.sort_by(|a, b| b.1.cmp(&a.1).then(a.2.cmp(&b.2)));
        // A cause named at two increments or more, and at a third as many as are unexplained,
        // stands before `unexplained`: a flaw in the elastic stiffness is named exactly where the
        // point is elastic and leaves the plastic increments unexplained, 6 against 10, and the
        // finding read `unexplained` (a user-style sweep). One named among eleven does not.
        if let (Some(top), Some(named)) =
            (counts.first(), counts.iter().find(|c| c.0 != "unexplained" && c.1 >= 2))
        {
            if top.0 == "unexplained" && 3 * named.1 >= top.1 {
                return named.0.clone();
            }
        }
        counts.first().map_or_else(|| "unexplained".to_string(), |c| c.0.clone())
    }

    /// The warnings of the report a reader must not miss, whatever the verdict: the coverage
    /// warnings and a conventions warning among the notes (a declared order or shear measure
    /// the elastic response contradicts). Reports that carry one line per run (a campaign's
    /// item, a JUnit test case) give these.
    pub fn warnings(&self) -> Vec<&str> {
        let conventions = self.notes.iter().filter(|n| n.starts_with("conventions warning"));
        conventions.chain(&self.coverage).map(String::as_str).collect()
    }

    /// The first fault anywhere in the report.
    pub fn first_fault(&self) -> Option<&FaultRecord> {
        self.first_fault_at().map(|(_, f)| f)
    }

    /// [`Report::first_fault`] with the index of its increment in the report (0 for the zero
    /// increment from the start state, whose call the routine is told is increment 1: the
    /// record's `call.increment` is what the routine was told, not the report's row).
    pub fn first_fault_at(&self) -> Option<(usize, &FaultRecord)> {
        self.increments.iter().find_map(|inc| {
            inc.fault
                .as_ref()
                .or_else(|| {
                    inc.checks.iter().find_map(|c| match &c.tangent {
                        CheckOutcome::Fault(f) => Some(f),
                        _ => match &c.dstress_dtemp {
                            Some(CheckOutcome::Fault(f)) => Some(f),
                            _ => None,
                        },
                    })
                })
                .map(|f| (inc.index, f))
        })
    }
}
