//! Comparison of a returned tangent with a numerical one, in Mandel form.
//!
//! Three measures, so that one wrong small entry does not hide under large diagonal ones:
//! - norm error: ‖C_ret − C_num‖_F / ‖C_num‖_F;
//! - column error: ‖ΔC_:j‖ / max(‖C_num,:j‖, floor·‖C_num‖_F);
//! - entry error: |ΔC_ij| / max(|C_num,ij|, floor·‖C_num‖_F);
//! - soft-direction error: along the directions where the material is soft (the increment's
//!   own strain direction, and the eigenvectors of a numerical tangent's symmetric part with
//!   the smallest eigenvalues: in a check, the increment's sharpest numerical tangent, the same
//!   for every scheme; see `soft`), ‖(C_ret − C_num) d‖ / max(‖C_num d‖, [`SOFT_FLOOR`]·‖C_num‖_F).
//!   After yield the plastic modulus can be a thousandth of the elastic one: an error of 20 %
//!   in that direction hides under the elastic scale in the other three measures.
//!
//! ∂σ/∂T vectors are compared against an absolute floor as well ([`compare_dtemp_floor`], in
//! `dtemp`); an entry's label is in `label`.
//!
//! A comparison runs twice per increment of every check, so it allocates nothing at the
//! default settings: the Mandel copies live on the stack, the worst entries are kept by
//! insertion in an inline list (a larger `worst_entries` than [`INLINE_WORST`] spills to the
//! heap), and an entry's label is a few inline bytes, turned into text only when printed.

use std::borrow::Cow;

use serde::{Deserialize, Serialize};
use smallvec::SmallVec;

use crate::convention::Convention;

mod dtemp;
mod label;
mod soft;

pub use dtemp::{compare_dtemp, compare_dtemp_floor, dtemp_floor};
pub use label::Label;
pub use soft::{soft_error, SoftDirections, SOFT_FLOOR};

/// Entries kept inline by a comparison (the default `worst_entries`).
pub const INLINE_WORST: usize = 4;

/// Column errors of a comparison (one per strain component, at most 6, inline).
pub type ColumnErrors = SmallVec<[f64; 6]>;
/// The worst entries of a comparison, worst first.
pub type WorstEntries = SmallVec<[EntryDiff; INLINE_WORST]>;

/// How strict a comparison is: the tolerance on every measure, the entry floor (a fraction of
/// the numerical tangent's norm below which an entry's error is relative to the floor), and
/// how many of the worst entries to keep.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Limits {
    pub tol: f64,
    pub entry_floor: f64,
    pub keep_worst: usize,
    /// The rounding floor of a difference scheme's tangent ([`rounding_floor`]), 0 for none:
    /// a numerical tangent whose norm lies below it is zero to rounding, and every measure is
    /// then taken against this floor instead of the tangent's own size.
    pub abs_floor: f64,
}

impl Limits {
    pub fn new(tol: f64, entry_floor: f64, keep_worst: usize) -> Limits {
        Limits { tol, entry_floor, keep_worst, abs_floor: 0.0 }
    }

    /// These limits with the rounding floor `abs_floor`.
    pub fn with_abs_floor(self, abs_floor: f64) -> Limits {
        Limits { abs_floor, ..self }
    }

    /// Whether a numerical tangent of (Frobenius, Mandel) norm `norm` is zero to rounding.
    fn below_floor(&self, norm: f64) -> bool {
        self.abs_floor > 0.0 && self.abs_floor.is_finite() && norm.is_finite() && norm < self.abs_floor
    }

    /// What the errors of a numerical tangent of norm `norm` are relative to: the rounding floor
    /// when it is zero to rounding (and whether it is), else its norm (1 when that is zero).
    fn scale(&self, norm: f64) -> (f64, bool) {
        if self.below_floor(norm) {
            (self.abs_floor, true)
        } else if norm > 0.0 {
            (norm, false)
        } else {
            (1.0, false)
        }
    }
}

