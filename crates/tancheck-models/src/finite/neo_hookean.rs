//! Compressible neo-Hookean hyperelasticity, Ψ = μ/2 (I₁ − 3) − μ ln J + λ/2 (ln J)²
//! (Bonet & Wood, Nonlinear Continuum Mechanics for FEA, 2nd ed. 2008, ch. 5–6; from memory).
//!
//! Properties `[E, ν]` (μ, λ from the small-strain relations), no state. Kirchhoff stress
//! τ = μ (b − I) + λ ln J I; the closed-form spatial tangent of the Truesdell rate of τ is
//! 𝕔ᵀ = λ I⊗I + 2 (μ − λ ln J) 𝕀; the routine returns it converted to the declared measure
//! (`tancheck_core::finite::measure::convert`), and its stress in the declared stress
//! measure. Energy: stored Ψ per unit reference volume, dissipated 0.
//!
//! The flaws of [`NhFlaw`] spoil one thing each, for the causes of the finite-strain
//! diagnosis.

use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::finite::measure::convert;
use tancheck_core::finite::{FiniteInfo, FiniteInput, FiniteOutput, Frame, StressMeasure, TangentMeasure};
use tancheck_core::{Fault, Scalar};

use crate::call::finite_model;

use crate::tensor::lame;

/// What a flawed neo-Hookean routine gets wrong.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NhFlaw {
    /// Correct.
    None,
    /// Returns dS/dE where a spatial measure is declared.
    MaterialAsSpatial,
    /// Returns the tangent of another measure (e.g. the Truesdell one where Jaumann is
    /// declared).
    OtherRate(TangentMeasure),
    /// dP/dF without the initial-stress (geometric) term δ_ik S_JL.
    GeometricMissing,
    /// The tangent multiplied by J: a sigma measure returned without its 1/J.
    MissingOverJ,
    /// The tangent divided by J: a tau measure returned with a 1/J too many.
    ExtraOverJ,
    /// Kirchhoff stress declared, Cauchy stress returned (tangent right for Kirchhoff).
    CauchyForKirchhoff,
    /// Cauchy stress declared, Kirchhoff stress returned.
    KirchhoffForCauchy,
}

/// The compressible neo-Hookean model.
#[derive(Clone, Debug)]
pub struct NeoHookean {
    info: FiniteInfo,
    flaw: NhFlaw,
}

impl NeoHookean {
    pub const NAME: &'static str = "neo-hookean";

    /// A correct routine with the given measures.
    pub fn new(stress: StressMeasure, tangent: TangentMeasure) -> NeoHookean {
        NeoHookean::flawed(stress, tangent, NhFlaw::None)
    }

    pub fn flawed(stress: StressMeasure, tangent: TangentMeasure, flaw: NhFlaw) -> NeoHookean {
        NeoHookean {
            info: FiniteInfo {
                name: Self::NAME.to_string(),
                stress,
                tangent,
                frame: Frame::None,
                nstate: 0,
                nproperties: 2,
            },
            flaw,
        }
    }

    /// Kirchhoff stress at F (with μ, λ).
    pub fn kirchhoff<S: Scalar>(mu: S, lambda: S, f: &Mat3<S>) -> [S; 6] {
        let b = mat3::mul(f, &mat3::transpose(f));
        let lnj = mat3::det(f).ln();
        let mut tau = mat3::to_sym6(&b);
        for (k, t) in tau.iter_mut().enumerate() {
            *t *= mu;
            if k < 3 {
                *t += lambda * lnj - mu;
            }
        }
        tau
    }

    /// 𝕔ᵀ = λ I⊗I + 2 (μ − λ ln J) 𝕀, column-major 6×6 with tensor-component columns.
    pub fn truesdell<S: Scalar>(mu: S, lambda: S, j: S) -> [S; 36] {
        let mut c = [S::zero(); 36];
        let g = mu - lambda * j.ln();
        for a in 0..3 {
            for b in 0..3 {
                c[a + 6 * b] = lambda;
            }
            c[a + 6 * a] += g * 2.0;
        }
        for a in 3..6 {
            c[a + 6 * a] = g;
        }
        c
    }
}

finite_model!(NeoHookean);

impl NeoHookean {
    /// One call (see [`finite_model`]).
    fn update<S: Scalar>(
        &self,
        input: &FiniteInput<'_, S>,
        out: &mut FiniteOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (lambda, mu) = lame(input.properties[0], input.properties[1]);
        let f = mat3::from_flat(input.f1);
        let j = mat3::det(&f);
        if j.re() <= 0.0 {
            out.outcome.status = tancheck_core::routine::status::FAILED;
            out.outcome.set_message("det F <= 0");
            return Ok(());
        }
        let tau = Self::kirchhoff(mu, lambda, &f);
        let declared = self.info.stress;
        let returned = match self.flaw {
            NhFlaw::CauchyForKirchhoff => StressMeasure::Cauchy,
            NhFlaw::KirchhoffForCauchy => StressMeasure::Kirchhoff,
            _ => declared,
        };
        *out.stress = returned.from_kirchhoff(&tau, j);
        let ct = Self::truesdell(mu, lambda, j);
        let m = self.info.tangent;
        let n = m.size();
        let as_measure = match self.flaw {
            NhFlaw::MaterialAsSpatial => TangentMeasure::DsDe,
            NhFlaw::OtherRate(other) => other,
            _ => m,
        };
        let t = &mut out.tangent[..n * n];
        if as_measure.size() == n {
            convert(TangentMeasure::TauTruesdell, as_measure, &f, &tau, &ct, t);
        }
        match self.flaw {
            NhFlaw::GeometricMissing if m == TangentMeasure::DpDf => {
                let fi = mat3::inverse(&f);
                let s = mat3::mul(&mat3::mul(&fi, &mat3::from_sym6(&tau)), &mat3::transpose(&fi));
                for i in 0..3 {
                    for jj in 0..3 {
                        for l in 0..3 {
                            t[(i + 3 * jj) + 9 * (i + 3 * l)] -= s[jj][l];
                        }
                    }
                }
            }
            NhFlaw::MissingOverJ => {
                for x in t.iter_mut() {
                    *x *= j;
                }
            }
            NhFlaw::ExtraOverJ => {
                for x in t.iter_mut() {
                    *x /= j;
                }
            }
            _ => {}
        }
        let i1 = mat3::trace(&mat3::mul(&mat3::transpose(&f), &f));
        let lnj = j.ln();
        out.energy[0] = mu * 0.5 * (i1 - 3.0) - mu * lnj + lambda * 0.5 * lnj * lnj;
        out.energy[1] = S::zero();
        out.outcome.branch = 0;
        out.outcome.provides = tancheck_core::routine::provides::ENERGY;
        Ok(())
    }
}
