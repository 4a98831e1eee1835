//! `tancheck campaign` and `tancheck merge` through the program:
//! - the bundled campaign (every bundled example routine: campaigns/bundled/campaign.json)
//!   gives every item the outcome it expects, and the same items (findings, verdicts, worst
//!   errors bit for bit, order) run one by one, on two threads and in worker processes;
//! - `--shard K/N` puts every item in exactly one shard, and the shards' union is the serial
//!   run; `merge` of the partial reports gives the serial report's items; a missing shard is
//!   named (exit 2), a partial report of another campaign is refused;
//! - a worker that dies (a routine calling exit) is that item's fault, the others run
//!   (bad campaign files: tests/campaign_files.rs).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use serde_json::Value;
use tancheck_testkit::libs::{scratch, workers_of};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn bundled() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("campaigns/bundled/campaign.json")
}

/// The libraries of the bundled campaign, shared by the test programs (rebuilt only when a
/// source changes: the campaign's stamps).
fn build_dir() -> PathBuf {
    Path::new(env!("CARGO_TARGET_TMPDIR")).join("campaign-build")
}

/// Run the bundled campaign with `args`, writing its JSON to `json`; the report.
fn run_bundled(args: &[&str], json: &Path) -> (Output, Value) {
    let o = bin()
        .arg("campaign")
        .arg(bundled())
        .arg("--build-dir")
        .arg(build_dir())
        .args(args)
        .arg("--json")
        .arg(json)
        .arg("-q")
        .output()
        .unwrap();
    let v: Value = serde_json::from_str(&std::fs::read_to_string(json).unwrap_or_default())
        .unwrap_or_else(|e| panic!("{e}: {}", text(&o)));
    (o, v)
}

fn items(v: &Value) -> &Vec<Value> {
    v["items"].as_array().expect("items")
}

