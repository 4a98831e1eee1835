//! A stress that does not move with the strain: the derivative is zero, and a difference
//! quotient of it is rounding alone.
//!
//! A perfectly plastic return to the apex of a pressure-dependent surface (or any update that
//! ends on a fixed stress) computes that stress by arithmetic that depends on the strain, a
//! trial stress less its return, so the perturbed calls give the same stress to a few
//! roundings. A correct routine returns a zero tangent. The central difference then held a
//! matrix of rounding against it (error 1, a FAIL with exit 1 without a complex twin), and the
//! one-sided quotients of the kink probe, unrelated roundings of equal size, read as a kink.
//! Now a difference tangent below its rounding floor (16 ε · stress size / (step · tolerance))
//! is measured against that floor, and a gap between one-sided quotients that grows as the
//! step shrinks is rounding, not a kink.

use tancheck::core::driver::PointState;
use tancheck::core::report::Keep;
use tancheck::core::routine::{CallInput, CallOutput, Fault, Routine, RoutineInfo};
use tancheck::core::{check, Caller, Convention, Path, PointKind, Report, Shape, ShearMeasure, Verdict};

/// The fixed stress's pressure, the stiffness of the trial stress it is returned from and a
/// shift of that trial stress (invented for the test: the shift makes the sum round in a
/// binade above the trial term, so the rounding depends on the strain).
const APEX: f64 = -8.3;
const TRIAL_MODULUS: f64 = 7.7e4;
const SHIFT: f64 = 100.3;
/// Young's modulus and Poisson's ratio of the elastic tangent a flawed routine returns.
const E: f64 = 1.0e4;
const NU: f64 = 0.25;

/// Every increment ends at the fixed stress, computed as trial less return.
struct Apex {
    info: RoutineInfo,
    /// Return the elastic tangent (a flaw) instead of zero.
    elastic: bool,
}

impl Routine for Apex {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        let trace: f64 = (0..3).map(|i| input.strain[i] + input.dstrain[i]).sum();
        let trial = SHIFT + TRIAL_MODULUS * trace;
        for i in 0..6 {
            output.stress[i] = if i < 3 { (trial - TRIAL_MODULUS * trace) + (APEX - SHIFT) } else { 0.0 };
        }
        output.state[0] = input.state0[0] + 1.0;
        if input.want_tangent {
            output.tangent.iter_mut().for_each(|x| *x = 0.0);
            if self.elastic {
                let lambda = E * NU / ((1.0 + NU) * (1.0 - 2.0 * NU));
                let mu = E / (2.0 * (1.0 + NU));
                for j in 0..6 {
                    for i in 0..6 {
                        let v = match (i < 3, j < 3) {
                            (true, true) => lambda + if i == j { 2.0 * mu } else { 0.0 },
                            (false, false) if i == j => mu,
                            _ => 0.0,
                        };
                        output.tangent[i + 6 * j] = v;
                    }
                }
            }
        }
        output.energy[0] = 0.0;
        output.energy[1] = 0.0;
        Ok(())
    }
}

fn run(elastic: bool) -> Report {
    let info = RoutineInfo {
        name: "apex".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 1,
        nprop: 0,
    };
    let mut r = Apex { info: info.clone(), elastic };
    let mut caller = Caller::new(&mut r);
    let path = Path::ramp(Shape::Hydrostatic, 1e-3, 6, 0);
    let start = PointState::zero(&info, 20.0);
    check::run_with(&mut caller, &[], start, &path, &Default::default(), Keep::All, &mut |_| {}).unwrap()
}

#[test]
fn a_zero_tangent_of_a_fixed_stress_passes_without_a_twin() {
    let r = run(false);
    assert_eq!(r.calls.complex, 0, "no twin: the central difference judges alone");
    // The difference quotients are rounding, not zero (otherwise this test shows nothing).
    let noisy = r.increments.iter().any(|i| {
        i.checks.iter().any(
            |c| matches!(&c.tangent, tancheck::core::report::CheckOutcome::Compared(x) if x.error() > 0.0),
        )
    });
    assert!(noisy, "the quotients were exactly zero: the test routine makes no rounding");
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}", r.increments.iter().find(|i| !i.passed()));
}

#[test]
fn an_elastic_tangent_where_the_stress_is_fixed_fails_and_is_no_kink() {
    let r = run(true);
    assert_eq!(r.verdict, Verdict::TangentFailure);
    for i in &r.increments {
        if let Some(d) = &i.diagnosis {
            assert!(!d.pass, "increment {}: {}", i.index, d.reason);
            let k = d.kink.as_ref().expect("the kink probe ran");
            assert!(!k.detected, "increment {}: rounding read as a kink: {:?}", i.index, k.gaps);
            assert_ne!(d.finding, "kink-neither-side", "increment {}", i.index);
        }
        // The error is measured against the rounding floor, not against the rounding itself
        // (which read 1e13 before): the elastic tangent is thousands of floors away.
        for c in &i.checks {
            if let tancheck::core::report::CheckOutcome::Compared(x) = &c.tangent {
                assert!(x.error() > 1.0 && x.error() < 1e9, "increment {}: error {:e}", i.index, x.error());
            }
        }
    }
}
