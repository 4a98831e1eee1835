//! Case files and `tancheck replay`: a case written by `tancheck bisect` reruns the failing
//! call with exactly its inputs and reproduces the stress and the tangent bit for bit, for the
//! Rust models and for the compiled C and Fortran routines; the bits are compared with a call
//! made here directly through the routine ABI, independent of the replay code. A changed
//! library is a warning; a folder of cases runs as a regression suite in which a broken file
//! is a warning with file and line; the printed debugger command stops at the routine.
//!
//! The Fortran half is ignored ("needs gfortran", cfg set by build.rs) without gfortran, and
//! runs (failing if it cannot build) when TANCHECK_REQUIRE_FORTRAN=1 (as in CI).

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::cli::cmd_replay::run_case_folder;
use tancheck::core::{
    CallInput, CallOutput, Convention, Outcome, PointKind, Routine, RoutineInfo, ShearMeasure,
};
use tancheck::models::zoo::{zoo_model, C_SOURCES, FORTRAN_SOURCES};
use tancheck_testkit::libs::{build_once, output_text as text, scratch};

const J2_PROPS: &str = "[210000, 0.3, 355, 1200, 150, 12, 2500]";
const COHESIVE_PROPS: &str = "[1e5, 60, 90, 0.3, 0.9, 2.0]";
const J2_PATH: &str = r#"{ "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 }"#;
const COHESIVE_PATH: &str = r#"{ "shape": "mixed-mode", "peak": 0.0032, "steps": 8, "back": 4 }"#;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn c_library() -> &'static Path {
    build_once("zoo-c", &C_SOURCES)
}

fn fortran_library() -> &'static Path {
    build_once("zoo-f", &FORTRAN_SOURCES)
}

/// A routine of a test: a built-in model, or a library symbol with its state count.
#[derive(Clone, Copy)]
enum Source<'a> {
    Model(&'a str),
    Library(&'a Path, &'a str, usize),
}

fn manifest(dir: &Path, src: Source<'_>, kind: &str, props: &str, path: &str) -> PathBuf {
    let routine = match src {
        Source::Model(m) => format!(r#"{{ "model": "{m}", "kind": "{kind}", "properties": {props} }}"#),
        Source::Library(lib, sym, n) => format!(
            r#"{{ "library": "{}", "symbol": "{sym}", "kind": "{kind}", "states": {n}, "properties": {props} }}"#,
            lib.display()
        ),
    };
    let m = dir.join("m.json");
    std::fs::write(&m, format!("{{ \"routine\": {routine}, \"path\": {path} }}\n")).unwrap();
    m
}

/// Bisect a manifest; the case files written (original first, then the shrunk one).
fn cases_of(m: &Path, shrink: bool) -> Vec<PathBuf> {
    let mut c = bin();
    c.arg("bisect").arg(m).args(["--json", "-"]);
    if !shrink {
        c.args(["--max-shrink-iterations", "0"]);
    }
    let o = c.output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let v: Value = serde_json::from_slice(&o.stdout).unwrap();
    v["cases"].as_array().unwrap().iter().map(|c| PathBuf::from(c.as_str().unwrap())).collect()
}

fn replay(case: &Path) -> (i32, Value) {
    let o = bin().arg("replay").arg(case).args(["--json", "-"]).output().unwrap();
    let v: Value = serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", text(&o)));
    (o.status.code().unwrap(), v)
}

fn read(p: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

/// The numbers of a `{ values, bits }` object, from the bits.
fn bits(v: &Value) -> Vec<f64> {
    v["bits"]
        .as_array()
        .unwrap()
        .iter()
        .map(|b| f64::from_bits(u64::from_str_radix(b.as_str().unwrap(), 16).unwrap()))
        .collect()
}

fn same_bits(a: &[f64], b: &[f64]) -> bool {
    a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x.to_bits() == y.to_bits())
}

/// Call `r` once with the inputs of a case, directly: (stress, state, tangent, branch).
fn call_directly(r: &mut dyn Routine, case: &Value) -> (Vec<f64>, Vec<f64>, Vec<f64>, i32) {
    let c = &case["call"];
    let info = r.info().clone();
    let n = info.convention.ncomp();
    let (props, strain, dstrain, stress0, state0) =
        (bits(&c["props"]), bits(&c["strain"]), bits(&c["dstrain"]), bits(&c["stress0"]), bits(&c["state0"]));
    let (temp, time) = (bits(&c["temp"]), bits(&c["time"]));
    let nan = f64::NAN;
    let (mut stress, mut state, mut tangent, mut dtemp) =
        (vec![nan; n], vec![nan; info.nstate], vec![nan; n * n], vec![nan; n]);
    let mut energy = [nan; 2];
    let mut outcome = Outcome::default();
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp: [temp[0], temp[1]],
        stress0: &stress0,
        state0: &state0,
        time: [time[0], time[1]],
        increment: c["increment"].as_i64().unwrap() as i32,
        want_tangent: true,
    };
    let mut output = CallOutput {
        stress: &mut stress,
        state: &mut state,
        tangent: &mut tangent,
        dstress_dtemp: &mut dtemp,
        energy: &mut energy,
        outcome: &mut outcome,
    };
    r.call(&input, &mut output).expect("the saved call succeeds");
    (stress, state, tangent, outcome.branch)
}

