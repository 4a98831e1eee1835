//! The orthotropic reference model (`orthotropic`) against the textbook compliance and the
//! off-axis transformation formulas of Jones, Mechanics of Composite Materials (2nd ed. 1999,
//! ch. 2; from memory), against frame-indifference when the material axes turn with the
//! frame, against `elastic` for isotropic constants, and against num-dual / complex-step
//! derivatives of its own update.

use num_complex::Complex64;
use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::driver::Outputs;
use tancheck_core::routine::{provides, status};
use tancheck_core::{Model, PointKind, Scalar};
use tancheck_models::{Elastic, Orthotropic};
use tancheck_testkit::call::{model_allocations, model_call, model_complex_tangent, Call};

// ---------------------------------------------------------------------------------------
// A counting allocator: one call of the model must not allocate (DEVELOPERS.md, hot path).

mod common;

// ---------------------------------------------------------------------------------------
// One call with owned arrays, in any scalar type.

#[derive(Clone, Debug)]
struct Point {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    stress0: Vec<f64>,
}

impl Point {
    fn new(props: &[f64], n: usize) -> Point {
        Point { props: props.to_vec(), strain: vec![0.0; n], dstrain: vec![0.0; n], stress0: vec![0.0; n] }
    }
}

impl Point {
    /// The call, at 20 °C.
    fn call(&self) -> Call {
        Call::new(&self.props, self.strain.len(), 0)
            .strain(&self.strain)
            .dstrain(&self.dstrain)
            .stress0(&self.stress0)
    }
}

fn run<M: Model>(m: &M, p: &Point) -> Outputs<f64> {
    model_call(m, &p.call(), &p.dstrain, [20.0, 0.0]).expect("sizes match")
}

/// ∂σ/∂Δε by num-dual (column-major): one call per column with the unit dual part on Δεⱼ.
fn dual_tangent<M: Model>(m: &M, p: &Point) -> Vec<f64> {
    tancheck_testkit::call::dual_tangent(m, &p.call()).0
}

/// ∂σ/∂Δε by the complex step Im σ(Δε + i h eⱼ)/h (Squire & Trapp 1998).
fn complex_tangent<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    model_complex_tangent(m, &p.call(), h)
}

fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let r: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    d / r.max(1e-300)
}

/// The inverse of an n×n column-major matrix by Gauss–Jordan elimination with partial
/// pivoting (an independent computation, not the model's).
fn inverse(a: &[f64], n: usize) -> Vec<f64> {
    let mut m: Vec<Vec<f64>> = (0..n).map(|i| (0..n).map(|j| a[i + j * n]).collect()).collect();
    let mut inv: Vec<Vec<f64>> =
        (0..n).map(|i| (0..n).map(|j| if i == j { 1.0 } else { 0.0 }).collect()).collect();
    for c in 0..n {
        let p = (c..n).max_by(|&x, &y| m[x][c].abs().total_cmp(&m[y][c].abs())).unwrap();
        m.swap(c, p);
        inv.swap(c, p);
        let d = m[c][c];
        for j in 0..n {
            m[c][j] /= d;
            inv[c][j] /= d;
        }
        for r in 0..n {
            if r != c {
                let f = m[r][c];
                for j in 0..n {
                    m[r][j] -= f * m[c][j];
                    inv[r][j] -= f * inv[c][j];
                }
            }
        }
    }
    let mut out = vec![0.0; n * n];
    for i in 0..n {
        for j in 0..n {
            out[i + j * n] = inv[i][j];
        }
    }
    out
}

// ---------------------------------------------------------------------------------------
// Tensors as 3×3 matrices, for rotations done independently of the model's Mandel form.

/// Tensor indices of the Voigt slots 11, 22, 33, 23, 13, 12.
const PAIRS: [(usize, usize); 6] = [(0, 0), (1, 1), (2, 2), (1, 2), (0, 2), (0, 1)];

