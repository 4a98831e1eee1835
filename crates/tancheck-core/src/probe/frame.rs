//! The frame probe: frame indifference (objectivity) of the material law at small strain.
//! Rotating every strain increment by a rotation R, from a start that no rotation changes,
//! must rotate the response with it: σ_rot(k) = R σ(k) Rᵀ at every increment k, and the
//! tangent C_rot = (R⊗R) C (Rᵀ⊗Rᵀ) (in Mandel form Q M Qᵀ with Q the orthogonal 6×6 image
//! of R). An isotropic law must pass as it is; a law declared anisotropic
//! (`anisotropic: true`) must pass once its material axes, given as property vectors by
//! `axes` (the 0-based index of the first of three entries each), are rotated too.
//!
//! The path is run once as written (mixed-control increments solved as usual), and the
//! strain increments it actually took are rotated and run again under strain control. The
//! rotation: angle `amplitude` (default 0.7 rad) about the skew axis (1, −2, 3)/√14 for
//! solid-3d points; about axis 3 for the in-plane kinds (plane strain, axisymmetric, plane
//! stress), which keeps the components they lack at zero. Uniaxial and cohesive points have
//! no frame to turn and are skipped, as are starts with nonzero strain, stress or state
//! (their rotation would need the meaning of each state variable; state variables declared
//! scalar by `scalar_states`, which no rotation changes, may be nonzero) and anisotropic models
//! without `axes`: declared so (`anisotropic: true`), or, when nothing is declared, seen to be
//! so (the elastic tangent at the start is not isotropic, or, with an isotropic elastic
//! response, the stress stops rotating only once the state has changed: an anisotropic yield
//! surface or damage law). `anisotropic: false` declares the law isotropic: then a response
//! that does not rotate fails. A tangent that does not rotate where its stress does fails
//! whatever is declared.
//!
//! Mismatches are Mandel (Frobenius) norms relative to the largest stress (tangent) norm
//! along the path; both must stay within `tol` (default 1e-10) at every probed increment.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::convention::{canonical_slot, PointKind};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::routine::Caller;

pub struct Frame;

/// Default tolerance of the relative mismatches.
pub const DEFAULT_TOL: f64 = 1e-10;
/// Default rotation angle (rad).
pub const DEFAULT_ANGLE: f64 = 0.7;

type Mat3 = [[f64; 3]; 3];

/// Tensor indices of the canonical slots 11, 22, 33, 23, 13, 12.
const PAIRS: [(usize, usize); 6] = [(0, 0), (1, 1), (2, 2), (1, 2), (0, 2), (0, 1)];

/// The rotation by `angle` about the unit vector along `axis` (Rodrigues' formula).
pub fn rotation(axis: [f64; 3], angle: f64) -> Mat3 {
    let l = (axis[0] * axis[0] + axis[1] * axis[1] + axis[2] * axis[2]).sqrt();
    let k = axis.map(|x| x / l);
    let (s, c) = angle.sin_cos();
    let mut r = [[0.0; 3]; 3];
    let cross = [[0.0, -k[2], k[1]], [k[2], 0.0, -k[0]], [-k[1], k[0], 0.0]];
    for i in 0..3 {
        for j in 0..3 {
            r[i][j] = (1.0 - c) * k[i] * k[j] + s * cross[i][j] + if i == j { c } else { 0.0 };
        }
    }
    r
}

/// The rotation the probe uses for a kind of point, or why it has none.
pub fn rotation_for(kind: PointKind, angle: f64) -> Result<Mat3, &'static str> {
    match kind {
        PointKind::Solid3d => Ok(rotation([1.0, -2.0, 3.0], angle)),
        PointKind::PlaneStrain | PointKind::Axisymmetric | PointKind::PlaneStress => {
            Ok(rotation([0.0, 0.0, 1.0], angle))
        }
        PointKind::Uniaxial => Err("a uniaxial point has no frame to turn"),
        PointKind::Cohesive3d | PointKind::Cohesive2d => {
            Err("a cohesive point's components are already in the interface frame")
        }
    }
}

