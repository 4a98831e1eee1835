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
//! Where the symmetric part is positive definite no normal can lose ellipticity, and the walk
//! does not search the normals there ([`assess_unless_definite`]): the increment's det Q
//! measure is then the lower bound (λmin/2)^d. The normals of the grid are made once per
//! process, and the start points of the refinement are picked from a partial selection of the
//! grid values instead of a sort of all of them.

use super::Needs;
use nalgebra::{DMatrix, SymmetricEigen};

use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::convention::{Convention, PointKind};
use crate::error::CoreError;
use crate::routine::{Caller, Fault};

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

/// The fourth-order tensor C_ijkl (index i·27 + j·9 + k·3 + l) of a routine tangent.
fn fourth_order(conv: &Convention, tangent: &[f64]) -> [f64; 81] {
    let n = conv.ncomp();
    let mut m = tangent.to_vec();
    conv.tangent_to_mandel(&mut m);
    let mut c = [0.0; 81];
    let s2 = std::f64::consts::SQRT_2;
    for (p, cp) in conv.order().iter().enumerate() {
        let Some((i, j)) = cp.indices() else { continue };
        for (q, cq) in conv.order().iter().enumerate() {
            let Some((k, l)) = cq.indices() else { continue };
            let f = if cp.is_shear() { s2 } else { 1.0 } * if cq.is_shear() { s2 } else { 1.0 };
            let v = m[p + q * n] / f;
            for (a, b) in [(i, j), (j, i)] {
                for (e, g) in [(k, l), (l, k)] {
                    c[a * 27 + b * 9 + e * 3 + g] = v;
                }
            }
        }
    }
    c
}

/// det Q(n) with Q of size `dim` (indices 0..dim).
fn det_q(c: &[f64; 81], n: &[f64; 3], dim: usize) -> f64 {
    let mut q = [[0.0; 3]; 3];
    for (i, row) in q.iter_mut().enumerate().take(dim) {
        for (k, x) in row.iter_mut().enumerate().take(dim) {
            let mut s = 0.0;
            for j in 0..dim {
                for l in 0..dim {
                    s += n[j] * c[i * 27 + j * 9 + k * 3 + l] * n[l];
                }
            }
            *x = s;
        }
    }
    match dim {
        1 => q[0][0],
        2 => q[0][0] * q[1][1] - q[0][1] * q[1][0],
        _ => {
            q[0][0] * (q[1][1] * q[2][2] - q[1][2] * q[2][1])
                - q[0][1] * (q[1][0] * q[2][2] - q[1][2] * q[2][0])
                + q[0][2] * (q[1][0] * q[2][1] - q[1][1] * q[2][0])
        }
    }
}

fn sphere(theta: f64, phi: f64) -> [f64; 3] {
    [theta.sin() * phi.cos(), theta.sin() * phi.sin(), theta.cos()]
}

fn signed(mut n: [f64; 3]) -> [f64; 3] {
    let norm = (n[0] * n[0] + n[1] * n[1] + n[2] * n[2]).sqrt();
    for x in &mut n {
        *x /= norm;
    }
    if let Some(&first) = n.iter().find(|x| x.abs() > 1e-14) {
        if first < 0.0 {
            for x in &mut n {
                *x = -*x;
            }
        }
    }
    n
}

