//! The inputs of a call, and of a call that faulted, as a report keeps them.

use crate::driver::Driver;
use crate::report::{CallRecord, FaultRecord};
use crate::routine::{Fault, FaultedCall};

/// The inputs of the driver's current call, with the perturbation named.
pub fn call_record(d: &Driver, perturbation: Option<String>) -> CallRecord {
    let s = d.start();
    CallRecord {
        increment: d.increment(),
        perturbation,
        props: d.props().to_vec(),
        strain: s.strain.clone(),
        dstrain: d.dstrain().to_vec(),
        temp: s.temp,
        dtemp: d.dtemp(),
        stress0: s.stress.clone(),
        state0: s.state.clone(),
        time: s.time,
        dtime: d.dtime(),
    }
}

/// A fault with the inputs of the call that made it, as the caller kept them
/// ([`Caller::take_faulted`]); `what` says which call of the check it was.
pub fn fault_record_of_call(f: &Fault, c: FaultedCall, what: &str) -> FaultRecord {
    FaultRecord {
        message: f.to_string(),
        signal: signal_of(f),
        call: CallRecord {
            increment: c.increment,
            perturbation: Some(match c.imaginary {
                Some(im) => format!("{what}; a complex call: {im}"),
                None => what.to_string(),
            }),
            props: c.props,
            strain: c.strain,
            dstrain: c.dstrain,
            temp: c.temp[0],
            dtemp: c.temp[1],
            stress0: c.stress0,
            state0: c.state0,
            time: c.time[0],
            dtime: c.time[1],
        },
    }
}

/// A fault with the inputs of the driver's current call.
pub fn fault_record(f: &Fault, d: &Driver, perturbation: Option<String>) -> FaultRecord {
    FaultRecord { message: f.to_string(), signal: signal_of(f), call: call_record(d, perturbation) }
}

/// The signal of a crash, if the fault is one.
fn signal_of(f: &Fault) -> Option<i32> {
    match f {
        Fault::Crashed { signal, .. } => Some(*signal),
        _ => None,
    }
}
