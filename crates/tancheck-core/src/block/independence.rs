//! Point independence: the point under test gives the same results alone, in a block of 7 and
//! in a block of 128, at different positions, with neighbours on other paths (other branches:
//! at rest, elastic, reversed, far beyond yield) and under other conditions (a little warmer,
//! denser, with a shorter characteristic length). The first output that differs is named.
//!
//! The neighbours at rest (a zero strain increment over a nonzero time increment, as most
//! points of an explicit model are in most increments) must return finite stresses and state
//! variables: a direction Δε/|Δε| or a rate term ln ε̇ unguarded at zero gives NaN there
//! (`zero-rate-not-finite`, the finding the rate check makes at zero rate).

use super::report::{BlockCheck, BlockReport};
use super::routine::BlockRoutine;
use super::settings::BlockSettings;
use super::step::BlockStep;
use super::walk::{BlockBuffers, BlockWalk};
use crate::routine::Fault;

/// Scale factors of the neighbours' paths (0: at rest; small: elastic; negative: reversed;
/// large: far past yield), used in turn.
const NEIGHBOURS: [f64; 7] = [0.0, 0.05, -1.0, 3.0, 0.5, -0.2, 1.7];

/// How much warmer a neighbour starts (K, times 1 to 3), and by what share its density is
/// larger and its characteristic length smaller (times 1 to 3): small enough to stay within a
/// routine's range, large enough to show in any output that reads them.
const NEIGHBOUR_WARMER: f64 = 5.0;
const NEIGHBOUR_SHARE: f64 = 0.05;

/// (block size, position of the point under test, permuted neighbours).
const LAYOUTS: [(usize, usize, bool); 5] =
    [(7, 0, false), (7, 3, false), (7, 6, true), (128, 127, false), (128, 61, true)];

/// The point's outputs per increment when alone: stress, state, energies, deleted.
struct Trace {
    stress: Vec<f64>,
    state: Vec<f64>,
    energy: Vec<[f64; 2]>,
    deleted: Vec<i32>,
}

/// A block: the point under test at `at`, the others on their scaled paths.
struct Layout<'a> {
    at: usize,
    scales: &'a [f64],
}

fn walk(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    incs: &[BlockStep],
    s: &BlockSettings,
    layout: Layout<'_>,
    report: &mut BlockReport,
    mut visit: impl FnMut(usize, &BlockBuffers) -> bool,
) -> Result<(), (usize, Fault)> {
    let n = routine.info().ncomp;
    let npoints = layout.scales.len();
    let mut b = BlockBuffers::new(npoints, n, &s.state0, s.conditions);
    // The neighbours' own conditions differ a little from the point's (temperature, density,
    // characteristic length), so a point that reads a neighbour's shows it (one reading its
    // neighbour's temperature passed, found by a user-style sweep).
    for (p, c) in b.conditions.iter_mut().enumerate() {
        if p != layout.at {
            let k = (1 + p % 3) as f64;
            c.temperature += NEIGHBOUR_WARMER * k;
            c.density *= 1.0 + NEIGHBOUR_SHARE * k;
            c.characteristic_length *= 1.0 - NEIGHBOUR_SHARE * k;
        }
    }
    for (k, step) in incs.iter().enumerate() {
        let (de, dt) = (&step.strain_increment, &step.time_increment);
        b.set_temperature_increment(step.temperature_increment);
        for (p, &scale) in layout.scales.iter().enumerate() {
            let f = if p == layout.at { 1.0 } else { scale };
            for (x, d) in b.increment_of(p).iter_mut().zip(de) {
                *x = f * d;
            }
        }
        report.real_calls += 1;
        b.call(routine, properties, *dt, (k + 1) as i32).map_err(|e| (k + 1, e))?;
        if !visit(k + 1, &b) {
            return Ok(());
        }
        b.advance(*dt);
    }
    Ok(())
}

