//! The Newton-rate probe: does the returned tangent make Newton's method converge
//! quadratically, as the derivative of the stress update must?
//!
//! At each probed increment the path's own call fixes a reference: the strain increment Δε
//! and the stress σ it reached. The probe then solves a mixed-control version of the same
//! increment ([`mixed::solve`] with the routine's tangent): the first component (routine
//! order) keeps its strain increment, every other component starts from a zero strain
//! increment (from −Δε₁/2 when zero is the reference increment itself, as on a path that
//! moves only the first component) and is driven by Newton's method until its stress is the
//! reference stress. The
//! stress update is a function of the increment, so Newton is looking for Δε itself, and the
//! iteration is Newton's method on the routine's own map with the routine's Jacobian. Holding
//! the reached stresses rather than zero works on any path, mixed or strain controlled, and
//! makes every column of the tangent but the first take part.
//!
//! From the residual norms r_k (controlled stresses minus targets) the observed orders
//! p_k = ln(r_{k+1}/r_k) / ln(r_k/r_{k−1}) are reported: they tend to 2 with the exact
//! Jacobian and stay near 1 with an approximate one, such as a continuum tangent after yield
//! (a standard result of Newton's method). Residuals at the rounding floor,
//! r ≤ 1e-13 · max(1, ‖σ‖∞, max|C_ij| ‖ε + Δε‖∞), are left out; the solve itself stops at
//! 1e-12 · max(1, ‖σ‖∞) within at most max(100, the path's `mixed.max_iterations`)
//! iterations.
//!
//! The order of an increment is its last observed order, from its three smallest usable
//! residuals: the asymptotic rate; or, when the solve went on below the rounding floor and
//! the step there shows a higher order, that one (rounding can only lower it). Earlier orders come from iterates far from the solution
//! (often on the other side of the elastic–plastic kink) and scatter widely, above 2 as well
//! as below, with either tangent; they are listed in the details but not judged.
//!
//! Verdict: FAIL when Newton with the routine's tangent does not converge at some probed
//! increment (or the routine fails during it), or when an increment with at least three
//! usable residuals has an order below `tol` (default 1.5); a single order (three usable
//! residuals, the first the start's) between 1.2 and 1.5 is pre-asymptotic and not judged
//! ([`IncrementSolve::judged_order`]). An increment that converges in
//! one iteration has a linear response and no order to measure. Value: the lowest order over
//! the measured increments. A point with a single component has nothing to solve for and is
//! skipped.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::mixed::{self, MixedSettings, SolveLog};
use crate::routine::{Caller, Fault};

pub struct NewtonRate;

/// Default lowest acceptable order.
pub const DEFAULT_MIN_ORDER: f64 = 1.5;
/// A single order from the start residual below this reads as linear convergence and is
/// judged; above it (and below the lowest acceptable order) it is left unjudged: see
/// [`IncrementSolve::judged_order`]. Why 1.2: a constant contraction gives 1.0 from any three
/// residuals, and a contraction that shrinks tenfold after a first step by 1e-4 already reads
/// 1.25.
pub const FROM_START_LINEAR: f64 = 1.2;
/// Residuals at most this times the scale of the stress are at the rounding floor.
pub const FLOOR: f64 = 1e-13;
/// The probe's solves stop at this residual relative to max(1, ‖σ‖∞).
pub const STRESS_TOL: f64 = 1e-12;

