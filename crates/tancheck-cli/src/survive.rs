//! Surviving any routine: the program's side of the guard's watch (tancheck-abi `watch`).
//!
//! - [`init`] (first thing in `main`) arms the watch, so that an `exit()` from any thread or
//!   from a library constructor is a reported fault, never a silent exit 0; and keeps
//!   routines off standard output: descriptor 1 goes to standard error, and tancheck's own
//!   output ([`stdout`]) to a saved copy of the real standard output, so `--json -` stays
//!   parseable whatever the routine prints (C `printf`, Fortran `print *`). No system call
//!   per routine call: the descriptors are swapped once.
//! - [`begin_report`] replaces an earlier report at once with an "incomplete" marker, and
//!   prepares the last words' JSON report for that file.
//! - [`start_watchdog`] starts a thread that reads the guard's call counters (two atomic
//!   increments per call, nothing else): a call that runs past the call time limit, or a
//!   check past the whole-check limit, ends the process with the fault, the increment and its
//!   inputs, and the JSON report (exit 3); a long check prints progress on standard error.

use std::io::{LineWriter, Write};
use std::mem::ManuallyDrop;
use std::os::fd::FromRawFd;
use std::path::Path;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::OnceLock;
use std::time::{Duration, Instant};

use anyhow::{Context, Result};
use tancheck_abi::watch::{self, Phase};

/// The largest time limit accepted, in seconds (one day).
pub const MAX_SECONDS: f64 = 86_400.0;
/// Default time limit of one routine call, in seconds (with and without --isolate).
pub const DEFAULT_CALL_TIMEOUT: f64 = 30.0;
/// Default time limit of a whole check, in seconds.
pub const DEFAULT_SUITE_TIMEOUT: f64 = 600.0;
/// Environment variable naming an --isolate worker's heartbeat file; set only in a worker,
/// whose parent watches it (isolate.rs).
pub use crate::worker_env::HEARTBEAT_ENV;

static TOOL_STDOUT: OnceLock<Option<i32>> = OnceLock::new();
/// How many checks are running (a campaign checks several items at once, on several threads):
/// the watchdog times calls while any is.
static CHECKING: AtomicUsize = AtomicUsize::new(0);
static ARMED: AtomicBool = AtomicBool::new(false);
static WATCHDOG: OnceLock<()> = OnceLock::new();
/// Whether the watchdog prints its "still checking" lines (off under -q).
static PROGRESS_LINES: AtomicBool = AtomicBool::new(true);

/// Let the watchdog print its "still checking" lines on standard error, or not (a quiet run).
pub fn progress_lines(on: bool) {
    PROGRESS_LINES.store(on, Ordering::SeqCst);
}
/// Set while tancheck's own output goes to standard error (see [`own_output_to_stderr`]).
static OWN_OUTPUT_TO_STDERR: AtomicBool = AtomicBool::new(false);

/// Arm the watch and protect standard output. Call once, first thing in `main`.
pub fn init() {
    ARMED.store(watch::arm().is_ok(), Ordering::SeqCst);
    TOOL_STDOUT.get_or_init(watch::protect_stdout);
}

/// End the program with `code`: its own exit, which a routine's thread calling `exit` at the
/// same moment cannot turn into another status.
pub fn finish(code: i32) -> ! {
    if ARMED.load(Ordering::SeqCst) {
        watch::finish(code);
    }
    std::process::exit(code)
}

/// tancheck's own standard output (the real one, whatever descriptor 1 is now).
pub struct ToolStdout(ManuallyDrop<std::fs::File>);

