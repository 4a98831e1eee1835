//! 3×3 tensors over [`Scalar`] for finite strain: products, determinant, inverse, the polar
//! decomposition, symmetric tensors as 6-vectors (order 11, 22, 33, 23, 13, 12) and the flat
//! column-major storage of the routine interface (entry (i, j) at `i + 3 j`).
//!
//! Everything is fixed size and complex-step safe (no conjugates, decisions on real parts),
//! and nothing allocates.

#![allow(clippy::needless_range_loop)] // index notation reads as the formulas

use crate::scalar::Scalar;

/// A 3×3 tensor, `m[i][j]` = row i, column j.
pub type Mat3<S> = [[S; 3]; 3];

/// Row and column of each slot of the symmetric order 11, 22, 33, 23, 13, 12.
pub const SYM_PAIRS: [(usize, usize); 6] = [(0, 0), (1, 1), (2, 2), (1, 2), (0, 2), (0, 1)];

#[inline]
pub fn identity<S: Scalar>() -> Mat3<S> {
    let mut m = [[S::zero(); 3]; 3];
    for (i, row) in m.iter_mut().enumerate() {
        row[i] = S::one();
    }
    m
}

#[inline]
pub fn zeros<S: Scalar>() -> Mat3<S> {
    [[S::zero(); 3]; 3]
}

/// A real tensor in another scalar type.
#[inline]
pub fn lift<S: Scalar>(a: &Mat3<f64>) -> Mat3<S> {
    let mut m = zeros::<S>();
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] = S::cst(a[i][j]);
        }
    }
    m
}

/// The real parts.
#[inline]
pub fn real<S: Scalar>(a: &Mat3<S>) -> Mat3<f64> {
    let mut m = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] = a[i][j].re();
        }
    }
    m
}

#[inline]
pub fn mul<S: Scalar>(a: &Mat3<S>, b: &Mat3<S>) -> Mat3<S> {
    let mut m = zeros::<S>();
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] = a[i][0] * b[0][j] + a[i][1] * b[1][j] + a[i][2] * b[2][j];
        }
    }
    m
}

#[inline]
pub fn transpose<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    let mut m = *a;
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] = a[j][i];
        }
    }
    m
}

#[inline]
pub fn add<S: Scalar>(a: &Mat3<S>, b: &Mat3<S>) -> Mat3<S> {
    let mut m = *a;
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] += b[i][j];
        }
    }
    m
}

#[inline]
pub fn sub<S: Scalar>(a: &Mat3<S>, b: &Mat3<S>) -> Mat3<S> {
    let mut m = *a;
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] -= b[i][j];
        }
    }
    m
}

#[inline]
pub fn scale<S: Scalar>(a: &Mat3<S>, s: S) -> Mat3<S> {
    let mut m = *a;
    for row in m.iter_mut() {
        for x in row.iter_mut() {
            *x *= s;
        }
    }
    m
}

#[inline]
pub fn det<S: Scalar>(a: &Mat3<S>) -> S {
    a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1]) - a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0])
        + a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0])
}

/// The inverse by cofactors; a singular tensor gives non-finite entries.
#[inline]
pub fn inverse<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    let d = det(a);
    let c = |i0: usize, j0: usize, i1: usize, j1: usize| a[i0][j0] * a[i1][j1] - a[i0][j1] * a[i1][j0];
    let mut m = zeros::<S>();
    m[0][0] = c(1, 1, 2, 2) / d;
    m[0][1] = -c(0, 1, 2, 2) / d;
    m[0][2] = c(0, 1, 1, 2) / d;
    m[1][0] = -c(1, 0, 2, 2) / d;
    m[1][1] = c(0, 0, 2, 2) / d;
    m[1][2] = -c(0, 0, 1, 2) / d;
    m[2][0] = c(1, 0, 2, 1) / d;
    m[2][1] = -c(0, 0, 2, 1) / d;
    m[2][2] = c(0, 0, 1, 1) / d;
    m
}

#[inline]
pub fn trace<S: Scalar>(a: &Mat3<S>) -> S {
    a[0][0] + a[1][1] + a[2][2]
}

/// The rotation R of the polar decomposition F = R U, by Newton's iteration
/// R ← ½ (R + R⁻ᵀ) (Higham, Functions of Matrices, 2008, §8.3; from memory), which converges
/// quadratically for det F > 0. It stops on the real parts and then makes two more
/// iterations so that derivative parts converge too.
pub fn rotation<S: Scalar>(f: &Mat3<S>) -> Mat3<S> {
    let mut r = *f;
    let mut extra = 0;
    for _ in 0..60 {
        let next = scale(&add(&r, &transpose(&inverse(&r))), S::cst(0.5));
        let mut change = 0.0_f64;
        for i in 0..3 {
            for j in 0..3 {
                change = change.max((next[i][j] - r[i][j]).re().abs());
            }
        }
        r = next;
        if change <= 1e-15 {
            extra += 1;
            if extra > 2 {
                break;
            }
        }
    }
    r
}

