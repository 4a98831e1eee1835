//! Mixed control at the material point: some strain components prescribed, the stresses of
//! the others held at targets (e.g. uniaxial stress: ε11 prescribed, every other stress zero),
//! solved by Newton's method with the routine's own tangent, falling back to a numerical
//! (central-difference) tangent when the routine's does not converge.

use serde::{Deserialize, Serialize};

use crate::driver::{Direction, Driver};
use crate::path::MAX_STRAIN;
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;

/// Settings of the mixed-control solve.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields, default)]
pub struct MixedSettings {
    /// Converged when every controlled stress is within `stress_tol` × max(1, ‖σ‖∞).
    pub stress_tol: f64,
    pub max_iterations: usize,
}

impl Default for MixedSettings {
    fn default() -> Self {
        // Why: 1e-10 of the largest stress is far below the 1e-6 a tangent check resolves but
        // within reach of double precision; Newton with a consistent tangent needs well under
        // 10 iterations, and 25 leaves room for the linear rate of an approximate one
        // (common practice).
        MixedSettings { stress_tol: 1e-10, max_iterations: 25 }
    }
}

/// How the solve went.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct SolveLog {
    /// Residual norm (controlled stresses minus targets) before each iteration and at the end.
    pub residuals: Vec<f64>,
    pub converged: bool,
    /// The routine's tangent did not converge and a numerical one was used.
    pub numerical_fallback: bool,
}

impl SolveLog {
    /// Observed orders p_k = ln(r_{k+1}/r_k) / ln(r_k/r_{k−1}) (a standard result of Newton's
    /// method: → 2 with the exact Jacobian, ≈ 1 with an approximate one).
    pub fn orders(&self) -> Vec<f64> {
        let r = &self.residuals;
        (1..r.len().saturating_sub(1))
            .filter(|&k| r[k + 1] > 0.0 && r[k] > 0.0 && r[k - 1] > 0.0 && r[k] < r[k - 1])
            .map(|k| (r[k + 1] / r[k]).ln() / (r[k] / r[k - 1]).ln())
            .collect()
    }
}

/// Solve the current increment of `driver` so that the stresses of the components in
/// `controlled` (routine order) reach `targets`; the other components keep their strain
/// increments. On return the base call holds the converged state; when the solve did not
/// converge (a held stress the material cannot carry, a tangent too wrong for Newton), the
/// iterate closest to the targets, not the last one: a diverging solve's last iterate can lie
/// at strains of 1e12.
///
/// A Newton step that does not lower the residual is halved, up to [`HALVINGS`] times (a line
/// search): with full steps alone the solve jumped between the two sides of a plastic plateau
/// and never reached a held stress the material carries (a plane-stress routine heated while
/// held; a user-style sweep). An iterate whose stresses are not finite numbers ends the
/// attempt: the routine is never called with a strain worked out from them (it was, with NaN).
pub fn solve(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    controlled: &[usize],
    targets: &[f64],
    settings: &MixedSettings,
    use_routine_tangent: bool,
) -> Result<SolveLog, Fault> {
    solve_with(driver, caller, controlled, targets, settings, use_routine_tangent, true)
}

/// Routine positions and targets of the stress components a mixed-control increment holds:
/// those in the slots a path drives ([`crate::PointKind::path_slots`]; a plane-strain point's
/// σ33 is the reaction to its ε33 = 0, not held).
pub fn held_components(conv: &crate::Convention, hold: &[Option<f64>; 6]) -> (Vec<usize>, Vec<f64>) {
    let mut controlled = Vec::new();
    let mut targets = Vec::new();
    let driven = conv.kind().path_slots();
    for (i, c) in conv.order().iter().enumerate() {
        let slot = crate::convention::canonical_slot(*c);
        if !driven.contains(&slot) {
            continue;
        }
        if let Some(t) = hold[slot] {
            controlled.push(i);
            targets.push(t);
        }
    }
    (controlled, targets)
}

/// How many times a step that does not lower the residual is halved.
pub const HALVINGS: usize = 8;

