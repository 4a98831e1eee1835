//! Trials of a discrepancy of low rank: one term a⊗b missing, of the wrong sign or scaled
//! (measured against the rest of the derivative's spectrum), or two such terms.

use super::kind::{Cause, Evidence, Found};

/// Term missing / sign / scaled (or rank-one when the factor cannot be told), rank two.
pub(super) fn try_rank_one(ev: &Evidence<'_>, found: &mut Found) {
    let n = ev.conv.ncomp();
    let r = ev.returned;

    // Rank-one term: the discrepancy is one outer product a⊗b (in Mandel form).
    {
        let mut d = r.to_vec();
        let mut m = ev.numerical.to_vec();
        ev.conv.tangent_to_mandel(&mut d);
        ev.conv.tangent_to_mandel(&mut m);
        for (x, y) in d.iter_mut().zip(&m) {
            *x -= y;
        }
        if d.iter().chain(&m).any(|x| !x.is_finite()) {
            return;
        }
        let dm = nalgebra::DMatrix::from_column_slice(n, n, &d);
        let svd = dm.clone().svd(true, true);
        let mut order: Vec<usize> = (0..svd.singular_values.len()).collect();
        order.sort_by(|&a, &b| svd.singular_values[b].total_cmp(&svd.singular_values[a]));
        let s: Vec<f64> = order.iter().map(|&k| svd.singular_values[k]).collect();
        // Why 1e-300: only a guard against dividing by the zero norm of an all-zero matrix.
        let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt().max(1e-300);
        let rest = s.iter().skip(1).map(|x| x * x).sum::<f64>().sqrt() / norm;
        if s.first().is_some_and(|&x| x > 0.0) {
            // Which term: the discrepancy σ u⊗v against the derivative's own part along u⊗v,
            // measured from the elastic tangent when the state changed (the inelastic term),
            // else from zero. The factor the returned term carries: (τ + σ)/τ.
            let (u, v) = match (&svd.u, &svd.v_t) {
                (Some(u), Some(vt)) => (u.column(order[0]).into_owned(), vt.row(order[0]).transpose()),
                _ => return,
            };
            let mut base = m.clone();
            // Which part of the derivative the term belongs to, for the words.
            let of = if ev.elastic.is_some() && ev.state_changed {
                "the inelastic part of the derivative (the derivative less the elastic tangent)"
            } else {
                "the derivative"
            };
            // Measured from the stiffness of the state reached where it was measured (a damage
            // law's damaged stiffness at the end), else from the elastic tangent of the start.
            if let (Some(e), true) = (ev.elastic_end.or(ev.elastic), ev.state_changed) {
                let mut em = e.to_vec();
                ev.conv.tangent_to_mandel(&mut em);
                for (b, x) in base.iter_mut().zip(&em) {
                    *b -= x;
                }
            }
            let bm = nalgebra::DMatrix::from_column_slice(n, n, &base);
            // The background along u: the median of the other eigenvalues of the symmetric
            // part (the spectrum without the eigen-direction closest to u). The term is what
            // stands out from it: for J2, −2μθ̄ against the 2μ(θ − 1) of the other deviatoric
            // directions (Simo & Hughes 1998, Box 3.2).
            let eig = (0.5 * (&bm + bm.transpose())).symmetric_eigen();
            let closest = (0..n)
                .max_by(|&a, &b| {
                    eig.eigenvectors
                        .column(a)
                        .dot(&u)
                        .abs()
                        .total_cmp(&eig.eigenvectors.column(b).dot(&u).abs())
                })
                .unwrap_or(0);
            let mut others: Vec<f64> = (0..n).filter(|&k| k != closest).map(|k| eig.eigenvalues[k]).collect();
            others.sort_by(f64::total_cmp);
            let background = if others.is_empty() {
                0.0
            } else if others.len() % 2 == 1 {
                others[others.len() / 2]
            } else {
                0.5 * (others[others.len() / 2 - 1] + others[others.len() / 2])
            };
            let tau = (u.transpose() * &bm * &v)[(0, 0)] - background * u.dot(&v);
            let cosine = |w: nalgebra::DVector<f64>, along: &nalgebra::DVector<f64>| {
                let l = w.norm();
                if l > 0.0 {
                    (w.dot(along) / (l * along.norm())).abs()
                } else {
                    0.0
                }
            };
            // A scaled term of the derivative is one of its own directions: the derivative
            // (net of the background) maps v to a multiple of u, and its transpose u to one of
            // v. A discrepancy that is one term but not such a copy (another flow direction in
            // place of the true one) has no factor to tell: its cosines fall far below 1
            // (0.1–0.6 on a sweep's non-associative return given the associative tangent,
            // above 0.98 on every scaled term the sweeps and the zoo planted).
            let right = cosine(&bm * &v - &v * background, &u);
            let left = cosine(bm.transpose() * &u - &u * background, &v);
            // The same without the background: a tangent written with none along the term's
            // directions (see `whole_factor` below) has its copy there.
            let right_whole = cosine(&bm * &v, &u);
            let left_whole = cosine(bm.transpose() * &u, &v);
            let copy_net = left.min(right) >= 0.9;
            let copy_whole = left_whole.min(right_whole) >= 0.9;
            let copy = copy_net || copy_whole;
            let sigma = (u.transpose() * &dm * &v)[(0, 0)];
            // Why 1e-12: below that the derivative has no part along u⊗v beyond rounding of
            // the norm (a few ulps), so no factor can be told.
            // The term is the derivative's part along u⊗v net of the background (a plastic
            // correction under the elastic stiffness). Where the background is most of that part
            // (a bulk term beside a shear background of about its size) the net term is small
            // and its factor ill-told (17.7 for a bulk modulus returned at −0.18 of its value):
            // then the factor is that of the whole part along u⊗v.
            let whole = (u.transpose() * &bm * &v)[(0, 0)];
            let net = copy_net && tau.abs() > 1e-12 * norm && tau.abs() >= 0.5 * whole.abs();
            let whole_told = whole.abs() > 1e-12 * norm;
            let factor = if net {
                (tau + sigma) / tau
            } else if copy && whole_told {
                (whole + sigma) / whole
            } else {
                f64::NAN
            };
            // Which part is "the term" depends on how the routine wrote its tangent: the J2
            // form 2μθ P_dev − 2μθ̄ n⊗n puts a background on n too (the factor net of it is
            // the one a wrong θ̄ leaves), the pressure-dependent cone form
            // 2Gθ (P_dev − n⊗n) + 2G n⊗n − a⊗b/A leaves a and b alone (the factor of the whole
            // part along a⊗b is A's; net of the background it drifts with the increment:
            // 1.24 to 1.38 against 1.1995 on a user's Drucker–Prager routine, where the
            // directions net of it were 26–39° from a copy). Both are said when they differ.
            let whole_factor = (net && copy_whole && whole_told)
                .then(|| (whole + sigma) / whole)
                .filter(|w| w.is_finite() && (w - factor).abs() > 0.01 * factor.abs().max(1e-300));
            let (left, right) = (left.max(left_whole), right.max(right_whole));
            let size = s[0] / norm;
            // The whole part's factor decides when it reads as a missing term or a sign error
            // (within 0.05 of 0 or of −1: tighter than the net factor's bands, being the
            // second reading) and the net factor reads as neither: a sign flipped on a
            // volumetric plastic term beside a deviatoric background read `term-scaled` 2.7
            // net, −1.00 whole, on a user's porous plasticity routine.
            let special = |f: f64| f.abs() < 0.05 || (f + 1.0).abs() < 0.25;
            let whole_reads =
                whole_factor.filter(|w| !special(factor) && (w.abs() < 0.05 || (w + 1.0).abs() < 0.05));
            let (factor, reading, whole_factor) = match whole_reads {
                Some(w) => (
                    w,
                    format!(" of the whole part along a⊗b, {} net of the background", factor_text(factor)),
                    None,
                ),
                None => (factor, String::new(), whole_factor),
            };
            // Why 0.05 and 0.25: a missing term leaves a factor of 0, a sign error one of −1; the
            // bands admit the error the rank-one fit leaves (a sign error in the damage term of a
            // scalar damage routine read −0.76 to −0.87 where the damage grew most in the
            // increment, its elastic reference taken at the start damage), far from any plain
            // scaling: a term scaled by a negative factor is a sign error first.
            // A factor within 1e-6 of 1 describes no flaw: the term it scales would be a
            // million times the discrepancy, far larger than any term of a tangent whose error
            // passed a tolerance of that order; such a discrepancy is the update's own noise (a
            // local solve stopped at another iterate: a user's Johnson–Cook routine read
            // "scaled by about 1 − 1.7e-11"). No reading is offered from it.
            let no_reading = (factor - 1.0).abs() < 1e-6;
            // In an increment that left the state unchanged (unloading, elastic) of a routine
            // whose state changed on the path, a scaled or sign-flipped term is as likely a term
            // of another branch's tangent returned here: a cohesive law's softening term kept on
            // unloading read only "scaled by about −2.21" (a user-style sweep).
            let other_branch = if !ev.state_changed && ev.initial.is_some() {
                "; the increment left the state variables unchanged (an unloading or elastic step): a term of \
                 another branch's tangent returned here, such as the loading branch's softening or hardening \
                 term, reads so too"
            } else {
                ""
            };
            let (cause, detail) = if (factor).abs() < 0.05 {
                // In an unloading step a term of another branch that cancels one of the
                // derivative's reads as missing too (a cohesive law's softening term kept on
                // unloading, returned −1955 where the derivative is 59270; a user-style sweep).
                (
                    Cause::TermMissing,
                    format!(
                        "one term a⊗b of {of} is missing (factor {factor:.3}{reading}; size {size:.2e} of the norm){other_branch}"
                    ),
                )
            } else if (factor + 1.0).abs() < 0.25 {
                (
                    Cause::TermSign,
                    format!(
                        "one term a⊗b of {of} has the wrong sign (factor {factor:.3}{reading}; size {size:.2e}){other_branch}"
                    ),
                )
            } else if factor.is_finite() {
                (
                    Cause::TermScaled,
                    format!(
                        "one term a⊗b of {of} is scaled by about {} (size {size:.2e} of the norm){}",
                        factor_text(factor),
                        whole_factor.map_or(String::new(), |w| format!(
                            "; by {} if the term is the whole part along a⊗b (a tangent written with no background along a and b, as a pressure-dependent cone's)",
                            factor_text(w)
                        ))
                    ) + other_branch,
                )
            } else if copy {
                (Cause::RankOneTerm, format!("the discrepancy is one term a⊗b of size {size:.2e}"))
            } else {
                (
                    Cause::RankOneTerm,
                    format!(
                        "the discrepancy is one term a⊗b of size {size:.2e}, not a scaled term of the derivative (its directions are {:.0}° from the derivative's own): a term built from other vectors, such as another flow direction",
                        left.min(right).clamp(0.0, 1.0).acos().to_degrees()
                    ),
                )
            };
            if !no_reading {
                found.push(cause, detail, rest);
            }
            // Rank two only where the second term is more than rounding beside the first (it
            // was offered as "two terms of sizes 2.8e-1 and 0": the rank-one causes above say it).
            if s.len() > 2 && s[1] > RANK_TWO_LEVEL * s[0] {
                let rest2 = s.iter().skip(2).map(|x| x * x).sum::<f64>().sqrt() / norm;
                found.push(
                    Cause::RankTwo,
                    format!(
                        "the discrepancy has rank two: two terms of sizes {:.2e} and {:.2e} of the norm",
                        s[0] / norm,
                        s[1] / norm
                    ),
                    rest2,
                );
            }
        }
    }
}

/// The second singular value of a discrepancy, relative to the first, below which it has
/// rank one (a thousandth: far above rounding, far below any second term worth naming).
const RANK_TWO_LEVEL: f64 = 1e-3;

/// A factor to two decimals, or as 1 ± its distance from 1 when that would read 1.00 (a
/// factor that reads 1.00 beside a failure says nothing).
fn factor_text(f: f64) -> String {
    if (f - 1.0).abs() < 0.005 {
        format!("1 {} {:.1e}", if f >= 1.0 { "+" } else { "−" }, (f - 1.0).abs())
    } else {
        format!("{f:.2}")
    }
}

#[cfg(test)]
mod tests {
    // A factor that would read 1.00 beside a failure reads as its distance from 1.
    #[test]
    fn a_factor_near_one_reads_as_its_distance_from_one() {
        assert_eq!(super::factor_text(0.99908), "1 − 9.2e-4");
        assert_eq!(super::factor_text(1.003), "1 + 3.0e-3");
        assert_eq!(super::factor_text(1.05), "1.05");
        assert_eq!(super::factor_text(-0.2), "-0.20");
    }
}
