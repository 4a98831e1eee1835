//! Forward difference: (f(x + h) − f(x)) / h, truncation error O(h).

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

/// Column of ∂σ/∂dir from the base call and one call at +h.
pub fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<(), Fault> {
    driver.perturbed_call(caller, dir, h)?;
    for (i, c) in col.iter_mut().enumerate() {
        *c = (driver.plus.stress[i] - driver.base.stress[i]) / h;
    }
    Ok(())
}

/// The forward difference of a scalar function.
pub fn derivative(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    (f(x + h) - f(x)) / h
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function; error levels in IEEE double from
    // REFERENCES.md (derived): 1.17e-4 at h = 1e-4, 2.45e-8 at h = 1e-8.
    #[test]
    fn error_levels_on_the_published_test_function() {
        let e4 = rel_err(derivative(f, X, 1e-4));
        assert!((e4 / 1.17e-4 - 1.0).abs() < 0.02, "h=1e-4: {e4:e}");
        let e8 = rel_err(derivative(f, X, 1e-8));
        // At h = 1e-8 rounding is as large as truncation, so the digits depend on how f is
        // evaluated (we see 2.6e-9, the reference 2.45e-8); the level is the check: at most
        // about √ε_mach (Nocedal & Wright 2006, §8.1).
        assert!(e8 < 5e-8, "h=1e-8: {e8:e}");
        // Truncation alone predicts f''/(2f')·h (f'' = 9.463073681596603, REFERENCES.md).
        assert!((e4 / (9.463073681596603 / (2.0 * DF) * 1e-4) - 1.0).abs() < 0.01);
    }
}
