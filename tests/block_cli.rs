//! `tancheck check` and `tancheck probe` on block routines named by a manifest
//! (`routine.interface: "block"`): a compiled C block routine with its point counterpart passes,
//! a flawed one fails with its finding (exit 1), the JSON report says so, and a manifest whose
//! block section does not fit is refused with the file named (exit 2).

use std::path::{Path, PathBuf};
use std::process::Command;

use tancheck::abi::{build_library, BuildOptions};

fn dir() -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-root-test-{}-block-cli", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn library(d: &Path) {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/j2_block.c");
    build_library(&BuildOptions::new([src], d.join("libj2b.so"))).unwrap();
}

fn manifest(d: &Path, name: &str, symbol: &str, extra: &str) -> PathBuf {
    let text = format!(
        r#"{{
  "routine": {{ "library": "libj2b.so", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d",
               "states": 13, "properties": [200000, 0.3, 250, 1000, 0, 0, 500] }},
  "start": {{ "temperature": 293 }},
  "block": {{ "density": 7.85e-9, "characteristic_length": 2.0{extra} }}
}}"#
    );
    let p = d.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn tancheck(args: &[&std::ffi::OsStr]) -> (i32, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into(),
        String::from_utf8_lossy(&o.stderr).into(),
    )
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn check_and_probe_run_block_routines() {
    let d = dir();
    library(&d);
    let good = manifest(&d, "good.json", "c_j2_block", r#", "counterpart": { "symbol": "c_j2" }"#);
    let json = d.join("good-report.json");
    let (code, out, err) =
        tancheck(&["check".as_ref(), good.as_os_str(), "--json".as_ref(), json.as_os_str()]);
    assert_eq!(code, 0, "{out}\n{err}");
    assert!(out.contains("verdict: PASS"), "{out}");
    assert!(out.contains("counterpart: the stresses of c_j2 and of the block routine agree"), "{out}");
    assert!(out.contains("the tangent of c_j2 passes"), "{out}");
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["interface"], "block");
    assert_eq!(v["passed"], true);
    assert!(v["elastic"]["wave_speed"].as_f64().unwrap() > 0.0);

    let bad = manifest(&d, "bad.json", "c_j2_block_dissipation_sign", "");
    let (code, out, _) = tancheck(&["probe".as_ref(), bad.as_os_str()]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("FAIL dissipation-decreases"), "{out}");
}

#[test]
fn a_block_section_that_does_not_fit_is_refused_naming_the_file() {
    let d = dir();
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
}