fn kind_of(k: &str) -> PointKind {
    k.parse().unwrap()
}

/// Bisect, replay the case, and compare: the replay's outputs, the case's outputs and a direct
/// call through the ABI have the same bits.
fn reproduces(src: Source<'_>, kind: &str, props: &str, path: &str, dir: &Path) {
    let m = manifest(fresh(dir), src, kind, props, path);
    let cases = cases_of(&m, false);
    assert_eq!(cases.len(), 1);
    let case = read(&cases[0]);
    let (code, r) = replay(&cases[0]);
    assert_eq!(code, 1, "the flaw is still there: {r:#}");
    assert_eq!(r["identical"], true, "{r:#}");
    assert!(r["differences"].as_array().unwrap().is_empty());
    let out = &case["outputs"];
    for what in ["stress", "state", "tangent"] {
        assert!(same_bits(&bits(&r[what]), &bits(&out[what])), "{what}: {:#} vs {:#}", r[what], out[what]);
    }
    assert_eq!(r["finding"], case["probe"]["finding"]);
    assert_eq!(r["path_leads_here"], "yes");
    // The same numbers of the check: errors of every scheme as written.
    assert_eq!(r["checks"], case["probe"]["checks"]);
    // A direct call through the ABI, outside the replay code.
    let k = kind_of(kind);
    let (stress, state, tangent, branch) = match src {
        Source::Model(name) => call_directly(&mut zoo_model(name, k).unwrap(), &case),
        Source::Library(lib, sym, nstate) => {
            let info = RoutineInfo {
                name: sym.into(),
                convention: Convention::new(k, ShearMeasure::Engineering),
                nstate,
                nprop: case["routine"]["nprop"].as_u64().unwrap() as usize,
            };
            let mut r = Library::open(lib).unwrap().routine(sym, info).unwrap();
            call_directly(&mut r, &case)
        }
    };
    assert!(same_bits(&stress, &bits(&out["stress"])), "stress of a direct call");
    assert!(same_bits(&state, &bits(&out["state"])), "state of a direct call");
    assert!(same_bits(&tangent, &bits(&out["tangent"])), "tangent of a direct call");
    assert_eq!(branch as i64, out["branch"].as_i64().unwrap());
    // A library case carries the library's SHA-256, a model case its name.
    match src {
        Source::Model(name) => {
            assert_eq!(case["routine"]["model"], name);
            assert!(case["routine"]["library_sha256"].is_null());
        }
        Source::Library(lib, sym, _) => {
            assert_eq!(case["routine"]["symbol"], sym);
            let h = case["routine"]["library_sha256"].as_str().unwrap();
            assert_eq!(h.len(), 64);
            if let Ok(o) = Command::new("sha256sum").arg(lib).output() {
                assert!(String::from_utf8_lossy(&o.stdout).starts_with(h), "sha256sum agrees");
            } else {
                eprintln!("NOTE: sha256sum not found; the library hash was not checked against it");
            }
        }
    }
    eprintln!("{}: replayed bit for bit ({})", cases[0].display(), r["routine"]);
}