#[test]
fn the_bundled_campaign_gives_the_same_items_serial_threaded_and_isolated() {
    let d = scratch("bundled");
    let (o, serial) = run_bundled(&["--jobs", "1"], &d.join("serial.json"));
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let list = items(&serial);
    assert_eq!(serial["kind"], "campaign");
    // Every item as expected: the correct routines pass, the flawed ones fail with their finding.
    for it in list {
        assert_eq!(it["as_expected"], true, "{it}");
    }
    let find = |key: &str| list.iter().find(|i| i["key"].as_str().unwrap().contains(key)).unwrap();
    assert_eq!(find("routine=c/j2_continuum.json")["finding"], "continuum-tangent");
    assert_eq!(find("routine=c/cohesive_secant.json")["finding"], "secant");
    assert_eq!(find("routine=c/jc_block.json")["outcome"], "pass");
    assert_eq!(find("routine=c/finite_nh_truesdell_for_jaumann.json")["outcome"], "fail");
    // Fortran routines are checked when a Fortran compiler runs, and skipped (said so) otherwise.
    let fortran: Vec<_> =
        list.iter().filter(|i| i["routine"].as_str().unwrap().starts_with("fortran/")).collect();
    assert!(fortran.len() >= 10, "{}", fortran.len());
    let skipped = fortran.iter().filter(|i| i["outcome"] == "skipped").count();
    if cfg!(tancheck_no_fortran) {
        assert_eq!(skipped, fortran.len());
        assert!(serial["notes"].to_string().contains("no Fortran compiler"), "{}", serial["notes"]);
    } else {
        assert_eq!(skipped, 0);
    }
    // Per routine: every bundled routine once, its items summed up.
    let routines = serial["routines"].as_array().unwrap();
    assert!(routines.len() >= 30, "{}", routines.len());
    let j2 = routines.iter().find(|r| r["routine"] == "c/j2.json").unwrap();
    assert_eq!(j2["items"], 4, "two property sets times two paths: {j2}");
    assert_eq!(j2["code"], 0);
    // In positions order, with the regression cases (none here) first.
    for (k, it) in list.iter().enumerate() {
        assert_eq!(it["position"], k);
    }

    let (o, threads) = run_bundled(&["--jobs", "2"], &d.join("threads.json"));
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert_eq!(items(&threads), list, "two threads against one");
    let (o, isolated) = run_bundled(&["--jobs", "2", "--isolate"], &d.join("isolated.json"));
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert_eq!(items(&isolated), list, "worker processes against one process");
    assert_eq!(isolated["campaign"], serial["campaign"]);

    // Shards: every item in exactly one, the union the serial run; merged, the serial report.
    let mut parts = Vec::new();
    let mut union: Vec<Value> = Vec::new();
    for k in 0..3 {
        let p = d.join(format!("part{k}.json"));
        let (o, part) = run_bundled(&["--shard", &format!("{k}/3")], &p);
        assert_eq!(o.status.code(), Some(0), "{}", text(&o));
        assert_eq!(part["kind"], "campaign-part");
        assert_eq!(part["shard"]["index"], k);
        for it in items(&part) {
            let h = u64::from_str_radix(it["hash"].as_str().unwrap(), 16).unwrap();
            assert_eq!(h % 3, k as u64, "{it}");
        }
        union.extend(items(&part).iter().cloned());
        parts.push(p);
    }
    union.sort_by_key(|i| i["position"].as_u64().unwrap());
    assert_eq!(&union, list, "the shards' union against the serial run");
    let merged = d.join("merged.json");
    let o = bin().arg("merge").args(&parts).arg("-o").arg(&merged).arg("-q").output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let m: Value = serde_json::from_str(&std::fs::read_to_string(&merged).unwrap()).unwrap();
    assert_eq!(items(&m), list, "merged against serial");
    assert_eq!(m["routines"], serial["routines"], "merged against serial, per routine");
    assert_eq!(m["merged"]["missing"].as_array().unwrap().len(), 0);

    // A missing shard is named, exit 2; the report of what is there is still written.
    let partial = d.join("partial.json");
    let o = bin().arg("merge").arg(&parts[0]).arg(&parts[2]).arg("--json").arg(&partial).output().unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("missing shards 1 of 3"), "{}", text(&o));
    let m: Value = serde_json::from_str(&std::fs::read_to_string(&partial).unwrap()).unwrap();
    assert_eq!(m["merged"]["missing"], serde_json::json!([1]));

    // A partial report of another campaign (another digest) is refused.
    let mut other: Value = serde_json::from_str(&std::fs::read_to_string(&parts[1]).unwrap()).unwrap();
    other["campaign"]["digest"] = Value::String("0".repeat(64));
    let other_file = d.join("other.json");
    std::fs::write(&other_file, other.to_string()).unwrap();
    let o = bin().arg("merge").arg(&parts[0]).arg(&other_file).arg(&parts[2]).output().unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("another campaign") && text(&o).contains("other.json"), "{}", text(&o));
}

#[test]
fn slurm_array_variables_pick_the_shard() {
    let d = scratch("slurm-vars");
    // An array 4-7: task 5 is shard 1 of 4.
    let o = bin()
        .arg("campaign")
        .arg(bundled())
        .arg("--build-dir")
        .arg(build_dir())
        .args(["-q", "--json"])
        .arg(d.join("s.json"))
        .env("SLURM_ARRAY_TASK_ID", "5")
        .env("SLURM_ARRAY_TASK_COUNT", "4")
        .env("SLURM_ARRAY_TASK_MIN", "4")
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(d.join("s.json")).unwrap()).unwrap();
    assert_eq!(v["shard"], serde_json::json!({"index": 1, "count": 4}));
    // Ids beyond the count (an array with a step) are refused.
    let o = bin()
        .arg("campaign")
        .arg(bundled())
        .env("SLURM_ARRAY_TASK_ID", "6")
        .env("SLURM_ARRAY_TASK_COUNT", "4")
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("SLURM_ARRAY_TASK_ID=6"), "{}", text(&o));
    for bad in ["4/4", "1/0", "x/2", "3"] {
        let o = bin().arg("campaign").arg(bundled()).args(["--shard", bad]).output().unwrap();
        assert_eq!(o.status.code(), Some(2), "--shard {bad}: {}", text(&o));
    }
}

