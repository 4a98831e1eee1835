//! The environment an `--isolate` worker gets from its parent (cli `isolate`): the variables'
//! names and what they say, at the bottom of the module order so that the reports, the guard
//! set-up (`survive`) and `isolate` itself can all read them.

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
