//! An update that does not settle: a bar with Voce hardening whose local Newton iteration for
//! the plastic multiplier stops after one step (a planted flaw) returns the tangent of the
//! converged return, E H/(E + H) (the one-dimensional consistent tangent, Simo & Hughes 1998,
//! §1.4, from memory), at a state the update has not converged to. The check names that
//! (`unsettled-update`), not a term of the tangent; the converged bar passes. The numbers are
//! invented for the test.

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::report::Keep;
use tancheck::core::{
    CallInput, CallOutput, Caller, Convention, Fault, Model, ModelRoutine, PointKind, PointState,
    RoutineInfo, Scalar, Settings, ShearMeasure,
};

/// Properties [E, σy0, Q, b, η]; state [plastic strain, accumulated plastic strain]. With
/// η > 0 an overstress viscosity η/Δt joins the hardening slope (none when Δt = 0: the
/// rate-independent update, as some routines guard the division).
#[derive(Clone, Debug)]
struct VoceBar {
    info: RoutineInfo,
    /// Newton iterations for the plastic multiplier (one: the flaw; many: converged).
    iterations: usize,
    /// The tangent leaves the viscous term out (a flaw of the tangent alone).
    no_viscous_term: bool,
}

impl Model for VoceBar {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, sy0, q, b) = (input.props[0], input.props[1], input.props[2], input.props[3]);
        let dt = input.time[1];
        let visc = if dt.re() > 0.0 { input.props[4] / dt } else { S::zero() };
        let (ep0, a0) = (input.state0[0], input.state0[1]);
        let yield_at = |a: S| sy0 + q * (S::one() - (-(b * a)).exp());
        let slope_at = |a: S| q * b * (-(b * a)).exp();
        let trial = e * (input.strain[0] + input.dstrain[0] - ep0);
        let sign = if trial.re() >= 0.0 { 1.0 } else { -1.0 };
        let f = trial * sign - yield_at(a0);
        out.dstress_dtemp[0] = S::zero();
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        if f.re() <= 0.0 {
            out.stress[0] = trial;
            out.state[0] = ep0;
            out.state[1] = a0;
            out.tangent[0] = e;
            out.outcome.branch = 0;
            return Ok(());
        }
        let mut dg = S::zero();
        for _ in 0..self.iterations {
            let g = trial * sign - e * dg - yield_at(a0 + dg) - visc * dg;
            dg = dg + g / (e + slope_at(a0 + dg) + visc);
            if g.re().abs() <= 1e-12 * sy0.re() {
                break;
            }
        }
        let h = slope_at(a0 + dg) + if self.no_viscous_term { S::zero() } else { visc };
        out.stress[0] = trial - e * dg * sign;
        out.state[0] = ep0 + dg * sign;
        out.state[1] = a0 + dg;
        out.tangent[0] = e * h / (e + h);
        out.outcome.branch = 1;
        Ok(())
    }
}

fn check(iterations: usize) -> tancheck::core::Report {
    check_with(iterations, 0.0, false)
}

fn check_with(iterations: usize, eta: f64, no_viscous_term: bool) -> tancheck::core::Report {
    let info = RoutineInfo {
        name: format!("voce-bar-{iterations}"),
        convention: Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering),
        nstate: 2,
        nprop: 5,
    };
    let mut r = ModelRoutine(VoceBar { info: info.clone(), iterations, no_viscous_term });
    let props = [200000.0, 250.0, 150.0, 80.0, eta];
    let path = Path {
        name: "tension into hardening".into(),
        increments: vec![PathIncrement::strain([1e-3, 0.0, 0.0, 0.0, 0.0, 0.0]); 6],
    };
    let mut caller = Caller::new(&mut r);
    tancheck::core::check::run_with(
        &mut caller,
        &props,
        PointState::zero(&info, 20.0),
        &path,
        &Settings::default(),
        Keep::All,
        &mut |_| {},
    )
    .unwrap()
}

#[test]
fn an_update_stopped_after_one_newton_step_is_named_unsettled() {
    let good = check(50);
    assert_eq!(good.verdict, tancheck::core::Verdict::Pass, "{:?}", good.finding());
    let bad = check(1);
    assert_eq!(bad.verdict, tancheck::core::Verdict::TangentFailure);
    assert_eq!(bad.finding(), "unsettled-update");
    let inc = bad.increments.iter().find(|i| !i.passed()).unwrap();
    let d = inc.diagnosis.as_ref().unwrap();
    assert_eq!(d.finding, "unsettled-update", "{}", d.reason);
    assert!(d.reason.starts_with("a zero increment (Δε = 0, ΔT = 0, Δt → 0) from the end"), "{}", d.reason);
    assert!(d.reason.contains("changes the state variables"), "{}", d.reason);
    // The causes are still there, for what they say of the tangent against that map.
    assert!(!d.causes.is_empty());
}

// A settled viscous update whose tangent leaves the viscous term out is a wrong tangent, not an
// unsettled update: a zero increment of exactly no time would make it rate-independent and
// return its overstress to the static yield surface (it read `unsettled-update`; a user-style
// sweep's viscoplastic routine), so the look gives the zero increment a vanishing time.
#[test]
fn a_viscous_update_with_a_wrong_tangent_is_not_called_unsettled() {
    assert_eq!(check_with(50, 2000.0, false).verdict, tancheck::core::Verdict::Pass);
    let bad = check_with(50, 2000.0, true);
    assert_eq!(bad.verdict, tancheck::core::Verdict::TangentFailure);
    assert_ne!(bad.finding(), "unsettled-update");
    // The look cannot tell a viscous update that stops after one step either (a vanishing time
    // gives an infinite viscosity, which holds any stress): it says nothing rather than
    // something false.
    assert_ne!(check_with(1, 2000.0, false).finding(), "unsettled-update");
}
