//! The plots of the HTML report, drawn with plotters' SVG backend: each function takes report
//! data and returns one `<svg>` element as text (with a `<title>` naming the plot), or `None`
//! when the data has nothing to draw.

use plotters::coord::Shift;
use plotters::prelude::*;

use tancheck_core::diagnose::study::StepStudy;
use tancheck_core::probe::ProbeSeries;
use tancheck_core::report::IncrementRecord;
use tancheck_core::{Report, Scheme};

mod bisect;
mod heatmap;

pub use bisect::bisect_fractions;

pub use heatmap::entry_heatmap;

pub(super) type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;
pub(super) type Drawn = Result<(), DrawingAreaErrorKind<std::io::Error>>;

/// Plot size in SVG units (the page scales it to its column).
const W: u32 = 760;
const H: u32 = 380;
/// Curves with more points than this are drawn as lines only (no marker per point), so a
/// long path keeps the page small.
const MARKERS_UP_TO: usize = 400;
/// Errors below this are drawn at it on a log axis (an exact agreement is 0).
const LOG_FLOOR: f64 = 1e-17;

pub(super) const FONT: &str = "sans-serif";

/// A colour per scheme, the same in every plot: its place in the one palette, [`CURVES`].
pub fn scheme_colour(s: Scheme) -> RGBColor {
    CURVES[match s {
        Scheme::Central => 0,
        Scheme::ComplexStep => 1,
        Scheme::Forward => 2,
        Scheme::Backward => 3,
        Scheme::Central4 => 4,
        Scheme::Richardson => 5,
    }]
}

/// The line colours: the schemes' (by [`scheme_colour`]) and, in turn, those of curves that are
/// not schemes (components, probe series).
const CURVES: [RGBColor; 6] = [
    RGBColor(31, 95, 170),
    RGBColor(213, 94, 0),
    RGBColor(0, 140, 100),
    RGBColor(150, 60, 150),
    RGBColor(130, 120, 0),
    RGBColor(90, 90, 90),
];

/// Branch bands cycle through this many tints.
const BANDS: usize = 5;

/// The background tint of branch band `k`: the curve colour of the same place, seven eighths
/// of the way to white.
fn band_tint(k: usize) -> RGBColor {
    let RGBColor(r, g, b) = CURVES[k % BANDS];
    let light = |c: u8| 255 - (255 - c) / 8;
    RGBColor(light(r), light(g), light(b))
}

const FAIL: RGBColor = RGBColor(190, 20, 30);

/// Width of the legend panel to the right of a plot.
const LEGEND_W: u32 = 230;

/// How a legend entry is drawn.
#[derive(Clone, Copy)]
enum Mark {
    Line(RGBColor),
    Dashed(RGBColor),
    Dot(RGBColor),
    Band(RGBColor),
    Cross(RGBColor),
}

/// The legend of a plot, drawn in its own panel beside the plot so it never hides data.
#[derive(Default)]
struct Legend(Vec<(Mark, String)>);

impl Legend {
    fn add(&mut self, mark: Mark, text: impl Into<String>) {
        self.0.push((mark, text.into()));
    }

    fn draw(&self, area: &Area<'_>) -> Drawn {
        let style = TextStyle::from((FONT, 13).into_font()).color(&BLACK);
        let mut y = 24;
        for (mark, text) in &self.0 {
            let (x0, x1) = (8, 34);
            match *mark {
                Mark::Line(c) => area.draw(&PathElement::new(vec![(x0, y), (x1, y)], c.stroke_width(3)))?,
                Mark::Dashed(c) => {
                    for seg in [(x0, x0 + 7), (x0 + 11, x0 + 18), (x0 + 22, x1)] {
                        area.draw(&PathElement::new(vec![(seg.0, y), (seg.1, y)], c.stroke_width(2)))?;
                    }
                }
                Mark::Dot(c) => area.draw(&Circle::new(((x0 + x1) / 2, y), 4, c.filled()))?,
                Mark::Band(c) => {
                    area.draw(&Rectangle::new([(x0, y - 7), (x1, y + 7)], c.filled()))?;
                    area.draw(&Rectangle::new([(x0, y - 7), (x1, y + 7)], RGBColor(190, 190, 190)))?;
                }
                Mark::Cross(c) => area.draw(&Cross::new(((x0 + x1) / 2, y), 5, c.stroke_width(2)))?,
            }
            for line in wrap(text, 26) {
                area.draw(&Text::new(line, (x1 + 8, y - 8), style.clone()))?;
                y += 16;
            }
            y += 8;
        }
        Ok(())
    }
}

