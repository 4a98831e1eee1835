//! A routine presented in another component order and shear measure.
//!
//! [`Relabel`] wraps a routine and converts every call: strains and stresses are permuted
//! and rescaled into the inner routine's convention, outputs back. State variables are the
//! routine's own business and pass unchanged. It lets the checker be tested in every order
//! and shear measure with one reference implementation, and lets a user check a routine
//! whose convention differs from a model they compare it with.

use num_complex::Complex64;

use crate::convention::Convention;
use crate::error::CoreError;
use crate::routine::{CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};
use crate::scalar::Scalar;

struct Buffers<S> {
    strain: Vec<S>,
    dstrain: Vec<S>,
    stress0: Vec<S>,
    stress: Vec<S>,
    tangent: Vec<S>,
    dstress_dtemp: Vec<S>,
}

impl<S: Scalar> Buffers<S> {
    fn new(n: usize) -> Self {
        let z = S::zero();
        Buffers {
            strain: vec![z; n],
            dstrain: vec![z; n],
            stress0: vec![z; n],
            stress: vec![z; n],
            tangent: vec![z; n * n],
            dstress_dtemp: vec![z; n],
        }
    }
}

/// `inner` seen in the convention `outer` (same kind of point).
pub struct Relabel<R> {
    inner: R,
    info: RoutineInfo,
    /// Outer component i is inner component map[i].
    map: Vec<usize>,
    /// Outer strain component i times strain_scale[i] is the inner strain component map[i].
    strain_scale: Vec<f64>,
    real: Buffers<f64>,
    cplx: Buffers<Complex64>,
}

impl<R: Routine> Relabel<R> {
    pub fn new(inner: R, outer: Convention) -> Result<Relabel<R>, CoreError> {
        let ic = inner.info().convention.clone();
        if ic.kind() != outer.kind() {
            return Err(CoreError::OtherKind { inner: ic.kind(), outer: outer.kind() });
        }
        let n = ic.ncomp();
        let mut map = Vec::with_capacity(n);
        let mut strain_scale = Vec::with_capacity(n);
        for (i, c) in outer.order().iter().enumerate() {
            let m = ic.position(*c).expect("same kind, same components");
            map.push(m);
            strain_scale.push(outer.strain_factor(i) / ic.strain_factor(m));
        }
        let mut info = inner.info().clone();
        info.convention = outer;
        Ok(Relabel { inner, info, map, strain_scale, real: Buffers::new(n), cplx: Buffers::new(n) })
    }

    pub fn inner(&self) -> &R {
        &self.inner
    }
}

fn call_relabelled<S: Scalar>(
    map: &[usize],
    scale: &[f64],
    b: &mut Buffers<S>,
    input: &CallInput<'_, S>,
    output: &mut CallOutput<'_, S>,
    inner: impl FnOnce(&CallInput<'_, S>, &mut CallOutput<'_, S>) -> Result<(), Fault>,
) -> Result<(), Fault> {
    let n = map.len();
    for i in 0..n {
        b.strain[map[i]] = input.strain[i] * scale[i];
        b.dstrain[map[i]] = input.dstrain[i] * scale[i];
        b.stress0[map[i]] = input.stress0[i];
    }
    let inner_input = CallInput { strain: &b.strain, dstrain: &b.dstrain, stress0: &b.stress0, ..*input };
    let mut inner_output = CallOutput {
        stress: &mut b.stress,
        state: &mut *output.state,
        tangent: &mut b.tangent,
        dstress_dtemp: &mut b.dstress_dtemp,
        energy: &mut *output.energy,
        outcome: &mut *output.outcome,
    };
    let r = inner(&inner_input, &mut inner_output);
    for i in 0..n {
        output.stress[i] = b.stress[map[i]];
        output.dstress_dtemp[i] = b.dstress_dtemp[map[i]];
        for j in 0..n {
            // ∂σ_i/∂ε_j (outer) = ∂σ_map(i)/∂ε_map(j) (inner) · ∂ε_map(j)/∂ε_j.
            output.tangent[i + j * n] = b.tangent[map[i] + map[j] * n] * scale[j];
        }
    }
    r
}

impl<R: Routine> Routine for Relabel<R> {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        let inner = &mut self.inner;
        call_relabelled(&self.map, &self.strain_scale, &mut self.real, input, output, |i, o| inner.call(i, o))
    }

    crate::pass_on_to_inner!();
}

impl<R: Routine> ComplexRoutine for Relabel<R> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let twin = self.inner.complex().ok_or_else(|| Fault::Unsupported("no complex twin".into()))?;
        call_relabelled(&self.map, &self.strain_scale, &mut self.cplx, input, output, |i, o| {
            twin.call_complex(i, o)
        })
    }
}
