//! The Johnson–Cook point model (`johnson-cook`, and the flawed `johnson-cook-no-rate-term`)
//! against the published check values of REFERENCES.md ("Johnson–Cook": Johnson & Cook 1983
//! flow stress, Johnson & Cook 1985 fracture strain, 4340 steel and OFHC copper), and its
//! tangent and ∂σ/∂T against num-dual (an independent library) and the complex step of its own
//! update.

use num_complex::Complex64;
use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::routine::{provides, status};
use tancheck_core::{Model, PointKind, Scalar};
use tancheck_models::johnson_cook::JcLaw;
use tancheck_models::{AnyModel, JcTangent, JohnsonCook};
use tancheck_testkit::call::{dual_dtemp, dual_tangent, model_allocations, model_complex_tangent};
use tancheck_testkit::point::{run, Point};

mod common;

/// 4340 steel of REFERENCES.md (read, secondary copies): A 792 MPa, B 510 MPa, n 0.26,
/// C 0.014, m 1.03, T_m 1793 K; D1..D5 = 0.05, 3.44, −2.12, 0.002, 0.61. E, ν, T_r, the
/// reference rate, density, heat capacity and χ = 0.9 are typical values (common practice,
/// not from the source), used only where a full routine call needs them.
fn steel_4340() -> Vec<f64> {
    vec![
        200_000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05,
        3.44, -2.12, 0.002, 0.61,
    ]
}

/// OFHC copper of REFERENCES.md (read, secondary): A 90, B 292 MPa, n 0.31, C 0.025, m 1.09,
/// T_m 1356 K; D1..D5 = 0.54, 4.89, −3.03, 0.014, 1.12. Other entries as for [`steel_4340`].
fn ofhc_copper() -> Vec<f64> {
    vec![
        124_000.0, 0.34, 90.0, 292.0, 0.31, 0.025, 1.09, 293.0, 1356.0, 1.0, 8.96e-9, 3.83e8, 0.9, 0.54,
        4.89, -3.03, 0.014, 1.12,
    ]
}

fn law(p: &[f64]) -> JcLaw<f64> {
    JcLaw::from_props(p)
}

/// |x − printed| within half a unit of the printed value's last digit.
fn assert_printed(x: f64, printed: f64, half_unit: f64, what: &str) {
    assert!((x - printed).abs() <= half_unit, "{what} = {x:.10}, printed {printed}");
}

// REFERENCES.md "Johnson–Cook", 4340 steel: flow stress at ε_p = 0.1, ε̇* = 1, T* = 0:
// 1072.266 MPa; at ε̇* = 1000: 1175.963 MPa (derived from the read constants, Johnson & Cook
// 1983). OFHC copper at ε_p = 0.2: 267.297 MPa (derived).
#[test]
fn flow_stress_matches_the_published_values() {
    let steel = law(&steel_4340());
    let t_r = steel.t_room;
    let f = steel.flow(0.1, 1.0, t_r).unwrap();
    assert_printed(f.stress, 1072.266, 5e-4, "4340 σ_y(0.1, 1, T_r)");
    let f = steel.flow(0.1, 1000.0, t_r).unwrap();
    assert_printed(f.stress, 1175.963, 5e-4, "4340 σ_y(0.1, 1000, T_r)");
    let cu = law(&ofhc_copper());
    let f = cu.flow(0.2, 1.0, cu.t_room).unwrap();
    assert_printed(f.stress, 267.297, 5e-4, "OFHC σ_y(0.2, 1, T_r)");
    // Below the reference rate the floor ε̇* = 1 applies (common practice): same stress,
    // zero rate slope, and nothing non-finite at ε̇* = 0.
    let slow = steel.flow(0.1, 0.0, t_r).unwrap();
    assert_eq!(slow.stress, steel.flow(0.1, 1.0, t_r).unwrap().stress);
    assert_eq!(slow.d_rate, 0.0);
    // At the melting temperature the law has no flow stress.
    assert!(steel.flow(0.1, 1.0, steel.t_melt).is_none());
}

// REFERENCES.md "Johnson–Cook": ε_f at σ* = 1/3, ε̇* = 1, T* = 0: 1.74690 for 4340 steel and
// 2.32103 for OFHC copper (derived from the read constants, Johnson & Cook 1985).
#[test]
fn fracture_strain_matches_the_published_values() {
    let steel = law(&steel_4340());
    assert_printed(steel.fracture_strain(1.0 / 3.0, 1.0, steel.t_room), 1.74690, 5e-6, "4340 ε_f");
    let cu = law(&ofhc_copper());
    assert_printed(cu.fracture_strain(1.0 / 3.0, 1.0, cu.t_room), 2.32103, 5e-6, "OFHC ε_f");
    // ε̇* = 0 uses the floor: no ln 0.
    assert_eq!(
        steel.fracture_strain(1.0 / 3.0, 0.0, steel.t_room),
        steel.fracture_strain(1.0 / 3.0, 1.0, steel.t_room)
    );
}

