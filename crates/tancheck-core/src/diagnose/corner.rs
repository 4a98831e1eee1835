//! Corners: where several branches of the update meet at the point (the apex or an edge of a
//! pressure-dependent yield surface, two active faces, a vertex of a damage surface), its
//! derivative is a set: the derivative of each branch that starts there. Any one of them
//! serves Newton's method (an element of the generalized Jacobian of a piecewise smooth map;
//! Clarke 1983, and the semismooth Newton method of Qi & Sun 1993, from memory), and a routine
//! at a corner returns the one its active set picks.
//!
//! The kink probe moves one strain component at a time, and along ±e_j it may enter two other
//! branches than the routine's: at an apex an opening stays at the apex while a slip either way
//! leaves it along one face or the other, so the apex's tangent matches neither side of the slip
//! column. The search here looks for the routine's branch in other directions: for each
//! candidate direction d it makes a call a short way along d (and a second, shorter, where the
//! first agrees) and compares the difference quotient with the returned tangent times d (a
//! sieve); the best candidates get a whole central-difference tangent at two depths into the
//! branch, forward and backward differences agreeing there (inside the branch, not on its
//! boundary), extrapolated to the point, which must equal the returned tangent within the kink
//! probe's tolerance. A tangent that is no branch's derivative (the mean of two sides, a
//! branch's derivative with a term wrong) matches none of them.

use super::kink::{Corner, KinkQuery, GAP_LEVEL};
use crate::compare::compare;
use crate::convention::Component;
use crate::driver::{Direction, Driver};
use crate::routine::Caller;
use crate::schemes::Scheme;

/// How far into a branch the search looks, relative to the strain scale (and a tenth of it
/// for the second tangent). Why 1e-5: the kink probe's largest step, far above rounding,
/// while a branch's derivative changes over it by about this share of its curvature, which
/// the extrapolation from the two depths removes to first order.
pub const DEPTH: f64 = 1e-5;

/// The central-difference step of the tangent a short way into a branch, relative to the
/// strain scale: the kink probe's smallest step, a tenth of the nearer depth (a tenth of
/// [`DEPTH`]), so that the difference stays within the branch unless the branch is narrower
/// than about six degrees.
pub const STEP: f64 = 1e-7;

/// A candidate passes the sieve when its difference quotients over [`DEPTH`] and over [`STEP`]
/// are within this of the returned tangent times the direction (relative to their size). Why
/// 1e-3: within a branch the quotient is off by about the depth times the curvature; another
/// branch's is off by the branch gap, which makes a kink only above 1e-4 (a sieve only: the
/// whole tangent decides). The shorter depth asks the branch to start at the point: a boundary
/// a hair beyond it (a wrong plastic tangent returned 1e-10 inside the elastic range, the
/// plastic branch starting there) mixes the two slopes in the shorter quotient.
const SIEVE: f64 = 1e-3;

/// Candidates that passed the sieve and get a whole tangent, best sieve first.
const CONFIRM: usize = 4;

/// Directions drawn at random (a fixed sequence, the same every run), beside the coordinate
/// directions, their pairs, the volumetric one and the principal ones.
const DRAWN: usize = 48;

/// The direction in words, e.g. "0.71·11 + 0.71·22".
fn words(q: &KinkQuery<'_>, direction: &[f64]) -> String {
    let mut parts = Vec::new();
    for (j, &x) in direction.iter().enumerate() {
        if x.abs() >= 0.005 {
            let sign = match (parts.is_empty(), x < 0.0) {
                (true, true) => "−",
                (true, false) => "",
                (false, true) => " − ",
                (false, false) => " + ",
            };
            parts.push(format!("{sign}{:.2}·{}", x.abs(), q.conv.order()[j].label()));
        }
    }
    parts.concat()
}

