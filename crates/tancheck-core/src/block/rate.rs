//! Rate dependence, for a routine that declares a rate law (a reference rate ε̇₀ and the
//! coefficient C of Johnson & Cook 1983: the flow stress scales with 1 + C ln(ε̇/ε̇₀) above
//! ε̇₀):
//!
//! - **zero rate**: after loading along the path, an increment with no strain and a positive
//!   time increment (strain rate zero), and the same from the start state, give finite
//!   stresses and succeed (ln ε̇ → −∞ must be guarded);
//! - **two rates**: the loading part of the path walked with time increments that make the
//!   equivalent strain rate r₁ ε̇₀ and r₂ ε̇₀ (10 and 1000); the equivalent stress at the most
//!   stressed increment changes by the declared law, (1 + C ln r₂)/(1 + C ln r₁), within
//!   [`RATE_TOLERANCE`] of the rate effect. The plastic rate equals the total rate only in
//!   steady plastic flow: the path must take the point well past yield.

use super::report::{BlockCheck, BlockReport};
use super::routine::BlockRoutine;
use super::settings::{BlockSettings, RateLaw};
use super::step::BlockStep;
use super::walk::{BlockBuffers, BlockWalk};

/// The two rates, in multiples of the reference rate.
pub const RATES: [f64; 2] = [10.0, 1000.0];
/// Allowed relative error of the rate effect (ratio − 1): the plastic rate trails the total
/// rate while the elastic part of the increments is not negligible (common practice, not a
/// published bound).
pub const RATE_TOLERANCE: f64 = 0.1;

fn equivalent_strain(de: &[f64]) -> f64 {
    let m = (de[0] + de[1] + de[2]) / 3.0;
    let q: f64 =
        de.iter().enumerate().map(|(i, &x)| if i < 3 { (x - m) * (x - m) } else { 0.5 * x * x }).sum();
    (2.0 / 3.0 * q).sqrt()
}

fn equivalent_stress(s: &[f64]) -> f64 {
    let q = 0.5 * ((s[0] - s[1]).powi(2) + (s[1] - s[2]).powi(2) + (s[2] - s[0]).powi(2))
        + 3.0 * s[3..].iter().map(|t| t * t).sum::<f64>();
    q.sqrt()
}

/// The increments up to the first one that turns back (the loading part).
fn loading(incs: &[BlockStep]) -> &[BlockStep] {
    let first = &incs[0].strain_increment;
    let end = incs
        .iter()
        .position(|step| step.strain_increment.iter().zip(first).map(|(a, b)| a * b).sum::<f64>() < 0.0)
        .unwrap_or(incs.len());
    &incs[..end.max(1)]
}

/// Walk `incs` at equivalent rate `rate` (or with the path's time increments when `None`);
/// the largest equivalent stress, and the buffers at the end.
fn walk(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    incs: &[BlockStep],
    s: &BlockSettings,
    rate: Option<f64>,
    report: &mut BlockReport,
) -> Result<(f64, BlockBuffers), String> {
    let n = routine.info().ncomp;
    let mut b = BlockBuffers::new(1, n, &s.state0, s.conditions);
    let mut largest = 0.0f64;
    for (k, step) in incs.iter().enumerate() {
        let de = &step.strain_increment;
        let dt = match rate {
            Some(r) => (equivalent_strain(de) / r).max(f64::MIN_POSITIVE),
            None => step.time_increment,
        };
        b.strain_increment.copy_from_slice(de);
        b.set_temperature_increment(step.temperature_increment);
        report.real_calls += 1;
        b.call(routine, properties, dt, (k + 1) as i32).map_err(|e| format!("increment {}: {e}", k + 1))?;
        if b.stress.iter().any(|x| !x.is_finite()) {
            return Err(format!("increment {}: non-finite stress", k + 1));
        }
        largest = largest.max(equivalent_stress(&b.stress));
        b.advance(dt);
    }
    Ok((largest, b))
}

pub fn check(w: BlockWalk<'_>, law: RateLaw, report: &mut BlockReport) {
    let BlockWalk { routine, properties, incs, settings: s } = w;
    let load = loading(incs);
    let dt = load[0].time_increment.max(f64::MIN_POSITIVE);
    // Zero rate: from the start, and after loading.
    let zero = |routine: &mut dyn BlockRoutine, b: &mut BlockBuffers, report: &mut BlockReport, at: &str| {
        b.strain_increment.fill(0.0);
        b.set_temperature_increment(0.0);
        report.real_calls += 1;
        let r = b.call(routine, properties, dt, 1 + load.len() as i32);
        let what = match r {
            Err(e) => Some(format!("failed: {e}")),
            Ok(()) if b.stress.iter().any(|x| !x.is_finite()) => {
                Some(format!("returned the stress {:?}", b.stress))
            }
            Ok(()) => None,
        };
        if let Some(w) = what {
            report.add(
                BlockCheck::Rate,
                "zero-rate-not-finite",
                None,
                format!(
                    "an increment with zero strain (strain rate 0) and time increment {dt:e} {at} {w}: a \
                     rate term (ln ε̇) or a direction Δε/|Δε| not guarded at zero rate?"
                ),
            );
            return false;
        }
        true
    };
    let mut b = BlockBuffers::new(1, routine.info().ncomp, &s.state0, s.conditions);
    if !zero(routine, &mut b, report, "from the start state") {
        return;
    }
    match walk(routine, properties, load, s, None, report) {
        Ok((_, mut b)) => {
            if !zero(routine, &mut b, report, "after the loading part of the path") {
                return;
            }
        }
        Err(e) => {
            report.notes.push(format!("rate: the loading part of the path failed ({e}); not checked"));
            return;
        }
    }
    // Two rates.
    let mut peaks = [0.0; 2];
    for (k, r) in RATES.iter().enumerate() {
        match walk(routine, properties, load, s, Some(r * law.reference_rate), report) {
            Ok((peak, _)) => peaks[k] = peak,
            Err(e) => {
                report.add(
                    BlockCheck::Rate,
                    "rate-law",
                    None,
                    format!(
                        "at the equivalent strain rate {:e} the walk failed: {e}",
                        r * law.reference_rate
                    ),
                );
                return;
            }
        }
    }
    let expected = (1.0 + law.coefficient * RATES[1].ln()) / (1.0 + law.coefficient * RATES[0].ln());
    let measured = peaks[1] / peaks[0];
    let effect_err = if expected != 1.0 {
        ((measured - 1.0) / (expected - 1.0) - 1.0).abs()
    } else {
        (measured - 1.0).abs()
    };
    if effect_err > RATE_TOLERANCE || effect_err.is_nan() {
        report.add(
            BlockCheck::Rate,
            "rate-law",
            None,
            format!(
                "at {}× and {}× the reference rate the largest equivalent stresses are {:.6e} and {:.6e}: a ratio \
                 {measured:.6} where the declared law 1 + C ln(ε̇/ε̇₀) (C = {}) gives {expected:.6}",
                RATES[0], RATES[1], peaks[0], peaks[1], law.coefficient
            ),
        );
    } else {
        report.notes.push(format!(
            "rate: zero-rate increments stay finite; at {}× and {}× the reference rate the stress ratio is \
             {measured:.6} (declared law {expected:.6}, rate effect within {:.1} %)",
            RATES[0],
            RATES[1],
            100.0 * effect_err
        ));
    }
}
