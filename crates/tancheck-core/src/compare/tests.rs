//! Tests of the comparison on worked tangents.

use super::*;
use crate::convention::{PointKind, ShearMeasure};
use crate::worked::{self, isotropic};

#[test]
fn one_small_wrong_entry_is_seen_under_large_diagonal_entries() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let good = isotropic(&conv, 115384.6, 76923.1);
    let mut bad = good.clone();
    // A zero coupling entry (11 row, 12 column) set to 1e-5 of the matrix norm.
    let norm: f64 = {
        let mut m = good.clone();
        conv.tangent_to_mandel(&mut m);
        m.iter().map(|x| x * x).sum::<f64>().sqrt()
    };
    bad[5 * 6] = 1e-5 * norm;
    let c = compare(&conv, &bad, &good, 1e-6, 1e-2, 3);
    assert!(!c.pass);
    assert!(c.norm_error < 2e-5, "the norm alone barely sees it: {}", c.norm_error);
    assert!(c.worst_entry_error > 1e-4);
    assert_eq!(c.worst[0].label, "11/12");
    assert!(compare(&conv, &good, &good, 1e-12, 1e-2, 3).pass);
    // Every entry's error is kept for a failing comparison (the HTML heatmap), column-major
    // in routine order: the wrong one is row 0 (11), column 5 (12), and only it is off.
    assert_eq!(c.entry_errors.len(), 36);
    assert_eq!(c.entry_errors[5 * 6], c.worst_entry_error);
    assert!(c.entry_errors.iter().enumerate().all(|(k, &e)| k == 5 * 6 || e == 0.0), "{:?}", c.entry_errors);
    // ... and dropped when it passes.
    assert!(compare(&conv, &good, &good, 1e-12, 1e-2, 3).entry_errors.is_empty());
}

#[test]
fn the_verdict_does_not_depend_on_the_convention() {
    // The same wrong map written in two conventions gives the same errors.
    let a = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let b = Convention::from_labels(
        PointKind::Solid3d,
        &["11", "22", "33", "12", "13", "23"],
        ShearMeasure::Tensor,
    )
    .unwrap();
    let ga = isotropic(&a, 100.0, 50.0);
    let gb = isotropic(&b, 100.0, 50.0);
    let mut ba = ga.clone();
    let mut bb = gb.clone();
    // Scale the 23-23 shear entry by 2 in both (the tensor-vs-engineering confusion).
    let pa = a.position(crate::convention::Component::C23).unwrap();
    let pb = b.position(crate::convention::Component::C23).unwrap();
    ba[pa + pa * 6] *= 2.0;
    bb[pb + pb * 6] *= 2.0;
    let ca = compare(&a, &ba, &ga, 1e-6, 1e-2, 1);
    let cb = compare(&b, &bb, &gb, 1e-6, 1e-2, 1);
    assert!((ca.norm_error - cb.norm_error).abs() < 1e-14);
    assert!((ca.worst_entry_error - 1.0).abs() < 1e-12);
    assert_eq!(ca.worst[0].label, "23/23");
    assert_eq!(cb.worst[0].label, "23/23");
}

#[test]
fn non_finite_entries_fail() {
    let conv = Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering);
    let c = compare(&conv, &[f64::NAN], &[200.0], 1e-6, 1e-2, 1);
    assert!(!c.pass);
    assert_eq!(c.non_finite_returned, 1);
    assert!(c.worst_entry_error.is_infinite());
}

