//! `tancheck explore`: from a fixed seed and without a hand-written path, it finds the J2
//! routine whose tangent has the wrong plastic sign after a load reversal (zoo row
//! `j2-reversal`, Rust model and C routine `c_j2_reversal`), shrinks the failure to a short
//! path that reverses, and writes a case that `tancheck replay` reproduces; on the correct J2
//! routine it reaches the elastic and the plastic branch and finds nothing within its budget;
//! the same seed gives the same report; bad `explore` sections are exit 2 naming the file.
//!
//! The budgets are stated in each test (paths checked); each test runs in a few seconds in a
//! debug build.

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use tancheck::models::zoo::C_SOURCES;
use tancheck_testkit::libs::{build_once, output_text as text, scratch};

/// The J2 properties of the zoo: E, ν, σy0, H_iso, Q, b, H_kin.
const J2_PROPS: &str = "[210000, 0.3, 355, 1200, 150, 12, 2500]";

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn c_library() -> &'static Path {
    build_once("zoo-c", &C_SOURCES)
}

/// A manifest with `routine` (JSON) and an optional `explore` section; no path.
fn manifest(dir: &Path, name: &str, routine: &str, explore: Option<&str>) -> PathBuf {
    let m = dir.join(format!("{name}.json"));
    let ex = explore.map(|e| format!(",\n  \"explore\": {e}")).unwrap_or_default();
    std::fs::write(&m, format!("{{ \"routine\": {routine}{ex} }}\n")).unwrap();
    m
}

fn model(name: &str) -> String {
    format!(r#"{{ "model": "{name}", "kind": "solid-3d", "properties": {J2_PROPS} }}"#)
}

fn library(symbol: &str, states: usize) -> String {
    format!(
        r#"{{ "library": "{}", "symbol": "{symbol}", "kind": "solid-3d", "states": {states}, "properties": {J2_PROPS} }}"#,
        c_library().display()
    )
}

/// Run `tancheck explore` with `--json -`: exit code and report.
fn explore(m: &Path, args: &[&str]) -> (i32, Value) {
    let o = bin().arg("explore").arg(m).args(["--json", "-"]).args(args).output().unwrap();
    let v: Value = serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", text(&o)));
    let code = o.status.code().unwrap();
    // The report says the exit code the run ended with.
    assert_eq!(v["exit_code"].as_i64(), Some(code as i64), "{}", text(&o));
    (code, v)
}

/// The branches reached by any signature.
fn branches_reached(v: &Value) -> Vec<i64> {
    let mut b: Vec<i64> =
        v["reached"].as_array().unwrap().iter().filter_map(|r| r["signature"]["branch"].as_i64()).collect();
    b.sort_unstable();
    b.dedup();
    b
}

/// Numbers of a case or replay report, from their bits.
fn bits(v: &Value) -> Vec<f64> {
    v["bits"]
        .as_array()
        .unwrap_or_else(|| panic!("no bits: {v:#}"))
        .iter()
        .map(|b| f64::from_bits(u64::from_str_radix(b.as_str().unwrap(), 16).unwrap()))
        .collect()
}

/// The reversal flaw found from seed 7 within 40 paths, shrunk to a short path, written as a
/// case that replays to the same failure at a call that reverses the plastic flow.
fn finds_the_reversal(routine: &str, dir: &Path) {
    let m = manifest(dir, "rev", routine, None);
    let (code, v) = explore(&m, &["--seed", "7", "--paths", "40"]);
    assert_eq!(code, 1, "{v:#}");
    assert_eq!(v["kind"], "explore");
    assert_eq!(v["seed"], 7);
    assert_eq!(v["verdict"], "tangent-failure");
    let findings = v["findings"].as_array().unwrap();
    let f = findings
        .iter()
        .find(|f| f["finding"] == "term-sign")
        .unwrap_or_else(|| panic!("no term-sign finding: {:#}", v["findings"]));
    // Shrunk: a few increments, and among them a reversal (two increments that oppose).
    let s = &f["shrunk"];
    let incs = s["path"]["increments"].as_array().unwrap();
    assert!(incs.len() <= 4, "shrunk to {} increments: {:#}", incs.len(), s["path"]);
    assert!(incs.len() < f["path"]["increments"].as_array().unwrap().len() || incs.len() <= 3);
    assert_eq!(s["located"]["increment"], incs.len(), "{s:#}");
    assert_eq!(s["located"]["finding"], "term-sign");
    // The case replays the failure: the same outputs bit for bit, the same finding.
    let case = f["case"].as_str().unwrap_or_else(|| panic!("no case written: {f:#}"));
    assert!(case.contains("tancheck-cases"), "{case}");
    let o = bin().arg("replay").arg(case).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let r: Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["identical"], true, "{r:#}");
    assert_eq!(r["recorded_finding"], "term-sign");
    assert_eq!(r["finding"], "term-sign");
    assert_eq!(r["path_leads_here"], "yes", "{r:#}");
    // The failing call reverses the plastic flow, the flaw's definition: the routine keeps the
    // last flow direction n_last in state 13–18 (tensor components, routine order); the call's
    // new direction n (its output there) has n : n_last < 0 (shear entries counted twice).
    let c: Value = serde_json::from_str(&std::fs::read_to_string(case).unwrap()).unwrap();
    let (last, now) = (bits(&c["call"]["state0"]), bits(&r["state"]));
    let contraction: f64 = (13..19).map(|i| last[i] * now[i] * if i >= 16 { 2.0 } else { 1.0 }).sum();
    assert!(contraction < 0.0, "n : n_last = {contraction}: the failing call does not reverse the flow");
    // It is not found on the elastic branch or on the first loading.
    assert_eq!(f["branch"], "#1 (state changed)");
    eprintln!(
        "{}: {} paths, {} calls; term-sign first at path {}, shrunk to {} increments",
        v["routine"]["name"],
        v["paths"],
        v["calls"]["real"],
        f["first_path"],
        incs.len()
    );
}

