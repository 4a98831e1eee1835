//! `tancheck demo` goes through the reporters like the other commands: `--json` writes a
//! `demo` document with one case per routine and its expected and found verdicts, `--junit`
//! and `--html` write their files, `--quiet` leaves standard output to the final line, and
//! `--json -` leaves standard output to the JSON document.

use std::process::Command;

use tancheck_testkit::libs::{output_text, scratch};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

#[test]
fn demo_writes_json_junit_and_html_and_quiet_prints_the_verdict_only() {
    let d = scratch("demo");
    let (json, junit, html) = (d.join("demo.json"), d.join("demo.xml"), d.join("demo.html"));
    let mut cmd = bin();
    cmd.args(["demo", "-q", "--json"]).arg(&json).arg("--junit").arg(&junit).arg("--html").arg(&html);
    let o = cmd.output().unwrap();
    let t = output_text(&o);
    assert_eq!(o.status.code(), Some(0), "{t}");
    let stdout = String::from_utf8_lossy(&o.stdout);
    assert_eq!(stdout.trim(), "demo: every routine got the verdict it should (exit 0)", "{t}");
    let doc: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(doc["kind"], "demo");
    let cases = doc["cases"].as_array().unwrap();
    // The Rust J2 model, C elastic, J2 and J2-continuum, and the two C bracket ply routines at
    // least (Fortran ones when gfortran is there).
    assert!(cases.len() >= 6, "{doc}");
    assert!(cases.iter().all(|c| c["right"] == true), "{doc}");
    // The flawed routines are among them, found as flawed.
    let flawed = cases.iter().filter(|c| c["expected"] == "tangent-failure").count();
    assert!(flawed >= 2, "{doc}");
    assert!(cases.iter().all(|c| c["report"]["verdict"] == c["expected"]), "{doc}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(xml.contains("J2 plasticity with the continuum tangent (flawed on purpose), C"), "{xml}");
    assert!(std::fs::read_to_string(&html).unwrap().contains("<html"));
}

#[test]
fn demo_json_on_standard_output_is_one_document() {
    let o = bin().args(["demo", "--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", output_text(&o));
    let doc: serde_json::Value =
        serde_json::from_slice(&o.stdout).expect("standard output is the JSON document");
    assert_eq!(doc["format"], "tancheck-report");
    assert_eq!(doc["exit_code"], 0);
}
