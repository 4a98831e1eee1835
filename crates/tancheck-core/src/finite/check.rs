//! The finite-strain check: walk a path in F, and at every increment compare the routine's
//! tangent with the numerical tangent made in its declared measure (complex step with the
//! twin, central differences always); a failing increment gets a cause from `causes`.

use serde::{Deserialize, Serialize};

use super::causes::{diagnose, rel_error, FiniteCause};
use super::mat3::{self, Mat3};
use super::numeric::{self, Ask, Difference, Result1, Start, Workspace};
use super::path::{path_start, FinitePath};
use super::routine::FiniteRoutine;
use crate::report::{Verdict, CAUTIONS};
use crate::routine::{status, Fault};

/// Steps and tolerance of the finite-strain check.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct FiniteSettings {
    /// Step of the central differences on the perturbation of F (dimensionless).
    pub central_step: f64,
    /// Step of the complex step.
    pub complex_step: f64,
    /// Largest relative (Frobenius) error of the tangent against the best numerical one.
    pub tolerance: f64,
}

impl Default for FiniteSettings {
    fn default() -> Self {
        // common practice: central step near eps^(1/3) of a unit-size F, tolerance well
        // above its truncation and rounding error (about 1e-10 here)
        FiniteSettings { central_step: 1e-6, complex_step: 1e-20, tolerance: 1e-6 }
    }
}

/// How many of the largest entry differences a failing increment keeps.
pub const WORST_ENTRIES: usize = 5;

/// The largest difference of one entry.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct WorstEntry {
    /// Row and column, from 0: for a 6×6 measure in the order 11 22 33 23 13 12, for dP/dF
    /// the column-major 3×3 components of P (rows) and F (columns). [`WorstEntry::label`]
    /// names them.
    pub row: usize,
    pub column: usize,
    pub returned: f64,
    pub numerical: f64,
}

impl WorstEntry {
    /// The entry as a reader names it: `22/11` (∂σ22/∂ε11) in a 6×6 measure, `P21/F12` in
    /// dP/dF (`size` 9).
    pub fn label(&self, size: usize) -> String {
        let sym = |k: usize| ["11", "22", "33", "23", "13", "12"].get(k).copied().unwrap_or("?").to_string();
        let full = |k: usize| format!("{}{}", k % 3 + 1, k / 3 + 1);
        if size == 9 {
            format!("P{}/F{}", full(self.row), full(self.column))
        } else {
            format!("{}/{}", sym(self.row), sym(self.column))
        }
    }
}

/// One increment's verdict.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FiniteIncrement {
    pub increment: usize,
    /// F at the end of the increment, column-major.
    pub gradient: [f64; 9],
    /// Relative error against central differences.
    pub error_central: f64,
    /// Relative error against the complex step, with a twin (set aside when the twin
    /// disagrees with the central differences: see `FiniteReport::twin_not_safe`).
    pub error_complex: Option<f64>,
    pub passed: bool,
    pub worst: Option<WorstEntry>,
    /// The entries with the largest differences, largest first (up to [`WORST_ENTRIES`], the
    /// first of them `worst`), where the increment failed: a flaw in one term shows in several
    /// entries, and which ones tells the term.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub worst_entries: Vec<WorstEntry>,
    pub cause: Option<FiniteCause>,
}

/// The report of a finite-strain check.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FiniteReport {
    pub routine: String,
    pub stress_measure: String,
    pub tangent_measure: String,
    pub frame: String,
    pub complex_twin: bool,
    pub settings: FiniteSettings,
    pub increments: Vec<FiniteIncrement>,
    pub verdict: Verdict,
    /// The exit code of the verdict (as `tancheck check` exits).
    #[serde(default)]
    pub exit_code: i32,
    /// The cause of most failing increments (`unexplained` when none fits).
    pub finding: Option<String>,
    /// The routine failed or crashed at this increment.
    pub fault: Option<String>,
    /// The first increment where the twin's complex-step tangent disagreed with the central
    /// differences (the twin was set aside there).
    pub twin_not_safe: Option<usize>,
    pub calls: u64,
    pub complex_calls: u64,
    /// What the check did beyond the path as given (increments cut where the routine asked
    /// for smaller ones).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub notes: Vec<String>,
    pub cautions: Vec<String>,
}

