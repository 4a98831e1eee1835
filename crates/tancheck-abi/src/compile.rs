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

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

use crate::error::BuildError;

/// The routine ABI's files, as shipped with this tancheck.
const SHIM_INCLUDE: [(&str, &str); 5] = [
    ("tancheck_routine.h", include_str!("../../../fortran-shim/include/tancheck_routine.h")),
    ("tancheck_cstep.h", include_str!("../../../fortran-shim/include/tancheck_cstep.h")),
    ("tancheck_twin.inc", include_str!("../../../fortran-shim/include/tancheck_twin.inc")),
    ("tancheck_block.h", include_str!("../../../fortran-shim/include/tancheck_block.h")),
    ("tancheck_block_twin.inc", include_str!("../../../fortran-shim/include/tancheck_block_twin.inc")),
];
/// The Fortran modules, in the order they must be compiled.
const SHIM_MODULES: [(&str, &str); 3] = [
    ("tancheck_routine.f90", include_str!("../../../fortran-shim/fortran/tancheck_routine.f90")),
    ("tancheck_cstep.f90", include_str!("../../../fortran-shim/fortran/tancheck_cstep.f90")),
    ("tancheck_block.f90", include_str!("../../../fortran-shim/fortran/tancheck_block.f90")),
];
const SHIM_MODULE_NAMES: [&str; 3] = ["tancheck_routine", "tancheck_cstep", "tancheck_block"];

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

pub use crate::build_log::{BuildCommand, BuildLog};

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Language {
    C,
    Fortran,
}

impl Language {
    fn of(path: &Path) -> Option<Language> {
        let ext = path.extension()?.to_str()?;
        match ext.to_ascii_lowercase().as_str() {
            "c" => Some(Language::C),
            "f" | "f90" | "f95" | "f03" | "f08" => Some(Language::Fortran),
            _ => None,
        }
    }
}

/// A compiler: program plus leading arguments from the environment.
#[derive(Clone, Debug)]
struct Compiler {
    program: String,
    pre: Vec<String>,
    language: &'static str,
    var: &'static str,
    example: &'static str,
    install: &'static str,
}

const FORTRAN_INSTALL: &str = ", or install gfortran with the system package manager (for \
                               example `apt-get install gfortran`, `dnf install gcc-gfortran` \
                               or `brew install gcc`)";
const C_INSTALL: &str = ", or install a C compiler with the system package manager (for \
                         example `apt-get install gcc`)";

impl Compiler {
    fn from_env(language: Language) -> Result<Compiler, BuildError> {
        let (var, default, name, example, install) = match language {
            Language::C => ("CC", "cc", "C", "/usr/bin/gcc", C_INSTALL),
            Language::Fortran => ("FC", "gfortran", "Fortran", "/usr/bin/gfortran-12", FORTRAN_INSTALL),
        };
        let (program, pre) = match std::env::var_os(var) {
            None => (default.to_string(), Vec::new()),
            Some(v) => {
                let v = v.to_string_lossy().into_owned();
                let mut words = v.split_whitespace().map(str::to_string);
                match words.next() {
                    Some(p) => (p, words.collect()),
                    None => return Err(BuildError::EmptyCompilerVar { var, default }),
                }
            }
        };
        Ok(Compiler { program, pre, language: name, var, example, install })
    }

    /// Run the compiler; a program that cannot be started is a [`BuildError::CompilerMissing`].
    fn run(
        &self,
        stage: String,
        args: Vec<String>,
        log: &mut BuildLog,
        hint: impl Fn(&str) -> String,
    ) -> Result<(), BuildError> {
        let mut all = self.pre.clone();
        all.extend(args);
        let out =
            Command::new(&self.program).args(&all).output().map_err(|e| BuildError::CompilerMissing {
                language: self.language,
                program: self.program.clone(),
                var: self.var,
                example: self.example,
                reason: if e.kind() == std::io::ErrorKind::NotFound {
                    "no such program on PATH".to_string()
                } else {
                    e.to_string()
                },
                install: self.install,
            })?;
        let step = BuildCommand {
            stage,
            program: self.program.clone(),
            args: all,
            stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
            success: out.status.success(),
        };
        log.commands.push(step.clone());
        if out.status.success() {
            return Ok(());
        }
        let mut output = step.stderr.clone();
        if !step.stdout.trim().is_empty() {
            output.push_str(&step.stdout);
        }
        if !output.ends_with('\n') {
            output.push('\n');
        }
        let h = hint(&output);
        Err(BuildError::CompilerFailed {
            stage: step.stage.clone(),
            command: step.command_line(),
            code: out.status.code(),
            output,
            hint: h,
            log: Box::new(log.clone()),
        })
    }
}

