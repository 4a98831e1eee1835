//! `tancheck check` and `tancheck probe` on a finite-strain manifest (one with a `finite`
//! section, see `finite_load`): run the check or the probes and hand the report to the
//! command's reporters (terminal, `--json`, `--html`, `--junit`; `report::finite` renders it).

use std::path::Path as FsPath;

use anyhow::Result;
use tancheck_core::finite::check::run;
use tancheck_core::finite::path::FinitePath;
use tancheck_core::finite::probe::{run_all_noted, FiniteProbeReport};
use tancheck_core::finite::routine::FiniteRoutine;

use crate::finite_load::{open, FiniteManifest};
use crate::report::Reporter;
use crate::session::{reporters, OutputArgs};

/// The command line's options a finite-strain check or probe run honours (the others are
/// refused before it starts, see `cli`).
#[derive(Clone, Copy, Debug)]
pub struct FiniteOptions {
    pub call_timeout: f64,
    pub suite_timeout: f64,
    /// `--guards`, over the manifest's (light and full both check the outputs; the finite
    /// interface has no read guard).
    pub guards: Option<crate::manifest::Guards>,
    pub fp_traps: bool,
}

impl Default for FiniteOptions {
    fn default() -> Self {
        FiniteOptions {
            call_timeout: crate::survive::DEFAULT_CALL_TIMEOUT,
            suite_timeout: crate::survive::DEFAULT_SUITE_TIMEOUT,
            guards: None,
            fp_traps: false,
        }
    }
}

/// What both commands do first: open the report, start the watch, load the manifest and its
/// routine, build the path and the start state; then run `body` with the routine checking.
fn with_routine<T>(
    manifest: &FsPath,
    json: Option<&FsPath>,
    options: FiniteOptions,
    body: impl FnOnce(&mut dyn FiniteRoutine, &FiniteManifest, &[f64], &FinitePath) -> T,
) -> Result<T> {
    let file = manifest.display().to_string();
    crate::survive::begin_report(json, &file)?;
    crate::survive::start_watchdog(options.call_timeout, Some(options.suite_timeout));
    // An `--isolate` worker dies with its parent, and every call leaves a heartbeat for it.
    let heartbeat = std::env::var_os(crate::isolate::HEARTBEAT_ENV);
    if let Some(hb) = &heartbeat {
        crate::isolate::worker_follows_parent(FsPath::new(hb))?;
    }
    let (mut m, d, dir) = FiniteManifest::load(manifest)?;
    if let Some(g) = options.guards {
        m.guards = g;
    }
    m.fp_traps |= options.fp_traps;
    // The last words name the routine, as a point check's do (not the manifest).
    let name = match (&m.routine.library, &m.routine.symbol, &m.routine.model) {
        (Some(l), Some(s), _) => format!("{}:{s}", l.display()),
        (_, _, Some(model)) => format!("model {model}"),
        _ => file.clone(),
    };
    crate::survive::set_routine(json, &name);
    let mut r = open(&m, &d, &dir, &file)?;
    let path = m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    let mut beating;
    let r: &mut dyn FiniteRoutine = match &heartbeat {
        Some(hb) => {
            beating = crate::isolate::FiniteHeartbeat::new(r.as_mut(), FsPath::new(hb))?;
            &mut beating
        }
        None => r.as_mut(),
    };
    crate::survive::checking(true);
    let out = body(r, &m, &state0, &path);
    crate::survive::checking(false);
    Ok(out)
}

/// `tancheck check` on a finite-strain manifest.
pub fn check(
    manifest: &FsPath,
    json: Option<&FsPath>,
    output: &OutputArgs,
    options: FiniteOptions,
) -> Result<i32> {
    let report = with_routine(manifest, json, options, |r, m, state0, path| {
        let mut report = run(r, &m.routine.properties, state0, path, m.check);
        // The full level adds nothing to a finite-strain call yet: said, not left to be
        // assumed (a user-style sweep; README, "Finite strain").
        if m.guards == crate::manifest::Guards::Full && m.routine.library.is_some() {
            report.notes.push(
                "guards full: finite-strain calls get the light level's checks (the input comparison, the zones \
                 after the outputs, the unwritten outputs); the full level's look for reads past the end of the \
                 inputs is not made for them yet"
                    .into(),
            );
        }
        report
    })?;
    let mut out = reporters(output, json);
    out.finite_check(&report)?;
    out.finish()?;
    Ok(report.exit_code)
}

/// `tancheck probe` on a finite-strain manifest.
pub fn probe(
    manifest: &FsPath,
    json: Option<&FsPath>,
    output: &OutputArgs,
    options: FiniteOptions,
) -> Result<i32> {
    let report = with_routine(manifest, json, options, |r, m, state0, path| {
        let (results, notes) = run_all_noted(r, &m.routine.properties, state0, path, &m.probes);
        FiniteProbeReport::with_notes(&r.info().name, results, notes)
    })?;
    let mut out = reporters(output, json);
    out.finite_probes(&report)?;
    out.finish()?;
    Ok(report.exit_code)
}
