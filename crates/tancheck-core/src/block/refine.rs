//! Increment refinement: the path walked with every increment split into 1, 2 and 4 equal
//! parts; the stresses at the ends of the original increments converge with the update's
//! order (differences falling by 2^order per halving), or agree to rounding for an update that
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

/// Run the check; findings go into `report`.
pub fn check(w: BlockWalk<'_>, report: &mut BlockReport) {
    let BlockWalk { routine, properties, incs, settings: s } = w;
    let mut runs = Vec::new();
    let mut alive = incs.len();
    for parts in [1, 2, 4] {
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
    }
    // Only the increments before any run deleted the point: when a point is deleted depends on
    // the increment size, and a deleted point's zero stress is no limit to converge to.
    let n = routine.info().ncomp;
    if s.softening {
        // Declared softening: only the increments before the first one that softens along its
        // own direction (the walk of one point measured it); where softening starts depends on
        // the increment size much as deletion does.
        if let Some(k) = report.increments.iter().position(|i| i.along_ratio < 0.0) {
            alive = alive.min(k);
        }
    }
    if alive == 0 {
        report.notes.push("refinement: the point is deleted in the first increment; not checked".into());
        return;
    }
    for r in &mut runs {
        r.truncate(alive * n);
    }
    let dist = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| (x - y).abs()).fold(0.0f64, f64::max);
    let scale = runs[2].iter().fold(0.0f64, |a, x| a.max(x.abs())).max(f64::MIN_POSITIVE);
    let e1 = dist(&runs[0], &runs[1]);
    let e2 = dist(&runs[1], &runs[2]);
    if e1 <= NOISE * scale {
        report.notes.push(format!(
            "refinement: halving the increments twice changed the stresses by at most {:.2e} of their size: \
             the update is exact in the increment size on this path",
            e1.max(e2) / scale
        ));
        return;
    }
    let order = if e2 > 0.0 { (e1 / e2).log2() } else { f64::INFINITY };
    if e2 > NOISE * scale && order < s.update_order - 0.5 {
        report.add(
            BlockCheck::Refinement,
            "refinement-order",
            None,
            format!(
                "halving the increments changed the stresses by {e1:.4e}, then by {e2:.4e}: observed order \
                 {order:.2}, below the declared {:.1}; the update does not converge as it should",
                s.update_order
            ),
        );
    } else {
        report.notes.push(format!(
            "refinement: differences {e1:.3e} then {e2:.3e} on halving, observed order {order:.2} (declared {:.1})",
            s.update_order
        ));
    }
}
