//! Numerical tangents of one point of a block routine (central differences; the complex step
//! with the twin), and whether a twin that disagrees with the central differences takes one
//! side of a kink there (the central difference straddles it) or is not complex-step safe.

use num_complex::Complex64;

use super::report::BlockReport;
use super::routine::BlockRoutine;
use super::walk::{BlockBuffers, ComplexPoint};

/// Relative step of the central differences, of the increment's largest component.
const FD_STEP: f64 = 1e-6;
/// Floor of the increment size the differences scale with.
const FD_FLOOR: f64 = 1e-6;
/// Complex step.
const CS_STEP: f64 = 1e-20;
/// Relative difference between the twin's tangent and the central one above which the twin is
/// looked at (the central differences' truncation and rounding stay far below; common
/// practice).
pub(super) const TWIN_GAP: f64 = 1e-4;
/// A column of the twin's tangent within this share of the whole tangent's size of a one-sided
/// column is that side's (first-order one-sided differences at the central step are within
/// about 1e-6 of their side).
const SIDE_GAP: f64 = 1e-3;

/// Numerical tangent ∂σ/∂Δε of point 0 of `b` at its current increment (central differences);
/// `b`'s outputs are left as the unperturbed call's only by a later call.
pub(super) fn fd_tangent(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    b: &mut BlockBuffers,
    dt: f64,
    inc: i32,
    report: &mut BlockReport,
) -> Result<Vec<f64>, String> {
    let n = b.ncomp;
    let base: Vec<f64> = b.strain_increment.clone();
    let scale = base.iter().fold(0.0f64, |a, x| a.max(x.abs())).max(FD_FLOOR);
    let h = FD_STEP * scale;
    let mut d = vec![0.0; n * n];
    let mut plus = vec![0.0; n];
    for j in 0..n {
        for (sign, out) in [(1.0, 0usize), (-1.0, 1)] {
            b.strain_increment.copy_from_slice(&base);
            b.strain_increment[j] += sign * h;
            report.real_calls += 1;
            b.call(routine, properties, dt, inc).map_err(|e| e.to_string())?;
            if out == 0 {
                plus.copy_from_slice(&b.stress[..n]);
            } else {
                for i in 0..n {
                    d[i + j * n] = (plus[i] - b.stress[i]) / (2.0 * h);
                }
            }
        }
    }
    b.strain_increment.copy_from_slice(&base);
    Ok(d)
}

pub(super) fn cs_tangent(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    b: &BlockBuffers,
    cx: &mut ComplexPoint,
    dt: f64,
    inc: i32,
    report: &mut BlockReport,
) -> Result<Vec<f64>, String> {
    let n = b.ncomp;
    let mut d = vec![0.0; n * n];
    for j in 0..n {
        cx.load(properties, b, 0);
        cx.strain_increment[j] += Complex64::new(0.0, CS_STEP);
        report.complex_calls += 1;
        cx.call(routine, &b.conditions, b.time, dt, inc).map_err(|e| e.to_string())?;
        for i in 0..n {
            d[i + j * n] = cx.stress[i].im / CS_STEP;
        }
    }
    Ok(d)
}

pub(super) fn frobenius(a: &[f64]) -> f64 {
    a.iter().map(|x| x * x).sum::<f64>().sqrt()
}

/// Whether every column of `twin` (the twin's tangent at the increment `b` holds) equals the
/// forward or the backward one-sided derivative: a twin on one side of a kink the central
/// difference straddles, no broken twin. `2n + 1` real calls.
pub(super) fn twin_on_a_side(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    b: &mut BlockBuffers,
    dt: f64,
    inc: i32,
    twin: &[f64],
    report: &mut BlockReport,
) -> Result<bool, String> {
    let n = b.ncomp;
    let base: Vec<f64> = b.strain_increment.clone();
    let scale = base.iter().fold(0.0f64, |a, x| a.max(x.abs())).max(FD_FLOOR);
    let h = FD_STEP * scale;
    report.real_calls += 1;
    b.call(routine, properties, dt, inc).map_err(|e| e.to_string())?;
    let s0: Vec<f64> = b.stress[..n].to_vec();
    let size = frobenius(twin).max(f64::MIN_POSITIVE);
    let mut all = true;
    for j in 0..n {
        let mut sides = [vec![0.0; n], vec![0.0; n]];
        for (k, sign) in [1.0, -1.0].into_iter().enumerate() {
            b.strain_increment.copy_from_slice(&base);
            b.strain_increment[j] += sign * h;
            report.real_calls += 1;
            b.call(routine, properties, dt, inc).map_err(|e| e.to_string())?;
            for i in 0..n {
                sides[k][i] = sign * (b.stress[i] - s0[i]) / h;
            }
        }
        let col = &twin[j * n..(j + 1) * n];
        let near = |side: &[f64]| {
            let d: Vec<f64> = col.iter().zip(side).map(|(a, b)| a - b).collect();
            frobenius(&d) <= SIDE_GAP * size
        };
        all &= near(&sides[0]) || near(&sides[1]);
    }
    b.strain_increment.copy_from_slice(&base);
    Ok(all)
}
