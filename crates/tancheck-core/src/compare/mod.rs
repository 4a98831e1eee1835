//! Comparison of a returned tangent with a numerical one, in Mandel form.
//!
//! Three measures, so that one wrong small entry does not hide under large diagonal ones:
//! - norm error: ‖C_ret − C_num‖_F / ‖C_num‖_F;
//! - column error: ‖ΔC_:j‖ / max(‖C_num,:j‖, floor·‖C_num‖_F);
//! - entry error: |ΔC_ij| / max(|C_num,ij|, floor·‖C_num‖_F);
//! - soft-direction error: along the directions where the material is soft (the increment's
//!   own strain direction, and the eigenvectors of the numerical tangent's symmetric part with
//!   the smallest eigenvalues), ‖(C_ret − C_num) d‖ / max(‖C_num d‖, [`SOFT_FLOOR`]·‖C_num‖_F).
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

pub use dtemp::{compare_dtemp, compare_dtemp_floor, dtemp_floor};
pub use label::Label;

/// Entries kept inline by a comparison (the default `worst_entries`).
pub const INLINE_WORST: usize = 4;

/// Column errors of a comparison (one per strain component, at most 6, inline).
pub type ColumnErrors = SmallVec<[f64; 6]>;
/// The worst entries of a comparison, worst first.
pub type WorstEntries = SmallVec<[EntryDiff; INLINE_WORST]>;

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

/// Soft directions count down to this fraction of the numerical tangent's norm (a
/// perfectly plastic direction has no response at all; below this, difference noise rules).
pub const SOFT_FLOOR: f64 = 1e-3;

/// How many of the softest eigen-directions are measured.
const SOFT_EIGEN: usize = 2;

/// The eigenvectors of the symmetric 6 × 6 matrix `s` with the [`SOFT_EIGEN`] smallest
/// |eigenvalues|, softest first.
///
/// A check meets the same matrix again and again (the complex-step tangent of an elastic
/// increment is the same to the bit in every such increment), so the last few answers are
/// kept per thread, keyed by the bits of `s`: a repeated matrix costs a comparison of its
/// entries instead of an eigen-decomposition, and gets the very vectors the decomposition
/// gave (the result does not depend on the cache, nor on the thread).
fn softest_directions(s: &nalgebra::SMatrix<f64, 6, 6>) -> [nalgebra::SVector<f64, 6>; SOFT_EIGEN] {
    use std::cell::RefCell;
    type Entry = ([u64; 36], [nalgebra::SVector<f64, 6>; SOFT_EIGEN]);
    /// Matrices remembered per thread (a check alternates between a few schemes).
    const KEEP: usize = 4;
    thread_local! {
        static SEEN: RefCell<(usize, [Option<Entry>; KEEP])> = const { RefCell::new((0, [None; KEEP])) };
    }
    let mut key = [0u64; 36];
    for (k, x) in key.iter_mut().zip(s.iter()) {
        *k = x.to_bits();
    }
    let hit = SEEN.with(|c| c.borrow().1.iter().flatten().find(|(k, _)| *k == key).map(|(_, v)| *v));
    if let Some(v) = hit {
        return v;
    }
    let eig = s.symmetric_eigen();
    let mut idx = [0usize, 1, 2, 3, 4, 5];
    idx.sort_by(|&a, &b| eig.eigenvalues[a].abs().total_cmp(&eig.eigenvalues[b].abs()));
    let v: [nalgebra::SVector<f64, 6>; SOFT_EIGEN] =
        std::array::from_fn(|k| eig.eigenvectors.column(idx[k]).into_owned());
    SEEN.with(|c| {
        let mut c = c.borrow_mut();
        let at = c.0;
        c.1[at] = Some((key, v));
        c.0 = (at + 1) % KEEP;
    });
    v
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
    compare_along(conv, returned, numerical, tol, entry_floor, keep_worst, None)
}

/// [`compare`], also measuring along `direction` (a strain increment in the routine's
/// convention, e.g. the increment being checked) beside the softest eigen-directions.
pub fn compare_along(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    tol: f64,
    entry_floor: f64,
    keep_worst: usize,
    direction: Option<&[f64]>,
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
    let mut c = measure(r, m, returned, numerical, conv.ncomp(), &label, tol, entry_floor, keep_worst);
    let mut dir = [0.0; 6];
    let d = direction.map(|d| {
        conv.strain_to_mandel(d, &mut dir[..conv.ncomp()]);
        &dir[..conv.ncomp()]
    });
    let (e, what) = soft_error(r, m, conv.ncomp(), d);
    c.soft_error = e;
    c.soft_direction = Cow::Borrowed(what);
    c.pass &= e <= tol;
    if c.pass {
        c.entry_errors = Vec::new();
    }
    c
}

