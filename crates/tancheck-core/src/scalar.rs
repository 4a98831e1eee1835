//! The number type a reference model is written over.
//!
//! A model written once over [`Scalar`] runs with `f64` (the ordinary stress update),
//! with [`Complex64`] (complex-step derivatives) and with [`Dual64`] (exact forward-mode
//! derivatives from num-dual, an independent check of analytic tangents).
//!
//! Every operation here is complex-step safe in the sense of Martins, Sturdza & Alonso (2003),
//! ACM TOMS 29(3): comparisons, `abs`, `max` and `min` look at real parts only, and no
//! operation conjugates.

use num_complex::Complex64;
use num_dual::{Dual64, DualNum};
use std::fmt::Debug;
use std::ops::{Add, AddAssign, Div, DivAssign, Mul, MulAssign, Neg, Sub, SubAssign};

/// A real-like number: `f64`, or a number that carries a derivative along with its value.
pub trait Scalar:
    Copy
    + Debug
    + PartialEq
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
    + AddAssign
    + SubAssign
    + MulAssign
    + DivAssign
    + Add<f64, Output = Self>
    + Sub<f64, Output = Self>
    + Mul<f64, Output = Self>
    + Div<f64, Output = Self>
    + Send
    + Sync
    + 'static
{
    /// A constant.
    fn cst(x: f64) -> Self;
    /// The real part (the value with its derivative part dropped).
    fn re(self) -> f64;
    fn sqrt(self) -> Self;
    fn exp(self) -> Self;
    fn ln(self) -> Self;
    /// `self` raised to a real power.
    fn powf(self, p: f64) -> Self;

    #[inline]
    fn zero() -> Self {
        Self::cst(0.0)
    }
    #[inline]
    fn one() -> Self {
        Self::cst(1.0)
    }
    /// Absolute value decided on the real part.
    #[inline]
    fn abs(self) -> Self {
        if self.re() < 0.0 {
            -self
        } else {
            self
        }
    }
    /// Larger of two by real part.
    #[inline]
    fn max(self, other: Self) -> Self {
        if self.re() >= other.re() {
            self
        } else {
            other
        }
    }
    /// Smaller of two by real part.
    #[inline]
    fn min(self, other: Self) -> Self {
        if self.re() <= other.re() {
            self
        } else {
            other
        }
    }
    /// `sqrt` that returns exactly zero (with a zero derivative part) at zero, where the
    /// derivative of the square root is unbounded.
    #[inline]
    fn sqrt_or_zero(self) -> Self {
        if self.re() <= 0.0 {
            Self::zero()
        } else {
            self.sqrt()
        }
    }
}

impl Scalar for f64 {
    #[inline]
    fn cst(x: f64) -> Self {
        x
    }
    #[inline]
    fn re(self) -> f64 {
        self
    }
    #[inline]
    fn sqrt(self) -> Self {
        f64::sqrt(self)
    }
    #[inline]
    fn exp(self) -> Self {
        f64::exp(self)
    }
    #[inline]
    fn ln(self) -> Self {
        f64::ln(self)
    }
    #[inline]
    fn powf(self, p: f64) -> Self {
        f64::powf(self, p)
    }
}

impl Scalar for Complex64 {
    #[inline]
    fn cst(x: f64) -> Self {
        Complex64::new(x, 0.0)
    }
    #[inline]
    fn re(self) -> f64 {
        self.re
    }
    #[inline]
    fn sqrt(self) -> Self {
        // sqrt(a + ib) = sqrt(a) + i b / (2 sqrt(a)) to first order in b: the analytic
        // continuation, exact for the complex step with tiny b and a > 0.
        let r = self.re.sqrt();
        Complex64::new(r, self.im / (2.0 * r))
    }
    #[inline]
    fn exp(self) -> Self {
        let e = self.re.exp();
        Complex64::new(e, e * self.im)
    }
    #[inline]
    fn ln(self) -> Self {
        Complex64::new(self.re.ln(), self.im / self.re)
    }
    #[inline]
    fn powf(self, p: f64) -> Self {
        let v = self.re.powf(p);
        Complex64::new(v, p * self.re.powf(p - 1.0) * self.im)
    }
}

impl Scalar for Dual64 {
    #[inline]
    fn cst(x: f64) -> Self {
        Dual64::from_re(x)
    }
    #[inline]
    fn re(self) -> f64 {
        self.re
    }
    #[inline]
    fn sqrt(self) -> Self {
        DualNum::sqrt(&self)
    }
    #[inline]
    fn exp(self) -> Self {
        DualNum::exp(&self)
    }
    #[inline]
    fn ln(self) -> Self {
        DualNum::ln(&self)
    }
    #[inline]
    fn powf(self, p: f64) -> Self {
        DualNum::powf(&self, p)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The complex-step elementary functions keep the first-order term exactly:
    // Im f(x + ih)/h = f'(x) for f = sqrt, exp, ln, x^p (Squire & Trapp 1998).
    #[test]
    fn complex_elementary_functions_carry_first_derivatives() {
        let x = 1.7_f64;
        let h = 1e-30;
        let z = Complex64::new(x, h);
        assert!((Scalar::sqrt(z).im / h - 0.5 / x.sqrt()).abs() < 1e-15);
        assert!((Scalar::exp(z).im / h - x.exp()).abs() < 1e-14);
        assert!((Scalar::ln(z).im / h - 1.0 / x).abs() < 1e-15);
        assert!((Scalar::powf(z, 0.26).im / h - 0.26 * x.powf(-0.74)).abs() < 1e-15);
    }

    #[test]
    fn abs_max_min_decide_on_real_part() {
        let a = Complex64::new(-2.0, 1e-20);
        assert_eq!(Scalar::abs(a), Complex64::new(2.0, -1e-20));
        let b = Complex64::new(1.0, 5.0);
        assert_eq!(Scalar::max(a, b), b);
        assert_eq!(Scalar::min(a, b), a);
        assert_eq!(Scalar::sqrt_or_zero(Complex64::new(0.0, 1e-20)), Complex64::new(0.0, 0.0));
    }

    #[test]
    fn dual_matches_complex_on_a_composite_function() {
        fn f<S: Scalar>(x: S) -> S {
            (x * x + 1.0).sqrt() * x.exp() / (x.ln() + 2.0)
        }
        let d = f(Dual64::new(1.3, 1.0));
        let c = f(Complex64::new(1.3, 1e-30));
        assert!((d.eps - c.im / 1e-30).abs() < 1e-13 * d.eps.abs());
        assert_eq!(d.re, f(1.3));
    }
}
