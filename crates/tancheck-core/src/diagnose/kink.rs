//! Kinks: the point sits on a branch boundary (yield surface, opening/closing, damage onset)
//! when the forward and backward derivatives disagree and keep disagreeing as the step
//! shrinks. A kink alone is not a failure; a returned tangent that matches neither one-sided
//! derivative is.
//!
//! Each strain direction is judged on its own: at a multi-axial yield point the 11 column may
//! load plastically on one side while the 22 and 33 columns load plastically on the other
//! (and unload elastically on the side the returned tangent describes). A returned column
//! passes when it equals the forward or the backward derivative of that column.

use serde::{Deserialize, Serialize};

use crate::compare::compare;
use crate::convention::Convention;
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;

/// Relative steps at which the one-sided derivatives are compared. Why these: two decades over
/// which a one-sided truncation (∝ h) falls 100-fold while round-off (≈ ε/h, 2e-9 at 1e-7)
/// stays far below [`GAP_LEVEL`], so a gap that does not fall is a kink (common practice).
pub const STEPS: [f64; 3] = [1e-5, 1e-6, 1e-7];

/// A one-sided gap larger than this (relative to the column, or the matrix norm times the
/// entry floor) is more than the one-sided truncation at the steps of [`STEPS`]. Why 1e-4: that
/// truncation is about h × the relative curvature, 1e-5 at the largest step for a smooth law,
/// so 1e-4 leaves a factor 10 (common practice).
pub const GAP_LEVEL: f64 = 1e-4;

/// Which one-sided derivative the returned tangent (or one of its columns) equals.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Side {
    Forward,
    Backward,
    /// No kink in this column: both sides agree and the returned column equals them.
    Both,
    Neither,
}

impl Side {
    pub fn word(self) -> &'static str {
        match self {
            Side::Forward => "forward",
            Side::Backward => "backward",
            Side::Both => "both",
            Side::Neither => "neither",
        }
    }

    /// The side a returned column (or ∂σ/∂T) matches from its errors against the forward and
    /// the backward derivative: one rule for both kink probes. Within `tol` of both, it is
    /// `Both` unless the gaps say kink, where the closer side wins.
    pub fn matched(forward_error: f64, backward_error: f64, tol: f64, detected: bool) -> Side {
        match (forward_error <= tol, backward_error <= tol) {
            (true, true) if !detected => Side::Both,
            (true, true) if forward_error <= backward_error => Side::Forward,
            (true, true) | (false, true) => Side::Backward,
            (true, false) => Side::Forward,
            (false, false) => Side::Neither,
        }
    }
}

/// A kink: the gap between the one-sided derivatives stays above the one-sided truncation level
/// at every step and does not shrink with h. Why 0.3: truncation falls 100-fold over STEPS, a
/// kink's gap not at all; keeping 30% of the first gap at the last step tells them apart with
/// room for round-off. Shared by both kink probes.
pub(super) fn kinked(gaps: &[f64]) -> bool {
    gaps.len() >= 2 && gaps.iter().all(|&x| x > GAP_LEVEL) && gaps[gaps.len() - 1] > 0.3 * gaps[0]
}

/// Rounding, not a kink: the absolute gap between the one-sided derivatives grows tenfold or
/// more from the largest step of [`STEPS`] to the smallest. Round-off in a difference quotient
/// (ε|σ|/h, or an inner solve's tolerance over h) grows 100-fold over those two decades, a
/// kink's gap stays, a boundary's beyond the point falls; tenfold lies between. Without this a
/// derivative that is zero (a perfectly plastic return to the apex of a pressure-dependent
/// surface: the stress does not move) read as a kink, its one-sided quotients being rounding
/// alone, equal in size and unrelated, so their gap relative to themselves stays near 1.
pub(super) fn rounding(abs_gaps: &[f64]) -> bool {
    match (abs_gaps.first(), abs_gaps.last()) {
        (Some(&a), Some(&b)) if abs_gaps.len() >= 2 => b >= 10.0 * a && b > 0.0,
        _ => false,
    }
}

