//! `--isolate`: the check runs in a child worker process (this same program), with a time
//! limit per call and for the whole check. An infinite loop, an exit or Fortran STOP, heap
//! corruption or a stack overflow inside the routine ends only the worker; the parent says
//! what happened, with the inputs of the increment that was running, and finishes the report.
//!
//! The worker and the parent share a record in memory (`shared`, a file both map): a counter
//! the worker raises before every routine call, and the inputs of each increment's base call
//! (of every call, for a finite-strain routine). No system call per routine call: the parent reads the counter
//! every 10 ms (and at once when the worker's output ends) and the inputs when the worker has
//! died. The worker's JSON report is all the parent reads of a finished check; without
//! `--json` it holds only the verdict ([`VERDICT_ONLY_ENV`]), and the worker does not wait for
//! the disk to write it.
//!
//! The worker follows its parent: SIGTERM, SIGINT or SIGHUP to the parent ends the worker and
//! removes the worker's folder before the parent dies of the signal (exit 128 + signal), and
//! the parent's death sends the worker SIGTERM (Linux), whose handler removes the folder.

use std::io::{Read, Write};
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use anyhow::{Context, Result};

use crate::exit;

mod heartbeat;
mod shared;

pub use heartbeat::{FiniteHeartbeat, Heartbeat};
use shared::SharedView;
pub use shared::{FiniteCall, RunningCall, SHARED_LEN};

pub use crate::survive::HEARTBEAT_ENV;
/// Environment variable with the parent's process id (the worker follows it).
pub const PARENT_ENV: &str = "TANCHECK_WORKER_PARENT";
pub use crate::worker_env::VERDICT_ONLY_ENV;

/// In the worker, before the routine is loaded: die with the parent, and remove the worker's
/// folder on SIGTERM, SIGINT or SIGHUP.
pub fn worker_follows_parent(heartbeat: &Path) -> Result<()> {
    use tancheck_abi::watch;
    if let Some(dir) = heartbeat.parent() {
        watch::remove_on_stop(dir);
    }
    let report = heartbeat.with_file_name("report.json");
    for f in [heartbeat.to_path_buf(), crate::report::temporary_name(&report), report] {
        watch::remove_on_stop(&f);
    }
    let parent = std::env::var(PARENT_ENV).ok().and_then(|p| p.parse::<u32>().ok());
    if let Some(parent) = parent {
        if !watch::follow_parent(parent) {
            anyhow::bail!("the parent process {parent} of this worker is gone");
        }
    }
    Ok(())
}