/// The Newton solve of one increment.
#[derive(Clone, Debug, PartialEq)]
pub struct IncrementSolve {
    pub increment: usize,
    /// The path's call changed the state variables (an inelastic step).
    pub state_changed: bool,
    /// The solve's log; `converged` is false when the routine's tangent did not converge (or
    /// a call failed), whatever a numerical fallback then did.
    pub log: SolveLog,
    /// The routine failed during the solve.
    pub failure: Option<String>,
    /// That failure was a status the routine returned for an iterate of the solve (it refused
    /// the iterate as too large or outside its law, as it would refuse a solver's, which cuts
    /// back): the increment is not judged.
    pub refused: bool,
    /// The routine's tangent at the path's call is singular in the components solved for (a
    /// corner or apex of the yield surface where the stress cannot change along them): a
    /// solve that does not converge there is not judged.
    pub singular: bool,
    /// Residuals above the rounding floor.
    pub usable: Vec<f64>,
    /// Observed orders from the usable residuals.
    pub orders: Vec<f64>,
    /// The order of the last step, to the first residual below the rounding floor (when the
    /// solve went below it and the usable residuals give an order): rounding can only make
    /// that residual larger, so this order is never higher than the true one.
    pub tail_order: Option<f64>,
    /// From the start of the increment Newton with the routine's tangent did not converge
    /// (these are the residuals of that solve, its numerical fallback's when it fell back),
    /// and the solve above started near the solution instead (see [`NEAR`]).
    pub diverged_from_start: Option<Vec<f64>>,
    /// From the start of the increment Newton with the routine's tangent converged faster than
    /// linearly but below the lowest acceptable order (these are its residuals), and the solve
    /// above, started near the solution instead (see [`NEAR`]), shows that order: the first
    /// steps were pre-asymptotic (a correct ply tangent read 1.43 from [9.65, 3.88, 1.24e-2,
    /// 3.42e-6, 8.32e-14], its first step across the damage onset; a user-style sweep).
    pub slow_from_start: Option<Vec<f64>>,
    /// The solve converged to the path's stresses at another solution than the path's (other
    /// state variables or strains, in words): a softening law reaches the same stresses on its
    /// unloading branch. The increment is not judged (a secant tangent passed so, the solve
    /// ending elastic at the path's damaging increment; a user-style sweep).
    pub elsewhere: Option<String>,
}

/// Where a second solve starts when the first diverged: this fraction of the way from the
/// first start to the solution. Newton's order is a local property; far from the solution a
/// correct tangent can overshoot (a softening branch), which says nothing about the tangent.
pub const NEAR: f64 = 0.9;

impl IncrementSolve {
    /// Newton iterations made (calls after the first).
    pub fn iterations(&self) -> usize {
        self.log.residuals.len().saturating_sub(1)
    }
    /// The order of the increment: the last observed one (the asymptotic rate), when there
    /// is one, or the order of the step below the rounding floor when that is higher (the
    /// residuals of an exact tangent can settle late: [9.7e-1, 9.7e-2, 4.2e-2, 2.6e-4,
    /// 3.1e-7, 3.0e-14] has the last usable order 1.33 and the final one 2.39).
    pub fn order(&self) -> Option<f64> {
        let last = self.orders.last().copied()?;
        Some(self.tail_order.map_or(last, |t| last.max(t)))
    }
    /// The order the verdict judges: [`IncrementSolve::order`], except a single order made
    /// with the start residual that does not read as linear (at least [`FROM_START_LINEAR`]):
    /// the first step from the far start is pre-asymptotic and lowers it (a creep routine's
    /// exact tangent gave [2.4e1, 1.8e-3, 3.2e-9, 6.4e-14], order 1.39 from those three, and
    /// failed; a user-style sweep). A wrong tangent's contraction stays about the same from step
    /// to step, which reads as order 1 from any three residuals.
    pub fn judged_order(&self) -> Option<f64> {
        let p = self.order()?;
        (self.orders.len() > 1 || !(FROM_START_LINEAR..DEFAULT_MIN_ORDER).contains(&p)).then_some(p)
    }
    /// Fill `usable`, `orders` and `tail_order` from the log (`scale`: the stress scale of
    /// the rounding floor). After a numerical fallback the residuals are not the routine
    /// tangent's, and none is used.
    fn read_orders(&mut self, scale: f64) {
        let log = &self.log;
        self.usable = if log.numerical_fallback {
            Vec::new()
        } else {
            log.residuals.iter().cloned().filter(|&r| r > FLOOR * scale).collect()
        };
        self.orders =
            SolveLog { residuals: self.usable.clone(), converged: true, numerical_fallback: false }.orders();
        self.tail_order = if log.numerical_fallback {
            None
        } else {
            tail_order(&log.residuals, FLOOR * scale, TAIL_LOWEST * scale)
        };
    }
    /// Converged with the routine's own tangent.
    pub fn converged(&self) -> bool {
        self.failure.is_none() && self.log.converged && !self.log.numerical_fallback
    }
    /// Left out of the judgement: the routine refused an iterate, its tangent is singular where
    /// the solve did not converge, or the solve reached another solution than the path's.
    pub fn unjudged(&self) -> bool {
        self.refused || (self.singular && !self.converged()) || self.elsewhere.is_some()
    }
}

