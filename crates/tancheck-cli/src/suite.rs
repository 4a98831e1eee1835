//! Probe-suite files (`probes/*.json`): a path, the probes with their tolerances, and where
//! along the path they run. Unknown fields are errors with file, line and column.

use serde::Deserialize;
use std::path::{Path as FsPath, PathBuf};

use tancheck_core::path::Path;
use tancheck_core::probe::ProbeSpec;
use tancheck_core::PointKind;

use crate::manifest::{ManifestError, PathSpec};

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
    pub path: PathSpec,
    pub probes: Vec<ProbeSpec>,
}

impl Suite {
    pub fn parse(text: &str, file: &FsPath) -> Result<Suite, ManifestError> {
        let s: Suite = serde_json::from_str(text).map_err(|e| ManifestError::Parse {
            path: file.into(),
            line: e.line(),
            column: e.column(),
            message: e.to_string().split(" at line ").next().unwrap_or_default().to_string(),
        })?;
        let known: Vec<_> = tancheck_core::probe::registry().iter().map(|p| p.name()).collect();
        for p in &s.probes {
            if !known.contains(&p.probe.as_str()) {
                return Err(ManifestError::Invalid {
                    path: file.into(),
                    message: format!("unknown probe `{}`; known probes: {}", p.probe, known.join(", ")),
                });
            }
        }
        s.path().map_err(|message| ManifestError::Invalid { path: file.into(), message })?;
        Ok(s)
    }

    pub fn load(file: &FsPath) -> Result<Suite, ManifestError> {
        let text = std::fs::read_to_string(file)
            .map_err(|source| ManifestError::Read { path: file.into(), source })?;
        Suite::parse(&text, file)
    }

    pub fn path(&self) -> Result<Path, String> {
        crate::manifest::path_from_spec(&self.path)
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
    }
}
