//! One scheme's strain columns of the numerical tangent: made in one sweep where the routine
//! can make its perturbed calls so ([`crate::routine::Sweep`]), else call by call through the
//! scheme; the same calls, the same columns to the bit, either way.

use num_complex::Complex64;

use crate::driver::{Direction, Driver};
use crate::routine::{call_at, Caller, Fault, SweepEnd};
use crate::schemes::Scheme;

/// What the calls of one column gave, for the looks a check takes at each column: the base
/// call's stress, the last call's with a step above 0 and with one below (the central
/// difference's two), the complex call's.
pub(super) struct ColumnCalls<'a> {
    pub base: &'a [f64],
    pub plus: &'a [f64],
    pub minus: &'a [f64],
    pub cplx: &'a [Complex64],
}

/// Fill the strain columns of `scheme` at step `h` into `tangent` (column-major, n × n),
/// calling `seen(j, calls)` after each column made. A fault ends the columns: `Err((j, fault))`
/// with the column whose call faulted (the columns before it are made).
pub(super) fn strain_columns(
    scheme: Scheme,
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    h: f64,
    tangent: &mut [f64],
    mut seen: impl FnMut(usize, ColumnCalls<'_>),
) -> Result<(), (usize, Fault)> {
    let n = driver.ncomp();
    if let Some(stencil) = scheme.stencil() {
        let mut steps = [0.0; 4];
        let ns = stencil.steps(h, &mut steps);
        let mut stresses = [0.0f64; 6 * 4 * 6];
        if ns > 0 {
            if let Some(end) = driver.sweep_real(caller, &steps[..ns], &mut stresses[..n * ns * n]) {
                let full = if end.result.is_ok() { n } else { call_at(&steps[..ns], end.calls - 1).0 };
                let base = &driver.base.stress[..n];
                for j in 0..full {
                    let calls = &stresses[j * ns * n..(j + 1) * ns * n];
                    stencil.combine(h, base, calls, &mut tangent[j * n..(j + 1) * n]);
                    // The column's last call with a step above 0 and with one below (the
                    // central difference's two).
                    let last = |positive: bool| {
                        (0..ns)
                            .rev()
                            .find(|&i| (steps[i] > 0.0) == positive)
                            .map_or(&[][..], |i| &calls[i * n..(i + 1) * n])
                    };
                    seen(j, ColumnCalls { base, plus: last(true), minus: last(false), cplx: &[] });
                }
                return ended(end, full);
            }
        }
    } else if scheme == Scheme::ComplexStep {
        let mut stresses = [Complex64::new(0.0, 0.0); 36];
        if let Some(end) = driver.sweep_complex(caller, h, &mut stresses[..n * n]) {
            let full = if end.result.is_ok() { n } else { end.calls - 1 };
            for j in 0..full {
                let s = &stresses[j * n..(j + 1) * n];
                for (c, s) in tangent[j * n..(j + 1) * n].iter_mut().zip(s) {
                    *c = s.im / h;
                }
                seen(j, ColumnCalls { base: &driver.base.stress, plus: &[], minus: &[], cplx: s });
            }
            return ended(end, full);
        }
    }
    // Call by call.
    for j in 0..n {
        scheme
            .column(driver, caller, Direction::Strain(j), h, &mut tangent[j * n..(j + 1) * n])
            .map_err(|f| (j, f))?;
        let d = &*driver;
        seen(
            j,
            ColumnCalls {
                base: &d.base.stress,
                plus: &d.plus.stress,
                minus: &d.minus.stress,
                cplx: &d.cplx.stress,
            },
        );
    }
    Ok(())
}

/// A sweep's end as the columns' result: the fault of column `full` (the first not made).
fn ended(end: SweepEnd, full: usize) -> Result<(), (usize, Fault)> {
    end.result.map_err(|f| (full, f))
}
