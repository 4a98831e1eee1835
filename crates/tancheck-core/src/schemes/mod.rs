//! Derivative schemes: one file per scheme.
//!
//! Each scheme fills one column of the numerical tangent, ∂σ/∂(Δε_j) or ∂σ/∂(ΔT), from
//! perturbed calls made by the [`Driver`], and offers the same formula on a scalar function
//! (`derivative`) so it can be checked against published values.

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

    /// Fill `col` with the derivative of the stress along `dir`, step `h`.
    pub fn column(
        self,
        driver: &mut Driver,
        caller: &mut Caller<'_>,
        dir: Direction,
        h: f64,
        col: &mut [f64],
    ) -> Result<(), Fault> {
        match self {
            Scheme::Forward => forward::column(driver, caller, dir, h, col),
            Scheme::Backward => backward::column(driver, caller, dir, h, col),
            Scheme::Central => central::column(driver, caller, dir, h, col),
            Scheme::Central4 => central4::column(driver, caller, dir, h, col),
            Scheme::Richardson => richardson::column(driver, caller, dir, h, col),
            Scheme::ComplexStep => complex_step::column(driver, caller, dir, h, col),
        }
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