/// An engineering-shear strain vector as a symmetric 3×3 tensor.
fn strain_tensor(v: &[f64]) -> [[f64; 3]; 3] {
    let mut t = [[0.0; 3]; 3];
    for (k, &(i, j)) in PAIRS.iter().enumerate() {
        let x = if i == j { v[k] } else { 0.5 * v[k] };
        t[i][j] = x;
        t[j][i] = x;
    }
    t
}

fn strain_vector(t: &[[f64; 3]; 3]) -> Vec<f64> {
    PAIRS.iter().map(|&(i, j)| if i == j { t[i][j] } else { 2.0 * t[i][j] }).collect()
}

fn stress_tensor(v: &[f64]) -> [[f64; 3]; 3] {
    let mut t = [[0.0; 3]; 3];
    for (k, &(i, j)) in PAIRS.iter().enumerate() {
        t[i][j] = v[k];
        t[j][i] = v[k];
    }
    t
}

fn stress_vector(t: &[[f64; 3]; 3]) -> Vec<f64> {
    PAIRS.iter().map(|&(i, j)| t[i][j]).collect()
}

/// R t Rᵀ.
fn rotate(r: &[[f64; 3]; 3], t: &[[f64; 3]; 3]) -> [[f64; 3]; 3] {
    let mut o = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            for k in 0..3 {
                for l in 0..3 {
                    o[i][j] += r[i][k] * t[k][l] * r[j][l];
                }
            }
        }
    }
    o
}

fn apply(r: &[[f64; 3]; 3], v: &[f64]) -> [f64; 3] {
    [0, 1, 2].map(|i| r[i][0] * v[0] + r[i][1] * v[1] + r[i][2] * v[2])
}

/// A random rotation from a random unit quaternion (q0, q) (Rodrigues form).
fn random_rotation(rng: &mut StdRng) -> [[f64; 3]; 3] {
    let mut q = [0.0; 4];
    loop {
        for x in q.iter_mut() {
            *x = rng.gen_range(-1.0..1.0);
        }
        let n = q.iter().map(|x| x * x).sum::<f64>().sqrt();
        if n > 0.1 {
            q.iter_mut().for_each(|x| *x /= n);
            break;
        }
    }
    let [w, x, y, z] = q;
    [
        [1.0 - 2.0 * (y * y + z * z), 2.0 * (x * y - w * z), 2.0 * (x * z + w * y)],
        [2.0 * (x * y + w * z), 1.0 - 2.0 * (x * x + z * z), 2.0 * (y * z - w * x)],
        [2.0 * (x * z - w * y), 2.0 * (y * z + w * x), 1.0 - 2.0 * (x * x + y * y)],
    ]
}

// ---------------------------------------------------------------------------------------
// Material data.

/// T300/914C-like ply (REFERENCES.md: Soden, Hinton & Kaddour 1998, from memory):
/// E1 = 138 GPa, E2 = 11 GPa, G12 = 5.5 GPa, ν12 = 0.28, in MPa. Taken transversely isotropic
/// (E3 = E2, ν13 = ν12, G13 = G12); ν23 = 0.4 is a demo value not in the source, and
/// G23 = E2/(2(1 + ν23)) the transverse-isotropy relation.
fn t300_914c(axes: [f64; 6]) -> Vec<f64> {
    let (e1, e2, nu12, g12, nu23) = (138_000.0, 11_000.0, 0.28, 5_500.0, 0.4);
    let g23 = e2 / (2.0 * (1.0 + nu23));
    let mut p = vec![e1, e2, e2, nu12, nu12, nu23, g12, g12, g23];
    p.extend(axes);
    p
}

const ALIGNED: [f64; 6] = [1.0, 0.0, 0.0, 0.0, 1.0, 0.0];

