//! `tancheck check` and `tancheck probe` on finite-strain manifests naming C and Fortran
//! routines, in every tangent measure each routine implements (j2-log: all seven): the neo-Hookean, j2-log and
//! hypoelastic Jaumann examples pass (exit 0), their flawed variants fail with the cause named
//! (exit 1), the hypoelastic routine that never applies the rotation increment fails the
//! probes, and a built-in model given the wrong number of properties is bad input (exit 2).

use std::path::{Path, PathBuf};
use std::process::Command;

use tancheck_testkit::libs::{build_examples, output_text, scratch};

const J2_PROPERTIES: &str = "[1000, 0.3, 5, 20]";
const ELASTIC: &str = "[1000, 0.3]";

fn c_lib() -> &'static Path {
    build_examples("finite_cli_c", &["c/finite_nh.c", "c/finite_j2.c", "c/finite_hypo.c"])
}

fn f_lib() -> &'static Path {
    build_examples(
        "finite_cli_f",
        &["fortran/finite_nh.F90", "fortran/finite_j2.F90", "fortran/finite_hypo.F90"],
    )
}

fn tancheck(args: &[&str]) -> (i32, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    (o.status.code().unwrap_or(-1), output_text(&o))
}

struct Manifest<'a> {
    lib: &'a Path,
    symbol: &'a str,
    stress: &'a str,
    tangent: &'a str,
    frame: &'a str,
    properties: &'a str,
    states: usize,
    extra: &'a str,
}

fn write(dir: &Path, name: &str, m: &Manifest) -> String {
    let text = format!(
        r#"{{ "finite": {{ "stress": "{}", "tangent": "{}", "frame": "{}" }},
           "routine": {{ "library": "{}", "symbol": "{}", "states": {}, "properties": {} }},
           "path": {{ "shape": "biaxial", "stretch": [1.3, 0.9], "increments": 3,
                      "rotation": {{ "axis": [1, -0.5, 0.3], "angle": 0.9 }} }}{} }}"#,
        m.stress,
        m.tangent,
        m.frame,
        m.lib.display(),
        m.symbol,
        m.states,
        m.properties,
        m.extra
    );
    let p: PathBuf = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.display().to_string()
}

