//! The report data of the commands besides `check` (whose report is core's [`Report`]): what
//! `bisect`, `replay`, a folder of cases, `selftest` and `demo` found. Every reporter renders these;
//! the commands only fill them in.
//!
//! [`Report`]: tancheck_core::Report

use std::path::PathBuf;

use schemars::JsonSchema;
use serde::Serialize;

use tancheck_core::bisect::{Located, ShrinkStop};
use tancheck_core::case::{CaseCall, Numbers, ProbeCheck};
use tancheck_core::path::Path;
use tancheck_core::{Report, Verdict};

use crate::exit;

/// A shrink and what it located.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct ShrinkSummary {
    pub path: Path,
    pub original_increments: usize,
    pub iterations: usize,
    pub accepted: usize,
    pub seconds: f64,
    pub stop: ShrinkStop,
    /// The stop in words, naming the option that raises the limit that stopped it.
    pub stopped: String,
    pub located: Option<Located>,
}

/// What `tancheck bisect` found.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct BisectOutcome {
    pub routine: String,
    pub path: String,
    pub verdict: Verdict,
    pub finding: String,
    pub located: Option<Located>,
    pub shrunk: Option<ShrinkSummary>,
    /// Case files written.
    pub cases: Vec<PathBuf>,
    /// Things that went wrong without stopping the bisection (a case that could not be
    /// written, a call that did not repeat).
    pub warnings: Vec<String>,
    pub exit_code: i32,
    pub cautions: Vec<String>,
    /// The check the bisection started from, for the reporters that draw it (HTML); not part
    /// of the JSON (the bisect report names its finding and verdict).
    #[serde(skip)]
    #[schemars(skip)]
    pub check: Option<Box<tancheck_core::Report>>,
}

/// What a replay found, as printed and as JSON.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct ReplayReport {
    pub case: String,
    pub routine: String,
    /// Where the call was met: the path, the increment, its branch.
    pub origin: String,
    pub warnings: Vec<String>,
    /// The call's inputs, as the case holds them.
    pub inputs: CaseCall,
    /// Stress, state, tangent, status and branch are those of the case, bit for bit.
    pub identical: bool,
    pub differences: Vec<String>,
    pub fault: Option<String>,
    pub status: i32,
    pub branch: i32,
    pub stress: Numbers,
    pub state: Numbers,
    pub tangent: Numbers,
    pub checks: Vec<ProbeCheck>,
    /// The verdict of the call now, and what the diagnosis found; the finding of the case.
    pub pass: bool,
    pub finding: String,
    pub recorded_finding: String,
    /// "yes" when walking the case's path reaches the call bit for bit, else why not.
    pub path_leads_here: Option<String>,
    /// The kink the closer look found at the call, in words: the columns across which the
    /// one-sided derivatives differ, where the central difference gives their mean.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kink: Option<String>,
    /// The command that reruns the case under a debugger, as a shell line and as words.
    pub debugger: String,
    pub debugger_args: Vec<String>,
    pub exit_code: i32,
}

/// One case of a folder, replayed.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct CaseRun {
    pub file: PathBuf,
    pub report: ReplayReport,
}

/// A folder of cases run as a regression suite: the cases whose call passes its check now,
/// those that still fail (or fault), and the files that could not be run, as warnings with
/// file and line. Other warnings (a changed library, a decimal that does not match its bits)
/// are in `warnings`; cases of other routines set aside are in `other_routines`.
#[derive(Clone, Debug, Default, Serialize, JsonSchema)]
pub struct CaseFolderResult {
    pub folder: PathBuf,
    pub passed: Vec<CaseRun>,
    pub failed: Vec<CaseRun>,
    pub broken: Vec<String>,
    pub warnings: Vec<String>,
    /// Case files of another routine than the one checked, not run.
    #[serde(default)]
    pub other_routines: Vec<PathBuf>,
}

impl CaseFolderResult {
    /// 0 when no case failed, 1 when one still fails its check, 3 when one faults (broken
    /// files only warn).
    pub fn exit_code(&self) -> i32 {
        if self.failed.iter().any(|c| c.report.exit_code == exit::ROUTINE_FAULT) {
            exit::ROUTINE_FAULT
        } else if self.failed.is_empty() {
            exit::PASS
        } else {
            exit::TANGENT_FAILURE
        }
    }
}

