//! The JSON report's schema: the shipped file is what the Rust types generate, and real
//! reports of every kind (check passing and failing, probe suite, bisect, replay) validate
//! against it. `TANCHECK_BLESS=1 cargo test --test report_schema` rewrites the shipped file.

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use tancheck::cli::report::schema::{schema_text, SCHEMA_FILE};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-schema-test-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn shipped() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(SCHEMA_FILE)
}

#[test]
fn the_shipped_schema_is_what_the_types_generate() {
    let now = schema_text();
    if std::env::var("TANCHECK_BLESS").is_ok_and(|v| v == "1") {
        std::fs::create_dir_all(shipped().parent().unwrap()).unwrap();
        std::fs::write(shipped(), &now).unwrap();
    }
    let file = std::fs::read_to_string(shipped()).unwrap_or_default();
    assert!(
        file == now,
        "{} is stale: regenerate it with TANCHECK_BLESS=1 cargo test --test report_schema",
        shipped().display()
    );
    // It is a schema a validator accepts, and it names the format.
    let v: Value = serde_json::from_str(&file).unwrap();
    jsonschema::meta::validate(&v).expect("a valid JSON Schema");
    assert!(file.contains("tancheck-report"));
}

fn validator() -> jsonschema::Validator {
    let v: Value = serde_json::from_str(&schema_text()).unwrap();
    jsonschema::validator_for(&v).expect("the schema compiles")
}

/// Validate `report`, with every error named.
fn valid(what: &str, report: &Value) {
    let errors: Vec<String> =
        validator().iter_errors(report).take(10).map(|e| format!("{} at {}", e, e.instance_path())).collect();
    assert!(errors.is_empty(), "{what}: the report does not match the schema:\n{}", errors.join("\n"));
    assert_eq!(report["format"], "tancheck-report", "{what}");
    assert_eq!(report["version"], 1, "{what}");
}

fn manifest(dir: &Path, name: &str, model: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(
        &p,
        format!(
            r#"{{ "routine": {{ "model": "{model}", "kind": "solid-3d",
  "properties": [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0] }},
  "path": {{ "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 }} }}"#
        ),
    )
    .unwrap();
    p
}