/// The first output of a neighbour at rest (scale 0, not the point under test) that is not
/// a finite number, in words: "the point at rest at position 3 returned stress[0] = NaN".
fn not_finite_at_rest(b: &BlockBuffers, scales: &[f64], at: usize, n: usize, ns: usize) -> Option<String> {
    for (p, _) in scales.iter().enumerate().filter(|&(p, &f)| f == 0.0 && p != at) {
        let stress = &b.stress[p * n..(p + 1) * n];
        let state = &b.state[p * ns..(p + 1) * ns];
        let bad = stress
            .iter()
            .position(|x| !x.is_finite())
            .map(|i| format!("stress[{i}] = {}", stress[i]))
            .or_else(|| {
                state.iter().position(|x| !x.is_finite()).map(|i| format!("state[{i}] = {}", state[i]))
            });
        if let Some(what) = bad {
            return Some(format!("the point at rest at position {p} returned {what}"));
        }
    }
    None
}

/// A call of the check that failed at increment `k` of the walk `place` names. A crash or a
/// memory guard's finding is the routine's fault whatever the neighbours' paths (an explicit
/// solver sends blocks of this size, at rest and far past yield alike); a failure the routine
/// reported (a status) may belong to a neighbour's path far past yield: a note, with `then`.
fn failed_call(report: &mut BlockReport, k: usize, e: &Fault, place: &str, then: &str) {
    if matches!(e, Fault::Crashed { .. } | Fault::Misbehaved { .. }) {
        report.add(BlockCheck::Independence, "routine-fault", Some(k), format!("{place}: {e}"));
    } else {
        report.notes.push(format!("independence: {place}, a call failed (increment {k}: {e}); {then}"));
    }
}

fn differs(a: f64, b: f64, scale: f64, tol: f64) -> bool {
    // The same value (the same infinity too: inf − inf is NaN, and a deleted point's inf in
    // the block and alone read as point-dependence; a user-style sweep), or NaN on both sides.
    if a == b || a.is_nan() && b.is_nan() {
        return false;
    }
    (a - b).abs() > tol * scale.max(f64::MIN_POSITIVE) || (a - b).is_nan()
}

