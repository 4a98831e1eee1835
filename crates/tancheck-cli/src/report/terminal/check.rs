//! The readable report of a check: a row per increment that needs one, runs of passing
//! increments folded into one line, the details of failures, the summary and the verdict.

use std::io::{self, Write};

use super::{Detail, Palette};
use crate::report::sci;
use tancheck_core::diagnose::{Behaviour, Diagnosis, Hypothesis};
use tancheck_core::report::{CheckOutcome, FaultRecord, IncrementRecord, IncrementResult, SchemeCheck};
use tancheck_core::{Report, Verdict};

/// Whether an increment goes into a folded run: it passed and its full detail (if kept) has
/// nothing to show.
fn foldable(rec: &IncrementRecord, full: Option<&IncrementResult>) -> bool {
    rec.pass && full.is_none_or(|i| i.diagnosis.is_none() && i.fault.is_none() && i.non_finite.is_empty())
}

/// The line of a run of passing increments `run` (at least one).
fn folded(out: &mut dyn Write, r: &Report, run: &[IncrementRecord], p: Palette) -> io::Result<()> {
    let (first, last) = (run[0].index, run[run.len() - 1].index);
    let mut branches: Vec<(Option<i32>, bool, usize)> = Vec::new();
    for rec in run {
        match branches.iter_mut().find(|b| b.0 == rec.branch && b.1 == rec.state_changed) {
            Some(b) => b.2 += 1,
            None => branches.push((rec.branch, rec.state_changed, 1)),
        }
    }
    let label = |b: &(Option<i32>, bool, usize)| {
        let changed = if b.1 { "state changed" } else { "state unchanged" };
        match b.0 {
            Some(id) => format!("#{id} ({changed}) ×{}", b.2),
            None => format!("{changed} ×{}", b.2),
        }
    };
    let worst: Vec<String> = r
        .settings
        .schemes
        .iter()
        .enumerate()
        .filter_map(|(k, s)| {
            let w = run
                .iter()
                .filter_map(|rec| rec.worst_errors().nth(k).flatten())
                .fold(None, |a: Option<f64>, e| Some(a.map_or(e, |a| a.max(e))));
            w.map(|w| format!("{} {}", s.name(), sci(w)))
        })
        .collect();
    let span = if first == last { format!("{first:>3}") } else { format!("{first:>3}–{last}") };
    writeln!(
        out,
        // At least one space after a long span (as wide as before for spans of up to 8).
        "   {span:<8} {} {}; {}; worst {}",
        p.pass("ok"),
        if run.len() == 1 { "1 increment".to_string() } else { format!("{} increments", run.len()) },
        branches.iter().map(label).collect::<Vec<_>>().join(", "),
        if worst.is_empty() { "-".to_string() } else { worst.join(", ") }
    )
}

/// The check report for a terminal.
pub fn write(out: &mut dyn Write, r: &Report, detail: Detail, p: Palette) -> io::Result<()> {
    let rt = &r.routine;
    if detail == Detail::Quiet {
        return quiet(out, r, p);
    }
    writeln!(out, "{}", p.head(&format!("== {} ==", rt.name)))?;
    // The shear measure only where the point has shear components (a uniaxial point read
    // "components 11 (engineering shear)"; a user-style sweep).
    let shear = if rt.order.iter().any(|l| ["23", "13", "12"].contains(&l.as_str())) {
        format!(" ({} shear)", rt.shear)
    } else {
        String::new()
    };
    writeln!(
        out,
        "   {} point, components {}{shear}, {} properties, {} state variables, complex twin: {}",
        rt.kind,
        rt.order.join(" "),
        rt.nprop,
        rt.nstate,
        if rt.complex_twin { "yes" } else { "no" }
    )?;
    writeln!(out, "   path: {}", r.path)?;
    writeln!(out)?;
    let schemes: Vec<_> = r.settings.schemes.iter().map(|s| format!("{:<22}", s.name())).collect();
    writeln!(out, "   inc  {:<24}{}", "branch", schemes.join(""))?;
    // Every increment has a record (a report read from an older file: made from its increments).
    let made;
    let records: &[IncrementRecord] = if r.records.is_empty() {
        made = r.increments.iter().map(|i| IncrementRecord::of(i, &r.settings.schemes)).collect::<Vec<_>>();
        &made
    } else {
        &r.records
    };
    let mut full = r.increments.iter().peekable();
    let mut run: Vec<IncrementRecord> = Vec::new();
    // The first increment whose diagnosis listed the twin's usual culprits (listed once).
    let mut culprits_at = None;
    for rec in records {
        while full.peek().is_some_and(|i| (i.index as u32) < rec.index) {
            full.next();
        }
        let inc = full.next_if(|i| i.index as u32 == rec.index);
        if detail != Detail::Verbose && foldable(rec, inc) {
            run.push(*rec);
            continue;
        }
        if !run.is_empty() {
            folded(out, r, &run, p)?;
            run.clear();
        }
        match inc {
            Some(inc) => increment(out, inc, detail, p, &mut culprits_at)?,
            None => folded(out, r, std::slice::from_ref(rec), p)?,
        }
    }
    if !run.is_empty() {
        folded(out, r, &run, p)?;
    }
    writeln!(out)?;
    summary(out, r, p)?;
    writeln!(out, "   routine calls: {} real, {} complex", r.calls.real, r.calls.complex)?;
    verdict(out, r, p)?;
    for c in &r.cautions {
        writeln!(out, "   caution: {c}")?;
    }
    Ok(())
}

