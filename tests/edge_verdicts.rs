//! Verdicts at the edges of a branch: a correct zero tangent at a perfectly plastic apex with
//! the complex-step twin (its derivative rounding of a few ε·K), and a continuum tangent on an
//! increment that enters plasticity near its end. Split from tests/verdict.rs.

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::{CallInput, CallOutput, Fault, ModelRoutine, PointKind, RoutineInfo, Settings, Verdict};
use tancheck::models::{reference, zoo_model};
use tancheck_testkit::check::{run_from_zero, summary};

/// A perfectly plastic return to the apex of a pressure-dependent cone, hydrostatic part only
/// (bulk modulus K = 1.5e4, friction A = 0.3, cohesion k = 10, made-up numbers): past
/// A·K·tr ε = k the pressure is computed as p = p_tr − K (A p_tr − k)/(A K), which is k/A in
/// exact arithmetic, and the tangent returned is zero, its true derivative. In the twin the
/// derivative parts of p_tr and of the correction cancel to a few ε·K, not to zero. Before the
/// apex, isotropic elasticity (shear modulus 1e4).
/// With `.1`, the elastic tangent is returned at the apex too (a flaw).
struct Apex(ModelRoutine<tancheck::models::AnyModel>, bool);

fn apex_update<T>(strain: &[T], dstrain: &[T], stress: &mut [T], re: impl Fn(T) -> f64) -> bool
where
    T: Copy
        + std::ops::Add<Output = T>
        + std::ops::Sub<Output = T>
        + std::ops::Mul<Output = T>
        + std::ops::Div<Output = T>
        + From<f64>,
{
    let (k, mu, a, c) = (T::from(1.5e4), T::from(1e4), T::from(0.3), T::from(10.0));
    let e: Vec<T> = strain.iter().zip(dstrain).map(|(x, y)| *x + *y).collect();
    let tr = e[0] + e[1] + e[2];
    let p_tr = k * tr;
    if re(a * p_tr - c) <= 0.0 {
        let third = tr / T::from(3.0);
        for (i, s) in stress.iter_mut().enumerate().take(6) {
            let dev = if i < 3 { e[i] - third } else { e[i] * T::from(0.5) };
            *s = if i < 3 { p_tr } else { T::from(0.0) } + T::from(2.0) * mu * dev;
        }
        return false;
    }
    let p = p_tr - k * (a * p_tr - c) / (a * k);
    for (i, s) in stress.iter_mut().enumerate().take(6) {
        *s = if i < 3 { p } else { T::from(0.0) };
    }
    true
}

impl tancheck::core::Routine for Apex {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.call(input, output)?;
        if apex_update(input.strain, input.dstrain, output.stress, |x| x) && !self.1 {
            output.tangent.iter_mut().for_each(|t| *t = 0.0);
        } else {
            let (k, mu) = (1.5e4, 1e4);
            for j in 0..6 {
                for i in 0..6 {
                    let vol = if i < 3 && j < 3 { k - 2.0 * mu / 3.0 } else { 0.0 };
                    let shear = if i == j {
                        if i < 3 {
                            2.0 * mu
                        } else {
                            mu
                        }
                    } else {
                        0.0
                    };
                    output.tangent[i + 6 * j] = vol + shear;
                }
            }
        }
        Ok(())
    }
    fn complex(&mut self) -> Option<&mut dyn tancheck::core::ComplexRoutine> {
        Some(self)
    }
}

impl tancheck::core::ComplexRoutine for Apex {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, num_complex::Complex64>,
        output: &mut CallOutput<'_, num_complex::Complex64>,
    ) -> Result<(), Fault> {
        use tancheck::core::Routine;
        self.0.complex().expect("elasticity has a twin").call_complex(input, output)?;
        apex_update(input.strain, input.dstrain, output.stress, |x| x.re);
        Ok(())
    }
}

// A correct zero tangent at the apex passes with the twin, whose derivative there is rounding
// of a few ε·K (−2.4e-12 beside a stiffness of 2.4e4 failed `zero-tangent`), and nothing is
// said of a jump (one-ulp backward quotients read "the stress jumps"; a user-style sweep). A
// returned elastic tangent at the apex still fails.
#[test]
fn a_zero_tangent_at_an_apex_passes_with_the_twin() {
    let path = Path {
        name: "hydrostatic past the apex and back".into(),
        increments: [1.0, 1.0, 1.0, -0.5, -2.0]
            .iter()
            .map(|&s| PathIncrement::strain([s * 4e-4, s * 4e-4, s * 4e-4, 0.0, 0.0, 0.0]))
            .collect(),
    };
    let mut m = Apex(reference("elastic", PointKind::Solid3d).unwrap(), false);
    let r = run_from_zero(&mut m, &[200000.0, 0.3], 20.0, &path, &Settings::default());
    assert_eq!(r.verdict, Verdict::Pass, "{}", summary(&r));
    assert!(!r.coverage.iter().any(|c| c.contains("jumps")), "{:?}", r.coverage);
    let mut flawed = Apex(reference("elastic", PointKind::Solid3d).unwrap(), true);
    let r = run_from_zero(&mut flawed, &[200000.0, 0.3], 20.0, &path, &Settings::default());
    assert_eq!(r.verdict, Verdict::TangentFailure, "{}", summary(&r));
}

// A continuum tangent on an increment that enters plasticity near its end (at 0.998 of it) is
// named `continuum-tangent` from fractions of its part past the crossing (with a bound of 0.99
// on the crossing the refined increments were all elastic and it read `unexplained`; a
// user-style sweep). J2 with linear hardening (E 200000, ν 0.3, σy 250, H 1000; made-up): under
// uniaxial strain the von Mises stress is 2μ ε11 = E ε11/(1 + ν) (derived), so yield at
// ε11 = 250 · 1.3 / 200000 = 1.625e-3, reached at 0.998 of an increment of 1.625e-3 / 0.998.
#[test]
fn a_continuum_tangent_entering_plasticity_near_the_end_is_named() {
    let d = 1.625e-3 / 0.998;
    let path = Path {
        name: "uniaxial strain just past yield".into(),
        increments: vec![PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0])],
    };
    let mut m = zoo_model("j2-continuum", PointKind::Solid3d).unwrap();
    let r = run_from_zero(
        &mut m,
        &[200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 0.0],
        20.0,
        &path,
        &Settings::default(),
    );
    assert_eq!(r.verdict, Verdict::TangentFailure, "{}", summary(&r));
    assert_eq!(r.finding(), "continuum-tangent", "{}", summary(&r));
}