// ---------------------------------------------------------------------------------------
// Calls with owned arrays, in any scalar type.

/// ∂σ/∂Δε (column-major) and ∂σ/∂ΔT by num-dual.
fn dual_derivatives<M: Model>(m: &M, p: &Point) -> (Vec<f64>, Vec<f64>) {
    let c = p.call();
    (dual_tangent(m, &c).0, dual_dtemp(m, &c))
}

/// The same by the complex step Im σ(x + ih)/h (Squire & Trapp 1998).
fn complex_tangent<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    model_complex_tangent(m, &p.call(), h)
}

fn rel_err(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let r: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    d / r.max(1e-300)
}

fn shear_factor(n: usize, i: usize) -> f64 {
    if (n == 6 && i >= 3) || (n == 4 && i == 3) {
        2.0
    } else {
        1.0
    }
}

/// A random call that yields: a random prior plastic state (deviatoric εp with ε̄p at least
/// its equivalent), a random deviatoric-plus-volumetric increment large enough to yield, a
/// time increment spanning slow (rate floor) to fast, a temperature between T_r and 0.8 T_m.
fn random_point(rng: &mut StdRng, props: &[f64], n: usize) -> Point {
    let mut eps_p = vec![0.0; n];
    let mut sum = 0.0;
    for (i, e) in eps_p.iter_mut().enumerate().take(n) {
        *e = rng.gen_range(-0.02..0.02) * shear_factor(n, i);
        if i < 3 {
            sum += *e;
        }
    }
    for e in eps_p.iter_mut().take(3) {
        *e -= sum / 3.0;
    }
    let ebar = if rng.gen_bool(0.2) { 0.0 } else { rng.gen_range(0.0..0.3) };
    if ebar == 0.0 {
        eps_p.fill(0.0);
    }
    let mut state0 = eps_p.clone();
    state0.extend([ebar, rng.gen_range(0.0..0.5), rng.gen_range(0.0..50.0)]);
    let strain: Vec<f64> = eps_p.iter().map(|e| e + rng.gen_range(-1e-3..1e-3)).collect();
    let scale = 10f64.powf(rng.gen_range(-2.0..0.5)) * 0.01;
    let dstrain: Vec<f64> = (0..n).map(|i| rng.gen_range(-1.0..1.0) * scale * shear_factor(n, i)).collect();
    let dtime = 10f64.powf(rng.gen_range(-7.0..1.0));
    let (t_r, t_m) = (props[7], props[8]);
    let temp = [rng.gen_range(t_r - 20.0..t_r + 0.6 * (t_m - t_r)), rng.gen_range(-5.0..5.0)];
    Point { props: props.to_vec(), strain, dstrain, state0, temp, dtime }
}

// The analytic tangent and ∂σ/∂ΔT of `johnson-cook` are the num-dual derivatives of its own
// update at random plastic states (both materials, both component counts, rates from the
// floor to 10⁵ × the reference); the complex step agrees too.
#[test]
fn tangent_is_the_derivative_of_the_update() {
    let mut rng = StdRng::seed_from_u64(14);
    let mut plastic = 0;
    let mut above_floor = 0;
    for props in [steel_4340(), ofhc_copper()] {
        for kind in JohnsonCook::KINDS {
            let n = kind.ncomp();
            let m = JohnsonCook::new(kind).unwrap();
            for _ in 0..150 {
                let p = random_point(&mut rng, &props, n);
                let out = run(&m, &p);
                assert_eq!(out.outcome.status, status::OK, "{}", out.outcome.message_text());
                assert_eq!(out.outcome.provides, provides::DSTRESS_DTEMP);
                if out.outcome.branch != 1 {
                    continue;
                }
                plastic += 1;
                let debar = out.state[n] - p.state0[n];
                if debar / (p.dtime * p.props[9]) > 1.0 {
                    above_floor += 1;
                }
                let (t_dual, dt_dual) = dual_derivatives(&m, &p);
                let e = rel_err(&out.tangent, &t_dual);
                assert!(e < 1e-9, "tangent vs num-dual {e:e} at {p:?}");
                let e = rel_err(&out.dstress_dtemp, &dt_dual);
                assert!(e < 1e-9 || dt_dual.iter().all(|x| x.abs() < 1e-9), "∂σ/∂ΔT vs num-dual {e:e}");
                let t_cx = complex_tangent(&m, &p, 1e-30);
                let e = rel_err(&t_cx, &t_dual);
                assert!(e < 1e-11, "complex step vs num-dual {e:e}");
            }
        }
    }
    assert!(plastic > 300 && above_floor > 150, "plastic {plastic}, above the rate floor {above_floor}");
}

