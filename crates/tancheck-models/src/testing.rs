//! Test support: one call of a model with owned arrays, in any scalar type, and the
//! derivative of the stress by forward-mode dual numbers (num-dual) or the complex step (both
//! from tancheck-testkit).

use tancheck_core::driver::Outputs;
use tancheck_core::{CallInput, Convention, Fault, Model, Scalar};

/// The real inputs of one call.
#[derive(Clone, Debug)]
pub(crate) struct Point {
    pub props: Vec<f64>,
    pub strain: Vec<f64>,
    pub dstrain: Vec<f64>,
    pub stress0: Vec<f64>,
    pub state0: Vec<f64>,
}

impl Point {
    /// Zero strain, increment, stress and state.
    pub fn new(props: &[f64], ncomp: usize, nstate: usize) -> Point {
        Point {
            props: props.to_vec(),
            strain: vec![0.0; ncomp],
            dstrain: vec![0.0; ncomp],
            stress0: vec![0.0; ncomp],
            state0: vec![0.0; nstate],
        }
    }
    pub fn strain(mut self, v: &[f64]) -> Point {
        self.strain = v.to_vec();
        self
    }
    pub fn dstrain(mut self, v: &[f64]) -> Point {
        self.dstrain = v.to_vec();
        self
    }
    pub fn stress0(mut self, v: &[f64]) -> Point {
        self.stress0 = v.to_vec();
        self
    }
    pub fn state0(mut self, v: &[f64]) -> Point {
        self.state0 = v.to_vec();
        self
    }
}

/// The outputs of one call (core's owned output buffers).
pub(crate) type Out<S> = Outputs<S>;

/// One call in scalar type `S`, outputs pre-filled with NaN as the checker does. The sizes
/// of the outputs follow the model's info and the length of `strain`.
pub(crate) fn run_scalar<S: Scalar, M: Model>(
    m: &M,
    props: &[S],
    strain: &[S],
    dstrain: &[S],
    stress0: &[S],
    state0: &[S],
) -> Result<Out<S>, Fault> {
    let mut out = Outputs::new(strain.len(), m.info().nstate, S::cst(f64::NAN));
    let input = CallInput {
        props,
        strain,
        dstrain,
        temp: [S::cst(293.15), S::zero()],
        stress0,
        state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    m.evaluate(&input, &mut out.view())?;
    Ok(out)
}

/// One real call.
pub(crate) fn run<M: Model>(m: &M, p: &Point) -> Result<Out<f64>, Fault> {
    run_scalar(m, &p.props, &p.strain, &p.dstrain, &p.stress0, &p.state0)
}

/// The call as tancheck-testkit's (293.15 K, as [`run_scalar`]).
fn testkit_call(p: &Point) -> tancheck_testkit::call::Call {
    tancheck_testkit::call::Call::new(&p.props, p.strain.len(), p.state0.len())
        .strain(&p.strain)
        .dstrain(&p.dstrain)
        .stress0(&p.stress0)
        .state0(&p.state0)
        .temp(293.15, 0.0)
}

/// ∂σ/∂Δε by num-dual: one call per column j with Δεⱼ carrying the unit dual part.
/// Column-major like a routine tangent. Also returns the branch of each call.
pub(crate) fn dual_tangent<M: Model>(m: &M, p: &Point) -> (Vec<f64>, Vec<i32>) {
    tancheck_testkit::call::dual_tangent(m, &testkit_call(p))
}

/// ∂σ/∂Δε by the complex step Im σ(Δε + i h eⱼ)/h (Squire & Trapp 1998).
pub(crate) fn complex_tangent<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    tancheck_testkit::call::model_complex_tangent(m, &testkit_call(p), h)
}

/// Relative errors of a tangent against a reference, in Mandel form (so the Frobenius norm
/// is that of the fourth-order tensor): the whole matrix, and the worst column.
pub(crate) fn mandel_errors(conv: &Convention, got: &[f64], reference: &[f64]) -> (f64, f64) {
    let n = conv.ncomp();
    let mut a = got.to_vec();
    let mut b = reference.to_vec();
    conv.tangent_to_mandel(&mut a);
    conv.tangent_to_mandel(&mut b);
    let norm = |v: &mut dyn Iterator<Item = f64>| v.map(|x| x * x).sum::<f64>().sqrt();
    let whole = norm(&mut a.iter().zip(&b).map(|(x, y)| x - y)) / norm(&mut b.iter().copied());
    let mut worst: f64 = 0.0;
    for j in 0..n {
        let col = j * n..(j + 1) * n;
        let d = norm(&mut a[col.clone()].iter().zip(&b[col.clone()]).map(|(x, y)| x - y));
        let r = norm(&mut b[col].iter().copied());
        worst = worst.max(d / r);
    }
    (whole, worst)
}
