//! What an exploration found: its seed and budget, the scale it measured, the signatures it
//! reached and what it never reached, and each distinct failure with its shrunk path.

use std::path::PathBuf;

use serde::{Deserialize, Serialize};

use super::coverage::Reached;
use super::scale::Scale;
use crate::bisect::{Located, ShrinkStop};
use crate::path::Path;
use crate::report::{CallCounts, RoutineSummary, Verdict};

/// When an exploration stops: whichever limit comes first (None: no such limit).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Budget {
    /// Random paths checked at most.
    pub paths: Option<usize>,
    /// Routine calls at most (every call: measuring, walking, checking, shrinking).
    pub calls: Option<u64>,
    /// Wall-clock seconds at most (a run stopped by time is not reproducible from its seed).
    pub seconds: Option<f64>,
}

/// Which limit stopped the exploration, or the stop signal that did.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Stop {
    Paths,
    Calls,
    Time,
    /// A stop signal (its number: 2 SIGINT, 15 SIGTERM, 1 SIGHUP) after the path being
    /// checked: the report holds the paths checked and the failures found before it.
    Signal(i32),
}

impl Stop {
    pub fn words(self) -> String {
        match self {
            Stop::Paths => "the path budget (--paths)".into(),
            Stop::Calls => "the call budget (--calls)".into(),
            Stop::Time => "the time budget (--time; not reproducible from the seed)".into(),
            Stop::Signal(n) => format!(
                "{} before the budget was spent (the failures found so far are kept; the seed and a path \
                 budget of the paths checked give them again)",
                match n {
                    1 => "SIGHUP".to_string(),
                    2 => "SIGINT (Ctrl-C)".to_string(),
                    15 => "SIGTERM".to_string(),
                    _ => format!("signal {n}"),
                }
            ),
        }
    }
}

/// A branch named by the routine's vocabulary or the manifest.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct NamedBranch {
    pub branch: i32,
    pub name: String,
}

/// What no path reached.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct NeverReached {
    /// Branches the routine's vocabulary knows (or the manifest declares) that no increment
    /// reported.
    pub branches: Vec<NamedBranch>,
    /// State variables that never changed in any increment, as inclusive index ranges.
    pub state: Vec<(u32, u32)>,
}

/// The shrunk path of a failure.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct ShrunkFailure {
    pub path: Path,
    pub iterations: usize,
    pub accepted: usize,
    pub stop: ShrinkStop,
    /// Where the failure sits in the shrunk path (its increment, the fraction inside it).
    pub located: Option<Located>,
}

/// One distinct failure: a verdict, the finding of the first failing increment and its branch.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Finding {
    pub verdict: Verdict,
    pub finding: String,
    pub branch: String,
    /// The first path that failed this way (its number, from 1), its first failing increment,
    /// and the path itself.
    pub first_path: usize,
    pub first_increment: usize,
    pub path: Path,
    /// The properties of the failing path.
    pub properties: Vec<f64>,
    /// Paths that failed this way.
    pub paths: usize,
    pub shrunk: Option<ShrunkFailure>,
    /// The case file written for the shrunk failing call (filled in by the command line).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub case: Option<PathBuf>,
}

/// The report of `tancheck explore`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct ExploreReport {
    pub tool: String,
    pub routine: RoutineSummary,
    /// The seed: the same seed, routine, manifest and path/call budget give the same report.
    pub seed: u64,
    pub budget: Budget,
    pub stopped_by: Stop,
    /// The scale of the start properties.
    pub scale: Scale,
    /// Temperatures the paths stayed within (None: no temperature increments).
    pub temperature: Option<(f64, f64)>,
    /// Whether properties were drawn from declared ranges.
    pub random_properties: bool,
    pub paths: usize,
    /// Paths made by mutating one that reached something new, and the size of that corpus.
    pub mutated: usize,
    pub corpus: usize,
    pub increments: usize,
    pub calls: CallCounts,
    pub seconds: f64,
    pub reached: Vec<Reached>,
    pub never: NeverReached,
    pub findings: Vec<Finding>,
    pub verdict: Verdict,
    pub notes: Vec<String>,
    pub cautions: Vec<String>,
}

