//! Checks and endings shared by the models' `evaluate`: array sizes, a failed status with a
//! message, and filling the outputs a model has no use for; the trait impls of point and
//! finite-strain models.

use tancheck_core::routine::status;
use tancheck_core::{CallInput, CallOutput, Fault, RoutineInfo, Scalar};

use crate::tensor::write_tangent;

/// The arrays of one call have the sizes the routine's info announces. Allocates only when
/// they do not (the message).
pub(crate) fn check_sizes<S>(
    info: &RoutineInfo,
    input: &CallInput<'_, S>,
    output: &CallOutput<'_, S>,
) -> Result<(), Fault> {
    let n = info.convention.ncomp();
    let checks: [(&str, usize, usize); 9] = [
        ("properties", input.props.len(), info.nprop),
        ("strain", input.strain.len(), n),
        ("dstrain", input.dstrain.len(), n),
        ("stress0", input.stress0.len(), n),
        ("state0", input.state0.len(), info.nstate),
        ("stress", output.stress.len(), n),
        ("state", output.state.len(), info.nstate),
        ("tangent", output.tangent.len(), n * n),
        ("dstress_dtemp", output.dstress_dtemp.len(), n),
    ];
    for (what, got, want) in checks {
        if got != want {
            return Err(Fault::Unsupported(format!(
                "{}: `{what}` has {got} entries; {} point of this model takes {want}",
                info.name,
                info.convention.kind().with_article()
            )));
        }
    }
    Ok(())
}

/// End the call with status FAILED and `message`: every output becomes NaN, no branch.
/// `message` is static text, so this does not allocate either.
pub(crate) fn fail<S: Scalar>(output: &mut CallOutput<'_, S>, message: &str) {
    let nan = S::cst(f64::NAN);
    output.stress.fill(nan);
    output.state.fill(nan);
    output.tangent.fill(nan);
    output.dstress_dtemp.fill(nan);
    output.energy[0] = nan;
    output.energy[1] = nan;
    let o = &mut *output.outcome;
    o.status = status::FAILED;
    o.branch = -1;
    o.provides = 0;
    o.largest_fraction = 1.0;
    o.set_message(message);
}

/// Mark the call as a success on `branch` with the `provides` bits given, clearing any
/// message left in the outcome.
pub(crate) fn succeed<S>(output: &mut CallOutput<'_, S>, branch: i32, provides: i32) {
    let o = &mut *output.outcome;
    o.status = status::OK;
    o.branch = branch;
    o.provides = provides;
    o.largest_fraction = 1.0;
    if o.message[0] != 0 {
        o.message.fill(0);
    }
}

/// The end of a call of a linear elastic model (isotropic and orthotropic alike): σ = σ₀ + C Δε
/// on the routine's `slots` of the canonical-order matrix `c`, C as the tangent, no ∂σ/∂T, the
/// stored energy ½ σ·ε and no dissipation.
pub(crate) fn linear_elastic_end<S: Scalar>(
    c: &[[S; 6]; 6],
    slots: &[usize],
    input: &CallInput<'_, S>,
    output: &mut CallOutput<'_, S>,
) {
    let mut stored = S::zero();
    for (i, &si) in slots.iter().enumerate() {
        let mut s = input.stress0[i];
        for (j, &sj) in slots.iter().enumerate() {
            s += c[si][sj] * input.dstrain[j];
        }
        output.stress[i] = s;
        stored += s * (input.strain[i] + input.dstrain[i]);
    }
    write_tangent(c, slots, output.tangent);
    output.dstress_dtemp.fill(S::zero());
    output.energy[0] = stored * 0.5;
    output.energy[1] = S::zero();
    succeed(output, 0, tancheck_core::routine::provides::ENERGY);
}

/// x > 0 on the real part; false for NaN.
#[inline]
pub(crate) fn positive(x: f64) -> bool {
    x > 0.0
}

/// lo < x < hi on the real part; false for NaN.
#[inline]
pub(crate) fn between(x: f64, lo: f64, hi: f64) -> bool {
    lo < x && x < hi
}

/// The properties a model read, or — when they are out of range — the call ended with status
/// FAILED and the reader's message (`None`: return `Ok(())`).
pub(crate) fn props_or_fail<S: Scalar, P>(
    output: &mut CallOutput<'_, S>,
    read: Result<P, &str>,
) -> Option<P> {
    match read {
        Ok(p) => Some(p),
        Err(message) => {
            fail(output, message);
            None
        }
    }
}

/// `impl Model` for a point model with an `info` field: the optional outputs it fills in
/// (`Capabilities` flags), and its inherent `update`, which runs once the array sizes are
/// checked.
macro_rules! point_model {
    ($model:ty, $($outputs:ident)|*) => {
        impl tancheck_core::Model for $model {
            fn info(&self) -> &tancheck_core::RoutineInfo {
                &self.info
            }

            fn outputs(&self) -> tancheck_core::routine::Capabilities {
                tancheck_core::routine::Capabilities::empty()
                    $(| tancheck_core::routine::Capabilities::$outputs)*
            }

            fn evaluate<S: tancheck_core::Scalar>(
                &self,
                input: &tancheck_core::CallInput<'_, S>,
                output: &mut tancheck_core::CallOutput<'_, S>,
            ) -> Result<(), tancheck_core::Fault> {
                $crate::call::check_sizes(&self.info, input, output)?;
                self.update(input, output);
                Ok(())
            }
        }
    };
}
pub(crate) use point_model;

/// `impl FiniteModel` for a finite-strain model with an `info` field: its inherent `update`
/// does the call (the trait's boilerplate written once, as [`point_model`] does for points).
macro_rules! finite_model {
    ($model:ty) => {
        impl tancheck_core::finite::FiniteModel for $model {
            fn info(&self) -> &tancheck_core::finite::FiniteInfo {
                &self.info
            }

            fn evaluate<S: tancheck_core::Scalar>(
                &self,
                input: &tancheck_core::finite::FiniteInput<'_, S>,
                output: &mut tancheck_core::finite::FiniteOutput<'_, S>,
            ) -> Result<(), tancheck_core::Fault> {
                self.update(input, output)
            }
        }
    };
}
pub(crate) use finite_model;

/// `impl Model` for an enum of models: every method goes to the variant's model.
macro_rules! model_by_variant {
    ($any:ident { $($variant:ident),* $(,)? }) => {
        impl tancheck_core::Model for $any {
            fn info(&self) -> &tancheck_core::RoutineInfo {
                match self {
                    $($any::$variant(m) => tancheck_core::Model::info(m),)*
                }
            }

            fn outputs(&self) -> tancheck_core::routine::Capabilities {
                match self {
                    $($any::$variant(m) => tancheck_core::Model::outputs(m),)*
                }
            }

            #[inline]
            fn evaluate<S: tancheck_core::Scalar>(
                &self,
                input: &tancheck_core::CallInput<'_, S>,
                output: &mut tancheck_core::CallOutput<'_, S>,
            ) -> Result<(), tancheck_core::Fault> {
                match self {
                    $($any::$variant(m) => tancheck_core::Model::evaluate(m, input, output),)*
                }
            }
        }
    };
}
pub(crate) use model_by_variant;
