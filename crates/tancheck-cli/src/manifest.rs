//! The manifest: a JSON file that describes one routine and how to check it.
//!
//! ```json
//! {
//!   "routine": {
//!     "library": "libj2.so", "symbol": "c_j2",
//!     "kind": "solid-3d", "order": ["11","22","33","23","13","12"], "shear": "engineering",
//!     "states": 13, "properties": [200000, 0.3, 250, 1000, 0, 0, 500]
//!   },
//!   "start": { "temperature": 20 },
//!   "path": { "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 },
//!   "check": { "schemes": ["central", "complex-step"], "central": { "rel_step": 6e-6, "tol": 1e-6 } },
//!   "fp_traps": false
//! }
//! ```
//! Instead of `library` and `symbol`, `"model": "j2"` picks a built-in Rust model. A relative
//! library path is relative to the manifest's folder. Unknown fields are errors.

use serde::Deserialize;
use std::path::{Path as FsPath, PathBuf};

use tancheck_core::path::{Path, PathIncrement, Shape};
use tancheck_core::{Convention, PointKind, Settings, ShearMeasure};

/// A manifest as read from a file.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Manifest {
    pub routine: RoutineSpec,
    #[serde(default)]
    pub start: StartSpec,
    #[serde(default)]
    pub path: Option<PathSpec>,
    #[serde(default)]
    pub check: Settings,
    #[serde(default)]
    pub fp_traps: bool,
    /// Memory guards around every call of a loaded routine: `off`, `light` (default) or `full`.
    #[serde(default)]
    pub guards: Guards,
    /// Settings of a block routine's check (with `routine.interface: "block"`).
    #[serde(default)]
    pub block: Option<crate::block_manifest::BlockSpec>,
    /// What `tancheck explore` may vary (property ranges, temperatures) and should reach.
    #[serde(default)]
    pub explore: Option<crate::explore_manifest::ExploreSpec>,
}

/// Guard level of a manifest.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Guards {
    Off,
    #[default]
    Light,
    Full,
}

#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoutineSpec {
    /// Shared library with the routine.
    pub library: Option<PathBuf>,
    /// Exported symbol name.
    pub symbol: Option<String>,
    /// A built-in Rust model instead of a library: "elastic", "j2", "j2-continuum".
    pub model: Option<String>,
    pub kind: PointKind,
    /// Component order as labels; default: the kind's default order.
    pub order: Option<Vec<String>>,
    #[serde(default)]
    pub shear: ShearMeasure,
    /// Number of state variables (for a library; a model knows its own).
    pub states: Option<usize>,
    pub properties: Vec<f64>,
    /// The routine's interface: `point` (default, tancheck_routine.h) or `block`
    /// (tancheck_block.h, explicit dynamics).
    #[serde(default)]
    pub interface: crate::block_manifest::Interface,
}

#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StartSpec {
    pub strain: Option<Vec<f64>>,
    pub stress: Option<Vec<f64>>,
    pub state: Option<Vec<f64>>,
    #[serde(default)]
    pub temperature: f64,
}

/// Either a built-in shape loaded to `peak` in `steps` increments and back to zero in
/// `back`, or `increments` given one by one (canonical tensor components 11, 22, 33, 23,
/// 13, 12).
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PathSpec {
    pub shape: Option<String>,
    pub peak: Option<f64>,
    pub steps: Option<usize>,
    #[serde(default)]
    pub back: usize,
    /// Temperature increment of every increment of a ramp.
    pub dtemp: Option<f64>,
    /// Time increment of every increment of a ramp (default 1).
    pub dtime: Option<f64>,
    pub name: Option<String>,
    pub increments: Option<Vec<PathIncrement>>,
}

/// A ramp along a built-in shape.
#[derive(Clone, Debug)]
pub struct RampSpec {
    pub shape: String,
    pub peak: f64,
    pub steps: usize,
    pub back: usize,
    pub dtemp: f64,
}

/// A manifest that cannot be used, with where and why.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ManifestError {
    /// The reason is part of the message (not a chained source, which would print it twice).
    #[error("cannot read {path}: {reason}")]
    Read { path: PathBuf, reason: std::io::Error },
    #[error("{path}:{line}:{column}: {message}")]
    Parse { path: PathBuf, line: usize, column: usize, message: String },
    #[error("{path}: {message}")]
    Invalid { path: PathBuf, message: String },
}

