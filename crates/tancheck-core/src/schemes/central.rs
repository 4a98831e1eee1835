//! Central difference: (f(x + h) − f(x − h)) / 2h, truncation error O(h²).

use super::Stencil;

/// ∂σ/∂dir from calls at +h and −h.
pub const STENCIL: Stencil = Stencil { points: &[(1.0, 1.0), (-1.0, -1.0)], div: 2.0 };

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // Martins, Sturdza & Alonso (2003) test function; error levels from REFERENCES.md
    // (derived): 1.32e-8 at h = 1e-4, 1.39e-10 at h = 1e-6, 5.4e-5 at h = 1e-12.
    #[test]
    fn error_levels_on_the_published_test_function() {
        check_levels(
            |h| STENCIL.derivative(f, X, h),
            &[(1e-4, Near(1.32e-8, 0.02)), (1e-6, Between(1e-11, 1e-9)), (1e-12, Between(5e-6, 5e-4))],
        );
    }
}