/// Check `r` along `path` from `state0` (stress zero at the start). A base call that asks for
/// a smaller increment (`TC_STATUS_SMALLER_INCREMENT`) stops the path; the check is then made
/// again on the path with the increments the routine refuses cut into parts, as a solver cuts
/// back (`super::cutback`), with a note saying so.
pub fn run(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
    settings: FiniteSettings,
) -> FiniteReport {
    run_checked(r, properties, state0, path, settings).0
}

/// [`run`], with the path the report is of: `path` itself, or the path cut where the routine
/// asked for smaller increments (what bisect walks to a failing increment).
pub fn run_checked(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
    settings: FiniteSettings,
) -> (FiniteReport, FinitePath) {
    let (report, asked_smaller) = run_path(r, properties, state0, path, settings);
    let (mut report, checked) = if !asked_smaller {
        (report, path.clone())
    } else {
        match super::cutback::cut(r, properties, state0, path) {
            Some(cut) => {
                let (mut again, _) = run_path(r, properties, state0, &cut.path, settings);
                again.notes.push(cut.note(path.gradients.len() - 1));
                (again, cut.path)
            }
            None => (report, path.clone()),
        }
    };
    // A path on which the volume never changes (J = 1: simple shear, the default) cannot show a
    // tangent off by a factor of J (such a tangent passed on the default path, found by a
    // user-style sweep). A stress measure swapped it does show (d(τ/J) = dτ − τ tr d even at
    // J = 1): the note does not claim that (it contradicted the verdict above it).
    if path.gradients.len() > 1 && path.gradients.iter().all(|f| (mat3::det(f) - 1.0).abs() <= 1e-12) {
        report.notes.push(
            "J = det F = 1 at every increment of the path (an isochoric path such as simple shear): a tangent \
             off by a factor of J (a missing or extra 1/J) agrees here; check a path that changes the volume \
             too (uniaxial-stretch, biaxial)"
                .into(),
        );
    }
    (report, checked)
}