/// Whether a Fortran compiler (`$FC`, default `gfortran`) can be run.
pub fn fortran_available() -> bool {
    compiler_runs(Language::Fortran)
}

/// For tests that need Fortran: `true` when a Fortran compiler runs; otherwise a panic that
/// names the test and says how to mark it. Such a test carries
/// `#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]` (the cfg comes from the build
/// script of the test's package and is never set under `TANCHECK_REQUIRE_FORTRAN=1`, as CI
/// sets), so without a compiler the test summary counts it as ignored instead of passing it
/// unrun; this call is the loud failure when a test runs without one all the same.
pub fn fortran_for_test(test: &str) -> bool {
    if fortran_available() {
        return true;
    }
    panic!(
        "{test}: no Fortran compiler (set FC, or install gfortran with the system package manager); \
         a test that needs one is marked #[cfg_attr(tancheck_no_fortran, ignore = \"needs gfortran\")]"
    );
}

/// Whether a C compiler (`$CC`, default `cc`) can be run.
pub fn c_available() -> bool {
    compiler_runs(Language::C)
}

fn compiler_runs(language: Language) -> bool {
    let Ok(c) = Compiler::from_env(language) else { return false };
    Command::new(&c.program)
        .args(&c.pre)
        .arg("--version")
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}

/// Write the routine ABI's headers (`tancheck_routine.h`, `tancheck_cstep.h`,
/// `tancheck_twin.inc`) and Fortran module sources into `dir`, for builds by hand.
pub fn write_shim_files(dir: &Path) -> Result<Vec<PathBuf>, BuildError> {
    std::fs::create_dir_all(dir).map_err(|source| BuildError::Io {
        action: "create the directory",
        path: dir.into(),
        source,
    })?;
    let mut written = Vec::new();
    for (name, text) in SHIM_INCLUDE.iter().chain(SHIM_MODULES.iter()) {
        let p = dir.join(name);
        std::fs::write(&p, text).map_err(|source| BuildError::Io {
            action: "write",
            path: p.clone(),
            source,
        })?;
        written.push(p);
    }
    Ok(written)
}

static BUILD_COUNTER: AtomicUsize = AtomicUsize::new(0);

fn fresh_build_dir() -> PathBuf {
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.subsec_nanos())
        .unwrap_or(0);
    std::env::temp_dir().join(format!(
        "tancheck-build-{}-{}-{nanos}",
        std::process::id(),
        BUILD_COUNTER.fetch_add(1, Ordering::Relaxed)
    ))
}

/// Removes a temporary build directory when the build ends, however it ends.
struct Cleanup(Option<PathBuf>);

impl Drop for Cleanup {
    fn drop(&mut self) {
        if let Some(d) = &self.0 {
            let _ = std::fs::remove_dir_all(d);
        }
    }
}

