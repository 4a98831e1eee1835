//! Building routine sources (C and Fortran) into one shared library, with the complex-step
//! twin of every routine.
//!
//! The routine ABI's headers and Fortran modules are part of tancheck itself; a build writes
//! them into a private build directory, compiles the two modules there first (when there is
//! Fortran), then compiles every source once as the real routine and once with `TC_COMPLEX`
//! defined as its twin, and links all objects into the library.
//!
//! Compilers: `$CC` (default `cc`) for `.c`, `$FC` (default `gfortran`) for `.f`, `.f90`,
//! `.F90`, `.f95`, `.f03`, `.f08`. A variable may hold a program and leading arguments, split
//! at white space (`CC="ccache gcc"`). The library is linked by the Fortran compiler when
//! there is Fortran, by the C compiler otherwise. Extra flags for each language and for the
//! link come from [`BuildOptions::cflags`], [`BuildOptions::fflags`] and
//! [`BuildOptions::ldflags`], after tancheck's own (so `-O3` there wins over `-O2`).
//!
//! What a compiler prints while it succeeds (its warnings) is kept in the [`BuildLog`]
//! ([`BuildLog::warnings`]); a failure carries the compiler's own words.
//!
//! A debug build also links a marker function, [`DEBUG_MARKER`], into the library: the
//! floating-point traps that `-ffpe-trap` asks for act only in a program whose main program
//! gfortran compiled, so tancheck switches its own traps on at check time for a library
//! that carries the marker.
//!
//! Data flow: `options` (what to build) → `language` (which compiler, Fortran module order)
//! → `compiler` (run one) with `hints` (what to say when it fails) and `shim_files` (the
//! ABI's files in the build directory) → `build` (the whole build).

mod build;
mod compiler;
mod hints;
mod language;
mod options;
mod shim_files;
#[cfg(test)]
mod tests;

pub use crate::build_log::{BuildCommand, BuildLog};
pub use build::{build_library, C_DEBUG_FLAGS, FORTRAN_DEBUG_FLAGS};
pub use compiler::{c_available, fortran_available, fortran_for_test};
pub use options::{BuildOptions, DEBUG_MARKER};
pub use shim_files::write_shim_files;