/// A small campaign of its own: a library built from C sources (a routine that ends its
/// process, and an elastic one), and a built-in model.
fn small_campaign(d: &Path) -> PathBuf {
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c");
    for (name, routine) in [
        (
            "exits.json",
            r#""library": "build/libsmall.so", "symbol": "bad_exit", "kind": "solid-3d", "states": 0, "properties": [200000, 0.3]"#,
        ),
        (
            "elastic.json",
            r#""library": "build/libsmall.so", "symbol": "c_elastic", "kind": "solid-3d", "states": 0, "properties": [200000, 0.3]"#,
        ),
        (
            "model.json",
            r#""model": "j2", "kind": "solid-3d", "properties": [210000, 0.3, 355, 1200, 150, 12, 2500]"#,
        ),
    ] {
        std::fs::write(d.join(name), format!("{{ \"routine\": {{ {routine} }} }}\n")).unwrap();
    }
    let file = d.join("small.json");
    let text = format!(
        r#"{{ "format": "tancheck-campaign", "version": 1, "name": "small",
  "libraries": [ {{ "output": "build/libsmall.so", "sources": ["{}", "{}"] }} ],
  "routines": [
    {{ "manifest": "exits.json", "expect": "fault" }},
    {{ "manifest": "elastic.json", "paths": ["uniaxial-strain:0.001:3"] }},
    {{ "manifest": "model.json", "expect": "fail" }}
  ] }}
"#,
        examples.join("misbehave.c").display(),
        examples.join("elastic.c").display()
    );
    std::fs::write(&file, text).unwrap();
    file
}

#[test]
fn a_worker_that_dies_is_its_items_fault_and_the_others_run() {
    let d = scratch("isolate");
    let file = small_campaign(&d);
    let json = d.join("r.json");
    let o = bin()
        .arg("campaign")
        .arg(&file)
        .args(["--isolate", "-j", "2", "--json"])
        .arg(&json)
        .output()
        .unwrap();
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    let list = items(&v);
    assert_eq!(list.len(), 3, "{v}");
    assert_eq!(list[0]["outcome"], "fault", "{}", list[0]);
    assert!(list[0]["message"].as_str().unwrap().contains("worker ended"), "{}", list[0]);
    assert_eq!(list[0]["as_expected"], true);
    assert_eq!(list[1]["outcome"], "pass", "{}", list[1]);
    assert_eq!(list[1]["path"], "uniaxial-strain:0.001:3");
    // The J2 model is correct: a campaign that expects it to fail says the flaw is gone (exit 1).
    assert_eq!(list[2]["outcome"], "pass");
    assert_eq!(list[2]["as_expected"], false);
    assert_eq!(list[2]["code"], 1);
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    // JUnit and HTML through the reporters.
    let o = bin()
        .arg("campaign")
        .arg(&file)
        .args(["--isolate", "--junit"])
        .arg(d.join("r.xml"))
        .arg("--html")
        .arg(d.join("r.html"))
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let xml = std::fs::read_to_string(d.join("r.xml")).unwrap();
    assert!(xml.contains("<testsuite name=\"tancheck campaign small model.json\""), "{xml}");
    assert_eq!(xml.matches("<testcase").count(), 3, "{xml}");
    assert_eq!(xml.matches("<failure").count(), 1, "{xml}");
    let html = std::fs::read_to_string(d.join("r.html")).unwrap();
    assert!(html.contains("Campaign small") && html.contains("not as expected"), "{html}");
    // Every routine's table has the same column widths, so the columns line up down the page
    // (each table sized its own; a user-style sweep).
    let tables = html.matches("<table").count();
    assert!(tables > 1 && html.matches("<table class=\"items\">\n<colgroup>").count() == tables, "{html}");
    // The expected fault shows in a plain badge, not in the red (or orange) of a surprise; the
    // item not as expected keeps its row marked.
    assert!(html.contains("<span class=\"badge expected\">FAULT · expected</span>"), "{html}");
    assert!(!html.contains("badge fault"), "{html}");
    assert_eq!(html.matches("<tr class=\"bad\">").count(), 1, "{html}");
}

