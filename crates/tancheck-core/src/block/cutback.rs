//! Increments a block routine asks to cut (`TC_BLOCK_STATUS_SMALLER_INCREMENT`, with the
//! largest fraction it expects to manage), as it would ask an explicit solver, which cuts its
//! time increment and goes on. The block check does the same, as the point check does
//! (`crate::cutback`): before its checks, the point alone walks the path with plain calls,
//! each increment the routine refuses split into equal parts of its strain, temperature and
//! time increments (as many as the fraction asks with a tenth to spare, at least twice as
//! many as before) until it takes every part; the checks then run on that path, with a note.
//! A request in a check's other calls (a perturbed call, a block of many points) stays a
//! failed call of that check. A call the memory guards flag is handed back (a loaded routine
//! says a guard finding once); any other fault in this walk, or more than [`MAX_PARTS`] parts,
//! leaves the path as given (the checks then meet the fault themselves).

use super::routine::{block_status, BlockRoutine};
use super::settings::BlockSettings;
use super::step::BlockStep;
use super::walk::BlockBuffers;
use crate::cutback::{more_parts, note, request_words, MAX_PARTS};
use crate::routine::Fault;

/// The cut path and the note saying so.
type CutPath = (Vec<BlockStep>, String);

/// The path cut where the routine asked, and the note saying so; `None` when nothing was cut;
/// the increment (from 1, of the path walked so far) and the fault when a call was flagged by
/// the memory guards. `calls` counts the calls made.
pub(super) fn cut(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    incs: &[BlockStep],
    s: &BlockSettings,
    calls: &mut u64,
) -> Result<Option<CutPath>, (usize, Fault)> {
    let n = routine.info().ncomp;
    let mut b = BlockBuffers::new(1, n, &s.state0, s.conditions);
    let mut out: Vec<BlockStep> = Vec::with_capacity(incs.len());
    let (mut cuts, mut words) = (Vec::new(), None);
    for (k, step) in incs.iter().enumerate() {
        let mut parts = 1usize;
        loop {
            let at = b.clone();
            let part = BlockStep {
                strain_increment: step.strain_increment.iter().map(|x| x / parts as f64).collect(),
                time_increment: step.time_increment / parts as f64,
                temperature_increment: step.temperature_increment / parts as f64,
            };
            let mut refused = None;
            for i in 0..parts {
                b.increment_of(0).copy_from_slice(&part.strain_increment);
                b.set_temperature_increment(part.temperature_increment);
                *calls += 1;
                match b.call(routine, properties, part.time_increment, (out.len() + i + 1) as i32) {
                    Ok(()) => b.advance(part.time_increment),
                    Err(Fault::Status { status, largest_fraction, message })
                        if status == block_status::SMALLER_INCREMENT =>
                    {
                        refused = Some((largest_fraction, message));
                        break;
                    }
                    // A guard finding is said once by a loaded routine (later calls that repeat
                    // it pass with the outputs as the routine left them): the checks would not
                    // meet it again, so it is handed back (an unwritten `deleted` flag was read
                    // as a deletion and an unwritten energy as a non-finite one; a user-style
                    // sweep). Any other fault the checks meet themselves.
                    Err(f @ Fault::Misbehaved { .. }) => return Err((out.len() + i + 1, f)),
                    Err(_) => return Ok(None),
                }
            }
            let Some((fraction, message)) = refused else {
                if parts > 1 {
                    cuts.push((k + 1, parts));
                }
                out.extend(std::iter::repeat_n(part, parts));
                break;
            };
            words.get_or_insert_with(|| request_words(fraction, &message));
            parts = more_parts(parts, fraction);
            if parts > MAX_PARTS {
                return Ok(None);
            }
            b = at;
        }
    }
    if cuts.is_empty() {
        return Ok(None);
    }
    let text = note(
        &words.unwrap_or_default(),
        &cuts,
        incs.len(),
        "equal parts of the strain, temperature and time increments",
        out.len(),
    );
    Ok(Some((out, text)))
}
