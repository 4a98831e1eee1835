//! Stress and tangent measures of finite-strain routines, and the conversions between the
//! tangent measures.
//!
//! Every conversion goes through one pivot: the derivative of the Kirchhoff stress τ at the
//! end of the increment along a variation of the deformation gradient δF = δl F, as a linear
//! map of δl (a 9×9 matrix on column-major 3×3 tensors). The relations used (standard; Bonet &
//! Wood, Nonlinear Continuum Mechanics for FEA, 2nd ed. 2008, ch. 5–6, from memory; Miehe
//! 1996 for the perturbation that defines the Jaumann tangent):
//!
//! - Jaumann rate of τ, d symmetric: δτ = 𝕔ᴶ : d (the spin of the variation is zero, so the
//!   Jaumann rate is the plain variation).
//! - Truesdell (Lie) rate: 𝕔ᵀ : d = 𝕔ᴶ : d − (d τ + τ d); in components the difference is
//!   ½(δ_ik τ_jl + τ_ik δ_jl + δ_il τ_jk + τ_il δ_jk).
//! - Green–Naghdi rate: 𝕔ᴳᴺ : d = 𝕔ᴶ : d − (Ω τ − τ Ω), Ω = δR Rᵀ the spin of the rotation of
//!   F = R U caused by d; δR from W U + U W = 2 skew(Rᵀ δF), W = Rᵀ δR.
//! - First Piola–Kirchhoff P = τ F⁻ᵀ: δP = δτ F⁻ᵀ − τ F⁻ᵀ δFᵀ F⁻ᵀ.
//! - Second Piola–Kirchhoff S = F⁻¹ τ F⁻ᵀ against E = ½(FᵀF − I): δF = F⁻ᵀ δE gives exactly
//!   that δE to first order.
//! - The "sigma" spatial measures are the Kirchhoff ones divided by J = det F, the form that
//!   goes with Cauchy stress in many implicit solvers.
//!
//! Going from a 6-column spatial or material measure to the pivot needs the response to a
//! spin, which an objective routine gives as δτ = w τ − τ w (w = skew δl): conversions
//! assume an objective response. The check itself never converts: it builds the numerical
//! tangent directly in the declared measure (see `numeric`).

#![allow(clippy::needless_range_loop)] // index notation reads as the formulas

use serde::{Deserialize, Serialize};

use super::mat3::{self, Mat3, SYM_PAIRS};
use crate::scalar::Scalar;

/// The stress a finite-strain routine takes and returns.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum StressMeasure {
    /// Cauchy (true) stress σ.
    Cauchy,
    /// Kirchhoff stress τ = J σ.
    Kirchhoff,
}

impl StressMeasure {
    pub const ALL: [StressMeasure; 2] = [StressMeasure::Cauchy, StressMeasure::Kirchhoff];

    pub fn name(self) -> &'static str {
        match self {
            StressMeasure::Cauchy => "cauchy",
            StressMeasure::Kirchhoff => "kirchhoff",
        }
    }

    pub fn parse(s: &str) -> Option<StressMeasure> {
        Self::ALL.into_iter().find(|m| m.name() == s)
    }

    /// The other one.
    pub fn other(self) -> StressMeasure {
        match self {
            StressMeasure::Cauchy => StressMeasure::Kirchhoff,
            StressMeasure::Kirchhoff => StressMeasure::Cauchy,
        }
    }

    /// Kirchhoff stress from a stress in this measure at volume ratio J.
    #[inline]
    pub fn to_kirchhoff<S: Scalar>(self, stress: &[S; 6], j: S) -> [S; 6] {
        match self {
            StressMeasure::Kirchhoff => *stress,
            StressMeasure::Cauchy => stress.map(|x| x * j),
        }
    }

    /// This measure from Kirchhoff stress at volume ratio J.
    #[inline]
    pub fn from_kirchhoff<S: Scalar>(self, tau: &[S; 6], j: S) -> [S; 6] {
        match self {
            StressMeasure::Kirchhoff => *tau,
            StressMeasure::Cauchy => tau.map(|x| x / j),
        }
    }
}

