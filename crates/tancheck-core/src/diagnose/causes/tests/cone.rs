//! The factor of a scaled term in a tangent written with no background along the term.

use super::*;

/// A Drucker–Prager cone return's consistent tangent in the form
/// C + 2Gθ' (P_dev − n⊗n) − a⊗b/A with a = √2 G n + K η̄ 1, b = √2 G n + K η 1 (Mandel
/// form; the structure of de Souza Neto, Perić & Owen 2008, §8.3, from memory; the numbers
/// invented), returned with A for a hardening of the wrong sign (A_h = A − 2ξ²H). The
/// discrepancy is the a⊗b term scaled by A/A_h: that factor is among the ones said, whatever
/// the background 2Gθ' of the other deviatoric directions.
#[test]
fn a_scaled_cone_term_says_the_factor_of_its_whole_part() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let (g, k, eta, etab, xi, h) = (3750.0, 8333.3, 0.6, 0.3, 1.2, 500.0);
    let a_mod = g + k * eta * etab + xi * xi * h;
    let a_h = g + k * eta * etab - xi * xi * h;
    let nn = {
        let v = [0.7, -0.2, -0.5, 0.3 * 2f64.sqrt(), 0.0, 0.1 * 2f64.sqrt()];
        let l = v.iter().map(|x| x * x).sum::<f64>().sqrt();
        v.map(|x| x / l)
    };
    let one = [1.0, 1.0, 1.0, 0.0, 0.0, 0.0];
    let a: Vec<f64> = (0..6).map(|i| 2f64.sqrt() * g * nn[i] + k * etab * one[i]).collect();
    let b: Vec<f64> = (0..6).map(|i| 2f64.sqrt() * g * nn[i] + k * eta * one[i]).collect();
    let theta_dev = -0.35; // 2Gθ' of the deviatoric directions other than n, relative to C
    let tangent = |a_div: f64| {
        let mut m = vec![0.0; 36];
        for j in 0..6 {
            for i in 0..6 {
                let pdev = if i == j { 1.0 } else { 0.0 } - one[i] * one[j] / 3.0;
                let c = 2.0 * g * pdev + k * one[i] * one[j];
                m[i + 6 * j] = c + 2.0 * g * theta_dev * (pdev - nn[i] * nn[j]) - a[i] * b[j] / a_div;
            }
        }
        conv.tangent_from_mandel(&mut m);
        m
    };
    let (good, bad) = (tangent(a_mod), tangent(a_h));
    let mut elastic = vec![0.0; 36];
    for j in 0..6 {
        for i in 0..6 {
            let pdev = if i == j { 1.0 } else { 0.0 } - one[i] * one[j] / 3.0;
            elastic[i + 6 * j] = 2.0 * g * pdev + k * one[i] * one[j];
        }
    }
    conv.tangent_from_mandel(&mut elastic);
    let z = vec![0.0; 6];
    let mut e = ev(&conv, &bad, &good, &z);
    e.elastic = Some(&elastic);
    let hs = rank(&e);
    let t = hs.iter().find(|h| h.cause == Cause::TermScaled).unwrap_or_else(|| panic!("{hs:?}"));
    let want = format!("{:.2}", a_mod / a_h);
    assert!(t.explains && t.detail.contains(&want), "{want}: {t:?}");
}

