//! A tangent check along a path: the pipeline driver → schemes → comparison → report. Each
//! increment is checked by [`judge::check_call`], the same per-call check bisection uses.

use crate::call_check as judge;
use crate::concurrent;
use crate::cutback;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::first_calls;
pub use crate::increment::held_components;
use crate::increment::{self, Step};
use crate::path::Path;
use crate::report::{CallCounts, Collector, Keep, Report, RoutineSummary, Verdict, CAUTIONS};
use crate::routine::Caller;
use crate::schemes::Scheme;
use crate::settings::Settings;

/// Check the routine behind `caller` along `path` from `start`.
///
/// Errors are bad input (wrong sizes, bad settings); a crashing or failing routine is a
/// [`Verdict::RoutineFault`] in the report, not an error.
pub fn run(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    settings: &Settings,
) -> Result<Report, CoreError> {
    run_with(caller, props, start, path, settings, Keep::All, &mut |_| {})
}

/// [`run`], keeping the full detail of the increments `keep` says (every increment gets its
/// fixed-size record), and telling `progress` the number of each increment once it is checked.
///
/// A path that stopped where the routine asked for a smaller increment is checked again with
/// the increments it refuses cut into parts, as a solver cuts back ([`cutback`]).
pub fn run_with(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    settings: &Settings,
    keep: Keep,
    progress: &mut dyn FnMut(usize),
) -> Result<Report, CoreError> {
    let report = run_path(caller, props, start.clone(), path, settings, keep, progress)?;
    if !cutback::stopped_for_smaller(&report) {
        return Ok(report);
    }
    let Some(cut) = cutback::cut(caller, props, &start, path)? else {
        return Ok(report);
    };
    let mut again = run_path(caller, props, start, &cut.path, settings, keep, progress)?;
    again.notes.insert(0, cut.note(path.increments.len()));
    again.checked_path = Some(cut.path);
    Ok(again)
}

