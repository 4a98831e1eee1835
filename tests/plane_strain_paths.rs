//! A plane-strain point's ε33 stays 0 by its kind, whatever path drives it: a path's ε33 is
//! left out with a note, and σ33, the reaction to ε33 = 0, is not held. Before, the built-in
//! hydrostatic path drove ε33 at a plane-strain point and uniaxial stress held σ33 at zero
//! there, neither of which a plane-strain solver does (a user-style sweep).
//!
//! The expected stresses are Hooke's law of isotropic linear elasticity in plane strain
//! (ε33 = 0): σ11 = (λ + 2μ) ε11 + λ ε22, σ33 = λ (ε11 + ε22) = ν (σ11 + σ22), and under
//! σ22 = 0 the plane-strain modulus E / (1 − ν²) with ε22 = −ν/(1 − ν) ε11 (any elasticity
//! text, e.g. Timoshenko & Goodier, Theory of Elasticity, the plane-strain chapter; from memory).

use tancheck::core::path::{Path, PathIncrement, Shape};
use tancheck::core::{check, Caller, PointKind, PointState, Report, Routine, Settings};
use tancheck::models::reference;

const E: f64 = 200000.0;
const NU: f64 = 0.3;

fn lame() -> (f64, f64) {
    (E * NU / ((1.0 + NU) * (1.0 - 2.0 * NU)), E / (2.0 * (1.0 + NU)))
}

fn run(kind: PointKind, path: &Path) -> Result<Report, String> {
    let mut r = reference("elastic", kind).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    check::run(&mut caller, &[E, NU], PointState::zero(&info, 20.0), path, &Settings::default())
        .map_err(|e| e.to_string())
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * b.abs().max(1.0)
}

#[test]
fn a_hydrostatic_path_leaves_a_plane_strain_points_e33_at_zero() {
    let eps = 1e-3;
    let rep = run(PointKind::PlaneStrain, &Path::ramp(Shape::Hydrostatic, eps, 2, 0)).unwrap();
    assert_eq!(rep.exit_code(), 0, "{:?}", rep.notes);
    // Routine order 11, 22, 33, 12.
    for inc in &rep.increments {
        assert_eq!(inc.strain[2], 0.0, "ε33 of increment {} moved", inc.index);
    }
    let last = rep.increments.last().unwrap();
    let (l, m) = lame();
    assert!(close(last.strain[0], eps) && close(last.strain[1], eps), "{:?}", last.strain);
    assert!(
        close(last.stress[0], 2.0 * (l + m) * eps),
        "σ11 {} against {}",
        last.stress[0],
        2.0 * (l + m) * eps
    );
    assert!(close(last.stress[2], 2.0 * l * eps), "σ33 {} against {}", last.stress[2], 2.0 * l * eps);
    assert!(
        rep.notes.iter().any(|n| n.contains("slot 33 (first at increment 1)")
            && n.contains("its ε33 stays 0 and σ33 is the reaction to it")
            && n.contains("they were left out")),
        "{:?}",
        rep.notes
    );
    // An axisymmetric point's 33 is its hoop strain, a component the path drives.
    let axi = run(PointKind::Axisymmetric, &Path::ramp(Shape::Hydrostatic, eps, 2, 0)).unwrap();
    assert!(close(axi.increments.last().unwrap().strain[2], eps));
    assert!(!axi.notes.iter().any(|n| n.contains("left out")), "{:?}", axi.notes);
}

#[test]
fn uniaxial_stress_at_a_plane_strain_point_holds_s22_and_not_s33() {
    let eps = 1e-3;
    let rep = run(PointKind::PlaneStrain, &Path::uniaxial_stress(eps, 2, 0)).unwrap();
    assert_eq!(rep.exit_code(), 0, "{:?}", rep.notes);
    let last = rep.increments.last().unwrap();
    assert_eq!(last.strain[2], 0.0, "ε33 moved: {:?}", last.strain);
    assert!(close(last.strain[1], -NU / (1.0 - NU) * eps), "ε22 {:?}", last.strain);
    let s11 = E / (1.0 - NU * NU) * eps;
    assert!(close(last.stress[0], s11), "σ11 {} against {s11}", last.stress[0]);
    assert!(last.stress[1].abs() <= 1e-6 * s11, "σ22 held at zero: {}", last.stress[1]);
    assert!(close(last.stress[2], NU * s11), "σ33 {} against ν σ11 = {}", last.stress[2], NU * s11);
    assert!(
        rep.notes
            .iter()
            .any(|n| n.contains("holds σ33 at 0 (first at increment 1)") && n.contains("not held")),
        "{:?}",
        rep.notes
    );
    // A plane-stress point holds nothing more than its kind gives: no such note.
    let ps = run(PointKind::PlaneStress, &Path::uniaxial_stress(eps, 2, 0)).unwrap();
    assert!(!ps.notes.iter().any(|n| n.contains("σ33")), "{:?}", ps.notes);
}

#[test]
fn a_plane_strain_point_cannot_hold_s33_at_another_value() {
    let mut inc = PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]);
    inc.hold_stress = Some([None, None, Some(40.0), None, None, None]);
    let path = Path { name: "σ33 held at 40".into(), increments: vec![inc] };
    let e = run(PointKind::PlaneStrain, &path).unwrap_err();
    assert!(
        e.contains("increment 1 of the path holds the stress in slot 33 at 40")
            && e.contains("its ε33 stays 0 and σ33 is the reaction to it"),
        "{e}"
    );
}
