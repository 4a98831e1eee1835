//! The flawed J2 variants at random states: each differs from num-dual exactly as documented,
//! in the branch it targets, and agrees with it elsewhere.

use super::*;

// ---------------------------------------------------------------------------------------------
// The flawed J2 variants at random states

// j2-shear-factor: every shear column is half the num-dual column, in both branches (the
// engineering-shear column holds C_ijkl, REFERENCES.md J2 worked case note).
#[test]
fn shear_factor_halves_the_shear_columns_everywhere() {
    let mut t = Tally::default();
    for_random_states(J2Flaw::ShearFactor, 0x200a_0001, 0.2, |what, p, out, dual, conv| {
        let n = p.strain.len();
        let mut want = dual.to_vec();
        for j in 3..n {
            for i in 0..n {
                want[i + j * n] *= 0.5;
            }
        }
        assert!(rel_error(conv, &out.tangent, &want) <= DUAL_TOL, "{what}");
        let err = rel_error(conv, &out.tangent, dual);
        assert!(err > VISIBLE, "{what}: {err:.3e}");
        t.branch[out.outcome.branch as usize] += 1;
    });
    eprintln!("j2-shear-factor: {t:?}");
    t.assert_both_branches("j2-shear-factor");
}

// j2-shear-permuted: P D P with P swapping the 23 and 12 rows and columns. The isotropic
// elastic tangent is invariant under P, so the elastic branch is right; after yield only the
// n⊗n term moves, and ‖P(n⊗n)P − n⊗n‖ = √(2 − 2(n·Pn)²) for a unit n, so the Mandel error is
// 2μ|θ̄| √(2 − 2(n·Pn)²)/‖D‖ (derived from the closed form of Simo & Hughes 1998, Box 3.2).
#[test]
fn shear_permutation_shows_after_yield_only() {
    let perm = [0usize, 1, 2, 5, 4, 3];
    let mut t = Tally::default();
    for_random_states(J2Flaw::ShearPermuted, 0x200a_0002, 0.2, |what, p, out, dual, conv| {
        let err = rel_error(conv, &out.tangent, dual);
        let b = out.outcome.branch as usize;
        t.branch[b] += 1;
        if b == 0 {
            assert!(err <= DUAL_TOL, "{what}: elastic branch {err:.3e}");
            return;
        }
        let mut want = vec![0.0; 36];
        for j in 0..6 {
            for i in 0..6 {
                want[i + 6 * j] = dual[perm[i] + 6 * perm[j]];
            }
        }
        assert!(rel_error(conv, &out.tangent, &want) <= DUAL_TOL, "{what}");
        let end = plastic_end(p, out);
        let nm = &end.n_mandel;
        let dot: f64 = (0..6).map(|i| nm[i] * nm[perm[i]]).sum();
        let predicted = 2.0 * end.mu * end.theta_bar.abs() * (2.0 - 2.0 * dot * dot).max(0.0).sqrt()
            / frobenius(&mandel(conv, dual));
        assert!((err - predicted).abs() <= 1e-6 * predicted + 1e-12, "{what}: {err:.6e} vs {predicted:.6e}");
        if err > VISIBLE {
            t.visible += 1;
        }
    });
    eprintln!("j2-shear-permuted: {t:?} (visible: plastic states with error > 1e-3)");
    t.assert_both_branches("j2-shear-permuted");
    assert!(t.visible * 10 >= t.branch[1] * 8, "the permutation shows too rarely: {t:?}");
}

// j2-elastic-first-plastic: in a plastic increment from α_n = 0 the tangent is the elastic
// matrix (REFERENCES.md "Relations"), far from the derivative; everywhere else it is the
// derivative.
#[test]
fn elastic_tangent_in_the_first_plastic_increment_only() {
    let (mut first, mut later_plastic, mut elastic) = (0, 0, 0);
    for_random_states(J2Flaw::ElasticFirstPlastic, 0x200a_0003, 0.5, |what, p, out, dual, conv| {
        let n = p.strain.len();
        let err = rel_error(conv, &out.tangent, dual);
        if out.outcome.branch == 1 && p.state0[n] == 0.0 {
            first += 1;
            let c = elastic_tangent(p.props[0], p.props[1], n);
            assert!(rel_error(conv, &out.tangent, &c) <= DUAL_TOL, "{what}: not the elastic tangent");
            assert!(err > VISIBLE, "{what}: {err:.3e}");
        } else {
            if out.outcome.branch == 1 {
                later_plastic += 1;
            } else {
                elastic += 1;
            }
            assert!(err <= DUAL_TOL, "{what}: {err:.3e}");
        }
    });
    eprintln!(
        "j2-elastic-first-plastic: {first} first plastic, {later_plastic} later plastic, {elastic} elastic"
    );
    assert!(first >= 300 && later_plastic >= 300 && elastic >= 300, "{first} {later_plastic} {elastic}");
}

