//! Hypoelastic isotropic elasticity with the Jaumann rate of Kirchhoff stress, integrated by
//! the incrementally objective update of Hughes & Winget (1980), IJNME 15:1862–1867 (from
//! memory): on the midpoint configuration, G = (F₁ − F₀) F_½⁻¹, Δε = sym G, Δω = skew G,
//! ΔR = (I − ½Δω)⁻¹(I + ½Δω), and τ₁ = ΔR τ₀ ΔRᵀ + ℂ : Δε with ℂ isotropic (λ, μ from
//! `[E, ν]`).
//!
//! The routine declares the Jaumann frame and rotates with the rotation increment it is
//! given. Its tangent (measure tau-jaumann) is the exact derivative of this update along
//! δF₁ = D F₁, D symmetric: δG = (I − ½G) D F₁ F_½⁻¹, δΔR = (I − ½Δω)⁻¹ ½ skew(δG) (ΔR + I),
//! δτ₁ = δΔR τ₀ ΔRᵀ + ΔR τ₀ δΔRᵀ + ℂ : sym δG. No state; no energy.
//!
//! In simple shear it shows the oscillating shear stress of the Jaumann rate,
//! σ₁₂ = G sin γ (Dienes 1979, Acta Mechanica 32:217–232; from memory).
//! [`HypoJaumann::without_rotation`] forgets to rotate the start stress (a consistent
//! tangent for a stress update that is not objective): the rotation probes catch it.

use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::finite::{
    FiniteInfo, FiniteInput, FiniteModel, FiniteOutput, Frame, StressMeasure, TangentMeasure,
};
use tancheck_core::{Fault, Scalar};

use crate::tensor::lame;

#[derive(Clone, Debug)]
pub struct HypoJaumann {
    info: FiniteInfo,
    rotate: bool,
}

impl HypoJaumann {
    pub const NAME: &'static str = "hypo-jaumann";
    pub const NO_ROTATION_NAME: &'static str = "hypo-no-rotation";

    pub fn new() -> HypoJaumann {
        HypoJaumann {
            info: FiniteInfo {
                name: Self::NAME.into(),
                stress: StressMeasure::Kirchhoff,
                tangent: TangentMeasure::TauJaumann,
                frame: Frame::Jaumann,
                nstate: 0,
                nproperties: 2,
            },
            rotate: true,
        }
    }

    /// The flawed routine that never rotates the start stress.
    pub fn without_rotation() -> HypoJaumann {
        let mut m = HypoJaumann::new();
        m.info.name = Self::NO_ROTATION_NAME.into();
        m.rotate = false;
        m
    }
}

impl Default for HypoJaumann {
    fn default() -> Self {
        HypoJaumann::new()
    }
}

/// ℂ : e for isotropic elasticity.
fn elastic<S: Scalar>(lambda: S, mu: S, e: &Mat3<S>) -> Mat3<S> {
    let mut s = mat3::scale(e, mu * 2.0);
    let tr = mat3::trace(e) * lambda;
    for (i, row) in s.iter_mut().enumerate() {
        row[i] += tr;
    }
    s
}

fn sym<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    mat3::scale(&mat3::add(a, &mat3::transpose(a)), S::cst(0.5))
}

fn skew<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    mat3::scale(&mat3::sub(a, &mat3::transpose(a)), S::cst(0.5))
}

impl FiniteModel for HypoJaumann {
    fn info(&self) -> &FiniteInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &FiniteInput<'_, S>,
        out: &mut FiniteOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (lambda, mu) = lame(input.properties[0], input.properties[1]);
        let f0 = mat3::from_flat(input.f0);
        let f1 = mat3::from_flat(input.f1);
        let fhi = mat3::inverse(&mat3::scale(&mat3::add(&f0, &f1), S::cst(0.5)));
        let g = mat3::mul(&mat3::sub(&f1, &f0), &fhi);
        let q = if self.rotate { mat3::from_flat(input.rotation) } else { mat3::identity() };
        let tau0 = mat3::from_sym6(input.stress0);
        let rotated = mat3::mul(&mat3::mul(&q, &tau0), &mat3::transpose(&q));
        let tau1 = mat3::add(&rotated, &elastic(lambda, mu, &sym(&g)));
        *out.stress = mat3::to_sym6(&tau1);
        // the tangent
        let i = mat3::identity::<S>();
        let n = mat3::sub(&i, &mat3::scale(&g, S::cst(0.5)));
        let m = mat3::mul(&f1, &fhi);
        let ai = mat3::inverse(&mat3::sub(&i, &mat3::scale(&skew(&g), S::cst(0.5))));
        let qp = mat3::add(&q, &i);
        for b in 0..6 {
            let d = mat3::lift::<S>(&mat3::sym_direction(b));
            let dg = mat3::mul(&mat3::mul(&n, &d), &m);
            let mut dtau = elastic(lambda, mu, &sym(&dg));
            if self.rotate {
                let dq = mat3::mul(&mat3::mul(&ai, &mat3::scale(&skew(&dg), S::cst(0.5))), &qp);
                let x = mat3::mul(&mat3::mul(&dq, &tau0), &mat3::transpose(&q));
                dtau = mat3::add(&dtau, &mat3::add(&x, &mat3::transpose(&x)));
            }
            out.tangent[6 * b..6 * b + 6].copy_from_slice(&mat3::to_sym6(&dtau));
        }
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        out.outcome.branch = 0;
        Ok(())
    }
}
