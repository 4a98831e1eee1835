//! Backward difference: (f(x) − f(x − h)) / h, truncation error O(h). With the forward
//! difference it shows a kink: the two one-sided derivatives disagree at a branch boundary.

use super::Stencil;

/// ∂σ/∂dir from the base call and one call at −h.
pub const STENCIL: Stencil = Stencil { points: &[(0.0, 1.0), (-1.0, -1.0)], div: 1.0 };

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function. The backward difference has the
    // forward difference's leading error with the opposite sign: −f''/(2f')·h (Taylor
    // expansion; f'' = 9.463073681596603, REFERENCES.md, derived).
    #[test]
    fn error_level_on_the_published_test_function() {
        let d = STENCIL.derivative(f, X, 1e-4);
        let predicted = -9.463073681596603 / 2.0 * 1e-4;
        assert!(((d - DF) / predicted - 1.0).abs() < 0.01, "{d}");
    }
}