/// The measure of the tangent a finite-strain routine returns.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum TangentMeasure {
    /// 𝕔ᴶ: spatial tangent of the Jaumann rate of Kirchhoff stress (6×6).
    TauJaumann,
    /// 𝕔ᴶ / J (6×6), paired with Cauchy stress.
    SigmaJaumann,
    /// 𝕔ᵀ: spatial tangent of the Truesdell rate of Kirchhoff stress, the push-forward of
    /// dS/dE (6×6).
    TauTruesdell,
    /// 𝕔ᵀ / J (6×6).
    SigmaTruesdell,
    /// 𝕔ᴳᴺ: spatial tangent of the Green–Naghdi rate of Kirchhoff stress (6×6).
    TauGreenNaghdi,
    /// dP/dF, first Piola–Kirchhoff stress against the deformation gradient (9×9).
    DpDf,
    /// dS/dE, second Piola–Kirchhoff stress against Green–Lagrange strain (6×6).
    DsDe,
}

impl TangentMeasure {
    pub const ALL: [TangentMeasure; 7] = [
        TangentMeasure::TauJaumann,
        TangentMeasure::SigmaJaumann,
        TangentMeasure::TauTruesdell,
        TangentMeasure::SigmaTruesdell,
        TangentMeasure::TauGreenNaghdi,
        TangentMeasure::DpDf,
        TangentMeasure::DsDe,
    ];

    pub fn name(self) -> &'static str {
        match self {
            TangentMeasure::TauJaumann => "tau-jaumann",
            TangentMeasure::SigmaJaumann => "sigma-jaumann",
            TangentMeasure::TauTruesdell => "tau-truesdell",
            TangentMeasure::SigmaTruesdell => "sigma-truesdell",
            TangentMeasure::TauGreenNaghdi => "tau-green-naghdi",
            TangentMeasure::DpDf => "dp-df",
            TangentMeasure::DsDe => "ds-de",
        }
    }

    pub fn parse(s: &str) -> Option<TangentMeasure> {
        Self::ALL.into_iter().find(|m| m.name() == s)
    }

    /// Rows (and columns) of the tangent: 9 for dP/dF, 6 otherwise.
    pub fn size(self) -> usize {
        if self == TangentMeasure::DpDf {
            9
        } else {
            6
        }
    }

    /// A spatial (Eulerian) measure.
    pub fn is_spatial(self) -> bool {
        !matches!(self, TangentMeasure::DpDf | TangentMeasure::DsDe)
    }

    /// A spatial measure divided by J.
    pub fn over_j(self) -> bool {
        matches!(self, TangentMeasure::SigmaJaumann | TangentMeasure::SigmaTruesdell)
    }

    /// The same rate with the other scaling by J (`None` for the others).
    pub fn j_partner(self) -> Option<TangentMeasure> {
        match self {
            TangentMeasure::TauJaumann => Some(TangentMeasure::SigmaJaumann),
            TangentMeasure::SigmaJaumann => Some(TangentMeasure::TauJaumann),
            TangentMeasure::TauTruesdell => Some(TangentMeasure::SigmaTruesdell),
            TangentMeasure::SigmaTruesdell => Some(TangentMeasure::TauTruesdell),
            _ => None,
        }
    }

    /// One line: what it is.
    pub fn describe(self) -> &'static str {
        match self {
            TangentMeasure::TauJaumann => "spatial tangent of the Jaumann rate of Kirchhoff stress",
            TangentMeasure::SigmaJaumann => {
                "spatial tangent of the Jaumann rate of Kirchhoff stress, divided by J"
            }
            TangentMeasure::TauTruesdell => "spatial tangent of the Truesdell rate of Kirchhoff stress",
            TangentMeasure::SigmaTruesdell => {
                "spatial tangent of the Truesdell rate of Kirchhoff stress, divided by J"
            }
            TangentMeasure::TauGreenNaghdi => "spatial tangent of the Green-Naghdi rate of Kirchhoff stress",
            TangentMeasure::DpDf => "first Piola-Kirchhoff stress against the deformation gradient",
            TangentMeasure::DsDe => "second Piola-Kirchhoff stress against Green-Lagrange strain",
        }
    }
}

