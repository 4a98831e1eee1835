//! End-to-end tests of the `tancheck` binary: exit codes, reports, and crashing routines.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-cli-test-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

/// misbehave.c built with `tancheck build`, once.
fn misbehave() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| {
        let d = scratch("misbehave");
        let lib = d.join("libmisbehave.so");
        let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/misbehave.c");
        let o = bin().arg("build").arg(&src).arg("-o").arg(&lib).output().unwrap();
        assert!(o.status.success(), "{}", text(&o));
        lib
    })
}

fn manifest(dir: &Path, name: &str, body: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, body).unwrap();
    p
}

fn elastic_manifest(lib: &Path, symbol: &str, extra: &str) -> String {
    format!(
        r#"{{
  "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "solid-3d", "states": 0, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 4 }}{extra}
}}"#,
        lib.display()
    )
}

#[test]
fn demo_shows_correct_routines_passing_and_the_flawed_one_failing() {
    let o = bin().arg("demo").output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(0), "{t}");
    assert!(t.contains("J2 plasticity, C"), "{t}");
    assert!(t.contains("expected FAIL, got FAIL"), "{t}");
    assert!(!t.contains("NOT AS EXPECTED"), "{t}");
    // The flawed routine's wrong entries are named by component labels.
    assert!(t.contains("wrong entries (row/column)"), "{t}");
    // And the cause is named.
    assert!(t.contains("finding over the path: continuum-tangent"), "{t}");
    // The bracket ply scenario: the ply routine passes, its secant variant is found as such.
    assert!(t.contains("bracket ply: composite ply damage (Hashin modes, crack-band softening), C"), "{t}");
    assert!(
        t.contains("bracket ply: composite ply damage with the secant tangent (flawed on purpose), C"),
        "{t}"
    );
    assert!(t.contains("finding over the path: secant"), "{t}");
    assert!(t.contains("caution: A consistent tangent"), "{t}");
}

#[test]
fn a_null_dereference_is_a_crash_with_exit_3_and_the_report_is_finished() {
    let d = scratch("null");
    let json = d.join("report.json");
    let m = manifest(&d, "m.json", &elastic_manifest(misbehave(), "bad_null_deref", ""));
    let o = bin().arg("check").arg(&m).arg("--json").arg(&json).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(3), "{t}");
    assert!(t.contains("SIGSEGV"), "{t}");
    assert!(t.contains("inputs of that call (increment 2)"), "{t}");
    assert!(t.contains("verdict: FAULT"), "{t}");
    let r: serde_json::Value = serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    assert_eq!(r["verdict"], "routine-fault");
    // The compact report: full detail for the faulted increment, a record for each.
    let faulted = r["increments"].as_array().unwrap().iter().find(|i| i["fault"].is_object()).unwrap();
    assert_eq!(faulted["index"], 2);
    assert_eq!(faulted["fault"]["signal"], 11);
    // Increment 1 was checked normally before the crash.
    assert_eq!(r["records"][0]["index"], 1);
    assert_eq!(r["records"][0]["pass"], true);
}

#[test]
fn division_by_zero_with_traps_on_is_a_crash() {
    let d = scratch("fpe");
    let m = manifest(
        &d,
        "m.json",
        &elastic_manifest(misbehave(), "bad_divide_by_zero", ",\n  \"fp_traps\": true"),
    );
    let o = bin().arg("check").arg(&m).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(3), "{t}");
    assert!(t.contains("SIGFPE"), "{t}");
    assert!(t.contains("division by zero"), "{t}");
    // Without traps the same routine returns an infinite stress: no crash, and the check
    // of that increment fails instead.
    let m = manifest(&d, "m2.json", &elastic_manifest(misbehave(), "bad_divide_by_zero", ""));
    let o = bin().arg("check").arg(&m).output().unwrap();
    assert_ne!(o.status.code(), Some(3), "{}", text(&o));
    assert_ne!(o.status.code(), Some(0), "{}", text(&o));
}

#[test]
fn bad_input_exits_2_with_file_line_and_column() {
    let d = scratch("bad");
    let m = manifest(
        &d,
        "m.json",
        "{\n  \"routine\": { \"model\": \"j2\", \"kind\": \"solid-3d\", \"propertys\": [] }\n}\n",
    );
    let o = bin().arg("check").arg(&m).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(t.contains("m.json:2:"), "{t}");
    assert!(t.contains("propertys"), "{t}");
    let o = bin().arg("check").arg(d.join("missing.json")).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    let o = bin().arg("check").output().unwrap();
    assert_eq!(o.status.code(), Some(2), "usage error");
}

