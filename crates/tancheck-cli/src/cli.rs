//! Argument parsing and the commands.

use std::io::Write;
use std::path::PathBuf;

use anyhow::{bail, Context, Result};
use clap::{Args, CommandFactory, Parser, Subcommand};

use tancheck_core::{PointKind, Scheme};

use crate::demo::DemoArgs;
use crate::exit;
use crate::manifest::{path_arg, Manifest};
use crate::refuse::{
    refuse_for_finite, refuse_options, BLOCK_CHECKS_INSTEAD, FINITE_CHECK_INSTEAD, FINITE_PROBES_INSTEAD,
};
use crate::report::model::SuiteContext;
use crate::report::Reporter;
use crate::session::{default_path, routine_name};
use tancheck_core::report::Keep;

#[derive(Parser, Debug)]
#[command(
    name = "tancheck",
    version,
    about = "Checks that a material routine's tangent is the derivative of its own stress update",
    after_help = "Exit codes: 0 pass, 1 tangent failure (or a failed probe), 2 bad input or usage, 3 the routine crashed, misbehaved, corrupted the heap, hung or failed, 4 the tangent agrees with the real differences but the complex-step twin is not complex-step safe, 70 the routine, a thread of it or its library's constructor ended the process (without --isolate), 130/143 stopped by SIGINT/SIGTERM (the report says incomplete)."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Check one routine described by a manifest file.
    Check(CheckArgs),
    /// Run a probe suite (tangent, symmetry, energy, hidden state, ...) on one routine.
    Probe(ProbeArgs),
    /// Point at the first failure: increment, branch, fraction of the increment; shrink the
    /// path and write the failing calls as case files.
    Bisect(crate::cmd_bisect::BisectArgs),
    /// Check random load paths from a seed, steered towards branches and state changes not
    /// reached yet; shrink every distinct failure into a case file.
    Explore(crate::cmd_explore::ExploreArgs),
    /// Rerun the call saved in a case file and print its outputs and check.
    Replay(crate::cmd_replay::ReplayArgs),
    /// Run a campaign: every routine of a campaign file (or a folder of manifests) with its
    /// property sets, paths and probe suites, in parallel or as one shard of N.
    Campaign(crate::campaign::CampaignArgs),
    /// Merge the partial reports of a campaign's shards into one report.
    Merge(crate::cmd_merge::MergeArgs),
    /// Compile C and Fortran sources into a shared library, with the complex-step twin.
    Build(crate::cmd_build::BuildArgs),
    /// Build the bundled example routines and check them.
    Demo(DemoArgs),
    /// List the built-in reference models and their properties.
    Models {
        /// Print the names only.
        #[arg(short, long)]
        quiet: bool,
    },
    /// Run the zoo of routines with known flaws and show what the checker finds.
    Selftest(SelftestArgs),
    /// Print a shell completion script (for packagers).
    #[command(hide = true)]
    Completions(crate::cmd_packaging::CompletionsArgs),
    /// Print the man page, or write every page into a folder (for packagers).
    #[command(hide = true)]
    Man(crate::cmd_packaging::ManArgs),
}

#[derive(Args, Debug)]
struct SelftestArgs {
    /// Write the rows as JSON to FILE (`-` for standard output, replacing the table).
    #[arg(long, value_name = "FILE")]
    json: Option<PathBuf>,
    #[command(flatten)]
    output: crate::session::OutputArgs,
}

/// The command line's definition (for generated completions and man pages).
pub fn command() -> clap::Command {
    Cli::command()
}

