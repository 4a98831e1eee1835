//! The ply damage model (`ply`) and its flawed variants: points on the Hashin (1980) failure
//! envelope for T300/914C strengths (REFERENCES.md, "Composite ply failure"), the crack-band
//! energy identity (Bažant & Oh 1983: dissipated energy per unit volume × L = G per mode),
//! irreversibility, the viscous limit, the snap-back limit, and num-dual / complex-step
//! derivatives of its own update in every branch, with and without viscosity.

use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::routine::status;
use tancheck_core::{Model, PointKind};
use tancheck_models::orthotropic::global_stiffness;
use tancheck_models::ply::{branch, mode};
use tancheck_models::{Ply, PlyFlaw};
use tancheck_testkit::call::model_allocations;
use tancheck_testkit::point::{complex_tangent, dual_tangent, run, Point};

mod common;

// ---------------------------------------------------------------------------------------
// Properties.

/// T300/914C (Soden, Hinton & Kaddour 1998): E1 138, E2 11, G12 5.5 GPa, ν12 0.28 (memory);
/// Xt 1500, Xc 900, Yt 27, Yc 200, S 80 MPa (read, secondary). E3 = E2, ν13 = ν12, G13 = G12
/// (transverse isotropy, common practice), ν23 0.4 and G23 = E2/(2(1 + ν23)): assumed; no
/// check below depends on them. Fracture energies (N/mm) 90, 80, 0.25, 2.0 and L = 0.5 mm:
/// assumed (fibre values of the order quoted for carbon/epoxy, from memory; G_mc raised so
/// that the length-dropping variant, which acts as L = 1 mm, does not snap back); the energy
/// checks are identities that hold for any admissible value. η = 0. Units MPa, mm.
fn t300(axis_deg: f64) -> Vec<f64> {
    let (c, s) = (axis_deg.to_radians().cos(), axis_deg.to_radians().sin());
    let g23 = 11_000.0 / (2.0 * 1.4);
    vec![
        138_000.0, 11_000.0, 11_000.0, 0.28, 0.28, 0.4, 5_500.0, 5_500.0, g23, c, s, 0.0, -s, c, 0.0, 1500.0,
        900.0, 27.0, 200.0, 80.0, 90.0, 80.0, 0.25, 2.0, 0.5, 0.0,
    ]
}

const XT: f64 = 1500.0;
const XC: f64 = 900.0;
const YT: f64 = 27.0;
const YC: f64 = 200.0;
const SL: f64 = 80.0;

// ---------------------------------------------------------------------------------------
// One call.

fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let r: f64 = b.iter().map(|x| x * x).sum::<f64>().sqrt();
    if r == 0.0 {
        d
    } else {
        d / r
    }
}

// ---------------------------------------------------------------------------------------
// Strains that give a chosen effective stress in the material frame.

/// Plane-stress material strain (ε1, ε2, γ12) for the effective stress (σ1, σ2, τ12), from
/// the reduced compliance (Jones 1999, ch. 2; from memory).
fn ps_strain(p: &[f64], s: [f64; 3]) -> [f64; 3] {
    let (e1, e2, nu12, g12) = (p[0], p[1], p[3], p[6]);
    [s[0] / e1 - nu12 * s[1] / e1, -nu12 * s[0] / e1 + s[1] / e2, s[2] / g12]
}

/// Material → global engineering strain in plane stress for material axis 1 at angle θ from
/// x (the strain transformation of Jones 1999, ch. 2; from memory).
fn to_global(theta_deg: f64, e: [f64; 3]) -> [f64; 3] {
    let (c, s) = (theta_deg.to_radians().cos(), theta_deg.to_radians().sin());
    [
        e[0] * c * c + e[1] * s * s - e[2] * s * c,
        e[0] * s * s + e[1] * c * c + e[2] * s * c,
        2.0 * (e[0] - e[1]) * s * c + e[2] * (c * c - s * s),
    ]
}

/// The 3D material strain for an effective stress in the material frame: the orthotropic
/// compliance of the props.
fn solid_strain(p: &[f64], s: [f64; 6]) -> [f64; 6] {
    let (e1, e2, e3, n12, n13, n23, g12, g13, g23) = (p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7], p[8]);
    [
        s[0] / e1 - n12 * s[1] / e1 - n13 * s[2] / e1,
        -n12 * s[0] / e1 + s[1] / e2 - n23 * s[2] / e2,
        -n13 * s[0] / e1 - n23 * s[1] / e2 + s[2] / e3,
        s[3] / g23,
        s[4] / g13,
        s[5] / g12,
    ]
}