/// `-q`: one line per failing increment, then the verdict.
fn quiet(out: &mut dyn Write, r: &Report, p: Palette) -> io::Result<()> {
    for inc in r.failing() {
        let cells: Vec<String> = inc
            .checks
            .iter()
            .filter(|c| !c.passed())
            .map(|c| format!("{} {}", c.scheme.name(), cell(c, false)))
            .collect();
        let mut what = cells.join(", ");
        if let Some(f) = &inc.fault {
            what = f.message.clone();
        } else if !inc.non_finite.is_empty() {
            what = format!("not finite: {}", inc.non_finite.join(", "));
        }
        // A fault is not a failed comparison, and has no diagnosis to name.
        // The increment's base call or one of its schemes' calls faulted.
        let faulted =
            inc.fault.is_some() || inc.checks.iter().any(|c| matches!(c.tangent, CheckOutcome::Fault(_)));
        let word = if faulted { "FAULT" } else { "FAIL" };
        let finding =
            if faulted && inc.diagnosis.is_none() { String::new() } else { format!(" -> {}", inc.finding()) };
        // Increment 0 is the zero increment from the start state, which the routine is told
        // is increment 1: said, so that the line does not read as two answers beside a guard
        // finding naming increment 1 (a user-style sweep).
        let zero = if inc.index == 0 { " (the zero increment from the start state)" } else { "" };
        writeln!(
            out,
            "{} {} increment {}{zero} ({}): {what}{finding}",
            p.fail(word),
            r.routine.name,
            inc.index,
            inc.branch_label(),
        )?;
    }
    verdict(out, r, p)
}

/// `culprits_at`: the first increment whose lines listed the usual culprits of a twin that is
/// not complex-step safe; a later increment refers to it instead of listing them again.
fn increment(
    out: &mut dyn Write,
    inc: &IncrementResult,
    detail: Detail,
    p: Palette,
    culprits_at: &mut Option<usize>,
) -> io::Result<()> {
    let cleared = inc.diagnosis.as_ref().is_some_and(|d| d.pass);
    let mut cells: Vec<String> = inc
        .checks
        .iter()
        .map(|c| {
            let text = format!("{:<22}", cell(c, cleared));
            if c.passed() || cleared {
                text
            } else {
                p.fail(&text)
            }
        })
        .collect();
    if inc.diagnosis.is_none() && inc.fault.is_none() && !inc.non_finite.is_empty() {
        // The finding the report names (no diagnosis is made of outputs that are not finite).
        cells.push(p.fail("-> non-finite-output"));
    }
    if let Some(d) = &inc.diagnosis {
        cells.push(if d.twin_unsafe && d.pass {
            p.warn(&format!("-> tangent ok; {}", d.finding))
        } else if d.pass {
            "-> ok on a closer look".into()
        } else {
            p.fail(&format!("-> {}", d.finding))
        });
    }
    writeln!(out, "   {:>3}  {:<24}{}", inc.index, inc.branch_label(), cells.join(""))?;
    if let Some(f) = &inc.fault {
        fault(out, f, inc.index)?;
    }
    for nf in &inc.non_finite {
        writeln!(out, "        the routine returned a value that is not a finite number: {nf}")?;
    }
    if let Some(c) = &inc.non_finite_call {
        inputs(out, c, inc.index)?;
    }
    for c in &inc.checks {
        if !inc.passed() && !c.passed() || detail == Detail::Verbose {
            details(out, inc, c)?;
        }
    }
    if let Some(d) = &inc.diagnosis {
        if !d.pass || detail == Detail::Verbose {
            diagnosis(out, d)?;
        } else if d.twin_unsafe {
            let culprits = tancheck_core::diagnose::decide::TWIN_CULPRITS;
            let reason = match *culprits_at {
                Some(k) => d.reason.replace(culprits, &format!("as listed at increment {k}")),
                None => {
                    if d.reason.contains(culprits) {
                        *culprits_at = Some(inc.index);
                    }
                    d.reason.clone()
                }
            };
            writeln!(out, "        tangent cleared, twin set aside: {reason}")?;
        } else {
            writeln!(out, "        cleared on a closer look: {}", d.reason)?;
        }
    }
    Ok(())
}

