//! Forward difference: (f(x + h) − f(x)) / h, truncation error O(h).

use super::Stencil;

/// ∂σ/∂dir from one call at +h and the base call.
pub const STENCIL: Stencil = Stencil { points: &[(1.0, 1.0), (0.0, -1.0)], div: 1.0 };

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function; error levels in IEEE double from
    // REFERENCES.md (derived): 1.17e-4 at h = 1e-4, 2.45e-8 at h = 1e-8.
    #[test]
    fn error_levels_on_the_published_test_function() {
        // At h = 1e-8 rounding is as large as truncation, so the digits depend on how f is
        // evaluated (we see 2.6e-9, the reference 2.45e-8); the level is the check: at most
        // about √ε_mach (Nocedal & Wright 2006, §8.1).
        check_levels(|h| STENCIL.derivative(f, X, h), &[(1e-4, Near(1.17e-4, 0.02)), (1e-8, Below(5e-8))]);
        // Truncation alone predicts f''/(2f')·h (f'' = 9.463073681596603, REFERENCES.md).
        let e4 = rel_err(STENCIL.derivative(f, X, 1e-4));
        assert!((e4 / (9.463073681596603 / (2.0 * DF) * 1e-4) - 1.0).abs() < 0.01);
    }
}