#[test]
fn rust_cases_reproduce_bit_for_bit() {
    let d = scratch("rust");
    reproduces(Source::Model("j2-elastic-first-plastic"), "solid-3d", J2_PROPS, J2_PATH, &d.join("a"));
    reproduces(Source::Model("j2-reversal"), "solid-3d", J2_PROPS, J2_PATH, &d.join("b"));
    reproduces(Source::Model("cohesive-secant"), "cohesive-3d", COHESIVE_PROPS, COHESIVE_PATH, &d.join("c"));
}

#[test]
fn c_cases_reproduce_bit_for_bit() {
    let d = scratch("c");
    let lib = c_library();
    reproduces(
        Source::Library(lib, "c_j2_elastic_first_plastic", 13),
        "solid-3d",
        J2_PROPS,
        J2_PATH,
        &d.join("a"),
    );
    reproduces(Source::Library(lib, "c_j2_reversal", 19), "solid-3d", J2_PROPS, J2_PATH, &d.join("b"));
    reproduces(
        Source::Library(lib, "c_cohesive_secant", 2),
        "cohesive-3d",
        COHESIVE_PROPS,
        COHESIVE_PATH,
        &d.join("c"),
    );
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_cases_reproduce_bit_for_bit() {
    let d = scratch("fortran");
    let lib = fortran_library();
    reproduces(
        Source::Library(lib, "f_j2_elastic_first_plastic", 13),
        "solid-3d",
        J2_PROPS,
        J2_PATH,
        &d.join("a"),
    );
    reproduces(
        Source::Library(lib, "f_cohesive_secant", 2),
        "cohesive-3d",
        COHESIVE_PROPS,
        COHESIVE_PATH,
        &d.join("c"),
    );
}

/// `d`, created when missing.
fn fresh(d: &Path) -> &Path {
    std::fs::create_dir_all(d).unwrap();
    d
}

#[test]
fn a_changed_library_is_a_warning_and_the_readable_replay_has_the_numbers() {
    let d = scratch("changed");
    // A private copy of the library, so it can be changed.
    let lib = d.join("libcopy.so");
    std::fs::copy(c_library(), &lib).unwrap();
    let m = manifest(
        fresh(&d),
        Source::Library(&lib, "c_j2_elastic_first_plastic", 13),
        "solid-3d",
        J2_PROPS,
        J2_PATH,
    );
    let case = cases_of(&m, false).remove(0);
    // The library path in the case is relative to the case folder (tancheck-cases/m/).
    let c = read(&case);
    assert_eq!(c["routine"]["library"], "../../libcopy.so");
    let o = bin().arg("replay").arg(&case).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    assert!(!t.contains("warning"), "{t}");
    assert!(t.contains("bit for bit"), "{t}");
    // The stress as printed is the case's, to every digit.
    let stress = bits(&c["outputs"]["stress"]);
    assert!(t.contains(&format!("{:e}", stress[0])), "{t}");
    // So are the call's inputs, each on its line (they were not printed: what the call was
    // given had to be read from the case file; a user-style sweep).
    for what in ["strain", "dstrain", "stress0", "state0", "props"] {
        let want = bits(&c["call"][what]);
        let line = t.lines().find(|l| l.trim_start().starts_with(&format!("{what} "))).unwrap_or("");
        for x in &want {
            assert!(line.contains(&format!("{x:e}")), "{what}: {line}\n{t}");
        }
    }
    assert!(t.contains(&format!("inputs (increment {})", c["call"]["increment"])), "{t}");
    assert!(
        t.contains("gdb") && t.contains("--args") && t.contains("break c_j2_elastic_first_plastic"),
        "{t}"
    );
    // Trailing bytes leave the library loadable but change its hash.
    let mut bytes = std::fs::read(&lib).unwrap();
    bytes.extend_from_slice(b"changed after the case was written");
    std::fs::write(&lib, bytes).unwrap();
    let o = bin().arg("replay").arg(&case).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    assert!(t.contains("warning:") && t.contains("changed since the case was written"), "{t}");
    let line = t.lines().find(|l| l.contains("changed since")).unwrap();
    assert!(line.contains(&format!("{}:", case.display())), "file and line: {line}");
}

#[test]
fn the_shrunk_case_carries_a_path_that_leads_to_its_call() {
    let d = scratch("shrunk");
    let m = manifest(&d, Source::Library(c_library(), "c_j2_reversal", 19), "solid-3d", J2_PROPS, J2_PATH);
    let cases = cases_of(&m, true);
    assert_eq!(cases.len(), 2, "{cases:?}");
    let shrunk = read(&cases[1]);
    assert_eq!(shrunk["origin"]["shrunk_from"], 12);
    let n = shrunk["path"]["increments"].as_array().unwrap().len();
    assert!(n <= 3, "{n}");
    let (code, r) = replay(&cases[1]);
    assert_eq!(code, 1);
    assert_eq!(r["identical"], true);
    assert_eq!(r["path_leads_here"], "yes");
    assert_eq!(r["finding"], "term-sign");
}

#[test]
fn a_folder_of_cases_is_a_regression_suite_and_broken_files_are_warnings() {
    let d = scratch("folder");
    let m = manifest(&d, Source::Model("j2-elastic-first-plastic"), "solid-3d", J2_PROPS, J2_PATH);
    let cases = cases_of(&m, true);
    assert_eq!(cases.len(), 2);
    let dir = cases[0].parent().unwrap().to_path_buf();
    // Each manifest has its own case folder.
    assert_eq!(dir, d.join("tancheck-cases").join("m"));
    // The fix: the consistent J2 model has the same layout; its tangent passes at that call.
    let text0 = std::fs::read_to_string(&cases[0]).unwrap();
    let fixed = text0.replace("\"model\": \"j2-elastic-first-plastic\"", "\"model\": \"j2\"");
    assert_ne!(fixed, text0);
    std::fs::write(dir.join("fixed.json"), &fixed).unwrap();
    // Broken files: cut short, a bad bit pattern, wrong sizes, not JSON; other files are ignored.
    std::fs::write(dir.join("cut.json"), &text0[..text0.len() / 3]).unwrap();
    let bad_bits = text0.replacen("\"bits\": [\"", "\"bits\": [\"zz", 1);
    std::fs::write(dir.join("bits.json"), &bad_bits).unwrap();
    std::fs::write(dir.join("empty.json"), "").unwrap();
    std::fs::write(dir.join("notes.txt"), "not a case").unwrap();
    let r = run_case_folder(&dir);
    assert_eq!(r.passed.len(), 1, "{r:#?}");
    assert_eq!(r.failed.len(), 2, "the flaw is still in the original routine");
    assert_eq!(r.broken.len(), 3, "{:#?}", r.broken);
    assert_eq!(r.exit_code(), 1);
    let p = &r.passed[0].report;
    assert!(p.pass && !p.identical, "the fixed routine returns another tangent: {p:#?}");
    for b in &r.broken {
        let file = b.split(':').next().unwrap();
        assert!(file.ends_with(".json"), "{b}");
        let line: usize =
            b.split(':').nth(1).unwrap().parse().unwrap_or_else(|_| panic!("a line number: {b}"));
        assert!(line >= 1, "{b}");
    }
    let bits_warning = r.broken.iter().find(|b| b.contains("bits.json")).unwrap();
    let want_line = bad_bits.lines().position(|l| l.contains("\"zz")).unwrap() + 1;
    assert!(bits_warning.contains(&format!("bits.json:{want_line}:")), "{bits_warning} (line {want_line})");
    assert!(bits_warning.contains("16 hex digits"), "{bits_warning}");
    assert!(r.broken.iter().any(|b| b.contains("cut.json") && b.contains("EOF")), "{:#?}", r.broken);
    let mut out = Vec::new();
    {
        use tancheck::cli::report::Reporter;
        let mut t = tancheck::cli::report::terminal::Terminal::new(
            tancheck::cli::report::terminal::Detail::Normal,
            &mut out,
        );
        t.cases(&r).unwrap();
    }
    let s = String::from_utf8(out).unwrap();
    assert!(s.contains("cases: 1 pass, 2 fail, 3 broken"), "{s}");
    // A missing folder is a warning too, not a crash.
    let r = run_case_folder(&d.join("no-such-folder"));
    assert_eq!((r.passed.len(), r.failed.len(), r.broken.len()), (0, 0, 1));
    // `tancheck replay` on a broken case: exit 2 with file and line.
    let o = bin().arg("replay").arg(dir.join("cut.json")).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("cut.json:"), "{}", text(&o));
    // And on the fixed one: exit 0, the outputs differ from the case.
    let (code, v) = replay(&dir.join("fixed.json"));
    assert_eq!(code, 0, "{v:#}");
    assert!(v["differences"].as_array().unwrap().iter().any(|x| x.as_str().unwrap().starts_with("tangent")));
}