/// Compile `opts.sources` into the shared library `opts.output`.
pub fn build_library(opts: &BuildOptions) -> Result<BuildLog, BuildError> {
    if opts.sources.is_empty() {
        return Err(BuildError::NoSources);
    }
    let mut sources = Vec::with_capacity(opts.sources.len());
    for s in &opts.sources {
        match std::fs::metadata(s) {
            Ok(m) if m.is_file() => {}
            Ok(_) => return Err(BuildError::SourceNotFound { path: s.clone() }),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                return Err(BuildError::SourceNotFound { path: s.clone() })
            }
            Err(source) => return Err(BuildError::Io { action: "read", path: s.clone(), source }),
        }
        let lang = Language::of(s).ok_or_else(|| BuildError::UnknownSource { path: s.clone() })?;
        sources.push((s.clone(), lang));
    }
    let has_fortran = sources.iter().any(|(_, l)| *l == Language::Fortran);
    let cc = if sources.iter().any(|(_, l)| *l == Language::C) {
        Some(Compiler::from_env(Language::C)?)
    } else {
        None
    };
    let fc = if has_fortran { Some(Compiler::from_env(Language::Fortran)?) } else { None };
    let sources = order_by_modules(sources);

    let (dir, _cleanup) = match &opts.build_dir {
        Some(d) => (d.clone(), Cleanup(None)),
        None => {
            let d = fresh_build_dir();
            (d.clone(), Cleanup(Some(d)))
        }
    };
    let include = dir.join("include");
    let mods = dir.join("mod");
    let obj = dir.join("obj");
    for d in [&include, &mods, &obj, &dir.join("mod-real"), &dir.join("mod-cx")] {
        std::fs::create_dir_all(d).map_err(|source| BuildError::Io {
            action: "create the build directory",
            path: d.clone(),
            source,
        })?;
    }
    for (name, text) in SHIM_INCLUDE {
        let p = include.join(name);
        std::fs::write(&p, text).map_err(|source| BuildError::Io {
            action: "write",
            path: p.clone(),
            source,
        })?;
    }

    let mut log = BuildLog { output: opts.output.clone(), build_dir: dir.clone(), commands: Vec::new() };
    let mut objects: Vec<PathBuf> = Vec::new();
    let opt_c: Vec<&str> =
        if opts.debug { vec!["-g", "-O0", "-fno-omit-frame-pointer", "-ftrapv"] } else { vec!["-O2"] };
    let opt_f: Vec<&str> = if opts.debug {
        vec![
            "-g",
            "-O0",
            "-fcheck=all",
            "-ffpe-trap=invalid,zero,overflow",
            "-fbacktrace",
            "-finit-real=snan",
        ]
    } else {
        vec!["-O2"]
    };
    let s = |p: &Path| p.display().to_string();

    if let Some(fc) = &fc {
        let src_dir = dir.join("shim");
        std::fs::create_dir_all(&src_dir).map_err(|source| BuildError::Io {
            action: "create the build directory",
            path: src_dir.clone(),
            source,
        })?;
        // The block module only for sources that use it (every other build keeps its steps).
        let wants_block = sources.iter().any(|(p, l)| {
            *l == Language::Fortran
                && std::fs::read_to_string(p).is_ok_and(|t| t.to_ascii_lowercase().contains("tancheck_block"))
        });
        for (name, text) in SHIM_MODULES {
            if name == "tancheck_block.f90" && !wants_block {
                continue;
            }
            let src = src_dir.join(name);
            std::fs::write(&src, text).map_err(|source| BuildError::Io {
                action: "write",
                path: src.clone(),
                source,
            })?;
            let o = obj.join(name.replace(".f90", ".o"));
            let mut args: Vec<String> = vec!["-cpp".into(), "-fPIC".into()];
            args.extend(opt_f.iter().map(|a| a.to_string()));
            args.extend(opts.fflags.iter().cloned());
            args.extend([
                "-J".into(),
                s(&mods),
                "-I".into(),
                s(&include),
                "-c".into(),
                s(&src),
                "-o".into(),
                s(&o),
            ]);
            fc.run(format!("compiling the module `{name}` of tancheck"), args, &mut log, |_| {
                " The module ships with tancheck and compiles with gfortran 9 or newer: check \
                 that FC names a Fortran 2008 compiler."
                    .into()
            })?;
            objects.push(o);
        }
    }

    let passes: &[bool] = if opts.twin { &[false, true] } else { &[false] };
    for &complex in passes {
        let mod_out = dir.join(if complex { "mod-cx" } else { "mod-real" });
        for (i, (src, lang)) in sources.iter().enumerate() {
            let stem = src.file_stem().map(|x| x.to_string_lossy().into_owned()).unwrap_or_default();
            let o = obj.join(format!("{i}-{stem}{}.o", if complex { "-cx" } else { "" }));
            let mut args: Vec<String> = Vec::new();
            let compiler = match lang {
                Language::C => {
                    args.push("-fPIC".into());
                    args.extend(opt_c.iter().map(|a| a.to_string()));
                    args.extend(opts.cflags.iter().cloned());
                    args.extend(["-I".into(), s(&include)]);
                    cc.as_ref().expect("a C compiler is set up when there is C")
                }
                Language::Fortran => {
                    args.extend(["-cpp".into(), "-fPIC".into()]);
                    args.extend(opt_f.iter().map(|a| a.to_string()));
                    args.extend(opts.fflags.iter().cloned());
                    args.extend(["-I".into(), s(&include), "-I".into(), s(&mods), "-J".into(), s(&mod_out)]);
                    fc.as_ref().expect("a Fortran compiler is set up when there is Fortran")
                }
            };
            if complex {
                args.push("-DTC_COMPLEX".into());
            }
            args.extend(["-c".into(), s(src), "-o".into(), s(&o)]);
            let stage = format!(
                "compiling `{}`{}",
                src.display(),
                if complex { " as its complex-step twin (-DTC_COMPLEX)" } else { "" }
            );
            let lang = *lang;
            compiler.run(stage, args, &mut log, |out| compile_hint(out, lang, complex))?;
            objects.push(o);
        }
    }

    if opts.debug {
        // The marker, in the language of the linker (so no second compiler is needed).
        let marker_dir = dir.join("marker");
        std::fs::create_dir_all(&marker_dir).map_err(|source| BuildError::Io {
            action: "create the build directory",
            path: marker_dir.clone(),
            source,
        })?;
        let (compiler, file, text, extra) = match &fc {
            Some(fc) => (
                fc,
                "debug_marker.f90",
                format!(
                    "function tc_debug_marker() bind(C, name=\"{DEBUG_MARKER}\") result(r)\n  \
                     use, intrinsic :: iso_c_binding, only: c_int\n  implicit none\n  \
                     integer(c_int) :: r\n  r = 1_c_int\nend function tc_debug_marker\n"
                ),
                opt_f
                    .iter()
                    .map(|a| a.to_string())
                    .chain(["-J".to_string(), s(&marker_dir)])
                    .collect::<Vec<_>>(),
            ),
            None => (
                cc.as_ref().expect("there is at least one source"),
                "debug_marker.c",
                format!("int {DEBUG_MARKER}(void);\nint {DEBUG_MARKER}(void) {{ return 1; }}\n"),
                opt_c.iter().map(|a| a.to_string()).collect(),
            ),
        };
        let src = marker_dir.join(file);
        std::fs::write(&src, text).map_err(|source| BuildError::Io {
            action: "write",
            path: src.clone(),
            source,
        })?;
        let o = obj.join("debug-marker.o");
        let mut args: Vec<String> = vec!["-fPIC".into()];
        args.extend(extra);
        args.extend(["-c".into(), s(&src), "-o".into(), s(&o)]);
        compiler.run("compiling the debug marker of tancheck".into(), args, &mut log, |_| String::new())?;
        objects.push(o);
    }

    if let Some(parent) = opts.output.parent().filter(|p| !p.as_os_str().is_empty()) {
        std::fs::create_dir_all(parent).map_err(|source| BuildError::Io {
            action: "create the output directory",
            path: parent.into(),
            source,
        })?;
    }
    let linker = fc.as_ref().or(cc.as_ref()).expect("there is at least one source");
    let mut args: Vec<String> = vec!["-shared".into()];
    if opts.debug {
        args.push("-g".into());
    }
    args.extend(["-o".into(), s(&opts.output)]);
    args.extend(objects.iter().map(|o| s(o)));
    if cfg!(target_os = "linux") {
        // Report an unresolved name now, not when the library is loaded.
        args.push("-Wl,-z,defs".into());
    }
    args.push("-lm".into());
    args.extend(opts.ldflags.iter().cloned());
    let defines_modules =
        sources.iter().any(|(p, l)| *l == Language::Fortran && !fortran_modules(p).0.is_empty());
    let twin = opts.twin;
    linker.run(format!("linking `{}`", opts.output.display()), args, &mut log, |out| {
        link_hint(out, twin, defines_modules)
    })?;
    Ok(log)
}

