//! `--isolate`: the check runs in a child worker process (this same program), with a time
//! limit per call and for the whole check. An infinite loop, an exit or Fortran STOP, heap
//! corruption or a stack overflow inside the routine ends only the worker; the parent says
//! what happened, with the inputs of the increment that was running, and finishes the report.
//!
//! The worker writes one byte to a heartbeat file before every routine call, and the inputs
//! of each increment's base call to a second file; the parent watches both.

use std::fs::File;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use anyhow::{Context, Result};
use num_complex::Complex64;
use tancheck_core::report::CallRecord;
use tancheck_core::{CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};

use crate::exit;

/// Environment variable naming the worker's heartbeat file (the call file is `<it>.call`).
pub const HEARTBEAT_ENV: &str = "TANCHECK_WORKER_HEARTBEAT";

/// A routine that leaves a heartbeat before every call (in the worker).
pub struct Heartbeat<'r> {
    inner: &'r mut dyn Routine,
    beats: File,
    call_file: PathBuf,
}

impl<'r> Heartbeat<'r> {
    pub fn new(inner: &'r mut dyn Routine, heartbeat: &Path) -> std::io::Result<Heartbeat<'r>> {
        let beats = std::fs::OpenOptions::new().create(true).append(true).open(heartbeat)?;
        Ok(Heartbeat { inner, beats, call_file: call_file(heartbeat) })
    }

    fn beat(&mut self, input: &CallInput<'_, f64>) {
        let _ = self.beats.write_all(b".");
        if input.want_tangent {
            let rec = CallRecord {
                increment: input.increment,
                perturbation: None,
                props: input.props.to_vec(),
                strain: input.strain.to_vec(),
                dstrain: input.dstrain.to_vec(),
                temp: input.temp[0],
                dtemp: input.temp[1],
                stress0: input.stress0.to_vec(),
                state0: input.state0.to_vec(),
                time: input.time[0],
                dtime: input.time[1],
            };
            if let Ok(text) = serde_json::to_vec(&rec) {
                let _ = std::fs::write(&self.call_file, text);
            }
        }
    }
}

fn call_file(heartbeat: &Path) -> PathBuf {
    let mut p = heartbeat.as_os_str().to_owned();
    p.push(".call");
    PathBuf::from(p)
}

impl Routine for Heartbeat<'_> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.beat(input);
        self.inner.call(input, output)
    }
    fn guard_next_call_fully(&mut self) -> bool {
        self.inner.guard_next_call_fully()
    }
    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        if self.inner.complex().is_some() {
            Some(self)
        } else {
            None
        }
    }
}

impl ComplexRoutine for Heartbeat<'_> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let _ = self.beats.write_all(b".");
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
    let heartbeat = dir.join("heartbeat");
    let report_json = dir.join("report.json");
    File::create(&heartbeat)?;
    let exe = std::env::current_exe().context("finding this program to start a worker")?;
    let mut cmd = Command::new(exe);
    cmd.args(args).arg("--json").arg(&report_json).env(HEARTBEAT_ENV, &heartbeat);
    cmd.stdout(Stdio::piped()).stderr(Stdio::piped()).stdin(Stdio::null());
    let mut child = cmd.spawn().context("starting the worker process")?;
    let mut out = child.stdout.take().expect("piped");
    let mut err = child.stderr.take().expect("piped");
    let reader = std::thread::spawn(move || {
        let mut s = Vec::new();
        let _ = out.read_to_end(&mut s);
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
        let len = std::fs::metadata(&heartbeat).map(|m| m.len()).unwrap_or(0);
        if len != last_len {
            last_len = len;
            last_beat = Instant::now();
        }
        if last_len > 0 && last_beat.elapsed() > Duration::from_secs_f64(call_timeout) {
            killed = Some(format!("the routine did not return within {call_timeout} s (an infinite loop?)"));
        } else if started.elapsed() > Duration::from_secs_f64(suite_timeout) {
            killed = Some(format!("the check did not finish within {suite_timeout} s"));
        }
        if killed.is_some() {
            let _ = child.kill();
            break child.wait()?;
        }
        std::thread::sleep(Duration::from_millis(10));
    };
    let stdout = reader.join().unwrap_or_default();
    let stderr = err_reader.join().unwrap_or_default();
    let code = status.code();
    let finished =
        killed.is_none() && matches!(code, Some(0..=3)) && (code == Some(2) || report_json.exists());
    let result = if finished {
        std::io::stdout().write_all(&stdout)?;
        std::io::stderr().write_all(&stderr)?;
        if let Some(j) = json {
            if j.as_os_str() == "-" {
                std::io::stdout().write_all(&std::fs::read(&report_json)?)?;
            } else if report_json.exists() {
                crate::report::write_atomic(j, &std::fs::read(&report_json)?)?;
            }
        }
        code.unwrap_or(exit::ROUTINE_FAULT)
    } else {
        use std::os::unix::process::ExitStatusExt;
        let what = match (&killed, code, status.signal()) {
            (Some(k), _, _) => k.clone(),
            (None, Some(70), _) => "the routine ended the worker process by calling exit() (a Fortran STOP or a run-time check?)".to_string(),
            (None, Some(c), _) => format!("the worker process ended with status {c} before finishing the report (the routine called exit()?)"),
            (None, None, Some(s)) => format!("the worker process was killed by signal {s} (heap corruption or a stack overflow the guard could not catch?)"),
            (None, None, None) => "the worker process ended unexpectedly".to_string(),
        };
        let call: Option<CallRecord> =
            std::fs::read(call_file(&heartbeat)).ok().and_then(|b| serde_json::from_slice(&b).ok());
        let stdout_text = String::from_utf8_lossy(&stdout);
        let stderr_text = String::from_utf8_lossy(&stderr);
        let mut o = std::io::stdout().lock();
        if !stdout_text.is_empty() {
            writeln!(o, "{stdout_text}")?;
        }
        writeln!(o, "== isolated check ==")?;
        writeln!(o, "   FAULT: {what}")?;
        if let Some(c) = &call {
            writeln!(o, "   during increment {} (the inputs of its base call):", c.increment)?;
            writeln!(o, "     strain   {:?}\n     dstrain  {:?}\n     stress0  {:?}\n     state0   {:?}\n     props    {:?}\n     temp, dtemp {}, {}", c.strain, c.dstrain, c.stress0, c.state0, c.props, c.temp, c.dtemp)?;
        } else {
            writeln!(o, "   before the first routine call")?;
        }
        if !stderr_text.trim().is_empty() {
            writeln!(o, "   the worker said: {}", stderr_text.trim())?;
        }
        writeln!(o, "   verdict: FAULT — the routine crashed, hung or ended the process (exit 3)")?;
        if let Some(j) = json {
            let v = serde_json::json!({
                "tool": format!("tancheck {}", env!("CARGO_PKG_VERSION")),
                "verdict": "routine-fault",
                "isolated": true,
                "fault": { "message": what, "call": call },
                "cautions": tancheck_core::report::CAUTIONS,
            });
            let text = serde_json::to_vec_pretty(&v)?;
            if j.as_os_str() == "-" {
                o.write_all(&text)?;
            } else {
                crate::report::write_atomic(j, &text)?;
            }
        }
        exit::ROUTINE_FAULT
    };
    let _ = std::fs::remove_dir_all(&dir);
    Ok(result)
}
