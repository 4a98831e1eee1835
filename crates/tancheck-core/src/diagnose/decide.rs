//! The decision: one function, no I/O and no routine calls, that turns the evidence the
//! routine calls collected about one increment into its finding.
//!
//! The evidence ([`Observed`]): the kink probe (one-sided derivatives per column), the step
//! studies (with slopes), the complex-step check, the twin comparison (its real part against
//! the real outputs; its derivative against a real reference), the ∂σ/∂T check, and the cause
//! trials when they were made. [`decide`] applies the rules in this order:
//!
//! 1. a twin whose real part differs from the real routine's outputs, or whose derivative
//!    disagrees with the real schemes (as far from a real reference as from the returned
//!    tangent) while those agree with the returned tangent (with the scheme's order shown in a
//!    step study, a decade closer to it than the complex step, [`TWIN_MARGIN`]) or settle
//!    together on a derivative of their own at most half as far from it ([`REAL_AGREE`]), is
//!    not complex-step safe: its results are set aside and, when the real schemes clear the
//!    tangent, that is the finding ([`TWIN_FINDING`]), never "the tangent differs"; when they
//!    do not, the tangent differs, judged (and its causes tried) against a real reference, and
//!    both are said;
//! 2. at a kink, an exact complex-step agreement stands (the complex step does not cross the
//!    boundary) where every kinked column lies on one side of it
//!    ([`super::kink::SIDE_MARGIN`]); otherwise each column must equal its own forward or backward
//!    derivative. A check whose central difference straddles a kink at the point comes here
//!    even when every check passed (`call_check`: the mean of the two sides is no side);
//! 3. near a kink (one within the default step), each column must equal the one-sided
//!    derivatives below it; away from a kink, an exact complex-step agreement passes;
//! 4. a study that converges with its order to the failed check's tolerance clears the
//!    increment (the default step was poor);
//! 5. a wrong ∂σ/∂T with a right tangent is its own finding; the ∂σ/∂T column is judged by
//!    the rules of 2 and 3 first ([`dtemp_excuse`]): at a kink in the temperature an exact
//!    complex-step agreement stands, else the returned ∂σ/∂T must equal its forward or
//!    backward derivative; near one it must equal both below it; away from one an exact
//!    complex-step agreement passes;
//! 6. otherwise the tangent differs: the first explaining cause names it, once the causes
//!    were tried ([`Decision::needs_causes`] asks for them).

use super::causes::{Cause, Hypothesis};
use super::kink::{Kink, KinkColumn, Side};
use super::study::{self, Behaviour, StepStudy};
use super::temp_kink::TempKink;
use twin::{dtemp_twin_unsafe, real_agree, real_settles_apart, twin_real_part_differs, twin_unsafe};
pub use twin::{REAL_AGREE, TWIN_MARGIN};

/// The finding of an increment whose complex-step twin is not complex-step safe.
pub const TWIN_FINDING: &str = "twin-not-complex-step-safe";

/// The finding of an increment whose difference quotients are not finite numbers at any step
/// of the step studies: the perturbed calls' stresses are not finite.
pub const NON_FINITE_FINDING: &str = "non-finite-derivative";

/// The reason of [`NON_FINITE_FINDING`] when no step of any study gives a finite quotient.
const NOT_FINITE_EVERYWHERE: &str = "at every step tried the difference quotients are not finite \
numbers: the perturbed calls returned stresses that are not finite (computed from an output the call \
did not write, such as a tangent it was not asked for, or from memory it never set?)";

/// The usual reasons a twin is not complex-step safe, for messages.
pub const TWIN_CULPRITS: &str = "conjugating intrinsics (Fortran dot_product, conjg, C conj; a \
norm as sqrt(sum |z|^2)), complex abs (cabs, Fortran abs of a complex), a real-only sqrt or \
abs (the imaginary part dropped, e.g. sqrt(real(x))), comparisons of complex values \
instead of their real parts, or a complex pow or ** of a zero base to a power below 1 (its \
derivative part 0 times infinity: NaN; tc_pow and cs_pow give 0 there)";

