//! One call of a routine with owned buffers, and the derivatives tests compare a returned
//! tangent with: the complex step through a routine's twin (Squire & Trapp 1998) and forward
//! dual numbers through a model (num-dual, an independent library).

use num_complex::Complex64;
use num_dual::Dual64;
use tancheck_core::driver::Outputs;
use tancheck_core::{CallInput, Fault, Model, Outcome, Routine, Scalar};

/// The inputs of one call in scalar type `S`, owned: [`Call`] (real) or [`ComplexCall`] (the
/// twin's).
#[derive(Clone, Debug, PartialEq)]
pub struct Inputs<S> {
    pub props: Vec<S>,
    pub strain: Vec<S>,
    pub dstrain: Vec<S>,
    pub stress0: Vec<S>,
    pub state0: Vec<S>,
    /// Temperature at the start and its increment.
    pub temp: [S; 2],
    /// Time at the start and the time increment.
    pub time: [f64; 2],
}

/// The real inputs of one call. [`Call::new`] starts from zero strain, increment, stress
/// and state at 20 °C with a unit time increment.
pub type Call = Inputs<f64>;

/// The complex inputs of one call (the twin's).
pub type ComplexCall = Inputs<Complex64>;

impl<S: Copy> Inputs<S> {
    /// The call's inputs (increment 1).
    pub fn input(&self, want_tangent: bool) -> CallInput<'_, S> {
        CallInput {
            props: &self.props,
            strain: &self.strain,
            dstrain: &self.dstrain,
            temp: self.temp,
            stress0: &self.stress0,
            state0: &self.state0,
            time: self.time,
            increment: 1,
            want_tangent,
        }
    }
}

impl Call {
    pub fn new(props: &[f64], ncomp: usize, nstate: usize) -> Call {
        Call {
            props: props.to_vec(),
            strain: vec![0.0; ncomp],
            dstrain: vec![0.0; ncomp],
            stress0: vec![0.0; ncomp],
            state0: vec![0.0; nstate],
            temp: [20.0, 0.0],
            time: [0.0, 1.0],
        }
    }
    pub fn strain(mut self, v: &[f64]) -> Call {
        self.strain = v.to_vec();
        self
    }
    pub fn dstrain(mut self, v: &[f64]) -> Call {
        self.dstrain = v.to_vec();
        self
    }
    pub fn stress0(mut self, v: &[f64]) -> Call {
        self.stress0 = v.to_vec();
        self
    }
    pub fn state0(mut self, v: &[f64]) -> Call {
        self.state0 = v.to_vec();
        self
    }
    pub fn temp(mut self, start: f64, increment: f64) -> Call {
        self.temp = [start, increment];
        self
    }
    pub fn dtime(mut self, dt: f64) -> Call {
        self.time[1] = dt;
        self
    }

    /// The inputs of the same call as complex numbers with zero imaginary parts.
    pub fn complex(&self) -> ComplexCall {
        self.lifted(&lift(&self.dstrain), self.temp.map(Complex64::cst))
    }

    /// The same call in scalar type `S`, with the strain and temperature increments given.
    pub fn lifted<S: Scalar>(&self, dstrain: &[S], temp: [S; 2]) -> Inputs<S> {
        Inputs {
            props: lift(&self.props),
            strain: lift(&self.strain),
            dstrain: dstrain.to_vec(),
            stress0: lift(&self.stress0),
            state0: lift(&self.state0),
            temp,
            time: self.time,
        }
    }
}

/// One real call into NaN-filled buffers; the fault when the routine fails.
pub fn try_call(r: &mut dyn Routine, c: &Call) -> Result<Outputs<f64>, Fault> {
    let mut o = Outputs::new(c.strain.len(), c.state0.len(), f64::NAN);
    r.call(&c.input(true), &mut o.view())?;
    Ok(o)
}

/// One real call that must succeed.
#[track_caller]
pub fn call(r: &mut dyn Routine, c: &Call) -> Outputs<f64> {
    try_call(r, c).unwrap_or_else(|f| panic!("{}: {f}", r.info().name))
}

/// What a complex-step column perturbs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Column {
    /// The strain increment's component j.
    Strain(usize),
    /// The temperature increment.
    Temperature,
}

/// One complex call through the routine's twin, outputs NaN-filled.
pub fn try_call_complex(r: &mut dyn Routine, c: &ComplexCall) -> Result<Outputs<Complex64>, Fault> {
    let mut o = Outputs::new(c.strain.len(), c.state0.len(), Complex64::new(f64::NAN, 0.0));
    let twin =
        r.complex().ok_or_else(|| Fault::Unsupported("the routine has no complex-step twin".into()))?;
    twin.call_complex(&c.input(false), &mut o.view())?;
    Ok(o)
}

/// The complex-step derivative Im σ(x + i h e)/h of the stress along `column`, through the
/// routine's twin (Squire & Trapp 1998).
#[track_caller]
pub fn complex_column(r: &mut dyn Routine, c: &Call, column: Column, h: f64) -> Vec<f64> {
    let mut z = c.complex();
    match column {
        Column::Strain(j) => z.dstrain[j].im = h,
        Column::Temperature => z.temp[1].im = h,
    }
    let o = try_call_complex(r, &z).unwrap_or_else(|f| panic!("{} (complex): {f}", r.info().name));
    o.stress.iter().map(|s| s.im / h).collect()
}

