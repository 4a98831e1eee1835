//! `tancheck check` and `tancheck probe` on block routines named by a manifest
//! (`routine.interface: "block"`), compiled from C and from Fortran: the correct routine with
//! its point counterpart passes, a flawed one fails with its finding (exit 1); the reports go
//! through the reporters like a point check's (`--json` validated against the report schema,
//! `--html`, `--junit`, `-q`, `--color`); a manifest whose block section does not fit is
//! refused with the file named (exit 2).

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use tancheck_testkit::libs::{build_once, scratch};

/// The routines of `misbehave_block.c`: memory and outputs misused on purpose.
mod misbehave;

/// The C (`c`) or Fortran (`f`) J2 block library, with the point routines of the same model
/// (`c_j2`, `f_j2`) for the counterpart.
fn library(lang: &str) -> &'static Path {
    match lang {
        "c" => build_once("j2_block_cli_c", &["fortran-shim/examples/c/j2_block.c"]),
        _ => build_once(
            "j2_block_cli_f",
            &["fortran-shim/examples/fortran/j2_block.F90", "fortran-shim/examples/fortran/j2.F90"],
        ),
    }
}

fn manifest(d: &Path, name: &str, lib: &Path, symbol: &str, extra: &str) -> PathBuf {
    let text = format!(
        r#"{{
  "routine": {{ "library": "{}", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d",
               "states": 13, "properties": [200000, 0.3, 250, 1000, 0, 0, 500] }},
  "start": {{ "temperature": 293 }},
  "block": {{ "density": 7.85e-9, "characteristic_length": 2.0{extra} }}
}}"#,
        lib.display()
    );
    let p = d.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn tancheck(args: &[&std::ffi::OsStr]) -> (i32, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).env_remove("NO_COLOR").args(args).output().unwrap();
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into(),
        String::from_utf8_lossy(&o.stderr).into(),
    )
}

fn schema_valid(v: &Value) {
    let schema: Value = serde_json::from_str(&tancheck::cli::report::schema::schema_text()).unwrap();
    let validator = jsonschema::validator_for(&schema).expect("the schema compiles");
    let errors: Vec<String> =
        validator.iter_errors(v).take(10).map(|e| format!("{e} at {}", e.instance_path())).collect();
    assert!(errors.is_empty(), "the block report does not match the schema:\n{}", errors.join("\n"));
}