/// The candidate directions for `n` components: the increment's own (when it has one), ±e_j,
/// (±e_i ± e_j)/√2, ± the volumetric direction and the principal ones of `stress` (solids),
/// then [`DRAWN`] drawn ones.
fn candidates(q: &KinkQuery<'_>, dstrain: &[f64], stress: &[f64]) -> Vec<Vec<f64>> {
    let n = q.conv.ncomp();
    let mut out: Vec<Vec<f64>> = Vec::new();
    let unit = |v: Vec<f64>| {
        let norm = v.iter().map(|x| x * x).sum::<f64>().sqrt();
        (norm > 0.0 && norm.is_finite()).then(|| v.iter().map(|x| x / norm).collect::<Vec<f64>>())
    };
    out.extend(unit(dstrain.to_vec()));
    for j in 0..n {
        for s in [1.0, -1.0] {
            let mut v = vec![0.0; n];
            v[j] = s;
            out.push(v);
        }
    }
    for i in 0..n {
        for j in i + 1..n {
            for (a, b) in [(1.0, 1.0), (1.0, -1.0), (-1.0, 1.0), (-1.0, -1.0)] {
                let mut v = vec![0.0; n];
                (v[i], v[j]) = (a, b);
                out.extend(unit(v));
            }
        }
    }
    let normal: Vec<usize> = (0..n)
        .filter(|&j| matches!(q.conv.order()[j], Component::C11 | Component::C22 | Component::C33))
        .collect();
    if normal.len() >= 2 {
        for s in [1.0, -1.0] {
            let mut v = vec![0.0; n];
            for &j in &normal {
                v[j] = s;
            }
            out.extend(unit(v));
        }
        out.extend(principal(q, stress).into_iter().filter_map(unit));
    }
    // SplitMix64 (Steele, Lea & Flood 2014), uniform in (−1, 1) per entry: directions spread
    // over the sphere well enough for a search, the same on every machine.
    let mut seed: u64 = 0x9e37_79b9_7f4a_7c15;
    let mut next = || {
        seed = seed.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = seed;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^= z >> 31;
        (z >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
    };
    for _ in 0..DRAWN {
        let v: Vec<f64> = (0..n).map(|_| next()).collect();
        out.extend(unit(v));
    }
    out
}

/// Strains along the principal directions p_k of `stress` (a solid's): ±p_k⊗p_k and
/// ±(p_i⊗p_i ± p_j⊗p_j). Where two principal stresses are equal (the edge of a yield surface
/// written in principal stresses) the branch that keeps them equal is entered along the sum of
/// their projectors, which the coordinate directions miss unless the axes are the coordinate
/// axes.
fn principal(q: &KinkQuery<'_>, stress: &[f64]) -> Vec<Vec<f64>> {
    let mut c = [0.0; 6];
    q.conv.stress_to_canonical(stress, &mut c);
    let m = nalgebra::Matrix3::new(c[0], c[5], c[4], c[5], c[1], c[3], c[4], c[3], c[2]);
    if !m.iter().all(|x| x.is_finite()) {
        return Vec::new();
    }
    let p = nalgebra::SymmetricEigen::new(m).eigenvectors;
    let proj = |k: usize| p.column(k) * p.column(k).transpose();
    let mut sums = Vec::new();
    for k in 0..3 {
        sums.push(proj(k));
    }
    for (i, j) in [(0, 1), (0, 2), (1, 2)] {
        sums.push(proj(i) + proj(j));
        sums.push(proj(i) - proj(j));
    }
    let n = q.conv.ncomp();
    let mut out = Vec::new();
    for t in sums {
        for s in [1.0, -1.0] {
            let canon =
                [s * t[(0, 0)], s * t[(1, 1)], s * t[(2, 2)], s * t[(1, 2)], s * t[(0, 2)], s * t[(0, 1)]];
            let mut v = vec![0.0; n];
            q.conv.strain_from_canonical(&canon, &mut v);
            out.push(v);
        }
    }
    out
}

/// The central tangent at the driver's increment into `out` (the mean of the forward and the
/// backward columns, the same two calls a central column makes), and whether the point lies
/// inside a branch there: its forward and backward differences agree in every column within
/// the kink probe's gap level. `None` when a call faults.
fn branch_tangent(
    d: &mut Driver,
    caller: &mut Caller<'_>,
    q: &KinkQuery<'_>,
    h: f64,
    out: &mut [f64],
) -> Option<bool> {
    let n = q.conv.ncomp();
    d.base_call(caller).ok()?;
    let (mut fwd, mut bwd) = (vec![0.0; n * n], vec![0.0; n * n]);
    for j in 0..n {
        let col = j * n..(j + 1) * n;
        Scheme::Forward.column(d, caller, Direction::Strain(j), h, &mut fwd[col.clone()]).ok()?;
        Scheme::Backward.column(d, caller, Direction::Strain(j), h, &mut bwd[col]).ok()?;
    }
    for ((o, f), b) in out.iter_mut().zip(&fwd).zip(&bwd) {
        *o = 0.5 * (f + b);
    }
    let gaps = compare(q.conv, &bwd, &fwd, f64::INFINITY, q.entry_floor, 0).column_errors;
    Some(gaps.iter().all(|g| *g <= GAP_LEVEL))
}

/// Look for a branch at the point whose derivative the returned tangent (`q.returned`) is.
/// `driver` holds the increment (its base call made); it is left as it was. A call that
/// faults or is refused ends the search with nothing found.
pub fn search(driver: &Driver, caller: &mut Caller<'_>, q: &KinkQuery<'_>) -> Option<Corner> {
    let n = q.conv.ncomp();
    let base: Vec<f64> = driver.dstrain().to_vec();
    let sigma0 = driver.base.stress.clone();
    let t = DEPTH * q.scale;
    let norm = |v: &[f64]| v.iter().map(|x| x * x).sum::<f64>().sqrt();
    let dnorm = norm(q.returned);
    let mut d = driver.clone();
    let dirs = candidates(q, &base, &sigma0);
    let mut sieved: Vec<(f64, usize)> = Vec::new();
    let mut shifted = vec![0.0; n];
    let mut dd = vec![0.0; n];
    for (k, dir) in dirs.iter().enumerate() {
        // D·d in stress per unit of the scaled direction, against the quotient.
        for (r, x) in dd.iter_mut().enumerate() {
            *x = (0..n).map(|j| q.returned[j * n + r] * dir[j]).sum::<f64>();
        }
        let mut worst: f64 = 0.0;
        for depth in [t, STEP * q.scale] {
            for j in 0..n {
                shifted[j] = base[j] + depth * dir[j];
            }
            d.set_dstrain(&shifted);
            d.base_call(caller).ok()?;
            let mut gap = 0.0;
            let mut quotient = 0.0;
            for r in 0..n {
                let g = (d.base.stress[r] - sigma0[r]) / depth;
                gap += (g - dd[r]) * (g - dd[r]);
                quotient += g * g;
            }
            let size = norm(&dd).max(quotient.sqrt()).max(q.entry_floor * dnorm);
            // A NaN (a refused or broken call) counts as off.
            let err = gap.sqrt() / size;
            worst = if err.is_nan() { f64::INFINITY } else { worst.max(err) };
            if worst > SIEVE {
                break;
            }
        }
        if worst <= SIEVE {
            sieved.push((worst, k));
        }
    }
    // Those plainly in the returned tangent's branch (the quotient within the kink probe's
    // tolerance) in the order of the list, the plainer directions first; then the rest, best
    // first.
    sieved.sort_by(|a, b| {
        (a.0 > q.tol).cmp(&(b.0 > q.tol)).then(if a.0 > q.tol { a.0.total_cmp(&b.0) } else { a.1.cmp(&b.1) })
    });
    // The branch's derivative at the point: its central tangent at two depths, DEPTH and a
    // tenth of it, extrapolated linearly to the point (within a branch it changes smoothly; the
    // change over DEPTH alone, a few 1e-5, reads as 5e-3 along the soft direction of an
    // edge's nearly singular tangent). Both points must lie inside the branch: a direction
    // along the boundary keeps its points on the kink, where the central difference gives the
    // mean of the sides (a tangent that is that mean passed so), so the forward and backward
    // differences there must agree column by column.
    let (mut far, mut near) = (vec![0.0; n * n], vec![0.0; n * n]);
    for (c, &(_, k)) in sieved.iter().take(CONFIRM).enumerate() {
        let mut inside = true;
        for (depth, jac) in [(t, &mut far), (0.1 * t, &mut near)] {
            for j in 0..n {
                shifted[j] = base[j] + depth * dirs[k][j];
            }
            d.set_dstrain(&shifted);
            inside &= branch_tangent(&mut d, caller, q, STEP * q.scale, jac)?;
        }
        if !inside {
            continue;
        }
        let at_point: Vec<f64> = far.iter().zip(&near).map(|(f, m)| m - (f - m) / 9.0).collect();
        let error = compare(q.conv, q.returned, &at_point, q.tol, q.entry_floor, 0).error();
        if error <= q.tol {
            return Some(Corner {
                along: words(q, &dirs[k]),
                direction: dirs[k].clone(),
                error,
                tried: dirs.len(),
                confirmed: c + 1,
            });
        }
    }
    None
}
