//! Declared damage variables never fall: along the point's path, each state variable the
//! manifest names as damage (`block.damage`) ends every increment at least where it started,
//! in loading, unloading, reloading and after deletion alike. A damage that falls heals the
//! material: a solver sees the stiffness come back without any cause.

use super::report::{BlockCheck, BlockReport};

/// A fall below the start value by more than this share of the larger of the two (and of 1)
/// is a fall, not rounding (common practice: a thousand roundings of margin).
const FALL_ROUNDING: f64 = 1e-12;

/// The damage variables watched along one point's path.
pub(crate) struct DamageWatch<'a> {
    indices: &'a [usize],
    /// Each variable's first fall is reported (later ones would repeat it).
    fell: Vec<bool>,
    grew: bool,
}

impl<'a> DamageWatch<'a> {
    pub(crate) fn new(indices: &'a [usize]) -> DamageWatch<'a> {
        DamageWatch { indices, fell: vec![false; indices.len()], grew: false }
    }

    /// After increment `index`: the state at its start and at its end.
    pub(crate) fn after(&mut self, start: &[f64], end: &[f64], index: usize, report: &mut BlockReport) {
        for (k, &i) in self.indices.iter().enumerate() {
            let (Some(&a), Some(&b)) = (start.get(i), end.get(i)) else { continue };
            if b > a {
                self.grew = true;
            }
            if !self.fell[k] && b < a - FALL_ROUNDING * a.abs().max(b.abs()).max(1.0) {
                self.fell[k] = true;
                report.add(
                    BlockCheck::Damage,
                    "damage-decreases",
                    Some(index),
                    format!(
                        "state[{i}], declared damage, fell from {a:.9e} to {b:.9e} in this increment: a damage \
                         variable never decreases (the material heals)"
                    ),
                );
            }
        }
    }

    /// The check's note: what was watched, how far (to the end of the path, or to the
    /// increment the walk `stopped` at, which did not end), and whether the damage grew at all
    /// (a damage that never grew makes a weak test).
    pub(crate) fn finish(self, stopped: Option<usize>, report: &mut BlockReport) {
        if self.indices.is_empty() {
            report
                .notes
                .push("damage: no state variable declared as damage (block.damage); not checked".into());
            return;
        }
        let list = self.indices.iter().map(|i| format!("state[{i}]")).collect::<Vec<_>>().join(", ");
        let note = match stopped {
            Some(1) => format!("damage: {list} not checked: the walk stopped at the first increment"),
            Some(at) => format!(
                "damage: {list} checked never to decrease up to increment {} (the walk stopped at increment \
                 {at}){}",
                at - 1,
                if self.grew { "" } else { "; the damage did not grow there (a weak test)" }
            ),
            None => format!(
                "damage: {list} checked never to decrease along the path{}",
                if self.grew { "" } else { "; the damage did not grow on this path (a weak test)" }
            ),
        };
        report.notes.push(note);
    }
}
