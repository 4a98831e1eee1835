//! Tests of locating a failure on a bar that yields at a known strain.

use super::testing::{Bar, PROPS};
use super::*;
use crate::check;
use crate::driver::PointState;
use crate::path::Path;
use crate::path::PathIncrement;
use crate::report::Report;
use crate::routine::Caller;
use crate::routine::Model;
use crate::schemes::Scheme;
use crate::settings::Settings;

fn uniaxial(steps: &[f64]) -> Path {
    Path {
        name: "test path".into(),
        increments: steps.iter().map(|&d| PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0])).collect(),
    }
}

/// What every test here starts from: the bar (flawed or not) checked along a path.
struct Checked<'c, 'b> {
    caller: &'c mut Caller<'b>,
    start: PointState,
    path: Path,
    settings: Settings,
    report: Report,
}

/// Checks `path` on the bar from zero and hands the check to `test`: the set-up the tests share.
fn checked<T>(flawed: bool, path: Path, settings: Settings, test: impl FnOnce(Checked<'_, '_>) -> T) -> T {
    let mut bar = Bar::new(flawed);
    let start = PointState::zero(bar.0.info(), 0.0);
    let mut caller = Caller::new(&mut bar);
    let report = check::run(&mut caller, &PROPS, start.clone(), &path, &settings).unwrap();
    test(Checked { caller: &mut caller, start, path, settings, report })
}

// The bar yields at ε = σy/E = 1.25e-3 (Simo & Hughes 1998, Box 1.4): along increments of
// 5e-4 from zero that is half-way through increment 3. The flawed bar returns E there,
// the consistent tangent is E H/(E + H): the error changes class at s* = 0.5 exactly.
#[test]
fn the_crossing_is_the_yield_fraction() {
    checked(
        true,
        uniaxial(&[5e-4; 8]),
        Settings::default(),
        |Checked { caller, start, path, settings, report }| {
            let bs = BisectSettings::default();
            let l = locate(caller, &PROPS, start.clone(), &path, &report, &settings, &bs).unwrap().unwrap();
            assert_eq!((l.increment, l.of), (3, 8));
            assert_eq!(l.branch, "#1 (state changed)");
            assert_eq!(l.judged_by, Scheme::ComplexStep);
            let Inside::Crossing(c) = l.inside else { panic!("{:?}", l.inside) };
            let s_star = (PROPS[1] / PROPS[0] - 2.0 * 5e-4) / 5e-4;
            assert!((s_star - 0.5).abs() < 1e-12);
            assert!(c.below <= s_star && s_star <= c.above, "{c:?}");
            assert!(c.above - c.below <= bs.fraction_tol);
            assert_eq!(c.class_below.reported_branch, Some(0));
            assert_eq!(c.class_below.judgement, Judgement::Agrees);
            assert_eq!(c.class_above.reported_branch, Some(1));
            assert_eq!(c.class_above.judgement, Judgement::Differs);
            // E against E H/(E + H): relative error (E − E_t)/E_t = E/H = 20.
            assert!((c.error_above - PROPS[0] / PROPS[2]).abs() < 1e-6, "{}", c.error_above);
            let step = l.step.unwrap();
            assert_eq!(step.verdict, StepVerdict::Mismatch);
            assert!((step.plateau.unwrap() / 20.0 - 1.0).abs() < 0.1, "{:?}", step.plateau);
            // The saved inputs are those of increment 3: strain 1e-3 at its start.
            assert_eq!(l.call.strain, vec![1e-3]);
            assert_eq!(l.call.increment, 3);
        },
    );
}

// Without a twin the fractions are judged by the central difference; a coarser tolerance
// of the fraction is met too.
#[test]
fn without_a_twin_the_central_difference_judges() {
    checked(
        true,
        uniaxial(&[4e-4; 6]),
        Settings { schemes: vec![Scheme::Central], ..Settings::default() },
        |Checked { caller, start, path, settings, report }| {
            let bs = BisectSettings { fraction_tol: 1e-3, ..BisectSettings::default() };
            let l = locate(caller, &PROPS, start.clone(), &path, &report, &settings, &bs).unwrap().unwrap();
            assert_eq!(l.judged_by, Scheme::Central);
            assert_eq!(l.increment, 4);
            let Inside::Crossing(c) = l.inside else { panic!("{:?}", l.inside) };
            let s_star = (PROPS[1] / PROPS[0] - 3.0 * 4e-4) / 4e-4;
            assert!((c.fraction() - s_star).abs() <= 1e-3, "{c:?} vs {s_star}");
        },
    );
}

// A failure that does not start inside the increment: the flawed bar loaded further
// after yielding fails at every fraction of a later plastic increment.
#[test]
fn a_failure_throughout_the_increment_is_said_so() {
    // Yield inside increment 1 (1.5e-3 > 1.25e-3); increment 2 starts plastic.
    checked(
        true,
        uniaxial(&[1.5e-3, 5e-4]),
        Settings::default(),
        |Checked { caller, start, path, settings, report }| {
            // Shift the question to increment 2 by checking from the end of increment 1.
            let (mut d, previous) = driver_at(caller, &PROPS, start.clone(), &path, 2, &settings).unwrap();
            assert!(previous.is_some());
            d.base_call(caller).unwrap();
            let later = Path { name: "later".into(), increments: path.increments[1..].to_vec() };
            let start = d.start().clone();
            let r2 = check::run(caller, &PROPS, start.clone(), &later, &settings).unwrap();
            let l = locate(caller, &PROPS, start, &later, &r2, &settings, &BisectSettings::default())
                .unwrap()
                .unwrap();
            assert!(matches!(l.inside, Inside::Throughout { .. }), "{:?}", l.inside);
            assert_eq!(report.increments.len(), 2);
        },
    );
}