/// The rounding floor of a difference tangent at absolute step `h` (`rel_step` of the strain
/// scale) and tolerance `tol`: a difference quotient carries rounding of about ε·S/h, where S is
/// the size of the stresses it subtracts (`stress_size`: ‖σ‖ + ‖C‖·strain scale, the trial
/// stress a return starts from), and an entry that small is measured within `tol` only against
/// S·ε/(h·tol). Why 16 ε: the two to four stresses of a stencil, each a few roundings off, with
/// room for the cancellation of a return mapping (common practice).
///
/// The complex step subtracts no stresses, but the routine's own arithmetic cancels in the
/// derivative part where the stress does not move (a perfectly plastic return to a cone's apex
/// computes k/A as p − K B (A p − k)/(A K B): the derivative parts of sizes ‖C‖ cancel to a few
/// ε·‖C‖): its floor is ε·S/(strain scale) in the same form, S/(strain scale) standing for
/// ‖C‖ (a correct apex return failed `zero-tangent` against a complex-step derivative of
/// −2.4e-12 beside a stiffness of 2.4e4; a user-style sweep).
pub fn rounding_floor(
    scheme: crate::schemes::Scheme,
    stress_size: f64,
    h: f64,
    rel_step: f64,
    tol: f64,
) -> f64 {
    if !(h > 0.0 && tol > 0.0) {
        return 0.0;
    }
    let f = if scheme == crate::schemes::Scheme::ComplexStep {
        16.0 * f64::EPSILON * stress_size * rel_step / (h * tol)
    } else {
        16.0 * f64::EPSILON * stress_size / (h * tol)
    };
    if f.is_finite() {
        f
    } else {
        0.0
    }
}

/// One entry of a comparison, with values in the routine's own convention.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct EntryDiff {
    /// 0-based row (stress component) and column (strain component), routine order.
    pub row: usize,
    pub col: usize,
    /// "row/col" component labels, e.g. "11/23".
    #[schemars(with = "String")]
    pub label: Label,
    pub returned: f64,
    pub numerical: f64,
    pub error: f64,
}

/// Result of comparing two tangents.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Comparison {
    pub norm_error: f64,
    pub worst_entry_error: f64,
    /// The largest relative error along a soft direction (see the module doc); 0 when not
    /// measured (∂σ/∂T).
    #[serde(default)]
    pub soft_error: f64,
    /// That direction, in words (e.g. "the increment direction", "the softest direction").
    #[serde(default)]
    pub soft_direction: Cow<'static, str>,
    #[schemars(with = "Vec<f64>")]
    pub column_errors: ColumnErrors,
    /// The worst entries, worst first.
    /// Every entry's error (the entry measure above), column-major in the routine's order,
    /// kept only when the comparison fails (for the heatmap of the HTML report); empty when
    /// it passes, so a passing comparison allocates nothing.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub entry_errors: Vec<f64>,
    #[schemars(with = "Vec<EntryDiff>")]
    pub worst: WorstEntries,
    /// The returned tangent has entries that are not finite.
    pub non_finite_returned: usize,
    pub tol: f64,
    pub pass: bool,
}

/// Compare tangents given column-major in the routine's convention.
pub fn compare(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    tol: f64,
    entry_floor: f64,
    keep_worst: usize,
) -> Comparison {
    compare_along(conv, returned, numerical, Limits::new(tol, entry_floor, keep_worst), None)
}

/// [`compare`], also measuring along `direction` (a strain increment in the routine's
/// convention, e.g. the increment being checked) beside the softest eigen-directions of
/// `numerical`.
pub fn compare_along(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    limits: Limits,
    direction: Option<&[f64]>,
) -> Comparison {
    compare_with(conv, returned, numerical, limits, &SoftDirections::of(conv, numerical, direction))
}

/// [`compare`], measuring the soft-direction error along `soft` (found once per increment from
/// its sharpest numerical tangent, so every scheme is measured along the same directions).
pub fn compare_with(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    limits: Limits,
    soft: &SoftDirections,
) -> Comparison {
    let nn = returned.len();
    assert!(nn <= 36 && numerical.len() == nn, "a tangent has at most 6 × 6 entries");
    let (mut rb, mut mb) = ([0.0; 36], [0.0; 36]);
    let (r, m) = (&mut rb[..nn], &mut mb[..nn]);
    r.copy_from_slice(returned);
    m.copy_from_slice(numerical);
    conv.tangent_to_mandel(r);
    conv.tangent_to_mandel(m);
    let order = conv.order();
    let label = |i: usize, j: usize| Label::pair(order[i].label(), order[j].label());
    let mut c = measure(r, m, returned, numerical, conv.ncomp(), &label, limits);
    let (e, what) = soft::soft_error_along(r, m, conv.ncomp(), soft, limits);
    c.soft_error = e;
    c.soft_direction = Cow::Borrowed(what);
    c.pass &= e <= limits.tol;
    if c.pass {
        c.entry_errors = Vec::new();
    }
    c
}

