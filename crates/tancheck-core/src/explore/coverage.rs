//! Coverage: the signature of an increment (the branch the routine reported and which state
//! variables changed), a walk of a path with base calls that gives each increment's
//! signature, and the tally of every signature reached.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::bisect::base_call_of;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::{Path, PathIncrement};
use crate::routine::{status, Caller, Fault};
use crate::settings::Settings;

/// What one increment did: the reported branch (None when the routine reports none) and the
/// state variables that changed, as sorted inclusive index ranges.
#[derive(
    Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize, schemars::JsonSchema,
)]
pub struct Signature {
    pub branch: Option<i32>,
    pub changed: Vec<(u32, u32)>,
}

impl Signature {
    /// The signature of a call from `state0` to `state` that reported `branch` (−1: none).
    pub fn of(branch: i32, state0: &[f64], state: &[f64]) -> Signature {
        let mut changed: Vec<(u32, u32)> = Vec::new();
        for (i, (a, b)) in state0.iter().zip(state).enumerate() {
            if a != b {
                let i = i as u32;
                match changed.last_mut() {
                    Some(r) if r.1 + 1 == i => r.1 = i,
                    _ => changed.push((i, i)),
                }
            }
        }
        Signature { branch: (branch >= 0).then_some(branch), changed }
    }

    /// For reading: "branch 1, state 0–12 changed", "no branch, state unchanged".
    pub fn label(&self) -> String {
        let b = match self.branch {
            Some(b) => format!("branch {b}"),
            None => "no branch".into(),
        };
        if self.changed.is_empty() {
            format!("{b}, state unchanged")
        } else {
            format!("{b}, state {} changed", ranges_text(&self.changed))
        }
    }
}

/// Index ranges as text: "0–5, 7, 9–12".
pub fn ranges_text(r: &[(u32, u32)]) -> String {
    let parts: Vec<String> =
        r.iter().map(|&(a, b)| if a == b { format!("{a}") } else { format!("{a}–{b}") }).collect();
    parts.join(", ")
}

/// A walk of a path with base calls (mixed-control solves included, as the check makes them).
pub struct Walked {
    /// The signature of each increment walked.
    pub signatures: Vec<Signature>,
    /// The path as walked: cut before an increment whose call asked for a smaller increment (a
    /// legitimate request, not a finding; the check would report it as a fault).
    pub path: Path,
    /// The increments were cut there (1-based index of the increment that asked).
    pub cut_at: Option<usize>,
}

/// Walk `path` from `start`: each increment's signature. A call that faults otherwise ends the
/// walk (the check that follows reports the fault).
pub fn walk(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    path: &Path,
    settings: &Settings,
) -> Result<Walked, CoreError> {
    let info = caller.info().clone();
    let conv = info.convention.clone();
    let mut driver = Driver::new(&info, props, start.clone())?;
    let mut dstrain = vec![0.0; conv.ncomp()];
    let mut signatures = Vec::with_capacity(path.increments.len());
    let mut kept: Vec<PathIncrement> = Vec::with_capacity(path.increments.len());
    let mut cut_at = None;
    for (k, inc) in path.increments.iter().enumerate() {
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        driver.set_increment(&dstrain, inc.dtemp, inc.dtime);
        match base_call_of(&mut driver, caller, inc, settings) {
            Ok(()) => {}
            Err(Fault::Status { status: s, .. }) if s == status::SMALLER_INCREMENT => {
                cut_at = Some(k + 1);
                break;
            }
            Err(_) => {
                kept.push(inc.clone());
                break;
            }
        }
        let b = &driver.base;
        if b.stress.iter().chain(&b.state).any(|x| !x.is_finite()) {
            kept.push(inc.clone());
            break;
        }
        signatures.push(Signature::of(b.outcome.branch, &driver.start().state, &b.state));
        kept.push(inc.clone());
        driver.advance();
    }
    let path = Path { name: path.name.clone(), increments: kept };
    Ok(Walked { signatures, path, cut_at })
}

/// Where a signature was first reached, and how often.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Reached {
    pub signature: Signature,
    /// Its label (see [`Signature::label`]).
    pub label: String,
    /// Increments and paths that reached it.
    pub increments: usize,
    pub paths: usize,
    /// The first path that reached it (its number, from 1) and the increment there.
    pub first_path: usize,
    pub first_increment: usize,
    /// That path up to that increment (replayable with `tancheck check --path FILE`).
    pub path: Path,
    /// The properties of that path (when they were drawn from the declared ranges).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub properties: Option<Vec<f64>>,
}

/// Every signature reached, in signature order.
#[derive(Default)]
pub struct Tally {
    pub reached: BTreeMap<Signature, Reached>,
}

impl Tally {
    /// Add the walk of path number `number`; the number of signatures it reached first.
    pub fn add(&mut self, number: usize, walked: &Walked, properties: Option<&[f64]>) -> usize {
        let mut new = 0;
        let mut seen_here: Vec<&Signature> = Vec::new();
        for (k, sig) in walked.signatures.iter().enumerate() {
            match self.reached.get_mut(sig) {
                Some(r) => {
                    r.increments += 1;
                    if !seen_here.contains(&sig) {
                        r.paths += 1;
                    }
                }
                None => {
                    new += 1;
                    let path = Path {
                        name: format!("{} (to increment {})", walked.path.name, k + 1),
                        increments: walked.path.increments[..=k].to_vec(),
                    };
                    self.reached.insert(
                        sig.clone(),
                        Reached {
                            signature: sig.clone(),
                            label: sig.label(),
                            increments: 1,
                            paths: 1,
                            first_path: number,
                            first_increment: k + 1,
                            path,
                            properties: properties.map(<[f64]>::to_vec),
                        },
                    );
                }
            }
            seen_here.push(sig);
        }
        new
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn signatures_name_the_changed_ranges() {
        let s = Signature::of(1, &[0.0, 0.0, 0.0, 1.0, 0.0], &[1.0, 2.0, 0.0, 1.5, 0.0]);
        assert_eq!(s.changed, vec![(0, 1), (3, 3)]);
        assert_eq!(s.label(), "branch 1, state 0–1, 3 changed");
        assert_eq!(Signature::of(-1, &[1.0], &[1.0]).label(), "no branch, state unchanged");
    }
}