/// An explore report as written: the report and the exit code `tancheck explore` ends with.
#[derive(Serialize)]
pub struct ExploreDocument<'r> {
    #[serde(flatten)]
    report: &'r ExploreReport,
    exit_code: i32,
}

impl<'r> ExploreDocument<'r> {
    pub fn of(report: &'r ExploreReport) -> ExploreDocument<'r> {
        ExploreDocument { report, exit_code: report.exit_code() }
    }
}

impl ExploreReport {
    /// As for `check`: 3 for a routine fault, 1 for a tangent failure, 4 for a twin that is not
    /// complex-step safe (and nothing worse), 0 when nothing was found; 128 + the signal's
    /// number for an exploration a stop signal ended.
    pub fn exit_code(&self) -> i32 {
        match self.stopped_by {
            // As every command stopped by a signal: 128 + its number.
            Stop::Signal(n) => 128 + n,
            _ => self.verdict.exit_code(),
        }
    }
}

/// Notes on failures that may be one flaw: tangent failures on the same branch under different
/// cause names. The key of a failure is its verdict, finding and branch, and a wrong term of a
/// tangent reads under different names on different paths (the cause trials measure it against
/// each path's stress and strain: a scaled term on one, a single entry on another), so such
/// failures are listed apart but may be one (a user-style sweep counted one flaw three times).
pub fn one_flaw_notes(findings: &[Finding]) -> Vec<String> {
    let mut branches: Vec<&str> = Vec::new();
    for f in findings.iter().filter(|f| f.verdict == Verdict::TangentFailure) {
        if !branches.contains(&f.branch.as_str()) {
            branches.push(&f.branch);
        }
    }
    let mut notes = Vec::new();
    for b in branches {
        let same: Vec<&Finding> =
            findings.iter().filter(|f| f.verdict == Verdict::TangentFailure && f.branch == b).collect();
        if same.len() < 2 {
            continue;
        }
        let names: Vec<String> =
            same.iter().map(|f| format!("{} ({} path(s))", f.finding, f.paths)).collect();
        notes.push(format!(
            "{b}: the tangent failures named {} may be one flaw seen from different paths (a wrong term \
             reads under different cause names as the stress and strain differ); their shrunk cases tell \
             whether they are one",
            names.join(", ")
        ));
    }
    notes
}

#[cfg(test)]
mod tests {
    use super::*;

    fn finding(verdict: Verdict, finding: &str, branch: &str, paths: usize) -> Finding {
        Finding {
            verdict,
            finding: finding.into(),
            branch: branch.into(),
            first_path: 1,
            first_increment: 1,
            path: Path { name: "p".into(), increments: Vec::new() },
            properties: Vec::new(),
            paths,
            shrunk: None,
            case: None,
        }
    }

    // Two names on one branch are noted together; one name alone, another branch, a fault or a
    // broken twin are not.
    #[test]
    fn tangent_failures_on_one_branch_under_two_names_are_noted() {
        let t = Verdict::TangentFailure;
        let fs = [
            finding(t, "term-scaled", "branch #1", 5),
            finding(t, "single-entry", "branch #1", 2),
            finding(t, "term-sign", "branch #2", 1),
            finding(Verdict::RoutineFault, "routine-fault", "branch #1", 1),
            finding(Verdict::TwinNotSafe, "twin-not-complex-step-safe", "branch #2", 1),
        ];
        let notes = one_flaw_notes(&fs);
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(
            notes[0].starts_with("branch #1: the tangent failures named term-scaled (5 path(s)), single-entry (2 path(s)) may be one flaw"),
            "{notes:?}"
        );
        assert!(one_flaw_notes(&fs[2..]).is_empty());
    }
}
