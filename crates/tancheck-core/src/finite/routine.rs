//! What a finite-strain routine is to tancheck: one call's inputs and outputs, the routine's
//! declared measures, and the rotation increment of a declared corotational frame.
//!
//! The deformation gradients are column-major 3×3 (entry (i, j) at `i + 3 j`), stresses
//! symmetric 6-vectors in the order 11, 22, 33, 23, 13, 12, and the tangent column-major
//! `n × n` (n = 6, or 9 for dP/dF) in the routine's declared [`TangentMeasure`]; the column of
//! a shear direction holds tensor components (see `measure`).

use num_complex::Complex64;
use serde::{Deserialize, Serialize};

use super::mat3::{self, Mat3};
use super::measure::{StressMeasure, TangentMeasure};
use crate::routine::{status_fault, Fault, Outcome};
use crate::scalar::Scalar;

/// The corotational frame whose rotation increment a routine receives.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Frame {
    /// No frame: the rotation input is the identity.
    None,
    /// The Jaumann (spin) frame over the increment: ΔR = (I − ½Δω)⁻¹(I + ½Δω), Δω the skew
    /// part of the displacement-increment gradient on the midpoint configuration
    /// (Hughes & Winget 1980, IJNME 15:1862–1867; from memory).
    Jaumann,
    /// The frame of the polar rotation: ΔR = R₁ R₀ᵀ with F = R U.
    GreenNaghdi,
}

impl Frame {
    pub const ALL: [Frame; 3] = [Frame::None, Frame::Jaumann, Frame::GreenNaghdi];

    pub fn name(self) -> &'static str {
        match self {
            Frame::None => "none",
            Frame::Jaumann => "jaumann",
            Frame::GreenNaghdi => "green-naghdi",
        }
    }

    pub fn parse(s: &str) -> Option<Frame> {
        Self::ALL.into_iter().find(|m| m.name() == s)
    }

    /// The rotation increment from F₀ to F₁.
    pub fn increment<S: Scalar>(self, f0: &Mat3<S>, f1: &Mat3<S>) -> Mat3<S> {
        match self {
            Frame::None => mat3::identity(),
            Frame::GreenNaghdi => mat3::mul(&mat3::rotation(f1), &mat3::transpose(&mat3::rotation(f0))),
            Frame::Jaumann => {
                let mid = mat3::scale(&mat3::add(f0, f1), S::cst(0.5));
                let g = mat3::mul(&mat3::sub(f1, f0), &mat3::inverse(&mid));
                let w = mat3::scale(&mat3::sub(&g, &mat3::transpose(&g)), S::cst(0.25));
                let i = mat3::identity::<S>();
                mat3::mul(&mat3::inverse(&mat3::sub(&i, &w)), &mat3::add(&i, &w))
            }
        }
    }
}

/// The read-only inputs of one finite-strain call.
#[derive(Clone, Copy, Debug)]
pub struct FiniteInput<'a, S> {
    pub properties: &'a [S],
    /// Deformation gradient at the start of the increment, column-major.
    pub f0: &'a [S; 9],
    /// Deformation gradient at the end of the increment, column-major.
    pub f1: &'a [S; 9],
    /// Rotation increment of the declared frame, column-major (identity without a frame).
    pub rotation: &'a [S; 9],
    /// Temperature at the start, and its increment.
    pub temperature: [S; 2],
    /// Stress at the start, in the declared stress measure.
    pub stress0: &'a [S; 6],
    pub state0: &'a [S],
    /// Time at the start, and the time increment.
    pub time: [f64; 2],
    /// Increment number along the path, from 1.
    pub increment: i32,
}

/// The outputs of one finite-strain call; the caller fills them with NaN first.
#[derive(Debug)]
pub struct FiniteOutput<'a, S> {
    pub stress: &'a mut [S; 6],
    pub state: &'a mut [S],
    /// Column-major n × n in the declared tangent measure.
    pub tangent: &'a mut [S],
    /// Stored and dissipated energy density at the end of the increment.
    pub energy: &'a mut [S; 2],
    pub outcome: &'a mut Outcome,
}

/// Sizes and declared measures of a finite-strain routine.
#[derive(Clone, Debug)]
pub struct FiniteInfo {
    pub name: String,
    pub stress: StressMeasure,
    pub tangent: TangentMeasure,
    pub frame: Frame,
    pub nstate: usize,
    pub nproperties: usize,
}

/// A finite-strain stress update that returns its tangent.
pub trait FiniteRoutine {
    fn info(&self) -> &FiniteInfo;
    /// One call; implementations must not allocate.
    fn call(&mut self, input: &FiniteInput<'_, f64>, output: &mut FiniteOutput<'_, f64>)
        -> Result<(), Fault>;
    /// Whether [`FiniteRoutine::call_complex`] works.
    fn has_complex(&self) -> bool {
        false
    }
    /// The complex-step twin.
    fn call_complex(
        &mut self,
        _input: &FiniteInput<'_, Complex64>,
        _output: &mut FiniteOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        Err(Fault::Unsupported("the routine has no complex-step twin".into()))
    }
}

/// A finite-strain model written once over [`Scalar`]; wrap it in [`FiniteModelRoutine`].
pub trait FiniteModel {
    fn info(&self) -> &FiniteInfo;
    fn evaluate<S: Scalar>(
        &self,
        input: &FiniteInput<'_, S>,
        output: &mut FiniteOutput<'_, S>,
    ) -> Result<(), Fault>;
}

/// A [`FiniteModel`] as a [`FiniteRoutine`] with its twin.
#[derive(Clone, Debug)]
pub struct FiniteModelRoutine<M>(pub M);

impl<M: FiniteModel> FiniteRoutine for FiniteModelRoutine<M> {
    fn info(&self) -> &FiniteInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.0.evaluate(input, output)?;
        status_fault(output.outcome)
    }
    fn has_complex(&self) -> bool {
        true
    }
    fn call_complex(
        &mut self,
        input: &FiniteInput<'_, Complex64>,
        output: &mut FiniteOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.0.evaluate(input, output)?;
        status_fault(output.outcome)
    }
}

/// Fill the outputs with `nan` and reset the outcome.
pub fn prefill<S: Copy>(o: &mut FiniteOutput<'_, S>, nan: S) {
    o.stress.fill(nan);
    o.state.fill(nan);
    o.tangent.fill(nan);
    o.energy[0] = nan;
    o.energy[1] = nan;
    *o.outcome = Outcome::default();
}