// A value of the wrong type is told in JSON's words, never in the program's own type names
// (it said "expected struct PathIncrement", "invalid type: map, expected a sequence", and for
// a number where a name belongs only "expected value").
#[test]
fn a_value_of_the_wrong_type_is_told_in_json_words() {
    let d = scratch("types");
    for (body, said) in [
        (r#""kind": 5, "properties": [200000, 0.3] }"#, "expected a name (a string"),
        (
            r#""kind": "solid-3d", "properties": [200000, 0.3] }, "path": { "increments": [5] }"#,
            "integer `5`, expected an object",
        ),
        (
            r#""kind": "solid-3d", "properties": [200000, 0.3] }, "path": { "increments": {"a": 1} }"#,
            "invalid type: an object, expected an array",
        ),
        (r#""kind": "solid-3d", "properties": [200000, 0.3] }, "guards": 3"#, "expected a name (a string"),
    ] {
        let m = manifest(&d, "m.json", &format!("{{ \"routine\": {{ \"model\": \"elastic\", {body} }}\n"));
        let o = bin().arg("check").arg(&m).output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{t}");
        assert!(t.contains("m.json:1:") && t.contains(said), "{body}: {t}");
        assert!(!t.contains("struct") && !t.contains("map") && !t.contains("sequence"), "{t}");
    }
}

// A plane-stress user writes the three components the routine takes; the path's dstrain has
// the six tensor components for every kind, and the error says so (it said "invalid length 3,
// expected an array of length 6", naming neither the field nor the order).
#[test]
fn a_short_dstrain_says_the_path_takes_six_components() {
    let d = scratch("dstrain3");
    let m = manifest(
        &d,
        "m.json",
        "{ \"routine\": { \"model\": \"elastic\", \"kind\": \"plane-stress\", \"properties\": [200000, 0.3] },\n  \"path\": { \"increments\": [ {\"dstrain\": [1e-3, 0, 0]} ] } }\n",
    );
    let o = bin().arg("check").arg(&m).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(t.contains("m.json:2:"), "{t}");
    assert!(
        t.contains("dstrain has 3 entries") && t.contains("6 tensor components 11 22 33 23 13 12"),
        "{t}"
    );
    // So does a hold_stress of another length: seven read "trailing characters" (a user-style
    // sweep).
    let m = manifest(
        &d,
        "h.json",
        "{ \"routine\": { \"model\": \"elastic\", \"kind\": \"solid-3d\", \"properties\": [200000, 0.3] },\n  \"path\": { \"increments\": [ {\"dstrain\": [1e-3, 0, 0, 0, 0, 0], \"hold_stress\": [null, 0, 0, 0, 0, 0, 0]} ] } }\n",
    );
    let o = bin().arg("check").arg(&m).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(t.contains("h.json:2:") && t.contains("hold_stress has 7 entries"), "{t}");
}

#[test]
fn a_misspelt_symbol_lists_the_near_names() {
    let d = scratch("sym");
    let m = manifest(&d, "m.json", &elastic_manifest(misbehave(), "bad_null_derf", ""));
    let o = bin().arg("check").arg(&m).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(t.contains("bad_null_deref"), "{t}");
}

#[test]
fn json_on_stdout_has_the_verdict_and_the_continuum_tangent_fails_with_exit_1() {
    let d = scratch("json");
    let m = manifest(
        &d,
        "m.json",
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let o = bin().arg("check").arg(&m).arg("--json").arg("-").output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let r: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["verdict"], "tangent-failure");
    assert!(r["cautions"][0].as_str().unwrap().contains("does not validate the material model"));
    let m = manifest(
        &d,
        "ok.json",
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let o = bin()
        .arg("check")
        .arg(&m)
        .arg("--scheme")
        .arg("forward")
        .arg("--scheme")
        .arg("complex-step")
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
}

/// The selftest's output, run once for the tests that read it.
fn selftest_output() -> &'static str {
    static OUT: std::sync::OnceLock<String> = std::sync::OnceLock::new();
    OUT.get_or_init(|| {
        let o = bin().arg("selftest").output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(0), "{t}");
        t
    })
}

#[test]
fn selftest_gets_every_zoo_row_right() {
    let t = selftest_output();
    assert!(!t.contains(" NO"), "{t}");
    // Flawed rows are flagged with their cause, and the kinked correct routine passes.
    assert!(
        t.lines()
            .any(|l| l.starts_with("j2-continuum ") && l.contains("continuum-tangent") && l.ends_with("yes")),
        "{t}"
    );
    assert!(t.lines().any(|l| l.starts_with("bimodulus ") && l.contains("PASS")), "{t}");
    // Conventions rows: a correct anisotropic routine is not failed by the frame probe; a
    // wrong declared order or shear measure is named (by the check and by the probe).
    conventions_rows_are_right(t, &["Rust", "C"]);
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn selftest_gets_the_fortran_rows_right() {
    let t = selftest_output();
    assert!(t.contains("Fortran"), "{t}");
    assert!(!t.contains("SKIPPED the Fortran rows"), "{t}");
    conventions_rows_are_right(t, &["Fortran"]);
}

fn conventions_rows_are_right(t: &str, languages: &[&str]) {
    for lang in languages {
        let row = |variant: &str, found: &str| {
            t.lines().any(|l| {
                l.starts_with(variant)
                    && l.contains(&format!(" {lang} "))
                    && l.contains(found)
                    && l.ends_with("yes")
            })
        };
        assert!(
            row("orthotropic, frame probe", "frame skipped") || row("orthotropic, frame probe", "frame pass"),
            "{t}"
        );
        assert!(row("elastic, wrong order", "mismatch named"), "{lang}: {t}");
        assert!(row("elastic, wrong shear", "mismatch named"), "{lang}: {t}");
        // Ply rows (selftest/ply.rs): correct passes, each flawed tangent with its finding.
        for kind in ["3d", "ps"] {
            assert!(row(&format!("ply ({kind})"), "none"), "{lang}: {t}");
            assert!(row(&format!("ply, viscous ({kind})"), "none"), "{lang}: {t}");
            assert!(row(&format!("ply-secant ({kind})"), "secant"), "{lang}: {t}");
            assert!(row(&format!("ply-no-coupling ({kind})"), "one-row"), "{lang}: {t}");
            assert!(row(&format!("ply-viscous-no-factor ({kind})"), "term-scaled"), "{lang}: {t}");
            assert!(row(&format!("ply, irreversibility ({kind})"), "irreversibility pass"), "{lang}: {t}");
            assert!(row(&format!("ply-healing ({kind})"), "irreversibility FAIL"), "{lang}: {t}");
            assert!(row(&format!("ply, regularisation ({kind})"), "regularisation pass"), "{lang}: {t}");
            assert!(row(&format!("ply, softening ({kind})"), "softening pass"), "{lang}: {t}");
            assert!(row(&format!("ply-healing ({kind})"), "softening FAIL"), "{lang}: {t}");
            assert!(row(&format!("ply, viscous limit ({kind})"), "viscous-limit pass"), "{lang}: {t}");
            let no_factor = format!("ply-viscous-no-factor ({kind})");
            assert!(row(&no_factor, "viscous-limit FAIL"), "{lang}: {t}");
            assert!(row(&format!("ply, snap-back ({kind})"), "snap-back pass"), "{lang}: {t}");
            assert!(row(&format!("ply-length-dropped ({kind})"), "regularisation FAIL"), "{lang}: {t}");
        }
    }
}

#[test]
fn killing_tancheck_never_leaves_a_partial_report() {
    let d = scratch("kill");
    let m = manifest(
        &d,
        "m.json",
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let json = d.join("report.json");
    let run = || {
        bin()
            .arg("check")
            .arg(&m)
            .args(["--path", "tension-shear:0.004:200:200", "-q", "--json"])
            .arg(&json)
            .stdout(std::process::Stdio::null())
            .spawn()
            .unwrap()
    };
    // How long a whole run takes, to spread the kills over it.
    let t0 = std::time::Instant::now();
    assert!(run().wait().unwrap().code().is_some());
    let full = t0.elapsed();
    assert!(json.exists());
    let (mut complete, mut marked) = (0, 0);
    for k in 0..24 {
        let _ = std::fs::remove_file(&json);
        let mut child = run();
        let pid = child.id();
        std::thread::sleep(full.mul_f64(k as f64 / 20.0));
        // Odd runs are stopped with SIGTERM (which removes the temporary file), even ones
        // killed with SIGKILL (which nothing can handle: no partial report all the same).
        let term = k % 2 == 1;
        if term {
            let _ = Command::new("kill").arg("-TERM").arg(pid.to_string()).status();
        } else {
            let _ = child.kill();
        }
        let _ = child.wait();
        if let Ok(bytes) = std::fs::read(&json) {
            let v: serde_json::Value = serde_json::from_slice(&bytes)
                .unwrap_or_else(|e| panic!("kill {k}: a partial report was left: {e}"));
            // Either the finished report, or the marker that the run did not finish.
            if v["verdict"] == "incomplete" {
                marked += 1;
            } else {
                assert!(v["verdict"].is_string());
                complete += 1;
            }
        }
        // After SIGTERM no temporary file of that run is left beside the report.
        let tmp = d.join(format!(".report.json.tmp-{pid}"));
        assert!(!term || !tmp.exists(), "kill {k}: {} is left", tmp.display());
    }
    // The early kills left the marker (or nothing, when they came before it).
    assert!(complete < 24 && marked > 0, "{complete} complete, {marked} marked of 24 runs");
}

#[test]
fn a_run_replaces_an_earlier_report_at_once() {
    let d = scratch("stale");
    let json = d.join("report.json");
    let yesterday = r#"{ "verdict": "pass", "from": "yesterday" }"#;
    std::fs::write(&json, yesterday).unwrap();
    // A run under way holds the marker in place of the earlier report (a check of 8,000
    // increments keeps it under way long enough to be seen; its report then replaces it).
    let sleepy = manifest(
        &d,
        "sleepy.json",
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let mut child = bin()
        .arg("check")
        .arg(&sleepy)
        .args(["--path", "tension-shear:4e-3:4000:4000", "-q", "--json"])
        .arg(&json)
        .stdout(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let mut seen = false;
    for _ in 0..200 {
        let v: serde_json::Value =
            serde_json::from_slice(&std::fs::read(&json).unwrap_or_default()).unwrap_or_default();
        if v["verdict"] == "incomplete" {
            seen = true;
            break;
        }
        if v["verdict"] == "pass" && v["from"].is_null() {
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    let _ = child.wait();
    assert!(seen, "the marker was never seen in place of yesterday's report");
    // A run that fails on bad input loses nothing: the earlier report is put back.
    std::fs::write(&json, yesterday).unwrap();
    let m =
        manifest(&d, "m.json", r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [1] } }"#);
    let o = bin().arg("check").arg(&m).arg("--json").arg(&json).output().unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert_eq!(std::fs::read_to_string(&json).unwrap(), yesterday);
}

#[test]
fn time_limits_and_numbers_out_of_range_are_bad_input() {
    let d = scratch("bounds");
    let ok = manifest(
        &d,
        "ok.json",
        r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
    );
    for (flag, value) in [
        ("--call-timeout", "1e30"),
        ("--call-timeout", "0"),
        ("--call-timeout", "-1"),
        ("--call-timeout", "inf"),
        ("--suite-timeout", "NaN"),
        ("--suite-timeout", "-1"),
        ("--suite-timeout", "86401"),
    ] {
        let o = bin().arg("check").arg(&ok).arg(format!("{flag}={value}")).output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{flag} {value}: {t}");
        assert!(t.contains(flag) && t.contains("at most 86400"), "{flag} {value}: {t}");
    }
    // Numbers in a manifest: exit 2 with the file and the field.
    for (body, field) in [
        (
            r#"{ "routine": { "library": "x.so", "symbol": "x", "kind": "solid-3d", "states": 2000000000, "properties": [1] } }"#,
            "routine.states",
        ),
        (
            r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] }, "path": { "increments": [ { "dstrain": [1e308, 0, 0, 0, 0, 0] } ] } }"#,
            "path.increments",
        ),
        (
            r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] }, "path": { "shape": "shear-12", "peak": 1e308, "steps": 2 } }"#,
            "path.peak",
        ),
        (r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [1, 2] } }"#, "properties"),
        // A component both prescribed and held: the strain increment was dropped in silence.
        (
            r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] }, "path": { "increments": [ { "dstrain": [1e-3, 5e-4, 0, 0, 0, 0], "hold_stress": [null, 0, 0, 0, 0, 0] } ] } }"#,
            "component 22 has a strain increment (0.0005) and a held stress (0)",
        ),
    ] {
        let m = manifest(&d, "m.json", body);
        let o = bin().arg("check").arg(&m).output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{field}: {t}");
        assert!(t.contains("m.json") && t.contains(field), "{field}: {t}");
    }
    // A suite with 2e9 subdivisions is refused at once (it used to run for minutes).
    let s = manifest(
        &d,
        "s.json",
        r#"{ "suite": "s", "path": {"shape": "tension-shear", "peak": 0.004, "steps": 4},
  "probes": [ {"probe": "refinement", "subdivisions": 2000000000} ] }"#,
    );
    let o = bin().arg("probe").arg(&ok).arg("--suite").arg(&s).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(t.contains("s.json:2:") && t.contains("subdivisions"), "{t}");
    // A --cases folder that does not exist is an error, not a warning.
    let o = bin().arg("check").arg(&ok).arg("--cases").arg(d.join("no-such-folder")).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(t.contains("no-such-folder"), "{t}");
}

