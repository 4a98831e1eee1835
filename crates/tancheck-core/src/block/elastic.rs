//! The elastic response (the routine's first call, a block of ncomp points with a test strain
//! each) and its check against the routine's own stiffness for a small increment from the
//! start: the moduli, wave speed and stable time increment a solver takes from the first call.

use super::along::{dilatational, wave};
use super::numeric::{cs_tangent, fd_tangent, frobenius};
use super::report::{BlockCheck, BlockReport, ElasticSummary};
use super::routine::BlockRoutine;
use super::settings::BlockSettings;
use super::step::BlockStep;
use super::walk::{BlockBuffers, ComplexPoint};

/// Test strain of the elastic response (its size does not matter: the response is linear).
const TEST_STRAIN: f64 = 1e-4;

/// The first call: a block of ncomp points, point j with the test strain in component j.
pub fn elastic_response(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    s: &BlockSettings,
    report: &mut BlockReport,
) -> Option<Vec<f64>> {
    let n = routine.info().ncomp;
    report.elastic = ElasticSummary::unmeasured();
    let mut b = BlockBuffers::new(n, n, &s.state0, s.conditions);
    for j in 0..n {
        b.increment_of(j)[j] = TEST_STRAIN;
    }
    report.real_calls += 1;
    if let Err(e) = b.call(routine, properties, 0.0, 0) {
        report.add(
            BlockCheck::Call,
            "routine-fault",
            Some(0),
            format!("the elastic response (first call): {e}"),
        );
        return None;
    }
    let mut moduli = vec![0.0; n * n];
    for j in 0..n {
        for i in 0..n {
            moduli[i + j * n] = b.stress[j * n + i] / TEST_STRAIN;
        }
    }
    if moduli.iter().any(|x| !x.is_finite()) {
        report.add(
            BlockCheck::ElasticResponse,
            "non-finite-output",
            Some(0),
            "the elastic response (zero time, zero increment) has non-finite stresses".into(),
        );
        return None;
    }
    // The first output it changed, named (the finding said only "the state, the energies or
    // the deleted flags"; a user-style sweep).
    let ns = b.nstate.max(1);
    let changed = b
        .state
        .iter()
        .zip(&b.state_start)
        .position(|(a, o)| a.to_bits() != o.to_bits())
        .map(|i| {
            format!("state[{}] of point {} from {:e} to {:e}", i % ns, i / ns, b.state_start[i], b.state[i])
        })
        .or_else(|| {
            b.energy.iter().enumerate().find(|(_, e)| e.internal != 0.0 || e.dissipated != 0.0).map(
                |(p, e)| {
                    format!(
                        "the energies of point {p} to internal {:e}, dissipated {:e}",
                        e.internal, e.dissipated
                    )
                },
            )
        })
        .or_else(|| b.deleted.iter().position(|&d| d != 0).map(|p| format!("the deleted flag of point {p}")));
    if let Some(what) = changed {
        report.add(
            BlockCheck::ElasticResponse,
            "elastic-response-updates",
            Some(0),
            format!(
                "the elastic response (zero time, zero increment) changed {what}; it must update nothing (the \
                 state, the energies and the deleted flags stay as they were)"
            ),
        );
    }
    let m = dilatational(&moduli, n);
    let (c, dt) = wave(m, s);
    report.elastic = ElasticSummary {
        moduli: moduli.clone(),
        dilatational_modulus: m,
        wave_speed: c,
        stable_time_increment: dt,
    };
    Some(moduli)
}

/// Scale of the small increment whose tangent must equal the elastic response.
const SMALL: f64 = 1e-3;
/// Relative (Frobenius) difference allowed between them.
const ELASTIC_TOLERANCE: f64 = 1e-5;
/// The factor the time increment of the small increment is shrunk by toward Δt → 0 when the
/// tangent depends on it.
const TIME_SHRINK: f64 = 1e-3;
/// The factor the small increment is shrunk by toward a zero increment when the stiffness
/// there differs from the first call's and changes with the increment's size.
const SIZE_SHRINK: f64 = 1e-3;

