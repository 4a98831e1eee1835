//! The ∂σ/∂T column at a kink in the temperature: at a zero increment from a point on the
//! Johnson–Cook yield surface (Johnson & Cook 1983, flow stress with thermal softening
//! [1 − T*ᵐ], as in REFERENCES.md), raising the temperature lowers the yield stress (plastic
//! flow, the stress drops) while lowering it keeps the step elastic. The stress is not
//! differentiable in T there and a central difference straddles the kink. A correct routine
//! returns the derivative of the branch it took and passes; a ∂σ/∂T that matches neither side
//! still fails.

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::report::CheckOutcome;
use tancheck::core::{
    CallInput, CallOutput, Fault, Model, ModelRoutine, PointKind, Report, RoutineInfo, Scalar, Scheme,
    Settings, Verdict,
};
use tancheck::models::JohnsonCook;
use tancheck_testkit::check::{only, run_from_zero, summary};

/// The 4340 steel constants of README's Johnson–Cook manifest (A, B, n, C, m, T_room, T_melt,
/// ε̇₀ and the fracture constants from Johnson & Cook 1983 / 1985 as in REFERENCES.md; E, ν,
/// density, heat capacity and the rest are demo values in MPa–mm–s–K units).
const PROPS: [f64; 18] = [
    200000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
    -2.12, 0.002, 0.61,
];

/// A plastic shear increment of −3e-3 (component 12) from 400 K, then `second`
/// (dstrain 12, dtemp): (0, 0) is the zero increment from a point on the yield surface.
fn path(second: (f64, f64)) -> Path {
    let inc = |g12: f64, dtemp: f64| PathIncrement {
        dstrain: [0.0, 0.0, 0.0, 0.0, 0.0, g12],
        dtemp,
        dtime: 1.0,
        hold_stress: None,
    };
    Path { name: "shear, then held".into(), increments: vec![inc(-3e-3, 0.0), inc(second.0, second.1)] }
}

fn run(routine: &mut dyn tancheck::core::Routine, path: &Path, settings: &Settings) -> Report {
    run_from_zero(routine, &PROPS, 400.0, path, settings)
}

/// The central ∂σ/∂T the check measured at increment `inc` (routine form, entry 12/T).
fn central_dtemp_12(r: &Report, inc: usize) -> (f64, f64) {
    let c = r.increments[inc].checks.iter().find(|c| c.scheme == Scheme::Central).unwrap();
    match &c.dstress_dtemp {
        Some(CheckOutcome::Compared(x)) => {
            let e = x.worst.iter().find(|e| e.row == 5).expect("entry 12/T among the worst");
            (e.returned, e.numerical)
        }
        other => panic!("no ∂σ/∂T comparison: {other:?}"),
    }
}

#[test]
fn correct_johnson_cook_at_a_zero_increment_on_the_yield_surface_passes() {
    let mut m = ModelRoutine(JohnsonCook::new(PointKind::Solid3d).unwrap());
    for settings in [Settings::default(), only(Scheme::Central)] {
        let r = run(&mut m, &path((0.0, 0.0)), &settings);
        assert_eq!(r.verdict, Verdict::Pass, "{:?}:\n{}", settings.schemes, summary(&r));
    }
    // The mechanism: the routine took the elastic branch (∂σ₁₂/∂T = 0, the elastic constants
    // do not depend on T), the central difference straddles the kink and reads half the
    // plastic side's derivative; the diagnosis names the kink in the temperature.
    let r = run(&mut m, &path((0.0, 0.0)), &only(Scheme::Central));
    let (returned, central) = central_dtemp_12(&r, 1);
    assert_eq!(returned, 0.0);
    // σ₁₂ < 0 after negative shear; heating softens it toward zero: a positive derivative.
    assert!(central > 0.0, "central ∂σ₁₂/∂T {central}");
    let d = r.increments[1].diagnosis.as_ref().expect("the central check straddled the kink");
    assert!(d.pass, "{}", summary(&r));
    assert!(d.reason.contains("kink in the temperature"), "{}", d.reason);
    assert!(d.reason.contains("backward derivative"), "{}", d.reason);
    assert!(d.dtemp_causes.is_empty(), "{:?}", d.dtemp_causes);
}