#[test]
#[cfg_attr(tancheck_no_gdb, ignore = "needs gdb, allowed to trace (ptrace) here")]
fn the_debugger_command_stops_in_the_routine() {
    let d = scratch("gdb");
    let m = manifest(
        &d,
        Source::Library(c_library(), "c_j2_elastic_first_plastic", 13),
        "solid-3d",
        J2_PROPS,
        J2_PATH,
    );
    let case = cases_of(&m, false).remove(0);
    let (_, r) = replay(&case);
    let words: Vec<String> =
        r["debugger_args"].as_array().unwrap().iter().map(|w| w.as_str().unwrap().to_string()).collect();
    assert_eq!(words[0], "gdb");
    let o = Command::new("gdb").arg("-batch").args(&words[1..]).output().unwrap();
    let t = text(&o);
    assert!(t.contains("Breakpoint 1, ") && t.contains("c_j2_elastic_first_plastic"), "{t}");
}

/// `symbol` of the misbehaving example routines on a uniaxial-strain path of 4 increments,
/// bisected (it faults: exit 3): the scratch folder, the manifest and bisect's JSON report.
fn bisect_misbehaving(name: &str, symbol: &str) -> (PathBuf, PathBuf, Value) {
    let d = scratch(name);
    let lib = d.join("libmisbehave.so");
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/misbehave.c");
    build_library(&BuildOptions::new([src], &lib)).unwrap();
    let m = manifest(
        &d,
        Source::Library(&lib, symbol, 0),
        "solid-3d",
        "[210000, 0.3]",
        r#"{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 4 }"#,
    );
    let o = bin().arg("bisect").arg(&m).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(3), "{symbol}: {}", text(&o));
    (d, m, serde_json::from_slice(&o.stdout).unwrap())
}

