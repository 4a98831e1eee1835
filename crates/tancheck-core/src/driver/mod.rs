//! The material-point driver: holds the start state of an increment and every buffer a
//! check needs, makes the base call and the perturbed calls, and advances along a path.
//!
//! All buffers are allocated once, when the driver is made. The increment is kept twice more,
//! as the scratch copy a perturbed call moves and as the complex copy the twin reads; both are
//! written whenever the increment changes, so that a perturbed call moves one entry, calls the
//! routine with the same read-only start state and puts the entry back. Outputs go to scratch
//! buffers. Nothing is allocated or copied per call.
//!
//! Data flow: this file (state, buffers, one call at a time) → `sweep` (a scheme's perturbed
//! calls of every strain column in one go, where the routine can make them so).

use num_complex::Complex64;

mod sweep;

use crate::error::CoreError;
use crate::routine::{CallInput, CallOutput, Caller, Fault, Outcome, RoutineInfo};

/// The state of a material point at the start of an increment, in the routine's convention.
#[derive(Clone, Debug, PartialEq)]
pub struct PointState {
    pub strain: Vec<f64>,
    pub stress: Vec<f64>,
    pub state: Vec<f64>,
    pub temp: f64,
    pub time: f64,
}

impl PointState {
    /// A virgin point: zero strain, stress and state.
    pub fn zero(info: &RoutineInfo, temp: f64) -> PointState {
        let n = info.convention.ncomp();
        PointState {
            strain: vec![0.0; n],
            stress: vec![0.0; n],
            state: vec![0.0; info.nstate],
            temp,
            time: 0.0,
        }
    }
}

/// Which input a perturbation moves.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Direction {
    /// Component j of the strain increment.
    Strain(usize),
    /// The temperature increment.
    Temperature,
}

/// Outputs of one call.
#[derive(Clone, Debug)]
pub struct Outputs<S> {
    pub stress: Vec<S>,
    pub state: Vec<S>,
    pub tangent: Vec<S>,
    pub dstress_dtemp: Vec<S>,
    pub energy: [S; 2],
    pub outcome: Outcome,
}

impl<S: Copy> Outputs<S> {
    /// Buffers for a routine with `n` components and `nstate` state variables, filled with
    /// `fill` (NaN, so that unwritten entries show).
    pub fn new(n: usize, nstate: usize, fill: S) -> Self {
        Outputs {
            stress: vec![fill; n],
            state: vec![fill; nstate],
            tangent: vec![fill; n * n],
            dstress_dtemp: vec![fill; n],
            energy: [fill; 2],
            outcome: Outcome::default(),
        }
    }

    /// The buffers as the outputs of one call.
    pub fn view(&mut self) -> CallOutput<'_, S> {
        CallOutput {
            stress: &mut self.stress,
            state: &mut self.state,
            tangent: &mut self.tangent,
            dstress_dtemp: &mut self.dstress_dtemp,
            energy: &mut self.energy,
            outcome: &mut self.outcome,
        }
    }
}

/// Complex copies of the start state for the complex-step twin.
#[derive(Clone, Debug)]
struct ComplexInputs {
    props: Vec<Complex64>,
    strain: Vec<Complex64>,
    dstrain: Vec<Complex64>,
    stress0: Vec<Complex64>,
    state0: Vec<Complex64>,
}

/// The driver of one material point.
#[derive(Clone, Debug)]
pub struct Driver {
    n: usize,
    props: Vec<f64>,
    start: PointState,
    /// The start of the path it walks (initial-stiffness trial); None without a path before.
    origin: Option<Box<PointState>>,
    dstrain: Vec<f64>,
    /// The increment as set, before any rescaling.
    full_dstrain: Vec<f64>,
    dtemp: f64,
    dtime: f64,
    /// The temperature and time increments as set, before any rescaling.
    full_dtemp: f64,
    full_dtime: f64,
    increment: i32,
    /// Outputs of the base call (the unperturbed increment).
    pub base: Outputs<f64>,
    /// Outputs of the last `+h` perturbed call.
    pub plus: Outputs<f64>,
    /// Outputs of the last `−h` perturbed call.
    pub minus: Outputs<f64>,
    /// Outputs of the last complex call.
    pub cplx: Outputs<Complex64>,
    /// The increment as the perturbed calls pass it: equal to `dstrain` between calls.
    scratch_dstrain: Vec<f64>,
    /// Complex copies of the inputs; their `dstrain` equals `dstrain` (imaginary parts zero)
    /// between calls.
    complex_inputs: ComplexInputs,
}

