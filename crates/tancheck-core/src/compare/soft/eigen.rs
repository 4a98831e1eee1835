//! The eigenvalues and eigenvectors of a symmetric 6 × 6 matrix on the stack, for the
//! soft-direction measure: Householder reduction to tridiagonal form, then implicit QR steps
//! with Wilkinson shifts, the eigenvectors accumulated along the way (the textbook algorithm:
//! Golub & Van Loan, "Matrix Computations", §8.3, Algorithms 8.3.1 to 8.3.3, numbered as in the
//! 3rd and 4th editions from memory; written here from the algorithm). No allocation, no
//! library in the loop, fixed-size arrays throughout.
//!
//! The result is a pure function of the input bits (no threads, no caches, no fused
//! multiply-adds the compiler may choose), so the same matrix gives the same vectors to the bit
//! on every thread. A matrix with a NaN or an infinity gets NaN eigenvalues and the unit
//! vectors; the QR iteration is capped, so no input makes it loop forever.

#![allow(clippy::needless_range_loop)] // index notation reads as the algorithm

/// Order of the matrices solved here (the Mandel form of a 3-D tangent).
pub(super) const N: usize = 6;

/// A 6 × 6 matrix as six columns: `m[j][i]` is the entry in row i, column j.
pub(super) type Mat6 = [[f64; N]; N];

/// QR steps allowed for the whole matrix. A 6 × 6 matrix needs one or two per eigenvalue (the
/// Wilkinson shift converges cubically for almost every matrix; about 6.5 steps per matrix on
/// a J2 check's tangents); the cap only stops an iteration that cannot converge (a NaN).
const MAX_STEPS: usize = 30 * N;

/// The eigen-decomposition of a symmetric matrix: `values[j]` belongs to the unit vector
/// `vectors[j]` (not sorted; in the order the iteration left them, the same for the same input).
#[derive(Clone, Copy, Debug)]
pub(super) struct Eigen6 {
    pub values: [f64; N],
    pub vectors: Mat6,
}

/// The eigenvalues and orthonormal eigenvectors of the symmetric matrix `a`. The lower
/// triangle is used (the upper one is taken as its mirror); a NaN or infinity anywhere gives
/// NaN eigenvalues and the unit vectors. Not inlined, so a profile shows its cost apart.
#[inline(never)]
pub(super) fn symmetric_eigen6(a: &Mat6) -> Eigen6 {
    let mut w = [[0.0; N]; N];
    let mut big = 0.0f64;
    for j in 0..N {
        for i in j..N {
            w[j][i] = a[j][i];
            w[i][j] = a[j][i];
            big = big.max(a[j][i].abs());
        }
    }
    if a.iter().flatten().any(|x| !x.is_finite()) {
        return Eigen6 { values: [f64::NAN; N], vectors: identity() };
    }
    if big == 0.0 {
        return Eigen6 { values: [0.0; N], vectors: identity() };
    }
    // Scale by a power of two (exact) so the largest entry is near one: no overflow or
    // underflow in the squares below, whatever the units of the tangent.
    let scale = power_of_two_near(big);
    for c in w.iter_mut() {
        for x in c.iter_mut() {
            *x /= scale;
        }
    }
    let (mut d, mut e, mut v) = tridiagonalize(w);
    qr_iterate(&mut d, &mut e, &mut v);
    for x in d.iter_mut() {
        *x *= scale;
    }
    Eigen6 { values: d, vectors: v }
}

fn identity() -> Mat6 {
    std::array::from_fn(|j| std::array::from_fn(|i| if i == j { 1.0 } else { 0.0 }))
}

/// The power of two nearest above `x` (finite, positive), clamped so it stays a normal number.
fn power_of_two_near(x: f64) -> f64 {
    let exp = ((x.to_bits() >> 52) & 0x7ff) as i32 - 1023;
    2f64.powi(exp.clamp(-1000, 1000) + 1)
}

