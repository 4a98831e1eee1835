//! Compiles the guarded trampoline (fortran-shim/src/guard.c) into this crate, and tells the
//! tests which compilers run here: `tancheck_no_fortran` (no `$FC`, default `gfortran`; never
//! set when TANCHECK_REQUIRE_FORTRAN=1, as CI sets) and `tancheck_no_cc` (no `$CC`, default
//! `cc`) and `tancheck_no_fp_traps` (the machine cannot trap floating-point exceptions), so a test that needs one is ignored with the reason instead of passing unrun.

use std::path::PathBuf;

include!("build_probe.rs");

fn declare_tools() {
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fortran)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_cc)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fp_traps)");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_FORTRAN");
    println!("cargo::rerun-if-env-changed=FC");
    println!("cargo::rerun-if-env-changed=CC");
    println!("cargo::rerun-if-env-changed=PATH");
    println!("cargo::rerun-if-changed=build_probe.rs");
    let required = std::env::var("TANCHECK_REQUIRE_FORTRAN").is_ok_and(|v| v == "1");
    if !required && !tool_runs(&env_or("FC", "gfortran"), &["--version"]) {
        println!("cargo::rustc-cfg=tancheck_no_fortran");
    }
    if !tool_runs(&env_or("CC", "cc"), &["--version"]) {
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
    println!("cargo:rerun-if-changed={}", shim.join("src/guard_block.inc").display());
    println!("cargo:rerun-if-changed={}", shim.join("src/guard_sweep.inc").display());
    println!("cargo:rerun-if-changed={}", include.join("tancheck_block.h").display());
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