/// The routine's numerical stiffness for the first increment's strain and time increment
/// scaled by `scale`, from the start state at the start temperature, and the time increment it
/// was taken at when it depends on the time increment (toward Δt → 0).
fn stiffness_at(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    b: &mut BlockBuffers,
    cx: &mut ComplexPoint,
    first: &BlockStep,
    scale: f64,
    report: &mut BlockReport,
) -> Result<(Vec<f64>, Option<f64>), String> {
    for (x, d) in b.strain_increment.iter_mut().zip(&first.strain_increment) {
        *x = scale * d;
    }
    let mut tangent_at = |dt: f64, report: &mut BlockReport| {
        if routine.has_twin() {
            cs_tangent(routine, properties, b, cx, dt, 1, report)
        } else {
            fd_tangent(routine, properties, b, dt, 1, report)
        }
    };
    // The elastic response is the instantaneous one (Δt → 0): a rate-dependent routine without
    // a threshold (a Maxwell branch relaxing within the increment) is softer at a finite time
    // increment. Where the tangent at a thousandth of the time increment differs from the one
    // at it, the limit is taken a thousandth further on (a correct viscoelastic routine failed
    // at 1.2e-5, found by a user-style sweep).
    let dt = scale * first.time_increment;
    let d = tangent_at(dt, report)?;
    let d2 = tangent_at(dt * TIME_SHRINK, report)?;
    let diff: Vec<f64> = d.iter().zip(&d2).map(|(a, b)| a - b).collect();
    if frobenius(&diff) <= 0.1 * ELASTIC_TOLERANCE * frobenius(&d2) {
        return Ok((d, None));
    }
    let limit = dt * TIME_SHRINK * TIME_SHRINK;
    Ok((tangent_at(limit, report)?, Some(limit)))
}