/// Solve every probed increment of the path as described in the module documentation.
/// Errors are faults of the path's own calls, with the increment.
pub fn study(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
) -> Result<Vec<IncrementSolve>, (usize, crate::routine::Fault)> {
    let n = caller.info().convention.ncomp();
    let controlled: Vec<usize> = (1..n).collect();
    let settings =
        MixedSettings { stress_tol: STRESS_TOL, max_iterations: env.settings.mixed.max_iterations.max(100) };
    let mut out = Vec::new();
    walk(caller, env, |k, d, c| {
        if !env.spec.runs_at(k) {
            return Ok(());
        }
        let targets: Vec<f64> = controlled.iter().map(|&i| d.base.stress[i]).collect();
        let state_changed =
            d.base.state.iter().zip(&d.start().state).any(|(a, b)| a.to_bits() != b.to_bits());
        let sig = d.base.stress.iter().fold(1.0f64, |a, s| a.max(s.abs()));
        let cmax = d.base.tangent.iter().fold(0.0f64, |a, x| a.max(x.abs()));
        let emax = (0..n).fold(0.0f64, |a, i| a.max((d.start().strain[i] + d.dstrain()[i]).abs()));
        let scale = sig.max(cmax * emax);
        let singular =
            singular_block(&d.base.tangent, n, &controlled) && derivative_singular(d, c, &controlled, env);
        let mut t = d.clone();
        let mut de = d.dstrain().to_vec();
        // From zero, unless zero is the reference increment itself (a path that moves only
        // the first component): then from −Δε₁/2, so that there is something to solve.
        let start = if controlled.iter().all(|&i| de[i] == 0.0) { -0.5 * de[0] } else { 0.0 };
        for &i in &controlled {
            de[i] = start;
        }
        let fresh = t.clone();
        t.set_dstrain(&de);
        let (mut log, mut failure, refused) =
            match mixed::solve_with(&mut t, c, &controlled, &targets, &settings, true, false) {
                Ok(log) => (log, None, false),
                Err(f) => (
                    SolveLog { residuals: Vec::new(), converged: false, numerical_fallback: false },
                    Some(f.to_string()),
                    matches!(f, Fault::Status { .. }),
                ),
            };
        // Where the solve converged with the routine's tangent: the same solution as the
        // path's, or another one (found with the driver of the solve that gave the log).
        let done = |log: &SolveLog| log.converged && !log.numerical_fallback;
        let mut elsewhere =
            if failure.is_none() && done(&log) { another_solution(d, &t, &controlled) } else { None };
        let mut diverged_from_start = None;
        if failure.is_none() && log.numerical_fallback {
            // Again from near the solution (the path's own increment).
            let mut t = fresh.clone();
            let mut near = de.clone();
            for &i in &controlled {
                near[i] = NEAR * d.dstrain()[i] + (1.0 - NEAR) * start;
            }
            t.set_dstrain(&near);
            if let Ok(l) = mixed::solve_with(&mut t, c, &controlled, &targets, &settings, true, false) {
                elsewhere = if done(&l) { another_solution(d, &t, &controlled) } else { None };
                diverged_from_start = Some(std::mem::take(&mut log.residuals));
                (log, failure) = (l, None);
            }
        }
        let mut solve = IncrementSolve {
            increment: k,
            state_changed,
            log,
            failure,
            refused,
            singular,
            usable: Vec::new(),
            orders: Vec::new(),
            tail_order: None,
            diverged_from_start,
            slow_from_start: None,
            elsewhere,
        };
        solve.read_orders(scale);
        // Faster than linear but slower than the lowest acceptable order, from the start: the
        // first steps may cross a kink (a damage onset) or start far away, so that the orders
        // read are pre-asymptotic. Again from near the solution; a correct tangent shows its
        // order there, a wrong one converges linearly there too and the first solve stands.
        let min_order = env.spec.tol.unwrap_or(DEFAULT_MIN_ORDER);
        let slow = solve.converged()
            && solve.elsewhere.is_none()
            && solve.judged_order().is_some_and(|p| (FROM_START_LINEAR..min_order).contains(&p));
        if slow {
            let mut t = fresh;
            let mut near = de.clone();
            for &i in &controlled {
                near[i] = NEAR * d.dstrain()[i] + (1.0 - NEAR) * start;
            }
            t.set_dstrain(&near);
            if let Ok(l) = mixed::solve_with(&mut t, c, &controlled, &targets, &settings, true, false) {
                if done(&l) && another_solution(d, &t, &controlled).is_none() {
                    let mut again = solve.clone();
                    again.log = l;
                    again.read_orders(scale);
                    if again.judged_order().is_some_and(|p| p >= min_order) {
                        again.slow_from_start = Some(solve.log.residuals.clone());
                        solve = again;
                    }
                }
            }
        }
        out.push(solve);
        Ok(())
    })?;
    Ok(out)
}