/// R A Rᵀ for a symmetric tensor given by canonical components (tensor values).
pub fn rotate_sym(r: &Mat3, a: &[f64; 6]) -> [f64; 6] {
    let mut m = [[0.0; 3]; 3];
    for (s, &(i, j)) in PAIRS.iter().enumerate() {
        m[i][j] = a[s];
        m[j][i] = a[s];
    }
    let mut out = [0.0; 6];
    for (s, &(i, j)) in PAIRS.iter().enumerate() {
        let mut v = 0.0;
        for k in 0..3 {
            for l in 0..3 {
                v += r[i][k] * m[k][l] * r[j][l];
            }
        }
        out[s] = v;
    }
    out
}

/// The orthogonal 6×6 matrix Q (row-major, canonical Mandel order) with
/// mandel(R A Rᵀ) = Q mandel(A).
fn mandel_rotation(r: &Mat3) -> [[f64; 6]; 6] {
    let s2 = std::f64::consts::SQRT_2;
    let mut q = [[0.0; 6]; 6];
    for j in 0..6 {
        // The tensor whose Mandel vector is e_j, in canonical tensor components.
        let mut a = [0.0; 6];
        a[j] = if j < 3 { 1.0 } else { 1.0 / s2 };
        let b = rotate_sym(r, &a);
        for i in 0..6 {
            q[i][j] = if i < 3 { b[i] } else { s2 * b[i] };
        }
    }
    q
}

/// Mandel norm of canonical stress components (tensor values).
fn mandel_norm(a: &[f64; 6]) -> f64 {
    (a[0] * a[0] + a[1] * a[1] + a[2] * a[2] + 2.0 * (a[3] * a[3] + a[4] * a[4] + a[5] * a[5])).sqrt()
}

use crate::convention_fit::{canonical_mandel, isotropy_residual};

fn fro6(m: &[[f64; 6]; 6]) -> f64 {
    m.iter().flatten().map(|x| x * x).sum::<f64>().sqrt()
}

/// One increment of the original run.
struct Original {
    increment: usize,
    dstrain: Vec<f64>,
    dtemp: f64,
    dtime: f64,
    stress: [f64; 6],
    tangent: [[f64; 6]; 6],
    /// The branch the call took: the routine's own number and whether the state changed.
    branch: (i32, bool),
}

/// The branch a driver's base call took: the routine's number and whether the state changed.
fn branch_of(d: &Driver) -> (i32, bool) {
    (d.base.outcome.branch, d.base.state.iter().zip(&d.start().state).any(|(a, b)| a != b))
}

