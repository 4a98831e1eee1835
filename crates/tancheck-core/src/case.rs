//! Case files: the exact inputs of one routine call whose tangent failed a check, its outputs,
//! and the numbers of the check, so that the call can be rerun (under a debugger, after a fix)
//! and kept as a regression test.
//!
//! A case is JSON. Every floating-point array is a [`Numbers`]: readable decimals (`values`)
//! next to the IEEE-754 bit patterns (`bits`, 16 hex digits each), which are what a replay
//! uses, so the call is made with exactly the saved inputs whatever a JSON parser does with
//! the last digit of a decimal. A hand-written case may leave `bits` out; then the decimals
//! are used.
//!
//! Fields, in order: `about` (what the file is, and that it should be committed), `format`
//! ([`FORMAT`]), `tool` (name and version that wrote it), `routine` ([`CaseRoutine`]: a
//! built-in model's name, or a library's path and SHA-256 and the symbol; kind, component
//! order, shear measure, sizes), `call` ([`CaseCall`]: increment number, properties, strain,
//! strain increment, start stress and state, temperature and time with their increments),
//! `outputs` ([`CaseOutputs`]: status, branch, stress, state, tangent as returned),
//! `probe` ([`CaseProbe`]: the settings of the check, each scheme's numbers, the best
//! numerical tangent, the verdict and finding), `origin` ([`CaseOrigin`]: where on which path
//! the call was met, and the fraction of the increment where the error changes class), and
//! optionally `path` ([`CasePath`]: a start state and increments that lead to the call).
//!
//! Nothing here reads or writes files: the front end does, and computes the library hash.

use std::fmt;

use serde::{Deserialize, Serialize};

use crate::bisect::{Crossing, Inside};
use crate::call_check::{self as judge, CallCheck};
use crate::convention::{Convention, PointKind, ShearMeasure};
use crate::driver::{Driver, PointState};
use crate::path::{Path, PathIncrement};
use crate::report::CheckOutcome;
use crate::routine::{Caller, Fault, RoutineInfo};
use crate::schemes::Scheme;
use crate::settings::Settings;

pub use crate::call_check::FAULT_FINDING;

/// The version of the case format this code writes and reads.
pub const FORMAT: u32 = 1;

/// The `about` field of every case.
pub const ABOUT: &str = "tancheck case: the exact inputs of one routine call whose returned tangent \
failed a check, with the outputs and the numbers of that check. Commit this file next to the \
routine's sources: `tancheck replay <this file>` reruns the call and prints the same numbers, and \
a folder of cases runs as a regression suite before the paths of a check. Values are for reading; \
the bits (IEEE-754, hex) are what the replay uses.";

/// Floating-point numbers with their bit patterns.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Numbers {
    /// The numbers as decimals (`null` for a value that is not finite).
    pub values: Vec<Option<f64>>,
    /// The IEEE-754 bit patterns as 16 hex digits; used when present.
    #[serde(default)]
    pub bits: Vec<String>,
}

impl Numbers {
    pub fn of(v: &[f64]) -> Numbers {
        Numbers {
            values: v.iter().map(|x| x.is_finite().then_some(*x)).collect(),
            bits: v.iter().map(|x| format!("{:016x}", x.to_bits())).collect(),
        }
    }

    /// The numbers: from the bits when given, else from the decimals. A decimal that does not
    /// match its bits (beyond the last digit a parser may get wrong) is a warning.
    pub fn decode(&self, what: &str, warnings: &mut Vec<String>) -> Result<Vec<f64>, String> {
        if self.bits.is_empty() {
            return self
                .values
                .iter()
                .enumerate()
                .map(|(i, v)| v.ok_or_else(|| format!("{what}[{i}] is null and has no bits")))
                .collect();
        }
        if self.bits.len() != self.values.len() {
            return Err(format!(
                "{what} has {} values and {} bit patterns; give both for every entry, or drop `bits`",
                self.values.len(),
                self.bits.len()
            ));
        }
        let mut out = Vec::with_capacity(self.bits.len());
        for (i, (b, v)) in self.bits.iter().zip(&self.values).enumerate() {
            let x = u64::from_str_radix(b.trim_start_matches("0x"), 16)
                .ok()
                .filter(|_| b.trim_start_matches("0x").len() == 16)
                .map(f64::from_bits)
                .ok_or_else(|| format!("{what}[{i}]: `{b}` is not 16 hex digits"))?;
            match v {
                Some(v) if (v - x).abs() > 1e-15 * x.abs().max(f64::MIN_POSITIVE) => warnings.push(format!(
                    "{what}[{i}]: the decimal {v:e} does not match the bits {b} ({x:e}); the bits are used \
                     (delete `bits` to use the decimals)"
                )),
                None if x.is_finite() => warnings.push(format!(
                    "{what}[{i}]: the decimal is null but the bits {b} hold {x:e}; the bits are used"
                )),
                _ => {}
            }
            out.push(x);
        }
        Ok(out)
    }
}

