//! Complex step: Im f(x + ih) / h (Squire & Trapp 1998, SIAM Review 40(1):110–112; Martins,
//! Sturdza & Alonso 2003). No difference of nearby values is taken, so the step can be tiny
//! and the derivative is exact to rounding for complex-step-safe code.

use num_complex::Complex64;

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

/// Column of ∂σ/∂dir from one call of the complex twin.
pub fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<(), Fault> {
    driver.complex_call(caller, dir, h)?;
    for (i, c) in col.iter_mut().enumerate() {
        *c = driver.cplx.stress[i].im / h;
    }
    Ok(())
}

/// The complex-step derivative of a scalar function.
pub fn derivative(f: impl Fn(Complex64) -> Complex64, x: f64, h: f64) -> f64 {
    f(Complex64::new(x, h)).im / h
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003): relative error 1.32e-8 at h = 1e-4 and at most
    // 2.2e-16 for 1e-8 ≥ h ≥ 1e-307, failing (1.7e-5) at the subnormal h = 1e-320
    // (REFERENCES.md, derived).
    #[test]
    fn error_levels_on_the_published_test_function() {
        let e4 = rel_err(derivative(fc, X, 1e-4));
        assert!((e4 / 1.32e-8 - 1.0).abs() < 0.02, "h=1e-4: {e4:e}");
        for k in [8, 20, 50, 100, 200, 300, 307] {
            let h = 10f64.powi(-k);
            let e = rel_err(derivative(fc, X, h));
            assert!(e <= 2.3e-16, "h=1e-{k}: {e:e}");
        }
        let e = rel_err(derivative(fc, X, 1e-320));
        assert!(e > 1e-6, "h=1e-320 should fail: {e:e}");
    }
}
