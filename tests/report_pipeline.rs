//! The report pipeline end to end: the C API and the command line write the same JSON for the
//! same run; colour follows --color and NO_COLOR; -q is accepted by every command and prints
//! one line per failing check plus the verdict; a closed pipe ends with the verdict's code;
//! runs of passing increments fold into one line; `check --cases` replays only the cases of
//! the routine it checks.

use std::ffi::CString;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use serde_json::Value;

#[path = "../benches/common/mod.rs"]
mod common;

fn bin() -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_tancheck"));
    // The tests set colour themselves.
    c.env_remove("NO_COLOR").env_remove("CLICOLOR_FORCE").env_remove("CLICOLOR");
    c
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-pipeline-test-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn model_manifest(dir: &Path, name: &str, model: &str) -> PathBuf {
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

#[test]
fn the_c_api_and_the_command_line_write_the_same_json() {
    let d = scratch("same-json");
    let lib = common::routine_library(&d);
    let (_, manifest) = common::manifest(&d, &lib, common::J2, "light");
    let cli_file = d.join("cli.json");
    let o = bin().arg("check").arg(&manifest).arg("--json").arg(&cli_file).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let cli: Value = serde_json::from_str(&std::fs::read_to_string(&cli_file).unwrap()).unwrap();

    // The same routine through the C API, named as the command line names it, with the same
    // default path, settings and guard level.
    // SAFETY: the library holds the example routines of the routine ABI.
    let library = unsafe { libloading::Library::new(&lib) }.unwrap();
    // SAFETY: the symbols have the routine ABI's real and complex signatures.
    let (real, twin) = unsafe {
        (
            *library.get::<tancheck::abi::signal_guard::RealFn>(b"c_j2\0").unwrap(),
            *library.get::<tancheck_capi::check::TwinFn>(b"c_j2_cx\0").unwrap(),
        )
    };
    let name = CString::new(cli["routine"]["name"].as_str().unwrap()).unwrap();
    let mut o = tancheck_capi::Options::default();
    // SAFETY: a valid struct to write to.
    assert_eq!(unsafe { tancheck_capi::tck_options_init(&mut o) }, 0);
    o.name = name.as_ptr();
    o.nproperties = common::J2_PROPS.len() as i32;
    o.properties = common::J2_PROPS.as_ptr();
    o.nstate = common::J2.states as i32;
    o.temperature = cli_start_temperature();
    let mut r = std::ptr::null_mut();
    // SAFETY: valid pointers; the routines have the ABI's signatures.
    let status = unsafe { tancheck_capi::tck_check(&mut r, Some(real), Some(twin), &o) };
    assert_eq!(status, 0);
    // SAFETY: a live result, freed once.
    let capi: Value = unsafe {
        let j = std::ffi::CStr::from_ptr(tancheck_capi::tck_result_json(r)).to_str().unwrap().to_string();
        tancheck_capi::tck_result_free(r);
        serde_json::from_str(&j).unwrap()
    };
    assert_eq!(capi["format"], "tancheck-report");
    assert_eq!(capi["kind"], "check");
    assert!(capi["guard"].is_object() && cli["guard"].is_object());
    assert_eq!(capi, cli, "the C API and the command line wrote different reports for the same run");
    let _ = std::fs::remove_dir_all(&d);
}

/// The start temperature of a manifest that gives none (the C API's must match it).
fn cli_start_temperature() -> f64 {
    let text = r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [1, 2, 3, 4, 5, 6, 7] } }"#;
    let m = tancheck::cli::manifest::Manifest::parse(text, Path::new("m.json")).unwrap();
    m.start.temperature
}

const ESC: char = '\u{1b}';

