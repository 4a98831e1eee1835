//! Tests of the cause trials on worked tangents with one planted flaw each.

use super::*;
use crate::convention::{Convention, PointKind, ShearMeasure};

/// The consistent J2 tangent of the worked case in REFERENCES.md (Simo & Taylor 1985,
/// derived).
fn j2_like() -> Vec<f64> {
    crate::worked::j2(crate::worked::J2_THETA_BAR)
}

fn ev<'a>(conv: &'a Convention, r: &'a [f64], n: &'a [f64], z: &'a [f64]) -> Evidence<'a> {
    Evidence {
        conv,
        returned: r,
        numerical: n,
        elastic: None,
        previous: None,
        refinement: None,
        strain_end: z,
        stress_end: z,
        state_changed: true,
        tol: 1e-10,
        entry_floor: 1e-2,
    }
}

#[test]
fn each_transformation_is_named_first() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let good = j2_like();
    let z = vec![0.0; 6];
    let mut half = good.clone();
    for j in 3..6 {
        for i in 0..6 {
            half[i + 6 * j] *= 0.5;
        }
    }
    assert_eq!(rank(&ev(&conv, &half, &good, &z))[0].cause, Cause::ShearFactor);
    let scaled: Vec<f64> = good.iter().map(|x| 1e3 * x).collect();
    let h = rank(&ev(&conv, &scaled, &good, &z));
    assert_eq!(h[0].cause, Cause::UniformScale);
    assert!(h[0].detail.contains("1.0000e3"), "{}", h[0].detail);
    let mut col = good.clone();
    col[4 * 6 + 1] += 5000.0;
    col[4 * 6 + 4] -= 3000.0;
    assert_eq!(rank(&ev(&conv, &col, &good, &z))[0].cause, Cause::OneColumn);
    // A rank-one error spread over all entries: θ̄ changed.
    let nv = [2.0 / 6f64.sqrt(), -1.0 / 6f64.sqrt(), -1.0 / 6f64.sqrt(), 0.0, 0.0, 0.0];
    let mut r1 = good.clone();
    for j in 0..6 {
        for i in 0..6 {
            r1[i + 6 * j] += 1000.0 * nv[i] * nv[j];
        }
    }
    // Without an elastic tangent the term is measured against the whole derivative.
    let h = rank(&ev(&conv, &r1, &good, &z));
    assert!(matches!(h[0].cause, Cause::TermScaled | Cause::RankOneTerm), "{:?}", h[0]);
    // With the elastic tangent: the plastic correction −2μθ̄ n⊗n of the worked case
    // (θ̄ = 0.5381686, REFERENCES.md) missing, with the wrong sign, or scaled by 0.8.
    let mu = 200000.0 / 2.6;
    let e = elastic_like();
    for (factor, want) in [(0.0, Cause::TermMissing), (-1.0, Cause::TermSign), (0.8, Cause::TermScaled)] {
        let mut bad = good.clone();
        for j in 0..6 {
            for i in 0..6 {
                bad[i + 6 * j] += (1.0 - factor) * 2.0 * mu * 0.5381686 * nv[i] * nv[j];
            }
        }
        let mut evd = ev(&conv, &bad, &good, &z);
        evd.elastic = Some(&e);
        let h = rank(&evd);
        assert_eq!(h[0].cause, want, "factor {factor}: {:?}", h[0]);
        if want == Cause::TermScaled {
            assert!(h[0].detail.contains("0.8"), "{}", h[0].detail);
        }
    }
}

fn elastic_like() -> Vec<f64> {
    let (e, nu) = (200000.0, 0.3);
    let mu = e / (2.0 * (1.0 + nu));
    let lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    let mut c = vec![0.0; 36];
    for j in 0..6 {
        for i in 0..6 {
            c[i + 6 * j] = if i < 3 && j < 3 { lambda } else { 0.0 }
                + if i == j {
                    if i < 3 {
                        2.0 * mu
                    } else {
                        mu
                    }
                } else {
                    0.0
                };
        }
    }
    c
}

// The symmetric part of an unsymmetric derivative, one wrong entry at 1e-4 (named), and a
// rank-two discrepancy a⊗b + b⊗a are each named first.
#[test]
fn symmetrized_single_entry_and_rank_two_are_named() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let z = vec![0.0; 6];
    let mut unsym = j2_like();
    unsym[1] += 2.0e4; // 22/11 differs from 11/22
    let mut sym = unsym.clone();
    for j in 0..6 {
        for i in 0..6 {
            sym[i + 6 * j] = 0.5 * (unsym[i + 6 * j] + unsym[j + 6 * i]);
        }
    }
    let h = rank(&ev(&conv, &sym, &unsym, &z));
    assert_eq!(h[0].cause, Cause::Symmetrized, "{:?}", &h[..2]);
    let good = j2_like();
    let mut one = good.clone();
    one[2 + 6] *= 1.0 + 1e-4; // row 33, column 22
    let h = rank(&ev(&conv, &one, &good, &z));
    assert_eq!(h[0].cause, Cause::SingleEntry, "{:?}", &h[..2]);
    assert!(h[0].detail.contains("33/22"), "{}", h[0].detail);
    let a = [0.0, 0.0, 0.0, 1.0, 0.0, 0.0];
    let b = [1.0, 1.0, 1.0, 0.0, 0.0, 0.0];
    let mut two = good.clone();
    for j in 0..6 {
        for i in 0..6 {
            two[i + 6 * j] += 3000.0 * (a[i] * b[j] + b[i] * a[j]);
        }
    }
    let h = rank(&ev(&conv, &two, &good, &z));
    assert_eq!(h[0].cause, Cause::RankTwo, "{:?}", &h[..2]);
}