/// [`solve`], with the line search or with full Newton steps only (`line_search` false: the
/// Newton probe measures the rate of the routine's own tangent, step by full step).
pub fn solve_with(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    controlled: &[usize],
    targets: &[f64],
    settings: &MixedSettings,
    use_routine_tangent: bool,
    line_search: bool,
) -> Result<SolveLog, Fault> {
    let m = controlled.len();
    let n = driver.ncomp();
    let mut dstrain = driver.dstrain().to_vec();
    let mut residuals = Vec::new();
    let mut numerical_fallback = !use_routine_tangent;
    let mut jac = vec![0.0; n * n];
    // The iterate with the smallest residual so far.
    let mut closest = (f64::INFINITY, dstrain.clone());
    for attempt in 0..2 {
        if attempt == 1 {
            if numerical_fallback {
                break;
            }
            numerical_fallback = true;
            residuals.clear();
        }
        // The last accepted iterate (its residual, strain and the step taken from it) and how
        // often that step was halved.
        let mut last: Option<(f64, Vec<f64>, Vec<f64>)> = None;
        let mut halved = 0;
        let mut calls = 0;
        while calls < settings.max_iterations * (1 + usize::from(line_search) * HALVINGS) {
            calls += 1;
            driver.set_dstrain(&dstrain);
            driver.base_call(caller)?;
            let scale = driver.base.stress.iter().fold(1.0f64, |a, s| a.max(s.abs()));
            let r: Vec<f64> = (0..m).map(|k| driver.base.stress[controlled[k]] - targets[k]).collect();
            let norm = r.iter().map(|x| x * x).sum::<f64>().sqrt();
            if !norm.is_finite() && last.is_none() {
                residuals.push(norm);
                break;
            }
            if line_search {
                if let Some((before, from, step)) = &mut last {
                    let lower = norm.partial_cmp(before) == Some(std::cmp::Ordering::Less);
                    if !lower && halved < HALVINGS {
                        // Back along the step, half as far.
                        halved += 1;
                        for (q, &j) in controlled.iter().enumerate() {
                            step[q] *= 0.5;
                            dstrain[j] = from[j] + step[q];
                        }
                        continue;
                    }
                }
            } else if !norm.is_finite() {
                residuals.push(norm);
                break;
            }
            if !norm.is_finite() {
                break;
            }
            halved = 0;
            if residuals.len() >= settings.max_iterations {
                break;
            }
            residuals.push(norm);
            if norm < closest.0 && within_limits(&dstrain) {
                closest = (norm, dstrain.clone());
            }
            if norm <= settings.stress_tol * scale {
                return Ok(SolveLog { residuals, converged: true, numerical_fallback });
            }
            if numerical_fallback {
                // Why 1e-6: near ε^(1/3) ≈ 6e-6, the step where central differences'
                // truncation and round-off balance (common practice).
                let h = 1e-6 * driver.strain_scale(1e-6);
                for j in 0..n {
                    Scheme::Central.column(
                        driver,
                        caller,
                        Direction::Strain(j),
                        h,
                        &mut jac[j * n..(j + 1) * n],
                    )?;
                }
            } else {
                jac.copy_from_slice(&driver.base.tangent);
            }
            // Solve J_cc δ = −r on the controlled block.
            let mut a = vec![0.0; m * m];
            for (p, &i) in controlled.iter().enumerate() {
                for (q, &j) in controlled.iter().enumerate() {
                    a[p + q * m] = jac[i + j * n];
                }
            }
            let Some(delta) = solve_dense(&a, &r.iter().map(|x| -x).collect::<Vec<_>>(), m) else { break };
            // A step that would leave the strain increments a path may hold is shortened to
            // their limit: a singular tangent (perfect plasticity past a stress it cannot
            // carry) sends Newton to strains of 1e12.
            let mut shorten = 1.0f64;
            for (q, &j) in controlled.iter().enumerate() {
                let next = dstrain[j] + delta[q];
                if next.abs() > MAX_STRAIN {
                    shorten =
                        shorten.min(((MAX_STRAIN * next.signum() - dstrain[j]) / delta[q]).clamp(0.0, 1.0));
                }
            }
            let step: Vec<f64> = delta.iter().map(|d| shorten * d).collect();
            if step.iter().any(|d| !d.is_finite()) {
                break;
            }
            last = Some((norm, dstrain.clone(), step.clone()));
            for (q, &j) in controlled.iter().enumerate() {
                dstrain[j] += step[q];
            }
        }
        // Restart from the prescribed increment with the numerical tangent.
        dstrain.copy_from_slice(driver.dstrain());
        for &j in controlled {
            dstrain[j] = 0.0;
        }
    }
    // Not converged: back to the closest iterate (the base call of the last one is replaced).
    if closest.0.is_finite() {
        driver.set_dstrain(&closest.1);
        driver.base_call(caller)?;
    }
    Ok(SolveLog { residuals, converged: false, numerical_fallback })
}

/// Whether every strain increment lies within what a path may hold ([`MAX_STRAIN`]).
fn within_limits(dstrain: &[f64]) -> bool {
    dstrain.iter().all(|d| d.abs() <= MAX_STRAIN)
}

/// Gaussian elimination with partial pivoting; `a` column-major m×m. None when singular.
fn solve_dense(a: &[f64], b: &[f64], m: usize) -> Option<Vec<f64>> {
    let mut a = a.to_vec();
    let mut x = b.to_vec();
    for c in 0..m {
        let p = (c..m).max_by(|&i, &j| a[i + c * m].abs().total_cmp(&a[j + c * m].abs()))?;
        // Why 1e-300: a pivot that small is zero for stiffnesses of any physical size; dividing
        // by it would only spread infinities.
        if a[p + c * m].abs() < 1e-300 {
            return None;
        }
        for k in 0..m {
            a.swap(c + k * m, p + k * m);
        }
        x.swap(c, p);
        for i in c + 1..m {
            let f = a[i + c * m] / a[c + c * m];
            for k in c..m {
                a[i + k * m] -= f * a[c + k * m];
            }
            x[i] -= f * x[c];
        }
    }
    for c in (0..m).rev() {
        let mut s = x[c];
        for k in c + 1..m {
            s -= a[c + k * m] * x[k];
        }
        x[c] = s / a[c + c * m];
    }
    Some(x)
}
