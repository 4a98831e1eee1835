//! Complex step: Im f(x + ih) / h (Squire & Trapp 1998, SIAM Review 40(1):110–112; Martins,
//! Sturdza & Alonso 2003). No difference of nearby values is taken, so the step can be tiny
//! and the derivative is exact to rounding for complex-step-safe code.

use num_complex::Complex64;

use super::Samples;
use crate::routine::Fault;

/// Column of ∂σ/∂dir from one call of the complex twin.
pub(crate) fn column(at: &mut Samples<'_, '_>, h: f64, col: &mut [f64]) -> Result<(), Fault> {
    for (c, s) in col.iter_mut().zip(at.complex_stress(h)?) {
        *c = s.im / h;
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
        let tiny = [8, 20, 50, 100, 200, 300, 307].map(|k| (10f64.powi(-k), AtMost(2.3e-16)));
        let levels = [(1e-4, Near(1.32e-8, 0.02))].into_iter().chain(tiny).chain([(1e-320, Above(1e-6))]);
        check_levels(|h| derivative(fc, X, h), &levels.collect::<Vec<_>>());
    }
}
