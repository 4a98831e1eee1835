//! The energy probe on a stress that is a function of the strain but no derivative of a
//! stored energy: its closed elastic cycles must find the work done around a loop.

use tancheck::core::probe::{run_suite, ProbeStatus};
use tancheck::core::{Caller, PointKind, PointState, Routine, Settings};

/// Elasticity that is Cauchy-elastic but not hyperelastic: Hooke's law (E, ν) with k ε11 γ12
/// added to σ12 only, and its own tangent. A stress that is a function of the strain, but no
/// derivative of a stored energy: around a loop in ε11 and γ12 the work k ∮ε11 dγ12 is the
/// enclosed area times k (Green's theorem), not zero.
struct Cauchy(tancheck::core::RoutineInfo);

impl Routine for Cauchy {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.0
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        let (e, nu, k) = (input.props[0], input.props[1], input.props[2]);
        let (mu, lambda) = (e / (2.0 * (1.0 + nu)), e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu)));
        let eps: Vec<f64> = (0..6).map(|i| input.strain[i] + input.dstrain[i]).collect();
        let tr = eps[0] + eps[1] + eps[2];
        for (i, &e) in eps.iter().enumerate() {
            output.stress[i] = if i < 3 { lambda * tr + 2.0 * mu * e } else { mu * e };
            for j in 0..6 {
                output.tangent[i + 6 * j] = match (i, j) {
                    (i, j) if i < 3 && j < 3 => lambda + if i == j { 2.0 * mu } else { 0.0 },
                    (i, j) if i == j => mu,
                    _ => 0.0,
                };
            }
            output.dstress_dtemp[i] = 0.0;
        }
        // Engineering shear γ12 in slot 5.
        output.stress[5] += k * eps[0] * eps[5];
        output.tangent[5] += k * eps[5];
        output.tangent[5 + 30] += k * eps[0];
        Ok(())
    }
}

// The energy probe closes a loop in every pair of components: a loop in 11 and 22 alone missed
// a coupling of 11 and 12 that is not mutual (the net work was that of Hooke's law to the last
// digit; a user-style sweep).
#[test]
fn a_stress_that_is_no_derivative_of_an_energy_fails_the_energy_probe() {
    use tancheck::core::probe::ProbeSpec;
    use tancheck::core::{Convention, Path, Shape, ShearMeasure};
    let info = tancheck::core::RoutineInfo {
        name: "cauchy".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 0,
        nprop: 3,
    };
    let path = Path::ramp(Shape::TensionShear, 4e-3, 4, 2);
    let energy = |k: f64| {
        let mut r = Cauchy(info.clone());
        let mut caller = Caller::new(&mut r);
        let start = PointState::zero(&info, 20.0);
        let rep = run_suite(
            &mut caller,
            "e",
            &[ProbeSpec::named("energy")],
            &[200_000.0, 0.3, k],
            &start,
            &path,
            &Settings::default(),
        )
        .unwrap();
        rep.results[0].clone()
    };
    // Hooke's law alone (k = 0) passes.
    assert_eq!(energy(0.0).status, ProbeStatus::Pass, "{:#?}", energy(0.0));
    // k = 1e8 MPa: around the square of side a = 1e-5 in ε11 and γ12 the term's net work
    // k ∮ε11 γ12 dγ12 is k a³/2 (the γ12 legs sit at ε11 = a and at 0; the trapezoid rule is
    // exact for it), of the order of 1e-3 of the work on the way: far above the probe's 1e-10.
    let p = energy(1e8);
    assert_eq!(p.status, ProbeStatus::Fail, "{p:#?}");
    assert!(p.summary.contains("in 11 and 12"), "{}", p.summary);
}
