//! Step studies: how the discrepancy between the returned tangent and a difference
//! approximation behaves as the step shrinks.
//!
//! For a consistent tangent the discrepancy falls like hᵖ (p = 1 one-sided, 2 central, 4 for
//! the higher-order schemes) until rounding and the routine's own inner tolerances take over
//! (the noise floor), where it scatters or grows like 1/h. For an inconsistent tangent it
//! levels off at a plateau: the size of the error in the tangent.

use serde::{Deserialize, Serialize};

use crate::compare::{compare_along, Limits};
use crate::convention::Convention;
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;

/// Relative steps of a study: decades from 1e-2 to 1e-12, each with its half. Why this range:
/// from steps where truncation clearly dominates down past √ε ≈ 1.5e-8, where round-off takes
/// over, so both the fall with the scheme's order and the noise floor show; the halves give
/// two points a decade for the slope.
pub fn ladder() -> Vec<f64> {
    let mut v = Vec::with_capacity(22);
    for k in 2..=12 {
        let h = 10f64.powi(-k);
        v.push(h);
        v.push(0.5 * h);
    }
    v
}

/// How the discrepancy behaved.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Behaviour {
    /// Fell with the scheme's order (the observed slope near the theoretical one over at
    /// least two consecutive steps) to at most the tolerance, or was within the tolerance
    /// (at the noise floor) from the largest step on.
    Converges,
    /// Levelled off above the tolerance: the tangent is not the derivative.
    Plateau,
    /// Neither: scattered (noisy inner solves) or the scheme broke down.
    Inconclusive,
}

/// One point of a study.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct StudyPoint {
    pub rel_step: f64,
    pub step: f64,
    /// max(norm error, worst entry error) of the returned tangent against this approximation.
    pub error: f64,
}

/// A step study of one scheme at one increment.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct StepStudy {
    pub scheme: Scheme,
    pub points: Vec<StudyPoint>,
    /// Smallest error reached, and the relative step that reached it.
    pub best_error: f64,
    pub best_rel_step: f64,
    /// Observed order: slope of log(error) against log(step) one to two decades above the
    /// best step (about the scheme's order where truncation dominates; about 0 on a plateau).
    pub slope: Option<f64>,
    /// Estimated noise floor: the scatter of the errors at steps smaller than the best one
    /// (rounding and inner tolerances), or the best error when there are none.
    pub noise_floor: f64,
    /// The plateau level when the discrepancy levels off.
    pub plateau: Option<f64>,
    pub behaviour: Behaviour,
}

/// Run a study: the returned tangent `returned` against `scheme` at every ladder step.
#[allow(clippy::too_many_arguments)]
pub fn run(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &Convention,
    returned: &[f64],
    scheme: Scheme,
    scale: f64,
    tol: f64,
    entry_floor: f64,
) -> Result<StepStudy, Fault> {
    let n = conv.ncomp();
    let mut num = vec![0.0; n * n];
    let mut points = Vec::new();
    'steps: for rel in ladder() {
        let h = rel * scale;
        for j in 0..n {
            match scheme.column(driver, caller, Direction::Strain(j), h, &mut num[j * n..(j + 1) * n]) {
                Ok(()) => {}
                // A step the routine refuses (a large one may cross a limit of its own, as a
                // solver's cut-back) is left out of the study; a crash is a fault.
                Err(Fault::Status { .. }) => continue 'steps,
                Err(f) => return Err(f),
            }
        }
        // Along the increment's own direction too, as the check measured it.
        let c = compare_along(conv, returned, &num, Limits::new(tol, entry_floor, 0), Some(driver.dstrain()));
        points.push(StudyPoint { rel_step: rel, step: h, error: c.error() });
    }
    Ok(analyse(scheme, points, tol))
}

/// Points from the largest step on (two decades of the ladder) that must be within the
/// tolerance for a study to be at its floor from the start.
const FLOOR_POINTS: usize = 4;

