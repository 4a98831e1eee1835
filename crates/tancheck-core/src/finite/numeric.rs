//! The numerical tangent of a finite-strain routine, made directly in the measure it declares.
//!
//! Every column perturbs the deformation gradient at the end of the increment and nothing
//! else (the start F₀, stress, state, temperature and time stay as they were; the rotation
//! increment of a declared frame is recomputed from the perturbed F₁):
//!
//! | measure | perturbation of F₁ | quantity differenced | mapped back |
//! | --- | --- | --- | --- |
//! | tau-/sigma-jaumann | F + ε D F (Miehe 1996) | τ | — (÷ J) |
//! | tau-/sigma-truesdell | F + ε D F | S = F⁻¹ τ F⁻ᵀ | F δS Fᵀ (÷ J) |
//! | tau-green-naghdi | F + ε D F | Rᵀ τ R | R δ(·) Rᵀ |
//! | ds-de | F + ε F⁻ᵀ D | S | — |
//! | dp-df | F + ε e_k⊗e_l | P = τ F⁻ᵀ | — |
//!
//! D is the symmetric unit direction of a column (e_c⊗e_c, or ½(e_c⊗e_d + e_d⊗e_c) for a
//! shear). With a symmetric D the variation has no spin, so the Jaumann rate is the plain
//! variation of τ (Miehe 1996, CMAME 134:223–240; the form of the perturbation from memory).
//! Central differences use real calls, the complex step (Squire & Trapp 1998) the twin.

use num_complex::Complex64;

use super::mat3::{self, Mat3};
use super::measure::{StressMeasure, TangentMeasure};
use super::routine::{prefill, FiniteInput, FiniteOutput, FiniteRoutine};
use crate::routine::{Fault, Outcome};
use crate::scalar::Scalar;

/// The start of one increment: everything but F₁.
#[derive(Clone, Debug)]
pub struct Start {
    pub properties: Vec<f64>,
    pub f0: Mat3<f64>,
    pub stress0: [f64; 6],
    pub state0: Vec<f64>,
    pub temperature: [f64; 2],
    pub time: [f64; 2],
    pub increment: i32,
}

/// One call's results.
#[derive(Clone, Debug)]
pub struct Result1 {
    pub stress: [f64; 6],
    pub state: Vec<f64>,
    pub tangent: Vec<f64>,
    pub energy: [f64; 2],
    pub outcome: Outcome,
}

/// Scratch buffers for calls, allocated once per routine; calls allocate nothing.
pub struct Workspace {
    state: Vec<f64>,
    tangent: Vec<f64>,
    properties_c: Vec<Complex64>,
    state0_c: Vec<Complex64>,
    state_c: Vec<Complex64>,
    tangent_c: Vec<Complex64>,
    energy: [f64; 2],
    /// Real calls made.
    pub calls: u64,
    /// Complex calls made.
    pub complex_calls: u64,
}

impl Workspace {
    pub fn new(nstate: usize, nproperties: usize) -> Workspace {
        Workspace {
            state: vec![0.0; nstate],
            tangent: vec![0.0; 81],
            properties_c: vec![Complex64::new(0.0, 0.0); nproperties],
            state0_c: vec![Complex64::new(0.0, 0.0); nstate],
            state_c: vec![Complex64::new(0.0, 0.0); nstate],
            tangent_c: vec![Complex64::new(0.0, 0.0); 81],
            energy: [0.0; 2],
            calls: 0,
            complex_calls: 0,
        }
    }

    /// A full real call at F₁, keeping everything it returns (allocates the result).
    pub fn call_full(
        &mut self,
        r: &mut dyn FiniteRoutine,
        p: &Start,
        f1: &Mat3<f64>,
    ) -> Result<Result1, Fault> {
        let mut outcome = Outcome::default();
        let stress = self.call_real(r, p, f1, &mut outcome)?;
        let n = r.info().tangent.size();
        Ok(Result1 {
            stress,
            state: self.state.clone(),
            tangent: self.tangent[..n * n].to_vec(),
            energy: self.energy,
            outcome,
        })
    }

