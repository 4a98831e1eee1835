//! A probe works on its own copy of the walk's driver: a probe that wrecks its driver at every
//! increment (a large extra increment, calls, two advances) still sees, at the next increment,
//! exactly the base call a clean walk sees, and the probe after it in the suite is unaffected.
//! Stresses are compared bit for bit; the J2 model (Simo & Hughes 1998, Box 3.2) carries
//! plastic state, so a walk that went on from a wrecked driver would show it.

use tancheck::core::driver::Driver;
use tancheck::core::probe::{run_probes, walk, Needs, Probe, ProbeEnv, ProbeResult, ProbeSpec, ProbeStatus};
use tancheck::core::{Caller, CoreError, Path, PointKind, PointState, Routine, Settings, Shape};
use tancheck::models::reference;

const J2: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

/// The base stress and state of every increment, as bits.
fn record(k: usize, d: &Driver, out: &mut Vec<String>) {
    let bits: Vec<String> =
        d.base.stress.iter().chain(&d.base.state).map(|x| format!("{:016x}", x.to_bits())).collect();
    out.push(format!("{k}: {}", bits.join(" ")));
}

/// Records each increment's base call, then wrecks its driver.
struct Vandal;

impl Probe for Vandal {
    fn name(&self) -> &'static str {
        "vandal"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut seen = Vec::new();
        walk(caller, env, |k, d, c| {
            record(k, d, &mut seen);
            let n = d.dstrain().len();
            d.set_increment(&vec![0.01; n], 0.0, 1.0);
            d.base_call(c)?;
            d.advance();
            d.base_call(c)?;
            d.advance();
            Ok(())
        })
        .expect("the J2 model takes these increments");
        let mut r = ProbeResult::new("vandal", ProbeStatus::Pass, "wrecked its driver at every increment");
        r.details = seen;
        Ok(r)
    }
}

/// Records each increment's base call and does nothing else.
struct Recorder;

impl Probe for Recorder {
    fn name(&self) -> &'static str {
        "recorder"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut seen = Vec::new();
        walk(caller, env, |k, d, _| {
            record(k, d, &mut seen);
            Ok(())
        })
        .expect("the J2 model takes these increments");
        let mut r = ProbeResult::new("recorder", ProbeStatus::Pass, "recorded the base calls");
        r.details = seen;
        Ok(r)
    }
}

#[test]
fn a_probe_that_wrecks_its_driver_leaves_the_walk_and_the_next_probe_alone() {
    let mut routine = reference("j2", PointKind::Solid3d).unwrap();
    let info = routine.info().clone();
    let start = PointState::zero(&info, 20.0);
    let path = Path::ramp(Shape::TensionShear, 0.004, 8, 4);
    let spec = ProbeSpec::default();
    let settings = Settings::default();
    let mut caller = Caller::new(&mut routine);
    let clean = run_probes(&mut caller, "s", &[(&Recorder, &spec)], &J2, &start, &path, &settings).unwrap();
    let both =
        run_probes(&mut caller, "s", &[(&Vandal, &spec), (&Recorder, &spec)], &J2, &start, &path, &settings)
            .unwrap();
    let clean = &clean.results[0].details;
    assert_eq!(clean.len(), 12);
    // The path yields: later increments carry plastic state, so order matters.
    assert_ne!(clean[0].split(' ').next_back(), clean[11].split(' ').next_back());
    assert_eq!(&both.results[0].details, clean, "the vandal's own walk went on from its wreck");
    assert_eq!(&both.results[1].details, clean, "the probe after the vandal saw its wreck");
}

#[test]
fn the_runner_skips_a_probe_whose_needs_are_not_met_and_says_why() {
    struct NeedsDamage;
    impl Probe for NeedsDamage {
        fn name(&self) -> &'static str {
            "needs-damage"
        }
        fn needs(&self) -> Needs {
            Needs::TANGENT | Needs::DAMAGE_INDICES
        }
        fn run(&self, _: &mut Caller<'_>, _: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
            panic!("run although a need is not met");
        }
    }
    let mut routine = reference("elastic", PointKind::Uniaxial).unwrap();
    let info = routine.info().clone();
    let start = PointState::zero(&info, 20.0);
    let path = Path::ramp(Shape::UniaxialStrain, 0.001, 2, 0);
    let mut caller = Caller::new(&mut routine);
    let calls = caller.real_calls;
    let r = run_probes(
        &mut caller,
        "s",
        &[(&NeedsDamage, &ProbeSpec::default())],
        &[200000.0, 0.3],
        &start,
        &path,
        &Settings::default(),
    )
    .unwrap();
    assert_eq!(r.results[0].status, ProbeStatus::Skipped);
    assert!(r.results[0].summary.contains("no damage variables declared"), "{}", r.results[0].summary);
    assert_eq!(caller.real_calls, calls, "a skipped probe makes no call");
}
