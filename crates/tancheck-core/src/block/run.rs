//! One block check: the elastic response, the walk of one point (tangent, energy, deletion),
//! point independence and increment refinement, gathered in a [`BlockReport`].

use super::along;
use super::elastic;
use super::history;
use super::independence;
use super::rate;
use super::refine;
use super::report::{BlockCheck, BlockReport};
use super::routine::BlockRoutine;
use super::settings::BlockSettings;
use super::step::block_increments;
use super::walk::BlockWalk;
use crate::path::Path;

/// Check a block routine along `path`.
pub fn run(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    path: &Path,
    settings: &BlockSettings,
) -> Result<BlockReport, String> {
    let info = routine.info().clone();
    if properties.len() != info.nproperties {
        return Err(format!(
            "{} has {} properties, the manifest gives {}",
            info.name,
            info.nproperties,
            properties.len()
        ));
    }
    if settings.state0.len() != info.nstate {
        return Err(format!(
            "{} has {} state variables, the start state has {}",
            info.name,
            info.nstate,
            settings.state0.len()
        ));
    }
    let c = settings.conditions;
    if !(c.density > 0.0 && c.characteristic_length > 0.0 && c.temperature.is_finite()) {
        return Err("the point's density and characteristic length must be positive".into());
    }
    let mut incs = block_increments(path, info.ncomp)?;
    let mut report = BlockReport {
        routine: info.name.clone(),
        path: path.name.clone(),
        energy_rule: settings.energy_rule.name(),
        ..BlockReport::default()
    };
    let Some(moduli) = elastic::elastic_response(routine, properties, settings, &mut report) else {
        not_checked(&mut report, "the first call failed");
        return Ok(report);
    };
    // Increments the routine refuses as too large are cut, as a solver cuts its time
    // increment (a request read as a routine fault; a user-style sweep). After the first call,
    // so that the elastic response stays the routine's first call.
    match super::cutback::cut(routine, properties, &incs, settings, &mut report.real_calls) {
        Ok(Some((cut, note))) => {
            incs = cut;
            report.notes.push(note);
        }
        Ok(None) => {}
        // The first call after the elastic response that the guards flag: a fault, said here
        // (a loaded routine says it once, and the checks' calls would pass it by), and the
        // end of the check: the outputs of such calls are not the routine's results (an
        // unwritten `deleted` flag read as a deletion beside the fault).
        Err((k, f)) => {
            report.add(
                BlockCheck::Call,
                "routine-fault",
                Some(k),
                format!("the point alone along the path, increment {k}: {f}"),
            );
            report.notes.push(
                "the other block checks were not made: the memory guards flagged a call of the point alone, whose \
                 outputs are then not the routine's results; mend the fault first"
                    .into(),
            );
            not_checked(&mut report, "the memory guards flagged a call of the point alone");
            return Ok(report);
        }
    }
    elastic::elastic_consistency(routine, properties, &incs[0], &moduli, settings, &mut report);
    along::walk_one_point(routine, properties, &incs, &moduli, settings, &mut report);
    let mut w = BlockWalk { routine, properties, incs: &incs, settings };
    if settings.independence {
        // Results that depend on the calls before make every comparison of blocks meaningless
        // (a point alone and in a block differ by the calls between them): looked for first.
        match history::check(w.reborrow(), &mut report) {
            history::History::Comparable => independence::check(w.reborrow(), &mut report),
            history::History::Dependent => report.notes.push(
                "independence: blocks not compared, the point's results depending on the calls made before"
                    .into(),
            ),
            // Said as it is (it read "depending on the calls made before" after a write past an
            // array; a user-style sweep).
            history::History::Failed => report.notes.push(
                "independence: blocks not compared: a call of the point alone failed when its walk was repeated \
                 (the history check's finding or note says which); not checked"
                    .into(),
            ),
        }
    }
    if let Some(law) = settings.rate_law {
        rate::check(w.reborrow(), law, &mut report);
    }
    if settings.refinement {
        refine::check(w.reborrow(), &mut report);
    }
    // A point that depends on its neighbours corrupts every measurement made on a block of
    // points (the elastic response's block of ncomp points among them): it leads, after a
    // fault, ahead of what follows from it.
    report.findings.sort_by_key(|f| match f.finding {
        "routine-fault" => 0,
        "point-dependence" | "history-dependence" => 1,
        _ => 2,
    });
    // What follows such a dependence may all come from it: a SAVE variable carried from call
    // to call also reads as a broken twin, a stiffness above the elastic one, a wrong rate law
    // (four findings of one flaw read like four bugs; a user-style sweep).
    let dependence =
        report.findings.iter().find(|f| matches!(f.finding, "point-dependence" | "history-dependence"));
    if let Some(first) = dependence.map(|f| f.finding) {
        let after =
            report.findings.iter().filter(|f| f.finding != first && f.finding != "routine-fault").count();
        if after > 0 {
            report.notes.push(format!(
                "{first}: the routine's results depend on other calls, so every later check sees calls that differ \
                 from the point's own; the {after} other finding{} may follow from it alone: mend it first",
                if after == 1 { "" } else { "s" }
            ));
        }
    }
    Ok(report)
}

/// A note per check that did not run because the check ended early (`why`), so that the
/// reports that read a check's note (JUnit: skipped, with why) do not take it as passed (they
/// read success, or "turned off in the manifest"; a review).
fn not_checked(report: &mut BlockReport, why: &str) {
    // The checks after the elastic response (a failed call is no check of its own).
    for c in
        BlockCheck::ALL.into_iter().filter(|c| !matches!(c, BlockCheck::ElasticResponse | BlockCheck::Call))
    {
        if !report.findings.iter().any(|f| f.check == c) {
            report.notes.push(format!("{}: not checked ({why})", c.name()));
        }
    }
}
