//! The command line's default path per kind of point: a cohesive point opens with its slips
//! (the `mixed-mode` shape), so a tangent whose mixed-mode coupling is wrong fails the default
//! check; tension-shear left a cohesive point in pure opening, where that coupling is zero, and
//! such a routine passed with no word (a user-style sweep). The cohesive law and its flawed
//! variant are the zoo's (`cohesive`, `cohesive-no-coupling`: every off-diagonal term of the
//! damaged tangent dropped).

use tancheck::cli::session::default_path;
use tancheck::core::{check, Caller, PointKind, PointState, Report, Routine, Settings, Verdict};
use tancheck::models::zoo::zoo_model;

/// The zoo's cohesive properties (K, strengths, mode mixity, …) as the coverage tests use them.
const COHESIVE: [f64; 6] = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];

fn run(name: &str, kind: PointKind) -> Report {
    let mut r = zoo_model(name, kind).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let path = default_path(kind);
    check::run(&mut caller, &COHESIVE, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap()
}

#[test]
fn a_cohesive_default_path_loads_the_slips() {
    for kind in [PointKind::Cohesive3d, PointKind::Cohesive2d] {
        let p = default_path(kind);
        assert!(p.name.starts_with("mixed-mode"), "{}", p.name);
        assert!(p.increments.iter().any(|i| i.dstrain[1] != 0.0), "{kind:?}: no slip in {}", p.name);
        assert!(!p.name.contains("left out"), "{}", p.name);
        let good = run("cohesive", kind);
        assert_eq!(good.verdict, Verdict::Pass, "{kind:?}: {:?}", good.notes);
        // Its shear components are slips: no shear measure is reported (it said "engineering").
        assert_eq!(good.routine.shear, "none (slips)");
        assert!(!good.notes.iter().any(|n| n.contains("left out")), "{:?}", good.notes);
        let bad = run("cohesive-no-coupling", kind);
        assert_eq!(bad.verdict, Verdict::TangentFailure, "{kind:?}: the default path misses the coupling");
    }
    // Solids keep tension-shear, a bar uniaxial strain.
    assert!(default_path(PointKind::Solid3d).name.starts_with("tension-shear"));
    assert!(default_path(PointKind::Uniaxial).name.starts_with("uniaxial-strain"));
}
