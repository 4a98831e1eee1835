//! The regularisation probe (crack band, Bažant & Oh 1983): along a path that takes the point
//! to full failure, the work done per unit volume W = ∫ σ·dε (trapezoid rule; all of it
//! dissipated once the stress is gone) times the characteristic length L equals the declared
//! fracture energy, and does not change with L.
//!
//! Suite fields: `"length"`, the property index (0-based) of L — the probe reruns the path with
//! L/2 and the strain increments doubled (the softening strain scales with 1/L) and compares
//! W·L; `"fracture_energy"`, the energy per unit area the path should dissipate (compared with
//! W·L, or with W alone when there is no `length`, as for a cohesive law whose strain is a
//! separation). Tolerance `tol` (relative, default 2e-2: the trapezoid rule over kinks that
//! fall inside increments). A path that does not reach full failure (final stress above 1e-6
//! of the largest) is skipped with that reason.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::convention::{Convention, ShearMeasure};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::path::Path;
use crate::routine::Caller;

pub struct Regularisation;

const DEFAULT_TOL: f64 = 2e-2;

/// The work per unit volume σ·dε done along a walk (trapezoid rule in each increment) and the
/// size of the stress, to tell when it is gone: what the regularisation and the snap-back
/// probes measure, in one place.
pub(super) struct WorkMeter {
    /// σ·dε is the work with engineering shear; a tensor shear counts twice.
    weight: Vec<f64>,
    /// The work so far.
    pub work: f64,
    peak: f64,
    last: f64,
    /// The largest strain reached (norm of the end strain over the walk) and the stress's
    /// size there: a point fails at its furthest, not where a path brought it back to zero.
    furthest: f64,
    at_furthest: f64,
}

impl WorkMeter {
    pub fn new(conv: &Convention) -> WorkMeter {
        let tensor = conv.shear() == ShearMeasure::Tensor;
        let weight = conv.order().iter().map(|c| if c.is_shear() && tensor { 2.0 } else { 1.0 }).collect();
        WorkMeter { weight, work: 0.0, peak: 0.0, last: 0.0, furthest: 0.0, at_furthest: 0.0 }
    }

    /// The work from stress `s0` to `s1` over the fraction `f` of the strain increment `de`.
    pub fn part(&self, s0: &[f64], s1: &[f64], de: &[f64], f: f64) -> f64 {
        (0..s1.len()).map(|i| 0.5 * (s0[i] + s1[i]) * de[i] * f * self.weight[i]).sum::<f64>()
    }

    /// Add the driver's increment (its start to its base call) and follow the stress's size.
    pub fn add(&mut self, d: &Driver) {
        self.work += self.part(&d.start().stress, &d.base.stress, d.dstrain(), 1.0);
        self.last = d.base.stress.iter().map(|x| x * x).sum::<f64>().sqrt();
        self.peak = self.peak.max(self.last);
        let reach =
            d.start().strain.iter().zip(d.dstrain()).map(|(e, de)| (e + de) * (e + de)).sum::<f64>().sqrt();
        if reach >= self.furthest {
            (self.furthest, self.at_furthest) = (reach, self.last);
        }
    }

    /// The point failed: the stress is gone (below 1e-6 of the largest along the walk) at the
    /// end and at the largest strain reached (a path that unloads back to zero strain ends
    /// without stress, failed or not).
    pub fn stress_gone(&self) -> bool {
        self.last <= 1e-6 * self.peak && self.at_furthest <= 1e-6 * self.peak
    }
}

/// W along `path` with `props`, and whether the stress is gone at the end.
fn work(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
    props: &[f64],
    path: &Path,
) -> Result<(f64, bool), (usize, crate::routine::Fault)> {
    let env2 = ProbeEnv { props, path, ..*env };
    let mut meter = WorkMeter::new(&caller.info().convention.clone());
    walk(caller, &env2, |_, d, _| {
        meter.add(d);
        Ok(())
    })?;
    Ok((meter.work, meter.stress_gone()))
}

impl Probe for Regularisation {
    fn name(&self) -> &'static str {
        "regularisation"
    }
    fn needs(&self) -> Needs {
        Needs::LENGTH_OR_FRACTURE_ENERGY
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        // run_probes skips before this; a direct call gets the same reason.
        if let Some(why) = super::unmet(self.needs(), caller.capabilities(), caller.info(), env) {
            return Ok(ProbeResult::skipped(self.name(), why));
        }
        let name = self.name();
        let (length, g) = (env.spec.length, env.spec.fracture_energy);
        if let Some(i) = length {
            if i >= env.props.len() || !env.props[i].is_finite() || env.props[i] <= 0.0 {
                return Err(CoreError::LengthProperty(i));
            }
        }
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let (w, failed) = match work(caller, env, env.props, env.path) {
            Ok(x) => x,
            Err((k, f)) => return Ok(faulted(name, k, &f)),
        };
        if !failed {
            return Ok(ProbeResult::skipped(
                name,
                "the path does not take the point to full failure (the stress is not gone at its end, or not at the largest strain it reached)",
            ));
        }
        let l = length.map_or(1.0, |i| env.props[i]);
        let gl = w * l;
        // A cohesive law's work ∫ t·dδ is already per unit area: no length multiplies it.
        let mut details = if caller.info().convention.kind().is_cohesive() && length.is_none() {
            vec![format!("W = ∫ t·dδ = {w:.6e} per unit area (a cohesive law's dissipated energy)")]
        } else {
            vec![format!("W = {w:.6e} per unit volume, L = {l:.6e}: W·L = {gl:.6e}")]
        };
        let mut worst = 0.0_f64;
        let mut what = String::new();
        if let Some(i) = length {
            let mut half = env.props.to_vec();
            half[i] *= 0.5;
            let mut doubled = env.path.clone();
            for inc in &mut doubled.increments {
                for x in &mut inc.dstrain {
                    *x *= 2.0;
                }
            }
            let (w2, failed2) = match work(caller, env, &half, &doubled) {
                Ok(x) => x,
                Err((k, f)) => return Ok(faulted(name, k, &f)),
            };
            let gl2 = w2 * half[i];
            details.push(format!("with L/2 and the path doubled: W·L = {gl2:.6e}"));
            if !failed2 {
                return Ok(ProbeResult::skipped(
                    name,
                    "with L/2 the doubled path does not reach full failure",
                ));
            }
            let r = (gl2 - gl).abs() / gl.abs().max(1e-300);
            if r > worst {
                worst = r;
                what = format!("W·L changes with L: {gl:.6e} at L, {gl2:.6e} at L/2 (the length is not in the softening law)");
            }
        }
        let per_area = caller.info().convention.kind().is_cohesive() && length.is_none();
        if let Some(g) = g {
            let r = (gl - g).abs() / g.abs().max(1e-300);
            if r > worst {
                worst = r;
                what = if per_area {
                    format!("W = {gl:.6e} but the declared fracture energy is {g:.6e}")
                } else {
                    format!("W·L = {gl:.6e} but the declared fracture energy is {g:.6e}")
                };
            }
        }
        let mut res = if worst <= tol {
            let words = if per_area {
                format!("dissipated energy per unit area {gl:.6e}, as declared (within {worst:.1e})")
            } else {
                format!(
                    "dissipated energy × L = {gl:.6e}, as declared and independent of L (within {worst:.1e})"
                )
            };
            ProbeResult::new(name, ProbeStatus::Pass, words)
        } else {
            ProbeResult::new(name, ProbeStatus::Fail, what)
        };
        res.value = Some(worst);
        res.tol = Some(tol);
        res.details = details;
        Ok(res)
    }
}