impl Driver {
    /// A driver for `info`'s routine with the given properties and start state.
    pub fn new(info: &RoutineInfo, props: &[f64], start: PointState) -> Result<Driver, CoreError> {
        let n = info.convention.ncomp();
        if props.len() != info.nprop {
            return Err(CoreError::PropertyCount { given: props.len(), declared: info.nprop });
        }
        if start.strain.len() != n || start.stress.len() != n {
            return Err(CoreError::StartSize(n));
        }
        if start.state.len() != info.nstate {
            return Err(CoreError::StateCount { given: start.state.len(), declared: info.nstate });
        }
        let cz = Complex64::new(0.0, 0.0);
        Ok(Driver {
            n,
            props: props.to_vec(),
            dstrain: vec![0.0; n],
            full_dstrain: vec![0.0; n],
            dtemp: 0.0,
            full_dtemp: 0.0,
            dtime: 0.0,
            full_dtime: 0.0,
            increment: 0,
            base: Outputs::new(n, info.nstate, f64::NAN),
            plus: Outputs::new(n, info.nstate, f64::NAN),
            minus: Outputs::new(n, info.nstate, f64::NAN),
            cplx: Outputs::new(n, info.nstate, cz),
            scratch_dstrain: vec![0.0; n],
            complex_inputs: ComplexInputs {
                props: props.iter().map(|&p| Complex64::new(p, 0.0)).collect(),
                strain: vec![cz; n],
                dstrain: vec![cz; n],
                stress0: vec![cz; n],
                state0: vec![cz; info.nstate],
            },
            origin: Some(Box::new(start.clone())),
            start,
        })
    }

    pub fn ncomp(&self) -> usize {
        self.n
    }
    pub fn start(&self) -> &PointState {
        &self.start
    }
    /// The start of the path the driver walks, when it knows it (see [`Driver::set_origin`]).
    pub fn origin(&self) -> Option<&PointState> {
        self.origin.as_deref()
    }
    /// Say where the path the driver is on starts: a driver is made with its own start state
    /// as the origin, which a driver made at a later call (a case's) must replace, or clear.
    pub fn set_origin(&mut self, origin: Option<PointState>) {
        self.origin = origin.map(Box::new);
    }
    pub fn props(&self) -> &[f64] {
        &self.props
    }
    pub fn dstrain(&self) -> &[f64] {
        &self.dstrain
    }
    pub fn dtemp(&self) -> f64 {
        self.dtemp
    }
    pub fn dtime(&self) -> f64 {
        self.dtime
    }
    pub fn increment(&self) -> i32 {
        self.increment
    }

    /// Set the next increment (the start state stays).
    pub fn set_increment(&mut self, dstrain: &[f64], dtemp: f64, dtime: f64) {
        self.dstrain.copy_from_slice(dstrain);
        self.full_dstrain.copy_from_slice(dstrain);
        self.dstrain_changed();
        (self.dtemp, self.full_dtemp) = (dtemp, dtemp);
        (self.dtime, self.full_dtime) = (dtime, dtime);
        self.increment += 1;
        for i in 0..self.n {
            self.complex_inputs.strain[i] = Complex64::new(self.start.strain[i], 0.0);
            self.complex_inputs.stress0[i] = Complex64::new(self.start.stress[i], 0.0);
        }
        for (c, &s) in self.complex_inputs.state0.iter_mut().zip(&self.start.state) {
            *c = Complex64::new(s, 0.0);
        }
    }

    /// Give the increment set the number `k` (the calls' `increment`), for a probe that calls
    /// the same inputs under another number.
    pub(crate) fn set_count(&mut self, k: i32) {
        self.increment = k;
    }