#[test]
fn finds_and_shrinks_the_reversal_flaw_rust() {
    finds_the_reversal(&model("j2-reversal"), &scratch("rev-rust"));
}

#[test]
fn finds_and_shrinks_the_reversal_flaw_c() {
    finds_the_reversal(&library("c_j2_reversal", 19), &scratch("rev-c"));
}

/// The correct routine: the elastic and the plastic branch reached, every state variable
/// changed somewhere, no failure within 60 paths.
fn correct_j2(routine: &str, explore_section: Option<&str>, dir: &Path) -> Value {
    let m = manifest(dir, "j2", routine, explore_section);
    let (code, v) = explore(&m, &["--seed", "11", "--paths", "60"]);
    assert_eq!(code, 0, "{v:#}");
    assert_eq!(v["verdict"], "pass");
    assert!(v["findings"].as_array().unwrap().is_empty(), "{:#}", v["findings"]);
    assert_eq!(v["paths"], 60);
    assert_eq!(v["stopped_by"], "paths");
    let b = branches_reached(&v);
    assert!(b.contains(&0) && b.contains(&1), "branches reached: {b:?}");
    assert!(v["never"]["state"].as_array().unwrap().is_empty(), "{:#}", v["never"]);
    // Each signature names the first path reaching it, that path ending where it did.
    for r in v["reached"].as_array().unwrap() {
        assert_eq!(
            r["path"]["increments"].as_array().unwrap().len() as u64,
            r["first_increment"].as_u64().unwrap()
        );
        assert!(r["increments"].as_u64().unwrap() >= r["paths"].as_u64().unwrap());
    }
    // The elastic range is measured from the response. Along a direction d of tensor strain
    // from the virgin state J2 yields at s = √(2/3) σy0 / (2μ ‖dev d‖) (Simo & Hughes 1998,
    // Box 3.2: the trial stress of a linear-elastic step); of the probe directions (each
    // component alone, and all six at once) the smallest limit is that of all six at once,
    // ‖dev d‖ = √6 (its normal part is volumetric, three shear pairs of 1).
    let mu = 210000.0 / (2.0 * 1.3);
    let expected = (2.0f64 / 3.0).sqrt() * 355.0 / (2.0 * mu * 6.0f64.sqrt());
    let got = v["scale"]["strain"].as_f64().unwrap();
    assert!(v["scale"]["measured"] == true);
    assert!(got <= expected && got > 0.98 * expected, "strain scale {got} against {expected} in closed form");
    v
}

#[test]
fn the_correct_routine_reaches_both_branches_and_passes_rust() {
    let v = correct_j2(&model("j2"), None, &scratch("j2-rust"));
    // The model's vocabulary (elastic, plastic) is reached in full.
    assert!(v["never"]["branches"].as_array().unwrap().is_empty(), "{:#}", v["never"]);
}