/// Run this program again as a worker with `args` (the same check without `--isolate`), and
/// report what became of it. Returns the exit code.
pub fn run_isolated(
    args: &[std::ffi::OsString],
    json: Option<&Path>,
    call_timeout: f64,
    suite_timeout: f64,
) -> Result<i32> {
    let dir = std::env::temp_dir().join(format!("tancheck-worker-{}", std::process::id()));
    std::fs::create_dir_all(&dir)?;
    // SIGINT, SIGTERM, SIGHUP now only set a flag that the loop below acts on.
    tancheck_abi::watch::defer_stop(true);
    let heartbeat = dir.join("heartbeat");
    let report_json = dir.join("report.json");
    let shared = SharedView::open(&heartbeat)?;
    let exe = std::env::current_exe().context("finding this program to start a worker")?;
    let mut cmd = Command::new(exe);
    cmd.args(args)
        .arg("--json")
        .arg(&report_json)
        .env(HEARTBEAT_ENV, &heartbeat)
        .env(PARENT_ENV, std::process::id().to_string());
    if json.is_none() {
        cmd.env(VERDICT_ONLY_ENV, "1");
    }
    cmd.stdout(Stdio::piped()).stderr(Stdio::piped()).stdin(Stdio::null());
    let mut child = cmd.spawn().context("starting the worker process")?;
    let mut out = child.stdout.take().expect("piped");
    let mut err = child.stderr.take().expect("piped");
    // The end of the worker's standard output (normally its end) wakes the loop below at
    // once, instead of at its next look.
    let (ended, ended_rx) = std::sync::mpsc::channel::<()>();
    let reader = std::thread::spawn(move || {
        let mut s = Vec::new();
        let _ = out.read_to_end(&mut s);
        let _ = ended.send(());
        s
    });
    let err_reader = std::thread::spawn(move || {
        let mut s = Vec::new();
        let _ = err.read_to_end(&mut s);
        s
    });
    let started = Instant::now();
    let mut last_len = 0u64;
    let mut last_beat = Instant::now();
    let mut killed: Option<String> = None;
    // Stopped from outside: the worker goes with us, and so does its folder.
    let stopped = |stop: i32| {
        let _ = std::fs::remove_dir_all(&dir);
        if let Some(j) = json.filter(|j| j.as_os_str() != "-") {
            if let crate::report::Destination::Replace(p) = crate::report::destination(j) {
                let _ = std::fs::remove_file(crate::report::temporary_name(&p));
            }
        }
        crate::say!("tancheck: stopped by signal {stop}; the worker was ended and its folder removed");
        Ok(128 + stop)
    };
    let status = loop {
        if let Some(st) = child.try_wait()? {
            break st;
        }
        let stop = tancheck_abi::watch::stop_signal();
        if stop != 0 {
            let _ = child.kill();
            let _ = child.wait();
            return stopped(stop);
        }
        let len = shared.calls();
        if len != last_len {
            last_len = len;
            last_beat = Instant::now();
        }
        if last_len == 0 && last_beat.elapsed() > Duration::from_secs_f64(call_timeout) {
            killed = Some(format!(
                "the worker did not reach the first routine call within {call_timeout} s (a library \
                 constructor that hangs while it is being loaded?)"
            ));
        } else if last_len > 0 && last_beat.elapsed() > Duration::from_secs_f64(call_timeout) {
            killed = Some(format!(
                "the routine did not return within {call_timeout} s (an infinite loop, a deadlock or a \
                 long sleep?; --call-timeout sets the limit)"
            ));
        } else if started.elapsed() > Duration::from_secs_f64(suite_timeout) {
            killed = Some(format!("the check did not finish within {suite_timeout} s"));
        }
        if killed.is_some() {
            let _ = child.kill();
            break child.wait()?;
        }
        // Every 10 ms, or at once when the worker's output ends (then in short steps until
        // the worker is gone: one that closed its output may still run).
        match ended_rx.recv_timeout(Duration::from_millis(10)) {
            Err(std::sync::mpsc::RecvTimeoutError::Disconnected) => {
                std::thread::sleep(Duration::from_micros(200))
            }
            Ok(()) | Err(std::sync::mpsc::RecvTimeoutError::Timeout) => {}
        }
    };
    // A worker ended by SIGINT or SIGTERM was stopped from outside, as this process was or is
    // about to be: Ctrl-C and a CI runner's cancel signal the whole process group, and the
    // worker may end before this process has seen its own signal (the check was then said to
    // have faulted, exit 3; a user-style sweep). No routine raises those two itself.
    {
        use std::os::unix::process::ExitStatusExt;
        // SIGINT and SIGTERM (2 and 15 on every POSIX system).
        if let (None, Some(sig @ (2 | 15))) = (&killed, status.signal()) {
            return stopped(sig);
        }
    }
    let stdout = reader.join().unwrap_or_default();
    let stderr = err_reader.join().unwrap_or_default();
    let code = status.code();
    // The worker's report: complete, last words, or only the "incomplete" marker. Read once;
    // only the few fields the parent needs are decoded (the rest is skipped, not built).
    let worker_bytes = std::fs::read(&report_json).ok();
    let worker_report: Option<WorkerReport> =
        worker_bytes.as_deref().and_then(|b| serde_json::from_slice(b).ok());
    let complete = worker_report.as_ref().is_some_and(|v| v.verdict != "incomplete");
    let last_words = worker_report.as_ref().filter(|v| v.last_words == true);
    // Last words end the worker with 3 or 70; with any other status they still mean a fault.
    let finished = killed.is_none()
        && match code {
            Some(exit::BAD_INPUT) => true,
            Some(exit::ROUTINE_FAULT) => complete,
            Some(exit::PASS | exit::TANGENT_FAILURE | exit::TWIN_NOT_SAFE) => {
                complete && last_words.is_none()
            }
            _ => false,
        };
    let json_to_stdout = json.is_some_and(|j| j.as_os_str() == "-");
    let result = if finished {
        if json_to_stdout {
            // Only the JSON report goes to standard output.
            std::io::stderr().write_all(&stdout)?;
        } else {
            crate::survive::stdout().write_all(&stdout)?;
        }
        std::io::stderr().write_all(&stderr)?;
        if let Some(j) = json {
            if let (true, Some(bytes)) = (complete, &worker_bytes) {
                if json_to_stdout {
                    crate::survive::stdout().write_all(bytes)?;
                } else {
                    crate::report::write_atomic(j, bytes)?;
                }
            }
        }
        code.unwrap_or(exit::ROUTINE_FAULT)
    } else {
        use std::os::unix::process::ExitStatusExt;
        let what = match (&killed, code, status.signal()) {
            (Some(k), _, _) => k.clone(),
            (None, Some(70), _) => match last_words.and_then(|v| v.fault["when"].as_str()) {
                Some(when) => format!("the routine ended the worker process by calling exit() (a Fortran STOP or a run-time check?), {when}"),
                None => "the routine ended the worker process by calling exit() (a Fortran STOP or a run-time check?)".to_string(),
            },
            (None, Some(c), _) => format!("the worker process ended with status {c} before finishing the report (the routine called exit()?)"),
            (None, None, Some(s)) => format!("the worker process was killed by signal {s} (heap corruption or a stack overflow the guard could not catch?)"),
            (None, None, None) => "the worker process ended unexpectedly".to_string(),
        };
        // The call that was running: from the worker's last words (exact), or the last call
        // the shared record holds (a point check's base call of the increment running, or
        // the very finite-strain call).
        let exact: Option<RunningCall> =
            last_words.and_then(|v| serde_json::from_value(v.fault["call"].clone()).ok());
        let (call, seen) = match exact {
            Some(c) => (Some(c), Seen::Exact),
            None => match shared.last_call() {
                Some(c @ RunningCall::Finite(_)) => (Some(c), Seen::Exact),
                c => (c, Seen::BaseCall),
            },
        };
        let routine = shared.routine();
        // The worker's own account of its last words (ending "verdict: FAULT (exit 70)") is left
        // out: the account below is the one that holds, with the exit code of this process
        // (two verdicts with two exit codes were printed; a user-style sweep). What the routine
        // printed stays.
        let stdout_text = without_last_words(&String::from_utf8_lossy(&stdout));
        let stderr_text = String::from_utf8_lossy(&stderr);
        let mut o = crate::survive::stdout();
        if !stdout_text.is_empty() {
            if json_to_stdout {
                crate::say!("{stdout_text}");
            } else {
                writeln!(o, "{stdout_text}")?;
            }
        }
        if json_to_stdout {
            // The readable account goes to standard error; standard output is the JSON.
            drop(o);
            let mut e = std::io::stderr().lock();
            account(&mut e, &what, routine.as_deref(), call.as_ref().map(|c| (c, seen)), &stderr_text)?;
            let v = fault_json(&what, routine.as_deref(), call.as_ref());
            let mut text = serde_json::to_vec_pretty(&v)?;
            text.push(b'\n');
            crate::survive::stdout().write_all(&text)?;
            let _ = std::fs::remove_dir_all(&dir);
            return Ok(exit::ROUTINE_FAULT);
        }
        account(&mut o, &what, routine.as_deref(), call.as_ref().map(|c| (c, seen)), &stderr_text)?;
        if let Some(j) = json {
            let mut text = serde_json::to_vec_pretty(&fault_json(&what, routine.as_deref(), call.as_ref()))?;
            text.push(b'\n');
            crate::report::write_atomic(j, &text)?;
        }
        exit::ROUTINE_FAULT
    };
    let _ = std::fs::remove_dir_all(&dir);
    Ok(result)
}

