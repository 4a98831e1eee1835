//! `tancheck bisect MANIFEST`: check the routine along the path, then point at the first
//! failure: the increment and its branch, the fraction of the increment where the error
//! changes class (e.g. where the yield surface is crossed), what the step studies say
//! (mismatch, truncation or noise), and a shrunk path that still fails. The failing calls are
//! written as case files for `tancheck replay`.

use std::path::PathBuf;

use anyhow::{Context, Result};
use clap::Args;

use tancheck_core::bisect::{self, BisectSettings, ShrinkLimits, ShrinkStop};
use tancheck_core::{check, Caller};

use crate::case_store::{open_for_manifest, write_case};
use crate::exit;
use crate::load::start_state;
use crate::manifest::Manifest;
use crate::report::Reporter;
use crate::session::default_path;

#[derive(Args, Debug)]
pub struct BisectArgs {
    /// The manifest (JSON) that names the routine, its properties and the path.
    pub manifest: PathBuf,
    /// Path to walk instead of the manifest's: a path file (JSON, like a manifest's "path"), or
    /// SHAPE:PEAK:STEPS[:BACK] (shapes: uniaxial-strain, shear-12, biaxial, hydrostatic,
    /// tension-shear, mixed-mode, and uniaxial-stress, which holds every stress but 11 at zero),
    /// as for `check`.
    #[arg(long, value_name = "FILE|SPEC")]
    pub path: Option<String>,
    /// Candidate paths the shrinker checks at most; 0 skips shrinking.
    #[arg(long, value_name = "N", default_value_t = ShrinkLimits::default().max_iterations)]
    pub max_shrink_iterations: usize,
    /// Seconds the shrinker runs at most.
    #[arg(long, value_name = "S", default_value_t = ShrinkLimits::default().max_seconds)]
    pub max_shrink_seconds: f64,
    /// Narrow the class change inside the failing increment to this fraction of it.
    #[arg(long, value_name = "F", default_value_t = BisectSettings::default().fraction_tol)]
    pub fraction_tol: f64,
    #[command(flatten)]
    pub run: crate::case_store::CaseRunArgs,
}

pub use crate::report::model::{BisectOutcome, ShrinkSummary};

/// The stop of a shrink in words, naming the option that raises its limit.
pub fn stop_words(stop: &ShrinkStop) -> String {
    match stop {
        ShrinkStop::Done => "no smaller path fails the same way".into(),
        ShrinkStop::IterationLimit { limit } => format!(
            "stopped at the limit of {limit} candidate checks; raise it with --max-shrink-iterations to shrink further"
        ),
        ShrinkStop::TimeLimit { seconds } => {
            format!("stopped at the limit of {seconds} s; raise it with --max-shrink-seconds to shrink further")
        }
        ShrinkStop::Signal { signal } => format!(
            "stopped by {}; the path shrunk so far is kept (run bisect again to shrink further)",
            crate::campaign::item::signal_name(*signal)
        ),
    }
}