fn every_measure(lib: &Path, prefix: &str, dir: &Path) {
    let j2 = |tangent, stress| Manifest {
        lib,
        symbol: "",
        stress,
        tangent,
        frame: "none",
        properties: J2_PROPERTIES,
        states: 7,
        extra: r#", "probes": { "tensor_state": [0] }"#,
    };
    for (tangent, stress) in [
        ("tau-jaumann", "kirchhoff"),
        ("tau-green-naghdi", "cauchy"),
        ("sigma-jaumann", "cauchy"),
        ("tau-truesdell", "kirchhoff"),
        ("sigma-truesdell", "cauchy"),
        ("dp-df", "cauchy"),
        ("ds-de", "kirchhoff"),
    ] {
        let symbol = format!("{prefix}_j2log");
        let file =
            write(dir, &format!("j2-{tangent}.json"), &Manifest { symbol: &symbol, ..j2(tangent, stress) });
        let (code, out) = tancheck(&["check", &file]);
        assert_eq!(code, 0, "{symbol} {tangent}: {out}");
        let (code, out) = tancheck(&["probe", &file]);
        assert_eq!(code, 0, "{symbol} {tangent} probes: {out}");
    }
    // Its elastic log strain, a spatial tensor, declared a scalar: the rotation probes fail,
    // and say that the stress rotates where the state does not (a correct routine keeping a
    // tensor of the reference configuration read "NOT objective" with no word; a user-style
    // sweep).
    let symbol = format!("{prefix}_j2log");
    let undeclared = Manifest {
        symbol: &symbol,
        extra: r#", "probes": { "tensor_state": [] }"#,
        ..j2("tau-jaumann", "kirchhoff")
    };
    let file = write(dir, "j2-undeclared.json", &undeclared);
    let (code, out) = tancheck(&["probe", &file]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("the stress rotates as it should and the state does not follow"), "{out}");
    for tangent in ["tau-jaumann", "sigma-jaumann", "tau-truesdell", "sigma-truesdell"] {
        let symbol = format!("{prefix}_nh");
        let m =
            Manifest { symbol: &symbol, properties: ELASTIC, states: 0, extra: "", ..j2(tangent, "cauchy") };
        let file = write(dir, &format!("nh-{tangent}.json"), &m);
        let (code, out) = tancheck(&["check", &file]);
        assert_eq!(code, 0, "{symbol} {tangent}: {out}");
    }
    // flawed variants: exit 1 with the cause named
    for (symbol, tangent, stress, cause, j2_family) in [
        ("j2log_geometric_missing", "dp-df", "kirchhoff", "geometric-terms-missing", true),
        ("j2log_material_as_spatial", "tau-jaumann", "kirchhoff", "material-as-spatial", true),
        ("nh_kirchhoff_for_cauchy", "sigma-jaumann", "cauchy", "stress-measure", false),
        ("nh_extra_over_j", "tau-jaumann", "kirchhoff", "extra-over-j", false),
    ] {
        let symbol = format!("{prefix}_{symbol}");
        let mut m = Manifest { symbol: &symbol, ..j2(tangent, stress) };
        if !j2_family {
            (m.properties, m.states, m.extra) = (ELASTIC, 0, "");
        }
        let file = write(dir, &format!("{symbol}.json"), &m);
        let (code, out) = tancheck(&["check", &file]);
        assert_eq!(code, 1, "{symbol}: {out}");
        assert!(out.contains(cause), "{symbol}: {out}");
        // Beside the largest difference, the next largest entries (a flaw in one term shows
        // in several; only the largest was given).
        assert!(
            out.contains("largest difference at entry") && out.contains("      next: "),
            "{symbol}: {out}"
        );
    }
    // the hypoelastic routine: objective and oscillating in simple shear; without the rotation
    // increment it fails the rigid-increment probe
    for (symbol, want) in [(format!("{prefix}_hypo"), 0), (format!("{prefix}_hypo_no_rotation"), 1)] {
        let m = Manifest {
            symbol: &symbol,
            properties: ELASTIC,
            states: 0,
            frame: "jaumann",
            extra: r#", "probes": { "shear_response": "oscillating" }"#,
            ..j2("tau-jaumann", "kirchhoff")
        };
        let file = write(dir, &format!("{symbol}.json"), &m);
        let (code, out) = tancheck(&["check", &file]);
        assert_eq!(code, 0, "{symbol}: {out}");
        let (code, out) = tancheck(&["probe", &file]);
        assert_eq!(code, want, "{symbol} probes: {out}");
        if want == 1 {
            assert!(out.contains("rotation-increment"), "{out}");
        }
    }
}

