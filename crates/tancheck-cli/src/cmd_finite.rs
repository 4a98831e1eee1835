//! `tancheck check` and `tancheck probe` on a finite-strain manifest (one with a `finite`
//! section, see `finite_load`): run the check or the probes and hand the report to the
//! command's reporters (terminal, `--json`, `--html`, `--junit`; `report::finite` renders it).

use std::path::Path as FsPath;

use anyhow::Result;
use tancheck_core::finite::check::run;
use tancheck_core::finite::path::FinitePath;
use tancheck_core::finite::probe::{run_all, FiniteProbeReport};
use tancheck_core::finite::routine::FiniteRoutine;

use crate::exit;
use crate::finite_load::{open, FiniteManifest};
use crate::report::Reporter;
use crate::session::{reporters, OutputArgs};

/// What both commands do first: open the report, start the watch, load the manifest and its
/// routine, build the path and the start state; then run `body` with the routine checking.
fn with_routine<T>(
    manifest: &FsPath,
    json: Option<&FsPath>,
    body: impl FnOnce(&mut dyn FiniteRoutine, &FiniteManifest, &[f64], &FinitePath) -> T,
) -> Result<T> {
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
    let out = body(r.as_mut(), &m, &state0, &path);
    crate::survive::checking(false);
    Ok(out)
}

/// `tancheck check` on a finite-strain manifest.
pub fn check(manifest: &FsPath, json: Option<&FsPath>, output: &OutputArgs) -> Result<i32> {
    let report = with_routine(manifest, json, |r, m, state0, path| {
        run(r, &m.routine.properties, state0, path, m.check)
    })?;
    let mut out = reporters(output, json);
    out.finite_check(&report)?;
    out.finish()?;
    Ok(report.verdict.exit_code())
}

/// `tancheck probe` on a finite-strain manifest.
pub fn probe(manifest: &FsPath, json: Option<&FsPath>, output: &OutputArgs) -> Result<i32> {
    let report = with_routine(manifest, json, |r, m, state0, path| {
        let results = run_all(r, &m.routine.properties, state0, path, &m.probes);
        FiniteProbeReport::new(&r.info().name, results)
    })?;
    let mut out = reporters(output, json);
    out.finite_probes(&report)?;
    out.finish()?;
    Ok(if report.passed { exit::PASS } else { exit::TANGENT_FAILURE })
}
