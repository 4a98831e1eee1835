//! `--isolate`: the check runs in a child worker process (this same program), with a time
//! limit per call and for the whole check. An infinite loop, an exit or Fortran STOP, heap
//! corruption or a stack overflow inside the routine ends only the worker; the parent says
//! what happened, with the inputs of the increment that was running, and finishes the report.
//!
//! The worker and the parent share a record in memory (a file both map, [`SHARED_LEN`]
//! bytes): a counter the worker raises before every routine call, and the inputs of each
//! increment's base call. No system call per routine call: the parent reads the counter
//! every 10 ms (and at once when the worker's output ends) and the inputs when the worker has
//! died. The worker's JSON report is all the parent reads of a finished check; without
//! `--json` it holds only the verdict ([`VERDICT_ONLY_ENV`]), and the worker does not wait for
//! the disk to write it.
//!
//! The worker follows its parent: SIGTERM, SIGINT or SIGHUP to the parent ends the worker and
//! removes the worker's folder before the parent dies of the signal (exit 128 + signal), and
//! the parent's death sends the worker SIGTERM (Linux), whose handler removes the folder.

use std::fs::File;
use std::io::{Read, Write};
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use anyhow::{Context, Result};
use num_complex::Complex64;
use tancheck_core::report::CallRecord;
use tancheck_core::routine::{Sweep, SweepEnd};
use tancheck_core::{CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};

use crate::exit;

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

/// Bytes of the shared record: the call counter, the sequence word, the record's length in
/// words, and the inputs of the last base call (8-byte words); in its last [`NAME_WORDS`]
/// words the routine's name (its length in bytes, then the bytes). A sparse file: pages the
/// record does not reach take no room.
pub const SHARED_LEN: u64 = 1 << 20;
/// Words at the end of the shared record that hold the routine's name.
const NAME_WORDS: usize = 64;
/// Word offsets in the shared record.
const W_CALLS: usize = 0;
const W_SEQ: usize = 1;
const W_LEN: usize = 2;
const W_RECORD: usize = 3;
/// Words of a record before its arrays: increment, temperature and its increment, time and
/// its increment, and the lengths of properties, strain (stress) and state.
const RECORD_HEAD: usize = 8;

/// The words of a shared record mapped in memory.
fn words(map: &[u8]) -> &[std::sync::atomic::AtomicU64] {
    let n = map.len() / 8;
    // SAFETY: the map is page-aligned (so 8-aligned) and `n` words long; AtomicU64 has the
    // size and alignment of u64, and every access to the shared words is atomic.
    unsafe { std::slice::from_raw_parts(map.as_ptr().cast::<std::sync::atomic::AtomicU64>(), n) }
}

/// A routine that raises the shared call counter before every call and leaves the inputs of
/// each base call in the shared record (in the worker).
pub struct Heartbeat<'r> {
    inner: &'r mut dyn Routine,
    map: memmap2::MmapMut,
    calls: u64,
    seq: u64,
}