/// [`run`] on `path` as given, and whether it stopped at a base call that asked for a smaller
/// increment.
fn run_path(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
    settings: FiniteSettings,
) -> (FiniteReport, bool) {
    let info = r.info().clone();
    let twin = r.has_complex();
    let mut ws = Workspace::new(info.nstate, info.nproperties);
    let mut report = FiniteReport {
        routine: info.name.clone(),
        stress_measure: info.stress.name().into(),
        tangent_measure: info.tangent.name().into(),
        frame: info.frame.name().into(),
        complex_twin: twin,
        settings,
        increments: Vec::new(),
        verdict: Verdict::Pass,
        exit_code: 0,
        finding: None,
        fault: None,
        twin_not_safe: None,
        calls: 0,
        complex_calls: 0,
        notes: Vec::new(),
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
    };
    let mut start = path_start(properties, state0, path);
    let mut asked_smaller = false;
    // Whether any increment changed the state variables (bit for bit).
    let mut state_changed = false;
    for (k, f1) in path.gradients.iter().enumerate().skip(1) {
        start.increment = k as i32;
        start.time[1] = path.dtime.get(k - 1).copied().unwrap_or(1.0);
        let judged = match judge(r, &mut ws, &start, f1, settings) {
            Ok(j) => j,
            Err(JudgeFault { base: true, fault }) => {
                asked_smaller =
                    matches!(fault, Fault::Status { status: s, .. } if s == status::SMALLER_INCREMENT);
                report.fault = Some(format!("increment {k}: {fault}"));
                break;
            }
            Err(JudgeFault { fault, .. }) => {
                report.fault = Some(format!("increment {k}, a perturbed call: {fault}"));
                break;
            }
        };
        report.notes.extend(judged.notes.iter().map(|n| format!("increment {k}: {n}")));
        if judged.twin_not_safe {
            report.twin_not_safe.get_or_insert(k);
        }
        let mut inc = judged.increment;
        inc.increment = k;
        report.increments.push(inc);
        let base = judged.base;
        start.f0 = *f1;
        start.time[0] += start.time[1];
        start.stress0 = base.stress;
        state_changed |= base.state.iter().zip(&start.state0).any(|(a, b)| a.to_bits() != b.to_bits());
        start.state0.copy_from_slice(&base.state);
    }
    // A routine with state that never changed it along the path was checked on its elastic
    // (or stateless) branch only: said, as the point check's coverage says it (a finite J2
    // check that never yielded read as one plastic throughout; a user-style sweep).
    if info.nstate > 0 && !state_changed && report.fault.is_none() && !report.increments.is_empty() {
        report.notes.push(
            "the path never changed the state variables: only the elastic (or stateless) branch was checked; \
             load further (a larger stretch or shear), or start from an inelastic state"
                .into(),
        );
    }
    report.calls = ws.calls;
    report.complex_calls = ws.complex_calls;
    not_one_factor(&mut report.increments);
    let failing: Vec<&FiniteIncrement> = report.increments.iter().filter(|i| !i.passed).collect();
    if report.fault.is_some() {
        report.verdict = Verdict::RoutineFault;
    } else if !failing.is_empty() {
        report.verdict = Verdict::TangentFailure;
        let mut counts: Vec<(String, usize)> = Vec::new();
        for inc in &failing {
            let name = inc.cause.as_ref().map_or("unexplained", |c| c.name.as_str());
            match counts.iter_mut().find(|(n, _)| n == name) {
                Some((_, c)) => *c += 1,
                None => counts.push((name.to_string(), 1)),
            }
        }
        counts.sort_by_key(|c| std::cmp::Reverse(c.1));
        report.finding = counts.first().map(|(n, _)| n.clone());
    } else if report.twin_not_safe.is_some() {
        report.verdict = Verdict::TwinNotSafe;
        report.finding = Some("twin-not-complex-step-safe".into());
    }
    report.exit_code = report.verdict.exit_code();
    (report, asked_smaller)
}

/// A factor written in code is the same at every increment: where `rate-terms-scaled` fits
/// factors that change along the path (a small-strain tangent in a finite J2 routine read so,
/// its factor going from 0.333 to 0.763; a user-style sweep), it is not the cause, and those
/// increments read `unexplained`, saying what was fitted. Why 2 %: a term that is scaled fits
/// its factor to the error the cause leaves (below 1e-4), far inside it.
fn not_one_factor(increments: &mut [FiniteIncrement]) {
    let scaled = |i: &FiniteIncrement| {
        i.cause
            .as_ref()
            .filter(|c| c.name == "rate-terms-scaled")
            .and_then(|c| c.factor)
            .filter(|_| !i.passed)
    };
    let factors: Vec<f64> = increments.iter().filter_map(scaled).collect();
    let (lo, hi) = factors.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &f| (a.min(f), b.max(f)));
    if factors.len() < 2 || hi - lo <= 0.02 * lo.abs().max(hi.abs()) {
        return;
    }
    for inc in increments.iter_mut() {
        if scaled(inc).is_none() {
            continue;
        }
        if let Some(c) = inc.cause.as_mut() {
            c.explanation = format!(
                "the stress terms between two rates fit here with the factor {:.3}, but along the path with \
                 factors from {lo:.3} to {hi:.3}: a factor written in code is the same at every increment, so \
                 none of the measure confusions explains it (a tangent of another strain measure, such as a \
                 small-strain one, fits a factor that changes)",
                c.factor.unwrap_or(f64::NAN)
            );
            c.name = "unexplained".into();
            c.factor = None;
        }
    }
}

/// One increment judged: its verdict and numbers (`increment` left 0 for the caller to set),
/// the base call's outputs, notes for the report (without the increment's number), and
/// whether the twin was found not complex-step safe here.
#[derive(Clone, Debug)]
pub struct Judged {
    pub increment: FiniteIncrement,
    pub base: Result1,
    pub notes: Vec<String>,
    pub twin_not_safe: bool,
}