// Every plastic step ends on the yield surface of the law at the rate it took and the
// temperature it reached: √(3/2)‖dev σ‖ = σ_y(ε̄p_{n+1}, Δε̄p/(Δt rate0), T + ΔT) (the
// Johnson–Cook flow rule, 1983), and
// the damage indicator grows by Δε̄p/ε_f (Johnson & Cook 1985) with ε_f from the end stress.
#[test]
fn plastic_steps_end_on_the_rate_dependent_yield_surface() {
    let m = JohnsonCook::new(PointKind::Solid3d).unwrap();
    let props = steel_4340();
    let l = law(&props);
    for dtime in [1e3, 1.0, 1e-3, 1e-6] {
        let p = Point {
            props: props.clone(),
            strain: vec![0.0; 6],
            dstrain: vec![0.02, -0.01, -0.01, 0.0, 0.0, 0.004],
            state0: vec![0.0; 9],
            temp: [400.0, 20.0],
            dtime,
        };
        let out = run(&m, &p);
        assert_eq!(out.outcome.branch, 1);
        let s = &out.stress;
        let mean = (s[0] + s[1] + s[2]) / 3.0;
        let j2 = ((s[0] - mean).powi(2) + (s[1] - mean).powi(2) + (s[2] - mean).powi(2)) / 2.0
            + s[3] * s[3]
            + s[4] * s[4]
            + s[5] * s[5];
        let seq = (3.0 * j2).sqrt();
        let ebar = out.state[6];
        let rate = ebar / (dtime * props[9]);
        // Adiabatic heating of the step χ σ_y(T_s) Δε̄p / (ρ c); the end stress on the surface
        // at the end temperature T_s + ΔT.
        let heat = props[12] * l.flow(ebar, rate, 420.0).unwrap().stress * ebar / (props[10] * props[11]);
        assert!((out.state[8] - heat).abs() <= 1e-9 * heat);
        let t_end = 420.0 + heat;
        let flow = l.flow(ebar, rate, t_end).unwrap().stress;
        assert!((seq - flow).abs() <= 1e-9 * flow, "dt {dtime}: σ_eq {seq} vs σ_y {flow}");
        let ef = l.fracture_strain(mean / seq, rate, t_end);
        assert!((out.state[7] - ebar / ef).abs() <= 1e-12, "damage {} vs {}", out.state[7], ebar / ef);
    }
}

// The flawed variant keeps the update and leaves out the rate term: it equals num-dual on the
// rate floor (slow steps) and is wrong above it.
#[test]
fn the_tangent_without_the_rate_term_is_wrong_only_above_the_floor() {
    let good = JohnsonCook::new(PointKind::PlaneStrain).unwrap();
    let bad = JohnsonCook::with_tangent(PointKind::PlaneStrain, JcTangent::NoRateTerm).unwrap();
    assert_eq!(bad.info().name, "johnson-cook-no-rate-term");
    let mk = |dtime| Point {
        props: steel_4340(),
        strain: vec![0.0; 4],
        dstrain: vec![0.01, -0.005, -0.005, 0.003],
        state0: vec![0.0, 0.0, 0.0, 0.0, 0.05, 0.0, 0.0],
        temp: [293.0, 0.0],
        dtime,
    };
    let slow = mk(1e3);
    let (a, b) = (run(&good, &slow), run(&bad, &slow));
    assert_eq!(a.stress, b.stress);
    assert_eq!(a.tangent, b.tangent);
    let fast = mk(1e-4);
    let (a, b) = (run(&good, &fast), run(&bad, &fast));
    assert_eq!(a.stress, b.stress);
    let (t_dual, _) = dual_derivatives(&good, &fast);
    assert!(rel_err(&a.tangent, &t_dual) < 1e-10);
    let e = rel_err(&b.tangent, &t_dual);
    assert!(e > 1e-4, "the flawed tangent should differ above the rate floor: {e:e}");
}

