//! Turning cases into text and back: numbers as decimals and hex bit patterns, capturing a
//! call into a case, writing its JSON and parsing it with the line and column of each fault.

use super::*;
use crate::call_check::CallCheck;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::{Path, PathIncrement};
use crate::routine::Fault;
use crate::settings::Settings;

impl Numbers {
    pub fn of(v: &[f64]) -> Numbers {
        Numbers {
            values: v.iter().map(|x| x.is_finite().then_some(*x)).collect(),
            bits: v.iter().map(|x| format!("{:016x}", x.to_bits())).collect(),
        }
    }

    /// The numbers: from the bits when given, else from the decimals. A decimal that does not
    /// match its bits (beyond the last digit a parser may get wrong) is a warning.
    pub fn decode(&self, what: &str, warnings: &mut Vec<String>) -> Result<Vec<f64>, CoreError> {
        if self.bits.is_empty() {
            return self
                .values
                .iter()
                .enumerate()
                .map(|(index, v)| v.ok_or_else(|| CoreError::NullWithoutBits { what: what.into(), index }))
                .collect();
        }
        if self.bits.len() != self.values.len() {
            return Err(CoreError::BitsCount {
                what: what.into(),
                values: self.values.len(),
                bits: self.bits.len(),
            });
        }
        let mut out = Vec::with_capacity(self.bits.len());
        for (i, (b, v)) in self.bits.iter().zip(&self.values).enumerate() {
            let x = u64::from_str_radix(b.trim_start_matches("0x"), 16)
                .ok()
                .filter(|_| b.trim_start_matches("0x").len() == 16)
                .map(f64::from_bits)
                .ok_or_else(|| CoreError::NotHexBits { what: what.into(), index: i, bits: b.clone() })?;
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
    /// `driver.base` (as [`judge::check_call`](crate::call_check::check_call) leaves them), and
    /// `judged` its judgement, or the fault of the call.
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
        // Another file given for a case (a report, a manifest) is said so, not by the first
        // field it lacks.
        if let Ok(v) = serde_json::from_str::<serde_json::Value>(text) {
            let what = match (
                v.get("format").and_then(|f| f.as_str()),
                v.get("kind").and_then(|k| k.as_str()),
            ) {
                (Some("tancheck-report"), Some(kind)) => Some(format!("a tancheck report of kind `{kind}`")),
                (Some(f), _) => Some(format!("a file of format `{f}`")),
                // A finite-strain manifest: its cases are written by bisect on it, in their
                // own format (a `finite` section and a `call`; `tancheck replay` reads them).
                _ if v.get("finite").is_some() && v.get("call").is_none() => Some(
                    "a finite-strain manifest (`tancheck bisect` on it writes its finite-strain case files)"
                        .to_string(),
                ),
                _ if v.get("routine").is_some() && v.get("call").is_none() => Some("a manifest".to_string()),
                _ if v.is_array() => Some("a JSON array".to_string()),
                _ if !v.is_object() => Some("a single JSON value".to_string()),
                _ => None,
            };
            if let Some(what) = what {
                return Err(CaseError { line: 1, column: 1, problem: CaseProblem::NotACase(what) });
            }
        }
        let case: Case = serde_json::from_str(text).map_err(|e| CaseError {
            line: e.line(),
            column: e.column(),
            problem: CaseProblem::Syntax(
                e.to_string().split(" at line ").next().unwrap_or_default().to_string(),
            ),
        })?;
        let err = |keys: &[&str], problem: CaseProblem| {
            let (line, column) = place(text, keys);
            CaseError { line, column, problem }
        };
        if case.format != FORMAT {
            return Err(err(&["format"], CaseProblem::Format { found: case.format }));
        }
        let r = &case.routine;
        let conv = r.convention().map_err(|m| err(&["routine", "order"], m.into()))?;
        match (&r.model, &r.library, &r.symbol) {
            (Some(_), None, None) | (None, Some(_), Some(_)) => {}
            _ => return Err(err(&["routine"], CaseProblem::RoutineSource)),
        }
        let n = conv.ncomp();
        let mut warnings = Vec::new();
        let mut num = |section: &str,
                       key: &str,
                       x: &Numbers,
                       len: Option<usize>|
         -> Result<Vec<f64>, CaseError> {
            let mut w = Vec::new();
            let what = format!("{section}.{key}");
            let v = x.decode(&what, &mut w).map_err(|m| {
                let e = err(&[section, key, "bits"], m.clone().into());
                if e.line == 0 {
                    err(&[section, key], m.into())
                } else {
                    e
                }
            })?;
            let (line, _) = place(text, &[section, key]);
            warnings.extend(w.into_iter().map(|m| format!("line {line}: {m}")));
            if let Some(len) = len {
                if v.len() != len {
                    return Err(err(&[section, key], CaseProblem::Length { what, got: v.len(), want: len }));
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
                    return Err(err(&["call", key], CaseProblem::OutOfRange { key, value: *x, max }));
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
        case.probe.settings.validate().map_err(|m| err(&["probe", "settings"], m.into()))?;
        if c.increment < 1 {
            return Err(err(&["call", "increment"], CaseProblem::Increment(c.increment)));
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
                        problem: CaseProblem::InIncrement { increment: k + 1, problem: Box::new(e.problem) },
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
                path.validate().map_err(|m| err(&["path"], m.into()))?;
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
pub(super) fn compact_arrays(pretty: &str) -> String {
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
