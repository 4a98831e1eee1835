//! One session with a routine: load the routine a manifest names, check it along a path,
//! and print or write the report. Used by the check command, the demo and the selftest.

use std::io::Write;

use anyhow::{Context, Result};
use tancheck_core::path::{Path, Shape};
use tancheck_core::{check, Caller, PointKind, Report};

use crate::load::{load, start_state};
use crate::manifest::Manifest;
use crate::report::json::Json;
use crate::report::terminal::{Detail, Terminal};
use crate::report::{write_atomic, Reporter};

/// The default path: into the inelastic range of typical metals and back.
pub fn default_path(kind: PointKind) -> Path {
    let shape = if kind == PointKind::Uniaxial { Shape::UniaxialStrain } else { Shape::TensionShear };
    Path::ramp(shape, 4e-3, 8, 4)
}

/// The routine a manifest names, for messages: the symbol or the model.
pub fn routine_name(m: &Manifest) -> String {
    match (&m.routine.library, &m.routine.symbol, &m.routine.model) {
        (Some(l), Some(s), _) => format!("{}:{s}", l.display()),
        (_, _, Some(model)) => format!("model {model}"),
        _ => "the routine".into(),
    }
}

/// Load and check the routine a manifest names.
pub fn run_manifest(m: &Manifest, dir: &std::path::Path, path: &Path) -> Result<Report> {
    if let Some(hb) = std::env::var_os(crate::isolate::HEARTBEAT_ENV) {
        crate::isolate::worker_follows_parent(std::path::Path::new(&hb))?;
    }
    let mut loaded = load(m, dir)?;
    let routine = loaded.routine();
    let start = start_state(m, routine.info())?;
    // In an isolated worker, every call leaves a heartbeat for the parent.
    let mut beating;
    let routine: &mut dyn tancheck_core::Routine = match std::env::var_os(crate::isolate::HEARTBEAT_ENV) {
        Some(hb) => {
            beating = crate::isolate::Heartbeat::new(routine, std::path::Path::new(&hb))?;
            &mut beating
        }
        None => routine,
    };
    let mut caller = Caller::new(routine);
    crate::survive::checking(true);
    let report =
        check::run(&mut caller, &m.routine.properties, start, path, &m.check).map_err(anyhow::Error::msg);
    crate::survive::checking(false);
    report
}

/// Print the readable report and/or write the JSON one.
pub fn emit(report: &Report, detail: Detail, json: Option<&std::path::Path>) -> Result<()> {
    let mut out = crate::survive::stdout();
    match json {
        Some(p) if p.as_os_str() == "-" => Json.write(report, &mut out)?,
        other => {
            Terminal { detail }.write(report, &mut out)?;
            if let Some(p) = other {
                let mut buf = Vec::new();
                Json.write(report, &mut buf)?;
                write_atomic(p, &buf)
                    .with_context(|| format!("writing the JSON report to {}", p.display()))?;
            }
            if detail != Detail::Quiet {
                for c in &report.cautions {
                    writeln!(out, "   caution: {c}")?;
                }
            }
        }
    }
    Ok(())
}
