//! Verdicts at and next to a branch boundary, through the command line, with routines that
//! break the two easy readings of the evidence there (both found by a user-style sweep):
//!
//! - a tangent that is the mean of the two sides at a kink, which the straddling central
//!   difference also gives, and which a twin on a branch that holds only at the point gives
//!   too: every check passes, yet the tangent is no side's derivative (exit 1,
//!   `kink-neither-side`); the correct routine still passes;
//! - a tangent wrong by 95 % a hair inside the elastic range after plastic loading: the
//!   forward study's error, smallest at its largest step and growing as the step shrinks,
//!   is no convergence, and the complex step, which alone is right there, is not blamed
//!   (exit 1, not TWIN's 4); the correct routine passes, with and without the complex step.
//!
//! Hand derivations: the bimodulus law σ11 = E_t ε11 (ε11 ≥ 0), E_c ε11 (ε11 < 0) has the
//! one-sided derivatives E_t and E_c at ε11 = 0, their mean (E_t + E_c)/2 neither; the bar
//! with E = 1000, σy = 1, H = 50 unloaded by 1e-10 after plastic loading is elastic at the
//! end, dσ/dε = E = 1000, against the plastic E H / (E + H) = 47.6.

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use tancheck_testkit::libs::{build_examples, output_text, scratch};

fn bimodulus() -> &'static Path {
    build_examples("kink_bimodulus", &["c/bimodulus.c"])
}

fn bar() -> &'static Path {
    build_examples("kink_bar", &["c/bar_1d.c"])
}

fn write(d: &Path, name: &str, text: String) -> PathBuf {
    let p = d.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// The check's exit code, its JSON report and its text.
fn check(manifest: &Path, flags: &[&str]) -> (Option<i32>, Value, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(manifest)
        .args(flags)
        .args(["--json", "-"])
        .output()
        .unwrap();
    let v: Value = serde_json::from_slice(&o.stdout).unwrap_or(Value::Null);
    (o.status.code(), v, output_text(&o))
}

/// A uniaxial bimodulus manifest (E_t 1000, E_c 3000) from ε11 = 1e-3 down to 0 exactly,
/// held there by a zero increment, then into compression.
fn on_the_kink(d: &Path, symbol: &str) -> PathBuf {
    write(
        d,
        &format!("{symbol}.json"),
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "uniaxial", "states": 0,
               "properties": [1000, 3000, 0.3] }},
  "start": {{ "strain": [0.001], "stress": [1.0] }},
  "path": {{ "increments": [ {{"dstrain": [-0.001, 0, 0, 0, 0, 0]}}, {{"dstrain": [0, 0, 0, 0, 0, 0]}},
                             {{"dstrain": [-0.0005, 0, 0, 0, 0, 0]}} ] }} }}"#,
            bimodulus().display()
        ),
    )
}

fn first_failure(v: &Value) -> (u64, String) {
    let inc = v["increments"]
        .as_array()
        .unwrap()
        .iter()
        .find(|i| i["diagnosis"]["pass"] == false)
        .unwrap_or_else(|| panic!("a failing increment: {v}"));
    (inc["index"].as_u64().unwrap(), inc["diagnosis"]["finding"].as_str().unwrap().to_string())
}

#[test]
fn the_mean_of_the_two_sides_at_a_kink_fails_even_where_every_check_agrees_with_it() {
    let d = scratch("kink-mean");
    // Twin on the mean's branch: central and complex step both agree with the mean.
    let m = on_the_kink(&d, "c_bimodulus_mean_branch");
    let (code, v, t) = check(&m, &[]);
    assert_eq!(code, Some(1), "{t}");
    assert_eq!(first_failure(&v), (1, "kink-neither-side".to_string()), "{t}");
    // Without the complex step (as for a routine without a twin): the central difference
    // alone agrees with the mean.
    let m = on_the_kink(&d, "c_bimodulus_average");
    let (code, v, t) = check(&m, &["--scheme", "central"]);
    assert_eq!(code, Some(1), "{t}");
    assert_eq!(first_failure(&v), (1, "kink-neither-side".to_string()), "{t}");
    // The correct routine returns the tension side's derivative at the kink: it passes with
    // and without the complex step.
    let m = on_the_kink(&d, "c_bimodulus");
    for flags in [&[][..], &["--scheme", "central"][..]] {
        let (code, _, t) = check(&m, flags);
        assert_eq!(code, Some(0), "{flags:?}: {t}");
    }
}

