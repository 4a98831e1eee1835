//! The viscous-limit probe on a routine that converges to its rate-independent update slowly:
//! a Perzyna-type overstress with exponent m leaves a difference of order (η/Δt)^(1/m), which
//! falls by 10^(1/m) a decade of η (2.5 for m = 2.5). Four decades below η₀ were not enough,
//! and the probe said "the update does not converge" of a correct routine (found by a
//! user-style sweep). Now the decades go on while the difference falls steadily, down to ten
//! below η₀; a difference that levels off still fails with the old words.

use tancheck::core::probe::{run_suite, ProbeSpec, ProbeStatus};
use tancheck::core::routine::{CallInput, CallOutput, Fault, Model, ModelRoutine, RoutineInfo};
use tancheck::core::{Convention, Path, PointKind, PointState, Scalar, Settings, Shape, ShearMeasure};

/// σ = E (ε + Δε) (1 + c g(η/Δt)) componentwise, with g(x) = x^0.4 (`slow`) or a step of 1
/// for any η > 0 (a difference that never goes away); the tangent E (1 + c g) I is consistent.
/// Properties [E, η] (invented).
struct Overstress {
    info: RoutineInfo,
    slow: bool,
}

const C: f64 = 0.1;

impl Model for Overstress {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, eta, dt) = (input.props[0].re(), input.props[1].re(), input.time[1]);
        let g = match (self.slow, eta > 0.0) {
            (_, false) => 0.0,
            (true, true) => (eta / dt).powf(0.4),
            (false, true) => 1.0,
        };
        let f = e * (1.0 + C * g);
        for i in 0..6 {
            output.stress[i] = (input.strain[i] + input.dstrain[i]) * S::cst(f);
            for j in 0..6 {
                output.tangent[i + 6 * j] = S::cst(if i == j { f } else { 0.0 });
            }
            output.dstress_dtemp[i] = S::zero();
        }
        output.energy[0] = S::zero();
        output.energy[1] = S::zero();
        Ok(())
    }
}

fn probe(slow: bool) -> tancheck::core::probe::ProbeResult {
    let info = RoutineInfo {
        name: "overstress".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 0,
        nprop: 2,
    };
    let mut r = ModelRoutine(Overstress { info: info.clone(), slow });
    let mut caller = tancheck::core::Caller::new(&mut r);
    let spec = ProbeSpec { viscosity: Some(1), ..ProbeSpec::named("viscous-limit") };
    let path = Path::ramp(Shape::TensionShear, 1e-3, 4, 0);
    let rep = run_suite(
        &mut caller,
        "viscous",
        &[spec],
        &[1000.0, 1.0],
        &PointState::zero(&info, 20.0),
        &path,
        &Settings::default(),
    )
    .unwrap();
    rep.results.into_iter().next().unwrap()
}

#[test]
fn a_slow_but_steady_convergence_passes_with_its_order() {
    // 0.1 (η/Δt)^0.4: 2.5e-3 at η₀/10⁴ (above the tolerance 1e-3), 4.0e-4 at η₀/10⁶.
    let r = probe(true);
    assert_eq!(r.status, ProbeStatus::Pass, "{}\n{:#?}", r.summary, r.details);
    assert!(r.summary.contains("order 0.40 per decade"), "{}", r.summary);
    assert!(r.value.is_some_and(|v| v <= 1e-3), "{:?}", r.value);
}

#[test]
fn a_difference_that_levels_off_does_not_converge() {
    let r = probe(false);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("does not converge to the rate-independent limit"), "{}", r.summary);
}
