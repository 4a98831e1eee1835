//! A kink at the point that the central difference straddles: the central stencil's two
//! calls and the base call give both one-sided quotients of a column for free; a returned
//! column away from both is confirmed with two calls at a tenth of the step (see
//! [`super::judge`]).

use super::Measurement;
use crate::driver::{Direction, Driver};
use crate::routine::Caller;
use crate::schemes::Scheme;
use crate::settings::Settings;

/// A returned column this far (relative) from both one-sided quotients of the central
/// difference's calls is no one side's derivative: the level of the kink probe's gaps
/// ([`crate::diagnose::kink::GAP_LEVEL`]), above a smooth response's one-sided truncation at
/// the central step (about 1e-5 for a relative curvature of one).
pub(super) const STRADDLE_LEVEL: f64 = crate::diagnose::kink::GAP_LEVEL;

/// The bit of [`Measurement::straddled`] for the ∂σ/∂T column.
pub(super) const TEMPERATURE_BIT: usize = 6;

/// The relative distance of the returned column `r` from the nearer of the one-sided
/// quotients (plus − base)/h and (base − minus)/h, made from a central difference's two calls
/// and the base call (no call of its own). On a smooth response both quotients are within the
/// one-sided truncation of the derivative; at a kink at the point they are its two sides, and
/// their mean, which the central difference gives, is neither.
pub(super) fn one_sided_distance(
    base: &[f64],
    plus: &[f64],
    minus: &[f64],
    r: &[f64],
    h: f64,
    floor: f64,
) -> f64 {
    // The quotients' 1/h is taken out of both sums (it cancels in the ratio): one division
    // per column instead of two per entry (this runs on every column of every increment).
    let (mut df, mut db, mut nf, mut nb) = (0.0, 0.0, 0.0, 0.0);
    for i in 0..r.len() {
        let f = plus[i] - base[i];
        let b = base[i] - minus[i];
        let rh = r[i] * h;
        df += (rh - f) * (rh - f);
        db += (rh - b) * (rh - b);
        nf += f * f;
        nb += b * b;
    }
    let ah = h.abs();
    let d = df.min(db).sqrt() / nf.max(nb).sqrt().max(floor * ah).max(f64::MIN_POSITIVE);
    if d.is_nan() {
        0.0
    } else {
        d
    }
}

/// The level above which a straddled column is looked at: [`STRADDLE_LEVEL`], or the central
/// check's own tolerance when it was loosened (a noisy routine's), never stricter than it.
pub(super) fn straddle_level(settings: &Settings) -> f64 {
    STRADDLE_LEVEL.max(settings.central.tol)
}

/// Whether a kink sits at the point in a column the central difference straddled: the same
/// distance at a tenth of the step (two calls per straddled column) neither shrinks as a
/// one-sided truncation would nor grows as noise does. Returns (some strain column, the
/// ∂σ/∂T column).
pub(super) fn kink_straddled(
    me: &Measurement,
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    settings: &Settings,
) -> (bool, bool) {
    let n = me.n;
    let Some(central) = me.measured.iter().find(|m| m.scheme == Scheme::Central && m.outcome.is_none())
    else {
        return (false, false);
    };
    let ht = settings.central.rel_step * driver.temp_scale(settings.temp_floor);
    let mut kinked = (false, false);
    for j in (0..=TEMPERATURE_BIT).filter(|&j| me.straddled & (1 << j) != 0) {
        let (dir, h, returned, floor) = if j == TEMPERATURE_BIT {
            match &me.returned_dtemp {
                Some(ret) => (Direction::Temperature, 0.1 * ht, &ret[..n], me.dtemp_abs_floor),
                None => continue,
            }
        } else {
            (Direction::Strain(j), 0.1 * central.h, &me.returned[j * n..(j + 1) * n], me.column_floor)
        };
        let calls =
            driver.perturbed_call(caller, dir, h).and_then(|()| driver.perturbed_call(caller, dir, -h));
        if calls.is_err() {
            continue;
        }
        let d = one_sided_distance(
            &driver.base.stress[..n],
            &driver.plus.stress[..n],
            &driver.minus.stress[..n],
            returned,
            h,
            floor,
        );
        // A kink's distance holds at a tenth of the step; smooth truncation falls tenfold and
        // noise (an inner solve's tolerance) grows tenfold. Why 0.7 and 1.5: the distance at a
        // kink moves by its sides' truncation only.
        let d1 = me.straddle_distance[j];
        if d > straddle_level(settings) && d >= 0.7 * d1 && d <= 1.5 * d1 {
            if j == TEMPERATURE_BIT {
                kinked.1 = true;
            } else {
                kinked.0 = true;
            }
        }
    }
    kinked
}
