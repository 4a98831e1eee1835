//! Random states in every branch: the tangent is num-dual's derivative of the update, and
//! each flawed variant is wrong where it should be only; no call allocates, and bad input
//! is refused.

use super::*;

// ---------------------------------------------------------------------------------------
// Random states in every branch.

/// Random states per branch and kind.
const STATES: usize = 1200;
/// Analytic tangent against num-dual (relative, whole matrix and worst column).
const DUAL_TOL: f64 = 1e-12;
/// Complex step (h = 1e-30) against num-dual.
const COMPLEX_TOL: f64 = 1e-12;
/// Relative distance kept from every branch boundary (damage, onset, failure, zero opening).
const GAP: f64 = 1e-3;

/// The five branches, by id.
const BRANCHES: [i32; 5] =
    [branch::ELASTIC, branch::GROWTH, branch::UNLOADING, branch::CLOSED, branch::FAILED];

/// Random properties near composite interface values, with 2 G K > max(N, S)² by a margin so
/// that δ_fm > δ₀ₘ at every mixity.
fn random_props(rng: &mut StdRng) -> Vec<f64> {
    if rng.gen_bool(0.2) {
        return AS4_PEEK.to_vec();
    }
    vec![
        rng.gen_range(1e5..5e6),
        rng.gen_range(20.0..100.0),
        rng.gen_range(30.0..150.0),
        rng.gen_range(0.2..1.5),
        rng.gen_range(0.5..3.0),
        rng.gen_range(1.0..3.0),
    ]
}

/// Which shape of separation a state takes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Mode {
    /// Opening only.
    PureOpening,
    /// Closed (negative opening) with one slip (2D, or 3D with the second slip zero).
    ClosedOneSlip,
    /// Closed with slips in both directions (3D) — in 2D the same as `ClosedOneSlip`.
    ClosedShear,
    /// Open with slip: mixed mode.
    Mixed,
}

/// A random unit-λ direction of the given mode: (direction, β or None for closed).
fn random_direction(rng: &mut StdRng, n: usize, mode: Mode) -> (Vec<f64>, Option<f64>) {
    let mut dir = vec![0.0; n];
    match mode {
        Mode::PureOpening => dir[0] = 1.0,
        Mode::ClosedOneSlip | Mode::ClosedShear => {
            let slot = if n == 3 && rng.gen_bool(0.5) { 2 } else { 1 };
            dir[slot] = if rng.gen_bool(0.5) { 1.0 } else { -1.0 };
            if mode == Mode::ClosedShear && n == 3 {
                let a: f64 = rng.gen_range(0.1..1.47) * if rng.gen_bool(0.5) { 1.0 } else { -1.0 };
                dir[1] = a.cos();
                dir[2] = a.sin();
            }
            dir[0] = -rng.gen_range(0.0..10.0) - GAP; // any closing, away from zero
        }
        Mode::Mixed => {
            // Mode ratio β log-uniform over [0.02, 50], slip direction random.
            let beta = 10f64.powf(rng.gen_range(-1.7..1.7));
            let a: f64 = rng.gen_range(0.0..std::f64::consts::TAU);
            dir[0] = 1.0 / (1.0 + beta * beta).sqrt();
            let sh = beta * dir[0];
            if n == 3 {
                dir[1] = sh * a.cos();
                dir[2] = sh * a.sin();
            } else {
                dir[1] = if a.cos() < 0.0 { -sh } else { sh };
            }
            return (dir, Some(beta));
        }
    }
    (dir, if mode == Mode::PureOpening { Some(0.0) } else { None })
}