/// Classify a study from its points (ordered from large to small steps).
pub fn analyse(scheme: Scheme, points: Vec<StudyPoint>, tol: f64) -> StepStudy {
    let finite: Vec<&StudyPoint> = points.iter().filter(|p| p.error.is_finite()).collect();
    let (best_error, best_rel_step, best_idx) = finite
        .iter()
        .enumerate()
        .map(|(i, p)| (p.error, p.rel_step, i))
        .min_by(|a, b| a.0.total_cmp(&b.0))
        .unwrap_or((f64::INFINITY, f64::NAN, 0));
    let lg = |x: f64| x.max(1e-300).log10();
    // Slope over a decade of steps above the best one, where truncation dominates: from
    // two decades to one decade above it (or the decade just above when that is all).
    let slope = if best_idx >= 2 {
        let (ia, ib) = if best_idx >= 4 { (best_idx - 4, best_idx - 2) } else { (best_idx - 2, best_idx) };
        let a = finite[ia];
        let b = finite[ib];
        let s = (lg(a.error) - lg(b.error)) / (lg(a.step) - lg(b.step));
        s.is_finite().then_some(s)
    } else {
        None
    };
    let below: Vec<f64> = finite[best_idx..].iter().map(|p| p.error).collect();
    let noise_floor = if below.len() >= 3 {
        let m = below.iter().map(|e| lg(*e)).sum::<f64>() / below.len() as f64;
        // Why ×10: round-off errors scatter over about a decade, so the geometric mean below the
        // best step, capped at ten times their smallest, is their typical size.
        10f64.powf(m).min(below.iter().cloned().fold(f64::INFINITY, f64::min) * 10.0).max(best_error)
    } else {
        best_error
    };
    // A plateau: at least four consecutive points (two decades) within a factor 2 of their
    // median, above the tolerance. Why a factor 2: truncation changes by 10ᵖ a decade and never
    // stays that flat over two; a wrong tangent's error does not depend on the step at all.
    // And at the level the error settles to: no more than twice the best error. A flat run at
    // large steps above errors that fall far below it as the step shrinks is a branch boundary
    // within those steps, not a level the discrepancy keeps (a point 1e-10 from a yield
    // surface's edge read "levels off at 1.93e1" beside a best error of 3e-5; a user-style
    // sweep).
    let mut plateau = None;
    for w in finite.windows(4) {
        let mut e: Vec<f64> = w.iter().map(|p| p.error).collect();
        e.sort_by(f64::total_cmp);
        let med = 0.5 * (e[1] + e[2]);
        if med > tol && e[0] >= 0.5 * med && e[3] <= 2.0 * med && med <= 2.0 * best_error {
            plateau = Some(med);
            break;
        }
    }
    // No finite point at all (every perturbed stress NaN): nothing shows an order.
    let order_shown = !finite.is_empty() && shows_order(&finite[..=best_idx], scheme.order());
    // Already at the floor from the largest step on: a response linear over the ladder (no
    // truncation to fall), every error within the tolerance down to the best step, and over
    // the first two decades of steps at least (four points). Why: a best error at the largest
    // step alone, with errors growing as the step shrinks, is also what a branch boundary just
    // beyond the point gives (the quotient mixes the two sides less as h grows), not a floor.
    let at_floor = !finite.is_empty()
        && finite[..=best_idx].iter().all(|p| p.error <= tol)
        && finite.iter().take(FLOOR_POINTS).all(|p| p.error <= tol);
    let behaviour = if best_error <= tol && (order_shown || at_floor) {
        Behaviour::Converges
    } else if plateau.is_some() {
        Behaviour::Plateau
    } else {
        Behaviour::Inconclusive
    };
    StepStudy { scheme, points, best_error, best_rel_step, slope, noise_floor, plateau, behaviour }
}

/// Whether the errors of `points` (large to small steps, down to the best one) fall with the
/// order `p` over at least two consecutive steps: each local slope within [0.6p, 1.6p]
/// (common practice: halving the step should cut the discrepancy by about 2ᵖ).
pub fn shows_order(points: &[&StudyPoint], p: f64) -> bool {
    let lg = |x: f64| x.max(1e-300).log10();
    let good = |a: &StudyPoint, b: &StudyPoint| {
        let s = (lg(a.error) - lg(b.error)) / (lg(a.step) - lg(b.step));
        s.is_finite() && s >= 0.6 * p && s <= 1.6 * p
    };
    points.windows(3).any(|w| good(w[0], w[1]) && good(w[1], w[2]))
}

/// What a set of step studies of one increment says about a failed check at tolerance
/// `failed_tol` (the smallest tolerance among the failed checks). The one classification
/// `check` (through the diagnosis) and `bisect` share.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum StepVerdict {
    /// The discrepancy levels off as the step shrinks: the tangent is not the derivative.
    Mismatch,
    /// A difference converges with its order to the returned tangent, within `failed_tol`:
    /// the default step was poor (truncation).
    Truncation,
    /// Neither: the discrepancy scatters (noisy inner solves or rounding), or converges only
    /// to a level above the failed check's tolerance.
    Noise,
}

/// The study that clears a failed check, if one does: it converges with its order to at most
/// `failed_tol`.
pub fn clearing(studies: &[StepStudy], failed_tol: f64) -> Option<&StepStudy> {
    studies.iter().find(|s| s.behaviour == Behaviour::Converges && s.best_error <= failed_tol)
}

