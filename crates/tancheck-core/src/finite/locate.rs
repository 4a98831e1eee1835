//! Bisect for the finite-strain check: the first failing increment of a check's path, the
//! start of that increment (walked again with base calls), and the fraction of the increment
//! in F where its verdict changes from pass to fail, with what changes there (the routine's
//! branch, its state variables starting to move, or nothing: the error grows with the
//! fraction and passes the tolerance there).
//!
//! A fraction θ of the increment from F₀ to F₁ is the call to F₀ + θ (F₁ − F₀) from the same
//! start (stress, state, temperature, time, and its time increment scaled by θ), as a solver
//! cuts an increment in a displacement-driven step.

use serde::{Deserialize, Serialize};

use super::check::{judge, FiniteIncrement, FiniteReport, FiniteSettings, Judged};
use super::mat3::{self, Mat3};
use super::numeric::{Start, Workspace};
use super::path::{path_start, FinitePath};
use super::routine::FiniteRoutine;

/// Where inside the failing increment its verdict changes.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(tag = "found", rename_all = "kebab-case", deny_unknown_fields)]
pub enum FractionFound {
    /// The increment fails at every fraction tried, down to `smallest`: the flaw is in the
    /// branch the increment starts in.
    Throughout { smallest: f64 },
    /// Passes at `passes`, fails at `fails` (the bracket narrowed to the fraction tolerance);
    /// `change` says what changes between them.
    Between { passes: f64, fails: f64, change: String },
    /// A call at a fraction faulted (or F there has det F ≤ 0): no bracket.
    Unknown { why: String },
}

impl FractionFound {
    /// One line for a reader.
    pub fn words(&self) -> String {
        match self {
            FractionFound::Throughout { smallest } => format!(
                "it fails at every fraction of the increment down to {smallest:e}: the flaw is in the branch the \
                 increment starts in"
            ),
            FractionFound::Between { passes, fails, change } => {
                let f = |x: f64| if x >= 1e-3 { format!("{x:.6}") } else { format!("{x:.3e}") };
                format!("it passes up to {} of the increment and fails from {}: {change}", f(*passes), f(*fails))
            }
            FractionFound::Unknown { why } => format!("no fraction bracket: {why}"),
        }
    }
}

/// The first failing increment of a finite-strain check, located.
#[derive(Clone, Debug)]
pub struct FiniteLocated {
    /// 1-based, in the path the check walked.
    pub increment: usize,
    /// The start of that increment (the state the walk reached).
    pub start: Start,
    /// F at the end of the increment.
    pub f1: Mat3<f64>,
    /// The increment judged again on its own, and the outputs of its base call.
    pub judged: Judged,
    pub fraction: FractionFound,
    /// Real and complex calls made to locate it.
    pub calls: u64,
    pub complex_calls: u64,
}

/// Locate the first failing increment of `report` (a check of `path`, the path as checked:
/// see [`super::check::run_checked`]). `None` when no increment failed (a pass, or a fault
/// before the first failure). `fraction_tol`: how narrow the bracket of the fraction gets,
/// and the smallest fraction tried.
pub fn locate(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
    report: &FiniteReport,
    settings: FiniteSettings,
    fraction_tol: f64,
) -> Option<FiniteLocated> {
    let k = report.increments.iter().find(|i| !i.passed)?.increment;
    let info = r.info().clone();
    let mut ws = Workspace::new(info.nstate, info.nproperties);
    let mut start = path_start(properties, state0, path);
    for (i, f1) in path.gradients.iter().enumerate().take(k).skip(1) {
        start.increment = i as i32;
        start.time[1] = path.dtime.get(i - 1).copied().unwrap_or(1.0);
        let base = ws.call_full(r, &start, f1).ok()?;
        start.f0 = *f1;
        start.time[0] += start.time[1];
        start.stress0 = base.stress;
        start.state0.copy_from_slice(&base.state);
    }
    start.increment = k as i32;
    start.time[1] = path.dtime.get(k - 1).copied().unwrap_or(1.0);
    let f1 = path.gradients[k];
    let mut judged = judge(r, &mut ws, &start, &f1, settings).ok()?;
    judged.increment.increment = k;
    let fraction = if judged.increment.passed {
        // The routine does not repeat its results (the check saw a failure here).
        FractionFound::Unknown {
            why:
                "the increment passed when judged again on its own: the routine does not repeat its results \
                  (hidden state between calls?)"
                    .into(),
        }
    } else {
        bracket(r, &mut ws, &start, &f1, settings, fraction_tol, &judged)
    };
    Some(FiniteLocated {
        increment: k,
        start,
        f1,
        judged,
        fraction,
        calls: ws.calls,
        complex_calls: ws.complex_calls,
    })
}