/// ‖a − b‖ / ‖b‖ (Euclidean), or ‖a − b‖ when b = 0.
pub fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    if n == 0.0 {
        d
    } else {
        d / n
    }
}

/// Panics unless two calls agree: the same status, branch and `provides` bits, and stress,
/// state, tangent (and ∂σ/∂ΔT and the energies where provided) within `tol` relative
/// ([`rel`]; energies relative to the larger of the two).
#[track_caller]
pub fn assert_outputs_agree(got: &Outputs<f64>, want: &Outputs<f64>, tol: f64, what: &str) {
    use tancheck_core::routine::provides;
    let (g, w) = (&got.outcome, &want.outcome);
    assert_eq!(g.status, w.status, "{what} status: {} vs {}", g.message_text(), w.message_text());
    assert_eq!(g.branch, w.branch, "{what} branch");
    assert_eq!(g.provides, w.provides, "{what} provides");
    assert!(rel(&got.stress, &want.stress) <= tol, "{what} stress {:?} vs {:?}", got.stress, want.stress);
    assert!(rel(&got.state, &want.state) <= tol, "{what} state {:?} vs {:?}", got.state, want.state);
    assert!(rel(&got.tangent, &want.tangent) <= tol, "{what} tangent");
    if w.provides & provides::DSTRESS_DTEMP != 0 {
        assert!(rel(&got.dstress_dtemp, &want.dstress_dtemp) <= tol, "{what} ∂σ/∂ΔT");
    }
    if w.provides & provides::ENERGY != 0 {
        let scale = want.energy[0].abs().max(want.energy[1].abs()).max(1e-12);
        for k in 0..2 {
            assert!((got.energy[k] - want.energy[k]).abs() <= tol * scale, "{what} energy {k}");
        }
    }
}

fn lift<S: Scalar>(v: &[f64]) -> Vec<S> {
    v.iter().map(|&x| S::cst(x)).collect()
}

/// One call of a model in scalar type `S` (every input lifted from `c`, `dstrain` given),
/// outputs NaN-filled as the checker does.
pub fn model_call<S: Scalar, M: Model>(
    m: &M,
    c: &Call,
    dstrain: &[S],
    temp: [S; 2],
) -> Result<Outputs<S>, Fault> {
    let mut o = Outputs::new(c.strain.len(), c.state0.len(), S::cst(f64::NAN));
    m.evaluate(&c.lifted(dstrain, temp).input(true), &mut o.view())?;
    Ok(o)
}

/// ∂σ/∂Δε of a model by num-dual: one call per column j with Δεⱼ carrying the unit dual
/// part. Column-major like a routine tangent; also the branch of each call.
#[track_caller]
pub fn dual_tangent<M: Model>(m: &M, c: &Call) -> (Vec<f64>, Vec<i32>) {
    let n = c.strain.len();
    let mut t = vec![0.0; n * n];
    let mut branches = Vec::with_capacity(n);
    let temp = [Dual64::new(c.temp[0], 0.0), Dual64::new(c.temp[1], 0.0)];
    for j in 0..n {
        let de: Vec<Dual64> = c
            .dstrain
            .iter()
            .enumerate()
            .map(|(k, &x)| Dual64::new(x, if k == j { 1.0 } else { 0.0 }))
            .collect();
        let out = model_call(m, c, &de, temp).expect("dual call");
        assert_eq!(out.outcome.status, 0, "dual call failed: {}", out.outcome.message_text());
        for i in 0..n {
            t[i + j * n] = out.stress[i].eps;
        }
        branches.push(out.outcome.branch);
    }
    (t, branches)
}

/// ∂σ/∂ΔT of a model by num-dual: one call with the temperature increment carrying the unit
/// dual part (the strain increment real).
#[track_caller]
pub fn dual_dtemp<M: Model>(m: &M, c: &Call) -> Vec<f64> {
    let de: Vec<Dual64> = c.dstrain.iter().map(|&x| Dual64::from_re(x)).collect();
    let temp = [Dual64::from_re(c.temp[0]), Dual64::new(c.temp[1], 1.0)];
    let out = model_call(m, c, &de, temp).expect("dual call");
    assert_eq!(out.outcome.status, 0, "dual call failed: {}", out.outcome.message_text());
    out.stress.iter().map(|s| s.eps).collect()
}

/// ∂σ/∂Δε of a model by the complex step Im σ(Δε + i h eⱼ)/h (Squire & Trapp 1998), one call
/// per column; column-major.
#[track_caller]
pub fn model_complex_tangent<M: Model>(m: &M, c: &Call, h: f64) -> Vec<f64> {
    let n = c.strain.len();
    let mut t = vec![0.0; n * n];
    let temp = [Complex64::new(c.temp[0], 0.0), Complex64::new(c.temp[1], 0.0)];
    for j in 0..n {
        let de: Vec<Complex64> = c
            .dstrain
            .iter()
            .enumerate()
            .map(|(k, &x)| Complex64::new(x, if k == j { h } else { 0.0 }))
            .collect();
        let out = model_call(m, c, &de, temp).expect("complex call");
        for i in 0..n {
            t[i + j * n] = out.stress[i].im / h;
        }
    }
    t
}

