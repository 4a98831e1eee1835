//! `tancheck bisect` and `tancheck replay` on finite-strain routines: the first failing
//! increment, the fraction of it where the verdict changes, a case file that replays the call
//! bit for bit, and the same call judged again.
//!
//! The plastic onset below is the von Mises yield of the logarithmic-strain J2 model under
//! uniaxial stretch F = diag(s, 1, 1): the Hencky strain is uniaxial, ε = ln s, its deviator
//! gives a von Mises stress of 2μ ε = E ε / (1 + ν) (derived: the deviator of diag(ε, 0, 0) has
//! norm √(2/3) ε, and √(3/2) · 2μ · √(2/3) ε = 2μ ε), so yield at ln s = σy (1 + ν) / E = 0.0065
//! for E = 1000, ν = 0.3, σy = 5; in the first increment, s = 1 + 0.05 θ, at θ = (e^0.0065 − 1)
//! / 0.05 ≈ 0.1304. There the equivalent plastic strain (state 6) and the lateral elastic log
//! strains (states 1 and 2, zero while the strain is ln s e₁⊗e₁) start to change.

use std::process::Command;

use tancheck::core::finite::check::{run_checked, FiniteSettings};
use tancheck::core::finite::locate::{locate, FractionFound};
use tancheck::core::finite::{
    FiniteInfo, FiniteInput, FiniteModelRoutine, FiniteOutput, FinitePathSpec, FiniteRoutine, StressMeasure,
    TangentMeasure,
};
use tancheck::core::routine::Fault;
use tancheck::models::finite::J2Log;
use tancheck_testkit::libs::{output_text, scratch};

/// The J2 model whose returned tangent is 0.9 of the true one where its equivalent plastic
/// strain (the last state variable) changed: a flaw of the plastic branch only.
/// With `hide_branch`, it reports no branch (as many routines do).
struct PlasticFlaw(FiniteModelRoutine<J2Log>, bool);

impl FiniteRoutine for PlasticFlaw {
    fn info(&self) -> &FiniteInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.0.call(input, output)?;
        if output.state[6] != input.state0[6] {
            output.tangent.iter_mut().for_each(|x| *x *= 0.9);
        }
        if self.1 {
            output.outcome.branch = -1;
        }
        Ok(())
    }
}

#[test]
fn the_bracket_falls_where_the_state_starts_to_change() {
    let props = [1000.0, 0.3, 5.0, 20.0];
    let state0 = vec![0.0; J2Log::NSTATE];
    let path =
        FinitePathSpec::UniaxialStretch { stretch: 1.1, increments: 2, rotation: None }.build().unwrap();
    let settings = FiniteSettings::default();
    let yield_at = (0.0065f64.exp() - 1.0) / 0.05;
    for (hide_branch, words) in [
        (false, "the routine's branch changes there, from 0 to 1"),
        (true, "state variables 1, 2, 6 start to change"),
    ] {
        let model = J2Log::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
        let mut r = PlasticFlaw(FiniteModelRoutine(model), hide_branch);
        let (report, checked) = run_checked(&mut r, &props, &state0, &path, settings);
        assert!(!report.increments[0].passed, "{report:?}");
        let l = locate(&mut r, &props, &state0, &checked, &report, settings, 1e-6).expect("located");
        assert_eq!(l.increment, 1);
        match &l.fraction {
            FractionFound::Between { passes, fails, change } => {
                assert!(
                    *passes <= yield_at + 1e-5 && *fails >= yield_at - 1e-5,
                    "{passes} {fails} {yield_at}"
                );
                assert!(fails - passes <= 1e-6, "{passes} {fails}");
                assert!(change.contains(words), "{change}");
            }
            other => panic!("{other:?}"),
        }
    }
    // Without the flaw every increment passes and nothing is located.
    let mut ok = FiniteModelRoutine(J2Log::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann));
    let (report, checked) = run_checked(&mut ok, &props, &state0, &path, settings);
    assert!(report.increments.iter().all(|i| i.passed), "{report:?}");
    assert!(locate(&mut ok, &props, &state0, &checked, &report, settings, 1e-6).is_none());
}

fn tancheck(args: &[&str]) -> (i32, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    (o.status.code().unwrap_or(-1), output_text(&o))
}

