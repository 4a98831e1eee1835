//! A column whose difference stencil the routine refuses on one side: at the edge of the
//! routine's domain (a temperature limit it may not pass, a strain past which it deletes the
//! point or asks for a smaller increment) the base call succeeds and a call of the stencil,
//! a step beyond the edge, returns a failed status. The derivative is still defined on the
//! side the routine takes; the column is made there by the one-sided second-order difference
//!
//! f′(0) ≈ (−3 f(0) + 4 f(s) − f(2s)) / (2s),  s = −h (backward) or +h (forward),
//!
//! whose truncation error is of the same order in h as the central difference's (Fornberg's
//! one-sided weights for the first derivative, second order; from memory as to the table). A
//! refusal on both sides, and any fault that is not a status (a crash, a guard finding), stays
//! the fault it was. A refused perturbed call is not a fault of the increment: the report says
//! which columns were made one-sided and what the routine said.

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;

/// Words every note of a one-sided column starts its tail with (the check folds those notes).
pub(crate) const ONE_SIDED: &str = "taken one-sided";

/// Whether a perturbed call's fault is a refusal the column can go around: a status the
/// routine returned (it failed, or asked for a smaller increment), not a crash or a guard
/// finding.
pub(super) fn refused(f: &Fault) -> bool {
    matches!(f, Fault::Status { .. })
}

/// Whether a real stencil's column at step `h` can go around `fault` (a refusal; the complex
/// step has no side to change to).
fn goes_around(scheme: Scheme, fault: &Fault, h: f64) -> bool {
    scheme != Scheme::ComplexStep && refused(fault) && h > 0.0
}

/// The columns of one scheme made one-sided at an increment, and the first refusal.
#[derive(Clone, Debug, Default)]
pub(super) struct OneSided {
    /// (column label, side) in the order made: "11" or "dT", "backward" or "forward".
    pub columns: Vec<(String, &'static str)>,
    /// The first refusal, as the fault says it.
    pub refusal: String,
}

impl OneSided {
    /// The note of an increment (1-based `index`) for a scheme's one-sided columns.
    pub(super) fn note(&self, index: usize, scheme: Scheme) -> String {
        let cols: Vec<String> = self.columns.iter().map(|(c, side)| format!("{c} ({side})")).collect();
        format!(
            "increment {index}: the routine refused a call of the {scheme} difference one step away ({}{}); \
             column{} {} {ONE_SIDED}, by the second-order difference on the side it takes",
            if self.columns.len() > 1 { "the first: " } else { "" },
            self.refusal,
            if cols.len() == 1 { "" } else { "s" },
            cols.join(", ")
        )
    }
}

/// Column `dir` at step `h` (> 0) by the one-sided second-order difference, backward first,
/// else forward; the side taken. A refusal on both sides gives the forward side's fault; any
/// other fault ends it at once.
pub(super) fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<&'static str, Fault> {
    let n = col.len();
    let mut last = None;
    for (s, side) in [(-h, "backward"), (h, "forward")] {
        match pair(driver, caller, dir, s) {
            Ok((f1, f2)) => {
                let base = &driver.base.stress[..n];
                for i in 0..n {
                    col[i] = (-3.0 * base[i] + 4.0 * f1[i] - f2[i]) / (2.0 * s);
                }
                // The refused call was gone around: it is no fault of the increment.
                let _ = caller.take_faulted();
                return Ok(side);
            }
            Err(f) if refused(&f) => last = Some(f),
            Err(f) => return Err(f),
        }
    }
    Err(last.expect("two sides tried"))
}

/// The stresses of the calls at `s` and `2s` along `dir`.
fn pair(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    s: f64,
) -> Result<([f64; 6], [f64; 6]), Fault> {
    let n = driver.ncomp();
    let out = |d: &Driver| {
        let mut v = [0.0; 6];
        v[..n].copy_from_slice(if s > 0.0 { &d.plus.stress[..n] } else { &d.minus.stress[..n] });
        v
    };
    driver.perturbed_call(caller, dir, s)?;
    let f1 = out(driver);
    driver.perturbed_call(caller, dir, 2.0 * s)?;
    Ok((f1, out(driver)))
}

