//! An edge of a yield surface written in principal stresses: where two principal stresses are
//! equal and both at the yield stress, the edge's own tangent is the derivative of the branch
//! that keeps them equal, which a strain component moved alone does not enter when the
//! principal axes are not the coordinate axes. The check finds that branch along the principal
//! directions and passes the edge's tangent; a tangent with its rotation term wrong still fails
//! there.
//!
//! The law is invented for the test: a tension cut-off (each principal stress at most
//! Y = Y₀ + H κ) with isotropic elasticity and associated flow, returned in principal stresses
//! (one face, an edge of two, or the apex of three; Simo & Hughes 1998, §2.4, and de Souza
//! Neto, Perić & Owen 2008, ch. 8, from memory). Its tangent is the derivative of an isotropic
//! function of the trial strain: the principal block D = C − C N A⁻¹ Nᵀ C and, between two
//! principal directions, (σᵢ − σⱼ)/(εᵢ − εⱼ), or Dᵢᵢ − Dᵢⱼ where they are equal (the
//! Daleckii–Krein formula; Carlson & Hoger 1986, from memory). Real arithmetic only: the checks
//! here use the central difference.

use nalgebra::{Matrix3, SymmetricEigen};
use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::{
    CallInput, CallOutput, Convention, Fault, Model, ModelRoutine, PointKind, Report, RoutineInfo, Scalar,
    Scheme, ShearMeasure, Verdict,
};
use tancheck_testkit::check::{only, run_from_zero, summary};

#[derive(Clone, Debug)]
struct CutOff {
    info: RoutineInfo,
    /// The rotation term between principal directions taken as the elastic 2μ (a flaw).
    elastic_spin: bool,
}

/// Routine order 11, 22, 33, 23, 13, 12 with engineering shears → the tensor.
fn tensor(v: &[f64]) -> Matrix3<f64> {
    Matrix3::new(v[0], 0.5 * v[5], 0.5 * v[4], 0.5 * v[5], v[1], 0.5 * v[3], 0.5 * v[4], 0.5 * v[3], v[2])
}

fn stress_vector(s: &Matrix3<f64>) -> [f64; 6] {
    [s[(0, 0)], s[(1, 1)], s[(2, 2)], s[(1, 2)], s[(0, 2)], s[(0, 1)]]
}

impl CutOff {
    /// Stress, new state and tangent (column-major 6 × 6) for the trial strain `et`.
    fn update(&self, p: &[f64], et: Matrix3<f64>, kappa0: f64) -> ([f64; 6], Matrix3<f64>, f64, [f64; 36]) {
        let (e, nu, y0, h) = (p[0], p[1], p[2], p[3]);
        let (lam, mu) = (e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu)), e / (2.0 * (1.0 + nu)));
        let eig = SymmetricEigen::new(et);
        let (ev, pv) = (eig.eigenvalues, eig.eigenvectors);
        let tr = ev.sum();
        let cp = |i: usize, k: usize| lam + if i == k { 2.0 * mu } else { 0.0 };
        let trial: Vec<f64> = (0..3).map(|i| lam * tr + 2.0 * mu * ev[i]).collect();
        let y = y0 + h * kappa0;
        let tol = 1e-12 * y0;
        let f: Vec<f64> = trial.iter().map(|s| s - y).collect();
        let mut act: Vec<usize> = (0..3).filter(|&i| f[i] > -tol).collect();
        let mut dg = vec![0.0; 3];
        for _ in 0..8 {
            dg = vec![0.0; 3];
            if act.is_empty() {
                break;
            }
            let m = act.len();
            let a = nalgebra::DMatrix::from_fn(m, m, |r, c| cp(act[r], act[c]) + h);
            let rhs = nalgebra::DVector::from_fn(m, |r, _| f[act[r]]);
            let g = a.lu().solve(&rhs).expect("regular");
            if let Some((r, _)) =
                g.iter().enumerate().filter(|(_, x)| **x < -1e-14).min_by(|a, b| a.1.total_cmp(b.1))
            {
                act.remove(r);
                continue;
            }
            for (r, &i) in act.iter().enumerate() {
                dg[i] = g[r];
            }
            let sum: f64 = dg.iter().sum();
            let viol = (0..3).find(|i| {
                !act.contains(i) && f[*i] - (0..3).map(|k| dg[k] * cp(*i, k)).sum::<f64>() - h * sum > tol
            });
            match viol {
                Some(i) => {
                    act.push(i);
                    act.sort();
                }
                None => break,
            }
        }
        let sig: Vec<f64> =
            (0..3).map(|i| trial[i] - (0..3).map(|k| dg[k] * cp(i, k)).sum::<f64>()).collect();
        // The principal block: C − C N A⁻¹ Nᵀ C over the active faces.
        let mut d = Matrix3::from_fn(cp);
        if !act.is_empty() {
            let m = act.len();
            let a = nalgebra::DMatrix::from_fn(m, m, |r, c| cp(act[r], act[c]) + h);
            let ai = a.try_inverse().expect("regular");
            d = Matrix3::from_fn(|i, j| {
                let mut v = cp(i, j);
                for r in 0..m {
                    for c in 0..m {
                        v -= cp(i, act[r]) * ai[(r, c)] * cp(act[c], j);
                    }
                }
                v
            });
        }
        let sigma = pv * Matrix3::from_diagonal(&nalgebra::Vector3::from_column_slice(&sig)) * pv.transpose();
        let mut ep = Matrix3::zeros();
        for (k, g) in dg.iter().enumerate() {
            ep += *g * pv.column(k) * pv.column(k).transpose();
        }
        let scale = ev.amax().max(1e-300);
        let theta = |i: usize, j: usize| {
            if self.elastic_spin {
                2.0 * mu
            } else if (ev[i] - ev[j]).abs() > 1e-9 * scale {
                (sig[i] - sig[j]) / (ev[i] - ev[j])
            } else {
                d[(i, i)] - d[(i, j)]
            }
        };
        let mut tangent = [0.0; 36];
        for c in 0..6 {
            let mut unit = [0.0; 6];
            unit[c] = 1.0;
            let de = pv.transpose() * tensor(&unit) * pv;
            let m = Matrix3::from_fn(|i, j| {
                if i == j {
                    (0..3).map(|k| d[(i, k)] * de[(k, k)]).sum()
                } else {
                    theta(i, j) * de[(i, j)]
                }
            });
            let ds = stress_vector(&(pv * m * pv.transpose()));
            tangent[c * 6..c * 6 + 6].copy_from_slice(&ds);
        }
        (stress_vector(&sigma), ep, dg.iter().sum(), tangent)
    }
}

