//! Correct routines are never called wrong: every reference model, at 1,000 random states
//! each along random paths, in every branch (asserted), presented in several component
//! orders and both shear measures, passes the default check (central differences and the
//! complex step) with zero false alarms.

use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::relabel::Relabel;
use tancheck::core::{check, Caller, Convention, PointKind, PointState, Routine, Settings, ShearMeasure};
use tancheck::models::reference;

fn conventions(kind: PointKind) -> Vec<Convention> {
    let orders: Vec<Vec<&str>> = match kind {
        PointKind::Solid3d => vec![
            vec!["11", "22", "33", "23", "13", "12"],
            vec!["11", "22", "33", "12", "13", "23"],
            vec!["12", "11", "23", "22", "13", "33"],
        ],
        PointKind::PlaneStrain | PointKind::Axisymmetric => {
            vec![vec!["11", "22", "33", "12"], vec!["12", "33", "22", "11"]]
        }
        PointKind::PlaneStress => vec![vec!["11", "22", "12"], vec!["12", "11", "22"]],
        PointKind::Cohesive3d => vec![vec!["n", "s1", "s2"], vec!["s2", "n", "s1"]],
        PointKind::Cohesive2d => vec![vec!["n", "s1"], vec!["s1", "n"]],
        _ => vec![kind.default_components().iter().map(|c| c.label()).collect()],
    };
    let mut v = Vec::new();
    for o in &orders {
        for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
            v.push(Convention::from_labels(kind, o, shear).unwrap());
        }
    }
    v
}

/// Walk `paths` random paths of `len` increments; returns (increments checked, increments
/// in which the state changed).
fn run(
    model: &str,
    kind: PointKind,
    props: &[f64],
    paths: usize,
    len: usize,
    amp: f64,
    seed: u64,
) -> (usize, usize) {
    run_with(model, kind, props, paths, len, amp, 0.0, seed).0
}

/// As `run`, with temperature increments up to `dtemp_amp` (heating on average); also
/// returns the branch ids the routine reported.
#[allow(clippy::too_many_arguments)]
fn run_with(
    model: &str,
    kind: PointKind,
    props: &[f64],
    paths: usize,
    len: usize,
    amp: f64,
    dtemp_amp: f64,
    seed: u64,
) -> ((usize, usize), Vec<i32>) {
    let mut branches_seen = Vec::new();
    let mut rng = StdRng::seed_from_u64(seed);
    let convs = conventions(kind);
    let settings = Settings::default();
    let (mut total, mut changed) = (0, 0);
    for p in 0..paths {
        let conv = convs[p % convs.len()].clone();
        let mut r = Relabel::new(reference(model, kind).unwrap(), conv).unwrap();
        let info = r.info().clone();
        // Alternate small increments (mostly elastic, many unloading) with large ones.
        let a = if p % 2 == 0 { amp } else { 0.25 * amp };
        let increments = (0..len)
            .map(|_| PathIncrement {
                dstrain: std::array::from_fn(|_| rng.gen_range(-a..a)),
                dtemp: if dtemp_amp > 0.0 { rng.gen_range(-0.3 * dtemp_amp..dtemp_amp) } else { 0.0 },
                dtime: 1.0,
                hold_stress: None,
            })
            .collect();
        let path = Path { name: format!("random path {p}"), increments };
        let mut caller = Caller::new(&mut r);
        let report = check::run(&mut caller, props, PointState::zero(&info, 20.0), &path, &settings).unwrap();
        for inc in &report.increments {
            assert!(
                inc.passed(),
                "false alarm: {model} {kind} in order {:?} ({:?} shear), path {p}, increment {}: {:#?}",
                report.routine.order,
                report.routine.shear,
                inc.index,
                inc
            );
            total += 1;
            changed += inc.state_changed as usize;
            if let Some(b) = inc.reported_branch {
                if !branches_seen.contains(&b) {
                    branches_seen.push(b);
                }
            }
        }
    }
    ((total, changed), branches_seen)
}

// Property sets inside each model's valid range; the check is the absence of false alarms.
const LINEAR: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
const VOCE: [f64; 7] = [210000.0, 0.29, 300.0, 800.0, 180.0, 25.0, 0.0];
const KINEMATIC: [f64; 7] = [200000.0, 0.3, 250.0, 0.0, 0.0, 0.0, 5000.0];
const MIXED: [f64; 7] = [70000.0, 0.33, 120.0, 300.0, 60.0, 40.0, 900.0];

#[test]
fn j2_in_every_hardening_setting_has_no_false_alarms() {
    for (i, props) in [LINEAR, VOCE, KINEMATIC, MIXED].iter().enumerate() {
        for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric] {
            let (total, plastic) = run("j2", kind, props, 100, 10, 1.2e-3, 17 + i as u64);
            assert!(total >= 1000, "{total}");
            assert!(plastic >= 200 && total - plastic >= 200, "both branches: {plastic} plastic of {total}");
        }
    }
}

#[test]
fn elasticity_in_every_kind_has_no_false_alarms() {
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::PlaneStress, PointKind::Uniaxial] {
        let (total, _) = run("elastic", kind, &[68900.0, 0.33], 100, 10, 2e-3, 5);
        assert!(total >= 1000);
    }
}

#[test]
fn thermo_elasticity_has_no_false_alarms() {
    // E20, ν0, ν1, EN 1993-1-2 Table 3.1 modulus, EN 1993-1-2 elongation, α (unused); random
    // heating paths from 20 °C through several ranges of both laws (the checks include ∂σ/∂T).
    let props = [210000.0, 0.3, 2e-5, 1.0, 1.0, 0.0];
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::PlaneStress, PointKind::Uniaxial] {
        let ((total, _), _) = run_with("thermo", kind, &props, 100, 10, 1e-3, 23.7, 31);
        assert!(total >= 1000);
    }
}

#[test]
fn the_cohesive_law_has_no_false_alarms_in_any_branch() {
    // K (N/mm³), N, S (MPa), G_Ic, G_IIc (N/mm), η: demo values of an interface.
    let props = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];
    for kind in [PointKind::Cohesive3d, PointKind::Cohesive2d] {
        let ((total, changed), mut branches) = run_with("cohesive", kind, &props, 100, 12, 1.2e-3, 0.0, 41);
        assert!(total >= 1000 && changed >= 100, "{total} {changed}");
        // Large separations as well, to take points to complete failure (branch 4).
        let (_, more) = run_with("cohesive", kind, &props, 20, 12, 6e-3, 0.0, 43);
        branches.extend(more);
        for b in [0, 1, 2, 3, 4] {
            assert!(branches.contains(&b), "{kind}: branch {b} reached ({branches:?})");
        }
    }
}
