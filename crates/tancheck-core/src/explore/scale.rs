//! How large the random increments are: the routine's elastic range, measured from its own
//! response, and whether it responds to temperature.
//!
//! From the start state, single calls along a few directions (each active component alone,
//! and all of them together) with strain increments growing by factors of two from 1e-7 to 1
//! find the first increment whose call reports another branch than the smallest one did (or,
//! for a routine that reports no branch or never another, changes the state variables; or
//! fails); bisection narrows it to 1 %. The smallest of these
//! limits is the strain scale of the paths, and the stress of that call their stress scale
//! (for held stresses). A limit below 1e-6 (a law that flows at any stress, as creep does) is
//! no elastic range, and the fallback scale is used. No yield stress or modulus is read from the properties: a routine of
//! any law with any property layout is measured the same way.

use serde::{Deserialize, Serialize};

use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::routine::Caller;

/// The strain scale used when no probe direction leaves the elastic range up to a strain of 1
/// (an elastic or stateless routine): 1e-3, the order of the elastic range of metals (common
/// practice).
pub const FALLBACK_STRAIN: f64 = 1e-3;

/// A measured limit below this is no elastic range (ten times the smallest probe increment,
/// 1e-7): see [`measure`].
const NO_RANGE: f64 = 1e-6;

/// What the probe calls found.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Scale {
    /// The smallest strain (largest component, canonical tensor strain) at which a probe
    /// direction left the elastic range; the increments of the paths are multiples of it.
    pub strain: f64,
    /// The largest stress component at that strain.
    pub stress: f64,
    /// False when no direction left the elastic range up to a strain of 1 ([`FALLBACK_STRAIN`]
    /// was used).
    pub measured: bool,
    /// Whether the routine responds to a temperature increment (stress or state differ).
    pub uses_temperature: bool,
    /// `strain` is the declared `explore.strain_scale`, not the measured one.
    #[serde(default)]
    pub declared: bool,
    /// Routine calls the measurement made.
    pub calls: u64,
}

/// One call from the start with canonical increment `d` scaled by `s` and temperature
/// increment `dtemp`: the branch, whether the state changed, the stress (None on a fault).
fn probe(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    d: &[f64; 6],
    s: f64,
    dtemp: f64,
) -> Option<(i32, bool, Vec<f64>, Vec<f64>)> {
    let conv = caller.info().convention.clone();
    let mut dstrain = vec![0.0; conv.ncomp()];
    conv.strain_from_canonical(&d.map(|x| x * s), &mut dstrain);
    driver.set_increment_keep_count(&dstrain, dtemp);
    driver.base_call(caller).ok()?;
    let b = &driver.base;
    if b.stress.iter().chain(&b.state).any(|x| !x.is_finite()) {
        return None;
    }
    let changed = b.state.iter().zip(&driver.start().state).any(|(a, b)| a != b);
    Some((b.outcome.branch, changed, b.stress.clone(), b.state.clone()))
}

/// How the end of the elastic range shows.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Sign {
    /// The routine reports another branch than at the smallest increment.
    Branch,
    /// The state variables change.
    State,
}