impl ManifestError {
    /// A JSON file (its `text`) that does not parse into what it should hold: file, line,
    /// column and [`json_message`].
    pub fn json(path: &FsPath, text: &str, e: &serde_json::Error) -> ManifestError {
        ManifestError::Parse {
            path: path.into(),
            line: e.line(),
            column: e.column(),
            message: json_message(e, text),
        }
    }
}

/// The words of a JSON parse error of `text` without its position (the caller puts the file,
/// line and column first), in JSON's words rather than Rust's: "expected usize" becomes
/// "expected a whole number, 0 or more", a sequence an array, a map or a struct an object;
/// and a value of the wrong type where a name is expected (serde_json's "expected value" in
/// a file that is valid JSON) says that a name is expected.
pub fn json_message(e: &serde_json::Error, text: &str) -> String {
    let full = e.to_string();
    let mut m = full.split(" at line ").next().unwrap_or_default().to_string();
    if m == "expected value" && serde_json::from_str::<serde::de::IgnoredAny>(text).is_ok() {
        return "invalid type, expected a name (a string, one of the choices of this field)".into();
    }
    m = m
        .replace("invalid type: sequence", "invalid type: an array")
        .replace("invalid type: map", "invalid type: an object")
        .replace("expected a sequence", "expected an array")
        .replace("expected a map", "expected an object");
    if let Some(at) = m.find("expected struct ") {
        m.truncate(at);
        m.push_str("expected an object");
    }
    for (rust, plain) in [
        ("usize", "a whole number, 0 or more"),
        ("u64", "a whole number, 0 or more"),
        ("u32", "a whole number, 0 or more"),
        ("u16", "a whole number, 0 or more"),
        ("u8", "a whole number, 0 or more"),
        ("i64", "a whole number"),
        ("i32", "a whole number"),
        ("f64", "a number"),
    ] {
        m = m.replace(&format!("expected {rust}"), &format!("expected {plain}"));
    }
    m
}

impl Manifest {
    pub fn load(path: &FsPath) -> Result<(Manifest, PathBuf), ManifestError> {
        let text = std::fs::read_to_string(path)
            .map_err(|reason| ManifestError::Read { path: path.into(), reason })?;
        let m = Manifest::parse(&text, path)?;
        let dir = path.parent().map(FsPath::to_path_buf).unwrap_or_default();
        Ok((m, dir))
    }

    pub fn parse(text: &str, path: &FsPath) -> Result<Manifest, ManifestError> {
        let m: Manifest = serde_json::from_str(text).map_err(|e| ManifestError::json(path, text, &e))?;
        m.validate().map_err(|message| ManifestError::Invalid { path: path.into(), message })?;
        Ok(m)
    }

    fn validate(&self) -> Result<(), String> {
        let r = &self.routine;
        match (&r.library, &r.symbol, &r.model) {
            (Some(_), Some(_), None) | (None, None, Some(_)) => {}
            (Some(_), None, None) => return Err("routine.library is given but routine.symbol is not".into()),
            _ => {
                return Err("give routine.library and routine.symbol (a compiled routine) or routine.model \
                            (a built-in model), not both"
                    .into())
            }
        }
        if r.library.is_some() && r.states.is_none() {
            return Err("routine.states (the number of state variables) is required for a library".into());
        }
        if r.properties.iter().any(|p| !p.is_finite()) {
            return Err("routine.properties must be finite numbers".into());
        }
        if r.properties.len() > MAX_PROPERTIES {
            return Err(format!(
                "routine.properties has {} entries; at most {MAX_PROPERTIES}",
                r.properties.len()
            ));
        }
        if let Some(n) = r.states {
            if n > MAX_STATES {
                return Err(format!("routine.states is {n}; at most {MAX_STATES}"));
            }
        }
        let st = &self.start;
        for (what, values, max) in [
            ("start.strain", &st.strain, tancheck_core::path::MAX_STRAIN),
            ("start.stress", &st.stress, tancheck_core::path::MAX_STRESS),
            ("start.state", &st.state, f64::MAX),
        ] {
            if let Some(x) = values.iter().flatten().find(|x| !x.is_finite() || x.abs() > max) {
                return Err(format!(
                    "{what} has {x}; every entry must be a finite number at most {max:e} in magnitude"
                ));
            }
        }
        if !st.temperature.is_finite() || st.temperature.abs() > MAX_TEMPERATURE {
            return Err(format!(
                "start.temperature is {}; it must be a finite number at most {MAX_TEMPERATURE:e} in magnitude",
                st.temperature
            ));
        }
        self.convention()?;
        crate::block_manifest::validate(self.routine.interface, self.routine.kind, self.block.as_ref())?;
        self.check.validate().map_err(|e| e.to_string())?;
        crate::explore_manifest::validate(self.explore.as_ref(), r.properties.len(), MAX_TEMPERATURE)?;
        self.path_or(Path { name: String::new(), increments: Vec::new() })?;
        Ok(())
    }

