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
//! ∂σ/∂T vectors are compared against an absolute floor as well ([`compare_dtemp`]).
//!
//! A comparison runs twice per increment of every check, so it allocates nothing at the
//! default settings: the Mandel copies live on the stack, the worst entries are kept by
//! insertion in an inline list (a larger `worst_entries` than [`INLINE_WORST`] spills to the
//! heap), and an entry's label is a few inline bytes, turned into text only when printed.

use std::borrow::Cow;
use std::fmt;

use serde::{Deserialize, Serialize};
use smallvec::SmallVec;

use crate::convention::Convention;

/// Entries kept inline by a comparison (the default `worst_entries`).
pub const INLINE_WORST: usize = 4;

/// Column errors of a comparison (one per strain component, at most 6, inline).
pub type ColumnErrors = SmallVec<[f64; 6]>;
/// The worst entries of a comparison, worst first.
pub type WorstEntries = SmallVec<[EntryDiff; INLINE_WORST]>;

/// An entry's "row/col" label, e.g. "11/23" or "s1/T": at most [`Label::CAP`] bytes, inline
/// (no allocation); text only when displayed or serialised.
#[derive(Clone, Copy, PartialEq, Eq)]
pub struct Label {
    len: u8,
    bytes: [u8; Label::CAP],
}

impl Label {
    pub const CAP: usize = 14;

    /// `row` + "/" + `col`, cut at [`Label::CAP`] bytes (component labels are 1–2 bytes).
    pub fn pair(row: &str, col: &str) -> Label {
        let mut l = Label { len: 0, bytes: [0; Label::CAP] };
        for part in [row, "/", col] {
            for &b in part.as_bytes() {
                if (l.len as usize) < Label::CAP {
                    l.bytes[l.len as usize] = b;
                    l.len += 1;
                }
            }
        }
        // Never cut inside a character.
        while std::str::from_utf8(&l.bytes[..l.len as usize]).is_err() {
            l.len -= 1;
        }
        l
    }

    pub fn as_str(&self) -> &str {
        std::str::from_utf8(&self.bytes[..self.len as usize]).unwrap_or("")
    }
}

impl std::ops::Deref for Label {
    type Target = str;
    fn deref(&self) -> &str {
        self.as_str()
    }
}

impl fmt::Display for Label {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.pad(self.as_str())
    }
}

impl fmt::Debug for Label {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt::Debug::fmt(self.as_str(), f)
    }
}

impl PartialEq<&str> for Label {
    fn eq(&self, other: &&str) -> bool {
        self.as_str() == *other
    }
}

impl PartialEq<str> for Label {
    fn eq(&self, other: &str) -> bool {
        self.as_str() == other
    }
}

impl PartialEq<String> for Label {
    fn eq(&self, other: &String) -> bool {
        self.as_str() == other
    }
}

impl From<Label> for String {
    fn from(l: Label) -> String {
        l.as_str().to_string()
    }
}

impl Serialize for Label {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.as_str())
    }
}