/// Classify studies: truncation when one clears the failed tolerance, a mismatch when one
/// shows a plateau, noise otherwise.
pub fn classify(studies: &[StepStudy], failed_tol: f64) -> StepVerdict {
    if clearing(studies, failed_tol).is_some() {
        StepVerdict::Truncation
    } else if studies.iter().any(|s| s.behaviour == Behaviour::Plateau) {
        StepVerdict::Mismatch
    } else {
        StepVerdict::Noise
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pts(f: impl Fn(f64) -> f64) -> Vec<StudyPoint> {
        ladder().into_iter().map(|h| StudyPoint { rel_step: h, step: h, error: f(h) }).collect()
    }

    // Truncation c·h² plus rounding ε/h: the textbook error balance of the central
    // difference (Nocedal & Wright 2006, §8.1); the study finds order 2 and the floor.
    #[test]
    fn a_consistent_tangent_converges_with_the_scheme_order() {
        let s = analyse(Scheme::Central, pts(|h| 0.3 * h * h + 1e-16 / h), 1e-6);
        assert_eq!(s.behaviour, Behaviour::Converges);
        assert!((s.slope.unwrap() - 2.0).abs() < 0.2, "{:?}", s.slope);
        assert!(s.best_error < 1e-10 && s.best_error > 1e-12, "{}", s.best_error);
        assert!(s.noise_floor >= s.best_error);
    }

    // A boundary within the larger steps: flat at 19 there, then falling with order 2 as the
    // step shrinks below the boundary's distance, until rounding (a noisy routine's, 1.5e-13/h)
    // takes over, above the tolerance. No plateau (the discrepancy does not level off at 19),
    // and no convergence to the tolerance either.
    #[test]
    fn a_flat_run_above_a_converging_tail_is_no_plateau() {
        let s =
            analyse(Scheme::Central, pts(|h| if h > 1e-6 { 19.0 } else { 1e8 * h * h + 1.5e-13 / h }), 1e-6);
        assert_eq!(s.plateau, None, "{s:?}");
        assert_ne!(s.behaviour, Behaviour::Plateau);
    }

    #[test]
    fn an_inconsistent_tangent_shows_a_plateau() {
        let s = analyse(Scheme::Central, pts(|h| 3e-3 + 0.3 * h * h + 1e-16 / h), 1e-6);
        assert_eq!(s.behaviour, Behaviour::Plateau);
        assert!((s.plateau.unwrap() / 3e-3 - 1.0).abs() < 0.1);
        assert!(s.slope.unwrap().abs() < 0.1);
    }

    // A wrong tangent whose discrepancy happens to dip under the tolerance at one step
    // (scatter, no order) does not converge: the dip is noise, not truncation.
    #[test]
    fn a_dip_without_order_is_not_convergence() {
        let s = analyse(
            Scheme::Central,
            pts(|h| if (h - 1e-7).abs() < 1e-12 { 5e-7 } else { 3e-3 * (1.0 + 0.5 * (1e3 * h).sin()) }),
            1e-6,
        );
        assert_ne!(s.behaviour, Behaviour::Converges, "{s:?}");
        // First order falling to the floor converges for the forward scheme (order 1).
        let f = analyse(Scheme::Forward, pts(|h| 0.5 * h + 1e-16 / h), 1e-4);
        assert_eq!(f.behaviour, Behaviour::Converges);
        // ... but a first-order fall is not the order of the central scheme.
        let c = analyse(Scheme::Central, pts(|h| 0.5 * h + 1e-16 / h), 1e-4);
        assert_ne!(c.behaviour, Behaviour::Converges, "{c:?}");
        assert_eq!(classify(std::slice::from_ref(&c), 1e-4), StepVerdict::Noise);
        assert_eq!(classify(&[f.clone(), c], 1e-4), StepVerdict::Truncation);
        assert_eq!(classify(&[f], 1e-12), StepVerdict::Noise);
    }

    // A branch boundary a little beyond the point: the forward quotient mixes the two sides
    // in proportion d/h, so its error is smallest at the largest step and grows as h shrinks.
    // Within the tolerance at the largest step only, that is no floor (the study used to call
    // it converging on one point).
    #[test]
    fn an_error_growing_from_the_largest_step_is_not_convergence() {
        let s = analyse(Scheme::Forward, pts(|h| (8e-5 * 1e-2 / h).min(0.95)), 1e-4);
        assert_ne!(s.behaviour, Behaviour::Converges, "{s:?}");
        // A linear response is at its floor from the largest step on: still converges.
        let f = analyse(Scheme::Forward, pts(|h| 1e-16 / h), 1e-4);
        assert_eq!(f.behaviour, Behaviour::Converges, "{f:?}");
    }

    // A routine whose perturbed stresses are all NaN leaves no finite point: the study says
    // it cannot tell (it used to stop the program on an empty slice).
    #[test]
    fn a_study_without_a_finite_point_is_inconclusive() {
        let points = vec![
            StudyPoint { rel_step: 1e-4, step: 1e-7, error: f64::NAN },
            StudyPoint { rel_step: 1e-6, step: 1e-9, error: f64::INFINITY },
        ];
        let s = analyse(Scheme::Central, points, 1e-6);
        assert_eq!(s.behaviour, Behaviour::Inconclusive);
        assert_eq!(s.best_error, f64::INFINITY);
        assert!(analyse(Scheme::Central, Vec::new(), 1e-6).behaviour == Behaviour::Inconclusive);
    }
}
