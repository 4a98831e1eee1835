//! The routine ABI of tancheck, from the Rust side.
//!
//! - [`Library`] loads a shared library of material routines and finds a routine and its
//!   complex-step twin (`symbol_cx`); [`LibraryRoutine`] is such a routine as a
//!   [`tancheck_core::Routine`].
//! - Every call goes through the guarded trampoline of `fortran-shim/src/guard.c` ([`signal_guard`]),
//!   which turns a crash inside the routine (SIGSEGV, SIGBUS, SIGFPE, SIGILL, SIGABRT) into a
//!   [`tancheck_core::Fault::Crashed`] instead of ending the process.
//! - The memory guards ([`memory_guards`]) around every call report writes past the end of an
//!   array, writes to read-only inputs, outputs left unwritten and (at [`GuardLevel::Full`])
//!   reads past the end of the inputs, as [`GuardFinding`]s of the routine.
//! - [`build_library`] compiles C and Fortran sources into such a library, with the twin.

pub mod block;
pub mod build_log;
pub mod compile;
pub mod error;
pub mod memory_guards;
pub mod signal_guard;

pub mod library;
pub mod locate;
pub mod watch;

pub use block::LibraryBlockRoutine;
pub use compile::{
    build_library, c_available, fortran_available, fortran_for_test, write_shim_files, BuildCommand,
    BuildLog, BuildOptions, DEBUG_MARKER,
};
pub use error::{BuildError, LoadError, SettingError, TrapError};
pub use library::{Library, LibraryRoutine};
pub use memory_guards::{FindingKind, GuardFinding, GuardLevel, GuardedArray};
pub use signal_guard::{Crash, CrashDetail, SignalKind, EXIT_STATUS_ROUTINE_EXITED, TWIN_SUFFIX};