/// A twin's real part this far (relative to the stress scale) from the real routine's
/// outputs computes another stress: rounding stays near 1e-15, so 1e-9 leaves six digits of
/// margin while any real change of the stress update shows.
pub const REAL_PART_LEVEL: f64 = 1e-9;

/// Near a branch boundary, the returned tangent must equal the one-sided derivatives at the
/// smallest probe step (relative 1e-7, one-sided truncation about that size) this closely:
/// ten times that truncation, so a correct one-sided tangent is never failed.
pub const NEARBY_LEVEL: f64 = 1e-6;

/// What the twin comparison found.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct TwinEvidence {
    /// Largest gap between the twin's real part and the real routine's stress over the
    /// complex calls of the increment, relative to the stress scale.
    pub real_part_gap: f64,
    /// Error of the complex-step derivative against the cleanest real reference (Richardson at
    /// a moderate step), when measured away from a kink.
    pub derivative_gap: Option<f64>,
}

/// What the real schemes and a real reference showed of a failed complex-step ∂σ/∂T.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct DtempTwin {
    /// The closest real scheme's ∂σ/∂T check: its error and tolerance.
    pub real: (f64, f64),
    /// The complex-step ∂σ/∂T against Richardson in the temperature, measured as the check
    /// measured the returned ∂σ/∂T against it.
    pub gap: f64,
}

/// Everything the routine calls showed about one failed increment.
#[derive(Clone, Debug, Default)]
pub struct Observed {
    pub kink: Option<Kink>,
    pub studies: Vec<StepStudy>,
    /// The complex-step check, when it ran: its error (max of the measures) and tolerance.
    pub complex: Option<(f64, f64)>,
    pub twin: Option<TwinEvidence>,
    /// The smallest tolerance among the failed tangent checks (infinite when none failed).
    pub failed_tol: f64,
    /// Every tangent check passed (a failure, if any, is in ∂σ/∂T only).
    pub tangent_checks_pass: bool,
    /// The ∂σ/∂T check failed, and the ranked causes of that.
    pub dtemp_failed: bool,
    pub dtemp_causes: Vec<Hypothesis>,
    /// The temperature kink probe, when the ∂σ/∂T check failed.
    pub dtemp_kink: Option<TempKink>,
    /// The complex-step ∂σ/∂T check, when it ran: its error and tolerance.
    pub dtemp_complex: Option<(f64, f64)>,
    /// When only the complex-step ∂σ/∂T failed and a real scheme's passed: the evidence on
    /// the twin's derivative in the temperature.
    pub dtemp_twin: Option<DtempTwin>,
    /// Ranked cause trials, when made.
    pub causes: Option<Vec<Hypothesis>>,
    /// Where a real scheme's perturbed calls at the default step returned stresses that are
    /// not finite numbers (the base call's were), in words.
    pub non_finite_quotient: Option<String>,
}

/// The finding of an increment.
#[derive(Clone, Debug, PartialEq)]
pub struct Decision {
    /// The tangent is right (a set-aside twin does not make it wrong).
    pub pass: bool,
    pub reason: String,
    /// One word: `none`, a cause name, `kink-neither-side`, `dtemp`, `dtemp-partial`,
    /// [`TWIN_FINDING`], [`NON_FINITE_FINDING`], or `unexplained`.
    pub finding: String,
    /// The complex-step results of the increment are set aside.
    pub twin_unsafe: bool,
    /// The tangent differs and the cause trials were not made yet: make them and decide again.
    pub needs_causes: bool,
    /// Which reference the cause trials should use: the complex step only when the twin
    /// is trusted.
    pub trust_twin: bool,
}