fn check_and_probe(lang: &str) {
    let d = scratch(&format!("block-cli-{lang}"));
    let lib = library(lang);
    let counterpart = format!(r#", "counterpart": {{ "symbol": "{lang}_j2" }}"#);
    let good = manifest(&d, "good.json", lib, &format!("{lang}_j2_block"), &counterpart);
    let (json, html, junit) = (d.join("good.json.out"), d.join("good.html"), d.join("good.xml"));
    let (code, out, err) = tancheck(&[
        "check".as_ref(),
        good.as_os_str(),
        "--json".as_ref(),
        json.as_os_str(),
        "--html".as_ref(),
        html.as_os_str(),
        "--junit".as_ref(),
        junit.as_os_str(),
        "--color".as_ref(),
        "never".as_ref(),
    ]);
    assert_eq!(code, 0, "{out}\n{err}");
    assert!(out.contains("verdict: PASS"), "{out}");
    assert!(!out.contains('\x1b'), "--color never: {out}");
    assert!(
        out.contains(&format!("counterpart: the stresses of {lang}_j2 and of the block routine agree")),
        "{out}"
    );
    assert!(out.contains(&format!("the tangent of {lang}_j2 passes")), "{out}");
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    schema_valid(&v);
    assert_eq!(v["kind"], "block");
    assert_eq!(v["interface"], "block");
    assert_eq!(v["passed"], true);
    assert!(v["elastic"]["wave_speed"].as_f64().unwrap() > 0.0);
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains("Block routine") && page.contains("<svg") && page.contains("Caution"), "{page}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(xml.contains("<testcase name=\"tangent\"") && !xml.contains("<failure"), "{xml}");
    // Checks that did not run are skipped with why (no point deleted, no rate law): they read
    // as passed (found by a user-style sweep); the counterpart named here ran.
    assert!(xml.contains("the deletion check did not run") && xml.contains("no rate law declared"), "{xml}");
    assert!(!xml.contains("counterpart: none named"), "{xml}");
    // A block report's cautions are the block checks' own, in the page and the JSON.
    assert!(page.contains("These checks test the routine&#39;s own consistency"), "{page}");
    assert!(v["cautions"][0].as_str().unwrap().contains("own consistency"), "{v}");

    // A flawed routine through probe: the finding, in colour when asked for, and quietly.
    let bad = manifest(&d, "bad.json", lib, &format!("{lang}_j2_block_corrector_sign"), "");
    let (code, out, _) =
        tancheck(&["probe".as_ref(), bad.as_os_str(), "--color".as_ref(), "always".as_ref()]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("stiffer-than-elastic") && out.contains('\x1b'), "{out}");
    let (code, quiet, _) = tancheck(&["probe".as_ref(), bad.as_os_str(), "-q".as_ref()]);
    assert_eq!(code, 1);
    assert!(quiet.lines().count() < out.lines().count(), "-q:\n{quiet}\nnormal:\n{out}");
    // -q is one line per finding, naming the routine, and the verdict.
    assert!(
        quiet.lines().all(|l| l.starts_with("FAIL ") || l.starts_with("FAULT ") || l.starts_with("verdict:"))
            && quiet.contains("_j2_block_corrector_sign stiffer-than-elastic"),
        "{quiet}"
    );
    let xml_bad = d.join("bad.xml");
    let (code, _, _) =
        tancheck(&["check".as_ref(), bad.as_os_str(), "--junit".as_ref(), xml_bad.as_os_str()]);
    assert_eq!(code, 1);
    let xml = std::fs::read_to_string(&xml_bad).unwrap();
    assert!(xml.contains("<failure") && xml.contains("stiffer-than-elastic"), "{xml}");
    // A block check's finding is typed as such, not as a tangent's.
    assert!(xml.contains(r#"type="block-finding""#) && !xml.contains("tangent-finding"), "{xml}");

    // The counterpart names a block routine whose update differs from the point routine's.
    let drift = manifest(&d, "drift.json", lib, &format!("{lang}_j2_block_total_back_stress"), &counterpart);
    let (code, out, _) = tancheck(&["check".as_ref(), drift.as_os_str(), "--json".as_ref(), "-".as_ref()]);
    assert_eq!(code, 1, "{out}");
    let v: Value = serde_json::from_str(&out).unwrap();
    let names: Vec<&str> =
        v["findings"].as_array().unwrap().iter().map(|f| f["finding"].as_str().unwrap()).collect();
    assert!(names.contains(&"counterpart-mismatch"), "{names:?}");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn check_and_probe_run_c_block_routines() {
    check_and_probe("c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn check_and_probe_run_fortran_block_routines() {
    check_and_probe("f");
}

#[test]
fn a_block_section_that_does_not_fit_is_refused_naming_the_file() {
    let d = scratch("block-cli-refused");
    let p = d.join("point-with-block.json");
    std::fs::write(
        &p,
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
             "block": { "density": 7.85e-9, "characteristic_length": 2.0 } }"#,
    )
    .unwrap();
    let (code, _, err) = tancheck(&["check".as_ref(), p.as_os_str()]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("point-with-block.json") && err.contains("routine.interface"), "{err}");
    let p = d.join("block-no-density.json");
    std::fs::write(
        &p,
        r#"{ "routine": { "model": "j2-block", "interface": "block", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
             "block": { "density": -1, "characteristic_length": 2.0 } }"#,
    )
    .unwrap();
    let (code, _, err) = tancheck(&["check".as_ref(), p.as_os_str()]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("block-no-density.json") && err.contains("block.density"), "{err}");
    // A counterpart of other sizes is bad input, said before any check runs (it was a finding,
    // exit 1, after them; a user-style sweep).
    let p = d.join("block-other-counterpart.json");
    std::fs::write(
        &p,
        r#"{ "routine": { "model": "j2-block", "interface": "block", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
             "block": { "density": 7.85e-9, "characteristic_length": 2.0, "counterpart": { "model": "johnson-cook" } } }"#,
    )
    .unwrap();
    let (code, _, err) = tancheck(&["check".as_ref(), p.as_os_str()]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("block-other-counterpart.json") && err.contains("block.counterpart"), "{err}");
}

