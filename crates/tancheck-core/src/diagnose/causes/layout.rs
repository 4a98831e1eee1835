//! Trials of how the entries were written: shear entries scaled by 2 or ½ (of the whole
//! tangent, or of the vector of one term a⊗a such as a flow direction's) or in another order,
//! rows and columns swapped, the whole matrix scaled.

use super::kind::{Cause, Evidence, Found};

/// Shear factor, shear permutation, component order, transposed, uniform scale (in this order).
pub(super) fn try_layout(ev: &Evidence<'_>, found: &mut Found) {
    let n = ev.conv.ncomp();
    let r = ev.returned;
    let at = |m: &[f64], i: usize, j: usize| m[i + j * n];
    let shear: Vec<usize> = (0..n).filter(|&i| ev.conv.order()[i].is_shear()).collect();

    // Shear factor: shear rows, columns or both scaled by 2 or ½.
    if !shear.is_empty() {
        let mut best = (f64::INFINITY, String::new());
        for (what, rows, cols) in
            [("columns", false, true), ("rows", true, false), ("rows and columns", true, true)]
        {
            for f in [2.0, 0.5] {
                let mut c = r.to_vec();
                for j in 0..n {
                    for i in 0..n {
                        let mut s = 1.0;
                        if rows && shear.contains(&i) {
                            s *= f;
                        }
                        if cols && shear.contains(&j) {
                            s *= f;
                        }
                        c[i + j * n] *= s;
                    }
                }
                let e = ev.error(&c);
                if e < best.0 {
                    best = (
                        e,
                        format!(
                            "shear {what} off by {}: multiply them by {f}",
                            if f == 2.0 { "½" } else { "2" }
                        ),
                    );
                }
            }
        }
        if let Some((e, detail)) = term_shear_factor(ev, &shear) {
            if e < best.0 {
                best = (e, detail);
            }
        }
        for columns in [true, false] {
            if let Some((e, detail)) = one_side_shear_factor(ev, &shear, columns) {
                if e < best.0 {
                    best = (e, detail);
                }
            }
        }
        found.push(Cause::ShearFactor, best.1, best.0);
    }

    // Shear permutation: rows and columns of the shear components reordered together.
    if shear.len() == 3 {
        let perms = [[0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]];
        let mut best = (f64::INFINITY, String::new());
        for p in perms {
            let mut map: Vec<usize> = (0..n).collect();
            for (k, &s) in shear.iter().enumerate() {
                map[s] = shear[p[k]];
            }
            let mut c = vec![0.0; n * n];
            for j in 0..n {
                for i in 0..n {
                    c[i + j * n] = at(r, map[i], map[j]);
                }
            }
            let e = ev.error(&c);
            if e < best.0 {
                let labels: Vec<&str> = shear.iter().map(|&s| ev.conv.order()[map[s]].label()).collect();
                best = (e, format!("shear entries written in the order {}", labels.join(", ")));
            }
        }
        found.push(Cause::ShearPermutation, best.1, best.0);
    }

    // Component order: rows and columns reordered together, any reordering but the identity
    // and those of the shear components among themselves (the shear permutation's, where a
    // point has three): a plane tangent written for 11 22 12 33 where the routine declares
    // 11 22 33 12 read `rank-two` (a user-style sweep). At most 6! = 720 trials, made only
    // for a failing increment.
    if n >= 2 {
        let shear_only = |map: &[usize]| {
            shear.len() == 3 && (0..n).all(|i| map[i] == i || (shear.contains(&i) && shear.contains(&map[i])))
        };
        let mut best = (f64::INFINITY, String::new());
        let mut map: Vec<usize> = (0..n).collect();
        let mut c = vec![0.0; n * n];
        permutations(&mut map, 0, &mut |map| {
            if map.iter().enumerate().all(|(i, &m)| i == m) || shear_only(map) {
                return;
            }
            for j in 0..n {
                for i in 0..n {
                    c[i + j * n] = at(r, map[i], map[j]);
                }
            }
            let e = ev.error(&c);
            if e < best.0 {
                let labels: Vec<&str> = map.iter().map(|&m| ev.conv.order()[m].label()).collect();
                let declared: Vec<&str> = ev.conv.order().iter().map(|c| c.label()).collect();
                best = (
                    e,
                    format!(
                        "rows and columns written in the component order {} (the stress and strain are in {})",
                        labels.join(" "),
                        declared.join(" ")
                    ),
                );
            }
        });
        if best.0.is_finite() {
            found.push(Cause::ComponentOrder, best.1, best.0);
        }
    }

    // Transposed.
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        for i in 0..n {
            t[i + j * n] = at(r, j, i);
        }
    }
    if t != r {
        found.push(Cause::Transposed, "rows and columns swapped".into(), ev.error(&t));
    }

    // Uniform scale: the best factor in the least-squares sense.
    let rr: f64 = r.iter().map(|x| x * x).sum();
    if rr > 0.0 {
        let c: f64 = r.iter().zip(ev.numerical).map(|(a, b)| a * b).sum::<f64>() / rr;
        let nn: f64 = ev.numerical.iter().map(|x| x * x).sum();
        // Why 1e-6: the check's own resolution; a factor closer to 1 than that is no scaling.
        // A zero derivative (a fully failed point) is no factor of the returned tangent (it
        // read "off by a factor inf" and ranked first).
        if (c - 1.0).abs() > 1e-6 && nn > 1e-24 * rr {
            let scaled: Vec<f64> = r.iter().map(|x| c * x).collect();
            found.push(
                Cause::UniformScale,
                format!("the whole tangent off by a factor {:.4e}{}", 1.0 / c, bar_reading(ev, 1.0 / c)),
                ev.error(&scaled),
            );
        }
    }
}