fn json_of(args: &[&str], out: &Path) -> Value {
    let o = bin().args(args).arg("--json").arg(out).output().unwrap();
    assert!(
        matches!(o.status.code(), Some(0 | 1)),
        "{args:?}: {}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    let v: Value = serde_json::from_str(&std::fs::read_to_string(out).unwrap()).unwrap();
    // Every report that gives an exit code gives the one the run ended with.
    if let Some(code) = v.get("exit_code") {
        assert_eq!(code.as_i64(), o.status.code().map(i64::from), "{args:?}");
    }
    v
}

#[test]
fn real_reports_of_every_kind_validate() {
    let d = scratch("kinds");
    let ok = manifest(&d, "ok.json", "j2");
    let bad = manifest(&d, "bad.json", "j2-continuum");
    let s = |p: &Path| p.display().to_string();

    let pass = json_of(&["check", &s(&ok)], &d.join("pass.json"));
    valid("check (pass)", &pass);
    assert_eq!((pass["kind"].as_str(), pass["verdict"].as_str()), (Some("check"), Some("pass")));
    assert_eq!(pass["exit_code"], 0);
    // The compact form: a record per increment, no passing increment in full.
    assert_eq!(pass["records"].as_array().unwrap().len(), 12);
    assert!(pass["increments"].as_array().unwrap().is_empty());
    assert!(pass["records"][0]["strain"][0].is_number(), "numbers as numbers: {}", pass["records"][0]);

    let fail = json_of(&["check", &s(&bad)], &d.join("fail.json"));
    valid("check (fail)", &fail);
    assert_eq!((fail["verdict"].as_str(), fail["exit_code"].as_i64()), (Some("tangent-failure"), Some(1)));
    let full = fail["increments"].as_array().unwrap();
    assert!(!full.is_empty() && full.iter().all(|i| i["diagnosis"].is_object()), "{full:?}");

    let verbose = json_of(&["check", &s(&ok), "-v"], &d.join("verbose.json"));
    valid("check (every increment in full)", &verbose);
    assert_eq!(verbose["increments"].as_array().unwrap().len(), 12);

    let probe = json_of(&["probe", &s(&ok)], &d.join("probe.json"));
    valid("probe suite", &probe);
    assert_eq!(probe["kind"], "probe-suite");

    let bisect = json_of(&["bisect", &s(&bad), "--max-shrink-iterations", "20"], &d.join("bisect.json"));
    valid("bisect", &bisect);
    assert_eq!(bisect["kind"], "bisect");
    let case = bisect["cases"][0].as_str().expect("a case file written").to_string();

    let replay = json_of(&["replay", &case], &d.join("replay.json"));
    valid("replay", &replay);
    assert_eq!(replay["kind"], "replay");

    // And a report that breaks the schema is caught (the validation can fail).
    let mut broken = pass.clone();
    broken["records"][0]["strain"][0] = Value::String("1e-3".into());
    assert!(!validator().is_valid(&broken));
    let mut unversioned = pass;
    unversioned["format"] = Value::String("something-else".into());
    assert!(!validator().is_valid(&unversioned));
    let _ = std::fs::remove_dir_all(&d);
}

/// The reports of runs that did not finish validate too: the last words of a check whose
/// routine hangs (written by the guarded shim as the process ends), the parent's report when
/// an `--isolate` worker hangs, and the "incomplete" marker a run leaves while it runs.
#[test]
fn reports_of_runs_that_did_not_finish_validate() {
    let d = scratch("unfinished");
    let lib = d.join("libmisbehave.so");
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/misbehave.c");
    let o = bin().arg("build").arg(&src).arg("-o").arg(&lib).output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let m = |symbol: &str| {
        let p = d.join(format!("{symbol}.json"));
        std::fs::write(
            &p,
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "solid-3d", "states": 2, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 3 }} }}"#,
                lib.display()
            ),
        )
        .unwrap();
        p
    };
    // A failing check whose derivatives are not finite numbers (the routine reads a tangent it
    // was not asked for): its errors are infinite and its derivatives NaN, which the report
    // writes as null; the schema says so (it rejected these reports before).
    let nan = d.join("non-finite.json");
    let o = bin().arg("check").arg(m("bad_unasked_tangent")).arg("--json").arg(&nan).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", String::from_utf8_lossy(&o.stderr));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&nan).unwrap()).unwrap();
    assert!(v["increments"][0]["checks"][0]["tangent"]["norm_error"].is_null(), "{:#}", v["increments"][0]);
    valid("check with non-finite derivatives", &v);

    let hang = m("bad_infinite_loop");
    for (isolate, kind) in [(false, "last-words"), (true, "isolated-fault")] {
        let out = d.join(format!("{kind}.json"));
        let mut c = bin();
        c.arg("check").arg(&hang).args(["--call-timeout", "1", "-q"]).arg("--json").arg(&out);
        if isolate {
            c.arg("--isolate");
        }
        let o = c.output().unwrap();
        assert_eq!(o.status.code(), Some(3), "{}", String::from_utf8_lossy(&o.stderr));
        let v: Value = serde_json::from_str(&std::fs::read_to_string(&out).unwrap()).unwrap();
        valid(kind, &v);
        assert_eq!((v["kind"].as_str(), v["verdict"].as_str()), (Some(kind), Some("routine-fault")));
    }

    // The marker, read while a routine sleeps in its second increment.
    let out = d.join("marker.json");
    let mut child = bin()
        .arg("check")
        .arg(m("bad_sleep"))
        .args(["--call-timeout", "60", "-q"])
        .arg("--json")
        .arg(&out)
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let start = std::time::Instant::now();
    let marker = loop {
        if let Some(v) =
            std::fs::read_to_string(&out).ok().and_then(|t| serde_json::from_str::<Value>(&t).ok())
        {
            break v;
        }
        assert!(start.elapsed().as_secs() < 30, "no marker written");
        std::thread::sleep(std::time::Duration::from_millis(20));
    };
    let _ = child.kill();
    let _ = child.wait();
    valid("incomplete", &marker);
    assert_eq!(
        (marker["kind"].as_str(), marker["verdict"].as_str()),
        (Some("incomplete"), Some("incomplete"))
    );
    let _ = std::fs::remove_dir_all(&d);
}