impl<'r> Heartbeat<'r> {
    pub fn new(inner: &'r mut dyn Routine, heartbeat: &Path) -> std::io::Result<Heartbeat<'r>> {
        let file = std::fs::OpenOptions::new().read(true).write(true).open(heartbeat)?;
        if file.metadata()?.len() < SHARED_LEN {
            file.set_len(SHARED_LEN)?;
        }
        // SAFETY: the file is the worker folder's own, made by the parent, which only reads
        // it; its length is not changed while mapped.
        let map = unsafe { memmap2::MmapMut::map_mut(&file)? };
        let mut beat = Heartbeat { inner, map, calls: 0, seq: 0 };
        beat.name();
        Ok(beat)
    }

    /// The routine's name into the end of the shared record (cut to fit), before any call:
    /// the parent names the routine when the worker dies.
    fn name(&mut self) {
        use std::sync::atomic::Ordering;
        let w = words(&self.map);
        let at = w.len() - NAME_WORDS;
        let name = self.inner.info().name.as_bytes();
        let name = &name[..name.len().min((NAME_WORDS - 1) * 8)];
        for (slot, chunk) in w[at + 1..].iter().zip(name.chunks(8)) {
            let mut b = [0u8; 8];
            b[..chunk.len()].copy_from_slice(chunk);
            slot.store(u64::from_le_bytes(b), Ordering::Relaxed);
        }
        w[at].store(name.len() as u64, Ordering::Release);
    }

    fn beat(&mut self) {
        use std::sync::atomic::Ordering;
        self.calls += 1;
        words(&self.map)[W_CALLS].store(self.calls, Ordering::Release);
    }

    /// The inputs of a base call into the shared record, between two raises of the sequence
    /// word (odd while writing). Nothing when they do not fit.
    fn record(&mut self, input: &CallInput<'_, f64>) {
        use std::sync::atomic::Ordering;
        let w = words(&self.map);
        let arrays = [input.props, input.strain, input.dstrain, input.stress0, input.state0];
        let len = RECORD_HEAD + arrays.iter().map(|a| a.len()).sum::<usize>();
        self.seq += 1;
        w[W_SEQ].store(self.seq, Ordering::Release);
        if W_RECORD + len > w.len() - NAME_WORDS {
            w[W_LEN].store(0, Ordering::Relaxed);
        } else {
            let head = [
                input.increment as i64 as u64,
                input.temp[0].to_bits(),
                input.temp[1].to_bits(),
                input.time[0].to_bits(),
                input.time[1].to_bits(),
                input.props.len() as u64,
                input.strain.len() as u64,
                input.state0.len() as u64,
            ];
            let values = head.into_iter().chain(arrays.iter().flat_map(|a| a.iter().map(|x| x.to_bits())));
            for (slot, v) in w[W_RECORD..].iter().zip(values) {
                slot.store(v, Ordering::Relaxed);
            }
            w[W_LEN].store(len as u64, Ordering::Relaxed);
        }
        self.seq += 1;
        w[W_SEQ].store(self.seq, Ordering::Release);
    }
}

/// The parent's view of the shared record.
struct SharedView(memmap2::Mmap);

impl SharedView {
    fn open(heartbeat: &Path) -> std::io::Result<SharedView> {
        let file = File::options().read(true).write(true).create(true).truncate(true).open(heartbeat)?;
        file.set_len(SHARED_LEN)?;
        // SAFETY: the worker writes the file only through its own map, with atomic accesses,
        // and never changes its length.
        Ok(SharedView(unsafe { memmap2::Mmap::map(&file)? }))
    }

    /// Routine calls the worker has begun.
    fn calls(&self) -> u64 {
        words(&self.0)[W_CALLS].load(std::sync::atomic::Ordering::Acquire)
    }

    /// The routine's name, once the worker has loaded it and written it (cut at a character
    /// boundary where the record cut it).
    fn routine(&self) -> Option<String> {
        use std::sync::atomic::Ordering;
        let w = words(&self.0);
        let at = w.len() - NAME_WORDS;
        let n = (w[at].load(Ordering::Acquire) as usize).min((NAME_WORDS - 1) * 8);
        if n == 0 {
            return None;
        }
        let bytes: Vec<u8> =
            w[at + 1..].iter().flat_map(|x| x.load(Ordering::Relaxed).to_le_bytes()).take(n).collect();
        Some(String::from_utf8_lossy(&bytes).trim_end_matches('\u{fffd}').to_string())
    }

    /// The inputs of the last base call, when the worker finished writing them.
    fn last_call(&self) -> Option<CallRecord> {
        use std::sync::atomic::Ordering;
        let w = words(&self.0);
        let seq = w[W_SEQ].load(Ordering::Acquire);
        let len = w[W_LEN].load(Ordering::Acquire) as usize;
        if seq == 0 || seq % 2 == 1 || len < RECORD_HEAD || W_RECORD + len > w.len() - NAME_WORDS {
            return None;
        }
        let r: Vec<u64> = w[W_RECORD..W_RECORD + len].iter().map(|x| x.load(Ordering::Relaxed)).collect();
        let (np, n, ns) = (r[5] as usize, r[6] as usize, r[7] as usize);
        if RECORD_HEAD + np + 3 * n + ns != len {
            return None;
        }
        let mut at = RECORD_HEAD;
        let mut take = |m: usize| {
            let v: Vec<f64> = r[at..at + m].iter().map(|b| f64::from_bits(*b)).collect();
            at += m;
            v
        };
        let (props, strain, dstrain, stress0, state0) = (take(np), take(n), take(n), take(n), take(ns));
        Some(CallRecord {
            increment: r[0] as i64 as i32,
            perturbation: None,
            props,
            strain,
            dstrain,
            temp: f64::from_bits(r[1]),
            dtemp: f64::from_bits(r[2]),
            stress0,
            state0,
            time: f64::from_bits(r[3]),
            dtime: f64::from_bits(r[4]),
        })
    }
}

impl Routine for Heartbeat<'_> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        if input.want_tangent {
            self.record(input);
        }
        self.beat();
        self.inner.call(input, output)
    }
    tancheck_core::pass_on_to_inner!();

    /// The inner routine's sweep, with a beat before each of its calls (the parent's bound is
    /// on one call, not on a sweep).
    fn sweep_real(&mut self, sweep: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        let counter = &words(&self.map)[W_CALLS];
        let end = self.inner.sweep_real(Sweep { counter: Some(counter), ..sweep });
        self.calls = counter.load(std::sync::atomic::Ordering::Acquire);
        end
    }

    fn sweep_complex(&mut self, sweep: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        let counter = &words(&self.map)[W_CALLS];
        let end = self.inner.sweep_complex(Sweep { counter: Some(counter), ..sweep });
        self.calls = counter.load(std::sync::atomic::Ordering::Acquire);
        end
    }
}

