//! The test programs of fortran-shim/examples, built against the C API library as a user
//! would build them, check the J2 routines in-process: the consistent one passes, the one
//! with the continuum tangent fails. The C program links the static library, the Fortran
//! program the shared one.

mod common;

use common::*;

/// check_from_c.c with c_j2 and c_j2_continuum (j2.c, real and complex twin), statically
/// linked.
#[test]
fn the_c_program_passes_the_consistent_j2_and_fails_the_continuum_one() {
    if !tancheck_abi::c_available() {
        panic!("no C compiler (set CC or install gcc): the C API cannot be tested from C");
    }
    let lib = library_dir();
    let dir = scratch("c-program");
    let include = shim().join("include");
    let inc = format!("-I{}", include.display());
    let j2 = shim().join("examples/c/j2.c");
    let program = shim().join("examples/c/check_from_c.c");
    let flags = ["-std=c11", "-Wall", "-Wextra", "-pedantic"];
    let mut args: Vec<&str> = flags.to_vec();
    args.extend([inc.as_str(), "-c", path_str(&j2), "-o", "j2.o"]);
    compile("CC", "cc", &args, &dir);
    let mut args: Vec<&str> = flags.to_vec();
    args.extend([inc.as_str(), "-DTC_COMPLEX", "-c", path_str(&j2), "-o", "j2_cx.o"]);
    compile("CC", "cc", &args, &dir);
    let archive = lib.join("libtancheck_capi.a");
    let mut args: Vec<&str> = flags.to_vec();
    args.extend([inc.as_str(), path_str(&program), "j2.o", "j2_cx.o", path_str(&archive)]);
    args.extend(NATIVE_STATIC_LIBS);
    args.extend(["-o", "check_from_c"]);
    compile("CC", "cc", &args, &dir);

    let (out, stdout, stderr) = run(&dir.join("check_from_c"));
    assert_eq!(out.status.code(), Some(0), "stdout:\n{stdout}\nstderr:\n{stderr}");
    assert!(stdout.contains("\nPASS c_j2: central: 0 of 12 checks failed"), "{stdout}");
    assert!(stdout.contains("\nFAIL c_j2_continuum: central: 8 of 12 checks failed"), "{stdout}");
    // The summary says why it failed.
    assert!(stdout.contains("; finding continuum-tangent"), "{stdout}");
    assert!(!stdout.contains("guard:"), "the J2 routine is clean under full guards:\n{stdout}");
    assert!(stdout.ends_with("as expected: c_j2 passes, c_j2_continuum fails\n"), "{stdout}");
}

/// check_from_fortran.f90 with f_j2 and f_j2_continuum (j2.F90, real and complex twin) and
/// the modules, linked with the shared library.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn the_fortran_program_passes_the_consistent_j2_and_fails_the_continuum_one() {
    let lib = library_dir();
    let dir = scratch("fortran-program");
    let fortran = shim().join("fortran");
    let inc = format!("-I{}", shim().join("include").display());
    let flags = ["-std=f2008", "-Wall", "-J", "."];
    for module in ["tancheck_routine", "tancheck_cstep", "tancheck_api"] {
        let src = fortran.join(format!("{module}.f90"));
        let obj = format!("{module}.o");
        let mut args: Vec<&str> = flags.to_vec();
        args.extend(["-c", path_str(&src), "-o", &obj]);
        compile("FC", "gfortran", &args, &dir);
    }
    let j2 = shim().join("examples/fortran/j2.F90");
    for (twin, obj) in [(None, "j2.o"), (Some("-DTC_COMPLEX"), "j2_cx.o")] {
        let mut args: Vec<&str> = flags.to_vec();
        args.extend(["-cpp", inc.as_str()]);
        args.extend(twin);
        args.extend(["-c", path_str(&j2), "-o", obj]);
        compile("FC", "gfortran", &args, &dir);
    }
    let program = shim().join("examples/fortran/check_from_fortran.f90");
    let libdir = format!("-L{}", lib.display());
    let rpath = format!("-Wl,-rpath,{}", lib.display());
    let mut args: Vec<&str> = flags.to_vec();
    args.extend([
        path_str(&program),
        "j2.o",
        "j2_cx.o",
        "tancheck_routine.o",
        "tancheck_cstep.o",
        "tancheck_api.o",
        libdir.as_str(),
        "-ltancheck_capi",
        rpath.as_str(),
        "-o",
        "check_from_fortran",
    ]);
    compile("FC", "gfortran", &args, &dir);

    let (out, stdout, stderr) = run(&dir.join("check_from_fortran"));
    assert_eq!(out.status.code(), Some(0), "stdout:\n{stdout}\nstderr:\n{stderr}");
    assert!(stdout.contains("\nPASS f_j2: central: 0 of 12 checks failed"), "{stdout}");
    assert!(stdout.contains("\nFAIL f_j2_continuum: central: 8 of 12 checks failed"), "{stdout}");
    assert!(!stdout.contains("guard:"), "the J2 routine is clean under full guards:\n{stdout}");
    assert!(stdout.ends_with("as expected: f_j2 passes, f_j2_continuum fails\n"), "{stdout}");
}

