//! Tests of the J2 model against the published worked case, its closed forms (uniaxial
//! elastoplastic modulus, plane-strain reduction) and its refusals of bad input.

use super::*;
use crate::testing::{run, Point};
use tancheck_core::routine::status;
use tancheck_core::Fault;
use tancheck_testkit::call::uniaxial_stress_step;
use tancheck_testkit::tangent::{at, condensed_uniaxial};

/// The worked case of REFERENCES.md: E = 200 GPa, ν = 0.3, σy0 = 250 MPa, H_iso = 1000 MPa,
/// no Voce term, H_kin = 500 MPa.
const WORKED: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

/// |x − printed| within half a unit of the printed value's last digit.
fn assert_printed(x: f64, printed: f64, half_unit: f64, what: &str) {
    assert!((x - printed).abs() <= half_unit, "{what} = {x:.10}, printed {printed}");
}

// Worked case, one increment ε = diag(0.003, 0, 0) from the virgin state. Values derived
// from the closed form of Simo & Taylor (1985), CMAME 48:101–118 / Simo & Hughes (1998)
// Box 3.2 (REFERENCES.md, "J2 plasticity"): σ11 = 667.5774, σ22 = σ33 = 416.2113 MPa,
// Δγ = 1.115432e-3, θ = 0.5446266, θ̄ = 0.5381686, C1111 = 167329.028,
// C2211 = C3311 = 166335.486, C1212 = μθ = 41894.353 MPa.
#[test]
fn worked_case_matches_the_published_closed_form() {
    let m = J2::new(PointKind::Solid3d).unwrap();
    let p = Point::new(&WORKED, 6, 13).dstrain(&[0.003, 0.0, 0.0, 0.0, 0.0, 0.0]);
    let out = run(&m, &p).unwrap();
    assert_eq!(out.outcome.status, status::OK);
    assert_eq!(out.outcome.branch, 1);
    assert_printed(out.stress[0], 667.5774, 5e-5, "σ11");
    assert_printed(out.stress[1], 416.2113, 5e-5, "σ22");
    assert_printed(out.stress[2], 416.2113, 5e-5, "σ33");
    for s in &out.stress[3..] {
        assert_eq!(*s, 0.0);
    }
    // α = √(2/3) Δγ (Simo & Hughes Box 3.2 update of the equivalent plastic strain).
    let dgamma = out.state[6] / sqrt_2_3();
    assert_printed(dgamma, 1.115432e-3, 5e-10, "Δγ");
    let t = &out.tangent;
    assert_printed(at(t, 6, 0, 0), 167329.028, 5e-4, "C1111");
    assert_printed(at(t, 6, 1, 0), 166335.486, 5e-4, "C2211");
    assert_printed(at(t, 6, 2, 0), 166335.486, 5e-4, "C3311");
    for k in 3..6 {
        assert_printed(at(t, 6, k, k), 41894.353, 5e-4, "shear diagonal");
    }
    // θ from C1212 = μθ and θ̄ from C1111 = κ + (4/3)μθ − 2μθ̄ n11², n11² = 2/3
    // (the same closed form).
    let (lambda, mu) = lame(WORKED[0], WORKED[1]);
    let kappa = lambda + 2.0 * mu / 3.0;
    let theta = at(t, 6, 5, 5) / mu;
    assert_printed(theta, 0.5446266, 5e-8, "θ");
    let theta_bar = (kappa + 4.0 / 3.0 * mu * theta - at(t, 6, 0, 0)) / (4.0 / 3.0 * mu);
    assert_printed(theta_bar, 0.5381686, 5e-8, "θ̄");
    // Flow direction n = diag(2, −1, −1)/√6: εp = Δγ n, β = ⅔ H_kin Δγ n.
    let n11 = 2.0 / 6f64.sqrt();
    assert!((out.state[0] - dgamma * n11).abs() < 1e-15);
    assert!((out.state[1] + dgamma * n11 / 2.0).abs() < 1e-15);
    assert!((out.state[7] - 2.0 / 3.0 * 500.0 * dgamma * n11).abs() < 1e-12);
    // The symmetric tangent is stored symmetric.
    for i in 0..6 {
        for j in 0..6 {
            assert!((at(t, 6, i, j) - at(t, 6, j, i)).abs() <= 1e-9 * at(t, 6, 0, 0));
        }
    }
}

// The 4-component kinds carry the 11, 22, 33, 12 rows and columns of the 3D update.
#[test]
fn four_components_are_the_3d_update_without_23_and_13() {
    let de6 = [0.002, -0.0007, 0.0004, 0.0, 0.0, 0.0016];
    let de4 = [0.002, -0.0007, 0.0004, 0.0016];
    let out6 = run(&J2::new(PointKind::Solid3d).unwrap(), &Point::new(&WORKED, 6, 13).dstrain(&de6)).unwrap();
    for kind in [PointKind::PlaneStrain, PointKind::Axisymmetric] {
        let out4 = run(&J2::new(kind).unwrap(), &Point::new(&WORKED, 4, 9).dstrain(&de4)).unwrap();
        assert_eq!(out4.outcome.branch, 1);
        let map = [0, 1, 2, 5];
        for (i, &a) in map.iter().enumerate() {
            assert!((out4.stress[i] - out6.stress[a]).abs() < 1e-10);
            for (j, &b) in map.iter().enumerate() {
                assert!((at(&out4.tangent, 4, i, j) - at(&out6.tangent, 6, a, b)).abs() < 1e-8);
            }
        }
    }
}