#[test]
fn bisect_writes_cases_that_check_replays_first_as_a_regression_suite() {
    let d = scratch("cases");
    let flawed = manifest(
        &d,
        "flawed.json",
        r#"{ "routine": { "model": "j2-elastic-first-plastic", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let cases = d.join("cases");
    let o = bin().arg("bisect").arg(&flawed).arg("--case-dir").arg(&cases).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let written: Vec<_> = std::fs::read_dir(&cases).unwrap().collect();
    assert!(!written.is_empty());
    // A broken case file among them is a warning with its file name, not a crash.
    std::fs::write(cases.join("broken.json"), "{ \"format\": 1, \"routine\": [").unwrap();
    let ok = manifest(
        &d,
        "ok.json",
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    // The cases are another routine's: set aside unless asked for.
    let o = bin().arg("check").arg(&ok).arg("--cases").arg(&cases).output().unwrap();
    let t = text(&o);
    assert!(t.contains("of other routines"), "{t}");
    assert_eq!(o.status.code(), Some(0), "{t}");
    let o = bin().arg("check").arg(&ok).arg("--cases").arg(&cases).arg("--all-cases").output().unwrap();
    let t = text(&o);
    assert!(t.contains("== cases in"), "{t}");
    assert!(t.contains("broken.json"), "{t}");
    // The cases still fail (the flaw is not fixed), so the run fails although the path passes,
    // and every report says so: the verdict line, the JSON and the JUnit (they said PASS, with
    // exit 1; found by a user-style sweep).
    assert!(t.contains("verdict: FAIL") && t.contains("regression cases still fail"), "{t}");
    assert!(t.contains("the path's increments passed"), "{t}");
    assert_eq!(o.status.code(), Some(1), "{t}");
    let (json, xml, html) = (d.join("cases.json"), d.join("cases.xml"), d.join("cases.html"));
    let o = bin()
        .arg("check")
        .arg(&ok)
        .arg("--cases")
        .arg(&cases)
        .arg("--all-cases")
        .arg("--json")
        .arg(&json)
        .arg("--junit")
        .arg(&xml)
        .arg("--html")
        .arg(&html)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains("regression cases") && page.contains("still fail"), "{page}");
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["verdict"], "tangent-failure", "{v}");
    assert_ne!(v["finding"], "none", "{v}");
    assert!(!v["cases"]["failed"].as_array().unwrap().is_empty(), "{v}");
    let x = std::fs::read_to_string(&xml).unwrap();
    assert!(x.contains("regression case") && !x.contains("failures=\"0\""), "{x}");
    // A bad option stops the run before the cases are replayed (they used to run first, and
    // the error came after their whole output).
    for bad in
        [["--tol", "central=-1"], ["--step", "central=2"], ["--guards", "loose"], ["--path", "none.json"]]
    {
        let o = bin()
            .arg("check")
            .arg(&ok)
            .arg("--cases")
            .arg(&cases)
            .arg("--all-cases")
            .args(bad)
            .output()
            .unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{bad:?}: {t}");
        assert!(!t.contains("== cases in"), "{bad:?}: the cases ran before the option was read:\n{t}");
    }
}

#[test]
fn models_lists_every_built_in_model_with_its_properties() {
    let o = bin().arg("models").output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(0), "{t}");
    for name in ["j2 ", "elastic ", "thermo ", "cohesive ", "orthotropic ", "bimodulus "] {
        assert!(t.lines().any(|l| l.starts_with(name)), "{name} missing:\n{t}");
    }
    assert!(t.contains("properties: K, N, S, G_Ic, G_IIc, eta"), "{t}");
}

#[test]
fn a_closed_pipe_ends_quietly_with_the_verdicts_code_and_the_report_written() {
    let d = scratch("pipe");
    let m = manifest(
        &d,
        "m.json",
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    );
    let json = d.join("r.json");
    let mut child = bin()
        .arg("check")
        .arg(&m)
        .arg("--json")
        .arg(&json)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // The reader goes away before tancheck prints anything (as `| head -0` would).
    drop(child.stdout.take());
    let out = child.wait_with_output().unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "the flawed tangent's verdict, not a pipe error: {err}");
    assert!(!err.contains("Broken pipe") && !err.contains("panicked"), "{err}");
    let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    assert_eq!(v["verdict"], "tangent-failure");
}
