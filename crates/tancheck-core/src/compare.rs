//! Comparison of a returned tangent with a numerical one, in Mandel form.
//!
//! Three measures, so that one wrong small entry does not hide under large diagonal ones:
//! - norm error: ‖C_ret − C_num‖_F / ‖C_num‖_F;
//! - column error: ‖ΔC_:j‖ / max(‖C_num,:j‖, floor·‖C_num‖_F);
//! - entry error: |ΔC_ij| / max(|C_num,ij|, floor·‖C_num‖_F).

use serde::{Deserialize, Serialize};

use crate::convention::Convention;

/// One entry of a comparison, with values in the routine's own convention.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct EntryDiff {
    /// 0-based row (stress component) and column (strain component), routine order.
    pub row: usize,
    pub col: usize,
    /// "row/col" component labels, e.g. "11/23".
    pub label: String,
    pub returned: f64,
    pub numerical: f64,
    pub error: f64,
}

/// Result of comparing two tangents.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Comparison {
    pub norm_error: f64,
    pub worst_entry_error: f64,
    pub column_errors: Vec<f64>,
    /// The worst entries, worst first.
    pub worst: Vec<EntryDiff>,
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
    let mut r = returned.to_vec();
    let mut m = numerical.to_vec();
    conv.tangent_to_mandel(&mut r);
    conv.tangent_to_mandel(&mut m);
    let label = |i: usize, j: usize| conv.entry_label(i, j);
    measure(&r, &m, returned, numerical, conv.ncomp(), &label, tol, entry_floor, keep_worst)
}

/// Compare ∂σ/∂T vectors given in the routine's convention.
pub fn compare_dtemp(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    tol: f64,
    entry_floor: f64,
    keep_worst: usize,
) -> Comparison {
    let n = conv.ncomp();
    let mut r = vec![0.0; n];
    let mut m = vec![0.0; n];
    conv.stress_to_mandel(returned, &mut r);
    conv.stress_to_mandel(numerical, &mut m);
    let label = |i: usize, _j: usize| format!("{}/T", conv.order()[i].label());
    measure(&r, &m, returned, numerical, 1, &label, tol, entry_floor, keep_worst)
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
    label: &dyn Fn(usize, usize) -> String,
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
    let mut column_errors = Vec::with_capacity(ncols);
    for j in 0..ncols {
        let (mut d, mut c) = (0.0, 0.0);
        for i in 0..nrows {
            let k = i + j * nrows;
            d += (r[k] - m[k]) * (r[k] - m[k]);
            c += m[k] * m[k];
        }
        column_errors.push(finite_or_inf(d.sqrt() / c.sqrt().max(floor)));
    }
    let mut entries: Vec<EntryDiff> = Vec::with_capacity(r.len());
    let mut non_finite = 0;
    for j in 0..ncols {
        for i in 0..nrows {
            let k = i + j * nrows;
            if !returned[k].is_finite() {
                non_finite += 1;
            }
            entries.push(EntryDiff {
                row: i,
                col: j,
                label: label(i, j),
                returned: returned[k],
                numerical: numerical[k],
                error: finite_or_inf((r[k] - m[k]).abs() / m[k].abs().max(floor)),
            });
        }
    }
    entries.sort_by(|a, b| b.error.total_cmp(&a.error));
    let worst_entry_error = entries.first().map_or(0.0, |e| e.error);
    entries.truncate(keep_worst);
    let pass = non_finite == 0 && norm_error <= tol && worst_entry_error <= tol;
    Comparison {
        norm_error,
        worst_entry_error,
        column_errors,
        worst: entries,
        non_finite_returned: non_finite,
        tol,
        pass,
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
}
