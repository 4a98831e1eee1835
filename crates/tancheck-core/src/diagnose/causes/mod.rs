//! Cause hypotheses for a failing tangent. Each usual explanation is tested by correcting
//! the returned tangent for it (or by comparing it with the tangent the explanation
//! predicts) and measuring the error left. Explanations that leave little error are ranked
//! first, the more specific before the more general.
//!
//! Data flow: `kind` (causes, evidence) → the trials, in the order their results are listed
//! (`layout`, `other_matrix`, `plane`, `local`, `isotropic`, `rank_one`; `dtemp` for ∂σ/∂T) → [`rank`]
//! here.

mod dtemp;
mod isotropic;
mod kind;
mod layout;
mod local;
mod other_matrix;
mod plane;
mod rank_one;
#[cfg(test)]
mod tests;

pub use dtemp::rank_dtemp;
use kind::Found;
pub use kind::{Cause, Evidence, Hypothesis, Refinement};
pub(crate) use local::proportional;

/// The error a correction may leave and still explain a failure of error `original` against
/// `tol`. Why: a hypothesis explains the failure when its corrected tangent passes with a
/// margin (10 × tol) or removes all but 1e-3 of the original error (three digits of it); and
/// in any case removes nine tenths of it, so that for a failure within ten tolerances a
/// correction that changes nothing (a swap of equal shear entries) explains nothing.
pub(crate) fn explain_level(tol: f64, original: f64) -> f64 {
    (10.0 * tol).max(1e-3 * original).min(0.1 * original)
}

/// The relative asymmetry ‖M − Mᵀ‖/‖M‖ of a tangent in Mandel form (routine form in, column-
/// major n × n), or `None` when it is zero or not finite.
fn asymmetry(conv: &crate::convention::Convention, t: &[f64]) -> Option<f64> {
    let n = conv.ncomp();
    let mut m = t.to_vec();
    conv.tangent_to_mandel(&mut m);
    let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt();
    let skew =
        (0..n).flat_map(|j| (0..n).map(move |i| (i, j))).map(|(i, j)| (m[i + j * n] - m[j + i * n]).powi(2));
    let a = skew.sum::<f64>().sqrt() / norm;
    (norm > 0.0 && a.is_finite()).then_some(a)
}

/// Why: the asymmetry of a difference tangent is rounding up to about the step's relative
/// error; below 1e-8 a tangent is symmetric for this purpose, and one of the two must be
/// unsymmetric by a hundred times the other's asymmetry (and 1e-6) to be said.
const SYMMETRIC: f64 = 1e-8;

/// A word on symmetry when the returned tangent and the derivative differ in it: a returned
/// tangent unsymmetric where the derivative is symmetric (a term written into one triangle
/// only, an entry off in one place), or symmetric where the derivative is not (the unsymmetric
/// part left out: a symmetrized tangent, a non-associative flow or a recovery term of a
/// kinematic hardening dropped). The cheapest clue an author can check; `None` otherwise.
pub fn symmetry_note(
    conv: &crate::convention::Convention,
    returned: &[f64],
    numerical: &[f64],
) -> Option<String> {
    let (r, d) = (asymmetry(conv, returned)?, asymmetry(conv, numerical).unwrap_or(0.0));
    if r > 1e-6 && r > 100.0 * d.max(SYMMETRIC) {
        Some(format!(
            "the returned tangent is unsymmetric (‖C − Cᵀ‖/‖C‖ = {r:.2e}, Mandel form) where the derivative is \
             symmetric ({d:.1e}): a term written into one triangle only, or an entry off on one side?"
        ))
    } else if d > 1e-6 && d > 100.0 * r.max(SYMMETRIC) {
        Some(format!(
            "the returned tangent is symmetric ({r:.1e}) where the derivative is not (‖C − Cᵀ‖/‖C‖ = {d:.2e}, \
             Mandel form): the unsymmetric part left out (a symmetrized tangent, a non-associative flow or a \
             recovery term of kinematic hardening dropped)?"
        ))
    } else {
        None
    }
}

/// Test every applicable hypothesis and rank them.
pub fn rank(ev: &Evidence<'_>) -> Vec<Hypothesis> {
    let original = ev.error(ev.returned);
    let explain_level = explain_level(ev.tol, original);
    let mut found = Found { hs: Vec::new(), explain_level };
    layout::try_layout(ev, &mut found);
    other_matrix::try_other_matrix(ev, &mut found);
    plane::try_uncondensed(ev, &mut found);
    local::try_local(ev, &mut found);
    isotropic::try_isotropic(ev, &mut found);
    rank_one::try_rank_one(ev, &mut found);
    finish(found.hs, 10.0 * ev.tol, ev.conv.ncomp(), explain_level)
}

