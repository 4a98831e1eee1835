//! Campaign reports, continued (tests/campaign.rs holds the rest): a check's conventions
//! warning in every report of a campaign, a manifest listed twice, and a stopped campaign.

use std::path::Path;
use std::process::{Command, Output};

use serde_json::Value;
use tancheck_testkit::libs::scratch;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn text(o: &Output) -> String {
    tancheck_testkit::libs::output_text(o)
}

fn items(v: &Value) -> &Vec<Value> {
    v["items"].as_array().expect("items")
}

// A routine whose elastic response contradicts its declared shear measure (engineering shear
// declared tensor): the check's conventions warning reaches the campaign's item, in the
// terminal, the JSON, the HTML and the JUnit output of a passing item (a user-style sweep's
// library, declared wrongly, passed every item without a word of it).
#[test]
fn a_conventions_warning_reaches_the_campaign_reports() {
    let d = scratch("conventions");
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c");
    std::fs::write(
        d.join("declared.json"),
        r#"{ "routine": { "library": "build/libconv.so", "symbol": "c_elastic", "kind": "solid-3d", "shear": "tensor", "states": 0, "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    let file = d.join("conv.json");
    std::fs::write(
        &file,
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "conv",
  "libraries": [ {{ "output": "build/libconv.so", "sources": ["{}"] }} ],
  "routines": [ {{ "manifest": "declared.json" }} ] }}
"#,
            examples.join("elastic.c").display()
        ),
    )
    .unwrap();
    let (json, xml, html) = (d.join("r.json"), d.join("r.xml"), d.join("r.html"));
    let o = bin()
        .arg("campaign")
        .arg(&file)
        .arg("--json")
        .arg(&json)
        .arg("--junit")
        .arg(&xml)
        .arg("--html")
        .arg(&html)
        .output()
        .unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(0), "{t}");
    assert!(t.contains("conventions warning: the elastic response behaves as"), "{t}");
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    let item = &items(&v)[0];
    assert_eq!(item["outcome"], "pass", "{item}");
    assert!(item["message"].as_str().unwrap().starts_with("conventions warning"), "{item}");
    let xml = std::fs::read_to_string(&xml).unwrap();
    assert!(xml.contains("<system-out>conventions warning"), "{xml}");
    assert!(std::fs::read_to_string(&html).unwrap().contains("conventions warning"));
    // The check's own JUnit output carries its warnings too (it had none of them).
    let one = d.join("one.xml");
    let o = bin().arg("check").arg(d.join("declared.json")).arg("--junit").arg(&one).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let xml = std::fs::read_to_string(&one).unwrap();
    assert!(xml.contains("<system-out>warning: conventions warning"), "{xml}");
}

// A manifest listed twice (its property sets expected to pass and to fail) replays its
// regression cases once: the campaign was refused once `bisect` had written them, two `cases`
// items having one key (a user-style sweep).
#[test]
fn a_manifest_listed_twice_replays_its_cases_once() {
    let d = scratch("twice");
    std::fs::write(
        d.join("b.json"),
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [210000, 0.3, 355, 1200, 150, 12, 2500] } }"#,
    )
    .unwrap();
    let o = bin().arg("bisect").arg(d.join("b.json")).arg("-q").output().unwrap();
    assert!(d.join("tancheck-cases/b").is_dir(), "{}", text(&o));
    let file = d.join("twice.json");
    std::fs::write(
        &file,
        r#"{ "format": "tancheck-campaign", "version": 1, "name": "twice",
  "routines": [
    { "manifest": "b.json", "expect": "fail",
      "property_sets": [ { "name": "hardening", "values": [210000, 0.3, 355, 1200, 150, 12, 2500] } ] },
    { "manifest": "b.json",
      "property_sets": [ { "name": "elastic", "values": [210000, 0.3, 1e9, 1200, 150, 12, 2500] } ] }
  ] }
"#,
    )
    .unwrap();
    let o = bin().arg("campaign").arg(&file).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let v: Value = serde_json::from_str(&String::from_utf8_lossy(&o.stdout)).unwrap();
    let list = items(&v);
    assert_eq!(list.iter().filter(|i| i["task"] == "cases").count(), 1, "{v}");
    assert_eq!(list.len(), 3, "{v}");
}