/// One check along `path` (see [`run_with`]).
fn run_path(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    settings: &Settings,
    keep: Keep,
    progress: &mut dyn FnMut(usize),
) -> Result<Report, CoreError> {
    settings.validate()?;
    path.validate()?;
    let info = caller.info().clone();
    let conv = info.convention.clone();
    let start_point = Some((start.strain.clone(), start.stress.clone()));
    let driver = Driver::new(&info, props, start)?;
    let has_twin = caller.has_complex();
    if !has_twin && settings.schemes.iter().all(|&s| s == Scheme::ComplexStep) {
        return Err(CoreError::ComplexStepWithoutTwin(info.name.clone()));
    }
    outside_kind(&conv, path)?;
    let mut notes = Vec::new();
    notes.extend(dropped_entries(&conv, path));
    notes.extend(released_holds(&conv, path));
    if settings.schemes.contains(&Scheme::ComplexStep) && !has_twin {
        notes.push(format!(
            "complex-step checks skipped: {} has no complex twin (build it with `tancheck build`, \
             which compiles the same source with TC_COMPLEX and exports <symbol>_cx)",
            info.name
        ));
    }
    let (real0, cplx0) = (caller.real_calls, caller.complex_calls);
    let mut increments = Collector::new(settings, keep, path.increments.len());
    // Cheap looks at first calls (see `first_calls`): a zero increment, full guards per branch.
    if settings.first_calls {
        let dtime = path.increments.first().map_or(1.0, |i| i.dtime);
        if let Some(r) = first_calls::zero_increment(caller, &info, props, driver.start(), dtime)? {
            notes.push(
                "increment 0 is a zero strain increment from the start state (made by every default check)"
                    .into(),
            );
            increments.push(r);
        }
    }
    // (The start state, for the look at the time increment after the walk.)
    let origin = settings.first_calls.then(|| driver.start().clone());
    let mut merged = Merged { notes, increments, unloaded: false, conventions_seen: false };
    let stopped_at_zero = merged.increments.last_faulted();
    // Several threads when the settings ask for them and the routine is safe to call from
    // several at once (see `concurrent`); otherwise, or for a short path, one.
    let plan = if stopped_at_zero { None } else { concurrent::plan(caller, path, settings) };
    // The threads the path was checked on (1 also when a check on several gave way).
    let mut threads_used = 1;
    // How a check on several threads gave way to one, when it did (its note is added below).
    let mut gave_way = None;
    // The start states the walk kept for the look at the time increment.
    let mut changed = increment::ChangedStarts::default();
    let chunks = match plan {
        Some(plan) => {
            let threads = plan.threads();
            let job = concurrent::Job { info: &info, props, start: driver.start(), path, settings, keep };
            match concurrent::walk(caller, plan, job, &mut *progress) {
                Ok(chunks) => {
                    threads_used = threads;
                    Some(chunks)
                }
                Err(serial) => {
                    gave_way = Some(concurrent::GaveWay { threads, at: merged.notes.len(), serial });
                    None
                }
            }
        }
        None => None,
    };
    match chunks {
        Some(chunks) => {
            for chunk in chunks {
                let stop = merged.take_chunk(
                    chunk.collected,
                    chunk.notes,
                    chunk.unloaded,
                    chunk.first_elastic,
                    &conv,
                );
                caller.real_calls += chunk.real_calls;
                caller.complex_calls += chunk.complex_calls;
                changed = changed.then(chunk.changed);
                if stop || !chunk.complete {
                    break;
                }
            }
        }
        None => {
            let mut walk = increment::Walk::new(driver, settings);
            for (k, inc) in path.increments.iter().enumerate() {
                if merged.increments.last_faulted() {
                    break;
                }
                if k > 0 {
                    progress(k);
                }
                let step = walk.step(k, inc, caller, &mut merged.increments);
                if merged.take(step, walk.best(), &conv) {
                    break;
                }
            }
            changed = walk.changed;
        }
    }
    // No elastic increment on the path: the conventions are read from a zero increment at its
    // start (see `first_calls::start_tangent`).
    if let (false, Some(start), false) = (merged.conventions_seen, &origin, merged.increments.any_fault) {
        let dtime = path.increments.first().map_or(1.0, |i| i.dtime);
        if let Some(t) = first_calls::start_tangent(caller, &info, props, start, dtime, settings) {
            merged.first_elastic(Some(&t), &conv);
        }
    }
    if let Some(g) = &gave_way {
        g.add_note(&mut merged.notes, merged.increments.any_fault);
    }
    let Merged { notes, increments, unloaded, .. } = merged;
    // A path whose increments all take the same time checks a time-dependent tangent at that
    // time increment only: whether the routine depends on it is looked at once the path has
    // been checked without a fault (two calls; the check's own calls meet any fault first).
    let one_dtime = path.increments.windows(2).all(|w| w[0].dtime.to_bits() == w[1].dtime.to_bits());
    // Looked at in the first increment and, when its stress does not depend on the time (an
    // elastic start), in the first increment that changed the state (a rate-dependent
    // routine's time enters where it flows: a tangent that ignored it passed unwarned).
    let time_dependent = match (path.increments.first(), &origin) {
        (Some(inc), Some(start)) if one_dtime && !increments.any_fault && !increments.is_empty() => {
            match first_calls::depends_on_time(caller, &info, props, start, inc) {
                Some(false) => {
                    // The first increment after the first that changed the state, and the last
                    // one that did: a routine that sets its state on the first call (thresholds,
                    // a flag) changes it there without any rate (a ply routine with viscous
                    // damage passed unwarned; a user-style sweep).
                    // Their start states the walk kept (walking the path again to them made
                    // a second base call of every increment up to the last).
                    let mut found = Some(None);
                    for (k, from) in [changed.first.as_ref(), changed.last.as_ref()].into_iter().flatten() {
                        match first_calls::depends_on_time(
                            caller,
                            &info,
                            props,
                            from,
                            &path.increments[k - 1],
                        ) {
                            Some(true) => {
                                found = Some(Some(*k));
                                break;
                            }
                            Some(false) => {}
                            None => found = None,
                        }
                    }
                    found
                }
                t => t.map(|t| t.then_some(1)),
            }
        }
        _ => None,
    };

    progress(path.increments.len());
    let mut coverage = Vec::new();
    // A path that stopped at a fault says nothing about what the rest would have reached.
    let stopped = increments.stopped_at;
    if let Some(k) = stopped {
        coverage.push(if increments.stopped_not_finite {
            format!(
                "the path stopped at increment {k} of {}, where the routine returned values that are not \
                 finite numbers: the increments after it would start from them, and were not checked",
                path.increments.len()
            )
        } else {
            format!(
                "the path stopped at a fault at increment {k} of {}: the increments after it were not checked",
                path.increments.len()
            )
        });
    }
    let stopped = stopped.is_some();
    // A routine without state variables has no inelastic branch to reach.
    if info.nstate > 0 && !stopped && !increments.is_empty() && !increments.state_ever_changed {
        coverage.push(
            "the path never changed the state variables: only the elastic (or stateless) branch was checked; \
             load further, or start from an inelastic state"
                .to_string(),
        );
    }
    // A path that changes the temperature, and a routine that never returned ∂σ/∂T: nothing
    // of the temperature coupling was checked, and a coupled solver's tangent lacks it. Not
    // said of a path that stopped at a fault (a guard finding at the first call said it of a
    // routine that did return ∂σ/∂T, found by a user-style sweep).
    if !increments.dtemp_checked
        && !stopped
        && !increments.is_empty()
        && path.increments.iter().any(|i| i.dtemp != 0.0)
    {
        coverage.push(
            "the path changes the temperature, but the routine never returned ∂σ/∂T (its report's provides \
             never had TC_PROVIDES_DSTRESS_DTEMP, tc_provides_dstress_dtemp in Fortran): the stress's \
             temperature derivative was not checked; a routine whose stress depends on the temperature \
             gives it for a coupled solver"
                .to_string(),
        );
    }
    // The routine returns ∂σ/∂T, so its stress depends on the temperature, but the path never
    // changes it: a tangent whose moduli are taken at the start temperature (not the end one)
    // agrees at every increment of such a path (it passed unwarned; a user-style sweep).
    if increments.dtemp_checked
        && !stopped
        && !path.increments.is_empty()
        && path.increments.iter().all(|i| i.dtemp == 0.0)
    {
        coverage.push(
            "the routine returns ∂σ/∂T, but the temperature never changes along the path: a tangent taken \
             at the start temperature of each increment agrees at every increment of such a path; give \
             the path a `dtemp`"
                .to_string(),
        );
    }
    // Held stresses the solve did not reach: those increments are off the path asked for.
    let off_path: Vec<&String> = notes.iter().filter(|n| n.contains(increment::HELD_NOT_REACHED)).collect();
    if let Some(first) = off_path.first() {
        coverage.push(format!(
            "{} at {} of {} increments ({}): they were checked at the strain closest to them, not on the path \
             asked for (a held stress the material cannot carry, past its strength, cannot be reached)",
            increment::HELD_NOT_REACHED,
            off_path.len(),
            path.increments.len(),
            first.split(':').next().unwrap_or("")
        ));
    }
    if let (Some(Some(k)), false) = (time_dependent, stopped) {
        coverage.push(format!(
            "every increment takes the same time ({:e}) and the routine's stress depends on it (twice that \
             time changed the stress of increment {k}): the tangent was checked at that time increment \
             only, where one that leaves out its dependence on the time may still agree; vary `dtime` along \
             the path",
            path.increments[0].dtime
        ));
    }
    if let Some(&first) = increments.jumps.first() {
        let n = increments.jumps.len();
        coverage.push(format!(
            "the stress jumps across the point at {n} increment{} (first {first}; see their diagnosis): \
             a discontinuous response, which no tangent describes and across which a solver's Newton \
             iteration cannot converge, whatever the check says of the tangent",
            if n == 1 { "" } else { "s" }
        ));
    }
    // A path without strain increments (a temperature ramp at held strain) has nothing to
    // unload (it read "the path never unloaded"; a user-style sweep).
    let strained =
        path.increments.iter().any(|i| i.dstrain.iter().any(|&d| d != 0.0) || i.hold_stress.is_some());
    if !unloaded && !stopped && increments.len() > 1 && strained {
        // A path that turns back where the stress is zero (a fully failed interface, a point
        // unloaded to zero) did reverse; the words said it never did (a user-style sweep).
        let reverses = path
            .increments
            .windows(2)
            .any(|w| w[0].dstrain.iter().zip(&w[1].dstrain).map(|(a, b)| a * b).sum::<f64>() < 0.0);
        coverage.push(if reverses {
            "the path turns back, but never against a stress (the strain increment never opposed the stress: \
             where it turned, the stress was zero, as at a fully failed or unloaded point): tangents of \
             unloading under stress were not checked"
                .to_string()
        } else {
            "the path never unloaded (the strain increment never opposed the stress): tangents after a load \
             reversal were not checked"
                .to_string()
        });
    }
    let verdict = if increments.any_fault {
        Verdict::RoutineFault
    } else if !increments.all_passed {
        Verdict::TangentFailure
    } else if increments.twin_unsafe {
        Verdict::TwinNotSafe
    } else {
        Verdict::Pass
    };
    let Collector { records, increments, summary, branches, .. } = increments;
    Ok(Report {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        routine: RoutineSummary {
            name: info.name.clone(),
            kind: conv.kind().name().into(),
            order: conv.order().iter().map(|c| c.label().to_string()).collect(),
            // A cohesive point's shear components are slips, with no shear measure (its
            // reports said "engineering shear"; a user-style sweep).
            shear: match conv.shear() {
                _ if conv.kind().is_cohesive() => "none (slips)".into(),
                crate::ShearMeasure::Engineering => "engineering".into(),
                crate::ShearMeasure::Tensor => "tensor".into(),
            },
            nstate: info.nstate,
            nprop: info.nprop,
            complex_twin: has_twin,
        },
        path: path.name.clone(),
        path_increments: path.increments.len(),
        settings: Settings { jobs: threads_used, ..settings.clone() },
        kept: keep,
        records,
        increments,
        summary,
        branches,
        coverage,
        calls: CallCounts { real: caller.real_calls - real0, complex: caller.complex_calls - cplx0 },
        verdict,
        notes: fold_one_sided(notes),
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
        guard: None,
        cases: None,
        gave_way,
        checked_path: None,
        start_point,
    })
}

