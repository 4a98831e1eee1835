//! Probe-suite files (`probes/*.json`): a path, the probes with their tolerances, and where
//! along the path they run. Unknown fields are errors with file, line and column.

use serde::Deserialize;
use std::path::{Path as FsPath, PathBuf};

use tancheck_core::path::Path;
use tancheck_core::probe::ProbeSpec;
use tancheck_core::PointKind;

use crate::manifest::{ManifestError, PathSpec};

/// The smallest probe amplitude (strain, or rotation in radians) accepted: 1e-14, a tenth of
/// the smallest the energy probe cuts its own cycle to (1e-5 / 10⁸), and far above amplitudes
/// whose square underflows (1e-300 squared is zero: a cycle's net work would read zero for
/// any law).
pub const MIN_AMPLITUDE: f64 = 1e-14;

/// The default suites, built in (the same files as under `probes/`).
pub const DEFAULT_SUITES: [(&str, &str); 3] = [
    ("probes/solid.json", include_str!("../../../probes/solid.json")),
    ("probes/thermal.json", include_str!("../../../probes/thermal.json")),
    ("probes/cohesive.json", include_str!("../../../probes/cohesive.json")),
];

/// A probe suite as read from a file.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Suite {
    pub suite: String,
    #[serde(default)]
    pub description: String,
    /// Kinds of point the suite is meant for (informative; a mismatch is a warning).
    #[serde(default)]
    pub kinds: Vec<PointKind>,
    /// The path the probes walk when the manifest has none or `--suite-path` asks for it;
    /// a suite without one walks the manifest's (or `--path`).
    #[serde(default)]
    pub path: Option<PathSpec>,
    pub probes: Vec<ProbeSpec>,
}

impl Suite {
    /// The first probe that names a state variable (`damage`) or a property (`length`,
    /// `viscosity`, `axes`) a routine with `nstate` state variables and `nprop` properties
    /// does not have, in words naming the probe (`probes[k]`).
    pub fn indices_beyond(&self, nstate: usize, nprop: usize) -> Option<String> {
        self.probes.iter().enumerate().find_map(|(k, p)| {
            let named = [("damage", &p.damage), ("scalar_states", &p.scalar_states)];
            let state = named.into_iter().find_map(|(what, v)| {
                v.iter().flatten().find(|&&i| i >= nstate).map(|i| {
                    format!("{what} index {i} is not a state variable (the routine has {nstate}; indices count from 0)")
                })
            });
            let property = || {
                let named = [("length", p.length), ("viscosity", p.viscosity)];
                named
                    .into_iter()
                    .find_map(|(what, i)| i.filter(|&i| i >= nprop).map(|i| (what, i)))
                    .or_else(|| p.axes.iter().flatten().find(|&&i| i + 2 >= nprop).map(|&i| ("axes", i)))
                    .map(|(what, i)| {
                        format!(
                            "{what} names property {i}{}, and the routine has {nprop} properties (indices \
                             count from 0)",
                            if what == "axes" { " (with the two after it)" } else { "" }
                        )
                    })
            };
            state.or_else(property).map(|w| format!("probes[{k}] ({}): {w}", p.probe))
        })
    }

    pub fn parse(text: &str, file: &FsPath) -> Result<Suite, ManifestError> {
        let s: Suite = serde_json::from_str(text).map_err(|e| ManifestError::json(file, text, &e))?;
        let known: Vec<_> = tancheck_core::probe::registry().iter().map(|p| p.name()).collect();
        let at = |k: usize, name: &str, message: String| match probe_position(text, k, name) {
            Some((line, column)) => ManifestError::Parse { path: file.into(), line, column, message },
            None => ManifestError::Invalid { path: file.into(), message },
        };
        if s.path.is_some() {
            s.path().map_err(|message| ManifestError::Invalid { path: file.into(), message })?;
        }
        for (k, p) in s.probes.iter().enumerate() {
            if !known.contains(&p.probe.as_str()) {
                return Err(at(
                    k,
                    &p.probe,
                    format!("unknown probe `{}`; known probes: {}", p.probe, known.join(", ")),
                ));
            }
            check_numbers(p).map_err(|m| at(k, &p.probe, format!("probe `{}`: {m}", p.probe)))?;
        }
        if s.probes.is_empty() {
            return Err(ManifestError::Invalid {
                path: file.into(),
                message: "the suite has no probes; list at least one under \"probes\"".into(),
            });
        }
        // `at` is checked against the path the probes walk (the manifest's, --path or the
        // suite's: `check_at` once it is known), not against the suite's own.
        Ok(s)
    }

    /// Every `at` of the suite names an increment of `path` (1 to its length).
    pub fn check_at(&self, path: &Path) -> Result<(), String> {
        let n = path.increments.len();
        for p in &self.probes {
            if let Some(at) = &p.at {
                if at.is_empty() {
                    return Err(format!("probe `{}`: `at` is empty, so the probe would never run", p.probe));
                }
                if let Some(k) = at.iter().find(|&&k| k == 0 || k > n) {
                    return Err(format!(
                        "probe `{}` runs at increment {k}, but the path ({}) has increments 1 to {n}",
                        p.probe, path.name
                    ));
                }
            }
        }
        Ok(())
    }