// j2-no-kinematic: after yield the tangent is D − 2μ Δθ̄ n⊗n with
// Δθ̄ = 1/(1 + K'/(3μ)) − 1/(1 + (K' + H_kin)/(3μ)) (θ̄ of Simo & Hughes 1998, Box 3.2, with
// and without H_kin; derived), so the Mandel error is 2μ|Δθ̄|/‖D‖. Right in the elastic
// branch and with H_kin = 0.
#[test]
fn kinematic_modulus_missing_from_the_rank_one_term() {
    let mut t = Tally::default();
    let mut without_kin = 0;
    for_random_states(J2Flaw::NoKinematic, 0x200a_0004, 0.2, |what, p, out, dual, conv| {
        let err = rel_error(conv, &out.tangent, dual);
        let h_kin = p.props[6];
        let b = out.outcome.branch as usize;
        t.branch[b] += 1;
        if b == 0 || h_kin == 0.0 {
            without_kin += usize::from(b == 1);
            assert!(err <= DUAL_TOL, "{what}: {err:.3e}");
            return;
        }
        let end = plastic_end(p, out);
        let mu = end.mu;
        let shift = 1.0 / (1.0 + end.slope / (3.0 * mu)) - 1.0 / (1.0 + (end.slope + h_kin) / (3.0 * mu));
        let n = p.strain.len();
        let mut want = mandel(conv, dual);
        for j in 0..n {
            for i in 0..n {
                want[i + j * n] -= 2.0 * mu * shift * end.n_mandel[i] * end.n_mandel[j];
            }
        }
        conv.tangent_from_mandel(&mut want);
        assert!(rel_error(conv, &out.tangent, &want) <= 1e-10, "{what}");
        let predicted = 2.0 * mu * shift / frobenius(&mandel(conv, dual));
        assert!((err - predicted).abs() <= 1e-6 * predicted, "{what}: {err:.6e} vs {predicted:.6e}");
        if err > VISIBLE {
            t.visible += 1;
        }
    });
    eprintln!("j2-no-kinematic: {t:?}, {without_kin} plastic with H_kin = 0");
    t.assert_both_branches("j2-no-kinematic");
    assert!(without_kin > 0);
    assert!(t.visible * 10 >= (t.branch[1] - without_kin) * 9, "{t:?}");
}

// j2-unit-factor: exactly 1000 times the num-dual derivative, in both branches.
#[test]
fn unit_factor_is_a_uniform_scale() {
    let mut t = Tally::default();
    for_random_states(J2Flaw::UnitFactor, 0x200a_0005, 0.2, |what, _p, out, dual, conv| {
        let want: Vec<f64> = dual.iter().map(|x| x * UNIT_FACTOR).collect();
        assert!(rel_error(conv, &out.tangent, &want) <= DUAL_TOL, "{what}");
        let err = rel_error(conv, &out.tangent, dual);
        assert!((err - (UNIT_FACTOR - 1.0)).abs() <= 1e-9 * UNIT_FACTOR, "{what}: {err}");
        t.branch[out.outcome.branch as usize] += 1;
    });
    eprintln!("j2-unit-factor: {t:?}");
    t.assert_both_branches("j2-unit-factor");
}

