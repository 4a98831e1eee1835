//! One point of a model test: the real inputs of a call as owned vectors that the model tests
//! draw, perturb and replay, with the calls they make of it (the outputs, num-dual and the
//! complex step).

use tancheck_core::driver::Outputs;
use tancheck_core::Model;

use crate::call::{model_call, model_complex_tangent, Call};

/// The real inputs of one call of a model, written once for the model tests (each had its own).
#[derive(Clone, Debug)]
pub struct Point {
    pub props: Vec<f64>,
    pub strain: Vec<f64>,
    pub dstrain: Vec<f64>,
    pub state0: Vec<f64>,
    /// Temperature at the start and its increment.
    pub temp: [f64; 2],
    /// The time increment.
    pub dtime: f64,
}

impl Default for Point {
    /// No properties, strain or state; 20 °C, no temperature increment, a unit time increment.
    fn default() -> Point {
        Point {
            props: Vec::new(),
            strain: Vec::new(),
            dstrain: Vec::new(),
            state0: Vec::new(),
            temp: [20.0, 0.0],
            dtime: 1.0,
        }
    }
}

impl Point {
    /// The call (stress0 zero: the total-form models do not read it).
    pub fn call(&self) -> Call {
        Call::new(&self.props, self.strain.len(), self.state0.len())
            .strain(&self.strain)
            .dstrain(&self.dstrain)
            .state0(&self.state0)
            .temp(self.temp[0], self.temp[1])
            .dtime(self.dtime)
    }
}

/// One real call of `m` at `p` (its outputs, whatever the status).
#[track_caller]
pub fn run<M: Model>(m: &M, p: &Point) -> Outputs<f64> {
    model_call(m, &p.call(), &p.dstrain, p.temp).expect("sizes match")
}

/// ∂σ/∂Δε of `m` at `p` by num-dual (column-major), and the branch of every dual call.
#[track_caller]
pub fn dual_tangent<M: Model>(m: &M, p: &Point) -> (Vec<f64>, Vec<i32>) {
    crate::call::dual_tangent(m, &p.call())
}

/// ∂σ/∂Δε of `m` at `p` by the complex step with step `h` (Squire & Trapp 1998).
#[track_caller]
pub fn complex_tangent<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    model_complex_tangent(m, &p.call(), h)
}
