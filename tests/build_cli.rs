//! `tancheck build` shows what the compilers say: warnings on success, the compiler's own
//! words on failure (exit 2), and passes extra flags per language.

use std::path::PathBuf;
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn out(o: &Output) -> (String, String) {
    (String::from_utf8_lossy(&o.stdout).into_owned(), String::from_utf8_lossy(&o.stderr).into_owned())
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-build-cli-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// A C routine with an unused static helper (a -Wall warning) that needs TC_NEEDS_FLAG
/// defined to compile; the error text is ours, so the test can find the compiler's words.
const C_SOURCE: &str = r#"#include "tancheck_routine.h"
#ifndef TC_NEEDS_FLAG
#error "define TC_NEEDS_FLAG to build this routine"
#endif
static int helper_nobody_calls(void) { return 3; }
TC_ROUTINE(flagged)
{
    int n = call->ncomp;
    for (int i = 0; i < n; ++i) {
        stress[i] = stress0[i] + 100.0 * dstrain[i];
        for (int j = 0; j < n; ++j) tangent[i + j * n] = i == j ? 100.0 : 0.0;
    }
    (void)properties; (void)strain; (void)temperature; (void)state0; (void)state; (void)dstress_dtemp;
    (void)energy; (void)report;
}
"#;

#[test]
fn a_compiler_error_fails_with_the_compilers_words_and_extra_c_flags_reach_the_compiler() {
    let d = scratch("c");
    let src = d.join("flagged.c");
    std::fs::write(&src, C_SOURCE).unwrap();
    let lib = d.join("libflagged.so");

    let o = bin().arg("build").arg(&src).arg("-o").arg(&lib).output().unwrap();
    let (_, err) = out(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("define TC_NEEDS_FLAG to build this routine"), "{err}");
    assert!(err.contains("flagged.c"), "{err}");
    assert!(!lib.exists());

    // The flag defined: it builds; without -Wall the unused helper is not a warning.
    let o = bin()
        .arg("build")
        .arg(&src)
        .arg("-o")
        .arg(&lib)
        .args(["--cflags", "-DTC_NEEDS_FLAG"])
        .output()
        .unwrap();
    let (so, se) = out(&o);
    assert_eq!(o.status.code(), Some(0), "{so}{se}");
    assert!(!se.contains("helper_nobody_calls"), "{se}");
    assert!(so.contains("built ") && !so.contains("warnings"), "{so}");

    // Two --cflags, one holding two flags: -Wall shows the warning, on standard error, for
    // the real routine and for its twin.
    let o = bin()
        .arg("build")
        .arg(&src)
        .arg("-o")
        .arg(&lib)
        .args(["--cflags", "-DTC_NEEDS_FLAG -Wall", "--cflags=-Wextra", "-v"])
        .output()
        .unwrap();
    let (so, se) = out(&o);
    assert_eq!(o.status.code(), Some(0), "{so}{se}");
    assert!(se.contains("helper_nobody_calls"), "{se}");
    assert!(se.contains("the compiler said, compiling"), "{se}");
    assert_eq!(
        se.matches("defined but not used").count(),
        1,
        "the twin's identical warning is not repeated:\n{se}"
    );
    assert!(se.contains("the compiler said the same, compiling") && se.contains("complex-step twin"), "{se}");
    assert!(so.contains("2 compiler commands printed warnings"), "{so}");
    // The flags come after tancheck's own, on every C compilation.
    let c_lines: Vec<&str> = so.lines().filter(|l| l.contains(" -c ") && l.contains("flagged.c")).collect();
    assert_eq!(c_lines.len(), 2, "{so}");
    for l in c_lines {
        assert!(l.find("-O2").unwrap() < l.find("-DTC_NEEDS_FLAG").unwrap(), "{l}");
        assert!(l.contains("-Wall") && l.contains("-Wextra"), "{l}");
    }
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn extra_fortran_flags_reach_every_fortran_compilation() {
    let d = scratch("f");
    let src = d.join("elastic.F90");
    std::fs::copy(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/fortran/elastic.F90"),
        &src,
    )
    .unwrap();
    let lib = d.join("libel.so");
    // A flag gfortran refuses shows that the flags reach it, and the failure has its words.
    let o = bin()
        .arg("build")
        .arg(&src)
        .arg("-o")
        .arg(&lib)
        .args(["--fflags", "-fno-such-flag-here"])
        .output()
        .unwrap();
    let (so, se) = out(&o);
    assert_eq!(o.status.code(), Some(2), "{so}{se}");
    assert!(se.contains("-fno-such-flag-here"), "{se}");
    assert!(se.contains("compiling the module `tancheck_routine.f90`"), "{se}");
    // A warning flag: it builds, and the verbose commands carry it on every Fortran compilation.
    let o = bin()
        .arg("build")
        .arg(&src)
        .arg("-o")
        .arg(&lib)
        .args(["--fflags", "-Wall -Wextra", "-v"])
        .output()
        .unwrap();
    let (so, se) = out(&o);
    assert_eq!(o.status.code(), Some(0), "{so}{se}");
    let f_lines: Vec<&str> = so.lines().filter(|l| l.contains(" -c ")).collect();
    assert_eq!(f_lines.len(), 4, "two modules, the routine and its twin:\n{so}");
    assert!(f_lines.iter().all(|l| l.contains("-Wall -Wextra")), "{so}");
}
