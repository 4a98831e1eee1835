//! `tancheck probe` from the command line: the manifest's path unless asked otherwise, a path
//! file with `--path FILE`, `--guards` and `-q` as in `check`, and suites that cannot run
//! (no probes, `at` past the path) as errors naming the file (exit 2).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-probe-cli-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn write(dir: &Path, name: &str, body: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, body).unwrap();
    p
}

/// Built-in J2 (demo properties) along uniaxial strain in 4 increments.
const J2_MANIFEST: &str = r#"{
  "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
  "path": { "shape": "uniaxial-strain", "peak": 0.004, "steps": 4 }
}"#;

fn probe(args: &[&str], dir: &Path) -> (Option<i32>, String) {
    let o = bin().arg("probe").args(args).current_dir(dir).output().unwrap();
    (o.status.code(), text(&o))
}

#[test]
fn the_manifest_path_is_walked_unless_the_suites_is_asked_for() {
    let d = scratch("paths");
    let m = write(&d, "m.json", J2_MANIFEST);
    let m = m.to_str().unwrap();
    let (c, t) = probe(&[m], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("path (the manifest's): uniaxial-strain"), "{t}");
    assert!(t.contains("consistent at 4 increments"), "{t}");
    // The built-in suite's `at` entries past 4 increments are dropped, and said so.
    assert!(t.contains("note: probe `refinement`"), "{t}");

    let (c, t) = probe(&[m, "--suite-path"], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("path (the suite's): tension-shear"), "{t}");
    assert!(t.contains("consistent at 12 increments"), "{t}");
    // A suite file without a path under --suite-path: the message says --suite-path asked for
    // it (it told to give the manifest a path, which it had; a user-style sweep).
    let s = write(&d, "nopath.json", r#"{ "suite": "no-path", "probes": [ { "probe": "symmetry" } ] }"#);
    let (c, t) = probe(&[m, "--suite", s.to_str().unwrap(), "--suite-path"], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("nopath.json") && t.contains("--suite-path asks for the suite's own"), "{t}");

    // --thermal with a manifest path that never heats: the thermal suite's path (it walked the
    // manifest's isothermally, without a word; a user-style sweep).
    let (c, t) = probe(&[m, "--thermal"], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("path (the suite's): tension-shear"), "{t}");
    assert!(t.contains("the manifest's path never heats or cools"), "{t}");

    // A path file.
    let p = write(
        &d,
        "path.json",
        r#"{ "increments": [ {"dstrain": [1e-3, 0, 0, 0, 0, 0]}, {"dstrain": [1e-3, 0, 0, 0, 0, 2e-4]}, {"dstrain": [-1e-3, 0, 0, 0, 0, 0]} ] }"#,
    );
    let (c, t) = probe(&[m, "--path", p.to_str().unwrap()], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("path (from --path)"), "{t}");
    assert!(t.contains("consistent at 3 increments"), "{t}");
    // The same file for `check`.
    let o = bin().args(["check", m, "--path", p.to_str().unwrap()]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));

    // A broken path file: exit 2 with the file, line and column.
    let bad =
        write(&d, "bad.json", "{ \"increments\": [ {\"dstrain\": [1e-3, 0, 0, 0, 0, 0], \"dtemps\": 1} ] }");
    let (c, t) = probe(&[m, "--path", bad.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("bad.json:1:"), "{t}");
    assert!(t.contains("dtemps"), "{t}");
}

#[test]
fn quiet_prints_only_failures_and_the_verdict() {
    let d = scratch("quiet");
    let m = write(&d, "m.json", J2_MANIFEST);
    let (c, t) = probe(&[m.to_str().unwrap(), "-q"], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("verdict: PASS"), "{t}");
    assert!(!t.contains("symmetry") && !t.contains("caution"), "{t}");
    // A flawed tangent: the failed probes are listed.
    let flawed = write(&d, "f.json", &J2_MANIFEST.replace("\"j2\"", "\"j2-continuum\""));
    let (c, t) = probe(&[flawed.to_str().unwrap(), "-q"], &d);
    assert_eq!(c, Some(1), "{t}");
    assert!(t.contains("tangent") && t.contains("FAIL"), "{t}");
    assert!(!t.contains("symmetry"), "{t}");
}

#[test]
fn guards_are_set_as_in_check() {
    let d = scratch("guards");
    let lib = d.join("libmisbehave.so");
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/misbehave.c");
    let o = bin().arg("build").arg(&src).arg("-o").arg(&lib).output().unwrap();
    assert!(o.status.success(), "{}", text(&o));
    let m = write(
        &d,
        "m.json",
        &format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_props_overread", "kind": "solid-3d", "states": 0, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 3 }} }}"#,
            lib.display()
        ),
    );
    let m = m.to_str().unwrap();
    let (_, t) = probe(&[m, "-q"], &d);
    assert!(!t.contains("reads beyond"), "light guards cannot see a read: {t}");
    let (c, t) = probe(&[m, "-q", "--guards", "full"], &d);
    // A guard's finding is a routine fault, as in a check (exit 3).
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains("reads beyond its 2 properties"), "{t}");
    let (c, t) = probe(&[m, "--guards", "heavy"], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("off, light or full"), "{t}");
}