#[test]
fn the_correct_routine_reaches_both_branches_and_passes_c() {
    // A library has no vocabulary of its own: the manifest declares one, with a branch the
    // routine never reports, which the report names.
    let v = correct_j2(
        &library("c_j2", 13),
        Some(r#"{ "branches": { "0": "elastic", "1": "plastic", "7": "never reported" } }"#),
        &scratch("j2-c"),
    );
    let never = v["never"]["branches"].as_array().unwrap();
    assert_eq!(never.len(), 1, "{never:?}");
    assert_eq!(never[0]["branch"], 7);
    assert_eq!(never[0]["name"], "never reported");
}

/// Everything but the wall-clock time.
fn without_time(mut v: Value) -> Value {
    v.as_object_mut().unwrap().remove("seconds");
    v
}

#[test]
fn the_same_seed_gives_the_same_report() {
    let d = scratch("same-seed");
    let m = manifest(&d, "rev", &model("j2-reversal"), None);
    let args = ["--seed", "99", "--paths", "25", "--max-shrink-iterations", "60"];
    let (c1, a) = explore(&m, &args);
    let (c2, b) = explore(&m, &args);
    assert_eq!(c1, c2);
    assert!(!a["findings"].as_array().unwrap().is_empty(), "{a:#}");
    assert_eq!(without_time(a.clone()), without_time(b), "two runs of seed 99 differ");
    // The HTML page and the JUnit XML of the same run name the failures.
    let (html, junit) = (d.join("explore.html"), d.join("explore.xml"));
    let o = bin()
        .arg("explore")
        .arg(&m)
        .args(args)
        .arg("-q")
        .arg("--html")
        .arg(&html)
        .arg("--junit")
        .arg(&junit)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(c1), "{}", text(&o));
    let page = std::fs::read_to_string(&html).unwrap();
    let xml = std::fs::read_to_string(&junit).unwrap();
    for f in a["findings"].as_array().unwrap() {
        let name = f["finding"].as_str().unwrap();
        assert!(page.contains(name) && xml.contains(&format!("name=\"{name} in ")), "{name}: {xml}");
    }
    assert!(page.contains("seed 99") && page.contains("Caution"), "{page}");
    let mut reader = quick_xml::Reader::from_str(&xml);
    let mut failures = 0;
    loop {
        match reader.read_event().unwrap() {
            quick_xml::events::Event::Eof => break,
            quick_xml::events::Event::Start(e) | quick_xml::events::Event::Empty(e)
                if e.name().as_ref() == b"failure" =>
            {
                failures += 1
            }
            _ => {}
        }
    }
    // One failure per finding, and the verdict's.
    assert_eq!(failures, a["findings"].as_array().unwrap().len() + 1, "{xml}");
    // Another seed explores other paths.
    let (_, c) = explore(&m, &["--seed", "100", "--paths", "25", "--max-shrink-iterations", "60"]);
    assert_ne!(a["reached"], c["reached"]);
    // The report matches the shipped schema's explore kind.
    let schema: Value = serde_json::from_str(
        &std::fs::read_to_string(tancheck_testkit::libs::repo_root().join("schema/report.schema.json"))
            .unwrap(),
    )
    .unwrap();
    let validator = jsonschema::validator_for(&schema).unwrap();
    let errors: Vec<String> =
        validator.iter_errors(&a).take(5).map(|e| format!("{e} at {}", e.instance_path())).collect();
    assert!(errors.is_empty(), "{errors:#?}");
}

#[test]
fn budgets_of_calls_stop_the_exploration_and_quiet_prints_the_verdict() {
    let d = scratch("budget");
    let m = manifest(&d, "j2", &model("j2"), None);
    let (code, v) = explore(&m, &["--calls", "3000"]);
    assert_eq!(code, 0);
    assert_eq!(v["stopped_by"], "calls");
    assert!(v["paths"].as_u64().unwrap() >= 1);
    let calls = v["calls"]["real"].as_u64().unwrap() + v["calls"]["complex"].as_u64().unwrap();
    assert!(calls >= 3000, "{calls}");
    assert!(v["budget"]["paths"].is_null(), "no default path budget beside --calls: {:#}", v["budget"]);
    let o = bin().arg("explore").arg(&m).args(["--paths", "3", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0));
    let out = String::from_utf8_lossy(&o.stdout);
    assert_eq!(out.lines().count(), 1, "{out}");
    assert!(out.starts_with("PASS j2 (explore seed 1)"), "{out}");
}