/// What a factor `f` on a bar's tangent reads as, when it is its elastic stiffness's too (the
/// increment left the state alone, or the elastic step from the start state carries the same
/// factor): a modulus of a fuller stress state in place of E. For isotropic elasticity (any
/// text on Hooke's law): the 3D entry C11 = λ + 2μ = E (1 − ν)/((1 + ν)(1 − 2ν)) (lateral
/// strains held at zero, not condensed for σ22 = σ33 = 0), and the plane-stress entry
/// E/(1 − ν²). Each is read back to the ν that gives `f`, and named when that ν lies in
/// (0, ½); empty for any other kind, a factor below 1 or a plastic increment whose elastic
/// stiffness is right.
fn bar_reading(ev: &Evidence<'_>, f: f64) -> String {
    if ev.conv.kind() != crate::convention::PointKind::Uniaxial || !(f > 1.0 && f.is_finite()) {
        return String::new();
    }
    let elastic_too = !ev.state_changed
        || match (ev.elastic_returned, ev.elastic) {
            (Some(&[r]), Some(&[e])) => e != 0.0 && (r / e - f).abs() <= 1e-3 * f,
            _ => false,
        };
    if !elastic_too {
        return String::new();
    }
    // 2 f ν² + (f − 1) ν + (1 − f) = 0, its positive root; and 1 − ν² = 1/f.
    let three_d = (-(f - 1.0) + ((f - 1.0).powi(2) + 8.0 * f * (f - 1.0)).sqrt()) / (4.0 * f);
    let plane_stress = (1.0 - 1.0 / f).sqrt();
    // At most 0.49: every factor above 1 has a 3D root below ½, and a factor of 1000 (a unit
    // slip) read "at ν = 0.500" (a review); ν = 0.49 is already a factor of 17.
    let plausible = |nu: f64| nu > 0.0 && nu <= 0.49;
    let mut readings = Vec::new();
    if plausible(three_d) {
        readings.push(format!(
            "the 3D modulus λ + 2μ = E(1 − ν)/((1 + ν)(1 − 2ν)) in place of E gives it at ν = {three_d:.3} \
             (a tangent not condensed for σ22 = σ33 = 0)"
        ));
    }
    if plausible(plane_stress) {
        readings.push(format!("the plane-stress modulus E/(1 − ν²) gives it at ν = {plane_stress:.3}"));
    }
    if readings.is_empty() {
        return String::new();
    }
    format!("; for a bar, {}", readings.join("; "))
}

