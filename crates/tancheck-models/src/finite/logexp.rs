//! Functions of symmetric 3×3 tensors for the logarithmic-strain models: the square root
//! (Denman–Beavers iteration), the logarithm (inverse scaling and squaring) and the
//! exponential (scaling and squaring), written over [`Scalar`] without an eigen-decomposition
//! so that dual and complex parts stay exact when eigenvalues coincide; and, in real
//! arithmetic only, the eigen-decomposition (cyclic Jacobi) and the derivative of ½ ln b
//! along δb = D b + b D that the closed-form tangents use.
//!
//! Methods: Denman & Beavers (1976), Appl. Math. Comput. 2:63–94; inverse scaling and
//! squaring for the logarithm and scaling and squaring for the exponential (Higham, Functions
//! of Matrices, 2008, ch. 10–11); the derivative of a matrix function in the eigenbasis by
//! divided differences (Daleckii–Krein; Higham 2008, Thm. 3.11). All from memory.

#![allow(clippy::needless_range_loop)] // index notation reads as the formulas

use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::Scalar;

/// The largest entry of the real part of a − b.
fn change<S: Scalar>(a: &Mat3<S>, b: &Mat3<S>) -> f64 {
    let mut c = 0.0_f64;
    for i in 0..3 {
        for j in 0..3 {
            c = c.max((a[i][j] - b[i][j]).re().abs());
        }
    }
    c
}

/// The square root of a symmetric positive definite tensor by the Denman–Beavers iteration
/// Y ← ½(Y + Z⁻¹), Z ← ½(Z + Y⁻¹) from Y = A, Z = I; stops on the real parts, then makes
/// two more iterations so that derivative parts converge too.
pub fn sqrt_spd<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    let mut y = *a;
    let mut z = mat3::identity::<S>();
    let mut extra = 0;
    for _ in 0..100 {
        let yi = mat3::inverse(&y);
        let zi = mat3::inverse(&z);
        let yn = mat3::scale(&mat3::add(&y, &zi), S::cst(0.5));
        z = mat3::scale(&mat3::add(&z, &yi), S::cst(0.5));
        let c = change(&yn, &y);
        let scale = yn.iter().flatten().fold(0.0_f64, |m, x| m.max(x.re().abs()));
        y = yn;
        if c <= 1e-15 * scale {
            extra += 1;
            if extra > 2 {
                break;
            }
        }
    }
    y
}

/// The logarithm of a symmetric positive definite tensor: k square roots until
/// ‖Y − I‖ ≤ 0.1 (real parts), then ln Y = 2 artanh Z = 2 Σ Z²ᵐ⁺¹/(2m + 1) with
/// Z = (Y − I)(Y + I)⁻¹ (eigenvalues of Z below 0.05, eight terms), times 2ᵏ.
pub fn log_spd<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    let i = mat3::identity::<S>();
    let mut y = *a;
    let mut k = 0;
    while k < 60 {
        let d = mat3::sub(&y, &i);
        let n = d.iter().flatten().map(|x| x.re() * x.re()).sum::<f64>().sqrt();
        if n <= 0.1 {
            break;
        }
        y = sqrt_spd(&y);
        k += 1;
    }
    let z = mat3::mul(&mat3::sub(&y, &i), &mat3::inverse(&mat3::add(&y, &i)));
    let z2 = mat3::mul(&z, &z);
    let mut term = z;
    let mut sum = z;
    for m in 1..8 {
        term = mat3::mul(&term, &z2);
        sum = mat3::add(&sum, &mat3::scale(&term, S::cst(1.0 / (2 * m + 1) as f64)));
    }
    mat3::scale(&sum, S::cst(2.0 * (1u64 << k) as f64))
}

/// The exponential of a symmetric tensor: scaled by 2⁻ˢ until ‖A‖ ≤ ¼ (real parts), Taylor
/// series to degree 16, squared s times.
pub fn exp_sym<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    let n = a.iter().flatten().map(|x| x.re() * x.re()).sum::<f64>().sqrt();
    let mut s = 0;
    while n / (1u64 << s) as f64 > 0.25 && s < 60 {
        s += 1;
    }
    let x = mat3::scale(a, S::cst(1.0 / (1u64 << s) as f64));
    let mut term = mat3::identity::<S>();
    let mut sum = term;
    for m in 1..=16 {
        term = mat3::scale(&mat3::mul(&term, &x), S::cst(1.0 / m as f64));
        sum = mat3::add(&sum, &term);
    }
    for _ in 0..s {
        sum = mat3::mul(&sum, &sum);
    }
    sum
}

