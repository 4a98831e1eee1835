//! The readable report for a terminal.

use std::io::{self, Write};

use super::{sci, Reporter};
use tancheck_core::diagnose::{Behaviour, Diagnosis, Hypothesis};
use tancheck_core::report::{CheckOutcome, FaultRecord, IncrementResult, SchemeCheck};
use tancheck_core::{Report, Verdict};

/// How much the terminal report says.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Detail {
    /// Verdict and failures only.
    Quiet,
    /// A line per increment, details of failures.
    Normal,
    /// Details of every check.
    Verbose,
}

pub struct Terminal {
    pub detail: Detail,
}

impl Reporter for Terminal {
    fn write(&mut self, r: &Report, out: &mut dyn Write) -> io::Result<()> {
        let rt = &r.routine;
        writeln!(out, "== {} ==", rt.name)?;
        if self.detail != Detail::Quiet {
            writeln!(
                out,
                "   {} point, components {} ({} shear), {} properties, {} state variables, complex twin: {}",
                rt.kind,
                rt.order.join(" "),
                rt.shear,
                rt.nprop,
                rt.nstate,
                if rt.complex_twin { "yes" } else { "no" }
            )?;
            writeln!(out, "   path: {}", r.path)?;
            writeln!(out)?;
            let schemes: Vec<_> = r.settings.schemes.iter().map(|s| format!("{:<22}", s.name())).collect();
            writeln!(out, "   inc  {:<24}{}", "branch", schemes.join(""))?;
        }
        for inc in &r.increments {
            let show = match self.detail {
                Detail::Quiet => !inc.passed(),
                _ => true,
            };
            if !show {
                continue;
            }
            let cleared = inc.diagnosis.as_ref().is_some_and(|d| d.pass);
            let mut cells: Vec<String> =
                inc.checks.iter().map(|c| format!("{:<22}", cell(c, cleared))).collect();
            if let Some(d) = &inc.diagnosis {
                cells.push(if d.twin_unsafe && d.pass {
                    format!("-> tangent ok; {}", d.finding)
                } else if d.pass {
                    "-> ok on a closer look".into()
                } else {
                    format!("-> {}", d.finding)
                });
            }
            if self.detail == Detail::Quiet {
                writeln!(out, "   increment {} ({}): {}", inc.index, inc.branch_label(), cells.join(""))?;
            } else {
                writeln!(out, "   {:>3}  {:<24}{}", inc.index, inc.branch_label(), cells.join(""))?;
            }
            if let Some(f) = &inc.fault {
                fault(out, f)?;
            }
            for nf in &inc.non_finite {
                writeln!(out, "        the routine returned a value that is not a finite number: {nf}")?;
            }
            if let Some(c) = &inc.non_finite_call {
                inputs(out, c)?;
            }
            for c in &inc.checks {
                if !inc.passed() && !c.passed() || self.detail == Detail::Verbose {
                    details(out, inc, c)?;
                }
            }
            if let Some(d) = &inc.diagnosis {
                if !d.pass || self.detail == Detail::Verbose {
                    diagnosis(out, d)?;
                } else if d.twin_unsafe {
                    writeln!(out, "        tangent cleared, twin set aside: {}", d.reason)?;
                } else {
                    writeln!(out, "        cleared on a closer look: {}", d.reason)?;
                }
            }
        }
        writeln!(out)?;
        for s in &r.summary {
            if s.checks == 0 && s.skipped > 0 {
                writeln!(out, "   {:<13} skipped at every increment", s.scheme.name())?;
                continue;
            }
            // A check that failed at an increment the closer look cleared is not a failure of
            // the tangent: count it apart so the summary agrees with the verdict.
            let cleared = r
                .increments
                .iter()
                .filter(|inc| inc.diagnosis.as_ref().is_some_and(|d| d.pass))
                .flat_map(|inc| &inc.checks)
                .filter(|c| c.scheme == s.scheme && !c.passed())
                .count();
            let aside =
                if cleared > 0 { format!(" ({cleared} cleared on a closer look)") } else { String::new() };
            writeln!(
                out,
                "   {:<13} {} of {} checks failed{aside}; worst norm error {}, worst entry error {} (tolerance {})",
                s.scheme.name(),
                s.failed.saturating_sub(cleared),
                s.checks,
                sci(s.worst_norm_error),
                sci(s.worst_entry_error),
                sci(s.tol)
            )?;
        }
        for b in &r.branches {
            if b.failed > 0 {
                writeln!(
                    out,
                    "   branch {}: failed at {} of {} increments, worst {}",
                    b.branch,
                    b.failed,
                    b.increments,
                    sci(b.worst_error)
                )?;
            } else {
                writeln!(
                    out,
                    "   branch {}: passed at {} increments (worst {})",
                    b.branch,
                    b.increments,
                    sci(b.worst_error)
                )?;
            }
        }
        for c in &r.coverage {
            writeln!(out, "   coverage warning: {c}")?;
        }
        for n in &r.notes {
            writeln!(out, "   note: {n}")?;
        }
        if self.detail != Detail::Quiet {
            writeln!(out, "   routine calls: {} real, {} complex", r.calls.real, r.calls.complex)?;
        }
        let what = match r.verdict {
            Verdict::Pass => {
                "the returned tangent is the derivative of the stress update at every increment checked"
            }
            // Only outputs that are not finite numbers, no tangent mismatch.
            Verdict::TangentFailure
                if r.increments.iter().filter(|i| !i.passed()).all(|i| {
                    !i.non_finite.is_empty()
                        && i.checks.iter().all(tancheck_core::report::SchemeCheck::passed)
                }) =>
            {
                "the routine returned values that are not finite numbers"
            }
            Verdict::TangentFailure => {
                "the returned tangent differs from the derivative of the stress update"
            }
            Verdict::RoutineFault => "the routine crashed or could not compute an increment",
            Verdict::TwinNotSafe => {
                "the returned tangent agrees with the real difference schemes, but the complex-step twin is \
                 not complex-step safe (its results were set aside; see the diagnosis for the usual culprits)"
            }
        };
        writeln!(out, "   verdict: {} — {what} (exit {})", r.verdict.word(), r.exit_code())?;
        Ok(())
    }
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
        CheckOutcome::Fault(_) => "CRASH".into(),
    };
    if let Some(CheckOutcome::Compared(d)) = &c.dstress_dtemp {
        if !d.pass {
            s.push_str(" dT!");
        }
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
                    sci(c.step),
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
            CheckOutcome::Fault(f) => fault(out, f)?,
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
        writeln!(
            out,
            "          refined increments: {}{}",
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

fn fault(out: &mut dyn Write, f: &FaultRecord) -> io::Result<()> {
    writeln!(out, "        {}", f.message)?;
    inputs(out, &f.call)
}

fn inputs(out: &mut dyn Write, c: &tancheck_core::report::CallRecord) -> io::Result<()> {
    writeln!(out, "          inputs of that call (increment {}):", c.increment)?;
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
