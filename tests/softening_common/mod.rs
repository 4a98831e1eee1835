//! Shared by the softening probe tests (softening_probes.rs, softening_limits.rs): the demo
//! ply and interface, the load–unload–reload paths, one probe run on a routine, and a
//! cohesive law that forgets its damage (the flawed routine both files need).

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::probe::{run_suite, ProbeResult, ProbeSpec};
use tancheck::core::{
    CallInput, CallOutput, Caller, Fault, Model, PointState, Routine, RoutineInfo, Scalar, Settings,
};
use tancheck::models::Cohesive;

/// Demo ply (MPa, N/mm, mm), 0° axes: only the roles of the numbers matter here.
pub fn ply_props(eta: f64) -> Vec<f64> {
    vec![
        138000.0, 11000.0, 11000.0, 0.28, 0.28, 0.4, 5500.0, 5500.0, 3928.57, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0,
        1500.0, 900.0, 27.0, 200.0, 80.0, 90.0, 80.0, 0.25, 2.0, 0.5, eta,
    ]
}

/// Demo interface [K, N, S, G_Ic, G_IIc, η_BK].
pub const COHESIVE: [f64; 6] = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];

pub fn path(name: &str, dt: f64, steps: &[([f64; 6], usize)]) -> Path {
    let mut p = Path { name: name.into(), increments: Vec::new() };
    for &(d, n) in steps {
        for _ in 0..n {
            p.increments.push(PathIncrement { dstrain: d, dtemp: 0.0, dtime: dt, hold_stress: None });
        }
    }
    p
}

/// Into matrix damage growth with in-plane shear, unload half way, reload past the largest load.
pub fn ply_path(dt: f64) -> Path {
    path(
        "transverse tension + shear, unload, reload",
        dt,
        &[
            ([1e-4, 6e-4, 0.0, 0.0, 0.0, 5e-4], 8),
            ([0.0, -8e-4, 0.0, 0.0, 0.0, -5e-4], 3),
            ([1e-4, 8e-4, 0.0, 0.0, 0.0, 6e-4], 5),
        ],
    )
}

pub fn cohesive_path(dt: f64) -> Path {
    path(
        "mixed-mode opening into growth, closing half way, reopening",
        dt,
        &[
            ([3e-4, 2e-4, 1e-4, 0.0, 0.0, 0.0], 8),
            ([-3e-4, -2e-4, -1e-4, 0.0, 0.0, 0.0], 4),
            ([3e-4, 2e-4, 1e-4, 0.0, 0.0, 0.0], 6),
        ],
    )
}

pub fn probe(routine: &mut dyn Routine, spec: ProbeSpec, props: &[f64], path: &Path) -> ProbeResult {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    let rep = run_suite(
        &mut caller,
        "softening",
        &[spec],
        props,
        &PointState::zero(&info, 20.0),
        path,
        &Settings::default(),
    )
    .unwrap();
    rep.results.into_iter().next().unwrap()
}

/// The cohesive law with its history forgotten: every call starts from d = 0, so the damage is
/// that of the current separation and heals when the interface closes; its tangent carries
/// the growth term on closing too.
#[derive(Clone, Debug)]
pub struct ForgetfulCohesive(pub Cohesive);

impl Model for ForgetfulCohesive {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let fresh = [S::zero(), S::zero()];
        self.0.evaluate(&CallInput { state0: &fresh, ..*input }, output)
    }
}
