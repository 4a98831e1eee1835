//! The stability probe: two material-stability measures of the returned tangent at each
//! increment along the path (or at the increments of `at`).
//!
//! - **Positive definiteness** of the symmetric part of the tangent in Mandel form: its
//!   smallest eigenvalue. Where it is ≤ 0 the material softens in some strain direction
//!   (second-order work can be negative).
//! - **Ellipticity**: the acoustic tensor Q(n)_ik = n_j C_ijkl n_l of the fourth-order tangent
//!   C_ijkl, minimised over unit normals n. Where min det Q(n) ≤ 0 a band with normal n can
//!   form: the rate equations lose ellipticity, the onset of localization (Rudnicki & Rice
//!   1975, JMPS 23:371–394; Rice 1976, 14th IUTAM Congress).
//!
//! The fourth-order tangent comes from the Mandel form M of the routine's tangent:
//! C_ijkl = M(I, J)/(f_I f_J), f = √2 for shear components and 1 otherwise; components the
//! kind lacks are zero. Normals: for solid-3d points the unit hemisphere, scanned on a 2° grid
//! in (θ, φ) and refined by Nelder–Mead from the best few distinct grid points; for the
//! in-plane kinds (plane strain, axisymmetric, plane stress) normals in the 1–2 plane with the
//! 2×2 in-plane acoustic tensor, scanned on a 1° grid and refined by golden-section search
//! around every grid minimum; for a uniaxial point the one normal e₁ (Q = C₁₁₁₁). Cohesive
//! points get the eigenvalue measure only.
//!
//! Both measures are made dimensionless with s, the largest |eigenvalue| of the symmetric
//! part of the Mandel tangent at the same increment: λ_min/s and min det Q/s^d (d = 1, 2 or 3,
//! the size of Q). A value ≤ `tol` (default 1e-12, so that a critical state whose exact value
//! is 0 counts as lost whatever the rounding) marks softening or lost ellipticity.
//!
//! The probe is informative: it passes, and its summary says where the symmetric part stops
//! being positive definite and where ellipticity is lost, with the band normal (as a vector,
//! and as its angle from axis 1). Its value is the smallest normalised min det Q(n) along the
//! path (the smallest normalised eigenvalue for cohesive points). It fails only when the
//! routine fails during the walk.
//!
//! Where the symmetric part is positive definite no normal can lose ellipticity, and where it
//! is so by enough that the lower bound (λmin/2s)^d of min det Q/s^d clears the tolerance the
//! walk does not search the normals ([`assess_unless_definite`]): the increment's det Q
//! measure is then that bound. Closer to the tolerance the normals are searched as elsewhere. The normals of the grid are made once per
//! process, and the start points of the refinement are picked from a partial selection of the
//! grid values instead of a sort of all of them.

use nalgebra::{DMatrix, SymmetricEigen};

use super::{faulted, walk, Needs, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::convention::{Convention, PointKind};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::routine::{Caller, Fault};

mod normals;

use normals::{acoustic_min, fourth_order, signed};

pub struct Stability;

/// Default threshold of the normalised measures.
pub const DEFAULT_TOL: f64 = 1e-12;

/// The minimum of det Q(n) over normals and where it is reached.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Acoustic {
    /// min over n of det Q(n), in stress units to the power `dim`.
    pub min_det: f64,
    /// The minimising unit normal (n₃ = 0 for the in-plane kinds), signed so that its first
    /// nonzero component is positive.
    pub normal: [f64; 3],
    /// Size of Q: 3 for solid-3d, 2 for the in-plane kinds, 1 for uniaxial.
    pub dim: usize,
    /// The largest |det Q(n)| over the grid of normals (NaN where not searched): where it is
    /// as small as the minimum, no normal is singled out.
    pub max_abs_det: f64,
}

impl Acoustic {
    /// Angle of the band normal from axis 1, in degrees (0 to 90).
    pub fn angle_from_axis1(&self) -> f64 {
        self.normal[0].abs().min(1.0).acos().to_degrees()
    }
}