// A routine that crashes from increment 2 on (it reads the increment number): bisect writes
// the crashing call, and the replay makes exactly that call again, increment number included,
// and faults the same way; the debugger command breaks in the routine.
#[test]
fn a_crashing_call_is_saved_and_replayed_with_its_increment_number() {
    let (d, _, v) = bisect_misbehaving("crash", "bad_null_deref");
    assert_eq!(v["located"]["increment"], 2, "{v:#}");
    assert_eq!(v["located"]["finding"], "routine-fault");
    // Every fraction of increment 2 crashes: the crash does not start inside it.
    assert_eq!(v["located"]["inside"]["found"], "throughout", "{:#}", v["located"]["inside"]);
    let case = PathBuf::from(v["cases"][0].as_str().unwrap());
    let c = read(&case);
    assert_eq!(c["call"]["increment"], 2);
    assert_eq!(c["probe"]["finding"], "routine-fault");
    assert!(c["probe"]["reason"].as_str().unwrap().contains("SIGSEGV"), "{:#}", c["probe"]);
    let (code, r) = replay(&case);
    assert_eq!(code, 3, "{r:#}");
    assert!(r["fault"].as_str().unwrap().contains("SIGSEGV"), "{r:#}");
    assert!(r["debugger"].as_str().unwrap().contains("break bad_null_deref"), "{r:#}");
    // The same call as increment 1 does not crash: the increment number is part of the inputs.
    let text1 = std::fs::read_to_string(&case).unwrap().replacen("\"increment\": 2", "\"increment\": 1", 1);
    let case1 = d.join("as-increment-1.json");
    std::fs::write(&case1, text1).unwrap();
    let (code, r) = replay(&case1);
    assert!(r["fault"].is_null(), "{r:#}");
    // Moved out of its folder, the case finds the library where it was written.
    assert!(r["warnings"][0].as_str().unwrap().contains("using"), "{r:#}");
    assert_eq!(code, 0, "{r:#}");
}

