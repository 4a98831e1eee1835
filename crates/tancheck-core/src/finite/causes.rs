//! Causes of a failing finite-strain tangent: measure confusions, tried against the
//! numerical tangent.
//!
//! Each hypothesis turns the reference (the numerical tangent in the declared measure) into
//! what a routine making that mistake would return; the hypothesis that brings the returned
//! tangent closest, by far, is the cause:
//!
//! - `material-as-spatial`: dS/dE returned where a spatial measure is declared
//!   (`spatial-as-material`: a spatial tangent where dS/dE is declared);
//! - `other-rate`: the tangent of another objective rate; the report names the terms by
//!   which the rates differ (`measure::difference_terms`);
//! - `geometric-terms-missing`: dP/dF without the initial-stress term δ_ik S_JL;
//! - `missing-over-j` / `extra-over-j`: the tangent off by a factor J;
//! - `shear-factor`: the shear columns or rows off by 2 or ½;
//! - `transposed`: the tangent stored row by row (its transpose returned); `row-major`: dP/dF
//!   with P and F flattened row by row;
//! - `stress-measure`: the routine returns Cauchy stress where Kirchhoff is declared, or the
//!   other way round (its tangent fits the other stress: the numerical tangent made by
//!   reading its stress as the other measure matches).

use serde::{Deserialize, Serialize};

use super::mat3::{self, Mat3};
use super::measure::{convert, difference_terms, TangentMeasure};
use super::numeric::{self, Ask, Start, Workspace};
use super::routine::FiniteRoutine;

/// A named cause with the error left once it is assumed.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FiniteCause {
    pub name: String,
    pub explanation: String,
    /// Relative error of the returned tangent against the reference turned by the cause.
    pub error: f64,
    /// The factor fitted, for a cause that has one (`rate-terms-scaled`: the factor the terms
    /// carry), so that a path can see whether it is the same at every increment.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub factor: Option<f64>,
}

/// Relative Frobenius distance ‖a − b‖ / ‖b‖.
pub fn rel_error(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    if n > 0.0 {
        d / n
    } else {
        d
    }
}

/// A hypothesis matches when it leaves less than this relative error …
pub const MATCH: f64 = 1e-4;
/// … and less than this fraction of the error without it.
pub const GAIN: f64 = 0.01;

