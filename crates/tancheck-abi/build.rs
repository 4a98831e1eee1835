//! Compiles the guarded trampoline (fortran-shim/src/guard.c) into this crate, and tells the
//! tests which compilers run here: `tancheck_no_fortran` (no `$FC`, default `gfortran`; never
//! set when TANCHECK_REQUIRE_FORTRAN=1, as CI sets) and `tancheck_no_cc` (no `$CC`, default
//! `cc`) and `tancheck_no_fp_traps` (the machine cannot trap floating-point exceptions), so a test that needs one is ignored with the reason instead of passing unrun.

use std::path::PathBuf;
use std::process::{Command, Stdio};

fn compiler_runs(var: &str, default: &str) -> bool {
    let line = std::env::var(var).ok().filter(|s| !s.trim().is_empty()).unwrap_or_else(|| default.into());
    let mut words = line.split_whitespace();
    let Some(program) = words.next() else { return false };
    Command::new(program)
        .args(words)
        .arg("--version")
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}

/// Whether this machine traps floating-point exceptions (glibc's feenableexcept takes the
/// invalid, division-by-zero and overflow traps): a small C program, compiled with `$CC`
/// (default `cc`) and run. The same test as tc_guard_fp_traps_available in guard.c.
fn fp_traps_run() -> bool {
    let Some(out) = std::env::var_os("OUT_DIR").map(std::path::PathBuf::from) else { return false };
    let src = out.join("fp_traps_probe.c");
    let exe = out.join("fp_traps_probe");
    let program = "#define _GNU_SOURCE\n#include <fenv.h>\nint main(void) {\n\
#if defined(__GLIBC__) && defined(FE_INVALID) && defined(FE_DIVBYZERO) && defined(FE_OVERFLOW)\n\
    int t = FE_INVALID | FE_DIVBYZERO | FE_OVERFLOW;\n\
    return (feenableexcept(t) != -1 && (fegetexcept() & t) == t) ? 0 : 1;\n\
#else\n    return 1;\n#endif\n}\n";
    if std::fs::write(&src, program).is_err() {
        return false;
    }
    let cc = std::env::var("CC").ok().filter(|s| !s.trim().is_empty()).unwrap_or_else(|| "cc".into());
    let mut words = cc.split_whitespace();
    let Some(first) = words.next() else { return false };
    let built = Command::new(first)
        .args(words)
        .arg(&src)
        .arg("-o")
        .arg(&exe)
        .arg("-lm")
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    built && Command::new(&exe).status().is_ok_and(|s| s.success())
}

fn declare_tools() {
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fortran)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_cc)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fp_traps)");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_FORTRAN");
    println!("cargo::rerun-if-env-changed=FC");
    println!("cargo::rerun-if-env-changed=CC");
    println!("cargo::rerun-if-env-changed=PATH");
    let required = std::env::var("TANCHECK_REQUIRE_FORTRAN").is_ok_and(|v| v == "1");
    if !required && !compiler_runs("FC", "gfortran") {
        println!("cargo::rustc-cfg=tancheck_no_fortran");
    }
    if !compiler_runs("CC", "cc") {
        println!("cargo::rustc-cfg=tancheck_no_cc");
    }
    if !fp_traps_run() {
        println!("cargo::rustc-cfg=tancheck_no_fp_traps");
    }
}

fn main() {
    declare_tools();
    let manifest =
        PathBuf::from(std::env::var_os("CARGO_MANIFEST_DIR").expect("cargo sets CARGO_MANIFEST_DIR"));
    let shim = manifest.join("../../fortran-shim");
    let guard = shim.join("src/guard.c");
    let include = shim.join("include");
    println!("cargo:rerun-if-changed={}", guard.display());
    println!("cargo:rerun-if-changed={}", include.join("tancheck_routine.h").display());
    cc::Build::new()
        .file(&guard)
        .include(&include)
        .warnings(true)
        .extra_warnings(true)
        .flag_if_supported("-std=gnu11")
        .compile("tancheck_guard");
    // feenableexcept and friends live in libm on glibc.
    println!("cargo:rustc-link-lib=m");
}