/// Nelder–Mead minimisation of `f` over two variables from `x0` with initial step `step`.
fn nelder_mead(f: impl Fn(f64, f64) -> f64, x0: [f64; 2], step: f64) -> ([f64; 2], f64) {
    let mut s = [x0, [x0[0] + step, x0[1]], [x0[0], x0[1] + step]];
    let mut v = s.map(|p| f(p[0], p[1]));
    for _ in 0..2000 {
        // Order: s[0] best, s[2] worst.
        let mut idx = [0, 1, 2];
        idx.sort_by(|&a, &b| v[a].total_cmp(&v[b]));
        s = idx.map(|i| s[i]);
        v = idx.map(|i| v[i]);
        let size = (1..3).map(|k| (s[k][0] - s[0][0]).hypot(s[k][1] - s[0][1])).fold(0.0, f64::max);
        if size < 1e-11 {
            break;
        }
        let c = [(s[0][0] + s[1][0]) / 2.0, (s[0][1] + s[1][1]) / 2.0];
        let at = |t: f64| [c[0] + t * (s[2][0] - c[0]), c[1] + t * (s[2][1] - c[1])];
        let r = at(-1.0);
        let fr = f(r[0], r[1]);
        if fr < v[0] {
            let e = at(-2.0);
            let fe = f(e[0], e[1]);
            if fe < fr {
                (s[2], v[2]) = (e, fe);
            } else {
                (s[2], v[2]) = (r, fr);
            }
        } else if fr < v[1] {
            (s[2], v[2]) = (r, fr);
        } else {
            let k = if fr < v[2] { at(-0.5) } else { at(0.5) };
            let fk = f(k[0], k[1]);
            if fk < v[2].min(fr) {
                (s[2], v[2]) = (k, fk);
            } else {
                for i in 1..3 {
                    s[i] = [(s[0][0] + s[i][0]) / 2.0, (s[0][1] + s[i][1]) / 2.0];
                    v[i] = f(s[i][0], s[i][1]);
                }
            }
        }
    }
    let best = (0..3).min_by(|&a, &b| v[a].total_cmp(&v[b])).unwrap_or(0);
    (s[best], v[best])
}

/// Golden-section minimisation of `f` on [a, b].
fn golden(f: impl Fn(f64) -> f64, mut a: f64, mut b: f64) -> (f64, f64) {
    let g = (5f64.sqrt() - 1.0) / 2.0;
    let mut x1 = b - g * (b - a);
    let mut x2 = a + g * (b - a);
    let (mut f1, mut f2) = (f(x1), f(x2));
    while b - a > 1e-12 {
        if f1 <= f2 {
            b = x2;
            (x2, f2) = (x1, f1);
            x1 = b - g * (b - a);
            f1 = f(x1);
        } else {
            a = x1;
            (x1, f1) = (x2, f2);
            x2 = a + g * (b - a);
            f2 = f(x2);
        }
    }
    if f1 <= f2 {
        (x1, f1)
    } else {
        (x2, f2)
    }
}

/// The 2° grid of the unit hemisphere (θ from 0 to 90°, φ all round; one point at the
/// pole) as (θ, φ, n), made once per process.
fn hemisphere_grid() -> &'static [(f64, f64, [f64; 3])] {
    static GRID: std::sync::OnceLock<Vec<(f64, f64, [f64; 3])>> = std::sync::OnceLock::new();
    GRID.get_or_init(|| {
        let step = 2f64.to_radians();
        let mut grid = Vec::with_capacity(45 * 180 + 1);
        for i in 0..=45 {
            let t = i as f64 * step;
            let nphi = if i == 0 { 1 } else { 180 };
            for j in 0..nphi {
                let p = j as f64 * step;
                grid.push((t, p, sphere(t, p)));
            }
        }
        grid
    })
}

/// The 1° grid of in-plane normals (θ from 0 to 179°) as (θ, n), made once per process.
fn circle_grid() -> &'static [(f64, [f64; 3])] {
    static GRID: std::sync::OnceLock<Vec<(f64, [f64; 3])>> = std::sync::OnceLock::new();
    GRID.get_or_init(|| {
        let step = 1f64.to_radians();
        (0..180)
            .map(|k| {
                let t = k as f64 * step;
                (t, [t.cos(), t.sin(), 0.0])
            })
            .collect()
    })
}

/// Grid points kept as candidate start points before falling back to ordering them all.
const CANDIDATES: usize = 256;

