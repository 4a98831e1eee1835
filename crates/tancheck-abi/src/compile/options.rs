//! What a build is asked for: the sources, the library to write, debug or optimised, the twin,
//! extra flags and the build directory.

use std::path::PathBuf;

/// What to build.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct BuildOptions {
    /// C and Fortran sources. Fortran sources are compiled in the order of their module
    /// dependencies; otherwise in this order.
    pub sources: Vec<PathBuf>,
    /// The shared library to write.
    pub output: PathBuf,
    /// Debug build: no optimisation, debug information, run-time checks (bounds, signed
    /// overflow), Fortran reals initialised to signalling NaN.
    pub debug: bool,
    /// Also compile every source with `TC_COMPLEX` defined (the complex-step twin).
    pub twin: bool,
    /// Extra flags for every C compilation (split at white space by the command line).
    pub cflags: Vec<String>,
    /// Extra flags for every Fortran compilation, tancheck's modules included.
    pub fflags: Vec<String>,
    /// Extra flags for the link.
    pub ldflags: Vec<String>,
    /// Where to put intermediate files. `None`: a fresh directory under the system's temporary
    /// directory, removed afterwards. A given directory is kept.
    pub build_dir: Option<PathBuf>,
}

impl Default for BuildOptions {
    /// No sources yet, output `libroutine.so`, optimised, with the twin.
    fn default() -> Self {
        BuildOptions::new(Vec::<PathBuf>::new(), "libroutine.so")
    }
}

impl BuildOptions {
    /// Optimised build of `sources` into `output`, with the twin.
    pub fn new<P: Into<PathBuf>>(sources: impl IntoIterator<Item = P>, output: impl Into<PathBuf>) -> Self {
        BuildOptions {
            sources: sources.into_iter().map(Into::into).collect(),
            output: output.into(),
            debug: false,
            twin: true,
            cflags: Vec::new(),
            fflags: Vec::new(),
            ldflags: Vec::new(),
            build_dir: None,
        }
    }
}

/// The function a debug build (`BuildOptions::debug`) links into the library, so that a check
/// knows to switch the floating-point traps on. It takes nothing and returns 1.
pub const DEBUG_MARKER: &str = "tancheck_built_for_debug";
