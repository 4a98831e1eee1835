//! The search over band normals: the fourth-order tangent from the routine's, det Q(n) of the
//! acoustic tensor, the grids of normals (made once per process) and their refinement.

use crate::convention::Convention;

/// The fourth-order tensor C_ijkl (index i·27 + j·9 + k·3 + l) of a routine tangent.
pub(super) fn fourth_order(conv: &Convention, tangent: &[f64]) -> [f64; 81] {
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
pub(super) fn det_q(c: &[f64; 81], n: &[f64; 3], dim: usize) -> f64 {
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

pub(super) fn sphere(theta: f64, phi: f64) -> [f64; 3] {
    [theta.sin() * phi.cos(), theta.sin() * phi.sin(), theta.cos()]
}

pub(super) fn signed(mut n: [f64; 3]) -> [f64; 3] {
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

/// The minimising normal, min det Q(n), and the largest |det Q(n)| over the grid (equal to
/// the minimum's size for one dimension).
pub(super) fn acoustic_min(c: &[f64; 81], dim: usize) -> ([f64; 3], f64, f64) {
    let largest = |v: &[f64]| v.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    match dim {
        1 => {
            let d = det_q(c, &[1.0, 0.0, 0.0], 1);
            ([1.0, 0.0, 0.0], d, d.abs())
        }
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
            ([best.0.cos(), best.0.sin(), 0.0], best.1, largest(&grid))
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
            (sphere(best.0[0], best.0[1]), best.1, largest(&values))
        }
    }
}
