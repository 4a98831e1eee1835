//! Rigid rotations of the finite-strain probes, cut where the routine asks for a smaller
//! increment (`TC_STATUS_SMALLER_INCREMENT`), as the check cuts the path's increments
//! (`super::cutback`): each part a rigid rotation about the probes' axis.

use super::mat3::{self, Mat3};
use super::numeric::{Result1, Start, Workspace};
use super::routine::FiniteRoutine;
use crate::routine::Fault;

/// The axis of the probes' rigid rotations.
pub(super) const AXIS: [f64; 3] = [0.2, -0.5, 1.0];

/// Whether `e` is the routine asking for a smaller increment.
pub(super) fn asks_smaller(e: &Fault) -> bool {
    matches!(e, Fault::Status { status, .. } if *status == crate::routine::status::SMALLER_INCREMENT)
}

/// The largest number of parts a rigid rotation was cut into, where the routine asked for
/// smaller increments (1: none was cut).
#[derive(Default)]
pub(super) struct RotationCuts(pub(super) usize);

/// A rigid rotation about [`AXIS`] from the angle `from` to `to` (radians), F = Q(angle) `base`,
/// made from `s` in one call or, where the routine asks for a smaller increment, in equal
/// parts of the angle (each part a rigid rotation too, as a solver cuts back), up to the
/// check's limit of parts. The last call's results.
pub(super) fn rotate_rigidly(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    s: &Start,
    base: &Mat3<f64>,
    (from, to): (f64, f64),
    cuts: &mut RotationCuts,
) -> Result<Result1, Fault> {
    use crate::cutback::{more_parts, MAX_PARTS};
    let mut parts = 1usize;
    loop {
        let mut at = s.clone();
        at.time[1] /= parts as f64;
        let (mut last, mut refused) = (None, None);
        for i in 1..=parts {
            let angle = from + (to - from) * i as f64 / parts as f64;
            let f1 = mat3::mul(&mat3::axis_rotation(AXIS, angle), base);
            match ws.call_full(r, &at, &f1) {
                Ok(res) => {
                    at.f0 = f1;
                    at.time[0] += at.time[1];
                    at.stress0 = res.stress;
                    at.state0.clone_from(&res.state);
                    last = Some(res);
                }
                Err(Fault::Status { status, largest_fraction, .. })
                    if status == crate::routine::status::SMALLER_INCREMENT && parts < MAX_PARTS =>
                {
                    refused = Some(largest_fraction);
                    break;
                }
                Err(e) => return Err(e),
            }
        }
        match (refused, last) {
            (Some(fraction), _) => parts = more_parts(parts, fraction).min(MAX_PARTS),
            (None, Some(res)) => {
                cuts.0 = cuts.0.max(parts);
                return Ok(res);
            }
            (None, None) => unreachable!("a rotation has at least one part"),
        }
    }
}

/// The note of a rotation probe whose rigid rotations were cut.
pub(super) fn rotation_note(name: &str, cuts: &RotationCuts) -> Option<String> {
    (cuts.0 > 1).then(|| {
        format!(
            "{name}: the routine asked for smaller increments; its rigid rotations were made in up to {} equal \
             parts of the angle, each a rigid rotation",
            cuts.0
        )
    })
}