/// A jump in the stress, not rounding: the absolute gap between the one-sided quotients grows
/// as the step shrinks (see [`rounding`]) and, at the smallest step, exceeds `scale`, the size
/// of the column (the larger of the returned column and the smaller one-sided one, and the
/// entry floor). A quotient across a jump J is J/h; rounding's ε|σ|/h stays many decades below
/// the tangent at these steps (2e-16 × a stress over a strain of 1e-10).
pub(super) fn jump(abs_gaps: &[f64], scale: f64) -> bool {
    rounding(abs_gaps) && abs_gaps.last().is_some_and(|&g| g > scale)
}

/// No kink at the point, but one within the largest step: the gap is above [`GAP_LEVEL`] at
/// the largest step and below it at the smallest. Shared by both kink probes.
pub(super) fn nearby(gaps: &[f64], detected: bool) -> bool {
    !detected && gaps.len() >= 2 && gaps[0] > GAP_LEVEL && gaps[gaps.len() - 1] <= GAP_LEVEL
}

/// No kink at the point, but a boundary closer than the smallest step: the gap is above
/// [`GAP_LEVEL`] at every step, which a kink's is too, but falls to less than 0.3 of the first
/// (see [`kinked`]), as a quotient across a boundary at a distance δ below the steps does
/// (its share of the other branch falls as δ/h).
pub(super) fn close(gaps: &[f64], detected: bool) -> bool {
    !detected && gaps.len() >= 2 && gaps.iter().all(|&g| g > GAP_LEVEL) && gaps[gaps.len() - 1] < gaps[0]
}

/// What the kink probe found in one column (strain direction).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct KinkColumn {
    /// Gap ‖F_:j − B_:j‖ relative to the column (with the entry floor), per step of [`STEPS`].
    pub gaps: Vec<f64>,
    pub detected: bool,
    /// Column error of the returned column against the forward and the backward column at
    /// the smallest step.
    pub forward_error: f64,
    pub backward_error: f64,
    pub matches: Side,
    /// The returned column lies on one side of the kink: its distance to the nearer one-sided
    /// column is at most [`SIDE_MARGIN`] of the distance between the two sides (one scale for
    /// all three, so a side that is zero does not skew it). The mean of the sides is not.
    #[serde(default)]
    pub on_a_side: bool,
    /// The stress jumps across the point in this strain direction: the gap between the
    /// one-sided quotients grows as 1/h (as rounding's does) and is larger than the column
    /// itself (rounding's is far below it); see [`jump`].
    #[serde(default)]
    pub jump: bool,
    /// The side whose one-sided quotients are the same at every step of [`STEPS`] (within the
    /// probe's tolerance) while the other side's are not: the point lies inside that side's
    /// branch, and a boundary lies on the other side, closer than the steps reach. `None`
    /// where both or neither are steady.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub steady: Option<Side>,
}

/// At a kink, a column on one side of it is at most this share of the gap between the sides
/// away from that side's one-sided derivative (a decade: the one-sided truncation at the
/// probe's smallest step is far below a gap that makes a kink). A column about as far from
/// both, their mean for one, is no side's derivative, whatever the complex step says: a twin
/// that takes a branch that holds only at the point itself (a sign function that is 0 at 0)
/// agrees with such a column.
pub const SIDE_MARGIN: f64 = 0.1;

/// Whether `returned` lies on one side of the kink between `forward` and `backward` (plain
/// Euclidean distances, one scale): see [`KinkColumn::on_a_side`].
pub fn on_a_side(returned: &[f64], forward: &[f64], backward: &[f64]) -> bool {
    let dist = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let near = dist(returned, forward).min(dist(returned, backward));
    near <= SIDE_MARGIN * dist(forward, backward)
}

