//! The readable view of a campaign's report for the terminal: the headline, per routine its
//! items (with `-q` only those not as expected), the notes and the overall line.

use std::io::{self, Write};

use super::Detail;
use crate::report::campaign::{headline, item_line, verdict_line, CampaignReport};
use crate::report::style::Palette;

/// The readable view: the headline, per routine its items (quiet: only the items not as
/// expected), the notes, the overall line.
pub fn write(out: &mut dyn Write, r: &CampaignReport, detail: Detail, p: Palette) -> io::Result<()> {
    writeln!(out, "{}", p.head(&headline(r)))?;
    for (routine, items) in r.routines() {
        let shown: Vec<_> = items.iter().filter(|i| detail != Detail::Quiet || !i.as_expected).collect();
        if shown.is_empty() {
            continue;
        }
        let bad = items.iter().any(|i| !i.as_expected);
        let name = &items[0].name;
        let head = format!("  {routine} ({name})");
        writeln!(out, "{}", if bad { p.fail(&head) } else { head })?;
        for it in shown {
            writeln!(out, "    {}", item_line(it))?;
        }
    }
    if detail != Detail::Quiet {
        for n in &r.notes {
            writeln!(out, "  note: {n}")?;
        }
    }
    let v = verdict_line(r);
    writeln!(out, "{}", if r.exit_code == 0 { p.pass(&v) } else { p.fail(&v) })?;
    if detail != Detail::Quiet {
        for c in &r.cautions {
            writeln!(out, "  caution: {c}")?;
        }
    }
    Ok(())
}
