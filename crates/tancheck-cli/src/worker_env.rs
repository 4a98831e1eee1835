//! The environment an `--isolate` worker gets from its parent (cli `isolate`): the variables'
//! names and what they say, at the bottom of the module order so that the reports, the guard
//! set-up (`survive`) and `isolate` itself can all read them; and the call a worker that died
//! was making, as its parent tells it (in the report schema too).

use tancheck_core::report::CallRecord;

/// Environment variable naming the heartbeat file an `--isolate` worker shares with its parent
/// (its presence makes this process a worker).
pub const HEARTBEAT_ENV: &str = "TANCHECK_WORKER_HEARTBEAT";

/// Set for a worker whose parent writes no JSON report: the worker's check report then holds
/// only its verdict (the parent reads nothing else of a finished check; the readable report
/// comes from the worker's standard output).
pub const VERDICT_ONLY_ENV: &str = "TANCHECK_WORKER_VERDICT_ONLY";

/// Whether this process is an `--isolate` worker.
pub fn in_worker() -> bool {
    std::env::var_os(HEARTBEAT_ENV).is_some()
}

/// Whether this worker's parent reads only the verdict of its check report.
pub fn verdict_only() -> bool {
    std::env::var_os(VERDICT_ONLY_ENV).is_some()
}

/// Whether `path` is the report this worker hands to its parent (the `report.json` beside its
/// heartbeat file): the parent reads it at once and removes it, so it need not reach the disk
/// before it is renamed into place. Every other file a worker writes (`--html`, `--junit`,
/// saved cases) is written as outside a worker.
pub fn is_handoff_report(path: &std::path::Path) -> bool {
    handoff_beside(std::env::var_os(HEARTBEAT_ENV).as_deref(), path)
}

/// Whether `path` is the `report.json` beside the heartbeat file `heartbeat` (none outside a
/// worker).
fn handoff_beside(heartbeat: Option<&std::ffi::OsStr>, path: &std::path::Path) -> bool {
    heartbeat.is_some_and(|h| std::path::Path::new(h).with_file_name("report.json") == path)
}

#[cfg(test)]
mod tests {
    use std::ffi::OsStr;
    use std::path::Path;

    use super::handoff_beside;

    #[test]
    fn only_the_report_beside_the_heartbeat_is_the_handoff() {
        let hb = Some(OsStr::new("/tmp/tancheck-worker-7/heartbeat"));
        assert!(handoff_beside(hb, Path::new("/tmp/tancheck-worker-7/report.json")));
        for other in ["/tmp/tancheck-worker-7/out.html", "/tmp/tancheck-worker-8/report.json", "report.json"]
        {
            assert!(!handoff_beside(hb, Path::new(other)), "{other}");
        }
        // Outside a worker nothing is.
        assert!(!handoff_beside(None, Path::new("/tmp/tancheck-worker-7/report.json")));
    }
}

/// The inputs of a finite-strain call, as the parent of a worker that died tells them (the
/// same fields as the guard's last words of a finite-strain call, and the temperature).
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize, schemars::JsonSchema)]
pub struct FiniteCall {
    pub increment: i32,
    /// Null for a real call; the twin's calls are told by their real parts.
    pub perturbation: Option<String>,
    pub properties: Vec<f64>,
    /// Deformation gradients at the start and end of the increment, column-major.
    pub f0: Vec<f64>,
    pub f1: Vec<f64>,
    pub stress0: Vec<f64>,
    pub state0: Vec<f64>,
    /// Temperature at the start and its increment (absent from the guard's last words).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temperature: Option<[f64; 2]>,
    pub time: f64,
    pub dtime: f64,
}

/// The call a worker was making when it died, as far as the parent knows it.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize, schemars::JsonSchema)]
#[serde(untagged)]
pub enum RunningCall {
    /// A point routine's call: its inputs.
    Point(CallRecord),
    /// A finite-strain routine's call.
    Finite(FiniteCall),
}

impl RunningCall {
    pub fn increment(&self) -> i32 {
        match self {
            RunningCall::Point(c) => c.increment,
            RunningCall::Finite(c) => c.increment,
        }
    }
}