/// The increments checked so far, in path order, and what they leave for the next ones.
struct Merged {
    notes: Vec<String>,
    increments: Collector,
    /// Some increment's strain increment opposed the stress at its start (unloading).
    unloaded: bool,
    conventions_seen: bool,
}

impl Merged {
    /// Take what the next increment's step leaves (its result is in `self.increments`
    /// already; `best` is its best numerical tangent); true when the path stops there.
    fn take(&mut self, step: Step, best: Option<&[f64]>, conv: &crate::Convention) -> bool {
        self.unloaded |= step.unloaded;
        self.notes.extend(step.note);
        if step.checked && !step.state_changed {
            self.first_elastic(best, conv);
        }
        step.stops
    }

    /// Add a thread's share, collected there; true when the path stops in it.
    fn take_chunk(
        &mut self,
        collected: Collector,
        notes: Vec<String>,
        unloaded: bool,
        first_elastic: Option<(Option<Vec<f64>>, usize)>,
        conv: &crate::Convention,
    ) -> bool {
        self.unloaded |= unloaded;
        // The notes in the order one thread gives them: the conventions warning after the
        // notes of the increments up to the first elastic one.
        let mut notes = notes.into_iter();
        if let Some((best, before)) = first_elastic {
            self.notes.extend(notes.by_ref().take(before));
            self.first_elastic(best.as_deref(), conv);
        }
        self.notes.extend(notes);
        self.increments.append(collected);
        self.increments.last_faulted()
    }

