//! fortran-shim/install.sh installs the C API library, the headers, the Fortran modules,
//! tancheck.pc / tancheck-fortran.pc and the CMake package into a prefix; the in-process
//! examples (check_from_c.c, check_from_fortran.f90) then build through CMake
//! (find_package(tancheck)) and through pkg-config (fortran-shim/examples/build-installed.sh),
//! and run without LD_LIBRARY_PATH (the rpath).

mod common;

use std::process::Command;

use common::*;

fn run_script(script: &str, args: &[&str], envs: &[(&str, &str)]) -> String {
    let out = Command::new("bash")
        .arg(shim().join(script))
        .args(args)
        .envs(envs.iter().copied())
        .env_remove("LD_LIBRARY_PATH")
        .output()
        .unwrap_or_else(|e| panic!("cannot run bash: {e}"));
    let text = format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr));
    assert!(out.status.success(), "{script} {args:?} failed:\n{text}");
    text
}

#[test]
#[cfg_attr(tancheck_no_cmake, ignore = "needs cmake and pkg-config (apt-get install cmake pkg-config)")]
fn the_installed_package_builds_and_runs_the_examples_through_cmake_and_pkg_config() {
    // The Fortran part runs where gfortran does (always under TANCHECK_REQUIRE_FORTRAN=1, as
    // in CI; see build.rs); the installer itself leaves the Fortran modules out without it.
    let fortran = !cfg!(tancheck_no_fortran);
    let lib = library_dir();
    let prefix = scratch("install-prefix");
    let work = scratch("install-work");
    let text = run_script(
        "install.sh",
        &[path_str(&prefix)],
        &[("TANCHECK_LIB_DIR", path_str(&lib)), ("TANCHECK_BIN", "none")],
    );
    assert!(text.contains("installed in"), "{text}");

    // The pkg-config file has the real paths, the version and the rpath.
    let pc = std::fs::read_to_string(prefix.join("lib/pkgconfig/tancheck.pc")).unwrap();
    assert!(pc.contains(&format!("prefix={}\n", prefix.display())), "{pc}");
    assert!(pc.contains(&format!("Version: {}\n", env!("CARGO_PKG_VERSION"))), "{pc}");
    assert!(pc.contains("-Wl,-rpath,${libdir}") && !pc.contains('@'), "{pc}");
    let cfg = std::fs::read_to_string(prefix.join("lib/cmake/tancheck/tancheckConfig.cmake")).unwrap();
    assert!(!cfg.contains("@VERSION@") && !cfg.contains("@FORTRAN@"), "{cfg}");
    for f in [
        "include/tancheck.h",
        "include/tancheck_twin.inc",
        "lib/libtancheck_capi.so",
        "lib/libtancheck_capi.a",
    ] {
        assert!(prefix.join(f).is_file(), "{f} is not installed");
    }
    if fortran {
        assert!(prefix.join("include/tancheck/fortran/tancheck_api.mod").is_file());
        assert!(prefix.join("lib/libtancheck_fortran.a").is_file());
    }

    let mut args = vec![path_str(&prefix), path_str(&work)];
    if !fortran {
        args.push("--no-fortran");
    }
    let text = run_script("examples/build-installed.sh", &args, &[]);
    assert!(text.contains("== through CMake") && text.contains("== through pkg-config"), "{text}");
    let c_runs = text.matches("as expected: c_j2 passes, c_j2_continuum fails").count();
    assert_eq!(c_runs, 2, "the C program ran through CMake and through pkg-config:\n{text}");
    if fortran {
        let f_runs = text.matches("as expected: f_j2 passes, f_j2_continuum fails").count();
        assert_eq!(f_runs, 2, "the Fortran program ran through CMake and through pkg-config:\n{text}");
    }
    assert!(text.ends_with("build-installed: every example built and ran as expected\n"), "{text}");
}
