//! The symmetry probe: major symmetry of the returned tangent, measured in Mandel form as
//! ‖C − Cᵀ‖ / ‖C‖. A model declared symmetric must be symmetric (default tolerance 1e-10);
//! otherwise an unsymmetric tangent is reported, since a solver with symmetric storage would
//! need to know.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct Symmetry;

impl Probe for Symmetry {
    fn name(&self) -> &'static str {
        "symmetry"
    }
    fn needs(&self) -> Needs {
        Needs::TANGENT
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let conv = caller.info().convention.clone();
        let n = conv.ncomp();
        let tol = env.spec.tol.unwrap_or(1e-10);
        let declared = env.spec.symmetric.unwrap_or(false);
        let mut worst = (0.0f64, 0usize);
        let mut non_finite: Option<usize> = None;
        let walked = walk(caller, env, |k, d, _| {
            if env.spec.runs_at(k) && non_finite.is_none() && d.base.tangent.iter().any(|x| !x.is_finite()) {
                non_finite = Some(k);
            }
            if env.spec.runs_at(k) {
                let mut m = d.base.tangent.clone();
                conv.tangent_to_mandel(&mut m);
                let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt().max(1e-300);
                let mut asym = 0.0;
                for i in 0..n {
                    for j in 0..n {
                        asym += (m[i + j * n] - m[j + i * n]).powi(2);
                    }
                }
                let a = asym.sqrt() / norm;
                if a > worst.0 {
                    worst = (a, k);
                }
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("symmetry", k, &f));
        }
        if let Some(k) = non_finite {
            let mut r = ProbeResult::new(
                "symmetry",
                ProbeStatus::Fail,
                format!("the tangent has entries that are not finite numbers at increment {k}"),
            );
            r.increment = Some(k);
            return Ok(r);
        }
        let (status, summary) = match (worst.0 > tol, declared) {
            (false, _) => (ProbeStatus::Pass, format!("symmetric (worst asymmetry {:.2e})", worst.0)),
            (true, true) => (
                ProbeStatus::Fail,
                format!("declared symmetric, but the asymmetry reaches {:.2e} at increment {}", worst.0, worst.1),
            ),
            (true, false) => (
                ProbeStatus::Pass,
                format!(
                    "unsymmetric tangent (asymmetry up to {:.2e} at increment {}): a solver with symmetric storage would need to know",
                    worst.0, worst.1
                ),
            ),
        };
        let mut r = ProbeResult::new("symmetry", status, summary);
        r.value = Some(worst.0);
        r.tol = Some(tol);
        r.increment = (status == ProbeStatus::Fail).then_some(worst.1);
        Ok(r)
    }
}
