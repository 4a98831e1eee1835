//! Reference block models (explicit dynamics, fortran-shim/include/tancheck_block.h), written
//! once over [`Scalar`]: each point is updated by the point model of this crate (the return
//! map is not rewritten), and the block adds what explicit solvers expect — the specific
//! internal energy by the trapezoid rule, the specific dissipation, the deleted flag and the
//! elastic response of the first call.
//!
//! - [`J2Block`]: J2 plasticity with linear kinematic (and isotropic) hardening, the block form
//!   of [`crate::J2`]; with a [`BlockFlaw`] one of the flawed zoo rows.
//! - [`JcBlock`]: Johnson–Cook plasticity (rate, thermal softening, adiabatic heating), damage
//!   initiation, progressive damage over the characteristic length and deletion, the block form
//!   of [`crate::JohnsonCook`]; with a [`JcBlockFlaw`] one of the flawed zoo rows.
//! - [`worked`]: the worked cases the tests and the selftest run these models on.
//!
//! Both are a [`PointBlock`] (a point model and a flaw); `block_model!` writes their
//! loop over the points once, and each updates one point (`At`).

/// `impl BlockModel` for a [`PointBlock`] whose inherent `point` updates one
/// point (`Ok(false)`: the call failed there, stop): the loop over the points written once for
/// every block model. With `$check`, the inherent `$check(input, output)` runs first (`false`:
/// the call failed as a whole).
macro_rules! block_model {
    ($model:ty $(, $check:ident)?) => {
        impl tancheck_core::block::BlockModel for $model {
            fn info(&self) -> &tancheck_core::block::BlockInfo {
                &self.info
            }

            fn evaluate<S: tancheck_core::Scalar>(
                &self,
                input: &tancheck_core::block::BlockInput<'_, S>,
                output: &mut tancheck_core::block::BlockOutput<'_, S>,
            ) -> Result<(), tancheck_core::Fault> {
                $(if !self.$check(input, output) {
                    return Ok(());
                })?
                let (n, ns) = (self.info.ncomp, self.info.nstate);
                for p in 0..input.npoints() {
                    let (c, s) = (p * n..(p + 1) * n, p * ns..(p + 1) * ns);
                    if !self.point($crate::block::At { input, output: &mut *output, p, c, s })? {
                        break;
                    }
                }
                Ok(())
            }
        }
    };
}

pub mod j2;
pub mod johnson_cook;
pub mod worked;

pub use j2::{BlockFlaw, J2Block};
pub use johnson_cook::{JcBlock, JcBlockFlaw};

use std::ops::Range;

use tancheck_core::block::{
    block_status, BlockInfo, BlockInput, BlockModelRoutine, BlockOutput, BlockRoutine,
};
use tancheck_core::{CallInput, CallOutput, Fault, Model, Outcome, PointKind, Scalar};

use crate::ModelError;

/// A block model over the point model `M` with the zoo flaw `F` of its row: the J2 and
/// Johnson–Cook blocks are both of this shape (the loop over the points: `block_model!`).
#[derive(Clone, Debug)]
pub struct PointBlock<M, F> {
    point: M,
    info: BlockInfo,
    flaw: F,
}

/// One point of a block call: the call's arrays, the point's index `p`, its stress components
/// `c` and its state entries `s` in them.
pub(crate) struct At<'a, 'i, 'o, S> {
    pub(crate) input: &'a BlockInput<'i, S>,
    pub(crate) output: &'a mut BlockOutput<'o, S>,
    pub(crate) p: usize,
    pub(crate) c: Range<usize>,
    pub(crate) s: Range<usize>,
}

