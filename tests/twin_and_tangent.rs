//! A complex-step twin that is not complex-step safe beside a tangent that is wrong as well.
//!
//! With a right tangent, a broken twin is told apart because the real schemes agree with the
//! tangent and the complex step does not. With a wrong tangent no real scheme agrees with it,
//! and the twin was trusted: the causes were judged against its broken derivative (a planted
//! scaling read as `elastic-tangent` with an error of 1.02 left, in a user's Cam-clay-type
//! routine). Now a twin whose derivative is far from a real reference while the real schemes
//! settle a decade closer to the returned tangent is set aside there too, and the causes are
//! judged against the real reference: the verdict is the wrong tangent's (exit 1), the finding
//! the planted cause, and the increment says the twin was set aside.

use num_complex::Complex64;
use tancheck::core::driver::PointState;
use tancheck::core::report::Keep;
use tancheck::core::routine::{CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};
use tancheck::core::{check, Caller, Path, PointKind, Report, Shape, Verdict};
use tancheck::models::zoo::zoo_model;

/// E, ν, σy, H (linear isotropic hardening), then the zoo J2's saturation terms (none here).
const J2_PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 1200.0, 0.0, 0.0, 0.0];

/// A routine whose returned tangent is `factor` times its own (a planted uniform scaling).
struct Scaled<R> {
    inner: R,
    factor: f64,
}

impl<R: Routine> Routine for Scaled<R> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        let r = self.inner.call(input, output);
        if input.want_tangent {
            output.tangent.iter_mut().for_each(|x| *x *= self.factor);
        }
        r
    }
    tancheck::core::pass_on_to_inner!();
}

impl<R: Routine> ComplexRoutine for Scaled<R> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.inner.complex().expect("the model has its twin").call_complex(input, output)
    }
}

fn run(model: &str, factor: f64) -> Report {
    let inner = zoo_model(model, PointKind::Solid3d).unwrap();
    let mut r = Scaled { inner, factor };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    // Tension and shear into the plastic range (plastic from the third increment on).
    let path = Path::ramp(Shape::TensionShear, 0.006, 8, 0);
    check::run_with(
        &mut caller,
        &J2_PROPS,
        PointState::zero(&info, 20.0),
        &path,
        &Default::default(),
        Keep::All,
        &mut |_| {},
    )
    .unwrap()
}

/// The failing increments' (finding, twin set aside) pairs.
fn findings(r: &Report) -> Vec<(usize, String, bool)> {
    r.increments
        .iter()
        .filter_map(|i| {
            i.diagnosis.as_ref().filter(|d| !d.pass).map(|d| (i.index, d.finding.clone(), d.twin_unsafe))
        })
        .collect()
}

#[test]
fn a_broken_twin_beside_a_scaled_tangent_is_set_aside_and_the_scaling_named() {
    let r = run("twin-conjugate", 1.3);
    assert_eq!(r.verdict, Verdict::TangentFailure, "{:#?}", findings(&r));
    let f = findings(&r);
    assert!(!f.is_empty());
    // Every failing increment names the planted scaling, judged against a real reference.
    for (i, finding, _) in &f {
        assert_eq!(finding, "uniform-scale", "increment {i}: {f:#?}");
    }
    // Where the twin's derivative is off (the plastic increments), it is set aside and said.
    let set_aside: Vec<usize> = f.iter().filter(|x| x.2).map(|x| x.0).collect();
    assert!(!set_aside.is_empty(), "the twin is set aside somewhere: {f:#?}");
    for i in &set_aside {
        let d = r.increments.iter().find(|x| x.index == *i).and_then(|x| x.diagnosis.as_ref()).unwrap();
        assert!(
            d.reason.contains("levels off") && d.reason.contains("not complex-step safe"),
            "{}",
            d.reason
        );
    }
}

#[test]
fn a_sound_twin_beside_a_scaled_tangent_is_not_blamed() {
    let r = run("j2", 1.3);
    assert_eq!(r.verdict, Verdict::TangentFailure);
    let f = findings(&r);
    assert!(!f.is_empty());
    for (i, finding, twin) in &f {
        assert_eq!(finding, "uniform-scale", "increment {i}: {f:#?}");
        assert!(!twin, "increment {i}: a sound twin set aside");
    }
}

#[test]
fn a_broken_twin_beside_a_right_tangent_is_still_the_twin_verdict() {
    let r = run("twin-conjugate", 1.0);
    assert_eq!(r.verdict, Verdict::TwinNotSafe, "{:#?}", findings(&r));
}
