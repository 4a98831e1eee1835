//! Kinks in the temperature: at a zero (or small) increment from a point on a branch boundary
//! whose position depends on the temperature (a yield stress that falls as T rises, a damage
//! onset that moves with T), raising the temperature crosses the boundary while lowering it
//! does not. The stress is then not differentiable in T and a central difference of ∂σ/∂T
//! straddles the kink. The ∂σ/∂T column is judged as a strain column is in [`super::kink`]:
//! with the same steps, the same gap level and the same rule that a kink alone is not a
//! failure, a returned ∂σ/∂T that matches neither one-sided derivative is.

use super::kink::{kinked, nearby, one_sided, KinkQuery, OneSided, Side};
use crate::compare::{compare_dtemp_floor, Limits};
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

/// What the temperature kink probe found (the ∂σ/∂T column).
#[derive(Clone, Debug, PartialEq)]
pub struct TempKink {
    /// Gap ‖F − B‖ between the one-sided derivatives, relative to the column (or the absolute
    /// floor of [`crate::compare::dtemp_floor`]), per step of [`STEPS`](super::kink::STEPS).
    pub gaps: Vec<f64>,
    /// The gap stays above [`GAP_LEVEL`](super::kink::GAP_LEVEL) and does not shrink with the step.
    pub detected: bool,
    /// No kink at the point, but one within the largest probe step.
    pub nearby: bool,
    /// Error of the returned ∂σ/∂T against the forward and backward derivative at the
    /// smallest step.
    pub forward_error: f64,
    pub backward_error: f64,
    pub matches: Side,
    /// The returned ∂σ/∂T lies on one side of the kink ([`super::kink::on_a_side`]).
    pub on_a_side: bool,
    /// The one-sided derivatives at the smallest step (routine form).
    pub forward: Vec<f64>,
    pub backward: Vec<f64>,
}

impl TempKink {
    /// The one-sided derivative closer to the returned ∂σ/∂T: the reference for its causes.
    pub fn closest_side(&self) -> &[f64] {
        if self.backward_error < self.forward_error {
            &self.backward
        } else {
            &self.forward
        }
    }
}

/// Judge the temperature kink from the one-sided derivatives at each step of [`STEPS`](super::kink::STEPS)
/// (`pairs[k]` = (forward, backward) at step k, routine form): no routine calls. `abs_floor`
/// is the absolute floor of the ∂σ/∂T comparison.
pub fn judge(q: &KinkQuery<'_>, pairs: &[OneSided], abs_floor: f64) -> TempKink {
    let KinkQuery { conv, returned, tol, entry_floor, .. } = *q;
    let cmp = |a: &[f64], b: &[f64], t: f64| {
        compare_dtemp_floor(conv, a, b, Limits::new(t, entry_floor, 0), abs_floor)
    };
    let gaps: Vec<f64> = pairs.iter().map(|(f, b)| cmp(b, f, f64::INFINITY).norm_error).collect();
    let (f, b) = pairs.last().expect("at least one step");
    let detected = kinked(&gaps);
    let nearby = nearby(&gaps, detected);
    let (fe, be) = (cmp(returned, f, tol).error(), cmp(returned, b, tol).error());
    let matches = Side::matched(fe, be, tol, detected);
    TempKink {
        gaps,
        detected,
        nearby,
        forward_error: fe,
        backward_error: be,
        matches,
        on_a_side: super::kink::on_a_side(returned, f, b),
        forward: f.clone(),
        backward: b.clone(),
    }
}

/// Probe for a kink in the temperature at the end of the current increment: forward and
/// backward differences of the stress in the temperature increment at each step of
/// [`STEPS`](super::kink::STEPS) times `q.scale` (the temperature scale).
pub fn probe(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    q: &KinkQuery<'_>,
    abs_floor: f64,
) -> Result<TempKink, Fault> {
    let pairs = one_sided(driver, caller, q.conv.ncomp(), std::iter::once(Direction::Temperature), q.scale)?;
    Ok(judge(q, &pairs, abs_floor))
}
