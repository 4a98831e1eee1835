//! Derivative schemes: one file per scheme.
//!
//! Each scheme fills one column of the numerical tangent, ∂σ/∂(Δε_j) or ∂σ/∂(ΔT), from
//! perturbed calls made by the [`Driver`], and offers the same formula on a scalar function
//! (`derivative`) so it can be checked against published values.

use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

use crate::driver::{Direction, Driver};
use crate::error::CoreError;
use crate::routine::{Caller, Fault};

pub mod backward;
pub mod central;
pub mod central4;
pub mod complex_step;
pub mod forward;
pub mod richardson;

/// A derivative scheme.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Scheme {
    /// (f(x + h) − f(x)) / h: error O(h).
    Forward,
    /// (f(x) − f(x − h)) / h: error O(h).
    Backward,
    /// (f(x + h) − f(x − h)) / 2h: error O(h²).
    Central,
    /// Five-point central difference: error O(h⁴).
    Central4,
    /// Richardson extrapolation of the central difference at h and h/2: error O(h⁴).
    Richardson,
    /// Im f(x + ih) / h: error O(h²) with no subtractive cancellation (Squire & Trapp 1998).
    ComplexStep,
}

impl Scheme {
    pub const ALL: [Scheme; 6] = [
        Scheme::Forward,
        Scheme::Backward,
        Scheme::Central,
        Scheme::Central4,
        Scheme::Richardson,
        Scheme::ComplexStep,
    ];

    /// Order of the truncation error in h.
    pub fn order(self) -> f64 {
        match self {
            Scheme::Forward | Scheme::Backward => 1.0,
            Scheme::Central | Scheme::ComplexStep => 2.0,
            Scheme::Central4 | Scheme::Richardson => 4.0,
        }
    }

    /// Whether the scheme needs the complex twin.
    pub fn needs_twin(self) -> bool {
        self == Scheme::ComplexStep
    }

    pub fn name(self) -> &'static str {
        match self {
            Scheme::Forward => "forward",
            Scheme::Backward => "backward",
            Scheme::Central => "central",
            Scheme::Central4 => "central4",
            Scheme::Richardson => "richardson",
            Scheme::ComplexStep => "complex-step",
        }
    }

    /// The difference formula of a scheme that is one table of samples (all but Richardson
    /// and the complex step).
    pub(crate) fn stencil(self) -> Option<&'static Stencil> {
        match self {
            Scheme::Forward => Some(&forward::STENCIL),
            Scheme::Backward => Some(&backward::STENCIL),
            Scheme::Central => Some(&central::STENCIL),
            Scheme::Central4 => Some(&central4::STENCIL),
            Scheme::Richardson | Scheme::ComplexStep => None,
        }
    }

    /// Fill `col` with the derivative of the stress along `dir`, step `h`.
    pub fn column(
        self,
        driver: &mut Driver,
        caller: &mut Caller<'_>,
        dir: Direction,
        h: f64,
        col: &mut [f64],
    ) -> Result<(), Fault> {
        let mut at = Samples { driver, caller, dir };
        match self {
            Scheme::Forward => forward::STENCIL.column(&mut at, h, col),
            Scheme::Backward => backward::STENCIL.column(&mut at, h, col),
            Scheme::Central => central::STENCIL.column(&mut at, h, col),
            Scheme::Central4 => central4::STENCIL.column(&mut at, h, col),
            Scheme::Richardson => richardson::column(&mut at, h, col),
            Scheme::ComplexStep => complex_step::column(&mut at, h, col),
        }
    }
}

/// The calls one column is made of, along one direction: every scheme samples through this one
/// value instead of passing the driver, the caller and the direction on by hand.
pub(crate) struct Samples<'a, 'l> {
    driver: &'a mut Driver,
    caller: &'a mut Caller<'l>,
    dir: Direction,
}

impl Samples<'_, '_> {
    /// Call with the increment moved by `step` along the direction (results in the driver's
    /// `plus` for `step > 0`, else `minus`).
    pub(crate) fn call(&mut self, step: f64) -> Result<(), Fault> {
        self.driver.perturbed_call(self.caller, self.dir, step)
    }

    /// The stresses at `step`: the base call's for 0 (already made), else a new call's.
    fn stress(&mut self, step: f64) -> Result<&[f64], Fault> {
        if step == 0.0 {
            return Ok(&self.driver.base.stress);
        }
        self.call(step)?;
        Ok(if step > 0.0 { &self.driver.plus.stress } else { &self.driver.minus.stress })
    }

    /// The stresses of the complex twin with imaginary part `h` along the direction.
    pub(crate) fn complex_stress(&mut self, h: f64) -> Result<&[Complex64], Fault> {
        self.driver.complex_call(self.caller, self.dir, h)?;
        Ok(&self.driver.cplx.stress)
    }

    /// The outputs of the calls made so far.
    pub(crate) fn driver(&self) -> &Driver {
        self.driver
    }
}

/// A difference formula Σ w·f(x + k·h) / (div·h) as a table of (k, w), so that the checker's
/// `column` and the scalar `derivative` the published test function checks are one formula.
pub struct Stencil {
    /// The sample points (k, w), in call order; k = 0 is the base call.
    pub points: &'static [(f64, f64)],
    /// The denominator in units of h.
    pub div: f64,
}

