//! The block checks' remaining findings, each with a correct and a flawed routine: a point
//! counterpart that differs (`counterpart-mismatch`), a rate term off the declared law
//! (`rate-law`), dissipation counted twice (`stored-energy-negative`), an elastic response
//! that updates the state (`elastic-response-updates`) and a deleted point that turns
//! non-finite (`deleted-point-not-finite`). The flawed routines wrap the reference block
//! models and change one thing.

use tancheck_core::block::{
    self, BlockInfo, BlockInput, BlockModel, BlockModelRoutine, BlockOutput, BlockReport, EnergyRule,
};
use tancheck_core::{Fault, PointKind, Scalar};
use tancheck_models::block::worked::{j2_path, j2_settings, jc_path, jc_settings, jc_steel, J2_PROPS};
use tancheck_models::block::{BlockFlaw, J2Block, JcBlock, JcBlockFlaw};

#[derive(Clone, Copy, Debug, PartialEq)]
enum Tamper {
    /// The dissipated energy's increment counted twice.
    DoubleDissipation,
    /// The elastic response (first call) writes its first state variable.
    ElasticResponseWrites,
    /// A deleted point's state turns NaN (0/0 of a damage ratio, say).
    NanAfterDeletion,
    /// The elastic response (first call) doubles the shear stress of component 3 (twice the
    /// shear modulus), the dilatational modulus right.
    ElasticResponseShear,
    /// Crashes in the history check's repeated walk of the point alone (the second walk under
    /// its warmer conditions), and nowhere else.
    CrashesInTheRepeatedWalk,
    /// Asks for a smaller increment (`TC_BLOCK_STATUS_SMALLER_INCREMENT`) when a point's
    /// strain increment has an entry above 6e-4, with the fraction it could manage.
    AsksSmaller,
    /// Stress falling along every increment from the first (a negative stiffness of 1000).
    SoftensAtOnce,
}