fn compile_hint(output: &str, lang: Language, complex: bool) -> String {
    let mut h = String::new();
    if output.contains("Cannot open module file") {
        h.push_str(
            "A module this source uses was not found: give the source that defines it too \
             (tancheck compiles Fortran sources in the order of their modules). The modules \
             tancheck_routine and tancheck_cstep are provided.",
        );
    }
    if complex {
        if !h.is_empty() {
            h.push(' ');
        }
        h.push_str(match lang {
            Language::C => {
                "The source compiled as a real routine but not as its complex-step twin \
                 (-DTC_COMPLEX, where tc_real is double _Complex): compare real parts only \
                 (tc_re(x) < 0), declare every number of the routine tc_real, and use the \
                 helpers of tancheck_cstep.h (tc_abs, tc_sqrt, ...) instead of libm; or build \
                 without the twin (--no-twin)."
            }
            Language::Fortran => {
                "The source compiled as a real routine but not as its complex-step twin \
                 (-DTC_COMPLEX): declare the routine's numbers TC_REAL from tancheck_twin.inc, \
                 name it bind(C, name=\"...\"//TC_SUFFIX) and use the generics of module \
                 tancheck_cstep, or build without the twin (--no-twin)."
            }
        });
    }
    if h.is_empty() {
        h
    } else {
        format!("\n{h}")
    }
}