// An item without an expectation that fails says in the terminal that a pass was expected (the
// page said so, the terminal did not); an expected failure keeps its finding in its JUnit
// output; a probe item's page row counts probes, not increments (user-style sweep).
#[test]
fn the_reports_say_what_was_expected_and_what_a_probe_item_counts() {
    let d = scratch("expected");
    std::fs::write(
        d.join("c.json"),
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [210000, 0.3, 355, 1200, 150, 12, 2500] },
  "path": { "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 } }"#,
    )
    .unwrap();
    std::fs::write(d.join("suite.json"), r#"{ "suite": "one", "probes": [ { "probe": "symmetry" } ] }"#)
        .unwrap();
    let file = d.join("e.json");
    let campaign = |expect: &str| {
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "e",
  "routines": [ {{ "manifest": "c.json"{expect}, "probes": ["suite.json"] }} ] }}
"#
        )
    };
    std::fs::write(&file, campaign("")).unwrap();
    let o = bin().arg("campaign").arg(&file).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    let line = t.lines().find(|l| l.contains("continuum-tangent")).unwrap_or("");
    assert!(line.contains("expected pass: NOT AS EXPECTED"), "{t}");
    std::fs::write(&file, campaign(r#", "expect": "fail", "expect_finding": "continuum-tangent""#)).unwrap();
    let (xml, html) = (d.join("e.xml"), d.join("e.html"));
    let o =
        bin().arg("campaign").arg(&file).arg("--junit").arg(&xml).arg("--html").arg(&html).output().unwrap();
    let xml = std::fs::read_to_string(&xml).unwrap();
    assert!(xml.contains("<system-out>finding continuum-tangent: fail as expected"), "{}\n{xml}", text(&o));
    let html = std::fs::read_to_string(&html).unwrap();
    assert!(html.contains(" probes</td>"), "{html}");
}

// A stop signal (Ctrl-C's SIGINT, or SIGTERM) in a campaign: the item in progress finishes, no
// new one starts, and every report holds the items checked so far, the rest listed as not run
// (exit 128 + the signal). A
// stopped campaign kept nothing of what it had checked (a user-style sweep). The routine is a
// bar that sleeps 2 ms a call and touches a file at its first call, so the signal comes while
// the first item runs.
#[test]
fn a_stopped_campaign_keeps_the_items_it_checked() {
    let d = scratch("stopped");
    std::fs::write(
        d.join("slow.c"),
        r#"#define _POSIX_C_SOURCE 199309L
#include <stdio.h>
#include <stdlib.h>
#include <time.h>
#include "tancheck_cstep.h"
#include "tancheck_routine.h"

TC_ROUTINE(c_slow_bar)
{
    (void)temperature;
    (void)stress0;
    (void)state0;
    (void)state;
    (void)energy;
    const char *mark = getenv("TANCHECK_TEST_MARK");
    if (mark != NULL) {
        FILE *f = fopen(mark, "a");
        if (f != NULL) fclose(f);
    }
    struct timespec pause = {0, 2000000};
    nanosleep(&pause, NULL);
    stress[0] = properties[0] * (strain[0] + dstrain[0]);
    tangent[0] = properties[0];
    dstress_dtemp[0] = 0.0;
    report->status = TC_STATUS_OK;
    report->branch = 0;
    (void)call;
}
"#,
    )
    .unwrap();
    let mut routines = Vec::new();
    for (k, e) in [1000, 2000, 3000, 4000].iter().enumerate() {
        std::fs::write(
            d.join(format!("slow{k}.json")),
            format!(
                r#"{{ "routine": {{ "library": "build/libslow.so", "symbol": "c_slow_bar", "kind": "uniaxial", "states": 0, "properties": [{e}] }},
  "path": {{ "increments": [ {} ] }} }}"#,
                vec![r#"{"dstrain": [1e-4, 0, 0, 0, 0, 0]}"#; 40].join(", ")
            ),
        )
        .unwrap();
        routines.push(format!(r#"{{ "manifest": "slow{k}.json" }}"#));
    }
    let file = d.join("slow_campaign.json");
    std::fs::write(
        &file,
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "slow",
  "libraries": [ {{ "output": "build/libslow.so", "sources": ["slow.c"] }} ],
  "routines": [ {} ] }}
"#,
            routines.join(", ")
        ),
    )
    .unwrap();
    // The library is built before any item runs; the file marks the first call.
    let (mark, json, xml) = (d.join("mark"), d.join("r.json"), d.join("r.xml"));
    let child = bin()
        .arg("campaign")
        .arg(&file)
        .args(["--jobs", "1"])
        .arg("--json")
        .arg(&json)
        .arg("--junit")
        .arg(&xml)
        .env("TANCHECK_TEST_MARK", &mark)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    let start = std::time::Instant::now();
    while !mark.exists() {
        assert!(start.elapsed().as_secs() < 120, "the routine was never called");
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    // SIGTERM, handled as Ctrl-C's SIGINT is: a test run in the background of a shell has
    // SIGINT ignored, and its children with it. SAFETY: a signal to the child this test started.
    assert_eq!(unsafe { libc::kill(child.id() as i32, libc::SIGTERM) }, 0);
    let o = child.wait_with_output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(143), "{t}");
    assert!(t.contains("SIGTERM: the items in progress finish"), "{t}");
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    let its = items(&v);
    assert_eq!(its.len(), 4, "{v}");
    assert_eq!(its[0]["outcome"], "pass", "{v}");
    let not_run: Vec<&Value> = its.iter().filter(|i| i["outcome"] == "not-run").collect();
    assert!(!not_run.is_empty() && its[3]["outcome"] == "not-run", "{v}");
    for i in &not_run {
        assert!(i["message"].as_str().unwrap().contains("stopped by SIGTERM"), "{i}");
    }
    assert!(
        v["notes"].as_array().unwrap().iter().any(|n| n.as_str().unwrap().starts_with("stopped by SIGTERM")),
        "{v}"
    );
    assert_eq!(v["exit_code"], 143, "{v}");
    let x = std::fs::read_to_string(&xml).unwrap();
    assert!(x.contains("<skipped") && x.contains("not run"), "{x}");
}

