//! The worker's routines under `--isolate`: the routine the check calls, wrapped so that every
//! call first raises the shared call counter and leaves its inputs in the shared record (a
//! point check's base call of each increment; every finite-strain call).

use std::path::Path;

use num_complex::Complex64;
use tancheck_core::finite::routine::{FiniteInfo, FiniteInput, FiniteOutput, FiniteRoutine};
use tancheck_core::routine::{Sweep, SweepEnd};
use tancheck_core::{CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};

use super::shared::Writer;

/// A point routine that raises the shared call counter before every call and leaves the
/// inputs of each base call in the shared record.
pub struct Heartbeat<'r> {
    inner: &'r mut dyn Routine,
    shared: Writer,
}

impl<'r> Heartbeat<'r> {
    pub fn new(inner: &'r mut dyn Routine, heartbeat: &Path) -> std::io::Result<Heartbeat<'r>> {
        let shared = Writer::open(heartbeat, &inner.info().name)?;
        Ok(Heartbeat { inner, shared })
    }
}

impl Routine for Heartbeat<'_> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        if input.want_tangent {
            self.shared.record_point(input);
        }
        self.shared.beat();
        self.inner.call(input, output)
    }
    tancheck_core::pass_on_to_inner!();

    /// The inner routine's sweep, with a beat before each of its calls (the parent's bound is
    /// on one call, not on a sweep).
    fn sweep_real(&mut self, sweep: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        let end = self.inner.sweep_real(Sweep { counter: Some(self.shared.counter()), ..sweep });
        self.shared.sync_calls();
        end
    }

    fn sweep_complex(&mut self, sweep: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        let end = self.inner.sweep_complex(Sweep { counter: Some(self.shared.counter()), ..sweep });
        self.shared.sync_calls();
        end
    }
}

impl ComplexRoutine for Heartbeat<'_> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.shared.beat();
        self.inner.complex().expect("checked").call_complex(input, output)
    }
}

/// A finite-strain routine that raises the shared call counter before every call and leaves
/// the call's inputs in the shared record (the twin's by their real parts). A finite-strain
/// check makes tens of calls per increment on short paths; recording each one lets the
/// parent name the very call that was running when the worker died.
pub struct FiniteHeartbeat<'r> {
    inner: &'r mut dyn FiniteRoutine,
    shared: Writer,
}

impl<'r> FiniteHeartbeat<'r> {
    pub fn new(inner: &'r mut dyn FiniteRoutine, heartbeat: &Path) -> std::io::Result<FiniteHeartbeat<'r>> {
        let shared = Writer::open(heartbeat, &inner.info().name)?;
        Ok(FiniteHeartbeat { inner, shared })
    }
}

impl FiniteRoutine for FiniteHeartbeat<'_> {
    fn info(&self) -> &FiniteInfo {
        self.inner.info()
    }

    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        let t = input.temperature;
        let arrays = [input.properties, &input.f0[..], &input.f1[..], &input.stress0[..], input.state0];
        self.shared.record_finite(input.increment, t, input.time, false, arrays);
        self.shared.beat();
        self.inner.call(input, output)
    }

    fn has_complex(&self) -> bool {
        self.inner.has_complex()
    }

    fn call_complex(
        &mut self,
        input: &FiniteInput<'_, Complex64>,
        output: &mut FiniteOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        // Real parts on the stack: a finite-strain call has at most this many entries of the
        // properties and the state it records (longer ones are left out of the record).
        const MAX: usize = 256;
        let re9 = |a: &[Complex64; 9]| a.map(|z| z.re);
        let (f0, f1) = (re9(input.f0), re9(input.f1));
        let stress0 = input.stress0.map(|z| z.re);
        let (mut props, mut state0) = ([0.0; MAX], [0.0; MAX]);
        let (np, ns) = (input.properties.len(), input.state0.len());
        if np <= MAX && ns <= MAX {
            for (d, s) in props.iter_mut().zip(input.properties) {
                *d = s.re;
            }
            for (d, s) in state0.iter_mut().zip(input.state0) {
                *d = s.re;
            }
            let t = [input.temperature[0].re, input.temperature[1].re];
            let arrays = [&props[..np], &f0[..], &f1[..], &stress0[..], &state0[..ns]];
            self.shared.record_finite(input.increment, t, input.time, true, arrays);
        }
        self.shared.beat();
        self.inner.call_complex(input, output)
    }
}