impl Stencil {
    /// Fill `col` with the derivative along the samples' direction, step `h`.
    pub(crate) fn column(&self, at: &mut Samples<'_, '_>, h: f64, col: &mut [f64]) -> Result<(), Fault> {
        // The calls in the stencil's order, then the one formula a sweep's columns use too.
        let n = col.len();
        let mut steps = [0.0; 4];
        let ns = self.steps(h, &mut steps);
        let mut calls = [0.0; 4 * 6];
        for (i, &step) in steps[..ns].iter().enumerate() {
            calls[i * n..(i + 1) * n].copy_from_slice(&at.stress(step)?[..n]);
        }
        self.combine(h, &at.driver().base.stress, &calls[..ns * n], col);
        Ok(())
    }

    /// The steps of one column's calls at step `h` besides the base call, in call order (k·h
    /// where it is not 0), into `steps`; returns how many.
    pub(crate) fn steps(&self, h: f64, steps: &mut [f64; 4]) -> usize {
        let mut count = 0;
        // A step of 0 is the base call, as in `Samples::stress`.
        for &(k, _) in self.points.iter().filter(|(k, _)| k * h != 0.0) {
            steps[count] = k * h;
            count += 1;
        }
        count
    }

    /// [`Stencil::column`] from stresses already made: `base` the base call's, `calls` those of
    /// the column's other calls one after the other (in the order of [`Stencil::steps`], each
    /// `col.len()` long). The same arithmetic in the same order, so the column is the same to
    /// the bit.
    pub(crate) fn combine(&self, h: f64, base: &[f64], calls: &[f64], col: &mut [f64]) {
        let n = col.len();
        let mut call = 0;
        for (p, &(k, w)) in self.points.iter().enumerate() {
            let s = if k * h == 0.0 {
                &base[..n]
            } else {
                call += 1;
                &calls[(call - 1) * n..call * n]
            };
            // The first point assigns, so that w = ±1 leaves the difference exact.
            if p == 0 {
                for (c, s) in col.iter_mut().zip(s) {
                    *c = w * s;
                }
            } else {
                for (c, s) in col.iter_mut().zip(s) {
                    *c += w * s;
                }
            }
        }
        let div = self.div * h;
        for c in col.iter_mut() {
            *c /= div;
        }
    }

    /// The same formula on a scalar function.
    pub fn derivative(&self, f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
        self.points.iter().map(|&(k, w)| w * f(x + k * h)).sum::<f64>() / (self.div * h)
    }
}

impl fmt::Display for Scheme {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Scheme {
    type Err = CoreError;
    fn from_str(s: &str) -> Result<Self, CoreError> {
        Scheme::ALL.into_iter().find(|x| x.name() == s).ok_or_else(|| CoreError::UnknownScheme(s.into()))
    }
}

#[cfg(test)]
pub(crate) mod test_function {
    //! The test function of Martins, Sturdza & Alonso (2003), ACM TOMS 29(3):245–262:
    //! f(x) = eˣ / √(sin³x + cos³x), with f'(1.5) = 4.053427893898621 (REFERENCES.md:
    //! derived; also read in a secondary copy quoting the paper).
    use crate::scalar::Scalar;
    use num_complex::Complex64;

    pub const X: f64 = 1.5;
    pub const DF: f64 = 4.053427893898621;

    pub fn f(x: f64) -> f64 {
        x.exp() / (x.sin().powi(3) + x.cos().powi(3)).sqrt()
    }

    /// The same in complex arithmetic (full complex functions, as the paper does).
    pub fn fc(z: Complex64) -> Complex64 {
        z.exp() / (z.sin().powi(3) + z.cos().powi(3)).sqrt()
    }

    pub fn rel_err(d: f64) -> f64 {
        (d - DF).abs() / DF
    }

    /// What a relative error must be at one step.
    #[derive(Clone, Copy, Debug)]
    pub enum Level {
        /// Within a fraction `tol` of a published error level.
        Near(f64, f64),
        /// Strictly between two bounds.
        Between(f64, f64),
        /// Strictly below a bound.
        Below(f64),
        /// At most a bound.
        AtMost(f64),
        /// Strictly above a bound (the scheme should fail there).
        Above(f64),
    }
    pub use Level::*;

    /// Checks a scheme's relative error at each step against its level: one loop for every
    /// scheme's table of published levels, naming the step that failed.
    pub fn check_levels(derivative: impl Fn(f64) -> f64, levels: &[(f64, Level)]) {
        for &(h, level) in levels {
            let e = rel_err(derivative(h));
            let ok = match level {
                Near(at, tol) => (e / at - 1.0).abs() < tol,
                Between(lo, hi) => e > lo && e < hi,
                Below(hi) => e < hi,
                AtMost(hi) => e <= hi,
                Above(lo) => e > lo,
            };
            assert!(ok, "h={h:e}: relative error {e:e}, wanted {level:?}");
        }
    }

    #[test]
    fn value_matches_reference() {
        // f(1.5) = 4.497780053946162 (REFERENCES.md, derived).
        assert!((f(X) - 4.497780053946162).abs() < 1e-14);
        // Our first-order complex sqrt agrees with the full complex function for tiny steps.
        let z = Complex64::new(X, 1e-30);
        let s = z.sin().powi(3) + z.cos().powi(3);
        assert!((Scalar::sqrt(s).im - s.sqrt().im).abs() < 1e-40);
    }
}