/// The routine of a case.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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

    pub fn convention(&self) -> Result<Convention, String> {
        let labels: Vec<&str> = self.order.iter().map(String::as_str).collect();
        Convention::from_labels(self.kind, &labels, self.shear).map_err(|e| format!("routine.order: {e}"))
    }

    pub fn info(&self) -> Result<RoutineInfo, String> {
        Ok(RoutineInfo {
            name: self.name.clone(),
            convention: self.convention()?,
            nstate: self.nstate,
            nprop: self.nprop,
        })
    }
}

/// The inputs of the call, in the routine's convention.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ProbeEntry {
    /// "row/column" component labels.
    pub label: String,
    pub returned: Option<f64>,
    pub numerical: Option<f64>,
    pub error: Option<f64>,
}

/// One scheme's numbers.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
}

fn finite(x: f64) -> Option<f64> {
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
                };
                match &s.tangent {
                    CheckOutcome::Compared(x) => {
                        p.outcome = "compared".into();
                        p.tol = Some(x.tol);
                        p.norm_error = finite(x.norm_error);
                        p.worst_entry_error = finite(x.worst_entry_error);
                        p.worst = x
                            .worst
                            .iter()
                            .map(|e| ProbeEntry {
                                label: e.label.clone(),
                                returned: finite(e.returned),
                                numerical: finite(e.numerical),
                                error: finite(e.error),
                            })
                            .collect();
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
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

/// A case file that cannot be used: where (1-based line and column, 0 when unknown) and why.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct CaseError {
    pub line: usize,
    pub column: usize,
    pub message: String,
}

impl fmt::Display for CaseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}:{}: {}", self.line, self.column, self.message)
    }
}

impl std::error::Error for CaseError {}

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

/// Line and column of the first `"key"` after the previous keys of `keys`, in order (a
/// nested field's place); (0, 0) when it is not there.
fn place(text: &str, keys: &[&str]) -> (usize, usize) {
    let mut at = 0;
    for k in keys {
        match text[at..].find(&format!("\"{k}\"")) {
            Some(p) => at += p,
            None => return (0, 0),
        }
    }
    let before = &text[..at];
    let line = before.matches('\n').count() + 1;
    let column = at - before.rfind('\n').map_or(0, |p| p + 1) + 1;
    (line, column)
}