// ---------------------------------------------------------------------------------------
// The envelope: each failure index is 1 at its strength (Hashin 1980; REFERENCES.md:
// "each failure index equals 1 at its uniaxial strength state — exact check"), and combined
// points of the plane-stress criteria (derived from the criterion: F = cos² + sin² = 1).

/// Plane-stress points σ̃ = (σ1, σ2, τ12) on the envelope, with the mode they reach.
fn envelope_points() -> Vec<([f64; 3], &'static [usize])> {
    let h = std::f64::consts::FRAC_1_SQRT_2;
    vec![
        ([XT, 0.0, 0.0], &[mode::FT]),  // read: Xt
        ([-XC, 0.0, 0.0], &[mode::FC]), // read: Xc
        ([0.0, YT, 0.0], &[mode::MT]),  // read: Yt
        ([0.0, -YC, 0.0], &[mode::MC]), // read: Yc (S_T = Yc/2)
        // read: S. Fibre tension carries (τ/S)² too, and with σ̃11, σ̃22 = 0 up to rounding in
        // an off-axis ply either sign may count: the pair is checked as one below.
        ([0.0, 0.0, SL], &[mode::MT]),
        ([0.0, YT * h, SL * h], &[mode::MT]), // derived: (σ2/Yt)² + (τ/S)² = 1
        ([0.0, -0.6 * YC, 0.8 * SL], &[mode::MC]), // derived: (σ2/Yc)² + (τ/S)² = 1
        ([0.8 * XT, 0.0, 0.6 * SL], &[mode::FT]), // derived: (σ1/Xt)² + (τ/S)² = 1
    ]
}

#[test]
fn failure_starts_on_the_hashin_envelope_in_plane_stress_at_any_ply_angle() {
    let m = Ply::new(PointKind::PlaneStress).unwrap();
    for theta in [0.0, 30.0, -55.0, 90.0] {
        let props = t300(theta);
        for (s, modes) in envelope_points() {
            // At exactly 1 the branch is decided by rounding: not checked.
            for (scale, want_branch) in
                [(0.999, Some(branch::ELASTIC)), (1.0, None), (1.001, Some(branch::GROWTH))]
            {
                let sc = [s[0] * scale, s[1] * scale, s[2] * scale];
                let e = to_global(theta, ps_strain(&props, sc));
                let p = Point {
                    props: props.clone(),
                    strain: vec![0.0; 3],
                    dstrain: e.to_vec(),
                    state0: vec![0.0; 8],
                    dtime: 1.0,
                    ..Point::default()
                };
                let out = run(&m, &p);
                assert_eq!(out.outcome.status, status::OK);
                // The largest failure measure reached in the mode is √F = the load factor.
                for &md in modes {
                    // σ̃22 = 0 up to rounding may count as compression: either matrix mode.
                    let r = if s[1] == 0.0 && md == mode::MT {
                        out.state[md].max(out.state[mode::MC])
                    } else {
                        out.state[md]
                    };
                    assert!((r - scale).abs() < 1e-9, "θ {theta} σ̃ {s:?}: r = {r}, want {scale}");
                    if scale > 1.0 {
                        let pair = if s[1] == 0.0 && md == mode::MT { out.state[4 + mode::MC] } else { 0.0 };
                        assert!(out.state[4 + md].max(pair) > 0.0);
                    }
                }
                // Only the modes of the point are on the envelope (the others stay below).
                for other in 0..4 {
                    let fibre_shear = s[0] == 0.0 && s[1] == 0.0 && (other == mode::FT || other == mode::MC);
                    if !modes.contains(&other) && !fibre_shear {
                        assert!(
                            out.state[other] < 0.999,
                            "θ {theta} σ̃ {s:?}: mode {other} r = {}",
                            out.state[other]
                        );
                    }
                }
                if let Some(b) = want_branch {
                    assert_eq!(out.outcome.branch, b, "θ {theta} σ̃ {s:?} × {scale}");
                }
            }
        }
    }
}