/// What the kink probe found.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Kink {
    /// Relative gap ‖F − B‖/‖F‖ between the one-sided derivatives, per step of [`STEPS`].
    pub gaps: Vec<f64>,
    /// A kink in at least one column.
    pub detected: bool,
    /// No kink at the point, but one within the largest probe step: the one-sided derivatives
    /// differ at that step and agree at the smallest (a branch boundary close to the point).
    #[serde(default)]
    pub nearby: bool,
    /// No kink at the point, but a boundary closer to it than the smallest probe step: the gap
    /// stays above [`GAP_LEVEL`] at every step yet falls as the step shrinks (see [`close`]).
    #[serde(default)]
    pub close: bool,
    /// Error of the returned tangent against the forward and the backward derivative at the
    /// smallest step (the whole matrix).
    pub forward_error: f64,
    pub backward_error: f64,
    /// The side the whole returned tangent matches, or, when no single side does but every
    /// column matches one of its own sides, the side of the first kinked column (see
    /// [`Kink::columns`]); `Neither` when some column matches neither side.
    pub returned_matches: Side,
    /// Per column, in routine order.
    #[serde(default)]
    pub columns: Vec<KinkColumn>,
    /// Which side each column matched, in words, e.g. "11 backward, 22 forward, 23 both".
    #[serde(default)]
    pub sides: String,
    /// The one-sided derivatives at the smallest step (routine form, column-major).
    pub forward: Vec<f64>,
    pub backward: Vec<f64>,
    /// Where a column matched neither side: the branch at the point whose derivative the
    /// returned tangent was found to be, along another direction (the corner search's finding).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub corner: Option<Corner>,
}

impl Kink {
    /// The strain directions (labels) across which the stress jumps.
    pub fn jumps(&self, conv: &Convention) -> Vec<&'static str> {
        self.columns
            .iter()
            .enumerate()
            .filter(|(_, c)| c.jump)
            .map(|(j, _)| conv.order()[j].label())
            .collect()
    }

    /// Every column equals one of its own one-sided derivatives.
    pub fn every_column_matches(&self) -> bool {
        !self.columns.is_empty() && self.columns.iter().all(|c| c.matches != Side::Neither)
    }

    /// The one-sided derivative column by column: each column from the side the returned
    /// column matched (the closer side where it matched neither). The best reference at a kink.
    pub fn closest_sides(&self, n: usize) -> Vec<f64> {
        let mut out = self.forward.clone();
        for (j, c) in self.columns.iter().enumerate() {
            if c.backward_error < c.forward_error {
                out[j * n..(j + 1) * n].copy_from_slice(&self.backward[j * n..(j + 1) * n]);
            }
        }
        out
    }
}

/// The branch the search found the returned tangent to be the derivative of.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Corner {
    /// The strain direction the branch was entered along (routine order, unit length).
    pub direction: Vec<f64>,
    /// The same in words, e.g. "0.71·11 + 0.71·22".
    pub along: String,
    /// The returned tangent against the branch's derivative there (the check's error measure).
    pub error: f64,
    /// Directions tried, and how many of them got a whole tangent.
    pub tried: usize,
    pub confirmed: usize,
}

/// What both kink probes judge with: the convention, the returned tangent (or ∂σ/∂T), the
/// step scale and the tolerances, passed as one value.
#[derive(Clone, Copy)]
pub struct KinkQuery<'a> {
    pub conv: &'a Convention,
    pub returned: &'a [f64],
    /// The steps of [`STEPS`] are relative to this.
    pub scale: f64,
    pub tol: f64,
    pub entry_floor: f64,
    /// The size of the stresses the one-sided quotients subtract (‖σ‖ + ‖C‖ times the scale):
    /// their rounding, ε times it over the step, is no jump.
    pub stress_size: f64,
}