#[test]
fn c_routines_in_every_measure() {
    every_measure(c_lib(), "c", &scratch("c"));
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_routines_in_every_measure() {
    every_measure(f_lib(), "f", &scratch("f"));
}

// The built-in model j2-log from a manifest: it passes, and a manifest with the properties of
// an elastic model is bad input naming the file (exit 2).
#[test]
fn built_in_j2_log_model() {
    let dir = scratch("model");
    let text = |props: &str, states: usize| {
        format!(
            r#"{{ "finite": {{ "stress": "cauchy", "tangent": "sigma-jaumann" }},
               "routine": {{ "model": "j2-log", "states": {states}, "properties": {props} }},
               "path": {{ "shape": "simple-shear", "amount": 1.0, "increments": 4 }},
               "probes": {{ "tensor_state": [0] }} }}"#
        )
    };
    let good = dir.join("good.json");
    std::fs::write(&good, text(J2_PROPERTIES, 7)).unwrap();
    let bad = dir.join("two-properties.json");
    std::fs::write(&bad, text(ELASTIC, 7)).unwrap();
    let (code, out) = tancheck(&["check", good.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}");
    let (code, out) = tancheck(&["probe", good.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}");
    let (code, out) = tancheck(&["check", bad.to_str().unwrap()]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("two-properties.json") && out.contains("4 properties"), "{out}");
}

// The finite reports go through the reporters like the point checks: --json writes the
// enveloped document (kind finite-check / finite-probes) that the shipped schema accepts,
// --html a page and --junit a test case per increment or probe, -q keeps failing increments
// only, --color always colours and --color never does not.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn finite_reports_through_the_reporters() {
    let dir = scratch("reporters");
    let lib = f_lib();
    let m = |symbol: &'static str| Manifest {
        lib,
        symbol,
        stress: "cauchy",
        tangent: "sigma-jaumann",
        frame: "none",
        properties: ELASTIC,
        states: 0,
        extra: "",
    };
    let good = write(&dir, "good.json", &m("f_nh"));
    let bad = write(&dir, "bad.json", &m("f_nh_missing_over_j"));
    let path = |n: &str| dir.join(n).display().to_string();
    let schema: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(tancheck_testkit::libs::repo_root().join("schema/report.schema.json"))
            .unwrap(),
    )
    .unwrap();
    let validator = jsonschema::validator_for(&schema).unwrap();
    let (code, _) = tancheck(&[
        "check",
        &bad,
        "--json",
        &path("c.json"),
        "--html",
        &path("c.html"),
        "--junit",
        &path("c.xml"),
    ]);
    assert_eq!(code, 1);
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(path("c.json")).unwrap()).unwrap();
    assert_eq!(v["kind"], "finite-check");
    assert_eq!(v["finding"], "missing-over-j");
    // The exit code is in the report, as in the point routines' reports.
    assert_eq!(v["exit_code"], 1, "{v}");
    assert!(validator.is_valid(&v), "{v}");
    let html = std::fs::read_to_string(path("c.html")).unwrap();
    assert!(html.contains("f_nh_missing_over_j") && html.contains("missing-over-j"), "{html}");
    // The page gives the exit code and the largest differences, and a cause's words once (the
    // page had neither, and repeated the cause on every row; a user-style sweep).
    assert!(html.contains("(exit 1)") && html.contains("largest differences"), "{html}");
    assert!(html.contains("(as at increment "), "{html}");
    let xml = std::fs::read_to_string(path("c.xml")).unwrap();
    assert!(xml.contains("<testcase name=\"increment 1\"") && xml.contains("missing-over-j"), "{xml}");
    let (code, _) = tancheck(&["probe", &good, "--json", &path("p.json"), "--junit", &path("p.xml")]);
    assert_eq!(code, 0);
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(path("p.json")).unwrap()).unwrap();
    assert_eq!(v["kind"], "finite-probes");
    assert_eq!(v["exit_code"], 0, "{v}");
    assert!(validator.is_valid(&v), "{v}");
    assert!(std::fs::read_to_string(path("p.xml")).unwrap().contains("<testcase name=\"stretch-rotate\""));
    // -q: the failing increments and the verdict, no cautions; a pass prints its verdict only
    let (_, out) = tancheck(&["check", &good, "-q"]);
    assert!(out.contains("verdict: PASS (exit 0)"), "{out}");
    assert!(out.contains("verdict: PASS") && !out.contains("increment") && !out.contains("caution"), "{out}");
    // A failing check under -q: one line per failing increment, its largest entry named as a
    // component pair (not 0-based indices), and the verdict.
    let (_, out) = tancheck(&["check", &bad, "-q"]);
    assert!(out.lines().all(|l| l.starts_with("FAIL ") || l.starts_with("verdict:")), "{out}");
    assert!(out.contains("largest difference at entry ") && out.contains("missing-over-j"), "{out}");
    let (_, out) = tancheck(&["check", &bad, "--color", "always"]);
    assert!(out.contains("\u{1b}[") && out.contains("missing-over-j"), "{out}");
    let (_, out) = tancheck(&["check", &bad, "--color", "never"]);
    assert!(!out.contains("\u{1b}["), "{out}");
}

