//! Block routines that misbehave on purpose (`fortran-shim/examples/c/misbehave_block.c`):
//! each misbehaviour is a fault (exit 3) or its finding, named, and nothing read from the calls
//! that misbehaved is reported as the routine's result.

use super::*;

fn misbehaving(d: &Path, symbol: &str, states: usize) -> PathBuf {
    let lib = build_once("misbehave_block_cli", &["fortran-shim/examples/c/misbehave_block.c"]);
    let p = d.join(format!("{symbol}.json"));
    std::fs::write(
        &p,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d",
               "states": {states}, "properties": [200000, 0.3] }},
  "block": {{ "density": 7.85e-9, "characteristic_length": 2.0 }} }}"#,
            lib.display()
        ),
    )
    .unwrap();
    p
}

#[test]
fn a_point_at_rest_must_return_finite_outputs() {
    // A direction of the strain increment taken without a guard: NaN for the neighbours at
    // rest in the independence check's blocks, with no rate law declared (so no rate check).
    let d = scratch("block-cli-at-rest");
    let m = misbehaving(&d, "mb_block_nan_at_rest", 0);
    let (code, out, err) = tancheck(&["check".as_ref(), m.as_os_str(), "--json".as_ref(), "-".as_ref()]);
    assert_eq!(code, 1, "{out}{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    schema_valid(&v);
    let f = &v["findings"][0];
    assert_eq!(f["finding"], "zero-rate-not-finite", "{v}");
    assert!(f["what"].as_str().unwrap().contains("the point at rest at position"), "{f}");
}

#[test]
fn a_guard_finding_in_the_elastic_responses_own_check_is_a_fault() {
    // Clean in the first call; from the next call on the last point reads past state_start.
    // The small increment from the start that checks the elastic response is the first such
    // call: under the full guards its finding is a fault of the routine (exit 3), not a note.
    let d = scratch("block-cli-state-overread");
    let m = misbehaving(&d, "mb_block_state_overread", 1);
    let args = ["check".as_ref(), m.as_os_str(), "--guards".as_ref(), "full".as_ref(), "-q".as_ref()];
    let (code, out, err) = tancheck(&args);
    assert_eq!(code, 3, "{out}{err}");
    let line = out.lines().find(|l| l.contains("routine-fault")).expect("the fault's line");
    assert!(
        line.starts_with("FAULT ") && line.contains("reads past the end of its read-only input state_start"),
        "{out}"
    );
}

#[test]
fn a_crash_or_guard_finding_in_the_independence_blocks_is_a_fault() {
    // Both routines are correct alone and in the first call; the independence check's blocks
    // of 7 and 128 points are the first to meet their misbehaviour. It is the routine's fault
    // whatever the neighbours' paths (exit 3), not a note beside a PASS.
    let d = scratch("block-cli-independence-fault");
    for (symbol, size, what) in [
        ("mb_block_large_crash", 128, "the routine crashed: segmentation fault"),
        ("mb_block_large_unwritten", 7, "left energy"),
    ] {
        let m = misbehaving(&d, symbol, 0);
        let (code, out, err) = tancheck(&["check".as_ref(), m.as_os_str(), "--json".as_ref(), "-".as_ref()]);
        assert_eq!(code, 3, "{symbol}: {out}{err}");
        let v: Value = serde_json::from_str(&out).unwrap();
        schema_valid(&v);
        let f = &v["findings"][0];
        assert_eq!(f["finding"], "routine-fault", "{symbol}: {v}");
        assert_eq!(f["check"], "independence", "{symbol}: {f}");
        let w = f["what"].as_str().unwrap();
        assert!(w.contains(&format!("in a block of {size}")) && w.contains(what), "{symbol}: {w}");
    }
}

#[test]
fn an_output_left_unwritten_after_the_first_call_is_a_fault_and_ends_the_check() {
    // Correct in the first call; after it the deleted flags are left unwritten. The point's
    // walk before the checks (the one that cuts increments a routine refuses) met it first and
    // let it go, and the loaded routine says a guard finding once: the checks then read the
    // pre-fill as "deleted" and reported a deletion that never happened, exit 1 (with
    // `"independence": false`; with it, the fault of the fresh instance beside it; a user-style
    // sweep). Now the fault is said there, exit 3, and nothing read from such calls follows.
    let d = scratch("block-cli-deleted-unwritten");
    let m = misbehaving(&d, "mb_block_deleted_unwritten", 0);
    let text = std::fs::read_to_string(&m).unwrap();
    let alone = d.join("alone.json");
    std::fs::write(
        &alone,
        text.replace(
            r#""characteristic_length": 2.0"#,
            r#""characteristic_length": 2.0, "independence": false"#,
        ),
    )
    .unwrap();
    for m in [&m, &alone] {
        let (code, out, err) = tancheck(&["check".as_ref(), m.as_os_str(), "--json".as_ref(), "-".as_ref()]);
        assert_eq!(code, 3, "{}: {out}{err}", m.display());
        let v: Value = serde_json::from_str(&out).unwrap();
        schema_valid(&v);
        let f = v["findings"].as_array().unwrap();
        assert_eq!(f.len(), 1, "{v:#}");
        assert_eq!(f[0]["finding"], "routine-fault", "{v:#}");
        assert!(f[0]["what"].as_str().unwrap().contains("left deleted[0] unwritten"), "{v:#}");
        assert!(v["notes"].to_string().contains("the other block checks were not made"), "{v:#}");
    }
}

#[test]
fn a_first_call_that_fails_gives_no_moduli() {
    // The elastic response left an energy unwritten: nothing was measured, and the reports
    // say so (they gave a wave speed and L/c of 0 as if measured; a user-style sweep).
    let d = scratch("block-cli-first-call-fails");
    let m = misbehaving(&d, "mb_block_unwritten", 0);
    let html = d.join("page.html");
    let args = [
        "check".as_ref(),
        m.as_os_str(),
        "--json".as_ref(),
        "-".as_ref(),
        "--html".as_ref(),
        html.as_os_str(),
    ];
    let (code, out, err) = tancheck(&args);
    assert_eq!(code, 3, "{out}{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    schema_valid(&v);
    for k in ["dilatational_modulus", "wave_speed", "stable_time_increment"] {
        assert!(v["elastic"][k].is_null(), "{k}: {v:#}");
    }
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains("not measured (the first call did not give it)"), "{page}");
    let (_, out, _) = tancheck(&["check".as_ref(), m.as_os_str()]);
    assert!(out.contains("elastic response (first call): not measured"), "{out}");
}

#[test]
fn a_block_call_that_never_returns_is_named_with_its_block() {
    // Spins for ever in a block of 7 points: the watchdog's last words place the hang in that
    // block call (it said "between two calls ... from a thread the routine left running?").
    let d = scratch("block-cli-spin");
    let m = misbehaving(&d, "mb_block_spin7", 0);
    let args = ["check".as_ref(), m.as_os_str(), "--call-timeout".as_ref(), "2".as_ref(), "-q".as_ref()];
    let (code, out, err) = tancheck(&args);
    assert_eq!(code, 3, "{out}{err}");
    let all = format!("{out}{err}");
    assert!(all.contains("did not return within 2 s"), "{all}");
    assert!(all.contains("during a block call of increment 1 (a block of 7 points)"), "{all}");
    assert!(!all.contains("between two calls"), "{all}");
}
