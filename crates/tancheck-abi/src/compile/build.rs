//! One build from start to end: check the sources, order them, write the ABI's files, compile
//! the modules, every source and its twin, and link the library.

use std::path::{Path, PathBuf};

use super::compiler::Compiler;
use super::hints::{compile_hint, link_hint};
use super::language::{fortran_modules, order_by_modules, Language};
use super::options::{BuildOptions, DEBUG_MARKER};
use super::shim_files::{fresh_build_dir, Cleanup, SHIM_INCLUDE, SHIM_MODULES};
use crate::build_log::BuildLog;
use crate::error::BuildError;

/// The C flags of a debug build (`BuildOptions::debug`), one list for the build and its tests:
/// debug information, no optimisation, frame pointers for backtraces, trapping integer overflow.
pub const C_DEBUG_FLAGS: [&str; 4] = ["-g", "-O0", "-fno-omit-frame-pointer", "-ftrapv"];

/// The Fortran flags of a debug build, one list for the build and its tests: debug information,
/// no optimisation, run-time checks, floating-point traps, backtraces, reals set to signalling NaN.
pub const FORTRAN_DEBUG_FLAGS: [&str; 6] =
    ["-g", "-O0", "-fcheck=all", "-ffpe-trap=invalid,zero,overflow", "-fbacktrace", "-finit-real=snan"];

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
    let opt_c: Vec<&str> = if opts.debug { C_DEBUG_FLAGS.to_vec() } else { vec!["-O2"] };
    let opt_f: Vec<&str> = if opts.debug { FORTRAN_DEBUG_FLAGS.to_vec() } else { vec!["-O2"] };
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