#[test]
fn failure_starts_at_the_uniaxial_strengths_in_solid_3d() {
    let m = Ply::new(PointKind::Solid3d).unwrap();
    let props = t300(0.0);
    // (σ̃ in the material frame, mode): the uniaxial strength states (read), and a transverse
    // shear τ23 = S_T = Yc/2 (the strength the model assumes, common practice).
    let points: [([f64; 6], usize); 6] = [
        ([XT, 0.0, 0.0, 0.0, 0.0, 0.0], mode::FT),
        ([-XC, 0.0, 0.0, 0.0, 0.0, 0.0], mode::FC),
        ([0.0, YT, 0.0, 0.0, 0.0, 0.0], mode::MT),
        ([0.0, 0.0, -YC, 0.0, 0.0, 0.0], mode::MC),
        ([0.0, 0.0, 0.0, 0.0, SL, 0.0], mode::MT),
        ([0.0, 0.0, 0.0, YC / 2.0, 0.0, 0.0], mode::MT),
    ];
    for (s, md) in points {
        let e = solid_strain(&props, s);
        let p = Point {
            props: props.clone(),
            strain: vec![0.0; 6],
            dstrain: e.to_vec(),
            state0: vec![0.0; 8],
            dtime: 1.0,
            ..Point::default()
        };
        let out = run(&m, &p);
        assert!((out.state[md] - 1.0).abs() < 1e-9, "σ̃ {s:?}: r = {}", out.state[md]);
        assert!(out.state[4..].iter().all(|&d| d.abs() < 1e-12), "σ̃ {s:?}: damage at onset");
    }
}

// ---------------------------------------------------------------------------------------
// Crack band: on a path of uniaxial material strain in a mode's direction the dissipated
// energy per unit volume times L is that mode's fracture energy (Bažant & Oh 1983), for every
// admissible L.

/// ∫ σ_k dε_k to beyond full failure, material strain in component k only, on a grid holding
/// the onset and failure strains (the curve is piecewise linear: the trapezoid rule is exact).
fn dissipated<M: Model>(m: &M, props: &[f64], n: usize, k: usize, sign: f64, eps0: f64, epsf: f64) -> f64 {
    let mut grid: Vec<f64> = (0..=20).map(|i| eps0 * i as f64 / 20.0).collect();
    grid.extend((1..=400).map(|i| eps0 + (epsf - eps0) * i as f64 / 400.0));
    grid.push(1.2 * epsf);
    let mut state = vec![0.0; 8];
    let mut strain = vec![0.0; n];
    let (mut work, mut s_prev) = (0.0, 0.0);
    for w in grid.windows(2) {
        let mut de = vec![0.0; n];
        de[k] = sign * (w[1] - w[0]);
        let p = Point {
            props: props.to_vec(),
            strain: strain.clone(),
            dstrain: de.clone(),
            state0: state.clone(),
            dtime: 1.0,
            ..Point::default()
        };
        let out = run(m, &p);
        assert_eq!(out.outcome.status, status::OK, "{}", out.outcome.message_text());
        work += 0.5 * (s_prev + out.stress[k]) * de[k];
        s_prev = out.stress[k];
        strain[k] += de[k];
        state.copy_from_slice(&out.state);
    }
    assert!(s_prev.abs() < 1e-9, "not fully failed: σ = {s_prev}");
    work
}

