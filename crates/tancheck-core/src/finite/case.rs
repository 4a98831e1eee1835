//! Finite-strain case files: the exact inputs of one call of a finite-strain routine whose
//! tangent failed the check (F₀, F₁, start stress and state, properties, temperature, time),
//! its outputs and the numbers of the check, so that `tancheck replay` makes the call again
//! and judges it as the check did. Every array is a [`Numbers`] (decimals for reading, the
//! IEEE-754 bits for the replay), as in a point routine's case (`crate::case`).
//!
//! Fields, in order: `about`, `format` ([`FINITE_FORMAT`]), `tool`, `finite` (the declared
//! measures and frame, as in the manifest), `routine`, `call`, `outputs`, `check` (the settings
//! and the verdict with its numbers) and `origin` (the manifest, the increment, and the fraction
//! of it where the verdict changes). Nothing here reads or writes files.

use serde::{Deserialize, Serialize};

use super::check::{judge, FiniteIncrement, FiniteSettings, Judged};
use super::locate::{FiniteLocated, FractionFound};
use super::mat3::{self, Mat3};
use super::numeric::{Start, Workspace};
use super::routine::FiniteRoutine;
use crate::case::Numbers;

/// The version of the finite-strain case format this code writes and reads.
pub const FINITE_FORMAT: u32 = 1;

/// The `about` field of every finite-strain case.
pub const FINITE_ABOUT: &str = "tancheck finite-strain case: the exact inputs of one call of a \
finite-strain routine whose returned tangent failed a check, with the outputs and the numbers of \
that check. Commit this file next to the routine's sources: `tancheck replay <this file>` makes the \
call again and judges its tangent as the check did. Values are for reading; the bits (IEEE-754, \
hex) are what the replay uses.";

/// The declared measures, as a finite-strain manifest's `finite` section.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCaseMeasures {
    pub stress: String,
    pub tangent: String,
    pub frame: String,
}

/// The routine of a finite-strain case.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCaseRoutine {
    pub name: String,
    /// A built-in finite-strain model, by name.
    #[serde(default)]
    pub model: Option<String>,
    /// A shared library: its path relative to the case file's folder (or absolute).
    #[serde(default)]
    pub library: Option<String>,
    /// The library's absolute path when the case was written.
    #[serde(default)]
    pub library_absolute: Option<String>,
    /// SHA-256 of the library file when the case was written.
    #[serde(default)]
    pub library_sha256: Option<String>,
    #[serde(default)]
    pub symbol: Option<String>,
    pub nstate: usize,
    pub complex_twin: bool,
    /// The guard level of the check (`off`, `light`, `full`).
    #[serde(default)]
    pub guards: Option<String>,
    #[serde(default)]
    pub fp_traps: bool,
}

/// The inputs of the call.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCaseCall {
    /// Increment number the routine was given, from 1.
    pub increment: i32,
    pub properties: Numbers,
    /// F at the start and at the end of the increment, column-major (entry (i, j) at i + 3 j).
    pub f0: Numbers,
    pub f1: Numbers,
    /// Stress at the start, in the declared measure (11 22 33 23 13 12).
    pub stress0: Numbers,
    pub state0: Numbers,
    /// Temperature at the start and its increment.
    pub temperature: Numbers,
    /// Time at the start and the time increment.
    pub time: Numbers,
}

/// The outputs of the call as the check saw them.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCaseOutputs {
    pub status: i32,
    pub branch: i32,
    pub stress: Numbers,
    pub state: Numbers,
    /// Column-major n × n in the declared tangent measure.
    pub tangent: Numbers,
}

/// The check's settings and its verdict on the call.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCaseCheck {
    pub settings: FiniteSettings,
    pub verdict: FiniteIncrement,
}

/// Where the call was met.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCaseOrigin {
    #[serde(default)]
    pub manifest: Option<String>,
    /// The increment of the path (1-based) and how many the path had.
    pub increment: usize,
    pub of: usize,
    pub fraction: FractionFound,
}

/// A finite-strain case file.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FiniteCase {
    pub about: String,
    pub format: u32,
    pub tool: String,
    pub finite: FiniteCaseMeasures,
    pub routine: FiniteCaseRoutine,
    pub call: FiniteCaseCall,
    pub outputs: FiniteCaseOutputs,
    pub check: FiniteCaseCheck,
    pub origin: FiniteCaseOrigin,
}

/// The call of a case, decoded.
#[derive(Clone, Debug)]
pub struct DecodedFiniteCall {
    pub start: Start,
    pub f1: Mat3<f64>,
}

impl FiniteCase {
    /// The case of a located failure.
    pub fn capture(
        measures: FiniteCaseMeasures,
        routine: FiniteCaseRoutine,
        l: &FiniteLocated,
        settings: FiniteSettings,
        manifest: Option<String>,
        of: usize,
    ) -> FiniteCase {
        let s = &l.start;
        let b = &l.judged.base;
        FiniteCase {
            about: FINITE_ABOUT.into(),
            format: FINITE_FORMAT,
            tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
            finite: measures,
            routine,
            call: FiniteCaseCall {
                increment: s.increment,
                properties: Numbers::of(&s.properties),
                f0: Numbers::of(&mat3::to_flat(&s.f0)),
                f1: Numbers::of(&mat3::to_flat(&l.f1)),
                stress0: Numbers::of(&s.stress0),
                state0: Numbers::of(&s.state0),
                temperature: Numbers::of(&s.temperature),
                time: Numbers::of(&s.time),
            },
            outputs: FiniteCaseOutputs {
                status: b.outcome.status,
                branch: b.outcome.branch,
                stress: Numbers::of(&b.stress),
                state: Numbers::of(&b.state),
                tangent: Numbers::of(&b.tangent),
            },
            check: FiniteCaseCheck { settings, verdict: l.judged.increment.clone() },
            origin: FiniteCaseOrigin { manifest, increment: l.increment, of, fraction: l.fraction.clone() },
        }
    }

