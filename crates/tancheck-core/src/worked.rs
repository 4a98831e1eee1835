//! Worked tangents shared by the unit tests (test builds only): isotropic elasticity in any
//! convention and the consistent J2 tangent of the worked case in REFERENCES.md.

use crate::convention::{Convention, ShearMeasure};

/// Young's modulus and Poisson's ratio of the J2 worked case (REFERENCES.md).
pub const J2_E: f64 = 200000.0;
pub const J2_NU: f64 = 0.3;
/// θ and θ̄ of the J2 worked case (REFERENCES.md; Simo & Taylor 1985, derived).
pub const J2_THETA: f64 = 0.5446266;
pub const J2_THETA_BAR: f64 = 0.5381686;

/// Isotropic elasticity in a convention's order, column-major: C = λ 1⊗1 + 2μ I_sym. With
/// engineering shear the shear diagonal is μ, with tensor shear 2μ (σ12 = 2μ ε12).
pub fn isotropic(conv: &Convention, lambda: f64, mu: f64) -> Vec<f64> {
    let n = conv.ncomp();
    let mut t = vec![0.0; n * n];
    for (i, ci) in conv.order().iter().enumerate() {
        for (j, cj) in conv.order().iter().enumerate() {
            t[i + j * n] = match (ci.is_shear(), cj.is_shear()) {
                (false, false) => lambda + if i == j { 2.0 * mu } else { 0.0 },
                (true, true) if i == j => match conv.shear() {
                    ShearMeasure::Engineering => mu,
                    ShearMeasure::Tensor => 2.0 * mu,
                },
                _ => 0.0,
            };
        }
    }
    t
}

/// The J2 tangent of the worked case with plastic factor `theta_bar`: C = κ1⊗1 + 2μθ(I − ⅓1⊗1)
/// − 2μθ̄ n⊗n with uniaxial-strain n, 3D, default order, engineering shear (6 × 6,
/// column-major). With [`J2_THETA_BAR`] it is the consistent tangent.
pub fn j2(theta_bar: f64) -> Vec<f64> {
    let mu = J2_E / (2.0 * (1.0 + J2_NU));
    let kappa = J2_E / (3.0 * (1.0 - 2.0 * J2_NU));
    let nv = [2.0 / 6f64.sqrt(), -1.0 / 6f64.sqrt(), -1.0 / 6f64.sqrt(), 0.0, 0.0, 0.0];
    let mut c = vec![0.0; 36];
    for j in 0..6 {
        for i in 0..6 {
            let one = if i < 3 && j < 3 { 1.0 } else { 0.0 };
            let id = match (i == j, i < 3) {
                (true, true) => 1.0,
                (true, false) => 0.5,
                (false, _) => 0.0,
            };
            c[i + 6 * j] =
                kappa * one + 2.0 * mu * J2_THETA * (id - one / 3.0) - 2.0 * mu * theta_bar * nv[i] * nv[j];
        }
    }
    c
}