impl Case {
    /// A case of the call the driver holds: its increment as set, the base outputs in
    /// `driver.base` (as [`judge::check_call`] leaves them), and `judged` its judgement, or
    /// the fault of the call.
    pub fn capture(
        routine: CaseRoutine,
        driver: &Driver,
        judged: Result<&CallCheck, &Fault>,
        previous: Option<&[f64]>,
        settings: &Settings,
        origin: CaseOrigin,
        path: Option<(&PointState, &Path)>,
    ) -> Case {
        let s = driver.start();
        let b = &driver.base;
        let provides_dtemp = b.outcome.provides(crate::routine::provides::DSTRESS_DTEMP);
        Case {
            about: ABOUT.to_string(),
            format: FORMAT,
            tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
            routine,
            call: CaseCall {
                increment: driver.increment(),
                props: Numbers::of(driver.props()),
                strain: Numbers::of(&s.strain),
                dstrain: Numbers::of(driver.dstrain()),
                stress0: Numbers::of(&s.stress),
                state0: Numbers::of(&s.state),
                temp: Numbers::of(&[s.temp, driver.dtemp()]),
                time: Numbers::of(&[s.time, driver.dtime()]),
            },
            outputs: CaseOutputs {
                status: b.outcome.status,
                branch: b.outcome.branch,
                provides: b.outcome.provides,
                stress: Numbers::of(&b.stress),
                state: Numbers::of(&b.state),
                tangent: Numbers::of(&b.tangent),
                dstress_dtemp: provides_dtemp.then(|| Numbers::of(&b.dstress_dtemp)),
            },
            probe: match judged {
                Ok(check) => CaseProbe {
                    settings: settings.clone(),
                    checks: ProbeCheck::list(check),
                    best_scheme: check.best.as_ref().map(|(s, _)| *s),
                    best_numerical: check.best.as_ref().map(|(_, t)| Numbers::of(t)),
                    previous: previous.map(Numbers::of),
                    pass: check.passed(),
                    finding: check.finding().to_string(),
                    reason: check.diagnosis.as_ref().map(|d| d.reason.clone()),
                },
                Err(fault) => CaseProbe {
                    settings: settings.clone(),
                    checks: Vec::new(),
                    best_scheme: None,
                    best_numerical: None,
                    previous: previous.map(Numbers::of),
                    pass: false,
                    finding: FAULT_FINDING.to_string(),
                    reason: Some(fault.to_string()),
                },
            },
            origin,
            path: path.map(|(start, p)| CasePath {
                strain: Numbers::of(&start.strain),
                stress: Numbers::of(&start.stress),
                state: Numbers::of(&start.state),
                temp_time: Numbers::of(&[start.temp, start.time]),
                increments: p
                    .increments
                    .iter()
                    .map(|i| {
                        let mut v = i.dstrain.to_vec();
                        v.push(i.dtemp);
                        v.push(i.dtime);
                        CaseIncrement {
                            values: Numbers::of(&v),
                            hold_stress: i
                                .hold_stress
                                .map(|h| Numbers::of(&h.map(|x| x.unwrap_or(f64::NAN)))),
                        }
                    })
                    .collect(),
            }),
        }
    }

    /// The case as pretty-printed JSON with every array of plain values on one line, ending
    /// in a newline.
    pub fn to_json(&self) -> String {
        let mut s = compact_arrays(&serde_json::to_string_pretty(self).expect("a case serialises"));
        s.push('\n');
        s
    }