/// Both measures at one tangent.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Assessment {
    /// Smallest eigenvalue of the symmetric part of the Mandel tangent.
    pub min_eigenvalue: f64,
    /// Largest |eigenvalue| of the symmetric part: the scale s of the normalised measures.
    pub scale: f64,
    /// None for cohesive points.
    pub acoustic: Option<Acoustic>,
    /// The normals were not searched because the symmetric part is positive definite, so no
    /// normal can lose ellipticity: `acoustic.min_det` is then a lower bound, (λmin/2)^d, and
    /// its normal is undetermined (NaN). See [`assess_unless_definite`].
    pub bound_only: bool,
}

impl Assessment {
    /// λ_min / s.
    pub fn eigen_ratio(&self) -> f64 {
        self.min_eigenvalue / self.scale.max(f64::MIN_POSITIVE)
    }
    /// min det Q / s^d.
    pub fn det_ratio(&self) -> Option<f64> {
        self.acoustic.map(|a| a.min_det / self.scale.max(f64::MIN_POSITIVE).powi(a.dim as i32))
    }
}

/// The measures along a path.
#[derive(Clone, Debug, PartialEq)]
pub struct Survey {
    /// (increment, assessment) at each probed increment.
    pub increments: Vec<(usize, Assessment)>,
    /// First increment whose symmetric part is not positive definite (λ_min/s ≤ tol).
    pub first_softening: Option<usize>,
    /// First increment where ellipticity is lost (min det Q/s^d ≤ tol), with its measures.
    pub first_loss: Option<(usize, Assessment)>,
}

/// The minimum over unit normals n of det Q(n), Q(n)_ik = n_j C_ijkl n_l, of a routine
/// tangent (column-major, routine order and shear measure), and the minimising normal.
///
/// Normals: the unit hemisphere for solid-3d points, the 1–2 plane (2×2 Q) for plane strain,
/// axisymmetric and plane stress points, e₁ for a uniaxial point. Cohesive points have no
/// acoustic tensor: (NaN, [NaN; 3]).
pub fn min_det_acoustic(conv: &Convention, tangent: &[f64]) -> (f64, [f64; 3]) {
    match acoustic(conv, tangent) {
        Some(a) => (a.min_det, a.normal),
        None => (f64::NAN, [f64::NAN; 3]),
    }
}

fn dim_of(kind: PointKind) -> Option<usize> {
    match kind {
        PointKind::Solid3d => Some(3),
        PointKind::PlaneStrain | PointKind::Axisymmetric | PointKind::PlaneStress => Some(2),
        PointKind::Uniaxial => Some(1),
        PointKind::Cohesive3d | PointKind::Cohesive2d => None,
    }
}

fn acoustic(conv: &Convention, tangent: &[f64]) -> Option<Acoustic> {
    let dim = dim_of(conv.kind())?;
    let c = fourth_order(conv, tangent);
    let (normal, min_det, max_abs_det) = acoustic_min(&c, dim);
    Some(Acoustic { min_det, normal: signed(normal), dim, max_abs_det })
}

/// The smallest eigenvalue and the largest |eigenvalue| of the symmetric part of a routine
/// tangent in Mandel form.
fn symmetric_extremes(conv: &Convention, tangent: &[f64]) -> (f64, f64) {
    let n = conv.ncomp();
    let mut m = tangent.to_vec();
    conv.tangent_to_mandel(&mut m);
    let mm = DMatrix::from_column_slice(n, n, &m);
    let sym = (&mm + mm.transpose()) * 0.5;
    let eig = SymmetricEigen::new(sym).eigenvalues;
    let min_eigenvalue = eig.iter().cloned().fold(f64::INFINITY, f64::min);
    let scale = eig.iter().fold(0.0f64, |a, x| a.max(x.abs()));
    (min_eigenvalue, scale)
}

/// Both measures of one routine tangent.
pub fn assess(conv: &Convention, tangent: &[f64]) -> Assessment {
    let (min_eigenvalue, scale) = symmetric_extremes(conv, tangent);
    Assessment { min_eigenvalue, scale, acoustic: acoustic(conv, tangent), bound_only: false }
}