/// The C neo-Hookean routine `symbol` (a variant of it) with elastic properties, Cauchy stress
/// and the Jaumann tangent.
fn elastic_nh(symbol: &'static str) -> Manifest<'static> {
    Manifest {
        lib: c_lib(),
        symbol,
        stress: "cauchy",
        tangent: "sigma-jaumann",
        frame: "none",
        properties: ELASTIC,
        states: 0,
        extra: "",
    }
}

// The options of `tancheck check` on a finite-strain manifest: the time limits, the guard level
// and the traps are honoured; the ones a finite-strain check has its own settings for (--path,
// --scheme, --tol, --step, --cases) are refused naming the manifest (exit 2),
// where they were accepted and ignored. A NaN the routine computes is a non-finite output
// (exit 1), an entry it never writes a fault (exit 3): both read "unwritten" before.
#[test]
fn finite_checks_honour_or_refuse_the_check_options() {
    let dir = scratch("options");
    let m = elastic_nh;
    let good = write(&dir, "good.json", &m("c_nh"));
    for extra in [
        &["--path", "uniaxial-strain:0.01:7"][..],
        &["--tol", "central=1e-30"],
        &["--scheme", "forward"],
        &["--step", "central=1e-3"],
    ] {
        let (code, out) = tancheck(&[&["check", good.as_str()][..], extra].concat());
        assert_eq!(code, 2, "{extra:?}: {out}");
        assert!(out.contains("good.json: a finite-strain manifest") && out.contains(extra[0]), "{out}");
    }
    let (code, out) = tancheck(&["probe", &good, "--thermal"]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("--thermal does not apply"), "{out}");
    let (code, out) = tancheck(&["check", &good, "--guards", "none"]);
    assert_eq!(code, 2, "{out}");
    let (code, out) = tancheck(&["check", &good, "--guards", "full", "--fp-traps", "-q"]);
    assert_eq!(code, 0, "{out}");
    // The full level says what it adds to a finite-strain call: nothing yet (a user-style
    // sweep found it silent).
    let (code, out) = tancheck(&["check", &good, "--guards", "full"]);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("note: guards full: finite-strain calls get the light level's checks"), "{out}");

    // --call-timeout: the routine that never returns from increment 2 is a fault after 2 s
    // (the default limit is 30 s), named with its routine and the call's inputs.
    let spin = write(&dir, "spin.json", &m("c_nh_spin_at_2"));
    let t0 = std::time::Instant::now();
    let (code, out) = tancheck(&["check", &spin, "--call-timeout", "2", "-q"]);
    assert_eq!(code, 3, "{out}");
    assert!(t0.elapsed().as_secs_f64() < 20.0, "the limit was not the one given: {out}");
    assert!(
        out.contains("did not return within 2 s") && out.contains("finite-strain call of increment 2"),
        "{out}"
    );
    assert!(out.contains(":c_nh_spin_at_2"), "the routine is named, not the manifest: {out}");

    let nan = write(&dir, "nan.json", &m("c_nh_nan_at_2"));
    let (code, out) = tancheck(&["check", &nan, "-q"]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("non-finite-output") && !out.contains("unwritten"), "{out}");
    let unwritten = write(&dir, "unwritten.json", &m("c_nh_unwritten_at_2"));
    let (code, out) = tancheck(&["check", &unwritten, "-q"]);
    assert_eq!(code, 3, "{out}");
    assert!(out.contains("left tangent[20] unwritten"), "{out}");
    // The probes of a routine whose call fails are a fault too (exit 3, as the README says of
    // probes; it exited 1, found by a user-style sweep).
    let (code, out) = tancheck(&["probe", &unwritten, "-q"]);
    assert_eq!(code, 3, "{out}");
    assert!(out.contains("FAULT") && out.contains("exit 3"), "{out}");
    // A write one past the end of the state: the zone after it (the heap was corrupted, and a
    // PASS printed before the process died while writing the report).
    let overrun = write(&dir, "overrun.json", &m("c_nh_state_overrun_at_2"));
    let (code, out) = tancheck(&["check", &overrun, "-q"]);
    assert_eq!(code, 3, "{out}");
    assert!(out.contains("wrote past the end of state: state[0]") && !out.contains("PASS"), "{out}");
    // With the guards off an unwritten entry holds the NaN the check filled it with: a
    // non-finite output.
    let (code, out) = tancheck(&["check", &unwritten, "-q", "--guards", "off"]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("non-finite-output"), "{out}");
    // A NaN computed into the stress or the state is a non-finite output at its increment,
    // and the next increment, which starts from it, does not read as a write to its inputs
    // (the inputs are compared bit for bit); the state's NaN passed before with the guards off.
    for (symbol, states) in [("c_nh_nan_stress_at_2", 0), ("c_nh_nan_state_at_2", 1)] {
        let file = write(&dir, &format!("{symbol}.json"), &Manifest { states, ..m(symbol) });
        for guards in ["light", "off"] {
            let (code, out) = tancheck(&["check", &file, "-q", "--guards", guards]);
            assert_eq!(code, 1, "{symbol} {guards}: {out}");
            assert!(
                out.contains("non-finite-output") && !out.contains("read-only input"),
                "{symbol} {guards}: {out}"
            );
        }
    }
    // --fp-traps takes effect: the computed NaN is a trapped signal, a fault.
    let (code, out) = tancheck(&["check", &nan, "-q", "--fp-traps"]);
    assert_eq!(code, 3, "{out}");
    assert!(out.contains("SIGFPE"), "{out}");
}