/// Judge the kink from the one-sided derivatives at each step of [`STEPS`] (`pairs[k]` =
/// (forward, backward) at step k, routine form): no routine calls.
pub fn judge(q: &KinkQuery<'_>, pairs: &[OneSided]) -> Kink {
    let KinkQuery { conv, returned, tol, entry_floor, .. } = *q;
    let n = conv.ncomp();
    // The rounding of a one-sided quotient at the smallest step: 64 ε S/h (the two stresses
    // of a quotient, each a few roundings off, with room for a return's cancellation).
    let rounding_level = 64.0 * f64::EPSILON * q.stress_size / (STEPS[STEPS.len() - 1] * q.scale);
    let mut gaps = Vec::with_capacity(pairs.len());
    let mut col_gaps: Vec<Vec<f64>> = vec![Vec::with_capacity(pairs.len()); n];
    // The absolute gaps ‖F − B‖, whole and per column, to tell rounding from a kink.
    let mut abs_gaps = Vec::with_capacity(pairs.len());
    let mut col_abs: Vec<Vec<f64>> = vec![Vec::with_capacity(pairs.len()); n];
    let dist = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    for (f, b) in pairs {
        let c = compare(conv, b, f, f64::INFINITY, entry_floor, 0);
        gaps.push(c.norm_error);
        for (j, g) in c.column_errors.iter().enumerate() {
            col_gaps[j].push(*g);
        }
        abs_gaps.push(dist(f, b));
        for (j, a) in col_abs.iter_mut().enumerate() {
            a.push(dist(&f[j * n..(j + 1) * n], &b[j * n..(j + 1) * n]));
        }
    }
    let (f, b) = pairs.last().expect("at least one step");
    let cf = compare(conv, returned, f, tol, entry_floor, 0);
    let cb = compare(conv, returned, b, tol, entry_floor, 0);
    let columns: Vec<KinkColumn> = (0..n)
        .map(|j| {
            let (fe, be) = (cf.column_errors[j], cb.column_errors[j]);
            let detected = kinked(&col_gaps[j]) && !rounding(&col_abs[j]);
            let matches = Side::matched(fe, be, tol, detected);
            let cols = j * n..(j + 1) * n;
            let on_a_side = on_a_side(&returned[cols.clone()], &f[cols.clone()], &b[cols.clone()]);
            let norm = |m: &[f64]| m.iter().map(|x| x * x).sum::<f64>().sqrt();
            let scale = norm(&returned[cols.clone()])
                .max(norm(&f[cols.clone()]).min(norm(&b[cols])))
                .max(entry_floor * norm(returned));
            let steady_on = |side: usize| {
                let q = |k: usize| {
                    let pair = &pairs[k];
                    &(if side == 0 { &pair.0 } else { &pair.1 })[j * n..(j + 1) * n]
                };
                let last = q(pairs.len() - 1);
                (0..pairs.len()).all(|k| dist(q(k), last) <= tol * scale)
            };
            let steady = match (steady_on(0), steady_on(1)) {
                (true, false) => Some(Side::Forward),
                (false, true) => Some(Side::Backward),
                _ => None,
            };
            // A jump stands above the quotients' rounding, which also grows as 1/h and exceeds a
            // zero column where the stress does not move (a perfectly plastic apex read "the
            // stress jumps" on a one-ulp backward quotient; a user-style sweep).
            KinkColumn {
                steady,
                jump: jump(
                    &col_abs[j],
                    scale.max(if rounding_level.is_finite() { rounding_level } else { 0.0 }),
                ),
                gaps: col_gaps[j].clone(),
                detected,
                forward_error: fe,
                backward_error: be,
                matches,
                on_a_side,
            }
        })
        .collect();
    let detected = kinked(&gaps) && !rounding(&abs_gaps) || columns.iter().any(|c| c.detected);
    let nearby = nearby(&gaps, detected);
    let close = close(&gaps, detected);
    let whole = |c: &crate::compare::Comparison| c.error();
    let (fe, be) = (whole(&cf), whole(&cb));
    let returned_matches = if fe <= tol && fe <= be {
        Side::Forward
    } else if be <= tol {
        Side::Backward
    } else if columns.iter().all(|c| c.matches != Side::Neither) {
        columns.iter().find(|c| c.detected).map_or(Side::Both, |c| c.matches)
    } else {
        Side::Neither
    };
    let sides = columns
        .iter()
        .enumerate()
        .map(|(j, c)| format!("{} {}", conv.order()[j].label(), c.matches.word()))
        .collect::<Vec<_>>()
        .join(", ");
    Kink {
        gaps,
        sides,
        detected,
        nearby,
        close,
        forward_error: fe,
        backward_error: be,
        returned_matches,
        columns,
        forward: f.clone(),
        backward: b.clone(),
        corner: None,
    }
}