fn summary(out: &mut dyn Write, r: &Report, p: Palette) -> io::Result<()> {
    for s in &r.summary {
        if s.checks == 0 && s.skipped > 0 {
            writeln!(out, "   {:<13} skipped at every increment", s.scheme.name())?;
            continue;
        }
        // A check that failed at an increment the closer look cleared is counted apart.
        let cleared = s.cleared;
        // With no failure left, a worst error above the tolerance is a cleared check's raw one
        // (a central difference across a kink): said so, not read as a failure beside "0 of
        // 16 failed" (a user-style sweep).
        let raw = s.failed == 0 && s.dtemp_failed == 0 && s.worst_error > s.tol;
        let aside = match (cleared, raw) {
            (0, _) => String::new(),
            (_, true) => {
                format!(" ({cleared} cleared on a closer look, whose errors before it are the worst here)")
            }
            _ => format!(" ({cleared} cleared on a closer look)"),
        };
        let failed = s.failed;
        let count = format!("{failed} of {} checks failed", s.checks);
        // A failure of ∂σ/∂T is said apart: the errors after it are the tangent's.
        let dtemp = if s.dtemp_failed > 0 {
            format!(
                ", {} of them in ∂σ/∂T (worst ∂σ/∂T error {}); tangent:",
                s.dtemp_failed,
                sci(s.dtemp_worst_error)
            )
        } else {
            ";".into()
        };
        // The soft-direction error, when it is the largest, said too: the increments' lines
        // give the largest of the three.
        let soft = if s.worst_error > s.worst_norm_error.max(s.worst_entry_error) {
            format!(", along the soft directions {}", sci(s.worst_error))
        } else {
            String::new()
        };
        writeln!(
            out,
            "   {:<13} {}{aside}{dtemp} worst norm error {}, worst entry error {}{soft} (tolerance {})",
            s.scheme.name(),
            if failed > 0 { p.fail(&count) } else { count },
            sci(s.worst_norm_error),
            sci(s.worst_entry_error),
            sci(s.tol)
        )?;
    }
    for b in &r.branches {
        if b.failed > 0 {
            writeln!(
                out,
                "   branch {}: failed at {} of {} increments, worst tangent error {}",
                b.branch,
                b.failed,
                b.increments,
                sci(b.worst_error)
            )?;
        } else {
            writeln!(
                out,
                "   branch {}: passed at {} increment{} (worst {}{})",
                b.branch,
                b.increments,
                if b.increments == 1 { "" } else { "s" },
                sci(b.worst_error),
                match b.cleared {
                    0 => String::new(),
                    1 => ", counting 1 increment the closer look cleared".to_string(),
                    k => format!(", counting {k} increments the closer look cleared"),
                }
            )?;
        }
    }
    for c in &r.coverage {
        writeln!(out, "   {}: {c}", p.warn("coverage warning"))?;
    }
    for n in &r.notes {
        writeln!(out, "   note: {n}")?;
    }
    Ok(())
}