/// Names of the block models, as [`by_name`] accepts them.
pub const NAMES: [&str; 14] = [
    J2Block::NAME,
    J2Block::NEIGHBOUR_NAME,
    J2Block::OLD_STRESS_ENERGY_NAME,
    J2Block::DISSIPATION_SIGN_NAME,
    J2Block::TOTAL_BACK_STRESS_NAME,
    J2Block::CORRECTOR_SIGN_NAME,
    J2Block::DOUBLE_CORRECTION_NAME,
    J2Block::MIDPOINT_NAME,
    JcBlock::NAME,
    JcBlock::REVIVED_NAME,
    JcBlock::UNGUARDED_RATE_NAME,
    JcBlock::WRONG_TEMPERATURE_NAME,
    JcBlock::DELETED_STRESS_NAME,
    JcBlock::UNCLIPPED_TEMPERATURE_NAME,
];

/// The block model called `name` for a kind of point, as a block routine with its twin; `None`
/// for a name that is no block model.
pub fn by_name(name: &str, kind: PointKind) -> Option<Result<Box<dyn BlockRoutine>, ModelError>> {
    if let Some(m) = J2Block::by_name(name, kind) {
        return Some(m.map(|m| Box::new(BlockModelRoutine(m)) as Box<dyn BlockRoutine>));
    }
    if let Some(m) = JcBlock::by_name(name, kind) {
        return Some(m.map(|m| Box::new(BlockModelRoutine(m)) as Box<dyn BlockRoutine>));
    }
    None
}

/// stress = stress_start + C Δε with isotropic C(E, ν), per point: the elastic response of the
/// first call (engineering shear; ncomp 6 or 4).
pub(crate) fn elastic_response<S: Scalar>(e: S, nu: S, stress_start: &[S], de: &[S], stress: &mut [S]) {
    let n = de.len();
    let (lambda, mu) = crate::tensor::lame(e, nu);
    let tr = de[0] + de[1] + de[2];
    for i in 0..n {
        stress[i] = if i < 3 {
            stress_start[i] + lambda * tr + mu * 2.0 * de[i]
        } else {
            stress_start[i] + mu * de[i]
        };
    }
}

/// ½ (σ_start + σ_new)·Δε / ρ: the trapezoid rule's work per unit mass (engineering shear makes
/// the dot product the work-conjugate one).
pub(crate) fn trapezoid_work<S: Scalar>(stress_start: &[S], stress: &[S], de: &[S], density: f64) -> S {
    let mut w = S::zero();
    for i in 0..de.len() {
        w += (stress_start[i] + stress[i]) * de[i] * 0.5;
    }
    w / density
}

/// Point `p` of a block through the point model `model` (the return map is not rewritten):
/// from `state0` over the strain increment `de` in `time_increment`, at the point's
/// conditions; no tangent asked for. The point model's outcome, whose status the caller reads.
#[allow(clippy::too_many_arguments)]
pub(crate) fn point_update<S: Scalar, M: Model>(
    model: &M,
    props: &[S],
    input: &BlockInput<'_, S>,
    p: usize,
    de: &[S],
    time_increment: f64,
    state0: &[S],
    stress: &mut [S],
    state: &mut [S],
) -> Result<Outcome, Fault> {
    let n = de.len();
    let c = p * n..(p + 1) * n;
    let t = input.conditions[p];
    let (mut tangent, mut dsdt, mut energy) = ([S::zero(); 36], [S::zero(); 6], [S::zero(); 2]);
    let mut outcome = Outcome::default();
    let point_in = CallInput {
        props,
        strain: &input.strain[c.clone()],
        dstrain: de,
        temp: [S::cst(t.temperature), S::cst(t.temperature_increment)],
        stress0: &input.stress_start[c],
        state0,
        time: [input.time, time_increment],
        increment: input.increment,
        want_tangent: false,
    };
    let mut point_out = CallOutput {
        stress,
        state,
        tangent: &mut tangent[..n * n],
        dstress_dtemp: &mut dsdt[..n],
        energy: &mut energy,
        outcome: &mut outcome,
    };
    model.evaluate(&point_in, &mut point_out)?;
    Ok(outcome)
}

/// Fail the block call at point `p` (-1: the whole block) with `message`.
pub(crate) fn fail_point<S>(output: &mut BlockOutput<'_, S>, p: usize, message: &str) {
    output.outcome.status = block_status::FAILED;
    output.outcome.point = p as i32;
    output.outcome.set_message(message);
}
