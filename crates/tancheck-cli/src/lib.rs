//! The `tancheck` command line: manifests, routines, reporters and the commands
//! `check`, `build`, `demo` and `models`.

/// A line on standard error that never panics: when its reader has gone (`2>&1 | head -1`),
/// the line is dropped and the run keeps its exit code (`eprintln!` panicked, exit 101).
#[macro_export]
macro_rules! say {
    ($($arg:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stderr(), $($arg)*);
    }};
}

pub mod block_manifest;
pub mod block_session;
pub mod campaign;
pub mod case_store;
pub mod cli;
pub mod cmd_bisect;
pub mod cmd_build;
pub mod cmd_explore;
pub mod cmd_finite;
pub mod cmd_merge;
pub mod cmd_packaging;
pub mod cmd_replay;
pub mod demo;
pub mod demo_block;
pub mod demo_finite;
pub mod explore_manifest;
pub mod finite_case;
pub mod finite_load;
pub mod isolate;
pub mod load;
pub mod manifest;
mod refuse;
pub mod report;
pub mod selftest;
pub mod session;
pub mod suite;
pub mod survive;
pub mod worker_env;

pub use cli::main_with_args;

/// Exit codes of the command line. Fixed numbers, never renumbered.
pub mod exit {
    /// Every check passed.
    pub const PASS: i32 = 0;
    /// A tangent check failed.
    pub const TANGENT_FAILURE: i32 = 1;
    /// Bad input or usage: manifest, library, symbol, arguments.
    pub const BAD_INPUT: i32 = 2;
    /// The routine crashed, misbehaved, hung, or reported that it could not compute an
    /// increment.
    pub const ROUTINE_FAULT: i32 = 3;
    /// The tangent agrees with the real difference schemes, but the complex-step twin is not
    /// complex-step safe.
    pub const TWIN_NOT_SAFE: i32 = 4;
    /// The routine (or its library, or a thread it started) ended the process itself, with
    /// exit, Fortran STOP or a run-time check, without --isolate. Said by the guard.
    pub const ROUTINE_EXITED: i32 = 70;
}