#[test]
fn a_wrong_tangent_a_hair_inside_the_elastic_range_fails_and_the_twin_is_not_blamed() {
    let d = scratch("kink-sticky");
    for back in ["1e-10", "3e-11", "1e-13"] {
        for (symbol, want) in [("c_bar_sticky", 1), ("c_bar_plastic", 0)] {
            let m = write(
                &d,
                &format!("{symbol}-{back}.json"),
                format!(
                    r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "uniaxial", "states": 2,
               "properties": [1000, 1.0, 50] }},
  "path": {{ "increments": [ {{"dstrain": [0.0025, 0, 0, 0, 0, 0]}}, {{"dstrain": [-{back}, 0, 0, 0, 0, 0]}} ] }} }}"#,
                    bar().display()
                ),
            );
            let (code, v, t) = check(&m, &[]);
            assert_eq!(code, Some(want), "{symbol}, unloaded by {back}: {t}");
            if want == 1 {
                let (index, finding) = first_failure(&v);
                assert_eq!(index, 2, "{t}");
                assert_ne!(finding, "twin-not-complex-step-safe", "{t}");
            }
            // Without the twin too: the boundary lies closer than the kink probe's smallest
            // step, and the backward side, the same at every step, is the branch the point is
            // in (the correct bar failed at 1e-10 and 3e-11 with the central scheme alone).
            let (code, _, t) = check(&m, &["--scheme", "central"]);
            assert_eq!(code, Some(want), "{symbol}, unloaded by {back}, central only: {t}");
        }
    }
}

#[test]
fn a_temperature_derivative_that_is_the_mean_of_the_sides_fails() {
    // E(T) = E0 (1 − a <T − T0>) with E0 1000, a 0.002, T0 100, at ε = 1e-3: a zero strain
    // increment from 90 to 100 (T0 exactly), held there, then on to 110. The right side's
    // dσ/dT at T0 is −a E0 ε = −2e-3, the left side's 0; the flawed routine returns the mean
    // −1e-3, and its twin's ramp agrees.
    let d = scratch("kink-thermal");
    for (symbol, want) in [("c_bar_thermal_mean", 1), ("c_bar_thermal", 0)] {
        let m = write(
            &d,
            &format!("{symbol}.json"),
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "uniaxial", "states": 0,
               "properties": [1000, 0.002, 100] }},
  "start": {{ "strain": [0.001], "temperature": 90 }},
  "path": {{ "increments": [ {{"dstrain": [0, 0, 0, 0, 0, 0], "dtemp": 10}}, {{"dstrain": [0, 0, 0, 0, 0, 0], "dtemp": 0}},
                             {{"dstrain": [0, 0, 0, 0, 0, 0], "dtemp": 10}} ] }} }}"#,
                bar().display()
            ),
        );
        for flags in [&[][..], &["--scheme", "central"][..]] {
            let (code, v, t) = check(&m, flags);
            assert_eq!(code, Some(want), "{symbol} {flags:?}: {t}");
            if want == 1 {
                let (index, finding) = first_failure(&v);
                assert_eq!((index, finding.as_str()), (1, "dtemp"), "{t}");
            }
        }
    }
}

#[test]
fn a_twin_unsafe_in_the_temperature_only_is_blamed_not_the_routine() {
    // E(T) = E0 (1 − a <T − T0>) at ε = 1e-3, heated from 110 on (above T0 = 100, away from the
    // kink) under growing strain. The twin of c_bar_thermal_real_e holds E(T) in a real
    // variable: its strain derivative is exact, its dσ/dT misses −a E0 ε (it reads 0), while
    // the central dσ/dT equals the returned one. Its verdict is the twin's (exit 4); the sound
    // routine beside it passes, and a wrong dσ/dT with a sound twin (c_bar_thermal_mean at T0,
    // above) still fails.
    let d = scratch("twin-thermal");
    for (symbol, want) in [("c_bar_thermal_real_e", 4), ("c_bar_thermal", 0)] {
        let m = write(
            &d,
            &format!("{symbol}.json"),
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "uniaxial", "states": 0,
               "properties": [1000, 0.002, 100] }},
  "start": {{ "strain": [0.001], "temperature": 110 }},
  "path": {{ "increments": [ {{"dstrain": [1e-4, 0, 0, 0, 0, 0], "dtemp": 10}}, {{"dstrain": [1e-4, 0, 0, 0, 0, 0], "dtemp": 5}} ] }} }}"#,
                bar().display()
            ),
        );
        let (code, v, t) = check(&m, &[]);
        assert_eq!(code, Some(want), "{symbol}: {t}");
        if want == 4 {
            assert_eq!(v["verdict"], "twin-not-safe", "{t}");
            assert!(t.contains("not complex-step safe in the temperature"), "{t}");
            // The set-aside checks are counted as cleared, not failed.
            let cs = v["summary"].as_array().unwrap().iter().find(|s| s["scheme"] == "complex-step").unwrap();
            assert_eq!((cs["failed"].as_u64(), cs["cleared"].as_u64()), (Some(0), Some(2)), "{t}");
            // So are the increments in their branch's summary (its worst error counts them).
            let cleared: u64 =
                v["branches"].as_array().unwrap().iter().map(|b| b["cleared"].as_u64().unwrap()).sum();
            assert_eq!(cleared, 2, "{t}");
        }
    }
}

