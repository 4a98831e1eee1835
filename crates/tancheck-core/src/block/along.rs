//! The checks along the path of one point (a block of 1) after the elastic response
//! (`super::elastic`): the numerical tangent per increment (effective moduli, dilatational wave speed,
//! stable time increment L/c), the energy bookkeeping, deletion and finite outputs.

use super::numeric::{cs_tangent, fd_tangent, frobenius, twin_on_a_side, TWIN_GAP};
use super::report::TWIN_FINDING;
use super::report::{BlockCheck, BlockIncrement, BlockReport};
use super::routine::BlockRoutine;
use super::settings::{BlockSettings, EnergyRule};
use super::step::BlockStep;
use super::walk::{BlockBuffers, ComplexPoint};

/// Margin of "stored energy ≥ 0", of the sum of |work| so far: room for the integration
/// rule's error over the path (the trapezoid rule under-integrates a yield kink by a few per
/// cent of that increment's work; common practice, not a published bound).
const STORED_MARGIN: f64 = 0.02;

/// Largest normal diagonal entry of an n × n column-major matrix (the dilatational modulus).
pub fn dilatational(m: &[f64], n: usize) -> f64 {
    (0..n.min(3)).map(|i| m[i + i * n]).fold(f64::NEG_INFINITY, f64::max)
}

pub(super) fn wave(modulus: f64, s: &BlockSettings) -> (f64, f64) {
    if modulus > 0.0 && modulus.is_finite() {
        let c = (modulus / s.conditions.density).sqrt();
        (c, s.conditions.characteristic_length / c)
    } else {
        (f64::NAN, f64::NAN)
    }
}

fn smallest_eigen(d: &[f64], n: usize) -> f64 {
    let m = nalgebra::DMatrix::from_fn(n, n, |i, j| 0.5 * (d[i + j * n] + d[j + i * n]));
    m.symmetric_eigen().eigenvalues.iter().copied().fold(f64::INFINITY, f64::min)
}

/// Work per unit mass of `stress` over `de` (engineering shear: the plain dot product).
fn work(stress: &[f64], de: &[f64], density: f64) -> f64 {
    stress.iter().zip(de).map(|(s, e)| s * e).sum::<f64>() / density
}