// j2-one-column: every column but 13 is the num-dual column; column 13 is the elastic one
// (μ on the diagonal, REFERENCES.md "Relations"), which differs after yield.
#[test]
fn one_column_differs_only_in_the_13_column() {
    let mut t = Tally::default();
    for_random_states(J2Flaw::OneColumn, 0x200a_0006, 0.2, |what, p, out, dual, conv| {
        let b = out.outcome.branch as usize;
        t.branch[b] += 1;
        for j in [0, 1, 2, 3, 5] {
            let e = column_error(conv, &out.tangent, dual, j);
            assert!(e <= DUAL_TOL, "{what}: column {j} {e:.3e}");
        }
        let (_, mu) = lame(p.props[0], p.props[1]);
        let col13: Vec<f64> = (0..6).map(|i| if i == 4 { mu } else { 0.0 }).collect();
        let got = &out.tangent[24..30];
        assert!(got.iter().zip(&col13).all(|(g, w)| (g - w).abs() <= 1e-12 * mu), "{what}: {got:?}");
        let e13 = column_error(conv, &out.tangent, dual, 4);
        let err = rel_error(conv, &out.tangent, dual);
        if b == 0 {
            assert!(e13 <= DUAL_TOL && err <= DUAL_TOL, "{what}: elastic branch {e13:.3e}");
        } else if err > VISIBLE {
            assert!(e13 > err, "{what}: the whole error sits in column 13");
            t.visible += 1;
        }
    });
    eprintln!("j2-one-column: {t:?}");
    t.assert_both_branches("j2-one-column");
    assert!(t.visible * 10 >= t.branch[1] * 8, "{t:?}");
}

// j2-stale along two increments: the first (no previous increment: zero extra state) returns
// the elastic tangent; the second returns the num-dual derivative of the first, which is
// right only when both increments have the same derivative (elastic after elastic).
#[test]
fn stale_tangent_lags_one_increment() {
    let mut rng = StdRng::seed_from_u64(0x200a_0007);
    let (mut plastic_second, mut visible, mut elastic_pairs, mut after_plastic) = (0, 0, 0, 0);
    for &kind in J2Flaw::Stale.kinds() {
        let m = FlawedJ2::new(J2Flaw::Stale, kind).unwrap();
        let conv = m.info().convention.clone();
        let n = kind.ncomp();
        for (hname, hard) in &HARDENING {
            for k in 0..STATES {
                let what = format!("j2-stale {kind} {hname} #{k}");
                let mut p1 = random_j2_point(&mut rng, n, hard, 0.2);
                p1.state0.resize(2 * n + 3, 0.0);
                let out1 = run(&m, &p1);
                let dual1 = dual_tangent(&m, &p1);
                let c = elastic_tangent(p1.props[0], p1.props[1], n);
                assert!(rel_error(&conv, &out1.tangent, &c) <= DUAL_TOL, "{what}: first increment");
                let err1 = rel_error(&conv, &out1.tangent, &dual1);
                if out1.outcome.branch == 0 {
                    assert!(err1 <= DUAL_TOL, "{what}: {err1:.3e}");
                    assert_eq!(out1.state[2 * n + 1..], [0.0, 0.0]);
                } else {
                    assert!(err1 > VISIBLE, "{what}: {err1:.3e}");
                }
                // The second increment, in a new direction, from the end of the first.
                let size = p1.props[2] / p1.props[0] * 10f64.powf(rng.gen_range(-2.0..0.3));
                let p2 = Point {
                    props: p1.props.clone(),
                    strain: p1.strain.iter().zip(&p1.dstrain).map(|(a, b)| a + b).collect(),
                    dstrain: to_vector(&random_tensor(&mut rng, n).map(|x| x * size), n, 2.0),
                    state0: out1.state.clone(),
                    ..Point::default()
                };
                let out2 = run(&m, &p2);
                let dual2 = dual_tangent(&m, &p2);
                assert!(rel_error(&conv, &out2.tangent, &dual1) <= 1e-10, "{what}: not the first derivative");
                let err2 = rel_error(&conv, &out2.tangent, &dual2);
                let lag = rel_error(&conv, &dual1, &dual2);
                assert!((err2 - lag).abs() <= 1e-9 * lag.max(1.0), "{what}");
                match (out1.outcome.branch, out2.outcome.branch) {
                    (0, 0) => {
                        elastic_pairs += 1;
                        assert!(err2 <= DUAL_TOL, "{what}: {err2:.3e}");
                    }
                    (1, b2) => {
                        after_plastic += 1;
                        plastic_second += usize::from(b2 == 1);
                        visible += usize::from(err2 > VISIBLE);
                    }
                    _ => {}
                }
            }
        }
    }
    eprintln!(
        "j2-stale: {elastic_pairs} elastic pairs, {after_plastic} after a plastic increment \
         ({plastic_second} plastic again, {visible} with error > 1e-3)"
    );
    assert!(elastic_pairs > 100 && plastic_second > 300, "{elastic_pairs} {plastic_second}");
    assert!(visible * 10 >= after_plastic * 9, "{visible} of {after_plastic} after a plastic increment");
}