/// A scalar damage tangent (1 − d) C − g (C ε)⊗(C ε) (secant part and damage term; the
/// structure of any strain-driven scalar damage law, e.g. Simo & Ju 1987, from memory; the
/// numbers invented) returned with the damage term's sign flipped, its elastic reference the
/// stiffness at the start damage d_n < d, as the check measures it along an unloading step.
/// The factor read against that reference is off −1 (−0.85 here); it is a sign error, not a
/// scaling.
#[test]
fn a_flipped_damage_term_is_a_sign_error_beside_a_start_damage_reference() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let c = isotropic_scaled(6, 32000.0, 0.2, 1.0, 1.0);
    let eps = [3e-4, -7e-5, -7e-5, 0.0, 0.0, 2e-4];
    let ce: Vec<f64> = (0..6).map(|i| (0..6).map(|j| c[i + 6 * j] * eps[j]).sum()).collect();
    let (d, d_n, g) = (0.35, 0.15, 150.0);
    let tangent = |sign: f64| -> Vec<f64> {
        (0..36).map(|k| (1.0 - d) * c[k] + sign * g * ce[k % 6] * ce[k / 6]).collect()
    };
    let (good, bad) = (tangent(-1.0), tangent(1.0));
    let elastic: Vec<f64> = c.iter().map(|x| (1.0 - d_n) * x).collect();
    let z = vec![0.0; 6];
    let mut e = ev(&conv, &bad, &good, &z);
    e.elastic = Some(&elastic);
    let hs = rank(&e);
    let t = hs.iter().find(|h| h.cause == Cause::TermSign).unwrap_or_else(|| panic!("{hs:#?}"));
    assert!(t.explains, "{t:?}");
    assert!(!hs.iter().any(|h| h.cause == Cause::TermScaled), "{hs:#?}");
    // With the stiffness of the damage reached (the unloading step from the end of the
    // increment) the factor is −1 exactly, whatever the damage grew by (at the start's
    // reference it drifted from −0.68 to −0.87 with the growth, and read term-scaled and
    // term-missing on a user-style sweep's routine).
    let end: Vec<f64> = c.iter().map(|x| (1.0 - d) * x).collect();
    e.elastic_end = Some(&end);
    let hs = rank(&e);
    let t = hs.iter().find(|h| h.cause == Cause::TermSign).unwrap_or_else(|| panic!("{hs:#?}"));
    assert!(t.detail.contains("factor -1.000"), "{t:?}");
}

/// A porous plasticity return at a hydrostatic state: the consistent tangent
/// 2Gθ P_dev + (K − c) 1⊗1, its inelastic part a deviatoric background 2G(θ − 1) P_dev beside
/// the volumetric term −c 1⊗1 (the structure of a pressure-dependent return with volumetric
/// flow, e.g. a Gurson-type one, from memory; the numbers invented), returned with that
/// term's sign flipped. Net of the background the factor reads −1.73; of the whole part along
/// 1⊗1 it is −1: a sign error. The volumetric parts are of opposite signs (factor −11), no
/// bulk modulus off. Before: `bulk-modulus` −11×, then `term-scaled` −1.73. In an elastic
/// increment a bulk part of the other sign is still told as the bulk modulus's factor.
#[test]
fn a_flipped_volumetric_term_beside_a_deviatoric_background_is_a_sign_error() {
    let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let (g, theta, k, c) = (80000.0, 0.7, 50000.0, 60000.0);
    let one = [1.0, 1.0, 1.0, 0.0, 0.0, 0.0];
    let stiffness = |dev: f64, vol: f64| {
        let mut m = vec![0.0; 36];
        for j in 0..6 {
            for i in 0..6 {
                let pdev = if i == j { 1.0 } else { 0.0 } - one[i] * one[j] / 3.0;
                m[i + 6 * j] = dev * pdev + vol * one[i] * one[j];
            }
        }
        conv.tangent_from_mandel(&mut m);
        m
    };
    let good = stiffness(2.0 * g * theta, k - c);
    let bad = stiffness(2.0 * g * theta, k + c);
    let elastic = stiffness(2.0 * g, k);
    let z = vec![0.0; 6];
    let mut e = ev(&conv, &bad, &good, &z);
    e.elastic = Some(&elastic);
    let hs = rank(&e);
    assert_eq!(hs[0].cause, Cause::TermSign, "{hs:#?}");
    assert!(hs[0].explains && hs[0].detail.contains("whole part"), "{hs:#?}");
    assert!(!hs.iter().any(|h| h.cause == Cause::BulkModulus), "{hs:#?}");
    // The same parts in an elastic increment: the bulk modulus's factor, whatever its sign.
    let (good, bad) = (stiffness(2.0 * g, k), stiffness(2.0 * g, -k));
    let mut e = ev(&conv, &bad, &good, &z);
    e.state_changed = false;
    let hs = rank(&e);
    let b = hs.iter().find(|h| h.cause == Cause::BulkModulus).unwrap_or_else(|| panic!("{hs:#?}"));
    assert!(b.explains && b.detail.contains("-1.0000×"), "{b:?}");
}