    /// Read a case: JSON syntax and fields, the format version, every number, and the sizes
    /// against the routine's. Errors name the line and column.
    pub fn parse(text: &str) -> Result<ParsedCase, CaseError> {
        let case: Case = serde_json::from_str(text).map_err(|e| CaseError {
            line: e.line(),
            column: e.column(),
            message: e.to_string().split(" at line ").next().unwrap_or_default().to_string(),
        })?;
        let err = |keys: &[&str], message: String| {
            let (line, column) = place(text, keys);
            CaseError { line, column, message }
        };
        if case.format != FORMAT {
            return Err(err(
                &["format"],
                format!("case format {} is not the format {FORMAT} this tancheck reads", case.format),
            ));
        }
        let r = &case.routine;
        let conv = r.convention().map_err(|m| err(&["routine", "order"], m))?;
        match (&r.model, &r.library, &r.symbol) {
            (Some(_), None, None) | (None, Some(_), Some(_)) => {}
            _ => {
                return Err(err(
                    &["routine"],
                    "routine: give `model`, or `library` and `symbol`, not both".to_string(),
                ))
            }
        }
        let n = conv.ncomp();
        let mut warnings = Vec::new();
        let mut num =
            |section: &str, key: &str, x: &Numbers, len: Option<usize>| -> Result<Vec<f64>, CaseError> {
                let mut w = Vec::new();
                let what = format!("{section}.{key}");
                let v = x.decode(&what, &mut w).map_err(|m| {
                    let e = err(&[section, key, "bits"], m.clone());
                    if e.line == 0 {
                        err(&[section, key], m)
                    } else {
                        e
                    }
                })?;
                let (line, _) = place(text, &[section, key]);
                warnings.extend(w.into_iter().map(|m| format!("line {line}: {m}")));
                if let Some(len) = len {
                    if v.len() != len {
                        return Err(err(
                            &[section, key],
                            format!("{what} has {} entries; the routine needs {len}", v.len()),
                        ));
                    }
                }
                Ok(v)
            };
        let c = &case.call;
        let props = num("call", "props", &c.props, Some(r.nprop))?;
        let strain = num("call", "strain", &c.strain, Some(n))?;
        let dstrain = num("call", "dstrain", &c.dstrain, Some(n))?;
        let stress0 = num("call", "stress0", &c.stress0, Some(n))?;
        let state0 = num("call", "state0", &c.state0, Some(r.nstate))?;
        let temp = num("call", "temp", &c.temp, Some(2))?;
        let time = num("call", "time", &c.time, Some(2))?;
        // The inputs must be numbers a routine can be asked about: out of range is bad input,
        // not a routine failure.
        {
            use crate::path::{MAX_DTEMP, MAX_DTIME, MAX_STRAIN, MAX_STRESS};
            for (key, values, max) in [
                ("props", &props, f64::MAX),
                ("strain", &strain, MAX_STRAIN),
                ("dstrain", &dstrain, MAX_STRAIN),
                ("stress0", &stress0, MAX_STRESS),
                ("state0", &state0, f64::MAX),
                ("temp", &vec![temp[0]], 1.0e5),
                ("temp", &vec![temp[1]], MAX_DTEMP),
                ("time", &vec![time[0]], f64::MAX),
                ("time", &vec![time[1]], MAX_DTIME),
            ] {
                if let Some(x) = values.iter().find(|x| !x.is_finite() || x.abs() > max) {
                    return Err(err(
                        &["call", key],
                        format!("call.{key} has {x:e}; every input must be a finite number at most {max:e} in magnitude"),
                    ));
                }
            }
        }
        let o = &case.outputs;
        let outputs = DecodedOutputs {
            status: o.status,
            branch: o.branch,
            stress: num("outputs", "stress", &o.stress, Some(n))?,
            state: num("outputs", "state", &o.state, Some(r.nstate))?,
            tangent: num("outputs", "tangent", &o.tangent, Some(n * n))?,
            dstress_dtemp: match &o.dstress_dtemp {
                Some(d) => Some(num("outputs", "dstress_dtemp", d, Some(n))?),
                None => None,
            },
        };
        let previous = match &case.probe.previous {
            Some(p) => Some(num("probe", "previous", p, Some(n * n))?),
            None => None,
        };
        if let Some(b) = &case.probe.best_numerical {
            num("probe", "best_numerical", b, Some(n * n))?;
        }
        case.probe.settings.validate().map_err(|m| err(&["probe", "settings"], m))?;
        if c.increment < 1 {
            return Err(err(
                &["call", "increment"],
                format!("call.increment is {}; it counts from 1", c.increment),
            ));
        }
        let path = match &case.path {
            None => None,
            Some(p) => {
                let start = PointState {
                    strain: num("path", "strain", &p.strain, Some(n))?,
                    stress: num("path", "stress", &p.stress, Some(n))?,
                    state: num("path", "state", &p.state, Some(r.nstate))?,
                    temp: 0.0,
                    time: 0.0,
                };
                let tt = num("path", "temp_time", &p.temp_time, Some(2))?;
                let mut increments = Vec::with_capacity(p.increments.len());
                for (k, inc) in p.increments.iter().enumerate() {
                    let at = |e: CaseError| CaseError {
                        message: format!("increment {}: {}", k + 1, e.message),
                        ..e
                    };
                    let v = num("path", "increments", &inc.values, Some(8)).map_err(at)?;
                    let mut dstrain = [0.0; 6];
                    dstrain.copy_from_slice(&v[..6]);
                    let hold_stress = match &inc.hold_stress {
                        None => None,
                        Some(h) => {
                            let h = num("path", "hold_stress", h, Some(6)).map_err(at)?;
                            let mut a = [None; 6];
                            for (x, y) in a.iter_mut().zip(h) {
                                *x = y.is_finite().then_some(y);
                            }
                            Some(a)
                        }
                    };
                    increments.push(PathIncrement { dstrain, dtemp: v[6], dtime: v[7], hold_stress });
                }
                let path = Path {
                    name: format!("the path of the case ({} increments)", increments.len()),
                    increments,
                };
                path.validate().map_err(|m| err(&["path"], m))?;
                Some((PointState { temp: tt[0], time: tt[1], ..start }, path))
            }
        };
        let call = DecodedCall {
            increment: c.increment,
            props,
            start: PointState { strain, stress: stress0, state: state0, temp: temp[0], time: time[0] },
            dstrain,
            dtemp: temp[1],
            dtime: time[1],
        };
        Ok(ParsedCase { case, call, outputs, previous, path, warnings })
    }
}