/// Run the check; findings go into `report`.
pub fn check(w: BlockWalk<'_>, report: &mut BlockReport) {
    let BlockWalk { routine, properties, incs, settings: s } = w;
    let (n, ns) = (routine.info().ncomp, s.state0.len());
    let mut alone = Trace { stress: Vec::new(), state: Vec::new(), energy: Vec::new(), deleted: Vec::new() };
    let r = walk(routine, properties, incs, s, Layout { at: 0, scales: &[1.0] }, report, |_, b| {
        alone.stress.extend_from_slice(&b.stress);
        alone.state.extend_from_slice(&b.state);
        alone.energy.push([b.energy[0].internal, b.energy[0].dissipated]);
        alone.deleted.push(b.deleted[0]);
        true
    });
    if let Err((k, e)) = r {
        failed_call(report, k, &e, "the point alone along the path", "not checked");
        return;
    }
    let tol = s.independence_tolerance;
    let scale_of = |v: &[f64]| v.iter().fold(0.0f64, |a, x| a.max(x.abs()));
    for (size, at, permuted) in LAYOUTS {
        let mut scales: Vec<f64> = (0..size).map(|p| NEIGHBOURS[p % NEIGHBOURS.len()]).collect();
        if permuted {
            // A fixed permutation (multiplicative, 37 is prime to every size used).
            scales = (0..size).map(|p| NEIGHBOURS[(p * 37 + 5) % size % NEIGHBOURS.len()]).collect();
        }
        let mut found: Option<(usize, String)> = None;
        let mut at_rest: Option<(usize, String)> = None;
        let r = walk(routine, properties, incs, s, Layout { at, scales: &scales }, report, |k, b| {
            let i0 = k - 1;
            if let Some(w) = not_finite_at_rest(b, &scales, at, n, ns) {
                at_rest = Some((k, w));
                return false;
            }
            let a_stress = &alone.stress[i0 * n..(i0 + 1) * n];
            let a_state = &alone.state[i0 * ns..(i0 + 1) * ns];
            let b_stress = &b.stress[at * n..(at + 1) * n];
            let b_state = &b.state[at * ns..(at + 1) * ns];
            let mut what = None;
            if let Some(i) = (0..n).find(|&i| differs(b_stress[i], a_stress[i], scale_of(a_stress), tol)) {
                what = Some(format!(
                    "stress[{i}]: {:.12e} in the block, {:.12e} alone",
                    b_stress[i], a_stress[i]
                ));
            } else if let Some(i) = (0..ns).find(|&i| differs(b_state[i], a_state[i], scale_of(a_state), tol))
            {
                what =
                    Some(format!("state[{i}]: {:.12e} in the block, {:.12e} alone", b_state[i], a_state[i]));
            } else {
                let e = [b.energy[at].internal, b.energy[at].dissipated];
                let ea = alone.energy[i0];
                let sc = ea[0].abs().max(ea[1].abs());
                if let Some(j) = (0..2).find(|&j| differs(e[j], ea[j], sc, tol)) {
                    let name = ["energy.internal", "energy.dissipated"][j];
                    what = Some(format!("{name}: {:.12e} in the block, {:.12e} alone", e[j], ea[j]));
                } else if b.deleted[at] != alone.deleted[i0] {
                    what =
                        Some(format!("deleted: {} in the block, {} alone", b.deleted[at], alone.deleted[i0]));
                }
            }
            match what {
                Some(w) => {
                    found = Some((k, w));
                    false
                }
                None => true,
            }
        });
        if let Err((k, e)) = r {
            let place = format!("in a block of {size} (point under test at position {at})");
            failed_call(
                report,
                k,
                &e,
                &place,
                "perhaps for a neighbour's path; the layouts after it were not checked",
            );
            return;
        }
        if let Some((k, w)) = at_rest {
            report.add(
                BlockCheck::Independence,
                "zero-rate-not-finite",
                Some(k),
                format!(
                    "in a block of {size}, {w} for a zero strain increment over the time increment {:e} \
                     (a direction Δε/|Δε| or a rate term ln ε̇ not guarded at zero?): an explicit solver \
                     calls the routine with points at rest in most increments",
                    incs[k - 1].time_increment
                ),
            );
            return;
        }
        if let Some((k, w)) = found {
            report.add(
                BlockCheck::Independence,
                "point-dependence",
                Some(k),
                format!(
                    "the point at position {at} of a block of {size}{} differs from the same point alone \
                     first in {w}: it reads another point's inputs (an index off by one, a stride?) or a \
                     value the points before it in the block left (a static or SAVE variable, a work array \
                     shared by the points?)",
                    if permuted { " (neighbours permuted)" } else { "" }
                ),
            );
            return;
        }
    }
    report.notes.push(
        "independence: the point alone, in blocks of 7 (positions 0, 3, 6) and 128 (positions 127, 61) \
         with neighbours at rest, elastic, reversed and far past yield, under conditions of their own \
         (warmer, denser, a shorter characteristic length), gave the same outputs"
            .into(),
    );
}

#[cfg(test)]
mod tests {
    use super::differs;

    #[test]
    fn equal_values_never_differ_and_different_ones_do() {
        for v in [f64::INFINITY, f64::NEG_INFINITY, f64::NAN, 0.0, 1.5] {
            assert!(!differs(v, v, 1.0, 1e-12), "{v}");
        }
        assert!(differs(f64::INFINITY, f64::NEG_INFINITY, 1.0, 1e-12));
        assert!(differs(f64::INFINITY, 1.0, 1.0, 1e-12));
        assert!(differs(f64::NAN, 1.0, 1.0, 1e-12));
        assert!(differs(1.0, 1.1, 1.0, 1e-3) && !differs(1.0, 1.0 + 1e-15, 1.0, 1e-12));
    }
}
