//! Tests of how the check treats the time increment: the elastic tangent of the cause trials
//! taken over a millionth of the increment's time, and the coverage warning for a path whose
//! increments all take the same time. (A module of its own: they drive `check`, which the
//! modules they test are part of.)

mod elastic_time {
    // The elastic tangent of the cause trials is taken over a millionth of the increment's time:
    // for a creep routine that returns its elastic stiffness the `elastic-tangent` trial explains
    // the failure at every increment (its unloading step over the increment's time crept, the
    // elastic tangent was off by the creep, and the same flaw was named initial-stiffness,
    // continuum-tangent or unexplained from increment to increment). For linear creep the
    // continuum tangent, the limit of small increments, is that same stiffness, and may come first.

    use crate::convention::{Convention, PointKind, ShearMeasure};
    use crate::path::{Path, PathIncrement};
    use crate::report::Keep;
    use crate::routine::{CallInput, CallOutput, Caller, Fault, Model, ModelRoutine, Routine, RoutineInfo};
    use crate::scalar::Scalar;

    /// Linear deviatoric creep in 3D (Norton's law with exponent 1), backward Euler: properties
    /// [K, G, A]; state the creep strain (six entries, engineering shear). The creep strain
    /// increment is A Δt s (s the deviatoric stress at the end), so s = 2G e_tr / (1 + 2G A Δt)
    /// with e_tr the deviatoric trial strain, and p = K tr ε. Consistent tangent K 1⊗1 +
    /// 2G/(1 + 2G A Δt) P_dev; elastic stiffness K 1⊗1 + 2G P_dev (the limit Δt → 0). With
    /// `elastic` it returns the elastic stiffness (a flaw).
    struct Creep {
        info: RoutineInfo,
        elastic: bool,
    }

    impl Model for Creep {
        fn info(&self) -> &RoutineInfo {
            &self.info
        }

        #[allow(clippy::needless_range_loop)]
        fn evaluate<S: Scalar>(
            &self,
            input: &CallInput<'_, S>,
            out: &mut CallOutput<'_, S>,
        ) -> Result<(), Fault> {
            let (k, g, a, dt) = (input.props[0], input.props[1], input.props[2], input.time[1]);
            // Tensor strain minus creep strain (shear halved).
            let mut e = [S::zero(); 6];
            for i in 0..6 {
                let half = if i < 3 { 1.0 } else { 0.5 };
                e[i] = (input.strain[i] + input.dstrain[i] - input.state0[i]) * half;
            }
            let tr = e[0] + e[1] + e[2];
            let f = g * a * dt * 2.0 + 1.0;
            for i in 0..6 {
                let dev = if i < 3 { e[i] - tr / 3.0 } else { e[i] };
                let s = g * 2.0 * dev / f;
                out.stress[i] = if i < 3 { s + k * tr } else { s };
                // Engineering creep strain: A Δt s, shear doubled.
                out.state[i] = input.state0[i] + a * dt * s * if i < 3 { 1.0 } else { 2.0 };
            }
            let gd = if self.elastic { g } else { g / f };
            for j in 0..6 {
                for i in 0..6 {
                    let c = if i < 3 && j < 3 {
                        k + gd * 2.0 * (if i == j { 1.0 } else { 0.0 } - 1.0 / 3.0)
                    } else if i == j {
                        gd
                    } else {
                        S::zero()
                    };
                    out.tangent[i + 6 * j] = c;
                }
            }
            out.outcome.status = 0;
            out.outcome.branch = 1;
            for i in 0..6 {
                out.dstress_dtemp[i] = S::zero();
            }
            out.energy[0] = S::zero();
            out.energy[1] = S::zero();
            Ok(())
        }
    }

    fn creep(elastic: bool) -> ModelRoutine<Creep> {
        ModelRoutine(Creep {
            info: RoutineInfo {
                name: "creep".into(),
                convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
                nstate: 6,
                nprop: 3,
            },
            elastic,
        })
    }

    fn check(elastic: bool) -> crate::report::Report {
        // 2G A Δt = 1: the deviatoric part of the consistent tangent is half the elastic one.
        let props = [1000.0, 500.0, 1e-3];
        let inc = PathIncrement::strain([1e-3, 0.0, 0.0, 0.0, 0.0, 5e-4]);
        let path = Path { name: "ramp".into(), increments: vec![inc; 4] };
        let mut r = creep(elastic);
        let start = crate::driver::PointState::zero(r.info(), 20.0);
        let mut caller = Caller::new(&mut r);
        crate::check::run_with(&mut caller, &props, start, &path, &Default::default(), Keep::All, &mut |_| {})
            .unwrap()
    }

    #[test]
    fn a_creep_routine_returning_its_elastic_stiffness_is_named_so() {
        assert!(check(false).increments.iter().all(|i| i.passed()), "the consistent creep tangent passes");
        let r = check(true);
        assert_eq!(r.increments.iter().filter(|i| i.index > 0 && !i.passed()).count(), 4);
        for i in r.increments.iter().filter(|i| i.index > 0) {
            let d = i.diagnosis.as_ref().expect("a diagnosis");
            let elastic = d.causes.iter().find(|h| h.cause == crate::diagnose::causes::Cause::ElasticTangent);
            assert!(elastic.is_some_and(|h| h.explains), "increment {}: {:#?}", i.index, d.causes);
            // The elastic trial is the tangent of Δt → 0 (two short steps extrapolated): it
            // leaves rounding, not the creep of a millionth of the step, and leads.
            assert!(elastic.is_some_and(|h| h.error_left < 1e-10), "increment {}: {:#?}", i.index, d.causes);
            assert_eq!(i.finding(), "elastic-tangent", "{:#?}", d.causes);
        }
    }
}

mod one_time_increment {
    use crate::bisect::testing::{Bar, ViscousBar, PROPS};
    use crate::path::{Path, PathIncrement};
    use crate::routine::{Caller, Routine};

    fn coverage(r: &mut dyn Routine, props: &[f64], dtimes: &[f64]) -> Vec<String> {
        let incs = dtimes
            .iter()
            .map(|&dt| PathIncrement { dtime: dt, ..PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]) })
            .collect();
        let path = Path { name: "p".into(), increments: incs };
        let start = crate::driver::PointState::zero(r.info(), 20.0);
        let mut caller = Caller::new(r);
        crate::check::run(&mut caller, props, start, &path, &Default::default()).unwrap().coverage
    }

    // A routine whose stress depends on the time increment, checked on a path whose increments
    // all take the same time, is checked at that time only: a coverage warning says so (a
    // tangent without its time dependence passed such a path with no word). Not for a varied
    // time increment, nor for a routine that does not depend on it.
    #[test]
    fn one_time_increment_for_a_time_dependent_routine_is_a_coverage_warning() {
        let said = |c: &[String]| c.iter().any(|c| c.contains("every increment takes the same time"));
        let visco = [1000.0, 1000.0];
        assert!(said(&coverage(&mut ViscousBar::new(false), &visco, &[0.5, 0.5, 0.5])));
        assert!(!said(&coverage(&mut ViscousBar::new(false), &visco, &[0.5, 0.25, 0.5])));
        assert!(!said(&coverage(&mut Bar::new(false), &PROPS, &[0.5, 0.5, 0.5])));
    }
}
