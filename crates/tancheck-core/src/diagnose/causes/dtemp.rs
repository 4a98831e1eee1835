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
    let level = (10.0 * tol).max(1e-3 * original);
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
    if rr > 0.0 {
        let c: f64 = returned.iter().zip(numerical).map(|(a, b)| a * b).sum::<f64>() / rr;
        let s: Vec<f64> = returned.iter().map(|x| c * x).collect();
        let e = err(&s);
        hs.push(Hypothesis {
            cause: Cause::UniformScale,
            detail: format!("∂σ/∂T off by a factor {:.4e}", 1.0 / c),
            error_left: e,
            explains: e <= level,
        });
    }
    // Partial: the discrepancy is along the stress (the term C′(T):(ε − ε_th) = (E′/E) σ of a
    // stiffness that depends on T) or along C:1 (the thermal expansion term, hydrostatic for an
    // isotropic law): one of the two terms of ∂σ/∂T left out.
    let n = returned.len();
    let d: Vec<f64> = numerical.iter().zip(returned).map(|(a, b)| a - b).collect();
    let mut along = |dir: &[f64], what: &str| {
        let dd: f64 = dir.iter().map(|x| x * x).sum();
        if dd <= 0.0 || returned.iter().all(|&x| x == 0.0) {
            return;
        }
        let c: f64 = d.iter().zip(dir).map(|(a, b)| a * b).sum::<f64>() / dd;
        let corrected: Vec<f64> = returned.iter().zip(dir).map(|(r, x)| r + c * x).collect();
        let e = err(&corrected);
        hs.push(Hypothesis {
            cause: Cause::PartialDtemp,
            detail: format!("∂σ/∂T misses its term {what}"),
            error_left: e,
            explains: e <= level,
        });
    };
    along(stress, "along the stress (the temperature dependence of the stiffness, C′(T):(ε − ε_th))");
    let hydro: Vec<f64> = conv.order().iter().take(n).map(|c| if c.is_shear() { 0.0 } else { 1.0 }).collect();
    if !conv.kind().is_cohesive() {
        along(&hydro, "along C:1 (the thermal expansion, −C:1 ε_th′)");
    }
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