#[test]
fn energy_per_unit_volume_times_length_is_the_fracture_energy_in_each_mode() {
    for len in [0.1, 0.5, 1.0] {
        let mut props = t300(0.0);
        props[24] = len;
        // Plane stress: the reduced stiffness Q11, Q22 relate the uniaxial strain to σ̃.
        let den = 1.0 - 0.28 * 0.28 * 11_000.0 / 138_000.0;
        let (q11, q22) = (138_000.0 / den, 11_000.0 / den);
        let ps = Ply::new(PointKind::PlaneStress).unwrap();
        for (md, k, sign, x, q) in [
            (mode::FT, 0, 1.0, XT, q11),
            (mode::FC, 0, -1.0, XC, q11),
            (mode::MT, 1, 1.0, YT, q22),
            (mode::MC, 1, -1.0, YC, q22),
        ] {
            let g = props[20 + md];
            let (eps0, epsf) = (x / q, 2.0 * g / (x * len));
            let w = dissipated(&ps, &props, 3, k, sign, eps0, epsf);
            assert!(
                (w * len - g).abs() < 1e-9 * g,
                "{} L {len}: W L = {}, G = {g}",
                mode::NAMES[md],
                w * len
            );
        }
        // Solid 3d, fibre modes (the matrix modes see σ̃33 ≠ 0 under uniaxial material strain).
        let c = global_stiffness(&props).unwrap();
        let solid = Ply::new(PointKind::Solid3d).unwrap();
        for (md, sign, x) in [(mode::FT, 1.0, XT), (mode::FC, -1.0, XC)] {
            let g = props[20 + md];
            let w = dissipated(&solid, &props, 6, 0, sign, x / c[0][0], 2.0 * g / (x * len));
            assert!((w * len - g).abs() < 1e-9 * g, "solid {} L {len}: W L = {}", mode::NAMES[md], w * len);
        }
    }
    // The flawed variant that drops L dissipates G/1 mm whatever L is: W L ≠ G at L ≠ 1.
    let mut props = t300(0.0);
    props[24] = 0.5;
    let flawed = Ply::with_flaw(PointKind::PlaneStress, PlyFlaw::LengthDropped).unwrap();
    let den = 1.0 - 0.28 * 0.28 * 11_000.0 / 138_000.0;
    let g = props[20];
    let w = dissipated(&flawed, &props, 3, 0, 1.0, XT / (138_000.0 / den), 2.0 * g / XT);
    assert!((w * 0.5 - 0.5 * g).abs() < 1e-9 * g, "length dropped: W L = {}", w * 0.5);
}

#[test]
fn a_length_that_snaps_back_is_refused_with_the_largest_admissible_length() {
    let m = Ply::new(PointKind::PlaneStress).unwrap();
    let mut props = t300(0.0);
    // Matrix compression has the smallest limit here: L_max = 2 G_mc Q22 / Yc² (crack band,
    // REFERENCES.md: derived from L_e ≤ 2 E G_f / σ_f²).
    let den = 1.0 - 0.28 * 0.28 * 11_000.0 / 138_000.0;
    let lmax = 2.0 * 2.0 * (11_000.0 / den) / (YC * YC);
    props[24] = lmax * 1.01;
    let p = Point {
        props: props.clone(),
        strain: vec![0.0; 3],
        dstrain: vec![0.0; 3],
        state0: vec![0.0; 8],
        dtime: 1.0,
        ..Point::default()
    };
    let out = run(&m, &p);
    assert_eq!(out.outcome.status, status::FAILED);
    let msg = out.outcome.message_text();
    assert!(msg.contains("matrix compression"), "{msg}");
    let shown: f64 = msg.rsplit("= ").next().unwrap().trim().parse().unwrap();
    assert!((shown - lmax).abs() < 1e-5 * lmax, "{msg} vs {lmax}");
    props[24] = lmax * 0.99;
    let out = run(&m, &Point { props, ..p });
    assert_eq!(out.outcome.status, status::OK);
}

// ---------------------------------------------------------------------------------------
// Irreversibility and the viscous limit.

#[test]
fn damage_never_decreases_and_the_healing_variant_heals() {
    let props = t300(20.0);
    for (flaw, heals) in [(PlyFlaw::None, false), (PlyFlaw::Healing, true)] {
        let m = Ply::with_flaw(PointKind::PlaneStress, flaw).unwrap();
        let load = to_global(20.0, ps_strain(&props, [0.0, 1.3 * YT, 0.4 * SL]));
        let p = Point {
            props: props.clone(),
            strain: vec![0.0; 3],
            dstrain: load.to_vec(),
            state0: vec![0.0; 8],
            dtime: 1.0,
            ..Point::default()
        };
        let loaded = run(&m, &p);
        assert_eq!(loaded.outcome.branch, branch::GROWTH);
        let d = loaded.state[4 + mode::MT];
        assert!(d > 0.0);
        let back = Point {
            strain: load.to_vec(),
            dstrain: load.iter().map(|x| -0.7 * x).collect(),
            state0: loaded.state.clone(),
            ..p
        };
        let un = run(&m, &back);
        let d2 = un.state[4 + mode::MT];
        if heals {
            assert!(d2 < d, "healing variant kept d");
        } else {
            assert_eq!(d2, d);
            assert_eq!(un.outcome.branch, branch::DAMAGED);
            // Secant unloading: σ = (1 − D) C ε, so the stress is 0.3 of the stress at the same
            // damage and the full load.
            let full = run(&m, &Point { strain: vec![0.0; 3], dstrain: load.to_vec(), ..back.clone() });
            for i in 0..3 {
                assert!((un.stress[i] - 0.3 * full.stress[i]).abs() < 1e-9 * full.stress[i].abs().max(1.0));
            }
        }
    }
}

