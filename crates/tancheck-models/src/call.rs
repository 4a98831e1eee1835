//! Checks and endings shared by the models' `evaluate`: array sizes, a failed status with a
//! message, and filling the outputs a model has no use for.

use tancheck_core::routine::status;
use tancheck_core::{CallInput, CallOutput, Fault, RoutineInfo, Scalar};

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
                "{}: `{what}` has {got} entries; a {} point of this model takes {want}",
                info.name,
                info.convention.kind()
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