/// Walk the path (`incs`: routine-order increments with their time increments) with one
/// point, checking every increment.
pub fn walk_one_point(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    incs: &[BlockStep],
    moduli: &[f64],
    s: &BlockSettings,
    report: &mut BlockReport,
) {
    let n = routine.info().ncomp;
    let nprop = properties.len();
    let nstate = s.state0.len();
    let m_el = dilatational(moduli, n);
    let rho = s.conditions.density;
    let twin = routine.has_twin();
    let mut cx = ComplexPoint::new(nprop, n, nstate);
    let mut b = BlockBuffers::new(1, n, &s.state0, s.conditions);
    let mut deleted_at: Option<usize> = None;
    // The largest stress entry the point carried so far: the scale of rounding in a deleted
    // point's stress ((1 − d) σ with d rounded to one).
    let mut peak_stress = 0.0f64;
    let mut half = vec![0.0; n];
    let mut total_work = 0.0;
    let mut damage = super::damage::DamageWatch::new(&s.damage);
    // The increment the walk stopped at (a fault, a non-finite output): the checks made along
    // the walk say how far they got (the JUnit report skipped the damage check "no damage
    // declared" after such a stop; a user-style sweep).
    let mut stopped = None;
    for (k, step) in incs.iter().enumerate() {
        let (de, dt, dtemp) = (&step.strain_increment, &step.time_increment, step.temperature_increment);
        let index = k + 1;
        let inc = index as i32;
        b.strain_increment.copy_from_slice(de);
        b.set_temperature_increment(dtemp);
        // Undefined (null in the JSON) until the tangent is measured: a deleted point's
        // increments and a non-finite tangent keep them so, not a stable time increment of 0.
        let mut row = BlockIncrement {
            index,
            effective_modulus: f64::NAN,
            wave_speed: f64::NAN,
            stable_time_increment: f64::NAN,
            along_ratio: f64::NAN,
            smallest_stiffness: f64::NAN,
            ..BlockIncrement::default()
        };

        // The numerical tangent: effective moduli, wave speed, stable time increment.
        let fd = match fd_tangent(routine, properties, &mut b, *dt, inc, report) {
            Ok(d) => d,
            Err(e) => {
                report.add(BlockCheck::Call, "routine-fault", Some(index), format!("a perturbed call: {e}"));
                stopped = Some(index);
                break;
            }
        };
        // A non-finite difference quotient is what a solver without the twin sees: reported
        // as it is, whatever the twin says.
        let best = if twin && fd.iter().all(|x| x.is_finite()) {
            match cs_tangent(routine, properties, &b, &mut cx, *dt, inc, report) {
                Ok(d) => {
                    let diff: Vec<f64> = d.iter().zip(&fd).map(|(a, b)| a - b).collect();
                    let gap = frobenius(&diff) / frobenius(&d).max(f64::MIN_POSITIVE);
                    row.twin_difference = Some(gap);
                    // A twin far from the central differences and from both one-sided
                    // derivatives is not complex-step safe: the central tangent stands (the
                    // wave speed came from the broken twin; found by a user-style sweep).
                    let on_side = gap <= TWIN_GAP
                        || twin_on_a_side(routine, properties, &mut b, *dt, inc, &d, report).unwrap_or(true);
                    if on_side {
                        d
                    } else {
                        if !report.has(TWIN_FINDING) {
                            report.add(
                                BlockCheck::Tangent,
                                TWIN_FINDING,
                                Some(index),
                                format!(
                                    "the complex-step twin's tangent differs from the central differences by \
                                     {gap:.3e} and from both one-sided derivatives: the twin is not complex-step \
                                     safe (a real part taken, an abs or a conjugate?); the central tangent is used"
                                ),
                            );
                        }
                        fd
                    }
                }
                Err(e) => {
                    report.add(BlockCheck::Call, "routine-fault", Some(index), format!("a twin call: {e}"));
                    fd
                }
            }
        } else {
            fd
        };
        if deleted_at.is_none() {
            tangent_findings(&best, n, m_el, moduli, de, s, index, &mut row, report);
        }

        // The stress of the half increment, for the midpoint rule.
        if s.energy_rule == EnergyRule::Midpoint {
            for (h, d) in b.strain_increment.iter_mut().zip(de) {
                *h = 0.5 * d;
            }
            b.set_temperature_increment(0.5 * dtemp);
            report.real_calls += 1;
            if let Err(e) = b.call(routine, properties, 0.5 * dt, inc) {
                report.add(
                    BlockCheck::Call,
                    "routine-fault",
                    Some(index),
                    format!("the half increment: {e}"),
                );
                stopped = Some(index);
                break;
            }
            half.copy_from_slice(&b.stress);
            b.strain_increment.copy_from_slice(de);
            b.set_temperature_increment(dtemp);
        }

        // The increment itself.
        report.real_calls += 1;
        if let Err(e) = b.call(routine, properties, *dt, inc) {
            report.add(BlockCheck::Call, "routine-fault", Some(index), e.to_string());
            stopped = Some(index);
            break;
        }
        let finite = b.stress.iter().chain(&b.state).all(|x| x.is_finite())
            && b.energy[0].internal.is_finite()
            && b.energy[0].dissipated.is_finite();
        if !finite {
            let what = first_non_finite(&b);
            match deleted_at {
                Some(at) => report.add(
                    BlockCheck::Deletion,
                    "deleted-point-not-finite",
                    Some(index),
                    format!("the point was deleted in increment {at}; now {what}"),
                ),
                None => report.add(BlockCheck::Call, "non-finite-output", Some(index), what),
            }
            stopped = Some(index);
            break;
        }
        row.work = match s.energy_rule {
            EnergyRule::Trapezoid => 0.5 * (work(&b.stress_start, de, rho) + work(&b.stress, de, rho)),
            EnergyRule::Midpoint => work(&half, de, rho),
        };
        row.internal_increment = b.energy[0].internal - b.energy_start[0].internal;
        row.dissipated_increment = b.energy[0].dissipated - b.energy_start[0].dissipated;
        row.deleted = b.deleted[0] != 0;
        let scale = (frobenius(&b.stress_start) + frobenius(&b.stress)) * frobenius(de) / rho;
        // Before the energy: a damage that falls also gives back dissipated energy, and the
        // fall is the cause to read first.
        damage.after(&b.state_start, &b.state, index, report);
        // A deleted point too, while it stays deleted: its stress is the declared residual, and
        // its internal energy follows that stress's work (none for a stress-free point; a
        // deleted point that went on adding internal energy passed; a user-style sweep). A
        // point active again after its deletion is `deleted-point-revived`, whose energies
        // are not read further.
        if deleted_at.is_none() || row.deleted {
            total_work += row.work.abs();
            energy_findings(&b, &row, scale, total_work, s, report);
        }
        deletion_findings(&b, &mut deleted_at, index, s, peak_stress, report);
        peak_stress =
            b.stress.iter().fold(peak_stress, |a, x| if x.is_finite() { a.max(x.abs()) } else { a });
        report.increments.push(row);
        b.advance(*dt);
    }
    damage.finish(stopped, report);
    report.notes.extend(stiffening_note(&report.increments, m_el, s));
    match (deleted_at, stopped) {
        (None, Some(at)) => report.notes.push(format!(
            "deletion: no point was deleted before the walk stopped at increment {at}; the deletion check did not run"
        )),
        (Some(d), Some(at)) => report.notes.push(format!(
            "deletion: the point was deleted at increment {d}; checked up to increment {at}, where the walk stopped"
        )),
        (None, None) => report
            .notes
            .push("deletion: no point was deleted along this path; the deletion check did not run".into()),
        // Said when it ran too, so that no report reads a check that ran as one turned off
        // (the JUnit report skipped it "turned off in the manifest"; a user-style sweep).
        (Some(at), None) => report.notes.push(format!(
            "deletion: the point was deleted at increment {at}; checked to the end of the path ({} increments)",
            report.increments.len()
        )),
    }
}

