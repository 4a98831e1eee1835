//! Trials for a wrong ∂σ/∂T: missing, wrong sign, scaled, or one of its two terms left out.

use super::kind::{Cause, Hypothesis};
use crate::convention::Convention;

/// Hypotheses for a wrong ∂σ/∂T: missing, wrong sign, scaled.
pub fn rank_dtemp(
    conv: &Convention,
    returned: &[f64],
    numerical: &[f64],
    stress: &[f64],
    tol: f64,
    entry_floor: f64,
) -> Vec<Hypothesis> {
    let err = |c: &[f64]| {
        let x = crate::compare::compare_dtemp(
            conv,
            c,
            numerical,
            crate::compare::Limits::new(tol, entry_floor, 0),
        );
        x.error()
    };
    let original = err(returned);
    // Why: as in `rank`, a pass with margin or three digits of the error removed.
    let level = super::explain_level(tol, original);
    let mut hs = Vec::new();
    let neg: Vec<f64> = returned.iter().map(|x| -x).collect();
    let e = err(&neg);
    hs.push(Hypothesis {
        cause: Cause::UniformScale,
        detail: "∂σ/∂T has the wrong sign".into(),
        error_left: e,
        explains: e <= level,
    });
    if returned.iter().all(|&x| x == 0.0) {
        hs.push(Hypothesis {
            cause: Cause::OneColumn,
            detail: "∂σ/∂T is missing (all zero)".into(),
            error_left: original,
            explains: true,
        });
    }
    let rr: f64 = returned.iter().map(|x| x * x).sum();
    let nn: f64 = numerical.iter().map(|x| x * x).sum();
    let c: f64 =
        if rr > 0.0 { returned.iter().zip(numerical).map(|(a, b)| a * b).sum::<f64>() / rr } else { 1.0 };
    // A zero derivative is no factor. A factor near 1 keeps enough digits to show it is not 1.
    if rr > 0.0 && nn > 1e-24 * rr {
        let s: Vec<f64> = returned.iter().map(|x| c * x).collect();
        let e = err(&s);
        let near_one = (1.0 / c - 1.0).abs() < 1e-3;
        let digits = if near_one { 12 } else { 4 };
        // A factor within a thousandth of 1 that explains nothing says nothing (a sweep saw
        // "off by a factor 9.999992893443e-1 (does not explain it)" beside the cause).
        if e <= level || !near_one {
            hs.push(Hypothesis {
                cause: Cause::UniformScale,
                detail: format!("∂σ/∂T off by a factor {:.*e}", digits, 1.0 / c),
                error_left: e,
                explains: e <= level,
            });
        }
    }
    // Partial: the discrepancy is along the stress (the term C′(T):(ε − ε_th) = (E′/E) σ of a
    // stiffness that depends on T) or along C:1 (the thermal expansion term, hydrostatic for an
    // isotropic law): one of the two terms of ∂σ/∂T left out.
    let n = returned.len();
    let d: Vec<f64> = numerical.iter().zip(returned).map(|(a, b)| a - b).collect();
    let hydro: Vec<f64> = conv.order().iter().take(n).map(|c| if c.is_shear() { 0.0 } else { 1.0 }).collect();
    let cohesive = conv.kind().is_cohesive();
    // One component: the stress and 1 are one direction, and a term along it is a scale.
    let one = n == 1;
    // The returned and the numerical ∂σ/∂T as a·σ + b·1 (isotropic thermo-elasticity's two
    // terms), when both lie in that plane: what the routine made of a term, left out (a′ = 0),
    // of the wrong sign (a′ = −a) or scaled.
    let terms =
        (!cohesive).then(|| two_terms(stress, &hydro, returned).zip(two_terms(stress, &hydro, numerical)));
    let mut along = |dir: &[f64], what: &str, term: Option<(f64, f64)>| {
        let dd: f64 = dir.iter().map(|x| x * x).sum();
        if one || dd <= 0.0 || returned.iter().all(|&x| x == 0.0) {
            return;
        }
        let c: f64 = d.iter().zip(dir).map(|(a, b)| a * b).sum::<f64>() / dd;
        let corrected: Vec<f64> = returned.iter().zip(dir).map(|(r, x)| r + c * x).collect();
        let e = err(&corrected);
        // Why 0.05: a term read from two fits of the same plane; 5 % tells a sign or a
        // missing term from a factor, far above the fits' rounding.
        let detail = match term {
            Some((mine, truth)) if truth != 0.0 && (mine + truth).abs() <= 0.05 * truth.abs() => {
                format!("∂σ/∂T has its term {what} with the wrong sign")
            }
            Some((mine, truth)) if truth != 0.0 && mine.abs() > 0.05 * truth.abs() => {
                format!("∂σ/∂T has its term {what} off by a factor {:.4}", mine / truth)
            }
            _ => format!("∂σ/∂T misses its term {what}"),
        };
        hs.push(Hypothesis { cause: Cause::PartialDtemp, detail, error_left: e, explains: e <= level });
    };
    let flat = terms.flatten();
    // A hydrostatic stress (a thermal stress of a constrained point, say) is one direction with
    // C:1: the two terms cannot be told apart there, and one trial says so (both explained
    // the error, each as if it were the one, beside a factor on the whole ∂σ/∂T; a user-style
    // sweep).
    let dot = |x: &[f64], y: &[f64]| x.iter().zip(y).map(|(a, b)| a * b).sum::<f64>();
    let parallel = |v: &[f64]| {
        let (vv, hh) = (dot(v, v), dot(&hydro, &hydro));
        // Why 1e-6: as for the deviatoric direction below, the precision of the fits.
        vv > 0.0 && hh > 0.0 && 1.0 - dot(v, &hydro).powi(2) / (vv * hh) <= 1e-6
    };
    let hydrostatic = !cohesive && !one && parallel(stress);
    if hydrostatic {
        along(
            &hydro,
            "along the stress, which is hydrostatic here: the temperature dependence of the stiffness \
             (C′(T):(ε − ε_th), along the stress) and the thermal expansion (−C:1 ε_th′, along C:1) are one \
             direction at this point and cannot be told apart; a path with a deviatoric stress tells them apart",
            None,
        );
        if parallel(returned) {
            for h in hs.iter_mut().filter(|h| h.cause == Cause::UniformScale) {
                h.detail.push_str(
                    " (∂σ/∂T is hydrostatic too, so this factor and a term along the stress cannot be told apart here)",
                );
            }
        }
        return sorted(hs);
    }
    along(
        stress,
        "along the stress (the temperature dependence of the stiffness, C′(T):(ε − ε_th), or of a strength such as the yield stress)",
        flat.map(|(r, t)| (r.0, t.0)),
    );
    if !cohesive {
        along(&hydro, "along C:1 (the thermal expansion, −C:1 ε_th′)", flat.map(|(r, t)| (r.1, t.1)));
        // Along the deviatoric stress: the flow direction of a pressure-insensitive return, along
        // which a yield stress or hardening that depends on T moves the stress (∂σ_y/∂T n).
        // Offered where it is another direction than the stress (a stress with a mean part).
        let mean = stress.iter().zip(&hydro).map(|(x, h)| x * h).sum::<f64>() / 3.0;
        let dev: Vec<f64> = stress.iter().zip(&hydro).map(|(x, h)| x - mean * h).collect();
        let (dd, ss) = (dot(&dev, &dev), dot(stress, stress));
        // Why 1e-6: below it the deviatoric stress is the stress to the precision of the fits.
        if dd > 0.0 && ss > 0.0 && 1.0 - dot(&dev, stress).powi(2) / (dd * ss) > 1e-6 {
            along(
                &dev,
                "along the deviatoric stress (the temperature dependence of the inelastic flow along its direction: a yield stress or hardening, ∂σ_y/∂T, or a creep or rate law's dependence on the temperature)",
                None,
            );
        }
    }
    sorted(hs)
}

