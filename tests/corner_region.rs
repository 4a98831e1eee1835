//! At a corner several branches meet, and the update's derivative there is a set: the
//! derivative of each branch that starts at the point. A tangent equal to one of them serves
//! Newton's method (a generalized derivative of a piecewise smooth map; Clarke 1983, and the
//! semismooth Newton method of Qi & Sun 1993, from memory), and the check passes it. The
//! one-sided derivatives along each strain component need not show that branch: at the apex of
//! an interface whose shear strength falls with the normal traction, an opening reaches the
//! apex, a slip one way leaves it along one face and a slip the other way along the other, so
//! the apex's own tangent matches neither side of the slip column (a correct Mohr–Coulomb
//! routine failed `kink-neither-side` at its apex and edges; a user-style sweep).
//!
//! The law is invented for the test: an interface (opening, slip) with tractions t = K(δ − δp),
//! two faces f± = μ tₙ ± tₛ − c, c = c₀ + H κ, associated flow, and the apex return when both
//! faces are active. Its tangents are the standard multi-surface ones (Simo & Hughes 1998,
//! §2.4, from memory): K − K N A⁻¹ Nᵀ K with A_ik = n_i·K n_k + H.

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::{
    CallInput, CallOutput, Convention, Fault, Model, ModelRoutine, PointKind, Report, RoutineInfo, Scalar,
    Scheme, Settings, ShearMeasure, Verdict,
};
use tancheck_testkit::check::{only, run_from_zero, summary};

/// What the apex tangent gets wrong, if anything.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Flaw {
    None,
    /// The hardening left out of the coupling of the two faces (A₁₂ = n₁·K n₂).
    Coupling,
    /// The slip column of the apex tangent is the mean of the two faces' (what a central
    /// difference across the apex gives).
    Mean,
}

#[derive(Clone, Debug)]
struct Wedge {
    info: RoutineInfo,
    flaw: Flaw,
}

impl Wedge {
    fn routine(flaw: Flaw) -> ModelRoutine<Wedge> {
        let info = RoutineInfo {
            name: format!("wedge-{flaw:?}").to_lowercase(),
            convention: Convention::new(PointKind::Cohesive2d, ShearMeasure::Engineering),
            nstate: 3,
            nprop: 5,
        };
        ModelRoutine(Wedge { info, flaw })
    }
}

/// K − K N A⁻¹ Nᵀ K over the active faces `act` (normals n± = (μ, ±1)), into `out`
/// (column-major 2 × 2); `coupling_h` is the hardening in A's off-diagonal terms.
fn plastic_tangent<S: Scalar>(k: [S; 2], mu: S, h: S, act: &[f64], coupling_h: S, out: &mut [S]) {
    let kn = |s: f64| [k[0] * mu, k[1] * s]; // K n
    let m = act.len();
    let mut a = [[S::zero(); 2]; 2];
    for (i, &si) in act.iter().enumerate() {
        for (l, &sl) in act.iter().enumerate() {
            let kl = kn(sl);
            a[i][l] = mu * kl[0] + kl[1] * si + if i == l { h } else { coupling_h };
        }
    }
    let inv = if m == 1 {
        [[S::one() / a[0][0], S::zero()], [S::zero(), S::zero()]]
    } else {
        let det = a[0][0] * a[1][1] - a[0][1] * a[1][0];
        [[a[1][1] / det, -a[0][1] / det], [-a[1][0] / det, a[0][0] / det]]
    };
    for c in 0..2 {
        for r in 0..2 {
            let mut v = if r == c { k[r] } else { S::zero() };
            for (i, &si) in act.iter().enumerate() {
                for (l, &sl) in act.iter().enumerate() {
                    v -= kn(si)[r] * inv[i][l] * kn(sl)[c];
                }
            }
            out[c * 2 + r] = v;
        }
    }
}