/// One row of `tancheck selftest`: a routine with a known verdict, and what the check found.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct SelftestRow {
    pub variant: String,
    pub language: String,
    pub expected: String,
    pub verdict: Verdict,
    pub found: String,
    pub first_increment: Option<usize>,
    pub right: bool,
}

/// What `tancheck selftest` found.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct SelftestReport {
    pub tool: String,
    pub rows: Vec<SelftestRow>,
    /// Languages whose rows were not run, and why.
    pub skipped: Vec<String>,
    /// What each variant is (printed with --verbose).
    pub descriptions: Vec<(String, String)>,
    pub exit_code: i32,
}

impl SelftestReport {
    pub fn wrong(&self) -> usize {
        self.rows.iter().filter(|r| !r.right).count()
    }
}

/// One routine `tancheck demo` checked: what it is, its manifest, the verdict it should get
/// and the check's report.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct DemoCase {
    pub title: String,
    /// "Rust", "C" or "Fortran".
    pub language: String,
    /// The manifest the demo wrote (rerun it with `tancheck check`).
    pub manifest: String,
    pub expected: Verdict,
    pub report: Report,
    /// Whether the check's verdict is the expected one.
    pub right: bool,
}

/// What `tancheck demo` found: the routines it checked (the block and finite-strain scenarios
/// print their own lines), languages it could not build, and the folder it kept.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct DemoReport {
    pub cases: Vec<DemoCase>,
    /// Languages whose examples were not built, and why.
    pub skipped: Vec<String>,
    /// The folder with the libraries and manifests, when `--keep` asked for it.
    pub kept: Option<String>,
    /// 0 when every routine got the verdict it should, 1 otherwise.
    pub exit_code: i32,
}

impl DemoReport {
    /// The cases as selftest rows (the HTML page and JUnit XML of a demo are the selftest's).
    pub fn rows(&self) -> Vec<SelftestRow> {
        self.cases
            .iter()
            .map(|c| SelftestRow {
                variant: c.title.clone(),
                language: c.language.clone(),
                expected: c.expected.word().to_string(),
                verdict: c.report.verdict,
                found: c.report.finding(),
                first_increment: c.report.increments.iter().find(|i| !i.passed()).map(|i| i.index),
                right: c.right,
            })
            .collect()
    }
}

/// Where a probe suite's path came from and what was adjusted, for the readable report.
#[derive(Clone, Debug, Default)]
pub struct SuiteContext {
    /// "from --path", "the manifest's" or "the suite's".
    pub path_source: String,
    pub notes: Vec<String>,
}

/// What `tancheck bisect` found on a finite-strain manifest.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct FiniteBisectOutcome {
    pub routine: String,
    pub verdict: Verdict,
    pub finding: Option<String>,
    /// The first failing increment (1-based, in the path checked), when one failed.
    pub increment: Option<usize>,
    /// That increment judged again on its own.
    pub judged: Option<tancheck_core::finite::check::FiniteIncrement>,
    /// Where inside it the verdict changes.
    pub fraction: Option<tancheck_core::finite::locate::FractionFound>,
    /// The case file written.
    pub case: Option<String>,
    pub warnings: Vec<String>,
    pub exit_code: i32,
    pub cautions: Vec<String>,
    pub check: tancheck_core::finite::check::FiniteReport,
}

/// What `tancheck replay` found on a finite-strain case.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct FiniteReplayReport {
    pub case: String,
    pub routine: String,
    /// Where the case came from, in words.
    pub origin: String,
    pub warnings: Vec<String>,
    /// The call's inputs as the case holds them.
    pub call: tancheck_core::finite::case::FiniteCaseCall,
    /// Whether status, stress, state and tangent came back the same bit for bit.
    pub identical: bool,
    /// The outputs that differ from the saved ones.
    pub differences: Vec<String>,
    pub fault: Option<String>,
    /// The call judged again (errors, worst entries, cause).
    pub judged: Option<tancheck_core::finite::check::FiniteIncrement>,
    pub stress: Vec<f64>,
    pub pass: bool,
    pub recorded_finding: Option<String>,
    /// The command that reruns the replay under a debugger.
    pub debugger: String,
    pub exit_code: i32,
}
