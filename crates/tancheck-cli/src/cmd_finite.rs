//! `tancheck check` and `tancheck probe` on a finite-strain manifest (one with a `finite`
//! section, see `finite_load`): run the check or the probes and hand the report to the
//! command's reporters (terminal, `--json`, `--html`, `--junit`; `report::finite` renders it).

use std::path::Path as FsPath;

use anyhow::Result;
use tancheck_core::finite::check::run;
use tancheck_core::finite::probe::{run_all, FiniteProbeReport};

use crate::exit;
use crate::finite_load::{open, FiniteManifest};
use crate::report::Reporter;
use crate::session::{reporters, OutputArgs};

/// `tancheck check` on a finite-strain manifest.
pub fn check(manifest: &FsPath, json: Option<&FsPath>, output: &OutputArgs) -> Result<i32> {
    let file = manifest.display().to_string();
    crate::survive::begin_report(json, &file)?;
    crate::survive::start_watchdog(
        crate::survive::DEFAULT_CALL_TIMEOUT,
        Some(crate::survive::DEFAULT_SUITE_TIMEOUT),
    );
    let (m, d, dir) = FiniteManifest::load(manifest)?;
    let mut r = open(&m, &d, &dir, &file)?;
    let path = m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    crate::survive::checking(true);
    let report = run(r.as_mut(), &m.routine.properties, &state0, &path, m.check);
    crate::survive::checking(false);
    let mut out = reporters(output, json);
    out.finite_check(&report)?;
    out.finish()?;
    Ok(report.verdict.exit_code())
}

/// `tancheck probe` on a finite-strain manifest.
pub fn probe(manifest: &FsPath, json: Option<&FsPath>, output: &OutputArgs) -> Result<i32> {
    let file = manifest.display().to_string();
    crate::survive::begin_report(json, &file)?;
    crate::survive::start_watchdog(
        crate::survive::DEFAULT_CALL_TIMEOUT,
        Some(crate::survive::DEFAULT_SUITE_TIMEOUT),
    );
    let (m, d, dir) = FiniteManifest::load(manifest)?;
    let mut r = open(&m, &d, &dir, &file)?;
    let path = m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    crate::survive::checking(true);
    let results = run_all(r.as_mut(), &m.routine.properties, &state0, &path, &m.probes);
    crate::survive::checking(false);
    let report = FiniteProbeReport::new(&r.info().name, results);
    let mut out = reporters(output, json);
    out.finite_probes(&report)?;
    out.finish()?;
    Ok(if report.passed { exit::PASS } else { exit::TANGENT_FAILURE })
}