/// The three measures on Mandel-form matrices `r` (returned) and `m` (numerical) with
/// `ncols` columns; `returned` and `numerical` are the same in the routine's form, for display.
pub(super) fn measure(
    r: &[f64],
    m: &[f64],
    returned: &[f64],
    numerical: &[f64],
    ncols: usize,
    label: &dyn Fn(usize, usize) -> Label,
    limits: Limits,
) -> Comparison {
    let Limits { tol, entry_floor, keep_worst, .. } = limits;
    let nrows = r.len() / ncols;
    assert!(ncols <= 6, "a tangent has at most 6 columns");
    let Sums { columns, scale, norm_error, absolute } = sums(r, m, nrows, ncols, &limits);
    let floor = if absolute { scale } else { entry_floor * scale };
    let column_errors: ColumnErrors =
        columns[..ncols].iter().map(|(d, c)| finite_or_inf(d.sqrt() / c.sqrt().max(floor))).collect();
    // Every entry's error into a stack array (one tight pass), then the worst few picked by
    // index: an entry (and its label) is made only when it is kept.
    let nn = nrows * ncols;
    let (r, m) = (&r[..nn], &m[..nn]);
    let mut errors = [0.0f64; 36];
    for ((e, a), b) in errors.iter_mut().zip(r).zip(m) {
        *e = entry_error(*a, *b, floor);
    }
    let mut worst = Worst::new(keep_worst);
    for (k, &e) in errors[..nn].iter().enumerate() {
        worst.offer(e, k);
    }
    let non_finite = returned[..nn].iter().filter(|x| !x.is_finite()).count();
    let worst_entry_error = worst.max;
    let pass = non_finite == 0 && norm_error <= tol && worst_entry_error <= tol;
    let kept = worst.entries(|k| {
        let (i, j) = (k % nrows, k / nrows);
        EntryDiff {
            row: i,
            col: j,
            label: label(i, j),
            returned: returned[k],
            numerical: numerical[k],
            error: 0.0,
        }
    });
    Comparison {
        norm_error,
        worst_entry_error,
        soft_error: 0.0,
        soft_direction: Cow::Borrowed(""),
        column_errors,
        worst: kept,
        // Only a failing comparison keeps every entry's error.
        entry_errors: if pass { Vec::new() } else { errors[..nn].to_vec() },
        non_finite_returned: non_finite,
        tol,
        pass,
    }
}

/// The sums of squares of one comparison: per column (difference, numerical), the scale of
/// the entry floor (the numerical norm, 1 when it is zero, the rounding floor when the norm
/// lies below it) and the norm error. One pass for the whole and the columns (the same sums,
/// in the same order, as summing each on its own).
struct Sums {
    columns: [(f64, f64); 6],
    scale: f64,
    norm_error: f64,
    /// The numerical tangent is zero to rounding: every measure against the rounding floor.
    absolute: bool,
}

#[inline(always)]
fn sums(r: &[f64], m: &[f64], nrows: usize, ncols: usize, limits: &Limits) -> Sums {
    let (mut norm2, mut diff2) = (0.0, 0.0);
    let mut columns = [(0.0f64, 0.0f64); 6];
    for (j, (d, c)) in columns.iter_mut().enumerate().take(ncols) {
        for i in 0..nrows {
            let k = i + j * nrows;
            let (dd, mm) = ((r[k] - m[k]) * (r[k] - m[k]), m[k] * m[k]);
            *d += dd;
            *c += mm;
            diff2 += dd;
            norm2 += mm;
        }
    }
    let (norm, diff_norm) = (f64::sqrt(norm2), f64::sqrt(diff2));
    let (scale, absolute) = limits.scale(norm);
    Sums { columns, scale, norm_error: finite_or_inf(diff_norm / scale), absolute }
}

/// The entry measure of one entry: returned `a`, numerical `b`, floor `floor`.
#[inline(always)]
fn entry_error(a: f64, b: f64, floor: f64) -> f64 {
    finite_or_inf((a - b).abs() / b.abs().max(floor))
}

/// The numbers a passing tangent comparison leaves in a check's record and summaries.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PassedScheme {
    pub norm_error: f64,
    pub worst_entry_error: f64,
    /// [`Comparison::error`]: the largest of the norm, worst-entry and soft-direction errors.
    pub error: f64,
}