// A crash in a perturbed call only (a difference scheme's call, the base call clean): the case
// bisect writes replays as a fault, exit 3, as the check that found it said, and a folder of
// such cases makes `check --cases` a fault too (it read FAIL, exit 1, "the returned tangent
// still differs", with the complex step agreeing exactly; a user-style sweep).
#[test]
fn a_crash_in_a_perturbed_call_replays_as_a_fault() {
    let (_, m, v) = bisect_misbehaving("perturbed-crash", "bad_perturbed_crash");
    let case = PathBuf::from(v["cases"][0].as_str().unwrap());
    let (code, r) = replay(&case);
    assert_eq!(code, 3, "{r:#}");
    assert_eq!((r["finding"].as_str(), r["pass"].as_bool()), (Some("routine-fault"), Some(false)), "{r:#}");
    assert!(r["fault"].is_null(), "the base call is clean: {r:#}");
    let o = bin()
        .arg("check")
        .arg(&m)
        .args(["--cases", "-q", "--path", "uniaxial-strain:0.001:1"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(3), "{}", text(&o));
    assert!(text(&o).contains("FAULT"), "{}", text(&o));
}

// A report, a manifest or a list given to `replay` for a case is said to be that, with where
// the case files are (it said "missing field `about`", the first field a case has).
#[test]
fn another_file_given_for_a_case_is_named_for_what_it_is() {
    let d = scratch("not-a-case");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    let r = d.join("r.json");
    let o = bin().arg("check").arg(&m).arg("-q").arg("--json").arg(&r).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let list = d.join("list.json");
    std::fs::write(&list, "[1, 2]").unwrap();
    for (file, what) in
        [(&r, "a tancheck report of kind `check`"), (&m, "a manifest"), (&list, "a JSON array")]
    {
        let o = bin().arg("replay").arg(file).output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{t}");
        assert!(t.contains(&format!("{what}, not a case")) && t.contains("tancheck-cases/"), "{t}");
    }
    // A finite-strain manifest is said to be one, with where its cases come from.
    let f = d.join("f.json");
    std::fs::write(
        &f,
        r#"{ "finite": { "stress": "kirchhoff", "tangent": "tau-jaumann", "frame": "none" },
             "routine": { "model": "neo-hookean", "properties": [1.0, 4.0] } }"#,
    )
    .unwrap();
    let o = bin().arg("replay").arg(&f).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(2), "{t}");
    assert!(
        t.contains("a finite-strain manifest (`tancheck bisect` on it writes its finite-strain case"),
        "{t}"
    );
}
