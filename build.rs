//! Tells the integration tests under tests/ which tools run on this machine, so a test that
//! needs a missing one is ignored with the reason (and counted as ignored by the test
//! summary) instead of passing without running its body:
//! - `tancheck_no_fortran`: no Fortran compiler (`$FC`, default `gfortran`), unless
//!   TANCHECK_REQUIRE_FORTRAN=1 (as CI sets), where those tests run and a missing compiler fails;
//! - `tancheck_no_gdb`: gdb is missing or may not trace a process here (ptrace refused);
//! - `tancheck_no_fp_traps`: this machine cannot trap floating-point exceptions;
//! - `tancheck_no_slurm`: no running Slurm (`sbatch --version` and `sinfo` must both work; a
//!   local one-node cluster comes from scripts/slurm/local-cluster.sh), unless
//!   TANCHECK_REQUIRE_SLURM=1 (as CI sets), where the Slurm test runs and fails without one;
//! - `tancheck_no_chromium`: no headless browser (`$TANCHECK_CHROMIUM`, default `chromium`)
//!   for the HTML report's browser test, unless TANCHECK_REQUIRE_CHROMIUM=1 (as CI sets),
//!   where that test runs and a missing browser fails it.

fn gdb_can_trace() -> bool {
    let Ok(out) = std::process::Command::new("gdb").args(["-batch", "-ex", "run", "--args", "true"]).output()
    else {
        return false;
    };
    let text = String::from_utf8_lossy(&out.stdout) + String::from_utf8_lossy(&out.stderr);
    out.status.success() && !text.contains("not permitted") && !text.contains("Operation not permitted")
}

include!("crates/tancheck-abi/build_probe.rs");

fn main() {
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fortran)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_gdb)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_fp_traps)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_chromium)");
    println!("cargo::rustc-check-cfg=cfg(tancheck_no_slurm)");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_SLURM");
    println!("cargo::rerun-if-env-changed=SLURM_CONF");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_CHROMIUM");
    println!("cargo::rerun-if-env-changed=TANCHECK_CHROMIUM");
    println!("cargo::rerun-if-env-changed=CC");
    println!("cargo::rerun-if-env-changed=TANCHECK_REQUIRE_FORTRAN");
    println!("cargo::rerun-if-env-changed=FC");
    println!("cargo::rerun-if-env-changed=PATH");
    println!("cargo::rerun-if-changed=build.rs");
    println!("cargo::rerun-if-changed=crates/tancheck-abi/build_probe.rs");
    let required = std::env::var("TANCHECK_REQUIRE_FORTRAN").is_ok_and(|v| v == "1");
    if !required && !tool_runs(&env_or("FC", "gfortran"), &["--version"]) {
        println!("cargo::rustc-cfg=tancheck_no_fortran");
    }
    if !fp_traps_run() {
        println!("cargo::rustc-cfg=tancheck_no_fp_traps");
    }
    let chromium_required = std::env::var("TANCHECK_REQUIRE_CHROMIUM").is_ok_and(|v| v == "1");
    if !chromium_required && !tool_runs(&env_or("TANCHECK_CHROMIUM", "chromium"), &["--version"]) {
        println!("cargo::rustc-cfg=tancheck_no_chromium");
    }
    let slurm_required = std::env::var("TANCHECK_REQUIRE_SLURM").is_ok_and(|v| v == "1");
    let slurm_runs = tool_runs("sbatch", &["--version"]) && tool_runs("sinfo", &["-h"]);
    if !slurm_required && !slurm_runs {
        println!("cargo::rustc-cfg=tancheck_no_slurm");
    }
    if !gdb_can_trace() {
        println!("cargo::rustc-cfg=tancheck_no_gdb");
    }
}
