//! The J2 reference model with softening (negative H_iso, negative Voce Q, negative H_kin), as
//! the stability (localization) probe uses it: the consistent tangent against num-dual on both
//! branches, the uniaxial elastoplastic modulus E h/(E + h) with h < 0 (REFERENCES.md,
//! "J2 plasticity"), the loss of ellipticity of the continuum tangent at the critical moduli
//! of Rudnicki & Rice (1975) (REFERENCES.md, "Localization"), and the failed status of a step
//! whose softening would take the yield stress to zero.

use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::routine::status;
use tancheck_core::{Model, PointKind};
use tancheck_models::J2;
use tancheck_testkit::call::uniaxial_stress_step;
use tancheck_testkit::point::{dual_tangent, run, Point};
use tancheck_testkit::tangent::{at, condensed_uniaxial};
use tancheck_testkit::tensor::{deviatoric, random_tensor, slots, tensor_norm};

/// Relative Mandel–Frobenius error (the fourth-order tensor's norm) of a tangent.
fn mandel_error(m: &J2, got: &[f64], reference: &[f64]) -> f64 {
    let conv = &m.info().convention;
    let (mut a, mut b) = (got.to_vec(), reference.to_vec());
    conv.tangent_to_mandel(&mut a);
    conv.tangent_to_mandel(&mut b);
    let d: f64 = a.iter().zip(&b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    d / b.iter().map(|y| y * y).sum::<f64>().sqrt()
}

fn deviatoric_random(rng: &mut StdRng, n: usize) -> [f64; 6] {
    deviatoric(random_tensor(rng, n))
}

/// A softening variant: H_iso and H_kin as fractions of the point's E, Q as a fraction of
/// its σy0, b as it is.
struct Softening {
    name: &'static str,
    /// H_iso / E.
    h_iso: f64,
    /// Q / σy0.
    q: f64,
    /// b.
    b: f64,
    /// H_kin / E.
    h_kin: f64,
}

const SOFTENING: [Softening; 5] = [
    Softening { name: "linear isotropic, above h_cr", h_iso: -0.125, q: 0.0, b: 0.0, h_kin: 0.0 },
    Softening { name: "linear isotropic, beyond h_cr", h_iso: -0.5, q: 0.0, b: 0.0, h_kin: 0.0 },
    Softening { name: "Voce saturating softening", h_iso: 0.0, q: -0.4, b: 150.0, h_kin: 0.0 },
    Softening { name: "kinematic softening", h_iso: 0.01, q: 0.0, b: 0.0, h_kin: -0.1 },
    Softening { name: "mixed", h_iso: -0.2, q: -0.1, b: 80.0, h_kin: 0.05 },
];

/// A random softening state: random elastic constants and σy0, a prior plastic state with
/// K(α_n) ≥ 0.4 σy0, a start stress inside or on the yield surface, and an increment whose
/// size spans three decades of the yield strain.
fn random_point(rng: &mut StdRng, n: usize, s: &Softening) -> Point {
    let e = rng.gen_range(70_000.0..210_000.0);
    let nu = rng.gen_range(0.0..0.45);
    let sy0 = rng.gen_range(100.0..500.0);
    let (h_iso, q, b, h_kin) = (s.h_iso * e, s.q * sy0, s.b, s.h_kin * e);
    let props = vec![e, nu, sy0, h_iso, q, b, h_kin];
    let k = |a: f64| sy0 + h_iso * a + q * (1.0 - (-b * a).exp());
    // α_n: up to where K has lost 60% of σy0 (or 10 yield strains when it does not soften).
    let mut alpha_max = 10.0 * sy0 / e;
    while k(alpha_max) < 0.4 * sy0 {
        alpha_max *= 0.5;
    }
    let alpha = if rng.gen_bool(0.2) { 0.0 } else { rng.gen_range(0.0..alpha_max) };
    // εp deviatoric with √(2/3)‖εp‖ ≤ α, β along εp.
    let d = deviatoric_random(rng, n);
    let scale = alpha / (2.0f64 / 3.0).sqrt() / tensor_norm(&d) * rng.gen_range(0.0..1.0);
    let mut eps_p = [0.0; 6];
    let mut beta = [0.0; 6];
    let kin = 2.0 / 3.0 * h_kin * rng.gen_range(0.5..1.0);
    for i in 0..6 {
        eps_p[i] = d[i] * scale;
        beta[i] = kin * eps_p[i];
    }
    let m = deviatoric_random(rng, n);
    let r = if rng.gen_bool(0.3) { 1.0 } else { rng.gen_range(0.0..1.0) };
    let radius = r * (2.0f64 / 3.0).sqrt() * k(alpha) / tensor_norm(&m);
    let pressure = rng.gen_range(-2.0..2.0) * sy0;
    let mu = e / (2.0 * (1.0 + nu));
    let bulk = e / (3.0 * (1.0 - 2.0 * nu));
    let mut strain = [0.0; 6];
    for i in 0..6 {
        let dev_sigma = radius * m[i] + beta[i];
        strain[i] = eps_p[i] + dev_sigma / (2.0 * mu) + if i < 3 { pressure / (3.0 * bulk) } else { 0.0 };
    }
    let dir = deviatoric_random(rng, n);
    let size = sy0 / e * 10f64.powf(rng.gen_range(-2.5..0.5));
    let voigt =
        |t: &[f64; 6]| slots(n).iter().map(|&s| if s >= 3 { 2.0 * t[s] } else { t[s] }).collect::<Vec<_>>();
    let mut de = [0.0; 6];
    for i in 0..6 {
        de[i] = size * (dir[i] + 0.3 * rng.gen_range(-1.0..1.0) * if i < 3 { 1.0 } else { 0.0 });
    }
    let mut state0 = voigt(&eps_p);
    state0.push(alpha);
    state0.extend(slots(n).iter().map(|&s| beta[s]));
    Point { props, strain: voigt(&strain), dstrain: voigt(&de), state0, ..Point::default() }
}

// The consistent tangent (Simo & Taylor 1985; Simo & Hughes 1998 Box 3.2) is the derivative
// of the update also when the hardening is negative: against num-dual (an independent
// library) to 1e-12 at random softening states, both branches reached. A drawn step whose
// softening would exhaust the yield stress must fail with a message that says so; every
// plastic step that succeeds ends with a positive yield stress.
#[test]
fn softening_tangent_is_the_derivative_of_its_update() {
    let mut rng = StdRng::seed_from_u64(0x50f7_0001);
    for kind in J2::KINDS {
        let m = J2::new(kind).unwrap();
        for s in &SOFTENING {
            let mut count = [0usize; 3];
            for k in 0..400 {
                let p = random_point(&mut rng, kind.ncomp(), s);
                let out = run(&m, &p);
                if out.outcome.status == status::FAILED {
                    assert!(
                        out.outcome.message_text().contains("softening"),
                        "{}",
                        out.outcome.message_text()
                    );
                    count[2] += 1;
                    continue;
                }
                assert_eq!(out.outcome.status, status::OK, "{}", out.outcome.message_text());
                let (dual, branches) = dual_tangent(&m, &p);
                assert!(branches.iter().all(|&b| b == out.outcome.branch), "{kind} {} #{k}: branch", s.name);
                let err = mandel_error(&m, &out.tangent, &dual);
                assert!(
                    err <= 1e-12,
                    "{kind} {} #{k} (branch {}): {err:.3e}\n{p:?}",
                    s.name,
                    out.outcome.branch
                );
                count[out.outcome.branch as usize] += 1;
                // The yield stress at the end of a plastic step stays positive.
                let n = kind.ncomp();
                let alpha = out.state[n];
                let (sy0, h_iso, q, b) = (p.props[2], p.props[3], p.props[4], p.props[5]);
                assert!(sy0 + h_iso * alpha + q * (1.0 - (-b * alpha).exp()) > 0.0);
            }
            eprintln!(
                "j2 softening {kind} {}: {} elastic, {} plastic, {} exhausted",
                s.name, count[0], count[1], count[2]
            );
            assert!(count[0] >= 80 && count[1] >= 80, "{kind} {}: {count:?}", s.name);
        }
    }
}

// Uniaxial elastoplastic modulus E_t = E h/(E + h), h = H_iso + H_kin (REFERENCES.md, derived
// from the J2 closed form of Simo & Hughes 1998), with h < 0: the slope of the computed
// σ11–ε11 path and the tangent condensed to uniaxial stress, C11 − C1L C_LL⁻¹ C_L1
// (L = 22, 33), both give it, and the stress falls as σy0 + h εp11.
#[test]
fn uniaxial_softening_modulus_is_e_h_over_e_plus_h() {
    let m = J2::new(PointKind::Solid3d).unwrap();
    let e = 200_000.0;
    // (H_iso, H_kin): h = −E/8 isotropic; h = −E/8 split as isotropic softening and kinematic
    // hardening; h = −E/2 (beyond the uniaxial critical modulus −E/4, still admitted).
    for (h_iso, h_kin) in [(-25_000.0, 0.0), (-30_000.0, 5_000.0), (-100_000.0, 0.0)] {
        let props = [e, 0.3, 250.0, h_iso, 0.0, 0.0, h_kin];
        let h: f64 = h_iso + h_kin;
        let e_t = e * h / (e + h);
        let mut strain = [0.0; 6];
        let mut state = vec![0.0; 13];
        let mut last: Option<(f64, f64)> = None;
        let mut plastic = 0;
        // Yield strain 1.25e-3: the first step stays elastic, the second crosses yield; the
        // path ends at ε11 = 2.35e-3, short of σ11 = 0 (at 2.5e-3 for h = −E/2).
        for d11 in [1e-3, 1e-3, 1e-4, 1e-4, 5e-5, 1e-4] {
            let (de, out) = uniaxial_stress_step(&m, &props, &strain, &state, d11);
            for k in 0..6 {
                strain[k] += de[k];
            }
            state.copy_from_slice(&out.state);
            let s11 = out.stress[0];
            if out.outcome.branch == 1 {
                plastic += 1;
                let condensed = condensed_uniaxial(&out.tangent);
                assert!((condensed - e_t).abs() <= 1e-8 * e_t.abs(), "h {h}: condensed {condensed} vs {e_t}");
                if let Some((e_prev, s_prev)) = last {
                    let slope = (s11 - s_prev) / (strain[0] - e_prev);
                    assert!((slope - e_t).abs() <= 1e-8 * e_t.abs(), "h {h}: path slope {slope} vs {e_t}");
                }
                // σ11 = σy0 + h εp11 in uniaxial stress (εp11 = state[0]).
                assert!((s11 - (250.0 + h * state[0])).abs() <= 1e-9 * 250.0, "h {h}: σ11 {s11}");
                last = Some((strain[0], s11));
            }
        }
        assert_eq!(plastic, 5, "h {h}");
        assert!(last.unwrap().1 < 250.0, "the stress has softened");
    }
}

/// Voigt index of the tensor pair (i, j) in the canonical order 11, 22, 33, 23, 13, 12.
fn voigt(i: usize, j: usize) -> usize {
    match (i.min(j), i.max(j)) {
        (a, b) if a == b => a,
        (1, 2) => 3,
        (0, 2) => 4,
        _ => 5,
    }
}

/// det of the acoustic tensor Q_jk = N_i C_ijkl N_l of a 6×6 tangent (engineering-shear
/// columns hold the tensor components C_ijkl).
fn acoustic_det(t: &[f64], nrm: [f64; 3]) -> f64 {
    let mut q = [[0.0; 3]; 3];
    for (j, row) in q.iter_mut().enumerate() {
        for (k, x) in row.iter_mut().enumerate() {
            for i in 0..3 {
                for l in 0..3 {
                    *x += nrm[i] * at(t, 6, voigt(i, j), voigt(k, l)) * nrm[l];
                }
            }
        }
    }
    q[0][0] * (q[1][1] * q[2][2] - q[1][2] * q[2][1]) - q[0][1] * (q[1][0] * q[2][2] - q[1][2] * q[2][0])
        + q[0][2] * (q[1][0] * q[2][1] - q[1][1] * q[2][0])
}

/// The smallest det Q(N)/μ³ over unit normals N (θ from axis 1 in 0.05° steps, φ about it
/// at a few angles), and the cos²θ where it is reached.
fn min_acoustic(t: &[f64], mu: f64) -> (f64, f64) {
    let mut best = (f64::INFINITY, 0.0);
    for phi_deg in [0.0f64, 23.0, 45.0, 71.0, 90.0] {
        let phi = phi_deg.to_radians();
        for k in 0..=1800 {
            let th = (k as f64 * 0.05).to_radians();
            let nrm = [th.cos(), th.sin() * phi.cos(), th.sin() * phi.sin()];
            let d = acoustic_det(t, nrm) / (mu * mu * mu);
            if d < best.0 {
                best = (d, th.cos() * th.cos());
            }
        }
    }
    best
}

/// The continuum tangent of `j2-continuum` after one plastic step from the virgin state along
/// the deviatoric strain direction `dir` (the flow direction n is then dir's deviator).
fn continuum_tangent(h_iso: f64, nu: f64, dir: [f64; 6]) -> Vec<f64> {
    let m = J2::continuum(PointKind::Solid3d).unwrap();
    let props = vec![200_000.0, nu, 250.0, h_iso, 0.0, 0.0, 0.0];
    let p = Point {
        props,
        strain: vec![0.0; 6],
        dstrain: dir.map(|x| 4e-3 * x).to_vec(),
        state0: vec![0.0; 13],
        ..Point::default()
    };
    let out = run(&m, &p);
    assert_eq!((out.outcome.status, out.outcome.branch), (status::OK, 1), "{}", out.outcome.message_text());
    out.tangent
}

// Loss of ellipticity (Rudnicki & Rice 1975, JMPS 23; Rice 1976; REFERENCES.md "Localization",
// derived): with the continuum tangent of associated J2, uniaxial tension loses ellipticity at
// h_cr = −E/4 for any ν, the band normal at cos²θ = (2 − ν)/3 from the tension axis; in pure
// shear (the plane-strain flow direction diag(1, −1, 0)) at h_cr = 0. Here h = H_iso: det Q stays
// positive 4% above h_cr and turns negative 4% below, for two Poisson ratios.
#[test]
fn continuum_tangent_loses_ellipticity_at_the_critical_modulus() {
    let e = 200_000.0;
    for nu in [0.3, 0.1] {
        let mu = e / (2.0 * (1.0 + nu));
        let tension = [1.0, -0.5, -0.5, 0.0, 0.0, 0.0];
        let (above, _) = min_acoustic(&continuum_tangent(-0.24 * e, nu, tension), mu);
        let (below, cos2) = min_acoustic(&continuum_tangent(-0.26 * e, nu, tension), mu);
        assert!(above > 0.0, "ν {nu}: h = −0.24E still elliptic, min det Q/μ³ = {above:e}");
        assert!(below < 0.0, "ν {nu}: h = −0.26E lost ellipticity, min det Q/μ³ = {below:e}");
        let want = (2.0 - nu) / 3.0;
        assert!((cos2 - want).abs() < 0.02, "ν {nu}: band normal cos²θ = {cos2}, Rudnicki–Rice {want}");

        let shear = [1.0, -1.0, 0.0, 0.0, 0.0, 0.0];
        let (above, _) = min_acoustic(&continuum_tangent(0.01 * e, nu, shear), mu);
        let (below, _) = min_acoustic(&continuum_tangent(-0.01 * e, nu, shear), mu);
        assert!(above > 0.0 && below < 0.0, "ν {nu}: pure shear h_cr = 0: {above:e}, {below:e}");
    }
}

// A step whose softening would take the yield stress to zero fails with status 2 and a
// message instead of returning a reversed stress; the same step cut in pieces that stop short
// of K = 0 succeeds. E = 200 GPa, σy0 = 250 MPa, H_iso = −E/8: K reaches 0 at α = 0.01.
#[test]
fn exhausting_the_yield_stress_fails_the_step() {
    let m = J2::new(PointKind::Solid3d).unwrap();
    let props = vec![200_000.0, 0.3, 250.0, -25_000.0, 0.0, 0.0, 0.0];
    let big = 0.02;
    let p = Point {
        props: props.clone(),
        strain: vec![0.0; 6],
        dstrain: vec![big, -0.5 * big, -0.5 * big, 0.0, 0.0, 0.0],
        state0: vec![0.0; 13],
        ..Point::default()
    };
    let out = run(&m, &p);
    assert_eq!(out.outcome.status, status::FAILED);
    assert!(out.outcome.message_text().contains("yield stress"), "{}", out.outcome.message_text());
    assert!(out.stress.iter().all(|x| x.is_nan()));
    let small = 0.003;
    let p = Point { dstrain: vec![small, -0.5 * small, -0.5 * small, 0.0, 0.0, 0.0], ..p };
    let out = run(&m, &p);
    assert_eq!((out.outcome.status, out.outcome.branch), (status::OK, 1));
    assert!(out.stress[0] > 0.0 && out.stress[0] < 250.0 * 1.5, "tension stays tension: {}", out.stress[0]);
}