    /// A built-in suite on another path: `at` entries past the path are dropped (when none is
    /// left, the probe runs at every increment). Returns what was changed, for the report.
    pub fn fit_at(&mut self, path: &Path) -> Vec<String> {
        let n = path.increments.len();
        let mut notes = Vec::new();
        for p in &mut self.probes {
            if let Some(at) = &mut p.at {
                let before = at.clone();
                at.retain(|&k| k >= 1 && k <= n);
                if at.len() != before.len() {
                    if at.is_empty() {
                        p.at = None;
                        notes.push(format!(
                            "probe `{}`: none of increments {before:?} is on this path of {n}; it runs at every increment",
                            p.probe
                        ));
                    } else {
                        notes.push(format!(
                            "probe `{}`: runs at increments {at:?} of {before:?} (the path has {n})",
                            p.probe
                        ));
                    }
                }
            }
        }
        notes
    }

    pub fn load(file: &FsPath) -> Result<Suite, ManifestError> {
        let text = std::fs::read_to_string(file)
            .map_err(|reason| ManifestError::Read { path: file.into(), reason })?;
        Suite::parse(&text, file)
    }

    /// A warning per entry that gives fields its probe does not read (`file` names the suite):
    /// they are ignored, and were dropped without a word, a user-style sweep believing `axes`
    /// set on `newton`. A warning, not an error: the suite still runs as it did.
    pub fn unread_warnings(&self, file: &FsPath) -> Vec<String> {
        let mut out = Vec::new();
        for (k, p) in self.probes.iter().enumerate() {
            let unread = p.unread_fields();
            if !unread.is_empty() {
                out.push(format!(
                    "{}: probes[{k}] ({}): {} {} not read by this probe (ignored)",
                    file.display(),
                    p.probe,
                    unread.iter().map(|u| format!("`{u}`")).collect::<Vec<_>>().join(", "),
                    if unread.len() == 1 { "is" } else { "are" }
                ));
            }
        }
        out
    }

    /// The suite's own path; an error when it has none.
    pub fn path(&self) -> Result<Path, String> {
        match &self.path {
            Some(p) => crate::manifest::path_from_spec(p),
            None => Err(format!(
                "suite `{}` has no `path`, and none was given otherwise: give the manifest a path, or --path",
                self.suite
            )),
        }
    }

    /// The default suite for a kind of point; the thermal one when the routine is known to
    /// depend on temperature.
    pub fn default_for(kind: PointKind, thermal: bool) -> Suite {
        let (file, text) = if kind.is_cohesive() {
            DEFAULT_SUITES[2]
        } else if thermal {
            DEFAULT_SUITES[1]
        } else {
            DEFAULT_SUITES[0]
        };
        Suite::parse(text, &PathBuf::from(file)).expect("the built-in suites are valid")
    }
}

/// The most sub-increments the refinement probe may use.
pub const MAX_SUBDIVISIONS: usize = 1024;

/// The numbers of one suite entry (what does not depend on the path or the routine).
fn check_numbers(p: &ProbeSpec) -> Result<(), String> {
    if let Some(t) = p.tol {
        if !(t.is_finite() && t > 0.0) {
            return Err(format!("tol is {t}; it must be a positive number"));
        }
    }
    if let Some(n) = p.subdivisions {
        if !(1..=MAX_SUBDIVISIONS).contains(&n) {
            return Err(format!("subdivisions is {n}; it must be 1 to {MAX_SUBDIVISIONS}"));
        }
    }
    if let Some(a) = p.amplitude {
        let max = tancheck_core::path::MAX_STRAIN;
        // Why a floor: see MIN_AMPLITUDE (a cycle's net work at 1e-300 reads zero for any law).
        if !(a.is_finite() && a.abs() >= MIN_AMPLITUDE && a.abs() <= max) {
            return Err(format!(
                "amplitude is {a}; it must be at least {MIN_AMPLITUDE:e} and at most {max} in magnitude"
            ));
        }
    }
    if let Some(at) = &p.at {
        if at.contains(&0) {
            return Err("at names increment 0; increments count from 1".into());
        }
    }
    if let Some(g) = p.fracture_energy {
        if !(g.is_finite() && g > 0.0) {
            return Err(format!(
                "fracture_energy is {g}; it must be a positive number (energy per unit area)"
            ));
        }
    }
    if let Some(axes) = &p.axes {
        if let Some(i) = axes.iter().find(|&&i| i > crate::manifest::MAX_PROPERTIES) {
            return Err(format!("axes names property {i}; at most {}", crate::manifest::MAX_PROPERTIES));
        }
    }
    Ok(())
}