/// Random constants the model accepts (rejection of a non-positive-definite compliance is
/// the model's; the draw repeats until it accepts) and random axes.
fn random_props(rng: &mut StdRng) -> Vec<f64> {
    let m = Orthotropic::new(PointKind::Solid3d).unwrap();
    loop {
        let mut p: Vec<f64> = (0..3).map(|_| rng.gen_range(3_000.0..200_000.0)).collect();
        p.extend((0..3).map(|_| rng.gen_range(-0.3..0.6)));
        p.extend((0..3).map(|_| rng.gen_range(1_000.0..60_000.0)));
        p.extend((0..6).map(|_| rng.gen_range(-1.0..1.0)));
        if run(&m, &Point::new(&p, 6)).outcome.status == status::OK {
            return p;
        }
    }
}

fn random_vec(rng: &mut StdRng, n: usize, s: f64) -> Vec<f64> {
    (0..n).map(|_| rng.gen_range(-s..s)).collect()
}

// ---------------------------------------------------------------------------------------
// Checks.

// With the material axes on the global ones, the compliance (the inverse of the returned
// tangent) is the textbook orthotropic compliance (Jones 1999, ch. 2, from memory):
// S11 = 1/E1, S12 = −ν12/E1, S13 = −ν13/E1, S22 = 1/E2, S23 = −ν23/E2, S33 = 1/E3,
// S44 = 1/G23, S55 = 1/G13, S66 = 1/G12, zero elsewhere; and it is symmetric, so
// ν21 = ν12 E2/E1 (the reciprocal relation). Checked for the T300/914C-like ply and for a
// set with all nine constants different (so that an index mix-up cannot hide), given with
// unnormalised axes and an a₂ that is not orthogonal to a₁ (Gram–Schmidt must give the same).
#[test]
fn aligned_axes_give_the_textbook_compliance() {
    let distinct = [90_000.0, 20_000.0, 9_000.0, 0.31, 0.22, 0.45, 7_000.0, 4_500.0, 3_200.0];
    let mut sets = vec![t300_914c(ALIGNED), t300_914c([3.0, 0.0, 0.0, 0.7, 2.5, 0.0])];
    for axes in [ALIGNED, [0.5, 0.0, 0.0, -4.0, 1e-3, 0.0]] {
        let mut p = distinct.to_vec();
        p.extend(axes);
        sets.push(p);
    }
    let m = Orthotropic::new(PointKind::Solid3d).unwrap();
    for p in &sets {
        let out = run(&m, &Point::new(p, 6));
        assert_eq!(out.outcome.status, status::OK, "{}", out.outcome.message_text());
        let s = inverse(&out.tangent, 6);
        let (e1, e2, e3, n12, n13, n23, g12, g13, g23) =
            (p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7], p[8]);
        let mut want = [[0.0; 6]; 6];
        want[0][0] = 1.0 / e1;
        want[1][1] = 1.0 / e2;
        want[2][2] = 1.0 / e3;
        want[0][1] = -n12 / e1;
        want[1][0] = -n12 / e1;
        want[0][2] = -n13 / e1;
        want[2][0] = -n13 / e1;
        want[1][2] = -n23 / e2;
        want[2][1] = -n23 / e2;
        want[3][3] = 1.0 / g23;
        want[4][4] = 1.0 / g13;
        want[5][5] = 1.0 / g12;
        let scale = 1.0 / e1.min(e2).min(e3).min(g12).min(g13).min(g23);
        for i in 0..6 {
            for j in 0..6 {
                let got = s[i + j * 6];
                assert!(
                    (got - want[i][j]).abs() <= 1e-12 * scale,
                    "S[{i}][{j}] = {got:e}, textbook {:e} ({p:?})",
                    want[i][j]
                );
            }
        }
        // Reciprocal relation ν21/E2 = ν12/E1: uniaxial σ22 gives ε11 = −ν21 σ22/E2.
        let nu21 = -s[6] * e2;
        assert!((nu21 - n12 * e2 / e1).abs() < 1e-12, "ν21 = {nu21}");
    }
}