/// The terms by which the tangents of two measures differ (for the diagnosis).
pub fn difference_terms(asked: TangentMeasure, got: TangentMeasure) -> &'static str {
    use TangentMeasure::*;
    let rate = |m: TangentMeasure| match m {
        TauJaumann | SigmaJaumann => 'J',
        TauTruesdell | SigmaTruesdell => 'T',
        TauGreenNaghdi => 'G',
        _ => 'M',
    };
    match (rate(asked), rate(got)) {
        ('J', 'T') | ('T', 'J') => {
            "the stress terms d·tau + tau·d = 1/2(d_ik tau_jl + tau_ik d_jl + d_il tau_jk + tau_il d_jk) \
             (divided by J for the sigma measures)"
        }
        ('J', 'G') | ('G', 'J') => "the spin terms (Omega - w) tau - tau (Omega - w) of the polar rotation",
        ('T', 'G') | ('G', 'T') => "the stress terms d·tau + tau·d and the polar spin terms",
        (_, 'M') | ('M', _) => {
            "the push-forward by F (and, for dP/dF, the initial-stress term delta_ik S_JL)"
        }
        _ => "a factor J",
    }
}

/// The pivot: column `k + 3 l` holds δτ (column-major 3×3) for δF = (e_k⊗e_l) F.
pub type Pivot<S> = [[S; 9]; 9];

/// ∂τ for a variation δl from the pivot.
#[inline]
fn apply<S: Scalar>(a: &Pivot<S>, dl: &Mat3<S>) -> Mat3<S> {
    let x = mat3::to_flat(dl);
    let mut v = [S::zero(); 9];
    for (b, col) in a.iter().enumerate() {
        for r in 0..9 {
            v[r] += col[r] * x[b];
        }
    }
    mat3::from_flat(&v)
}

/// Ω = δR Rᵀ, the spin of the rotation of F = R U under δF.
pub fn polar_spin<S: Scalar>(f: &Mat3<S>, df: &Mat3<S>) -> Mat3<S> {
    let r = mat3::rotation(f);
    let rt = mat3::transpose(&r);
    let u = mat3::mul(&rt, f);
    let g = mat3::mul(&rt, df);
    // right-hand side: axial vector of 2 skew(Rᵀ δF) = G − Gᵀ
    let rhs = [g[2][1] - g[1][2], g[0][2] - g[2][0], g[1][0] - g[0][1]];
    let mut k = mat3::zeros::<S>();
    for a in 0..3 {
        let w = skew_of(a);
        let m = mat3::add(&mat3::mul(&w, &u), &mat3::mul(&u, &w));
        k[0][a] = m[2][1];
        k[1][a] = m[0][2];
        k[2][a] = m[1][0];
    }
    let ki = mat3::inverse(&k);
    let mut w = mat3::zeros::<S>();
    for a in 0..3 {
        let c = ki[a][0] * rhs[0] + ki[a][1] * rhs[1] + ki[a][2] * rhs[2];
        w = mat3::add(&w, &mat3::scale(&skew_of(a), c));
    }
    mat3::mul(&mat3::mul(&r, &w), &rt)
}

/// The skew tensor of the unit axial vector e_a (W v = e_a × v).
fn skew_of<S: Scalar>(a: usize) -> Mat3<S> {
    let mut w = mat3::zeros::<S>();
    let (i, j) = [(2, 1), (0, 2), (1, 0)][a];
    w[i][j] = S::one();
    w[j][i] = -S::one();
    w
}

