// Shared by the build scripts of the root package and of tancheck-abi (each includes this file
// with include!): which tools run here, so tests that need a missing one are ignored.

/// Whether `line` (a program and leading arguments, split at white space, as in `CC="ccache
/// gcc"`) runs with `args` and succeeds.
#[allow(dead_code)]
fn tool_runs(line: &str, args: &[&str]) -> bool {
    let mut words = line.split_whitespace();
    let Some(first) = words.next() else { return false };
    std::process::Command::new(first)
        .args(words)
        .args(args)
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}

/// The environment variable `var` when set and not blank, else `default`.
#[allow(dead_code)]
fn env_or(var: &str, default: &str) -> String {
    std::env::var(var).ok().filter(|s| !s.trim().is_empty()).unwrap_or_else(|| default.into())
}

#[allow(dead_code)]
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
    let cc = env_or("CC", "cc");
    let mut words = cc.split_whitespace();
    let Some(first) = words.next() else { return false };
    let built = std::process::Command::new(first)
        .args(words)
        .arg(&src)
        .arg("-o")
        .arg(&exe)
        .arg("-lm")
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    built && std::process::Command::new(&exe).status().is_ok_and(|s| s.success())
}
