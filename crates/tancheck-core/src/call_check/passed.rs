//! The judgement of a call that passed every check: the fast path of a check that keeps
//! only its failures in detail.

use super::Measurement;
use crate::compare::{compare_dtemp_floor, passing, rounding_floor, Limits, PassedScheme};
use crate::convention::Convention;
use crate::driver::Driver;
use crate::report::{CheckOutcome, RECORD_SCHEMES};
use crate::settings::Settings;

impl Measurement {
    /// The judgement of a call that passed every check, with nothing more to say about it:
    /// per scheme (the settings' order) the norm and worst-entry errors and the largest
    /// error of its tangent comparison, `None` for a skipped scheme; `None` as a whole when a
    /// comparison failed, a call faulted or an output is not a finite number (then only
    /// [`check_call`]'s full judgement says what happened). The numbers are the very ones the
    /// full judgement reports: the same measures, computed in the same order.
    pub fn passed(
        &self,
        driver: &Driver,
        conv: &Convention,
        settings: &Settings,
    ) -> Option<[Option<PassedScheme>; RECORD_SCHEMES]> {
        let n = self.n;
        let base = &driver.base;
        let finite = |v: &[f64]| v.iter().all(|x| x.is_finite());
        if !(finite(&base.stress) && finite(&base.state) && finite(&base.tangent)) {
            return None;
        }
        let soft = self.soft.as_ref()?;
        // A twin that refused a call is judged in full (`judge` says so).
        if self.twin_refused.is_some() {
            return None;
        }
        // A column the central difference straddles at a kink is looked at again (`judge`).
        if self.straddled != 0 {
            return None;
        }
        let mut r = [0.0; 36];
        conv.tangent_to_mandel_into(&self.returned[..n * n], &mut r[..n * n]);
        let mut out = [None; RECORD_SCHEMES];
        for (k, m) in self.measured.iter().enumerate() {
            match &m.outcome {
                Some(CheckOutcome::Skipped { .. }) => {}
                Some(_) => return None,
                None => {
                    let ss = settings.scheme(m.scheme);
                    let limits = Limits::new(ss.tol, settings.entry_floor, settings.worst_entries)
                        .with_abs_floor(rounding_floor(m.scheme, self.stress_size, m.h, ss.rel_step, ss.tol));
                    let p = passing(conv, &r[..n * n], &m.tangent[..n * n], limits, soft)?;
                    if k < RECORD_SCHEMES {
                        out[k] = Some(p);
                    }
                }
            }
            match (&self.returned_dtemp, &m.dtemp) {
                (Some(ret), Some(Ok(col))) => {
                    let ss = settings.scheme(m.scheme);
                    let limits = Limits::new(ss.tol, settings.entry_floor, settings.worst_entries);
                    if !compare_dtemp_floor(conv, &ret[..n], &col[..n], limits, self.dtemp_abs_floor).pass {
                        return None;
                    }
                }
                (_, Some(Err(_))) => return None,
                _ => {}
            }
        }
        Some(out)
    }
}