/// A symmetric tensor as the 6-vector 11, 22, 33, 23, 13, 12 (the upper triangle is read).
#[inline]
pub fn to_sym6<S: Scalar>(a: &Mat3<S>) -> [S; 6] {
    let mut v = [S::zero(); 6];
    for (slot, &(i, j)) in SYM_PAIRS.iter().enumerate() {
        v[slot] = a[i][j];
    }
    v
}

#[inline]
pub fn from_sym6<S: Scalar>(v: &[S; 6]) -> Mat3<S> {
    let mut m = zeros::<S>();
    for (slot, &(i, j)) in SYM_PAIRS.iter().enumerate() {
        m[i][j] = v[slot];
        m[j][i] = v[slot];
    }
    m
}

/// Column-major 9-vector (entry (i, j) at `i + 3 j`), the storage of the routine interface.
#[inline]
pub fn to_flat<S: Scalar>(a: &Mat3<S>) -> [S; 9] {
    let mut v = [S::zero(); 9];
    for i in 0..3 {
        for j in 0..3 {
            v[i + 3 * j] = a[i][j];
        }
    }
    v
}

#[inline]
pub fn from_flat<S: Scalar>(v: &[S; 9]) -> Mat3<S> {
    let mut m = zeros::<S>();
    for i in 0..3 {
        for j in 0..3 {
            m[i][j] = v[i + 3 * j];
        }
    }
    m
}

/// The symmetric unit direction of slot `s` (11, 22, 33, 23, 13, 12): e_c⊗e_c on the
/// diagonal, ½(e_c⊗e_d + e_d⊗e_c) for a shear, so that a tangent column holds tensor
/// components (the column of shear 12 holds C_ij12).
#[inline]
pub fn sym_direction(slot: usize) -> Mat3<f64> {
    let (c, d) = SYM_PAIRS[slot];
    let mut m = [[0.0; 3]; 3];
    if c == d {
        m[c][c] = 1.0;
    } else {
        m[c][d] = 0.5;
        m[d][c] = 0.5;
    }
    m
}

/// The unit tensor e_k⊗e_l of a column-major slot `k + 3 l`.
#[inline]
pub fn flat_direction(slot: usize) -> Mat3<f64> {
    let mut m = [[0.0; 3]; 3];
    m[slot % 3][slot / 3] = 1.0;
    m
}

/// A rotation by `angle` (radians) about the unit `axis` (Rodrigues' formula).
pub fn axis_rotation(axis: [f64; 3], angle: f64) -> Mat3<f64> {
    let n = (axis[0] * axis[0] + axis[1] * axis[1] + axis[2] * axis[2]).sqrt();
    let k = [axis[0] / n, axis[1] / n, axis[2] / n];
    let (s, c) = angle.sin_cos();
    let mut r = [[0.0; 3]; 3];
    let skew = [[0.0, -k[2], k[1]], [k[2], 0.0, -k[0]], [-k[1], k[0], 0.0]];
    for i in 0..3 {
        for j in 0..3 {
            r[i][j] = if i == j { c } else { 0.0 } + s * skew[i][j] + (1.0 - c) * k[i] * k[j];
        }
    }
    r
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;

    #[test]
    fn inverse_and_determinant() {
        let f = [[1.2, 0.3, -0.1], [0.05, 0.9, 0.2], [0.1, -0.2, 1.1]];
        let p = mul(&f, &inverse(&f));
        for i in 0..3 {
            for j in 0..3 {
                assert!((p[i][j] - if i == j { 1.0 } else { 0.0 }).abs() < 1e-14);
            }
        }
        let g = mul(&f, &f);
        assert!((det(&g) - det(&f) * det(&f)).abs() < 1e-14);
    }

    // F = R U with R = axis_rotation and U symmetric positive definite: the iteration
    // recovers R (the polar decomposition is unique for det F > 0).
    #[test]
    fn polar_rotation_is_recovered() {
        let r = axis_rotation([1.0, 2.0, -0.5], 0.8);
        let u = [[1.3, 0.1, 0.05], [0.1, 0.9, -0.2], [0.05, -0.2, 1.1]];
        let got = rotation(&mul(&r, &u));
        for i in 0..3 {
            for j in 0..3 {
                assert!((got[i][j] - r[i][j]).abs() < 1e-13);
            }
        }
        // The complex step through the iteration gives the derivative of R: R Rᵀ = I, so
        // δR Rᵀ is skew.
        let mut fc = lift::<Complex64>(&mul(&r, &u));
        fc[0][1].im = 1e-30;
        let rc = rotation(&fc);
        let mut d = [[0.0; 3]; 3];
        for i in 0..3 {
            for j in 0..3 {
                d[i][j] = (0..3).map(|k| rc[i][k].im / 1e-30 * r[j][k]).sum::<f64>();
            }
        }
        for i in 0..3 {
            for j in 0..3 {
                assert!((d[i][j] + d[j][i]).abs() < 1e-12, "{d:?}");
            }
        }
    }

    #[test]
    fn flat_storage_is_column_major() {
        let f = [[1.0, 2.0, 3.0], [4.0, 5.0, 6.0], [7.0, 8.0, 9.0]];
        let v = to_flat(&f);
        assert_eq!(v[1], 4.0);
        assert_eq!(v[3], 2.0);
        assert_eq!(from_flat(&v), f);
    }
}
