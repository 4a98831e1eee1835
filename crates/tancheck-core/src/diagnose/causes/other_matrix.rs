//! Trials of another matrix returned in place of the derivative: the elastic one, the one of
//! the start of the path, the one of the start of the increment, a secant, one without
//! coupling terms, a symmetric part.

use super::kind::{Cause, Evidence, Found};
use crate::compare::compare;

/// Elastic, start temperature, initial, stale, secant, coupling missing, symmetrized (in this
/// order).
pub(super) fn try_other_matrix(ev: &Evidence<'_>, found: &mut Found) {
    let n = ev.conv.ncomp();
    let r = ev.returned;
    let at = |m: &[f64], i: usize, j: usize| m[i + j * n];

    // Every entry zero where the derivative is not: what the routine wrote says more than any
    // factor of a term (a Drucker–Prager apex with hardening returning the zero tangent of a
    // perfectly plastic one read `term-scaled 1.37`; a user-style sweep).
    if r.iter().all(|&x| x == 0.0) && ev.numerical.iter().any(|&x| x != 0.0) {
        found.push(
            Cause::ZeroTangent,
            "every entry of the returned tangent is 0, where the derivative's are not: the routine wrote a zero \
             matrix (the tangent of a branch without stiffness, as a perfectly plastic apex, where this one has \
             some)"
                .into(),
            0.0,
        );
    }

    // Elastic tangent in an inelastic branch.
    if let (Some(e), true) = (ev.elastic, ev.state_changed) {
        found.push(
            Cause::ElasticTangent,
            "equals the elastic tangent although the state variables changed".into(),
            ev.distance(e),
        );
    }

    // The temperature held at the start of the increment (moduli or yield stress at T_n where
    // the update uses T_n+1), where that is not the derivative itself. It shrinks with the
    // increment as a continuum tangent does, and is named before it.
    if let Some(t) = ev.start_temperature {
        let level = found.explain_level;
        if compare(ev.conv, t, ev.numerical, ev.tol, ev.entry_floor, 0).error() > level {
            found.push(
                Cause::StartTemperature,
                "equals the derivative with the temperature held at the start of the increment (temperature-dependent moduli or yield stress taken at the start temperature)".into(),
                ev.distance(t),
            );
        }
    }

    // The stiffness at the start of the path, where it is neither the derivative (nothing
    // returned in its place would fail) nor the elastic tangent of the current state (that
    // trial already names it): a damaged point given its undamaged stiffness, in growth or
    // unloading alike.
    if let Some(i) = ev.initial {
        let level = found.explain_level;
        let same = |a: &[f64], b: &[f64]| compare(ev.conv, a, b, ev.tol, ev.entry_floor, 0).error() <= level;
        if !same(i, ev.numerical) && !ev.elastic.is_some_and(|e| same(i, e)) {
            found.push(
                Cause::InitialStiffness,
                "equals the stiffness at the start of the path (the material before its state variables changed), not that of the current state".into(),
                ev.distance(i),
            );
        }
    }

    // Stale: the tangent of the start of the increment.
    if let Some(p) = ev.previous {
        found.push(
            Cause::StaleTangent,
            "equals the tangent at the start of the increment".into(),
            ev.distance(p),
        );
    }

    // Secant: the returned matrix maps the total strain to the stress.
    let sn: f64 = ev.stress_end.iter().map(|x| x * x).sum::<f64>().sqrt();
    if sn > 0.0 {
        let mut res = 0.0;
        for i in 0..n {
            let mut s = 0.0;
            for j in 0..n {
                s += at(r, i, j) * ev.strain_end[j];
            }
            res += (s - ev.stress_end[i]) * (s - ev.stress_end[i]);
        }
        let nsec_res: f64 = {
            let mut res = 0.0;
            for i in 0..n {
                let mut s = 0.0;
                for j in 0..n {
                    s += at(ev.numerical, i, j) * ev.strain_end[j];
                }
                res += (s - ev.stress_end[i]) * (s - ev.stress_end[i]);
            }
            res.sqrt() / sn
        };
        // Only a hypothesis when the true tangent is not itself a secant (a linear law).
        // Why 1e-6: the check's own resolution; a secant closer than that is the tangent.
        if nsec_res > 1e-6 {
            found.push(
                Cause::Secant,
                "maps the total strain to the stress (a secant stiffness)".into(),
                res.sqrt() / sn,
            );
        }
    }

    // Coupling missing: the off-diagonal entries are zero where the derivative's are not.
    let off_zero = (0..n).all(|j| (0..n).all(|i| i == j || at(r, i, j) == 0.0));
    if off_zero && n > 1 {
        let mut c = r.to_vec();
        for j in 0..n {
            for i in 0..n {
                if i != j {
                    c[i + j * n] = at(ev.numerical, i, j);
                }
            }
        }
        found.push(Cause::CouplingMissing, "off-diagonal coupling terms are zero".into(), ev.error(&c));
    } else if n > 2 {
        // Some coupling terms missing: off-diagonal entries exactly zero where the derivative's
        // are not (a plane-strain tangent without its 33–11 and 33–22 terms read `rank-two`; a
        // user-style sweep). Exact zeros are what a term left out of the code leaves.
        let norm = ev.numerical.iter().map(|x| x * x).sum::<f64>().sqrt();
        let zeros: Vec<(usize, usize)> = (0..n)
            .flat_map(|j| (0..n).map(move |i| (i, j)))
            .filter(|&(i, j)| {
                i != j && at(r, i, j) == 0.0 && at(ev.numerical, i, j).abs() > 10.0 * ev.tol * norm
            })
            .collect();
        if !zeros.is_empty() {
            let mut c = r.to_vec();
            for &(i, j) in &zeros {
                c[i + j * n] = at(ev.numerical, i, j);
            }
            let label = |k: usize| ev.conv.order()[k].label();
            // One component shared by every entry, both ways round: said as its coupling.
            let common = (0..n).find(|&k| {
                zeros.iter().all(|&(i, j)| i == k || j == k)
                    && zeros.iter().all(|&(i, j)| zeros.contains(&(j, i)))
            });
            let detail = match common {
                Some(k) => {
                    let mut with: Vec<&str> =
                        zeros.iter().filter(|&&(i, _)| i == k).map(|&(_, j)| label(j)).collect();
                    with.dedup();
                    format!("the coupling terms of {} with {} are zero", label(k), with.join(", "))
                }
                None => {
                    let list: Vec<String> =
                        zeros.iter().map(|&(i, j)| format!("{}/{}", label(i), label(j))).collect();
                    format!("coupling terms {} are zero where the derivative's are not", list.join(", "))
                }
            };
            found.push(Cause::CouplingMissing, detail, ev.error(&c));
        }
    }

    // Symmetrized: the returned matrix is the symmetric part of an unsymmetric derivative.
    {
        let mut skew_norm = 0.0;
        let mut c = r.to_vec();
        for j in 0..n {
            for i in 0..n {
                let k = 0.5 * (at(ev.numerical, i, j) - at(ev.numerical, j, i));
                skew_norm += k * k;
                c[i + j * n] += k;
            }
        }
        // Why 1e-300: only a guard against dividing by the zero norm of an all-zero matrix.
        let num_norm = ev.numerical.iter().map(|x| x * x).sum::<f64>().sqrt().max(1e-300);
        // Why 1e-12: symmetric up to rounding of the products that built it (a few ulps of the
        // norm); the skew part of the numerical one must be 10 × tol to count.
        let sym_r = (0..n).all(|j| (0..j).all(|i| (at(r, i, j) - at(r, j, i)).abs() <= 1e-12 * num_norm));
        if sym_r && skew_norm.sqrt() > 10.0 * ev.tol * num_norm {
            found.push(
                Cause::Symmetrized,
                format!(
                    "the symmetric part ½(C + Cᵀ) of an unsymmetric derivative (skew part {:.2e} of the norm)",
                    skew_norm.sqrt() / num_norm
                ),
                ev.error(&c),
            );
        }
    }
}
