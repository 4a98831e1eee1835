//! Finite-strain J2 plasticity with the multiplicative split F = Fᵉ Fᵖ, the logarithmic
//! elastic strain and the exponential-map return (Simo 1992, CMAME 99:61–112; Eterovic &
//! Bathe 1990, IJNME 30:1099–1114; both from memory): with b_n = exp(2εᵉ_n) and the relative
//! gradient f = F₁F₀⁻¹, the trial state bᵗʳ = f b_n fᵀ, εᵗʳ = ½ ln bᵗʳ; the Kirchhoff stress
//! τ = K tr εᵉ I + 2G dev εᵉ (Hencky); the return is the small-strain radial return in εᵉ
//! (linear isotropic hardening σy = σy0 + H α), which the exponential map makes exact for
//! plastic incompressibility; εᵉ = εᵗʳ − Δα (3/2) dev τ / q with q the von Mises stress.
//!
//! Properties `[E, ν, σy0, H]`; state `[εᵉ (6, tensor components 11 22 33 23 13 12), α]`,
//! zero in the reference configuration. Stress in the declared measure; energy: stored
//! K/2 (tr εᵉ)² + G dev εᵉ : dev εᵉ + H α²/2, dissipated σy0 α, per reference volume.
//!
//! Tangent: the Jaumann rate of τ along δF₁ = D F₁ is 𝕔ᴶ = 𝔻 : 𝕄 (derived here: with
//! frame `none`, δbᵗʳ = D bᵗʳ + bᵗʳ D, and the spin of an isotropic response rotates τ),
//! 𝔻 the consistent small-strain tangent K 1⊗1 + 2Gθ 𝕀dev − 2Gθ̄ n⊗n (θ = 1 − 3GΔα/qᵗʳ,
//! θ̄ = 3G/(3G + H) − (1 − θ); Simo & Hughes 1998, Box 3.2, in von Mises form) and 𝕄 the
//! derivative of ½ ln bᵗʳ along that δb ([`super::logexp::half_log_derivative`]); other
//! measures by `measure::convert` (the response is objective in F₁). The tangent is computed
//! from the real parts (the twin's tangent is not a derivative and is not used).

use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::finite::measure::convert;
use tancheck_core::finite::{FiniteInfo, FiniteInput, FiniteOutput, Frame, StressMeasure, TangentMeasure};
use tancheck_core::routine::{provides, status};
use tancheck_core::{Fault, Scalar};

use crate::call::finite_model;

use super::logexp::{eigen_sym, exp_sym, half_log_derivative, log_spd};

/// Finite-strain J2 plasticity with logarithmic elastic strain.
#[derive(Clone, Debug)]
pub struct J2Log {
    info: FiniteInfo,
}

/// What the return mapping of one call found, in real numbers, for the tangent.
struct Return {
    /// Eigenvalues and eigenvectors of bᵗʳ.
    lambda: [f64; 3],
    q: Mat3<f64>,
    /// Unit deviatoric direction of the trial stress (zero when elastic).
    n: Mat3<f64>,
    theta: f64,
    theta_bar: f64,
}

impl J2Log {
    pub const NAME: &'static str = "j2-log";
    pub const NSTATE: usize = 7;

    pub fn new(stress: StressMeasure, tangent: TangentMeasure) -> J2Log {
        J2Log {
            info: FiniteInfo {
                name: Self::NAME.into(),
                stress,
                tangent,
                frame: Frame::None,
                nstate: Self::NSTATE,
                nproperties: 4,
            },
        }
    }

    /// Bulk and shear moduli from E, ν.
    fn moduli<S: Scalar>(p: &[S]) -> (S, S) {
        let (e, nu) = (p[0], p[1]);
        (e / ((S::one() - nu * 2.0) * 3.0), e / ((S::one() + nu) * 2.0))
    }

    /// 𝕔ᴶ (column-major 6×6, tensor-component columns) from the real return.
    fn jaumann_tangent(k: f64, g: f64, r: &Return) -> [f64; 36] {
        let mut c = [0.0; 36];
        for col in 0..6 {
            let e = half_log_derivative(&r.lambda, &r.q, &mat3::sym_direction(col));
            let tr = mat3::trace(&e);
            let nn: f64 =
                (0..3).flat_map(|i| (0..3).map(move |j| (i, j))).map(|(i, j)| r.n[i][j] * e[i][j]).sum();
            let mut t = [[0.0; 3]; 3];
            for i in 0..3 {
                for j in 0..3 {
                    let dev = e[i][j] - if i == j { tr / 3.0 } else { 0.0 };
                    t[i][j] = 2.0 * g * r.theta * dev - 2.0 * g * r.theta_bar * r.n[i][j] * nn;
                }
                t[i][i] += k * tr;
            }
            c[6 * col..6 * col + 6].copy_from_slice(&mat3::to_sym6(&t));
        }
        c
    }
}