/// At a kink whose probe found a column on neither side: a one-sided difference (forward or
/// backward, every column the same way) that converges with its order to the returned tangent
/// within the failed tolerance (at most [`ONE_SIDED_LEVEL`]), with the complex step agreeing. Then the returned tangent is that
/// one-sided derivative, and a second branch boundary lies closer to the point than the probe's
/// smallest step, whose one-sided differences cross it (a damage law with a tension split, at a
/// principal strain of zero with the trace 4e-11 from zero, failed `kink-neither-side`; a
/// user-style sweep). The mean of two sides, which a twin on a sign function's branch at the
/// point agrees with, is no one-sided difference's limit: those level off at half the gap.
fn one_sided_clears(o: &Observed, complex_pass: Option<bool>) -> Option<&StepStudy> {
    if complex_pass != Some(true) {
        return None;
    }
    o.studies.iter().find(|s| {
        s.scheme.order() == 1.0
            && s.behaviour == Behaviour::Converges
            && s.best_error <= o.failed_tol.min(ONE_SIDED_LEVEL)
    })
}

/// The most a one-sided difference may leave at its best step to be taken for the returned
/// tangent's limit at a double kink: the default central tolerance (a forward difference's best
/// error on a smooth law is about the square root of the rounding, 1e-8 × its curvature;
/// Nocedal & Wright 2006, §8.1).
const ONE_SIDED_LEVEL: f64 = 1e-6;

/// Whether every kinked column of `k` lies on one side of its kink
/// ([`KinkColumn::on_a_side`](super::kink::KinkColumn::on_a_side)). Only a steady gap is
/// held to it: a gap that grows as the step shrinks is noise (an inner solve's tolerance),
/// between whose sides any column lies, and there the complex step's agreement stands.
fn columns_on_a_side(k: &Kink) -> bool {
    k.columns.iter().filter(|c| c.detected && steady(&c.gaps)).all(|c| c.on_a_side)
}

/// A kink's gap between the one-sided derivatives holds as the step shrinks; noise grows
/// (tenfold a decade). Why 3: over the probe's two decades noise grows a hundredfold, a
/// kink's gap moves by its sides' truncation only.
fn steady(gaps: &[f64]) -> bool {
    match (gaps.first(), gaps.last()) {
        (Some(&a), Some(&b)) => b <= 3.0 * a,
        _ => false,
    }
}

/// Why a failed ∂σ/∂T check is not held against the routine, by the rules the strain columns
/// follow (1 to 3 of the module's list): `None` when it is.
pub fn dtemp_excuse(o: &Observed) -> Option<String> {
    if !o.dtemp_failed {
        return None;
    }
    if dtemp_twin_unsafe(o) {
        let (t, e) = (o.dtemp_twin.unwrap_or_default(), o.dtemp_complex.map_or(f64::NAN, |c| c.0));
        return Some(format!(
            "the complex-step twin is not complex-step safe in the temperature (a real difference gives the returned ∂σ/∂T within {:.2e} while the complex step's differs by {e:.2e}); its results are set aside. Usual culprits: {TWIN_CULPRITS}",
            t.real.0
        ));
    }
    let complex = if twin_unsafe(o) { None } else { o.dtemp_complex.map(|(e, tol)| e <= tol) };
    match &o.dtemp_kink {
        Some(k) if k.detected => {
            let head = format!(
                "∂σ/∂T: the point sits on a kink in the temperature (the one-sided derivatives differ by {:.2e}, a central difference straddles it)",
                k.gaps.last().copied().unwrap_or(f64::NAN)
            );
            // As for a strain column (rule 2): the complex step's agreement stands only for a
            // ∂σ/∂T on one side of the kink, not for the mean of the sides.
            if complex == Some(true) && (k.on_a_side || !steady(&k.gaps)) {
                Some(format!("{head}; the complex step (which does not cross it) equals the returned ∂σ/∂T"))
            } else if matches!(k.matches, Side::Forward | Side::Backward) {
                Some(format!(
                    "{head}; the returned ∂σ/∂T equals the {} derivative (error {:.2e})",
                    k.matches.word(),
                    k.forward_error.min(k.backward_error)
                ))
            } else {
                None
            }
        }
        // The boundary is not at the point: the complex step, which does not reach it, stands
        // there as it does for a strain column (rule 3); without it the one-sided derivatives
        // at the smallest step must agree (a correct plane-stress routine whose ∂σ/∂T entries
        // are small failed at 1.02e-6 of them, the complex step exact; a user-style sweep).
        Some(k) if k.nearby && complex == Some(true) => Some(format!(
            "∂σ/∂T: a branch boundary in the temperature lies within the default step (the one-sided derivatives differ by {:.2e} at the largest probe step); the complex step, which does not reach it, equals the returned ∂σ/∂T",
            k.gaps[0]
        )),
        Some(k) if k.nearby => (complex != Some(false)
            && k.forward_error.min(k.backward_error) <= NEARBY_LEVEL)
            .then(|| {
                format!(
                    "∂σ/∂T: a branch boundary in the temperature lies within the default step (the one-sided derivatives differ by {:.2e} at the largest probe step and agree at the smallest); there the returned ∂σ/∂T equals them (within {NEARBY_LEVEL:.0e})",
                    k.gaps[0]
                )
            }),
        _ => (complex == Some(true)).then(|| "∂σ/∂T: the complex-step derivative equals the returned ∂σ/∂T".into()),
    }
}

