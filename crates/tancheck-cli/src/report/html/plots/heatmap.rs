//! The heatmap of the entry errors of a failing comparison, with its colour scale.

use plotters::prelude::*;

use tancheck_core::compare::Comparison;
use tancheck_core::Scheme;

use super::{svg_sized, text_centre, FONT};

/// Cell colour of an entry error: pale within the tolerance; above it, yellow at `lo` to dark
/// red at `hi` on a log scale (the range of the errors above the tolerance), so the pattern
/// of the wrong entries shows.
fn heat(err: f64, tol: f64, lo: f64, hi: f64) -> RGBColor {
    if !err.is_finite() {
        return RGBColor(90, 0, 20);
    }
    if err <= tol {
        return RGBColor(236, 244, 250);
    }
    heat_at(heat_t(err, lo, hi))
}

fn heat_t(err: f64, lo: f64, hi: f64) -> f64 {
    if hi > lo {
        ((err / lo).ln() / (hi / lo).ln()).clamp(0.0, 1.0)
    } else {
        1.0
    }
}

fn heat_at(t: f64) -> RGBColor {
    let (a, b) = ((255.0, 224.0, 110.0), (150.0, 10.0, 30.0));
    let mix = |x: f64, y: f64| (x + (y - x) * t).round() as u8;
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// A heatmap of the entry errors of one failing comparison: rows are stress components,
/// columns strain components (routine order), each cell labelled with its error, and a colour
/// scale beside it.
pub fn entry_heatmap(c: &Comparison, order: &[String], scheme: Scheme, increment: usize) -> Option<String> {
    let n = order.len();
    if n == 0 || c.entry_errors.len() != n * n {
        return None;
    }
    let tol = c.tol;
    let above: Vec<f64> = c.entry_errors.iter().cloned().filter(|e| e.is_finite() && *e > tol).collect();
    let hi = above.iter().cloned().fold(tol, f64::max);
    let lo = above.iter().cloned().fold(hi, f64::min).min(hi / 10.0).max(tol);
    let cell = 64i32;
    let (left, top) = (96i32, 16i32);
    let grid = cell * n as i32;
    let size = ((left + grid + 190) as u32, (top + grid + 76) as u32);
    let title = format!("entry errors of increment {increment} against {}", scheme.name());
    svg_sized(&title, size, |root| {
        let label = TextStyle::from((FONT, 16).into_font()).color(&BLACK);
        let small = TextStyle::from((FONT, 14).into_font()).color(&BLACK);
        for (i, name) in order.iter().enumerate() {
            for j in 0..n {
                let e = c.entry_errors[i + j * n];
                let (x, y) = (left + j as i32 * cell, top + i as i32 * cell);
                root.draw(&Rectangle::new([(x, y), (x + cell, y + cell)], heat(e, tol, lo, hi).filled()))?;
                root.draw(&Rectangle::new([(x, y), (x + cell, y + cell)], WHITE.stroke_width(1)))?;
                let dark = !e.is_finite() || (e > tol && heat_t(e, lo, hi) > 0.45);
                let ink = if dark { WHITE } else { BLACK };
                let text = if e == 0.0 { "0".to_string() } else { format!("{e:.1e}") };
                root.draw(&Text::new(
                    text,
                    (x + cell / 2, y + cell / 2),
                    (FONT, 13).into_font().color(&ink).pos(text_centre()),
                ))?;
            }
            root.draw(&Text::new(
                format!("σ{name}"),
                (left - 10, top + i as i32 * cell + cell / 2),
                label.pos(plotters::style::text_anchor::Pos::new(
                    plotters::style::text_anchor::HPos::Right,
                    plotters::style::text_anchor::VPos::Center,
                )),
            ))?;
            root.draw(&Text::new(
                format!("Δε{name}"),
                (left + i as i32 * cell + cell / 2, top + grid + 16),
                label.pos(text_centre()),
            ))?;
        }
        root.draw(&Text::new(
            "row: stress component; column: strain component",
            (left + grid / 2, top + grid + 46),
            small.pos(text_centre()),
        ))?;
        // The colour scale.
        let (bx, bh) = (left + grid + 28, grid.min(300));
        let steps = 24;
        for k in 0..steps {
            let t = 1.0 - k as f64 / steps as f64;
            let y0 = top + bh * k / steps;
            let y1 = top + bh * (k + 1) / steps;
            root.draw(&Rectangle::new([(bx, y0), (bx + 18, y1)], heat_at(t).filled()))?;
        }
        root.draw(&Rectangle::new([(bx, top), (bx + 18, top + bh)], RGBColor(150, 150, 150)))?;
        let pale = top + bh + 14;
        root.draw(&Rectangle::new([(bx, pale), (bx + 18, pale + 18)], RGBColor(236, 244, 250).filled()))?;
        root.draw(&Rectangle::new([(bx, pale), (bx + 18, pale + 18)], RGBColor(150, 150, 150)))?;
        root.draw(&Text::new(format!("{hi:.1e}"), (bx + 26, top + 6), small.clone()))?;
        root.draw(&Text::new(format!("{lo:.1e}"), (bx + 26, top + bh - 10), small.clone()))?;
        root.draw(&Text::new(format!("≤ tolerance {tol:.0e}"), (bx + 26, pale + 3), small.clone()))?;
        Ok(())
    })
}