fn sym_skew<S: Scalar>(l: &Mat3<S>) -> (Mat3<S>, Mat3<S>) {
    let lt = mat3::transpose(l);
    let half = S::cst(0.5);
    (mat3::scale(&mat3::add(l, &lt), half), mat3::scale(&mat3::sub(l, &lt), half))
}

/// The response of a 6×6 tangent (column-major, tensor-component columns) to a symmetric
/// direction d.
#[inline]
fn apply6<S: Scalar>(t: &[S], d: &Mat3<S>) -> Mat3<S> {
    let mut v = [S::zero(); 6];
    for (b, &(c, e)) in SYM_PAIRS.iter().enumerate() {
        let coef = if c == e { d[c][c] } else { d[c][e] * 2.0 };
        for (r, x) in v.iter_mut().enumerate() {
            *x += t[r + 6 * b] * coef;
        }
    }
    mat3::from_sym6(&v)
}

/// The pivot of a tangent in measure `m` at deformation gradient `f` and Kirchhoff stress
/// `tau` (assuming an objective response for the 6-column measures).
pub fn to_pivot<S: Scalar>(m: TangentMeasure, f: &Mat3<S>, tau: &[S; 6], t: &[S]) -> Pivot<S> {
    let taum = mat3::from_sym6(tau);
    let j = mat3::det(f);
    let fi = mat3::inverse(f);
    let mut a = [[S::zero(); 9]; 9];
    for (b, col) in a.iter_mut().enumerate() {
        let dl = mat3::lift::<S>(&mat3::flat_direction(b));
        let (d, w) = sym_skew(&dl);
        let spin = mat3::sub(&mat3::mul(&w, &taum), &mat3::mul(&taum, &w));
        let dtau = match m {
            TangentMeasure::DpDf => {
                // δτ = δP Fᵀ + P δFᵀ, δF = δl F
                let df = mat3::mul(&dl, f);
                let x = mat3::to_flat(&df);
                let mut v = [S::zero(); 9];
                for (c, xc) in x.iter().enumerate() {
                    for (r, vr) in v.iter_mut().enumerate() {
                        *vr += t[r + 9 * c] * *xc;
                    }
                }
                let dp = mat3::from_flat(&v);
                let p = mat3::mul(&taum, &mat3::transpose(&fi));
                mat3::add(&mat3::mul(&dp, &mat3::transpose(f)), &mat3::mul(&p, &mat3::transpose(&df)))
            }
            _ => mat3::add(&jaumann_response(m, f, &fi, j, &taum, t, &d), &spin),
        };
        *col = mat3::to_flat(&dtau);
    }
    a
}

/// δτ = 𝕔ᴶ : d from a 6-column measure.
fn jaumann_response<S: Scalar>(
    m: TangentMeasure,
    f: &Mat3<S>,
    fi: &Mat3<S>,
    j: S,
    taum: &Mat3<S>,
    t: &[S],
    d: &Mat3<S>,
) -> Mat3<S> {
    let geo = || mat3::add(&mat3::mul(d, taum), &mat3::mul(taum, d));
    match m {
        TangentMeasure::TauJaumann => apply6(t, d),
        TangentMeasure::SigmaJaumann => mat3::scale(&apply6(t, d), j),
        TangentMeasure::TauTruesdell => mat3::add(&apply6(t, d), &geo()),
        TangentMeasure::SigmaTruesdell => mat3::add(&mat3::scale(&apply6(t, d), j), &geo()),
        TangentMeasure::TauGreenNaghdi => {
            let om = polar_spin(f, &mat3::mul(d, f));
            let s = mat3::sub(&mat3::mul(&om, taum), &mat3::mul(taum, &om));
            mat3::add(&apply6(t, d), &s)
        }
        TangentMeasure::DsDe => {
            // δF = d F, δE = Fᵀ d F, δS = C : δE, δτ = δF S Fᵀ + F δS Fᵀ + F S δFᵀ
            let df = mat3::mul(d, f);
            let de = mat3::mul(&mat3::transpose(f), &df);
            let ds = apply6(t, &de);
            let s = mat3::mul(&mat3::mul(fi, taum), &mat3::transpose(fi));
            let ft = mat3::transpose(f);
            let x = mat3::mul(&mat3::mul(&df, &s), &ft);
            let y = mat3::mul(&mat3::mul(f, &ds), &ft);
            let z = mat3::mul(&mat3::mul(f, &s), &mat3::transpose(&df));
            mat3::add(&mat3::add(&x, &y), &z)
        }
        TangentMeasure::DpDf => unreachable!("dP/dF has its own branch"),
    }
}

