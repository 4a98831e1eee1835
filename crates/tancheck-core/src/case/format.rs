//! The case file's serde types (what each JSON field holds), its error and the decoded forms
//! of a case; no reading, writing or replaying here.

use serde::{Deserialize, Serialize};

use crate::bisect::{Crossing, Inside};
use crate::call_check::CallCheck;
use crate::convention::{Convention, PointKind, ShearMeasure};
use crate::driver::PointState;
use crate::error::CoreError;
use crate::path::Path;
use crate::report::CheckOutcome;
use crate::routine::RoutineInfo;
use crate::schemes::Scheme;
use crate::settings::Settings;

/// The version of the case format this code writes and reads.
pub const FORMAT: u32 = 1;

/// The `about` field of every case.
pub const ABOUT: &str = "tancheck case: the exact inputs of one routine call whose returned tangent \
failed a check, with the outputs and the numbers of that check. Commit this file next to the \
routine's sources: `tancheck replay <this file>` reruns the call and prints the same numbers, and \
a folder of cases runs as a regression suite before the paths of a check. Values are for reading; \
the bits (IEEE-754, hex) are what the replay uses.";

/// Floating-point numbers with their bit patterns.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Numbers {
    /// The numbers as decimals (`null` for a value that is not finite).
    pub values: Vec<Option<f64>>,
    /// The IEEE-754 bit patterns as 16 hex digits; used when present.
    #[serde(default)]
    pub bits: Vec<String>,
}

/// The routine of a case.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseRoutine {
    /// The name reports gave it.
    pub name: String,
    /// A built-in model (and the zoo's variants), by name.
    #[serde(default)]
    pub model: Option<String>,
    /// A shared library: its path relative to the case file's folder (or absolute).
    #[serde(default)]
    pub library: Option<String>,
    /// The library's absolute path when the case was written (tried when `library` is not
    /// found, e.g. after the case file was moved).
    #[serde(default)]
    pub library_absolute: Option<String>,
    /// SHA-256 of the library file when the case was written, 64 hex digits.
    #[serde(default)]
    pub library_sha256: Option<String>,
    #[serde(default)]
    pub symbol: Option<String>,
    pub kind: PointKind,
    /// Component labels in the routine's order.
    pub order: Vec<String>,
    pub shear: ShearMeasure,
    pub nstate: usize,
    pub nprop: usize,
    /// Whether the routine had its complex-step twin.
    pub complex_twin: bool,
    /// Whether the call ran with floating-point traps.
    #[serde(default)]
    pub fp_traps: bool,
}

impl CaseRoutine {
    /// The parts a [`RoutineInfo`] gives (the front end fills model or library).
    pub fn from_info(info: &RoutineInfo, complex_twin: bool) -> CaseRoutine {
        let conv = &info.convention;
        CaseRoutine {
            name: info.name.clone(),
            model: None,
            library: None,
            library_absolute: None,
            library_sha256: None,
            symbol: None,
            kind: conv.kind(),
            order: conv.order().iter().map(|c| c.label().to_string()).collect(),
            shear: conv.shear(),
            nstate: info.nstate,
            nprop: info.nprop,
            complex_twin,
            fp_traps: false,
        }
    }

    pub fn convention(&self) -> Result<Convention, CoreError> {
        let labels: Vec<&str> = self.order.iter().map(String::as_str).collect();
        Convention::from_labels(self.kind, &labels, self.shear).map_err(CoreError::CaseOrder)
    }

    pub fn info(&self) -> Result<RoutineInfo, CoreError> {
        Ok(RoutineInfo {
            name: self.name.clone(),
            convention: self.convention()?,
            nstate: self.nstate,
            nprop: self.nprop,
        })
    }
}

/// The inputs of the call, in the routine's convention.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseCall {
    /// The increment number the routine was given (from 1).
    pub increment: i32,
    pub props: Numbers,
    /// Strain at the start of the increment, and the strain increment.
    pub strain: Numbers,
    pub dstrain: Numbers,
    pub stress0: Numbers,
    pub state0: Numbers,
    /// [temperature at the start, temperature increment].
    pub temp: Numbers,
    /// [time at the start, time increment].
    pub time: Numbers,
}

/// What the call returned.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseOutputs {
    pub status: i32,
    pub branch: i32,
    pub provides: i32,
    pub stress: Numbers,
    pub state: Numbers,
    /// Column-major, entry (i, j) = ∂σᵢ/∂Δεⱼ.
    pub tangent: Numbers,
    #[serde(default)]
    pub dstress_dtemp: Option<Numbers>,
}

/// One worst entry of a comparison.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ProbeEntry {
    /// "row/column" component labels.
    pub label: String,
    pub returned: Option<f64>,
    pub numerical: Option<f64>,
    pub error: Option<f64>,
}