/// The indices of the grid values `v` in increasing order of (value, index), at least the
/// first `m` of them (all when `m` ≥ the length): a partial selection, not a full sort.
fn smallest_first(v: &[f64], m: usize) -> Vec<usize> {
    let key = |a: &usize, b: &usize| v[*a].total_cmp(&v[*b]).then(a.cmp(b));
    let mut idx: Vec<usize> = (0..v.len()).collect();
    if m < idx.len() {
        idx.select_nth_unstable_by(m, key);
        idx.truncate(m);
    }
    idx.sort_unstable_by(key);
    idx
}

fn acoustic_min(c: &[f64; 81], dim: usize) -> ([f64; 3], f64) {
    match dim {
        1 => ([1.0, 0.0, 0.0], det_q(c, &[1.0, 0.0, 0.0], 1)),
        2 => {
            let f = |t: f64| det_q(c, &[t.cos(), t.sin(), 0.0], 2);
            let step = 1f64.to_radians();
            let grid: Vec<f64> = circle_grid().iter().map(|(_, n)| det_q(c, n, 2)).collect();
            let mut best = (0.0, f64::INFINITY);
            for k in 0..180 {
                let (lo, hi) = (grid[(k + 179) % 180], grid[(k + 1) % 180]);
                if grid[k] <= lo && grid[k] <= hi {
                    let t = k as f64 * step;
                    let r = golden(f, t - step, t + step);
                    if r.1 < best.1 {
                        best = r;
                    }
                }
            }
            ([best.0.cos(), best.0.sin(), 0.0], best.1)
        }
        _ => {
            let f = |t: f64, p: f64| det_q(c, &sphere(t, p), 3);
            let step = 2f64.to_radians();
            let grid = hemisphere_grid();
            let values: Vec<f64> = grid.iter().map(|(_, _, n)| det_q(c, n, 3)).collect();
            // Start points: the best grid points more than 10° apart (n and −n alike), taken
            // in order of value (ties in grid order) from the best few hundred; all of them
            // are ordered only when those few hundred do not hold five such points.
            let apart = 10f64.to_radians().cos();
            let pick = |order: &[usize]| {
                let mut starts: Vec<(f64, f64)> = Vec::new();
                for &k in order {
                    let (t, p, n) = grid[k];
                    let far = starts.iter().all(|&(u, q)| {
                        let m = sphere(u, q);
                        (n[0] * m[0] + n[1] * m[1] + n[2] * m[2]).abs() < apart
                    });
                    if far {
                        starts.push((t, p));
                        if starts.len() == 5 {
                            break;
                        }
                    }
                }
                starts
            };
            let mut starts = pick(&smallest_first(&values, CANDIDATES));
            if starts.len() < 5 && CANDIDATES < values.len() {
                starts = pick(&smallest_first(&values, values.len()));
            }
            let mut best = ([0.0, 0.0], f64::INFINITY);
            for (t, p) in starts {
                let r = nelder_mead(f, [t, p], step);
                if r.1 < best.1 {
                    best = r;
                }
            }
            (sphere(best.0[0], best.0[1]), best.1)
        }
    }
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
    let (normal, min_det) = acoustic_min(&c, dim);
    Some(Acoustic { min_det, normal: signed(normal), dim })
}

/// Both measures of one routine tangent.
pub fn assess(conv: &Convention, tangent: &[f64]) -> Assessment {
    let n = conv.ncomp();
    let mut m = tangent.to_vec();
    conv.tangent_to_mandel(&mut m);
    let mm = DMatrix::from_column_slice(n, n, &m);
    let sym = (&mm + mm.transpose()) * 0.5;
    let eig = SymmetricEigen::new(sym).eigenvalues;
    let min_eigenvalue = eig.iter().cloned().fold(f64::INFINITY, f64::min);
    let scale = eig.iter().fold(0.0f64, |a, x| a.max(x.abs()));
    Assessment { min_eigenvalue, scale, acoustic: acoustic(conv, tangent), bound_only: false }
}

