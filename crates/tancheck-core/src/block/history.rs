//! Results that depend on the calls made before: an explicit solver calls a block routine for
//! many blocks in turn, at points of other temperatures, densities and histories, so a point's
//! outputs may depend only on its own inputs. A `static` accumulator or a SAVE'd value that
//! carries a result from call to call breaks that without showing in any one walk.
//!
//! Two walks of the point alone, each opened by the first call (the elastic response), under
//! conditions of their own (warmer, denser, a shorter characteristic length than the path's
//! start, so a value kept from the check's earlier calls at the start conditions is wrong for
//! them):
//! 1. the walk made twice in a row on the routine the check has been calling: they must agree
//!    (an accumulator, a counter or a cache that drifts differs the second time);
//! 2. the same walk as the first call of a new instance of the library (its static and SAVE
//!    variables as at load), where the routine offers one: it must agree with the walk on the
//!    routine called before (a value computed on the first call and kept, such as a modulus at
//!    the first call's temperature, differs).

use super::report::{BlockCheck, BlockReport};
use super::routine::Conditions;
use super::walk::{BlockBuffers, BlockWalk};
use crate::routine::Fault;

/// The walks' conditions against the path's start: this much warmer (K), this share denser and
/// with this share shorter a characteristic length; within any routine's range, far outside
/// rounding.
const WARMER: f64 = 10.0;
const SHARE: f64 = 0.1;
/// Test strain of the opening elastic response (as the check's own first call makes it).
const TEST_STRAIN: f64 = 1e-4;

/// What the point returned: the elastic response's stresses (increment 0), then per increment
/// the stress, the state, the two energies and the deleted flag, in one row each.
struct Trace {
    rows: Vec<Vec<f64>>,
}

fn other_conditions(c: Conditions) -> Conditions {
    Conditions {
        temperature: c.temperature + WARMER,
        density: c.density * (1.0 + SHARE),
        characteristic_length: c.characteristic_length * (1.0 - SHARE),
        ..c
    }
}

/// The elastic response (a block of ncomp points, as the check's first call) and the walk of
/// the point alone, under `conditions`.
fn walk(
    w: &mut BlockWalk<'_>,
    conditions: Conditions,
    report: &mut BlockReport,
) -> Result<Trace, (usize, Fault)> {
    let n = w.routine.info().ncomp;
    let s = w.settings;
    let mut rows = Vec::with_capacity(w.incs.len() + 1);
    let mut e = BlockBuffers::new(n, n, &s.state0, conditions);
    for j in 0..n {
        e.increment_of(j)[j] = TEST_STRAIN;
    }
    report.real_calls += 1;
    e.call(w.routine, w.properties, 0.0, 0).map_err(|f| (0, f))?;
    rows.push(e.stress.clone());
    let mut b = BlockBuffers::new(1, n, &s.state0, conditions);
    for (k, step) in w.incs.iter().enumerate() {
        b.set_temperature_increment(step.temperature_increment);
        b.increment_of(0).copy_from_slice(&step.strain_increment);
        report.real_calls += 1;
        b.call(w.routine, w.properties, step.time_increment, (k + 1) as i32).map_err(|f| (k + 1, f))?;
        let mut row = b.stress.clone();
        row.extend_from_slice(&b.state);
        row.extend([b.energy[0].internal, b.energy[0].dissipated, f64::from(b.deleted[0])]);
        rows.push(row);
        b.advance(step.time_increment);
    }
    Ok(Trace { rows })
}

/// The name of entry `i` of a row of increment `k` (see [`Trace`]).
fn entry_name(k: usize, i: usize, n: usize, ns: usize) -> String {
    if k == 0 {
        return format!("the elastic response's stress[{i}] (of its point {})", i / n);
    }
    match i {
        i if i < n => format!("stress[{i}]"),
        i if i < n + ns => format!("state[{}]", i - n),
        i if i == n + ns => "energy.internal".into(),
        i if i == n + ns + 1 => "energy.dissipated".into(),
        _ => "deleted".into(),
    }
}

/// The first entry where `b` differs from `a` beyond `tol` of the row's largest magnitude:
/// (increment, entry name, value in b, value in a).
fn first_difference(
    a: &Trace,
    b: &Trace,
    tol: f64,
    n: usize,
    ns: usize,
) -> Option<(usize, String, f64, f64)> {
    for (k, (ra, rb)) in a.rows.iter().zip(&b.rows).enumerate() {
        let scale = ra.iter().filter(|x| x.is_finite()).fold(0.0f64, |m, x| m.max(x.abs()));
        for (i, (&x, &y)) in ra.iter().zip(rb).enumerate() {
            let same = (x.is_nan() && y.is_nan()) || x == y || (x - y).abs() <= tol * scale;
            if !same {
                return Some((k, entry_name(k, i, n, ns), y, x));
            }
        }
    }
    None
}