/// A call of [`judge`] that faulted: the base call (`base`) or a perturbed one.
#[derive(Clone, Debug)]
pub struct JudgeFault {
    pub base: bool,
    pub fault: Fault,
}

/// The index of the largest of `gaps`, the first of equal ones (the order of the list of
/// next largest entries).
fn first_largest(gaps: impl Iterator<Item = f64>) -> Option<usize> {
    gaps.enumerate().max_by(|(a, x), (b, y)| x.total_cmp(y).then(b.cmp(a))).map(|(i, _)| i)
}

#[cfg(test)]
#[test]
fn ties_go_to_the_first_entry() {
    assert_eq!(first_largest([1.0, 3.0, 2.0, 3.0].into_iter()), Some(1));
    assert_eq!(first_largest([0.5].into_iter()), Some(0));
    assert_eq!(first_largest(std::iter::empty()), None);
}

/// Judge the increment from `start` to `f1`: the base call, the numerical tangents, the kink
/// look and, where it fails, the cause. The check makes this for every increment of its path;
/// bisect for fractions of a failing one, replay for a case's call.
pub fn judge(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    start: &Start,
    f1: &Mat3<f64>,
    settings: FiniteSettings,
) -> Result<Judged, JudgeFault> {
    // The declared measures only (Copy): judged once per increment, no clone of the info.
    let (measure, stress) = (r.info().tangent, r.info().stress);
    let twin = r.has_complex();
    let n = measure.size();
    let mut notes = Vec::new();
    let mut twin_not_safe = false;
    let base = ws.call_full(r, start, f1).map_err(|fault| JudgeFault { base: true, fault })?;
    let perturbed = |fault| JudgeFault { base: false, fault };
    let mut central = vec![0.0; n * n];
    let mut complex = vec![0.0; n * n];
    let ask = |how| Ask { measure, stress, how };
    let central_ask = ask(Difference::Central(settings.central_step));
    numeric::tangent(r, ws, start, f1, central_ask, &mut central).map_err(perturbed)?;
    let complex_ask = ask(Difference::ComplexStep(settings.complex_step));
    let mut with_twin = twin && numeric::tangent(r, ws, start, f1, complex_ask, &mut complex).is_ok();
    // A twin whose complex-step tangent disagrees with the central differences is not
    // complex-step safe: set it aside and judge with the central differences.
    let twin_gap = with_twin.then(|| rel_error(&complex, &central));
    if let Some(gap) = twin_gap.filter(|&g| g > settings.tolerance) {
        // The central differences' own error (truncation at a large step, rounding at a
        // tight tolerance) is no fault of the twin: at a tenth of the step a wrong twin's
        // gap stays (a plateau), the central differences' shrinks (truncation) or grows
        // (rounding). A correct routine failed with its exact twin blamed at a central step
        // of 1e-4 (a user-style sweep).
        let small_ask = ask(Difference::Central(0.1 * settings.central_step));
        let mut small = vec![0.0; n * n];
        let gap_small = numeric::tangent(r, ws, start, f1, small_ask, &mut small)
            .ok()
            .map(|()| rel_error(&complex, &small));
        match gap_small {
            Some(g2) if !(0.5 * gap..=2.0 * gap).contains(&g2) => notes.push(format!(
                "the complex step and the central differences differ by {gap:.2e} at the central step {:.1e} \
                 and by {g2:.2e} at a tenth of it: the central differences' own error (truncation or \
                 rounding), not the twin's; the complex step judges",
                settings.central_step
            )),
            _ => {
                with_twin = false;
                twin_not_safe = true;
            }
        }
    }
    let (reference, reference_ask) =
        if with_twin { (&complex, complex_ask) } else { (&central, central_ask) };
    let error_central = rel_error(&base.tangent, &central);
    let error_complex = twin_gap.map(|_| rel_error(&base.tangent, &complex));
    let error_judged = if with_twin { error_complex } else { None };
    let error = error_judged.unwrap_or(error_central);
    // Every output a finite number (a NaN state passes on to the next increment unseen
    // by the tangent's error).
    let finite = base.tangent.iter().chain(&base.stress).chain(&base.state).all(|x| x.is_finite());
    let mut passed = error <= settings.tolerance && finite;
    // A failed increment on a kink whose every column is one of its own sides passes (the
    // central difference straddles the switch), and the twin is not blamed there (a fibre
    // at a stretch of exactly 1 under simple shear failed, its twin blamed, found by a
    // user-style sweep).
    let mut neither_side = None;
    if (!passed || twin_gap.is_some_and(|g| g > settings.tolerance)) && finite {
        let kink = super::kink::on_a_kink(
            r,
            ws,
            start,
            f1,
            central_ask,
            base.stress,
            &base.tangent,
            settings.central_step,
            settings.tolerance,
        );
        let on_kink =
            matches!(kink, Ok(super::kink::KinkVerdict::Neither(_) | super::kink::KinkVerdict::OnSides(_)));
        if let Ok(super::kink::KinkVerdict::Neither(words)) = kink {
            passed = false;
            neither_side = Some(words);
        } else if let Ok(super::kink::KinkVerdict::OnSides(words)) = kink {
            passed = true;
            // The complex step does not cross the switch: at the point it takes one side or
            // the other (by the sign of a real part that is zero there), whichever side the
            // routine's own tangent takes; it is not held against the twin here.
            notes.push(words);
        }
        if on_kink {
            twin_not_safe = false;
        }
    }
    // The entries are shown against the reference, but on a kink whose returned column equals
    // neither side against the complex step, which takes a side: the central difference across
    // the switch gives the mean of the two sides, as such a routine does, and showed no
    // difference at all (a user-style sweep).
    let shown = if neither_side.is_some() && twin_gap.is_some() { &complex } else { reference };
    let entry =
        |e: usize| WorstEntry { row: e % n, column: e / n, returned: base.tangent[e], numerical: shown[e] };
    let gap = |e: usize| (base.tangent[e] - shown[e]).abs();
    // Ties to the first entry, as `worst_entries` orders them: the report prints this one and
    // then the list past its first (with the last of two tied entries here it printed one
    // entry twice and left out the other; a user-style sweep).
    let worst = first_largest((0..n * n).map(gap)).map(entry);
    // Largest first, ties in entry order; only for a failure (a passing increment's
    // differences are rounding), and only entries that differ.
    let worst_entries = if passed {
        Vec::new()
    } else {
        let mut order: Vec<usize> = (0..n * n).filter(|&e| gap(e) > 0.0 || gap(e).is_nan()).collect();
        order.sort_by(|&a, &b| gap(b).total_cmp(&gap(a)).then(a.cmp(&b)));
        order.into_iter().take(WORST_ENTRIES).map(entry).collect()
    };
    let tau = stress.to_kirchhoff(&base.stress, mat3::det(f1));
    let non_finite =
        [("stress", &base.stress[..]), ("state", &base.state[..]), ("tangent", &base.tangent[..])]
            .into_iter()
            .find_map(|(name, a)| a.iter().position(|x| !x.is_finite()).map(|i| (name, i, a[i])));
    let cause = if passed {
        None
    } else if let Some(words) = neither_side {
        Some(FiniteCause {
            name: "kink-neither-side".into(),
            explanation: words,
            error: error_central,
            factor: None,
        })
    } else if let Some((name, i, v)) = non_finite {
        // A value the routine computed (an unwritten one is the guards' fault): no
        // measure or factor explains it.
        Some(FiniteCause {
            name: "non-finite-output".into(),
            explanation: format!(
                "the routine returned {name}[{i}] = {v}: a division by zero, a logarithm or root of a \
                 negative number, or an overflow in the update (or, with the guards off, an entry it \
                 never wrote)"
            ),
            error: f64::INFINITY,
            factor: None,
        })
    } else {
        let reference = reference.clone();
        diagnose(r, ws, start, f1, &tau, &base.tangent, &reference, reference_ask)
    };
    let increment = FiniteIncrement {
        increment: 0,
        gradient: mat3::to_flat(f1),
        error_central,
        error_complex,
        passed,
        worst,
        worst_entries,
        cause,
    };
    Ok(Judged { increment, base, notes, twin_not_safe })
}
