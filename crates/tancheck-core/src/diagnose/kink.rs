//! Kinks: the point sits on a branch boundary (yield surface, opening/closing, damage onset)
//! when the forward and backward derivatives disagree and keep disagreeing as the step
//! shrinks. A kink alone is not a failure; a returned tangent that matches neither one-sided
//! derivative is.

use serde::{Deserialize, Serialize};

use crate::compare::compare;
use crate::convention::Convention;
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;

/// Relative steps at which the one-sided derivatives are compared.
const STEPS: [f64; 3] = [1e-5, 1e-6, 1e-7];

/// Which one-sided derivative the returned tangent equals.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Side {
    Forward,
    Backward,
    Neither,
}

/// What the kink probe found.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Kink {
    /// Relative gap ‖F − B‖/‖F‖ between the one-sided derivatives, per step of [`STEPS`].
    pub gaps: Vec<f64>,
    pub detected: bool,
    /// Error of the returned tangent against the forward and the backward derivative at the
    /// smallest step.
    pub forward_error: f64,
    pub backward_error: f64,
    pub returned_matches: Side,
    /// The one-sided derivatives at the smallest step (routine form, column-major).
    pub forward: Vec<f64>,
    pub backward: Vec<f64>,
}

/// Probe for a kink at the end of the current increment.
#[allow(clippy::too_many_arguments)]
pub fn probe(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &Convention,
    returned: &[f64],
    scale: f64,
    tol: f64,
    entry_floor: f64,
) -> Result<Kink, Fault> {
    let n = conv.ncomp();
    let mut f = vec![0.0; n * n];
    let mut b = vec![0.0; n * n];
    let mut gaps = Vec::with_capacity(STEPS.len());
    for rel in STEPS {
        let h = rel * scale;
        for j in 0..n {
            Scheme::Forward.column(driver, caller, Direction::Strain(j), h, &mut f[j * n..(j + 1) * n])?;
            Scheme::Backward.column(driver, caller, Direction::Strain(j), h, &mut b[j * n..(j + 1) * n])?;
        }
        let c = compare(conv, &b, &f, f64::INFINITY, entry_floor, 0);
        gaps.push(c.norm_error);
    }
    // A gap that stays above the one-sided truncation level and does not shrink with h.
    let detected = gaps.iter().all(|&g| g > 1e-4) && gaps[2] > 0.3 * gaps[0];
    let err = |x: &[f64]| {
        let c = compare(conv, returned, x, tol, entry_floor, 0);
        c.norm_error.max(c.worst_entry_error)
    };
    let (fe, be) = (err(&f), err(&b));
    let returned_matches = if fe <= tol && fe <= be {
        Side::Forward
    } else if be <= tol {
        Side::Backward
    } else {
        Side::Neither
    };
    Ok(Kink {
        gaps,
        detected,
        forward_error: fe,
        backward_error: be,
        returned_matches,
        forward: f,
        backward: b,
    })
}