/// How far the solve's end may lie from the path's, relative to the larger state variable (or
/// strain) of the two, and still be the same solution: far above the solve's own tolerance
/// (1e-12 of the stress), far below any other branch's.
const SAME_SOLUTION: f64 = 1e-6;

/// Whether the solve `t` ended at another solution than the path's call `d`: state variables
/// or solved strains apart by more than [`SAME_SOLUTION`] of their size, in words.
fn another_solution(d: &Driver, t: &Driver, controlled: &[usize]) -> Option<String> {
    let apart = |a: &[f64], b: &[f64]| {
        let size = a.iter().chain(b).fold(0.0f64, |m, x| m.max(x.abs()));
        a.iter().zip(b).position(|(x, y)| (x - y).abs() > SAME_SOLUTION * size.max(f64::MIN_POSITIVE))
    };
    if let Some(i) = apart(&t.base.state, &d.base.state) {
        return Some(format!(
            "the solve reached the path's stresses at another solution (state[{i}] {:.4e} against the path's \
             {:.4e}: another branch, such as the unloading one of a softening law): not judged",
            t.base.state[i], d.base.state[i]
        ));
    }
    let ours: Vec<f64> = controlled.iter().map(|&i| t.dstrain()[i]).collect();
    let path: Vec<f64> = controlled.iter().map(|&i| d.dstrain()[i]).collect();
    let scale = d.strain_scale(1e-12);
    let j = ours.iter().zip(&path).position(|(x, y)| (x - y).abs() > SAME_SOLUTION * scale)?;
    Some(format!(
        "the solve reached the path's stresses at another strain (component {} increment {:.4e} against the \
         path's {:.4e}): not judged",
        controlled[j] + 1,
        ours[j],
        path[j]
    ))
}

/// Whether the block of the column-major n × n `tangent` on the rows and columns `idx` is
/// singular to rounding: Gaussian elimination with partial pivoting meets a pivot below 1e-12
/// of the block's largest entry (or a non-finite one).
fn singular_block(tangent: &[f64], n: usize, idx: &[usize]) -> bool {
    let m = idx.len();
    let mut a: Vec<f64> = Vec::with_capacity(m * m);
    for &j in idx {
        for &i in idx {
            a.push(tangent[i + j * n]);
        }
    }
    let big = a.iter().fold(0.0f64, |x, y| x.max(y.abs()));
    if !big.is_finite() || big == 0.0 {
        return true;
    }
    for k in 0..m {
        let p = (k..m).max_by(|&x, &y| a[x + k * m].abs().total_cmp(&a[y + k * m].abs())).unwrap_or(k);
        let pivot = a[p + k * m].abs();
        if pivot.is_nan() || pivot <= 1e-12 * big {
            return true;
        }
        for j in 0..m {
            a.swap(k + j * m, p + j * m);
        }
        for i in k + 1..m {
            let f = a[i + k * m] / a[k + k * m];
            for j in k..m {
                a[i + j * m] -= f * a[k + j * m];
            }
        }
    }
    false
}

/// Whether the derivative is singular in the components solved for too, where the routine's
/// tangent is: the complex step's columns (exact, and on the branch the routine takes at the
/// point, as its tangent should be). A routine whose tangent is singular only because it is
/// wrong (a Mohr-Coulomb tangent without the rotation of the principal directions, on its
/// main plane) had its unconverged solve excused as a corner's (a user-style sweep). Without
/// the twin, or where a call fails, the routine's word stands. n − 1 complex calls, only where
/// the routine's block is singular.
fn derivative_singular(
    d: &Driver,
    caller: &mut Caller<'_>,
    controlled: &[usize],
    env: &ProbeEnv<'_>,
) -> bool {
    use crate::schemes::Scheme;
    if !caller.has_complex() {
        return true;
    }
    let n = d.ncomp();
    let mut dd = d.clone();
    let h = env.settings.complex_step.rel_step * dd.strain_scale(env.settings.step_floor);
    let mut t = vec![0.0; n * n];
    for &j in controlled {
        let col = &mut t[j * n..(j + 1) * n];
        if Scheme::ComplexStep.column(&mut dd, caller, crate::driver::Direction::Strain(j), h, col).is_err() {
            return true;
        }
    }
    singular_block(&t, n, controlled)
}