fn first_non_finite(b: &BlockBuffers) -> String {
    if let Some(i) = b.stress.iter().position(|x| !x.is_finite()) {
        return format!("stress[{i}] is {}", b.stress[i]);
    }
    if let Some(i) = b.state.iter().position(|x| !x.is_finite()) {
        return format!("state[{i}] is {}", b.state[i]);
    }
    format!("the energies are {} (internal), {} (dissipated)", b.energy[0].internal, b.energy[0].dissipated)
}

/// Whether an increment's effective stiffness (its row's measures) exceeds the elastic one of
/// the first call: along the increment's own direction, or (without declared softening) its
/// dilatational modulus.
fn stiffer_than_elastic(row: &BlockIncrement, m_el: f64, s: &BlockSettings) -> bool {
    row.along_ratio > 1.0 + s.stiffness_tolerance
        || (!s.softening && row.effective_modulus > m_el * (1.0 + s.stiffness_tolerance))
}

/// The note of a routine that declares stiffening and stiffened: from which increment, by how
/// much at most, and the stable time increment L/c it fell to (a solver must take it from each
/// increment). A routine that stiffens on purpose, cooling with a temperature-dependent
/// modulus, failed `stiffer-than-elastic` with nothing to declare (a user-style sweep).
fn stiffening_note(rows: &[BlockIncrement], m_el: f64, s: &BlockSettings) -> Option<String> {
    if !s.stiffening {
        return None;
    }
    let stiffer: Vec<&BlockIncrement> = rows.iter().filter(|r| stiffer_than_elastic(r, m_el, s)).collect();
    let first = stiffer.first()?;
    let most = stiffer.iter().copied().max_by(|a, b| a.effective_modulus.total_cmp(&b.effective_modulus))?;
    let (_, dt_el) = wave(m_el, s);
    let shortest = stiffer.iter().map(|r| r.stable_time_increment).fold(f64::INFINITY, f64::min);
    Some(format!(
        "stiffening (declared): the effective stiffness exceeds the elastic one of the first call in {} \
         increment(s) from increment {}, the dilatational modulus by {:.3} % at most (increment {}); the \
         stable time increment L/c falls to {shortest:.4e} from {dt_el:.4e}: a solver must take it from each \
         increment, not from the first call",
        stiffer.len(),
        first.index,
        100.0 * (most.effective_modulus / m_el - 1.0),
        most.index
    ))
}