/// A comparison reduced to what a passing one leaves: `r` is the returned tangent already in
/// Mandel form (the same for every scheme of an increment, converted once), `numerical`
/// column-major in the routine's convention, and every entry of the returned tangent is a
/// finite number. `None` when the comparison fails: then [`compare_with`] makes the full one.
/// The same measures as [`compare_with`], computed in the same order, so the numbers are the
/// very ones it reports; nothing is allocated or labelled.
pub fn passing(
    conv: &Convention,
    r: &[f64],
    numerical: &[f64],
    limits: Limits,
    soft: &SoftDirections,
) -> Option<PassedScheme> {
    let nn = r.len();
    assert!(nn <= 36 && numerical.len() == nn, "a tangent has at most 6 × 6 entries");
    let mut mb = [0.0; 36];
    let m = &mut mb[..nn];
    conv.tangent_to_mandel_into(numerical, m);
    // The whole's sums of squares in the order of `sums` (column by column, entry by entry),
    // so the norm error has the same bits; the columns' own sums are not needed here.
    let (mut norm2, mut diff2) = (0.0, 0.0);
    for (a, b) in r.iter().zip(m.iter()) {
        diff2 += (a - b) * (a - b);
        norm2 += b * b;
    }
    let (norm, diff_norm) = (f64::sqrt(norm2), f64::sqrt(diff2));
    let (scale, absolute) = limits.scale(norm);
    let norm_error = finite_or_inf(diff_norm / scale);
    let floor = if absolute { scale } else { limits.entry_floor * scale };
    let mut worst_entry_error = 0.0f64;
    for (a, b) in r.iter().zip(m.iter()) {
        let e = entry_error(*a, *b, floor);
        if e > worst_entry_error {
            worst_entry_error = e;
        }
    }
    if !(norm_error <= limits.tol && worst_entry_error <= limits.tol) {
        return None;
    }
    let (soft_error, _) = soft::soft_error_along(r, m, conv.ncomp(), soft, limits);
    (soft_error <= limits.tol).then(|| PassedScheme {
        norm_error,
        worst_entry_error,
        error: norm_error.max(worst_entry_error).max(soft_error),
    })
}

/// The worst entries seen so far, worst first, at most `keep` of them, by index: an entry is
/// inserted after those with an equal or larger error (the order a stable sort by decreasing
/// error gives), and made (with its label) only at the end, for the ones kept. A fixed array
/// on the stack: a comparison has at most 36 entries.
pub(super) struct Worst {
    keep: usize,
    len: usize,
    /// (error, index) of the kept entries, worst first (the first `len`).
    kept: [(f64, usize); 36],
    /// The largest error offered (0 when none).
    pub(super) max: f64,
}

impl Worst {
    pub(super) fn new(keep: usize) -> Worst {
        Worst { keep: keep.min(36), len: 0, kept: [(0.0, 0); 36], max: 0.0 }
    }

    /// Offer entry `index` with `error` (≥ 0 or +∞, never NaN: see `finite_or_inf`, so the
    /// plain comparisons below order errors as a total order would).
    #[inline(always)]
    pub(super) fn offer(&mut self, error: f64, index: usize) {
        if error > self.max {
            self.max = error;
        }
        // Most entries are not among the worst: when the list is full (or keeps nothing) and
        // its last entry is at least as bad, there is no place for this one.
        if self.len == self.keep && (self.keep == 0 || error <= self.kept[self.keep - 1].0) {
            return;
        }
        // Insert after the kept entries with an equal or larger error, dropping the last
        // when full.
        let mut at = if self.len < self.keep {
            self.len += 1;
            self.len - 1
        } else {
            self.keep - 1
        };
        while at > 0 && self.kept[at - 1].0 < error {
            self.kept[at] = self.kept[at - 1];
            at -= 1;
        }
        self.kept[at] = (error, index);
    }

    /// The kept entries, worst first, each made by `make` from its index.
    pub(super) fn entries(&self, make: impl Fn(usize) -> EntryDiff) -> WorstEntries {
        self.kept[..self.len]
            .iter()
            .map(|&(error, k)| {
                let mut e = make(k);
                e.error = error;
                e
            })
            .collect()
    }
}

impl Comparison {
    /// The largest of the norm, worst-entry and soft-direction errors.
    pub fn error(&self) -> f64 {
        self.norm_error.max(self.worst_entry_error).max(self.soft_error)
    }
}

pub(super) fn finite_or_inf(x: f64) -> f64 {
    if x.is_finite() {
        x
    } else {
        f64::INFINITY
    }
}

#[cfg(test)]
mod tests;
