//! The readable report of `tancheck explore`: seed and budget, the scale, the signatures
//! reached (with counts and the first path), what was never reached, and each distinct
//! failure with its shrunk path and case file. `-q`: one line per failure and the verdict.

use std::io::{self, Write};

use tancheck_core::bisect::Inside;
use tancheck_core::explore::{coverage::ranges_text, ExploreReport};
use tancheck_core::Verdict;

use super::{increment_text, Detail, Palette};

pub fn write(out: &mut dyn Write, r: &ExploreReport, detail: Detail, p: Palette) -> io::Result<()> {
    let quiet = detail == Detail::Quiet;
    if quiet {
        for f in &r.findings {
            writeln!(
                out,
                "{} {} explore seed {}: {} in {} (first at path {}, increment {}){}",
                p.fail(f.verdict.word()),
                r.routine.name,
                r.seed,
                f.finding,
                f.branch,
                f.first_path,
                f.first_increment,
                f.case.as_ref().map(|c| format!("; case {}", c.display())).unwrap_or_default()
            )?;
        }
        return writeln!(out, "{} {} (explore seed {})", p.verdict(r.verdict.word()), r.routine.name, r.seed);
    }
    writeln!(out, "{}", p.head(&format!("== {} — explore, seed {} ==", r.routine.name, r.seed)))?;
    writeln!(
        out,
        "   {} paths ({} continued from the corpus of {}), {} increments, {} routine calls ({} complex), {:.1} s; \
         stopped by {}",
        r.paths,
        r.mutated,
        r.corpus,
        r.increments,
        r.calls.real + r.calls.complex,
        r.calls.complex,
        r.seconds,
        r.stopped_by.words()
    )?;
    let s = &r.scale;
    writeln!(
        out,
        "   scale: strain {:.3e} ({}), stress {:.3e}; temperature {}{}",
        s.strain,
        if s.declared {
            "declared: explore.strain_scale"
        } else if s.measured {
            "the elastic range measured from the start"
        } else {
            "not measured: fallback"
        },
        s.stress,
        match r.temperature {
            Some((lo, hi)) => format!("between {lo} and {hi}"),
            None => "held".into(),
        },
        if r.random_properties { "; properties drawn from the declared ranges" } else { "" }
    )?;
    for n in &r.notes {
        writeln!(out, "   note: {n}")?;
    }
    writeln!(out, "\n   reached ({} signatures):", r.reached.len())?;
    for x in &r.reached {
        writeln!(
            out,
            "     {:<44} {:>6} increments in {:>4} paths; first: path {}, increment {}",
            x.label, x.increments, x.paths, x.first_path, x.first_increment
        )?;
        if detail == Detail::Verbose {
            for (k, i) in x.path.increments.iter().enumerate() {
                writeln!(out, "         {:>3}  {}", k + 1, increment_text(i))?;
            }
        }
    }
    let n = &r.never;
    if n.branches.is_empty() && n.state.is_empty() {
        let state = if r.routine.nstate == 0 {
            "the routine has no state variables"
        } else {
            "every state variable changed"
        };
        writeln!(out, "   never reached: nothing known to the vocabulary; {state}")?;
    } else {
        for b in &n.branches {
            writeln!(out, "   {} branch {} ({})", p.warn("never reached:"), b.branch, b.name)?;
        }
        if !n.state.is_empty() {
            writeln!(out, "   {} state {}", p.warn("never changed:"), ranges_text(&n.state))?;
        }
    }
    writeln!(out)?;
    for f in &r.findings {
        writeln!(
            out,
            "   {} {} in {}: {} path(s), first path {} at increment {} of {}",
            p.fail(f.verdict.word()),
            f.finding,
            f.branch,
            f.paths,
            f.first_path,
            f.first_increment,
            f.path.increments.len()
        )?;
        if let Some(s) = &f.shrunk {
            writeln!(
                out,
                "       shrunk to {} increment(s) ({} candidates, {} kept):",
                s.path.increments.len(),
                s.iterations,
                s.accepted
            )?;
            for (k, i) in s.path.increments.iter().enumerate() {
                writeln!(out, "         {:>3}  {}", k + 1, increment_text(i))?;
            }
            if let Some(l) = &s.located {
                let inside = match &l.inside {
                    Inside::Crossing(c) => {
                        format!("; the error takes its class at {:.6} of it", c.fraction())
                    }
                    Inside::Throughout { .. } => String::new(),
                };
                writeln!(out, "       fails at increment {} ({}){inside}", l.increment, l.finding)?;
            }
        }
        if let Some(c) = &f.case {
            writeln!(out, "       case: {} (tancheck replay)", c.display())?;
        }
    }
    let what = match r.verdict {
        Verdict::Pass => "no failure found within the budget".to_string(),
        _ => format!("{} distinct failure(s)", r.findings.len()),
    };
    writeln!(out, "   verdict: {} — {what} (exit {})", p.verdict(r.verdict.word()), r.exit_code())?;
    for c in &r.cautions {
        writeln!(out, "   caution: {c}")?;
    }
    Ok(())
}
