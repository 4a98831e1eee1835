//! Richardson extrapolation of the central difference: R = [4 D(h/2) − D(h)] / 3 removes
//! the h² term of D (the central difference), leaving O(h⁴).

use super::Samples;
use crate::routine::Fault;

/// The central differences combined: (step in units of h, weight).
const PARTS: [(f64, f64); 2] = [(1.0, -1.0 / 3.0), (0.5, 4.0 / 3.0)];

/// Column of ∂σ/∂dir from central differences at h and h/2.
pub(crate) fn column(at: &mut Samples<'_, '_>, h: f64, col: &mut [f64]) -> Result<(), Fault> {
    col.fill(0.0);
    for (k, w) in PARTS {
        let step = k * h;
        at.call(step)?;
        at.call(-step)?;
        let d = at.driver();
        for ((c, p), m) in col.iter_mut().zip(&d.plus.stress).zip(&d.minus.stress) {
            *c += w * (p - m) / (2.0 * step);
        }
    }
    Ok(())
}

/// Richardson extrapolation of the central difference of a scalar function.
pub fn derivative(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    PARTS.iter().map(|&(k, w)| w * super::central::STENCIL.derivative(&f, x, k * h)).sum()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schemes::test_function::*;

    // REFERENCES.md (derived): on the Martins et al. (2003) test function, h = 1e-2 gives
    // an error of 3.2e-9 and h = 1e-3 gives 5.7e-13.
    #[test]
    fn error_levels_on_the_published_test_function() {
        check_levels(|h| derivative(f, X, h), &[(1e-2, Near(3.2e-9, 0.05)), (1e-3, Below(2e-12))]);
    }
}