/// What the parent reads of the worker's JSON report: three fields, whatever their shape;
/// every other field is skipped, not built.
#[derive(serde::Deserialize)]
struct WorkerReport {
    #[serde(default)]
    verdict: serde_json::Value,
    #[serde(default)]
    last_words: serde_json::Value,
    #[serde(default)]
    fault: serde_json::Value,
}

/// Where the parent's record of the running call came from.
#[derive(Clone, Copy)]
enum Seen {
    /// The worker's last words, or the shared record of a finite-strain call: the very call.
    Exact,
    /// The shared record of a point check: the base call of the increment that was running.
    BaseCall,
}

/// The readable account of a worker that did not finish.
fn account(
    o: &mut dyn Write,
    what: &str,
    routine: Option<&str>,
    call: Option<(&RunningCall, Seen)>,
    stderr_text: &str,
) -> std::io::Result<()> {
    match routine {
        Some(name) => writeln!(o, "== {name} (isolated check) ==")?,
        None => writeln!(o, "== isolated check (the worker had not loaded the routine) ==")?,
    }
    writeln!(o, "   FAULT: {what}")?;
    if let Some((call, seen)) = call {
        let n = call.increment();
        match (seen, call) {
            (Seen::Exact, RunningCall::Finite(c)) if c.perturbation.is_some() => writeln!(
                o,
                "   during a finite-strain call of increment {n} (the complex-step twin; the real parts of its inputs):"
            )?,
            (Seen::Exact, RunningCall::Finite(_)) => {
                writeln!(o, "   during a finite-strain call of increment {n} (the inputs of that call):")?
            }
            (Seen::Exact, _) => writeln!(o, "   during increment {n} (the inputs of that call):")?,
            // The shared record holds each increment's base call; the call that was running
            // may be one of the increment's perturbed calls.
            (Seen::BaseCall, _) => writeln!(o, "   during increment {n} (the inputs of its base call):")?,
        }
        match call {
            RunningCall::Point(c) => writeln!(
                o,
                "     strain   {:?}\n     dstrain  {:?}\n     stress0  {:?}\n     state0   {:?}\n     props    {:?}\n     temp, dtemp {}, {}   time, dtime {}, {}",
                c.strain, c.dstrain, c.stress0, c.state0, c.props, c.temp, c.dtemp, c.time, c.dtime
            )?,
            RunningCall::Finite(c) => {
                writeln!(
                    o,
                    "     F0 (column-major) {:?}\n     F1 (column-major) {:?}\n     stress0  {:?}\n     state0   {:?}\n     properties {:?}",
                    c.f0, c.f1, c.stress0, c.state0, c.properties
                )?;
                if let Some([t, dt]) = c.temperature {
                    write!(o, "     temperature, its increment {t}, {dt}   ")?;
                } else {
                    write!(o, "     ")?;
                }
                writeln!(o, "time, dtime {}, {}", c.time, c.dtime)?
            }
        }
    } else {
        writeln!(o, "   before the first routine call")?;
    }
    if !stderr_text.trim().is_empty() {
        writeln!(o, "   the worker said: {}", stderr_text.trim())?;
    }
    writeln!(o, "   verdict: FAULT — the routine crashed, hung or ended the process (exit 3)")
}