fn cohesive() -> &'static Path {
    build_examples("kink_cohesive", &["c/cohesive.c"])
}

// A kink in one column beside a tangent wrong in another: the bundled cohesive law slipped at
// zero opening (the normal column has a kink there, contact against opening; the slip
// columns do not) into damage growth. Its secant variant is wrong in the slip columns: that
// is `secant`, found against the one-sided derivatives, not `kink-neither-side` with no cause
// tried (a user's secant cohesive routine read so, found by a user-style sweep). The correct
// routine passes. Properties: K = 1e5, N = 30, S = 40, G_Ic = 0.2, G_IIc = 0.8, η = 2 (made
// up; onset in pure slip at S/K = 4e-4).
#[test]
fn a_tangent_wrong_beside_a_kink_in_another_column_gets_its_cause() {
    let d = scratch("kink-cohesive");
    let manifest = |symbol: &str| {
        write(
            &d,
            &format!("{symbol}.json"),
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "cohesive-3d", "states": 2,
                   "properties": [1e5, 30, 40, 0.2, 0.8, 2] }},
  "path": {{ "increments": [ {{"dstrain": [0, 3e-4, 0, 0, 0, 0]}}, {{"dstrain": [0, 3e-4, 0, 0, 0, 0]}},
                             {{"dstrain": [0, 3e-4, 0, 0, 0, 0]}}, {{"dstrain": [0, -4e-4, 0, 0, 0, 0]}} ] }} }}"#,
                cohesive().display()
            ),
        )
    };
    let (code, v, t) = check(&manifest("c_cohesive_secant"), &[]);
    assert_eq!(code, Some(1), "{t}");
    let failing: Vec<&Value> =
        v["increments"].as_array().unwrap().iter().filter(|i| i["diagnosis"]["pass"] == false).collect();
    assert!(!failing.is_empty(), "{t}");
    for inc in &failing {
        assert_eq!(inc["diagnosis"]["finding"], "secant", "{t}");
    }
    assert_eq!(v["finding"], "secant", "{t}");
    // Its case, replayed, says that the central difference straddles the kink in column n
    // (its entry there, the mean of the two sides, was listed as a difference with no word;
    // a user-style sweep).
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("bisect")
        .arg(manifest("c_cohesive_secant"))
        .args(["--json", "-"])
        .output()
        .unwrap();
    let b: Value = serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", output_text(&o)));
    let case = b["cases"][0].as_str().unwrap_or_else(|| panic!("no case: {b:#}"));
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("replay")
        .arg(case)
        .args(["--json", "-"])
        .output()
        .unwrap();
    let r: Value = serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", output_text(&o)));
    let kink = r["kink"].as_str().unwrap_or_else(|| panic!("no kink said: {r:#}"));
    assert!(kink.starts_with("a kink at this call in column n:") && kink.contains("their mean"), "{kink}");
    let (code, v, t) = check(&manifest("c_cohesive"), &[]);
    assert_eq!(code, Some(0), "{t}");
    // The correct law's central checks straddle the kink and are cleared: with no failure
    // left, the summary says the worst errors it gives are theirs, before the closer look (it
    // read "0 of 4 checks failed …; worst norm error 1.00e0" as a failure; a user-style sweep).
    let central = v["summary"].as_array().unwrap().iter().find(|s| s["scheme"] == "central").unwrap();
    assert!(central["cleared"].as_u64().unwrap() > 0, "{t}");
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(manifest("c_cohesive"))
        .output()
        .unwrap();
    let t = output_text(&o);
    let line = t.lines().find(|l| l.trim_start().starts_with("central ")).unwrap_or_else(|| panic!("{t}"));
    assert!(line.contains("cleared on a closer look, whose errors before it are the worst here"), "{line}");
}
