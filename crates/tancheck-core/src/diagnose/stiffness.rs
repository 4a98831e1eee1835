//! Two stiffnesses the cause trials compare a returned tangent with, each on a driver of its
//! own: the stiffness at the start of the path and the unloading stiffness at the end of the
//! increment.

use super::{BestTangent, ELASTIC_TIME};
use crate::driver::{Driver, PointState};
use crate::routine::Caller;

/// Fraction of the increment the initial-stiffness step takes from the path's start.
/// Why 1e-3: small enough to stay in the elastic range of a material whose increment reached
/// its inelastic range (yield and damage onset take strains well above a thousandth of an
/// increment on any path this tool drives), large enough for the difference schemes' steps.
const INITIAL_STEP: f64 = 1e-3;

/// The stiffness at the start of the path: the best numerical tangent (`best`, the scheme the
/// other trials use) at the end of a small step from the path's start state toward the strain
/// the increment ends at (the increment's own direction when that is the start's), on a
/// driver of its own (the increment's is left as it was). None
/// when the driver does not know where its path starts, the state at the increment's end is
/// the path's start state, the increment has no strain, or a call of the step fails (the trial
/// is then left out).
pub(super) fn initial_stiffness(
    driver: &Driver,
    caller: &mut Caller<'_>,
    best: &BestTangent<'_>,
) -> Option<Vec<f64>> {
    let origin = driver.origin()?;
    // Only for a state that has changed since the path's start (the increment's end state,
    // bit for bit): a point whose state variables are those it started with has no other
    // stiffness to be given (a tangent at the start temperature is another cause).
    let same_state = driver.base.state.iter().zip(&origin.state).all(|(a, b)| a.to_bits() == b.to_bits());
    if same_state || driver.dstrain().iter().all(|x| *x == 0.0) {
        return None;
    }
    let mut d = Driver::new(caller.info(), driver.props(), origin.clone()).ok()?;
    // Toward the strain the increment ends at, as long as the increment's step: the stiffness
    // on that side of the start (an unloading increment of a cohesive law stepped from the
    // start into compression and met the contact penalty, and a routine returning its
    // undamaged opening stiffness read `uniform-scale`; a user-style sweep). Along the
    // increment itself when it ends where the path started.
    let dstrain = driver.dstrain();
    let toward: Vec<f64> =
        driver.start().strain.iter().zip(dstrain).zip(&origin.strain).map(|((s, e), o)| s + e - o).collect();
    let norm = |v: &[f64]| v.iter().map(|x| x * x).sum::<f64>().sqrt();
    let (lt, ld) = (norm(&toward), norm(dstrain));
    let step: Vec<f64> = if lt > 0.0 && lt.is_finite() {
        toward.iter().map(|x| x / lt * ld * INITIAL_STEP).collect()
    } else {
        dstrain.iter().map(|x| x * INITIAL_STEP).collect()
    };
    d.set_increment(&step, 0.0, driver.dtime() * INITIAL_STEP);
    d.base_call(caller).ok()?;
    let n = driver.ncomp();
    let mut out = vec![0.0; n * n];
    best(&mut d, caller, &mut out).ok()?;
    out.iter().all(|x| x.is_finite()).then_some(out)
}

/// The unloading stiffness at the end of the increment: the derivative along a small step
/// back (a thousandth of the increment, in a millionth of its time) from the end state. The
/// background a term of the inelastic part is measured against: for a damage law the
/// stiffness of the damage reached, not of the damage at the start (a flipped damage term
/// read factors −0.68 to −0.87 against the start's; a user-style sweep). `None` when a call
/// fails or the increment is zero.
pub(super) fn elastic_at_end(
    driver: &Driver,
    caller: &mut Caller<'_>,
    best: &BestTangent<'_>,
) -> Option<Vec<f64>> {
    if driver.dstrain().iter().all(|x| *x == 0.0) {
        return None;
    }
    let s = driver.start();
    let end = PointState {
        strain: s.strain.iter().zip(driver.dstrain()).map(|(a, b)| a + b).collect(),
        stress: driver.base.stress.clone(),
        state: driver.base.state.clone(),
        temp: s.temp + driver.dtemp(),
        time: s.time + driver.dtime(),
    };
    let mut d = Driver::new(caller.info(), driver.props(), end).ok()?;
    let step: Vec<f64> = driver.dstrain().iter().map(|x| -1e-3 * x).collect();
    d.set_increment(&step, 0.0, driver.dtime() * ELASTIC_TIME);
    d.base_call(caller).ok()?;
    let mut out = vec![0.0; driver.ncomp() * driver.ncomp()];
    best(&mut d, caller, &mut out).ok()?;
    out.iter().all(|x| x.is_finite()).then_some(out)
}