#[derive(Args, Debug)]
struct CheckArgs {
    /// The manifest (JSON) that names the routine, its properties and the path.
    manifest: PathBuf,
    /// Path to walk instead of the manifest's: a path file (JSON, like a manifest's "path"), or
    /// SHAPE:PEAK:STEPS[:BACK] (shapes: uniaxial-strain, shear-12, biaxial, hydrostatic,
    /// tension-shear, mixed-mode, and uniaxial-stress, which holds every stress but 11 at zero; a
    /// plane-strain point keeps ε33 at zero and σ33 free).
    #[arg(long, value_name = "FILE|SPEC")]
    path: Option<String>,
    /// Scheme to run (repeat for several): forward, backward, central, central4, richardson,
    /// complex-step.
    #[arg(long = "scheme", value_name = "NAME")]
    schemes: Vec<String>,
    /// Tolerance of a scheme, e.g. --tol central=1e-7 (repeatable).
    #[arg(long = "tol", value_name = "SCHEME=VALUE")]
    tols: Vec<String>,
    /// Relative step of a scheme, e.g. --step central=1e-5 (repeatable).
    #[arg(long = "step", value_name = "SCHEME=VALUE")]
    steps: Vec<String>,
    /// Write the JSON report to FILE (`-` for standard output, replacing the readable report).
    #[arg(long, value_name = "FILE")]
    json: Option<PathBuf>,
    /// Switch floating-point traps (invalid, division by zero, overflow) on inside the routine.
    #[arg(long)]
    fp_traps: bool,
    /// Memory guards: off, light (default: canaries, input compare, unwritten outputs) or
    /// full (also reads past the end of inputs; twice the calls).
    #[arg(long, value_name = "LEVEL")]
    guards: Option<String>,
    /// Replay case files (written by `tancheck bisect`) first, as a regression suite counted
    /// separately: without DIR the manifest's own case folder (tancheck-cases/<manifest name>/
    /// beside it). Only the cases of the routine this manifest names run; the others are
    /// listed and set aside (--all-cases runs them too). A broken case file is a warning, a
    /// missing folder an error.
    #[arg(long, value_name = "DIR", num_args = 0..=1)]
    cases: Option<Option<PathBuf>>,
    /// With --cases: replay every case in the folder, whatever routine it was written for.
    #[arg(long, requires = "cases")]
    all_cases: bool,
    /// Run the routine in a child worker process, so that also _exit, SIGKILL, and anything
    /// that breaks the process beyond the guard become reported faults.
    #[arg(long)]
    isolate: bool,
    /// Time limit per routine call, in seconds (above 0, at most 86400): a call past it is a
    /// fault (exit 3), with or without --isolate.
    #[arg(long, value_name = "SECONDS", default_value_t = crate::survive::DEFAULT_CALL_TIMEOUT, value_parser = crate::survive::parse_seconds)]
    call_timeout: f64,
    /// Time limit for the whole check, in seconds (above 0, at most 86400).
    #[arg(long, value_name = "SECONDS", default_value_t = crate::survive::DEFAULT_SUITE_TIMEOUT, value_parser = crate::survive::parse_seconds)]
    suite_timeout: f64,
    /// Threads for the check (default: one per core). A routine is called from several threads
    /// only when it passes a thread-safety probe (else the report says why it ran on one);
    /// the report is the same whatever the number.
    #[arg(short, long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=1024))]
    jobs: Option<u16>,
    #[command(flatten)]
    output: crate::session::OutputArgs,
}

/// The threads of `--jobs`, by default one per core.
fn jobs_arg(jobs: Option<u16>) -> usize {
    jobs.map(usize::from)
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get))
}

#[derive(Args, Debug)]
struct ProbeArgs {
    /// The manifest (JSON) that names the routine.
    manifest: PathBuf,
    /// The suite file; default: the built-in suite for the routine's kind
    /// (probes/solid.json, probes/thermal.json with --thermal, probes/cohesive.json).
    #[arg(long, value_name = "FILE")]
    suite: Option<PathBuf>,
    /// Use the thermal default suite (heating along the path).
    #[arg(long)]
    thermal: bool,
    /// Path to walk instead of the manifest's: a path file (JSON, like a manifest's "path"), or
    /// SHAPE:PEAK:STEPS[:BACK]. Without it, the manifest's path; the suite's when the manifest
    /// has none or with --suite-path.
    #[arg(long, value_name = "FILE|SPEC", conflicts_with = "suite_path")]
    path: Option<String>,
    /// Walk the suite's path instead of the manifest's.
    #[arg(long)]
    suite_path: bool,
    /// Memory guards: off, light (default) or full, as in `check`.
    #[arg(long, value_name = "LEVEL")]
    guards: Option<String>,
    /// Write the JSON report to FILE (`-` for standard output).
    #[arg(long, value_name = "FILE")]
    json: Option<PathBuf>,
    #[command(flatten)]
    output: crate::session::OutputArgs,
}

/// The level of `--guards`.
fn guards_arg(g: &str) -> Result<crate::manifest::Guards> {
    Ok(match g {
        "off" => crate::manifest::Guards::Off,
        "light" => crate::manifest::Guards::Light,
        "full" => crate::manifest::Guards::Full,
        other => bail!("--guards takes off, light or full; got `{other}`"),
    })
}

