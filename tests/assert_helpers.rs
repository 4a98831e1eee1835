//! The `cargo test` helpers of the facade (`tancheck::assert`): a Rust model or a compiled
//! library, a path, and a failure message that names the verdict, the finding and the
//! increment.

use std::path::{Path as FsPath, PathBuf};
use std::sync::OnceLock;

use tancheck::assert::{assert_finding, check_tangent, library_routine, CheckFailure, Options};
use tancheck::core::{ModelRoutine, Path, PointKind, Shape};

/// Worked J2 properties (E, nu, sy0, H_iso, Q, b, H_kin) as used across the tests.
const J2_PROPS: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

fn path() -> Path {
    Path::ramp(Shape::TensionShear, 4e-3, 8, 4)
}

fn built(name: &str, sources: &[&str]) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-assert-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    let root = FsPath::new(env!("CARGO_MANIFEST_DIR"));
    let lib = d.join(format!("lib{name}.so"));
    let opts = tancheck::abi::BuildOptions::new(sources.iter().map(|s| root.join(s)), &lib);
    tancheck::abi::build_library(&opts).unwrap();
    lib
}

fn c_zoo() -> &'static FsPath {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| built("zoo", &["fortran-shim/examples/c/j2.c", "fortran-shim/examples/c/zoo_j2.c"]))
}

#[test]
fn a_flawed_rust_model_fails_with_the_finding_and_the_increment_in_the_message() {
    let mut m =
        ModelRoutine(tancheck::models::zoo::ZooModel::new("j2-continuum", PointKind::Solid3d).unwrap());
    let e = check_tangent(&mut m, &J2_PROPS, &path(), &Options::default()).unwrap_err();
    let CheckFailure::Verdict(report) = &e else { panic!("expected a verdict: {e}") };
    let msg = e.to_string();
    assert!(
        msg.starts_with("tancheck: the tangent of `j2-continuum` is not consistent (verdict FAIL, finding `"),
        "{msg}"
    );
    assert!(msg.contains(&format!("finding `{}`", report.finding())), "{msg}");
    let first = report.increments.iter().find(|i| !i.passed()).unwrap();
    assert!(msg.contains(&format!("first failing increment {} ", first.index)), "{msg}");
    // The readable report follows, with the verdict line.
    assert!(msg.lines().count() > 2, "{msg}");
    // The panicking form carries the same message.
    let p = std::panic::catch_unwind(|| {
        let mut m =
            ModelRoutine(tancheck::models::zoo::ZooModel::new("j2-continuum", PointKind::Solid3d).unwrap());
        tancheck::assert_tangent_consistent(&mut m, &J2_PROPS, &path());
    })
    .unwrap_err();
    assert_eq!(p.downcast_ref::<String>().map(String::as_str), Some(msg.as_str()));
}

#[test]
fn a_wrong_expected_finding_fails_and_names_both() {
    let p = std::panic::catch_unwind(|| {
        let mut m = ModelRoutine(
            tancheck::models::zoo::ZooModel::new("j2-shear-factor", PointKind::Solid3d).unwrap(),
        );
        assert_finding(&mut m, &J2_PROPS, &path(), "transposed");
    })
    .unwrap_err();
    let msg = p.downcast_ref::<String>().unwrap();
    assert!(
        msg.contains("expected the finding `transposed`") && msg.contains("found `shear-factor`"),
        "{msg}"
    );
}

#[test]
fn bad_input_is_an_input_failure_naming_the_routine() {
    let mut m = ModelRoutine(tancheck::models::J2::new(PointKind::Solid3d).unwrap());
    let e = check_tangent(&mut m, &J2_PROPS[..3], &path(), &Options::default()).unwrap_err();
    assert!(matches!(e, CheckFailure::Input { .. }), "{e}");
    assert!(e.to_string().starts_with("tancheck could not check `j2`"), "{e}");
}

#[test]
fn compiled_library_routines_pass_and_fail_with_their_findings() {
    // The C J2 of the examples agrees with its consistent tangent; the zoo's flawed one is named.
    let mut good = library_routine(c_zoo(), "c_j2", PointKind::Solid3d, 13, 7).unwrap();
    let r = tancheck::assert_tangent_consistent(&mut good, &J2_PROPS, &path());
    assert!(r.routine.complex_twin, "the twin comes with the library");
    let mut bad = library_routine(c_zoo(), "c_j2_shear_factor", PointKind::Solid3d, 13, 7).unwrap();
    assert_finding(&mut bad, &J2_PROPS, &path(), "shear-factor");
    let e = check_tangent(&mut bad, &J2_PROPS, &path(), &Options::default()).unwrap_err();
    assert!(e.to_string().contains("`libzoo.so:c_j2_shear_factor` is not consistent"), "{e}");
}

#[test]
fn a_crashing_library_routine_fails_the_check_not_the_test_process() {
    let lib = built("misbehave", &["fortran-shim/examples/c/misbehave.c"]);
    let mut r = library_routine(&lib, "bad_null_deref", PointKind::Solid3d, 2, 2).unwrap();
    let e = check_tangent(&mut r, &[210000.0, 0.3], &path(), &Options::default()).unwrap_err();
    let msg = e.to_string();
    assert!(msg.contains("could not be checked") && msg.contains("finding `routine-fault`"), "{msg}");
    assert!(msg.contains("SIGSEGV") && msg.contains("in `bad_null_deref`"), "{msg}");
    let missing = library_routine(&lib, "no_such_routine", PointKind::Solid3d, 2, 2).unwrap_err();
    assert!(missing.to_string().contains("no_such_routine"), "{missing}");
}