// A returned zero ∂σ/∂T against rounding noise of a difference in the temperature is not a
// 100 % error: the floor is a stress scale per temperature scale. A genuine derivative of
// a thermo-elastic law (−C:1 α = −3κα ≈ −6.3 MPa/K for steel, K = E/(3(1 − 2ν)), E = 210 GPa, ν = 0.3,
// α = 12e-6/K: EN 1993-1-1 §3.2.6, memory) returned as zero still fails.
#[test]
fn dtemp_zero_against_noise_passes_and_against_a_real_derivative_fails() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let stress = [300.0, 100.0, 100.0, 0.0, 0.0, 50.0];
    let tangent = isotropic(&conv, 121153.8, 80769.2);
    let floor = dtemp_floor(&stress, &tangent, 2e-3, 20.0);
    assert!(floor > 0.0);
    let zero = [0.0; 6];
    let noise = [3e-9, -2e-9, 1e-9, 0.0, 4e-10, 0.0];
    let c = compare_dtemp_floor(&conv, &zero, &noise, Limits::new(1e-6, 1e-2, 1), floor);
    assert!(c.pass, "{c:?}");
    assert!(
        !compare_dtemp(&conv, &zero, &noise, Limits::new(1e-6, 1e-2, 1)).pass,
        "without the floor: 100 %"
    );
    let k = 210000.0 / (3.0 * (1.0 - 2.0 * 0.3));
    let real: [f64; 6] = [-3.0 * k * 12e-6, -3.0 * k * 12e-6, -3.0 * k * 12e-6, 0.0, 0.0, 0.0];
    assert!((real[0] + 6.3).abs() < 0.01, "{}", real[0]);
    assert!(!compare_dtemp_floor(&conv, &zero, &real, Limits::new(1e-6, 1e-2, 1), floor).pass);
}

// The soft-direction error: the J2 worked case of REFERENCES.md (θ = 0.5446266,
// θ̄ = 0.5381686) with the plastic correction 2μθ̄ n⊗n off by 1 %: the norm sees it against
// the elastic scale, the softest direction n against its own modulus 2μ(θ − θ̄) (or the
// soft floor).
#[test]
fn an_error_in_the_soft_direction_is_measured_against_the_soft_modulus() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let mu = worked::J2_E / (2.0 * (1.0 + worked::J2_NU));
    let (theta, theta_bar) = (worked::J2_THETA, worked::J2_THETA_BAR);
    let good = worked::j2(theta_bar);
    let bad = worked::j2(theta_bar * 1.01);
    let c =
        compare_along(&conv, &bad, &good, Limits::new(1e-4, 1e-2, 1), Some(&[1e-3, 0.0, 0.0, 0.0, 0.0, 0.0]));
    let soft_modulus = 2.0 * mu * (theta - theta_bar);
    let want = 0.01 * 2.0 * mu * theta_bar / soft_modulus.max(SOFT_FLOOR * 4.0e5);
    assert!(c.soft_error > 10.0 * c.norm_error, "{c:?}");
    assert!(c.soft_error > 0.5 * want && c.soft_error < 2.0 * want, "{} vs {want}", c.soft_error);
    assert!(!c.pass);
    assert_eq!(compare_along(&conv, &good, &good, Limits::new(1e-12, 1e-2, 1), None).soft_error, 0.0);
}

// The worst-entry list against the standard library's stable sort by decreasing error (the
// order it is documented to give), on errors with many ties, for every list length.
#[test]
fn the_worst_entries_are_those_of_a_stable_sort() {
    let errors: Vec<f64> = (0..36)
        .map(|k| ((k * 7919) % 11) as f64 * 0.5 + if k % 5 == 0 { f64::INFINITY } else { 0.0 })
        .collect();
    let mut sorted: Vec<(f64, usize)> = errors.iter().copied().zip(0..).collect();
    sorted.sort_by(|a, b| b.0.total_cmp(&a.0));
    for keep in [0, 1, 3, 4, 5, 35, 36, 40] {
        let mut w = Worst::new(keep);
        for (k, &e) in errors.iter().enumerate() {
            w.offer(e, k);
        }
        let got: Vec<(f64, usize)> = w
            .entries(|k| EntryDiff {
                row: k,
                col: 0,
                label: Label::pair("a", "b"),
                returned: 0.0,
                numerical: 0.0,
                error: 0.0,
            })
            .iter()
            .map(|e| (e.error, e.row))
            .collect();
        assert_eq!(got, sorted[..keep.min(36)].to_vec(), "keep {keep}");
        assert_eq!(w.max, f64::INFINITY);
    }
}

