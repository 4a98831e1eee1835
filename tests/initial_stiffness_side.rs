//! The stiffness at the start of the path, which the `initial-stiffness` trial compares a
//! returned tangent with, is taken on the side of the start where the increment ends: an
//! unloading increment of an open, damaged interface stepped from the start along its own
//! direction, into compression, met a contact penalty stiffer than the opening's, and a
//! routine returning its undamaged opening stiffness read `uniform-scale` (a user-style sweep).
//!
//! The routine: the zoo's cohesive law that returns the undamaged stiffness K at every
//! increment (`cohesive-undamaged`), with a contact penalty of 2K on a closed interface added
//! here (the zoo's law uses K closed as open).

use tancheck::core::{
    check, CallInput, CallOutput, Caller, Fault, Path, PathIncrement, PointKind, PointState,
};
use tancheck::core::{Routine, RoutineInfo, Settings};
use tancheck::models::zoo::zoo_model;

struct StiffContact(tancheck::core::ModelRoutine<tancheck::models::ZooModel>);

impl Routine for StiffContact {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.call(input, output)?;
        if input.strain[0] + input.dstrain[0] < 0.0 {
            output.stress[0] *= 2.0;
            if !output.tangent.is_empty() {
                output.tangent[0] *= 2.0;
            }
        }
        Ok(())
    }
}

#[test]
fn an_unloading_increment_is_compared_with_the_open_sides_stiffness() {
    // K, N, S, G_Ic, G_IIc, η (the zoo's cohesive properties): onset at an opening of 6e-4.
    let props = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];
    let open = |d: f64| PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0]);
    let path = Path {
        name: "opened past onset, then partly closed".into(),
        increments: vec![open(4e-4), open(4e-4), open(4e-4), open(-3e-4), open(-3e-4)],
    };
    let mut r = StiffContact(zoo_model("cohesive-undamaged", PointKind::Cohesive3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let rep =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    for k in [4, 5] {
        let inc = &rep.increments.iter().find(|i| i.index == k).unwrap();
        let d = inc.diagnosis.as_ref().unwrap_or_else(|| panic!("increment {k} passed"));
        assert_eq!(d.finding, "initial-stiffness", "increment {k}: {:#?}", d.causes);
    }
}
