//! The last words of a call that hangs inside a scheme's perturbed calls (a sweep) name the
//! perturbation: they read `"perturbation": null` beside a moved `dstrain` (a user-style sweep).
//! A bar (σ = E ε) that spins for ever once ε passes a limit a hair above the strain at the end
//! of increment 3: the base call there stays below it, the central difference's call moved up by
//! its step passes it.

use std::process::Command;

use serde_json::Value;
use tancheck_testkit::libs::{output_text as text, scratch};

#[test]
fn a_call_that_hangs_in_a_sweep_is_named_with_its_perturbation() {
    let d = scratch("hang-perturbed");
    std::fs::write(
        d.join("spin.c"),
        r#"#include "tancheck_cstep.h"
#include "tancheck_routine.h"

TC_ROUTINE(c_spin_above)
{
    (void)call; (void)temperature; (void)stress0; (void)state0; (void)state; (void)energy;
    const tc_real eps = strain[0] + dstrain[0];
    volatile int spin = tc_re(eps) > tc_re(properties[1]);
    while (spin) {
    }
    stress[0] = properties[0] * eps;
    tangent[0] = properties[0];
    dstress_dtemp[0] = 0.0;
    report->status = TC_STATUS_OK;
    report->branch = 0;
}
"#,
    )
    .unwrap();
    let lib = d.join("libspin.so");
    let bin = || Command::new(env!("CARGO_BIN_EXE_tancheck"));
    let o = bin().arg("build").arg(d.join("spin.c")).arg("-o").arg(&lib).arg("-q").output().unwrap();
    assert!(o.status.success(), "{}", text(&o));
    // Increments of 5e-4: increment 3 ends at 1.5e-3; its central step is 6e-6 × 1.5e-3 = 9e-9.
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "c_spin_above", "kind": "uniaxial", "states": 0,
               "properties": [1000, 1.5000045e-3] }},
  "path": {{ "increments": [ {inc}, {inc}, {inc} ] }} }}"#,
            lib.display(),
            inc = r#"{"dstrain": [5e-4, 0, 0, 0, 0, 0]}"#
        ),
    )
    .unwrap();
    let json = d.join("r.json");
    let o = bin().arg("check").arg(&m).args(["--call-timeout", "1", "--json"]).arg(&json).output().unwrap();
    assert_eq!(o.status.code(), Some(3), "{}", text(&o));
    assert!(text(&o).contains("a perturbed call, dstrain[0] moved by 9"), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    let p = v["fault"]["call"]["perturbation"].as_str().unwrap_or_else(|| panic!("{v:#}"));
    assert!(p.starts_with("dstrain[0] moved by 9"), "{p}");
    assert_eq!(v["fault"]["call"]["increment"], 3, "{v:#}");
}