    /// The first elastic increment's numerical tangent tells a wrong declared convention, at
    /// no cost in calls.
    fn first_elastic(&mut self, best: Option<&[f64]>, conv: &crate::Convention) {
        if self.conventions_seen {
            return;
        }
        self.conventions_seen = true;
        if let Some(t) = best {
            let f = crate::convention_fit::analyse(conv, t, crate::convention_fit::DEFAULT_TOL);
            if f.mismatch() {
                self.notes.push(format!(
                    "conventions warning: the elastic response {}; the tangent check cannot see a wrong \
                     declaration (the `conventions` probe shows the evidence)",
                    f.sentence()
                ));
            }
        }
    }
}

/// A note when the path's strain increments have entries in slots the routine's kind does
/// not have (a cohesive point takes n, s1, s2 from slots 11, 22, 33; a plane-stress one 11,
/// 22, 12; a uniaxial one 11 only): those entries are left out of its increments, so the
/// point is not driven along the path asked for. Any such entry is noted, however small (a
/// rule that noted only increments losing a third of their size let a plane-stress path's
/// ε33 of 0.7 ε11 go unsaid; a user-style sweep). The command line's default path leaves them
/// out itself, and says so in its name.
fn dropped_entries(conv: &crate::Convention, path: &Path) -> Option<String> {
    use crate::path::SLOT_NAMES as SLOTS;
    let used = conv.kind().path_slots();
    let mut dropped = [false; 6];
    let mut first = None;
    for (k, inc) in path.increments.iter().enumerate() {
        for (slot, &d) in inc.dstrain.iter().enumerate() {
            if d != 0.0 && !used.contains(&slot) {
                dropped[slot] = true;
                first.get_or_insert(k + 1);
            }
        }
    }
    let first = first?;
    let names: Vec<&str> = (0..6).filter(|&i| dropped[i]).map(|i| SLOTS[i]).collect();
    Some(format!(
        "the path's strain increments have entries in slot{} {} (first at increment {first}), which the routine's kind ({}) does not have ({}): they were left out",
        if names.len() == 1 { "" } else { "s" },
        names.join(", "),
        conv.kind().name(),
        takes(conv)
    ))
}