/// A difference tangent of a stress that does not move is rounding alone: entries of about
/// ε·S/h (S = 10, h = 1e-8: 2.2e-7) in a pattern of their own. Against a returned zero it is a
/// 100 % error relative to itself; against its rounding floor (16 ε S/(h tol) = 3.55 at
/// tol 1e-6) it is within the tolerance, while an elastic tangent returned there is not.
#[test]
fn a_tangent_zero_to_rounding_is_measured_against_its_floor() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let noise: Vec<f64> = (0..36)
        .map(|k| {
            if k % 7 == 0 {
                2.2e-7
            } else if k % 5 == 0 {
                -4.4e-7
            } else {
                0.0
            }
        })
        .collect();
    let zero = vec![0.0; 36];
    let floor = rounding_floor(crate::schemes::Scheme::Central, 10.0, 1e-8, 6e-6, 1e-6);
    assert!((floor - 16.0 * f64::EPSILON * 10.0 / 1e-14).abs() < 1e-12 * floor);
    let limits = Limits::new(1e-6, 1e-2, 3);
    let soft = SoftDirections::of(&conv, &noise, None);
    let without = compare_with(&conv, &zero, &noise, limits, &soft);
    assert!(!without.pass && without.norm_error > 0.99, "{}", without.norm_error);
    let with = compare_with(&conv, &zero, &noise, limits.with_abs_floor(floor), &soft);
    assert!(with.pass && with.error() < 1e-6, "{:?}", with);
    // The fast path of a passing comparison gives the same numbers.
    let mut r = zero.clone();
    conv.tangent_to_mandel(&mut r);
    let p = passing(&conv, &r, &noise, limits.with_abs_floor(floor), &soft).expect("passes");
    assert_eq!((p.norm_error, p.worst_entry_error), (with.norm_error, with.worst_entry_error));
    // An elastic tangent where the derivative is zero fails by thousands of floors.
    let elastic = isotropic(&conv, 4000.0, 6000.0);
    let wrong = compare_with(&conv, &elastic, &noise, limits.with_abs_floor(floor), &soft);
    assert!(!wrong.pass && wrong.worst_entry_error > 1e3, "{:?}", wrong.worst_entry_error);
    // A tangent above its floor is measured relative to itself, as before.
    let e2 = isotropic(&conv, 4000.0, 6000.0);
    let same = compare_with(
        &conv,
        &e2,
        &elastic,
        limits.with_abs_floor(floor),
        &SoftDirections::of(&conv, &elastic, None),
    );
    assert_eq!(same, compare_with(&conv, &e2, &elastic, limits, &SoftDirections::of(&conv, &elastic, None)));
    // The complex step subtracts no stresses, but the routine's arithmetic cancels in the
    // derivative part where the stress does not move: its floor is 16 ε S/(strain scale) over
    // tol, S/(strain scale) standing for ‖C‖ (here S = 10 at a strain scale of 1e-2, the step
    // 1e-20 of it: ‖C‖ ≈ 1000).
    let cs = rounding_floor(crate::schemes::Scheme::ComplexStep, 10.0, 1e-22, 1e-20, 1e-10);
    assert!((cs * 1e-10 - 16.0 * f64::EPSILON * 1000.0).abs() < 1e-9 * cs * 1e-10, "{cs}");
    let cs_limits = Limits::new(1e-10, 1e-2, 3);
    // A zero returned where the complex-step derivative is rounding (1e-16 of ‖C‖, the apex of
    // a perfectly plastic cone) passes; where it is 1e-6 of ‖C‖ (a small true derivative) fails.
    for (size, pass) in [(1e-13, true), (1e-3, false)] {
        let small: Vec<f64> = noise.iter().map(|x| x.signum() * size).collect();
        let soft = SoftDirections::of(&conv, &small, None);
        let c = compare_with(&conv, &zero, &small, cs_limits.with_abs_floor(cs), &soft);
        assert_eq!(c.pass, pass, "{size}: {c:?}");
    }
}