// Uniaxial elastoplastic modulus E_t = E h/(E + h), h = H_iso + H_kin: 1488.834 MPa for
// the worked case (REFERENCES.md, derived from the J2 closed form of Simo & Hughes 1998).
// Both the slope of the computed σ11–ε11 path and the tangent condensed to uniaxial
// stress, C11 − C1L C_LL⁻¹ C_L1 (L = 22, 33), must give it.
#[test]
fn uniaxial_stress_tangent_is_the_elastoplastic_modulus() {
    let (e, h) = (WORKED[0], WORKED[3] + WORKED[6]);
    let e_t = e * h / (e + h);
    assert_printed(e_t, 1488.834, 5e-4, "E h/(E+h)");
    let m = J2::new(PointKind::Solid3d).unwrap();
    let mut strain = [0.0; 6];
    let mut state = vec![0.0; 13];
    let mut last: Option<(f64, f64)> = None;
    let mut plastic_steps = 0;
    // The first step (1e-3) stays elastic (yield strain 1.25e-3); the second crosses yield.
    for d11 in [1e-3, 1e-3, 5e-4, 5e-4, 2e-3, 1e-4] {
        let (de, out) = uniaxial_stress_step(&m, &WORKED, &strain, &state, d11);
        for k in 0..6 {
            strain[k] += de[k];
        }
        state.copy_from_slice(&out.state);
        let s11 = out.stress[0];
        if out.outcome.branch == 1 {
            plastic_steps += 1;
            let condensed = condensed_uniaxial(&out.tangent);
            assert!((condensed - e_t).abs() <= 1e-8 * e_t, "condensed tangent {condensed} vs {e_t}");
            if let Some((e_prev, s_prev)) = last {
                let slope = (s11 - s_prev) / (strain[0] - e_prev);
                assert!((slope - e_t).abs() <= 1e-8 * e_t, "path slope {slope} vs {e_t}");
            }
            last = Some((strain[0], s11));
        } else {
            assert!((s11 - e * strain[0]).abs() < 1e-9, "elastic uniaxial stress is E ε");
        }
    }
    assert_eq!(plastic_steps, 5);
}

#[test]
fn bad_properties_and_kinds_are_refused() {
    let m = J2::new(PointKind::Solid3d).unwrap();
    let mut props = WORKED;
    props[2] = 0.0;
    let out = run(&m, &Point::new(&props, 6, 13)).unwrap();
    assert_eq!(out.outcome.status, status::FAILED);
    assert!(out.outcome.message_text().contains("sy0"));
    assert!(out.tangent.iter().all(|x| x.is_nan()));
    let mut props = WORKED;
    props[3] = -300_000.0;
    let out = run(&m, &Point::new(&props, 6, 13)).unwrap();
    assert!(out.outcome.message_text().contains("softening"), "{}", out.outcome.message_text());
    assert!(J2::new(PointKind::PlaneStress).is_err());
    assert!(J2::continuum(PointKind::Uniaxial).is_err());
    assert!(matches!(run(&m, &Point::new(&WORKED, 6, 9)), Err(Fault::Unsupported(_))));
}

// Elastic unloading from a plastic state keeps the state and returns the elastic matrix.
#[test]
fn elastic_steps_keep_the_state() {
    let m = J2::new(PointKind::Solid3d).unwrap();
    let first = run(&m, &Point::new(&WORKED, 6, 13).dstrain(&[0.003, 0.0, 0.0, 0.0, 0.0, 0.0])).unwrap();
    let p = Point::new(&WORKED, 6, 13)
        .strain(&[0.003, 0.0, 0.0, 0.0, 0.0, 0.0])
        .dstrain(&[-0.0005, 0.0, 0.0, 0.0, 0.0, 0.0])
        .state0(&first.state);
    let out = run(&m, &p).unwrap();
    assert_eq!(out.outcome.branch, 0);
    assert_eq!(out.state, first.state);
    let (lambda, mu) = lame(WORKED[0], WORKED[1]);
    assert!((out.stress[0] - (first.stress[0] - (lambda + 2.0 * mu) * 0.0005)).abs() < 1e-9);
    assert!((out.tangent[0] - (lambda + 2.0 * mu)).abs() < 1e-9);
    assert!(out.tangent.iter().chain(&out.state).chain(&out.dstress_dtemp).all(|x| x.is_finite()));
}
