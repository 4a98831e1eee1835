//! Tests of the stability measures on isotropic elasticity and perturbed tangents.

use super::normals::{det_q, fourth_order, sphere};
use super::*;
use crate::convention::ShearMeasure;
use crate::worked::isotropic;

// For isotropic elasticity Q(n) = μ 1 + (λ + μ) n⊗n for every unit n (the classical
// acoustic tensor of isotropic elasticity), so det Q = μ²(λ + 2μ) in 3D and μ(λ + 2μ)
// in the plane, whatever the order or shear measure of the routine.
#[test]
fn isotropic_elasticity_has_the_classical_acoustic_determinant() {
    let (lambda, mu) = (115384.6, 76923.1);
    for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
        let conv = Convention::from_labels(PointKind::Solid3d, &["12", "11", "23", "33", "13", "22"], shear)
            .unwrap();
        let (d, n) = min_det_acoustic(&conv, &isotropic(&conv, lambda, mu));
        let want = mu * mu * (lambda + 2.0 * mu);
        assert!((d / want - 1.0).abs() < 1e-12, "{d} vs {want}");
        assert!((n[0] * n[0] + n[1] * n[1] + n[2] * n[2] - 1.0).abs() < 1e-12);
        let conv = Convention::new(PointKind::PlaneStrain, shear);
        let (d, _) = min_det_acoustic(&conv, &isotropic(&conv, lambda, mu));
        assert!((d / (mu * (lambda + 2.0 * mu)) - 1.0).abs() < 1e-12);
    }
    let a = assess(&Convention::new(PointKind::Solid3d, ShearMeasure::Engineering), &{
        let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
        isotropic(&conv, lambda, mu)
    });
    // Eigenvalues of isotropic elasticity in Mandel form: 3λ + 2μ once, 2μ five times.
    assert!((a.scale - (3.0 * lambda + 2.0 * mu)).abs() < 1e-6);
    assert!((a.min_eigenvalue - 2.0 * mu).abs() < 1e-6);
    let conv = Convention::new(PointKind::Cohesive3d, ShearMeasure::Engineering);
    assert!(min_det_acoustic(&conv, &[1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0]).0.is_nan());
}

// The refined minimum is a true minimum: never above a brute-force scan on a 0.25° grid of
// the hemisphere, and close to it (the grid's error is second order in its spacing), for a
// tangent with a weak 12 shear mode (C1212 < 0: det Q(e₁) = −(λ + 2μ)μ|C1212|) plus an
// unsymmetric, anisotropic perturbation.
#[test]
fn the_refined_minimum_beats_a_fine_scan() {
    let (lambda, mu) = (100.0, 80.0);
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let mut t = isotropic(&conv, lambda, mu);
    t[5 + 5 * 6] = -1.0;
    for (k, x) in t.iter_mut().enumerate() {
        *x += 3.0 * ((k * 37 % 11) as f64 / 11.0 - 0.5);
    }
    let (d, n) = min_det_acoustic(&conv, &t);
    let c = fourth_order(&conv, &t);
    assert!((det_q(&c, &n, 3) - d).abs() <= 1e-12 * d.abs());
    let step = 0.25f64.to_radians();
    let mut brute = f64::INFINITY;
    for i in 0..=360 {
        for j in 0..1440 {
            brute = brute.min(det_q(&c, &sphere(i as f64 * step, j as f64 * step), 3));
        }
    }
    // The grid's error: (half a step)² times the curvature, of order the det scale.
    let det_scale = mu * mu * (lambda + 2.0 * mu);
    assert!(d <= brute + 1e-12 * det_scale, "refined {d}, scan {brute}");
    assert!(brute - d <= 1e-4 * det_scale, "refined {d}, scan {brute}");
    // And a local minimum: no smaller value 1e-4 rad away in any direction.
    let t0 = n[2].clamp(-1.0, 1.0).acos();
    let p0 = n[1].atan2(n[0]);
    for k in 0..16 {
        let a = k as f64 * std::f64::consts::PI / 8.0;
        let v = det_q(&c, &sphere(t0 + 1e-4 * a.cos(), p0 + 1e-4 * a.sin() / t0.sin().max(1e-3)), 3);
        assert!(v >= d - 1e-12 * det_scale, "{v} < {d}");
    }
    assert!(d < 0.0, "{d}");
}

// The walk skips the search only where its bound clears the tolerance: a loss is marked at
// min det Q/s^d ≤ tol, and the bound (λmin/2s)^d lies below the searched value, so a skip on
// λmin/s > tol alone missed losses the search marks. Steel-like elasticity with a user
// tolerance of 5 % (searched: μ²(λ + 2μ)/s³ ≈ 0.013) and a nearly shear-free material at the
// default tolerance: the shortcut marks what the search marks, and where it skips, the bound
// it reports clears the tolerance.
#[test]
fn the_shortcut_marks_a_loss_wherever_the_search_does() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    for (tol, lambda, mu) in [(0.05, 121_153.8, 80_769.2), (1e-12, 1.0, 1e-6), (1e-3, 100.0, 80.0)] {
        let t = isotropic(&conv, lambda, mu);
        let full = assess(&conv, &t);
        let quick = assess_unless_definite(&conv, &t, tol);
        let lost = |a: &Assessment| !a.bound_only && a.det_ratio().is_some_and(|r| r <= tol);
        assert_eq!(
            lost(&full),
            lost(&quick),
            "tol {tol}: searched {:?}, quick {:?}",
            full.det_ratio(),
            quick
        );
        if quick.bound_only {
            assert!(quick.det_ratio().unwrap() > tol, "tol {tol}: {quick:?}");
            assert!(quick.det_ratio().unwrap() <= full.det_ratio().unwrap(), "the bound is below the search");
        }
    }
    // Steel-like at 5 %: the search marks the loss, so the walk searches too.
    let t = isotropic(&conv, 121_153.8, 80_769.2);
    assert!(!assess_unless_definite(&conv, &t, 0.05).bound_only);
}