/// Rank: explaining hypotheses first — those whose corrected tangent passes with the margin
/// (`exact`: error left at most `exact`) before those that only remove all but a thousandth of
/// the error (a secant that is exact ahead of the elastic tangent it nearly equals just past
/// yield) — the more specific before the more general; then by the error left. On a point of
/// one component (`scalar`) every wrong tangent is a single wrong entry, a missing or scaled
/// rank-one term: those causes say nothing there and come after every other that explains;
/// and a uniform scale, which still gives the factor, comes after the elastic, stale and
/// secant tangents, which name what the routine returned. On a point of three or four
/// components (plane stress, plane strain, axisymmetric) a discrepancy of rank two says little
/// (on three, that it has one null direction; a J2 continuum tangent's discrepancy there is
/// 2μ(1 − θ)(P_dev − n⊗n), of rank two on four): `rank-two` comes after every other cause that
/// explains (plane-stress and plane-strain continuum tangents read `rank-two`, exactly, before
/// the continuum tangent that explains them to 1e-5; a user-style sweep). The isotropic parts (shear and bulk modulus) come after such a tangent wherever one
/// explains.
fn finish(mut hs: Vec<Hypothesis>, exact: f64, ncomp: usize, explain_level: f64) -> Vec<Hypothesis> {
    let scalar = ncomp == 1;
    let rank = |c: Cause| {
        if scalar && c == Cause::UniformScale {
            2 * Cause::Secant.rank() + 1
        } else {
            2 * c.rank()
        }
    };
    let vacuous = |c: Cause| {
        scalar
            && matches!(
                c,
                Cause::SingleEntry
                    | Cause::OneColumn
                    | Cause::OneRow
                    | Cause::CouplingMissing
                    | Cause::TermMissing
                    | Cause::TermSign
                    | Cause::TermScaled
                    | Cause::RankOneTerm
                    | Cause::RankTwo
            )
    };
    // A tangent that names what the routine returned (its elastic stiffness, the stiffness
    // at the start of the path or of the increment, a secant, a continuum tangent, the
    // tangent at the start temperature) leads the isotropic parts that only describe the
    // discrepancy's shape: a creep routine returning its elastic stiffness is off in its
    // deviatoric part alone, exactly, and is named by what it returned.
    // Only a named tangent that explains well inside the band (a decade below its level): one
    // that just removes all but a thousandth of the error (a continuum tangent beside
    // start-of-increment moduli, whose discrepancy also shrinks with the increment) does not
    // push an exact bulk or shear modulus behind the shape-only terms (a user's Cam-clay-type
    // routine read term-scaled before an exact bulk-modulus 0.7408×).
    let named = hs.iter().any(|h| {
        h.explains
            && h.error_left <= 0.1 * explain_level
            && matches!(
                h.cause,
                Cause::ElasticTangent
                    | Cause::InitialStiffness
                    | Cause::StaleTangent
                    | Cause::Secant
                    | Cause::ContinuumTangent
                    | Cause::StartTemperature
                    | Cause::Uncondensed
            )
    });
    // The rank-one terms that only describe a shape (a scaled term, one of another direction)
    // come after such a named tangent too: a Johnson–Cook tangent whose thermal factor was taken at
    // the start temperature is a hardening term scaled by 1 − 3.9e-4, exactly, and read
    // `term-scaled` before the `start-temperature` that says why (a user-style sweep).
    let after = |c: Cause| {
        vacuous(c)
            || (ncomp <= 4 && c == Cause::RankTwo)
            || (named
                && matches!(
                    c,
                    Cause::ShearModulus
                        | Cause::BulkModulus
                        | Cause::IsotropicModuli
                        | Cause::TermScaled
                        | Cause::RankOneTerm
                ))
    };
    hs.sort_by(|a, b| {
        b.explains
            .cmp(&a.explains)
            .then_with(|| {
                if a.explains {
                    after(a.cause).cmp(&after(b.cause))
                } else {
                    std::cmp::Ordering::Equal
                }
            })
            .then_with(|| {
                if a.explains {
                    (b.error_left <= exact).cmp(&(a.error_left <= exact))
                } else {
                    std::cmp::Ordering::Equal
                }
            })
            .then_with(
                || {
                    if a.explains {
                        rank(a.cause).cmp(&rank(b.cause))
                    } else {
                        std::cmp::Ordering::Equal
                    }
                },
            )
            .then_with(|| a.error_left.total_cmp(&b.error_left))
    });
    hs
}
