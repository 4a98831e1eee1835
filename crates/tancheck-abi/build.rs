//! Compiles the guarded trampoline (fortran-shim/src/guard.c) into this crate.

use std::path::PathBuf;

fn main() {
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