/// Probe for a kink at the end of the current increment.
pub fn probe(driver: &mut Driver, caller: &mut Caller<'_>, q: &KinkQuery<'_>) -> Result<Kink, Fault> {
    let n = q.conv.ncomp();
    let pairs = one_sided(driver, caller, n, (0..n).map(Direction::Strain), q.scale)?;
    Ok(judge(q, &pairs))
}

/// The forward and the backward differences at one step.
pub(super) type OneSided = (Vec<f64>, Vec<f64>);

/// Forward and backward differences along each of `dirs` (columns of `n` stress entries, one
/// after the other) at each step of [`STEPS`] times `scale`: the samples both kink probes judge.
pub(super) fn one_sided(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    n: usize,
    dirs: impl Iterator<Item = Direction> + Clone,
    scale: f64,
) -> Result<Vec<OneSided>, Fault> {
    let width = n * dirs.clone().count();
    let mut pairs = Vec::with_capacity(STEPS.len());
    for rel in STEPS {
        let h = rel * scale;
        let (mut f, mut b) = (vec![0.0; width], vec![0.0; width]);
        for (j, dir) in dirs.clone().enumerate() {
            Scheme::Forward.column(driver, caller, dir, h, &mut f[j * n..(j + 1) * n])?;
            Scheme::Backward.column(driver, caller, dir, h, &mut b[j * n..(j + 1) * n])?;
        }
        pairs.push((f, b));
    }
    Ok(pairs)
}

#[cfg(test)]
mod tests {
    use super::rounding;

    /// Round-off ε|σ|/h grows 100-fold over the probe's two decades; a kink's gap stays (the
    /// 0.26 of a uniaxial yield point), a boundary's beyond the point falls.
    #[test]
    fn a_gap_that_grows_as_the_step_shrinks_is_rounding() {
        assert!(rounding(&[2.2e-9, 2.2e-8, 2.2e-7]));
        assert!(rounding(&[0.0, 1e-12, 1e-10]));
        assert!(!rounding(&[0.26, 0.26, 0.259]));
        assert!(!rounding(&[0.24, 0.08, 5e-8]));
        assert!(!rounding(&[0.0, 0.0, 0.0]));
        // A kink with rounding on top that has not yet overtaken it.
        assert!(!rounding(&[0.26, 0.26, 0.26 + 2.2e-7]));
    }

    /// A stress jump J seen by a one-sided quotient is J/h: it grows as rounding does, but
    /// stands far above the column (a 1 MPa jump at steps 1e-8 to 1e-10 against a column of
    /// 1e5 MPa); rounding stays far below it.
    #[test]
    fn a_gap_that_grows_and_exceeds_the_column_is_a_jump() {
        assert!(super::jump(&[1e8, 1e9, 1e10], 1e5));
        assert!(!super::jump(&[2.2e-9, 2.2e-8, 2.2e-7], 1e5));
        assert!(!super::jump(&[0.26e5, 0.26e5, 0.26e5], 1e5));
    }
}
