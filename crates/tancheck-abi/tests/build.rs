//! Building sources into a library: the commands, the twin, the errors.

mod common;

use std::path::PathBuf;

use common::*;
use tancheck_abi::compile::{C_DEBUG_FLAGS, FORTRAN_DEBUG_FLAGS};
use tancheck_abi::{build_library, BuildError, BuildOptions, Library};

fn fortran_example(name: &str) -> PathBuf {
    shim().join("examples/fortran").join(name)
}

/// The Fortran reference routine, built with the shipped modules, gives the elastic response,
/// and its twin gives the tangent by complex step.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_sources_build_with_modules_and_twin() {
    let dir = scratch("fortran");
    let out = dir.join("lib/libexamples.so"); // the lib/ folder does not exist yet
    let opts = BuildOptions::new([fortran_example("elastic.F90"), fortran_example("j2.F90")], &out);
    let log = build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    // The three modules first, then two sources twice, then the link.
    assert_eq!(log.commands.len(), 3 + 2 * 2 + 1, "{log}");
    assert!(log.commands[0].stage.contains("tancheck_routine.f90"), "{log}");
    assert!(log.commands[1].stage.contains("tancheck_cstep.f90"), "{log}");
    assert!(log.commands[2].stage.contains("tancheck_finite.f90"), "{log}");
    assert!(log.commands.iter().filter(|s| s.args.iter().any(|a| a == "-DTC_COMPLEX")).count() == 2, "{log}");
    assert!(log.commands.iter().all(|s| s.success));
    assert!(log.commands[..7].iter().all(|s| s.args.iter().any(|a| a == "-cpp")), "{log}");
    assert!(!log.build_dir.exists(), "the temporary build directory is removed");

    let lib = Library::open(&out).unwrap();
    for s in ["f_elastic", "f_elastic_cx", "f_j2", "f_j2_cx"] {
        assert!(lib.has_symbol(s), "{s} missing; exports: {:?}", lib.exported_functions().unwrap());
    }
    let mut r = lib.routine("f_elastic", elastic_info("f_elastic")).unwrap();
    assert!(r.has_twin());
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
    assert_twin_gives_tangent(&mut r, &b);
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn c_and_fortran_link_into_one_library() {
    let dir = scratch("mixed");
    let out = dir.join("libmixed.so");
    let log = build_library(&BuildOptions::new(
        [shim().join("examples/c/misbehave.c"), fortran_example("elastic.F90")],
        &out,
    ))
    .unwrap_or_else(|e| panic!("{e}"));
    let link = log.commands.last().unwrap();
    assert!(link.stage.starts_with("linking"), "{log}");
    let lib = Library::open(&out).unwrap();
    assert!(lib.has_symbol("bad_abort_cx") && lib.has_symbol("f_elastic_cx"));
    assert!(!lib.has_symbol(tancheck_abi::DEBUG_MARKER), "only a debug build carries the marker");
    let mut r = lib.routine("bad_abort", elastic_info("bad_abort")).unwrap();
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
}