/// One scheme's numbers.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ProbeCheck {
    pub scheme: Scheme,
    /// Absolute step in strain units.
    pub step: f64,
    /// `compared`, `skipped` or `fault`.
    pub outcome: String,
    #[serde(default)]
    pub tol: Option<f64>,
    #[serde(default)]
    pub norm_error: Option<f64>,
    #[serde(default)]
    pub worst_entry_error: Option<f64>,
    pub pass: bool,
    #[serde(default)]
    pub worst: Vec<ProbeEntry>,
    /// Why it was skipped, or the fault's message.
    #[serde(default)]
    pub detail: Option<String>,
    /// The ∂σ/∂T comparison of the same scheme, when the routine returned ∂σ/∂T (`pass` above
    /// holds both; the numbers above are the tangent's).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dtemp: Option<ProbeDtemp>,
    /// Whether the tangent itself passed (`pass` also holds ∂σ/∂T); absent in older cases.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tangent_pass: Option<bool>,
}

/// One scheme's ∂σ/∂T comparison.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ProbeDtemp {
    pub pass: bool,
    pub tol: Option<f64>,
    pub norm_error: Option<f64>,
    pub worst_entry_error: Option<f64>,
    #[serde(default)]
    pub worst: Vec<ProbeEntry>,
}

impl ProbeCheck {
    /// Whether the tangent itself (not ∂σ/∂T) agreed: `pass` unless only ∂σ/∂T failed.
    pub fn tangent_pass(&self) -> bool {
        self.tangent_pass.unwrap_or(self.pass)
    }
}

fn entries(x: &crate::compare::Comparison) -> Vec<ProbeEntry> {
    x.worst
        .iter()
        .map(|e| ProbeEntry {
            label: e.label.to_string(),
            returned: finite(e.returned),
            numerical: finite(e.numerical),
            error: finite(e.error),
        })
        .collect()
}

pub(super) fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

impl ProbeCheck {
    /// The numbers of every scheme's tangent check of `c`.
    pub fn list(c: &CallCheck) -> Vec<ProbeCheck> {
        c.checks
            .iter()
            .map(|s| {
                let mut p = ProbeCheck {
                    scheme: s.scheme,
                    step: s.step,
                    outcome: String::new(),
                    tol: None,
                    norm_error: None,
                    worst_entry_error: None,
                    pass: s.passed(),
                    worst: Vec::new(),
                    detail: None,
                    dtemp: match &s.dstress_dtemp {
                        Some(CheckOutcome::Compared(x)) => Some(ProbeDtemp {
                            pass: x.pass,
                            tol: Some(x.tol),
                            norm_error: finite(x.norm_error),
                            worst_entry_error: finite(x.worst_entry_error),
                            worst: entries(x),
                        }),
                        _ => None,
                    },
                    tangent_pass: match &s.tangent {
                        CheckOutcome::Compared(x) => Some(x.pass),
                        _ => None,
                    },
                };
                match &s.tangent {
                    CheckOutcome::Compared(x) => {
                        p.outcome = "compared".into();
                        p.tol = Some(x.tol);
                        p.norm_error = finite(x.norm_error);
                        p.worst_entry_error = finite(x.worst_entry_error);
                        p.worst = entries(x);
                    }
                    CheckOutcome::Skipped { reason } => {
                        p.outcome = "skipped".into();
                        p.detail = Some(reason.clone());
                    }
                    CheckOutcome::Fault(f) => {
                        p.outcome = "fault".into();
                        p.detail = Some(f.message.clone());
                    }
                }
                p
            })
            .collect()
    }
}

/// The check of the call, as made when the case was written.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseProbe {
    pub settings: Settings,
    pub checks: Vec<ProbeCheck>,
    /// The best numerical tangent and its scheme.
    #[serde(default)]
    pub best_scheme: Option<Scheme>,
    #[serde(default)]
    pub best_numerical: Option<Numbers>,
    /// The best numerical tangent at the start of the increment (for the stale-tangent
    /// hypothesis of the diagnosis).
    #[serde(default)]
    pub previous: Option<Numbers>,
    pub pass: bool,
    pub finding: String,
    #[serde(default)]
    pub reason: Option<String>,
}

/// A class change inside the increment, as found when the case was written.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseCrossing {
    pub below: f64,
    pub above: f64,
    pub class_below: String,
    pub class_above: String,
}

impl CaseCrossing {
    pub fn of(c: &Crossing) -> CaseCrossing {
        let class = |k: &crate::bisect::CallClass| format!("branch {}, {}", k.branch_label(), k.word());
        CaseCrossing {
            below: c.below,
            above: c.above,
            class_below: class(&c.class_below),
            class_above: class(&c.class_above),
        }
    }
}

