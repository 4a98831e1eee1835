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
//!
//! [`HypoJaumann::j2`] adds von Mises plasticity with linear isotropic hardening on top of the
//! same objective trial stress (properties `[E, ν, σy0, H]`, state: the equivalent plastic
//! strain α): radial return of the deviatoric Kirchhoff stress, Δα = ⟨q_tr − σy0 − Hα⟩/(3μ + H),
//! s₁ = (1 − 3μΔα/q_tr) s_tr (Simo & Hughes 1998, Box 3.1, from memory). Its tangent chains the
//! exact derivative of the return with that of the trial stress; num-dual confirms it.

use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::finite::{FiniteInfo, FiniteInput, FiniteOutput, Frame, StressMeasure, TangentMeasure};
use tancheck_core::{Fault, Scalar};

use crate::call::finite_model;

use crate::tensor::lame;

#[derive(Clone, Debug)]
pub struct HypoJaumann {
    info: FiniteInfo,
    rotate: bool,
    /// With von Mises plasticity (properties `[E, ν, σy0, H]`, state `[α]`).
    plastic: bool,
}

impl HypoJaumann {
    pub const NAME: &'static str = "hypo-jaumann";
    pub const NO_ROTATION_NAME: &'static str = "hypo-no-rotation";
    pub const J2_NAME: &'static str = "hypo-j2";

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
            plastic: false,
        }
    }

    /// The hypoelastic J2 routine: the same objective update with a radial return.
    pub fn j2() -> HypoJaumann {
        let mut m = HypoJaumann::new();
        m.info.name = Self::J2_NAME.into();
        m.info.nstate = 1;
        m.info.nproperties = 4;
        m.plastic = true;
        m
    }

    /// Whether the routine is the plastic one ([`HypoJaumann::j2`]).
    pub fn is_plastic(&self) -> bool {
        self.plastic
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

finite_model!(HypoJaumann);

impl HypoJaumann {
    /// One call (see [`finite_model`]).
    fn update<S: Scalar>(
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
        let ret = if self.plastic { Return::of(&tau1, mu, input.properties, input.state0) } else { None };
        *out.stress = mat3::to_sym6(&ret.as_ref().map_or(tau1, |r| r.stress(&tau1)));
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
            if let Some(r) = &ret {
                dtau = r.derivative(&dtau);
            }
            out.tangent[6 * b..6 * b + 6].copy_from_slice(&mat3::to_sym6(&dtau));
        }
        if self.plastic {
            out.state[0] = input.state0[0] + ret.as_ref().map_or(S::zero(), |r| r.dalpha);
        }
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        out.outcome.branch = i32::from(ret.is_some());
        Ok(())
    }
}

/// The radial return of a plastic step: the trial deviator, its von Mises value, the
/// increment of α and the hardening modulus.
struct Return<S: Scalar> {
    s_tr: Mat3<S>,
    q_tr: S,
    dalpha: S,
    mu: S,
    h: S,
}

impl<S: Scalar> Return<S> {
    /// `None` when the trial stress lies inside the yield surface (an elastic step).
    fn of(tau_tr: &Mat3<S>, mu: S, props: &[S], state0: &[S]) -> Option<Return<S>> {
        let (sy0, h, alpha) = (props[2], props[3], state0[0]);
        let s_tr = dev(tau_tr);
        let q_tr = (ddot(&s_tr, &s_tr) * 1.5).sqrt();
        let f = q_tr - (sy0 + h * alpha);
        (f.re() > 0.0).then(|| Return { s_tr, q_tr, dalpha: f / (mu * 3.0 + h), mu, h })
    }

    /// τ₁ = s_tr (1 − 3μΔα/q_tr) + (tr τ_tr / 3) I.
    fn stress(&self, tau_tr: &Mat3<S>) -> Mat3<S> {
        let beta = self.mu * 3.0 * self.dalpha / self.q_tr;
        mat3::add(&mat3::scale(&self.s_tr, S::one() - beta), &spherical(tau_tr))
    }

    /// δτ₁ for a change δτ_tr of the trial stress (the exact derivative of [`Return::stress`]).
    fn derivative(&self, dtau_tr: &Mat3<S>) -> Mat3<S> {
        let ds = dev(dtau_tr);
        let dq = ddot(&self.s_tr, &ds) * 1.5 / self.q_tr;
        let ddalpha = dq / (self.mu * 3.0 + self.h);
        let beta = self.mu * 3.0 * self.dalpha / self.q_tr;
        let dbeta = self.mu * 3.0 * (ddalpha / self.q_tr - self.dalpha * dq / (self.q_tr * self.q_tr));
        let s1 = mat3::sub(&mat3::scale(&ds, S::one() - beta), &mat3::scale(&self.s_tr, dbeta));
        mat3::add(&s1, &spherical(dtau_tr))
    }
}

/// The spherical part (tr a / 3) I.
fn spherical<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    mat3::scale(&mat3::identity(), mat3::trace(a) / 3.0)
}

/// The deviatoric part a − (tr a / 3) I.
fn dev<S: Scalar>(a: &Mat3<S>) -> Mat3<S> {
    mat3::sub(a, &spherical(a))
}

/// a : b.
fn ddot<S: Scalar>(a: &Mat3<S>, b: &Mat3<S>) -> S {
    let mut x = S::zero();
    for (ra, rb) in a.iter().zip(b) {
        for (p, q) in ra.iter().zip(rb) {
            x += *p * *q;
        }
    }
    x
}
