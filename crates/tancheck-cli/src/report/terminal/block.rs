//! The readable view of a [`BlockReport`] (the terminal reporter's `block`): the elastic
//! response, the stable time increments, notes, findings and the verdict.

use std::io::{self, Write};

use tancheck_core::block::BlockReport;

use super::{Detail, Palette};

/// The readable view.
pub struct BlockTerminal {
    pub detail: Detail,
    pub palette: Palette,
}

impl BlockTerminal {
    pub fn write(&self, r: &BlockReport, out: &mut dyn Write) -> io::Result<()> {
        if self.detail == Detail::Quiet {
            return self.write_quiet(r, out);
        }
        writeln!(out, "tancheck: block routine {}", r.routine)?;
        // A path spec's name counts its increments already ("… (6+3 increments)").
        if r.path.ends_with("increments)") || r.path.ends_with("increment)") {
            writeln!(out, "   path: {}", r.path)?;
        } else {
            writeln!(out, "   path: {} ({} increments)", r.path, r.increments.len())?;
        }
        let e = &r.elastic;
        if e.measured() {
            writeln!(
                out,
                "   elastic response (first call): dilatational modulus {:.6e}, wave speed {:.6e}, stable time \
                 increment L/c {:.6e}",
                e.dilatational_modulus, e.wave_speed, e.stable_time_increment
            )?;
        } else {
            writeln!(out, "   elastic response (first call): not measured (the first call did not give it)")?;
        }
        if self.detail == Detail::Verbose {
            writeln!(
                out,
                "   {:>4}  {:>13}  {:>12}  {:>12}  {:>13}  {:>13}  {:>13}  {:>8}",
                "inc",
                "eff. modulus",
                "wave speed",
                "L/c",
                "work/mass",
                "Δ internal",
                "Δ dissipated",
                "twin Δ"
            )?;
            for i in &r.increments {
                writeln!(
                    out,
                    "   {:>4}  {:>13.6e}  {:>12.5e}  {:>12.5e}  {:>13.6e}  {:>13.6e}  {:>13.6e}  {:>8}{}",
                    i.index,
                    i.effective_modulus,
                    i.wave_speed,
                    i.stable_time_increment,
                    i.work,
                    i.internal_increment,
                    i.dissipated_increment,
                    i.twin_difference.map_or("-".to_string(), |d| format!("{d:.1e}")),
                    if i.deleted { "  deleted" } else { "" }
                )?;
            }
        } else if let Some(min) = r
            .increments
            .iter()
            .map(|i| i.stable_time_increment)
            .filter(|x| x.is_finite() && *x > 0.0)
            .min_by(|a, b| a.total_cmp(b))
        {
            writeln!(out, "   smallest stable time increment along the path (tangent): {min:.6e}")?;
        }
        writeln!(out, "   energy rule: {}", r.energy_rule)?;
        if self.detail != Detail::Quiet {
            for n in &r.notes {
                writeln!(out, "   {n}")?;
            }
        }
        for f in &r.findings {
            let at = f.increment.map_or(String::new(), |k| format!(" (increment {k})"));
            writeln!(
                out,
                "   {} {} [{}]{at}: {}",
                self.palette.fail("FAIL"),
                f.finding,
                f.check.name(),
                f.what
            )?;
        }
        writeln!(out, "   calls: {} real, {} complex", r.real_calls, r.complex_calls)?;
        self.verdict(r, out)?;
        if self.detail != Detail::Quiet {
            for c in tancheck_core::block::BLOCK_CAUTIONS {
                writeln!(out, "   caution: {c}")?;
            }
        }
        Ok(())
    }

    /// `-q`: one line per finding, naming the routine, and the verdict.
    fn write_quiet(&self, r: &BlockReport, out: &mut dyn Write) -> io::Result<()> {
        for f in &r.findings {
            let at = f.increment.map_or(String::new(), |k| format!(" (increment {k})"));
            let word = if f.finding == "routine-fault" { "FAULT" } else { "FAIL" };
            writeln!(
                out,
                "{} {} {} [{}]{at}: {}",
                self.palette.fail(word),
                r.routine,
                f.finding,
                f.check.name(),
                f.what
            )?;
        }
        self.verdict(r, out)
    }

    fn verdict(&self, r: &BlockReport, out: &mut dyn Write) -> io::Result<()> {
        let verdict = match r.exit_code() {
            0 => "PASS",
            3 => "ROUTINE FAULT",
            4 => "TWIN",
            _ => "FAIL",
        };
        writeln!(
            out,
            "verdict: {} (exit {}); finding: {}",
            self.palette.verdict(verdict),
            r.exit_code(),
            r.finding()
        )
    }
}
