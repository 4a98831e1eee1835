//! The plot of a bisection: the judging scheme's error at each fraction of the failing
//! increment it judged.

use plotters::prelude::*;
use tancheck_core::bisect::{Inside, Located};

use super::{exp_label, log_range, num_label, svg_with_legend, Mark, CURVES, FAIL, FONT, LOG_FLOOR};

/// The fractions of the failing increment that bisection judged: the judging scheme's error
/// at each (log scale), coloured by class, with the bracket where the class changes.
pub fn bisect_fractions(l: &Located) -> Option<String> {
    if l.samples.is_empty() {
        return None;
    }
    // A sample whose error is not finite (an output that is not a number) has no place on a
    // log axis: it is left out, as the other plots leave out such values.
    let yr = log_range(l.samples.iter().map(|s| s.error).filter(|e| e.is_finite()));
    let class_of =
        |s: &tancheck_core::bisect::Sample| format!("{}, branch {}", s.class.word(), s.class.branch_label());
    let mut classes: Vec<String> = Vec::new();
    for s in &l.samples {
        let w = class_of(s);
        if !classes.contains(&w) {
            classes.push(w);
        }
    }
    svg_with_legend(
        &format!("error inside increment {} by fraction of the increment", l.increment),
        |root, legend| {
            let mut chart = ChartBuilder::on(root)
                .margin(12)
                .x_label_area_size(42)
                .y_label_area_size(64)
                .build_cartesian_2d(0.0..1.0, yr.clone().log_scale())?;
            chart
                .configure_mesh()
                .x_desc("fraction of the increment")
                .y_desc(format!("error against {} (log scale)", l.judged_by.name()))
                .x_label_formatter(&num_label)
                .y_label_formatter(&exp_label)
                .label_style((FONT, 13))
                .axis_desc_style((FONT, 14))
                .draw()?;
            if let Inside::Crossing(c) = &l.inside {
                let f = c.fraction();
                // The bracket is narrow (1e-6 by default): draw at least a visible band.
                let half = (0.5 * (c.above - c.below)).max(0.004);
                chart.draw_series(std::iter::once(Rectangle::new(
                    [(f - half, yr.start), (f + half, yr.end)],
                    FAIL.mix(0.25).filled(),
                )))?;
                legend.add(Mark::Band(RGBColor(240, 190, 190)), format!("class changes at {f:.6}"));
            }
            for (k, class) in classes.iter().enumerate() {
                let colour = CURVES[k % CURVES.len()];
                let pts: Vec<(f64, f64)> = l
                    .samples
                    .iter()
                    .filter(|s| &class_of(s) == class && s.error.is_finite())
                    .map(|s| (s.fraction, s.error.max(LOG_FLOOR)))
                    .collect();
                chart.draw_series(pts.iter().map(|&p| Circle::new(p, 4, colour.filled())))?;
                legend.add(Mark::Dot(colour), class.clone());
            }
            Ok(())
        },
    )
}
