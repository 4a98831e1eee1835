//! The refinement probe on a rate-dependent point: the changes of the end stress under
//! subdivision may rise before they shrink (a point unloading from an overstress relaxes in the
//! first sub-increments of a step that is elastic as a whole), and a correct update passes once
//! they shrink; an update that adds a fixed amount per call never converges, and fails.
//!
//! The routine: a uniaxial bar of linear (Perzyna-type) viscoplasticity integrated by backward
//! Euler — σ_tr = E (ε + Δε − εp), f = |σ_tr| − σy, Δγ = f/(E + η/Δt) when f > 0,
//! σ = σ_tr − E Δγ sign σ_tr, tangent E (η/Δt)/(E + η/Δt) (the one-dimensional viscoplastic
//! return of Simo & Hughes 1998, Computational Inelasticity, §1.7; from memory). Demo values:
//! E = 200 GPa, σy = 250 MPa, η = 1e4 MPa·s, 0.1 s per increment; four increments of 1e-3
//! then one of −8e-4, elastic as a whole from the overstress it starts at.

use tancheck::core::probe::{run_suite, ProbeSpec, ProbeStatus};
use tancheck::core::{
    CallInput, CallOutput, Caller, Convention, Fault, Path, PathIncrement, PointKind, PointState, Routine,
    RoutineInfo, Settings, ShearMeasure,
};

struct ViscoBar {
    info: RoutineInfo,
    /// A fixed plastic strain added by every call past yield (a flaw: a per-call amount, not
    /// one per unit of strain or time).
    per_call: f64,
}

impl Routine for ViscoBar {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        let (e, sy, eta) = (input.props[0], input.props[1], input.props[2]);
        let dt = input.time[1];
        let ep = input.state0[0];
        let trial = e * (input.strain[0] + input.dstrain[0] - ep);
        let f = trial.abs() - sy;
        let sign = trial.signum();
        let (stress, ep_new, tangent, branch) = if f <= 0.0 {
            (trial, ep, e, 0)
        } else {
            let dg = f / (e + eta / dt) + self.per_call;
            (trial - e * dg * sign, ep + dg * sign, e * (eta / dt) / (e + eta / dt), 1)
        };
        output.stress[0] = stress;
        output.state[0] = ep_new;
        output.tangent[0] = tangent;
        output.dstress_dtemp.fill(0.0);
        output.energy.fill(0.0);
        output.outcome.status = 0;
        output.outcome.branch = branch;
        Ok(())
    }
}

fn refinement(per_call: f64, at: usize) -> tancheck::core::probe::ProbeResult {
    let mut r = ViscoBar {
        info: RoutineInfo {
            name: "visco-bar".into(),
            convention: Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering),
            nstate: 1,
            nprop: 3,
        },
        per_call,
    };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let step = |d: f64| PathIncrement { dtime: 0.1, ..PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0]) };
    let path = Path {
        name: "load at a rate, then unload".into(),
        increments: vec![step(1e-3), step(1e-3), step(1e-3), step(1e-3), step(-8e-4)],
    };
    let spec = ProbeSpec { at: Some(vec![at]), ..ProbeSpec::named("refinement") };
    let rep =
        run_suite(&mut caller, "r", &[spec], &[200000.0, 250.0, 1e4], &start, &path, &Settings::default())
            .unwrap();
    rep.results[0].clone()
}

#[test]
fn a_rate_dependent_update_whose_changes_rise_before_they_shrink_passes() {
    let p = refinement(0.0, 5);
    assert_eq!(p.status, ProbeStatus::Pass, "{p:#?}");
    // The changes at 2, 4, 8 sub-increments rose (3.9e-2, 5.9e-2, 3.8e-2: the probe failed on
    // them); followed further they shrink at about first order.
    let d =
        p.details.iter().find(|d| d.contains("rose before they shrank")).unwrap_or_else(|| panic!("{p:#?}"));
    assert!(d.contains("at increment 5") && d.contains("16 sub-increments"), "{d}");
    let order = p.value.unwrap();
    assert!((0.6..1.3).contains(&order), "order {order}");
}

#[test]
fn an_update_that_adds_a_fixed_amount_per_call_fails() {
    // On a loading increment, where every sub-increment is past yield.
    let p = refinement(1e-5, 3);
    assert_eq!(p.status, ProbeStatus::Fail, "{p:#?}");
    assert!(p.summary.contains("at increment 3 subdividing does not converge"), "{}", p.summary);
    assert!(p.summary.contains("256 sub-increments"), "{}", p.summary);
}