// Options and commands made for point routines are refused on a block routine's manifest,
// naming the option (they were ignored, or bisect called the block routine through the point
// interface and reported a correct routine as a fault); a strain path given to bisect with a
// finite-strain manifest is refused likewise.
#[test]
fn point_options_and_bisect_are_refused_for_block_and_finite_manifests() {
    let d = scratch("block-cli-point-options");
    let p = d.join("jb.json");
    std::fs::write(
        &p,
        r#"{ "routine": { "model": "j2-block", "interface": "block", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
             "block": { "density": 7.85e-9, "characteristic_length": 2.0 } }"#,
    )
    .unwrap();
    let suite = Path::new(env!("CARGO_MANIFEST_DIR")).join("probes/thermal.json");
    let runs: [(&[&std::ffi::OsStr], &str); 6] = [
        (
            &["check".as_ref(), p.as_os_str(), "--scheme".as_ref(), "forward".as_ref()],
            "--scheme does not apply",
        ),
        (
            &["check".as_ref(), p.as_os_str(), "--tol".as_ref(), "central=1e-3".as_ref()],
            "--tol does not apply",
        ),
        (&["check".as_ref(), p.as_os_str(), "--cases".as_ref()], "--cases does not apply"),
        (&["probe".as_ref(), p.as_os_str(), "--suite".as_ref(), suite.as_os_str()], "--suite does not apply"),
        (&["probe".as_ref(), p.as_os_str(), "--thermal".as_ref()], "--thermal does not apply"),
        (
            &["bisect".as_ref(), p.as_os_str()],
            "bisect takes point routines; this manifest is a block routine's",
        ),
    ];
    for (args, said) in runs {
        let (code, out, err) = tancheck(args);
        assert_eq!(code, 2, "{args:?}: {out}{err}");
        assert!(err.contains("jb.json") && err.contains(said), "{args:?}: {err}");
    }
    let f = d.join("fin.json");
    std::fs::write(
        &f,
        r#"{ "finite": { "stress": "kirchhoff", "tangent": "tau-jaumann", "frame": "jaumann" },
             "routine": { "model": "hypo-no-rotation", "properties": [1000, 0.3] },
             "path": { "shape": "simple-shear", "amount": 0.3, "increments": 3 } }"#,
    )
    .unwrap();
    // bisect takes a finite-strain manifest (tests/finite_bisect.rs), but not a strain path.
    let (code, out, err) =
        tancheck(&["bisect".as_ref(), f.as_os_str(), "--path".as_ref(), "uniaxial-strain:0.01:5".as_ref()]);
    assert_eq!(code, 2, "{out}{err}");
    assert!(err.contains("fin.json") && err.contains("--path takes a strain path"), "{err}");
}