#[test]
fn correct_johnson_cook_around_the_yield_surface_passes() {
    let mut m = ModelRoutine(JohnsonCook::new(PointKind::Solid3d).unwrap());
    // Just inside (unloading), just beyond (loading), slightly heated, slightly cooled.
    for second in
        [(1e-9, 0.0), (-1e-9, 0.0), (1e-7, 0.0), (-1e-7, 0.0), (0.0, 1e-6), (0.0, -1e-6), (0.0, 1e-3)]
    {
        for settings in [Settings::default(), only(Scheme::Central)] {
            let r = run(&mut m, &path(second), &settings);
            assert_eq!(r.verdict, Verdict::Pass, "{second:?} {:?}:\n{}", settings.schemes, summary(&r));
        }
    }
}

/// Johnson–Cook whose ∂σ/∂T at the second increment is replaced by `dtemp` (a fixed vector).
#[derive(Clone, Debug)]
struct FixedDtemp {
    base: JohnsonCook,
    dtemp: [f64; 6],
}

impl Model for FixedDtemp {
    fn info(&self) -> &RoutineInfo {
        self.base.info()
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        self.base.evaluate(input, output)?;
        if input.increment == 2 {
            for (o, v) in output.dstress_dtemp.iter_mut().zip(self.dtemp) {
                *o = S::cst(v);
            }
        }
        Ok(())
    }
}

// Negative controls at the kink: the straddled central value (half the plastic side, the
// value the check itself measured on the correct routine) matches neither side and must fail
// where the complex step runs;
// a spurious term along the stress (k·σ, as a temperature-dependent stiffness would add)
// matches neither side and must fail with a ∂σ/∂T finding under every scheme set (its causes
// are ranked against the side the routine took, here the elastic side's zero, so both the
// partial-term and the scale trial explain it).
#[test]
fn a_wrong_dtemp_at_the_kink_still_fails() {
    let mut m = ModelRoutine(JohnsonCook::new(PointKind::Solid3d).unwrap());
    let r = run(&mut m, &path((0.0, 0.0)), &only(Scheme::Central));
    let (_, central) = central_dtemp_12(&r, 1);
    let sigma = r.increments[0].stress.clone();
    let straddled = [0.0, 0.0, 0.0, 0.0, 0.0, central];
    let mut along = [0.0; 6];
    for (a, s) in along.iter_mut().zip(&sigma) {
        *a = -1e-3 * s;
    }
    for (dtemp, central_too) in [(straddled, false), (along, true)] {
        let mut m = ModelRoutine(FixedDtemp { base: JohnsonCook::new(PointKind::Solid3d).unwrap(), dtemp });
        // The straddled value is what a central check at the default step reads, so only
        // the complex step (which does not cross the kink) can hold it against the routine.
        let all = [Settings::default(), only(Scheme::Central)];
        for settings in &all[..if central_too { 2 } else { 1 }] {
            let r = run(&mut m, &path((0.0, 0.0)), settings);
            assert_eq!(
                r.verdict,
                Verdict::TangentFailure,
                "{dtemp:?} {:?}:\n{}",
                settings.schemes,
                summary(&r)
            );
            assert!(r.increments[0].passed(), "{}", summary(&r));
            let f = r.increments[1].finding();
            assert!(f == "dtemp" || f == "dtemp-partial", "{dtemp:?}: finding {f}\n{}", summary(&r));
            let reason = &r.increments[1].diagnosis.as_ref().unwrap().reason;
            assert!(!reason.contains("kink in the temperature"), "{reason}");
        }
    }
}