impl Write for ToolStdout {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        match self.0.write(buf) {
            // The reader went away (`tancheck selftest | head -3`): the rest of the output is
            // dropped, and the command still finishes (reports written) with its verdict's code.
            Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(buf.len()),
            r => r,
        }
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

/// A line-buffered writer to tancheck's own standard output (flushed when dropped).
pub fn stdout() -> LineWriter<ToolStdout> {
    let fd = if OWN_OUTPUT_TO_STDERR.load(Ordering::SeqCst) {
        2
    } else {
        TOOL_STDOUT.get().copied().flatten().unwrap_or(1)
    };
    // SAFETY: `fd` is an open descriptor for the life of the process (the saved copy, or
    // descriptor 1); ManuallyDrop keeps it from being closed.
    LineWriter::new(ToolStdout(ManuallyDrop::new(unsafe { std::fs::File::from_raw_fd(fd) })))
}

/// While `on`, what tancheck writes through [`stdout`] goes to standard error instead: a
/// command whose standard output holds a JSON document (`demo --json -`) runs parts that print
/// their own lines this way. Descriptor 2 is open for the life of the process.
pub fn own_output_to_stderr(on: bool) {
    OWN_OUTPUT_TO_STDERR.store(on, Ordering::SeqCst);
}

/// Whether tancheck's own standard output is a terminal (for `--color auto`).
pub fn stdout_is_terminal() -> bool {
    use std::io::IsTerminal;
    let fd = TOOL_STDOUT.get().copied().flatten().unwrap_or(1);
    // SAFETY: as in `stdout`: an open descriptor, never closed here (ManuallyDrop).
    let f = ManuallyDrop::new(unsafe { std::fs::File::from_raw_fd(fd) });
    f.is_terminal()
}

/// The routine's calls begin (the watchdog times them) or are over (the report is written).
pub fn checking(on: bool) {
    let now = if on {
        CHECKING.fetch_add(1, Ordering::SeqCst) + 1
    } else {
        let before = CHECKING.fetch_update(Ordering::SeqCst, Ordering::SeqCst, |n| Some(n.saturating_sub(1)));
        before.unwrap_or(0).saturating_sub(1)
    };
    // Only in the program (armed by `init`): a library using this crate keeps its exits.
    if ARMED.load(Ordering::SeqCst) {
        watch::set_phase(if now > 0 { Phase::Checking } else { Phase::Reporting });
    }
}

fn head(routine: &str) -> String {
    let v = serde_json::json!({
        "format": tancheck_core::report::document::FORMAT,
        "version": tancheck_core::report::document::VERSION,
        "kind": "last-words",
        "tool": format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        "routine": routine,
        "cautions": tancheck_core::report::CAUTIONS,
    });
    let mut s = v.to_string();
    s.pop(); // the closing brace: the last words append the verdict and the fault
    s
}

/// Before anything else of a run that writes a JSON report to `json`: replace an earlier
/// report at once by an "incomplete" marker (so CI never reads yesterday's verdict, and a
/// run that dies without last words leaves a report that says so), and point the last words
/// at it. `routine` names the routine (for the marker and the last words).
pub fn begin_report(json: Option<&Path>, routine: &str) -> Result<()> {
    name_routine(json, routine, true)
}

/// Name the routine in the last words (once it is known), for the report at `json`.
pub fn set_routine(json: Option<&Path>, routine: &str) {
    let _ = name_routine(json, routine, false);
}

fn name_routine(json: Option<&Path>, routine: &str, marker: bool) -> Result<()> {
    watch::set_label(routine);
    match json {
        None => {
            watch::set_report(&head(routine), "", "", false);
        }
        Some(p) if p.as_os_str() == "-" => {
            watch::set_report(&head(routine), "", "", true);
        }
        Some(p) => match crate::report::destination(p) {
            // A device or a pipe gets the report as the program writes it, and neither a marker
            // nor last words (which would go through a rename onto it).
            crate::report::Destination::Stream(_) => {
                watch::set_report(&head(routine), "", "", false);
            }
            crate::report::Destination::Replace(p) => {
                // A missing folder is said as for --html and --junit (it read "replacing the
                // report … at the start of the run: No such file or directory"; a user-style
                // sweep).
                if marker {
                    crate::report::files::check_output(Some(&p), "--json")?;
                }
                // The temporary name is registered first, so a SIGINT or SIGTERM while the
                // marker itself is written removes it too.
                let tmp = crate::report::temporary_name(&p);
                watch::set_report(&head(routine), &p.to_string_lossy(), &tmp.to_string_lossy(), false);
                if marker {
                    write_marker(&p, routine)?;
                }
            }
        },
    }
    Ok(())
}

/// The report a marker replaced, kept until the run ends: a run that ends on bad input
/// (exit 2) puts it back, so that a mistyped option loses nothing.
struct Earlier {
    path: std::path::PathBuf,
    /// The earlier file's bytes; `None` when there was none.
    previous: Option<Vec<u8>>,
    marker: Vec<u8>,
}

static EARLIER: std::sync::Mutex<Vec<Earlier>> = std::sync::Mutex::new(Vec::new());

/// Replace `p` at once by `marker`, keeping what it held for [`restore_earlier_report`].
pub(crate) fn replace_with_marker(p: &Path, marker: Vec<u8>) -> Result<()> {
    let previous = std::fs::metadata(p).ok().filter(|m| m.is_file()).and_then(|_| std::fs::read(p).ok());
    crate::report::write_atomic(p, &marker)
        .with_context(|| format!("replacing the report {} at the start of the run", p.display()))?;
    EARLIER.lock().unwrap_or_else(|e| e.into_inner()).push(Earlier {
        path: p.to_path_buf(),
        previous,
        marker,
    });
    Ok(())
}

/// What an "incomplete" marker says: the run started this file and did not finish it.
const INCOMPLETE: &str =
    "tancheck started this report and did not finish it: still running, or ended before \
                          its reports were written (the routine ended the process, or tancheck was killed); \
                          this is not a result";

/// Before a run that writes an HTML or JUnit report: replace an earlier one at once by an
/// "incomplete" marker, as [`begin_report`] does for the JSON report. A run that ends without
/// writing them (a routine that calls `exit` or Fortran STOP ends the process; under
/// `--isolate` the worker that writes them ends) leaves a page and a JUnit error that say
/// so, never an earlier run's PASS. A device or pipe is left alone; a run that ends on bad
/// input (exit 2) puts the earlier files back.
pub fn begin_side_reports(html: Option<&Path>, junit: Option<&Path>, routine: &str) -> Result<()> {
    for (p, html) in [(html, true), (junit, false)] {
        let Some(p) = p else { continue };
        let crate::report::Destination::Replace(p) = crate::report::destination(p) else { continue };
        let marker = if html {
            crate::report::html::page(
                "tancheck: incomplete",
                &format!(
                    "<h1>Incomplete run</h1>\n<p>{}</p>\n<p>Routine: {}</p>\n",
                    crate::report::html::esc(INCOMPLETE),
                    crate::report::html::esc(routine)
                ),
            )
        } else {
            crate::report::junit::incomplete(routine, INCOMPLETE)?
        };
        replace_with_marker(&p, marker.into_bytes())?;
    }
    Ok(())
}

/// After a run that ended on bad input (exit 2): where the report file still holds this run's
/// "incomplete" marker (nothing was written after it), put back what was there before (or
/// remove the marker when there was nothing). The marker would say the run is still going
/// or was killed, and the earlier report would be lost.
pub fn restore_earlier_report() {
    let earlier = std::mem::take(&mut *EARLIER.lock().unwrap_or_else(|p| p.into_inner()));
    for e in earlier {
        if std::fs::read(&e.path).ok().as_deref() != Some(e.marker.as_slice()) {
            continue;
        }
        let _ = match &e.previous {
            Some(bytes) => crate::report::write_atomic(&e.path, bytes),
            None => std::fs::remove_file(&e.path),
        };
    }
}

fn write_marker(p: &Path, routine: &str) -> Result<()> {
    {
        {
            let marker = serde_json::json!({
                "format": tancheck_core::report::document::FORMAT,
                "version": tancheck_core::report::document::VERSION,
                "kind": "incomplete",
                "tool": format!("tancheck {}", env!("CARGO_PKG_VERSION")),
                "routine": routine,
                "verdict": "incomplete",
                "message": "tancheck started this report and did not finish it: still running, or \
                            ended from outside (killed); this is not a result",
                "cautions": tancheck_core::report::CAUTIONS,
            });
            let mut text = serde_json::to_vec_pretty(&marker)?;
            text.push(b'\n');
            replace_with_marker(p, text)?;
        }
    }
    Ok(())
}

/// Check a time limit given by the user (seconds): finite, above zero, at most [`MAX_SECONDS`].
pub fn parse_seconds(s: &str) -> std::result::Result<f64, String> {
    let v: f64 = s.trim().parse().map_err(|_| format!("`{s}` is not a number of seconds"))?;
    if !v.is_finite() || v <= 0.0 || v > MAX_SECONDS {
        return Err(format!(
            "`{s}`: a time limit must be a number of seconds above 0 and at most {MAX_SECONDS} (one day)"
        ));
    }
    Ok(v)
}

/// What the message of a call that does not return says sets the limit, where it is not
/// `--call-timeout` (a campaign's).
static TIMEOUT_HINT: std::sync::OnceLock<&'static str> = std::sync::OnceLock::new();

/// Say how the limit on a call is set, for the message of one that does not return.
pub fn set_timeout_hint(hint: &'static str) {
    let _ = TIMEOUT_HINT.set(hint);
}

/// How often a long check says it is still running: a third of the call time limit, between
/// 1 and 10 seconds.
fn progress_interval(call_timeout: f64) -> Duration {
    Duration::from_secs_f64((call_timeout / 3.0).clamp(1.0, 10.0))
}

/// Start the watchdog (once per process; not in an --isolate worker, whose parent watches).
/// `suite_timeout` limits the whole check when given.
pub fn start_watchdog(call_timeout: f64, suite_timeout: Option<f64>) {
    if crate::worker_env::in_worker() {
        return;
    }
    WATCHDOG.get_or_init(|| {
        let (ready, started) = std::sync::mpsc::channel();
        let spawned = std::thread::Builder::new().name("tancheck-watchdog".into()).spawn(move || {
            // Everything the thread needs from the C library's loader (its thread-locals and
            // their destructors) is set up now, before a library is loaded: a constructor
            // that hangs holds the loader's lock, and the watchdog must still run then.
            let _ = std::thread::current();
            eprint!("");
            let _ = Instant::now();
            let _ = ready.send(());
            watchdog(call_timeout, suite_timeout);
        });
        match spawned {
            Ok(_) => {
                let _ = started.recv_timeout(Duration::from_secs(10));
            }
            Err(e) => crate::say!(
                "tancheck: warning: no watchdog thread ({e}): a routine that hangs will hang the check"
            ),
        }
    });
}

fn watchdog(call_timeout: f64, suite_timeout: Option<f64>) {
    let started = Instant::now();
    let every = progress_interval(call_timeout);
    let mut next_progress = started + every;
    // The call seen running, and since when; per thread slot, the call seen running there (its
    // count of calls begun) and since when: a call that does not return on one thread while
    // others go on (a campaign's items on two threads) is found too (it was not: the summed
    // counts kept moving, and one thread's end of its check stopped the timing of the other).
    let mut per_slot: Vec<Option<(u64, Instant)>> = Vec::new();
    let mut slots: Vec<(u64, u64)> = Vec::new();
    // Since when a library has been loading.
    let mut loading: Option<Instant> = None;
    loop {
        std::thread::sleep(Duration::from_millis(50));
        let w = watch::watch();
        let now = Instant::now();
        if w.loading {
            let since = *loading.get_or_insert(now);
            if now.duration_since(since).as_secs_f64() > call_timeout {
                watch::die(
                    crate::exit::ROUTINE_FAULT,
                    &format!(
                        "the library did not finish loading within {call_timeout} s (a constructor that \
                         hangs?; --call-timeout sets the limit)"
                    ),
                );
            }
        } else {
            loading = None;
        }
        if CHECKING.load(Ordering::SeqCst) == 0 {
            per_slot.clear();
            continue;
        }
        watch::slots(&mut slots);
        per_slot.resize(slots.len(), None);
        for (i, &(begun, ended)) in slots.iter().enumerate() {
            if begun == ended {
                per_slot[i] = None;
                continue;
            }
            match per_slot[i] {
                Some((b, since)) if b == begun => {
                    if now.duration_since(since).as_secs_f64() > call_timeout {
                        watch::die_slot(
                            crate::exit::ROUTINE_FAULT,
                            i,
                            &format!(
                                "the routine did not return within {call_timeout} s (an infinite loop, \
                                 a deadlock or a long sleep?; {})",
                                TIMEOUT_HINT.get().copied().unwrap_or("--call-timeout sets the limit")
                            ),
                        );
                    }
                }
                _ => per_slot[i] = Some((begun, now)),
            }
        }
        if let Some(limit) = suite_timeout {
            if now.duration_since(started).as_secs_f64() > limit {
                watch::die(
                    crate::exit::ROUTINE_FAULT,
                    &format!(
                        "the check did not finish within {limit} s (a routine this slow, or a path this \
                         long, needs a larger --suite-timeout)"
                    ),
                );
            }
        }
        if now >= next_progress && PROGRESS_LINES.load(Ordering::SeqCst) {
            next_progress = now + every;
            // The longest-running call.
            let running = match per_slot.iter().flatten().min_by_key(|(_, since)| *since) {
                Some((_, since)) => {
                    format!(", the current call running for {:.0} s", since.elapsed().as_secs_f64())
                }
                None => String::new(),
            };
            crate::say!(
                "tancheck: still checking after {:.0} s: increment {}, {} routine calls so far{running}",
                started.elapsed().as_secs_f64(),
                w.increment,
                w.calls_begun
            );
        }
    }
}
