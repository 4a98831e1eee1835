//! Branch coverage: a path that never leaves the elastic branch, or never unloads, is
//! flagged; the default path (into the plastic range and back) is not. Per-branch summaries
//! count increments and failures.

use tancheck::core::path::{Path, Shape};
use tancheck::core::{check, Caller, PointKind, PointState, Report, Routine, Settings};
use tancheck::models::reference;

fn run(model: &str, path: &Path) -> Report {
    let mut r = reference(model, PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let props: Vec<f64> = if model == "elastic" {
        vec![200000.0, 0.3]
    } else {
        vec![200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0]
    };
    let mut caller = Caller::new(&mut r);
    check::run(&mut caller, &props, PointState::zero(&info, 20.0), path, &Settings::default()).unwrap()
}

#[test]
fn an_elastic_only_uniaxial_path_is_flagged() {
    // Uniaxial strain to 5e-4 stays below yield (about 1.6e-3 for these properties).
    let r = run("j2", &Path::ramp(Shape::UniaxialStrain, 5e-4, 4, 0));
    assert!(r.coverage.iter().any(|c| c.contains("never changed the state")), "{:?}", r.coverage);
    assert!(r.coverage.iter().any(|c| c.contains("never unloaded")), "{:?}", r.coverage);
}

#[test]
fn the_default_path_reaches_plastic_flow_and_unloading() {
    let r = run("j2", &tancheck::cli::session::default_path(PointKind::Solid3d));
    assert!(r.coverage.is_empty(), "{:?}", r.coverage);
    assert!(r.branches.len() >= 2, "{:?}", r.branches);
    let total: usize = r.branches.iter().map(|b| b.increments).sum();
    assert_eq!(total, r.increments.len());
    assert!(r.branches.iter().all(|b| b.failed == 0));
}

#[test]
fn failures_are_counted_per_branch() {
    let r = run("j2-continuum", &tancheck::cli::session::default_path(PointKind::Solid3d));
    let plastic = r.branches.iter().find(|b| b.branch.starts_with("#1")).expect("a plastic branch");
    let elastic = r.branches.iter().find(|b| b.branch.starts_with("#0")).expect("an elastic branch");
    assert_eq!(plastic.failed, plastic.increments, "{plastic:?}");
    assert_eq!(elastic.failed, 0, "{elastic:?}");
}

/// A path that changes the temperature and a routine that never returns ∂σ/∂T: nothing of the
/// temperature coupling was checked, and the report says so (it passed in silence). A routine
/// that returns it gets no such warning.
#[test]
fn a_temperature_path_without_a_returned_dtemp_is_flagged() {
    let mut path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    for inc in &mut path.increments {
        inc.dtemp = 25.0;
    }
    let r = run("elastic", &path);
    assert!(r.coverage.iter().any(|c| c.contains("never returned ∂σ/∂T")), "{:?}", r.coverage);
    let mut m = reference("thermo", PointKind::Solid3d).unwrap();
    let info = m.info().clone();
    let mut caller = Caller::new(&mut m);
    let props = [210000.0, 0.3, 1e-5, 1.0, 1.0, 0.0];
    let r =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert!(!r.coverage.iter().any(|c| c.contains("∂σ/∂T")), "{:?}", r.coverage);
    // Without a temperature change, no warning either.
    let r = run("elastic", &Path::ramp(Shape::TensionShear, 4e-3, 8, 4));
    assert!(!r.coverage.iter().any(|c| c.contains("∂σ/∂T")), "{:?}", r.coverage);
}