/// A residual below this times the scale is rounding itself: it can come out smaller than the
/// true residual by luck, and an order made from it could be any. Ten units of rounding.
const TAIL_LOWEST: f64 = 10.0 * f64::EPSILON;

/// The order of the step from the last residual above `floor` to the first one below it,
/// with the residual before them: `None` without such a step, or when that residual is under
/// `lowest` (rounding itself).
fn tail_order(r: &[f64], floor: f64, lowest: f64) -> Option<f64> {
    let last = r.iter().rposition(|&x| x > floor)?;
    let below = *r.get(last + 1)?;
    let (a, b) = (r[last.checked_sub(1)?], r[last]);
    let p = (below / b).ln() / (b / a).ln();
    (below >= lowest && below > 0.0 && b < a && p.is_finite()).then_some(p)
}

fn list(v: &[f64], prec: usize) -> String {
    elided(v.iter().map(|x| format!("{x:.prec$e}")).collect())
}

/// Entries a residual or order list shows in full; a longer one shows its first and last
/// [`LIST_ENDS`] with the count of those between (a slow solve's 45 residuals filled a line).
const LIST_FULL: usize = 10;
const LIST_ENDS: usize = 4;

fn elided(items: Vec<String>) -> String {
    if items.len() <= LIST_FULL {
        return format!("[{}]", items.join(", "));
    }
    let n = items.len();
    format!(
        "[{}, … {} more …, {}]",
        items[..LIST_ENDS].join(", "),
        n - 2 * LIST_ENDS,
        items[n - LIST_ENDS..].join(", ")
    )
}

