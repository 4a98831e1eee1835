//! The plane-stress trial: the in-plane block of a 3D tangent returned uncondensed.
//!
//! The derivative of a plane-stress update that holds σ33 at zero is the static condensation
//! C_ab − C_a3 C_3b / C_33 of the 3D tangent (any text on plane-stress return mapping; e.g.
//! Simo & Hughes 1998, §2.4, from memory). The tangents here are the J2 form of the worked case
//! (κ 1⊗1 + 2μθ (I − ⅓ 1⊗1) − 2μθ̄ n⊗n, REFERENCES.md) with a flow direction that has an
//! in-plane shear part, built in Mandel form and condensed here.

use super::*;
use crate::worked::{J2_E, J2_NU, J2_THETA, J2_THETA_BAR};

/// The 3D tangent in Mandel form (6 × 6, order 11 22 33 23 13 12): elastic with θ = 1, θ̄ = 0.
fn mandel_3d(theta: f64, theta_bar: f64) -> [[f64; 6]; 6] {
    let mu = J2_E / (2.0 * (1.0 + J2_NU));
    let kappa = J2_E / (3.0 * (1.0 - 2.0 * J2_NU));
    // A deviatoric unit direction with a 12 part (Mandel: the shear entry carries √2).
    let raw = [0.9, -0.2, -0.7, 0.0, 0.0, 0.5 * 2f64.sqrt()];
    let len = raw.iter().map(|x| x * x).sum::<f64>().sqrt();
    let nv = raw.map(|x| x / len);
    let mut c = [[0.0; 6]; 6];
    for (i, row) in c.iter_mut().enumerate() {
        for (j, x) in row.iter_mut().enumerate() {
            let one = if i < 3 && j < 3 { 1.0 } else { 0.0 };
            let id = if i == j { 1.0 } else { 0.0 };
            *x = kappa * one + 2.0 * mu * theta * (id - one / 3.0) - 2.0 * mu * theta_bar * nv[i] * nv[j];
        }
    }
    c
}

/// The plane-stress tangents of a 3D one: (condensed, uncondensed), in the routine form of
/// `conv` (plane stress, 11 22 12).
fn plane(conv: &Convention, c: &[[f64; 6]; 6]) -> (Vec<f64>, Vec<f64>) {
    const IN_PLANE: [usize; 3] = [0, 1, 5];
    let mut cond = vec![0.0; 9];
    let mut block = vec![0.0; 9];
    for (j, &b) in IN_PLANE.iter().enumerate() {
        for (i, &a) in IN_PLANE.iter().enumerate() {
            block[i + 3 * j] = c[a][b];
            cond[i + 3 * j] = c[a][b] - c[a][2] * c[2][b] / c[2][2];
        }
    }
    conv.tangent_from_mandel(&mut cond);
    conv.tangent_from_mandel(&mut block);
    (cond, block)
}

fn plane_ev<'a>(
    conv: &'a Convention,
    r: &'a [f64],
    n: &'a [f64],
    z: &'a [f64],
    elastic: (&'a [f64], &'a [f64]),
) -> Evidence<'a> {
    let mut e = ev(conv, r, n, z);
    e.elastic = Some(elastic.0);
    e.elastic_returned = Some(elastic.1);
    e
}

// A plastic plane-stress routine returning the in-plane block of its 3D consistent tangent
// (and of its elastic stiffness along an elastic step) is named `plane-stress-uncondensed`
// first: before it read `term-sign` (a user-style sweep's routine, condensing its stress but
// not its tangent). In engineering and tensor shear alike.
#[test]
fn an_uncondensed_tangent_is_named_first() {
    for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
        let conv = Convention::new(PointKind::PlaneStress, shear);
        let z = vec![0.0; 3];
        let (elastic, elastic_block) = plane(&conv, &mandel_3d(1.0, 0.0));
        let (good, block) = plane(&conv, &mandel_3d(J2_THETA, J2_THETA_BAR));
        let h = rank(&plane_ev(&conv, &block, &good, &z, (&elastic, &elastic_block)));
        assert_eq!(h[0].cause, Cause::Uncondensed, "{h:#?}");
        assert!(h[0].explains, "{h:#?}");
        // An elastic increment: its own tangent is the evidence.
        let mut e = ev(&conv, &elastic_block, &elastic, &z);
        e.state_changed = false;
        let h = rank(&e);
        assert_eq!(h[0].cause, Cause::Uncondensed, "{h:#?}");
    }
}

