//! Comparison of a returned ∂σ/∂T vector with a numerical one: relative errors, or against an
//! absolute floor when the numerical derivative is rounding noise.

use std::borrow::Cow;

use super::{finite_or_inf, measure, Comparison, EntryDiff, Label, Limits, Worst};
use crate::convention::Convention;

/// Compare ∂σ/∂T vectors given in the routine's convention. Errors are relative to
/// max(‖∂σ/∂T_num‖, `abs_floor`) where `abs_floor` is a stress scale per temperature scale
/// (see [`dtemp_floor`]): a returned zero against a numerical derivative that is rounding noise
/// is not a 100 % error.
pub fn compare_dtemp_floor(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    limits: Limits,
    abs_floor: f64,
) -> Comparison {
    let n = conv.ncomp();
    let (rb, mb) = mandel(conv, returned, numerical);
    let (r, m) = (&rb[..n], &mb[..n]);
    let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt();
    if norm >= abs_floor || !abs_floor.is_finite() || abs_floor <= 0.0 {
        return relative(conv, r, m, returned, numerical, limits);
    }
    let Limits { tol, keep_worst, .. } = limits;
    // Below the floor: measure against the floor, entry by entry.
    let diff = r.iter().zip(m.iter()).map(|(a, b)| (a - b) * (a - b)).sum::<f64>().sqrt();
    let mut worst = Worst::new(keep_worst);
    for i in 0..n {
        worst.offer(finite_or_inf((r[i] - m[i]).abs() / abs_floor), i);
    }
    let worst_entry_error = worst.max;
    let entries = worst.entries(|i| EntryDiff {
        row: i,
        col: 0,
        label: Label::pair(conv.order()[i].label(), "T"),
        returned: returned[i],
        numerical: numerical[i],
        error: 0.0,
    });
    let non_finite = returned.iter().filter(|x| !x.is_finite()).count();
    let norm_error = finite_or_inf(diff / abs_floor);
    Comparison {
        norm_error,
        worst_entry_error,
        soft_error: 0.0,
        soft_direction: Cow::Borrowed(""),
        column_errors: smallvec::smallvec![norm_error],
        worst: entries,
        entry_errors: Vec::new(),
        non_finite_returned: non_finite,
        tol,
        pass: non_finite == 0 && norm_error <= tol && worst_entry_error <= tol,
    }
}

/// The absolute floor of a ∂σ/∂T comparison: a stress scale per temperature scale,
/// (‖σ‖ + ‖C‖·strain scale) / temperature scale. Rounding noise of a difference in the
/// temperature lies far below it.
pub fn dtemp_floor(stress: &[f64], tangent: &[f64], strain_scale: f64, temp_scale: f64) -> f64 {
    let s = stress.iter().map(|x| x * x).sum::<f64>().sqrt();
    let c = tangent.iter().map(|x| x * x).sum::<f64>().sqrt();
    let f = (s + c * strain_scale) / temp_scale.max(1e-300);
    // A relative level (common practice): forward-difference rounding in the temperature
    // stays about two decades below it at the default steps.
    if f.is_finite() {
        1e-4 * f
    } else {
        0.0
    }
}

/// Compare ∂σ/∂T vectors given in the routine's convention (relative errors only).
pub fn compare_dtemp(conv: &Convention, returned: &[f64], numerical: &[f64], limits: Limits) -> Comparison {
    let n = conv.ncomp();
    let (r, m) = mandel(conv, returned, numerical);
    relative(conv, &r[..n], &m[..n], returned, numerical, limits)
}

/// Both vectors in Mandel form (the first `ncomp` entries).
fn mandel(conv: &Convention, returned: &[f64], numerical: &[f64]) -> ([f64; 6], [f64; 6]) {
    let n = conv.ncomp();
    let (mut r, mut m) = ([0.0; 6], [0.0; 6]);
    conv.stress_to_mandel(returned, &mut r[..n]);
    conv.stress_to_mandel(numerical, &mut m[..n]);
    (r, m)
}

/// The relative measures on the Mandel forms `r` and `m` of `returned` and `numerical`.
fn relative(
    conv: &Convention,
    r: &[f64],
    m: &[f64],
    returned: &[f64],
    numerical: &[f64],
    limits: Limits,
) -> Comparison {
    let order = conv.order();
    let label = |i: usize, _j: usize| Label::pair(order[i].label(), "T");
    measure(r, m, returned, numerical, 1, &label, limits)
}