/// A random call meant to land on `target` (0–4), away from the branch boundaries by `GAP`.
fn random_point(rng: &mut StdRng, n: usize, target: i32) -> (Point, Mode) {
    let props = random_props(rng);
    let open_modes = [Mode::PureOpening, Mode::Mixed, Mode::Mixed, Mode::Mixed];
    let closed_modes = [Mode::ClosedOneSlip, Mode::ClosedShear];
    let mode = match target {
        branch::ELASTIC | branch::UNLOADING => open_modes[rng.gen_range(0..4)],
        branch::CLOSED => closed_modes[rng.gen_range(0..2)],
        _ => [Mode::PureOpening, Mode::Mixed, Mode::Mixed, Mode::ClosedOneSlip, Mode::ClosedShear]
            [rng.gen_range(0..5)],
    };
    let (dir, beta) = random_direction(rng, n, mode);
    let (d0m, dfm, _) = published(&props, beta);
    let u = |rng: &mut StdRng, a: f64, b: f64| rng.gen_range(a..b);
    let (d_old, lam) = match target {
        branch::ELASTIC => (0.0, d0m * u(rng, 0.01, 1.0 - GAP)),
        branch::GROWTH => {
            let d_old = if rng.gen_bool(0.3) { 0.0 } else { u(rng, 0.0, 0.95) };
            let d_new = u(rng, d_old + GAP, 1.0 - GAP);
            (d_old, lambda_of_damage(d0m, dfm, d_new))
        }
        branch::UNLOADING => {
            let d_old = u(rng, GAP, 1.0 - GAP);
            (d_old, lambda_of_damage(d0m, dfm, d_old) * u(rng, 0.01, 1.0 - GAP))
        }
        branch::CLOSED => {
            let d_old = if rng.gen_bool(0.3) { 0.0 } else { u(rng, GAP, 1.0 - GAP) };
            (d_old, lambda_of_damage(d0m, dfm, d_old) * u(rng, 0.01, 1.0 - GAP))
        }
        _ => {
            if rng.gen_bool(0.5) {
                (1.0, dfm * u(rng, 0.01, 3.0))
            } else {
                (if rng.gen_bool(0.5) { 0.0 } else { u(rng, 0.0, 1.0) }, dfm * u(rng, 1.0 + GAP, 3.0))
            }
        }
    };
    // dir has unit λ (λ counts the opening only when open); scale the closing with λ too.
    let sep: Vec<f64> = dir.iter().map(|x| x * lam).collect();
    let frac: Vec<f64> = (0..n).map(|_| u(rng, -0.5, 1.5)).collect();
    let dstrain: Vec<f64> = sep.iter().zip(&frac).map(|(s, f)| s * f).collect();
    let strain: Vec<f64> = sep.iter().zip(&dstrain).map(|(s, d)| s - d).collect();
    let dissipated = u(rng, 0.0, 2.0);
    (Point { props, strain, dstrain, state0: vec![d_old, dissipated], ..Point::default() }, mode)
}

// The tangent against num-dual (an independent library's forward-mode derivative), and the
// complex step against num-dual, at random states in every branch of both kinds; each branch
// must be reached by at least 1000 states; the mixed-mode growth tangent must be
// unsymmetric (Camanho & Dávila 2002 with the mixity-dependent δ₀ₘ, δ_fm).
#[test]
fn tangent_is_the_derivative_of_the_update_in_every_branch() {
    let mut rng = StdRng::seed_from_u64(0xc0e5_0001);
    for kind in Cohesive::KINDS {
        let m = Cohesive::new(kind).unwrap();
        let n = kind.ncomp();
        let mut count = [0usize; 5];
        let mut worst = [0.0f64; 2];
        let (mut mixed_growth, mut unsymmetric) = (0, 0);
        for target in BRANCHES {
            for k in 0..STATES {
                let (p, mode) = random_point(&mut rng, n, target);
                let out = run(&m, &p);
                let what = format!("cohesive {kind} target {target} #{k} {mode:?} {p:?}");
                assert_eq!(out.outcome.status, status::OK, "{what}: {}", out.outcome.message_text());
                assert_eq!(out.outcome.branch, target, "{what}");
                assert!(
                    out.stress.iter().chain(&out.state).chain(&out.tangent).all(|x| x.is_finite()),
                    "{what}"
                );
                let (dual, branches) = dual_tangent(&m, &p);
                assert!(branches.iter().all(|&b| b == target), "{what}: dual branch {branches:?}");
                // num-dual, independent library: ∂t/∂Δδ.
                let e = tangent_error(n, &out.tangent, &dual);
                assert!(e <= DUAL_TOL, "{what}: tangent vs num-dual {e:.3e}\n{:?}\n{dual:?}", out.tangent);
                // Complex step (Squire & Trapp 1998) against num-dual.
                let c = tangent_error(n, &complex_tangent(&m, &p, 1e-30), &dual);
                assert!(c <= COMPLEX_TOL, "{what}: complex vs num-dual {c:.3e}");
                worst = [worst[0].max(e), worst[1].max(c)];
                count[target as usize] += 1;
                if target == branch::GROWTH && mode == Mode::Mixed {
                    mixed_growth += 1;
                    if rel_or_exact(&transpose(n, &dual), &dual) > 1e-3 {
                        unsymmetric += 1;
                    }
                }
            }
        }
        eprintln!(
            "cohesive {kind}: branches {count:?}; worst tangent vs dual {:.1e}, complex vs dual {:.1e}; \
             {unsymmetric}/{mixed_growth} mixed-mode growth tangents unsymmetric by > 1e-3",
            worst[0], worst[1]
        );
        assert!(count.iter().all(|&c| c >= 1000), "{kind}: {count:?}");
        assert!(unsymmetric * 10 >= mixed_growth * 5, "{kind}: {unsymmetric}/{mixed_growth}");
    }
}