/// [`assess`], without the search over normals where the symmetric part of the Mandel tangent
/// is positive definite (λmin/s > `tol`). There no normal can lose ellipticity: for a unit
/// vector a, a·Q(n)·a = E:C:E with E = sym(a⊗n), |E|² = (1 + (a·n)²)/2 ≥ 1/2, so the symmetric
/// part of Q(n) has eigenvalues ≥ λmin/2 and det Q(n) ≥ (λmin/2)^d (Ostrowski–Taussky: the
/// determinant of a matrix with a positive definite symmetric part is at least that part's
/// determinant; Horn & Johnson, Topics in Matrix Analysis, 1991, §2.2 — from memory).
pub fn assess_unless_definite(conv: &Convention, tangent: &[f64], tol: f64) -> Assessment {
    let n = conv.ncomp();
    let mut m = tangent.to_vec();
    conv.tangent_to_mandel(&mut m);
    let mm = DMatrix::from_column_slice(n, n, &m);
    let sym = (&mm + mm.transpose()) * 0.5;
    let eig = SymmetricEigen::new(sym).eigenvalues;
    let min_eigenvalue = eig.iter().cloned().fold(f64::INFINITY, f64::min);
    let scale = eig.iter().fold(0.0f64, |a, x| a.max(x.abs()));
    let definite = min_eigenvalue > 0.0 && min_eigenvalue / scale.max(f64::MIN_POSITIVE) > tol;
    match dim_of(conv.kind()) {
        Some(dim) if definite => Assessment {
            min_eigenvalue,
            scale,
            acoustic: Some(Acoustic {
                min_det: (0.5 * min_eigenvalue).powi(dim as i32),
                normal: [f64::NAN; 3],
                dim,
            }),
            bound_only: true,
        },
        _ => Assessment { min_eigenvalue, scale, acoustic: acoustic(conv, tangent), bound_only: false },
    }
}