    /// The case as JSON text, arrays of numbers on one line each.
    pub fn to_json(&self) -> String {
        let mut s =
            crate::case::compact_json(&serde_json::to_string_pretty(self).expect("a case serialises"));
        s.push('\n');
        s
    }

    /// Read a case (JSON syntax and fields, the format); errors in serde_json's words with
    /// the line and column.
    pub fn parse(text: &str) -> Result<FiniteCase, (usize, usize, String)> {
        let c: FiniteCase = serde_json::from_str(text).map_err(|e| {
            (e.line(), e.column(), e.to_string().split(" at line ").next().unwrap_or_default().to_string())
        })?;
        if c.format != FINITE_FORMAT {
            return Err((
                1,
                1,
                format!("case format {} is not the format {FINITE_FORMAT} this tancheck reads", c.format),
            ));
        }
        Ok(c)
    }

    /// The call's inputs decoded, checked against the sizes of `nprop` properties and the
    /// case's state; `warnings` gets decimals that disagree with their bits.
    pub fn decode(&self, warnings: &mut Vec<String>) -> Result<DecodedFiniteCall, String> {
        let c = &self.call;
        let get = |what: &str, n: &Numbers, len: Option<usize>, w: &mut Vec<String>| {
            let v = n.decode(&format!("call.{what}"), w).map_err(|e| e.to_string())?;
            match len {
                Some(l) if v.len() != l => Err(format!("call.{what} has {} entries; it needs {l}", v.len())),
                _ if v.iter().any(|x| !x.is_finite()) => {
                    Err(format!("call.{what}: every entry must be a finite number"))
                }
                _ => Ok(v),
            }
        };
        let properties = get("properties", &c.properties, None, warnings)?;
        let f0 = get("f0", &c.f0, Some(9), warnings)?;
        let f1 = get("f1", &c.f1, Some(9), warnings)?;
        let stress0 = get("stress0", &c.stress0, Some(6), warnings)?;
        let state0 = get("state0", &c.state0, Some(self.routine.nstate), warnings)?;
        let temperature = get("temperature", &c.temperature, Some(2), warnings)?;
        let time = get("time", &c.time, Some(2), warnings)?;
        if c.increment < 1 {
            return Err(format!("call.increment is {}; it counts from 1", c.increment));
        }
        let flat = |v: &[f64]| -> [f64; 9] { std::array::from_fn(|i| v[i]) };
        let (f0, f1) = (mat3::from_flat(&flat(&f0)), mat3::from_flat(&flat(&f1)));
        for (name, f) in [("f0", &f0), ("f1", &f1)] {
            let j = mat3::det(f);
            if !(j > 0.0 && j.is_finite()) {
                return Err(format!("call.{name} has det F = {j:e}; it must be positive"));
            }
        }
        Ok(DecodedFiniteCall {
            start: Start {
                properties,
                f0,
                stress0: std::array::from_fn(|i| stress0[i]),
                state0,
                temperature: [temperature[0], temperature[1]],
                time: [time[0], time[1]],
                increment: c.increment,
            },
            f1,
        })
    }
}

/// A case's call made again.
#[derive(Clone, Debug)]
pub struct FiniteReplayed {
    pub judged: Judged,
    /// The outputs (status, stress, state, tangent) that differ from the saved ones bit for
    /// bit, by name; empty when every one is the same.
    pub differs: Vec<String>,
}

/// Make the case's call again on `r` and judge it with the case's settings.
pub fn replay(
    r: &mut dyn FiniteRoutine,
    case: &FiniteCase,
    call: &DecodedFiniteCall,
) -> Result<FiniteReplayed, String> {
    let info = r.info().clone();
    let mut ws = Workspace::new(info.nstate, info.nproperties);
    let mut judged = judge(r, &mut ws, &call.start, &call.f1, case.check.settings).map_err(|e| {
        format!("the {} call faulted: {}", if e.base { "case's" } else { "a perturbed" }, e.fault)
    })?;
    judged.increment.increment = case.origin.increment;
    let mut ignore = Vec::new();
    let same = |saved: &Numbers, now: &[f64], w: &mut Vec<String>| {
        saved
            .decode("", w)
            .is_ok_and(|v| v.len() == now.len() && v.iter().zip(now).all(|(a, b)| a.to_bits() == b.to_bits()))
    };
    let o = &case.outputs;
    let b = &judged.base;
    let mut differs = Vec::new();
    if o.status != b.outcome.status {
        differs.push("status".to_string());
    }
    for (name, saved, now) in [
        ("stress", &o.stress, &b.stress[..]),
        ("state", &o.state, &b.state[..]),
        ("tangent", &o.tangent, &b.tangent[..]),
    ] {
        if !same(saved, now, &mut ignore) {
            differs.push(name.to_string());
        }
    }
    Ok(FiniteReplayed { judged, differs })
}