/// Decide the finding of one increment from its evidence. No I/O, no routine calls.
pub fn decide(o: &Observed) -> Decision {
    // A perturbed call next to an input the routine computes returned NaN or ∞: no agreement
    // elsewhere (the complex step's, one side of a kink) clears that (a routine returning NaN
    // just past its yield point passed, the complex step agreeing; found by a user-style
    // sweep). A Newton iterate lands there as easily as the check's step does.
    if let Some(w) = &o.non_finite_quotient {
        let everywhere = !o.studies.is_empty() && o.studies.iter().all(|s| !s.best_error.is_finite());
        return Decision {
            pass: false,
            reason: if everywhere {
                format!("{NOT_FINITE_EVERYWHERE}; first: {w}")
            } else {
                format!(
                    "{w}: the routine returns values that are not finite numbers next to an input it \
                     computes, where a solver's iterate may land; it must return finite numbers there or \
                     refuse the increment (a status)"
                )
            },
            finding: NON_FINITE_FINDING.into(),
            twin_unsafe: false,
            needs_causes: false,
            trust_twin: o.complex.is_some(),
        };
    }
    match dtemp_excuse(o) {
        None => decide_tangent(o),
        Some(why) => {
            let mut d = decide_tangent(&Observed { dtemp_failed: false, ..o.clone() });
            if d.pass {
                d.reason = if d.reason.is_empty() { why } else { format!("{}; {why}", d.reason) };
                if dtemp_twin_unsafe(o) {
                    d.twin_unsafe = true;
                    if d.finding.is_empty() || d.finding == "none" {
                        d.finding = TWIN_FINDING.into();
                    }
                }
            }
            d
        }
    }
}