impl Model for Wedge {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (k, mu, c0, h) =
            ([input.props[0], input.props[1]], input.props[2], input.props[3], input.props[4]);
        let (kappa0, p0) = (input.state0[0], [input.state0[1], input.state0[2]]);
        let tr = [
            k[0] * (input.strain[0] + input.dstrain[0] - p0[0]),
            k[1] * (input.strain[1] + input.dstrain[1] - p0[1]),
        ];
        let c = c0 + h * kappa0;
        let f = |s: f64| mu * tr[0] + tr[1] * s - c;
        // A face counts as active from a small negative value on, as many routines test it.
        let tol = 1e-12 * c0.re();
        let (fp, fm) = (f(1.0), f(-1.0));
        let mut act: Vec<f64> =
            [(1.0, fp), (-1.0, fm)].iter().filter(|(_, v)| v.re() > -tol).map(|x| x.0).collect();
        out.dstress_dtemp[0] = S::zero();
        out.dstress_dtemp[1] = S::zero();
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        let kn = |s: f64| [k[0] * mu, k[1] * s];
        let mut dg = [S::zero(); 2];
        loop {
            match act.len() {
                0 => break,
                1 => {
                    let s = act[0];
                    let a = mu * kn(s)[0] + kn(s)[1] * s + h;
                    dg[0] = f(s) / a;
                    // The other face after the return: still inside, or the apex.
                    let o = -s;
                    let fo = f(o) - dg[0] * (mu * kn(s)[0] + kn(s)[1] * o + h);
                    if fo.re() > tol {
                        act = vec![1.0, -1.0];
                        continue;
                    }
                    break;
                }
                _ => {
                    let a = |si: f64, sl: f64| mu * kn(sl)[0] + kn(sl)[1] * si + h;
                    let (a11, a12, a21, a22) = (a(1.0, 1.0), a(1.0, -1.0), a(-1.0, 1.0), a(-1.0, -1.0));
                    let det = a11 * a22 - a12 * a21;
                    let g1 = (a22 * fp - a12 * fm) / det;
                    let g2 = (a11 * fm - a21 * fp) / det;
                    if g1.re() < -tol / c0.re() {
                        act = vec![-1.0];
                        continue;
                    }
                    if g2.re() < -tol / c0.re() {
                        act = vec![1.0];
                        continue;
                    }
                    dg = [g1, g2];
                    break;
                }
            }
        }
        let mut t = tr;
        let mut dp = [S::zero(); 2];
        let mut dkappa = S::zero();
        for (i, &s) in act.iter().enumerate() {
            let n = [mu, S::cst(s)];
            for r in 0..2 {
                dp[r] += dg[i] * n[r];
                t[r] -= k[r] * dg[i] * n[r];
            }
            dkappa += dg[i];
        }
        out.stress[0] = t[0];
        out.stress[1] = t[1];
        out.state[0] = kappa0 + dkappa;
        out.state[1] = p0[0] + dp[0];
        out.state[2] = p0[1] + dp[1];
        out.outcome.branch = act.len() as i32;
        if act.is_empty() {
            out.tangent[0] = k[0];
            out.tangent[1] = S::zero();
            out.tangent[2] = S::zero();
            out.tangent[3] = k[1];
            return Ok(());
        }
        let coupling_h = if act.len() == 2 && self.flaw == Flaw::Coupling { S::zero() } else { h };
        plastic_tangent(k, mu, h, &act, coupling_h, out.tangent);
        if act.len() == 2 && self.flaw == Flaw::Mean {
            let (mut up, mut down) = ([S::zero(); 4], [S::zero(); 4]);
            plastic_tangent(k, mu, h, &[1.0], h, &mut up);
            plastic_tangent(k, mu, h, &[-1.0], h, &mut down);
            out.tangent[2] = (up[2] + down[2]) * 0.5;
            out.tangent[3] = (up[3] + down[3]) * 0.5;
        }
        Ok(())
    }
}

/// K = 1e5 N/mm³ both ways, μ = 0.5, c₀ = 10 MPa, H = 2000 MPa/mm (invented): the apex is at
/// tₙ = c/μ = 20 MPa, reached by an opening of 2e-4 mm.
const PROPS: [f64; 5] = [1e5, 1e5, 0.5, 10.0, 2000.0];

/// Open past the apex (a plastic apex return), stay (a zero increment: the point sits at the
/// apex with both faces at zero), then open and slip.
fn path() -> Path {
    Path {
        name: "open to the apex, stay, open and slip".into(),
        increments: vec![
            PathIncrement::strain([3e-4, 0.0, 0.0, 0.0, 0.0, 0.0]),
            PathIncrement::strain([0.0; 6]),
            PathIncrement::strain([5e-5, 2e-5, 0.0, 0.0, 0.0, 0.0]),
        ],
    }
}

