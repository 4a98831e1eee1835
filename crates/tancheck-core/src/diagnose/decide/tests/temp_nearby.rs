//! ∂σ/∂T next to a branch boundary in the temperature (within the default step, not at the
//! point): the complex step, which does not reach it, clears it as it clears a strain column.

use super::*;

/// A plane-stress J2 routine with small ∂σ/∂T entries (a user-style sweep): the one-sided
/// truncation at the smallest probe step is 1.02e-6 of them, above the 1e-6 the one-sided rule
/// allows, the complex step exact. Without the complex step the one-sided rule stands.
#[test]
fn a_nearby_boundary_in_the_temperature_is_cleared_by_the_complex_step() {
    let kink = TempKink {
        gaps: vec![8.4, 6.6, 6.2e-7],
        detected: false,
        nearby: true,
        forward_error: 1.02e-6,
        backward_error: 1.01e-6,
        matches: Side::Both,
        on_a_side: true,
        forward: vec![],
        backward: vec![],
    };
    let at = |complex: Option<(f64, f64)>| Observed {
        tangent_checks_pass: true,
        dtemp_failed: true,
        dtemp_kink: Some(kink.clone()),
        dtemp_complex: complex,
        failed_tol: f64::INFINITY,
        ..base()
    };
    let d = decide(&at(Some((1.1e-14, 1e-10))));
    assert!(d.pass && d.finding == "none", "{d:?}");
    assert!(d.reason.contains("the complex step, which does not reach it"), "{}", d.reason);
    let d = decide(&at(None));
    assert!(!d.pass && d.finding == "dtemp", "{d:?}");
    // A complex step that disagrees clears nothing.
    let d = decide(&at(Some((1e-3, 1e-10))));
    assert!(!d.pass, "{d:?}");
}