/// [`assess`], without the search over normals where the symmetric part of the Mandel tangent
/// is positive definite enough that no normal can come within the tolerance of losing
/// ellipticity: (λmin/2s)^d > `tol`, the bound below on min det Q/s^d that marks a loss. For a unit
/// vector a, a·Q(n)·a = E:C:E with E = sym(a⊗n), |E|² = (1 + (a·n)²)/2 ≥ 1/2, so the symmetric
/// part of Q(n) has eigenvalues ≥ λmin/2 and det Q(n) ≥ (λmin/2)^d (Ostrowski–Taussky: the
/// determinant of a matrix with a positive definite symmetric part is at least that part's
/// determinant; Horn & Johnson, Topics in Matrix Analysis, 1991, §2.2 — from memory).
pub fn assess_unless_definite(conv: &Convention, tangent: &[f64], tol: f64) -> Assessment {
    let (min_eigenvalue, scale) = symmetric_extremes(conv, tangent);
    let s = scale.max(f64::MIN_POSITIVE);
    // The bound must clear the tolerance itself, not only be positive: a loss is marked at
    // det ratio ≤ tol, and the search finds ratios between the bound and λmin/s.
    let clears = |dim: usize| min_eigenvalue > 0.0 && (0.5 * min_eigenvalue / s).powi(dim as i32) > tol;
    match dim_of(conv.kind()) {
        Some(dim) if clears(dim) => Assessment {
            min_eigenvalue,
            scale,
            acoustic: Some(Acoustic {
                min_det: (0.5 * min_eigenvalue).powi(dim as i32),
                normal: [f64::NAN; 3],
                dim,
                max_abs_det: f64::NAN,
            }),
            bound_only: true,
        },
        _ => Assessment { min_eigenvalue, scale, acoustic: acoustic(conv, tangent), bound_only: false },
    }
}

/// The returned tangent of increment `k` when the spec probes it, a fault of the routine when
/// an entry is not finite: how the stability and the softening probes read an increment.
pub(super) fn probed_tangent<'d>(
    env: &ProbeEnv<'_>,
    k: usize,
    d: &'d Driver,
) -> Result<Option<&'d [f64]>, Fault> {
    if !env.spec.runs_at(k) {
        return Ok(None);
    }
    if let Some(i) = d.base.tangent.iter().position(|x| !x.is_finite()) {
        return Err(Fault::Unsupported(format!(
            "{NON_FINITE_TANGENT} ({} at position {i})",
            d.base.tangent[i]
        )));
    }
    Ok(Some(&d.base.tangent))
}

/// The words of [`probed_tangent`]'s error for a tangent entry that is not a finite number.
const NON_FINITE_TANGENT: &str = "the returned tangent has a non-finite entry";

/// The result of a probe whose walk ended at increment `k` with `f`: a tangent entry that is
/// not a finite number fails the probe, as it fails the tangent check (exit 1, finding
/// `non-finite-output`), and is no fault of the routine's (a crash, a failure status, a guard
/// finding); the probe suite said FAULT, exit 3, where `check` said FAIL (a user-style sweep).
pub(super) fn walk_ended(name: &str, k: usize, f: &Fault) -> ProbeResult {
    match f {
        Fault::Unsupported(m) if m.starts_with(NON_FINITE_TANGENT) => {
            let mut r = ProbeResult::new(
                name,
                ProbeStatus::Fail,
                format!("{m} at increment {k}: no number to assess there (the path stops)"),
            );
            r.increment = Some(k);
            r
        }
        _ => faulted(name, k, f),
    }
}