#[test]
fn debug_builds_use_the_debug_flags() {
    let dir = scratch("debug-c");
    let out = dir.join("libmisbehave-debug.so");
    let mut opts = BuildOptions::new([shim().join("examples/c/misbehave.c")], &out);
    opts.debug = true;
    let log = build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    let compile = &log.commands[0];
    for flag in C_DEBUG_FLAGS.into_iter().chain(["-fPIC"]) {
        assert!(compile.args.iter().any(|a| a == flag), "{flag} missing: {}", compile.command_line());
    }
    assert!(!compile.args.iter().any(|a| a == "-O2"));
    let mut r = Library::open(&out).unwrap().routine("bad_null_deref", elastic_info("d")).unwrap();
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
    assert!(b.call(&mut r, 2).is_err());
    assert!(log.to_string().contains("$ cc "), "{log}");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_debug_builds_use_the_debug_flags() {
    let dir = scratch("debug-f");
    let out = dir.join("libelastic-debug.so");
    let mut opts = BuildOptions::new([fortran_example("elastic.F90")], &out);
    opts.debug = true;
    let log = build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    for step in &log.commands[..log.commands.len() - 1] {
        for flag in FORTRAN_DEBUG_FLAGS {
            assert!(step.args.iter().any(|a| a == flag), "{flag} missing: {}", step.command_line());
        }
    }
    let lib = Library::open(&out).unwrap();
    assert!(lib.has_symbol(tancheck_abi::DEBUG_MARKER), "a debug build carries the marker");
    let mut r = lib.routine("f_elastic", elastic_info("f")).unwrap();
    r.set_fp_traps(tancheck_abi::signal_guard::fp_traps_available()).unwrap();
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
}

#[test]
fn a_compiler_error_shows_the_command_and_the_message() {
    let dir = scratch("broken");
    let src = dir.join("broken.c");
    std::fs::write(&src, "#include \"tancheck_routine.h\"\nTC_ROUTINE(broken) { stress[0] = ; }\n").unwrap();
    let e = build_library(&BuildOptions::new([&src], dir.join("libbroken.so"))).unwrap_err();
    let BuildError::CompilerFailed { log, .. } = &e else { panic!("{e:?}") };
    assert_eq!(log.commands.len(), 1);
    assert!(!log.commands[0].success);
    let m = e.to_string();
    assert!(m.starts_with(&format!("compiling `{}` failed (exit status", src.display())), "{m}");
    assert!(m.contains(&format!("-c {}", src.display())), "{m}");
    assert!(m.contains("error"), "{m}");
    assert!(m.contains("broken.c:2"), "{m}");
    assert!(!dir.join("libbroken.so").exists());
}

#[test]
fn a_source_that_fails_only_as_a_twin_says_so() {
    let dir = scratch("twin-only");
    let src = dir.join("cmp.c");
    std::fs::write(
        &src,
        "#include \"tancheck_routine.h\"\nTC_ROUTINE(cmp) { (void)call; if (properties[0] < 0) stress[0] = 0; }\n",
    )
    .unwrap();
    let e = build_library(&BuildOptions::new([&src], dir.join("libcmp.so"))).unwrap_err();
    let m = e.to_string();
    assert!(m.contains("as its complex-step twin (-DTC_COMPLEX) failed"), "{m}");
    assert!(m.contains("compare real parts only"), "{m}");
    assert!(m.contains("--no-twin"), "{m}");

    let mut opts = BuildOptions::new([&src], dir.join("libcmp.so"));
    opts.twin = false;
    let log = build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(log.commands.len(), 2);
}

#[test]
fn a_helper_defined_twice_by_the_twin_is_explained() {
    let dir = scratch("dup");
    let src = dir.join("dup.c");
    std::fs::write(
        &src,
        "#include \"tancheck_routine.h\"\ndouble scale(double x) { return 2 * x; }\n\
         TC_ROUTINE(dup) { (void)call; stress[0] = scale(1.0) * properties[0]; }\n",
    )
    .unwrap();
    let e = build_library(&BuildOptions::new([&src], dir.join("libdup.so"))).unwrap_err();
    let m = e.to_string();
    assert!(m.starts_with("linking"), "{m}");
    assert!(m.contains("multiple definition"), "{m}");
    assert!(m.contains("Make helpers static"), "{m}");
}

#[test]
fn a_kept_build_directory_holds_the_shim() {
    let dir = scratch("kept");
    let mut opts = BuildOptions::new([shim().join("examples/c/misbehave.c")], dir.join("libm.so"));
    opts.build_dir = Some(dir.join("work"));
    let log = build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(log.build_dir, dir.join("work"));
    for f in ["tancheck_routine.h", "tancheck_cstep.h", "tancheck_twin.inc"] {
        let shipped = std::fs::read_to_string(shim().join("include").join(f)).unwrap();
        assert_eq!(std::fs::read_to_string(dir.join("work/include").join(f)).unwrap(), shipped, "{f}");
    }
    assert!(dir.join("work/obj/0-misbehave.o").is_file());
    assert!(dir.join("work/obj/0-misbehave-cx.o").is_file());
}

#[test]
fn unknown_extensions_are_refused() {
    let dir = scratch("ext");
    let src = dir.join("model.cpp");
    std::fs::write(&src, "int x;\n").unwrap();
    let e = build_library(&BuildOptions::new([&src], dir.join("x.so"))).unwrap_err();
    assert!(matches!(e, BuildError::UnknownSource { .. }), "{e:?}");
    assert!(e.to_string().contains("C sources end in .c"), "{e}");
}
