//! A finite-strain routine that asks for a smaller increment (`TC_STATUS_SMALLER_INCREMENT`)
//! where the increment of F is too large for it, as it would ask a solver. The check stopped
//! there with a FAULT (exit 3); now, as the small-strain check does, it is made again on the
//! path with each refused increment cut into equal parts of F and of the time, and says so.
//! A wrong tangent still fails on the cut path.

use num_complex::Complex64;
use tancheck::core::finite::check::run;
use tancheck::core::finite::probe::{run_all_noted, ProbeOptions};
use tancheck::core::finite::routine::{FiniteInput, FiniteOutput};
use tancheck::core::finite::{
    FiniteInfo, FiniteModelRoutine, FinitePathSpec, FiniteRoutine, FiniteSettings, StressMeasure,
    TangentMeasure,
};
use tancheck::core::routine::{status, Fault};
use tancheck::core::Verdict;
use tancheck::models::finite::NeoHookean;

/// Young's modulus and Poisson's ratio (invented).
const PROPS: [f64; 2] = [1000.0, 0.3];

/// The neo-Hookean model, refusing an increment whose largest change of an entry of F is
/// above `limit`, with the fraction it could manage; its tangent times `factor`.
struct Limited {
    inner: FiniteModelRoutine<NeoHookean>,
    limit: f64,
    factor: f64,
    /// The time increments of the base calls it took.
    dtimes: Vec<f64>,
    /// A call with this increment number fails (a failure status, not a request).
    fail_at: Option<i32>,
}

impl Limited {
    fn refuse<S: Copy + Into<Complex64>>(&self, input: &FiniteInput<'_, S>) -> Result<(), Fault> {
        if self.fail_at == Some(input.increment) {
            return Err(Fault::Status {
                status: status::FAILED,
                message: "cannot compute this one".into(),
                largest_fraction: 0.0,
            });
        }
        let step = (0..9).map(|k| (input.f1[k].into().re - input.f0[k].into().re).abs()).fold(0.0, f64::max);
        if step > self.limit {
            return Err(Fault::Status {
                status: status::SMALLER_INCREMENT,
                message: "the increment of F is too large".into(),
                largest_fraction: self.limit / step,
            });
        }
        Ok(())
    }
}

impl FiniteRoutine for Limited {
    fn info(&self) -> &FiniteInfo {
        self.inner.info()
    }
    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.refuse(input)?;
        self.inner.call(input, output)?;
        output.tangent.iter_mut().for_each(|x| *x *= self.factor);
        self.dtimes.push(input.time[1]);
        Ok(())
    }
    fn has_complex(&self) -> bool {
        self.inner.has_complex()
    }
    fn call_complex(
        &mut self,
        input: &FiniteInput<'_, Complex64>,
        output: &mut FiniteOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.refuse(input)?;
        self.inner.call_complex(input, output)
    }
}

fn limited(limit: f64, factor: f64) -> Limited {
    Limited {
        inner: FiniteModelRoutine(NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann)),
        limit,
        factor,
        dtimes: Vec::new(),
        fail_at: None,
    }
}

/// Simple shear to 0.5 in two increments: an increment of F of 0.25 in its 12 entry.
fn path() -> tancheck::core::finite::FinitePath {
    FinitePathSpec::SimpleShear { amount: 0.5, increments: 2, rotation: None }.build().unwrap()
}

/// The report's notes but the one on an isochoric path (J = 1 throughout).
fn cut_notes(rep: &tancheck::core::finite::FiniteReport) -> Vec<&String> {
    rep.notes.iter().filter(|n| !n.contains("J = det F = 1")).collect()
}