impl Model for CutOff {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let re = |v: &[S]| v.iter().map(|x| x.re()).collect::<Vec<f64>>();
        let (props, strain, dstrain, st) =
            (re(input.props), re(input.strain), re(input.dstrain), re(input.state0));
        let total: Vec<f64> = strain.iter().zip(&dstrain).map(|(a, b)| a + b).collect();
        // Plastic strain kept as tensor components 11, 22, 33, 23, 13, 12; then κ.
        let ep0 = Matrix3::new(st[0], st[5], st[4], st[5], st[1], st[3], st[4], st[3], st[2]);
        let (stress, dep, dkappa, tangent) = self.update(&props, tensor(&total) - ep0, st[6]);
        let ep = ep0 + dep;
        let state = [ep[(0, 0)], ep[(1, 1)], ep[(2, 2)], ep[(1, 2)], ep[(0, 2)], ep[(0, 1)], st[6] + dkappa];
        for (o, v) in out.stress.iter_mut().zip(stress) {
            *o = S::cst(v);
        }
        for (o, v) in out.state.iter_mut().zip(state) {
            *o = S::cst(v);
        }
        for (o, v) in out.tangent.iter_mut().zip(tangent) {
            *o = S::cst(v);
        }
        out.dstress_dtemp.iter_mut().for_each(|x| *x = S::zero());
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        out.outcome.branch = i32::from(dkappa > 0.0);
        Ok(())
    }
}

/// E = 30 GPa, ν = 0.2, Y₀ = 3 MPa, H = 3 GPa (invented, of the order of a concrete in
/// tension). An equal stretch along e₁ and along v = (0, cos 30°, sin 30°): two principal
/// stresses equal, reaching the edge of the faces; then a zero increment there; then on.
fn path() -> Path {
    let (c, s) = (30f64.to_radians().cos(), 30f64.to_radians().sin());
    let a = 2e-4;
    let stretch = [a, a * c * c, a * s * s, 2.0 * a * c * s, 0.0, 0.0];
    Path {
        name: "equal stretch in a tilted plane, stay, stretch on".into(),
        increments: vec![
            PathIncrement::strain(stretch),
            PathIncrement::strain([0.0; 6]),
            PathIncrement::strain(stretch.map(|x| 0.5 * x)),
        ],
    }
}

fn check(elastic_spin: bool) -> Report {
    let info = RoutineInfo {
        name: if elastic_spin { "cut-off-elastic-spin" } else { "cut-off" }.into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 7,
        nprop: 4,
    };
    let mut r = ModelRoutine(CutOff { info, elastic_spin });
    run_from_zero(&mut r, &[30000.0, 0.2, 3.0, 3000.0], 20.0, &path(), &only(Scheme::Central))
}

#[test]
fn the_edge_tangent_at_an_edge_passes() {
    let r = check(false);
    assert_eq!(r.verdict, Verdict::Pass, "{}", summary(&r));
    let d = r.increments[1].diagnosis.as_ref().expect("the zero increment straddles the edge");
    assert!(d.pass && d.reason.contains("corner"), "{}", d.reason);
}

#[test]
fn an_edge_tangent_with_a_wrong_rotation_term_fails_there() {
    let r = check(true);
    assert_eq!(r.verdict, Verdict::TangentFailure, "{}", summary(&r));
    assert!(!r.increments[1].passed(), "{}", summary(&r));
}