/// Without --isolate, a routine that ends the process ends the campaign: its JSON report is
/// then the last words naming the campaign and the fault (it stayed the bare "incomplete"
/// marker), and `merge` says so of a shard that ended this way.
#[test]
fn without_isolate_a_routine_that_ends_the_process_leaves_last_words() {
    let d = scratch("last-words");
    let file = small_campaign(&d);
    let json = d.join("r.json");
    let junit = d.join("r.xml");
    let o = bin()
        .arg("campaign")
        .arg(&file)
        .args(["-j", "1", "--json"])
        .arg(&json)
        .arg("--junit")
        .arg(&junit)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(70), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["kind"], "last-words", "{v}");
    assert_eq!(v["routine"], "campaign small", "{v}");
    // The JUnit report stays the marker that the run did not finish, naming the campaign (it
    // named whichever input sorted first, a library of it; a user-style sweep).
    let x = std::fs::read_to_string(&junit).unwrap();
    assert!(x.contains("campaign small") && !x.contains(".so"), "{x}");
    assert!(v["fault"]["message"].as_str().unwrap().contains("exit()"), "{v}");
    // Of two shards, the one holding that item ends so, and merge names it as a shard that
    // did not finish.
    let parts: Vec<PathBuf> = (0..2).map(|k| d.join(format!("p{k}.json"))).collect();
    let mut ended = Vec::new();
    for (k, p) in parts.iter().enumerate() {
        let shard = format!("{k}/2");
        let o = bin()
            .arg("campaign")
            .arg(&file)
            .args(["--shard", &shard, "-j", "1", "--json"])
            .arg(p)
            .output()
            .unwrap();
        let v: Value = serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap();
        if v["kind"] == "last-words" {
            assert_eq!(o.status.code(), Some(70), "{}", text(&o));
            ended.push(p.file_name().unwrap().to_string_lossy().into_owned());
        }
    }
    assert_eq!(ended.len(), 1, "{ended:?}");
    let o = bin().arg("merge").args(&parts).arg("-o").arg(d.join("m.json")).output().unwrap();
    assert!(text(&o).contains(&format!("{}: its shard ended before it finished", ended[0])), "{}", text(&o));
}

#[test]
fn a_folder_of_manifests_is_a_campaign() {
    let d = scratch("folder");
    let m = d.join("lib");
    std::fs::create_dir_all(&m).unwrap();
    std::fs::write(
        m.join("a.json"),
        r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    std::fs::write(
        m.join("b.json"),
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [210000, 0.3, 355, 1200, 150, 12, 2500] } }"#,
    )
    .unwrap();
    // The flawed routine's failure saved as regression cases (tancheck-cases/b/).
    let o = bin().arg("bisect").arg(m.join("b.json")).arg("-q").output().unwrap();
    assert!(m.join("tancheck-cases/b").is_dir(), "{}", text(&o));
    let o = bin().arg("campaign").arg(&m).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let v: Value = serde_json::from_str(&String::from_utf8_lossy(&o.stdout)).unwrap();
    assert_eq!(v["campaign"]["name"], "lib");
    let list = items(&v);
    // The cases replay first, and still fail.
    assert_eq!(list[0]["task"], "cases", "{v}");
    assert_eq!(list[0]["routine"], "b.json");
    assert_eq!(list[0]["outcome"], "fail");
    assert_eq!(list[1]["routine"], "a.json");
    assert_eq!(list[1]["outcome"], "pass");
    assert_eq!(list[2]["outcome"], "fail");
    assert_eq!(list[2]["finding"], "continuum-tangent");
}