/// Run the command line; returns the exit code.
pub fn main_with_args(args: impl IntoIterator<Item = std::ffi::OsString>) -> i32 {
    let cli = match Cli::try_parse_from(args) {
        Ok(c) => c,
        Err(e) => {
            if e.use_stderr() {
                let _ = e.print();
                return exit::BAD_INPUT;
            }
            // Help and version: to tancheck's own standard output (descriptor 1 is stderr).
            let _ = write!(crate::survive::stdout(), "{}", e.render());
            return exit::PASS;
        }
    };
    let result = match cli.command {
        Command::Check(a) => cmd_check(a),
        Command::Build(a) => crate::cmd_build::run(a),
        Command::Campaign(a) => crate::campaign::run(&a),
        Command::Merge(a) => crate::cmd_merge::run(&a),
        Command::Probe(a) => cmd_probe(a),
        Command::Bisect(a) => crate::cmd_bisect::run(&a),
        Command::Replay(a) => crate::cmd_replay::run(&a),
        Command::Explore(a) => crate::cmd_explore::run(&a),
        Command::Demo(a) => crate::demo::run(&a),
        Command::Models { quiet } => cmd_models(quiet),
        Command::Selftest(a) => crate::selftest::run_with(&a.output, a.json.as_deref()),
        Command::Completions(a) => crate::cmd_packaging::completions(&a, command()),
        Command::Man(a) => crate::cmd_packaging::man(&a, command()),
    };
    let code = match result {
        Ok(code) => code,
        Err(e) => {
            crate::say!("tancheck: {e:#}");
            exit::BAD_INPUT
        }
    };
    // Bad input: the report file gets back what it held before this run's marker.
    if code == exit::BAD_INPUT {
        crate::survive::restore_earlier_report();
    }
    code
}

fn scheme_value(s: &str, what: &str) -> Result<(Scheme, f64)> {
    let Some((name, v)) = s.split_once('=') else {
        bail!("--{what} takes SCHEME=VALUE, e.g. central=1e-7; got `{s}`");
    };
    let scheme: Scheme = name.parse().map_err(anyhow::Error::msg)?;
    let value: f64 = v.parse().with_context(|| format!("--{what}: `{v}` is not a number"))?;
    Ok((scheme, value))
}

/// The options of `tancheck check` a finite-strain check honours; the others refused.
fn finite_check_options(a: &CheckArgs) -> Result<crate::cmd_finite::FiniteOptions> {
    let given = [
        (a.path.is_some(), "--path"),
        (!a.schemes.is_empty(), "--scheme"),
        (!a.tols.is_empty(), "--tol"),
        (!a.steps.is_empty(), "--step"),
        (a.cases.is_some(), "--cases"),
    ];
    refuse_for_finite(&a.manifest, &given, FINITE_CHECK_INSTEAD)?;
    Ok(crate::cmd_finite::FiniteOptions {
        call_timeout: a.call_timeout,
        suite_timeout: a.suite_timeout,
        guards: a.guards.as_deref().map(guards_arg).transpose()?,
        fp_traps: a.fp_traps,
    })
}