    /// Replace the strain and temperature increments without counting a new increment (for
    /// probes that call around the current one; the base call must be made again).
    pub fn set_increment_keep_count(&mut self, dstrain: &[f64], dtemp: f64) {
        self.dstrain.copy_from_slice(dstrain);
        self.full_dstrain.copy_from_slice(dstrain);
        self.dstrain_changed();
        (self.dtemp, self.full_dtemp) = (dtemp, dtemp);
    }

    /// Replace the time increment (the start state stays; the base call must be made again).
    pub fn set_dtime_keep_count(&mut self, dtime: f64) {
        (self.dtime, self.full_dtime) = (dtime, dtime);
    }

    /// Replace the strain increment (the start state stays; the base call must be made again).
    pub fn set_dstrain(&mut self, dstrain: &[f64]) {
        self.dstrain.copy_from_slice(dstrain);
        self.full_dstrain.copy_from_slice(dstrain);
        self.dstrain_changed();
    }

    /// Scale the increment to `s` times the one set by [`Driver::set_increment`] (the start
    /// state stays): the strain and temperature increments by `s`, the time increment by
    /// |s| (a fraction of the increment at the same rates; a reversed one takes time too).
    /// `rescale(1.0)` restores it; the base call must be made again.
    pub fn rescale(&mut self, s: f64) {
        for (d, f) in self.dstrain.iter_mut().zip(&self.full_dstrain) {
            *d = s * f;
        }
        self.dtemp = s * self.full_dtemp;
        self.dtime = s.abs() * self.full_dtime;
        self.dstrain_changed();
    }

    /// The time increment to `t` times the one set (the base call must be made again).
    pub fn rescale_time(&mut self, t: f64) {
        self.dtime = t * self.full_dtime;
    }

    /// The increment changed: its scratch and complex copies follow (once per change, not per
    /// call).
    fn dstrain_changed(&mut self) {
        self.scratch_dstrain.copy_from_slice(&self.dstrain);
        for (c, &d) in self.complex_inputs.dstrain.iter_mut().zip(&self.dstrain) {
            *c = Complex64::new(d, 0.0);
        }
    }

    /// Scale of strain in this increment: max(|ε + Δε|∞, |Δε|∞, floor).
    pub fn strain_scale(&self, floor: f64) -> f64 {
        let mut s = floor;
        for i in 0..self.n {
            s = s.max((self.start.strain[i] + self.dstrain[i]).abs()).max(self.dstrain[i].abs());
        }
        s
    }

    /// Scale of temperature in this increment: max(|T|, |ΔT|, floor).
    pub fn temp_scale(&self, floor: f64) -> f64 {
        floor.max(self.start.temp.abs()).max(self.dtemp.abs())
    }

    /// The call with the unperturbed increment; results in `self.base`. Like the perturbed
    /// calls it gets the scratch copy of the increment (the routine works on it directly when
    /// the guards are off), so what a routine writes into its increment never reaches the
    /// increment as set, nor the copies the other calls of the increment get.
    pub fn base_call(&mut self, caller: &mut Caller<'_>) -> Result<(), Fault> {
        let input = CallInput {
            props: &self.props,
            strain: &self.start.strain,
            dstrain: &self.scratch_dstrain,
            temp: [self.start.temp, self.dtemp],
            stress0: &self.start.stress,
            state0: &self.start.state,
            time: [self.start.time, self.dtime],
            increment: self.increment,
            want_tangent: true,
        };
        let r = caller.call(&input, &mut self.base.view());
        self.restore_scratch();
        r
    }

    /// The scratch copy back to the increment as set when a call wrote into it: a bit
    /// comparison of its entries, a copy only then.
    #[inline]
    fn restore_scratch(&mut self) {
        let differ = self
            .scratch_dstrain
            .iter()
            .zip(&self.dstrain)
            .fold(0, |a, (x, y)| a | (x.to_bits() ^ y.to_bits()));
        if differ != 0 {
            self.scratch_dstrain.copy_from_slice(&self.dstrain);
        }
    }

