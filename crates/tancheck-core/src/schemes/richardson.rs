//! Richardson extrapolation of the central difference: R = [4 D(h/2) − D(h)] / 3 removes
//! the h² term of D (the central difference), leaving O(h⁴).

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

/// Column of ∂σ/∂dir from central differences at h and h/2.
pub fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<(), Fault> {
    col.fill(0.0);
    for (step, w) in [(h, -1.0 / 3.0), (0.5 * h, 4.0 / 3.0)] {
        driver.perturbed_call(caller, dir, step)?;
        driver.perturbed_call(caller, dir, -step)?;
        for (i, c) in col.iter_mut().enumerate() {
            *c += w * (driver.plus.stress[i] - driver.minus.stress[i]) / (2.0 * step);
        }
    }
    Ok(())
}

/// Richardson extrapolation of the central difference of a scalar function.
pub fn derivative(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    let d = |h: f64| (f(x + h) - f(x - h)) / (2.0 * h);
    (4.0 * d(0.5 * h) - d(h)) / 3.0
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // REFERENCES.md (derived): on the Martins et al. (2003) test function, h = 1e-2 gives
    // an error of 3.2e-9 and h = 1e-3 gives 5.7e-13.
    #[test]
    fn error_levels_on_the_published_test_function() {
        let e2 = rel_err(derivative(f, X, 1e-2));
        assert!((e2 / 3.2e-9 - 1.0).abs() < 0.05, "h=1e-2: {e2:e}");
        let e3 = rel_err(derivative(f, X, 1e-3));
        assert!(e3 < 2e-12, "h=1e-3: {e3:e}");
    }
}