    pub fn convention(&self) -> Result<Convention, String> {
        let r = &self.routine;
        match &r.order {
            None => Ok(Convention::new(r.kind, r.shear)),
            Some(labels) => {
                let l: Vec<&str> = labels.iter().map(String::as_str).collect();
                Convention::from_labels(r.kind, &l, r.shear).map_err(|e| format!("routine.order: {e}"))
            }
        }
    }

    /// The path from the manifest, or `default` when it has none.
    pub fn path_or(&self, default: Path) -> Result<Path, String> {
        match &self.path {
            None => Ok(default),
            Some(p) => path_from_spec(p),
        }
    }
}

/// A path from its spec (manifest or suite file).
pub fn path_from_spec(p: &PathSpec) -> Result<Path, String> {
    {
        match (&p.increments, &p.shape) {
            (Some(incs), None) if p.peak.is_none() && p.steps.is_none() => {
                let path = Path {
                    name: p.name.clone().unwrap_or_else(|| "increments from the manifest".into()),
                    increments: incs.clone(),
                };
                path.validate().map_err(|e| format!("path.increments: {e}"))?;
                Ok(path)
            }
            (None, Some(shape)) => {
                let mut path = ramp(&RampSpec {
                    shape: shape.clone(),
                    peak: p.peak.ok_or("path.peak is required with path.shape")?,
                    steps: p.steps.ok_or("path.steps is required with path.shape")?,
                    back: p.back,
                    dtemp: p.dtemp.unwrap_or(0.0),
                })?;
                if let Some(dt) = p.dtime {
                    // As an increment of a path file may: 0 included (a routine is given a
                    // zero time increment where a solver makes a step without time).
                    if !(0.0..=tancheck_core::path::MAX_DTIME).contains(&dt) {
                        return Err(format!(
                            "path.dtime must be a number from 0 to {:e}, not {dt}",
                            tancheck_core::path::MAX_DTIME
                        ));
                    }
                    for inc in &mut path.increments {
                        inc.dtime = dt;
                    }
                }
                Ok(path)
            }
            _ => Err("path: give either shape, peak, steps (and back), or increments".into()),
        }
    }
}

pub use tancheck_core::path::MAX_INCREMENTS;
/// The most state variables a routine may declare.
pub const MAX_STATES: usize = 100_000;
/// The most properties a routine may take.
pub const MAX_PROPERTIES: usize = 100_000;
/// The largest start temperature accepted in magnitude.
pub const MAX_TEMPERATURE: f64 = 1.0e5;

/// Build a ramp path, checking its numbers. Besides the built-in shapes, `uniaxial-stress`
/// prescribes ε11 and holds every other stress at zero.
pub fn ramp(r: &RampSpec) -> Result<Path, String> {
    if r.steps == 0 {
        return Err("path.steps must be at least 1".into());
    }
    if r.steps.saturating_add(r.back) > MAX_INCREMENTS {
        return Err(format!("path.steps + path.back must be at most {MAX_INCREMENTS}"));
    }
    let max = tancheck_core::path::MAX_STRAIN;
    if !r.peak.is_finite() || r.peak == 0.0 || r.peak.abs() > max {
        return Err(format!(
            "path.peak is {}; it must be a nonzero number at most {max} in magnitude",
            r.peak
        ));
    }
    let max = tancheck_core::path::MAX_DTEMP;
    if !r.dtemp.is_finite() || r.dtemp.abs() > max {
        return Err(format!(
            "path.dtemp is {}; it must be a finite number at most {max} in magnitude",
            r.dtemp
        ));
    }
    let mut p = if r.shape == "uniaxial-stress" {
        Path::uniaxial_stress(r.peak, r.steps, r.back)
    } else {
        Path::ramp(
            Shape::from_name(&r.shape).map_err(|e| format!("{e}, uniaxial-stress"))?,
            r.peak,
            r.steps,
            r.back,
        )
    };
    if r.dtemp != 0.0 {
        for inc in &mut p.increments {
            inc.dtemp = r.dtemp;
        }
        p.name = format!("{}, ΔT = {} per increment", p.name, r.dtemp);
    }
    p.validate().map_err(|e| e.to_string())?;
    Ok(p)
}