/// Pretty JSON with each array that holds no object or array written on one line.
fn compact_arrays(pretty: &str) -> String {
    let b = pretty.as_bytes();
    let mut out: Vec<u8> = Vec::with_capacity(b.len());
    let mut i = 0;
    let mut in_str = false;
    while i < b.len() {
        let c = b[i];
        if in_str {
            out.push(c);
            if c == b'\\' && i + 1 < b.len() {
                out.push(b[i + 1]);
                i += 2;
                continue;
            }
            in_str = c != b'"';
            i += 1;
            continue;
        }
        if c == b'"' {
            in_str = true;
        } else if c == b'[' {
            // Find the closing bracket; give up on a nested array or object. JSON strings
            // hold no raw newline, so items end at ",\n".
            let mut j = i + 1;
            let mut s = false;
            let mut flat = true;
            while j < b.len() {
                let d = b[j];
                if s {
                    if d == b'\\' {
                        j += 1;
                    } else if d == b'"' {
                        s = false;
                    }
                } else if d == b'"' {
                    s = true;
                } else if d == b'[' || d == b'{' {
                    flat = false;
                    break;
                } else if d == b']' {
                    break;
                }
                j += 1;
            }
            if flat && j < b.len() {
                let items: Vec<&str> =
                    pretty[i + 1..j].split(",\n").map(str::trim).filter(|x| !x.is_empty()).collect();
                out.push(b'[');
                out.extend_from_slice(items.join(", ").as_bytes());
                out.push(b']');
                i = j + 1;
                continue;
            }
        }
        out.push(c);
        i += 1;
    }
    String::from_utf8(out).expect("only ASCII whitespace was removed")
}

/// A driver holding exactly the call of a case: its start state, increment and increment
/// number (not yet called).
pub fn driver_for(info: &RoutineInfo, call: &DecodedCall) -> Result<Driver, String> {
    let mut d = Driver::new(info, &call.props, call.start.clone())?;
    // The driver numbers increments as they are set; set this one until it has its number.
    for _ in 0..call.increment {
        d.set_increment(&call.dstrain, call.dtemp, call.dtime);
    }
    Ok(d)
}

/// The result of a replay.
#[derive(Clone, Debug)]
pub struct Replay {
    /// What the call returned now (NaN where it wrote nothing).
    pub outputs: DecodedOutputs,
    /// The call's fault, if it faulted.
    pub fault: Option<String>,
    /// Outputs whose bits differ from the case's, e.g. "tangent[7]: 1.2e5 now, 1.3e5 in the case".
    pub differences: Vec<String>,
    /// The check of the call now (none when the call faulted).
    pub check: Option<CallCheck>,
    /// Whether walking the case's path from its start reaches the call's start state and
    /// increment number bit for bit (none when the case has no path, or when asked not to).
    pub path_leads_here: Option<Result<(), String>>,
}

impl Replay {
    /// The stress, state, tangent, status and branch are those of the case, bit for bit.
    pub fn identical(&self) -> bool {
        self.differences.is_empty()
    }
}

fn differences(now: &DecodedOutputs, then: &DecodedOutputs) -> Vec<String> {
    let mut out = Vec::new();
    if now.status != then.status {
        out.push(format!("status: {} now, {} in the case", now.status, then.status));
    }
    if now.branch != then.branch {
        out.push(format!("branch: {} now, {} in the case", now.branch, then.branch));
    }
    let mut arrays = vec![
        ("stress", &now.stress, &then.stress),
        ("state", &now.state, &then.state),
        ("tangent", &now.tangent, &then.tangent),
    ];
    if let (Some(a), Some(b)) = (&now.dstress_dtemp, &then.dstress_dtemp) {
        arrays.push(("dstress_dtemp", a, b));
    }
    for (what, a, b) in arrays {
        let diff: Vec<usize> =
            (0..a.len().min(b.len())).filter(|&i| a[i].to_bits() != b[i].to_bits()).collect();
        if let Some(&i) = diff.first() {
            out.push(format!(
                "{what}[{i}]: {:e} now, {:e} in the case{}",
                a[i],
                b[i],
                if diff.len() > 1 { format!(" ({} entries differ)", diff.len()) } else { String::new() }
            ));
        }
    }
    out
}