/// Explaining trials first, a partial term after a whole scale among them, then by the error
/// left.
fn sorted(mut hs: Vec<Hypothesis>) -> Vec<Hypothesis> {
    let spec = |c: Cause| if c == Cause::PartialDtemp { 1 } else { 0 };
    hs.sort_by(|a, b| {
        b.explains
            .cmp(&a.explains)
            .then_with(
                || if a.explains { spec(a.cause).cmp(&spec(b.cause)) } else { std::cmp::Ordering::Equal },
            )
            .then_with(|| a.error_left.total_cmp(&b.error_left))
    });
    hs
}

/// `v` as a·s + b·h by least squares, when `s` and `h` span a plane (not parallel: a
/// hydrostatic stress leaves the two terms apart only together) and `v` lies in it (to
/// 1e-6 of its size): `Some((a, b))`.
fn two_terms(s: &[f64], h: &[f64], v: &[f64]) -> Option<(f64, f64)> {
    let dot = |x: &[f64], y: &[f64]| x.iter().zip(y).map(|(a, b)| a * b).sum::<f64>();
    let (ss, hh, sh) = (dot(s, s), dot(h, h), dot(s, h));
    let det = ss * hh - sh * sh;
    // Why 1e-6: below it the two directions are parallel to the precision of the fit.
    if det.is_nan() || det <= 1e-6 * ss * hh {
        return None;
    }
    let (vs, vh) = (dot(v, s), dot(v, h));
    let a = (vs * hh - vh * sh) / det;
    let b = (vh * ss - vs * sh) / det;
    let left: f64 = v.iter().zip(s.iter().zip(h)).map(|(x, (p, q))| (x - a * p - b * q).powi(2)).sum();
    (left.sqrt() <= 1e-6 * dot(v, v).sqrt()).then_some((a, b))
}
