//! The block refinement check on an update whose error reaches its order only once the parts of
//! an increment are small beside a time scale of the update (a stiff rate law at the onset of
//! yield: a correct Johnson–Cook block routine failed `refinement-order` after two halvings,
//! converging at first order after five; found by a user-style sweep).

use tancheck::core::block::{
    refine, walk::BlockWalk, BlockInfo, BlockInput, BlockOutput, BlockReport, BlockRoutine, BlockSettings,
    SpecificEnergy,
};
use tancheck::core::path::{Path, Shape};
use tancheck::core::Fault;

/// σ = σ₀ + E Δε₁₁ + c h²/(h + τ) in the first component (h the call's time increment): over
/// one increment Δt split in N parts the error is c Δt · h/(h + τ), first order in h only for
/// h ≪ τ. With τ = Δt/4 the differences on halving are 0.13, 0.17, 0.17, 0.13, 0.089, 0.052
/// (times c Δt): orders −0.32, 0, 0.32, 0.58, 0.77 (worked out by hand from h/(h + τ)).
/// A `tau` far above Δt makes it first order from the start (c Δt h/τ); `stuck` adds the same
/// amount at every call, whatever h (more parts, more error: no convergence).
struct Stiff {
    info: BlockInfo,
    tau: f64,
    stuck: bool,
}

const E: f64 = 1000.0;
const C: f64 = 50.0;

impl BlockRoutine for Stiff {
    fn info(&self) -> &BlockInfo {
        &self.info
    }
    fn call(&mut self, i: &BlockInput<'_, f64>, o: &mut BlockOutput<'_, f64>) -> Result<(), Fault> {
        let n = self.info.ncomp;
        let h = i.time_increment;
        for p in 0..i.npoints() {
            for k in 0..n {
                let de = i.strain_increment[p * n + k];
                let mut s = i.stress_start[p * n + k] + E * de;
                if k == 0 && h > 0.0 {
                    s += if self.stuck { C * 1e-3 } else { C * h * h / (h + self.tau) };
                }
                o.stress[p * n + k] = s;
            }
            o.energy[p] = SpecificEnergy { internal: 0.0, dissipated: 0.0 };
            o.deleted[p] = 0;
        }
        Ok(())
    }
}

fn refined(tau: f64, stuck: bool) -> BlockReport {
    let mut r =
        Stiff { info: BlockInfo { name: "stiff".into(), ncomp: 6, nstate: 0, nproperties: 0 }, tau, stuck };
    let mut path = Path::ramp(Shape::UniaxialStrain, 1e-3, 4, 0);
    for inc in &mut path.increments {
        inc.dtime = 1e-3;
    }
    let incs = tancheck::core::block::block_increments(&path, 6).unwrap();
    let settings = BlockSettings::default();
    let mut report = BlockReport::default();
    refine::check(
        BlockWalk { routine: &mut r, properties: &[], incs: &incs, settings: &settings },
        &mut report,
    );
    report
}

#[test]
fn an_update_reaching_its_order_after_some_halvings_passes_and_one_that_never_does_fails() {
    let r = refined(0.25e-3, false);
    assert!(r.findings.is_empty(), "{:?}", r.findings);
    let note = r.notes.iter().find(|n| n.starts_with("refinement:")).unwrap();
    assert!(note.contains("not yet in the range"), "{note}");
    // First order from the start: judged after two halvings, as before.
    let r = refined(1.0, false);
    assert!(r.findings.is_empty(), "{:?}", r.findings);
    assert!(r.notes.iter().any(|n| n.contains("observed order 1.00")), "{:?}", r.notes);
    // No convergence at all: refinement-order, with every difference.
    let r = refined(1.0, true);
    assert_eq!(r.findings.len(), 1, "{:?}", r.findings);
    assert_eq!(r.findings[0].finding, "refinement-order");
    assert!(r.findings[0].what.contains("to 64 parts"), "{}", r.findings[0].what);
}