/// The `--path` given when it names a file (not SHAPE:PEAK:STEPS): an input of the run.
pub fn path_file(path: &Option<String>) -> Option<&FsPath> {
    path.as_deref().map(FsPath::new).filter(|p| p.is_file())
}

/// The library a manifest of any kind (point, block, finite strain) names, beside the
/// manifest as it resolves it; `None` when it names none or cannot be read. A report written
/// over it would replace the routine (`check --json` named the manifest's library: the
/// library became a report; a user-style sweep): the commands refuse that before writing.
pub fn library_of(manifest: &FsPath) -> Option<PathBuf> {
    let text = std::fs::read_to_string(manifest).ok()?;
    let v: serde_json::Value = serde_json::from_str(&text).ok()?;
    let lib = FsPath::new(v.get("routine")?.get("library")?.as_str()?);
    let dir = manifest.parent().unwrap_or(FsPath::new(""));
    Some(if lib.is_absolute() { lib.to_path_buf() } else { dir.join(lib) })
}

/// Parse a path given on the command line: `SHAPE:PEAK:STEPS[:BACK]`.
/// A path file: a JSON object like a manifest's `path` (a shape with `peak` and `steps`, or
/// `increments` one by one). Unknown fields are errors with file, line and column.
pub fn load_path_file(file: &FsPath) -> Result<Path, ManifestError> {
    let text =
        std::fs::read_to_string(file).map_err(|reason| ManifestError::Read { path: file.into(), reason })?;
    // A list of increments alone is read by serde as the fields of a path in order, and its
    // error named a string where an object was found (a user-style sweep): say what to write.
    if text.trim().is_empty() {
        return Err(ManifestError::Invalid { path: file.into(), message: "the file is empty".into() });
    }
    if text.trim_start().starts_with('[') {
        return Err(ManifestError::Invalid {
            path: file.into(),
            message: "a path file is a JSON object, not a list: write the increments as \
                      { \"increments\": [ { \"dstrain\": [...] }, ... ] }, or a shape as \
                      { \"shape\": \"tension-shear\", \"peak\": 0.004, \"steps\": 8 }"
                .into(),
        });
    }
    let mut spec: PathSpec = serde_json::from_str(&text).map_err(|e| ManifestError::json(file, &text, &e))?;
    drop(text);
    let given = spec.increments.is_some();
    // A long path is held once: the increments move from the spec into the path.
    let mut p = match spec.increments.take() {
        Some(incs) if spec.shape.is_none() && spec.peak.is_none() && spec.steps.is_none() => {
            let path = Path {
                name: spec.name.clone().unwrap_or_else(|| "increments from the manifest".into()),
                increments: incs,
            };
            path.validate().map_err(|e| ManifestError::Invalid {
                path: file.into(),
                message: format!("path.increments: {e}"),
            })?;
            path
        }
        incs => {
            spec.increments = incs;
            path_from_spec(&spec).map_err(|message| ManifestError::Invalid { path: file.into(), message })?
        }
    };
    p.validate().map_err(|e| ManifestError::Invalid { path: file.into(), message: e.to_string() })?;
    if spec.name.is_none() && given {
        p.name = format!("increments from {}", file.display());
    }
    Ok(p)
}

/// The argument of `--path`: a path file (an existing file, or a name ending in `.json`), or
/// SHAPE:PEAK:STEPS[:BACK].
pub fn path_arg(s: &str) -> anyhow::Result<Path> {
    let f = FsPath::new(s);
    if f.is_file() || s.ends_with(".json") {
        Ok(load_path_file(f)?)
    } else {
        parse_path_arg(s).map_err(anyhow::Error::msg)
    }
}

