//! One session with a routine: load the routine a manifest names, check it along a path,
//! and print or write the report. Used by the check command, the demo and the selftest.

use anyhow::Result;
use tancheck_core::path::Path;
use tancheck_core::report::Keep;
use tancheck_core::{check, Caller, PointKind, Report};

use crate::load::{load, start_state, Loaded};
use crate::manifest::Manifest;
use crate::report::json::Json;
use crate::report::style::{ColorWhen, Progress};
use crate::report::terminal::{Detail, Terminal};
use crate::report::{Fanout, Reporter};

/// The options of the readable output that every command takes.
#[derive(clap::Args, Debug, Clone, Default)]
pub struct OutputArgs {
    /// Print one line per failing check and the verdict.
    #[arg(short, long, conflicts_with = "verbose")]
    pub quiet: bool,
    /// Print the details of every check.
    #[arg(short, long)]
    pub verbose: bool,
    /// Colour the readable report: auto (when standard output is a terminal and NO_COLOR is
    /// not set), always or never.
    #[arg(long, value_name = "WHEN", value_enum, default_value_t = ColorWhen::Auto)]
    pub color: ColorWhen,
    /// Write the HTML report to FILE: one self-contained page with the summary and plots.
    #[arg(long, value_name = "FILE")]
    pub html: Option<std::path::PathBuf>,
    /// Write JUnit XML to FILE: a test case per check, probe or row.
    #[arg(long, value_name = "FILE")]
    pub junit: Option<std::path::PathBuf>,
}

impl OutputArgs {
    pub fn detail(&self) -> Detail {
        if self.quiet {
            Detail::Quiet
        } else if self.verbose {
            Detail::Verbose
        } else {
            Detail::Normal
        }
    }

    /// Before a command runs: fail early (exit 2, before a routine runs) when the folder of
    /// `--html` or `--junit` does not exist, so that no work is lost to a mistyped path; and
    /// under `-q` keep the watchdog's "still checking" lines off standard error.
    pub fn prepare(&self) -> anyhow::Result<()> {
        crate::survive::progress_lines(!self.quiet);
        crate::report::files::check_output(self.html.as_deref(), "--html")?;
        crate::report::files::check_output(self.junit.as_deref(), "--junit")
    }

    /// Before anything is written: every report file (`json`, `--html`, `--junit`) is a file of
    /// its own, and none is one of the run's `inputs` (a manifest, suite, path file or case):
    /// a report written there would overwrite it (exit 2, naming both).
    pub fn guard(&self, json: Option<&std::path::Path>, inputs: &[&std::path::Path]) -> anyhow::Result<()> {
        let what = inputs.first().map_or_else(String::new, |p| p.display().to_string());
        self.guard_named(json, inputs, &what)
    }

    /// [`OutputArgs::guard`], the markers naming `what` (a campaign names itself: its markers
    /// named whichever of its inputs sorted first, a library; a user-style sweep).
    pub fn guard_named(
        &self,
        json: Option<&std::path::Path>,
        inputs: &[&std::path::Path],
        what: &str,
    ) -> anyhow::Result<()> {
        let outputs =
            [("--json", json), ("--html", self.html.as_deref()), ("--junit", self.junit.as_deref())];
        crate::report::files::distinct(&outputs, inputs)?;
        // An earlier HTML or JUnit report is replaced by an "incomplete" marker at once: a run
        // that ends without writing them must not leave an earlier run's verdict.
        crate::survive::begin_side_reports(self.html.as_deref(), self.junit.as_deref(), what)
    }

    /// Whether progress may be drawn (on standard error, and only when it is a terminal).
    pub fn shows_progress(&self) -> bool {
        !self.quiet
    }

    /// Whether the readable report is coloured.
    pub fn colors(&self) -> bool {
        self.color.resolve(crate::survive::stdout_is_terminal())
    }

    /// The terminal reporter on tancheck's standard output.
    pub fn terminal(&self) -> Terminal<'static> {
        Terminal::colored(self.detail(), crate::survive::stdout(), self.colors())
    }
}