/// The elastic response must be the routine's own elastic stiffness at the point's
/// conditions: the numerical tangent of a small increment (the first increment's strain
/// scaled by [`SMALL`], elastic for any model with a yield or damage threshold, at the start
/// temperature) from the start state equals it. A solver sizes its time increment from the first call's moduli.
pub fn elastic_consistency(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    first: &BlockStep,
    moduli: &[f64],
    s: &BlockSettings,
    report: &mut BlockReport,
) {
    let n = routine.info().ncomp;
    let mut b = BlockBuffers::new(1, n, &s.state0, s.conditions);
    // At the start temperature, as the first call is (its conditions, no temperature change):
    // a thousandth of the first increment's temperature change moved a temperature-dependent
    // modulus by more than the tolerance (40 K per increment, E falling 5e-4 per K: 2.4e-5; a
    // user-style sweep).
    b.set_temperature_increment(0.0);
    let mut cx = ComplexPoint::new(properties.len(), n, s.state0.len());
    let relative = |d: &[f64]| {
        let diff: Vec<f64> = d.iter().zip(moduli).map(|(a, b)| a - b).collect();
        frobenius(&diff) / frobenius(moduli).max(f64::MIN_POSITIVE)
    };
    // The elastic response is the stiffness at a zero increment. A stiffness that changes with
    // the strain (an equation of state, a nonlinear elastic law) has moved at a thousandth of a
    // coarse first increment by more than the tolerance (a correct routine failed on a path of
    // three or ten steps and passed on one of a hundred; a user-style sweep): where it differs
    // from the first call's there, it is taken again a thousandth further toward zero, and that
    // one is judged when the two differ.
    let mut measured = stiffness_at(routine, properties, &mut b, &mut cx, first, SMALL, report);
    let mut size_limit = None;
    if let Ok((d, _)) = &measured {
        if relative(d) > ELASTIC_TOLERANCE {
            let smaller = SMALL * SIZE_SHRINK;
            let nearer = stiffness_at(routine, properties, &mut b, &mut cx, first, smaller, report);
            let moved = match &nearer {
                Ok((d2, _)) => {
                    let diff: Vec<f64> = d.iter().zip(d2).map(|(a, b)| a - b).collect();
                    frobenius(&diff) > 0.1 * ELASTIC_TOLERANCE * frobenius(d2)
                }
                Err(_) => true,
            };
            if moved {
                measured = nearer;
                size_limit = Some(smaller);
            }
        }
    }
    // The strain and time of the stiffness judged, for the twin's check below too (the
    // smaller one was left in place where it was not taken; a review).
    let scale = size_limit.unwrap_or(SMALL);
    for (x, d) in b.strain_increment.iter_mut().zip(&first.strain_increment) {
        *x = scale * d;
    }
    let dt = scale * first.time_increment;
    let (d, limit_dt) = match measured {
        Ok(d) => d,
        // A call of the small increment that crashed, returned a failure status or was flagged
        // by the memory guards is a fault like any other call's, not a check left out.
        Err(e) => {
            report.add(
                BlockCheck::Call,
                "routine-fault",
                None,
                format!("a small increment from the start (the elastic response's check): {e}"),
            );
            return;
        }
    };
    let diff: Vec<f64> = d.iter().zip(moduli).map(|(a, b)| a - b).collect();
    let rel = frobenius(&diff) / frobenius(moduli).max(f64::MIN_POSITIVE);
    // Measured with the twin: where the central differences agree with the first call, the
    // twin is what differs (the walk names it), not the elastic response.
    let twin_only = rel > ELASTIC_TOLERANCE && routine.has_twin() && {
        // At the limit of the time increment: a broken twin may hide the dependence on it.
        let t = dt * TIME_SHRINK * TIME_SHRINK;
        fd_tangent(routine, properties, &mut b, t, 1, report).is_ok_and(|c| {
            let diff: Vec<f64> = c.iter().zip(moduli).map(|(a, b)| a - b).collect();
            frobenius(&diff) <= ELASTIC_TOLERANCE * frobenius(moduli)
        })
    };
    if (rel > ELASTIC_TOLERANCE || rel.is_nan()) && !twin_only {
        let (m_own, m_first) = (dilatational(&d, n), dilatational(moduli, n));
        let (c_own, dt_own) = wave(m_own, s);
        // The entry that differs most (column-major: row i, column j), named in either case.
        let k =
            (0..diff.len())
                .fold(0, |a, k| if diff[k].abs() > diff[a].abs() || diff[k].is_nan() { k } else { a });
        let entry = format!(
            "entry [{}][{}]: the first call's {:.6e}, the routine's own {:.6e}",
            k % n,
            k / n,
            moduli[k],
            d[k]
        );
        let same_dilatational = (m_own - m_first).abs() <= 1e-9 * m_own.abs().max(m_first.abs());
        let what = if same_dilatational {
            format!(
                "the dilatational modulus {m_own:.6e} and the wave speed {c_own:.6e} agree; the difference is \
                 elsewhere, largest in {entry} (a shear or coupling modulus: a solver that reads the moduli \
                 of the first call gets it wrong)"
            )
        } else {
            format!(
                "dilatational modulus {m_first:.6e} vs {m_own:.6e}, largest in {entry}: the wave speed a solver \
                 sizes its time increment from is {:.6e}, the routine's own {c_own:.6e} (L/c {:.6e} vs \
                 {dt_own:.6e})",
                report.elastic.wave_speed, report.elastic.stable_time_increment
            )
        };
        report.add(
            BlockCheck::ElasticResponse,
            "elastic-response-mismatch",
            Some(0),
            format!(
                "the elastic response of the first call differs from the routine's own stiffness for a small \
                 increment from the start by {rel:.3e}{}: {what}",
                limit_dt.map_or(String::new(), |t| format!(
                    " (its stiffness depends on the time increment: taken toward Δt → 0, at Δt = {t:.3e})"
                )) + &size_limit.map_or(String::new(), |f| format!(
                    " (its stiffness changes with the strain: taken toward a zero increment, at {f:.0e} of the \
                     first increment)"
                ))
            ),
        );
    }
}
