//! A derivative scheme's perturbed calls of every strain column in one go ([`Sweep`]), for a
//! routine that can make them with less around each call; the driver's buffers end as the
//! same calls made one by one would leave them.

use num_complex::Complex64;

use super::Driver;
use crate::routine::{CallInput, Caller, Sweep, SweepEnd};

impl Driver {
    /// The real calls of `steps` along every strain component, column after column: the
    /// outputs of a step above 0 in `plus`, of the others in `minus` (the last such call's
    /// each), every call's stress in `stresses` (n × steps × n entries). `None` when the
    /// routine makes its calls one by one: nothing was called.
    pub fn sweep_real(
        &mut self,
        caller: &mut Caller<'_>,
        steps: &[f64],
        stresses: &mut [f64],
    ) -> Option<SweepEnd> {
        let input = CallInput {
            props: &self.props,
            strain: &self.start.strain,
            dstrain: &self.dstrain,
            temp: [self.start.temp, self.dtemp],
            stress0: &self.start.stress,
            state0: &self.start.state,
            time: [self.start.time, self.dtime],
            increment: self.increment,
            want_tangent: false,
        };
        let (mut plus, mut minus) = (self.plus.view(), self.minus.view());
        caller.sweep_real(Sweep {
            input,
            kept: &self.dstrain,
            steps,
            ncols: self.n,
            output: &mut plus,
            output_neg: Some(&mut minus),
            stresses,
            counter: None,
        })
    }

    /// The complex calls with imaginary part `h` on every strain component in turn: the last
    /// one's outputs in `cplx`, every call's stress in `stresses` (n × n entries). `None` as in
    /// [`Driver::sweep_real`].
    pub fn sweep_complex(
        &mut self,
        caller: &mut Caller<'_>,
        h: f64,
        stresses: &mut [Complex64],
    ) -> Option<SweepEnd> {
        let c = &self.complex_inputs;
        let input = CallInput {
            props: &c.props,
            strain: &c.strain,
            dstrain: &c.dstrain,
            temp: [Complex64::new(self.start.temp, 0.0), Complex64::new(self.dtemp, 0.0)],
            stress0: &c.stress0,
            state0: &c.state0,
            time: [self.start.time, self.dtime],
            increment: self.increment,
            want_tangent: false,
        };
        let mut out = self.cplx.view();
        caller.sweep_complex(Sweep {
            input,
            kept: &self.dstrain,
            steps: std::slice::from_ref(&h),
            ncols: self.n,
            output: &mut out,
            output_neg: None,
            stresses,
            counter: None,
        })
    }
}
