//! The energy probe's closed elastic cycle on a total-form thermo-elastic law started away
//! from its reference temperature at a zero start stress: the law's own stress there is the
//! thermal stress −3Kα(T − T₀) on the diagonal, the start given is zero. The cycle starts from
//! the law's own stress and does no net work (it failed with the first step's mismatch, and a
//! correct law read as one that does work in an elastic cycle; a user-style sweep); the probe
//! says what it did. Invented numbers; the law is linear thermo-elasticity (any text on it,
//! e.g. Boley & Weiner 1960, from memory).

use tancheck::core::path::{Path, Shape};
use tancheck::core::probe::energy::Energy;
use tancheck::core::probe::{Probe, ProbeEnv, ProbeSpec, ProbeStatus};
use tancheck::core::{
    CallInput, CallOutput, Caller, Convention, Fault, Model, ModelRoutine, PointKind, PointState,
    RoutineInfo, Scalar, Settings, ShearMeasure,
};

/// σ = C (ε − α (T − T₀) I), C isotropic of E and ν; properties [E, ν, α, T₀]; no state.
#[derive(Clone, Debug)]
struct TotalThermal(RoutineInfo);

impl Model for TotalThermal {
    fn info(&self) -> &RoutineInfo {
        &self.0
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, nu, alpha, t0) = (input.props[0], input.props[1], input.props[2], input.props[3]);
        let lam = e * nu / ((nu + 1.0) * (-(nu * 2.0) + 1.0));
        let mu = e / ((nu + 1.0) * 2.0);
        let theta = alpha * (input.temp[0] + input.temp[1] - t0);
        let eps: Vec<S> = (0..6)
            .map(|i| input.strain[i] + input.dstrain[i] - if i < 3 { theta } else { S::zero() })
            .collect();
        let tr = eps[0] + eps[1] + eps[2];
        for (i, &x) in eps.iter().enumerate() {
            out.stress[i] = if i < 3 { lam * tr + mu * x * 2.0 } else { mu * x };
            out.dstress_dtemp[i] = if i < 3 { -(lam * 3.0 + mu * 2.0) * alpha } else { S::zero() };
            for j in 0..6 {
                out.tangent[j * 6 + i] = match (i < 3, j < 3) {
                    (true, true) => lam + if i == j { mu * 2.0 } else { S::zero() },
                    (false, false) if i == j => mu,
                    _ => S::zero(),
                };
            }
        }
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        Ok(())
    }
}

#[test]
fn a_closed_cycle_starts_from_the_laws_own_stress() {
    let info = RoutineInfo {
        name: "total-thermal".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 0,
        nprop: 4,
    };
    let path = Path::ramp(Shape::TensionShear, 1e-3, 4, 4);
    let spec = ProbeSpec::named("energy");
    let settings = Settings::default();
    // 20 °C against a reference of 100 °C: a thermal stress of about 3 K α 80 = 240 MPa.
    let props = [200000.0, 0.3, 1.2e-5, 100.0];
    let start = PointState::zero(&info, 20.0);
    let mut routine = ModelRoutine(TotalThermal(info.clone()));
    let mut caller = Caller::new(&mut routine);
    let env = ProbeEnv { props: &props, start: &start, path: &path, settings: &settings, spec: &spec };
    let r = Energy.run(&mut caller, &env).unwrap();
    assert_eq!(r.status, ProbeStatus::Pass, "{r:?}");
    assert!(r.details.iter().any(|d| d.contains("the routine's own stress at the start")), "{:?}", r.details);
    // At the reference temperature the start given is the law's own, and nothing is said.
    let start = PointState::zero(&info, 100.0);
    let mut caller = Caller::new(&mut routine);
    let env = ProbeEnv { props: &props, start: &start, path: &path, settings: &settings, spec: &spec };
    let r = Energy.run(&mut caller, &env).unwrap();
    assert_eq!(r.status, ProbeStatus::Pass, "{r:?}");
    assert!(!r.details.iter().any(|d| d.contains("own stress at the start")), "{:?}", r.details);
}