fn check(flaw: Flaw, settings: &Settings) -> Report {
    run_from_zero(&mut Wedge::routine(flaw), &PROPS, 20.0, &path(), settings)
}

#[test]
fn the_apex_tangent_at_the_apex_passes() {
    for settings in [Settings::default(), only(Scheme::Central)] {
        let r = check(Flaw::None, &settings);
        assert_eq!(r.verdict, Verdict::Pass, "{}", summary(&r));
        // The zero increment sat on the corner and was cleared by the branch found there.
        let inc = &r.increments[1];
        let d = inc.diagnosis.as_ref().expect("the zero increment straddles the apex");
        assert!(d.pass && d.reason.contains("corner"), "{}", d.reason);
    }
}

#[test]
fn a_wrong_apex_tangent_still_fails_at_the_apex() {
    for flaw in [Flaw::Coupling, Flaw::Mean] {
        for settings in [Settings::default(), only(Scheme::Central)] {
            let r = check(flaw, &settings);
            assert_eq!(r.verdict, Verdict::TangentFailure, "{flaw:?}: {}", summary(&r));
            // The zero increment, on the corner, fails too.
            assert!(!r.increments[1].passed(), "{flaw:?}: {}", summary(&r));
        }
    }
}

/// Elasticity whose 11 modulus differs in tension and compression (σ = C ε + (E_c − E_t)
/// min(ε₁₁, 0) e₁₁, C isotropic of E_t and ν; invented numbers), returning at ε₁₁ = 0 exactly
/// the mean of the two sides' 11 entries. The mean is no branch's derivative. Directions
/// along the boundary (ε₁₁ = 0) keep their points on it, where a central difference gives the
/// mean too: the search must not take them for a branch (it did, and passed the mean; the
/// bundled campaign's negative control caught it).
#[derive(Clone, Debug)]
struct MeanAtZero(RoutineInfo);

impl Model for MeanAtZero {
    fn info(&self) -> &RoutineInfo {
        &self.0
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (et, ec, nu) = (input.props[0], input.props[1], input.props[2]);
        let lam = et * nu / ((nu + 1.0) * (-(nu * 2.0) + 1.0));
        let mu = et / ((nu + 1.0) * 2.0);
        let eps: Vec<S> = (0..6).map(|i| input.strain[i] + input.dstrain[i]).collect();
        let tr = eps[0] + eps[1] + eps[2];
        for (i, &e) in eps.iter().enumerate() {
            out.stress[i] = if i < 3 { lam * tr + mu * e * 2.0 } else { mu * e };
            for j in 0..6 {
                out.tangent[j * 6 + i] = match (i < 3, j < 3) {
                    (true, true) => lam + if i == j { mu * 2.0 } else { S::zero() },
                    (false, false) if i == j => mu,
                    _ => S::zero(),
                };
            }
            out.dstress_dtemp[i] = S::zero();
        }
        let e11 = eps[0].re();
        if e11 < 0.0 {
            out.stress[0] += (ec - et) * eps[0];
            out.tangent[0] += ec - et;
        } else if e11 == 0.0 {
            out.tangent[0] += (ec - et) * 0.5;
        }
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        Ok(())
    }
}

#[test]
fn the_mean_of_two_sides_is_no_corner_branch() {
    let info = RoutineInfo {
        name: "mean-at-zero".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 0,
        nprop: 3,
    };
    let path = Path {
        name: "stretch across, 11 held at zero".into(),
        increments: vec![PathIncrement::strain([0.0, 1e-3, 0.0, 0.0, 0.0, 5e-4])],
    };
    for settings in [Settings::default(), only(Scheme::Central)] {
        let mut m = ModelRoutine(MeanAtZero(info.clone()));
        let r = run_from_zero(&mut m, &[200000.0, 50000.0, 0.25], 20.0, &path, &settings);
        assert_eq!(r.verdict, Verdict::TangentFailure, "{}", summary(&r));
        assert_eq!(r.finding(), "kink-neither-side", "{}", summary(&r));
    }
}