#[test]
fn increments_the_routine_refuses_are_cut_and_checked() {
    // 0.25 against a limit of 0.1: a fraction of 0.4 asked, three parts (0.4 with a tenth to
    // spare) each.
    let mut r = limited(0.1, 1.0);
    let rep = run(&mut r, &PROPS, &[], &path(), FiniteSettings::default());
    assert_eq!(rep.verdict, Verdict::Pass, "{:?} {:?}", rep.fault, rep.notes);
    assert_eq!(rep.increments.len(), 6);
    let notes = cut_notes(&rep);
    assert_eq!(notes.len(), 1, "{:?}", rep.notes);
    let note = notes[0];
    assert!(
        note.contains("1 into 3, 2 into 3") && note.contains("the increment of F is too large"),
        "{note}"
    );
    assert!(note.contains("largest fraction 0.400"), "{note}");
    // Each part takes its share of the increment's time (1): the base calls of the cut path.
    let last = &r.dtimes[r.dtimes.len() - 6..];
    assert!(last.iter().all(|&t| (t - 1.0 / 3.0).abs() < 1e-15), "{last:?}");
    // The path ends where it was going.
    let end = rep.increments.last().unwrap().gradient;
    assert_eq!(end, tancheck::core::finite::mat3::to_flat(path().gradients.last().unwrap()));
}

#[test]
fn a_wrong_tangent_fails_on_the_cut_path() {
    let mut r = limited(0.1, 1.1);
    let rep = run(&mut r, &PROPS, &[], &path(), FiniteSettings::default());
    assert_eq!(rep.verdict, Verdict::TangentFailure, "{:?}", rep.fault);
    assert_eq!(rep.increments.len(), 6);
    assert_eq!(cut_notes(&rep).len(), 1);
}

#[test]
fn a_routine_that_refuses_every_part_stays_a_fault() {
    // A limit no number of parts up to the largest reaches.
    let mut r = limited(1e-6, 1.0);
    let rep = run(&mut r, &PROPS, &[], &path(), FiniteSettings::default());
    assert_eq!(rep.verdict, Verdict::RoutineFault);
    assert!(cut_notes(&rep).is_empty(), "{:?}", rep.notes);
    assert!(rep.fault.as_deref().is_some_and(|f| f.contains("status 1")), "{:?}", rep.fault);
}

/// The probes cut too: the path where the routine refuses an increment (as the check does), and
/// the rigid rotations of `rotation-increment` (1.2 rad at once) and `stretch-rotate` (15° steps)
/// in equal parts of the angle, each part a rigid rotation. They stopped with a FAULT and "NOT
/// objective" on an objective routine (a user-style sweep).
#[test]
fn the_probes_cut_what_the_routine_refuses() {
    let mut r = limited(0.1, 1.0);
    let (results, notes) = run_all_noted(&mut r, &PROPS, &[], &path(), &ProbeOptions::default());
    for p in &results {
        assert!(p.passed && !p.faulted, "{p:?} {notes:?}");
    }
    assert_eq!(results.len(), 4, "{results:?}");
    assert!(notes.iter().any(|n| n.contains("1 into 3, 2 into 3")), "{notes:?}");
    for probe in ["rotation-increment", "stretch-rotate"] {
        assert!(
            notes.iter().any(|n| n.starts_with(probe) && n.contains("equal parts of the angle")),
            "{notes:?}"
        );
    }
    // A routine that never refuses gets no note.
    let mut free = limited(10.0, 1.0);
    let (results, notes) = run_all_noted(&mut free, &PROPS, &[], &path(), &ProbeOptions::default());
    assert!(results.iter().all(|p| p.passed), "{results:?}");
    assert!(notes.is_empty(), "{notes:?}");
}

/// A call that fails in `rotation-increment` is named by the increment it follows (the last
/// increment of a two-increment path is 2; the line said 3).
#[test]
fn a_failed_rigid_increment_names_the_increment_it_follows() {
    let mut r = Limited { fail_at: Some(3), ..limited(10.0, 1.0) };
    let (results, _) = run_all_noted(&mut r, &PROPS, &[], &path(), &ProbeOptions::default());
    let p = results.iter().find(|p| p.name == "rotation-increment").unwrap();
    assert!(!p.passed && p.faulted, "{p:?}");
    assert!(p.details.iter().all(|d| d.contains("after increment 2") && !d.contains("increment 3")), "{p:?}");
    assert!(
        p.details.iter().any(|d| d.contains("1.2 rad") && d.contains("cannot compute this one")),
        "{p:?}"
    );
}
