//! Increment refinement: the path walked with every increment split into 1, 2 and 4 equal
//! parts, and on up to 64 while the differences do not yet fall with the order; the stresses at
//! the ends of the original increments converge with the update's order (differences falling
//! by 2^order per halving, over the last two halvings), or agree to rounding for an update that
//! is exact for the path. Increments from the first deletion in any of the walks on are left
//! out, and for a routine that declares softening those from the first softening increment.

use super::report::{BlockCheck, BlockReport};
use super::routine::BlockRoutine;
use super::settings::BlockSettings;
use super::step::BlockStep;
use super::walk::{BlockBuffers, BlockWalk};

/// Differences below this, relative to the stress scale, are rounding.
const NOISE: f64 = 1e-9;

fn walk(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    incs: &[BlockStep],
    s: &BlockSettings,
    parts: usize,
    report: &mut BlockReport,
) -> Result<(Vec<f64>, usize), String> {
    let n = routine.info().ncomp;
    let mut alive = incs.len();
    let mut b = BlockBuffers::new(1, n, &s.state0, s.conditions);
    let mut ends = Vec::with_capacity(incs.len() * n);
    let mut number = 0;
    for step in incs {
        let (de, dt) = (&step.strain_increment, step.time_increment);
        let h = 1.0 / parts as f64;
        b.set_temperature_increment(h * step.temperature_increment);
        for _ in 0..parts {
            for (x, d) in b.strain_increment.iter_mut().zip(de) {
                *x = h * d;
            }
            number += 1;
            report.real_calls += 1;
            b.call(routine, properties, dt * h, number).map_err(|e| e.to_string())?;
            if b.deleted[0] != 0 {
                alive = alive.min(ends.len() / n);
            }
            b.advance(dt * h);
        }
        ends.extend_from_slice(&b.stress_start);
    }
    Ok((ends, alive))
}

/// The most parts an increment is split into: a rate-dependent update whose time scale is a
/// small part of the increment (a stiff rate law at the onset of yield) converges with its order
/// only once the parts are small enough; the first halvings are not yet in that range (a correct
/// Johnson–Cook block routine showed order 0.07 after two halvings and 2 after five; a
/// user-style sweep).
const MOST_PARTS: usize = 64;

/// Run the check; findings go into `report`.
pub fn check(w: BlockWalk<'_>, report: &mut BlockReport) {
    let BlockWalk { routine, properties, incs, settings: s } = w;
    let n = routine.info().ncomp;
    let mut runs: Vec<Vec<f64>> = Vec::new();
    let mut alive = incs.len();
    // Declared softening: only the increments before the first one that softens along its own
    // direction (the walk of one point measured it); where softening starts depends on the
    // increment size much as deletion does.
    let mut softening_from = None;
    if s.softening {
        if let Some(k) = report.increments.iter().position(|i| i.along_ratio < 0.0) {
            alive = alive.min(k);
            softening_from = Some(k + 1);
        }
    }
    let dist = |a: &[f64], b: &[f64], alive: usize| {
        a[..alive * n].iter().zip(&b[..alive * n]).map(|(x, y)| (x - y).abs()).fold(0.0f64, f64::max)
    };
    // Differences between consecutive halvings, the last judged once there are two.
    let mut diffs: Vec<f64> = Vec::new();
    let mut parts = 1;
    while parts <= MOST_PARTS {
        match walk(routine, properties, incs, s, parts, report) {
            Ok((v, a)) => {
                runs.push(v);
                alive = alive.min(a);
            }
            // The same path in smaller increments, as a solver cutting its increment back
            // makes: a call that fails there is a fault of the routine.
            Err(e) => {
                report.add(
                    BlockCheck::Call,
                    "routine-fault",
                    None,
                    format!("the path with its increments split in {parts} (the refinement check): {e}"),
                );
                return;
            }
        }
        parts *= 2;
        if runs.len() < 3 {
            continue;
        }
        // Only the increments before any run deleted the point: when a point is deleted
        // depends on the increment size, and a deleted point's zero stress is no limit to
        // converge to.
        if alive == 0 {
            // Said for what stopped it (it blamed deletion where the declared softening began
            // in the first increment; a user-style sweep).
            report.notes.push(match softening_from {
                Some(1) => {
                    "refinement: the point softens (declared softening) from the first increment, where \
                            the response depends on the increment size; not checked"
                        .into()
                }
                _ => "refinement: the point is deleted in the first increment; not checked".into(),
            });
            return;
        }
        let k = runs.len();
        diffs = (1..k).map(|j| dist(&runs[j - 1], &runs[j], alive)).collect();
        let scale =
            runs[k - 1][..alive * n].iter().fold(0.0f64, |a, x| a.max(x.abs())).max(f64::MIN_POSITIVE);
        let (e1, e2) = (diffs[k - 3], diffs[k - 2]);
        if k == 3 && e1 <= NOISE * scale {
            report.notes.push(format!(
                "refinement: halving the increments twice changed the stresses by at most {:.2e} of their size: \
                 the update is exact in the increment size on this path",
                e1.max(e2) / scale
            ));
            return;
        }
        let order_of = |a: f64, b: f64| if b > 0.0 { (a / b).log2() } else { f64::INFINITY };
        let order = order_of(e1, e2);
        // Past the first judgement, two halvings in a row at the order: one ratio alone may be
        // a difference that jumped and fell back (deletion or softening moving with the size).
        let steady = k == 3 || order_of(diffs[k - 4], e1) >= s.update_order - 0.5;
        if e2 <= NOISE * scale || (order >= s.update_order - 0.5 && steady) {
            let list: Vec<String> = diffs.iter().map(|d| format!("{d:.3e}")).collect();
            report.notes.push(if k == 3 || e2 <= NOISE * scale && !steady {
                format!(
                    "refinement: differences {e1:.3e} then {e2:.3e} on halving, observed order {order:.2} (declared {:.1})",
                    s.update_order
                )
            } else {
                format!(
                    "refinement: differences {} on halving the increments {} times, observed order {order:.2} over the \
                     last two (declared {:.1}): the first halvings were not yet in the range where the update \
                     converges with its order (a time scale of the update small beside the increment?)",
                    list.join(", "),
                    k - 1,
                    s.update_order
                )
            });
            return;
        }
    }
    let list: Vec<String> = diffs.iter().map(|d| format!("{d:.4e}")).collect();
    let k = diffs.len();
    let order = (diffs[k - 2] / diffs[k - 1]).log2();
    report.add(
        BlockCheck::Refinement,
        "refinement-order",
        None,
        format!(
            "halving the increments {k} times (to {MOST_PARTS} parts) changed the stresses by {}: observed order \
             {order:.2} over the last two, below the declared {:.1}; the update does not converge as it should",
            list.join(", "),
            s.update_order
        ),
    );
}