impl Probe for NewtonRate {
    fn name(&self) -> &'static str {
        "newton"
    }
    fn needs(&self) -> Needs {
        Needs::TANGENT.union(Needs::SEVERAL_COMPONENTS)
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        // run_probes skips before this; a direct call gets the same reason.
        if let Some(why) = super::unmet(self.needs(), caller.capabilities(), caller.info(), env) {
            return Ok(ProbeResult::skipped("newton", why));
        }
        let min_order = env.spec.tol.unwrap_or(DEFAULT_MIN_ORDER);
        let solves = match study(caller, env) {
            Ok(s) => s,
            Err((k, f)) => return Ok(faulted("newton", k, &f)),
        };
        if solves.is_empty() {
            return Ok(ProbeResult::skipped("newton", "no increment of the path is probed (see `at`)"));
        }
        let details: Vec<String> = solves
            .iter()
            .map(|s| {
                let mut line = format!(
                    "increment {}{}: {} iteration(s), residuals {}",
                    s.increment,
                    if s.state_changed { " (inelastic)" } else { "" },
                    s.iterations(),
                    list(&s.log.residuals, 2)
                );
                if !s.orders.is_empty() {
                    let o: Vec<String> = s.orders.iter().map(|p| format!("{p:.2}")).collect();
                    line.push_str(&format!(", orders {}", elided(o)));
                    if let Some(t) = s.tail_order {
                        line.push_str(&format!(", {t:.2} to the residual below the rounding floor"));
                    }
                }
                if s.log.numerical_fallback {
                    line.push_str(", the routine's tangent did not converge (numerical fallback)");
                }
                if s.order().is_some() && s.judged_order().is_none() {
                    line.push_str(
                        "; one order only, made with the start residual (a first step far from the solution, \
                         pre-asymptotic), and above the linear rate: not judged",
                    );
                }
                if s.diverged_from_start.is_some() {
                    line.push_str(&format!(
                        "; started at {:.0} % of the increment: from its start Newton with the routine's \
                         tangent did not converge in {} iterations (far from the solution a correct tangent \
                         can overshoot)",
                        NEAR * 100.0,
                        env.settings.mixed.max_iterations.max(100)
                    ));
                }
                if let Some(r) = &s.slow_from_start {
                    line.push_str(&format!(
                        "; started at {:.0} % of the increment: from its start the residuals {} fell faster \
                         than linearly but below order {min_order} (first steps far from the solution or \
                         across a kink, pre-asymptotic)",
                        NEAR * 100.0,
                        list(r, 2)
                    ));
                }
                if s.singular && !s.converged() {
                    line.push_str(
                        "; the routine's tangent is singular in the components solved for (a corner or apex \
                         where the stress cannot change along them): Newton cannot solve for them there, not \
                         judged",
                    );
                }
                if let Some(w) = &s.elsewhere {
                    line.push_str(&format!("; {w}"));
                }
                if let Some(f) = &s.failure {
                    line.push_str(&format!(", {f}"));
                    if s.refused {
                        line.push_str(
                            " in an iterate of the solve: not judged here (a solver would cut the increment \
                             back)",
                        );
                    }
                }
                line
            })
            .collect();
        let measured: Vec<(usize, f64)> = solves
            .iter()
            .filter(|s| s.elsewhere.is_none())
            .filter_map(|s| s.judged_order().map(|p| (s.increment, p)))
            .collect();
        let worst = measured.iter().cloned().min_by(|a, b| a.1.total_cmp(&b.1));
        let iters = solves.iter().map(IncrementSolve::iterations);
        let (lo, hi) = (iters.clone().min().unwrap_or(0), iters.max().unwrap_or(0));
        let span = if lo == hi {
            format!("{lo} iteration{}", if lo == 1 { "" } else { "s" })
        } else {
            format!("{lo}–{hi} iterations")
        };
        let unjudged = IncrementSolve::unjudged;
        if solves.iter().all(unjudged) {
            let mut r = ProbeResult::skipped(
                "newton",
                "at every probed increment the routine refused an iterate of the solve (a status it returned, \
                 as to a solver that would cut back), its tangent is singular in the components solved \
                 for, or the solve reached another solution than the path's: no rate to measure",
            );
            r.details = details;
            return Ok(r);
        }
        let unconverged = solves.iter().find(|s| !unjudged(s) && !s.converged());
        let slow =
            solves.iter().find(|s| s.elsewhere.is_none() && s.judged_order().is_some_and(|p| p < min_order));
        let mut r = if let Some(s) = unconverged {
            let why = match &s.failure {
                Some(f) => format!("the routine failed during the solve: {f}"),
                None if s.log.numerical_fallback => format!(
                    "Newton with the routine's tangent did not converge in {} iterations, from the start \
                     of the increment nor from {:.0} % of it (the residuals shown are the numerical \
                     fallback's)",
                    env.settings.mixed.max_iterations.max(100),
                    NEAR * 100.0
                ),
                None => format!(
                    "Newton with the routine's tangent did not converge in {} iterations",
                    env.settings.mixed.max_iterations.max(100)
                ),
            };
            let mut r =
                ProbeResult::new("newton", ProbeStatus::Fail, format!("increment {}: {why}", s.increment));
            r.increment = Some(s.increment);
            r
        } else if let Some(s) = slow {
            let p = s.judged_order().unwrap_or(f64::NAN);
            let mut r = ProbeResult::new(
                "newton",
                ProbeStatus::Fail,
                format!(
                    "Newton converges with order {p:.2} at increment {} (below {min_order}): the tangent is not the derivative of the stress update{}",
                    s.increment,
                    // The rate alone does not tell which approximation: the check's diagnosis does.
                    if s.state_changed { " (the check's diagnosis names the likely cause)" } else { "" }
                ),
            );
            r.increment = Some(s.increment);
            r
        } else {
            let summary = match worst {
                Some((k, p)) => format!(
                    "Newton with the routine's tangent: order {p:.2} or more at every measured increment (lowest at increment {k}); {span}"
                ),
                None => format!(
                    "Newton with the routine's tangent converged in {span} at every probed increment: no order to measure"
                ),
            };
            let left = solves.iter().filter(|s| unjudged(s)).count();
            let summary = if left > 0 {
                format!("{summary}; {left} increment(s) not judged (see the details)")
            } else {
                summary
            };
            ProbeResult::new("newton", ProbeStatus::Pass, summary)
        };
        r.value = worst.map(|w| w.1);
        r.tol = Some(min_order);
        r.details = details;
        r.series = solves
            .iter()
            // One iteration is a linear response: nothing to see in a residual history.
            .filter(|s| s.iterations() >= 2)
            .map(|s| super::ProbeSeries {
                name: match s.order() {
                    Some(p) => format!("increment {} (order {p:.2})", s.increment),
                    None => format!("increment {}", s.increment),
                },
                x: "iteration".into(),
                y: "residual".into(),
                log_y: true,
                points: s.log.residuals.iter().enumerate().map(|(i, &r)| [i as f64, r]).collect(),
            })
            .collect();
        Ok(r)
    }
}

#[cfg(test)]
mod tests;