    /// The stress of a real call at F₁ (in the routine's measure); state and tangent stay
    /// in the workspace.
    pub fn call_real(
        &mut self,
        r: &mut dyn FiniteRoutine,
        p: &Start,
        f1: &Mat3<f64>,
        outcome: &mut Outcome,
    ) -> Result<[f64; 6], Fault> {
        let frame = r.info().frame;
        let n = r.info().tangent.size();
        let f0v = mat3::to_flat(&p.f0);
        let f1v = mat3::to_flat(f1);
        let rot = mat3::to_flat(&frame.increment(&p.f0, f1));
        let input = FiniteInput {
            properties: &p.properties,
            f0: &f0v,
            f1: &f1v,
            rotation: &rot,
            temperature: p.temperature,
            stress0: &p.stress0,
            state0: &p.state0,
            time: p.time,
            increment: p.increment,
        };
        let mut stress = [0.0; 6];
        let mut energy = [0.0; 2];
        let mut out = FiniteOutput {
            stress: &mut stress,
            state: &mut self.state,
            tangent: &mut self.tangent[..n * n],
            energy: &mut energy,
            outcome,
        };
        prefill(&mut out, f64::NAN);
        self.calls += 1;
        r.call(&input, &mut out)?;
        self.energy = energy;
        Ok(stress)
    }

    /// The stress of a complex call at F₁ (its real part must equal the real call's).
    pub fn call_complex(
        &mut self,
        r: &mut dyn FiniteRoutine,
        p: &Start,
        f1: &Mat3<Complex64>,
    ) -> Result<[Complex64; 6], Fault> {
        let frame = r.info().frame;
        let n = r.info().tangent.size();
        for (c, x) in self.properties_c.iter_mut().zip(&p.properties) {
            *c = Complex64::new(*x, 0.0);
        }
        for (c, x) in self.state0_c.iter_mut().zip(&p.state0) {
            *c = Complex64::new(*x, 0.0);
        }
        let f0 = mat3::lift::<Complex64>(&p.f0);
        let f0v = mat3::to_flat(&f0);
        let f1v = mat3::to_flat(f1);
        let rot = mat3::to_flat(&frame.increment(&f0, f1));
        let s0 = p.stress0.map(|x| Complex64::new(x, 0.0));
        let input = FiniteInput {
            properties: &self.properties_c,
            f0: &f0v,
            f1: &f1v,
            rotation: &rot,
            temperature: p.temperature.map(|x| Complex64::new(x, 0.0)),
            stress0: &s0,
            state0: &self.state0_c,
            time: p.time,
            increment: p.increment,
        };
        let nan = Complex64::new(f64::NAN, f64::NAN);
        let mut stress = [nan; 6];
        let mut energy = [nan; 2];
        let mut outcome = Outcome::default();
        let mut out = FiniteOutput {
            stress: &mut stress,
            state: &mut self.state_c,
            tangent: &mut self.tangent_c[..n * n],
            energy: &mut energy,
            outcome: &mut outcome,
        };
        prefill(&mut out, nan);
        self.complex_calls += 1;
        r.call_complex(&input, &mut out)?;
        Ok(stress)
    }
}

/// How a numerical tangent is made.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Difference {
    /// Central differences of real calls, step ε on the perturbation.
    Central(f64),
    /// Complex step with the twin, step h.
    ComplexStep(f64),
    /// One-sided second-order differences of real calls, (−3q₀ + 4q(h) − q(2h))/2h along the
    /// perturbation times `sign` (1 forward, −1 backward), from the stress at F₁ itself (in
    /// the declared measure): the derivative on one side of a kink.
    OneSided { step: f64, sign: f64, stress_at_f1: [f64; 6] },
}

/// The direction of F₁ perturbed for column `b` of measure `m`.
pub fn perturbation(m: TangentMeasure, f1: &Mat3<f64>, b: usize) -> Mat3<f64> {
    match m {
        TangentMeasure::DpDf => mat3::flat_direction(b),
        TangentMeasure::DsDe => mat3::mul(&mat3::transpose(&mat3::inverse(f1)), &mat3::sym_direction(b)),
        _ => mat3::mul(&mat3::sym_direction(b), f1),
    }
}

/// The quantity differenced for measure `m`, from F and Kirchhoff stress (9 entries; the
/// symmetric ones use the first 6).
pub fn quantity<S: Scalar>(m: TangentMeasure, f: &Mat3<S>, tau: &[S; 6]) -> [S; 9] {
    let t = mat3::from_sym6(tau);
    let mut q = [S::zero(); 9];
    match m {
        TangentMeasure::TauJaumann | TangentMeasure::SigmaJaumann => q[..6].copy_from_slice(tau),
        TangentMeasure::TauTruesdell | TangentMeasure::SigmaTruesdell | TangentMeasure::DsDe => {
            let fi = mat3::inverse(f);
            let s = mat3::mul(&mat3::mul(&fi, &t), &mat3::transpose(&fi));
            q[..6].copy_from_slice(&mat3::to_sym6(&s));
        }
        TangentMeasure::TauGreenNaghdi => {
            let r = mat3::rotation(f);
            let x = mat3::mul(&mat3::mul(&mat3::transpose(&r), &t), &r);
            q[..6].copy_from_slice(&mat3::to_sym6(&x));
        }
        TangentMeasure::DpDf => {
            let p = mat3::mul(&t, &mat3::transpose(&mat3::inverse(f)));
            q = mat3::to_flat(&p);
        }
    }
    q
}