/// One increment of a 6-component model in uniaxial stress from (`strain`, `state`): the
/// lateral increments Δε22, Δε33 (starting at −ν Δε11 with ν = `props[1]`) are solved for
/// σ22 = σ33 = 0 by Newton with the model's own tangent; shears stay zero. The increment
/// found and the outputs of the converged call; panics when a call fails or Newton does not
/// converge in 40 steps.
#[track_caller]
pub fn uniaxial_stress_step<M: Model>(
    m: &M,
    props: &[f64],
    strain: &[f64; 6],
    state: &[f64],
    d11: f64,
) -> ([f64; 6], Outputs<f64>) {
    use crate::tangent::at;
    let nu = props[1];
    let mut de = [d11, -nu * d11, -nu * d11, 0.0, 0.0, 0.0];
    let c = Call::new(props, 6, state.len()).strain(strain).state0(state);
    for _ in 0..40 {
        let out = model_call(m, &c, &de, [20.0, 0.0]).expect("the sizes match");
        let o = &out.outcome;
        assert_eq!(o.status, 0, "{} at {strain:?} + {de:?}", o.message_text());
        let (r2, r3) = (out.stress[1], out.stress[2]);
        let t = &out.tangent;
        let (a, b, c, d) = (at(t, 6, 1, 1), at(t, 6, 1, 2), at(t, 6, 2, 1), at(t, 6, 2, 2));
        let det = a * d - b * c;
        de[1] -= (d * r2 - b * r3) / det;
        de[2] -= (a * r3 - c * r2) / det;
        if r2.abs().max(r3.abs()) <= 1e-12 * out.stress[0].abs() {
            return (de, out);
        }
    }
    panic!("the uniaxial-stress Newton did not converge");
}

/// ∂σ/∂ΔT of a model by the complex step Im σ(ΔT + i h)/h (Squire & Trapp 1998), one call.
#[track_caller]
pub fn model_complex_dtemp<M: Model>(m: &M, c: &Call, h: f64) -> Vec<f64> {
    let de: Vec<Complex64> = c.dstrain.iter().map(|&x| Complex64::new(x, 0.0)).collect();
    let temp = [Complex64::new(c.temp[0], 0.0), Complex64::new(c.temp[1], h)];
    let out = model_call(m, c, &de, temp).expect("complex call");
    out.stress.iter().map(|s| s.im / h).collect()
}

/// Allocations made by `calls` evaluations of model `m` on `c` in scalar type `S` (every
/// buffer made beforehand, so only the calls count), and the outcome of the last call. Needs
/// [`counting_allocator!`](crate::counting_allocator) in the test binary.
pub fn model_allocations<S: Scalar, M: Model>(m: &M, c: &Call, calls: usize) -> (usize, Outcome) {
    let inputs = c.lifted::<S>(&lift(&c.dstrain), c.temp.map(S::cst));
    let input = inputs.input(true);
    let mut o = Outputs::new(c.strain.len(), c.state0.len(), S::cst(f64::NAN));
    let before = crate::alloc::allocations();
    for _ in 0..calls {
        m.evaluate(&input, &mut o.view()).expect("the sizes match");
    }
    (crate::alloc::allocations() - before, o.outcome)
}

/// Call `inner` with the leading `m` state variables of `input` and `output` (a test routine
/// that wraps a model and keeps state variables of its own after the model's); the output's
/// state variables past `m` are returned for the wrapper to write.
pub fn call_with_leading_states<'o>(
    inner: &mut dyn Routine,
    m: usize,
    input: &CallInput<'_, f64>,
    output: &'o mut tancheck_core::CallOutput<'_, f64>,
) -> Result<&'o mut [f64], Fault> {
    let inner_input = CallInput { state0: &input.state0[..m], ..*input };
    let (state, rest) = output.state.split_at_mut(m);
    let mut out = tancheck_core::CallOutput {
        stress: &mut *output.stress,
        state,
        tangent: &mut *output.tangent,
        dstress_dtemp: &mut *output.dstress_dtemp,
        energy: &mut *output.energy,
        outcome: &mut *output.outcome,
    };
    inner.call(&inner_input, &mut out)?;
    Ok(rest)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rel_is_relative_to_the_second() {
        assert_eq!(rel(&[1.0, 1.0], &[1.0, 1.0]), 0.0);
        assert!((rel(&[2.0, 0.0], &[1.0, 0.0]) - 1.0).abs() < 1e-15);
        let c = Call::new(&[1.0], 2, 1).dstrain(&[1e-3, 0.0]).temp(300.0, 5.0).dtime(0.5);
        let z = c.complex();
        assert_eq!(z.temp[1], Complex64::new(5.0, 0.0));
        assert_eq!(c.input(true).time, [0.0, 0.5]);
    }
}