/// The elastic limit along `d`: the smallest s (to 1 %) whose call shows `sign` (or fails);
/// with the largest stress just below it. None when s = 1 still does not, or when the
/// smallest increment already does (no elastic range to measure from this start).
fn limit_along(driver: &mut Driver, caller: &mut Caller<'_>, d: &[f64; 6], sign: Sign) -> Option<(f64, f64)> {
    let (branch0, changed0, ..) = probe(driver, caller, d, 1e-7, 0.0)?;
    if sign == Sign::State && changed0 {
        return None;
    }
    let elastic = |r: &Option<(i32, bool, Vec<f64>, Vec<f64>)>| match (r, sign) {
        (Some((b, ..)), Sign::Branch) => *b == branch0,
        (Some((_, changed, ..)), Sign::State) => !changed,
        (None, _) => false,
    };
    let mut lo = 1e-7;
    let mut hi = None;
    let mut s = 2e-7;
    while s <= 1.0 {
        if !elastic(&probe(driver, caller, d, s, 0.0)) {
            hi = Some(s);
            break;
        }
        lo = s;
        s *= 2.0;
    }
    let mut hi = hi?;
    while hi / lo > 1.01 {
        let mid = (lo * hi).sqrt();
        if elastic(&probe(driver, caller, d, mid, 0.0)) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let stress = probe(driver, caller, d, lo, 0.0)
        .map(|(_, _, st, _)| st.iter().fold(0.0f64, |m, x| m.max(x.abs())))
        .unwrap_or(0.0);
    Some((lo, stress))
}

/// Measure the scale of the routine behind `caller` from `start`. `slots` are the canonical
/// components the routine has.
pub fn measure(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    slots: &[usize],
) -> Result<Scale, CoreError> {
    let calls0 = caller.real_calls + caller.complex_calls;
    let info = caller.info().clone();
    let mut driver = Driver::new(&info, props, start.clone())?;
    driver.set_increment(&vec![0.0; info.convention.ncomp()], 0.0, 1.0);
    let mut directions: Vec<[f64; 6]> = slots
        .iter()
        .map(|&k| {
            let mut d = [0.0; 6];
            d[k] = 1.0;
            d
        })
        .collect();
    if slots.len() > 1 {
        let mut d = [0.0; 6];
        for &k in slots {
            d[k] = 1.0;
        }
        directions.push(d);
    }
    // A routine that reports branches ends its elastic range where the branch changes (its
    // state may change before, e.g. a largest failure measure kept from the first increment);
    // one that reports none, or whose branch never changes, where the state changes.
    let reports = probe(&mut driver, caller, &directions[0], 1e-7, 0.0).is_some_and(|(b, ..)| b >= 0);
    let mut best: Option<(f64, f64)> = None;
    let mut best_dir = directions[0];
    for sign in [Sign::Branch, Sign::State] {
        if (sign == Sign::Branch && !reports) || best.is_some() {
            continue;
        }
        for d in &directions {
            if let Some((s, stress)) = limit_along(&mut driver, caller, d, sign) {
                if best.is_none_or(|(b, _)| s < b) {
                    best = Some((s, stress));
                    best_dir = *d;
                }
            }
        }
    }
    // A limit within ten times the smallest probe increment is no elastic range: the routine
    // leaves its first branch (or changes its state) at almost any strain, as a creep law that
    // flows at any stress does. Its random paths were scaled to 1.3e-7 of strain, where the
    // law barely creeps, and the stress scale of their held stresses to 0.02 MPa (a user-style
    // sweep); the fallback is used instead, as for a law that never leaves it.
    let best = best.filter(|&(s, _)| s >= NO_RANGE);
    let (strain, stress, measured) = match best {
        Some((s, st)) => (s, st, true),
        None => {
            let st = probe(&mut driver, caller, &best_dir, FALLBACK_STRAIN, 0.0)
                .map(|(_, _, st, _)| st.iter().fold(0.0f64, |m, x| m.max(x.abs())))
                .unwrap_or(0.0);
            (FALLBACK_STRAIN, st, false)
        }
    };
    // Temperature: the same increments (inside and beyond the elastic range) with and without
    // a temperature increment of 10 (a tenth of the default window).
    let mut uses_temperature = false;
    for s in [0.5 * strain, 3.0 * strain] {
        let a = probe(&mut driver, caller, &best_dir, s, 0.0);
        let b = probe(&mut driver, caller, &best_dir, s, 10.0);
        if let (Some(a), Some(b)) = (&a, &b) {
            if a.2 != b.2 || a.3 != b.3 {
                uses_temperature = true;
            }
        } else if a.is_some() != b.is_some() {
            uses_temperature = true;
        }
    }
    Ok(Scale {
        strain,
        stress,
        measured,
        uses_temperature,
        declared: false,
        calls: caller.real_calls + caller.complex_calls - calls0,
    })
}