// Off-axis engineering constants of a ply turned by θ about axis 3 (Jones 1999, §2.6,
// from memory):
//   1/E_x  = cos⁴θ/E1 + (1/G12 − 2ν12/E1) sin²θ cos²θ + sin⁴θ/E2,
//   ν_xy   = E_x [ν12/E1 (sin⁴θ + cos⁴θ) − (1/E1 + 1/E2 − 1/G12) sin²θ cos²θ],
//   1/G_xy = 2 (2/E1 + 2/E2 + 4ν12/E1 − 1/G12) sin²θ cos²θ + (sin⁴θ + cos⁴θ)/G12,
// read from the global compliance as 1/S11, −S12/S11 and 1/S66. T300/914C-like ply.
#[test]
fn off_axis_constants_follow_the_transformation_formulas() {
    let m = Orthotropic::new(PointKind::Solid3d).unwrap();
    let (e1, e2, nu12, g12) = (138_000.0, 11_000.0, 0.28, 5_500.0);
    for deg in [0.0f64, 15.0, 30.0, 45.0, 60.0, 75.0, 90.0, -30.0, 135.0] {
        let t = deg.to_radians();
        let (c, s) = (t.cos(), t.sin());
        let p = t300_914c([c, s, 0.0, -s, c, 0.0]);
        let out = run(&m, &Point::new(&p, 6));
        let sg = inverse(&out.tangent, 6);
        let (c2, s2) = (c * c, s * s);
        let ex = 1.0 / (c2 * c2 / e1 + (1.0 / g12 - 2.0 * nu12 / e1) * s2 * c2 + s2 * s2 / e2);
        let nuxy = ex * (nu12 / e1 * (s2 * s2 + c2 * c2) - (1.0 / e1 + 1.0 / e2 - 1.0 / g12) * s2 * c2);
        let gxy = 1.0
            / (2.0 * (2.0 / e1 + 2.0 / e2 + 4.0 * nu12 / e1 - 1.0 / g12) * s2 * c2
                + (s2 * s2 + c2 * c2) / g12);
        let (got_ex, got_nu, got_g) = (1.0 / sg[0], -sg[6] / sg[0], 1.0 / sg[5 + 5 * 6]);
        assert!((got_ex - ex).abs() <= 1e-11 * ex, "θ = {deg}°: E_x = {got_ex}, formula {ex}");
        assert!((got_nu - nuxy).abs() <= 1e-11, "θ = {deg}°: ν_xy = {got_nu}, formula {nuxy}");
        assert!((got_g - gxy).abs() <= 1e-11 * gxy, "θ = {deg}°: G_xy = {got_g}, formula {gxy}");
    }
}

// Frame-indifference with the material axes turning with the frame: rotating the axes, the
// start strain, the start stress and the increment by R gives the stress R σ Rᵀ and the same
// stored energy (the rotations are done here on 3×3 tensors, independently of the model's
// Mandel form).
#[test]
fn rotating_axes_and_strain_together_rotates_the_stress() {
    let m = Orthotropic::new(PointKind::Solid3d).unwrap();
    let mut rng = StdRng::seed_from_u64(0x0a7f_0001);
    for k in 0..300 {
        let p = Point {
            props: random_props(&mut rng),
            strain: random_vec(&mut rng, 6, 2e-3),
            dstrain: random_vec(&mut rng, 6, 1e-3),
            stress0: random_vec(&mut rng, 6, 300.0),
        };
        let r = random_rotation(&mut rng);
        let mut q = p.clone();
        let a1 = apply(&r, &p.props[9..12]);
        let a2 = apply(&r, &p.props[12..15]);
        q.props[9..12].copy_from_slice(&a1);
        q.props[12..15].copy_from_slice(&a2);
        q.strain = strain_vector(&rotate(&r, &strain_tensor(&p.strain)));
        q.dstrain = strain_vector(&rotate(&r, &strain_tensor(&p.dstrain)));
        q.stress0 = stress_vector(&rotate(&r, &stress_tensor(&p.stress0)));
        let a = run(&m, &p);
        let b = run(&m, &q);
        let want = stress_vector(&rotate(&r, &stress_tensor(&a.stress)));
        assert!(rel(&b.stress, &want) <= 1e-12, "#{k}: {:?} vs {want:?}", b.stress);
        assert!((b.energy[0] - a.energy[0]).abs() <= 1e-12 * a.energy[0].abs().max(1e-3), "#{k} energy");
    }
}