/// A manifest of one of the misbehaving block routines (`misbehave_block.c`).
// A rate-dependent routine without a threshold (a Maxwell branch, relaxation time 1e-4 s, on a
// path of 1e-3 s increments): its stiffness for a small increment depends on the time
// increment, and the elastic response a solver sizes its time increment from is the
// instantaneous one (Δt → 0). The correct routine passes (it failed at 9.6e-4: the small
// increment's time increment let the branch relax; a correct viscoelastic routine failed so,
// found by a user-style sweep); one whose elastic response takes the long-time modulus fails.
#[test]
fn the_elastic_response_of_a_rate_dependent_routine_is_the_instantaneous_one() {
    let lib = build_once("maxwell_block_cli", &["fortran-shim/examples/c/maxwell_block.c"]);
    let d = scratch("block-cli-maxwell");
    let write = |symbol: &str| {
        let p = d.join(format!("{symbol}.json"));
        std::fs::write(
            &p,
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d",
                   "states": 6, "properties": [1000, 300, 200, 1e-4] }},
  "path": {{ "shape": "tension-shear", "peak": 0.01, "steps": 4, "back": 2, "dtime": 1e-3 }},
  "block": {{ "density": 1e-9, "characteristic_length": 1.0 }} }}"#,
                lib.display()
            ),
        )
        .unwrap();
        p
    };
    let good = write("c_maxwell_block");
    let (code, out, err) = tancheck(&["check".as_ref(), good.as_os_str()]);
    assert_eq!(code, 0, "{out}{err}");
    let relaxed = write("c_maxwell_block_relaxed");
    let (code, out, err) =
        tancheck(&["check".as_ref(), relaxed.as_os_str(), "--json".as_ref(), "-".as_ref()]);
    assert_eq!(code, 1, "{out}{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    schema_valid(&v);
    let f = &v["findings"][0];
    assert_eq!(f["finding"], "elastic-response-mismatch", "{v}");
    assert!(f["what"].as_str().unwrap().contains("toward Δt → 0"), "{f}");
    // A twin that loses the branch's derivative: TWIN (exit 4), the wave speed from the central
    // differences (it passed, its stiffness taken from the broken twin; a user-style sweep).
    let twin = write("c_maxwell_block_real_twin");
    let (code, out, err) = tancheck(&["check".as_ref(), twin.as_os_str(), "--json".as_ref(), "-".as_ref()]);
    assert_eq!(code, 4, "{out}{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    schema_valid(&v);
    assert_eq!(v["finding"], "twin-not-complex-step-safe", "{v}");
    let (_, good_out, _) = tancheck(&["check".as_ref(), good.as_os_str(), "--json".as_ref(), "-".as_ref()]);
    let g: Value = serde_json::from_str(&good_out).unwrap();
    let speeds = |v: &Value| -> Vec<f64> {
        v["increments"].as_array().unwrap().iter().filter_map(|i| i["wave_speed"].as_f64()).collect()
    };
    for (a, b) in speeds(&v).iter().zip(speeds(&g)) {
        assert!((a - b).abs() <= 1e-6 * b, "wave speed {a} against the correct routine's {b}");
    }
    // A point that reads its neighbour's density: the neighbours' conditions differ, so it is
    // point-dependence (neighbours shared the point's conditions and it passed).
    let neighbour = write("c_maxwell_block_neighbour_density");
    let (code, out, err) =
        tancheck(&["check".as_ref(), neighbour.as_os_str(), "--json".as_ref(), "-".as_ref()]);
    assert_eq!(code, 1, "{out}{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["finding"], "point-dependence", "{v}");
}

// Results that depend on the calls made before (found by a user-style sweep: a routine keeping
// its plastic strain in a static and one caching a relaxation time on its first call passed,
// or were named `point-dependence`). The density of the first call kept in a static is seen
// only against a new instance of the library (walked twice in a row it repeats itself); a
// dissipated energy summed in a static over all calls differs on the second of two walks in a
// row. Both are `history-dependence`, and the blocks are then not compared; the correct
// routine says what it was walked under and passes.
#[test]
fn results_that_depend_on_the_calls_before_are_history_dependence() {
    let lib = build_once("maxwell_block_cli", &["fortran-shim/examples/c/maxwell_block.c"]);
    let d = scratch("block-cli-maxwell-history");
    let run = |symbol: &str| -> (i32, Value) {
        let p = d.join(format!("{symbol}.json"));
        std::fs::write(
            &p,
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d",
                   "states": 6, "properties": [1000, 300, 200, 1e-2] }},
  "path": {{ "shape": "tension-shear", "peak": 0.01, "steps": 4, "back": 2, "dtime": 1e-3 }},
  "block": {{ "density": 1e-9, "characteristic_length": 1.0 }} }}"#,
                lib.display()
            ),
        )
        .unwrap();
        let (code, out, err) = tancheck(&["check".as_ref(), p.as_os_str(), "--json".as_ref(), "-".as_ref()]);
        let v: Value = serde_json::from_str(&out).unwrap_or_else(|e| panic!("{e}: {out}{err}"));
        schema_valid(&v);
        (code, v)
    };
    let (code, v) = run("c_maxwell_block");
    assert_eq!(code, 0, "{v}");
    let notes = v["notes"].to_string();
    assert!(notes.contains("as the first calls of a new instance of the library"), "{notes}");
    let (code, v) = run("c_maxwell_block_first_density");
    assert_eq!(code, 1, "{v}");
    assert_eq!(v["finding"], "history-dependence", "{v}");
    let what = v["findings"][0]["what"].as_str().unwrap();
    assert!(what.contains("new instance") && what.contains("energy.internal"), "{what}");
    assert!(v["notes"].to_string().contains("blocks not compared"), "{v}");
    let (code, v) = run("c_maxwell_block_static_dissipation");
    assert_eq!(code, 1, "{v}");
    assert_eq!(v["finding"], "history-dependence", "{v}");
    let what = v["findings"][0]["what"].as_str().unwrap();
    assert!(what.contains("walked twice in a row") && what.contains("energy.dissipated"), "{what}");
    // The findings after it may follow from it alone: the notes say so when there are any
    // (a SAVE variable read as four other bugs; a user-style sweep).
    let others =
        v["findings"].as_array().unwrap().iter().filter(|f| f["finding"] != "history-dependence").count();
    let said = v["notes"].to_string().contains("may follow from it alone");
    assert_eq!(said, others > 0, "{v:#}");
}