#[test]
fn declared_property_ranges_and_temperatures_are_explored() {
    let d = scratch("ranges");
    // σy0 between 200 and 500, H_iso log-uniform between 10 and 5000.
    let m = manifest(
        &d,
        "j2",
        &model("j2"),
        Some(
            r#"{ "properties": [ { "index": 2, "range": [200, 500] }, { "index": 3, "range": [10, 5000], "log": true } ] }"#,
        ),
    );
    let (code, v) = explore(&m, &["--seed", "3", "--paths", "30"]);
    assert_eq!(code, 0, "{v:#}");
    assert_eq!(v["random_properties"], true);
    let drawn: Vec<&Value> = v["reached"].as_array().unwrap().iter().map(|r| &r["properties"]).collect();
    assert!(drawn.iter().all(|p| {
        let p = p.as_array().unwrap();
        let (sy, h) = (p[2].as_f64().unwrap(), p[3].as_f64().unwrap());
        (200.0..=500.0).contains(&sy) && (10.0..=5000.0).contains(&h)
    }));
    // A temperature-dependent routine heats and cools inside the declared window.
    let m = d.join("thermo.json");
    std::fs::write(
        &m,
        r#"{ "routine": { "model": "thermo", "kind": "solid-3d", "properties": [210000, 0.3, 0, 1, 1, 1.2e-5] },
             "start": { "temperature": 20 }, "explore": { "temperature": [20, 600] } }"#,
    )
    .unwrap();
    let (code, v) = explore(&m, &["--paths", "20"]);
    assert_eq!(code, 0, "{v:#}");
    assert_eq!(v["scale"]["uses_temperature"], true);
    assert_eq!(v["temperature"], serde_json::json!([20.0, 600.0]));
    let heated = v["reached"][0]["path"]["increments"].as_array().unwrap().iter().any(|i| i["dtemp"] != 0.0)
        || v["increments"].as_u64().unwrap() > 0;
    assert!(heated);
}

