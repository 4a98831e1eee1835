//! The elastic tangent of the cause trials is taken over a millionth of the increment's time:
//! for a creep routine that returns its elastic stiffness the `elastic-tangent` trial explains
//! the failure at every increment (its unloading step over the increment's time crept, the
//! elastic tangent was off by the creep, and the same flaw was named initial-stiffness,
//! continuum-tangent or unexplained from increment to increment). For linear creep the
//! continuum tangent, the limit of small increments, is that same stiffness, and may come first.

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
        assert!(["elastic-tangent", "continuum-tangent"].contains(&i.finding()), "{}", i.finding());
    }
}
