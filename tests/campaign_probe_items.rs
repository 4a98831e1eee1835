//! A campaign's probe item: its finding lists the failed probes, comma-separated, and an
//! `expect_finding` naming one of them is as expected (it read "not as expected" beside
//! `tangent,newton`; a user-style sweep).

use std::process::Command;

use serde_json::Value;
use tancheck_testkit::libs::scratch;

#[test]
fn an_expected_probe_among_the_failed_ones_is_as_expected() {
    let d = scratch("campaign-probe-items");
    // The built-in J2 returning its continuum tangent: the tangent probe and the Newton rate
    // both fail after yield (the worked case of REFERENCES.md: H_iso 1000, H_kin 500 MPa).
    std::fs::write(
        d.join("m.json"),
        r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
  "path": { "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 } }"#,
    )
    .unwrap();
    std::fs::write(
        d.join("suite.json"),
        r#"{ "suite": "two", "probes": [ {"probe": "tangent"}, {"probe": "newton"} ] }"#,
    )
    .unwrap();
    let campaign = |expected: &str| {
        format!(
            r#"{{ "format": "tancheck-campaign", "version": 1, "name": "probe-items",
  "routines": [ {{ "manifest": "m.json", "check": false, "probes": ["suite.json"], "expect": "fail", "expect_finding": "{expected}" }} ] }}"#
        )
    };
    for (expected, as_expected) in [("newton", true), ("tangent", true), ("symmetry", false)] {
        let file = d.join(format!("c-{expected}.json"));
        std::fs::write(&file, campaign(expected)).unwrap();
        let json = d.join(format!("r-{expected}.json"));
        let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
            .arg("campaign")
            .arg(&file)
            .args(["-q", "--json"])
            .arg(&json)
            .output()
            .unwrap();
        let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
        let item = &v["items"][0];
        assert_eq!(item["finding"], "tangent,newton", "{item}");
        assert_eq!(item["as_expected"], as_expected, "{expected}: {item}");
        assert_eq!(o.status.code(), Some(if as_expected { 0 } else { 1 }), "{expected}: {item}");
    }
}