impl Probe for Frame {
    fn name(&self) -> &'static str {
        "frame"
    }
    fn needs(&self) -> Needs {
        Needs::TANGENT.union(Needs::FRAME).union(Needs::VIRGIN_START)
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        // run_probes checks and skips before this; a direct call gets the same.
        super::scalar_states_fit("frame", env.spec, caller.info().nstate)?;
        if let Some(why) = super::unmet(self.needs(), caller.capabilities(), caller.info(), env) {
            return Ok(ProbeResult::skipped("frame", why));
        }
        let info = caller.info().clone();
        let conv = info.convention.clone();
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let angle = env.spec.amplitude.unwrap_or(DEFAULT_ANGLE);
        let r = match rotation_for(conv.kind(), angle) {
            Ok(r) => r,
            Err(why) => return Ok(ProbeResult::skipped("frame", why)),
        };
        let anisotropic = env.spec.anisotropic.unwrap_or(false) || env.spec.axes.is_some();
        if env.spec.anisotropic.is_none() && env.spec.axes.is_none() {
            // Nothing declared: an anisotropic elastic response without material axes to rotate
            // cannot be judged, so the probe is skipped with that reason rather than failed.
            let t = match super::conventions::elastic_tangent(caller, env) {
                Ok((t, _)) => t,
                Err(f) => return Ok(faulted("frame", 1, &f)),
            };
            let present: Vec<usize> = conv.order().iter().map(|c| canonical_slot(*c)).collect();
            let residual = isotropy_residual(&canonical_mandel(&conv, &t), &present);
            if residual > crate::convention_fit::DEFAULT_TOL {
                let mut res = ProbeResult::skipped(
                    "frame",
                    format!(
                        "the elastic response at the start is anisotropic (isotropy residual {residual:.1e}) and no \
                         material axes are declared: give their property indices with `axes` to rotate them; \
                         declare `\"anisotropic\": false` if the routine is meant to be isotropic (it then fails \
                         here), and see the conventions probe for a wrong declared order or shear measure"
                    ),
                );
                res.value = Some(residual);
                return Ok(res);
            }
        }
        let mut props = env.props.to_vec();
        if anisotropic {
            let Some(axes) = &env.spec.axes else {
                return Ok(ProbeResult::skipped(
                    "frame",
                    "declared anisotropic without `axes`: the material axes to rotate are not known",
                ));
            };
            for &a in axes {
                if a + 3 > props.len() {
                    return Err(CoreError::AxisProperty { at: a, nprop: props.len() });
                }
                let v = [props[a], props[a + 1], props[a + 2]];
                for i in 0..3 {
                    props[a + i] = (0..3).map(|j| r[i][j] * v[j]).sum();
                }
            }
        }

        // The path as written.
        let mut original = Vec::new();
        let walked = walk(caller, env, |k, d, _| {
            let mut stress = [0.0; 6];
            conv.stress_to_canonical(&d.base.stress, &mut stress);
            original.push(Original {
                increment: k,
                dstrain: d.dstrain().to_vec(),
                dtemp: d.dtemp(),
                dtime: d.dtime(),
                stress,
                tangent: canonical_mandel(&conv, &d.base.tangent),
                branch: branch_of(d),
            });
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("frame", k, &f));
        }

        // The rotated run.
        let q = mandel_rotation(&r);
        let stress_scale = original.iter().map(|o| mandel_norm(&o.stress)).fold(0.0, f64::max).max(1e-300);
        let tangent_scale = original.iter().map(|o| fro6(&o.tangent)).fold(0.0, f64::max).max(1e-300);
        let mut d = Driver::new(&info, &props, env.start.clone())?;
        let mut canon = [0.0; 6];
        let mut de = vec![0.0; conv.ncomp()];
        let (mut worst_s, mut worst_t) = ((0.0f64, 0usize), (0.0f64, 0usize));
        let mut first_bad: Option<usize> = None;
        // The first increment whose stress does not rotate (a tangent that does not rotate
        // with a stress that does is a defect whatever the law's symmetry).
        let mut first_stress_bad: Option<usize> = None;
        // Increments that end on a branch boundary (a reload exactly to the largest load so
        // far, where damage or hardening starts again): rounding in the rotated frame may take
        // the other branch, with the same stress and the other side's tangent.
        let mut ties: Vec<(usize, f64)> = Vec::new();
        // Increments whose point sits on a kink (see `on_a_kink`): (increment, tangent
        // mismatch, the gap between the one-sided derivatives).
        let mut kinks: Vec<(usize, f64, f64)> = Vec::new();
        for o in &original {
            conv.strain_to_canonical(&o.dstrain, &mut canon);
            conv.strain_from_canonical(&rotate_sym(&r, &canon), &mut de);
            d.set_increment(&de, o.dtemp, o.dtime);
            if let Err(f) = d.base_call(caller) {
                let mut res = faulted("frame", o.increment, &f);
                res.summary = format!("in the rotated run, {}", res.summary);
                return Ok(res);
            }
            if env.spec.runs_at(o.increment) {
                let want = rotate_sym(&r, &o.stress);
                let mut got = [0.0; 6];
                conv.stress_to_canonical(&d.base.stress, &mut got);
                let diff: [f64; 6] = std::array::from_fn(|i| got[i] - want[i]);
                let es = mandel_norm(&diff) / stress_scale;
                // Q M Qᵀ against the rotated run's tangent.
                let m = &o.tangent;
                let mt = canonical_mandel(&conv, &d.base.tangent);
                let mut dt = [[0.0; 6]; 6];
                for i in 0..6 {
                    for j in 0..6 {
                        let mut v = 0.0;
                        for k in 0..6 {
                            for l in 0..6 {
                                v += q[i][k] * m[k][l] * q[j][l];
                            }
                        }
                        dt[i][j] = mt[i][j] - v;
                    }
                }
                let et = fro6(&dt) / tangent_scale;
                if es <= tol && et > tol && branch_of(&d) != o.branch {
                    // A tie at a branch boundary: the stress rotates, the tangent is the other
                    // side's. Not held against the routine, said in the details.
                    ties.push((o.increment, et));
                    d.advance();
                    continue;
                }
                if es <= tol && et > tol {
                    match on_a_kink(&mut d, caller, &conv, env.settings) {
                        Ok(Some(gap)) => {
                            kinks.push((o.increment, et, gap));
                            d.advance();
                            continue;
                        }
                        Ok(None) => {}
                        Err(f) => {
                            let mut res = faulted("frame", o.increment, &f);
                            res.summary = format!("in the rotated run's look for a kink, {}", res.summary);
                            return Ok(res);
                        }
                    }
                }
                if es > worst_s.0 {
                    worst_s = (es, o.increment);
                }
                if et > worst_t.0 {
                    worst_t = (et, o.increment);
                }
                if first_bad.is_none() && (es > tol || et > tol) {
                    first_bad = Some(o.increment);
                }
                if first_stress_bad.is_none() && es > tol {
                    first_stress_bad = Some(o.increment);
                }
            }
            d.advance();
        }
        let what = if anisotropic { "with the material axes rotated too" } else { "as an isotropic law" };
        // Nothing declared, an isotropic elastic response (above), and the stress stops
        // rotating only where the state has changed: an inelastic response anisotropic by
        // design (an orthotropic yield surface, damage directions fixed in the material) and
        // a frame-indifference defect of an isotropic law look the same. Skipped with that
        // reason, not failed; `anisotropic: false` makes it a failure.
        let first_inelastic = original.iter().find(|o| o.branch.1).map(|o| o.increment);
        let undeclared = env.spec.anisotropic.is_none() && env.spec.axes.is_none();
        if let (true, Some(k), Some(i)) = (undeclared, first_bad, first_inelastic) {
            if first_stress_bad == Some(k) && i <= k {
                let mut res = ProbeResult::skipped(
                    "frame",
                    format!(
                        "the elastic response rotates with the frame, but from increment {k}, after the state changed \
                         (increment {i}), the stress does not (rotated by {angle} rad, mismatch up to {:.2e} at \
                         increment {}): an inelastic response that is anisotropic by design (an orthotropic yield \
                         surface, damage directions fixed in the material) cannot be told from a frame-indifference \
                         defect of an isotropic law; declare `\"anisotropic\": false` if the routine is meant to be \
                         isotropic (it then fails here), or `\"anisotropic\": true` with `axes` to rotate its \
                         material axes",
                        worst_s.0, worst_s.1
                    ),
                );
                res.increment = Some(k);
                res.value = Some(worst_s.0.max(worst_t.0));
                res.tol = Some(tol);
                return Ok(res);
            }
        }
        let mut res = match first_bad {
            None => ProbeResult::new(
                "frame",
                ProbeStatus::Pass,
                format!(
                    "frame indifferent {what}: rotated by {angle} rad, stresses rotate to {:.1e}, tangents to {:.1e}{}",
                    worst_s.0,
                    worst_t.0,
                    match kinks.len() {
                        0 => String::new(),
                        1 => format!(" (increment {} ends on a kink, where its tangent is one-sided and not compared)", kinks[0].0),
                        n => format!(" ({n} increments end on a kink, where their tangents are one-sided and not compared)"),
                    }
                ),
            ),
            Some(k) => {
                let mut res = ProbeResult::new(
                    "frame",
                    ProbeStatus::Fail,
                    format!(
                        "not frame indifferent {what}: rotated by {angle} rad, the response does not rotate with the strain from increment {k} (stress mismatch up to {:.2e} at increment {}, tangent {:.2e} at increment {})",
                        worst_s.0, worst_s.1, worst_t.0, worst_t.1
                    ),
                );
                res.increment = Some(k);
                res
            }
        };
        res.value = Some(worst_s.0.max(worst_t.0));
        res.tol = Some(tol);
        res.details.push(format!(
            "rotation R = [{:?}, {:?}, {:?}]",
            r[0].map(|x| (x * 1e6).round() / 1e6),
            r[1].map(|x| (x * 1e6).round() / 1e6),
            r[2].map(|x| (x * 1e6).round() / 1e6)
        ));
        res.details.push(format!(
            "worst stress mismatch {:.3e} (increment {}), worst tangent mismatch {:.3e} (increment {})",
            worst_s.0, worst_s.1, worst_t.0, worst_t.1
        ));
        for (k, et, gap) in &kinks {
            res.details.push(format!(
                "increment {k} ends on a kink (in the rotated run its forward and backward derivatives differ by {gap:.2e}, and keep differing as the step shrinks): a tangent there is a one-sided derivative column by column, which a rotation mixes, so it need not rotate; the stress rotates, and its tangents (mismatch {et:.2e}) are not compared there"
            ));
        }
        for (k, et) in &ties {
            res.details.push(format!(
                "increment {k} ends on a branch boundary: the rotated run took the other branch (another branch number, or the state changed on one side only) with the stress rotated to the tolerance; its tangents differ by {et:.2e}, the two sides' tangents, and are not compared there"
            ));
        }
        Ok(res)
    }
}

