//! The bimodulus models: exact away from the kink; at the kink, one side's derivative or
//! (the flawed one) a blend of the two.

use super::*;

// ---------------------------------------------------------------------------------------------
// Bimodulus

fn bimodulus_point(rng: &mut StdRng, n: usize, e11_end: Option<f64>) -> Point {
    let e_t = rng.gen_range(10_000.0..300_000.0);
    // The two sides differ clearly (a factor 1.7 to 10 either way).
    let e_c = e_t * if rng.gen_bool(0.5) { rng.gen_range(0.1..0.6) } else { rng.gen_range(1.7..3.0) };
    let nu = rng.gen_range(-0.5..0.45);
    let mut strain: Vec<f64> = (0..n).map(|_| rng.gen_range(-2e-3..2e-3)).collect();
    let mut dstrain: Vec<f64> = (0..n).map(|_| rng.gen_range(-1e-3..1e-3)).collect();
    if let Some(x) = e11_end {
        // strain + dstrain = x exactly: both halves chosen so the sum rounds to x.
        strain[0] = rng.gen_range(-2e-3..2e-3);
        dstrain[0] = x - strain[0];
        if strain[0] + dstrain[0] != x {
            strain[0] = 0.0;
            dstrain[0] = x;
        }
    }
    Point { props: vec![e_t, e_c, nu], strain, dstrain, state0: vec![], ..Point::default() }
}

/// Column 0 of ∂σ/∂Δε by a one-sided difference of step h (the stress is linear on each side
/// of the kink, so this is exact up to rounding).
fn one_sided_column0<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    let base = run(m, p).stress;
    let mut q = p.clone();
    q.dstrain[0] += h;
    let moved = run(m, &q).stress;
    moved.iter().zip(&base).map(|(a, b)| (a - b) / h).collect()
}

// Away from the kink both bimodulus models return the num-dual derivative, on the branch of
// the sign of ε11; the reported stored energy is a potential of the stress (dW/dε = σ with
// engineering shear, linear elasticity), checked with num-dual.
#[test]
fn bimodulus_is_exact_away_from_the_kink() {
    let mut rng = StdRng::seed_from_u64(0x200a_0008);
    for kind in Bimodulus::KINDS {
        let n = kind.ncomp();
        for m in [Bimodulus::new(kind).unwrap(), Bimodulus::average(kind).unwrap()] {
            let conv = m.info().convention.clone();
            let mut count = [0; 2];
            for k in 0..600 {
                let p = bimodulus_point(&mut rng, n, None);
                let what = format!("{} {kind} #{k}", m.info().name);
                let out = run(&m, &p);
                let e11 = p.strain[0] + p.dstrain[0];
                assert_eq!(out.outcome.branch, i32::from(e11 < 0.0), "{what}");
                count[out.outcome.branch as usize] += 1;
                let dual = dual_tangent(&m, &p);
                assert!(rel_error(&conv, &out.tangent, &dual) <= DUAL_TOL, "{what}");
                for j in 0..n {
                    let de: Vec<Dual64> = p
                        .dstrain
                        .iter()
                        .enumerate()
                        .map(|(i, &x)| Dual64::new(x, f64::from(u8::from(i == j))))
                        .collect();
                    let d = model_call(&m, &p.call(), &de, [Dual64::from_re(20.0), Dual64::from_re(0.0)])
                        .unwrap();
                    let s = out.stress[j];
                    assert!(
                        (d.energy[0].eps - s).abs() <= 1e-12 * frobenius(&out.stress),
                        "{what}: dW/dε{j}"
                    );
                }
            }
            assert!(count[0] > 200 && count[1] > 200, "{count:?}");
        }
    }
}

// At ε11 = 0 exactly: the stress is continuous (no jump between the sides, the reason for
// the rank-one compression term), `bimodulus` returns the tension-side derivative (num-dual
// takes the tension branch there, and a forward difference agrees), and `bimodulus-average`
// returns a 11–11 entry that neither one-sided difference has.
#[test]
fn bimodulus_at_the_kink() {
    let mut rng = StdRng::seed_from_u64(0x200a_0009);
    for kind in Bimodulus::KINDS {
        let n = kind.ncomp();
        let good = Bimodulus::new(kind).unwrap();
        let avg = Bimodulus::average(kind).unwrap();
        let conv = good.info().convention.clone();
        for k in 0..300 {
            let p = bimodulus_point(&mut rng, n, Some(0.0));
            let what = format!("bimodulus {kind} #{k}");
            assert_eq!(p.strain[0] + p.dstrain[0], 0.0);
            let out = run(&good, &p);
            assert_eq!(out.outcome.branch, 0, "{what}: the kink belongs to the tension side");
            let h = 1e-7;
            let forward = one_sided_column0(&good, &p, h);
            let backward = one_sided_column0(&good, &p, -h);
            let scale = frobenius(&out.tangent);
            let col0 = &out.tangent[..n];
            let dual = dual_tangent(&good, &p);
            assert!(rel_error(&conv, &out.tangent, &dual) <= DUAL_TOL, "{what}");
            for i in 0..n {
                assert!((col0[i] - forward[i]).abs() <= 1e-7 * scale, "{what}: forward row {i}");
            }
            let (e_t, e_c) = (p.props[0], p.props[1]);
            assert!((backward[0] - forward[0] - (e_c - e_t)).abs() <= 1e-7 * scale, "{what}: the sides");
            // Continuity: σ(ε11 = +h) − σ(ε11 = −h) = (forward + backward) h, of size h.
            let mut up = p.clone();
            up.dstrain[0] += h;
            let mut down = p.clone();
            down.dstrain[0] -= h;
            let (su, sd) = (run(&good, &up).stress, run(&good, &down).stress);
            let smax = frobenius(&out.stress).max(1.0);
            for i in 0..n {
                let linear = h * (forward[i] + backward[i]);
                assert!((su[i] - sd[i] - linear).abs() <= 1e-9 * smax, "{what}: a jump at the kink, row {i}");
            }

            let flawed = run(&avg, &p);
            assert_eq!(flawed.stress, out.stress);
            let mean = 0.5 * (e_t + e_c);
            assert!((flawed.tangent[0] - mean).abs() <= 1e-9 * scale || n == 6, "{what}: uniaxial mean");
            let mut fwd = out.tangent.clone();
            fwd[..n].copy_from_slice(&forward);
            let mut bwd = out.tangent.clone();
            bwd[..n].copy_from_slice(&backward);
            let jump = (e_c - e_t).abs();
            let to_fwd = rel_error(&conv, &flawed.tangent, &fwd);
            let to_bwd = rel_error(&conv, &flawed.tangent, &bwd);
            // Half the jump of the 11–11 entry to either side (derived from the definition).
            let half = 0.5 * jump / frobenius(&mandel(&conv, &fwd));
            assert!((to_fwd - half).abs() <= 1e-6 * half + 1e-9, "{what}: {to_fwd:.6e} vs {half:.6e}");
            assert!(to_fwd > VISIBLE && to_bwd > VISIBLE, "{what}: {to_fwd:.3e} {to_bwd:.3e}");
        }
    }
}