/// The largest relative error along the soft directions of the Mandel-form matrices `r`
/// (returned) and `m` (numerical), n × n column-major, and which direction it was. Fixed-size
/// arithmetic (no allocation).
pub fn soft_error(r: &[f64], m: &[f64], n: usize, direction: Option<&[f64]>) -> (f64, &'static str) {
    use nalgebra::{SMatrix, SVector};
    if n == 0 || r.len() < n * n || m.len() < n * n {
        return (0.0, "");
    }
    let norm = m[..n * n].iter().map(|x| x * x).sum::<f64>().sqrt();
    if norm.is_nan() || norm <= 0.0 || !norm.is_finite() || r[..n * n].iter().any(|x| !x.is_finite()) {
        return (0.0, "");
    }
    let floor = SOFT_FLOOR * norm;
    let along = |d: &SVector<f64, 6>| {
        let (mut dr, mut dm) = (0.0, 0.0);
        for i in 0..n {
            let (mut a, mut b) = (0.0, 0.0);
            for j in 0..n {
                a += r[i + j * n] * d[j];
                b += m[i + j * n] * d[j];
            }
            dr += (a - b) * (a - b);
            dm += b * b;
        }
        dr.sqrt() / dm.sqrt().max(floor)
    };
    let mut worst = (0.0, "");
    if let Some(d) = direction {
        let mut v = SVector::<f64, 6>::zeros();
        for i in 0..n.min(d.len()) {
            v[i] = d[i];
        }
        let l = v.norm();
        if l > 0.0 && l.is_finite() {
            let e = along(&(v / l));
            if e > worst.0 {
                worst = (e, "the increment direction");
            }
        }
    }
    // The symmetric part, padded with a stiff diagonal so the padding is never the softest.
    let mut s = SMatrix::<f64, 6, 6>::zeros();
    for i in 0..6 {
        for j in 0..6 {
            s[(i, j)] = if i < n && j < n {
                0.5 * (m[i + j * n] + m[j + i * n])
            } else if i == j {
                10.0 * norm
            } else {
                0.0
            };
        }
    }
    let softest = softest_directions(&s);
    for (k, v) in softest.iter().take(SOFT_EIGEN.min(n)).enumerate() {
        let e = along(v);
        if e.is_finite() && e > worst.0 {
            worst = (e, if k == 0 { "the softest direction" } else { "the second softest direction" });
        }
    }
    worst
}

/// The three measures on Mandel-form matrices `r` (returned) and `m` (numerical) with
/// `ncols` columns; `returned` and `numerical` are the same in the routine's form, for display.
#[allow(clippy::too_many_arguments)]
pub(super) fn measure(
    r: &[f64],
    m: &[f64],
    returned: &[f64],
    numerical: &[f64],
    ncols: usize,
    label: &dyn Fn(usize, usize) -> Label,
    tol: f64,
    entry_floor: f64,
    keep_worst: usize,
) -> Comparison {
    let nrows = r.len() / ncols;
    assert!(ncols <= 6, "a tangent has at most 6 columns");
    // One pass for the whole and the columns' sums of squares (the same sums, in the same
    // order, as summing each on its own).
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
    let scale = if norm > 0.0 { norm } else { 1.0 };
    let norm_error = finite_or_inf(diff_norm / scale);
    let floor = entry_floor * scale;
    let column_errors: ColumnErrors =
        columns[..ncols].iter().map(|(d, c)| finite_or_inf(d.sqrt() / c.sqrt().max(floor))).collect();
    let mut worst = Worst::new(keep_worst);
    let mut non_finite = 0;
    for j in 0..ncols {
        for i in 0..nrows {
            let k = i + j * nrows;
            if !returned[k].is_finite() {
                non_finite += 1;
            }
            let error = finite_or_inf((r[k] - m[k]).abs() / m[k].abs().max(floor));
            worst.offer(error, || EntryDiff {
                row: i,
                col: j,
                label: label(i, j),
                returned: returned[k],
                numerical: numerical[k],
                error: 0.0,
            });
        }
    }
    let worst_entry_error = worst.max;
    let pass = non_finite == 0 && norm_error <= tol && worst_entry_error <= tol;
    Comparison {
        norm_error,
        worst_entry_error,
        soft_error: 0.0,
        soft_direction: Cow::Borrowed(""),
        column_errors,
        worst: worst.kept,
        // Only a failing comparison keeps every entry's error (a second pass over the entries).
        entry_errors: if pass {
            Vec::new()
        } else {
            let mut all = Vec::with_capacity(r.len());
            all.extend(r.iter().zip(m).map(|(a, b)| finite_or_inf((a - b).abs() / b.abs().max(floor))));
            all
        },
        non_finite_returned: non_finite,
        tol,
        pass,
    }
}

/// The worst entries seen so far, worst first, at most `keep` of them: an entry is inserted
/// after those with an equal or larger error (the order a stable sort by decreasing error
/// gives), and only made when it is kept.
pub(super) struct Worst {
    keep: usize,
    pub(super) kept: WorstEntries,
    /// The largest error offered (0 when none).
    pub(super) max: f64,
}

impl Worst {
    pub(super) fn new(keep: usize) -> Worst {
        Worst { keep, kept: WorstEntries::new(), max: 0.0 }
    }

    pub(super) fn offer(&mut self, error: f64, make: impl FnOnce() -> EntryDiff) {
        // Errors are ≥ 0 or +∞ (never NaN: see `finite_or_inf`).
        self.max = self.max.max(error);
        if self.keep == 0 {
            return;
        }
        // Most entries are not among the worst: when the list is full and its last entry is
        // at least as bad, the search below would find no place either.
        if self.kept.len() == self.keep && !self.kept[self.keep - 1].error.total_cmp(&error).is_lt() {
            return;
        }
        let at = self.kept.iter().position(|e| e.error.total_cmp(&error).is_lt()).unwrap_or(self.kept.len());
        if at >= self.keep {
            return;
        }
        if self.kept.len() == self.keep {
            self.kept.pop();
        }
        let mut e = make();
        e.error = error;
        self.kept.insert(at, e);
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