/// The strain columns `from..n` of `scheme` after the refusal `fault` of column `from` (the
/// columns before it are made): column `from` one-sided, each later one by the scheme, or
/// one-sided when the routine refuses it too. The complex step, and a fault that is not a
/// refusal, stay the fault they are (`Err` with the column).
#[allow(clippy::too_many_arguments)]
pub(super) fn finish_strain_columns(
    scheme: Scheme,
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    h: f64,
    from: usize,
    fault: Fault,
    tangent: &mut [f64],
    made: &mut Option<Box<OneSided>>,
) -> Result<(), (usize, Fault)> {
    if !goes_around(scheme, &fault, h) {
        return Err((from, fault));
    }
    let n = driver.ncomp();
    let mut first = Some(fault);
    for j in from..n {
        let col = &mut tangent[j * n..(j + 1) * n];
        let refusal = match first.take() {
            Some(f) => f,
            None => match scheme.column(driver, caller, Direction::Strain(j), h, col) {
                Ok(()) => continue,
                Err(f) if refused(&f) => f,
                Err(f) => return Err((j, f)),
            },
        };
        let side = column(driver, caller, Direction::Strain(j), h, col).map_err(|f| (j, f))?;
        let label = caller.info().convention.order()[j].label().to_string();
        let m = made
            .get_or_insert_with(|| Box::new(OneSided { columns: Vec::new(), refusal: refusal.to_string() }));
        m.columns.push((label, side));
    }
    Ok(())
}

/// The ∂σ/∂T column of `scheme` after the refusal `fault`: one-sided, as the strain columns.
pub(super) fn finish_dtemp_column(
    scheme: Scheme,
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    h: f64,
    fault: Fault,
    col: &mut [f64],
    made: &mut Option<Box<OneSided>>,
) -> Result<(), Fault> {
    if !goes_around(scheme, &fault, h) {
        return Err(fault);
    }
    let side = column(driver, caller, Direction::Temperature, h, col)?;
    let m =
        made.get_or_insert_with(|| Box::new(OneSided { columns: Vec::new(), refusal: fault.to_string() }));
    m.columns.push(("dT".to_string(), side));
    Ok(())
}

/// Whether the complex step ran and agrees with the returned tangent, and with the returned
/// ∂σ/∂T: (tangent, ∂σ/∂T). Only asked in the full judgement of an increment with a
/// one-sided column.
pub(super) fn exact_agrees(
    me: &super::Measurement,
    caller: &Caller<'_>,
    settings: &crate::Settings,
) -> (bool, bool) {
    use crate::compare::{compare_dtemp_floor, compare_with, Limits};
    if me.measured.iter().all(|m| m.one_sided.is_none()) {
        return (false, false);
    }
    let n = me.n;
    let Some(cx) = me.measured.iter().find(|m| m.scheme == Scheme::ComplexStep && m.outcome.is_none()) else {
        return (false, false);
    };
    let ss = settings.scheme(Scheme::ComplexStep);
    let limits = Limits::new(ss.tol, settings.entry_floor, settings.worst_entries);
    let conv = &caller.info().convention;
    let tangent = me.soft.as_ref().is_some_and(|soft| {
        compare_with(conv, &me.returned[..n * n], &cx.tangent[..n * n], limits, soft).pass
    });
    let dtemp = match (&me.returned_dtemp, &cx.dtemp) {
        (Some(ret), Some(Ok(col))) => {
            compare_dtemp_floor(conv, &ret[..n], &col[..n], limits, me.dtemp_abs_floor).pass
        }
        _ => false,
    };
    (tangent, dtemp)
}

/// A failed comparison of a scheme with one-sided columns (of ∂σ/∂T when `dtemp`, else of
/// the strain) set aside when the complex step agrees (`exact`); any other outcome as it is.
pub(super) fn set_aside(
    outcome: crate::report::CheckOutcome,
    made: Option<&OneSided>,
    dtemp: bool,
    exact: bool,
) -> crate::report::CheckOutcome {
    use crate::report::CheckOutcome;
    let Some(made) = made else { return outcome };
    let failed = matches!(&outcome, CheckOutcome::Compared(x) if !x.pass);
    let columns: Vec<&str> =
        made.columns.iter().filter(|(c, _)| (c == "dT") == dtemp).map(|(c, _)| c.as_str()).collect();
    if !failed || !exact || columns.is_empty() {
        return outcome;
    }
    CheckOutcome::Skipped {
        reason: format!(
            "set aside: column{} {} {ONE_SIDED} at the edge of the routine's domain disagree{} where the \
             complex step agrees (the response is too curved there for the difference's step)",
            if columns.len() == 1 { "" } else { "s" },
            columns.join(", "),
            if columns.len() == 1 { "s" } else { "" }
        ),
    }
}

impl super::Measurement {
    /// The note of increment `index` (1-based) when the routine refused a call of a scheme's
    /// stencil and columns were made one-sided.
    pub fn one_sided_note(&self, index: usize) -> Option<String> {
        if self.measured.iter().all(|m| m.one_sided.is_none()) {
            return None;
        }
        let notes: Vec<String> = self
            .measured
            .iter()
            .filter_map(|m| m.one_sided.as_ref().map(|o| o.note(index, m.scheme)))
            .collect();
        (!notes.is_empty()).then(|| notes.join("; "))
    }
}