// `--isolate` runs a finite-strain check in a worker process, as a point check: a routine
// that passes gives the report, byte for byte, of the check in one process; one that never
// returns, ends the process or aborts is a fault (exit 3) that names the very call that was
// running, by its deformation gradients, in the terminal and in the JSON report (kind
// `isolated-fault`). `--isolate` was refused for finite-strain manifests.
#[test]
fn finite_checks_run_isolated() {
    let dir = scratch("isolated");
    let m = elastic_nh;
    let schema: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(tancheck_testkit::libs::repo_root().join("schema/report.schema.json"))
            .unwrap(),
    )
    .unwrap();
    let validator = jsonschema::validator_for(&schema).unwrap();
    let good = write(&dir, "good.json", &m("c_nh"));
    let (plain, isolated) = (dir.join("plain.out.json"), dir.join("isolated.out.json"));
    let (code, out) = tancheck(&["check", &good, "-q", "--json", plain.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}");
    let (code, out) = tancheck(&["check", &good, "-q", "--isolate", "--json", isolated.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("verdict: PASS (exit 0)"), "{out}");
    assert_eq!(std::fs::read(&plain).unwrap(), std::fs::read(&isolated).unwrap());

    for (symbol, said) in [
        ("c_nh_spin_at_2", "did not return within 2 s"),
        ("c_nh_exit_at_2", "ended the worker process by calling exit()"),
        ("c_nh_abort_at_2", "SIGABRT"),
    ] {
        let file = write(&dir, &format!("{symbol}.json"), &m(symbol));
        let report = dir.join(format!("{symbol}.out.json"));
        let args = ["check", &file, "--isolate", "--call-timeout", "2", "--json", report.to_str().unwrap()];
        let t0 = std::time::Instant::now();
        let (code, out) = tancheck(&args);
        assert_eq!(code, 3, "{symbol}: {out}");
        assert!(t0.elapsed().as_secs_f64() < 30.0, "{symbol}: {out}");
        assert!(out.contains(said) && out.contains("finite-strain call of increment 2"), "{symbol}: {out}");
        assert!(
            out.contains("F0 (column-major) [") && out.contains("F1 (column-major) ["),
            "{symbol}: {out}"
        );
        assert!(out.contains(&format!(":{symbol}")), "{symbol}: the routine is named: {out}");
        let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&report).unwrap()).unwrap();
        assert_eq!(v["verdict"], "routine-fault", "{symbol}: {v}");
        let errors: Vec<String> = validator.iter_errors(&v).map(|e| e.to_string()).collect();
        assert!(errors.is_empty(), "{symbol}: the report does not fit the schema: {errors:?}\n{v}");
        let call = &v["fault"]["call"];
        assert_eq!(call["increment"], 2, "{symbol}: {v}");
        let (f0, f1) = (call["f0"].as_array().unwrap(), call["f1"].as_array().unwrap());
        assert!(f0.len() == 9 && f1.len() == 9 && f0 != f1, "{symbol}: {v}");
        assert_eq!(call["properties"][0].as_f64(), Some(1000.0), "{symbol}: {v}");
    }
}