/// Whether the rotated run's point (the driver's current increment) sits on a kink: the
/// forward and backward derivatives of some strain column keep differing as the step shrinks
/// (the check's kink probe, [`crate::diagnose::kink`]). There a returned tangent is one-sided
/// column by column, and the one-sided derivatives along the rotated axes are not the rotated
/// one-sided derivatives (a directional derivative at a kink is not linear in the direction):
/// a correct damage law with a tension split, at principal strains of exactly zero, failed
/// here (a user-style sweep). Returns the largest gap at the smallest step, when a kink.
fn on_a_kink(
    d: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &crate::convention::Convention,
    settings: &crate::settings::Settings,
) -> Result<Option<f64>, crate::routine::Fault> {
    let returned = d.base.tangent.clone();
    let q = crate::diagnose::kink::KinkQuery {
        conv,
        returned: &returned,
        scale: d.strain_scale(settings.step_floor),
        tol: settings.central.tol,
        entry_floor: settings.entry_floor,
        stress_size: d.base.stress.iter().map(|x| x * x).sum::<f64>().sqrt()
            + returned.iter().map(|x| x * x).sum::<f64>().sqrt() * d.strain_scale(settings.step_floor),
    };
    let k = crate::diagnose::kink::probe(d, caller, &q)?;
    let gap = k
        .columns
        .iter()
        .filter(|c| c.detected)
        .filter_map(|c| c.gaps.last())
        .fold(0.0, |a: f64, &b| a.max(b));
    Ok(k.detected.then_some(gap))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rotations_are_orthogonal_and_act_on_mandel_vectors() {
        let r = rotation([1.0, -2.0, 3.0], 0.7);
        for i in 0..3 {
            for j in 0..3 {
                let d: f64 = (0..3).map(|k| r[i][k] * r[j][k]).sum();
                assert!((d - if i == j { 1.0 } else { 0.0 }).abs() < 1e-15);
            }
        }
        // The axis is fixed: R k = k.
        let k = [1.0, -2.0, 3.0];
        for (i, row) in r.iter().enumerate() {
            let v: f64 = (0..3).map(|j| row[j] * k[j]).sum();
            assert!((v - k[i]).abs() < 1e-14);
        }
        let q = mandel_rotation(&r);
        for i in 0..6 {
            for j in 0..6 {
                let d: f64 = (0..6).map(|k| q[i][k] * q[j][k]).sum();
                assert!((d - if i == j { 1.0 } else { 0.0 }).abs() < 1e-14);
            }
        }
        let a = [0.3, -1.2, 0.5, 0.7, -0.4, 0.9];
        let b = rotate_sym(&r, &a);
        let mandel = |x: &[f64; 6]| {
            let s2 = std::f64::consts::SQRT_2;
            [x[0], x[1], x[2], s2 * x[3], s2 * x[4], s2 * x[5]]
        };
        let (ma, mb) = (mandel(&a), mandel(&b));
        for i in 0..6 {
            let v: f64 = (0..6).map(|j| q[i][j] * ma[j]).sum();
            assert!((v - mb[i]).abs() < 1e-14);
        }
        // Invariants survive: trace and norm.
        assert!((a[0] + a[1] + a[2] - b[0] - b[1] - b[2]).abs() < 1e-14);
        assert!((mandel_norm(&a) - mandel_norm(&b)).abs() < 1e-14);
    }
}
