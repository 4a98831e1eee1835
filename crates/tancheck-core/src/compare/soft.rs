//! The soft-direction measure of a comparison: the directions it is taken along (the
//! increment's own strain direction and the softest eigen-directions of a numerical tangent's
//! symmetric part) and the largest relative error of a returned tangent along them.
//!
//! The directions are a property of the material state, not of the scheme that estimated the
//! tangent, so a check finds them once per increment, from its sharpest numerical tangent, and
//! measures every scheme's comparison along the same ones ([`SoftDirections::of`]); a
//! comparison made on its own finds them from its own numerical tangent.
//!
//! The eigen-directions come from a fixed-size 6 × 6 symmetric eigen-solver on the stack
//! (`eigen`: Householder reduction and implicit QR steps), once per increment and only on a
//! matrix the per-thread cache has not seen; everything here is plain arrays, no allocation.

mod eigen;

use self::eigen::{symmetric_eigen6, Mat6};
use crate::convention::Convention;

/// Soft directions count down to this fraction of the numerical tangent's norm (a
/// perfectly plastic direction has no response at all; below this, difference noise rules).
pub const SOFT_FLOOR: f64 = 1e-3;

/// How many of the softest eigen-directions are measured.
const SOFT_EIGEN: usize = 2;

type Vec6 = [f64; 6];

/// The directions of the soft-direction measure, unit vectors in Mandel form.
#[derive(Clone, Copy, Debug)]
pub struct SoftDirections {
    /// The increment's own strain direction, when it has one.
    increment: Option<Vec6>,
    /// The softest eigen-directions of the reference tangent's symmetric part, softest first;
    /// `None` when the reference is not usable (not finite, or zero): each comparison then
    /// finds its own.
    softest: Option<[Vec6; SOFT_EIGEN]>,
}

impl SoftDirections {
    /// The directions of `reference`, a numerical tangent column-major in the routine's
    /// convention, with `direction` (a strain increment in the routine's convention).
    pub fn of(conv: &Convention, reference: &[f64], direction: Option<&[f64]>) -> SoftDirections {
        let n = conv.ncomp();
        let nn = reference.len();
        assert!(nn <= 36 && nn == n * n, "a tangent has at most 6 × 6 entries");
        let mut mb = [0.0; 36];
        let m = &mut mb[..nn];
        m.copy_from_slice(reference);
        conv.tangent_to_mandel(m);
        let mut dir = [0.0; 6];
        let d = direction.map(|d| {
            conv.strain_to_mandel(d, &mut dir[..n]);
            &dir[..n]
        });
        SoftDirections::of_mandel(m, n, d)
    }

    /// [`SoftDirections::of`] for a Mandel-form `m` (n × n, column-major) and direction.
    pub(super) fn of_mandel(m: &[f64], n: usize, direction: Option<&[f64]>) -> SoftDirections {
        let increment = direction.and_then(|d| {
            let mut v: Vec6 = [0.0; 6];
            let k = n.min(d.len()).min(6);
            v[..k].copy_from_slice(&d[..k]);
            let l = v.iter().map(|x| x * x).sum::<f64>().sqrt();
            (l > 0.0 && l.is_finite()).then(|| v.map(|x| x / l))
        });
        let norm = frobenius(m, n);
        let usable = n > 0 && m.len() >= n * n && norm > 0.0 && norm.is_finite();
        SoftDirections { increment, softest: usable.then(|| softest_of(m, n, norm)) }
    }
}

fn frobenius(m: &[f64], n: usize) -> f64 {
    m[..(n * n).min(m.len())].iter().map(|x| x * x).sum::<f64>().sqrt()
}

/// The softest eigen-directions of the symmetric part of `m` (Frobenius norm `norm`), padded
/// to 6 × 6 with a stiff diagonal so the padding is never the softest.
fn softest_of(m: &[f64], n: usize, norm: f64) -> [Vec6; SOFT_EIGEN] {
    // m padded with zeros, then its symmetric part over the fixed 6 × 6 (loops the compiler
    // unrolls), then the stiff diagonal.
    let n = n.min(6);
    let mut t: Mat6 = [[0.0; 6]; 6];
    for (j, c) in t.iter_mut().enumerate().take(n) {
        c[..n].copy_from_slice(&m[j * n..(j + 1) * n]);
    }
    let mut s: Mat6 = [[0.0; 6]; 6];
    for j in 0..6 {
        for i in 0..6 {
            s[j][i] = 0.5 * (t[j][i] + t[i][j]);
        }
    }
    for (i, c) in s.iter_mut().enumerate().skip(n) {
        c[i] = 10.0 * norm;
    }
    softest_directions(&s)
}

