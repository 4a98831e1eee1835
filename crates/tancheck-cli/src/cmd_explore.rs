//! `tancheck explore MANIFEST`: random load paths from a seed (core `explore`), each checked
//! as `check` checks one, steered towards branches and state changes not reached yet; every
//! distinct failure shrunk and written as a case file for `tancheck replay`.

use std::path::PathBuf;

use anyhow::{bail, Context, Result};
use clap::Args;

use tancheck_core::explore::{self, Budget, ExploreSettings, NamedBranch, Stop, DEFAULT_PATHS};
use tancheck_core::Caller;

use crate::case_store::{open_for_manifest, write_case};
use crate::load::start_state;
use crate::manifest::Manifest;
use crate::report::Reporter;

#[derive(Args, Debug)]
pub struct ExploreArgs {
    /// The manifest (JSON) that names the routine and its properties; its optional `explore`
    /// section declares property ranges, a temperature window and the branches to reach.
    pub manifest: PathBuf,
    /// The seed of the random paths: the same seed, manifest and --paths/--calls budget give
    /// the same report.
    #[arg(long, value_name = "N", default_value_t = 1)]
    pub seed: u64,
    /// Random paths to check at most. Default: 500 when neither --calls nor --time is given.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub paths: Option<u64>,
    /// Routine calls at most (measuring, walking, checking and shrinking all count); the
    /// exploration stops before the next path once they are spent.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub calls: Option<u64>,
    /// Seconds at most (above 0, at most 86400). A run stopped by time is not reproducible
    /// from its seed; --paths and --calls are.
    #[arg(long, value_name = "SECONDS", value_parser = crate::survive::parse_seconds)]
    pub time: Option<f64>,
    /// The most increments of one random path.
    #[arg(long, value_name = "N", default_value_t = 40, value_parser = clap::value_parser!(u64).range(1..=10_000))]
    pub max_increments: u64,
    /// Candidate paths the shrinker checks at most for each distinct failure; 0 skips shrinking.
    #[arg(long, value_name = "N", default_value_t = 300)]
    pub max_shrink_iterations: usize,
    #[command(flatten)]
    pub run: crate::case_store::CaseRunArgs,
}

/// The budget of the arguments: the default number of paths when none is given.
pub fn budget_of(a: &ExploreArgs) -> Budget {
    let paths = a.paths.map(|n| n as usize);
    let paths =
        if paths.is_none() && a.calls.is_none() && a.time.is_none() { Some(DEFAULT_PATHS) } else { paths };
    Budget { paths, calls: a.calls, seconds: a.time }
}

/// `tancheck explore`.
pub fn run(a: &ExploreArgs) -> Result<i32> {
    a.run.output.prepare()?;
    let library = crate::manifest::library_of(&a.manifest);
    let inputs: Vec<&std::path::Path> =
        [Some(a.manifest.as_path()), library.as_deref()].into_iter().flatten().collect();
    a.run.output.guard(a.run.json.as_deref(), &inputs)?;
    if crate::finite_load::FiniteManifest::detect(&a.manifest) {
        bail!("{}: explore takes point routines; this manifest is a finite-strain one", a.manifest.display());
    }
    crate::survive::begin_report(a.run.json.as_deref(), &a.manifest.display().to_string())?;
    let (mut m, dir) = Manifest::load(&a.manifest)?;
    let file = a.manifest.display().to_string();
    if crate::block_session::is_block(&m) {
        bail!("{file}: explore takes point routines; this manifest is a block routine's");
    }
    crate::survive::set_routine(a.run.json.as_deref(), &crate::session::routine_name(&m));
    crate::survive::start_watchdog(crate::survive::DEFAULT_CALL_TIMEOUT, None);
    crate::survive::progress_lines(!a.run.output.quiet);
    m.fp_traps |= a.run.fp_traps;
    let mut ex = ExploreSettings {
        seed: a.seed,
        budget: budget_of(a),
        max_increments: a.max_increments as usize,
        shrink_iterations: a.max_shrink_iterations,
        ..ExploreSettings::default()
    };
    // The branches a built-in model reports, then what the manifest declares.
    if let Some(name) = &m.routine.model {
        if let Some(v) = tancheck_models::branches::branch_vocabulary(name) {
            ex.branches = v.iter().map(|&(branch, n)| NamedBranch { branch, name: n.into() }).collect();
        }
    }
    if let Some(spec) = &m.explore {
        spec.apply(&mut ex).map_err(|e| anyhow::anyhow!("{file}: {e}"))?;
    }
    let (mut opened, spec) =
        open_for_manifest(&m, &dir).with_context(|| format!("loading the routine of {file}"))?;
    let routine = opened.routine();
    let info = routine.info().clone();
    let start = start_state(&m, &info).with_context(|| file.clone())?;
    ex.validate(info.nprop).map_err(|e| anyhow::anyhow!("{file}: {e}"))?;
    let settings = m.check.clone();
    let mut caller = Caller::new(routine);
    let bar = crate::report::style::Progress::new(
        ex.budget.paths.unwrap_or(0) as u64,
        "exploring",
        a.run.output.shows_progress(),
    );
    crate::survive::checking(true);
    // A stop signal (Ctrl-C, SIGTERM, SIGHUP) ends the exploration after the path being
    // checked, and the reports hold what it found so far (it died of the signal and kept
    // nothing; a user-style sweep). A second signal ends the process at once.
    tancheck_abi::watch::defer_stop(true);
    let result = explore::run(&mut caller, &m.routine.properties, &start, &settings, &ex, &mut |p| {
        bar.set(p.paths as u64);
        bar.message(&format!("exploring: {} signatures, {} findings", p.signatures, p.findings));
        let stop = tancheck_abi::watch::stop_signal();
        (stop != 0).then_some(Stop::Signal(stop))
    });
    drop(bar);
    let mut report = result.map_err(|e| anyhow::anyhow!("{file}: {e}"))?;
    let case_dir = a.run.case_dir_of(&a.manifest, &dir);
    let mut case_notes = Vec::new();
    for f in &mut report.findings {
        let Some(s) = &f.shrunk else { continue };
        let Some(l) = &s.located else { continue };
        let written = crate::case_store::capture(
            &mut caller,
            &spec,
            &f.properties,
            &start,
            &s.path,
            l,
            &settings,
            &a.manifest,
            Some(f.path.increments.len()),
            &mut case_notes,
        )
        .and_then(|c| write_case(&case_dir, &c));
        match written {
            Ok(p) => f.case = Some(p),
            // Saving a case never fails the run.
            Err(e) => report.notes.push(format!("the case of `{}` was not written: {e:#}", f.finding)),
        }
    }
    report.notes.extend(case_notes);
    crate::survive::checking(false);
    let mut reporters = crate::session::reporters(&a.run.output, a.run.json.as_deref());
    reporters.explore(&report)?;
    reporters.finish()?;
    Ok(report.exit_code())
}