fn cmd_check(a: CheckArgs) -> Result<i32> {
    a.output.prepare()?;
    let library = crate::manifest::library_of(&a.manifest);
    let case_files = crate::case_store::case_files_of(&a.manifest, a.cases.as_ref());
    let inputs: Vec<&std::path::Path> =
        [Some(a.manifest.as_path()), crate::manifest::path_file(&a.path), library.as_deref()]
            .into_iter()
            .flatten()
            .chain(case_files.iter().map(|p| p.as_path()))
            .collect();
    a.output.guard(a.json.as_deref(), &inputs)?;
    let finite = crate::finite_load::FiniteManifest::detect(&a.manifest);
    let finite_options = if finite { Some(finite_check_options(&a)?) } else { None };
    if let (Some(options), false) = (finite_options, a.isolate) {
        return crate::cmd_finite::check(&a.manifest, a.json.as_deref(), &a.output, options);
    }
    // An earlier report under the same name is replaced at once by an "incomplete" marker.
    crate::survive::begin_report(a.json.as_deref(), &a.manifest.display().to_string())?;
    if a.isolate {
        // The same check in a worker: the arguments as given, without --isolate and --json.
        let mut args: Vec<std::ffi::OsString> = Vec::new();
        let mut it = std::env::args_os().skip(1).peekable();
        while let Some(x) = it.next() {
            if x == "--isolate" {
                continue;
            }
            if x == "--json" {
                it.next();
                continue;
            }
            if x.to_string_lossy().starts_with("--json=") {
                continue;
            }
            args.push(x);
        }
        return crate::isolate::run_isolated(&args, a.json.as_deref(), a.call_timeout, a.suite_timeout);
    }
    let mut case_code = exit::PASS;
    let (mut m, dir) = Manifest::load(&a.manifest)?;
    let file = a.manifest.display().to_string();
    let block = crate::block_session::is_block(&m);
    if block {
        let given = [
            (!a.schemes.is_empty(), "--scheme"),
            (!a.tols.is_empty(), "--tol"),
            (!a.steps.is_empty(), "--step"),
            (a.cases.is_some(), "--cases"),
            (a.all_cases, "--all-cases"),
        ];
        refuse_options(&a.manifest, "a block routine's manifest", &given, BLOCK_CHECKS_INSTEAD)?;
    }
    // `--cases` without a folder: the manifest's own.
    let cases = a.cases.as_ref().map(|c| match c {
        Some(c) => c.clone(),
        None => crate::case_store::default_case_dir(&a.manifest, &dir),
    });
    if let Some(cases) = &cases {
        if !cases.is_dir() {
            bail!(
                "--cases {}: {}",
                cases.display(),
                if cases.exists() { "is not a folder" } else { "no such folder (bisect writes one)" }
            );
        }
    }
    // Every option is read before the cases replay: a bad one stops the run before any work.
    if !a.schemes.is_empty() {
        m.check.schemes = a.schemes.iter().map(|s| s.parse()).collect::<Result<_, _>>()?;
    }
    for t in &a.tols {
        let (s, v) = scheme_value(t, "tol")?;
        m.check.scheme_mut(s).tol = v;
    }
    for t in &a.steps {
        let (s, v) = scheme_value(t, "step")?;
        m.check.scheme_mut(s).rel_step = v;
    }
    m.check.validate().map_err(|e| anyhow::anyhow!("{file} (with the command-line options): {e}"))?;
    m.fp_traps |= a.fp_traps;
    m.check.jobs = jobs_arg(a.jobs);
    if let Some(g) = &a.guards {
        m.guards = guards_arg(g)?;
    }
    let block_path = if block { a.path.as_deref().map(path_arg).transpose()? } else { None };
    let point_path = if block {
        None
    } else {
        Some(match &a.path {
            Some(p) => path_arg(p)?,
            None => m.path_or(default_path(m.routine.kind)).map_err(|e| anyhow::anyhow!("{file}: {e}"))?,
        })
    };
    crate::survive::set_routine(a.json.as_deref(), &routine_name(&m));
    crate::survive::start_watchdog(a.call_timeout, Some(a.suite_timeout));
    let mut tally = None;
    if let Some(cases) = &cases {
        let mine = if a.all_cases {
            None
        } else {
            Some(
                crate::case_store::case_routine_of(&m, &dir)
                    .with_context(|| format!("loading the routine of {file}"))?,
            )
        };
        let r = crate::cmd_replay::run_case_folder_of(cases, mine.as_ref());
        tally = Some(crate::cmd_replay::tally_of(&r));
        // The cases go to the terminal only (the JSON report is the check's).
        if !a.json.as_deref().is_some_and(crate::report::json::Json::to_stdout) {
            let mut t = a.output.terminal();
            t.cases(&r)?;
            t.finish()?;
        }
        case_code = r.exit_code();
    }
    if block {
        let code = crate::block_session::check_block_command(
            &m,
            &dir,
            &file,
            block_path,
            &a.output,
            a.json.as_deref(),
        )?;
        return Ok(if case_code == exit::ROUTINE_FAULT || code == exit::ROUTINE_FAULT {
            exit::ROUTINE_FAULT
        } else {
            code.max(case_code)
        });
    }
    let path = point_path.expect("a point routine's path was read above");
    // The compact report (full detail of failures only) unless every check's details are asked for.
    let keep = if a.output.verbose { Keep::All } else { Keep::Failures };
    let mut report = crate::session::run_manifest_with(&m, &dir, &path, keep, a.output.shows_progress())
        .with_context(|| match &a.path {
            // A path error names the path given (it named the manifest only; a user-style sweep).
            Some(p) => format!("checking the routine of {file} on the path {p}"),
            None => format!("checking the routine of {file}"),
        })?;
    // The cases join the verdict, so that every report says what the exit code says (the
    // verdict line, the JSON and the JUnit said PASS while a case failed and the exit was 1).
    if let Some(t) = tally {
        report.join_cases(t);
    }
    let mut reporters = crate::session::reporters(&a.output, a.json.as_deref());
    reporters.check(&report)?;
    reporters.finish()?;
    debug_assert!(case_code == 0 || report.exit_code() != 0);
    Ok(report.exit_code())
}