/// x·A·x for an n × n column-major A.
fn quadratic(a: &[f64], x: &[f64], n: usize) -> f64 {
    (0..n).map(|j| (0..n).map(|i| x[i] * a[i + j * n]).sum::<f64>() * x[j]).sum()
}

#[allow(clippy::too_many_arguments)]
fn tangent_findings(
    d: &[f64],
    n: usize,
    m_el: f64,
    moduli: &[f64],
    de: &[f64],
    s: &BlockSettings,
    index: usize,
    row: &mut BlockIncrement,
    report: &mut BlockReport,
) {
    if d.iter().any(|x| !x.is_finite()) {
        report.add(
            BlockCheck::Tangent,
            "non-finite-stiffness",
            Some(index),
            "the numerical tangent has non-finite entries: the wave speed and the stable time \
             increment are undefined"
                .into(),
        );
        return;
    }
    let m = dilatational(d, n);
    let (c, dt) = wave(m, s);
    row.effective_modulus = m;
    row.wave_speed = c;
    row.stable_time_increment = dt;
    row.smallest_stiffness = smallest_eigen(d, n);
    // Along the increment's own direction the effective stiffness never exceeds the elastic
    // one; off its direction a softening routine's damage coupling may stiffen a component
    // (less plastic flow, less damage), so without declared softening any normal component
    // counts.
    let along = quadratic(d, de, n) / quadratic(moduli, de, n);
    row.along_ratio = along;
    // Declared stiffening is said in one note after the walk (`stiffening_note`).
    if stiffer_than_elastic(row, m_el, s) && !s.stiffening {
        let (_, dt_el) = wave(m_el, s);
        let what = if m > m_el * (1.0 + s.stiffness_tolerance) {
            format!(
                "effective dilatational modulus {m:.6e} (along the increment {along:.4} of the elastic \
                 stiffness) exceeds the elastic one {m_el:.6e} of the first call by {:.3} %: the stable \
                 time increment L/c falls to {dt:.4e} from {dt_el:.4e}",
                100.0 * (m / m_el - 1.0)
            )
        } else {
            // The stiffness along the increment alone (the message gave the dilatational modulus
            // "exceeding" by -0.000 %; a user-style sweep).
            format!(
                "along the increment's direction the effective stiffness is {along:.4} times the elastic \
                 stiffness of the first call ({:.3} % more; the dilatational modulus {m:.6e} against {m_el:.6e})",
                100.0 * (along - 1.0)
            )
        };
        report.add(
            BlockCheck::Tangent,
            "stiffer-than-elastic",
            Some(index),
            format!(
                "{what}; a routine that really stiffens (cooling with a temperature-dependent modulus, \
                 compaction) needs a solver that takes its wave speed from each increment, not from the \
                 first call"
            ),
        );
    }
    if !s.softening && row.smallest_stiffness < -s.stiffness_tolerance * m_el {
        report.add(
            BlockCheck::Tangent,
            "negative-stiffness",
            Some(index),
            format!(
                "the tangent's symmetric part has the eigenvalue {:.6e} < 0 and the routine declares \
                 no softening",
                row.smallest_stiffness
            ),
        );
    }
}