// Guards: a first plastic step from ε̄p = 0 (slope nBε̄pⁿ⁻¹ unbounded there), a zero and a
// huge time increment (ln ε̇* at both ends; a zero one with C = 0, where the rate does not
// matter), a temperature below T_r: finite outputs, exact derivatives. With C > 0 a zero time
// increment is elastic (no plastic flow in no time); at T_m the call fails with a message.
#[test]
fn guards_keep_everything_finite() {
    let m = JohnsonCook::new(PointKind::Solid3d).unwrap();
    let mut props = ofhc_copper();
    props[5] = 0.0; // C = 0 for the loop below
                    // Barely past yield from the virgin state: ε11 of 1.01 × the yield strain in shear.
    let mu = props[0] / (2.0 * (1.0 + props[1]));
    let g_yield = props[2] / (3f64.sqrt() * mu);
    for (gamma, dtime, t0) in
        [(1.000_001 * g_yield, 1e-5, 293.0), (2.0 * g_yield, 0.0, 250.0), (5e-3, 1e12, 800.0)]
    {
        let p = Point {
            props: props.clone(),
            strain: vec![0.0; 6],
            dstrain: vec![0.0, 0.0, 0.0, 0.0, 0.0, gamma],
            state0: vec![0.0; 9],
            temp: [t0, 0.0],
            dtime,
        };
        let out = run(&m, &p);
        assert_eq!((out.outcome.status, out.outcome.branch), (status::OK, 1), "γ {gamma} dt {dtime}");
        assert!(out
            .stress
            .iter()
            .chain(&out.state)
            .chain(&out.tangent)
            .chain(&out.dstress_dtemp)
            .all(|x| x.is_finite()));
        assert!(out.state[6] > 0.0);
        let (t_dual, _) = dual_derivatives(&m, &p);
        assert!(rel_err(&out.tangent, &t_dual) < 1e-8, "γ {gamma} dt {dtime}");
    }
    // C > 0 and Δt = 0: the trial state, elastic tangent, state unchanged; and a zero
    // increment over no time from a plastic state (above the static surface after a fast
    // step) returns the start stress.
    let props = ofhc_copper();
    let fast = Point {
        props: props.clone(),
        strain: vec![0.0; 6],
        dstrain: vec![0.0, 0.0, 0.0, 0.0, 0.0, 4.0 * g_yield],
        state0: vec![0.0; 9],
        temp: [293.0, 0.0],
        dtime: 1e-6,
    };
    let first = run(&m, &fast);
    assert_eq!(first.outcome.branch, 1);
    let out = run(&m, &Point { dtime: 0.0, ..fast.clone() });
    assert_eq!((out.outcome.status, out.outcome.branch), (status::OK, 0));
    assert_eq!(out.state, vec![0.0; 9]);
    let (t_dual, _) = dual_derivatives(&m, &Point { dtime: 0.0, ..fast.clone() });
    assert!(rel_err(&out.tangent, &t_dual) < 1e-14);
    let still = Point {
        strain: fast.dstrain.clone(),
        dstrain: vec![0.0; 6],
        state0: first.state.clone(),
        dtime: 0.0,
        ..fast.clone()
    };
    let out = run(&m, &still);
    assert_eq!(out.outcome.branch, 0);
    assert!(rel_err(&out.stress, &first.stress) < 1e-12, "{:?} vs {:?}", out.stress, first.stress);
    let p = Point {
        props: props.clone(),
        strain: vec![0.0; 6],
        dstrain: vec![0.0; 6],
        state0: vec![0.0; 9],
        temp: [1356.0, 0.0],
        dtime: 1.0,
    };
    let out = run(&m, &p);
    assert_eq!(out.outcome.status, status::FAILED);
    assert!(out.outcome.message_text().contains("T_melt"));
}

#[test]
fn bad_properties_and_kinds_are_refused() {
    let m = JohnsonCook::new(PointKind::Solid3d).unwrap();
    for (i, v, word) in
        [(2, 0.0, "A"), (4, 1.5, "n"), (8, 200.0, "T_melt"), (9, 0.0, "rate0"), (11, 0.0, "heat_capacity")]
    {
        let mut props = steel_4340();
        props[i] = v;
        let p = Point {
            props,
            strain: vec![0.0; 6],
            dstrain: vec![1e-3; 6],
            state0: vec![0.0; 9],
            temp: [293.0, 0.0],
            dtime: 1.0,
        };
        let out = run(&m, &p);
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains(word), "{}", out.outcome.message_text());
    }
    assert!(JohnsonCook::new(PointKind::PlaneStress).is_err());
    let any = AnyModel::new("johnson-cook-no-rate-term", PointKind::Axisymmetric).unwrap();
    assert_eq!((any.info().nstate, any.info().nprop), (7, 18));
}

// One call allocates nothing, in f64, num-dual and complex arithmetic (DEVELOPERS.md: the hot
// path).
#[test]
fn no_call_allocates() {
    fn count<S: Scalar>(m: &JohnsonCook, p: &Point) -> usize {
        model_allocations::<S, _>(m, &p.call(), 1).0
    }
    let mut rng = StdRng::seed_from_u64(7);
    for kind in JohnsonCook::KINDS {
        let m = JohnsonCook::new(kind).unwrap();
        let p = random_point(&mut rng, &steel_4340(), kind.ncomp());
        assert_eq!(count::<f64>(&m, &p), 0);
        assert_eq!(count::<Dual64>(&m, &p), 0);
        assert_eq!(count::<Complex64>(&m, &p), 0);
    }
}