// Isotropic constants (E1 = E2 = E3 = E, ν12 = ν13 = ν23 = ν, G = E/(2(1 + ν)), REFERENCES.md
// "Relations") make the model `elastic` for any axes: stress, tangent and energy.
#[test]
fn isotropic_constants_give_the_elastic_model_for_any_axes() {
    let mut rng = StdRng::seed_from_u64(0x0a7f_0002);
    for kind in Orthotropic::KINDS {
        let ortho = Orthotropic::new(kind).unwrap();
        let elastic = Elastic::new(kind).unwrap();
        let n = kind.ncomp();
        for k in 0..200 {
            let e = rng.gen_range(1_000.0..300_000.0);
            let nu = rng.gen_range(-0.5..0.45);
            let g = e / (2.0 * (1.0 + nu));
            let mut props = vec![e, e, e, nu, nu, nu, g, g, g];
            props.extend(random_vec(&mut rng, 6, 1.0));
            let p = Point {
                props,
                strain: random_vec(&mut rng, n, 2e-3),
                dstrain: random_vec(&mut rng, n, 1e-3),
                stress0: random_vec(&mut rng, n, 300.0),
            };
            let a = run(&ortho, &p);
            assert_eq!(a.outcome.status, status::OK, "{}", a.outcome.message_text());
            let b = run(&elastic, &Point { props: vec![e, nu], ..p.clone() });
            assert!(rel(&a.stress, &b.stress) <= 1e-12, "{kind} #{k} stress");
            assert!(rel(&a.tangent, &b.tangent) <= 1e-12, "{kind} #{k} tangent");
            assert!((a.energy[0] - b.energy[0]).abs() <= 1e-12 * b.energy[0].abs().max(1e-6), "{kind} #{k}");
            assert_eq!((a.outcome.branch, a.energy[1]), (0, 0.0));
            assert!(a.outcome.provides(provides::ENERGY));
        }
    }
}

// The returned tangent against num-dual (an independent library, forward mode) to 1e-12,
// the complex step (Squire & Trapp 1998) against num-dual to 1e-13, and the tangent is
// symmetric (the stiffness derives from a quadratic energy).
#[test]
fn tangent_is_the_derivative_of_the_update() {
    let mut rng = StdRng::seed_from_u64(0x0a7f_0003);
    for kind in Orthotropic::KINDS {
        let m = Orthotropic::new(kind).unwrap();
        let n = kind.ncomp();
        for k in 0..300 {
            let p = Point {
                props: random_props(&mut rng),
                strain: random_vec(&mut rng, n, 2e-3),
                dstrain: random_vec(&mut rng, n, 1e-3),
                stress0: random_vec(&mut rng, n, 300.0),
            };
            let out = run(&m, &p);
            let dual = dual_tangent(&m, &p);
            assert!(rel(&out.tangent, &dual) <= 1e-12, "{kind} #{k}: tangent vs num-dual");
            let cx = complex_tangent(&m, &p, 1e-30);
            assert!(rel(&cx, &dual) <= 1e-13, "{kind} #{k}: complex step vs num-dual");
            for i in 0..n {
                for j in 0..n {
                    let (a, b) = (out.tangent[i + j * n], out.tangent[j + i * n]);
                    assert!((a - b).abs() <= 1e-12 * out.tangent[0].abs(), "{kind} #{k} symmetry");
                }
            }
        }
    }
}