/// Eigenvalues and eigenvectors (columns of Q) of a real symmetric tensor, A = Q Λ Qᵀ, by
/// cyclic Jacobi rotations.
pub fn eigen_sym(a: &Mat3<f64>) -> ([f64; 3], Mat3<f64>) {
    let mut m = *a;
    let mut q = mat3::identity::<f64>();
    for _ in 0..60 {
        let off = m[0][1].abs() + m[0][2].abs() + m[1][2].abs();
        let size = m[0][0].abs() + m[1][1].abs() + m[2][2].abs();
        if off <= 1e-300 || off <= 1e-18 * size {
            break;
        }
        for (p, r) in [(0, 1), (0, 2), (1, 2)] {
            if m[p][r] == 0.0 {
                continue;
            }
            let theta = (m[r][r] - m[p][p]) / (2.0 * m[p][r]);
            let t = theta.signum() / (theta.abs() + (theta * theta + 1.0).sqrt());
            let t = if theta == 0.0 { 1.0 } else { t };
            let c = 1.0 / (t * t + 1.0).sqrt();
            let s = t * c;
            // m ← Jᵀ m J with J the rotation in the (p, r) plane
            for k in 0..3 {
                let (mkp, mkr) = (m[k][p], m[k][r]);
                m[k][p] = c * mkp - s * mkr;
                m[k][r] = s * mkp + c * mkr;
            }
            for k in 0..3 {
                let (mpk, mrk) = (m[p][k], m[r][k]);
                m[p][k] = c * mpk - s * mrk;
                m[r][k] = s * mpk + c * mrk;
            }
            for k in 0..3 {
                let (qkp, qkr) = (q[k][p], q[k][r]);
                q[k][p] = c * qkp - s * qkr;
                q[k][r] = s * qkp + c * qkr;
            }
        }
    }
    ([m[0][0], m[1][1], m[2][2]], q)
}

/// ½(λa + λb)(ln λa − ln λb)/(λa − λb), and 1 when λa = λb (written with ln(1 + u)/u).
pub fn log_divided(la: f64, lb: f64) -> f64 {
    let u = (la - lb) / lb;
    let g = if u == 0.0 { 1.0 } else { u.ln_1p() / u };
    0.5 * (la + lb) * g / lb
}

/// The derivative of ε = ½ ln b along δb = D b + b D (D symmetric), with b = Q Λ Qᵀ:
/// Qᵀ δε Q = M ∘ (Qᵀ D Q), M_ab = [`log_divided`](λa, λb) (Daleckii–Krein).
pub fn half_log_derivative(lambda: &[f64; 3], q: &Mat3<f64>, d: &Mat3<f64>) -> Mat3<f64> {
    let mut dt = mat3::mul(&mat3::mul(&mat3::transpose(q), d), q);
    for a in 0..3 {
        for b in 0..3 {
            dt[a][b] *= log_divided(lambda[a], lambda[b]);
        }
    }
    mat3::mul(&mat3::mul(q, &dt), &mat3::transpose(q))
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_dual::Dual64;

    fn spd() -> Mat3<f64> {
        let r = mat3::axis_rotation([1.0, -0.4, 0.7], 0.9);
        let d = [[2.5, 0.0, 0.0], [0.0, 0.6, 0.0], [0.0, 0.0, 1.3]];
        mat3::mul(&mat3::mul(&r, &d), &mat3::transpose(&r))
    }

    // exp(ln A) = A and ln of a diagonal tensor is the log of its entries; the eigen pairs
    // rebuild A.
    #[test]
    fn log_exp_and_eigen_round_trip() {
        let a = spd();
        let back = exp_sym(&log_spd(&a));
        assert!(change(&back, &a) < 1e-13, "{back:?}");
        let l = log_spd(&[[4.0, 0.0, 0.0], [0.0, 0.25, 0.0], [0.0, 0.0, 1.0]]);
        assert!((l[0][0] - 4f64.ln()).abs() < 1e-14 && (l[1][1] - 0.25f64.ln()).abs() < 1e-14);
        let (lam, q) = eigen_sym(&a);
        let re = mat3::mul(
            &mat3::mul(&q, &[[lam[0], 0.0, 0.0], [0.0, lam[1], 0.0], [0.0, 0.0, lam[2]]]),
            &mat3::transpose(&q),
        );
        assert!(change(&re, &a) < 1e-14);
    }

    // The closed-form derivative of ½ ln b (Daleckii–Krein) against num-dual through the
    // iteration, with two equal eigenvalues (where an eigen-decomposition over duals fails).
    #[test]
    fn half_log_derivative_matches_num_dual_with_repeated_eigenvalues() {
        for b in [spd(), [[2.0, 0.0, 0.0], [0.0, 0.7, 0.0], [0.0, 0.0, 0.7]]] {
            let (lam, q) = eigen_sym(&b);
            for slot in 0..6 {
                let d = mat3::sym_direction(slot);
                let want = half_log_derivative(&lam, &q, &d);
                let db = mat3::add(&mat3::mul(&d, &b), &mat3::mul(&b, &d));
                let mut bd = mat3::lift::<Dual64>(&b);
                for i in 0..3 {
                    for j in 0..3 {
                        bd[i][j].eps = db[i][j];
                    }
                }
                let e = log_spd(&bd);
                for i in 0..3 {
                    for j in 0..3 {
                        assert!((0.5 * e[i][j].eps - want[i][j]).abs() < 1e-12, "{slot} {i}{j}");
                    }
                }
            }
        }
    }
}
