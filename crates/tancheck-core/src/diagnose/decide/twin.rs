//! Rule 1 of the decision (see the parent module): whether the complex-step twin, not the
//! returned tangent, is off — its real part against the real outputs, its derivative against
//! the real schemes that agree with the returned tangent or settle on a derivative of their
//! own — for the tangent and for ∂σ/∂T.

use super::super::study::{Behaviour, StepStudy};
use super::{Observed, REAL_PART_LEVEL};

pub(super) fn twin_real_part_differs(o: &Observed) -> bool {
    o.twin.is_some_and(|t| t.real_part_gap.is_nan() || t.real_part_gap > REAL_PART_LEVEL)
}

/// How much closer to the returned tangent a real scheme must come than the complex step
/// does before the complex step, not the tangent, is held to be off: a decade. A real study
/// "converges" within its own tolerance (1e-4 for a one-sided scheme), which says nothing
/// against a complex step that differs by as much as the real scheme does (a tangent off by
/// 1e-5 next to a branch boundary, where the real references are spoiled and the complex step
/// alone is exact). Why a decade: a real scheme that converged sits at its rounding floor,
/// several decades below any complex-step error worth blaming on the twin.
pub const TWIN_MARGIN: f64 = 0.1;

/// Real schemes that agree with the returned tangent, with their order shown, and clearly
/// closer to it than the complex step is ([`TWIN_MARGIN`]) when the complex step ran.
pub(super) fn real_agree(o: &Observed) -> Option<&StepStudy> {
    let complex_error = o.complex.map(|(e, _)| e);
    o.studies.iter().filter(|s| s.scheme != crate::schemes::Scheme::ComplexStep).find(|s| {
        s.behaviour == Behaviour::Converges
            && complex_error.is_none_or(|e| e.is_nan() || s.best_error <= TWIN_MARGIN * e)
    })
}

/// How closely the real schemes' typical errors (the median over the ladder of steps) must
/// agree for the derivative they settle on to count as one (1 %). Why: schemes of different
/// order reach the same distance from the returned tangent over most of the ladder only when
/// they see the same derivative (measured: 0.1077 and 0.1077 for a Cam-clay-type routine,
/// 0.30000 and 0.30000 for a scaled J2 tangent); where a branch boundary spoils them, the
/// one-sided and central quotients differ by a factor of two and more.
pub const REAL_AGREE: f64 = 0.01;

/// The median of a study's finite errors over its ladder of steps.
fn typical_error(s: &StepStudy) -> Option<f64> {
    let mut e: Vec<f64> = s.points.iter().map(|p| p.error).filter(|e| e.is_finite()).collect();
    if e.is_empty() {
        return None;
    }
    e.sort_by(f64::total_cmp);
    let k = e.len() / 2;
    Some(if e.len() % 2 == 1 { e[k] } else { 0.5 * (e[k - 1] + e[k]) })
}

/// The real schemes settle on one derivative of their own, at least twice as close to the
/// returned tangent as the complex step is: every real study levels off (the returned
/// tangent is not the derivative), their typical errors agree within [`REAL_AGREE`], and that
/// level is at most half the complex step's error. With a wrong tangent no real scheme agrees
/// with it, so [`real_agree`] cannot speak against the twin; a twin that is off as well
/// showed a complex-step error three to a thousand times the real one (found by a user-style
/// sweep: a Cam-clay-type routine with start-of-increment moduli and a twin that lost the
/// shear derivative at a hydrostatic stress). Returns the level.
pub(super) fn real_settles_apart(o: &Observed) -> Option<f64> {
    let e = o.complex.map(|(e, _)| e)?;
    let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
    for s in o.studies.iter().filter(|s| s.scheme != crate::schemes::Scheme::ComplexStep) {
        let t = typical_error(s).filter(|_| s.behaviour == Behaviour::Plateau)?;
        lo = lo.min(t);
        hi = hi.max(t);
    }
    (hi > 0.0 && hi <= (1.0 + REAL_AGREE) * lo && hi <= 0.5 * e).then_some(lo)
}

/// Rule 1: the twin is not complex-step safe.
pub(super) fn twin_unsafe(o: &Observed) -> bool {
    let kink = o.kink.as_ref().filter(|k| k.detected);
    let complex_error = o.complex.map(|(e, _)| e);
    let complex_pass = o.complex.map(|(e, tol)| e <= tol);
    let settled = real_settles_apart(o);
    let derivative_off = match (o.twin.and_then(|t| t.derivative_gap), complex_error) {
        // The complex derivative is no closer to the real reference than the returned tangent
        // is to the complex one: the twin, not the tangent, is off.
        // Why 0.5: the twin is blamed only when its own gap is of the same size as the tangent's
        // discrepancy, not a small part of it.
        (Some(g), Some(e)) if g >= 0.5 * e => true,
        // Or the real schemes settle together on a derivative of their own and the complex
        // step is at least half as far from it as the returned tangent is: a wrong tangent and
        // a twin that is off in the same entries add up in the complex step's error, and the
        // twin's gap alone fell under half of it (a continuum tangent beside a twin taking a
        // real part: 5.05 against 11.1, with the real schemes at 1.2; a user-style sweep). A
        // correct twin is as close to the real reference as Richardson is accurate.
        // A quarter of the complex step's error at least: a correct twin beside a Richardson
        // reference off by more than half the real level is not blamed (a review).
        (Some(g), Some(e)) => g >= 0.25 * e && settled.is_some_and(|d| g >= 0.5 * d),
        _ => false,
    };
    // A real study that levels off above its tolerance says the tangent is wrong: no real
    // scheme can then speak for the tangent against the twin.
    let no_real_plateau = o
        .studies
        .iter()
        .filter(|s| s.scheme != crate::schemes::Scheme::ComplexStep)
        .all(|s| s.behaviour != Behaviour::Plateau);
    // The real schemes speak against the twin: they agree with the returned tangent, or they
    // settle together on a derivative of their own, at most half the complex step's error
    // from the returned tangent.
    let real_speaks = real_agree(o).is_some() && no_real_plateau || settled.is_some();
    twin_real_part_differs(o)
        || (complex_pass == Some(false) && kink.is_none() && real_speaks && derivative_off)
}

/// Rule 1 for ∂σ/∂T: the twin is not complex-step safe in the temperature. Only the complex
/// step's ∂σ/∂T failed; a real scheme's equals the returned one, a decade closer than the
/// complex step's ([`TWIN_MARGIN`]); and the complex ∂σ/∂T is as far from a real reference
/// (Richardson in the temperature) as from the returned one (the same 0.5 as for the
/// tangent), away from a kink in the temperature. A twin that holds a temperature-dependent
/// modulus in a real variable drops its derivative this way while its strain columns stay
/// exact.
pub(super) fn dtemp_twin_unsafe(o: &Observed) -> bool {
    let (Some((e, tol)), Some(t)) = (o.dtemp_complex, o.dtemp_twin) else { return false };
    let (real, real_tol) = t.real;
    e > tol
        && !o.dtemp_kink.as_ref().is_some_and(|k| k.detected)
        && real <= real_tol
        && real <= TWIN_MARGIN * e
        && t.gap >= 0.5 * e
}
