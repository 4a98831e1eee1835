//! Tells the integration tests under tests/ which tools run on this machine, so a test that
//! needs a missing one is ignored with the reason (and counted as ignored by the test
//! summary) instead of passing without running its body:
//! - `tancheck_no_fortran`: no Fortran compiler (`$FC`, default `gfortran`), unless
//!   TANCHECK_REQUIRE_FORTRAN=1 (as CI sets), where those tests run and a missing compiler fails;
//! - `tancheck_no_gdb`: gdb is missing or may not trace a process here (ptrace refused);
//! - `tancheck_no_fp_traps`: this machine cannot trap floating-point exceptions.

use std::process::{Command, Stdio};

fn runs(program: &str, args: &[&str]) -> bool {
    let mut words = program.split_whitespace();
    let Some(first) = words.next() else { return false };
    Command::new(first)
        .args(words)
        .args(args)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}

fn gdb_can_trace() -> bool {
    let Ok(out) = Command::new("gdb").args(["-batch", "-ex", "run", "--args", "true"]).output() else {
        return false;
    };
    let text = String::from_utf8_lossy(&out.stdout) + String::from_utf8_lossy(&out.stderr);
    out.status.success() && !text.contains("not permitted") && !text.contains("Operation not permitted")
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

fn main() {
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fortran)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_gdb)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fp_traps)");
    println!("cargo::rerun-if-env-changed=CC");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_FORTRAN");
    println!("cargo::rerun-if-env-changed=FC");
    println!("cargo::rerun-if-env-changed=PATH");
    println!("cargo::rerun-if-changed=build.rs");
    let required = std::env::var("TANCHECK_REQUIRE_FORTRAN").is_ok_and(|v| v == "1");
    let fc = std::env::var("FC").ok().filter(|s| !s.trim().is_empty()).unwrap_or_else(|| "gfortran".into());
    if !required && !runs(&fc, &["--version"]) {
        println!("cargo::rustc-cfg=tancheck_no_fortran");
    }
    if !fp_traps_run() {
        println!("cargo::rustc-cfg=tancheck_no_fp_traps");
    }
    if !gdb_can_trace() {
        println!("cargo::rustc-cfg=tancheck_no_gdb");
    }
}
