//! A block routine that stiffens on purpose: the built-in Johnson–Cook block model, whose
//! modulus E(T) = E (1 − k_E T*) rises as the point cools (its own definition, see
//! `tancheck_models::block::johnson_cook`), walked in its elastic range while it cools. Its
//! effective stiffness exceeds the elastic one of the first call, as it should: undeclared,
//! that is `stiffer-than-elastic` (a solver taking its wave speed from the first call would go
//! unstable); declared with `"stiffening": true` it is a note with the stable time increment
//! it falls to, and the check passes (it failed with nothing to declare; a user-style sweep).

use std::process::Command;

use serde_json::Value;
use tancheck_testkit::libs::scratch;

/// Johnson–Cook block properties (invented, of the order of a steel; k_E = 0.4) and a start
/// at 900 K: cooling by 100 K per increment at zero strain raises E by a few per cent per
/// increment. (At zero strain: with strain, the model's dissipation, internal − ½ σ·(ε − εp),
/// falls as E rises, which the energy check reports, as it should for what the model says.)
fn manifest(d: &std::path::Path, name: &str, stiffening: bool) -> std::path::PathBuf {
    let p = d.join(name);
    std::fs::write(
        &p,
        format!(
            r#"{{ "routine": {{ "model": "johnson-cook-block", "interface": "block", "kind": "solid-3d",
               "properties": [200000, 0.29, 792, 510, 0.26, 0.014, 1.03, 293, 1793, 1.0, 7.83e-9, 4.77e8, 0.9,
                              0.05, 3.44, -2.12, 0.002, 0.61, 0.4, 15.0, 0.99] }},
  "start": {{ "temperature": 900 }},
  "path": {{ "increments": [ {inc}, {inc}, {inc}, {inc} ] }},
  "block": {{ "density": 7.83e-9, "characteristic_length": 2.0, "stiffening": {stiffening} }} }}"#,
            inc = r#"{ "dstrain": [0, 0, 0, 0, 0, 0], "dtemp": -100, "dtime": 1e-5 }"#
        ),
    )
    .unwrap();
    p
}

fn check(m: &std::path::Path) -> (i32, Value) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(m)
        .args(["--json", "-"])
        .output()
        .unwrap();
    let v: Value = serde_json::from_slice(&o.stdout).unwrap_or_else(|e| {
        panic!("{e}: {}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
    });
    (o.status.code().unwrap(), v)
}

fn findings(v: &Value) -> Vec<String> {
    v["findings"].as_array().unwrap().iter().map(|f| f["finding"].as_str().unwrap().to_string()).collect()
}

#[test]
fn declared_stiffening_is_a_note_and_undeclared_a_finding() {
    let d = scratch("block-stiffening");
    let (code, v) = check(&manifest(&d, "cooling.json", false));
    assert_eq!(code, 1, "{v:#}");
    assert!(findings(&v).iter().any(|f| f == "stiffer-than-elastic"), "{v:#}");
    let (code, v) = check(&manifest(&d, "cooling-declared.json", true));
    assert_eq!(code, 0, "{v:#}");
    assert!(findings(&v).is_empty(), "{v:#}");
    let notes: Vec<&str> = v["notes"].as_array().unwrap().iter().map(|n| n.as_str().unwrap()).collect();
    assert!(
        notes.iter().any(|n| n.starts_with("stiffening (declared): the effective stiffness exceeds")
            && n.contains("from increment 1")
            && n.contains("a solver must take it from each increment")),
        "{notes:#?}"
    );
}
