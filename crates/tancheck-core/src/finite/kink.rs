//! A finite-strain increment that ends on a kink: a branch switch at the point itself (a fibre
//! that carries load only in tension, at a stretch of exactly 1; contact; a yield point),
//! where the central difference straddles the switch and gives the mean of the two sides. As
//! for point routines (`diagnose::kink`), the returned tangent is right there when each
//! column equals one of its own one-sided derivatives; the complex step, which does not cross
//! the switch, then agrees with the side the routine takes, and is no broken twin.

use super::mat3::Mat3;
use super::numeric::{self, Ask, Difference, Start, Workspace};
use super::routine::FiniteRoutine;
use crate::routine::Fault;

/// Relative gap between a column's one-sided derivatives above which the column has a kink
/// (a switch changes a modulus by far more than a thousandth; truncation and rounding of the
/// second-order one-sided differences at the central step stay far below).
const GAP: f64 = 1e-3;

/// A column's error against a one-sided derivative (relative to the column, with a floor of
/// the whole tangent's size) at most this many times the check's tolerance: that side's.
const SIDE_FACTOR: f64 = 10.0;

/// What the one-sided derivatives say of an increment.
#[derive(Debug, PartialEq)]
pub enum KinkVerdict {
    /// No column has a kink, or a column without one differs from its derivative.
    None,
    /// On a kink, every column of the returned tangent one of its own sides (the words name
    /// the kinked columns and their sides).
    OnSides(String),
    /// On a kink, a kinked column of the returned tangent neither side (the words name it).
    Neither(String),
}

/// The one-sided derivatives of an increment whose check failed, or whose twin disagreed with
/// the central difference: see [`KinkVerdict`].
#[allow(clippy::too_many_arguments)]
pub fn on_a_kink(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    start: &Start,
    f1: &Mat3<f64>,
    ask: Ask,
    stress_at_f1: [f64; 6],
    returned: &[f64],
    step: f64,
    tol: f64,
) -> Result<KinkVerdict, Fault> {
    let n = ask.measure.size();
    let mut forward = vec![0.0; n * n];
    let mut backward = vec![0.0; n * n];
    let side = |sign: f64| Ask { how: Difference::OneSided { step, sign, stress_at_f1 }, ..ask };
    numeric::tangent(r, ws, start, f1, side(1.0), &mut forward)?;
    numeric::tangent(r, ws, start, f1, side(-1.0), &mut backward)?;
    let norm = |a: &[f64]| a.iter().map(|x| x * x).sum::<f64>().sqrt();
    let whole = norm(&forward).max(norm(&backward)).max(f64::MIN_POSITIVE);
    let gap = |a: &[f64], b: &[f64]| {
        let d: Vec<f64> = a.iter().zip(b).map(|(x, y)| x - y).collect();
        norm(&d) / norm(b).max(1e-6 * whole)
    };
    let limit = SIDE_FACTOR * tol.max(1e-8);
    let (mut kinked, mut words, mut neither) = (0, Vec::new(), Vec::new());
    for b in 0..n {
        let col = |a: &[f64]| a[n * b..n * b + n].to_vec();
        let (f, bk, ret) = (col(&forward), col(&backward), col(returned));
        let on_forward = gap(&ret, &f) <= limit;
        let on_backward = gap(&ret, &bk) <= limit;
        if gap(&f, &bk) > GAP {
            kinked += 1;
            match (on_forward, on_backward) {
                (true, _) => words.push(format!("{} forward", b + 1)),
                (false, true) => words.push(format!("{} backward", b + 1)),
                (false, false) => neither.push(format!("{}", b + 1)),
            }
        } else if !(on_forward && on_backward) {
            // No kink in this column and the returned column is not its derivative.
            return Ok(KinkVerdict::None);
        }
    }
    if !neither.is_empty() {
        return Ok(KinkVerdict::Neither(format!(
            "it sits on a kink (a branch switch at the point) and the returned tangent's column{} {} equal{} \
             neither one-sided derivative (the mean of the two sides, which the central difference across the \
             switch also gives, is no side's derivative)",
            if neither.len() == 1 { "" } else { "s" },
            neither.join(", "),
            if neither.len() == 1 { "s" } else { "" }
        )));
    }
    if kinked == 0 {
        return Ok(KinkVerdict::None);
    }
    Ok(KinkVerdict::OnSides({
        format!(
            "it sits on a kink (a branch switch at the point): the returned tangent's column{} {} equal{} the \
             one-sided derivative{} named, the other columns the derivative; the central difference straddles \
             the switch",
            if words.len() == 1 { "" } else { "s" },
            words.join(", "),
            if words.len() == 1 { "s" } else { "" },
            if words.len() == 1 { "" } else { "s" }
        )
    }))
}
