//! Small fixed-size helpers shared by the models: symmetric tensors as 6-vectors in the
//! canonical order 11, 22, 33, 23, 13, 12 (tensor components, shear not doubled), the
//! isotropic elastic matrix, and the map between a routine's Voigt vector and that order.
//!
//! Nothing here allocates.

use tancheck_core::Scalar;

/// Canonical slots of the 6-component Voigt order (11, 22, 33, 23, 13, 12).
pub(crate) const SLOTS_6: [usize; 6] = [0, 1, 2, 3, 4, 5];
/// Canonical slots of the 4-component Voigt order (11, 22, 33, 12).
pub(crate) const SLOTS_4: [usize; 4] = [0, 1, 2, 5];

/// A slot of the canonical order holds a shear component.
#[inline]
pub(crate) fn is_shear_slot(slot: usize) -> bool {
    slot >= 3
}

/// √(2/3), the factor between the norm of a deviator and a uniaxial (von Mises) measure.
#[inline]
pub(crate) fn sqrt_2_3() -> f64 {
    (2.0_f64 / 3.0).sqrt()
}

/// Lamé constants λ and μ from Young's modulus and Poisson's ratio:
/// λ = Eν/((1+ν)(1−2ν)), μ = E/(2(1+ν)).
#[inline]
pub(crate) fn lame<S: Scalar>(e: S, nu: S) -> (S, S) {
    let lambda = e * nu / ((nu + 1.0) * (S::one() - nu * 2.0));
    let mu = e / ((nu + 1.0) * 2.0);
    (lambda, mu)
}

/// A routine strain vector (engineering shear) → canonical tensor components. Slots the
/// routine does not carry are zero.
#[inline]
pub(crate) fn strain_to_tensor<S: Scalar>(v: &[S], slots: &[usize]) -> [S; 6] {
    let mut t = [S::zero(); 6];
    for (x, &slot) in v.iter().zip(slots) {
        t[slot] = if is_shear_slot(slot) { *x * 0.5 } else { *x };
    }
    t
}

/// A routine stress-like vector → canonical components (no shear factor).
#[inline]
pub(crate) fn stress_to_tensor<S: Scalar>(v: &[S], slots: &[usize]) -> [S; 6] {
    let mut t = [S::zero(); 6];
    for (x, &slot) in v.iter().zip(slots) {
        t[slot] = *x;
    }
    t
}

/// Trace of a symmetric tensor.
#[inline]
pub(crate) fn trace<S: Scalar>(t: &[S; 6]) -> S {
    t[0] + t[1] + t[2]
}

/// Deviatoric part.
#[inline]
pub(crate) fn deviator<S: Scalar>(t: &[S; 6]) -> [S; 6] {
    let p = trace(t) / 3.0;
    let mut d = *t;
    for x in d.iter_mut().take(3) {
        *x -= p;
    }
    d
}

/// t : t, the squared Frobenius norm of a symmetric tensor (shear components count twice).
#[inline]
pub(crate) fn norm_sq<S: Scalar>(t: &[S; 6]) -> S {
    t[0] * t[0] + t[1] * t[1] + t[2] * t[2] + (t[3] * t[3] + t[4] * t[4] + t[5] * t[5]) * 2.0
}

/// The isotropic 3D elastic matrix in canonical Voigt order, for engineering shear strain:
/// normal block λ + 2μ δᵢⱼ, shear diagonal μ (σ12 = μ γ12).
#[inline]
pub(crate) fn isotropic_matrix<S: Scalar>(lambda: S, mu: S) -> [[S; 6]; 6] {
    let mut d = [[S::zero(); 6]; 6];
    for (i, row) in d.iter_mut().enumerate() {
        if i < 3 {
            for x in row.iter_mut().take(3) {
                *x = lambda;
            }
            row[i] = lambda + mu * 2.0;
        } else {
            row[i] = mu;
        }
    }
    d
}

/// Write an n×n block of a canonical-order matrix, picked by `slots`, as a column-major
/// routine tangent: `out[i + j n] = m[slots[i]][slots[j]]`.
#[inline]
pub(crate) fn write_tangent<S: Scalar>(m: &[[S; 6]; 6], slots: &[usize], out: &mut [S]) {
    let n = slots.len();
    for (j, &sj) in slots.iter().enumerate() {
        for (i, &si) in slots.iter().enumerate() {
            out[i + j * n] = m[si][sj];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Relations between elastic constants: G = E/(2(1+ν)), K = E/(3(1−2ν)),
    // λ = Eν/((1+ν)(1−2ν)) (REFERENCES.md "Relations"; standard isotropic elasticity).
    #[test]
    fn lame_constants_follow_the_standard_relations() {
        let (e, nu) = (200_000.0, 0.3);
        let (lambda, mu) = lame(e, nu);
        assert!((mu - 76_923.076_923_076_92_f64).abs() < 1e-9);
        assert!((lambda - 115_384.615_384_615_4_f64).abs() < 1e-9);
        let bulk = lambda + 2.0 * mu / 3.0;
        assert!((bulk - e / (3.0 * (1.0 - 2.0 * nu))).abs() < 1e-9);
    }

    // A tensor strain written with engineering shear comes back with the shear halved, and
    // the Frobenius norm counts each shear component twice (definition of t : t).
    #[test]
    fn voigt_strain_maps_to_tensor_components() {
        let v = [1.0, 2.0, 3.0, 0.4];
        let t = strain_to_tensor(&v, &SLOTS_4);
        assert_eq!(t, [1.0, 2.0, 3.0, 0.0, 0.0, 0.2]);
        assert!((norm_sq(&t) - (1.0 + 4.0 + 9.0 + 2.0 * 0.04)).abs() < 1e-15);
        let d = deviator(&t);
        assert!(trace(&d).abs() < 1e-15);
    }
}
