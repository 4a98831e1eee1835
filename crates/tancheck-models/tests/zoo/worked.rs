//! Every J2 flaw on the worked case of REFERENCES.md, against its printed values.

use super::*;

// ---------------------------------------------------------------------------------------------
// The worked case of REFERENCES.md (J2 plasticity): E = 200 GPa, ν = 0.3, σy0 = 250 MPa,
// H_iso = 1000 MPa, H_kin = 500 MPa, ε = diag(0.003, 0, 0) from the virgin state.
// C1111 = 167329.028, C2211 = 166335.486, C1212 = μθ = 41894.353 MPa, θ = 0.5446266,
// θ̄ = 0.5381686 (derived from the closed form of Simo & Hughes 1998, Box 3.2).

const C1111: f64 = 167_329.028;
const C1212: f64 = 41_894.353;

fn worked(flaw: J2Flaw, state0: Option<&[f64]>, strain: [f64; 6]) -> Outputs<f64> {
    let m = FlawedJ2::new(flaw, PointKind::Solid3d).unwrap();
    let mut s0 = state0.map_or(vec![0.0; 13], <[f64]>::to_vec);
    s0.resize(m.info().nstate, 0.0);
    let p = Point {
        props: WORKED.to_vec(),
        strain: strain.to_vec(),
        dstrain: vec![0.003, 0.0, 0.0, 0.0, 0.0, 0.0],
        state0: s0,
        ..Point::default()
    };
    run(&m, &p)
}

fn near(x: f64, want: f64, tol: f64, what: &str) {
    assert!((x - want).abs() <= tol, "{what}: {x:.6} vs {want}");
}

#[test]
fn worked_case_values_of_every_flaw() {
    let z = [0.0; 6];
    let (lambda, mu) = lame(WORKED[0], WORKED[1]);
    // Shear columns halved: C1212/2.
    let t = worked(J2Flaw::ShearFactor, None, z).tangent;
    near(t[0], C1111, 5e-4, "C1111");
    for k in 3..6 {
        near(t[k + 6 * k], C1212 / 2.0, 3e-4, "halved shear diagonal");
    }
    // Uniaxial flow (n has no shear part): the permutation is invisible here, the blind spot
    // of uniaxial-only tests (REFERENCES.md, practitioners' tests, common practice).
    let t = worked(J2Flaw::ShearPermuted, None, z).tangent;
    near(t[0], C1111, 5e-4, "C1111");
    for k in 3..6 {
        near(t[k + 6 * k], C1212, 5e-4, "shear diagonal");
    }
    // First plastic increment from the virgin state: λ + 2μ = 269230.769 and μ = 76923.077
    // (REFERENCES.md "Relations", derived).
    let t = worked(J2Flaw::ElasticFirstPlastic, None, z).tangent;
    near(t[0], 269_230.769, 5e-4, "λ + 2μ");
    near(t[1], 115_384.615, 5e-4, "λ");
    near(t[5 + 6 * 5], 76_923.077, 5e-4, "μ");
    // H_kin left out: C1111 − C1111_flawed = (4/3)μ Δθ̄ with n11² = 2/3 (derived).
    let shift = 1.0 / (1.0 + 1000.0 / (3.0 * mu)) - 1.0 / (1.0 + 1500.0 / (3.0 * mu));
    let t = worked(J2Flaw::NoKinematic, None, z).tangent;
    near(t[0], C1111 - 4.0 / 3.0 * mu * shift, 5e-4, "C1111 without H_kin");
    near(t[5 + 6 * 5], C1212, 5e-4, "shear diagonal untouched (n12 = 0)");
    // Times 1000.
    let t = worked(J2Flaw::UnitFactor, None, z).tangent;
    near(t[0], C1111 * 1e3, 0.5, "1000 C1111");
    // Column 13 elastic: μ on its diagonal, the rest consistent.
    let t = worked(J2Flaw::OneColumn, None, z).tangent;
    near(t[4 + 6 * 4], 76_923.077, 5e-4, "μ in column 13");
    near(t[3 + 6 * 3], C1212, 5e-4, "C2323");
    near(t[0], C1111, 5e-4, "C1111");
    // Stale: first the elastic tangent; then, in an unloading increment from the end of the
    // worked one, the consistent tangent of the worked increment.
    let first = worked(J2Flaw::Stale, None, z);
    near(first.tangent[0], lambda + 2.0 * mu, 1e-9, "λ + 2μ");
    let m = FlawedJ2::new(J2Flaw::Stale, PointKind::Solid3d).unwrap();
    let p = Point {
        props: WORKED.to_vec(),
        strain: vec![0.003, 0.0, 0.0, 0.0, 0.0, 0.0],
        dstrain: vec![-1e-4, 0.0, 0.0, 0.0, 0.0, 0.0],
        state0: first.state.clone(),
        ..Point::default()
    };
    let second = run(&m, &p);
    assert_eq!(second.outcome.branch, 0);
    near(second.tangent[0], C1111, 5e-4, "C1111 one increment late");
    near(second.tangent[1], 166_335.486, 5e-4, "C2211 one increment late");
    near(second.tangent[3 + 6 * 3], C1212, 5e-4, "C2323 one increment late");
    near(1.0 - first.state[13], 0.5446266, 5e-8, "θ kept in the state");
    near(first.state[14], 0.5381686, 5e-8, "θ̄ kept in the state");
}