fn cmd_probe(a: ProbeArgs) -> Result<i32> {
    a.output.prepare()?;
    let library = crate::manifest::library_of(&a.manifest);
    let inputs: Vec<&std::path::Path> = [
        Some(a.manifest.as_path()),
        a.suite.as_deref(),
        crate::manifest::path_file(&a.path),
        library.as_deref(),
    ]
    .into_iter()
    .flatten()
    .collect();
    a.output.guard(a.json.as_deref(), &inputs)?;
    if crate::finite_load::FiniteManifest::detect(&a.manifest) {
        let given = [
            (a.suite.is_some(), "--suite"),
            (a.thermal, "--thermal"),
            (a.path.is_some(), "--path"),
            (a.suite_path, "--suite-path"),
        ];
        refuse_for_finite(&a.manifest, &given, FINITE_PROBES_INSTEAD)?;
        let options = crate::cmd_finite::FiniteOptions {
            guards: a.guards.as_deref().map(guards_arg).transpose()?,
            ..Default::default()
        };
        return crate::cmd_finite::probe(&a.manifest, a.json.as_deref(), &a.output, options);
    }
    crate::survive::begin_report(a.json.as_deref(), &a.manifest.display().to_string())?;
    let (mut m, dir) = Manifest::load(&a.manifest)?;
    let file = a.manifest.display().to_string();
    crate::survive::set_routine(a.json.as_deref(), &routine_name(&m));
    crate::survive::start_watchdog(crate::survive::DEFAULT_CALL_TIMEOUT, None);
    if let Some(g) = &a.guards {
        m.guards = guards_arg(g)?;
    }
    if crate::block_session::is_block(&m) {
        let given =
            [(a.suite.is_some(), "--suite"), (a.thermal, "--thermal"), (a.suite_path, "--suite-path")];
        refuse_options(&a.manifest, "a block routine's manifest", &given, BLOCK_CHECKS_INSTEAD)?;
        // A block routine's probes are the block checks (independence, tangent and wave speed,
        // energy, deletion, refinement, counterpart).
        let path = a.path.as_deref().map(path_arg).transpose()?;
        return crate::block_session::check_block_command(
            &m,
            &dir,
            &file,
            path,
            &a.output,
            a.json.as_deref(),
        );
    }
    let (mut suite, suite_file) = match &a.suite {
        Some(f) => (crate::suite::Suite::load(f)?, Some(f.clone())),
        None => (crate::suite::Suite::default_for(m.routine.kind, a.thermal), None),
    };
    // Fields an entry gives that its probe does not read: said, not silently dropped.
    for w in suite_file.as_deref().map_or_else(Vec::new, |f| suite.unread_warnings(f)) {
        crate::say!("tancheck: warning: {w}");
    }
    if !suite.kinds.is_empty() && !suite.kinds.contains(&m.routine.kind) {
        // The kinds by the names a manifest uses (it printed `[PlaneStress]`; a user-style sweep).
        let kinds: Vec<String> = suite.kinds.iter().map(|k| k.to_string()).collect();
        crate::say!(
            "tancheck: warning: suite `{}` is meant for {}, the routine is {}",
            suite.suite,
            kinds.join(", "),
            m.routine.kind
        );
    }
    // The manifest's path, unless the user asks for another or for the suite's.
    let manifest_path = match (&a.path, &m.path) {
        (None, Some(p)) if !a.suite_path => Some(
            crate::manifest::path_from_spec(p)
                .map_err(|e| anyhow::anyhow!("{}: {e}", a.manifest.display()))?,
        ),
        _ => None,
    };
    let mut notes = Vec::new();
    // `--thermal` asks for heating along the path: a manifest's path that never heats or cools
    // would walk the thermal suite isothermally (it did, without a word; a user-style sweep),
    // so the suite's own path runs, and the report says so.
    let isothermal = |p: &tancheck_core::Path| p.increments.iter().all(|i| i.dtemp == 0.0);
    let thermal_swap = a.thermal
        && a.suite.is_none()
        && !m.routine.kind.is_cohesive()
        && manifest_path.as_ref().is_some_and(isothermal);
    if thermal_swap {
        notes.push(
            "--thermal: the manifest's path never heats or cools, so the thermal suite's path runs \
             (give --path for another)"
                .to_string(),
        );
    }
    let path = match (&a.path, manifest_path) {
        (Some(p), _) => path_arg(p)?,
        (None, Some(p)) if !thermal_swap => p,
        // With --suite-path the suite's own path is what was asked for: say so where it has
        // none (the message told to give the manifest a path, which it had; a user-style sweep).
        _ => suite.path().map_err(|e| {
            let e = if a.suite_path {
                format!("suite `{}` has no `path`, and --suite-path asks for the suite's own", suite.suite)
            } else {
                e
            };
            match &suite_file {
                Some(f) => anyhow::anyhow!("{}: {e}", f.display()),
                None => anyhow::Error::msg(e),
            }
        })?,
    };
    if a.thermal && a.suite.is_none() && m.routine.kind.is_cohesive() {
        notes
            .push("--thermal: there is no thermal suite for cohesive points; the cohesive suite runs".into());
    }
    match &suite_file {
        // A suite file of the user's names increments the path must have.
        Some(f) => suite.check_at(&path).map_err(|e| anyhow::anyhow!("{}: {e}", f.display()))?,
        None => notes.extend(suite.fit_at(&path)),
    }
    let report = crate::session::run_probe_suite(
        &m,
        &dir,
        &file,
        &suite,
        &path,
        suite_file.as_deref(),
        a.output.shows_progress(),
    )?;
    let source = if a.path.is_some() {
        "from --path"
    } else if m.path.is_some() && !a.suite_path && !thermal_swap {
        "the manifest's"
    } else {
        "the suite's"
    };
    let context = SuiteContext { path_source: source.into(), notes };
    let mut reporters = crate::session::reporters(&a.output, a.json.as_deref());
    reporters.suite(&report, &context)?;
    reporters.finish()?;
    Ok(report.exit_code)
}