// The rebuilt start state has the bits the check reached: the end of increment k − 1.
#[test]
fn the_walk_rebuilds_the_start_state_bit_for_bit() {
    checked(
        false,
        uniaxial(&[7e-4, 9e-4, -3e-4, -2.5e-3, 1e-4]),
        Settings::default(),
        |Checked { caller, start, path, settings, report }| {
            for k in 2..=5 {
                let (d, _) = driver_at(caller, &PROPS, start.clone(), &path, k, &settings).unwrap();
                assert_eq!(
                    d.start().stress[0].to_bits(),
                    report.increments[k - 2].stress[0].to_bits(),
                    "{k}"
                );
                assert_eq!(
                    d.start().strain[0].to_bits(),
                    report.increments[k - 2].strain[0].to_bits(),
                    "{k}"
                );
                assert_eq!(d.increment(), k as i32);
            }
            assert!(driver_at(caller, &PROPS, start.clone(), &path, 6, &settings).is_err());
            assert!(locate(
                caller,
                &PROPS,
                start.clone(),
                &path,
                &report,
                &settings,
                &BisectSettings::default()
            )
            .unwrap()
            .is_none());
        },
    );
}

/// A random walk with a slight drift (xorshift64*, seeded): the bar first yields late.
fn random_walk(n: usize, seed: u64) -> Vec<f64> {
    let mut x = seed;
    (0..n)
        .map(|_| {
            x ^= x >> 12;
            x ^= x << 25;
            x ^= x >> 27;
            let u = (x.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64;
            -1e-4 + 2.2e-4 * u
        })
        .collect()
}

#[test]
fn a_long_random_path_shrinks_to_one_increment() {
    checked(
        true,
        uniaxial(&random_walk(200, 0x5eed_b15e)),
        Settings::default(),
        |Checked { caller, start, path, settings, report }| {
            let first = first_failure(&report).expect("the walk yields").index;
            assert!(first > 20, "the first failure is late enough to need shrinking: {first}");
            let s =
                shrink(caller, &PROPS, &start.clone(), &path, &report, &settings, ShrinkLimits::default())
                    .unwrap()
                    .unwrap();
            assert_eq!(s.stop, ShrinkStop::Done);
            assert_eq!(s.original_increments, 200);
            assert_eq!(s.path.increments.len(), 1, "{:?}", s.path.increments);
            // One increment from zero past the yield strain, rounded to a short decimal.
            let d = s.path.increments[0].dstrain[0];
            assert!(d > PROPS[1] / PROPS[0], "{d}");
            assert!(format!("{d}").len() <= 8, "{d}");
            // The shrunk path still fails, the same way.
            let again = check::run(caller, &PROPS, start.clone(), &s.path, &settings).unwrap();
            assert_eq!(again.verdict, crate::report::Verdict::TangentFailure);
            assert_eq!(first_failure(&again).unwrap().finding(), s.finding);
            assert_eq!(s.finding, first_failure(&report).unwrap().finding());
            assert!(s.iterations <= ShrinkLimits::default().max_iterations);
        },
    );
}

#[test]
fn the_limits_stop_the_shrink_and_say_which() {
    checked(
        true,
        uniaxial(&random_walk(200, 0x5eed_b15e)),
        Settings::default(),
        |Checked { caller, start, path, settings, report }| {
            let first = first_failure(&report).unwrap().index;
            let limits = ShrinkLimits { max_iterations: 3, max_seconds: 600.0 };
            let s =
                shrink(caller, &PROPS, &start.clone(), &path, &report, &settings, limits).unwrap().unwrap();
            assert_eq!(s.stop, ShrinkStop::IterationLimit { limit: 3 });
            assert_eq!(s.iterations, 3);
            assert!(s.path.increments.len() <= first);
            let again = check::run(caller, &PROPS, start.clone(), &s.path, &settings).unwrap();
            assert_eq!(first_failure(&again).map(|f| f.index), Some(s.path.increments.len()));
            let limits = ShrinkLimits { max_iterations: 1000, max_seconds: 1e-12 };
            let s =
                shrink(caller, &PROPS, &start.clone(), &path, &report, &settings, limits).unwrap().unwrap();
            assert_eq!(s.stop, ShrinkStop::TimeLimit { seconds: 1e-12 });
            assert_eq!(s.iterations, 0);
            // Cut after the first failure, which needs no search.
            assert_eq!(s.path.increments.len(), first);
            // A passing path has nothing to shrink.
            let mut good = Bar::new(false);
            let mut c2 = Caller::new(&mut good);
            let r = check::run(&mut c2, &PROPS, start.clone(), &path, &settings).unwrap();
            assert!(shrink(&mut c2, &PROPS, &start.clone(), &path, &r, &settings, ShrinkLimits::default())
                .unwrap()
                .is_none());
        },
    );
}
