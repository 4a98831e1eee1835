//! Tells the install test (tests/install.rs) whether cmake and pkg-config run here: without
//! them it is ignored ("needs cmake and pkg-config"), unless TANCHECK_REQUIRE_FORTRAN=1 (as
//! CI sets), where it runs and a missing tool is a failure. Likewise `tancheck_no_fortran` (no
//! `$FC`, default `gfortran`) for the Fortran tests and `tancheck_no_pkg_config` for the
//! pkg-config test.

fn runs(program: &str) -> bool {
    let mut words = program.split_whitespace();
    let Some(first) = words.next() else { return false };
    std::process::Command::new(first)
        .args(words)
        .arg("--version")
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}

fn main() {
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_cmake)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fortran)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_pkg_config)");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_FORTRAN");
    println!("cargo::rerun-if-env-changed=FC");
    println!("cargo::rerun-if-env-changed=PATH");
    println!("cargo::rerun-if-changed=build.rs");
    let required = std::env::var("TANCHECK_REQUIRE_FORTRAN").is_ok_and(|v| v == "1");
    let tools = runs("cmake") && runs("pkg-config");
    if !required && !tools {
        println!("cargo::rustc-cfg=tancheck_no_cmake");
    }
    let fc = std::env::var("FC").ok().filter(|s| !s.trim().is_empty()).unwrap_or_else(|| "gfortran".into());
    if !required && !runs(&fc) {
        println!("cargo::rustc-cfg=tancheck_no_fortran");
    }
    if !required && !runs("pkg-config") {
        println!("cargo::rustc-cfg=tancheck_no_pkg_config");
    }
}
