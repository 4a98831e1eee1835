//! Central difference: (f(x + h) − f(x − h)) / 2h, truncation error O(h²).

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

/// Column of ∂σ/∂dir from calls at +h and −h.
pub fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<(), Fault> {
    driver.perturbed_call(caller, dir, h)?;
    driver.perturbed_call(caller, dir, -h)?;
    for (i, c) in col.iter_mut().enumerate() {
        *c = (driver.plus.stress[i] - driver.minus.stress[i]) / (2.0 * h);
    }
    Ok(())
}

/// The central difference of a scalar function.
pub fn derivative(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    (f(x + h) - f(x - h)) / (2.0 * h)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function; error levels from REFERENCES.md
    // (derived): 1.32e-8 at h = 1e-4, 1.39e-10 at h = 1e-6, 5.4e-5 at h = 1e-12.
    #[test]
    fn error_levels_on_the_published_test_function() {
        let e4 = rel_err(derivative(f, X, 1e-4));
        assert!((e4 / 1.32e-8 - 1.0).abs() < 0.02, "h=1e-4: {e4:e}");
        let e6 = rel_err(derivative(f, X, 1e-6));
        assert!(e6 > 1e-11 && e6 < 1e-9, "h=1e-6: {e6:e}");
        let e12 = rel_err(derivative(f, X, 1e-12));
        assert!(e12 > 5e-6 && e12 < 5e-4, "h=1e-12: {e12:e}");
    }
}
