//! Causes of the finite-strain check for flaws a user-style sweep met unexplained: the shear
//! columns of a 6 × 6 spatial tangent doubled or halved (the column of a shear direction holds
//! the derivative along ½(e_i⊗e_j + e_j⊗e_i); an engineering-shear habit doubles it), and the
//! stress terms of the rate with a wrong factor (half the Jaumann terms d·τ + τ·d, the
//! difference between the Jaumann and Truesdell tangents of τ; Simo & Hughes 1998 §7, from
//! memory). The flawed tangents are made from the neo-Hookean model's exact ones (tested
//! against num-dual in the models crate), so each flaw is exactly the one named.

use tancheck::core::finite::check::{run, FiniteSettings};
use tancheck::core::finite::path::Superposed;
use tancheck::core::finite::{
    FiniteInfo, FiniteInput, FiniteModelRoutine, FiniteOutput, FinitePathSpec, FiniteRoutine,
};
use tancheck::core::finite::{StressMeasure, TangentMeasure};
use tancheck::core::routine::Fault;
use tancheck::models::finite::NeoHookean;

enum Flaw {
    None,
    ShearColumns(f64),
    /// The Truesdell tangent plus this factor times (Jaumann − Truesdell).
    RateTerms(f64),
    /// The shear rows times this factor.
    ShearRows(f64),
    /// The rate terms with a factor that changes from increment to increment (0.3 + 0.2 k):
    /// no code carries such a factor, as a tangent of another measure fits one.
    RateTermsChanging,
}

struct Flawed {
    jaumann: FiniteModelRoutine<NeoHookean>,
    truesdell: FiniteModelRoutine<NeoHookean>,
    flaw: Flaw,
}

impl FiniteRoutine for Flawed {
    fn info(&self) -> &FiniteInfo {
        self.jaumann.info()
    }
    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.jaumann.call(input, output)?;
        match self.flaw {
            Flaw::None => {}
            Flaw::ShearColumns(f) => output.tangent[18..36].iter_mut().for_each(|x| *x *= f),
            Flaw::ShearRows(f) => {
                (0..6).for_each(|c| output.tangent[6 * c + 3..6 * c + 6].iter_mut().for_each(|x| *x *= f))
            }
            Flaw::RateTerms(_) | Flaw::RateTermsChanging => {
                let a = match self.flaw {
                    Flaw::RateTerms(a) => a,
                    _ => 0.3 + 0.2 * f64::from(input.increment),
                };
                let j = output.tangent.to_vec();
                let (mut s, mut st, mut e) = ([0.0; 6], vec![0.0; output.state.len()], [0.0; 2]);
                let mut t = vec![0.0; 36];
                let mut o = tancheck::core::routine::Outcome::default();
                let mut other = FiniteOutput {
                    stress: &mut s,
                    state: &mut st,
                    tangent: &mut t,
                    energy: &mut e,
                    outcome: &mut o,
                };
                self.truesdell.call(input, &mut other)?;
                // The terms that turn the Truesdell tangent into the Jaumann one, `a` times.
                for k in 0..36 {
                    output.tangent[k] = t[k] + a * (j[k] - t[k]);
                }
            }
        }
        Ok(())
    }
}

fn check(flaw: Flaw) -> tancheck::core::finite::FiniteReport {
    let k = StressMeasure::Kirchhoff;
    let mut r = Flawed {
        jaumann: FiniteModelRoutine(NeoHookean::new(k, TangentMeasure::TauJaumann)),
        truesdell: FiniteModelRoutine(NeoHookean::new(k, TangentMeasure::TauTruesdell)),
        flaw,
    };
    let path = FinitePathSpec::Biaxial {
        stretch: [1.3, 0.85],
        increments: 3,
        rotation: Some(Superposed { axis: [1.0, -0.5, 0.3], angle: 0.7 }),
    }
    .build()
    .unwrap();
    run(&mut r, &[1000.0, 0.3], &[], &path, FiniteSettings::default())
}

#[test]
fn shear_columns_off_by_two_and_scaled_rate_terms_are_named() {
    assert_eq!(check(Flaw::None).exit_code, 0);
    for (f, word) in [(2.0, "doubled"), (0.5, "halved")] {
        for (flaw, which) in [(Flaw::ShearColumns(f), "columns"), (Flaw::ShearRows(f), "rows")] {
            let r = check(flaw);
            assert_eq!(r.finding.as_deref(), Some("shear-factor"), "{which}: {r:#?}");
            let c = r.increments.iter().find_map(|i| i.cause.as_ref()).unwrap();
            assert!(c.explanation.contains(word) && c.explanation.contains(which), "{}", c.explanation);
        }
    }
    // The factor read is the one the terms carry: half of them 0.500, their sign flipped
    // −1.000, doubled 2.000 (the factor read was 1 minus it, so a flipped sign read 2.000; a
    // user-style sweep).
    for (a, told) in [(0.5, "0.500"), (-1.0, "-1.000"), (2.0, "2.000"), (0.25, "0.250")] {
        let r = check(Flaw::RateTerms(a));
        assert_eq!(r.finding.as_deref(), Some("rate-terms-scaled"), "{r:#?}");
        let c = r.increments.iter().find_map(|i| i.cause.as_ref()).unwrap();
        assert!(c.explanation.contains(told) && c.explanation.contains("tau-truesdell"), "{}", c.explanation);
    }
    // The whole difference is the other rate, as before.
    assert_eq!(check(Flaw::RateTerms(0.0)).finding.as_deref(), Some("other-rate"));
    // A factor that changes along the path is none written in code: unexplained, saying what
    // was fitted (a small-strain tangent in a finite J2 routine read rate-terms-scaled with
    // factors 0.333 to 0.763; a user-style sweep).
    let r = check(Flaw::RateTermsChanging);
    assert_eq!(r.finding.as_deref(), Some("unexplained"), "{r:#?}");
    let c = r.increments.iter().find_map(|i| i.cause.as_ref()).unwrap();
    assert!(
        c.explanation.contains("a factor written in code is the same at every increment"),
        "{}",
        c.explanation
    );
}

