//! The trials at the apex of a pressure-dependent yield surface, where the derivative is a
//! multiple of 1⊗1 (Drucker–Prager with linear cohesion hardening returns the stress to the apex
//! along the hydrostatic axis: the stress there moves with the volumetric strain only, so the
//! consistent tangent is k 1⊗1, its deviatoric part zero; a standard result of the apex return,
//! e.g. de Souza Neto, Perić & Owen 2008, §8.3, from memory). k = 3574 MPa is the demo value a
//! user-style sweep measured; only its role matters here.

use super::*;

/// k 1⊗1 in the routine form (3D, engineering shear), with rounding of relative size `noise`
/// in its deviatoric part (the numerical tangent of a real routine carries some).
fn apex(k: f64, noise: f64) -> Vec<f64> {
    let mut c = vec![0.0; 36];
    for j in 0..3 {
        for i in 0..3 {
            c[i + 6 * j] = k * (1.0 + if i == j { noise } else { -0.5 * noise });
        }
    }
    c
}

// A zero tangent returned where the derivative is not zero (a hardening apex given the zero
// tangent of a perfectly plastic one): named for what was returned, not as a term scaled by
// 1.37.
#[test]
fn a_zero_tangent_is_named_so() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let z = vec![0.0; 6];
    let numerical = apex(3574.0, 1e-13);
    let zero = vec![0.0; 36];
    let h = rank(&ev(&conv, &zero, &numerical, &z));
    assert_eq!(h[0].cause, Cause::ZeroTangent, "{h:#?}");
    assert!(h[0].explains && h[0].detail.contains("every entry"), "{h:#?}");
    // Not offered where the returned tangent has a nonzero entry.
    let mut one = zero.clone();
    one[0] = 1.0;
    assert!(rank(&ev(&conv, &one, &numerical, &z)).iter().all(|x| x.cause != Cause::ZeroTangent));
}

// An apex tangent of the wrong size: the derivative has no deviatoric part, so no factor of a
// shear modulus can be read from it (0/0 read 0.5000×), and no elastic modulus is named.
#[test]
fn a_derivative_without_a_deviatoric_part_has_no_modulus_factors() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let z = vec![0.0; 6];
    let numerical = apex(3574.0, 1e-13);
    let returned: Vec<f64> = apex(3574.0, 0.0).iter().map(|x| 0.3773 * x).collect();
    let h = rank(&ev(&conv, &returned, &numerical, &z));
    let isotropic = [Cause::ShearModulus, Cause::BulkModulus, Cause::IsotropicModuli];
    assert!(h.iter().all(|x| !isotropic.contains(&x.cause)), "{h:#?}");
    assert!(h[0].explains, "the scale still explains it: {h:#?}");
}