/// Walk the path and assess the tangent at each probed increment. A non-finite tangent
/// is a fault of the routine.
pub fn survey(caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<Survey, (usize, Fault)> {
    let conv = caller.info().convention.clone();
    let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
    let mut s = Survey { increments: Vec::new(), first_softening: None, first_loss: None };
    walk(caller, env, |k, d, _| {
        let Some(tangent) = probed_tangent(env, k, d)? else {
            return Ok(());
        };
        let a = assess_unless_definite(&conv, tangent, tol);
        if s.first_softening.is_none() && a.eigen_ratio() <= tol {
            s.first_softening = Some(k);
        }
        if s.first_loss.is_none() && !a.bound_only && a.det_ratio().is_some_and(|r| r <= tol) {
            s.first_loss = Some((k, a));
        }
        s.increments.push((k, a));
        Ok(())
    })?;
    Ok(s)
}

fn vector(n: &[f64; 3]) -> String {
    format!("({:.4}, {:.4}, {:.4})", n[0], n[1], n[2])
}

impl Probe for Stability {
    fn name(&self) -> &'static str {
        "stability"
    }
    fn needs(&self) -> Needs {
        Needs::TANGENT
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let s = match survey(caller, env) {
            Ok(s) => s,
            Err((k, f)) => return Ok(walk_ended("stability", k, &f)),
        };
        if s.increments.is_empty() {
            return Ok(ProbeResult::skipped("stability", "no increment of the path is probed (see `at`)"));
        }
        let min_eig = s.increments.iter().map(|(_, a)| a.eigen_ratio()).fold(f64::INFINITY, f64::min);
        let min_det = s.increments.iter().filter_map(|(_, a)| a.det_ratio()).fold(f64::INFINITY, f64::min);
        let has_acoustic = min_det.is_finite();
        let mut parts = Vec::new();
        match &s.first_loss {
            Some((k, a)) => {
                let ac = a.acoustic.expect("a loss has an acoustic tensor");
                let largest = ac.max_abs_det / a.scale.max(f64::MIN_POSITIVE).powi(ac.dim as i32);
                if largest <= tol {
                    // Singular for every normal: a tangent that holds the stress in the
                    // directions of any band (a return to the apex of a pressure-dependent
                    // surface without hardening gives a tangent of rank one or zero), where a
                    // minimising normal is an accident of rounding (a user-style sweep named one).
                    parts.push(format!(
                        "ellipticity lost at increment {k} for every normal: det Q(n)/s^{} is at most \
                         {largest:.3e} over all of them (the tangent is singular in every band's directions, as \
                         a return that holds the stress gives), so no band normal is singled out",
                        ac.dim
                    ));
                } else {
                    parts.push(format!(
                        "ellipticity lost at increment {k}, band normal {} at {:.1}° from axis 1",
                        vector(&ac.normal),
                        ac.angle_from_axis1()
                    ));
                }
            }
            None if has_acoustic && s.increments.iter().all(|(_, a)| a.bound_only) => parts.push(format!(
                "elliptic along the path: the symmetric part is positive definite at every increment \
                 (min det Q(n)/s^d ≥ {min_det:.3e})"
            )),
            None if has_acoustic => {
                parts.push(format!("elliptic along the path (min det Q(n)/s^d = {min_det:.3e})"))
            }
            None => parts.push("no acoustic tensor for a cohesive point".into()),
        }
        match s.first_softening {
            Some(k) => parts.push(format!("symmetric part not positive definite from increment {k}")),
            None => parts.push(format!("symmetric part positive definite (λmin/s ≥ {min_eig:.3e})")),
        }
        let mut r = ProbeResult::new("stability", ProbeStatus::Pass, parts.join("; "));
        r.value = Some(if has_acoustic { min_det } else { min_eig });
        r.tol = Some(tol);
        for (k, a) in &s.increments {
            let mut line = format!("increment {k}: λmin/s = {:.3e} (s = {:.4e})", a.eigen_ratio(), a.scale);
            if a.bound_only {
                if let (Some(ac), Some(q)) = (a.acoustic, a.det_ratio()) {
                    line.push_str(&format!(
                        ", min det Q/s^{} ≥ {q:.3e} (symmetric part positive definite: normals not searched)",
                        ac.dim
                    ));
                }
            } else if let (Some(ac), Some(q)) = (a.acoustic, a.det_ratio()) {
                line.push_str(&format!(
                    ", min det Q/s^{} = {q:.3e} at n = {} ({:.2}° from axis 1)",
                    ac.dim,
                    vector(&ac.normal),
                    ac.angle_from_axis1()
                ));
            }
            r.details.push(line);
        }
        let curve = |name: &str, f: &dyn Fn(&Assessment) -> Option<f64>| super::ProbeSeries {
            name: name.into(),
            x: "increment".into(),
            y: name.into(),
            log_y: false,
            points: s.increments.iter().filter_map(|(k, a)| f(a).map(|v| [*k as f64, v])).collect(),
        };
        if has_acoustic {
            r.series.push(curve("min det Q(n) / s^d", &|a| a.det_ratio()));
        }
        r.series.push(curve("λmin / s", &|a| Some(a.eigen_ratio())));
        Ok(r)
    }
}

#[cfg(test)]
mod tests;
