//! A check on two threads reports what one thread reports when the memory guards find
//! something or make extra calls: each thread's routine handle keeps its own findings (a
//! finding new to a handle ends that call with a fault), so a check whose guards found
//! something is made again on one thread, and the full guards' reruns on a later thread's
//! handle are counted with the check's (`concurrent::redo_on_one_thread`,
//! `Routine::absorb_guard_extra_calls`).

use std::path::{Path, PathBuf};
use std::process::Command;

use tancheck::abi::{build_library, BuildOptions};
use tancheck_testkit::libs::scratch;

/// Correct linear elasticity; a call without TC_WANT_TANGENT writes stress[n] (past the end)
/// while strain[0] is in (1e-3, 2e-3); with `BASE_TOO`, a call with TC_WANT_TANGENT does the
/// same while strain[0] is in (4e-3, 5e-3).
const SRC: &str = r#"
#include "tancheck_cstep.h"
#include "tancheck_routine.h"
TC_ROUTINE(NAME)
{
    (void)temperature; (void)dstress_dtemp;
    const int n = call->ncomp;
    tc_real e = properties[0], nu = properties[1];
    tc_real mu = e / (2.0 * (1.0 + nu));
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    for (int k = 0; k < 36; ++k) tangent[k] = 0.0;
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) tangent[i + 6 * j] = lambda;
        tangent[i + 6 * i] = lambda + 2.0 * mu;
    }
    for (int i = 3; i < 6; ++i) tangent[i + 6 * i] = mu;
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) s += tangent[i + 6 * j] * dstrain[j];
        stress[i] = s;
    }
    double e0 = tc_re(strain[0]);
    int want = call->flags & TC_WANT_TANGENT;
    if (!BRANCHES && ((!want && e0 > 1e-3 && e0 < 2e-3) || (BASE_TOO && want && e0 > 4e-3 && e0 < 5e-3))) stress[n] = 1.0;
    energy->stored = 0.0;
    energy->dissipated = 0.0;
    report->branch = BRANCHES ? ((e0 < 3e-3 && tc_re(dstrain[0]) < 0.0) ? 1 : 0) : 0;
    report->status = TC_STATUS_OK;
}
"#;

fn lib(name: &str, base_too: bool) -> PathBuf {
    lib_with(name, base_too, false)
}

fn lib_with(name: &str, base_too: bool, branches: bool) -> PathBuf {
    let d = scratch(name);
    let src = d.join(format!("{name}.c"));
    let text = SRC
        .replace("NAME", name)
        .replace("BASE_TOO", if base_too { "1" } else { "0" })
        .replace("BRANCHES", if branches { "1" } else { "0" });
    std::fs::write(&src, text).unwrap();
    let out = d.join(format!("lib{name}.so"));
    build_library(&BuildOptions::new(vec![src], &out)).unwrap_or_else(|e| panic!("{e}"));
    out
}

fn check(lib: &Path, symbol: &str, jobs: u32) -> (Option<i32>, String, String) {
    let d = scratch(&format!("{symbol}-{jobs}"));
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "solid-3d", "states": 0, "properties": [210000, 0.3] }} }}"#,
            lib.display()
        ),
    )
    .unwrap();
    let json = d.join("r.json");
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(&m)
        .args(["--path", "tension-shear:6e-3:40:40", "--json"])
        .arg(&json)
        .args(["--jobs", &jobs.to_string()])
        .output()
        .unwrap();
    let text = format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
    (o.status.code(), std::fs::read_to_string(&json).unwrap_or_default(), text)
}

/// The finding recurs in the second share: that thread's handle sees it for the first time
/// and faults there, and its calls are missing from the finding's count.
#[test]
fn a_recurring_guard_finding_gives_the_same_report_on_two_threads() {
    let l = lib("jg_perturbed", false);
    let (c1, j1, t1) = check(&l, "jg_perturbed", 1);
    let (c2, j2, t2) = check(&l, "jg_perturbed", 2);
    assert_eq!(c1, c2);
    assert!(j1 == j2, "JSON reports differ\n--- one thread:\n{t1}\n--- two threads:\n{t2}");
}

/// The finding, first seen in a perturbed call, recurs in a base call before the second
/// share: that thread's walk faults and the two-thread report silently loses the share.
#[test]
fn a_guard_finding_in_the_walk_does_not_cut_the_report_short() {
    let l = lib("jg_walk", true);
    let (_, _, t1) = check(&l, "jg_walk", 1);
    let (_, _, t2) = check(&l, "jg_walk", 2);
    assert!(t1.contains("of 80 checks"), "{t1}");
    assert!(t2.contains("of 80 checks"), "two threads checked fewer increments:\n{t2}");
}

/// A correct routine whose branch 1 is first reached in the second share: that thread's
/// handle makes the full-guard rerun, and its extra call is missing from the report.
#[test]
fn the_guards_extra_calls_are_the_same_on_two_threads() {
    let l = lib_with("jg_branch", false, true);
    let (c1, j1, t1) = check(&l, "jg_branch", 1);
    let (c2, j2, t2) = check(&l, "jg_branch", 2);
    assert_eq!((c1, c2), (Some(0), Some(0)), "{t1}\n{t2}");
    assert!(j1 == j2, "JSON reports differ (guard extra_calls)");
}