fn manifest(dir: &std::path::Path, name: &str, model: &str) -> String {
    let text = format!(
        r#"{{ "finite": {{ "stress": "cauchy", "tangent": "sigma-jaumann" }},
           "routine": {{ "model": "{model}", "properties": [1000, 0.3] }},
           "path": {{ "shape": "uniaxial-stretch", "stretch": 1.5, "increments": 4,
                      "rotation": {{ "axis": [0, 0, 1], "angle": 0.6 }} }} }}"#
    );
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.display().to_string()
}

#[test]
fn bisect_writes_a_case_that_replays_bit_for_bit() {
    let dir = scratch("finite_bisect_cli");
    // A tangent of the Truesdell rate declared as the Jaumann one: it fails from the first
    // increment, where the stress grows from zero with the fraction.
    let file = manifest(&dir, "flawed.json", "nh-truesdell-for-jaumann");
    let json = dir.join("bisect.json");
    let (code, out) = tancheck(&["bisect", &file, "--json", json.to_str().unwrap()]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("first failing increment: 1 of 4") && out.contains("other-rate"), "{out}");
    assert!(out.contains("the error grows with the fraction"), "{out}");
    let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    assert_eq!(v["kind"], "finite-bisect");
    assert_eq!(v["fraction"]["found"], "between");
    let case = v["case"].as_str().expect("a case written").to_string();
    assert!(case.contains("tancheck-cases/flawed/"), "{case}");
    let replay_json = dir.join("replay.json");
    let (code, out) = tancheck(&["replay", &case, "--json", replay_json.to_str().unwrap()]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("the same as in the case, bit for bit") && out.contains("other-rate"), "{out}");
    let r: serde_json::Value = serde_json::from_slice(&std::fs::read(&replay_json).unwrap()).unwrap();
    assert_eq!((r["kind"].as_str(), r["identical"].as_bool()), (Some("finite-replay"), Some(true)));
    // Both reports as the shipped schema describes them.
    let schema: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(tancheck_testkit::libs::repo_root().join("schema/report.schema.json"))
            .unwrap(),
    )
    .unwrap();
    let validator = jsonschema::validator_for(&schema).unwrap();
    assert!(validator.is_valid(&v), "{v}");
    assert!(validator.is_valid(&r), "{r}");
    // The case with its start moved to a folded F (det F < 0) is bad input naming the file.
    let text = std::fs::read_to_string(&case).unwrap();
    let mut c: serde_json::Value = serde_json::from_str(&text).unwrap();
    c["call"]["f1"] = serde_json::json!({ "values": [-1.0, 0, 0, 0, 1, 0, 0, 0, 1] });
    let broken = dir.join("broken-case.json");
    std::fs::write(&broken, serde_json::to_string(&c).unwrap()).unwrap();
    let (code, out) = tancheck(&["replay", broken.to_str().unwrap()]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("broken-case.json") && out.contains("det F"), "{out}");
    // A case cut short is told where its JSON ends, not "unknown field `finite`" from the point
    // case's reader (a user-style sweep).
    let cut = dir.join("cut-case.json");
    std::fs::write(&cut, &text[..text.len() / 2]).unwrap();
    let (code, out) = tancheck(&["replay", cut.to_str().unwrap()]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("cut-case.json") && out.contains("EOF") && !out.contains("unknown field"), "{out}");
    // A correct routine: nothing to bisect, no case.
    let file = manifest(&dir, "correct.json", "nh-sigma-jaumann");
    let (code, out) = tancheck(&["bisect", &file]);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("nothing to bisect"), "{out}");
    assert!(!dir.join("tancheck-cases/correct").exists());
    // A built-in model given a property short is bad input naming the manifest, for check and
    // bisect alike (it ended in a panic; found trying the commands as a user).
    let short = dir.join("short.json");
    std::fs::write(
        &short,
        r#"{ "finite": { "stress": "cauchy", "tangent": "sigma-jaumann" },
             "routine": { "model": "nh-sigma-jaumann", "properties": [1000] } }"#,
    )
    .unwrap();
    for cmd in ["check", "bisect"] {
        let (code, out) = tancheck(&[cmd, short.to_str().unwrap()]);
        assert_eq!(code, 2, "{cmd}: {out}");
        assert!(out.contains("short.json") && out.contains("takes 2 properties"), "{cmd}: {out}");
    }
    // HTML and JUnit are not written for it: said before any call.
    let (code, out) = tancheck(&["bisect", &file, "--html", dir.join("x.html").to_str().unwrap()]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("--html") && out.contains("--json"), "{out}");
}
