//! The point counterpart: a point routine of the same model, named by the manifest. Its
//! stress update must match the block routine's along the same path (within the stated
//! tolerance), and its tangent is checked as usual ([`crate::check::run`]); its verdict joins
//! the block report.

use super::report::{BlockCheck, BlockReport};
use super::routine::BlockRoutine;
use super::settings::BlockSettings;
use super::step::BlockStep;
use super::walk::BlockBuffers;
use crate::driver::PointState;
use crate::path::Path;
use crate::routine::{CallInput, CallOutput, Caller, Outcome, Routine};
use crate::settings::Settings;

/// Compare the updates of `block` and `point` along `path` (increments from
/// [`super::block_increments`]), then check the point routine's tangent.
#[allow(clippy::too_many_arguments)]
pub fn check(
    block: &mut dyn BlockRoutine,
    point: &mut dyn Routine,
    properties: &[f64],
    path: &Path,
    incs: &[BlockStep],
    s: &BlockSettings,
    tolerance: f64,
    report: &mut BlockReport,
) {
    let n = block.info().ncomp;
    let pi = point.info().clone();
    if pi.convention.ncomp() != n || pi.nstate != s.state0.len() || pi.nprop != properties.len() {
        report.add(
            BlockCheck::Counterpart,
            "counterpart-sizes",
            None,
            format!(
                "the point counterpart {} has {} components, {} state variables, {} properties; the block \
                 routine {n}, {}, {}",
                pi.name,
                pi.convention.ncomp(),
                pi.nstate,
                pi.nprop,
                s.state0.len(),
                properties.len()
            ),
        );
        return;
    }
    let mut b = BlockBuffers::new(1, n, &s.state0, s.conditions);
    let (mut strain, mut stress0, mut state0) = (vec![0.0; n], vec![0.0; n], s.state0.clone());
    let (mut stress, mut state, mut tangent, mut dsdt) =
        (vec![0.0; n], vec![0.0; s.state0.len()], vec![0.0; n * n], vec![0.0; n]);
    let mut energy = [0.0; 2];
    let mut outcome = Outcome::default();
    let mut time = 0.0;
    let mut peak = 0.0f64;
    let mut largest = 0.0f64;
    let mut temperature = s.conditions.temperature;
    for (k, step) in incs.iter().enumerate() {
        let (de, dt, dtemp) = (&step.strain_increment, &step.time_increment, step.temperature_increment);
        let inc = (k + 1) as i32;
        b.strain_increment.copy_from_slice(de);
        b.set_temperature_increment(dtemp);
        report.real_calls += 1;
        if let Err(e) = b.call(block, properties, *dt, inc) {
            report.notes.push(format!(
                "counterpart: the block routine failed in increment {inc} ({e}); compared up to there"
            ));
            break;
        }
        let input = CallInput {
            props: properties,
            strain: &strain,
            dstrain: de,
            temp: [temperature, dtemp],
            stress0: &stress0,
            state0: &state0,
            time: [time, *dt],
            increment: inc,
            want_tangent: true,
        };
        let mut output = CallOutput {
            stress: &mut stress,
            state: &mut state,
            tangent: &mut tangent,
            dstress_dtemp: &mut dsdt,
            energy: &mut energy,
            outcome: &mut outcome,
        };
        report.real_calls += 1;
        if let Err(e) = point.call(&input, &mut output) {
            report.add(
                BlockCheck::Counterpart,
                "counterpart-mismatch",
                Some(k + 1),
                format!("the point routine failed: {e}"),
            );
            return;
        }
        // Relative to the largest stress either routine has carried along the path so far (a
        // point routine's zero stress at a deleted point made the difference 1e303 of it).
        peak = stress.iter().chain(&b.stress[..n]).fold(peak, |a, x| a.max(x.abs()));
        let scale = peak.max(1e-300);
        // A stress that is not a finite number differs from any other (NaN compares with
        // nothing: it passed).
        let differ = |x: f64, y: f64| {
            if x.is_finite() && y.is_finite() {
                (x - y).abs()
            } else if x.to_bits() == y.to_bits() {
                0.0
            } else {
                f64::INFINITY
            }
        };
        let (i, d) =
            (0..n).map(|i| (i, differ(stress[i], b.stress[i]))).fold(
                (0, 0.0),
                |a, x| {
                    if x.1 > a.1 {
                        x
                    } else {
                        a
                    }
                },
            );
        largest = largest.max(d / scale);
        if d > tolerance * scale {
            report.add(
                BlockCheck::Counterpart,
                "counterpart-mismatch",
                Some(k + 1),
                format!(
                    "stress[{i}] of the block routine is {:.12e}, of the point routine {} {:.12e}: {}",
                    b.stress[i],
                    pi.name,
                    stress[i],
                    if d.is_finite() {
                        format!("a relative difference {:.3e} above the tolerance {tolerance:.1e}", d / scale)
                    } else {
                        "one is not a finite number".to_string()
                    }
                ),
            );
            return;
        }
        for (e, d) in strain.iter_mut().zip(de) {
            *e += d;
        }
        stress0.copy_from_slice(&stress);
        state0.copy_from_slice(&state);
        b.advance(*dt);
        time += dt;
        temperature += dtemp;
    }
    report.notes.push(format!(
        "counterpart: the stresses of {} and of the block routine agree along the path to {largest:.2e} \
         (tolerance {tolerance:.1e}, of the largest stress)",
        pi.name
    ));
    let start = PointState {
        temp: s.conditions.temperature,
        state: s.state0.clone(),
        ..PointState::zero(&pi, s.conditions.temperature)
    };
    let mut caller = Caller::new(point);
    match crate::check::run(&mut caller, properties, start, path, &Settings::default()) {
        Ok(r) if r.verdict == crate::report::Verdict::Pass => report
            .notes
            .push(format!("counterpart: the tangent of {} passes the check along the same path", pi.name)),
        Ok(r) => report.add(
            BlockCheck::Counterpart,
            "counterpart-tangent",
            r.increments.iter().find(|i| !i.passed()).map(|i| i.index),
            format!("the tangent of the point counterpart {} fails its check: {}", pi.name, r.finding()),
        ),
        Err(e) => report.notes.push(format!("counterpart: the tangent check did not run ({e})")),
    }
}