fn verdict(out: &mut dyn Write, r: &Report, p: Palette) -> io::Result<()> {
    let cases_only = r.failing().next().is_none() && !r.failed_cases().is_empty();
    let what = match r.verdict {
        // The path passed; a regression case replayed with it did not.
        Verdict::TangentFailure | Verdict::RoutineFault if cases_only => {
            let n = r.failed_cases().len();
            let all = r.cases.as_ref().map_or(n, |c| c.passed.len() + n);
            return writeln!(
                out,
                "   verdict: {} — {n} of {all} regression cases still {} (first {}: {}); the path's increments \
                 passed (exit {})",
                p.verdict(r.verdict.word()),
                if r.verdict == Verdict::RoutineFault { "fail or fault" } else { "fail" },
                r.failed_cases()[0].file,
                r.failed_cases()[0].finding,
                r.exit_code()
            );
        }
        // A stress that jumps across a point has no derivative there: the pass says so in its
        // own line (it read "the derivative ... at every increment" beside the coverage
        // warning; a user-style sweep's Mohr-Coulomb update that jumped near its apex).
        Verdict::Pass if r.coverage.iter().any(|c| c.starts_with("the stress jumps across the point")) => {
            "the returned tangent agrees with the difference schemes at every increment checked, but the stress \
             itself jumps at some (see the coverage warning): a discontinuous update, which a solver's Newton \
             iteration cannot follow"
        }
        Verdict::Pass => {
            "the returned tangent is the derivative of the stress update at every increment checked"
        }
        // Only outputs that are not finite numbers (the comparisons of such an increment fail
        // on them, and the path stops there), no tangent mismatch before.
        Verdict::TangentFailure if r.failing().all(|i| !i.non_finite.is_empty()) => {
            "the routine returned values that are not finite numbers"
        }
        // Only ∂σ/∂T failed: every failing increment's tangent agreed.
        Verdict::TangentFailure
            if r.failing().all(|i| {
                i.non_finite.is_empty()
                    && i.fault.is_none()
                    && i.checks.iter().all(|c| !matches!(&c.tangent, tancheck_core::report::CheckOutcome::Compared(x) if !x.pass))
            }) && r.summary.iter().any(|s| s.dtemp_failed > 0) =>
        {
            "the returned ∂σ/∂T differs from the derivative of the stress update with respect to temperature \
             (the tangent agrees)"
        }
        Verdict::TangentFailure => "the returned tangent differs from the derivative of the stress update",
        Verdict::RoutineFault => {
            "the routine crashed, could not compute an increment, or was flagged by the memory guards"
        }
        Verdict::TwinNotSafe => {
            "the returned tangent agrees with the real difference schemes, but the complex-step twin is \
             not complex-step safe (its results were set aside; see the diagnosis for the usual culprits)"
        }
    };
    writeln!(out, "   verdict: {} — {what} (exit {})", p.verdict(r.verdict.word()), r.exit_code())
}

/// One table cell: verdict word and the largest of norm, entry and soft-direction error.
/// `cleared`: the increment's closer look cleared it, so a failed check reads "cleared".
fn cell(c: &SchemeCheck, cleared: bool) -> String {
    let mut s = match &c.tangent {
        CheckOutcome::Compared(cmp) => {
            let word = if cmp.pass {
                "ok"
            } else if cleared {
                "cleared"
            } else {
                "FAIL"
            };
            format!("{word} {}", sci(cmp.error()))
        }
        CheckOutcome::Skipped { reason } => format!("skipped ({reason})"),
        // A signal ended the call; otherwise the routine returned a failure status or the
        // memory guards flagged the call (the details below say which).
        CheckOutcome::Fault(f) if f.signal.is_some() => "CRASH".into(),
        CheckOutcome::Fault(_) => "FAULT".into(),
    };
    match &c.dstress_dtemp {
        Some(CheckOutcome::Compared(d)) if !d.pass => s.push_str(" dT!"),
        // The ∂σ/∂T column's calls faulted (the row's tangent may have agreed): the row says
        // so, as the scheme's summary counts it.
        Some(CheckOutcome::Fault(f)) if f.signal.is_some() => s.push_str(" dT CRASH"),
        Some(CheckOutcome::Fault(_)) => s.push_str(" dT FAULT"),
        _ => {}
    }
    s
}

fn details(out: &mut dyn Write, inc: &IncrementResult, c: &SchemeCheck) -> io::Result<()> {
    for (what, o) in
        std::iter::once(("tangent", &c.tangent)).chain(c.dstress_dtemp.iter().map(|d| ("dstress/dT", d)))
    {
        match o {
            CheckOutcome::Compared(cmp) => {
                writeln!(
                    out,
                    "        {} {what} at increment {}, step {}: norm error {}, worst entry error {} (tolerance {})",
                    c.scheme.name(),
                    inc.index,
                    match (what, c.temperature_step) {
                        ("dstress/dT", Some(t)) => format!("{} (temperature)", sci(t)),
                        _ => sci(c.step),
                    },
                    sci(cmp.norm_error),
                    sci(cmp.worst_entry_error),
                    sci(cmp.tol)
                )?;
                if cmp.soft_error > cmp.tol {
                    writeln!(
                        out,
                        "          along {}: error {} relative to the response in that direction",
                        cmp.soft_direction,
                        sci(cmp.soft_error)
                    )?;
                }
                if cmp.non_finite_returned > 0 {
                    writeln!(
                        out,
                        "          {} returned entries are not finite numbers",
                        cmp.non_finite_returned
                    )?;
                }
                for e in cmp.worst.iter().filter(|e| !cmp.pass && e.error > cmp.tol) {
                    writeln!(
                        out,
                        "          entry {:<7} returned {:>12.6e}  derivative {:>12.6e}  error {}",
                        e.label,
                        e.returned,
                        e.numerical,
                        sci(e.error)
                    )?;
                }
            }
            CheckOutcome::Skipped { .. } => {}
            CheckOutcome::Fault(f) => fault(out, f, inc.index)?,
        }
    }
    Ok(())
}