impl<'de> Deserialize<'de> for Label {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Label, D::Error> {
        let s = Cow::<str>::deserialize(d)?;
        let (row, col) = s.split_once('/').unwrap_or((&s, ""));
        let l = Label::pair(row, col);
        if l.as_str() != s {
            return Err(serde::de::Error::custom(format!(
                "entry label `{s}` longer than {} bytes",
                Label::CAP
            )));
        }
        Ok(l)
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

/// Soft directions count down to this fraction of the numerical tangent's norm (a
/// perfectly plastic direction has no response at all; below this, difference noise rules).
pub const SOFT_FLOOR: f64 = 1e-3;

/// How many of the softest eigen-directions are measured.
const SOFT_EIGEN: usize = 2;

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
    let eig = s.symmetric_eigen();
    let mut idx = [0usize, 1, 2, 3, 4, 5];
    idx.sort_by(|&a, &b| eig.eigenvalues[a].abs().total_cmp(&eig.eigenvalues[b].abs()));
    for (k, &i) in idx.iter().take(SOFT_EIGEN.min(n)).enumerate() {
        let v: SVector<f64, 6> = eig.eigenvectors.column(i).into_owned();
        let e = along(&v);
        if e.is_finite() && e > worst.0 {
            worst = (e, if k == 0 { "the softest direction" } else { "the second softest direction" });
        }
    }
    worst
}

/// Compare ∂σ/∂T vectors given in the routine's convention. Errors are relative to
/// max(‖∂σ/∂T_num‖, `abs_floor`) where `abs_floor` is a stress scale per temperature scale
/// (see [`dtemp_floor`]): a returned zero against a numerical derivative that is rounding noise
/// is not a 100 % error.
pub fn compare_dtemp_floor(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    tol: f64,
    entry_floor: f64,
    keep_worst: usize,
    abs_floor: f64,
) -> Comparison {
    let n = conv.ncomp();
    let (mut rb, mut mb) = ([0.0; 6], [0.0; 6]);
    let (r, m) = (&mut rb[..n], &mut mb[..n]);
    conv.stress_to_mandel(returned, r);
    conv.stress_to_mandel(numerical, m);
    let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt();
    if norm >= abs_floor || !abs_floor.is_finite() || abs_floor <= 0.0 {
        return compare_dtemp(conv, returned, numerical, tol, entry_floor, keep_worst);
    }
    // Below the floor: measure against the floor, entry by entry.
    let diff = r.iter().zip(m.iter()).map(|(a, b)| (a - b) * (a - b)).sum::<f64>().sqrt();
    let mut worst = Worst::new(keep_worst);
    for i in 0..n {
        worst.offer(finite_or_inf((r[i] - m[i]).abs() / abs_floor), || EntryDiff {
            row: i,
            col: 0,
            label: Label::pair(conv.order()[i].label(), "T"),
            returned: returned[i],
            numerical: numerical[i],
            error: 0.0,
        });
    }
    let worst_entry_error = worst.max;
    let entries = worst.kept;
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
pub fn compare_dtemp(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    tol: f64,
    entry_floor: f64,
    keep_worst: usize,
) -> Comparison {
    let n = conv.ncomp();
    let (mut rb, mut mb) = ([0.0; 6], [0.0; 6]);
    let (r, m) = (&mut rb[..n], &mut mb[..n]);
    conv.stress_to_mandel(returned, r);
    conv.stress_to_mandel(numerical, m);
    let order = conv.order();
    let label = |i: usize, _j: usize| Label::pair(order[i].label(), "T");
    measure(r, m, returned, numerical, 1, &label, tol, entry_floor, keep_worst)
}

/// The three measures on Mandel-form matrices `r` (returned) and `m` (numerical) with
/// `ncols` columns; `returned` and `numerical` are the same in the routine's form, for display.
#[allow(clippy::too_many_arguments)]
fn measure(
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
    let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt();
    let diff_norm = r.iter().zip(m).map(|(a, b)| (a - b) * (a - b)).sum::<f64>().sqrt();
    let scale = if norm > 0.0 { norm } else { 1.0 };
    let norm_error = finite_or_inf(diff_norm / scale);
    let floor = entry_floor * scale;
    let mut column_errors = ColumnErrors::new();
    for j in 0..ncols {
        let (mut d, mut c) = (0.0, 0.0);
        for i in 0..nrows {
            let k = i + j * nrows;
            d += (r[k] - m[k]) * (r[k] - m[k]);
            c += m[k] * m[k];
        }
        column_errors.push(finite_or_inf(d.sqrt() / c.sqrt().max(floor)));
    }
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
struct Worst {
    keep: usize,
    kept: WorstEntries,
    /// The largest error offered (0 when none).
    max: f64,
}

impl Worst {
    fn new(keep: usize) -> Worst {
        Worst { keep, kept: WorstEntries::new(), max: 0.0 }
    }

    fn offer(&mut self, error: f64, make: impl FnOnce() -> EntryDiff) {
        // Errors are ≥ 0 or +∞ (never NaN: see `finite_or_inf`).
        self.max = self.max.max(error);
        if self.keep == 0 {
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

fn finite_or_inf(x: f64) -> f64 {
    if x.is_finite() {
        x
    } else {
        f64::INFINITY
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::convention::{PointKind, ShearMeasure};

    fn iso(lambda: f64, mu: f64, conv: &Convention) -> Vec<f64> {
        // Isotropic elasticity in the routine's form: with engineering shear the shear
        // diagonal is μ, with tensor shear 2μ (σ12 = 2μ ε12).
        let n = conv.ncomp();
        let mut t = vec![0.0; n * n];
        for (i, ci) in conv.order().iter().enumerate() {
            for (j, cj) in conv.order().iter().enumerate() {
                let v = match (ci.is_shear(), cj.is_shear()) {
                    (false, false) => lambda + if i == j { 2.0 * mu } else { 0.0 },
                    (true, true) if i == j => match conv.shear() {
                        ShearMeasure::Engineering => mu,
                        ShearMeasure::Tensor => 2.0 * mu,
                    },
                    _ => 0.0,
                };
                t[i + j * n] = v;
            }
        }
        t
    }

    #[test]
    fn one_small_wrong_entry_is_seen_under_large_diagonal_entries() {
        let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
        let good = iso(115384.6, 76923.1, &conv);
        let mut bad = good.clone();
        // A zero coupling entry (11 row, 12 column) set to 1e-5 of the matrix norm.
        let norm: f64 = {
            let mut m = good.clone();
            conv.tangent_to_mandel(&mut m);
            m.iter().map(|x| x * x).sum::<f64>().sqrt()
        };
        bad[5 * 6] = 1e-5 * norm;
        let c = compare(&conv, &bad, &good, 1e-6, 1e-2, 3);
        assert!(!c.pass);
        assert!(c.norm_error < 2e-5, "the norm alone barely sees it: {}", c.norm_error);
        assert!(c.worst_entry_error > 1e-4);
        assert_eq!(c.worst[0].label, "11/12");
        assert!(compare(&conv, &good, &good, 1e-12, 1e-2, 3).pass);
        // Every entry's error is kept for a failing comparison (the HTML heatmap), column-major
        // in routine order: the wrong one is row 0 (11), column 5 (12), and only it is off.
        assert_eq!(c.entry_errors.len(), 36);
        assert_eq!(c.entry_errors[5 * 6], c.worst_entry_error);
        assert!(
            c.entry_errors.iter().enumerate().all(|(k, &e)| k == 5 * 6 || e == 0.0),
            "{:?}",
            c.entry_errors
        );
        // ... and dropped when it passes.
        assert!(compare(&conv, &good, &good, 1e-12, 1e-2, 3).entry_errors.is_empty());
    }

    #[test]
    fn the_verdict_does_not_depend_on_the_convention() {
        // The same wrong map written in two conventions gives the same errors.
        let a = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
        let b = Convention::from_labels(
            PointKind::Solid3d,
            &["11", "22", "33", "12", "13", "23"],
            ShearMeasure::Tensor,
        )
        .unwrap();
        let ga = iso(100.0, 50.0, &a);
        let gb = iso(100.0, 50.0, &b);
        let mut ba = ga.clone();
        let mut bb = gb.clone();
        // Scale the 23-23 shear entry by 2 in both (the tensor-vs-engineering confusion).
        let pa = a.position(crate::convention::Component::C23).unwrap();
        let pb = b.position(crate::convention::Component::C23).unwrap();
        ba[pa + pa * 6] *= 2.0;
        bb[pb + pb * 6] *= 2.0;
        let ca = compare(&a, &ba, &ga, 1e-6, 1e-2, 1);
        let cb = compare(&b, &bb, &gb, 1e-6, 1e-2, 1);
        assert!((ca.norm_error - cb.norm_error).abs() < 1e-14);
        assert!((ca.worst_entry_error - 1.0).abs() < 1e-12);
        assert_eq!(ca.worst[0].label, "23/23");
        assert_eq!(cb.worst[0].label, "23/23");
    }

    #[test]
    fn non_finite_entries_fail() {
        let conv = Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering);
        let c = compare(&conv, &[f64::NAN], &[200.0], 1e-6, 1e-2, 1);
        assert!(!c.pass);
        assert_eq!(c.non_finite_returned, 1);
        assert!(c.worst_entry_error.is_infinite());
    }

    // A returned zero ∂σ/∂T against rounding noise of a difference in the temperature is not a
    // 100 % error: the floor is a stress scale per temperature scale. A genuine derivative of
    // a thermo-elastic law (−C:1 α = −3κα ≈ −6.3 MPa/K for steel, K = E/(3(1 − 2ν)), E = 210 GPa, ν = 0.3,
    // α = 12e-6/K: EN 1993-1-1 §3.2.6, memory) returned as zero still fails.
    #[test]
    fn dtemp_zero_against_noise_passes_and_against_a_real_derivative_fails() {
        let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
        let stress = [300.0, 100.0, 100.0, 0.0, 0.0, 50.0];
        let tangent = iso(121153.8, 80769.2, &conv);
        let floor = dtemp_floor(&stress, &tangent, 2e-3, 20.0);
        assert!(floor > 0.0);
        let zero = [0.0; 6];
        let noise = [3e-9, -2e-9, 1e-9, 0.0, 4e-10, 0.0];
        let c = compare_dtemp_floor(&conv, &zero, &noise, 1e-6, 1e-2, 1, floor);
        assert!(c.pass, "{c:?}");
        assert!(!compare_dtemp(&conv, &zero, &noise, 1e-6, 1e-2, 1).pass, "without the floor: 100 %");
        let k = 210000.0 / (3.0 * (1.0 - 2.0 * 0.3));
        let real: [f64; 6] = [-3.0 * k * 12e-6, -3.0 * k * 12e-6, -3.0 * k * 12e-6, 0.0, 0.0, 0.0];
        assert!((real[0] + 6.3).abs() < 0.01, "{}", real[0]);
        assert!(!compare_dtemp_floor(&conv, &zero, &real, 1e-6, 1e-2, 1, floor).pass);
    }

    // The soft-direction error: the J2 worked case of REFERENCES.md (θ = 0.5446266,
    // θ̄ = 0.5381686) with the plastic correction 2μθ̄ n⊗n off by 1 %: the norm sees it against
    // the elastic scale, the softest direction n against its own modulus 2μ(θ − θ̄) (or the
    // soft floor).
    #[test]
    fn an_error_in_the_soft_direction_is_measured_against_the_soft_modulus() {
        let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
        let (e, nu) = (200000.0, 0.3);
        let mu = e / (2.0 * (1.0 + nu));
        let kappa = e / (3.0 * (1.0 - 2.0 * nu));
        let (theta, theta_bar) = (0.5446266, 0.5381686);
        let nv = [2.0 / 6f64.sqrt(), -1.0 / 6f64.sqrt(), -1.0 / 6f64.sqrt(), 0.0, 0.0, 0.0];
        let make = |tb: f64| {
            let mut c = vec![0.0; 36];
            for j in 0..6 {
                for i in 0..6 {
                    let one = if i < 3 && j < 3 { 1.0 } else { 0.0 };
                    let id = if i == j {
                        if i < 3 {
                            1.0
                        } else {
                            0.5
                        }
                    } else {
                        0.0
                    };
                    c[i + 6 * j] =
                        kappa * one + 2.0 * mu * theta * (id - one / 3.0) - 2.0 * mu * tb * nv[i] * nv[j];
                }
            }
            c
        };
        let good = make(theta_bar);
        let bad = make(theta_bar * 1.01);
        let c = compare_along(&conv, &bad, &good, 1e-4, 1e-2, 1, Some(&[1e-3, 0.0, 0.0, 0.0, 0.0, 0.0]));
        let soft_modulus = 2.0 * mu * (theta - theta_bar);
        let want = 0.01 * 2.0 * mu * theta_bar / soft_modulus.max(SOFT_FLOOR * 4.0e5);
        assert!(c.soft_error > 10.0 * c.norm_error, "{c:?}");
        assert!(c.soft_error > 0.5 * want && c.soft_error < 2.0 * want, "{} vs {want}", c.soft_error);
        assert!(!c.pass);
        assert_eq!(compare_along(&conv, &good, &good, 1e-12, 1e-2, 1, None).soft_error, 0.0);
    }
}