/// Rerun the call of a case through `caller` (a routine with the case's sizes and
/// convention): the call itself with exactly the saved inputs, compared bit for bit with the
/// saved outputs, then its check with the case's settings. With `walk_path`, also walk the
/// case's path (when it has one) to see that it leads to the call.
pub fn replay(caller: &mut Caller<'_>, case: &ParsedCase, walk_path: bool) -> Result<Replay, String> {
    let info = caller.info().clone();
    let mut driver = driver_for(&info, &case.call)?;
    let base = driver.base_call(caller);
    let b = &driver.base;
    let outputs = DecodedOutputs {
        status: b.outcome.status,
        branch: b.outcome.branch,
        stress: b.stress.clone(),
        state: b.state.clone(),
        tangent: b.tangent.clone(),
        dstress_dtemp: b
            .outcome
            .provides(crate::routine::provides::DSTRESS_DTEMP)
            .then(|| b.dstress_dtemp.clone()),
    };
    let mut fault = base.as_ref().err().map(|f| f.to_string());
    let diffs = differences(&outputs, &case.outputs);
    let check = if fault.is_none() {
        match judge::check_call(&mut driver, caller, &case.case.probe.settings, case.previous.as_deref()) {
            Ok(c) => Some(c),
            Err(f) => {
                fault = Some(format!("a call of the check: {f}"));
                None
            }
        }
    } else {
        None
    };
    let path_leads_here = match (&case.path, walk_path) {
        (Some((start, path)), true) => {
            Some(walk(caller, &info, &case.case.probe.settings, &case.call, start, path))
        }
        _ => None,
    };
    Ok(Replay { outputs, fault, differences: diffs, check, path_leads_here })
}

