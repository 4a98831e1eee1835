//! Increments of a path in F the routine asks to cut (`TC_STATUS_SMALLER_INCREMENT`): walked
//! again with base calls, each refused increment split into equal parts of F (linear between
//! its ends, as a solver's displacement increment splits) and of its time, as the small-strain
//! check does (`crate::cutback`, the same number of parts and the same limit).

use super::mat3::Mat3;
use super::numeric::Workspace;
use super::path::{path_start, FinitePath};
use super::routine::FiniteRoutine;
use crate::cutback::{more_parts, request_words, MAX_PARTS};
use crate::routine::{status, Fault};

/// The path cut where the routine asked, and what was cut.
pub(super) struct FiniteCut {
    pub path: FinitePath,
    /// (increment of the path given, 1-based; parts it was cut into).
    pub cuts: Vec<(usize, usize)>,
    /// The first request, in the routine's words.
    pub words: String,
}

impl FiniteCut {
    /// The report's note, for a path of `given` increments.
    pub fn note(&self, given: usize) -> String {
        crate::cutback::note(
            &self.words,
            &self.cuts,
            given,
            "equal parts of F and of the time",
            self.path.gradients.len() - 1,
        )
    }
}

/// F after `i` of `parts` equal parts of the way from `a` to `b` (`b` itself at the end).
fn between(a: &Mat3<f64>, b: &Mat3<f64>, i: usize, parts: usize) -> Mat3<f64> {
    if i == parts {
        return *b;
    }
    let t = i as f64 / parts as f64;
    std::array::from_fn(|r| std::array::from_fn(|c| a[r][c] + t * (b[r][c] - a[r][c])))
}

/// Walk `path` with base calls, cutting every increment the routine refuses as too large.
/// `None` when nothing was cut, another fault stops the walk, or an increment needs more than
/// [`MAX_PARTS`] parts.
pub(super) fn cut(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
) -> Option<FiniteCut> {
    let info = r.info().clone();
    let mut ws = Workspace::new(info.nstate, info.nproperties);
    let mut start = path_start(properties, state0, path);
    let mut gradients = vec![path.gradients[0]];
    let mut dtime = Vec::with_capacity(path.gradients.len());
    let (mut cuts, mut words) = (Vec::new(), None);
    for k in 1..path.gradients.len() {
        let (a, b) = (path.gradients[k - 1], path.gradients[k]);
        let whole = path.dtime.get(k - 1).copied().unwrap_or(1.0);
        let mut parts = 1usize;
        loop {
            let at = start.clone();
            let mut refused = None;
            for i in 1..=parts {
                let f1 = between(&a, &b, i, parts);
                start.increment = (gradients.len() + i - 1) as i32;
                start.time[1] = whole / parts as f64;
                match ws.call_full(r, &start, &f1) {
                    Ok(base) => {
                        start.f0 = f1;
                        start.time[0] += start.time[1];
                        start.stress0 = base.stress;
                        start.state0.copy_from_slice(&base.state);
                    }
                    Err(Fault::Status { status: s, largest_fraction, message })
                        if s == status::SMALLER_INCREMENT =>
                    {
                        refused = Some((largest_fraction, message));
                        break;
                    }
                    Err(_) => return None,
                }
            }
            let Some((fraction, message)) = refused else { break };
            words.get_or_insert_with(|| request_words(fraction, &message));
            parts = more_parts(parts, fraction);
            if parts > MAX_PARTS {
                return None;
            }
            start = at;
        }
        if parts > 1 {
            cuts.push((k, parts));
        }
        gradients.extend((1..=parts).map(|i| between(&a, &b, i, parts)));
        dtime.extend(std::iter::repeat_n(whole / parts as f64, parts));
    }
    if cuts.is_empty() {
        return None;
    }
    Some(FiniteCut { path: FinitePath { gradients, dtime }, cuts, words: words.unwrap_or_default() })
}