/// The closer look: verdict, kink, step studies, ranked causes.
pub fn diagnosis(out: &mut dyn Write, d: &Diagnosis) -> io::Result<()> {
    writeln!(out, "        diagnosis: {}", d.reason)?;
    if let Some(k) = &d.kink {
        if k.detected {
            writeln!(
                out,
                "          kink: forward and backward derivatives differ by {} to {}; returned vs forward {}, vs backward {}",
                sci(k.gaps.iter().cloned().fold(f64::INFINITY, f64::min)),
                sci(k.gaps.iter().cloned().fold(0.0, f64::max)),
                sci(k.forward_error),
                sci(k.backward_error)
            )?;
            if !k.columns.is_empty() {
                writeln!(out, "          side matched per column: {}", k.sides)?;
            }
        }
    }
    for s in &d.studies {
        let slope = s.slope.map_or("-".to_string(), |x| format!("{x:.2}"));
        let what = match s.behaviour {
            Behaviour::Converges => "converges".to_string(),
            Behaviour::Plateau => format!("plateau at {}", sci(s.plateau.unwrap_or(f64::NAN))),
            Behaviour::Inconclusive => "inconclusive".to_string(),
        };
        writeln!(
            out,
            "          step study {:<8} best error {} at relative step {:.0e}, slope {slope} (order {}), noise floor {}: {what}",
            s.scheme.name(),
            sci(s.best_error),
            s.best_rel_step,
            s.scheme.order(),
            sci(s.noise_floor)
        )?;
    }
    if let Some(r) = &d.refinement {
        let e: Vec<String> =
            r.fractions.iter().zip(&r.errors).map(|(f, e)| format!("{f}×: {}", sci(*e))).collect();
        let part = if r.past > 0.0 {
            format!(" (of its part past {:.3}×, where it enters the branch)", r.past)
        } else {
            String::new()
        };
        writeln!(
            out,
            "          refined increments{part}: {}{}",
            e.join(", "),
            if r.same_branch { "" } else { " (not all in the same branch)" }
        )?;
    }
    let list = |out: &mut dyn Write, title: &str, hs: &[Hypothesis]| -> io::Result<()> {
        if hs.is_empty() {
            return Ok(());
        }
        writeln!(out, "          {title} (error left after the correction):")?;
        for (k, h) in hs.iter().take(4).enumerate() {
            writeln!(
                out,
                "            {}. {:<18} {:<10} {}{}",
                k + 1,
                h.cause.name(),
                sci(h.error_left),
                h.detail,
                if h.explains { "" } else { "  (does not explain it)" }
            )?;
        }
        Ok(())
    };
    list(out, "likely causes", &d.causes)?;
    list(out, "likely causes of the ∂σ/∂T error", &d.dtemp_causes)?;
    Ok(())
}

fn fault(out: &mut dyn Write, f: &FaultRecord, row: usize) -> io::Result<()> {
    writeln!(out, "        {}", f.message)?;
    inputs(out, &f.call, row)
}

/// The inputs of a call kept with a fault or non-finite outputs, under the report's increment
/// `row`; the increment number the routine was told is named where it is another.
fn inputs(out: &mut dyn Write, c: &tancheck_core::report::CallRecord, row: usize) -> io::Result<()> {
    if usize::try_from(c.increment).ok() == Some(row) {
        writeln!(out, "          inputs of that call (increment {row}):")?;
    } else {
        writeln!(
            out,
            "          inputs of that call (increment {row}; the routine was told increment {}):",
            c.increment
        )?;
    }
    if let Some(p) = &c.perturbation {
        writeln!(out, "            perturbation  {p}")?;
    }
    writeln!(out, "            strain        {:?}", c.strain)?;
    writeln!(out, "            dstrain       {:?}", c.dstrain)?;
    writeln!(out, "            stress0       {:?}", c.stress0)?;
    writeln!(out, "            state0        {:?}", c.state0)?;
    writeln!(out, "            props         {:?}", c.props)?;
    writeln!(out, "            temp, dtemp   {}, {}   time, dtime {}, {}", c.temp, c.dtemp, c.time, c.dtime)?;
    Ok(())
}
