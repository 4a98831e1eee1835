//! Fourth-order central difference:
//! (−f(x + 2h) + 8 f(x + h) − 8 f(x − h) + f(x − 2h)) / 12h, truncation error O(h⁴).

use crate::driver::{Direction, Driver};
use crate::routine::{Caller, Fault};

const STENCIL: [(f64, f64); 4] = [(2.0, -1.0), (1.0, 8.0), (-1.0, -8.0), (-2.0, 1.0)];

/// Column of ∂σ/∂dir from calls at ±h and ±2h.
pub fn column(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    dir: Direction,
    h: f64,
    col: &mut [f64],
) -> Result<(), Fault> {
    col.fill(0.0);
    for (k, w) in STENCIL {
        driver.perturbed_call(caller, dir, k * h)?;
        let out = if k > 0.0 { &driver.plus.stress } else { &driver.minus.stress };
        for (c, s) in col.iter_mut().zip(out) {
            *c += w * s;
        }
    }
    for c in col.iter_mut() {
        *c /= 12.0 * h;
    }
    Ok(())
}

/// The fourth-order central difference of a scalar function.
pub fn derivative(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    STENCIL.iter().map(|&(k, w)| w * f(x + k * h)).sum::<f64>() / (12.0 * h)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function: the error falls like h⁴, so halving
    // h from 1e-2 divides it by about 16 (Taylor expansion).
    #[test]
    fn fourth_order_on_the_published_test_function() {
        let e1 = rel_err(derivative(f, X, 1e-2));
        let e2 = rel_err(derivative(f, X, 5e-3));
        let order = (e1 / e2).log2();
        assert!((order - 4.0).abs() < 0.2, "order {order}, errors {e1:e} {e2:e}");
        assert!(rel_err(derivative(f, X, 1e-3)) < 1e-10);
    }
}