// Plane strain and axisymmetric points carry the 11, 22, 33, 12 rows and columns of the 3D
// stiffness (the strains they do not carry are zero).
#[test]
fn four_components_are_the_3d_rows_and_columns() {
    let mut rng = StdRng::seed_from_u64(0x0a7f_0004);
    let m6 = Orthotropic::new(PointKind::Solid3d).unwrap();
    for kind in [PointKind::PlaneStrain, PointKind::Axisymmetric] {
        let m4 = Orthotropic::new(kind).unwrap();
        for _ in 0..50 {
            let props = random_props(&mut rng);
            let de4 = random_vec(&mut rng, 4, 1e-3);
            let de6 = [de4[0], de4[1], de4[2], 0.0, 0.0, de4[3]];
            let a = run(&m4, &Point { dstrain: de4.clone(), ..Point::new(&props, 4) });
            let b = run(&m6, &Point { dstrain: de6.to_vec(), ..Point::new(&props, 6) });
            let map = [0, 1, 2, 5];
            for (i, &si) in map.iter().enumerate() {
                assert!((a.stress[i] - b.stress[si]).abs() <= 1e-12 * b.stress[si].abs().max(1.0));
                for (j, &sj) in map.iter().enumerate() {
                    assert_eq!(a.tangent[i + j * 4], b.tangent[si + sj * 6]);
                }
            }
        }
    }
}

#[test]
fn bad_properties_fail_with_a_message() {
    let m = Orthotropic::new(PointKind::Solid3d).unwrap();
    let good = t300_914c(ALIGNED);
    let mut cases: Vec<(Vec<f64>, &str)> = Vec::new();
    let mut p = good.clone();
    p[1] = 0.0;
    cases.push((p, "must be positive"));
    let mut p = good.clone();
    p[8] = -1.0;
    cases.push((p, "must be positive"));
    let mut p = good.clone();
    p[3] = 4.0; // the 12 minor 1/(E1 E2) − ν12²/E1² < 0 since ν12² = 16 > E1/E2 ≈ 12.5
    cases.push((p, "not positive definite"));
    let mut p = good.clone();
    p[5] = 1.0; // ν23 = 1 with E3 = E2: det = (1 − ν12ν21 − ν23ν32 − ν13ν31 − 2ν21ν32ν13)/(E1E2E3) < 0
    cases.push((p, "not positive definite"));
    let mut p = good.clone();
    p[9..12].copy_from_slice(&[0.0, 0.0, 0.0]);
    cases.push((p, "axis 1"));
    let mut p = good.clone();
    p[12..15].copy_from_slice(&[-2.0, 0.0, 0.0]);
    cases.push((p, "not parallel"));
    let mut p = good.clone();
    p[4] = f64::NAN;
    cases.push((p, "finite"));
    for (props, needle) in cases {
        let out = run(&m, &Point::new(&props, 6));
        assert_eq!(out.outcome.status, status::FAILED, "{props:?}");
        assert!(out.outcome.message_text().contains(needle), "{}", out.outcome.message_text());
        assert!(out.stress.iter().chain(&out.tangent).all(|x| x.is_nan()));
    }
    assert!(Orthotropic::new(PointKind::PlaneStress).is_err());
    assert!(Orthotropic::new(PointKind::Cohesive3d).is_err());
}

/// Allocations made by 10 evaluations in scalar type `S` (buffers made beforehand).
fn count<S: Scalar>(m: &Orthotropic, props: &[f64]) -> usize {
    let n = m.info().convention.ncomp();
    let c = Call::new(props, n, 0).dstrain(&vec![1e-3; n]).temp(0.0, 0.0);
    model_allocations::<S, _>(m, &c, 10).0
}

// One call does not allocate (DEVELOPERS.md, the hot path), on the success path and on the
// failure path (a bad property), in every scalar type.
#[test]
fn no_call_allocates() {
    let mut bad = t300_914c(ALIGNED);
    bad[0] = -1.0;
    for kind in Orthotropic::KINDS {
        let m = Orthotropic::new(kind).unwrap();
        for props in [t300_914c([0.6, 0.8, 0.0, 0.0, 0.3, 1.0]), bad.clone()] {
            assert_eq!(count::<f64>(&m, &props), 0, "{kind} f64");
            assert_eq!(count::<Dual64>(&m, &props), 0, "{kind} dual");
            assert_eq!(count::<Complex64>(&m, &props), 0, "{kind} complex");
        }
    }
}
