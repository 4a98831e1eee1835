//! Fourth-order central difference:
//! (−f(x + 2h) + 8 f(x + h) − 8 f(x − h) + f(x − 2h)) / 12h, truncation error O(h⁴).

use super::Stencil;

/// ∂σ/∂dir from calls at ±h and ±2h.
pub const STENCIL: Stencil =
    Stencil { points: &[(2.0, -1.0), (1.0, 8.0), (-1.0, -8.0), (-2.0, 1.0)], div: 12.0 };

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function: the error falls like h⁴, so halving
    // h from 1e-2 divides it by about 16 (Taylor expansion).
    #[test]
    fn fourth_order_on_the_published_test_function() {
        let d = |h| STENCIL.derivative(f, X, h);
        let (e1, e2) = (rel_err(d(1e-2)), rel_err(d(5e-3)));
        let order = (e1 / e2).log2();
        assert!((order - 4.0).abs() < 0.2, "order {order}, errors {e1:e} {e2:e}");
        check_levels(d, &[(1e-3, Below(1e-10))]);
    }
}
