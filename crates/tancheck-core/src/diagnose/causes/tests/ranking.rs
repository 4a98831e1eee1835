//! The order of causes that all explain a discrepancy.

use super::*;

/// A pressure-dependent elastic law whose tangent takes its bulk modulus at the start of the
/// increment: the returned bulk part is 0.7408 times the derivative's (exactly), and the
/// discrepancy also shrinks in proportion to the increment, so a continuum tangent explains it
/// to a thousandth of the error without being exact (the numbers are those of a user's
/// Cam-clay-type routine; measured). The exact bulk modulus is named first: the continuum
/// tangent, explaining only loosely, does not push it behind the shape-only terms.
#[test]
fn an_exact_modulus_leads_a_loosely_explaining_continuum_tangent() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let good = isotropic_scaled(6, 1.0e4, 0.3, 1.0, 1.0);
    let bad = isotropic_scaled(6, 1.0e4, 0.3, 1.0, 0.7408);
    let z = vec![0.0; 6];
    // Errors falling in proportion to the fraction of the increment, with a rest of about 9e-4
    // of the full error (0.368) left at a vanishing fraction.
    let refinement = Refinement {
        fractions: vec![0.125, 0.0625, 0.03125],
        errors: vec![5.99e-2, 3.06e-2, 1.55e-2],
        same_branch: true,
        past: 0.0,
    };
    let mut e = ev(&conv, &bad, &good, &z);
    e.refinement = Some(&refinement);
    e.tol = 1e-6;
    let hs = rank(&e);
    let continuum =
        hs.iter().find(|h| h.cause == Cause::ContinuumTangent).unwrap_or_else(|| panic!("{hs:?}"));
    let level = explain_level(e.tol, e.error(&bad));
    assert!(continuum.explains && continuum.error_left > 0.1 * level, "loosely: {continuum:?} ({level:e})");
    assert_eq!(hs[0].cause, Cause::BulkModulus, "{hs:#?}");
    assert!(hs[0].detail.contains("0.7408"), "{}", hs[0].detail);
}