/// The eigenvectors of the symmetric 6 × 6 matrix `s` (columns) with the [`SOFT_EIGEN`]
/// smallest |eigenvalues|, softest first; equal |eigenvalues| in the order the eigen-solver
/// left them (a pure function of the bits of `s`), so ties are broken the same way every time.
///
/// A check meets the same matrix again and again (the complex-step tangent of an elastic
/// increment is the same to the bit in every such increment), so the last few answers are
/// kept per thread, keyed by the bits of `s`: a repeated matrix costs a comparison of its
/// entries instead of an eigen-decomposition, and gets the very vectors the decomposition
/// gave (the result does not depend on the cache, nor on the thread).
fn softest_directions(s: &Mat6) -> [Vec6; SOFT_EIGEN] {
    use std::cell::RefCell;
    type Entry = ([u64; 36], [Vec6; SOFT_EIGEN]);
    /// Matrices remembered per thread (a check alternates between a few schemes).
    const KEEP: usize = 4;
    thread_local! {
        static SEEN: RefCell<(usize, [Option<Entry>; KEEP])> = const { RefCell::new((0, [None; KEEP])) };
    }
    let mut key = [0u64; 36];
    for (k, x) in key.iter_mut().zip(s.iter().flatten()) {
        *k = x.to_bits();
    }
    let hit = SEEN.with(|c| c.borrow().1.iter().flatten().find(|(k, _)| *k == key).map(|(_, v)| *v));
    if let Some(v) = hit {
        return v;
    }
    let eig = symmetric_eigen6(s);
    let mut idx = [0usize, 1, 2, 3, 4, 5];
    idx.sort_by(|&a, &b| eig.values[a].abs().total_cmp(&eig.values[b].abs()).then(a.cmp(&b)));
    let v: [Vec6; SOFT_EIGEN] = std::array::from_fn(|k| eig.vectors[idx[k]]);
    SEEN.with(|c| {
        let mut c = c.borrow_mut();
        let at = c.0;
        c.1[at] = Some((key, v));
        c.0 = (at + 1) % KEEP;
    });
    v
}

/// The largest relative error along the soft directions of the Mandel-form matrices `r`
/// (returned) and `m` (numerical), n × n column-major, and which direction it was. Fixed-size
/// arithmetic (no allocation).
pub fn soft_error(r: &[f64], m: &[f64], n: usize, direction: Option<&[f64]>) -> (f64, &'static str) {
    if n == 0 || r.len() < n * n || m.len() < n * n {
        return (0.0, "");
    }
    soft_error_along(r, m, n, &SoftDirections::of_mandel(m, n, direction), super::Limits::new(0.0, 0.0, 0))
}

/// [`soft_error`] along given directions (those of `m` itself when `dirs` has no usable
/// reference). Each direction's error is relative to the response of `m` along it, floored at
/// [`SOFT_FLOOR`] times the norm of `m`, or to the rounding floor of `limits` when `m` is zero
/// to rounding.
pub(super) fn soft_error_along(
    r: &[f64],
    m: &[f64],
    n: usize,
    dirs: &SoftDirections,
    limits: super::Limits,
) -> (f64, &'static str) {
    if n == 0 || r.len() < n * n || m.len() < n * n {
        return (0.0, "");
    }
    let norm = frobenius(m, n);
    let absolute = limits.below_floor(norm);
    if !absolute && (norm.is_nan() || norm <= 0.0 || !norm.is_finite())
        || r[..n * n].iter().any(|x| !x.is_finite())
    {
        return (0.0, "");
    }
    let floor = if absolute { limits.abs_floor } else { SOFT_FLOOR * norm };
    // Both matrices as 6 × 6, column-major: a 3D tangent as it is, a smaller one padded with
    // zeros (fixed-size loops the compiler unrolls; the padding adds exact zeros to every sum).
    let (mut rb, mut mb) = ([0.0f64; 36], [0.0f64; 36]);
    let (rp, mp): (&[f64; 36], &[f64; 36]) = match (r[..n * n].try_into(), m[..n * n].try_into()) {
        (Ok(r6), Ok(m6)) => (r6, m6),
        _ => {
            for j in 0..n {
                rb[j * 6..j * 6 + n].copy_from_slice(&r[j * n..(j + 1) * n]);
                mb[j * 6..j * 6 + n].copy_from_slice(&m[j * n..(j + 1) * n]);
            }
            (&rb, &mb)
        }
    };
    let along = |d: &Vec6| {
        let (mut a, mut b) = ([0.0f64; 6], [0.0f64; 6]);
        for j in 0..6 {
            for i in 0..6 {
                a[i] += rp[j * 6 + i] * d[j];
                b[i] += mp[j * 6 + i] * d[j];
            }
        }
        let (mut dr, mut dm) = (0.0, 0.0);
        for i in 0..6 {
            dr += (a[i] - b[i]) * (a[i] - b[i]);
            dm += b[i] * b[i];
        }
        dr.sqrt() / dm.sqrt().max(floor)
    };
    let mut worst = (0.0, "");
    if let Some(v) = &dirs.increment {
        let e = along(v);
        if e > worst.0 {
            worst = (e, "the increment direction");
        }
    }
    let softest = dirs.softest.unwrap_or_else(|| softest_of(m, n, norm));
    for (k, v) in softest.iter().take(SOFT_EIGEN.min(n)).enumerate() {
        let e = along(v);
        if e.is_finite() && e > worst.0 {
            worst = (e, if k == 0 { "the softest direction" } else { "the second softest direction" });
        }
    }
    worst
}
