//! The block checks' remaining findings, each with a correct and a flawed routine: a point
//! counterpart that differs (`counterpart-mismatch`), a rate term off the declared law
//! (`rate-law`), dissipation counted twice (`stored-energy-negative`), an elastic response
//! that updates the state (`elastic-response-updates`) and a deleted point that turns
//! non-finite (`deleted-point-not-finite`). The flawed routines wrap the reference block
//! models and change one thing.

use tancheck_core::block::{
    self, BlockInfo, BlockInput, BlockModel, BlockModelRoutine, BlockOutput, BlockReport, BlockSettings,
    Conditions, RateLaw,
};
use tancheck_core::path::{Path, Shape};
use tancheck_core::{Fault, PointKind, Scalar};
use tancheck_models::block::{BlockFlaw, J2Block, JcBlock, JcBlockFlaw};

/// The worked J2 case of REFERENCES.md (E 200 GPa, ν 0.3, σy 250 MPa, K' 1000, H' 500 MPa).
const J2: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

/// 4340 steel Johnson–Cook constants of REFERENCES.md (read, secondary copies) with typical E,
/// ν, T_r, reference rate, density and heat capacity (common practice), χ 0.9, k_E 0.3,
/// G_f 20 N/mm, d_max 0.99; `c` the rate coefficient (0.014 published).
fn steel(c: f64) -> Vec<f64> {
    vec![
        200_000.0, 0.29, 792.0, 510.0, 0.26, c, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
        -2.12, 0.002, 0.61, 0.3, 20.0, 0.99,
    ]
}

#[derive(Clone, Copy, Debug, PartialEq)]
enum Tamper {
    /// The dissipated energy's increment counted twice.
    DoubleDissipation,
    /// The elastic response (first call) writes its first state variable.
    ElasticResponseWrites,
    /// A deleted point's state turns NaN (0/0 of a damage ratio, say).
    NanAfterDeletion,
}

/// A reference block model with one thing changed.
struct Tampered<M> {
    inner: M,
    tamper: Tamper,
}

impl<M: BlockModel> BlockModel for Tampered<M> {
    fn info(&self) -> &BlockInfo {
        self.inner.info()
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &BlockInput<'_, S>,
        output: &mut BlockOutput<'_, S>,
    ) -> Result<(), Fault> {
        self.inner.evaluate(input, output)?;
        let ns = self.inner.info().nstate;
        for p in 0..input.npoints() {
            match self.tamper {
                Tamper::DoubleDissipation => {
                    let start = input.energy_start[p].dissipated;
                    output.energy[p].dissipated = start + (output.energy[p].dissipated - start) * 2.0;
                }
                Tamper::ElasticResponseWrites if input.elastic_response => {
                    output.state[p * ns] = input.state_start[p * ns] + 1e-3;
                }
                Tamper::NanAfterDeletion
                    if output.deleted[p] != 0 && input.state_start[p * ns + ns - 1].re() >= 0.5 =>
                {
                    output.state[p * ns + ns - 2] = S::cst(f64::NAN);
                }
                _ => {}
            }
        }
        Ok(())
    }
}

fn j2_settings() -> BlockSettings {
    BlockSettings {
        conditions: Conditions {
            temperature: 293.0,
            temperature_increment: 0.0,
            density: 7.85e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0; 13],
        ..BlockSettings::default()
    }
}

fn j2_check<M: BlockModel>(m: M) -> BlockReport {
    let mut r = BlockModelRoutine(m);
    block::run(&mut r, &J2, &Path::ramp(Shape::TensionShear, 6e-3, 6, 3), &j2_settings()).unwrap()
}

fn j2() -> J2Block {
    J2Block::with_flaw(PointKind::Solid3d, BlockFlaw::None).unwrap()
}

/// The Johnson–Cook block into damage and deletion (uniaxial strain to 0.3 and back, 200/s,
/// 500 K) with the rate law declared with C = 0.014.
fn jc_check<M: BlockModel>(m: M, props: &[f64]) -> BlockReport {
    let mut path = Path::ramp(Shape::UniaxialStrain, 0.3, 30, 10);
    for inc in &mut path.increments {
        inc.dtime = 5e-5;
    }
    let s = BlockSettings {
        conditions: Conditions {
            temperature: 500.0,
            temperature_increment: 0.0,
            density: 7.83e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0; 13],
        softening: true,
        rate_law: Some(RateLaw { reference_rate: 1.0, coefficient: 0.014 }),
        ..BlockSettings::default()
    };
    block::run(&mut BlockModelRoutine(m), props, &path, &s).unwrap()
}

fn jc() -> JcBlock {
    JcBlock::with_flaw(PointKind::Solid3d, JcBlockFlaw::None).unwrap()
}

#[test]
fn the_counterpart_check_passes_the_same_model_and_names_a_different_update() {
    let path = Path::ramp(Shape::TensionShear, 6e-3, 6, 3);
    let incs = block::block_increments(&path, 6).unwrap();
    let s = j2_settings();
    let run = |flaw: BlockFlaw| {
        let mut b = BlockModelRoutine(J2Block::with_flaw(PointKind::Solid3d, flaw).unwrap());
        let mut point = tancheck_models::zoo::zoo_model("j2", PointKind::Solid3d).unwrap();
        let mut report = BlockReport::default();
        block::counterpart::check(&mut b, &mut point, &J2, &path, &incs, &s, 1e-9, &mut report);
        report
    };
    let r = run(BlockFlaw::None);
    assert!(r.passed(), "{:#?}", r.findings);
    assert!(r.notes.iter().any(|n| n.contains("agree")), "{:#?}", r.notes);
    // The back stress from the total plastic strain: the stresses part after the second
    // plastic increment.
    let r = run(BlockFlaw::TotalBackStress);
    assert_eq!(r.finding(), "counterpart-mismatch", "{:#?}", r.findings);
    assert!(r.findings[0].increment.is_some());
}

#[test]
fn a_rate_term_off_the_declared_law_is_named() {
    // The published C = 0.014 passes; a routine whose rate term is twice as strong is off the
    // declared law 1 + C ln(ε̇/ε̇₀) (Johnson & Cook 1983).
    let r = jc_check(jc(), &steel(0.014));
    assert!(r.passed(), "{:#?}", r.findings);
    let r = jc_check(jc(), &steel(0.028));
    assert_eq!(r.finding(), "rate-law", "{:#?}", r.findings);
}

#[test]
fn dissipation_counted_twice_leaves_a_negative_stored_energy() {
    assert!(j2_check(j2()).passed());
    let r = j2_check(Tampered { inner: j2(), tamper: Tamper::DoubleDissipation });
    assert_eq!(r.finding(), "stored-energy-negative", "{:#?}", r.findings);
}

#[test]
fn an_elastic_response_that_updates_the_state_is_named() {
    let r = j2_check(Tampered { inner: j2(), tamper: Tamper::ElasticResponseWrites });
    assert_eq!(r.finding(), "elastic-response-updates", "{:#?}", r.findings);
    assert_eq!(r.findings[0].increment, Some(0));
}

#[test]
fn a_deleted_point_that_turns_non_finite_is_named() {
    let r = jc_check(jc(), &steel(0.014));
    assert!(r.increments.iter().any(|i| i.deleted), "the path deletes the point");
    let r = jc_check(Tampered { inner: jc(), tamper: Tamper::NanAfterDeletion }, &steel(0.014));
    assert_eq!(r.finding(), "deleted-point-not-finite", "{:#?}", r.findings);
}