/// Call `each` with every ordering of `v[k..]` (v[..k] fixed), in a fixed order; `v` is left
/// as it was.
fn permutations(v: &mut Vec<usize>, k: usize, each: &mut dyn FnMut(&[usize])) {
    if k == v.len() {
        each(v);
        return;
    }
    for i in k..v.len() {
        v.swap(k, i);
        permutations(v, k + 1, each);
        v.swap(k, i);
    }
}

/// The shear entries of the vector of one term c a⊗a written f times too large (f = 2 or ½;
/// a flow direction n with engineering shear in n⊗n where the routine's form wants tensor
/// shear, or the other way): the discrepancy c (Sa⊗Sa − a⊗a), S scaling the shear entries by
/// f, has no normal–normal part, a shear–shear part c (f² − 1) q⊗q and a normal–shear part
/// c (f − 1) p⊗q, where a = (p, q). The fit reads q from the shear–shear part's leading
/// eigen-pair and p from the normal–shear part (c is ±1: its size goes into a); the error left
/// by the corrected tangent and the words, or `None` when there is nothing to fit.
fn term_shear_factor(ev: &Evidence<'_>, shear: &[usize]) -> Option<(f64, String)> {
    let n = ev.conv.ncomp();
    let normal: Vec<usize> = (0..n).filter(|i| !shear.contains(i)).collect();
    if normal.is_empty() {
        return None;
    }
    let d = |i: usize, j: usize| ev.returned[i + j * n] - ev.numerical[i + j * n];
    let ns = shear.len();
    let dss =
        nalgebra::DMatrix::from_fn(ns, ns, |a, b| 0.5 * (d(shear[a], shear[b]) + d(shear[b], shear[a])));
    if dss.iter().any(|x| !x.is_finite()) {
        return None;
    }
    let eig = dss.symmetric_eigen();
    let k = (0..ns).max_by(|&a, &b| eig.eigenvalues[a].abs().total_cmp(&eig.eigenvalues[b].abs()))?;
    let (lambda, w) = (eig.eigenvalues[k], eig.eigenvectors.column(k).into_owned());
    if lambda == 0.0 {
        return None;
    }
    let mut best: Option<(f64, String)> = None;
    for f in [2.0, 0.5] {
        let g: f64 = f * f - 1.0;
        let c = (lambda / g).signum();
        let q: Vec<f64> = w.iter().map(|x| x * (lambda / g).abs().sqrt()).collect();
        let qq: f64 = q.iter().map(|x| x * x).sum();
        // p from both normal–shear blocks (the term is symmetric).
        let p: Vec<f64> = normal
            .iter()
            .map(|&i| {
                let s: f64 = shear.iter().zip(&q).map(|(&j, qj)| 0.5 * (d(i, j) + d(j, i)) * qj).sum();
                s / (c * (f - 1.0) * qq)
            })
            .collect();
        // A term without a normal part (a flow direction under pure shear) has its shear
        // entries scaled by f exactly as the whole term is scaled by f²: nothing tells the two
        // apart, and the fit would explain any scaled shear term ("off by 2" for factors of
        // 1.16 to 1.9 on a user-style sweep's creep routine under shear). Only a term whose
        // normal part is a fifth of its shear part or more is read.
        let pp: f64 = p.iter().map(|x| x * x).sum();
        if pp < 0.04 * qq {
            continue;
        }
        let mut a = vec![0.0; n];
        let mut sa = vec![0.0; n];
        for (&i, &x) in normal.iter().zip(&p) {
            a[i] = x;
            sa[i] = x;
        }
        for (&i, &x) in shear.iter().zip(&q) {
            a[i] = x;
            sa[i] = f * x;
        }
        let mut corrected = ev.returned.to_vec();
        for j in 0..n {
            for i in 0..n {
                corrected[i + j * n] -= c * (sa[i] * sa[j] - a[i] * a[j]);
            }
        }
        let e = ev.error(&corrected);
        if best.as_ref().is_none_or(|b| e < b.0) {
            best = Some((
                e,
                format!(
                    "the shear entries of the vector a of one term a⊗a (a flow direction's n⊗n) off by {}: \
                     multiply them by {}",
                    if f == 2.0 { "2" } else { "½" },
                    if f == 2.0 { "½" } else { "2" }
                ),
            ));
        }
    }
    best
}