#[test]
fn colour_follows_the_option_and_no_color() {
    let d = scratch("colour");
    let bad = model_manifest(&d, "bad.json", "j2-continuum");
    let run = |args: &[&str], no_color: bool| {
        let mut c = bin();
        c.arg("check").arg(&bad).args(args);
        if no_color {
            c.env("NO_COLOR", "1");
        }
        let o = c.output().unwrap();
        assert_eq!(o.status.code(), Some(1), "{}", text(&o));
        String::from_utf8_lossy(&o.stdout).into_owned()
    };
    let always = run(&["--color", "always"], false);
    assert!(always.contains(ESC), "--color always colours:\n{always}");
    for (args, no_color) in [
        (&["--color", "never"][..], false),
        (&[][..], true),
        (&["--color", "auto"][..], true),
        (&[][..], false),
    ] {
        let out = run(args, no_color);
        // Standard output is a pipe here, so auto means no colour too.
        assert!(!out.contains(ESC), "{args:?} NO_COLOR={no_color}: escape codes in\n{out}");
        assert!(out.contains("verdict: FAIL"), "{out}");
    }
    // Every other command honours it as well.
    let o = bin().args(["probe"]).arg(&bad).args(["--color", "never"]).output().unwrap();
    assert!(!String::from_utf8_lossy(&o.stdout).contains(ESC));
    let o = bin().args(["probe"]).arg(&bad).env("NO_COLOR", "1").output().unwrap();
    assert!(!String::from_utf8_lossy(&o.stdout).contains(ESC));
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn quiet_is_one_line_per_failing_check_and_the_verdict_in_every_command() {
    let d = scratch("quiet");
    let bad = model_manifest(&d, "bad.json", "j2-continuum");
    let ok = model_manifest(&d, "ok.json", "j2");
    let o = bin().arg("check").arg(&bad).arg("-q").output().unwrap();
    assert_eq!(o.status.code(), Some(1));
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    let lines: Vec<&str> = out.lines().collect();
    let full: Value = {
        let j = d.join("bad-report.json");
        bin().arg("check").arg(&bad).arg("--json").arg(&j).output().unwrap();
        serde_json::from_str(&std::fs::read_to_string(&j).unwrap()).unwrap()
    };
    let failing = full["records"].as_array().unwrap().iter().filter(|r| r["pass"] == false).count();
    assert!(failing > 0);
    assert_eq!(lines.len(), failing + 1, "one line per failing increment and the verdict:\n{out}");
    assert!(lines[..failing].iter().all(|l| l.starts_with("FAIL ") && l.contains("increment")), "{out}");
    assert!(lines[failing].contains("verdict: FAIL"), "{out}");

    let o = bin().arg("check").arg(&ok).arg("-q").output().unwrap();
    assert_eq!(o.status.code(), Some(0));
    assert_eq!(String::from_utf8_lossy(&o.stdout).lines().count(), 1, "{}", text(&o));

    // Accepted by every command.
    let o = bin().arg("probe").arg(&ok).arg("-q").output().unwrap();
    assert!(matches!(o.status.code(), Some(0 | 1)), "{}", text(&o));
    assert!(String::from_utf8_lossy(&o.stdout).lines().last().unwrap().contains("verdict:"), "{}", text(&o));
    let o = bin()
        .arg("bisect")
        .arg(&bad)
        .args(["-q", "--max-shrink-iterations", "0", "--case-dir"])
        .arg(d.join("c"))
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert_eq!(out.lines().count(), 2, "the first failure and the verdict:\n{out}");
    let case = std::fs::read_dir(d.join("c")).unwrap().next().unwrap().unwrap().path();
    let o = bin().arg("replay").arg(&case).arg("-q").output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    assert_eq!(String::from_utf8_lossy(&o.stdout).lines().count(), 2, "{}", text(&o));
    for args in [
        &["models", "-q"][..],
        &["build", "-q", "--help"][..],
        &["demo", "-q", "--help"][..],
        &["selftest", "-q", "--help"][..],
    ] {
        let o = bin().args(args).output().unwrap();
        assert_eq!(o.status.code(), Some(0), "{args:?}: {}", text(&o));
    }
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn a_closed_pipe_ends_with_the_verdicts_code_and_no_panic() {
    // `tancheck selftest | head -3`: the shell's view of tancheck's status.
    let o = Command::new("bash")
        .arg("-c")
        .arg(format!("{} selftest | head -3; exit ${{PIPESTATUS[0]}}", env!("CARGO_BIN_EXE_tancheck")))
        .env_remove("NO_COLOR")
        .output()
        .unwrap();
    let t = text(&o);
    assert_eq!(String::from_utf8_lossy(&o.stdout).lines().count(), 3, "{t}");
    assert!(!t.contains("panicked"), "{t}");
    // Every row of the selftest is right here, so the verdict is a pass.
    assert_eq!(o.status.code(), Some(0), "{t}");
}

#[test]
fn passing_increments_fold_into_one_line() {
    let d = scratch("fold");
    let ok = model_manifest(&d, "ok.json", "j2");
    let o = bin().arg("check").arg(&ok).output().unwrap();
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(out.contains("  1–12   ok 12 increments;"), "{out}");
    // The verbose report still has a row per increment.
    let o = bin().arg("check").arg(&ok).arg("-v").output().unwrap();
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(out.contains("\n    12  #1 (state changed)") || out.contains("\n    12  #0"), "{out}");
    // A failing path: failing increments keep their rows, passing runs fold around them.
    let bad = model_manifest(&d, "bad.json", "j2-continuum");
    let o = bin().arg("check").arg(&bad).output().unwrap();
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(out.contains("  1–3    ok 3 increments; #0 (state unchanged) ×3"), "{out}");
    assert!(out.contains("\n     4  #1 (state changed)"), "{out}");
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn check_replays_only_the_cases_of_its_own_routine() {
    let d = scratch("cases");
    // Two manifests side by side, two routines with a flaw each.
    let a = model_manifest(&d, "a.json", "j2-continuum");
    let b = model_manifest(&d, "b.json", "j2-plastic-sign");
    for m in [&a, &b] {
        let o = bin().arg("bisect").arg(m).args(["--max-shrink-iterations", "0"]).output().unwrap();
        assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    }
    let (da, db) = (d.join("tancheck-cases/a"), d.join("tancheck-cases/b"));
    let count = |dir: &Path| std::fs::read_dir(dir).unwrap().count();
    assert!(count(&da) >= 1 && count(&db) >= 1, "each manifest has its own case folder");
    // A case of b copied among a's: `check a --cases` sets it aside.
    let theirs = std::fs::read_dir(&db).unwrap().next().unwrap().unwrap().path();
    std::fs::copy(&theirs, da.join(theirs.file_name().unwrap())).unwrap();
    let o = bin().arg("check").arg(&a).arg("--cases").output().unwrap();
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(
        out.contains(&format!("cases: 0 pass, {} fail, 0 broken, 1 of other routines", count(&da) - 1)),
        "{out}"
    );
    assert!(!out.contains("j2-plastic-sign"), "{out}");
    // --all-cases runs them all.
    let o = bin().arg("check").arg(&a).args(["--cases", "--all-cases"]).output().unwrap();
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(out.contains(&format!("cases: 0 pass, {} fail, 0 broken\n", count(&da))), "{out}");
    let _ = std::fs::remove_dir_all(&d);
}
