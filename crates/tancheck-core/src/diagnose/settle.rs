//! Whether the stress update settled: a zero increment (Δε = 0, ΔT = 0, Δt → 0) from the end
//! of a failed increment must give back its end stress. An update that does not end at a state
//! it keeps (a local Newton iteration stopped before it converged, a return that falls short of
//! the yield surface, a state variable not stored) moves it, and its numerical derivative is
//! then that of an unconverged map, which no tangent of the converged one matches: the tangent
//! causes would name a term of the right tangent "scaled" or "of the wrong sign" (a
//! two-back-stress plasticity routine whose local Newton made one iteration read `term-sign`;
//! a user-style sweep). The `zero-increment` probe looks at the same thing along a whole path.

use super::Fault;
use crate::driver::Driver;
use crate::routine::Caller;

/// The finding of an increment whose update did not settle.
pub const UNSETTLED_FINDING: &str = "unsettled-update";

/// A stress moved by more than this, relative to its size, by a zero increment from the end of
/// the increment has not settled. Why 1e-5: local iterations stop at 1e-8 to 1e-12 of the
/// stress (common practice), and a zero increment from a state on the yield surface to that
/// tolerance moves the stress by about as much; an unconverged iteration leaves a residual of
/// the size of its last correction (1e-3 after one Newton step in the case above).
pub const SETTLE_LEVEL: f64 = 1e-5;

/// How far a zero increment from the end of the driver's increment moves the stress, relative
/// to its size, and whether it changes the state, when the stress moves by more than
/// [`SETTLE_LEVEL`]. `None` when it does not, or when the look says nothing (the call fails
/// or refuses, gives values that are not finite numbers, or the end stress is zero).
///
/// The zero increment takes a hundred-millionth of the increment's time and then a
/// billionth (none where the increment takes none): a time increment of exactly 0 turns some
/// viscous updates rate-independent (a viscosity η/Δt set to 0 when Δt is), which returns an
/// overstress to the static yield surface (a correct Perzyna-type update read unsettled), and
/// a rate law moves the stress in proportion to the time it is given; an unsettled update
/// moves it as much in the shorter time. Two calls.
pub fn unsettled(driver: &Driver, caller: &mut Caller<'_>) -> Option<(f64, bool)> {
    let dtime = driver.dtime();
    let look = |caller: &mut Caller<'_>, dt: f64| -> Option<(f64, bool)> {
        let mut d = driver.clone();
        d.advance();
        let zeros = vec![0.0; d.ncomp()];
        d.set_increment(&zeros, 0.0, dt);
        let called: Result<(), Fault> = d.base_call(caller);
        called.ok()?;
        let (end, again) = (&d.start().stress, &d.base.stress);
        let size = end.iter().map(|x| x * x).sum::<f64>().sqrt();
        let moved = end.iter().zip(again).map(|(a, b)| (a - b) * (a - b)).sum::<f64>().sqrt() / size;
        let state_moved = d.base.state.iter().zip(&d.start().state).any(|(a, b)| a != b);
        (moved.is_finite() && size > 0.0).then_some((moved, state_moved))
    };
    if dtime == 0.0 {
        return look(caller, 0.0).filter(|(m, _)| *m > SETTLE_LEVEL);
    }
    let (longer, _) = look(caller, 1e-8 * dtime).filter(|(m, _)| *m > SETTLE_LEVEL)?;
    let (shorter, state_moved) = look(caller, 1e-9 * dtime)?;
    (shorter > SETTLE_LEVEL && shorter > 0.5 * longer).then_some((shorter, state_moved))
}

/// The words of the finding, for the increment's reason.
pub fn words(moved: f64, state_moved: bool) -> String {
    format!(
        "a zero increment (Δε = 0, ΔT = 0, Δt → 0) from the end of this increment moves the stress by {moved:.2e} of \
         its size{}: the update does not end at a state it keeps (a local iteration stopped before it converged, a \
         return short of the yield surface, or a state variable not stored), so the derivative measured is that of \
         an unsettled map and no tangent of the settled one matches it; settle the update first",
        if state_moved { " and changes the state variables" } else { "" }
    )
}