/// The start and end of the fraction `t` of the increment from `start` to `f1`.
pub fn fraction_of(start: &Start, f1: &Mat3<f64>, t: f64) -> (Start, Mat3<f64>) {
    let mut s = start.clone();
    s.time[1] *= t;
    let f: Mat3<f64> =
        std::array::from_fn(|i| std::array::from_fn(|j| start.f0[i][j] + t * (f1[i][j] - start.f0[i][j])));
    (s, f)
}

/// Judge the fraction `t`, or why it cannot be judged.
fn at(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    start: &Start,
    f1: &Mat3<f64>,
    settings: FiniteSettings,
    t: f64,
) -> Result<Judged, String> {
    let (s, f) = fraction_of(start, f1, t);
    let j = mat3::det(&f);
    if !(j > 0.0 && j.is_finite()) {
        return Err(format!("at {t:.6} of the increment det F = {j:e}"));
    }
    judge(r, ws, &s, &f, settings).map_err(|e| {
        format!(
            "at {t:.6} of the increment {} call faulted: {}",
            if e.base { "the base" } else { "a perturbed" },
            e.fault
        )
    })
}

fn bracket(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    start: &Start,
    f1: &Mat3<f64>,
    settings: FiniteSettings,
    tol: f64,
    whole: &Judged,
) -> FractionFound {
    let tol = if tol > 0.0 && tol < 0.5 { tol } else { 1e-6 };
    let low = match at(r, ws, start, f1, settings, tol) {
        Ok(j) => j,
        Err(why) => return FractionFound::Unknown { why },
    };
    if !low.increment.passed {
        return FractionFound::Throughout { smallest: tol };
    }
    let (mut lo, mut hi) = (tol, 1.0);
    let (mut pass, mut fail) = (low, whole.clone());
    while hi - lo > tol {
        let mid = 0.5 * (lo + hi);
        match at(r, ws, start, f1, settings, mid) {
            Ok(j) if j.increment.passed => (lo, pass) = (mid, j),
            Ok(j) => (hi, fail) = (mid, j),
            Err(why) => return FractionFound::Unknown { why },
        }
    }
    FractionFound::Between { passes: lo, fails: hi, change: change_words(start, &pass, &fail) }
}

/// What changes between the passing and the failing side of the bracket.
fn change_words(start: &Start, pass: &Judged, fail: &Judged) -> String {
    let (bp, bf) = (pass.base.outcome.branch, fail.base.outcome.branch);
    if bp != bf && (bp >= 0 || bf >= 0) {
        return format!("the routine's branch changes there, from {bp} to {bf}");
    }
    // State variables held at their start values on the passing side that move on the
    // failing side (a plastic strain, a hardening variable, a damage): a branch is entered.
    // A state that moves in every call (an elastic strain kept as state) is not one of them.
    let still =
        |j: &Judged, i: usize| j.base.state.get(i).is_some_and(|x| x.to_bits() == start.state0[i].to_bits());
    let starting: Vec<String> = (0..start.state0.len())
        .filter(|&i| still(pass, i) && !still(fail, i))
        .map(|i| i.to_string())
        .collect();
    if !starting.is_empty() {
        return format!(
            "state variable{} {} start{} to change there (a branch such as yielding or damage is entered)",
            if starting.len() == 1 { "" } else { "s" },
            starting.join(", "),
            if starting.len() == 1 { "s" } else { "" }
        );
    }
    "nothing else changes there (no branch is entered, no state variable starts to move): the error grows \
     with the fraction and passes the tolerance there"
        .into()
}

/// The increment's verdict for a reader: the numbers of [`FiniteIncrement`].
pub fn verdict_words(i: &FiniteIncrement) -> String {
    let cx = i.error_complex.map_or(String::new(), |e| format!("complex step {e:.3e}, "));
    let cause = i.cause.as_ref().map_or("unexplained".to_string(), |c| c.name.clone());
    format!(
        "{} ({cx}central differences {:.3e}){}",
        if i.passed { "passes" } else { "fails" },
        i.error_central,
        if i.passed { String::new() } else { format!(", {cause}") }
    )
}