thread_local! {
    /// Elastic responses seen under the history check's warmer conditions (per test thread).
    static WARM_OPENINGS: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
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
        if self.tamper == Tamper::CrashesInTheRepeatedWalk && input.conditions[0].temperature > 293.0 + 5.0 {
            if input.elastic_response {
                WARM_OPENINGS.with(|c| c.set(c.get() + 1));
            }
            if WARM_OPENINGS.with(|c| c.get()) >= 2 {
                return Err(Fault::Crashed { signal: 11, what: "segmentation fault".into() });
            }
        }
        if self.tamper == Tamper::AsksSmaller && !input.elastic_response {
            let n = self.inner.info().ncomp;
            for p in 0..input.npoints() {
                let big = input.strain_increment[p * n..(p + 1) * n]
                    .iter()
                    .fold(0.0f64, |a, x| a.max(x.re().abs()));
                if big > 6e-4 {
                    output.outcome.status = tancheck_core::block::routine::block_status::SMALLER_INCREMENT;
                    output.outcome.point = p as i32;
                    output.outcome.largest_fraction = 6e-4 / big;
                    return Ok(());
                }
            }
        }
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
                Tamper::SoftensAtOnce if !input.elastic_response => {
                    let n = self.inner.info().ncomp;
                    for i in p * n..(p + 1) * n {
                        output.stress[i] = input.stress_start[i] - input.strain_increment[i] * S::cst(1000.0);
                    }
                }
                Tamper::ElasticResponseShear if input.elastic_response => {
                    let n = self.inner.info().ncomp;
                    output.stress[p * n + 3] = output.stress[p * n + 3] * 2.0;
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

fn j2_check<M: BlockModel>(m: M) -> BlockReport {
    let mut r = BlockModelRoutine(m);
    block::run(&mut r, &J2_PROPS, &j2_path(), &j2_settings(EnergyRule::Trapezoid)).unwrap()
}

fn j2() -> J2Block {
    J2Block::with_flaw(PointKind::Solid3d, BlockFlaw::None).unwrap()
}

/// The Johnson–Cook block into damage and deletion (uniaxial strain to 0.3 and back, 200/s,
/// 500 K) with the rate law declared with C = 0.014.
fn jc_check<M: BlockModel>(m: M, props: &[f64]) -> BlockReport {
    block::run(&mut BlockModelRoutine(m), props, &jc_path(), &jc_settings(500.0)).unwrap()
}

fn jc() -> JcBlock {
    JcBlock::with_flaw(PointKind::Solid3d, JcBlockFlaw::None).unwrap()
}

#[test]
fn the_counterpart_check_passes_the_same_model_and_names_a_different_update() {
    let path = j2_path();
    let incs = block::block_increments(&path, 6).unwrap();
    let s = j2_settings(EnergyRule::Trapezoid);
    let run = |flaw: BlockFlaw| {
        let mut b = BlockModelRoutine(J2Block::with_flaw(PointKind::Solid3d, flaw).unwrap());
        let mut point = tancheck_models::zoo::zoo_model("j2", PointKind::Solid3d).unwrap();
        let mut report = BlockReport::default();
        block::counterpart::check(&mut b, &mut point, &J2_PROPS, &path, &incs, &s, 1e-9, &mut report);
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

/// The reference J2 point model whose stress is zero from increment `after` on (a point
/// routine that deletes its point), or NaN in its first entry.
struct PointFrom {
    inner: tancheck_core::ModelRoutine<tancheck_models::zoo::ZooModel>,
    after: i32,
    nan: bool,
}

impl tancheck_core::Routine for PointFrom {
    fn info(&self) -> &tancheck_core::RoutineInfo {
        self.inner.info()
    }
    fn call(
        &mut self,
        input: &tancheck_core::CallInput<'_, f64>,
        output: &mut tancheck_core::CallOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.inner.call(input, output)?;
        if input.increment > self.after {
            if self.nan {
                output.stress[0] = f64::NAN;
            } else {
                output.stress.fill(0.0);
            }
        }
        Ok(())
    }
}

// The difference is relative to the largest stress either routine carried along the path (a
// point counterpart at zero stress made it 1e303 of the block's), and a stress that is not a
// number is a difference (NaN compared with nothing and passed).
#[test]
fn the_counterpart_difference_is_relative_to_the_path_and_sees_nan() {
    let path = j2_path();
    let incs = block::block_increments(&path, 6).unwrap();
    let s = j2_settings(EnergyRule::Trapezoid);
    for nan in [false, true] {
        let mut b = BlockModelRoutine(j2());
        let inner = tancheck_models::zoo::zoo_model("j2", PointKind::Solid3d).unwrap();
        let mut point = PointFrom { inner, after: 2, nan };
        let mut report = BlockReport::default();
        block::counterpart::check(&mut b, &mut point, &J2_PROPS, &path, &incs, &s, 1e-9, &mut report);
        assert_eq!(report.finding(), "counterpart-mismatch", "{:#?}", report.findings);
        let f = &report.findings[0];
        assert_eq!(f.increment, Some(3), "{f:#?}");
        if nan {
            assert!(f.what.contains("one is not a finite number"), "{}", f.what);
            continue;
        }
        let rel: f64 = f
            .what
            .split("relative difference ")
            .nth(1)
            .and_then(|t| t.split_whitespace().next())
            .and_then(|x| x.parse().ok())
            .unwrap_or_else(|| panic!("{}", f.what));
        assert!(rel > 0.1 && rel <= 2.0, "{}", f.what);
    }
}

#[test]
fn a_rate_term_off_the_declared_law_is_named() {
    // The published C = 0.014 passes; a routine whose rate term is twice as strong is off the
    // declared law 1 + C ln(ε̇/ε̇₀) (Johnson & Cook 1983).
    let r = jc_check(jc(), &jc_steel(0.014));
    assert!(r.passed(), "{:#?}", r.findings);
    let r = jc_check(jc(), &jc_steel(0.028));
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
    // The output it changed is named.
    assert!(r.findings[0].what.contains("changed state[0] of point 0"), "{}", r.findings[0].what);
}

// A first call whose shear modulus alone is wrong: the message names the entry and says the
// dilatational modulus and wave speed agree (it gave the two equal moduli and wave speeds as
// the difference).
#[test]
fn an_elastic_response_wrong_in_shear_names_the_entry() {
    let r = j2_check(Tampered { inner: j2(), tamper: Tamper::ElasticResponseShear });
    assert_eq!(r.finding(), "elastic-response-mismatch", "{:#?}", r.findings);
    let what = &r.findings[0].what;
    assert!(what.contains("the dilatational modulus") && what.contains("agree"), "{what}");
    assert!(what.contains("entry [3][3]"), "{what}");
}

#[test]
fn a_deleted_point_that_turns_non_finite_is_named() {
    let r = jc_check(jc(), &jc_steel(0.014));
    assert!(r.increments.iter().any(|i| i.deleted), "the path deletes the point");
    let r = jc_check(Tampered { inner: jc(), tamper: Tamper::NanAfterDeletion }, &jc_steel(0.014));
    assert_eq!(r.finding(), "deleted-point-not-finite", "{:#?}", r.findings);
}

// The elastic response is the first call's, at the point's start temperature; the routine's
// own stiffness it is compared with is taken from the start without a temperature change (a
// correct block whose modulus falls with temperature failed elastic-response-mismatch by
// E(T − ΔT/1000)/E(T) − 1 when the path heated 40 K per increment: the small increment kept a
// thousandth of the temperature increment; a user-style sweep). The Johnson–Cook block takes
// E at the end temperature of each increment.
#[test]
fn a_temperature_increment_does_not_shift_the_elastic_reference() {
    // Heated by 100 K in the first increment (the one the reference is taken from).
    let mut path = jc_path();
    path.increments[0].dtemp = 100.0;
    let r = block::run(&mut BlockModelRoutine(jc()), &jc_steel(0.014), &path, &jc_settings(500.0)).unwrap();
    assert!(r.findings.iter().all(|f| f.finding != "elastic-response-mismatch"), "{:#?}", r.findings);
}

// A walk that stops (here at the first non-finite output after deletion) says how far the
// damage and deletion checks got, and no other reason (the JUnit report skipped the damage
// check as "no state variable declared as damage" with one declared; a user-style sweep).
#[test]
fn a_walk_that_stops_says_how_far_damage_and_deletion_were_checked() {
    let settings = tancheck_core::block::BlockSettings { damage: vec![9], ..jc_settings(500.0) };
    let mut r = BlockModelRoutine(Tampered { inner: jc(), tamper: Tamper::NanAfterDeletion });
    let rep = block::run(&mut r, &jc_steel(0.014), &jc_path(), &settings).unwrap();
    assert_eq!(rep.finding(), "deleted-point-not-finite", "{:#?}", rep.findings);
    let stop = rep.findings[0].increment.unwrap();
    let note = |prefix: &str| rep.notes.iter().find(|n| n.starts_with(prefix)).cloned().unwrap_or_default();
    let damage = note("damage:");
    assert!(
        damage.contains(&format!("up to increment {} (the walk stopped at increment {stop})", stop - 1)),
        "{damage}"
    );
    assert!(!damage.contains("no state variable declared"), "{damage}");
    let deletion = note("deletion:");
    assert!(
        deletion.contains(&format!("checked up to increment {stop}, where the walk stopped")),
        "{deletion}"
    );
}

// A call that fails in the history check's repeated walk leaves the blocks uncompared, and the
// note says that, not that the results depend on the calls before (it did; a user-style sweep).
#[test]
fn a_failed_repeated_walk_is_not_called_history_dependence() {
    WARM_OPENINGS.with(|c| c.set(0));
    let r = j2_check(Tampered { inner: j2(), tamper: Tamper::CrashesInTheRepeatedWalk });
    assert_eq!(r.finding(), "routine-fault", "{:#?}", r.findings);
    assert!(r.findings.iter().all(|f| f.finding != "history-dependence"), "{:#?}", r.findings);
    let note = r.notes.iter().find(|n| n.starts_with("independence:")).expect("an independence note");
    assert!(note.contains("failed") && !note.contains("depending on the calls made before"), "{note}");
}

// A block routine that asks for a smaller increment gets it, as an explicit solver would cut
// its time increment: the path's refused increments are cut into equal parts (here 1e-3 per
// increment out against a limit of 6e-4: a fraction of 0.6, two parts each; four for the
// larger ones back) and checked, with a note (it was a routine fault, exit 3; a user-style
// sweep).
#[test]
fn increments_a_block_routine_refuses_are_cut() {
    let r = j2_check(Tampered { inner: j2(), tamper: Tamper::AsksSmaller });
    assert!(r.findings.iter().all(|f| f.finding != "routine-fault"), "{:#?}", r.findings);
    assert_eq!(r.increments.len(), 24, "{:#?}", r.notes);
    let note = r.notes.iter().find(|n| n.contains("asked for a smaller increment")).expect("a note");
    assert!(note.contains("largest fraction 0.600") && note.contains("1 into 2"), "{note}");
    // And the same routine with increments it takes is checked on the path as given.
    let plain = j2_check(j2());
    assert_eq!(plain.increments.len(), 9);
    assert!(plain.notes.iter().all(|n| !n.contains("smaller increment")), "{:#?}", plain.notes);
}

// Where the declared softening starts in the first increment, the refinement note says so (it
// said the point was deleted in the first increment, with no point deleted; a user-style
// sweep).
#[test]
fn refinement_names_softening_from_the_first_increment() {
    let settings =
        tancheck_core::block::BlockSettings { softening: true, ..j2_settings(EnergyRule::Trapezoid) };
    let mut r = BlockModelRoutine(Tampered { inner: j2(), tamper: Tamper::SoftensAtOnce });
    let rep = block::run(&mut r, &J2_PROPS, &j2_path(), &settings).unwrap();
    let note = rep.notes.iter().find(|n| n.starts_with("refinement:")).expect("a refinement note");
    assert!(note.contains("softens") && !note.contains("deleted"), "{note}");
}