/// `tancheck bisect`.
pub fn run(a: &BisectArgs) -> Result<i32> {
    a.run.output.prepare()?;
    let path = a.path.as_deref().map(std::path::Path::new).filter(|p| p.is_file());
    let library = crate::manifest::library_of(&a.manifest);
    let inputs: Vec<&std::path::Path> =
        [Some(a.manifest.as_path()), path, library.as_deref()].into_iter().flatten().collect();
    a.run.output.guard(a.run.json.as_deref(), &inputs)?;
    if crate::finite_load::FiniteManifest::detect(&a.manifest) {
        return crate::finite_case::bisect(&a.manifest, a.path.is_some(), a.fraction_tol, &a.run);
    }
    crate::survive::begin_report(a.run.json.as_deref(), &a.manifest.display().to_string())?;
    let (mut m, dir) = Manifest::load(&a.manifest)?;
    if crate::block_session::is_block(&m) {
        anyhow::bail!(
            "{}: bisect takes point routines; this manifest is a block routine's (`tancheck check` \
             makes the block checks; bisect its point counterpart's manifest)",
            a.manifest.display()
        );
    }
    crate::survive::set_routine(a.run.json.as_deref(), &crate::session::routine_name(&m));
    crate::survive::start_watchdog(crate::survive::DEFAULT_CALL_TIMEOUT, None);
    m.fp_traps |= a.run.fp_traps;
    let bs = BisectSettings { fraction_tol: a.fraction_tol, ..BisectSettings::default() };
    bs.validate().map_err(|e| anyhow::anyhow!("--fraction-tol: {e}"))?;
    if !a.max_shrink_seconds.is_finite()
        || a.max_shrink_seconds <= 0.0
        || a.max_shrink_seconds > crate::survive::MAX_SECONDS
    {
        anyhow::bail!(
            "--max-shrink-seconds must be a number of seconds above 0 and at most {}",
            crate::survive::MAX_SECONDS
        );
    }
    let path = match &a.path {
        Some(p) => crate::manifest::path_arg(p)?,
        None => m
            .path_or(default_path(m.routine.kind))
            .map_err(|e| anyhow::anyhow!("{}: {e}", a.manifest.display()))?,
    };
    let file = a.manifest.display().to_string();
    let (mut opened, spec) =
        open_for_manifest(&m, &dir).with_context(|| format!("loading the routine of {file}"))?;
    crate::survive::checking(true);
    let routine = opened.routine();
    let info = routine.info().clone();
    let start = start_state(&m, &info).with_context(|| file.clone())?;
    let props = m.routine.properties.clone();
    let settings = m.check.clone();
    let mut caller = Caller::new(routine);
    let report =
        check::run(&mut caller, &props, start.clone(), &path, &settings).map_err(anyhow::Error::msg)?;
    // A path cut where the routine asked for smaller increments is the one the cases replay.
    let path = report.checked_path.clone().unwrap_or(path);
    let located = bisect::locate(&mut caller, &props, start.clone(), &path, &report, &settings, &bs)
        .map_err(anyhow::Error::msg)?;
    let case_dir = a.run.case_dir_of(&a.manifest, &dir);
    let mut warnings = Vec::new();
    let mut cases = Vec::new();
    let mut to_write = Vec::new();
    let mut shrunk = None;
    if let Some(l) = &located {
        let c = crate::case_store::capture(
            &mut caller,
            &spec,
            &props,
            &start,
            &path,
            l,
            &settings,
            &a.manifest,
            None,
            &mut warnings,
        )?;
        // Written before the shrink, which may run for minutes: whatever ends it, the located
        // case is on disk.
        match write_case(&case_dir, &c) {
            Ok(f) => cases.push(f),
            Err(e) => warnings.push(format!("{e:#}")),
        }
        if a.max_shrink_iterations > 0 {
            let limits =
                ShrinkLimits { max_iterations: a.max_shrink_iterations, max_seconds: a.max_shrink_seconds };
            let progress = crate::report::style::Progress::new(
                0,
                "shrinking the failing path",
                a.run.output.shows_progress(),
            );
            // A stop signal (Ctrl-C, SIGTERM, SIGHUP) ends the shrink before its next candidate:
            // the located case and the path shrunk so far are written, and the exit code is
            // 128 + the signal (it died of the signal and kept nothing; a user-style sweep). A
            // second signal ends the process at once.
            tancheck_abi::watch::defer_stop(true);
            let shrunk_path = bisect::shrink_until(
                &mut caller,
                &props,
                &start,
                &path,
                &report,
                &settings,
                limits,
                &tancheck_abi::watch::stop_signal,
            )
            .map_err(anyhow::Error::msg)?;
            drop(progress);
            if let Some(s) = shrunk_path {
                let l2 =
                    bisect::locate(&mut caller, &props, start.clone(), &s.path, &s.report, &settings, &bs)
                        .map_err(anyhow::Error::msg)?;
                if let Some(l2) = &l2 {
                    let c = crate::case_store::capture(
                        &mut caller,
                        &spec,
                        &props,
                        &start,
                        &s.path,
                        l2,
                        &settings,
                        &a.manifest,
                        Some(s.original_increments),
                        &mut warnings,
                    )?;
                    to_write.push(c);
                }
                shrunk = Some(ShrinkSummary {
                    stopped: stop_words(&s.stop),
                    path: s.path,
                    original_increments: s.original_increments,
                    iterations: s.iterations,
                    accepted: s.accepted,
                    seconds: s.seconds,
                    stop: s.stop,
                    located: l2,
                });
            }
        }
    }
    for c in &to_write {
        // Saving a case never fails the run.
        match write_case(&case_dir, c) {
            Ok(f) => {
                if !cases.contains(&f) {
                    cases.push(f);
                }
            }
            Err(e) => warnings.push(format!("{e:#}")),
        }
    }
    crate::survive::checking(false);
    let outcome = BisectOutcome {
        routine: info.name.clone(),
        path: path.name.clone(),
        verdict: report.verdict,
        finding: report.finding(),
        located,
        shrunk,
        cases,
        warnings,
        exit_code: report.exit_code(),
        cautions: tancheck_core::report::CAUTIONS.iter().map(|c| c.to_string()).collect(),
        check: Some(Box::new(report)),
    };
    let mut reporters = crate::session::reporters(&a.run.output, a.run.json.as_deref());
    reporters.bisect(&outcome)?;
    reporters.finish()?;
    // A stop signal during the shrink or after it (while its case was captured): said, and the
    // exit code is the signal's, with everything found written.
    let signal = tancheck_abi::watch::stop_signal();
    if signal != 0 {
        if matches!(outcome.shrunk.as_ref().map(|s| &s.stop), Some(ShrinkStop::Signal { .. })) {
            crate::say!("tancheck: bisect {}", stop_words(&ShrinkStop::Signal { signal }));
        } else {
            // After the shrink had ended: nothing was cut short.
            crate::say!(
                "tancheck: bisect stopped by {} after the shrink; everything found is written",
                crate::campaign::item::signal_name(signal)
            );
        }
        return Ok(128 + signal);
    }
    Ok(if outcome.located.is_none() && outcome.exit_code == exit::PASS {
        exit::PASS
    } else {
        outcome.exit_code
    })
}
