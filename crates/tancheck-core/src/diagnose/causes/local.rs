//! Trials of an error confined to part of the matrix or of the increment: one entry, one row
//! or column, and a discrepancy that shrinks with the increment (a continuum tangent).

use super::kind::{Cause, Evidence, Found, Refinement};

/// Single entry, one row and one column, continuum tangent (in this order).
pub(super) fn try_local(ev: &Evidence<'_>, found: &mut Found) {
    let n = ev.conv.ncomp();
    let r = ev.returned;
    let at = |m: &[f64], i: usize, j: usize| m[i + j * n];

    // A single wrong entry: replace one entry by the derivative's.
    if n > 1 {
        let mut best = (f64::INFINITY, 0, 0);
        let mut c = r.to_vec();
        for j in 0..n {
            for i in 0..n {
                let keep = c[i + j * n];
                c[i + j * n] = at(ev.numerical, i, j);
                let e = ev.error(&c);
                c[i + j * n] = keep;
                if e < best.0 {
                    best = (e, i, j);
                }
            }
        }
        let (_, i, j) = best;
        let (rv, nv) = (at(r, i, j), at(ev.numerical, i, j));
        found.push(
            Cause::SingleEntry,
            format!(
                "entry {} (∂σ{}/∂ε{}): returned {rv:.6e}, derivative {nv:.6e}{}",
                ev.conv.entry_label(i, j),
                ev.conv.order()[i].label(),
                ev.conv.order()[j].label(),
                if nv != 0.0 { format!(", factor {:.4}", rv / nv) } else { String::new() }
            ),
            best.0,
        );
    }

    // One row or one column wrong.
    if n > 1 {
        let mut best_r = (f64::INFINITY, 0);
        let mut best_c = (f64::INFINITY, 0);
        for k in 0..n {
            let mut c = r.to_vec();
            for j in 0..n {
                c[k + j * n] = at(ev.numerical, k, j);
            }
            let e = ev.error(&c);
            if e < best_r.0 {
                best_r = (e, k);
            }
            let mut c = r.to_vec();
            c[k * n..(k + 1) * n].copy_from_slice(&ev.numerical[k * n..(k + 1) * n]);
            let e = ev.error(&c);
            if e < best_c.0 {
                best_c = (e, k);
            }
        }
        let lab = |k: usize| ev.conv.order()[k].label();
        found.push(
            Cause::OneRow,
            format!("row {} (the response of stress {})", lab(best_r.1), lab(best_r.1)),
            best_r.0,
        );
        // A plane-strain routine whose stress does not depend on ε33 at all (its numerical
        // column is exactly zero) and that returns that column of the 3-D law: the words say
        // what it means for a solver.
        let k = best_c.1;
        let ignores = ev.conv.kind() == crate::convention::PointKind::PlaneStrain
            && lab(k) == "33"
            && ev.numerical[k * n..(k + 1) * n].iter().all(|&x| x == 0.0);
        found.push(
            Cause::OneColumn,
            format!(
                "column {} (the strain direction {}){}",
                lab(k),
                lab(k),
                if ignores {
                    "; the routine's stress does not depend on ε33 at all: a plane-strain solver keeps ε33 = 0 \
                     and never uses this column, a generalized plane-strain one does (return zeros there, or \
                     let the stress depend on ε33)"
                } else {
                    ""
                }
            ),
            best_c.0,
        );
    }

    // Start temperature: the discrepancy falls in proportion to the temperature increment
    // alone (the strain increment kept): terms of the tangent taken at the start temperature
    // where the update uses the end one, mixed with others taken at the end (no exact trial
    // then). Named before the continuum tangent, whose refinement shrinks both increments.
    if let Some(rf) = ev.temp_refinement {
        let known = found.hs.iter().any(|h| h.cause == Cause::StartTemperature && h.explains);
        if let (false, Some((linear, left))) = (known, proportional(rf)) {
            let fr: Vec<String> =
                rf.fractions.iter().zip(&rf.errors).map(|(f, x)| format!("{f}: {x:.2e}")).collect();
            found.push(
                Cause::StartTemperature,
                format!(
                    "the discrepancy shrinks with the temperature increment alone, the strain increment kept ({}): terms of the tangent taken at the start temperature",
                    fr.join(", ")
                ),
                if linear { left.min(found.explain_level) } else { left.max(2.0 * found.explain_level) },
            );
        }
    }

    // Continuum tangent: the discrepancy falls in proportion to the increment.
    if let Some(rf) = ev.refinement {
        if let (true, Some((linear, left))) = (rf.same_branch, proportional(rf)) {
            let fr: Vec<String> =
                rf.fractions.iter().zip(&rf.errors).map(|(f, x)| format!("{f}: {x:.2e}")).collect();
            let part = if rf.past > 0.0 {
                format!(" (its part past {:.3} of it, where it enters the branch)", rf.past)
            } else {
                String::new()
            };
            let detail = format!("the discrepancy shrinks with the increment{part} ({})", fr.join(", "));
            // Explained by the linear decay, not by the size of what is left.
            found.push(
                Cause::ContinuumTangent,
                detail,
                if linear { left.min(found.explain_level) } else { left.max(2.0 * found.explain_level) },
            );
        }
    }
}

/// Whether the errors of a refinement fall in proportion to the fraction (each ratio of
/// successive errors over the ratio of fractions within 25 % of 1), and what is left of the
/// error extrapolated linearly to a vanishing fraction. None for fewer than three fractions.
pub(crate) fn proportional(rf: &Refinement) -> Option<(bool, f64)> {
    let e = &rf.errors;
    // Why 3: two ratios of successive errors are the fewest that show a trend, not a point.
    if e.len() < 3 {
        return None;
    }
    let ratio = |a: usize, b: usize| e[b] / e[a] / (rf.fractions[b] / rf.fractions[a]);
    // Why 0.25: an error in proportion to the increment keeps this ratio at 1 up to the
    // second-order term; 25% admits that term at the fractions used, never a constant.
    let linear = (0..e.len() - 1).all(|k| (ratio(k, k + 1) - 1.0).abs() < 0.25);
    let k = e.len() - 1;
    // Linear extrapolation of the discrepancy to a vanishing increment.
    let left = (e[k] - (e[k - 1] - e[k]) / (rf.fractions[k - 1] - rf.fractions[k]) * rf.fractions[k]).abs();
    Some((linear, left))
}