/// What the history check leaves for the comparison of blocks.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum History {
    /// No dependence on the calls before was found (or none could be looked for).
    Comparable,
    /// The results depend on the calls before: blocks are not comparable.
    Dependent,
    /// A call of a repeated walk failed (its finding or note says which): not compared either.
    Failed,
}

/// Run the check; findings go into `report`. Returns whether the blocks of the independence
/// check are comparable, and why not.
pub fn check(mut w: BlockWalk<'_>, report: &mut BlockReport) -> History {
    let (n, ns) = (w.routine.info().ncomp, w.settings.state0.len());
    let tol = w.settings.independence_tolerance;
    let c = other_conditions(w.settings.conditions);
    let said = format!(
        "{WARMER} K warmer, {}% denser, a characteristic length {}% shorter than the path's start",
        SHARE * 100.0,
        SHARE * 100.0
    );
    let fault = |report: &mut BlockReport, k: usize, e: &Fault, place: &str| {
        if matches!(e, Fault::Crashed { .. } | Fault::Misbehaved { .. }) {
            report.add(BlockCheck::Independence, "routine-fault", Some(k), format!("{place}: {e}"));
        } else {
            report.notes.push(format!(
                "history: {place}, a call failed (increment {k}: {e}); results that depend on the calls \
                 before were not looked for"
            ));
        }
    };
    let first = match walk(&mut w, c, report) {
        Ok(t) => t,
        Err((k, e)) => {
            fault(report, k, &e, &format!("the point alone ({said})"));
            return History::Comparable;
        }
    };
    let second = match walk(&mut w, c, report) {
        Ok(t) => t,
        Err((k, e)) => {
            fault(report, k, &e, "the point alone, walked a second time under the same conditions");
            return History::Failed;
        }
    };
    if let Some((k, what, now, before)) = first_difference(&first, &second, tol, n, ns) {
        report.add(
            BlockCheck::Independence,
            "history-dependence",
            Some(k),
            format!(
                "the point alone ({said}), walked twice in a row from the same start, gave other results \
                 the second time, first at increment {k} in {what}: {now:.12e} the second time, \
                 {before:.12e} the first: its results depend on the calls made before (a static or SAVE \
                 variable that carries a value from call to call, a counter, a shared work array?); an \
                 explicit solver calls it for many blocks in turn"
            ),
        );
        return History::Dependent;
    }
    let mut fresh = match w.routine.new_instance() {
        None => {
            report.notes.push(format!(
                "history: the point alone ({said}), walked twice in a row, gave the same outputs; {} \
                 offers no new instance, so a value kept from the first call was not looked for",
                w.routine.info().name
            ));
            return History::Comparable;
        }
        Some(Err(why)) => {
            report.notes.push(format!(
                "history: the point alone ({said}), walked twice in a row, gave the same outputs; no new \
                 instance of the library could be loaded ({why}), so a value kept from the first call was \
                 not looked for"
            ));
            return History::Comparable;
        }
        Some(Ok(r)) => r,
    };
    let mut wf =
        BlockWalk { routine: fresh.as_mut(), properties: w.properties, incs: w.incs, settings: w.settings };
    let on_fresh = match walk(&mut wf, c, report) {
        Ok(t) => t,
        Err((k, e)) => {
            fault(report, k, &e, &format!("the point alone on a new instance of the library ({said})"));
            return History::Failed;
        }
    };
    if let Some((k, what, now, before)) = first_difference(&second, &on_fresh, tol, n, ns) {
        report.add(
            BlockCheck::Independence,
            "history-dependence",
            Some(k),
            format!(
                "the point alone ({said}) as the first calls of a new instance of the library (its static \
                 and SAVE variables as at load) gave other results than the same walk after the check's \
                 calls at the path's start conditions, first at increment {k} in {what}: {now:.12e} on the \
                 new instance, {before:.12e} after the other calls: the routine keeps something from its \
                 first calls (a value computed once and saved, such as a modulus at the first call's \
                 temperature or density?); an explicit solver's first call covers points under other \
                 conditions than the ones that follow"
            ),
        );
        return History::Dependent;
    }
    report.notes.push(format!(
        "history: the point alone ({said}) gave the same outputs walked twice in a row and as the first calls \
         of a new instance of the library"
    ));
    History::Comparable
}