fn energy_findings(
    b: &BlockBuffers,
    row: &BlockIncrement,
    scale: f64,
    total_work: f64,
    s: &BlockSettings,
    report: &mut BlockReport,
) {
    let index = row.index;
    // Beside the work's scale, the rounding of the energy itself: a deleted point's leftover
    // stress of rounding size does work far below the last digit of the energy it carries (a
    // review).
    let rounding = 1e-12 * (b.energy[0].internal.abs() + b.energy_start[0].internal.abs());
    let tol = s.energy_tolerance * scale + rounding + 1e-300;
    if (row.internal_increment - row.work).abs() > tol {
        report.add(
            BlockCheck::Energy,
            "energy-work-mismatch",
            Some(index),
            format!(
                "the internal energy grew by {:.9e} per unit mass, the work of the stress over the \
                 increment ({} rule, divided by the density) is {:.9e}: {}",
                row.internal_increment,
                s.energy_rule.name(),
                row.work,
                if scale > 0.0 {
                    format!("off by {:.3e} of |σ||Δε|/ρ", (row.internal_increment - row.work).abs() / scale)
                } else {
                    // A stress-free point (deleted, or at rest): no work to measure it against.
                    "the stress does no work here, so the internal energy must not change".into()
                }
            ),
        );
    }
    if row.dissipated_increment < -tol || b.energy[0].dissipated < -tol {
        report.add(
            BlockCheck::Energy,
            "dissipation-decreases",
            Some(index),
            format!(
                "the dissipated energy changed by {:.6e} to {:.6e} per unit mass; it must never \
                 decrease",
                row.dissipated_increment, b.energy[0].dissipated
            ),
        );
    }
    let stored = b.energy[0].internal - b.energy[0].dissipated;
    if stored < -STORED_MARGIN * total_work - tol {
        report.add(
            BlockCheck::Energy,
            "stored-energy-negative",
            Some(index),
            format!(
                "stored energy (internal − dissipated) is {stored:.6e} per unit mass: more was \
                 dissipated ({:.6e}) than work done ({:.6e}); stored + dissipated must add up to the work",
                b.energy[0].dissipated, b.energy[0].internal
            ),
        );
    }
}

/// A deleted point's stress beyond the declared residual by more than this share of the
/// largest stress it carried is kept stress, not rounding: (1 − d) σ with a damage d that
/// rounds to one leaves about 1e-15 of σ (common practice: a thousand roundings of margin).
const DELETED_ROUNDING: f64 = 1e-12;

fn deletion_findings(
    b: &BlockBuffers,
    deleted_at: &mut Option<usize>,
    index: usize,
    s: &BlockSettings,
    peak_stress: f64,
    report: &mut BlockReport,
) {
    let now = b.deleted[0] != 0;
    match (*deleted_at, now) {
        (None, true) => *deleted_at = Some(index),
        (Some(at), false) => report.add(
            BlockCheck::Deletion,
            "deleted-point-revived",
            Some(index),
            format!("the point was deleted in increment {at} and is active again"),
        ),
        _ => {}
    }
    if now {
        let largest = b.stress.iter().fold(0.0f64, |a, x| a.max(x.abs()));
        if largest > s.deleted_stress * (1.0 + 1e-12) + DELETED_ROUNDING * peak_stress {
            report.add(
                BlockCheck::Deletion,
                "deleted-point-stress",
                Some(index),
                format!(
                    "a deleted point carries the stress {largest:.6e} (declared residual {:.3e}; rounding \
                     allowed up to {:.1e} of the largest stress {peak_stress:.3e} it carried)",
                    s.deleted_stress, DELETED_ROUNDING
                ),
            );
        }
    }
}