/// fortran-shim/tancheck.pc.in, filled in for an installation into a scratch prefix, gives
/// the flags that build and link check_from_c.c against the shared library.
#[test]
#[cfg_attr(tancheck_no_pkg_config, ignore = "needs pkg-config (apt-get install pkg-config)")]
fn the_pkg_config_file_builds_the_c_program() {
    let lib = library_dir();
    let prefix = scratch("pkg-config-prefix");
    std::fs::create_dir_all(prefix.join("include")).unwrap();
    std::fs::create_dir_all(prefix.join("lib/pkgconfig")).unwrap();
    for h in ["tancheck.h", "tancheck_routine.h", "tancheck_cstep.h"] {
        std::fs::copy(shim().join("include").join(h), prefix.join("include").join(h)).unwrap();
    }
    std::fs::copy(lib.join("libtancheck_capi.so"), prefix.join("lib/libtancheck_capi.so")).unwrap();
    let template = std::fs::read_to_string(shim().join("tancheck.pc.in")).unwrap();
    let pc = template.replace("@PREFIX@", path_str(&prefix)).replace("@VERSION@", env!("CARGO_PKG_VERSION"));
    assert!(!pc.contains('@'), "a placeholder is left:\n{pc}");
    std::fs::write(prefix.join("lib/pkgconfig/tancheck.pc"), pc).unwrap();

    let flags = std::process::Command::new("pkg-config")
        .args(["--cflags", "--libs", "tancheck"])
        .env("PKG_CONFIG_PATH", prefix.join("lib/pkgconfig"))
        .output()
        .unwrap();
    assert!(flags.status.success(), "{}", String::from_utf8_lossy(&flags.stderr));
    let flags = String::from_utf8(flags.stdout).unwrap();
    assert!(flags.contains("-ltancheck_capi"), "{flags}");
    let version = std::process::Command::new("pkg-config")
        .args(["--modversion", "tancheck"])
        .env("PKG_CONFIG_PATH", prefix.join("lib/pkgconfig"))
        .output()
        .unwrap();
    assert_eq!(String::from_utf8_lossy(&version.stdout).trim(), env!("CARGO_PKG_VERSION"));

    let dir = scratch("pkg-config-build");
    let j2 = shim().join("examples/c/j2.c");
    let flag_words: Vec<&str> = flags.split_whitespace().collect();
    for (twin, obj) in [(None, "j2.o"), (Some("-DTC_COMPLEX"), "j2_cx.o")] {
        let mut args = flag_words.clone();
        args.extend(twin);
        args.extend(["-c", path_str(&j2), "-o", obj]);
        compile("CC", "cc", &args, &dir);
    }
    let program = shim().join("examples/c/check_from_c.c");
    let mut args = vec![path_str(&program), "j2.o", "j2_cx.o"];
    args.extend(flag_words);
    args.extend(["-lm", "-o", "check_from_c"]); // libm for j2.c's exp
    compile("CC", "cc", &args, &dir);
    let out = std::process::Command::new(dir.join("check_from_c"))
        .env("LD_LIBRARY_PATH", prefix.join("lib"))
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{stdout}\n{}", String::from_utf8_lossy(&out.stderr));
    assert!(stdout.ends_with("as expected: c_j2 passes, c_j2_continuum fails\n"), "{stdout}");
}
