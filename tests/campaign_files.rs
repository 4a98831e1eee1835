//! A bad campaign file is exit 2 before anything runs, naming the file and the place (a
//! start state that does not fit, two items with one key, an expectation that cannot hold, a
//! misspelt or unknown finding, a suite whose `at` misses a path, an unknown field, a wrong
//! format or version, a missing manifest, a bad path), and an earlier report stays as it was.

use std::process::{Command, Output};

use tancheck_testkit::libs::scratch;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

#[test]
fn a_bad_campaign_file_is_exit_2_naming_the_place_and_keeps_the_earlier_report() {
    let d = scratch("bad");
    let json = d.join("r.json");
    std::fs::write(&json, "earlier report").unwrap();
    std::fs::write(
        d.join("sized.json"),
        r#"{ "routine": { "library": "lib.so", "symbol": "s", "kind": "solid-3d", "states": 7, "properties": [1] }, "start": { "state": [0, 0, 0] } }"#,
    )
    .unwrap();
    let cases: [(&str, &str, &str); 14] = [
        // A manifest whose start state does not fit its routine, said before anything runs.
        ("start.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\"}, {\"manifest\": \"sized.json\"}]}", "start.state has 3 entries; routine.states is 7"),
        // Two items with one key (a property set named twice, a manifest listed twice) would
        // be taken for each other in reports, shards and merges.
        ("twice.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"property_sets\": [{\"name\": \"a\", \"values\": [200000, 0.3]}, {\"name\": \"a\", \"values\": [70000, 0.33]}]}]}", "routines[0]: two items would have the key"),
        ("listed-twice.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\"}, {\"manifest\": \"./m.json\"}]}", "routines[0] and routines[1]: two items"),
        // An expectation that can never be met.
        ("never.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"expect\": \"pass\", \"expect_finding\": \"term-scaled\"}]}", "routines[0]: `expect` is pass"),
        // A finding misspelt (it ran the campaign and read "not as expected"; a user-style sweep).
        ("underscore.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"expect\": \"fail\", \"expect_finding\": \"continuum_tangent\"}]}", "did you mean `continuum-tangent`"),
        ("typo.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"expect\": \"fail\", \"expect_finding\": \"shear-facter\"}]}", "did you mean `shear-factor`"),
        // A word no check or probe gives, and a finding without a failure expected (both ran
        // and read "not as expected", exit 1, as if the routine had changed; a user-style sweep).
        ("no-finding.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"expect\": \"fail\", \"expect_finding\": \"continuum\"}]}", "`continuum` is no finding a check or probe gives"),
        // A suite whose `at` is past the end of a path an item walks (the probe was judged at
        // every increment, without a word; a user-style sweep).
        ("at-past.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"paths\": [\"uniaxial-strain:0.001:3\"], \"probes\": [\"far-suite.json\"]}]}", "probe `tangent` runs at increment 9, but the path"),
        ("no-expect.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"expect_finding\": \"secant\"}]}", "without `expect`"),
        ("unknown.json", "{\"format\": \"tancheck-campaign\", \"version\": 1,\n \"routines\": [{\"manifest\": \"m.json\", \"colour\": 1}]}", "unknown.json:2:"),
        ("format.json", "{\"format\": \"other\", \"version\": 1, \"routines\": []}", "`format` is `other`"),
        ("version.json", "{\"format\": \"tancheck-campaign\", \"version\": 9, \"routines\": []}", "version 9"),
        ("missing.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"nothing.json\"}]}", "routines[0].manifest"),
        ("path.json", "{\"format\": \"tancheck-campaign\", \"version\": 1, \"routines\": [{\"manifest\": \"m.json\", \"paths\": [\"spiral:1:2\"]}]}", "routines[0].paths[0]"),
    ];
    std::fs::write(
        d.join("m.json"),
        r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    std::fs::write(
        d.join("far-suite.json"),
        r#"{ "suite": "far", "probes": [ {"probe": "tangent", "at": [9]} ] }"#,
    )
    .unwrap();
    for (name, body, want) in cases {
        std::fs::write(d.join(name), body).unwrap();
        let o = bin().arg("campaign").arg(d.join(name)).arg("--json").arg(&json).output().unwrap();
        assert_eq!(o.status.code(), Some(2), "{name}: {}", text(&o));
        assert!(text(&o).contains(name) && text(&o).contains(want), "{name}: {}", text(&o));
        assert_eq!(std::fs::read_to_string(&json).unwrap(), "earlier report", "{name}");
    }
}