/// Householder reduction of the symmetric `a` to tridiagonal form T = Qᵀ A Q (Golub & Van
/// Loan, Algorithm 8.3.1). Returns the diagonal of T, its subdiagonal (`e[k]` couples rows k
/// and k + 1; the last entry is unused) and Q (columns).
fn tridiagonalize(mut a: Mat6) -> ([f64; N], [f64; N], Mat6) {
    // The Householder vectors and their β, kept for the accumulation of Q below (β = 0: no
    // reflection in that column).
    let mut hv = [[0.0; N]; N - 2];
    let mut hb = [0.0; N - 2];
    for k in 0..N - 2 {
        // The Householder vector v of column k below the diagonal: (I − β v vᵀ) x = α e₁.
        let v = &mut hv[k];
        let mut tail = 0.0;
        for i in k + 2..N {
            v[i] = a[k][i];
            tail += v[i] * v[i];
        }
        if tail == 0.0 {
            continue; // already tridiagonal in this column
        }
        let x0 = a[k][k + 1];
        let alpha = -(x0 * x0 + tail).sqrt().copysign(x0);
        v[k + 1] = x0 - alpha;
        let beta = 2.0 / (v[k + 1] * v[k + 1] + tail);
        hb[k] = beta;
        // The trailing block A₂₂ ← H A₂₂ H = A₂₂ − v wᵀ − w vᵀ with p = β A₂₂ v and
        // w = p − (β pᵀv / 2) v.
        let mut p = [0.0; N];
        for j in k + 1..N {
            for i in k + 1..N {
                p[i] += a[j][i] * v[j];
            }
        }
        let mut pv = 0.0;
        for i in k + 1..N {
            p[i] *= beta;
            pv += p[i] * v[i];
        }
        let half = 0.5 * beta * pv;
        for i in k + 1..N {
            p[i] -= half * v[i];
        }
        for j in k + 1..N {
            for i in j..N {
                let x = a[j][i] - (v[i] * p[j] + p[i] * v[j]);
                a[j][i] = x;
                a[i][j] = x;
            }
        }
        a[k][k + 1] = alpha;
        a[k + 1][k] = alpha;
        for i in k + 2..N {
            a[k][i] = 0.0;
            a[i][k] = 0.0;
        }
    }
    // Q = H₀ H₁ … H₃, accumulated from the last reflection back ("backward accumulation",
    // Golub & Van Loan, chapter 5; from memory as to the section): after H_k … H₃ only rows
    // and columns k + 1.. differ from the identity, so H_k touches those columns only.
    let mut q = identity();
    for k in (0..N - 2).rev() {
        let (v, beta) = (&hv[k], hb[k]);
        if beta == 0.0 {
            continue;
        }
        for c in k + 1..N {
            let mut vq = 0.0;
            for i in k + 1..N {
                vq += v[i] * q[c][i];
            }
            vq *= beta;
            for i in k + 1..N {
                q[c][i] -= vq * v[i];
            }
        }
    }
    let d = std::array::from_fn(|i| a[i][i]);
    let e = std::array::from_fn(|i| if i + 1 < N { a[i][i + 1] } else { 0.0 });
    (d, e, q)
}

/// Whether the coupling `e` between diagonal entries `a` and `b` is negligible (Golub & Van
/// Loan, Algorithm 8.3.3, with the unit round-off as tolerance).
/// A coupling below the smallest normal number counts as negligible too (the matrix is scaled
/// to entries near one, so that is far below the round-off of any entry).
fn negligible(e: f64, a: f64, b: f64) -> bool {
    e.abs() <= f64::EPSILON * 0.5 * (a.abs() + b.abs()) || e.abs() < f64::MIN_POSITIVE
}