/// The reporters of a command: the terminal (unless the JSON goes to standard output) and
/// the JSON file when asked for.
pub fn reporters(output: &OutputArgs, json: Option<&std::path::Path>) -> Fanout<'static> {
    let mut f = Fanout::new();
    if !json.is_some_and(Json::to_stdout) {
        f.push(Box::new(output.terminal()));
    }
    if let Some(p) = json {
        f.push(Box::new(Json::new(p, crate::survive::stdout())));
    }
    if output.html.is_some() || output.junit.is_some() {
        f.push(Box::new(crate::report::pages::Pages::new(output.html.clone(), output.junit.clone())));
    }
    f
}

/// The default path: into the inelastic range of typical metals and back (4e-3 in 8 increments
/// and back in 4), the kind's own shape ([`Path::kind_default`]).
pub fn default_path(kind: PointKind) -> Path {
    Path::kind_default(kind, 4e-3, 8, 4)
}

/// The routine a manifest names, for messages: the symbol or the model.
pub fn routine_name(m: &Manifest) -> String {
    match (&m.routine.library, &m.routine.symbol, &m.routine.model) {
        (Some(l), Some(s), _) => format!("{}:{s}", l.display()),
        (_, _, Some(model)) => format!("model {model}"),
        _ => "the routine".into(),
    }
}

/// Load and check the routine a manifest names (every increment in full detail).
pub fn run_manifest(m: &Manifest, dir: &std::path::Path, path: &Path) -> Result<Report> {
    run_manifest_with(m, dir, path, Keep::All, false)
}

/// [`run_manifest`], keeping the full detail `keep` says, with a progress bar over the path
/// when `progress` (drawn only on a terminal).
pub fn run_manifest_with(
    m: &Manifest,
    dir: &std::path::Path,
    path: &Path,
    keep: Keep,
    progress: bool,
) -> Result<Report> {
    if let Some(hb) = std::env::var_os(crate::isolate::HEARTBEAT_ENV) {
        crate::isolate::worker_follows_parent(std::path::Path::new(&hb))?;
    }
    let mut loaded = load(m, dir)?;
    let mut report = check_loaded(&mut loaded, m, path, keep, progress, &m.check)?;
    if let Loaded::Library(lib) = &loaded {
        let findings_on_threads = !lib.findings().is_empty();
        // A check on several threads that gave way to one (the routine's results depend on the
        // calls made before), or one whose threads met a fault or a guard finding, is made
        // again on one thread (misbehaving routines only; see `concurrent::GaveWay` and
        // `concurrent::redo_on_one_thread`).
        if report.gave_way.is_some()
            || tancheck_core::concurrent::redo_on_one_thread(
                &report,
                findings_on_threads,
                path.increments.len(),
            )
        {
            report = again_on_one_thread(&mut loaded, report, m, dir, path, keep, progress)?;
        }
    }
    if let Loaded::Library(lib) = &mut loaded {
        let findings = lib.take_findings();
        tancheck_abi::memory_guards::report::add_to_report(
            &mut report,
            lib.guard_level(),
            lib.guard_calls(),
            &findings,
        );
    }
    Ok(report)
}

/// The check made again on one thread, after `first` (made on several threads, or given way
/// to one after the threads' calls): on a new instance of the library
/// ([`crate::load::load_fresh`]), whose static and SAVE variables are as at load, so that the
/// report is the one `--jobs 1` makes but for the notes saying why and on what. `loaded`
/// becomes that instance. When no new instance can be loaded (no copy in memory can be made,
/// or it does not load), the check is made again on the instance the threads called, as a
/// note says.
fn again_on_one_thread(
    loaded: &mut Loaded,
    first: Report,
    m: &Manifest,
    dir: &std::path::Path,
    path: &Path,
    keep: Keep,
    progress: bool,
) -> Result<Report> {
    let serial = tancheck_core::Settings { jobs: 1, ..m.check.clone() };
    let fresh = crate::load::load_fresh(m, dir);
    let instance = match &fresh {
        Ok(_) => "the check on one thread was made on a new instance of the library, loaded from a copy in \
                  memory: its own static and SAVE variables start as at load, but the libraries it depends on \
                  keep what the first instance's calls left in theirs, and files it looks for beside itself are \
                  not found there"
            .to_string(),
        Err(e) => format!(
            "the check on one thread ran on the instance of the library the threads had called (a new one could \
             not be loaded: {e:#}): results that depend on the calls before may differ from --jobs 1"
        ),
    };
    let fresh_ok = fresh.is_ok();
    match (fresh, &first.gave_way) {
        (Ok(f), _) => *loaded = f,
        // Without a new instance, a check that gave way stays as made (on one thread already).
        (Err(_), Some(_)) => {
            let mut report = first;
            report.notes.push(instance);
            return Ok(report);
        }
        (Err(_), None) => {
            if let Loaded::Library(lib) = loaded {
                lib.take_findings();
                lib.reset_guard_calls();
            }
        }
    }
    let mut report = check_loaded(loaded, m, path, keep, progress, &serial)?;
    let before = report.notes.len();
    match &first.gave_way {
        Some(g) => g.add_note(&mut report.notes, report.verdict == tancheck_core::Verdict::RoutineFault),
        None => {
            let serial_findings = matches!(&*loaded, Loaded::Library(lib) if !lib.findings().is_empty());
            report.notes.extend(tancheck_core::concurrent::redo_note(&first, &report, serial_findings));
        }
    }
    // Where the report says it ran on one thread, it also says on what instance; where it
    // does not (the findings or faults of the threads are met on one thread too), it is the
    // report of `--jobs 1`, notes included. Running on the old instance is always said.
    if report.notes.len() > before || !fresh_ok {
        report.notes.push(instance);
    }
    Ok(report)
}