#[test]
fn a_suite_that_cannot_run_is_an_error_naming_the_file() {
    let d = scratch("suites");
    let m = write(&d, "m.json", J2_MANIFEST);
    let m = m.to_str().unwrap();
    let empty = write(
        &d,
        "empty.json",
        r#"{"suite": "e", "path": {"shape": "uniaxial-strain", "peak": 0.001, "steps": 3}, "probes": []}"#,
    );
    let (c, t) = probe(&[m, "--suite", empty.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("empty.json") && t.contains("no probes"), "{t}");
    assert!(!t.contains("PASS"), "{t}");

    // Its `at` fits its own path of 10 increments but not the manifest's 4.
    let far = write(
        &d,
        "far.json",
        r#"{"suite": "f", "path": {"shape": "uniaxial-strain", "peak": 0.004, "steps": 10},
            "probes": [{"probe": "zero-increment", "at": [9]}]}"#,
    );
    let (c, t) = probe(&[m, "--suite", far.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("far.json") && t.contains("runs at increment 9"), "{t}");
    assert!(!t.contains("PASS"), "{t}");
    // On the suite's own path it runs.
    let (c, t) = probe(&[m, "--suite", far.to_str().unwrap(), "--suite-path"], &d);
    assert_eq!(c, Some(0), "{t}");
    // A damage index past the routine's state variables (13 for J2) names the suite file.
    let index = write(
        &d,
        "index.json",
        r#"{"suite": "i", "path": {"shape": "uniaxial-strain", "peak": 0.004, "steps": 4},
            "probes": [{"probe": "irreversibility", "damage": [20]}]}"#,
    );
    let (c, t) = probe(&[m, "--suite", index.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("index.json: ") && t.contains("damage index 20 is not a state variable"), "{t}");
    // Checked against the routine before any probe runs, naming the entry.
    assert!(t.contains("probes[0] (irreversibility)"), "{t}");
    // So is a scalar state index of the frame probe.
    let scalar = write(
        &d,
        "scalar.json",
        r#"{"suite": "s", "path": {"shape": "uniaxial-strain", "peak": 0.004, "steps": 4},
            "probes": [{"probe": "frame", "scalar_states": [6, 13]}]}"#,
    );
    let (c, t) = probe(&[m, "--suite", scalar.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(
        t.contains("scalar.json: probes[0] (frame): scalar_states index 13 is not a state variable"),
        "{t}"
    );
    // So is a property index (J2 has 7 properties).
    let length = write(
        &d,
        "length.json",
        r#"{"suite": "l", "path": {"shape": "uniaxial-strain", "peak": 0.004, "steps": 4},
            "probes": [{"probe": "snap-back", "damage": [0], "length": 7}]}"#,
    );
    let (c, t) = probe(&[m, "--suite", length.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("length.json: probes[0] (snap-back): length names property 7"), "{t}");
    // A fracture energy that is not positive is refused where it is written.
    let energy = write(
        &d,
        "energy.json",
        r#"{"suite": "g", "path": {"shape": "uniaxial-strain", "peak": 0.004, "steps": 4},
            "probes": [{"probe": "regularisation", "length": 0, "fracture_energy": -1}]}"#,
    );
    let (c, t) = probe(&[m, "--suite", energy.to_str().unwrap()], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("energy.json:2:") && t.contains("fracture_energy is -1"), "{t}");
    // `at` is checked against the path walked (here the manifest's 4 increments), not the
    // suite's own (2): increment 4 runs.
    let at = write(
        &d,
        "at.json",
        r#"{"suite": "a", "path": {"shape": "uniaxial-strain", "peak": 0.004, "steps": 2},
            "probes": [{"probe": "zero-increment", "at": [4]}]}"#,
    );
    let (c, t) = probe(&[m, "--suite", at.to_str().unwrap()], &d);
    assert_eq!(c, Some(0), "{t}");
    let (c, t) = probe(&[m, "--suite", at.to_str().unwrap(), "--suite-path"], &d);
    assert_eq!(c, Some(2), "{t}");
    assert!(t.contains("at.json") && t.contains("runs at increment 4"), "{t}");
}