/// The neo-Hookean model keeping the polar rotation R of F (F = R U) in 9 state variables,
/// column-major: correct, its stress objective; a superposed rigid rotation Q turns R into Q R.
struct KeepsRotation(FiniteModelRoutine<NeoHookean>, FiniteInfo);

impl FiniteRoutine for KeepsRotation {
    fn info(&self) -> &FiniteInfo {
        &self.1
    }
    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        let mut none: [f64; 0] = [];
        let mut inner = FiniteOutput {
            stress: &mut *output.stress,
            state: &mut none,
            tangent: &mut *output.tangent,
            energy: &mut *output.energy,
            outcome: &mut *output.outcome,
        };
        let inner_input = FiniteInput { state0: &[], ..*input };
        self.0.call(&inner_input, &mut inner)?;
        use tancheck::core::finite::mat3;
        let r = mat3::to_flat(&mat3::rotation(&mat3::from_flat(input.f1)));
        output.state.copy_from_slice(&r);
        Ok(())
    }
}

// A routine that keeps a rotation in its state (a corotational one keeps R) passes the
// rotation probes when `rotation_state` declares it, and fails them without (a correct
// Green–Naghdi routine could not pass; a user-style sweep).
#[test]
fn a_rotation_kept_in_the_state_is_declared() {
    use tancheck::core::finite::probe::{run_all, ProbeOptions};
    let model = NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let mut info = tancheck::core::finite::FiniteModel::info(&model).clone();
    info.nstate = 9;
    let mut r = KeepsRotation(FiniteModelRoutine(model), info);
    let path = FinitePathSpec::SimpleShear { amount: 0.6, increments: 3, rotation: None }.build().unwrap();
    let state0 = [1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0];
    let failed = |opts: &ProbeOptions, r: &mut KeepsRotation| -> Vec<String> {
        run_all(r, &[1000.0, 0.3], &state0, &path, opts)
            .into_iter()
            .filter(|p| !p.passed)
            .map(|p| p.name)
            .collect()
    };
    let declared = ProbeOptions { rotation_state: vec![0], ..ProbeOptions::default() };
    assert!(failed(&declared, &mut r).is_empty(), "{:?}", failed(&declared, &mut r));
    assert!(!failed(&ProbeOptions::default(), &mut r).is_empty());
}

/// dP/dF stored with P and F flattened row by row (P_iJ at 3i + J) where the interface takes
/// them column by column: named `row-major` (it read `unexplained`; a user-style sweep).
#[test]
fn dp_df_flattened_row_by_row_is_named() {
    struct RowMajor(FiniteModelRoutine<NeoHookean>);
    impl FiniteRoutine for RowMajor {
        fn info(&self) -> &FiniteInfo {
            self.0.info()
        }
        fn call(
            &mut self,
            input: &FiniteInput<'_, f64>,
            output: &mut FiniteOutput<'_, f64>,
        ) -> Result<(), Fault> {
            self.0.call(input, output)?;
            let t = output.tangent.to_vec();
            let row = |a: usize| 3 * (a % 3) + a / 3;
            for a in 0..9 {
                for b in 0..9 {
                    output.tangent[row(a) + 9 * row(b)] = t[a + 9 * b];
                }
            }
            Ok(())
        }
    }
    let path = FinitePathSpec::Biaxial {
        stretch: [1.3, 0.85],
        increments: 3,
        rotation: Some(Superposed { axis: [1.0, -0.5, 0.3], angle: 0.7 }),
    }
    .build()
    .unwrap();
    let mut ok = FiniteModelRoutine(NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::DpDf));
    assert_eq!(run(&mut ok, &[1000.0, 0.3], &[], &path, FiniteSettings::default()).exit_code, 0);
    let mut r = RowMajor(FiniteModelRoutine(NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::DpDf)));
    let rep = run(&mut r, &[1000.0, 0.3], &[], &path, FiniteSettings::default());
    assert_eq!(rep.finding.as_deref(), Some("row-major"), "{rep:#?}");
}

/// A tangent returned transposed (stored row by row) where it is not symmetric (the hypoelastic
/// Jaumann update's, whose rotation terms make it unsymmetric under a prestress): `transposed`.
#[test]
fn a_transposed_unsymmetric_tangent_is_named() {
    use tancheck::models::finite::HypoJaumann;
    struct Transposed(FiniteModelRoutine<HypoJaumann>);
    impl FiniteRoutine for Transposed {
        fn info(&self) -> &FiniteInfo {
            self.0.info()
        }
        fn call(
            &mut self,
            input: &FiniteInput<'_, f64>,
            output: &mut FiniteOutput<'_, f64>,
        ) -> Result<(), Fault> {
            self.0.call(input, output)?;
            let t = output.tangent.to_vec();
            for a in 0..6 {
                for b in 0..6 {
                    output.tangent[a + 6 * b] = t[b + 6 * a];
                }
            }
            Ok(())
        }
    }
    let path = FinitePathSpec::SimpleShear { amount: 0.6, increments: 4, rotation: None }.build().unwrap();
    let mut r = Transposed(FiniteModelRoutine(HypoJaumann::new()));
    let rep = run(&mut r, &[1000.0, 0.3], &[], &path, FiniteSettings::default());
    assert_eq!(rep.finding.as_deref(), Some("transposed"), "{rep:#?}");
}
