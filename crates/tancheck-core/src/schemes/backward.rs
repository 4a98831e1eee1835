//! Backward difference: (f(x) − f(x − h)) / h, truncation error O(h). With the forward
//! difference it shows a kink: the two one-sided derivatives disagree at a branch boundary.

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

/// Column of ∂σ/∂dir from the base call and one call at −h.
pub fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<(), Fault> {
    driver.perturbed_call(caller, dir, -h)?;
    for (i, c) in col.iter_mut().enumerate() {
        *c = (driver.base.stress[i] - driver.minus.stress[i]) / h;
    }
    Ok(())
}

/// The backward difference of a scalar function.
pub fn derivative(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    (f(x) - f(x - h)) / h
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function. The backward difference has the
    // forward difference's leading error with the opposite sign: −f''/(2f')·h (Taylor
    // expansion; f'' = 9.463073681596603, REFERENCES.md, derived).
    #[test]
    fn error_level_on_the_published_test_function() {
        let d = derivative(f, X, 1e-4);
        let predicted = -9.463073681596603 / 2.0 * 1e-4;
        assert!(((d - DF) / predicted - 1.0).abs() < 0.01, "{d}");
    }
}