/// A tangent in measure `m` from the pivot, written into `out` (column-major, `m.size()`²
/// entries).
pub fn from_pivot<S: Scalar>(m: TangentMeasure, f: &Mat3<S>, tau: &[S; 6], a: &Pivot<S>, out: &mut [S]) {
    let taum = mat3::from_sym6(tau);
    let j = mat3::det(f);
    let fi = mat3::inverse(f);
    let fit = mat3::transpose(&fi);
    if m == TangentMeasure::DpDf {
        for b in 0..9 {
            let df = mat3::lift::<S>(&mat3::flat_direction(b));
            let dl = mat3::mul(&df, &fi);
            let dtau = apply(a, &dl);
            let dp = mat3::sub(
                &mat3::mul(&dtau, &fit),
                &mat3::mul(&mat3::mul(&mat3::mul(&taum, &fit), &mat3::transpose(&df)), &fit),
            );
            out[9 * b..9 * b + 9].copy_from_slice(&mat3::to_flat(&dp));
        }
        return;
    }
    for b in 0..6 {
        let dir = mat3::lift::<S>(&mat3::sym_direction(b));
        let col = match m {
            TangentMeasure::DsDe => {
                let df = mat3::mul(&fit, &dir);
                let dl = mat3::mul(&df, &fi);
                let dtau = apply(a, &dl);
                let dfi = mat3::scale(&mat3::mul(&mat3::mul(&fi, &df), &fi), S::cst(-1.0));
                let x = mat3::mul(&mat3::mul(&fi, &dtau), &fit);
                let y = mat3::mul(&mat3::mul(&dfi, &taum), &fit);
                let z = mat3::mul(&mat3::mul(&fi, &taum), &mat3::transpose(&dfi));
                mat3::add(&mat3::add(&x, &y), &z)
            }
            _ => {
                let dtau = apply(a, &dir);
                let geo = mat3::add(&mat3::mul(&dir, &taum), &mat3::mul(&taum, &dir));
                match m {
                    TangentMeasure::TauJaumann => dtau,
                    TangentMeasure::SigmaJaumann => mat3::scale(&dtau, S::one() / j),
                    TangentMeasure::TauTruesdell => mat3::sub(&dtau, &geo),
                    TangentMeasure::SigmaTruesdell => mat3::scale(&mat3::sub(&dtau, &geo), S::one() / j),
                    _ => {
                        let om = polar_spin(f, &mat3::mul(&dir, f));
                        mat3::sub(&dtau, &mat3::sub(&mat3::mul(&om, &taum), &mat3::mul(&taum, &om)))
                    }
                }
            }
        };
        out[6 * b..6 * b + 6].copy_from_slice(&mat3::to_sym6(&col));
    }
}

/// A tangent in measure `from` as measure `to` (objective response assumed when `from` has
/// six columns). `out` holds `to.size()`² entries.
pub fn convert<S: Scalar>(
    from: TangentMeasure,
    to: TangentMeasure,
    f: &Mat3<S>,
    tau: &[S; 6],
    t: &[S],
    out: &mut [S],
) {
    let a = to_pivot(from, f, tau, t);
    from_pivot(to, f, tau, &a, out);
}