/// A coverage warning of the tangent probe shows without -v, as in `check` (a passing probe
/// that did not look at something says so; it was printed only with -v).
#[test]
fn coverage_warnings_show_without_verbose() {
    let d = scratch("coverage");
    let m = write(&d, "m.json", J2_MANIFEST);
    let (c, t) = probe(&[m.to_str().unwrap()], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("coverage warning: the path never unloaded"), "{t}");
}

/// The regularisation probe skips a path that brings a damaged point back to zero separation
/// without failing it: the stress is gone at the end there too, but not at the furthest point
/// (it failed such a correct law on W against the full fracture energy).
#[test]
fn a_path_back_to_zero_before_failure_is_no_failure_for_regularisation() {
    let d = scratch("regularisation-back");
    let m = write(
        &d,
        "m.json",
        r#"{ "routine": { "model": "cohesive", "kind": "cohesive-2d", "properties": [1e5, 60.0, 90.0, 0.3, 0.9, 2.0] },
  "path": { "shape": "mixed-mode", "peak": 0.003, "steps": 4, "back": 4 } }"#,
    );
    let suite = write(
        &d,
        "s.json",
        r#"{"suite": "r", "path": {"shape": "mixed-mode", "peak": 0.003, "steps": 4},
            "probes": [{"probe": "regularisation", "fracture_energy": 0.3}]}"#,
    );
    let (c, t) = probe(&[m.to_str().unwrap(), "--suite", suite.to_str().unwrap()], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(t.contains("regularisation  skipped") && t.contains("full failure"), "{t}");
}