fn cmd_models(quiet: bool) -> Result<i32> {
    let mut out = crate::survive::stdout();
    if quiet {
        for e in tancheck_models::zoo::zoo() {
            writeln!(out, "{}", e.name)?;
        }
        for name in ["orthotropic", "johnson-cook", "johnson-cook-no-rate-term"] {
            writeln!(out, "{name}")?;
        }
        return Ok(exit::PASS);
    }
    writeln!(
        out,
        "Built-in models (\"model\": NAME in a manifest); the flawed ones are the selftest's zoo.\n"
    )?;
    let mut rows: Vec<(String, String, String, String)> = Vec::new();
    for e in tancheck_models::zoo::zoo() {
        let m = tancheck_models::zoo::ZooModel::new(e.name, e.kinds[0])?;
        let kinds: Vec<_> = e.kinds.iter().map(|k| k.name()).collect();
        rows.push((e.name.into(), kinds.join(" "), m.prop_names().join(", "), e.description.into()));
    }
    let o = tancheck_models::AnyModel::new("orthotropic", PointKind::Solid3d)?;
    rows.push((
        "orthotropic".into(),
        "solid-3d plane-strain axisymmetric".into(),
        o.prop_names().join(", "),
        "linear orthotropic elasticity with material axes among the properties".into(),
    ));
    for (name, what) in [
        ("johnson-cook", "J2 radial return with the Johnson–Cook flow stress (rate, thermal softening, adiabatic heating) and damage indicator"),
        ("johnson-cook-no-rate-term", "johnson-cook with the rate term left out of the tangent (flawed on purpose)"),
    ] {
        let m = tancheck_models::AnyModel::new(name, PointKind::Solid3d)?;
        rows.push((name.into(), "solid-3d plane-strain axisymmetric".into(), m.prop_names().join(", "), what.into()));
    }
    for (name, kinds, props, what) in rows {
        writeln!(out, "{name:<26} {what}\n{:<26} kinds: {kinds}\n{:<26} properties: {props}", "", "")?;
    }
    Ok(exit::PASS)
}