/// A differenced quantity mapped back to a tangent column.
pub fn map_back(m: TangentMeasure, f: &Mat3<f64>, dq: &[f64; 9]) -> [f64; 9] {
    let j = mat3::det(f);
    let sym = |v: &[f64; 9]| {
        let mut s = [0.0; 6];
        s.copy_from_slice(&v[..6]);
        mat3::from_sym6(&s)
    };
    let push = |x: Mat3<f64>| mat3::mul(&mat3::mul(f, &x), &mat3::transpose(f));
    let mut out = [0.0; 9];
    let col = match m {
        TangentMeasure::TauJaumann | TangentMeasure::DsDe | TangentMeasure::DpDf => return *dq,
        TangentMeasure::SigmaJaumann => mat3::scale(&sym(dq), 1.0 / j),
        TangentMeasure::TauTruesdell => push(sym(dq)),
        TangentMeasure::SigmaTruesdell => mat3::scale(&push(sym(dq)), 1.0 / j),
        TangentMeasure::TauGreenNaghdi => {
            let r = mat3::rotation(f);
            mat3::mul(&mat3::mul(&r, &sym(dq)), &mat3::transpose(&r))
        }
    };
    out[..6].copy_from_slice(&mat3::to_sym6(&col));
    out
}

/// What numerical tangent to make: its measure, how to read the routine's stress (the
/// declared measure, or the other one for a diagnosis), and the difference scheme.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Ask {
    pub measure: TangentMeasure,
    pub stress: StressMeasure,
    pub how: Difference,
}

/// The numerical tangent of `r` at F₁ as `ask` says, written column-major into `out`
/// (`measure.size()`² entries).
pub fn tangent(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    p: &Start,
    f1: &Mat3<f64>,
    ask: Ask,
    out: &mut [f64],
) -> Result<(), Fault> {
    let Ask { measure: m, stress, how } = ask;
    let n = m.size();
    let mut outcome = Outcome::default();
    for b in 0..n {
        let dir = perturbation(m, f1, b);
        let dq = match how {
            Difference::Central(h) => {
                let fp = mat3::add(f1, &mat3::scale(&dir, h));
                let fm = mat3::sub(f1, &mat3::scale(&dir, h));
                let sp = ws.call_real(r, p, &fp, &mut outcome)?;
                let sm = ws.call_real(r, p, &fm, &mut outcome)?;
                let qp = quantity(m, &fp, &stress.to_kirchhoff(&sp, mat3::det(&fp)));
                let qm = quantity(m, &fm, &stress.to_kirchhoff(&sm, mat3::det(&fm)));
                let mut d = [0.0; 9];
                for k in 0..9 {
                    d[k] = (qp[k] - qm[k]) / (2.0 * h);
                }
                d
            }
            Difference::OneSided { step: h, sign, stress_at_f1 } => {
                let h = h * sign;
                let q0 = quantity(m, f1, &stress.to_kirchhoff(&stress_at_f1, mat3::det(f1)));
                let f_1 = mat3::add(f1, &mat3::scale(&dir, h));
                let f_2 = mat3::add(f1, &mat3::scale(&dir, 2.0 * h));
                let s1 = ws.call_real(r, p, &f_1, &mut outcome)?;
                let s2 = ws.call_real(r, p, &f_2, &mut outcome)?;
                let q1 = quantity(m, &f_1, &stress.to_kirchhoff(&s1, mat3::det(&f_1)));
                let q2 = quantity(m, &f_2, &stress.to_kirchhoff(&s2, mat3::det(&f_2)));
                let mut d = [0.0; 9];
                for k in 0..9 {
                    d[k] = (-3.0 * q0[k] + 4.0 * q1[k] - q2[k]) / (2.0 * h);
                }
                d
            }
            Difference::ComplexStep(h) => {
                let mut fc = mat3::lift::<Complex64>(f1);
                for i in 0..3 {
                    for j in 0..3 {
                        fc[i][j].im = h * dir[i][j];
                    }
                }
                let sc = ws.call_complex(r, p, &fc)?;
                let q = quantity(m, &fc, &stress.to_kirchhoff(&sc, mat3::det(&fc)));
                q.map(|z| z.im / h)
            }
        };
        let col = map_back(m, f1, &dq);
        out[n * b..n * b + n].copy_from_slice(&col[..n]);
    }
    Ok(())
}