pub fn parse_path_arg(s: &str) -> Result<Path, String> {
    let parts: Vec<&str> = s.split(':').collect();
    if !(3..=4).contains(&parts.len()) {
        return Err(format!(
            "--path takes a path file (JSON, like a manifest's \"path\") or SHAPE:PEAK:STEPS[:BACK], e.g. \
             tension-shear:0.004:8:4; got `{s}`"
        ));
    }
    let peak = parts[1].parse::<f64>().map_err(|_| format!("--path: `{}` is not a number", parts[1]))?;
    let steps = parts[2].parse::<usize>().map_err(|_| format!("--path: `{}` is not a count", parts[2]))?;
    let back = match parts.get(3) {
        Some(b) => b.parse::<usize>().map_err(|_| format!("--path: `{b}` is not a count"))?,
        None => 0,
    };
    ramp(&RampSpec { shape: parts[0].into(), peak, steps, back, dtemp: 0.0 })
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"{
  "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
  "path": { "shape": "uniaxial-strain", "peak": 0.004, "steps": 8, "back": 4 }
}"#;

    #[test]
    fn a_good_manifest_reads() {
        let m = Manifest::parse(GOOD, FsPath::new("m.json")).unwrap();
        assert_eq!(m.routine.kind, PointKind::Solid3d);
        assert_eq!(m.path_or(Path::ramp(Shape::Shear12, 1.0, 1, 0)).unwrap().increments.len(), 12);
    }

    #[test]
    fn unknown_fields_name_line_and_column() {
        let bad = GOOD.replace("\"kind\"", "\"knd\"");
        let e = Manifest::parse(&bad, FsPath::new("m.json")).unwrap_err().to_string();
        assert!(e.starts_with("m.json:2:"), "{e}");
        assert!(e.contains("knd"), "{e}");
    }

    /// A number of the wrong kind is named in plain words, not by Rust's type name.
    #[test]
    fn a_negative_count_is_explained_in_plain_words() {
        let bad = GOOD.replace("\"steps\": 8", "\"steps\": -8");
        let e = Manifest::parse(&bad, FsPath::new("m.json")).unwrap_err().to_string();
        assert!(e.starts_with("m.json:3:"), "{e}");
        assert!(e.contains("expected a whole number, 0 or more") && !e.contains("usize"), "{e}");
    }

    // A shape's time increment may be 0, as a path file's increments may (it was refused for
    // shapes alone; a user-style sweep); a negative one, or one beyond the paths' bound, is
    // named.
    #[test]
    fn a_shape_takes_a_time_increment_of_zero() {
        let with = |dt: &str| GOOD.replace("\"back\": 4", &format!("\"back\": 4, \"dtime\": {dt}"));
        let m = Manifest::parse(&with("0"), FsPath::new("m.json")).unwrap();
        let p = m.path_or(Path::ramp(Shape::Shear12, 1.0, 1, 0)).unwrap();
        assert!(p.increments.iter().all(|i| i.dtime == 0.0));
        for bad in ["-1", "1e300"] {
            let e = Manifest::parse(&with(bad), FsPath::new("m.json")).unwrap_err().to_string();
            assert!(e.starts_with("m.json") && e.contains("path.dtime must be a number from 0"), "{e}");
        }
    }

    #[test]
    fn inconsistent_routines_are_explained() {
        let bad = GOOD.replace("\"model\": \"j2\"", "\"library\": \"x.so\"");
        let e = Manifest::parse(&bad, FsPath::new("m.json")).unwrap_err().to_string();
        assert!(e.contains("routine.symbol"), "{e}");
        let bad = GOOD.replace("\"kind\": \"solid-3d\"", "\"kind\": \"solid-3d\", \"order\": [\"11\"]");
        let e = Manifest::parse(&bad, FsPath::new("m.json")).unwrap_err().to_string();
        assert!(e.contains("routine.order"), "{e}");
        assert!(parse_path_arg("tension-shear:0.004").is_err());
        assert_eq!(parse_path_arg("tension-shear:0.004:8:4").unwrap().increments.len(), 12);
    }
}
