//! The readable report for a terminal.

use std::io::{self, Write};

use super::{sci, Reporter};
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
            let cells: Vec<String> = inc.checks.iter().map(|c| format!("{:<22}", cell(c))).collect();
            if self.detail == Detail::Quiet {
                writeln!(out, "   increment {} ({}): {}", inc.index, inc.branch_label(), cells.join(""))?;
            } else {
                writeln!(out, "   {:>3}  {:<24}{}", inc.index, inc.branch_label(), cells.join(""))?;
            }
            if let Some(f) = &inc.fault {
                fault(out, f)?;
            }
            for c in &inc.checks {
                if !c.passed() || self.detail == Detail::Verbose {
                    details(out, inc, c)?;
                }
            }
        }
        writeln!(out)?;
        for s in &r.summary {
            if s.checks == 0 && s.skipped > 0 {
                writeln!(out, "   {:<13} skipped at every increment", s.scheme.name())?;
                continue;
            }
            writeln!(
                out,
                "   {:<13} {} of {} checks failed; worst norm error {}, worst entry error {} (tolerance {})",
                s.scheme.name(),
                s.failed,
                s.checks,
                sci(s.worst_norm_error),
                sci(s.worst_entry_error),
                sci(s.tol)
            )?;
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
            Verdict::TangentFailure => {
                "the returned tangent differs from the derivative of the stress update"
            }
            Verdict::RoutineFault => "the routine crashed or could not compute an increment",
        };
        writeln!(out, "   verdict: {} — {what} (exit {})", r.verdict.word(), r.exit_code())?;
        Ok(())
    }
}

/// One table cell: verdict word and the larger of norm and entry error.
fn cell(c: &SchemeCheck) -> String {
    let mut s = match &c.tangent {
        CheckOutcome::Compared(cmp) => {
            format!(
                "{} {}",
                if cmp.pass { "ok" } else { "FAIL" },
                sci(cmp.norm_error.max(cmp.worst_entry_error))
            )
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

fn fault(out: &mut dyn Write, f: &FaultRecord) -> io::Result<()> {
    writeln!(out, "        {}", f.message)?;
    let c = &f.call;
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