/// The secant (1 − d) K on the diagonal, K in the normal entry when closed.
fn secant(n: usize, p: &Point, d: f64) -> Vec<f64> {
    let k = p.props[0];
    let mut s = vec![0.0; n * n];
    for i in 0..n {
        let closed = i == 0 && p.strain[0] + p.dstrain[0] < 0.0;
        s[i + i * n] = if closed { k } else { (1.0 - d) * k };
    }
    s
}

/// The diagonal part of a tangent: the correct tangent without the off-diagonal terms, which
/// all come from damage growth (the secant is diagonal).
fn diagonal(n: usize, tangent: &[f64]) -> Vec<f64> {
    let mut t = vec![0.0; n * n];
    for i in 0..n {
        t[i + i * n] = tangent[i + i * n];
    }
    t
}

// Each flawed variant against num-dual: it agrees (1e-12) on the branches and modes it does
// not target, and where it is wrong its error is the one its flaw predicts from the exact
// (num-dual) tangent D: secant ‖S − D‖/‖D‖, no coupling ‖diag-growth − D‖/‖D‖, transposed
// ‖Dᵀ − D‖/‖D‖, symmetrized ‖½(D + Dᵀ) − D‖/‖D‖, undamaged ‖K·1 − D‖/‖D‖ (wherever the
// damage is above zero and below one) — and large.
#[test]
fn flawed_variants_are_wrong_where_they_should_be_only() {
    let mut rng = StdRng::seed_from_u64(0xc0e5_0002);
    for kind in Cohesive::KINDS {
        let n = kind.ncomp();
        for flaw in [
            CohesiveFlaw::Secant,
            CohesiveFlaw::NoCoupling,
            CohesiveFlaw::Transposed,
            CohesiveFlaw::Symmetrized,
            CohesiveFlaw::Undamaged,
        ] {
            let m = Cohesive::with_flaw(kind, flaw).unwrap();
            let good = Cohesive::new(kind).unwrap();
            let (mut wrong, mut right, mut large) = (0, 0, 0);
            for target in BRANCHES {
                for k in 0..STATES / 2 {
                    let (p, mode) = random_point(&mut rng, n, target);
                    let out = run(&m, &p);
                    let reference = run(&good, &p);
                    assert_eq!((out.stress.clone(), out.state.clone()), (reference.stress, reference.state));
                    let (dual, _) = dual_tangent(&m, &p);
                    let e = tangent_error(n, &out.tangent, &dual);
                    let what = format!("{} {kind} branch {target} #{k} {mode:?}", m.info().name);
                    // Pure-mode growth with a single nonzero component (2D closed shear has one slip).
                    let single = mode == Mode::PureOpening
                        || mode == Mode::ClosedOneSlip
                        || n == 2 && mode == Mode::ClosedShear;
                    // The undamaged stiffness is wrong wherever there is damage; a fully
                    // failed open point has no stiffness to measure its error against.
                    let damage = out.state[0];
                    if flaw == CohesiveFlaw::Undamaged && damage >= 1.0 {
                        continue;
                    }
                    let targeted = match flaw {
                        CohesiveFlaw::Undamaged => damage > 0.0,
                        _ => {
                            target == branch::GROWTH
                                && match flaw {
                                    CohesiveFlaw::Secant => true,
                                    CohesiveFlaw::NoCoupling => !single,
                                    CohesiveFlaw::Transposed | CohesiveFlaw::Symmetrized => {
                                        mode == Mode::Mixed
                                    }
                                    CohesiveFlaw::None | CohesiveFlaw::Undamaged => false,
                                }
                        }
                    };
                    if !targeted {
                        assert!(e <= DUAL_TOL, "{what}: should agree, error {e:.3e}");
                        right += 1;
                        continue;
                    }
                    wrong += 1;
                    let sec = secant(n, &p, out.state[0]);
                    let flawed = match flaw {
                        CohesiveFlaw::Secant => sec,
                        // K on the diagonal: the secant of an undamaged point.
                        CohesiveFlaw::Undamaged => secant(n, &p, 0.0),
                        CohesiveFlaw::NoCoupling => diagonal(n, &dual),
                        CohesiveFlaw::Symmetrized => {
                            let t = transpose(n, &dual);
                            dual.iter().zip(&t).map(|(a, b)| 0.5 * (a + b)).collect()
                        }
                        _ => transpose(n, &dual),
                    };
                    let predicted = tangent_error(n, &flawed, &dual);
                    assert!(
                        (e - predicted).abs() <= 1e-9 * predicted,
                        "{what}: error {e:.6e}, predicted {predicted:.6e}"
                    );
                    assert!(e > 1e-9, "{what}: the flaw is invisible ({e:.3e})");
                    if e > 1e-3 {
                        large += 1;
                    }
                }
            }
            eprintln!(
                "{} {kind}: {right} states agree, {wrong} targeted ({large} with error > 1e-3)",
                m.info().name
            );
            // The undamaged stiffness is right only on the undamaged states (branch 0, and
            // the closed ones without damage): fewer than the other flaws leave right.
            let right_at_least = if flaw == CohesiveFlaw::Undamaged { STATES / 5 } else { STATES };
            assert!(wrong >= STATES / 10 && right >= right_at_least, "{wrong} {right}");
            assert!(
                large * 10 >= wrong * 7,
                "{}: too few show the flaw clearly: {large}/{wrong}",
                m.info().name
            );
        }
    }
}