#[test]
fn without_a_fortran_compiler_the_fortran_routines_are_skipped_and_said_so() {
    let d = scratch("no-fortran");
    let run = |require: bool| {
        let mut c = bin();
        c.arg("campaign")
            .arg(bundled())
            .arg("--build-dir")
            .arg(build_dir())
            .args(["--json"])
            .arg(d.join("r.json"))
            // A Fortran compiler that does not run.
            .env("FC", "/nonexistent/gfortran");
        if require {
            c.env("TANCHECK_REQUIRE_FORTRAN", "1");
        } else {
            c.env_remove("TANCHECK_REQUIRE_FORTRAN");
        }
        let o = c.output().unwrap();
        let v: Value = serde_json::from_str(&std::fs::read_to_string(d.join("r.json")).unwrap()).unwrap();
        (o, v)
    };
    let (o, v) = run(false);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(text(&o).contains("no Fortran compiler runs here"), "{}", text(&o));
    let fortran: Vec<_> = items(&v)
        .iter()
        .filter(|i| i["routine"].as_str().unwrap().starts_with("fortran/"))
        .cloned()
        .collect();
    assert!(!fortran.is_empty());
    assert!(fortran.iter().all(|i| i["outcome"] == "skipped" && i["as_expected"] == true), "{fortran:?}");
    assert!(items(&v).iter().any(|i| i["routine"] == "c/j2.json" && i["outcome"] == "pass"));
    // Required, a skip is a failure (exit 2), said in the item.
    let (o, v) = run(true);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let skipped = items(&v).iter().find(|i| i["outcome"] == "skipped").unwrap();
    assert_eq!(skipped["code"], 2);
    assert!(skipped["message"].as_str().unwrap().contains("TANCHECK_REQUIRE_FORTRAN=1"), "{skipped}");
}

// A known-flawed routine kept in a campaign as a regression suite (`expect: fail`) whose
// failure `bisect` saved as cases: its cases still failing is expected too, and the campaign
// passes (an exploration of it made the campaign fail with "case-still-fails"); a correct
// routine's case that fails is still a failure.
#[test]
fn the_cases_of_a_routine_expected_to_fail_are_expected_to_fail() {
    let d = scratch("expected-cases");
    std::fs::write(
        d.join("b.json"),
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [210000, 0.3, 355, 1200, 150, 12, 2500] } }"#,
    )
    .unwrap();
    let o = bin().arg("bisect").arg(d.join("b.json")).arg("-q").output().unwrap();
    assert!(d.join("tancheck-cases/b").is_dir(), "{}", text(&o));
    let campaign = |expect: &str| {
        let file = d.join("c.json");
        std::fs::write(
            &file,
            format!(
                r#"{{ "format": "tancheck-campaign", "version": 1, "name": "c",
  "routines": [ {{ "manifest": "b.json"{expect} }} ] }}"#
            ),
        )
        .unwrap();
        let o = bin().arg("campaign").arg(&file).args(["--json", "-", "-q"]).output().unwrap();
        let v: Value = serde_json::from_str(&String::from_utf8_lossy(&o.stdout)).unwrap();
        (o.status.code(), v)
    };
    let (code, v) = campaign(r#", "expect": "fail", "expect_finding": "continuum-tangent""#);
    assert_eq!(code, Some(0), "{v:#}");
    let list = items(&v);
    assert_eq!(
        (list[0]["task"].as_str(), list[0]["outcome"].as_str()),
        (Some("cases"), Some("fail")),
        "{v:#}"
    );
    assert!(list.iter().all(|i| i["as_expected"] == true), "{v:#}");
    let (code, v) = campaign("");
    assert_eq!(code, Some(1), "{v:#}");
    assert_eq!(items(&v)[0]["as_expected"], false, "{v:#}");
}