// A declared strain scale is the one the report gives, said to be declared (the report gave
// the measured one, or "not measured: fallback", beside paths scaled to the declared one).
#[test]
fn a_declared_strain_scale_is_reported_as_declared() {
    let d = scratch("strain-scale");
    let m = manifest(&d, "j2", &model("j2"), Some(r#"{ "strain_scale": 0.005 }"#));
    let (code, v) = explore(&m, &["--paths", "3"]);
    assert_eq!(code, 0, "{v:#}");
    assert_eq!(v["scale"]["strain"], 0.005, "{:#}", v["scale"]);
    assert_eq!(v["scale"]["declared"], true);
    let o = bin().arg("explore").arg(&m).args(["--paths", "3"]).output().unwrap();
    let t = text(&o);
    assert!(t.contains("scale: strain 5.000e-3 (declared: explore.strain_scale)"), "{t}");
    assert!(!t.contains("declare explore.strain_scale to change it"), "{t}");
}

#[test]
fn bad_explore_sections_are_exit_2_naming_the_file() {
    let d = scratch("bad");
    for (section, says) in [
        (r#"{ "properties": [ { "index": 9, "range": [1, 2] } ] }"#, "explore.properties"),
        (r#"{ "properties": [ { "index": 2, "range": [500, 200] } ] }"#, "above the high end"),
        (r#"{ "properties": [ { "index": 4, "range": [0, 10], "log": true } ] }"#, "positive low end"),
        (r#"{ "branches": { "one": "plastic" } }"#, "explore.branches"),
        (r#"{ "temperature": [600, 20] }"#, "explore.temperature"),
        (r#"{ "strain_scale": -1 }"#, "explore.strain_scale"),
        (r#"{ "strains": 1 }"#, "strains"),
    ] {
        let m = manifest(&d, "bad", &model("j2"), Some(section));
        let o = bin().arg("explore").arg(&m).output().unwrap();
        assert_eq!(o.status.code(), Some(2), "{section}: {}", text(&o));
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains("bad.json") && err.contains(says), "{section}: {err}");
    }
}

/// Linear elasticity whose one state variable grows with any strain increment past 1.5e-7:
/// its state changes at almost any strain, as a creep law's flows at any stress.
struct FlowsAtOnce(tancheck::core::ModelRoutine<tancheck::models::AnyModel>, tancheck::core::RoutineInfo);

impl tancheck::core::Routine for FlowsAtOnce {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.1
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        let state = tancheck_testkit::call::call_with_leading_states(&mut self.0, 0, input, output)?;
        // A creep-like flow past a tiny threshold (1.5e-7 of strain): the state changes a
        // little past the smallest probe increment, along every direction.
        let size = input.dstrain.iter().map(|x| x * x).sum::<f64>().sqrt();
        state[0] = input.state0[0] + (size - 1.5e-7).max(0.0);
        Ok(())
    }
}

// A routine whose state changes at almost any strain has no elastic range: its limit (about
// 1.5e-7) is not taken as the scale of the random paths, the fallback 1e-3 is
// (a creep law's paths were scaled to 1.3e-7 of strain, where it barely creeps; a user-style
// sweep). The J2 test above measures a true elastic range.
#[test]
fn a_routine_without_an_elastic_range_gets_the_fallback_scale() {
    use tancheck::core::{PointKind, PointState};
    let m = tancheck::models::reference("elastic", PointKind::Solid3d).unwrap();
    let info = tancheck::core::RoutineInfo { nstate: 1, ..tancheck::core::Routine::info(&m).clone() };
    let mut r = FlowsAtOnce(m, info.clone());
    let mut caller = tancheck::core::Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let s =
        tancheck::core::explore::scale::measure(&mut caller, &[200000.0, 0.3], &start, &[0, 1, 2, 3, 4, 5])
            .unwrap();
    assert!(!s.measured, "{s:?}");
    assert_eq!(s.strain, tancheck::core::explore::scale::FALLBACK_STRAIN, "{s:?}");
}

/// A stop signal ends the exploration after the path being checked, and the report holds the
/// paths checked and the failures found so far, with the signal's exit code (it died of the
/// signal and kept nothing; a user-style sweep). The signal is sent after a wait: the report
/// is checked whatever was reached by then, and the failure the same seed finds within 40
/// paths (`finds_the_reversal`) is asked for only when that many paths were checked (the paths
/// of a time budget are those of the seed until it ends).
#[test]
fn a_stop_signal_keeps_what_was_found() {
    let d = scratch("explore-stopped");
    let m = manifest(&d, "rev", &model("j2-reversal"), None);
    let json = d.join("stopped.json");
    let mut cmd = bin();
    // A time budget far beyond the wait: were the signal lost, the run would end by it.
    cmd.arg("explore")
        .arg(&m)
        .args(["--seed", "7", "--time", "120", "-q", "--json"])
        .arg(&json)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped());
    // The child gets SIGINT's default disposition: a test run started in the background of a
    // shell without job control inherits it ignored (POSIX), and tancheck keeps an ignored
    // SIGINT ignored (as in tests/survive.rs).
    // SAFETY: between fork and exec only async-signal-safe calls (signal) are made.
    unsafe {
        use std::os::unix::process::CommandExt;
        cmd.pre_exec(|| {
            libc::signal(libc::SIGINT, libc::SIG_DFL);
            Ok(())
        });
    }
    let child = cmd.spawn().unwrap();
    std::thread::sleep(std::time::Duration::from_secs(3));
    let sent = Command::new("kill").args(["-INT", &child.id().to_string()]).status().unwrap();
    assert!(sent.success());
    let o = child.wait_with_output().unwrap();
    assert_eq!(o.status.code(), Some(130), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["kind"], "explore", "{v:#}");
    assert_eq!(v["stopped_by"], serde_json::json!({ "signal": 2 }), "{v:#}");
    assert_eq!(v["exit_code"], 130);
    let paths = v["paths"].as_u64().unwrap();
    let findings = v["findings"].as_array().unwrap();
    assert!(findings.iter().all(|f| f["first_path"].as_u64().unwrap() <= paths), "{v:#}");
    if paths >= 40 {
        assert!(findings.iter().any(|f| f["finding"] == "term-sign"), "{paths} paths: {v:#}");
    }
    eprintln!("stopped after {paths} paths with {} findings", findings.len());
}