/// Line and column (1-based) of the `k`-th suite entry's probe name in `text`: the k-th
/// `"probe": "<name>"` pair, found by scanning (the parser keeps no positions).
fn probe_position(text: &str, k: usize, name: &str) -> Option<(usize, usize)> {
    let quoted = serde_json::to_string(name).ok()?;
    let mut seen = 0;
    let mut from = 0;
    while let Some(i) = text[from..].find("\"probe\"") {
        let key = from + i;
        let rest = text[key + 7..].trim_start();
        from = key + 7;
        let Some(rest) = rest.strip_prefix(':') else { continue };
        let rest = rest.trim_start();
        if seen == k {
            if !rest.starts_with(&quoted) {
                return None;
            }
            let value = text.len() - rest.len();
            let before = &text[..value];
            let line = before.matches('\n').count() + 1;
            let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
            return Some((line, column));
        }
        seen += 1;
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_built_in_suites_parse() {
        for (file, text) in DEFAULT_SUITES {
            let s = Suite::parse(text, FsPath::new(file)).unwrap();
            assert!(!s.probes.is_empty());
            assert!(!s.path().unwrap().increments.is_empty());
        }
    }

    #[test]
    fn unknown_fields_and_probes_are_errors_with_line_and_column() {
        let bad = DEFAULT_SUITES[0].1.replace("\"subdivisions\"", "\"subdivision\"");
        let e = Suite::parse(&bad, FsPath::new("s.json")).unwrap_err().to_string();
        assert!(e.starts_with("s.json:"), "{e}");
        assert!(e.contains("subdivision"), "{e}");
        let bad = DEFAULT_SUITES[0].1.replace("\"determinism\"", "\"determinsm\"");
        let e = Suite::parse(&bad, FsPath::new("s.json")).unwrap_err().to_string();
        assert!(e.contains("unknown probe `determinsm`"), "{e}");
        // With the line and column of the name.
        let line = bad.lines().position(|l| l.contains("determinsm")).unwrap() + 1;
        let column = bad.lines().nth(line - 1).unwrap().find("\"determinsm\"").unwrap() + 1;
        assert!(e.starts_with(&format!("s.json:{line}:{column}:")), "{e}");
    }

    #[test]
    fn numbers_out_of_range_are_errors_naming_the_file() {
        let bad = DEFAULT_SUITES[0].1.replacen("\"subdivisions\": 8", "\"subdivisions\": 2000000000", 1);
        assert_ne!(bad, DEFAULT_SUITES[0].1, "the solid suite sets subdivisions to 8");
        let e = Suite::parse(&bad, FsPath::new("s.json")).unwrap_err().to_string();
        assert!(e.starts_with("s.json:") && e.contains("subdivisions is 2000000000"), "{e}");
        // An amplitude whose square underflows would let any law pass the energy cycle.
        for a in ["1e-300", "0", "20"] {
            let text = format!(
                r#"{{"suite": "x", "path": {{"shape": "uniaxial-strain", "peak": 0.001, "steps": 3}},
                "probes": [{{"probe": "energy", "amplitude": {a}}}]}}"#
            );
            let e = Suite::parse(&text, FsPath::new("s.json")).unwrap_err().to_string();
            assert!(e.contains("must be at least 1e-14"), "{a}: {e}");
        }
    }

    #[test]
    fn a_suite_without_probes_or_whose_at_misses_the_path_walked_is_an_error() {
        let text = r#"{"suite": "x", "path": {"shape": "uniaxial-strain", "peak": 0.001, "steps": 3}, "probes": []}"#;
        let e = Suite::parse(text, FsPath::new("s.json")).unwrap_err().to_string();
        assert!(e.starts_with("s.json: the suite has no probes"), "{e}");
        // `at` past the suite's own path is not an error at parse: the probes may walk another
        // path (the manifest's); it is checked against the path walked.
        let text = r#"{"suite": "x", "path": {"shape": "uniaxial-strain", "peak": 0.001, "steps": 3},
            "probes": [{"probe": "refinement", "at": [2, 9]}]}"#;
        let s = Suite::parse(text, FsPath::new("s.json")).unwrap();
        let e = s.check_at(&s.path().unwrap()).unwrap_err();
        assert!(
            e.contains("probe `refinement` runs at increment 9") && e.contains("increments 1 to 3"),
            "{e}"
        );
        // Increment 0 is an error at parse, naming the file, the line and column of the probe.
        let text = r#"{"suite": "x", "path": {"shape": "uniaxial-strain", "peak": 0.001, "steps": 3},
            "probes": [{"probe": "refinement", "at": [0]}]}"#;
        let e = Suite::parse(text, FsPath::new("s.json")).unwrap_err().to_string();
        assert!(e.starts_with("s.json:2:") && e.contains("probe `refinement`"), "{e}");
        assert!(e.contains("at names increment 0"), "{e}");
        // A built-in suite on a shorter path keeps what fits.
        let mut s = Suite::default_for(tancheck_core::PointKind::Solid3d, false);
        let short = tancheck_core::path::Path::ramp(tancheck_core::path::Shape::UniaxialStrain, 1e-3, 4, 0);
        let notes = s.fit_at(&short);
        assert!(s.check_at(&short).is_ok());
        assert!(notes.iter().any(|n| n.contains("refinement")), "{notes:?}");
    }
}