/// The shear entries of the vector of one term c a⊗a written f times too large on one side
/// only (f = 2 or ½, which the discrepancy cannot tell apart): c a⊗(Sa) with the column side's shear doubled (n : dε taken with the
/// engineering shear of dε while n⊗n is built in tensor form), or c (Sa)⊗a. The discrepancy
/// c (f − 1) a⊗(0, q) lives in the shear columns (or rows) alone and has rank one: its leading
/// singular pair gives a (from the side that keeps all entries) and q (from the shear side),
/// which must agree in the shear entries of a. The error left by the corrected tangent and the
/// words, or `None` when the discrepancy has no such form (a one-sided shear slip read
/// `rank-one-term`; a user-style sweep).
fn one_side_shear_factor(ev: &Evidence<'_>, shear: &[usize], columns: bool) -> Option<(f64, String)> {
    let n = ev.conv.ncomp();
    let ns = shear.len();
    if ns == 0 || ns == n {
        return None;
    }
    // d(i, j) with the shear side as columns.
    let d = |i: usize, j: usize| {
        let (r, c) = if columns { (i, j) } else { (j, i) };
        ev.returned[r + c * n] - ev.numerical[r + c * n]
    };
    let ds = nalgebra::DMatrix::from_fn(n, ns, |i, b| d(i, shear[b]));
    if ds.iter().any(|x| !x.is_finite()) {
        return None;
    }
    let svd = ds.svd(true, true);
    let k = (0..svd.singular_values.len())
        .max_by(|&a, &b| svd.singular_values[a].total_cmp(&svd.singular_values[b]))?;
    let sigma = svd.singular_values[k];
    if sigma == 0.0 {
        return None;
    }
    let u = svd.u.as_ref()?.column(k).into_owned();
    let w = svd.v_t.as_ref()?.row(k).transpose();
    // The shear entries of a (∝ u) along q (∝ w): r = u_shear · w, with u_shear ∥ w.
    let us = nalgebra::DVector::from_iterator(ns, shear.iter().map(|&i| u[i]));
    let r = us.dot(&w);
    if r.abs() < 1e-6 || (us.norm() - r.abs()).abs() > 0.05 * us.norm().max(1e-300) {
        return None;
    }
    // A discrepancy in one shear column (or row) alone is `one-column` (`one-row`), more
    // plainly: the fit would explain it too (a ply tangent missing one coupling read
    // `shear-factor`). And a term without a normal part is a scaled shear term as much as a
    // one-sided factor (as in `term_shear_factor`): a normal part of a fifth of the shear
    // part or more is needed.
    if w.iter().any(|x| x.abs() > 0.999) {
        return None;
    }
    let un: f64 = (0..n).filter(|i| !shear.contains(i)).map(|i| u[i] * u[i]).sum();
    if un < 0.04 * us.norm_squared() {
        return None;
    }
    // f = 2 and f = ½ give the same correction (c (f − 1) α² r = σ fixes it whichever f):
    // the discrepancy tells that one side's shear entries are twice or half the other's, not
    // which side is the derivative's; the words say so.
    let f = 2.0f64;
    let g = (f - 1.0) * r;
    let c = (sigma / g).signum();
    let alpha = (sigma / g).abs().sqrt();
    let a: Vec<f64> = u.iter().map(|x| alpha * x).collect();
    let mut sa = a.clone();
    for &i in shear {
        sa[i] *= f;
    }
    let mut corrected = ev.returned.to_vec();
    for j in 0..n {
        for i in 0..n {
            let (left, right) = if columns { (a[i], sa[j]) } else { (sa[i], a[j]) };
            corrected[i + j * n] -= c * (left * right - a[i] * a[j]);
        }
    }
    Some((
        ev.error(&corrected),
        format!(
            "the shear entries of one term a⊗a (a flow direction's n⊗n) differ by a factor 2 between its two \
             sides, in its {}: n : dε taken with another shear measure than the one n⊗n is built in",
            if columns { "columns (the strain side)" } else { "rows (the stress side)" }
        ),
    ))
}