fn link_hint(output: &str, twin: bool, defines_modules: bool) -> String {
    let mut h = Vec::new();
    if output.contains("multiple definition") {
        if twin && defines_modules {
            h.push(
                "Every source is compiled twice (the routine and its complex-step twin), so a \
                 procedure inside a Fortran module is defined twice: write the routine as an \
                 external procedure named bind(C, name=\"...\"//TC_SUFFIX) (see tancheck_twin.inc), \
                 or build without the twin (--no-twin).",
            );
        } else if twin {
            h.push(
                "Every source is compiled twice (the routine and its complex-step twin): a \
                 function with external linkage that does not go through TC_NAME() / \
                 TC_SUFFIX is defined twice. Make helpers static, name routines with \
                 TC_ROUTINE() or TC_SUFFIX, or build without the twin (--no-twin).",
            );
        } else {
            h.push("Two sources define the same name: rename one or leave one out.");
        }
    }
    if output.contains("undefined reference") {
        h.push(
            "A name the sources use is defined nowhere: add the source that defines it. \
             A name ending in `_` is a Fortran external procedure; one ending in `_cx` is a \
             complex-step twin that a source did not get.",
        );
    }
    if h.is_empty() {
        String::new()
    } else {
        format!("\n{}", h.join(" "))
    }
}

/// Modules a Fortran source defines and uses (lower case), by a line scan that ignores
/// comments and continuation subtleties; good enough to order sources.
fn fortran_modules(path: &Path) -> (Vec<String>, Vec<String>) {
    let Ok(text) = std::fs::read_to_string(path) else { return (Vec::new(), Vec::new()) };
    let mut defines = Vec::new();
    let mut uses = Vec::new();
    for raw in text.lines() {
        let line = raw.split('!').next().unwrap_or("").trim().to_ascii_lowercase();
        let mut words =
            line.split(|c: char| c.is_whitespace() || c == ',' || c == ':').filter(|w| !w.is_empty());
        match words.next() {
            Some("module") => {
                if let Some(name) = words.next() {
                    if !matches!(name, "procedure" | "function" | "subroutine")
                        && name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_')
                    {
                        defines.push(name.to_string());
                    }
                }
            }
            Some("use") => {
                let rest: Vec<&str> = words.collect();
                let (intrinsic, name) = match rest.as_slice() {
                    ["intrinsic", name, ..] => (true, Some(*name)),
                    ["non_intrinsic", name, ..] => (false, Some(*name)),
                    [name, ..] => (false, Some(*name)),
                    [] => (false, None),
                };
                if let (false, Some(n)) = (intrinsic, name) {
                    let n: String =
                        n.chars().take_while(|c| c.is_ascii_alphanumeric() || *c == '_').collect();
                    if !n.is_empty() {
                        uses.push(n);
                    }
                }
            }
            _ => {}
        }
    }
    (defines, uses)
}