#[test]
fn the_viscous_update_tends_to_the_rate_independent_one() {
    let m = Ply::new(PointKind::PlaneStress).unwrap();
    let props = t300(0.0);
    let load = ps_strain(&props, [0.0, 1.5 * YT, 0.5 * SL]);
    let p = Point {
        props: props.clone(),
        strain: vec![0.0; 3],
        dstrain: load.to_vec(),
        state0: vec![0.0; 8],
        dtime: 0.01,
        ..Point::default()
    };
    let inviscid = run(&m, &p);
    let mut last = f64::INFINITY;
    for eta in [1e-2, 1e-4, 1e-6, 1e-8] {
        let mut q = p.clone();
        q.props[25] = eta;
        let v = run(&m, &q);
        let err = rel(&v.stress, &inviscid.stress);
        // Backward Euler: d_v − d = η (d_v,n − d)/(η + Δt), so the error falls like η/Δt.
        assert!(err < last, "η {eta}: {err} not below {last}");
        assert!(err < 2.0 * eta / 0.01, "η {eta}: {err}");
        last = err;
    }
}

// ---------------------------------------------------------------------------------------
// The tangent against num-dual and the complex step, in every branch.

fn random_point(rng: &mut StdRng, kind: PointKind, eta: f64) -> Point {
    let theta = rng.gen_range(-90.0..90.0);
    let mut props = t300(theta);
    if kind == PointKind::Solid3d {
        // Arbitrary axes in 3D.
        for a in &mut props[9..15] {
            *a = rng.gen_range(-1.0..1.0);
        }
    }
    props[25] = eta;
    let n = if kind == PointKind::Solid3d { 6 } else { 3 };
    // Strains around the matrix and fibre onsets (ε₀ about 0.0025 and 0.011).
    let scale = [0.015, 0.004, 0.004, 0.006, 0.006, 0.03];
    let slots: &[usize] = if n == 6 { &[0, 1, 2, 3, 4, 5] } else { &[0, 1, 5] };
    let strain: Vec<f64> = slots.iter().map(|&s| rng.gen_range(-1.0..1.0) * scale[s]).collect();
    let dstrain: Vec<f64> = slots.iter().map(|&s| rng.gen_range(-0.3..0.3) * scale[s]).collect();
    let mut state0 = vec![0.0; 8];
    for m in 0..4 {
        if rng.gen_bool(0.5) {
            state0[m] = rng.gen_range(1.0..3.0);
            state0[4 + m] = rng.gen_range(0.0..0.6);
        } else if rng.gen_bool(0.1) {
            // Beyond full failure in this mode (r_f is at most about 15 for these props).
            state0[m] = rng.gen_range(20.0..40.0);
            state0[4 + m] = if rng.gen_bool(0.5) { 1.0 } else { 0.9 };
        }
    }
    Point { props, strain, dstrain, state0, dtime: rng.gen_range(0.001..0.1), ..Point::default() }
}

#[test]
fn tangent_is_the_derivative_of_the_update_in_every_branch() {
    let mut rng = StdRng::seed_from_u64(0x91e_0015);
    for kind in [PointKind::PlaneStress, PointKind::Solid3d] {
        for eta in [0.0, 0.02] {
            let m = Ply::new(kind).unwrap();
            let mut seen = [0usize; 4];
            for _ in 0..3000 {
                let p = random_point(&mut rng, kind, eta);
                let out = run(&m, &p);
                assert_eq!(out.outcome.status, status::OK, "{}", out.outcome.message_text());
                let (dual, branches) = dual_tangent(&m, &p);
                if branches.iter().any(|&b| b != out.outcome.branch) {
                    continue; // on a branch boundary
                }
                let err = rel(&out.tangent, &dual);
                assert!(err < 1e-10, "{kind:?} η {eta} branch {}: {err}\n{p:?}", out.outcome.branch);
                let cs = complex_tangent(&m, &p, 1e-30);
                assert!(rel(&cs, &dual) < 1e-10);
                // Damage never decreases, per mode.
                for k in 0..8 {
                    assert!(out.state[k] >= p.state0[k], "{kind:?} state {k} fell");
                }
                seen[out.outcome.branch as usize] += 1;
            }
            assert!(seen.iter().all(|&c| c > 20), "{kind:?} η {eta}: branches seen {seen:?}");
        }
    }
}