/// Break a legend text into lines of at most about `width` characters, at spaces.
fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut line = String::new();
    for word in text.split(' ') {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// Draw a plot with a legend panel on its right into an SVG string of the default size.
fn svg_with_legend(title: &str, draw: impl FnOnce(&Area<'_>, &mut Legend) -> Drawn) -> Option<String> {
    svg(title, |root| {
        let (plot, side) = root.split_horizontally(W - LEGEND_W);
        let mut legend = Legend::default();
        draw(&plot, &mut legend)?;
        legend.draw(&side)
    })
}

/// Draw into an SVG string of the default size and give it a title.
fn svg(title: &str, draw: impl FnOnce(&Area<'_>) -> Drawn) -> Option<String> {
    svg_sized(title, (W, H), draw)
}

pub(super) fn svg_sized(
    title: &str,
    size: (u32, u32),
    draw: impl FnOnce(&Area<'_>) -> Drawn,
) -> Option<String> {
    let mut buf = String::new();
    {
        let root = SVGBackend::with_string(&mut buf, size).into_drawing_area();
        root.fill(&WHITE).ok()?;
        draw(&root).ok()?;
        root.present().ok()?;
    }
    Some(titled(&buf, title))
}

/// Put a `<title>` (and an accessible name) into the `<svg>` element plotters wrote.
fn titled(svg: &str, title: &str) -> String {
    let t = super::esc(title);
    match svg.find('>') {
        Some(i) if svg.starts_with("<svg") => {
            format!("{} role=\"img\" aria-label=\"{t}\"><title>{t}</title>{}", &svg[..i], &svg[i + 1..])
        }
        _ => svg.to_string(),
    }
}

fn log_range(values: impl Iterator<Item = f64>) -> std::ops::Range<f64> {
    let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
    for v in values.filter(|v| v.is_finite()) {
        let v = v.max(LOG_FLOOR);
        lo = lo.min(v);
        hi = hi.max(v);
    }
    if !lo.is_finite() || hi <= 0.0 {
        return 1e-16..1.0;
    }
    // Whole decades around the data, at least three (fewer crowd the axis with labels
    // inside one decade).
    let (mut a, mut b) = (lo.log10().floor(), hi.log10().ceil());
    if b - a < 3.0 {
        let grow = 3.0 - (b - a);
        a -= (grow / 2.0).ceil();
        b += (grow / 2.0).floor();
    }
    let lo = 10f64.powf(a - 0.2).max(LOG_FLOOR / 10.0);
    let hi = 10f64.powf(b + 0.4);
    lo..hi
}

fn lin_range(values: impl Iterator<Item = f64>) -> std::ops::Range<f64> {
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    if !lo.is_finite() {
        return 0.0..1.0;
    }
    let pad = if hi > lo { 0.06 * (hi - lo) } else { lo.abs().max(1.0) * 0.1 };
    (lo - pad)..(hi + pad)
}

fn exp_label(v: &f64) -> String {
    if *v == 0.0 {
        "0".into()
    } else {
        format!("{v:.0e}")
    }
}

fn num_label(v: &f64) -> String {
    let a = v.abs();
    if a == 0.0 {
        "0".into()
    } else if !(1e-3..1e5).contains(&a) {
        format!("{v:.1e}")
    } else if a >= 100.0 {
        format!("{v:.0}")
    } else {
        // Four significant digits (0.0015, not 0.002 beside a tick at 0.002), trailing zeros cut.
        let decimals = (3 - a.log10().floor() as i32).max(0) as usize;
        format!("{v:.decimals$}").trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

/// [`num_label`] on a linear axis over `range`: a tick within a billionth of the axis span
/// of zero is the zero the tick arithmetic missed (3.5e-18 on an axis from −2e-3 to 2e-3).
fn num_label_on(range: &std::ops::Range<f64>) -> impl Fn(&f64) -> String {
    let tiny = 1e-9 * (range.end - range.start).abs();
    move |v: &f64| if v.abs() <= tiny { "0".into() } else { num_label(v) }
}

/// The tangent error of every scheme along the path (log scale), with a band per run of
/// increments in one branch, each scheme's tolerance dashed, failing checks crossed.
pub fn error_along_path(report: &Report) -> Option<String> {
    // The compact records: one per increment, passing ones included.
    let recs = &report.records;
    if recs.is_empty() {
        return None;
    }
    let order = &report.settings.schemes;
    let error_of = |r: &tancheck_core::report::IncrementRecord, k: usize| r.worst_errors().nth(k).flatten();
    let schemes: Vec<Scheme> = order
        .iter()
        .enumerate()
        .filter(|&(k, _)| recs.iter().any(|r| error_of(r, k).is_some()))
        .map(|(_, &s)| s)
        .collect();
    if schemes.is_empty() {
        return None;
    }
    let errors = || recs.iter().flat_map(|r| r.worst_errors().flatten());
    let tols: Vec<(Scheme, f64)> = schemes.iter().map(|&s| (s, report.settings.scheme(s).tol)).collect();
    let yr = log_range(errors().chain(tols.iter().map(|t| t.1)));
    let x0 = recs.first().map_or(0, |r| r.index) as f64 - 0.5;
    let x1 = recs.last().map_or(1, |r| r.index) as f64 + 0.5;
    // Runs of increments in one branch.
    // An increment whose base call faulted reached no branch (its record keeps the unused
    // outputs' branch); the path stops there, so these are one or none.
    let faulted: Vec<usize> =
        report.increments.iter().filter(|i| i.fault.is_some()).map(|i| i.index).collect();
    let mut runs: Vec<(String, f64, f64)> = Vec::new();
    for r in recs {
        let label = if faulted.contains(&(r.index as usize)) {
            tancheck_core::report::NO_BRANCH_FAULTED.to_string()
        } else {
            r.branch_label()
        };
        let x = r.index as f64;
        match runs.last_mut() {
            Some(run) if run.0 == label => run.2 = x + 0.5,
            _ => runs.push((label, x - 0.5, x + 0.5)),
        }
    }
    let mut labels: Vec<String> = Vec::new();
    for r in &runs {
        if !labels.contains(&r.0) {
            labels.push(r.0.clone());
        }
    }
    // A check failed where its error is above the tolerance and the diagnosis did not clear
    // the increment (a kink, a poor default step).
    let any_failed = recs.iter().any(|r| !r.pass);
    svg_with_legend("error of the returned tangent along the path, per scheme", |root, legend| {
        let mut chart = ChartBuilder::on(root)
            .margin(12)
            .x_label_area_size(42)
            .y_label_area_size(64)
            .build_cartesian_2d(x0..x1, yr.clone().log_scale())?;
        chart
            .configure_mesh()
            .disable_x_mesh()
            .x_desc("increment")
            .y_desc("relative error (log scale)")
            .x_labels(((x1 - x0) as usize + 1).min(16))
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_label_formatter(&exp_label)
            .label_style((FONT, 13))
            .axis_desc_style((FONT, 14))
            .draw()?;
        for (k, label) in labels.iter().enumerate() {
            let tint = band_tint(k);
            let rects: Vec<_> = runs
                .iter()
                .filter(|r| &r.0 == label)
                .map(|r| Rectangle::new([(r.1, yr.start), (r.2, yr.end)], tint.filled()))
                .collect();
            chart.draw_series(rects)?;
            legend.add(Mark::Band(tint), format!("branch {label}"));
        }
        for &s in &schemes {
            let colour = scheme_colour(s);
            let tol = report.settings.scheme(s).tol;
            let k = order.iter().position(|&o| o == s).unwrap_or(usize::MAX);
            let pts: Vec<(f64, f64, bool)> = recs
                .iter()
                .filter_map(|r| {
                    error_of(r, k).map(|e| (r.index as f64, e.max(LOG_FLOOR), r.pass || e <= tol))
                })
                .collect();
            chart.draw_series(DashedLineSeries::new(
                vec![(x0, tol), (x1, tol)],
                6,
                4,
                colour.mix(0.8).stroke_width(1),
            ))?;
            chart.draw_series(LineSeries::new(pts.iter().map(|p| (p.0, p.1)), colour.stroke_width(2)))?;
            if pts.len() <= MARKERS_UP_TO {
                chart.draw_series(pts.iter().map(|p| Circle::new((p.0, p.1), 3, colour.filled())))?;
            }
            chart.draw_series(
                pts.iter().filter(|p| !p.2).map(|p| Cross::new((p.0, p.1), 6, FAIL.stroke_width(2))),
            )?;
            legend.add(Mark::Line(colour), s.name());
            legend.add(Mark::Dashed(colour), format!("{} tolerance {tol:.0e}", s.name()));
        }
        if any_failed {
            legend.add(Mark::Cross(FAIL), "failed check");
        }
        Ok(())
    })
}

/// The step-size curve of a failing increment: the discrepancy between the returned tangent
/// and each scheme at shrinking relative steps (log–log), with the slope each scheme's order
/// gives drawn dashed from its largest step, and the tolerance.
pub fn step_studies(studies: &[StepStudy], tol: Option<f64>, increment: usize) -> Option<String> {
    // Points that are not finite (a study of outputs that are not numbers) are not drawn.
    let pts = || {
        studies.iter().flat_map(|s| s.points.iter()).filter(|p| p.error.is_finite() && p.rel_step.is_finite())
    };
    pts().next()?;
    let xr = log_range(pts().map(|p| p.rel_step));
    let yr = log_range(pts().map(|p| p.error).chain(tol));
    svg_with_legend(&format!("step-size study of increment {increment}"), |root, legend| {
        let mut chart = ChartBuilder::on(root)
            .margin(12)
            .x_label_area_size(42)
            .y_label_area_size(64)
            .build_cartesian_2d(xr.clone().log_scale(), yr.clone().log_scale())?;
        chart
            .configure_mesh()
            .x_desc("relative step h (log scale)")
            .y_desc("discrepancy (log scale)")
            .x_label_formatter(&exp_label)
            .y_label_formatter(&exp_label)
            .label_style((FONT, 13))
            .axis_desc_style((FONT, 14))
            .draw()?;
        if let Some(t) = tol {
            chart.draw_series(DashedLineSeries::new(
                vec![(xr.start, t), (xr.end, t)],
                3,
                4,
                FAIL.mix(0.8).stroke_width(1),
            ))?;
        }
        for st in studies {
            let colour = scheme_colour(st.scheme);
            let line: Vec<(f64, f64)> = st
                .points
                .iter()
                .filter(|p| p.error.is_finite() && p.rel_step.is_finite())
                .map(|p| (p.rel_step, p.error.max(LOG_FLOOR)))
                .collect();
            chart.draw_series(LineSeries::new(line.clone(), colour.stroke_width(2)))?;
            chart.draw_series(line.iter().map(|&p| Circle::new(p, 3, colour.filled())))?;
            legend.add(Mark::Line(colour), format!("{} (observed)", st.scheme.name()));
            // The theoretical slope hᵖ through the largest step, down to the axis.
            if let Some(first) = line.iter().cloned().max_by(|a, b| a.0.total_cmp(&b.0)) {
                let p = st.scheme.order();
                let slope: Vec<(f64, f64)> = (0..=40)
                    .map(|k| {
                        let h = first.0 * (xr.start / first.0).powf(k as f64 / 40.0);
                        (h, first.1 * (h / first.0).powf(p))
                    })
                    .filter(|q| q.1 >= yr.start)
                    .collect();
                chart.draw_series(DashedLineSeries::new(slope, 7, 5, colour.mix(0.75).stroke_width(2)))?;
                legend.add(Mark::Dashed(colour), format!("slope {p} of {} (theory)", st.scheme.name()));
            }
        }
        if let Some(t) = tol {
            legend.add(Mark::Dashed(FAIL), format!("tolerance {t:.0e}"));
        }
        Ok(())
    })
}

pub(super) fn text_centre() -> plotters::style::text_anchor::Pos {
    use plotters::style::text_anchor::{HPos, Pos, VPos};
    Pos::new(HPos::Center, VPos::Center)
}

/// Component `i` of the strain (or the stress) along the path: from its start (the curves began
/// at the first increment's end, a cohesive law's first loading line off the origin; a
/// user-style sweep), then at the end of each increment of `incs`.
fn response_values(report: &Report, incs: &[&IncrementRecord], i: usize, stress: bool) -> Vec<f64> {
    let n = report.routine.order.len();
    let start = report.start_point.as_ref().filter(|(e, s)| e.len() == n && s.len() == n);
    let first = start.map(|(e, s)| if stress { s[i] } else { e[i] });
    let each =
        incs.iter().map(|r| if stress { r.stress() } else { r.strain() }.get(i).copied().unwrap_or(0.0));
    first.into_iter().chain(each).collect()
}

/// Stress against strain per component along the path (traction against separation for a
/// cohesive point), for the strain components that move.
pub fn response_curves(report: &Report) -> Option<String> {
    // The compact records carry strain and stress of every increment (a faulted one is not
    // recorded as a point of the response).
    let faulted: Vec<usize> =
        report.increments.iter().filter(|i| i.fault.is_some()).map(|i| i.index).collect();
    let incs: Vec<_> = report.records.iter().filter(|r| !faulted.contains(&(r.index as usize))).collect();
    let n = report.routine.order.len();
    if incs.len() < 2 || n == 0 {
        return None;
    }
    // Values that are not finite (a routine's inf or NaN output, where the path stopped) are
    // left out of the spans and the curves: they were drawn as points at the top of the axis
    // (a user-style sweep).
    let span = |v: &[f64]| {
        let f = || v.iter().cloned().filter(|x| x.is_finite());
        f().fold(f64::NEG_INFINITY, f64::max) - f().fold(f64::INFINITY, f64::min)
    };
    let strain = |i: usize| response_values(report, &incs, i, false);
    let stress = |i: usize| response_values(report, &incs, i, true);
    let emax = (0..n).map(|i| span(&strain(i))).fold(0.0, f64::max);
    let moving: Vec<usize> = (0..n).filter(|&i| span(&strain(i)) > 1e-3 * emax).collect();
    if moving.is_empty() || emax <= 0.0 || !emax.is_finite() {
        return None;
    }
    let cohesive = report.routine.kind.starts_with("cohesive");
    let (xd, yd, what) = if cohesive {
        ("separation", "traction", "traction against separation along the path")
    } else {
        ("strain (routine's components)", "stress", "stress against strain along the path")
    };
    let xr = lin_range(moving.iter().flat_map(|&i| strain(i)));
    let yr = lin_range(moving.iter().flat_map(|&i| stress(i)));
    svg_with_legend(what, |root, legend| {
        let mut chart = ChartBuilder::on(root)
            .margin(12)
            .x_label_area_size(42)
            .y_label_area_size(72)
            .build_cartesian_2d(xr.clone(), yr.clone())?;
        chart
            .configure_mesh()
            .x_desc(xd)
            .y_desc(yd)
            .x_label_formatter(&num_label_on(&xr))
            .y_label_formatter(&num_label_on(&yr))
            .label_style((FONT, 13))
            .axis_desc_style((FONT, 14))
            .draw()?;
        for (k, &i) in moving.iter().enumerate() {
            let colour = CURVES[k % CURVES.len()];
            let pts: Vec<(f64, f64)> = strain(i)
                .into_iter()
                .zip(stress(i))
                .filter(|(x, y)| x.is_finite() && y.is_finite())
                .collect();
            let label = &report.routine.order[i];
            chart.draw_series(LineSeries::new(pts.clone(), colour.stroke_width(2)))?;
            if pts.len() <= MARKERS_UP_TO {
                chart.draw_series(pts.iter().map(|&p| Circle::new(p, 3, colour.filled())))?;
            }
            legend.add(
                Mark::Line(colour),
                if cohesive { format!("component {label}") } else { format!("σ{label} against ε{label}") },
            );
        }
        Ok(())
    })
}

/// The curves a probe measured, on a log y axis when they ask for one.
pub fn probe_series(title: &str, series: &[ProbeSeries]) -> Option<String> {
    let pts = || series.iter().flat_map(|s| s.points.iter());
    pts().next()?;
    // On a log axis, points at zero (a residual at the rounding floor) are left out.
    let log = series.iter().all(|s| s.log_y) && pts().any(|p| p[1] > 0.0);
    let xr = lin_range(pts().map(|p| p[0]));
    let (xd, yd) = (series[0].x.clone(), series[0].y.clone());
    svg_with_legend(title, |root, legend| {
        let mut builder = ChartBuilder::on(root);
        builder.margin(12).x_label_area_size(42).y_label_area_size(72);
        macro_rules! body {
            ($chart:ident, $ylab:expr, $ydesc:expr) => {{
                $chart
                    .configure_mesh()
                    .x_desc(xd.as_str())
                    .y_desc($ydesc)
                    .x_label_formatter(&num_label_on(&xr))
                    .y_label_formatter($ylab)
                    .label_style((FONT, 13))
                    .axis_desc_style((FONT, 14))
                    .draw()?;
                for (k, s) in series.iter().enumerate() {
                    let colour = CURVES[k % CURVES.len()];
                    let p: Vec<(f64, f64)> = s
                        .points
                        .iter()
                        .filter(|p| p[0].is_finite() && p[1].is_finite() && (!log || p[1] > 0.0))
                        .map(|p| (p[0], p[1]))
                        .collect();
                    // Past the colours, the same colours dashed: a legend of twelve Newton
                    // runs showed two of each colour drawn alike (a user-style sweep).
                    if k < CURVES.len() {
                        $chart.draw_series(LineSeries::new(p.clone(), colour.stroke_width(2)))?;
                        legend.add(Mark::Line(colour), s.name.clone());
                    } else {
                        $chart.draw_series(DashedLineSeries::new(p.clone(), 7, 5, colour.stroke_width(2)))?;
                        legend.add(Mark::Dashed(colour), s.name.clone());
                    }
                    $chart.draw_series(p.iter().map(|&q| Circle::new(q, 3, colour.filled())))?;
                }
            }};
        }
        if log {
            let yr = log_range(pts().map(|p| p[1]).filter(|y| *y > 0.0));
            let mut chart = builder.build_cartesian_2d(xr.clone(), yr.log_scale())?;
            let desc = format!("{yd} (log scale)");
            body!(chart, &exp_label, desc.as_str());
        } else {
            let yr = lin_range(pts().map(|p| p[1]).chain(std::iter::once(0.0)));
            let ylab = num_label_on(&yr);
            let mut chart = builder.build_cartesian_2d(xr.clone(), yr)?;
            body!(chart, &ylab, yd.as_str());
        }
        Ok(())
    })
}

#[cfg(test)]
mod tests;
