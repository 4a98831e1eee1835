//! The zero-increment probe: Δε = 0 (and ΔT = 0, Δt = 0) from the start of each increment returns the
//! start stress and a finite tangent (default tolerance 1e-12 of the stress scale).

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct ZeroIncrement;

impl Probe for ZeroIncrement {
    fn name(&self) -> &'static str {
        "zero-increment"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let tol = env.spec.tol.unwrap_or(1e-12);
        // The worst change of the stress, where it was; and the first increment where the
        // fault appeared (a change beyond `tol`, or an output that is not finite), with what.
        let mut worst = (0.0f64, 0usize);
        let mut first: Option<(usize, bool, f64, f64)> = None;
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) {
                return Ok(());
            }
            let full = d.dstrain().to_vec();
            let dtemp = d.dtemp();
            let dtime = d.dtime();
            let zero = vec![0.0; full.len()];
            // Nothing happens: no strain, no temperature change and no time (over a positive
            // time a rate-dependent or viscous routine rightly relaxes).
            d.set_increment_keep_count(&zero, 0.0);
            d.set_dtime_keep_count(0.0);
            let r = d.base_call(c);
            let stress = d.base.stress.clone();
            let finite = d.base.tangent.iter().chain(&d.base.stress).all(|x| x.is_finite());
            d.set_increment_keep_count(&full, dtemp);
            d.set_dtime_keep_count(dtime);
            d.base_call(c)?;
            r?;
            let scale = d.start().stress.iter().fold(1.0f64, |a, s| a.max(s.abs()));
            let diff =
                stress.iter().zip(&d.start().stress).fold(0.0f64, |a, (x, y)| a.max((x - y).abs())) / scale;
            let diff = if diff.is_nan() { f64::INFINITY } else { diff };
            if diff > worst.0 {
                worst = (diff, k);
            }
            if first.is_none() && (!finite || diff > tol) {
                first = Some((k, finite, diff, scale));
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("zero-increment", k, &f));
        }
        let ok = first.is_none();
        let mut r = ProbeResult::new(
            "zero-increment",
            if ok { ProbeStatus::Pass } else { ProbeStatus::Fail },
            match first {
                None => {
                    format!("returns the start stress (worst change {:.2e}) and a finite tangent", worst.0)
                }
                Some((k, false, ..)) => format!(
                    "a zero increment gives a stress or tangent that is not finite, first at increment {k}"
                ),
                Some((k, true, diff, scale)) => format!(
                    "a zero increment changes the stress by {diff:.2e} {}, first at increment {k} (worst {:.2e} at \
                     increment {})",
                    if scale > 1.0 {
                        "of the largest start stress"
                    } else {
                        "(in stress units: the start stress is below 1)"
                    },
                    worst.0,
                    worst.1
                ),
            },
        );
        // At the path's first increment from a start stress of zero: the routine's own stress
        // at the start is not the one given (a total-form law at a start temperature away from
        // its reference holds a thermal stress there), and every probe that starts there sees
        // the mismatch (the energy probe's closed cycle too); the start, not the law, may be
        // what is wrong (a user-style sweep read it as a defect of the law).
        if let Some((1, true, ..)) = first {
            if env.start.stress.iter().all(|&x| x == 0.0) {
                r.details.push(
                    "the start stress is zero, and a zero increment from the start gives another stress: a \
                     total-form law gives the stress of its state there (a thermal stress at a start \
                     temperature other than its reference); give the start stress it gives (`start.stress`), \
                     or start where it is zero. Or the routine carries a value from call to call (a SAVE or \
                     static variable): the hidden-state and determinism probes say so"
                        .into(),
                );
            }
        }
        r.value = Some(worst.0);
        r.tol = Some(tol);
        r.increment = first.map(|f| f.0);
        Ok(r)
    }
}