/// What a point of `conv`'s kind takes from a path's slots, for messages: "11 from slot 11,
/// …", and for a plane-strain point that its ε33 stays 0.
fn takes(conv: &crate::Convention) -> String {
    use crate::path::SLOT_NAMES as SLOTS;
    let used = conv.kind().path_slots();
    let mut t = conv
        .order()
        .iter()
        .map(|&c| (c, crate::convention::canonical_slot(c)))
        .filter(|(_, s)| used.contains(s))
        .map(|(c, s)| format!("{} from slot {}", c.label(), SLOTS[s]))
        .collect::<Vec<_>>()
        .join(", ");
    if conv.kind() == crate::PointKind::PlaneStrain {
        t.push_str("; its ε33 stays 0 and σ33 is the reaction to it");
    }
    t
}

/// A note when a plane-strain point's increments hold σ33 (at zero: a value other than zero is
/// refused by [`outside_kind`]): σ33 is the reaction to ε33 = 0 and is not held (the built-in
/// uniaxial-stress path holds every stress but σ11).
fn released_holds(conv: &crate::Convention, path: &Path) -> Option<String> {
    if conv.kind() != crate::PointKind::PlaneStrain {
        return None;
    }
    let first = path.increments.iter().position(|inc| inc.hold_stress.is_some_and(|h| h[2].is_some()))?;
    Some(format!(
        "the path holds σ33 at 0 (first at increment {}); a plane-strain point's ε33 stays 0 and its σ33 is \
         the reaction to it, so σ33 was not held",
        first + 1
    ))
}

/// A path whose every strain increment lies in slots the routine's kind does not have, with
/// no temperature change and no stress target, loads nothing once they are left out: every
/// increment would pass (a cohesive routine on `shear-12` passed so; a user-style sweep).
///
/// A stress held at a value other than zero in such a slot cannot be reached (a plane-strain
/// point asked to hold σ23 at 50 passed with every stress zero; a user-style sweep): bad input
/// too. Held at zero it is what the kind gives (a plane-stress point's σ33).
fn outside_kind(conv: &crate::Convention, path: &Path) -> Result<(), CoreError> {
    use crate::path::SLOT_NAMES as SLOTS;
    let used = conv.kind().path_slots();
    for (k, inc) in path.increments.iter().enumerate() {
        let Some(hold) = &inc.hold_stress else { continue };
        if let Some((slot, value)) =
            (0..6).filter(|s| !used.contains(s)).find_map(|s| hold[s].filter(|&v| v != 0.0).map(|v| (s, v)))
        {
            return Err(CoreError::HoldOutsideKind {
                increment: k + 1,
                slot: SLOTS[slot].into(),
                value,
                kind: conv.kind().name().to_string(),
                takes: takes(conv),
            });
        }
    }
    let moves = path.increments.iter().any(|inc| {
        used.iter().any(|&s| inc.dstrain[s] != 0.0)
            || inc.dtemp != 0.0
            || inc.hold_stress.is_some_and(|h| h.iter().flatten().any(|&t| t != 0.0))
    });
    let mut dropped = [false; 6];
    for inc in &path.increments {
        for (slot, &d) in inc.dstrain.iter().enumerate() {
            dropped[slot] |= d != 0.0 && !used.contains(&slot);
        }
    }
    if moves || !dropped.iter().any(|&d| d) {
        return Ok(());
    }
    let slots: Vec<&str> = (0..6).filter(|&i| dropped[i]).map(|i| SLOTS[i]).collect();
    Err(CoreError::PathOutsideKind {
        slots: slots.join(", "),
        kind: conv.kind().name().to_string(),
        takes: takes(conv),
    })
}

/// Notes of one-sided columns (`call_check::ONE_SIDED`) kept for the first
/// [`ONE_SIDED_NOTES`] increments, the rest counted in one line: a path that stays at the edge
/// of the routine's domain would otherwise give a note per increment.
fn fold_one_sided(notes: Vec<String>) -> Vec<String> {
    let only = |n: &String| n.contains(judge::ONE_SIDED) && !n.contains(increment::HELD_NOT_REACHED);
    let total = notes.iter().filter(|n| only(n)).count();
    if total <= ONE_SIDED_NOTES {
        return notes;
    }
    let mut seen = 0;
    let mut out: Vec<String> = notes
        .into_iter()
        .filter(|n| {
            if !only(n) {
                return true;
            }
            seen += 1;
            seen <= ONE_SIDED_NOTES
        })
        .collect();
    out.push(format!(
        "{} more increments had columns {} around a refused call (the first {ONE_SIDED_NOTES} are above)",
        total - ONE_SIDED_NOTES,
        judge::ONE_SIDED
    ));
    out
}

/// One-sided notes given in full.
const ONE_SIDED_NOTES: usize = 3;