fn check_loaded(
    loaded: &mut Loaded,
    m: &Manifest,
    path: &Path,
    keep: Keep,
    progress: bool,
    settings: &tancheck_core::Settings,
) -> Result<Report> {
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
    // A bar only for paths long enough to wait for.
    let n = path.increments.len();
    let bar = Progress::new(n as u64, "checking", progress && n >= 200);
    crate::survive::checking(true);
    let report = check::run_with(&mut caller, &m.routine.properties, start, path, settings, keep, &mut |k| {
        if k % 64 == 0 || k == n {
            bar.set(k as u64);
        }
    })
    .map_err(anyhow::Error::msg);
    crate::survive::checking(false);
    // Where several causes explain an increment, the one the path agrees on is named first.
    report.map(|mut r| {
        let n = r.routine.order.len();
        tancheck_core::report::agree::agree_on_causes(&mut r.increments, n);
        r
    })
}

/// Print the readable report and/or write the JSON one (through [`reporters`]).
pub fn emit(report: &Report, detail: Detail, json: Option<&std::path::Path>) -> Result<()> {
    let output = OutputArgs {
        quiet: detail == Detail::Quiet,
        verbose: detail == Detail::Verbose,
        color: ColorWhen::Auto,
        ..Default::default()
    };
    let mut r = reporters(&output, json);
    r.check(report)?;
    r.finish()?;
    Ok(())
}

/// Run a probe suite on the routine a manifest names, along `path`: load it, start from the
/// manifest's start state, run the suite with the manifest's check settings. `file` names the
/// manifest in errors. Used by `tancheck probe` and by campaigns.
pub fn run_probe_suite(
    m: &Manifest,
    dir: &std::path::Path,
    file: &str,
    suite: &crate::suite::Suite,
    path: &Path,
    suite_file: Option<&std::path::Path>,
    progress: bool,
) -> Result<tancheck_core::probe::SuiteReport> {
    use anyhow::Context;
    let mut loaded = load(m, dir).with_context(|| format!("loading the routine of {file}"))?;
    let routine = loaded.routine();
    // A suite entry the routine cannot take is an error of the suite, before any call.
    if let Some(what) = suite.indices_beyond(routine.info().nstate, routine.info().nprop) {
        match suite_file {
            Some(f) => anyhow::bail!("{}: {what}", f.display()),
            None => anyhow::bail!("the built-in suite `{}`: {what}", suite.suite),
        }
    }
    let start = start_state(m, routine.info()).with_context(|| file.to_string())?;
    let mut caller = Caller::new(routine);
    crate::survive::checking(true);
    // A bar of the probes done, for paths long enough to wait for (a long probe run showed
    // nothing on a terminal; a user-style sweep).
    let total = suite.probes.len();
    let bar = Progress::new(total as u64, "probing", progress && path.increments.len() >= 200);
    let report = tancheck_core::probe::run_suite_with(
        &mut caller,
        &suite.suite,
        &suite.probes,
        &m.routine.properties,
        &start,
        path,
        &m.check,
        &mut |k| bar.set(k.min(total) as u64),
    )
    .map_err(anyhow::Error::msg);
    crate::survive::checking(false);
    report
}
