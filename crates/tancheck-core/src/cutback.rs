//! Increments the routine asks to cut: a base call that returns
//! `TC_STATUS_SMALLER_INCREMENT` (with the largest fraction of the increment it expects to
//! manage) says the increment is too large for the routine, as it would say to a solver,
//! which cuts the increment back and goes on. A check does the same: when its path stopped
//! at such a request, the path is walked again with base calls, each increment the routine
//! refuses split into equal parts (as many as the fraction asks with a tenth to spare, at least
//! twice as many as before) until it takes every part, and the check runs on that path, with a note saying
//! which increments were cut and into how many parts. Any other fault in that walk, a held
//! stress (mixed control) or more than [`MAX_PARTS`] parts leave the first report as it was.

use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::{Path, PathIncrement};
use crate::report::Report;
use crate::routine::{status, Caller, Fault};

/// Parts one increment of the path may be cut into.
pub const MAX_PARTS: usize = 1024;

/// The share of the fraction the routine asks for that a part takes.
const MARGIN: f64 = 0.9;

/// The words of a fault that asks for a smaller increment (`Fault::Status` displayed).
fn asks_smaller(message: &str) -> bool {
    message.starts_with(&format!("the routine returned status {}", status::SMALLER_INCREMENT))
}

/// Whether `report` stopped at a base call that asked for a smaller increment.
pub fn stopped_for_smaller(report: &Report) -> bool {
    report
        .first_fault()
        .is_some_and(|f| f.signal.is_none() && f.call.perturbation.is_none() && asks_smaller(&f.message))
}

/// The path cut where the routine asked, and what was cut.
#[derive(Clone, Debug)]
pub struct Cut {
    pub path: Path,
    /// (increment of the path given, 1-based; parts it was cut into).
    pub cuts: Vec<(usize, usize)>,
    /// The first request, as the fault says it.
    pub words: String,
}

impl Cut {
    /// The report's note.
    pub fn note(&self, given: usize) -> String {
        note(&self.words, &self.cuts, given, "equal parts", self.path.increments.len())
    }
}

/// The note of a cut path: the routine's `words`, the `cuts` of the `given` increments into
/// `parts` (what a part is), `total` increments in all.
pub(crate) fn note(words: &str, cuts: &[(usize, usize)], given: usize, parts: &str, total: usize) -> String {
    let listed: Vec<String> = cuts.iter().take(8).map(|(k, p)| format!("{k} into {p}")).collect();
    let more = cuts.len().saturating_sub(8);
    format!(
        "the routine asked for a smaller increment ({words}), as it would ask a solver: the path was \
         checked with {} of its {given} increments cut into {parts} ({}{}), {total} increments in all; \
         increment numbers are those of the cut path",
        cuts.len(),
        listed.join(", "),
        if more > 0 { format!(" and {more} more") } else { String::new() },
    )
}

/// Walk `path` from `start` with base calls, cutting every increment the routine refuses as
/// too large. `None` when nothing was cut or the path cannot be cut (see the module's text).
pub fn cut(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    path: &Path,
) -> Result<Option<Cut>, CoreError> {
    if path.increments.iter().any(|i| i.hold_stress.is_some()) {
        return Ok(None);
    }
    let info = caller.info().clone();
    let conv = &info.convention;
    let mut driver = Driver::new(&info, props, start.clone())?;
    let mut dstrain = vec![0.0; conv.ncomp()];
    let mut increments = Vec::with_capacity(path.increments.len());
    let (mut cuts, mut words) = (Vec::new(), None);
    for (k, inc) in path.increments.iter().enumerate() {
        let mut parts = 1usize;
        loop {
            let at = driver.start().clone();
            let part = scaled(inc, parts);
            conv.strain_from_canonical(&part.dstrain, &mut dstrain);
            let mut made = 0;
            let refused = loop {
                if made == parts {
                    break None;
                }
                driver.set_increment(&dstrain, part.dtemp, part.dtime);
                match driver.base_call(caller) {
                    // (Outputs that are not finite are the check's to report.)
                    Ok(()) => {
                        driver.advance();
                        made += 1;
                    }
                    Err(Fault::Status { status: s, largest_fraction, message })
                        if s == status::SMALLER_INCREMENT =>
                    {
                        break Some((largest_fraction, message));
                    }
                    Err(_) => return Ok(None),
                }
            };
            let Some((fraction, message)) = refused else { break };
            if words.is_none() {
                words = Some(request_words(fraction, &message));
            }
            parts = more_parts(parts, fraction);
            if parts > MAX_PARTS {
                return Ok(None);
            }
            driver = Driver::new(&info, props, at)?;
        }
        if parts > 1 {
            cuts.push((k + 1, parts));
        }
        increments.extend(std::iter::repeat_n(scaled(inc, parts), parts));
    }
    if cuts.is_empty() {
        return Ok(None);
    }
    let name = format!("{}, cut where the routine asked", path.name);
    Ok(Some(Cut { path: Path { name, increments }, cuts, words: words.unwrap_or_default() }))
}

/// One of `parts` equal parts of `inc`.
fn scaled(inc: &PathIncrement, parts: usize) -> PathIncrement {
    let p = parts as f64;
    PathIncrement {
        dstrain: inc.dstrain.map(|x| x / p),
        dtemp: inc.dtemp / p,
        dtime: inc.dtime / p,
        hold_stress: None,
    }
}

/// A request as a note says it: "status 1, largest fraction 0.5: <the routine's message>".
pub(crate) fn request_words(fraction: f64, message: &str) -> String {
    let fr = if fraction > 0.0 && fraction < 1.0 {
        format!(", largest fraction {fraction:.3}")
    } else {
        String::new()
    };
    let said = if message.is_empty() { String::new() } else { format!(": {message}") };
    format!("status {}{fr}{said}", status::SMALLER_INCREMENT)
}

/// The parts of an increment whose part (one of `parts`) was refused with `fraction`: as many
/// as the fraction asks, with a tenth to spare (a part at the very limit would have the
/// difference steps beyond it), at least twice as many.
pub(crate) fn more_parts(parts: usize, fraction: f64) -> usize {
    let asked =
        if fraction > 0.0 && fraction < 1.0 { (parts as f64 / (MARGIN * fraction)).ceil() } else { 0.0 };
    (asked as usize).max(2 * parts)
}