/// Sources with every Fortran source after the sources that define the modules it uses; the
/// given order otherwise. A cycle keeps the given order (the compiler will explain).
fn order_by_modules(sources: Vec<(PathBuf, Language)>) -> Vec<(PathBuf, Language)> {
    let info: Vec<(Vec<String>, Vec<String>)> = sources
        .iter()
        .map(|(p, l)| if *l == Language::Fortran { fortran_modules(p) } else { (Vec::new(), Vec::new()) })
        .collect();
    let provider = |m: &str| info.iter().position(|(d, _)| d.iter().any(|x| x == m));
    let n = sources.len();
    let mut placed = vec![false; n];
    let mut order = Vec::with_capacity(n);
    while order.len() < n {
        let next = (0..n).find(|&i| {
            !placed[i]
                && info[i].1.iter().all(|m| {
                    SHIM_MODULE_NAMES.contains(&m.as_str())
                        || match provider(m) {
                            Some(p) => p == i || placed[p],
                            None => true,
                        }
                })
        });
        match next {
            Some(i) => {
                placed[i] = true;
                order.push(i);
            }
            None => {
                // A cycle: keep the rest in the given order.
                order.extend((0..n).filter(|&i| !placed[i]));
                break;
            }
        }
    }
    let mut slots: Vec<Option<(PathBuf, Language)>> = sources.into_iter().map(Some).collect();
    order.into_iter().map(|i| slots[i].take().expect("each index once")).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn temp(name: &str) -> PathBuf {
        let d =
            fresh_build_dir().with_file_name(format!("tancheck-compile-test-{}-{name}", std::process::id()));
        std::fs::create_dir_all(&d).unwrap();
        d
    }

    #[test]
    fn fortran_sources_follow_their_modules() {
        let d = temp("order");
        let user = d.join("user.f90");
        let lib = d.join("helpers.F90");
        let c = d.join("x.c");
        std::fs::write(
            &user,
            "subroutine s()\n  use, non_intrinsic :: helpers, only: h\n  use tancheck_routine\nend\n",
        )
        .unwrap();
        std::fs::write(&lib, "Module Helpers ! defines h\ncontains\nsubroutine h()\nend\nend module\n")
            .unwrap();
        std::fs::write(&c, "int x;\n").unwrap();
        let (defs, uses) = fortran_modules(&user);
        assert!(defs.is_empty());
        assert_eq!(uses, vec!["helpers", "tancheck_routine"]);
        assert_eq!(fortran_modules(&lib).0, vec!["helpers"]);
        let ordered = order_by_modules(vec![
            (user.clone(), Language::Fortran),
            (c.clone(), Language::C),
            (lib.clone(), Language::Fortran),
        ]);
        let names: Vec<_> = ordered.iter().map(|(p, _)| p.clone()).collect();
        assert_eq!(names, vec![c, lib, user]);
        std::fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn languages_come_from_the_extension() {
        for (name, lang) in [
            ("a.c", Some(Language::C)),
            ("a.f", Some(Language::Fortran)),
            ("a.f90", Some(Language::Fortran)),
            ("a.F90", Some(Language::Fortran)),
            ("a.f95", Some(Language::Fortran)),
            ("a.f03", Some(Language::Fortran)),
            ("a.f08", Some(Language::Fortran)),
            ("a.cpp", None),
            ("a", None),
        ] {
            assert_eq!(Language::of(Path::new(name)), lang, "{name}");
        }
    }

    #[test]
    fn commands_are_quoted_for_a_shell() {
        let s = BuildCommand {
            stage: String::new(),
            program: "cc".into(),
            args: vec!["-I".into(), "/tmp/my dir".into(), "-DX='1'".into(), "-O2".into()],
            stdout: String::new(),
            stderr: String::new(),
            success: true,
        };
        assert_eq!(s.command_line(), r#"cc -I '/tmp/my dir' '-DX='\''1'\''' -O2"#);
    }

    #[test]
    fn a_missing_compiler_names_the_variable_to_set() {
        let mut fc = Compiler::from_env(Language::Fortran).unwrap();
        fc.program = "/nonexistent/tancheck-no-such-gfortran".into();
        fc.pre.clear();
        let mut log = BuildLog::default();
        let e =
            fc.run("compiling".into(), vec!["--version".into()], &mut log, |_| String::new()).unwrap_err();
        let m = e.to_string();
        assert!(matches!(e, BuildError::CompilerMissing { var: "FC", .. }), "{m}");
        assert!(m.contains("Set FC to the Fortran compiler"), "{m}");
        assert!(m.contains("system package manager"), "{m}");
        assert!(m.contains("/nonexistent/tancheck-no-such-gfortran"), "{m}");
    }

    #[test]
    fn the_default_build_makes_the_twin() {
        let d = BuildOptions::default();
        assert!(d.twin && !d.debug && d.sources.is_empty() && d.build_dir.is_none());
    }

    #[test]
    fn empty_source_list_is_refused() {
        let e = build_library(&BuildOptions::new(Vec::<PathBuf>::new(), "x.so")).unwrap_err();
        assert!(matches!(e, BuildError::NoSources), "{e}");
        let e = build_library(&BuildOptions::new(["model.cpp"], "x.so")).unwrap_err();
        assert!(matches!(e, BuildError::SourceNotFound { .. }), "{e}");
    }
}