/// Where the call was met.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseOrigin {
    /// The manifest checked, as given on the command line.
    #[serde(default)]
    pub manifest: Option<String>,
    /// The path's name, the increment (1-based) and the number of increments.
    pub path: String,
    pub increment: usize,
    pub of: usize,
    pub branch: String,
    #[serde(default)]
    pub crossing: Option<CaseCrossing>,
    /// The number of increments of the path this one was shrunk from.
    #[serde(default)]
    pub shrunk_from: Option<usize>,
}

impl CaseOrigin {
    /// The crossing of a bisection, when it found one.
    pub fn crossing_of(inside: &Inside) -> Option<CaseCrossing> {
        match inside {
            Inside::Crossing(c) => Some(CaseCrossing::of(c)),
            Inside::Throughout { .. } => None,
        }
    }
}

/// One increment of a [`CasePath`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CaseIncrement {
    /// [dstrain 11, 22, 33, 23, 13, 12 (tensor components), dtemp, dtime].
    pub values: Numbers,
    /// Mixed control: the canonical stress components held (NaN, written `null`, where the
    /// strain is prescribed).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub hold_stress: Option<Numbers>,
}

/// A path that leads to the call: a start state and increments in canonical components.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CasePath {
    pub strain: Numbers,
    pub stress: Numbers,
    pub state: Numbers,
    /// [temperature, time] at the start.
    pub temp_time: Numbers,
    pub increments: Vec<CaseIncrement>,
}

/// A case file.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Case {
    pub about: String,
    pub format: u32,
    pub tool: String,
    pub routine: CaseRoutine,
    pub call: CaseCall,
    pub outputs: CaseOutputs,
    pub probe: CaseProbe,
    pub origin: CaseOrigin,
    #[serde(default)]
    pub path: Option<CasePath>,
}

/// Where case files come from, after "not a case": `bisect` writes them (for a
/// finite-strain manifest the words of [`CaseProblem::NotACase`] say so themselves).
fn case_advice(what: &str) -> &'static str {
    if what.starts_with("a finite-strain") {
        ""
    } else {
        "; `tancheck bisect MANIFEST` writes case files (in `tancheck-cases/<manifest name>/` next to the manifest)"
    }
}

/// What is wrong with a case file; each message says what to change.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CaseProblem {
    /// JSON syntax or a field, in serde_json's words.
    #[error("{0}")]
    Syntax(String),
    /// Valid JSON that is no case (a report, a manifest, …): what it is and where cases are.
    #[error("{what}, not a case{advice}", what = .0, advice = case_advice(.0))]
    NotACase(String),
    #[error("case format {found} is not the format {FORMAT} this tancheck reads")]
    Format { found: u32 },
    #[error("routine: give `model`, or `library` and `symbol`, not both")]
    RoutineSource,
    #[error("{what} has {got} entries; the routine needs {want}")]
    Length { what: String, got: usize, want: usize },
    #[error("call.{key} has {value:e}; every input must be a finite number at most {max:e} in magnitude")]
    OutOfRange { key: &'static str, value: f64, max: f64 },
    #[error("call.increment is {0}; it counts from 1")]
    Increment(i32),
    /// A convention, a number's bits, the settings or the path, as core refuses them.
    #[error(transparent)]
    Core(#[from] CoreError),
    /// A problem inside one increment of the case's path (1-based).
    #[error("increment {increment}: {problem}")]
    InIncrement { increment: usize, problem: Box<CaseProblem> },
}

/// A case file that cannot be used: where (1-based line and column, 0 when unknown) and why.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("{line}:{column}: {problem}")]
pub struct CaseError {
    pub line: usize,
    pub column: usize,
    pub problem: CaseProblem,
}

/// The call of a case with its numbers decoded.
#[derive(Clone, Debug, PartialEq)]
pub struct DecodedCall {
    pub increment: i32,
    pub props: Vec<f64>,
    pub start: PointState,
    pub dstrain: Vec<f64>,
    pub dtemp: f64,
    pub dtime: f64,
}

/// The outputs of a case (or of a replay) decoded.
#[derive(Clone, Debug, PartialEq)]
pub struct DecodedOutputs {
    pub status: i32,
    pub branch: i32,
    pub stress: Vec<f64>,
    pub state: Vec<f64>,
    pub tangent: Vec<f64>,
    pub dstress_dtemp: Option<Vec<f64>>,
}

/// A case read from text, decoded and checked against its routine's sizes.
#[derive(Clone, Debug)]
pub struct ParsedCase {
    pub case: Case,
    pub call: DecodedCall,
    pub outputs: DecodedOutputs,
    pub previous: Option<Vec<f64>>,
    /// The path that leads to the call, when the case has one.
    pub path: Option<(PointState, Path)>,
    /// Things to tell the user that do not stop the replay (1-based line numbers in front).
    pub warnings: Vec<String>,
}