// A library that does not compile makes its routines' items bad input (exit 2), and the other
// items run: one typo in one library stopped the whole campaign before any item ran, with no
// report (a user-style sweep). Every report says so, the JUnit one as bad input (it read
// routine-fault, the class of exit 3).
#[test]
fn a_library_that_does_not_compile_is_bad_input_for_its_routines_only() {
    let d = scratch("broken-library");
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c");
    std::fs::write(d.join("broken.c"), "int broken( { return 0; }\n").unwrap();
    std::fs::write(
        d.join("m.json"),
        r#"{ "routine": { "library": "build/libbroken.so", "symbol": "broken", "kind": "solid-3d", "states": 0, "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    std::fs::write(
        d.join("good.json"),
        r#"{ "routine": { "library": "build/libgood.so", "symbol": "c_elastic", "kind": "solid-3d", "states": 0, "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    let file = d.join("c.json");
    std::fs::write(
        &file,
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "broken",
  "libraries": [ {{ "output": "build/libbroken.so", "sources": ["broken.c"] }},
                 {{ "output": "build/libgood.so", "sources": ["{}"] }} ],
  "routines": [ {{ "manifest": "m.json" }}, {{ "manifest": "good.json" }} ] }}
"#,
            examples.join("elastic.c").display()
        ),
    )
    .unwrap();
    let (json, xml, html) = (d.join("r.json"), d.join("r.xml"), d.join("r.html"));
    let o = bin()
        .arg("campaign")
        .arg(&file)
        .args(["--jobs", "1"])
        .arg("--json")
        .arg(&json)
        .arg("--junit")
        .arg(&xml)
        .arg("--html")
        .arg(&html)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("broken.c"), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    let its = items(&v);
    assert_eq!(its.len(), 2, "{v:#}");
    let broken = its.iter().find(|i| i["routine"].as_str().unwrap().contains("m.json")).unwrap();
    assert_eq!(broken["outcome"], "error", "{broken}");
    assert_eq!(broken["finding"], "bad-input", "{broken}");
    assert!(broken["message"].as_str().unwrap().contains("its library did not build"), "{broken}");
    let good = its.iter().find(|i| i["routine"].as_str().unwrap().contains("good.json")).unwrap();
    assert_eq!(good["outcome"], "pass", "{good}");
    let x = std::fs::read_to_string(&xml).unwrap();
    assert!(x.contains(r#"type="bad-input""#) && !x.contains("routine-fault"), "{x}");
    assert!(std::fs::read_to_string(&html).unwrap().contains("its library did not build"));
}
