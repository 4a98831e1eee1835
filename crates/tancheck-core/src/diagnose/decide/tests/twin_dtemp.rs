//! Decision-table rows of a twin unsafe in the temperature only.

use super::*;

/// A twin that holds a temperature-dependent modulus in a real variable: its strain columns
/// are exact, its ∂σ/∂T misses C′(T):ε (about 10 % here), while the central ∂σ/∂T equals the
/// returned one (error 1e-11, measured on such a Fortran routine by a user-style sweep).
pub(super) fn rows() -> Vec<Row> {
    let kink = TempKink {
        gaps: vec![1e-9; 3],
        detected: false,
        nearby: false,
        forward_error: 0.15,
        backward_error: 0.15,
        matches: Side::Neither,
        on_a_side: false,
        forward: vec![],
        backward: vec![],
    };
    let twin_dtemp = |gap: f64, real: f64, e: f64| Observed {
        tangent_checks_pass: true,
        dtemp_failed: true,
        dtemp_kink: Some(kink.clone()),
        dtemp_complex: Some((e, 1e-10)),
        dtemp_twin: Some(DtempTwin { real: (real, 1e-4), gap }),
        dtemp_causes: vec![hyp(Cause::UniformScale, false)],
        failed_tol: f64::INFINITY,
        ..base()
    };
    let row = |what, observed, pass, finding, twin_unsafe| Row {
        what,
        observed,
        pass,
        finding,
        twin_unsafe,
        needs_causes: false,
    };
    vec![
        row(
            "twin unsafe in the temperature: its ∂σ/∂T as far from Richardson as from the returned one",
            twin_dtemp(0.15, 1e-11, 0.15),
            true,
            TWIN_FINDING,
            true,
        ),
        row(
            "∂σ/∂T wrong with a sound twin: the complex ∂σ/∂T equals Richardson's",
            twin_dtemp(1e-9, 1e-11, 0.15),
            false,
            "dtemp",
            false,
        ),
        row(
            "twin gap large but the real ∂σ/∂T (within its tolerance) no decade closer than the complex one",
            twin_dtemp(2e-4, 5e-5, 2e-4),
            false,
            "dtemp",
            false,
        ),
    ]
}
