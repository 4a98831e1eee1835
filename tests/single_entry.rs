//! A single tangent entry wrong by 1e-5 of the matrix norm (Mandel–Frobenius) is detected on
//! J2 in every one of the 36 positions, diagonal or off-diagonal, normal or shear, and the
//! report names that entry first.

use tancheck::core::path::{Path, Shape};
use tancheck::core::{
    check, CallInput, CallOutput, Caller, ComplexRoutine, Fault, ModelRoutine, PointKind, PointState,
    Routine, RoutineInfo, Settings, Verdict,
};
use tancheck::models::{reference, AnyModel};

/// J2 with entry (row, col) of its tangent moved by `size` times the Mandel norm.
struct OneEntryOff {
    inner: ModelRoutine<AnyModel>,
    row: usize,
    col: usize,
    size: f64,
}

impl Routine for OneEntryOff {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.inner.call(input, output)?;
        let conv = self.inner.info().convention.clone();
        let mut m = output.tangent.to_vec();
        conv.tangent_to_mandel(&mut m);
        let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt();
        // In routine form the Mandel entry (i, j) is f_σ(i)/f_ε(j) times the routine entry.
        let k = self.row + 6 * self.col;
        output.tangent[k] += self.size * norm * conv.strain_factor(self.col) / conv.stress_factor(self.row);
        Ok(())
    }
    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        self.inner.complex()
    }
}

#[test]
fn one_entry_off_by_1e_minus_5_is_found_in_every_position() {
    let props = [200000.0, 0.3, 250.0, 1000.0, 50.0, 20.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 0);
    for row in 0..6 {
        for col in 0..6 {
            let mut r =
                OneEntryOff { inner: reference("j2", PointKind::Solid3d).unwrap(), row, col, size: 1e-5 };
            let info = r.info().clone();
            let mut caller = Caller::new(&mut r);
            let report =
                check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default())
                    .unwrap();
            assert_eq!(report.verdict, Verdict::TangentFailure, "entry ({row}, {col}) not detected");
            let label = info.convention.entry_label(row, col);
            for inc in &report.increments {
                assert!(!inc.passed(), "entry {label} missed at increment {}", inc.index);
                for c in &inc.checks {
                    if let tancheck::core::report::CheckOutcome::Compared(cmp) = &c.tangent {
                        assert_eq!(cmp.worst[0].label, label, "increment {} {}", inc.index, c.scheme);
                    }
                }
            }
            // Elastic and plastic increments were both among them.
            assert!(report.increments.iter().any(|i| i.state_changed));
            assert!(report.increments.iter().any(|i| !i.state_changed));
        }
    }
}

#[test]
fn the_same_routine_without_the_flaw_passes() {
    let props = [200000.0, 0.3, 250.0, 1000.0, 50.0, 20.0, 500.0];
    let mut r =
        OneEntryOff { inner: reference("j2", PointKind::Solid3d).unwrap(), row: 0, col: 0, size: 0.0 };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 0);
    let report =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert_eq!(report.verdict, Verdict::Pass);
}

/// Without the complex step, a 1e-5 error must not be cleared by a step study that only
/// reaches the forward scheme's looser tolerance: the central check's tolerance decides.
#[test]
fn without_the_complex_step_the_central_tolerance_decides() {
    let props = [200000.0, 0.3, 250.0, 1000.0, 50.0, 20.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 0);
    let settings = Settings { schemes: vec![tancheck::core::Scheme::Central], ..Settings::default() };
    for (row, col) in [(0, 0), (1, 0), (5, 5), (3, 4), (0, 5)] {
        let mut r = OneEntryOff { inner: reference("j2", PointKind::Solid3d).unwrap(), row, col, size: 1e-5 };
        let info = r.info().clone();
        let mut caller = Caller::new(&mut r);
        let report =
            check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &settings).unwrap();
        assert_eq!(
            report.verdict,
            Verdict::TangentFailure,
            "entry ({row}, {col}) cleared without the complex step"
        );
        assert!(report.increments.iter().all(|i| !i.passed()));
    }
}