/// The JSON report of a worker that did not finish.
fn fault_json(what: &str, routine: Option<&str>, call: Option<&RunningCall>) -> serde_json::Value {
    serde_json::json!({
        "format": tancheck_core::report::document::FORMAT,
        "version": tancheck_core::report::document::VERSION,
        "kind": "isolated-fault",
        "tool": format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        "routine": routine,
        "verdict": "routine-fault",
        "isolated": true,
        "fault": { "message": what, "increment": call.map(RunningCall::increment), "call": call },
        "cautions": tancheck_core::report::CAUTIONS,
    })
}

/// `text` without the blocks of a process's last words as the guarded shim writes them to the
/// terminal: from a line starting "tancheck: FAULT: " to the next line starting
/// "   verdict: FAULT (exit", both included. The parent of a worker gives its own account.
pub fn without_last_words(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut inside = false;
    for line in text.split_inclusive('\n') {
        if !inside && line.starts_with("tancheck: FAULT: ") {
            inside = true;
        }
        if !inside {
            out.push_str(line);
        }
        if inside && line.starts_with("   verdict: FAULT (exit") {
            inside = false;
        }
    }
    out
}

#[cfg(test)]
mod last_words_tests {
    // The shim's terminal account of last words is cut out whole; the routine's own lines
    // before and after it stay.
    #[test]
    fn the_workers_account_of_its_last_words_is_left_out() {
        let text = "routine says hi\ntancheck: FAULT: the routine ended the process by calling exit(), during a call.\n   \
                    routine: lib.so:f\n   verdict: FAULT (exit 70); the JSON report names the fault\nafter\n";
        assert_eq!(super::without_last_words(text), "routine says hi\nafter\n");
        assert_eq!(super::without_last_words("plain\n"), "plain\n");
    }
}
