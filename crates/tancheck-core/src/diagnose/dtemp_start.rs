//! A ∂σ/∂T taken at the start temperature: moduli, an expansion coefficient or their
//! temperature derivatives at T₀ where the update uses the end temperature T₀ + ΔT. Its
//! discrepancy falls in proportion to the temperature increment alone (the strain increment
//! kept), as the tangent's `start-temperature` trial finds for the tangent; a wrong term of
//! ∂σ/∂T (left out, of the wrong sign, scaled) does not shrink with it. Without this trial
//! such a ∂σ/∂T was named by the shape of its discrepancy ("the thermal expansion term off by
//! a factor near 1", also with a constant expansion coefficient; a user-style sweep).

use super::causes::{Cause, Hypothesis, Refinement};
use crate::compare::{compare_dtemp_floor, Limits};
use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;
use crate::settings::Settings;

/// Fractions of the temperature increment, largest first (the full one is the check's).
const FRACTIONS: [f64; 3] = [0.5, 0.25, 0.125];

/// The trial: `Some` hypothesis when the ∂σ/∂T discrepancy (`full_error` at the whole
/// increment, measured against the same reference the check used) falls in proportion to
/// the temperature increment. The driver's increment is set back after.
pub(super) fn trial(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    settings: &Settings,
    full_error: f64,
    branch: i32,
    floor: f64,
) -> Result<Option<Hypothesis>, Fault> {
    let dtemp = driver.dtemp();
    if dtemp == 0.0 || !(full_error.is_finite() && full_error > 0.0) {
        return Ok(None);
    }
    let conv = caller.info().convention.clone();
    let n = conv.ncomp();
    let full = driver.dstrain().to_vec();
    let (scheme, rel) = if caller.has_complex() {
        (Scheme::ComplexStep, settings.complex_step.rel_step)
    } else {
        (Scheme::Richardson, settings.richardson.rel_step)
    };
    let ef = settings.entry_floor;
    let mut errors = vec![full_error];
    let mut numerical = [0.0; 6];
    for s in FRACTIONS {
        driver.set_increment_keep_count(&full, dtemp * s);
        if driver.base_call(caller).is_err() || driver.base.outcome.branch != branch {
            break;
        }
        let returned = driver.base.dstress_dtemp[..n].to_vec();
        let ts = driver.temp_scale(settings.temp_floor);
        if scheme.column(driver, caller, Direction::Temperature, rel * ts, &mut numerical[..n]).is_err() {
            break;
        }
        let limits = Limits::new(1.0, ef, 0);
        errors.push(compare_dtemp_floor(&conv, &returned, &numerical[..n], limits, floor).error());
    }
    driver.set_increment_keep_count(&full, dtemp);
    driver.base_call(caller)?;
    if errors.len() != FRACTIONS.len() + 1 {
        return Ok(None);
    }
    let rf = Refinement {
        fractions: std::iter::once(1.0).chain(FRACTIONS).collect(),
        errors,
        same_branch: true,
        past: 0.0,
    };
    let Some((true, left)) = super::causes::proportional(&rf) else { return Ok(None) };
    let fr: Vec<String> = rf.fractions.iter().zip(&rf.errors).map(|(f, x)| format!("{f}: {x:.2e}")).collect();
    Ok(Some(Hypothesis {
        cause: Cause::StartTemperature,
        detail: format!(
            "∂σ/∂T taken at the start temperature: its discrepancy shrinks in proportion to the temperature \
             increment alone, the strain increment kept ({}): moduli, the expansion coefficient or their \
             temperature derivatives at T₀ where the update uses T₀ + ΔT",
            fr.join(", ")
        ),
        error_left: left,
        explains: true,
    }))
}