finite_model!(J2Log);

impl J2Log {
    /// One call (see [`finite_model`]).
    fn update<S: Scalar>(
        &self,
        input: &FiniteInput<'_, S>,
        out: &mut FiniteOutput<'_, S>,
    ) -> Result<(), Fault> {
        let p = input.properties;
        if p.len() < 4 || input.state0.len() < Self::NSTATE || out.state.len() < Self::NSTATE {
            out.outcome.status = status::FAILED;
            out.outcome.set_message("j2-log: needs 4 properties (E, nu, sy0, H) and 7 state variables");
            return Ok(());
        }
        let (k, g) = Self::moduli(p);
        let (sy0, h) = (p[2], p[3]);
        let f0 = mat3::from_flat(input.f0);
        let f1 = mat3::from_flat(input.f1);
        let j = mat3::det(&f1);
        if j.re() <= 0.0 || mat3::det(&f0).re() <= 0.0 {
            out.outcome.status = status::FAILED;
            out.outcome.set_message("j2-log: det F <= 0");
            return Ok(());
        }
        let mut e6 = [S::zero(); 6];
        e6.copy_from_slice(&input.state0[..6]);
        let alpha_n = input.state0[6];
        let fr = mat3::mul(&f1, &mat3::inverse(&f0));
        let bn = exp_sym(&mat3::scale(&mat3::from_sym6(&e6), S::cst(2.0)));
        let btr = mat3::mul(&mat3::mul(&fr, &bn), &mat3::transpose(&fr));
        let etr = mat3::scale(&log_spd(&btr), S::cst(0.5));
        let tr = mat3::trace(&etr);
        let mut dev = etr;
        for (i, row) in dev.iter_mut().enumerate() {
            row[i] -= tr / 3.0;
        }
        let dd: S = dev.iter().flatten().fold(S::zero(), |a, &x| a + x * x);
        let qtr = g * 2.0 * (dd * 1.5).sqrt_or_zero();
        let ftr = qtr - (sy0 + h * alpha_n);
        let (factor, dalpha, branch) = if ftr.re() > 1e-12 * sy0.re().abs() {
            let da = ftr / (g * 3.0 + h);
            (S::one() - g * 3.0 * da / qtr, da, 1)
        } else {
            (S::one(), S::zero(), 0)
        };
        let mut ee = mat3::scale(&dev, factor);
        let mut tau = mat3::scale(&dev, g * 2.0 * factor);
        for i in 0..3 {
            ee[i][i] += tr / 3.0;
            tau[i][i] += k * tr;
        }
        let alpha = alpha_n + dalpha;
        let tau6 = mat3::to_sym6(&tau);
        *out.stress = self.info.stress.from_kirchhoff(&tau6, j);
        out.state[..6].copy_from_slice(&mat3::to_sym6(&ee));
        out.state[6] = alpha;
        out.energy[0] = k * 0.5 * tr * tr + g * dd * factor * factor + h * 0.5 * alpha * alpha;
        out.energy[1] = sy0 * alpha;
        out.outcome.branch = branch;
        out.outcome.provides = provides::ENERGY;

        let m = self.info.tangent;
        let nt = m.size();
        let (lambda, q) = eigen_sym(&mat3::real(&btr));
        let qre = qtr.re();
        let mut n = [[0.0; 3]; 3];
        let (theta, theta_bar) = if branch == 1 {
            let norm = dd.re().sqrt();
            for i in 0..3 {
                for jj in 0..3 {
                    n[i][jj] = dev[i][jj].re() / norm;
                }
            }
            let (gr, hr) = (g.re(), h.re());
            let th = 1.0 - 3.0 * gr * dalpha.re() / qre;
            (th, 3.0 * gr / (3.0 * gr + hr) - (1.0 - th))
        } else {
            (1.0, 0.0)
        };
        let ret = Return { lambda, q, n, theta, theta_bar };
        let cj = Self::jaumann_tangent(k.re(), g.re(), &ret);
        let mut t = [0.0; 81];
        convert(
            TangentMeasure::TauJaumann,
            m,
            &mat3::real(&f1),
            &tau6.map(|x| x.re()),
            &cj,
            &mut t[..nt * nt],
        );
        for (o, x) in out.tangent[..nt * nt].iter_mut().zip(&t[..nt * nt]) {
            *o = S::cst(*x);
        }
        Ok(())
    }
}
