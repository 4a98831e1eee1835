//! A finite-strain check whose routine never changed its state variables along the path says
//! that only the elastic (or stateless) branch was checked, as the point check's coverage
//! does (a finite J2 check that never yielded read as one plastic throughout; a user-style
//! sweep). The routine: the neo-Hookean model with one state variable of its own, kept as it
//! is or raised at every call.
//!
//! An update that does not settle (a call from its own end state moves it again: here an
//! isotropic stress c·n·1 with n raised at every call) is objective: `rotation-increment`
//! compares a rigid increment with the same start's zero increment and passes, saying the
//! update does not settle (it read "NOT objective"; a user-style sweep).

use tancheck::core::finite::check::run;
use tancheck::core::finite::{
    FiniteInfo, FiniteInput, FiniteModelRoutine, FiniteOutput, FinitePathSpec, FiniteRoutine, FiniteSettings,
    StressMeasure, TangentMeasure,
};
use tancheck::core::routine::Fault;
use tancheck::core::Verdict;
use tancheck::models::finite::NeoHookean;

struct OneState(FiniteModelRoutine<NeoHookean>, FiniteInfo, bool);

impl FiniteRoutine for OneState {
    fn info(&self) -> &FiniteInfo {
        &self.1
    }
    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        let mut none: [f64; 0] = [];
        let mut inner = FiniteOutput {
            stress: &mut *output.stress,
            state: &mut none,
            tangent: &mut *output.tangent,
            energy: &mut *output.energy,
            outcome: &mut *output.outcome,
        };
        self.0.call(&FiniteInput { state0: &[], ..*input }, &mut inner)?;
        output.state[0] = input.state0[0] + if self.2 { 1.0 } else { 0.0 };
        if self.2 {
            // An isotropic stress growing with every call (objective: 1 rotates into itself).
            for k in 0..3 {
                output.stress[k] += output.state[0];
            }
        }
        Ok(())
    }
}

#[test]
fn a_state_that_never_changes_is_said() {
    let said = |grows: bool| {
        let model = NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
        let mut info = tancheck::core::finite::FiniteModel::info(&model).clone();
        info.nstate = 1;
        let mut r = OneState(FiniteModelRoutine(model), info, grows);
        let path =
            FinitePathSpec::UniaxialStretch { stretch: 1.2, increments: 3, rotation: None }.build().unwrap();
        let rep = run(&mut r, &[1000.0, 0.3], &[0.0], &path, FiniteSettings::default());
        assert_eq!(rep.verdict, Verdict::Pass, "{rep:#?}");
        rep.notes.iter().any(|n| n.starts_with("the path never changed the state variables"))
    };
    assert!(said(false));
    assert!(!said(true));
}

#[test]
fn an_update_that_does_not_settle_is_not_called_unobjective() {
    use tancheck::core::finite::probe::{run_all, ProbeOptions};
    let model = NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let mut info = tancheck::core::finite::FiniteModel::info(&model).clone();
    info.nstate = 1;
    let mut r = OneState(FiniteModelRoutine(model), info, true);
    let path =
        FinitePathSpec::UniaxialStretch { stretch: 1.2, increments: 3, rotation: None }.build().unwrap();
    let results = run_all(&mut r, &[1000.0, 0.3], &[0.0], &path, &ProbeOptions::default());
    let inc = results.iter().find(|p| p.name == "rotation-increment").unwrap();
    assert!(inc.passed, "{inc:#?}");
    assert!(inc.summary.contains("the update does not settle"), "{}", inc.summary);
}