// A routine that never returns, checked in one process on two threads beside an item that
// finishes: the watchdog ends the campaign at --call-timeout naming the call, whichever thread
// it runs on (it never fired once the other thread's item finished: the summed call counts
// moved, and that thread's end stopped the timing; a user-style sweep). The message says what
// keeps the other items.
#[test]
fn a_call_that_never_returns_on_one_of_two_threads_is_stopped() {
    let d = scratch("campaign-hang");
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c");
    for (name, symbol) in [("sleeps.json", "bad_sleep"), ("elastic.json", "c_elastic")] {
        std::fs::write(
            d.join(name),
            format!(
                r#"{{ "routine": {{ "library": "build/libhang.so", "symbol": "{symbol}", "kind": "solid-3d", "states": 0, "properties": [200000, 0.3] }} }}"#
            ),
        )
        .unwrap();
    }
    let file = d.join("hang.json");
    std::fs::write(
        &file,
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "hang",
  "libraries": [ {{ "output": "build/libhang.so", "sources": ["{}", "{}"] }} ],
  "routines": [ {{ "manifest": "elastic.json" }}, {{ "manifest": "sleeps.json", "expect": "fault" }} ] }}"#,
            examples.join("misbehave.c").display(),
            examples.join("elastic.c").display()
        ),
    )
    .unwrap();
    let started = std::time::Instant::now();
    let o = bin().arg("campaign").arg(&file).args(["-j", "2", "--call-timeout", "2"]).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(3), "{t}");
    assert!(t.contains("did not return within 2 s") && t.contains("--isolate"), "{t}");
    // The last words name the routine of the hung call, not only the campaign (several
    // routines of one library read alike; a user-style sweep).
    assert!(t.contains("routine: ") && t.contains("libhang.so:bad_sleep"), "{t}");
    assert!(started.elapsed().as_secs_f64() < 60.0, "took {:?}", started.elapsed());
    // Under --isolate the hanging item is a fault whose message is the worker's last words
    // (it read "the worker ended with exit code 3 without a report"; a user-style sweep).
    let json = d.join("isolated.json");
    let o = bin()
        .arg("campaign")
        .arg(&file)
        .args(["--isolate", "--call-timeout", "2", "-q", "--json"])
        .arg(&json)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    let hung = &items(&v)[1];
    assert_eq!(hung["outcome"], "fault", "{hung}");
    let message = hung["message"].as_str().unwrap();
    assert!(message.contains("worker ended") && message.contains("did not return within 2 s"), "{message}");
    // with the increment of the hung call and its inputs (it read "0 of 0 increments", no call)
    assert!(
        message.contains("during a call of increment") && message.contains("the call's inputs: strain"),
        "{message}"
    );
    assert!(hung["first_failing_increment"].as_u64().is_some(), "{hung}");
}

// A campaign's worker dies with its parent, as a check's does (a killed `campaign --isolate`
// left its worker running a routine that sleeps; a user-style sweep).
#[test]
fn a_campaign_worker_dies_with_its_parent() {
    let d = scratch("campaign-parent-death");
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c");
    std::fs::write(
        d.join("sleeps.json"),
        r#"{ "routine": { "library": "build/libhang.so", "symbol": "bad_sleep", "kind": "solid-3d", "states": 0, "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    let file = d.join("hang.json");
    std::fs::write(
        &file,
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "hang",
  "libraries": [ {{ "output": "build/libhang.so", "sources": ["{}", "{}"] }} ],
  "routines": [ {{ "manifest": "sleeps.json", "expect": "fault" }} ] }}"#,
            examples.join("misbehave.c").display(),
            examples.join("elastic.c").display()
        ),
    )
    .unwrap();
    let mut child = bin()
        .arg("campaign")
        .arg(&file)
        .args(["--isolate", "-q"])
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let pid = child.id();
    let t0 = std::time::Instant::now();
    while workers_of(pid).is_empty() {
        assert!(t0.elapsed().as_secs() < 60, "no worker started");
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
    child.kill().unwrap(); // SIGKILL: the parent has no last words
    child.wait().unwrap();
    let t0 = std::time::Instant::now();
    while !workers_of(pid).is_empty() {
        assert!(t0.elapsed().as_secs() < 20, "the worker outlived its parent");
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
}

// Bad input whose message on standard error has no reader left (`2>&1 | head -0`)
// keeps its exit code 2 (it panicked, exit 101; found with `merge` by a user-style sweep).
#[test]
fn a_closed_error_pipe_keeps_the_exit_code() {
    let d = scratch("pipe-err");
    for args in
        [vec!["check", "no-such-manifest.json"], vec!["merge", "no-such-shard.json", "also-none.json"]]
    {
        let mut child = bin()
            .args(&args)
            .current_dir(&d)
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::piped())
            .spawn()
            .unwrap();
        drop(child.stderr.take());
        let status = child.wait().unwrap();
        assert_eq!(status.code(), Some(2), "{args:?}");
    }
}