#[test]
fn flawed_tangents_are_wrong_in_damage_growth_only() {
    let mut rng = StdRng::seed_from_u64(0x91e_0016);
    for kind in [PointKind::PlaneStress, PointKind::Solid3d] {
        for (flaw, eta) in [
            (PlyFlaw::Secant, 0.0),
            (PlyFlaw::NoCoupling, 0.0),
            (PlyFlaw::ViscousNoFactor, 0.02),
            (PlyFlaw::LengthDropped, 0.0),
            (PlyFlaw::Healing, 0.0),
        ] {
            let m = Ply::with_flaw(kind, flaw).unwrap();
            let (mut wrong_growth, mut growth) = (0, 0);
            for _ in 0..1500 {
                let p = random_point(&mut rng, kind, eta);
                let out = run(&m, &p);
                let (dual, branches) = dual_tangent(&m, &p);
                if branches.iter().any(|&b| b != out.outcome.branch) {
                    continue;
                }
                let err = rel(&out.tangent, &dual);
                if out.outcome.branch == branch::GROWTH {
                    growth += 1;
                    if err > 1e-6 {
                        wrong_growth += 1;
                    }
                } else {
                    assert!(err < 1e-10, "{flaw:?} wrong outside growth: {err}");
                }
            }
            let consistent = matches!(flaw, PlyFlaw::LengthDropped | PlyFlaw::Healing);
            if consistent {
                assert_eq!(wrong_growth, 0, "{flaw:?}");
            } else {
                assert!(wrong_growth * 2 > growth, "{flaw:?} {kind:?}: {wrong_growth} of {growth}");
            }
            assert!(growth > 50, "{flaw:?}: {growth}");
        }
    }
}

#[test]
fn undamaged_tangent_is_the_orthotropic_stiffness() {
    let m = Ply::new(PointKind::Solid3d).unwrap();
    let mut props = t300(0.0);
    props[9..15].copy_from_slice(&[0.3, -1.2, 0.7, 2.0, 0.1, -0.4]);
    let c = global_stiffness(&props).unwrap();
    let p = Point {
        props,
        strain: vec![0.0; 6],
        dstrain: vec![1e-5; 6],
        state0: vec![0.0; 8],
        dtime: 1.0,
        ..Point::default()
    };
    let out = run(&m, &p);
    assert_eq!(out.outcome.branch, branch::ELASTIC);
    for i in 0..6 {
        for j in 0..6 {
            assert!((out.tangent[i + 6 * j] - c[i][j]).abs() < 1e-9 * c[0][0]);
        }
    }
}

#[test]
fn no_call_allocates_and_bad_input_is_refused() {
    let mut rng = StdRng::seed_from_u64(3);
    let m = Ply::new(PointKind::PlaneStress).unwrap();
    let p = random_point(&mut rng, PointKind::PlaneStress, 0.01);
    let mut bad = p.props.clone();
    bad[24] = 1e6; // snaps back: the message is formatted without allocating
    assert_eq!(model_allocations::<f64, _>(&m, &p.call(), 1).0, 0);
    let (made, outcome) = model_allocations::<f64, _>(&m, &Point { props: bad, ..p.clone() }.call(), 1);
    assert_eq!(made, 0);
    assert_eq!(outcome.status, status::FAILED);
    // Out-of-plane axes in plane stress, a negative strength, a negative viscosity.
    for (k, v, words) in [(11, 0.5, "1-2 plane"), (17, -1.0, "strengths"), (25, -1.0, "viscosity")] {
        let mut props = t300(0.0);
        props[k] = v;
        let out = run(&m, &Point { props, ..p.clone() });
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains(words), "{}", out.outcome.message_text());
    }
    assert!(Ply::new(PointKind::PlaneStrain).is_err());
}