/// Implicit symmetric QR steps with Wilkinson shifts (Golub & Van Loan, Algorithms 8.3.2 and
/// 8.3.3) on the tridiagonal matrix (`d`, `e`) until it is diagonal; every plane rotation is
/// applied to the columns of `v` too. At most [`MAX_STEPS`] steps.
fn qr_iterate(d: &mut [f64; N], e: &mut [f64; N], v: &mut Mat6) {
    let mut hi = N - 1;
    let mut steps = 0;
    while hi > 0 {
        if negligible(e[hi - 1], d[hi - 1], d[hi]) {
            e[hi - 1] = 0.0;
            hi -= 1;
            continue;
        }
        if steps == MAX_STEPS {
            return;
        }
        steps += 1;
        // The unreduced block lo..=hi.
        let mut lo = hi - 1;
        while lo > 0 && !negligible(e[lo - 1], d[lo - 1], d[lo]) {
            lo -= 1;
        }
        if lo > 0 {
            e[lo - 1] = 0.0;
        }
        // The Wilkinson shift: the eigenvalue of the trailing 2 × 2 block nearer to d[hi].
        let b = e[hi - 1];
        let t = 0.5 * (d[hi - 1] - d[hi]);
        let mu = d[hi] - b * b / (t + t.hypot(b).copysign(t));
        // Chase the bulge from the top of the block down: rotation k acts on rows and columns
        // k, k + 1 as R = [c s; −s c], chosen to zero the bulge z beside x.
        let mut x = d[lo] - mu;
        let mut z = e[lo];
        for k in lo..hi {
            // The matrix is scaled to entries of order one, so the squares cannot overflow; where
            // they underflow, hypot keeps the tiny rotation exact.
            let r = match (x * x + z * z).sqrt() {
                r if r > 1e-150 => r,
                _ => x.hypot(z),
            };
            let (c, s) = if r == 0.0 { (1.0, 0.0) } else { (x / r, -z / r) };
            if k > lo {
                e[k - 1] = r;
            }
            let (a, bb, cc) = (d[k], e[k], d[k + 1]);
            d[k] = c * c * a - 2.0 * c * s * bb + s * s * cc;
            d[k + 1] = s * s * a + 2.0 * c * s * bb + c * c * cc;
            e[k] = (a - cc) * c * s + bb * (c * c - s * s);
            if k + 1 < hi {
                x = e[k];
                z = -s * e[k + 1];
                e[k + 1] *= c;
            }
            let (vk, vk1) = v.split_at_mut(k + 1);
            for (p, q) in vk[k].iter_mut().zip(vk1[0].iter_mut()) {
                let (pp, qq) = (*p, *q);
                *p = c * pp - s * qq;
                *q = s * pp + c * qq;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::SMatrix;
    use rand::{Rng, SeedableRng};
    use rand_chacha::ChaCha8Rng;

    fn norm(a: &Mat6) -> f64 {
        a.iter().flatten().map(|x| x * x).sum::<f64>().sqrt()
    }

    fn dot(a: &[f64; N], b: &[f64; N]) -> f64 {
        a.iter().zip(b).map(|(x, y)| x * y).sum()
    }

    /// ‖A v − λ v‖ for column-stored A.
    fn residual(a: &Mat6, lambda: f64, v: &[f64; N]) -> f64 {
        let mut r = [0.0; N];
        for j in 0..N {
            for i in 0..N {
                r[i] += a[j][i] * v[j];
            }
        }
        r.iter().zip(v).map(|(ri, vi)| (ri - lambda * vi).powi(2)).sum::<f64>().sqrt()
    }

    /// The properties every decomposition must have: unit, mutually orthogonal vectors, and
    /// small residuals, both to `tol` relative to ‖A‖ (backward stability of the Householder
    /// and QR steps, Golub & Van Loan §8.3.6).
    fn assert_decomposition(a: &Mat6, eig: &Eigen6, tol: f64, what: &str) {
        let na = norm(a);
        for j in 0..N {
            for k in 0..N {
                let want = if j == k { 1.0 } else { 0.0 };
                let got = dot(&eig.vectors[j], &eig.vectors[k]);
                assert!((got - want).abs() <= tol, "{what}: vᵀv[{j}][{k}] = {got}");
            }
            let r = residual(a, eig.values[j], &eig.vectors[j]);
            assert!(r <= tol * na.max(f64::MIN_POSITIVE), "{what}: residual {r} of λ{j} (‖A‖ = {na})");
        }
    }

    /// Eigenvalues and vectors sorted by value (pairs of one decomposition).
    fn sorted(values: [f64; N], vectors: Mat6) -> Vec<(f64, [f64; N])> {
        let mut p: Vec<_> = values.into_iter().zip(vectors).collect();
        p.sort_by(|a, b| a.0.total_cmp(&b.0));
        p
    }

    /// Whether two unit vectors agree up to sign, to `tol`.
    fn same_up_to_sign(a: &[f64; N], b: &[f64; N], tol: f64) -> bool {
        let minus: f64 = a.iter().zip(b).map(|(x, y)| (x - y).powi(2)).sum::<f64>().sqrt();
        let plus: f64 = a.iter().zip(b).map(|(x, y)| (x + y).powi(2)).sum::<f64>().sqrt();
        minus.min(plus) <= tol
    }

    // The second-difference matrix (2 on the diagonal, −1 beside it) of order n has the
    // eigenvalues 2 − 2 cos(kπ/(n + 1)) with the eigenvectors (sin(jkπ/(n + 1)))_j, k, j = 1..n:
    // a standard closed form (e.g. Golub & Van Loan, "Matrix Computations", on the eigenvalues
    // of tridiagonal Toeplitz matrices; from memory as to the section).
    #[test]
    fn the_second_difference_matrix_has_its_closed_form_eigenpairs() {
        let mut a = [[0.0; N]; N];
        for j in 0..N {
            a[j][j] = 2.0;
            if j + 1 < N {
                a[j][j + 1] = -1.0;
                a[j + 1][j] = -1.0;
            }
        }
        let eig = symmetric_eigen6(&a);
        assert_decomposition(&a, &eig, 1e-13, "second difference");
        let got = sorted(eig.values, eig.vectors);
        let h = std::f64::consts::PI / (N as f64 + 1.0);
        for (k, (lambda, v)) in got.iter().enumerate() {
            let k = k as f64 + 1.0;
            let want = 2.0 - 2.0 * (k * h).cos();
            assert!((lambda - want).abs() <= 1e-14, "λ{k}: {lambda} against {want}");
            let mut u: [f64; N] = std::array::from_fn(|j| ((j as f64 + 1.0) * k * h).sin());
            let l = u.iter().map(|x| x * x).sum::<f64>().sqrt();
            u.iter_mut().for_each(|x| *x /= l);
            assert!(same_up_to_sign(v, &u, 1e-13), "v{k}: {v:?} against {u:?}");
        }
    }

    fn random_orthogonal(rng: &mut ChaCha8Rng) -> SMatrix<f64, N, N> {
        let g = SMatrix::<f64, N, N>::from_fn(|_, _| rng.gen_range(-1.0..1.0));
        g.qr().q()
    }

    /// Q diag(λ) Qᵀ for a random orthogonal Q, made exactly symmetric.
    fn with_eigenvalues(rng: &mut ChaCha8Rng, lambda: [f64; N]) -> Mat6 {
        let q = random_orthogonal(rng);
        let m = q * SMatrix::<f64, N, N>::from_diagonal(&lambda.into()) * q.transpose();
        std::array::from_fn(|j| std::array::from_fn(|i| if i >= j { m[(i, j)] } else { m[(j, i)] }))
    }

    fn random_symmetric(rng: &mut ChaCha8Rng, scale: f64) -> Mat6 {
        let mut a = [[0.0; N]; N];
        for j in 0..N {
            for i in j..N {
                a[j][i] = scale * rng.gen_range(-1.0..1.0);
                a[i][j] = a[j][i];
            }
        }
        a
    }

    /// The isotropic elastic tangent in Mandel form (eigenvalues 3K once, 2G five times).
    fn isotropic(k: f64, g: f64) -> Mat6 {
        let lame = k - 2.0 * g / 3.0;
        std::array::from_fn(|j| {
            std::array::from_fn(|i| {
                let vol = if i < 3 && j < 3 { lame } else { 0.0 };
                vol + if i == j { 2.0 * g } else { 0.0 }
            })
        })
    }

    /// The matrices compared with nalgebra: random ones over many scales, ill-conditioned
    /// ones, repeated eigenvalues, diagonal ones, zero rows and columns, and the padded shape
    /// `softest_of` builds (an n × n block, then a stiff diagonal of ten times its norm).
    fn test_matrices() -> Vec<(String, Mat6)> {
        let mut rng = ChaCha8Rng::seed_from_u64(0x5eed_e16e);
        let mut out = Vec::new();
        for t in 0..120 {
            let scale = 10f64.powf(rng.gen_range(-3.0..7.0));
            out.push((format!("random {t}"), random_symmetric(&mut rng, scale)));
        }
        for t in 0..40 {
            let spread = rng.gen_range(3.0..15.0);
            let mut l: [f64; N] = std::array::from_fn(|i| 10f64.powf(-spread * i as f64 / 5.0));
            l.iter_mut().for_each(|x| *x *= if rng.gen_bool(0.5) { -1.0 } else { 1.0 } * 2.0e5);
            out.push((format!("ill-conditioned {t} (10^-{spread:.1})"), with_eigenvalues(&mut rng, l)));
        }
        for t in 0..40 {
            let (a, b) = (rng.gen_range(-1.0..1.0), rng.gen_range(-1.0..1.0));
            let l = match t % 4 {
                0 => [a, b, b, b, b, b],
                1 => [a, a, a, b, b, b],
                2 => [a, a, b, b, 1e-9 * a, 1e-9 * a],
                _ => [a; N],
            };
            out.push((format!("repeated {t}"), with_eigenvalues(&mut rng, l)));
        }
        out.push(("isotropic".into(), isotropic(175_000.0, 80_769.0)));
        for t in 0..20 {
            let g = rng.gen_range(1e3..1e5);
            let lambda = [3.0 * rng.gen_range(1e3..2e5), 2.0 * g, 2.0 * g, 2.0 * g, 2.0 * g, 2.0 * g];
            out.push((format!("rotated isotropic {t}"), with_eigenvalues(&mut rng, lambda)));
        }
        for t in 0..20 {
            let mut a = [[0.0; N]; N];
            for (j, c) in a.iter_mut().enumerate() {
                c[j] = if t % 3 == 0 && j % 2 == 0 { 1.5 } else { rng.gen_range(-1e5..1e5) };
            }
            out.push((format!("diagonal {t}"), a));
        }
        for t in 0..30 {
            let mut a = random_symmetric(&mut rng, 1e5);
            for z in 0..(1 + t % 4) {
                let r = (t + 2 * z) % N;
                for i in 0..N {
                    a[r][i] = 0.0;
                    a[i][r] = 0.0;
                }
            }
            out.push((format!("zero rows {t}"), a));
        }
        out.push(("zero".into(), [[0.0; N]; N]));
        for t in 0..40 {
            let n = 1 + t % 5;
            let block = random_symmetric(&mut rng, 1e5);
            let nb = (0..n)
                .flat_map(|j| (0..n).map(move |i| (i, j)))
                .map(|(i, j)| block[j][i].powi(2))
                .sum::<f64>();
            let a = std::array::from_fn(|j| {
                std::array::from_fn(|i| match (i < n && j < n, i == j) {
                    (true, _) => block[j][i],
                    (false, true) => 10.0 * nb.sqrt(),
                    (false, false) => 0.0,
                })
            });
            out.push((format!("padded {n} × {n} ({t})"), a));
        }
        out
    }

    // Against an independent library (nalgebra's symmetric_eigen): eigenvalues to 1e-12 of
    // ‖A‖; our vectors orthonormal with residuals below 1e-12 ‖A‖; and the vector of a simple
    // eigenvalue the same as nalgebra's up to sign, to the accuracy the gap to the next
    // eigenvalue allows (the error of a computed eigenvector grows as ‖A‖ u / gap; Golub & Van
    // Loan §8.1, perturbation of invariant subspaces).
    #[test]
    fn eigenpairs_agree_with_nalgebra() {
        let cases = test_matrices();
        assert!(cases.len() >= 300, "{} cases", cases.len());
        for (what, a) in &cases {
            let eig = symmetric_eigen6(a);
            assert_decomposition(a, &eig, 1e-12, what);
            let m = SMatrix::<f64, N, N>::from_fn(|i, j| a[j][i]);
            let theirs = m.symmetric_eigen();
            let tv: Mat6 = std::array::from_fn(|j| std::array::from_fn(|i| theirs.eigenvectors[(i, j)]));
            let mine = sorted(eig.values, eig.vectors);
            let ours = sorted(theirs.eigenvalues.into(), tv);
            let na = norm(a);
            for k in 0..N {
                let (l, v) = &mine[k];
                let (tl, u) = &ours[k];
                assert!(
                    (l - tl).abs() <= 1e-12 * na,
                    "{what}: λ{k} {l} against nalgebra's {tl} (‖A‖ = {na})"
                );
                let gap =
                    (0..N).filter(|&o| o != k).map(|o| (ours[o].0 - tl).abs()).fold(f64::INFINITY, f64::min);
                if gap > 1e-6 * na {
                    let tol = 1e-13 * na / gap + 1e-13;
                    assert!(
                        same_up_to_sign(v, u, tol),
                        "{what}: v{k} {v:?} against nalgebra's {u:?} (gap {gap})"
                    );
                }
            }
        }
    }

    #[test]
    fn a_repeated_eigenvalue_gets_an_orthonormal_basis_of_its_space() {
        // The isotropic tangent: 3K once along the volumetric direction (1, 1, 1, 0, 0, 0)/√3.
        let (k, g) = (175_000.0, 80_769.0);
        let a = isotropic(k, g);
        let eig = symmetric_eigen6(&a);
        assert_decomposition(&a, &eig, 1e-13, "isotropic");
        let got = sorted(eig.values, eig.vectors);
        for (l, _) in &got[..5] {
            assert!((l - 2.0 * g).abs() <= 1e-12 * 3.0 * k, "{l} against 2G = {}", 2.0 * g);
        }
        assert!((got[5].0 - 3.0 * k).abs() <= 1e-12 * 3.0 * k);
        let vol = [1.0 / 3f64.sqrt(), 1.0 / 3f64.sqrt(), 1.0 / 3f64.sqrt(), 0.0, 0.0, 0.0];
        assert!(same_up_to_sign(&got[5].1, &vol, 1e-13), "{:?}", got[5].1);
    }

    #[test]
    fn non_finite_input_returns_at_once_and_the_same_every_time() {
        let mut a = isotropic(1.0, 1.0);
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            a[4][2] = bad;
            let (x, y) = (symmetric_eigen6(&a), symmetric_eigen6(&a));
            assert!(x.values.iter().all(|l| l.is_nan()), "{bad}: {:?}", x.values);
            assert_eq!(x.vectors, identity());
            assert_eq!(x.values.map(f64::to_bits), y.values.map(f64::to_bits));
        }
        // Entries near the largest finite number: scaled, so nothing overflows inside.
        let big = random_symmetric(&mut ChaCha8Rng::seed_from_u64(7), f64::MAX / 8.0);
        let eig = symmetric_eigen6(&big);
        assert!(eig.values.iter().all(|l| l.is_finite()), "{:?}", eig.values);
        assert_decomposition(
            &big.map(|c| c.map(|x| x / f64::MAX)),
            &Eigen6 { values: eig.values.map(|l| l / f64::MAX), ..eig },
            1e-12,
            "huge",
        );
    }

    #[test]
    fn the_qr_iteration_stops_at_its_cap_on_a_nan() {
        // Not reachable through symmetric_eigen6 (which screens non-finite input), but a NaN
        // made inside must not loop forever: a NaN coupling is never negligible.
        let mut d = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0];
        let mut e = [1.0, f64::NAN, 1.0, 1.0, 1.0, 0.0];
        let mut v = identity();
        qr_iterate(&mut d, &mut e, &mut v);
        assert!(d.iter().any(|x| x.is_nan()));
    }

    #[test]
    fn the_same_matrix_gives_the_same_bits_on_every_thread() {
        let cases = test_matrices();
        let bits = |cases: &[(String, Mat6)]| -> Vec<u64> {
            cases
                .iter()
                .flat_map(|(_, a)| {
                    let e = symmetric_eigen6(a);
                    e.values
                        .into_iter()
                        .chain(e.vectors.into_iter().flatten())
                        .map(f64::to_bits)
                        .collect::<Vec<_>>()
                })
                .collect()
        };
        let here = bits(&cases);
        std::thread::scope(|s| {
            let handles: Vec<_> = (0..3).map(|_| s.spawn(|| bits(&cases))).collect();
            for h in handles {
                assert_eq!(h.join().unwrap(), here);
            }
        });
    }
}
