//! Peak memory of a long check with a JSON report: the report keeps a fixed-size record per
//! passing increment and streams its JSON, so a 20,000-increment check of the example J2 C
//! routine with `--json FILE` stays at or under 30 MiB (issue 12; it took 222 MiB before the
//! compact report, DEVELOPERS.md "Measuring speed"). The check runs in a child process; its
//! maximum resident set size is the one wait4 returns for that child alone.

use std::path::Path;
use std::process::Command;

#[path = "../benches/common/mod.rs"]
mod common;

/// The bar of issue 12, in KiB.
const MAX_RSS_KIB: i64 = 30 * 1024;

/// Wait for the child `pid`; its exit code and its maximum resident set size in KiB (Linux
/// reports ru_maxrss in KiB).
fn wait_with_rss(pid: u32) -> (Option<i32>, i64) {
    // SAFETY: wait4 writes the status and the struct it is given; `pid` is our child, not yet
    // waited for.
    unsafe {
        let mut u: libc::rusage = std::mem::zeroed();
        let mut status = 0;
        assert_eq!(libc::wait4(pid as libc::pid_t, &mut status, 0, &mut u), pid as libc::pid_t);
        let code = libc::WIFEXITED(status).then(|| libc::WEXITSTATUS(status));
        (code, u.ru_maxrss)
    }
}

/// Check `n` increments of the cyclic path in a child process with `--json`: its exit code,
/// peak resident set size (KiB), standard output and the JSON report.
fn check_with_json(d: &Path, n: usize) -> (Option<i32>, i64, String, serde_json::Value) {
    let lib = common::routine_library(d);
    let (_, manifest) = common::manifest(d, &lib, common::J2, "light");
    let path_file = d.join(format!("cyclic-{n}.json"));
    common::write_path_file(&common::cyclic_path(n), &path_file);
    let json = d.join(format!("j2-{n}.json"));
    let out = d.join(format!("out-{n}.txt"));
    let child = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(&manifest)
        .arg("--path")
        .arg(&path_file)
        .arg("--json")
        .arg(&json)
        .stdout(std::fs::File::create(&out).unwrap())
        .spawn()
        .unwrap();
    let (code, rss) = wait_with_rss(child.id());
    std::mem::forget(child); // waited for above
    let stdout = std::fs::read_to_string(&out).unwrap();
    let report = if code == Some(0) {
        serde_json::from_reader(std::fs::File::open(&json).unwrap()).unwrap()
    } else {
        serde_json::Value::Null
    };
    (code, rss, stdout, report)
}

#[test]
fn a_20000_increment_check_with_a_json_report_stays_under_30_mib() {
    let d = std::env::temp_dir().join(format!("tancheck-memory-test-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    let (code, rss, stdout, report) = check_with_json(&d, 20_000);
    assert_eq!(code, Some(0), "{stdout}");
    assert!(rss > 0, "wait4 gave no resident set size");
    // The report is complete: a record for every increment.
    assert_eq!(report["records"].as_array().unwrap().len(), 20_000);
    assert_eq!(report["verdict"], "pass");
    // The readable report folds the passing increments: a few lines, not 20,000.
    assert!(stdout.lines().count() < 60, "{stdout}");
    // A span too wide for its column keeps a space before the verdict word.
    assert!(stdout.contains("1–20000 ok 20000 increments;"), "{stdout}");
    eprintln!("peak resident set size of the check: {rss} KiB ({:.1} MiB)", rss as f64 / 1024.0);
    // The bar is of the tool as users run it, a release build (13–16 MiB there, README
    // "Speed"). A debug build (the README's test command) keeps its unoptimised code and
    // frames resident, about twice as much, and sat at the bar's edge (29.9–30.5 MiB in runs
    // of one afternoon): there the test asserts what the bar is about, that memory does not
    // grow with the path, against a check of a tenth of it, and the absolute bar doubled.
    if cfg!(debug_assertions) {
        let (code, rss_tenth, stdout, _) = check_with_json(&d, 2_000);
        assert_eq!(code, Some(0), "{stdout}");
        eprintln!("a tenth of the path: {rss_tenth} KiB");
        assert!(
            rss - rss_tenth <= 6 * 1024,
            "18,000 more increments took {} KiB more (20,000: {rss} KiB, 2,000: {rss_tenth} KiB)",
            rss - rss_tenth
        );
        assert!(
            rss <= 2 * MAX_RSS_KIB,
            "a debug build took {rss} KiB; twice the bar is {} KiB",
            2 * MAX_RSS_KIB
        );
    } else {
        assert!(
            rss <= MAX_RSS_KIB,
            "a 20,000-increment check with --json took {rss} KiB at its peak; the bar is {MAX_RSS_KIB} KiB"
        );
    }
    let _ = std::fs::remove_dir_all(Path::new(&d));
}