// ---------------------------------------------------------------------------------------

fn count_allocations<S: Scalar>(m: &Cohesive, p: &Point) -> (usize, i32) {
    let (made, outcome) = model_allocations::<S, _>(m, &p.call().temp(0.0, 0.0), 5);
    (made, outcome.branch)
}

// One call allocates nothing, in every branch, every flaw, every scalar type, and on the
// failure path (DEVELOPERS.md: the hot path).
#[test]
fn no_call_allocates() {
    let mut rng = StdRng::seed_from_u64(0xc0e5_0003);
    for kind in Cohesive::KINDS {
        for flaw in
            [CohesiveFlaw::None, CohesiveFlaw::Secant, CohesiveFlaw::NoCoupling, CohesiveFlaw::Transposed]
        {
            let m = Cohesive::with_flaw(kind, flaw).unwrap();
            for target in BRANCHES {
                let (p, _) = random_point(&mut rng, kind.ncomp(), target);
                assert_eq!(count_allocations::<f64>(&m, &p), (0, target));
                assert_eq!(count_allocations::<Dual64>(&m, &p), (0, target));
                assert_eq!(count_allocations::<Complex64>(&m, &p), (0, target));
            }
            let mut p = point_at(&AS4_PEEK, &vec![1e-4; kind.ncomp()], [0.0, 0.0]);
            p.props[5] = 0.5;
            assert_eq!(count_allocations::<f64>(&m, &p), (0, -1));
        }
    }
}

#[test]
fn bad_properties_states_and_kinds_are_refused() {
    let m = Cohesive::new(PointKind::Cohesive2d).unwrap();
    let with = |i: usize, x: f64| {
        let mut p = AS4_PEEK.to_vec();
        p[i] = x;
        p
    };
    for (props, state0, needle) in [
        (with(0, 0.0), [0.0, 0.0], "K (properties[0])"),
        (with(1, -1.0), [0.0, 0.0], "strengths"),
        (with(4, 0.0), [0.0, 0.0], "G_Ic, G_IIc"),
        (with(5, 0.9), [0.0, 0.0], "eta"),
        (with(0, 1.0), [0.0, 0.0], "2 G_c K"),
        (AS4_PEEK.to_vec(), [1.5, 0.0], "damage"),
        (AS4_PEEK.to_vec(), [0.2, f64::NAN], "dissipated"),
    ] {
        let out = run(
            &m,
            &Point {
                props,
                strain: vec![0.0; 2],
                dstrain: vec![1e-5, 0.0],
                state0: state0.to_vec(),
                ..Point::default()
            },
        );
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains(needle), "{needle}: {}", out.outcome.message_text());
        assert!(out.stress.iter().chain(&out.tangent).chain(&out.state).all(|x| x.is_nan()));
    }
    assert!(Cohesive::new(PointKind::Solid3d).is_err());
    for (name, flaw) in [
        ("cohesive", CohesiveFlaw::None),
        ("cohesive-secant", CohesiveFlaw::Secant),
        ("cohesive-no-coupling", CohesiveFlaw::NoCoupling),
        ("cohesive-transposed", CohesiveFlaw::Transposed),
    ] {
        let any = AnyModel::new(name, PointKind::Cohesive3d).unwrap();
        assert_eq!((any.info().name.as_str(), any.info().nprop, any.info().nstate), (name, 6, 2));
        assert_eq!(Cohesive::name_of(flaw), name);
    }
}