fn walk(
    caller: &mut Caller<'_>,
    info: &RoutineInfo,
    settings: &Settings,
    call: &DecodedCall,
    start: &PointState,
    path: &Path,
) -> Result<(), String> {
    let last = path.increments.len();
    let mut d = Driver::new(info, &call.props, start.clone())?;
    let conv = &info.convention;
    let mut dstrain = vec![0.0; conv.ncomp()];
    for (k, inc) in path.increments.iter().enumerate() {
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        d.set_increment(&dstrain, inc.dtemp, inc.dtime);
        if k + 1 == last {
            if inc.hold_stress.is_some() {
                crate::bisect::base_call_of(&mut d, caller, inc, settings)
                    .map_err(|f| format!("increment {} of the path: {f}", k + 1))?;
            }
            break;
        }
        crate::bisect::base_call_of(&mut d, caller, inc, settings)
            .map_err(|f| format!("increment {} of the path: {f}", k + 1))?;
        d.advance();
    }
    let s = d.start();
    let same =
        |a: &[f64], b: &[f64]| a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x.to_bits() == y.to_bits());
    let mut off = Vec::new();
    for (what, a, b) in [
        ("strain", &s.strain, &call.start.strain),
        ("stress", &s.stress, &call.start.stress),
        ("state", &s.state, &call.start.state),
        ("dstrain", &d.dstrain().to_vec(), &call.dstrain),
    ] {
        if !same(a, b) {
            off.push(what);
        }
    }
    if s.temp.to_bits() != call.start.temp.to_bits() || d.dtemp().to_bits() != call.dtemp.to_bits() {
        off.push("temperature");
    }
    if s.time.to_bits() != call.start.time.to_bits() || d.dtime().to_bits() != call.dtime.to_bits() {
        off.push("time");
    }
    if d.increment() != call.increment {
        off.push("increment number");
    }
    if off.is_empty() {
        Ok(())
    } else {
        Err(format!("the path's last increment does not reach the call: {} differ", off.join(", ")))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::bisect::testing::{Bar, PROPS};
    use crate::bisect::{self, BisectSettings};
    use crate::routine::Model;

    #[test]
    fn numbers_keep_every_bit() {
        let v = [0.1 + 0.2, 1e-310, -0.0, f64::MAX, f64::MIN_POSITIVE, 1.0 / 3.0, f64::NAN, f64::INFINITY];
        let n = Numbers::of(&v);
        let text = serde_json::to_string(&n).unwrap();
        let back: Numbers = serde_json::from_str(&text).unwrap();
        let mut w = Vec::new();
        let d = back.decode("x", &mut w).unwrap();
        assert!(w.is_empty(), "{w:?}");
        for (a, b) in v.iter().zip(&d) {
            assert_eq!(a.to_bits(), b.to_bits());
        }
        // NaN and infinity have no decimal; their bits carry them.
        assert!(text.contains("null,null"), "{text}");
    }

    #[test]
    fn decimals_alone_and_decimals_that_disagree() {
        let n: Numbers = serde_json::from_str(r#"{ "values": [1.5, -2e-3] }"#).unwrap();
        let mut w = Vec::new();
        assert_eq!(n.decode("a", &mut w).unwrap(), vec![1.5, -2e-3]);
        let n: Numbers =
            serde_json::from_str(r#"{ "values": [1.5], "bits": ["3ff0000000000000"] }"#).unwrap();
        assert_eq!(n.decode("a", &mut w).unwrap(), vec![1.0]);
        assert!(w[0].contains("a[0]") && w[0].contains("the bits are used"), "{w:?}");
        let n: Numbers = serde_json::from_str(r#"{ "values": [1.5], "bits": ["3ff00000"] }"#).unwrap();
        assert!(n.decode("a", &mut w).unwrap_err().contains("16 hex digits"));
        let n: Numbers =
            serde_json::from_str(r#"{ "values": [1.5, 2], "bits": ["3ff0000000000000"] }"#).unwrap();
        assert!(n.decode("a", &mut w).unwrap_err().contains("2 values and 1 bit"));
    }

    #[test]
    fn compacting_keeps_the_json_value() {
        let v = serde_json::json!({
            "a": [1, 2.5, null], "b": {"c": [[1, 2], [3]], "d": "x, [y]\n\"z\"", "e": []},
            "f": ["∂σ/∂ε", "q"]
        });
        let pretty = serde_json::to_string_pretty(&v).unwrap();
        let compact = compact_arrays(&pretty);
        assert!(compact.lines().count() < pretty.lines().count());
        assert!(compact.contains("[1, 2.5, null]"), "{compact}");
        assert_eq!(serde_json::from_str::<serde_json::Value>(&compact).unwrap(), v);
    }

    /// A case of the flawed bar's first failing call (increment 3 of increments of 5e-4).
    fn bar_case() -> (Case, crate::bisect::Located) {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = Path {
            name: "bar".into(),
            increments: vec![PathIncrement::strain([5e-4, 0.0, 0.0, 0.0, 0.0, 0.0]); 5],
        };
        let settings = Settings::default();
        let start = PointState::zero(&info, 20.0);
        let report = crate::check::run(&mut caller, &PROPS, start.clone(), &path, &settings).unwrap();
        let l = bisect::locate(
            &mut caller,
            &PROPS,
            start.clone(),
            &path,
            &report,
            &settings,
            &BisectSettings::default(),
        )
        .unwrap()
        .unwrap();
        let (mut d, previous) =
            bisect::driver_at(&mut caller, &PROPS, start.clone(), &path, 3, &settings).unwrap();
        let check = judge::check_call(&mut d, &mut caller, &settings, previous.as_deref()).unwrap();
        assert!(!check.passed());
        let origin = CaseOrigin {
            manifest: None,
            path: path.name.clone(),
            increment: 3,
            of: 5,
            branch: l.branch.clone(),
            crossing: CaseOrigin::crossing_of(&l.inside),
            shrunk_from: None,
        };
        let prefix = Path { name: "bar".into(), increments: path.increments[..3].to_vec() };
        let mut r = CaseRoutine::from_info(&info, true);
        r.model = Some("bar".into());
        let case =
            Case::capture(r, &d, Ok(&check), previous.as_deref(), &settings, origin, Some((&start, &prefix)));
        (case, l)
    }

    #[test]
    fn a_case_replays_bit_for_bit_with_the_same_numbers() {
        let (case, l) = bar_case();
        let text = case.to_json();
        let parsed = Case::parse(&text).unwrap();
        assert!(parsed.warnings.is_empty(), "{:?}", parsed.warnings);
        // Every bit pattern survives the file. (The decimals need not: serde_json's default
        // parser reads the stress 252.38095238095238 written here back one unit in the last
        // place off, which is why the bits are kept.)
        fn all_bits(v: &serde_json::Value, out: &mut Vec<String>) {
            match v {
                serde_json::Value::Object(m) => {
                    for (k, x) in m {
                        if k == "bits" {
                            out.push(x.to_string());
                        } else {
                            all_bits(x, out);
                        }
                    }
                }
                serde_json::Value::Array(a) => a.iter().for_each(|x| all_bits(x, out)),
                _ => {}
            }
        }
        let (mut a, mut b) = (Vec::new(), Vec::new());
        all_bits(&serde_json::to_value(&case).unwrap(), &mut a);
        all_bits(&serde_json::to_value(&parsed.case).unwrap(), &mut b);
        assert!(a.len() > 10);
        assert_eq!(a, b);
        assert_eq!(parsed.outputs.stress[0].to_bits(), 0x406f8c30c30c30c3);
        assert_eq!(parsed.call.increment, 3);
        assert_eq!(parsed.call.start.strain, vec![1e-3]);
        assert_eq!(parsed.call.start.temp, 20.0);
        assert_eq!(parsed.outputs.branch, 1);
        assert_eq!(l.call.dstrain, parsed.call.dstrain);
        let crossing = case.origin.crossing.as_ref().unwrap();
        assert!(crossing.below <= 0.5 && 0.5 <= crossing.above);
        let mut bar = Bar::new(true);
        let mut caller = Caller::new(&mut bar);
        let r = replay(&mut caller, &parsed, true).unwrap();
        assert!(r.identical(), "{:?}", r.differences);
        assert_eq!(r.outputs.stress[0].to_bits(), parsed.outputs.stress[0].to_bits());
        assert_eq!(r.outputs.tangent[0], PROPS[0]);
        assert_eq!(r.path_leads_here, Some(Ok(())));
        let c = r.check.unwrap();
        assert!(!c.passed());
        assert_eq!(ProbeCheck::list(&c), case.probe.checks);
        assert_eq!(c.finding(), case.probe.finding);
        // The consistent bar gives other outputs for the same inputs, and passes.
        let mut good = Bar::new(false);
        let mut caller = Caller::new(&mut good);
        let r = replay(&mut caller, &parsed, false).unwrap();
        assert!(!r.identical());
        assert!(r.differences.iter().any(|d| d.starts_with("tangent[0]")), "{:?}", r.differences);
        assert!(r.check.unwrap().passed());
        assert_eq!(r.path_leads_here, None);
    }

    #[test]
    fn a_path_that_does_not_lead_to_the_call_is_named() {
        let (mut case, _) = bar_case();
        let p = case.path.as_mut().unwrap();
        p.increments.remove(0);
        let parsed = Case::parse(&case.to_json()).unwrap();
        let mut bar = Bar::new(true);
        let mut caller = Caller::new(&mut bar);
        let r = replay(&mut caller, &parsed, true).unwrap();
        let e = r.path_leads_here.unwrap().unwrap_err();
        assert!(e.contains("strain") && e.contains("increment number"), "{e}");
    }

    #[test]
    fn broken_cases_name_line_and_column() {
        let (case, _) = bar_case();
        let text = case.to_json();
        let e = Case::parse(&text[..text.len() / 2]).unwrap_err();
        assert!(e.line > 1 && e.message.contains("EOF"), "{e}");
        let bad = text.replacen("\"increment\": 3", "\"incremnt\": 3", 1);
        let e = Case::parse(&bad).unwrap_err();
        assert!(e.message.contains("incremnt"), "{e}");
        // Values and bits that do not pair up are reported at the line of the bits; a wrong
        // length at the field's line.
        let strain_line = text.lines().position(|l| l.contains("\"strain\"")).unwrap() + 1;
        let bad = text.replacen("\"values\": [0.001]", "\"values\": [0.001, 0.0]", 1);
        let e = Case::parse(&bad).unwrap_err();
        assert_eq!(e.line, strain_line + 2, "{e}");
        assert!(e.message.contains("call.strain has 2 values and 1 bit patterns"), "{e}");
        let bad = text.replacen("\"values\": [0.001]", "\"values\": [0.001, 0.0]", 1).replacen(
            "\"bits\": [\"3f50624dd2f1a9fc\"]",
            "\"bits\": [\"3f50624dd2f1a9fc\", \"0000000000000000\"]",
            1,
        );
        let e = Case::parse(&bad).unwrap_err();
        assert_eq!(e.line, strain_line, "{e}");
        assert!(e.message.contains("call.strain has 2 entries; the routine needs 1"), "{e}");
        let bad = text.replacen("\"format\": 1", "\"format\": 7", 1);
        let e = Case::parse(&bad).unwrap_err();
        assert_eq!(e.line, 3, "{e}");
        assert!(e.to_string().starts_with("3:"), "{e}");
    }
}