/// Walk the path and assess the tangent at each probed increment. A non-finite tangent
/// is a fault of the routine.
pub fn survey(caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<Survey, (usize, Fault)> {
    let conv = caller.info().convention.clone();
    let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
    let mut s = Survey { increments: Vec::new(), first_softening: None, first_loss: None };
    walk(caller, env, |k, d, _| {
        if !env.spec.runs_at(k) {
            return Ok(());
        }
        if let Some(i) = d.base.tangent.iter().position(|x| !x.is_finite()) {
            return Err(Fault::Unsupported(format!(
                "the returned tangent has a non-finite entry ({} at position {i})",
                d.base.tangent[i]
            )));
        }
        let a = assess_unless_definite(&conv, &d.base.tangent, tol);
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
            Err((k, f)) => return Ok(faulted("stability", k, &f)),
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
                parts.push(format!(
                    "ellipticity lost at increment {k}, band normal {} at {:.1}° from axis 1",
                    vector(&ac.normal),
                    ac.angle_from_axis1()
                ));
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
mod tests {
    use super::*;
    use crate::convention::ShearMeasure;

    /// Isotropic elasticity in a convention's order: C = λ 1⊗1 + 2μ I_sym (engineering shear:
    /// the shear diagonal is μ).
    fn isotropic(conv: &Convention, lambda: f64, mu: f64) -> Vec<f64> {
        let n = conv.ncomp();
        let mut t = vec![0.0; n * n];
        for (i, ci) in conv.order().iter().enumerate() {
            for (j, cj) in conv.order().iter().enumerate() {
                t[i + j * n] = match (ci.is_shear(), cj.is_shear()) {
                    (false, false) => lambda + if i == j { 2.0 * mu } else { 0.0 },
                    (true, true) if i == j => match conv.shear() {
                        ShearMeasure::Engineering => mu,
                        ShearMeasure::Tensor => 2.0 * mu,
                    },
                    _ => 0.0,
                };
            }
        }
        t
    }

    // For isotropic elasticity Q(n) = μ 1 + (λ + μ) n⊗n for every unit n (the classical
    // acoustic tensor of isotropic elasticity), so det Q = μ²(λ + 2μ) in 3D and μ(λ + 2μ)
    // in the plane, whatever the order or shear measure of the routine.
    #[test]
    fn isotropic_elasticity_has_the_classical_acoustic_determinant() {
        let (lambda, mu) = (115384.6, 76923.1);
        for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
            let conv =
                Convention::from_labels(PointKind::Solid3d, &["12", "11", "23", "33", "13", "22"], shear)
                    .unwrap();
            let (d, n) = min_det_acoustic(&conv, &isotropic(&conv, lambda, mu));
            let want = mu * mu * (lambda + 2.0 * mu);
            assert!((d / want - 1.0).abs() < 1e-12, "{d} vs {want}");
            assert!((n[0] * n[0] + n[1] * n[1] + n[2] * n[2] - 1.0).abs() < 1e-12);
            let conv = Convention::new(PointKind::PlaneStrain, shear);
            let (d, _) = min_det_acoustic(&conv, &isotropic(&conv, lambda, mu));
            assert!((d / (mu * (lambda + 2.0 * mu)) - 1.0).abs() < 1e-12);
        }
        let a = assess(&Convention::new(PointKind::Solid3d, ShearMeasure::Engineering), &{
            let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
            isotropic(&conv, lambda, mu)
        });
        // Eigenvalues of isotropic elasticity in Mandel form: 3λ + 2μ once, 2μ five times.
        assert!((a.scale - (3.0 * lambda + 2.0 * mu)).abs() < 1e-6);
        assert!((a.min_eigenvalue - 2.0 * mu).abs() < 1e-6);
        let conv = Convention::new(PointKind::Cohesive3d, ShearMeasure::Engineering);
        assert!(min_det_acoustic(&conv, &[1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0]).0.is_nan());
    }

    // The refined minimum is a true minimum: never above a brute-force scan on a 0.25° grid of
    // the hemisphere, and close to it (the grid's error is second order in its spacing), for a
    // tangent with a weak 12 shear mode (C1212 < 0: det Q(e₁) = −(λ + 2μ)μ|C1212|) plus an
    // unsymmetric, anisotropic perturbation.
    #[test]
    fn the_refined_minimum_beats_a_fine_scan() {
        let (lambda, mu) = (100.0, 80.0);
        let conv = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
        let mut t = isotropic(&conv, lambda, mu);
        t[5 + 5 * 6] = -1.0;
        for (k, x) in t.iter_mut().enumerate() {
            *x += 3.0 * ((k * 37 % 11) as f64 / 11.0 - 0.5);
        }
        let (d, n) = min_det_acoustic(&conv, &t);
        let c = fourth_order(&conv, &t);
        assert!((det_q(&c, &n, 3) - d).abs() <= 1e-12 * d.abs());
        let step = 0.25f64.to_radians();
        let mut brute = f64::INFINITY;
        for i in 0..=360 {
            for j in 0..1440 {
                brute = brute.min(det_q(&c, &sphere(i as f64 * step, j as f64 * step), 3));
            }
        }
        // The grid's error: (half a step)² times the curvature, of order the det scale.
        let det_scale = mu * mu * (lambda + 2.0 * mu);
        assert!(d <= brute + 1e-12 * det_scale, "refined {d}, scan {brute}");
        assert!(brute - d <= 1e-4 * det_scale, "refined {d}, scan {brute}");
        // And a local minimum: no smaller value 1e-4 rad away in any direction.
        let t0 = n[2].clamp(-1.0, 1.0).acos();
        let p0 = n[1].atan2(n[0]);
        for k in 0..16 {
            let a = k as f64 * std::f64::consts::PI / 8.0;
            let v = det_q(&c, &sphere(t0 + 1e-4 * a.cos(), p0 + 1e-4 * a.sin() / t0.sin().max(1e-3)), 3);
            assert!(v >= d - 1e-12 * det_scale, "{v} < {d}");
        }
        assert!(d < 0.0, "{d}");
    }
}