impl ComplexRoutine for Heartbeat<'_> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.beat();
        self.inner.complex().expect("checked").call_complex(input, output)
    }
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
    let status = loop {
        if let Some(st) = child.try_wait()? {
            break st;
        }
        let stop = tancheck_abi::watch::stop_signal();
        if stop != 0 {
            // Stopped from outside: the worker goes with us, and so does its folder.
            let _ = child.kill();
            let _ = child.wait();
            let _ = std::fs::remove_dir_all(&dir);
            if let Some(j) = json.filter(|j| j.as_os_str() != "-") {
                if let crate::report::Destination::Replace(p) = crate::report::destination(j) {
                    let _ = std::fs::remove_file(crate::report::temporary_name(&p));
                }
            }
            eprintln!("tancheck: stopped by signal {stop}; the worker was ended and its folder removed");
            return Ok(128 + stop);
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
        // The call that was running: from the worker's last words (exact), or the base call
        // of the increment the heartbeat last saw.
        let exact: Option<CallRecord> =
            last_words.and_then(|v| serde_json::from_value(v.fault["call"].clone()).ok());
        let seen = if exact.is_some() { Seen::Exact } else { Seen::BaseCall };
        let call = exact.or_else(|| shared.last_call());
        let routine = shared.routine();
        let stdout_text = String::from_utf8_lossy(&stdout);
        let stderr_text = String::from_utf8_lossy(&stderr);
        let mut o = crate::survive::stdout();
        if !stdout_text.is_empty() {
            if json_to_stdout {
                eprintln!("{stdout_text}");
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

/// The readable account of a worker that did not finish.
/// Where the parent's record of the running call came from.
#[derive(Clone, Copy)]
enum Seen {
    /// The worker's last words: the very call.
    Exact,
    /// The shared record: the base call of the increment that was running.
    BaseCall,
}

fn account(
    o: &mut dyn Write,
    what: &str,
    routine: Option<&str>,
    call: Option<(&CallRecord, Seen)>,
    stderr_text: &str,
) -> std::io::Result<()> {
    match routine {
        Some(name) => writeln!(o, "== {name} (isolated check) ==")?,
        None => writeln!(o, "== isolated check (the worker had not loaded the routine) ==")?,
    }
    writeln!(o, "   FAULT: {what}")?;
    if let Some((c, seen)) = call {
        match seen {
            Seen::Exact => writeln!(o, "   during increment {} (the inputs of that call):", c.increment)?,
            // The shared record holds each increment's base call; the call that was running
            // may be one of the increment's perturbed calls.
            Seen::BaseCall => {
                writeln!(o, "   during increment {} (the inputs of its base call):", c.increment)?
            }
        }
        writeln!(
            o,
            "     strain   {:?}\n     dstrain  {:?}\n     stress0  {:?}\n     state0   {:?}\n     props    {:?}\n     temp, dtemp {}, {}   time, dtime {}, {}",
            c.strain, c.dstrain, c.stress0, c.state0, c.props, c.temp, c.dtemp, c.time, c.dtime
        )?;
    } else {
        writeln!(o, "   before the first routine call")?;
    }
    if !stderr_text.trim().is_empty() {
        writeln!(o, "   the worker said: {}", stderr_text.trim())?;
    }
    writeln!(o, "   verdict: FAULT — the routine crashed, hung or ended the process (exit 3)")
}

/// The JSON report of a worker that did not finish.
fn fault_json(what: &str, routine: Option<&str>, call: Option<&CallRecord>) -> serde_json::Value {
    serde_json::json!({
        "format": tancheck_core::report::document::FORMAT,
        "version": tancheck_core::report::document::VERSION,
        "kind": "isolated-fault",
        "tool": format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        "routine": routine,
        "verdict": "routine-fault",
        "isolated": true,
        "fault": { "message": what, "increment": call.map(|c| c.increment), "call": call },
        "cautions": tancheck_core::report::CAUTIONS,
    })
}