/// The cause of a failing tangent `got` against `reference` (both in the declared measure),
/// at F₁ with Kirchhoff stress `tau`. May call the routine (for the stress hypothesis).
#[allow(clippy::too_many_arguments)] // one failing call's whole context
pub fn diagnose(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    start: &Start,
    f1: &Mat3<f64>,
    tau: &[f64; 6],
    got: &[f64],
    reference: &[f64],
    ask: Ask,
) -> Option<FiniteCause> {
    let m = ask.measure;
    let n = m.size();
    let j = mat3::det(f1);
    let base = rel_error(got, reference);
    let mut best: Option<FiniteCause> = None;
    // The factor of the hypothesis being considered, when it has one.
    let factor = std::cell::Cell::new(None);
    let mut consider = |name: &str, explanation: String, x: &[f64]| {
        let e = rel_error(got, x);
        if e < MATCH && e < GAIN * base && best.as_ref().is_none_or(|b| e < b.error) {
            best = Some(FiniteCause { name: name.into(), explanation, error: e, factor: factor.get() });
        }
    };
    let mut x = vec![0.0; 81];
    // material and spatial confused
    if m.is_spatial() {
        convert(m, TangentMeasure::DsDe, f1, tau, reference, &mut x);
        consider(
            "material-as-spatial",
            format!("the routine returns dS/dE (material) where the {} is declared", m.describe()),
            &x[..36],
        );
    } else if m == TangentMeasure::DsDe {
        for o in [TangentMeasure::TauTruesdell, TangentMeasure::TauJaumann] {
            convert(m, o, f1, tau, reference, &mut x);
            consider(
                "spatial-as-material",
                format!("the routine returns the {} where dS/dE is declared", o.describe()),
                &x[..36],
            );
        }
    }
    // another rate, same scaling by J
    if m.is_spatial() {
        for o in [TangentMeasure::TauJaumann, TangentMeasure::TauTruesdell, TangentMeasure::TauGreenNaghdi] {
            let same_rate = o == m || m.j_partner() == Some(o);
            if same_rate {
                continue;
            }
            convert(m, o, f1, tau, reference, &mut x);
            let mut other = o.name().to_string();
            if m.over_j() {
                x[..36].iter_mut().for_each(|v| *v /= j);
                other = o.j_partner().map_or(format!("{other} divided by J"), |p| p.name().to_string());
            }
            consider(
                "other-rate",
                format!(
                    "the routine returns the tangent of another rate ({}) where the {} is declared; they differ by {}",
                    other,
                    m.describe(),
                    difference_terms(m, o)
                ),
                &x[..36],
            );
            // The stress terms between the two rates with a wrong factor α (half of them, or
            // their sign flipped): got = reference + α (other − reference), α by least squares.
            let (mut num, mut den) = (0.0, 0.0);
            for k in 0..36 {
                let d = x[k] - reference[k];
                num += (got[k] - reference[k]) * d;
                den += d * d;
            }
            let alpha = num / den;
            if den > 0.0 && alpha.is_finite() && (alpha - 1.0).abs() > 0.05 && alpha.abs() > 0.05 {
                for k in 0..36 {
                    x[k] = reference[k] + alpha * (x[k] - reference[k]);
                }
                // The factor the terms carry: got = other + (1 − α)(reference − other).
                let carried = 1.0 - alpha;
                factor.set(Some(carried));
                consider(
                    "rate-terms-scaled",
                    format!(
                        "the terms that turn the tangent of another rate ({other}) into the {} ({}) are in the \
                         returned tangent {carried:.3} times instead of once: a stress term of the rate with a \
                         wrong factor",
                        m.describe(),
                        difference_terms(m, o)
                    ),
                    &x[..36],
                );
                factor.set(None);
            }
        }
    }
    // The shear columns off by 2 (engineering shear where the column of a shear direction
    // holds tensor components: the derivative along ½(e_i⊗e_j + e_j⊗e_i)), or by ½.
    if n == 6 {
        for (factor, words) in [
            (2.0, "doubled (a derivative along e_i⊗e_j + e_j⊗e_i, twice the tensor shear direction)"),
            (0.5, "halved (a derivative with respect to the engineering shear γ = 2ε_ij)"),
        ] {
            x[..36].copy_from_slice(reference);
            x[18..36].iter_mut().for_each(|v| *v *= factor);
            consider(
                "shear-factor",
                format!(
                    "the shear columns (23, 13, 12) are {words}: the column of a shear direction holds the \
                     derivative along ½(e_i⊗e_j + e_j⊗e_i)"
                ),
                &x[..36],
            );
        }
    }
    // The shear rows off by 2 or by ½ (a shear stress stored as twice its tensor component, or
    // as half of it: a user-style sweep left this one unexplained).
    if n == 6 {
        for (factor, words) in [(2.0, "doubled"), (0.5, "halved")] {
            x[..36].copy_from_slice(reference);
            for c in 0..6 {
                x[6 * c + 3..6 * c + 6].iter_mut().for_each(|v| *v *= factor);
            }
            consider(
                "shear-factor",
                format!(
                    "the shear rows (23, 13, 12) are {words}: a row of a shear holds the derivative of the tensor \
                     component of the stress (τ_ij), not of twice or half of it"
                ),
                &x[..36],
            );
        }
    }
    // The tangent transposed: stored row by row where the interface reads it column by column
    // (a common slip in C; the tangent of a finite-strain measure is not symmetric in general).
    for a in 0..n {
        for b in 0..n {
            x[a + n * b] = reference[b + n * a];
        }
    }
    consider(
        "transposed",
        format!(
            "the returned tangent is the transpose of the {}: stored row by row where the interface reads \
             it column by column (entry (i, j) at i + n·j)",
            m.describe()
        ),
        &x[..n * n],
    );
    // dP/dF with P and F flattened row by row (P_iJ at 3i + J) where the interface flattens
    // them column by column (i + 3J): a common slip in C, unexplained before (a user-style
    // sweep); the matrix transpose does not show it (a hyperelastic dP/dF is symmetric).
    if m == TangentMeasure::DpDf {
        let row = |a: usize| 3 * (a % 3) + a / 3;
        for a in 0..9 {
            for b in 0..9 {
                x[row(a) + 9 * row(b)] = reference[a + 9 * b];
            }
        }
        consider(
            "row-major",
            "dP/dF is stored with P and F flattened row by row (P_iJ at 3i + J, F_kL at 3k + L) where the \
             interface flattens them column by column (i + 3J)"
                .into(),
            &x[..81],
        );
    }
    // dP/dF without the initial-stress term
    if m == TangentMeasure::DpDf {
        let fi = mat3::inverse(f1);
        let s = mat3::mul(&mat3::mul(&fi, &mat3::from_sym6(tau)), &mat3::transpose(&fi));
        x[..81].copy_from_slice(reference);
        for i in 0..3 {
            for jj in 0..3 {
                for l in 0..3 {
                    x[(i + 3 * jj) + 9 * (i + 3 * l)] -= s[jj][l];
                }
            }
        }
        consider(
            "geometric-terms-missing",
            "dP/dF lacks the geometric (initial-stress) term delta_ik S_JL".into(),
            &x[..81],
        );
    }
    // a factor J
    for (name, factor, what) in
        [("missing-over-j", j, "without the 1/J it needs"), ("extra-over-j", 1.0 / j, "with a 1/J too many")]
    {
        for (k, v) in reference.iter().enumerate() {
            x[k] = v * factor;
        }
        consider(name, format!("the tangent is returned {what} (J = {j:.6})"), &x[..n * n]);
    }
    // the stress returned in the other measure
    let other = Ask { stress: ask.stress.other(), ..ask };
    if numeric::tangent(r, ws, start, f1, other, &mut x[..n * n]).is_ok() {
        consider(
            "stress-measure",
            format!(
                "the routine returns {} stress where {} stress is declared (its tangent fits that stress)",
                other.stress.name(),
                ask.stress.name()
            ),
            &x[..n * n],
        );
    }
    best
}