// Counter-cases. A plane-stress routine that condenses its elastic stiffness but scales its
// plastic correction down (returned stiffer along one direction, as an uncondensed tangent
// is) is not said uncondensed; nor is the same excess on a plane-strain point, nor a
// negative term (a plastic correction scaled up) with an uncondensed elastic stiffness.
#[test]
fn a_scaled_plastic_term_is_not_called_uncondensed() {
    let conv = Convention::new(PointKind::PlaneStress, ShearMeasure::Engineering);
    let z = vec![0.0; 3];
    let (elastic, elastic_block) = plane(&conv, &mandel_3d(1.0, 0.0));
    let (good, _) = plane(&conv, &mandel_3d(J2_THETA, J2_THETA_BAR));
    let (softer_term, _) = plane(&conv, &mandel_3d(J2_THETA, 0.5 * J2_THETA_BAR));
    let h = rank(&plane_ev(&conv, &softer_term, &good, &z, (&elastic, &elastic)));
    assert!(h.iter().all(|x| x.cause != Cause::Uncondensed), "{h:#?}");
    let (stiffer_term, _) = plane(&conv, &mandel_3d(J2_THETA, 1.5 * J2_THETA_BAR));
    let h = rank(&plane_ev(&conv, &stiffer_term, &good, &z, (&elastic, &elastic_block)));
    assert!(h.iter().all(|x| x.cause != Cause::Uncondensed), "{h:#?}");
    let strain = Convention::new(PointKind::PlaneStrain, ShearMeasure::Engineering);
    let e4 = crate::worked::isotropic(&strain, 1.0e5, 5.0e4);
    let mut more = e4.clone();
    more[0] += 100.0;
    let mut e = ev(&strain, &more, &e4, &[0.0; 4]);
    e.state_changed = false;
    assert!(rank(&e).iter().all(|x| x.cause != Cause::Uncondensed));
}

// On three or four components a discrepancy of rank two says little: a plane-stress or
// plane-strain continuum tangent, which explains to 1e-5, is named before an exact `rank-two`
// (the reports' finding was `rank-two`; a user-style sweep). On six components the exact
// explanation still leads.
#[test]
fn on_three_or_four_components_rank_two_comes_after_the_other_explanations() {
    let h = |cause, error_left| Hypothesis { cause, detail: String::new(), error_left, explains: true };
    let both = vec![h(Cause::RankTwo, 0.0), h(Cause::ContinuumTangent, 2.6e-5)];
    assert_eq!(super::super::finish(both.clone(), 1e-9, 3, 1e-3)[0].cause, Cause::ContinuumTangent);
    assert_eq!(super::super::finish(both.clone(), 1e-9, 4, 1e-3)[0].cause, Cause::ContinuumTangent);
    assert_eq!(super::super::finish(both, 1e-9, 6, 1e-3)[0].cause, Cause::RankTwo);
}

// A plane-strain tangent whose 33 row and column lost their coupling with 11 and 22 (the
// stress update keeps them: σ33 = λ(ε11 + ε22) + (λ + 2μ) ε33 from isotropic elasticity) is
// `coupling-missing`, the component named; it read `rank-two` (a user-style sweep).
#[test]
fn one_components_missing_coupling_is_named() {
    let conv = Convention::new(PointKind::PlaneStrain, ShearMeasure::Engineering);
    let mut good = crate::worked::isotropic(&conv, 1.15e5, 7.7e4);
    // A plastic part coupling 33 with the shear too (kept by the routine).
    let nv = [0.6, -0.2, -0.4, 0.5];
    for j in 0..4 {
        for i in 0..4 {
            good[i + 4 * j] -= 4.0e4 * nv[i] * nv[j];
        }
    }
    let mut bad = good.clone();
    for i in 0..2 {
        bad[i + 2 * 4] = 0.0;
        bad[2 + i * 4] = 0.0;
    }
    let mut e = ev(&conv, &bad, &good, &[0.0; 4]);
    e.state_changed = false;
    let h = rank(&e);
    assert_eq!(h[0].cause, Cause::CouplingMissing, "{h:#?}");
    assert!(h[0].detail.contains("of 33 with 11, 22"), "{}", h[0].detail);
}

// A plane-strain tangent written for the component order 11 22 12 33 where the routine
// declares 11 22 33 12 (rows and columns of 33 and 12 swapped together) is `component-order`,
// with the order it was written in; it read `rank-two` (a user-style sweep). A 3D tangent
// whose shear entries alone are reordered stays `shear-permutation`.
#[test]
fn a_tangent_in_another_component_order_is_named() {
    let conv = Convention::new(PointKind::PlaneStrain, ShearMeasure::Engineering);
    let mut good = crate::worked::isotropic(&conv, 1.15e5, 7.7e4);
    let nv = [0.6, -0.2, -0.4, 0.5];
    for j in 0..4 {
        for i in 0..4 {
            good[i + 4 * j] -= 4.0e4 * nv[i] * nv[j];
        }
    }
    let swap = [0, 1, 3, 2];
    let mut bad = vec![0.0; 16];
    for j in 0..4 {
        for i in 0..4 {
            bad[i + 4 * j] = good[swap[i] + 4 * swap[j]];
        }
    }
    let h = rank(&ev(&conv, &bad, &good, &[0.0; 4]));
    assert_eq!(h[0].cause, Cause::ComponentOrder, "{h:?}");
    assert!(h[0].detail.contains("component order 11 22 12 33"), "{}", h[0].detail);
    let conv3 = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let good3 = j2_like();
    let perm = [0, 1, 2, 5, 4, 3];
    let mut bad3 = vec![0.0; 36];
    for j in 0..6 {
        for i in 0..6 {
            bad3[i + 6 * j] = good3[perm[i] + 6 * perm[j]];
        }
    }
    let h = rank(&ev(&conv3, &bad3, &good3, &[0.0; 6]));
    assert_eq!(h[0].cause, Cause::ShearPermutation, "{h:?}");
}