/// A suite file without a `path` walks the manifest's (or `--path`); asked for the suite's
/// with `--suite-path`, or with no path anywhere, it is an error naming the suite file (exit
/// 2). It was refused whatever the manifest said ("missing field `path`", found by a
/// user-style sweep), though the suite's path is used only in those two cases.
#[test]
fn a_suite_without_a_path_walks_the_manifests() {
    let d = scratch("suite-no-path");
    let m = write(&d, "m.json", J2_MANIFEST);
    let s = write(&d, "s.json", r#"{ "suite": "frame only", "probes": [ { "probe": "frame" } ] }"#);
    let (code, out) = probe(&[m.to_str().unwrap(), "--suite", s.to_str().unwrap(), "-q"], &d);
    assert_eq!(code, Some(0), "{out}");
    let (code, out) = probe(&[m.to_str().unwrap(), "--suite", s.to_str().unwrap(), "--suite-path"], &d);
    assert_eq!(code, Some(2), "{out}");
    assert!(out.contains("s.json") && out.contains("has no `path`"), "{out}");
    let bare = write(
        &d,
        "bare.json",
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let (code, out) = probe(&[bare.to_str().unwrap(), "--suite", s.to_str().unwrap()], &d);
    assert_eq!(code, Some(2), "{out}");
    assert!(out.contains("has no `path`"), "{out}");
}

// A passing tangent probe whose path has an increment cleared on a closer look (the cohesive
// interface turning back at full failure: its central difference straddles the switch) quotes
// the worst error of the increments that passed as they were, and the cleared one's apart
// (it read "consistent at 6 increments (worst error 1.00e0; …)"; a user-style sweep).
#[test]
fn a_passing_tangent_probe_quotes_the_cleared_increments_apart() {
    let d = scratch("cleared");
    let step = |s: f64| format!(r#"{{"dstrain": [{s}, 0, 0, 0, 0, 0]}}"#);
    let mut incs = vec![step(5e-3); 4];
    incs.extend(vec![step(-5e-3); 2]);
    let m = write(
        &d,
        "coh.json",
        &format!(
            r#"{{ "routine": {{ "model": "cohesive", "kind": "cohesive-3d", "properties": [1e5, 60, 90, 0.3, 0.9, 2.0] }},
                 "path": {{ "increments": [{}] }} }}"#,
            incs.join(", ")
        ),
    );
    let s = write(&d, "s.json", r#"{"suite": "t", "probes": [{"probe": "tangent"}]}"#);
    let (code, t) = probe(&[m.to_str().unwrap(), "--suite", s.to_str().unwrap()], &d);
    assert_eq!(code, Some(0), "{t}");
    let line = t.lines().find(|l| l.contains("tangent ")).unwrap_or_default();
    assert!(
        line.contains("consistent at 5 increments (worst error ") && line.contains("1 more cleared"),
        "{t}"
    );
    let worst: f64 = line.split("worst error ").nth(1).unwrap().split(';').next().unwrap().parse().unwrap();
    assert!(worst < 1e-6, "{line}");
}

// A suite entry's fields that its probe does not read are said (they were taken and dropped
// without a word, and a user believed `axes` set on `newton`; a user-style sweep); the suite
// still runs as before. The built-in suites give none.
#[test]
fn fields_a_probe_does_not_read_are_warned_of() {
    let d = scratch("unread");
    let m = write(&d, "m.json", J2_MANIFEST);
    let s = write(
        &d,
        "s.json",
        r#"{ "suite": "unread", "probes": [ { "probe": "newton", "axes": [1, 2], "subdivisions": 4 },
                                            { "probe": "conventions", "at": [2] },
                                            { "probe": "symmetry", "symmetric": false, "at": [1] } ] }"#,
    );
    let (c, t) = probe(&[m.to_str().unwrap(), "--suite", s.to_str().unwrap(), "-q"], &d);
    assert_eq!(c, Some(0), "{t}");
    assert!(
        t.contains("probes[0] (newton): `subdivisions`, `axes` are not read by this probe (ignored)"),
        "{t}"
    );
    assert!(t.contains("probes[1] (conventions): `at` is not read by this probe (ignored)"), "{t}");
    assert!(!t.contains("probes[2]"), "{t}");
    for kind in [tancheck::core::PointKind::Solid3d, tancheck::core::PointKind::Cohesive3d] {
        for thermal in [false, true] {
            let suite = tancheck::cli::suite::Suite::default_for(kind, thermal);
            for p in &suite.probes {
                assert!(p.unread_fields().is_empty(), "{}: {} {:?}", suite.suite, p.probe, p.unread_fields());
            }
        }
    }
}