/// The decision with the ∂σ/∂T check's failure, if any, held against the routine.
fn decide_tangent(o: &Observed) -> Decision {
    let kink = o.kink.as_ref().filter(|k| k.detected);
    let complex_error = o.complex.map(|(e, _)| e);
    let complex_pass = o.complex.map(|(e, tol)| e <= tol);
    let real_agree = real_agree(o);
    let clears = study::clearing(&o.studies, o.failed_tol);
    // 1. The twin.
    let real_part_differs = twin_real_part_differs(o);
    let twin_unsafe = twin_unsafe(o);
    let complex_pass = if twin_unsafe { None } else { complex_pass };
    let trust_twin = o.complex.is_some() && !twin_unsafe;
    let mut d = Decision {
        pass: false,
        reason: String::new(),
        finding: String::new(),
        twin_unsafe,
        needs_causes: false,
        trust_twin,
    };
    let twin_text = |why: &str| {
        format!(
            "the complex-step twin is not complex-step safe ({why}); its results are set aside. Usual culprits: {TWIN_CULPRITS}"
        )
    };
    if twin_unsafe {
        let why = if real_part_differs {
            format!(
                "its real part differs from the real routine's stress by {:.2e} of the stress scale",
                o.twin.map_or(f64::NAN, |t| t.real_part_gap)
            )
        } else if let Some(s) = real_agree.filter(|_| real_settles_apart(o).is_none()) {
            format!(
                "the {} difference converges with order {:.0} to the returned tangent (error {:.2e}) while the complex step differs by {:.2e}",
                s.scheme.name(),
                s.scheme.order(),
                s.best_error,
                complex_error.unwrap_or(f64::NAN)
            )
        } else {
            let level = real_settles_apart(o).expect("checked by twin_unsafe");
            let names: Vec<&str> = o
                .studies
                .iter()
                .filter(|s| s.scheme != crate::schemes::Scheme::ComplexStep)
                .map(|s| s.scheme.name())
                .collect();
            format!(
                "the real differences ({}) settle {level:.2e} from the returned tangent while the complex step differs from it by {:.2e} and from a real reference (Richardson) by {:.2e}",
                names.join(", "),
                complex_error.unwrap_or(f64::NAN),
                o.twin.and_then(|t| t.derivative_gap).unwrap_or(f64::NAN)
            )
        };
        // A real scheme that settles away from the returned tangent says it is wrong, whatever
        // a loose one that converges within its own tolerance says.
        let cleared = real_agree.is_some() && real_settles_apart(o).is_none();
        if cleared || o.tangent_checks_pass && o.complex.is_none() {
            d.pass = true;
            d.reason = twin_text(&why);
            d.finding = TWIN_FINDING.into();
            return with_dtemp(o, d);
        }
        d.reason = twin_text(&why);
    }
    // 2. A kink.
    if let Some(k) = kink {
        if complex_pass == Some(true) && columns_on_a_side(k) {
            d.pass = true;
            d.reason = format!(
                "the point sits on a kink; the complex step (which does not cross it) equals the returned tangent; sides per column: {}",
                k.sides
            );
        } else if k.every_column_matches() || matches!(k.returned_matches, Side::Forward | Side::Backward) {
            d.pass = true;
            d.reason = format!(
                "the point sits on a kink; every column of the returned tangent equals one of its one-sided derivatives: {}",
                k.sides
            );
        } else if let Some(c) = k.corner.as_ref().filter(|_| complex_pass != Some(false)) {
            // A corner's branch found along another direction (see `corner`); the twin, which
            // follows the routine's own branch at the point, must not disagree: a plastic
            // tangent returned a hair inside the elastic range is the derivative of the branch
            // that starts a hair away, not at the point.
            d.pass = true;
            d.reason = format!(
                "the point sits on a corner where branches of the update meet; the one-sided derivatives along single \
                 strain components show other branches (sides per column: {}), and the returned tangent is the \
                 derivative of the branch entered along {} (a central difference a short way into it agrees \
                 within {:.2e}), which serves Newton's method as well as any other branch's there",
                k.sides,
                c.along,
                c.error
            );
        } else if let Some(s) = one_sided_clears(o, complex_pass) {
            d.pass = true;
            d.reason = format!(
                "the point sits on a kink, and another branch boundary lies closer than the kink probe's smallest \
                 step (its one-sided differences cross it: sides per column there {}); the {} difference converges \
                 with its order to the returned tangent (error {:.2e} at relative step {:.0e}), and the complex \
                 step (which does not cross either) equals it",
                k.sides,
                s.scheme.name(),
                s.best_error,
                s.best_rel_step
            );
        } else if k.columns.iter().any(|c| c.matches == Side::Neither && c.detected)
            && !k.columns.iter().any(|c| c.matches == Side::Neither && !c.detected)
        {
            let bad: Vec<&str> = k
                .columns
                .iter()
                .zip(k.sides.split(", "))
                .filter(|(c, _)| c.matches == Side::Neither)
                .map(|(_, s)| s.split(' ').next().unwrap_or(""))
                .collect();
            d.reason = format!(
                "the point sits on a kink and the returned tangent matches neither one-sided derivative in column{} {}{}",
                if bad.len() == 1 { "" } else { "s" },
                bad.join(", "),
                if o.tangent_checks_pass {
                    " (the central difference straddles the kink and gives the mean of its two sides, which is \
                     why the checks alone passed)"
                } else {
                    ""
                }
            );
            d.finding = "kink-neither-side".into();
            return with_dtemp(o, d);
        } else {
            // The columns that match neither side have no kink of their own (their one-sided
            // derivatives agree): the tangent is wrong there whatever the kink in the other
            // columns, and the causes are tried against the one-sided derivatives column by
            // column. A secant cohesive tangent at zero opening read `kink-neither-side` with
            // no cause, where the kink was in the normal column only (a user-style sweep).
            // So too where kinked columns match neither side as well: a column without a kink
            // that differs says the tangent is wrong, and the causes name how (a secant damage
            // tangent under shear, a principal strain at zero, read `kink-neither-side` with no
            // cause; a user-style sweep).
            let (kinked, bad): (Vec<_>, Vec<_>) = k
                .columns
                .iter()
                .zip(k.sides.split(", "))
                .filter(|(c, _)| c.detected || c.matches == Side::Neither)
                .partition(|(c, _)| c.detected);
            let names = |v: &[(&KinkColumn, &str)]| {
                v.iter().map(|(_, s)| s.split(' ').next().unwrap_or("")).collect::<Vec<_>>().join(", ")
            };
            let kinked_bad: Vec<_> =
                kinked.iter().copied().filter(|(c, _)| c.matches == Side::Neither).collect();
            d.reason = format!(
                "the point sits on a kink in column{} {} ({}), but column{} {} differ{} from the derivative, which \
                 has no kink there",
                if kinked.len() == 1 { "" } else { "s" },
                names(&kinked),
                if kinked_bad.is_empty() {
                    "each matching a side".to_string()
                } else {
                    format!("of which {} match{} neither side", names(&kinked_bad), if kinked_bad.len() == 1 { "es" } else { "" })
                },
                if bad.len() == 1 { "" } else { "s" },
                names(&bad),
                if bad.len() == 1 { "s" } else { "" }
            );
        }
        if d.pass {
            d.finding = "none".into();
            return with_dtemp(o, d);
        }
    }
    // A branch boundary within the default step, not at the point: below it, the one-sided
    // derivatives agree with each other and with the returned tangent, column by column.
    if let Some(k) = o.kink.as_ref().filter(|k| k.nearby) {
        let level = o.failed_tol.max(NEARBY_LEVEL);
        if complex_pass != Some(false)
            && !k.columns.is_empty()
            && k.columns.iter().all(|c| c.forward_error.min(c.backward_error) <= level)
        {
            d.pass = true;
            d.reason = format!(
                "a branch boundary lies within the default step (the one-sided derivatives differ by {:.2e} at the largest probe step and agree at the smallest); there every column of the returned tangent equals them (within {level:.0e})",
                k.gaps[0]
            );
            d.finding = "none".into();
            return with_dtemp(o, d);
        }
    }
    // A boundary closer to the point than the kink probe's smallest step, on one side: the
    // other side's quotients are the same at every step, and each column of the returned
    // tangent that has a gap equals that steady side (a correct plastic bar unloaded by 1e-10,
    // 4e-8 of its strain, failed without a twin: the central check and the forward side cross
    // the boundary, the backward side is the elastic branch the point lies in).
    if let Some(k) = o.kink.as_ref().filter(|k| k.close) {
        let gapped: Vec<&KinkColumn> = k.columns.iter().filter(|c| c.matches != Side::Both).collect();
        if complex_pass != Some(false)
            && !gapped.is_empty()
            && gapped.iter().all(|c| c.matches != Side::Neither && c.steady == Some(c.matches))
        {
            d.pass = true;
            d.reason = format!(
                "a branch boundary lies closer to the point than the kink probe's smallest step (the one-sided \
                 derivatives differ at every step, by less as the step shrinks); on the other side the one-sided \
                 derivatives are the same at every step, and the returned tangent equals them: {}",
                k.sides
            );
            d.finding = "none".into();
            return with_dtemp(o, d);
        }
    }
    // 3. The complex step away from a kink.
    if complex_pass == Some(true) {
        d.pass = true;
        d.reason = "the complex-step derivative equals the returned tangent".into();
        d.finding = "none".into();
        return with_dtemp(o, d);
    }
    // 4. Truncation of the default step.
    if let Some(s) = clears {
        if complex_pass != Some(false) {
            d.pass = true;
            d.reason = format!(
                "the {} difference converges with its order (slope {}) to the returned tangent (error {:.2e} at relative step {:.0e}); the default step was poor for this routine",
                s.scheme.name(),
                s.slope.map_or("-".into(), |x| format!("{x:.2}")),
                s.best_error,
                s.best_rel_step
            );
            d.finding = "none".into();
            return with_dtemp(o, d);
        }
    }
    if o.tangent_checks_pass {
        d.pass = true;
        d.finding = "none".into();
        return with_dtemp(o, d);
    }
    // 5. No derivative to compare with: at every step of every study the difference quotients
    // are not finite numbers (the perturbed calls' stresses are not). No cause of a wrong
    // tangent explains that, so none is tried.
    if !o.studies.is_empty() && o.studies.iter().all(|s| !s.best_error.is_finite()) {
        d.reason = NOT_FINITE_EVERYWHERE.into();
        d.finding = NON_FINITE_FINDING.into();
        return with_dtemp(o, d);
    }
    // 6. The tangent differs (judged by the real schemes when the twin was set aside: both
    // are said).
    let plateau = o.studies.iter().find_map(|s| s.plateau);
    let differs = match plateau {
        Some(p) => {
            format!("the discrepancy levels off at {p:.2e} as the step shrinks: the returned tangent is not the derivative")
        }
        None => "no step brings the difference approximation to the returned tangent".into(),
    };
    d.reason = if d.reason.is_empty() { differs } else { format!("{differs}; {}", d.reason) };
    match &o.causes {
        None => {
            d.needs_causes = true;
            d.finding = "unexplained".into();
        }
        Some(hs) => {
            d.finding =
                hs.iter().find(|h| h.explains).map_or("unexplained".into(), |h| h.cause.name().into());
        }
    }
    if o.dtemp_failed && o.causes.as_ref().is_some_and(|c| c.is_empty()) {
        d.finding = dtemp_finding(o);
    }
    d
}

fn dtemp_finding(o: &Observed) -> String {
    match o.dtemp_causes.iter().find(|h| h.explains) {
        Some(h) if h.cause == Cause::PartialDtemp => "dtemp-partial".into(),
        Some(h) if h.cause == Cause::StartTemperature => Cause::StartTemperature.name().into(),
        _ => "dtemp".into(),
    }
}

/// A wrong ∂σ/∂T with a right tangent fails the increment on its own.
fn with_dtemp(o: &Observed, mut d: Decision) -> Decision {
    if o.dtemp_failed && d.pass {
        d.pass = false;
        d.reason =
            "∂σ/∂T differs from the derivative of the stress with respect to the temperature increment"
                .into();
        d.finding = dtemp_finding(o);
        // The tangent itself is right: no tangent causes to try.
        d.needs_causes = false;
    }
    d
}

mod twin;

#[cfg(test)]
mod tests;
