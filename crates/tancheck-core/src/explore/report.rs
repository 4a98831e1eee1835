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

/// Which limit stopped the exploration.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Stop {
    Paths,
    Calls,
    Time,
}

impl Stop {
    pub fn words(self) -> &'static str {
        match self {
            Stop::Paths => "the path budget (--paths)",
            Stop::Calls => "the call budget (--calls)",
            Stop::Time => "the time budget (--time; not reproducible from the seed)",
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

impl ExploreReport {
    /// As for `check`: 3 for a routine fault, 1 for a tangent failure, 4 for a twin that is not
    /// complex-step safe (and nothing worse), 0 when nothing was found.
    pub fn exit_code(&self) -> i32 {
        self.verdict.exit_code()
    }
}