// State variables declared as damage (`block.damage`) must never decrease: a Johnson–Cook
// block routine whose damage falls by a tenth in an increment without plastic flow is
// `damage-decreases` at the first unloading increment, before the energy findings the fall
// also gives (a user-style sweep's routine with damage in total form went unnoticed); the
// correct routine passes with the check said; an index past the routine's states is bad input
// naming the manifest (exit 2).
#[test]
fn a_declared_damage_that_falls_is_damage_decreases() {
    let lib = build_once("jc_block_cli", &["fortran-shim/examples/c/jc_block.c"]);
    let d = scratch("block-cli-damage");
    let run = |symbol: &str, peak: f64, steps: usize, damage: &str| -> (i32, String) {
        let p = d.join(format!("{symbol}-{steps}-{}.json", damage.len()));
        std::fs::write(
            &p,
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d", "states": 13,
    "properties": [200000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44, -2.12, 0.002, 0.61, 0.3, 20.0, 0.99] }},
  "start": {{ "temperature": 293 }},
  "path": {{ "shape": "uniaxial-strain", "peak": {peak}, "steps": {steps}, "back": 10, "dtime": 5e-5 }},
  "block": {{ "density": 7.83e-9, "characteristic_length": 2.0, "softening": true{damage} }} }}"#,
                lib.display()
            ),
        )
        .unwrap();
        let (code, out, err) = tancheck(&["check".as_ref(), p.as_os_str(), "--json".as_ref(), "-".as_ref()]);
        (code, format!("{out}{err}"))
    };
    let (code, out) = run("c_jc_block_healing", 0.1, 20, r#", "damage": [9]"#);
    assert_eq!(code, 1, "{out}");
    let v: Value = serde_json::from_str(&out).unwrap_or_else(|e| panic!("{e}: {out}"));
    schema_valid(&v);
    assert_eq!(v["finding"], "damage-decreases", "{v}");
    assert_eq!(v["findings"][0]["increment"], 21, "{v}");
    assert!(v["findings"][0]["what"].as_str().unwrap().contains("state[9]"), "{v}");
    let (code, out) = run("c_jc_block", 0.3, 30, r#", "damage": [9]"#);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("state[9] checked never to decrease"), "{out}");
    // Not declared: not checked, and said so.
    let (code, out) = run("c_jc_block_healing", 0.1, 20, "");
    assert!(out.contains("no state variable declared as damage"), "{out}");
    assert_ne!(code, 2, "{out}");
    let (code, out) = run("c_jc_block", 0.3, 30, r#", "damage": [13]"#);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("block.damage names state[13]") && out.contains(".json"), "{out}");
}

// A plane-strain block routine with no path gets the default path without its small 23 and 13
// shear, as a plane point does (it was refused: "increment 1 has 23 or 13 shear", increments
// its manifest never gave; a user-style sweep). A path given with them is refused naming the
// shapes that have them.
#[test]
fn a_plane_block_routine_takes_the_default_path() {
    let d = scratch("block-plane-default");
    let p = d.join("ps.json");
    std::fs::write(
        &p,
        r#"{ "routine": { "model": "j2-block", "interface": "block", "kind": "plane-strain", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
             "block": { "density": 7.85e-9, "characteristic_length": 2.0 } }"#,
    )
    .unwrap();
    let (code, out, err) = tancheck(&["check".as_ref(), p.as_os_str()]);
    assert_eq!(code, 0, "{out}{err}");
    let (code, out, err) =
        tancheck(&["check".as_ref(), p.as_os_str(), "--path".as_ref(), "tension-shear:0.004:8:4".as_ref()]);
    assert_eq!(code, 2, "{out}{err}");
    assert!(err.contains("the built-in shapes tension-shear and mixed-mode have them"), "{err}");
    // A plane-strain point's ε33 stays 0: a hydrostatic path's ε33 is left out, with a note (it
    // was driven, as no plane-strain solver does; a user-style sweep).
    let json = d.join("hydro.json");
    let (code, out, err) = tancheck(&[
        "check".as_ref(),
        p.as_os_str(),
        "--path".as_ref(),
        "hydrostatic:0.002:4:2".as_ref(),
        "--json".as_ref(),
        json.as_os_str(),
    ]);
    assert_eq!(code, 0, "{out}{err}");
    let report = std::fs::read_to_string(&json).unwrap();
    assert!(
        report.contains("slot 33 (first at increment 1); a plane-strain point's ε33 stays 0"),
        "{out}{report}"
    );
}

// A deleted point has no modulus, wave speed or L/c: the page shows a dash there (the JSON has
// null), not "NaN", which read as a failed computation (a user-style sweep). The demo alloy
// plate of `tancheck demo` (invented numbers), with the built-in model.
#[test]
fn a_deleted_point_reads_as_a_dash_on_the_page() {
    let d = scratch("block-deleted-page");
    let p = d.join("plate.json");
    std::fs::write(
        &p,
        r#"{ "routine": { "model": "johnson-cook-block", "interface": "block", "kind": "solid-3d",
               "properties": [110000, 0.31, 900, 600, 0.3, 0.02, 1.0, 293, 1900, 1.0, 4.4e-9, 5.3e8, 0.9,
                              0.1, 0.9, -2.0, 0.01, 0.5, 0.4, 15.0, 0.99] },
             "start": { "temperature": 350 },
             "path": { "shape": "uniaxial-strain", "peak": 0.25, "steps": 25, "back": 10, "dtime": 4e-6 },
             "block": { "density": 4.4e-9, "characteristic_length": 1.5, "softening": true,
                        "rate_law": { "reference_rate": 1.0, "coefficient": 0.02 } } }"#,
    )
    .unwrap();
    let html = d.join("plate.html");
    let (code, out, err) = tancheck(&["check".as_ref(), p.as_os_str(), "--html".as_ref(), html.as_os_str()]);
    assert_eq!(code, 0, "{out}{err}");
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains(">deleted<") && page.contains(">—<"), "{page}");
    assert!(!page.contains("NaN"), "{page}");
}