// A tensor in the state (probes.tensor_state) must lie inside the state and not share entries
// with another: both were accepted, and the probes passed without rotating it.
#[test]
fn tensor_slots_outside_the_state_are_refused() {
    let dir = scratch("tensor-slots");
    for (slots, want) in
        [("[0]", None), ("[2]", Some("slot 2 takes state entries 2 to 7")), ("[0, 1]", Some("share"))]
    {
        let p = dir.join("m.json");
        std::fs::write(
            &p,
            format!(
                r#"{{ "finite": {{ "stress": "cauchy", "tangent": "sigma-jaumann" }},
                   "routine": {{ "model": "j2-log", "states": 7, "properties": {J2_PROPERTIES} }},
                   "path": {{ "shape": "simple-shear", "amount": 0.5, "increments": 2 }},
                   "probes": {{ "tensor_state": {slots} }} }}"#
            ),
        )
        .unwrap();
        let (code, out) = tancheck(&["probe", p.to_str().unwrap()]);
        match want {
            None => assert_eq!(code, 0, "{slots}: {out}"),
            Some(w) => {
                assert_eq!(code, 2, "{slots}: {out}");
                assert!(out.contains("m.json: probes.tensor_state") && out.contains(w), "{slots}: {out}");
            }
        }
    }
}

// A finite-strain manifest with a JSON syntax error is named with that error where it is (it
// read "unknown field `finite`" from the point manifest's loader, found by a user-style sweep).
#[test]
fn a_syntax_error_in_a_finite_manifest_is_named_where_it_is() {
    let dir = scratch("syntax");
    let p = dir.join("comma.json");
    std::fs::write(
        &p,
        "{ \"finite\": { \"stress\": \"cauchy\", \"tangent\": \"sigma-jaumann\", \"frame\": \"none\" },\n  \
         \"routine\": { \"model\": \"neo-hookean\", \"states\": 0, \"properties\": [1000, 0.3], },\n  \
         \"path\": { \"shape\": \"simple-shear\", \"amount\": 0.5, \"increments\": 3 } }\n",
    )
    .unwrap();
    let (code, out) = tancheck(&["check", p.to_str().unwrap()]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("comma.json:2:") && out.contains("trailing comma"), "{out}");
    assert!(!out.contains("unknown field"), "{out}");
}

// A library built with `tancheck build --debug` gets floating-point traps in a finite-strain
// check as in a point check, without being asked, and the note says so: the NaN the routine
// computes at increment 2 is a trapped signal, a fault placed at its line (a debug build ran
// without traps here and passed the NaN on; a user-style sweep).
#[test]
#[cfg_attr(tancheck_no_fp_traps, ignore = "needs floating-point traps (this machine has none)")]
fn a_debug_build_gets_floating_point_traps_in_a_finite_check() {
    let dir = scratch("debug-traps");
    let lib = dir.join("libdebug.so");
    let src = tancheck_testkit::libs::repo_root().join("fortran-shim/examples/c/finite_nh.c");
    let (code, out) = tancheck(&["build", "--debug", src.to_str().unwrap(), "-o", lib.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}");
    let nan = write(&dir, "nan.json", &Manifest { lib: &lib, ..elastic_nh("c_nh_nan_at_2") });
    let (code, out) = tancheck(&["check", &nan, "-q"]);
    assert_eq!(code, 3, "{out}");
    assert!(out.contains("floating-point traps on") && out.contains("was built with --debug"), "{out}");
    assert!(out.contains("SIGFPE") && out.contains("finite_nh.c:"), "{out}");
}