    /// A real call with the increment moved by `h` along `dir`; results in `self.plus` when
    /// `h > 0`, else in `self.minus`.
    pub fn perturbed_call(&mut self, caller: &mut Caller<'_>, dir: Direction, h: f64) -> Result<(), Fault> {
        let mut dtemp = self.dtemp;
        match dir {
            Direction::Strain(j) => self.scratch_dstrain[j] = self.dstrain[j] + h,
            Direction::Temperature => dtemp += h,
        }
        let out = if h > 0.0 { &mut self.plus } else { &mut self.minus };
        let input = CallInput {
            props: &self.props,
            strain: &self.start.strain,
            dstrain: &self.scratch_dstrain,
            temp: [self.start.temp, dtemp],
            stress0: &self.start.stress,
            state0: &self.start.state,
            time: [self.start.time, self.dtime],
            increment: self.increment,
            want_tangent: false,
        };
        let r = caller.call(&input, &mut out.view());
        // Back to the increment as set, whatever the call did: the moved entry, and the whole
        // copy when the routine wrote into its read-only increment (it gets the copy itself
        // when the guards are off), so that no later call sees what it wrote.
        if let Direction::Strain(j) = dir {
            self.scratch_dstrain[j] = self.dstrain[j];
        }
        self.restore_scratch();
        r
    }

    /// A complex call with imaginary part `h` along `dir`; results in `self.cplx`.
    pub fn complex_call(&mut self, caller: &mut Caller<'_>, dir: Direction, h: f64) -> Result<(), Fault> {
        let mut dtemp = Complex64::new(self.dtemp, 0.0);
        match dir {
            Direction::Strain(j) => self.complex_inputs.dstrain[j].im = h,
            Direction::Temperature => dtemp.im = h,
        }
        let input = CallInput {
            props: &self.complex_inputs.props,
            strain: &self.complex_inputs.strain,
            dstrain: &self.complex_inputs.dstrain,
            temp: [Complex64::new(self.start.temp, 0.0), dtemp],
            stress0: &self.complex_inputs.stress0,
            state0: &self.complex_inputs.state0,
            time: [self.start.time, self.dtime],
            increment: self.increment,
            want_tangent: false,
        };
        let r = caller.call_complex(&input, &mut self.cplx.view());
        // Back to the increment as set, whatever the call did (as in `perturbed_call`).
        if let Direction::Strain(j) = dir {
            self.complex_inputs.dstrain[j].im = 0.0;
        }
        let differ = self
            .complex_inputs
            .dstrain
            .iter()
            .zip(&self.dstrain)
            .fold(0, |a, (c, x)| a | (c.re.to_bits() ^ x.to_bits()) | c.im.to_bits());
        if differ != 0 {
            for (c, &x) in self.complex_inputs.dstrain.iter_mut().zip(&self.dstrain) {
                *c = Complex64::new(x, 0.0);
            }
        }
        r
    }

    /// Take `other`'s start state and increment (the same routine and properties), without
    /// allocating; the outputs stay as they were.
    pub fn set_like(&mut self, other: &Driver) {
        debug_assert_eq!((self.n, self.start.state.len()), (other.n, other.start.state.len()));
        self.start.strain.copy_from_slice(&other.start.strain);
        self.start.stress.copy_from_slice(&other.start.stress);
        self.start.state.copy_from_slice(&other.start.state);
        self.start.temp = other.start.temp;
        self.start.time = other.start.time;
        self.dstrain.copy_from_slice(&other.dstrain);
        self.full_dstrain.copy_from_slice(&other.full_dstrain);
        self.scratch_dstrain.copy_from_slice(&other.scratch_dstrain);
        self.dtemp = other.dtemp;
        self.dtime = other.dtime;
        self.full_dtemp = other.full_dtemp;
        self.full_dtime = other.full_dtime;
        self.increment = other.increment;
        let (c, o) = (&mut self.complex_inputs, &other.complex_inputs);
        c.strain.copy_from_slice(&o.strain);
        c.dstrain.copy_from_slice(&o.dstrain);
        c.stress0.copy_from_slice(&o.stress0);
        c.state0.copy_from_slice(&o.state0);
    }

    /// Accept the base call: its end state becomes the next start state.
    pub fn advance(&mut self) {
        for i in 0..self.n {
            self.start.strain[i] += self.dstrain[i];
        }
        self.start.stress.copy_from_slice(&self.base.stress);
        self.start.state.copy_from_slice(&self.base.state);
        self.start.temp += self.dtemp;
        self.start.time += self.dtime;
    }
}

#[cfg(test)]
mod tests;
