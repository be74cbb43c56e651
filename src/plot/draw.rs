//! Drawing a [`Figure`] with plotters' SVG backend.

use plotters::coord::Shift;
use plotters::prelude::*;

use super::axis::Ticks;
use super::thin::{thin_positions, MAX_POINTS_PER_SERIES};
use super::{
    Figure, LegendPosition, Panel, PlotError, PlotNumber, Rgb, Scale, Series, SeriesStyle,
};

pub(crate) const FONT: &str = "serif";
pub(crate) const INK: RGBColor = RGBColor(0x22, 0x22, 0x22);
const GRID: RGBColor = RGBColor(0xE2, 0xE2, 0xE2);
const FAINT_GRID: RGBColor = RGBColor(0xF1, 0xF1, 0xF1);
const RULE: RGBColor = RGBColor(0x66, 0x66, 0x66);
const SHADE: RGBColor = RGBColor(0xD9, 0xD4, 0xC7);

/// Width of the y labels' area: room for labels like `10⁻⁵⁰²¹⁶⁴³` and the rotated axis name.
pub(crate) const Y_LABEL_AREA: u32 = 88;
pub(crate) const X_LABEL_AREA: u32 = 48;
pub(crate) const TITLE_HEIGHT: u32 = 30;
const CAPTION_HEIGHT: u32 = 26;
const GAP: u32 = 12;

pub(crate) fn to_color(rgb: Rgb) -> RGBColor {
    RGBColor(rgb.0, rgb.1, rgb.2)
}

pub(crate) fn plot_error<E: std::fmt::Debug>(error: E) -> PlotError {
    PlotError(format!("{error:?}"))
}

/// The axis span of a set of values (positions already mapped), or None when there is none.
pub(crate) fn extent(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    values
        .filter(|v| v.is_finite())
        .fold(None, |acc, v| match acc {
            None => Some((v, v)),
            Some((lo, hi)) => Some((lo.min(v), hi.max(v))),
        })
}

/// The ticks of an axis: a fixed range when one is given, else the data's extent widened.
pub(crate) fn axis_ticks(
    fixed: Option<(PlotNumber, PlotNumber)>,
    data: Option<(f64, f64)>,
    scale: Scale,
) -> Result<Ticks, PlotError> {
    if let Some((low, high)) = fixed {
        let (Some(low), Some(high)) = (low.position(scale), high.position(scale)) else {
            return Err(PlotError(
                "an axis range cannot be placed on its scale".into(),
            ));
        };
        if low >= high {
            return Err(PlotError("an axis range must have low < high".into()));
        }
        return Ok(Ticks::fixed(low, high, scale));
    }
    let (low, high) = data.unwrap_or(match scale {
        Scale::Log => (0.0, 1.0),
        Scale::Linear => (0.0, 1.0),
    });
    Ok(Ticks::covering(low, high, scale))
}

/// The runs of placeable points of a series (a point that cannot be placed ends a run), each
/// thinned so the whole series keeps at most `MAX_POINTS_PER_SERIES` points.
fn placed_runs(series: &Series, x_scale: Scale, y_scale: Scale) -> Vec<Vec<(f64, f64)>> {
    let mut runs: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
    for (x, y) in &series.points {
        match (x.position(x_scale), y.position(y_scale)) {
            (Some(x), Some(y)) => runs.last_mut().unwrap().push((x, y)),
            _ => {
                if !runs.last().unwrap().is_empty() {
                    runs.push(Vec::new());
                }
            }
        }
    }
    runs.retain(|run| !run.is_empty());
    let total: usize = runs.iter().map(Vec::len).sum();
    if total <= MAX_POINTS_PER_SERIES {
        return runs;
    }
    runs.iter()
        .map(|run| {
            let share = (MAX_POINTS_PER_SERIES * run.len() / total).max(2);
            thin_positions(run, share)
        })
        .collect()
}

pub(crate) fn figure_svg(figure: &Figure) -> Result<String, PlotError> {
    if figure.panels.is_empty() {
        return Err(PlotError("a figure needs at least one panel".into()));
    }
    let x_scale = figure.x_scale;
    let mut runs = Vec::new();
    for panel in &figure.panels {
        runs.push(
            panel
                .series
                .iter()
                .map(|s| placed_runs(s, x_scale, panel.y_scale))
                .collect::<Vec<_>>(),
        );
    }
    let x_data = extent(
        runs.iter()
            .flatten()
            .flatten()
            .flatten()
            .map(|p| p.0)
            .chain(figure.panels.iter().flat_map(|panel| {
                panel
                    .vertical
                    .iter()
                    .filter_map(|r| r.at.position(x_scale))
                    .chain(panel.shades.iter().flat_map(|s| {
                        [s.from.position(x_scale), s.to.position(x_scale)]
                            .into_iter()
                            .flatten()
                    }))
            })),
    );
    let x_ticks = axis_ticks(figure.x_range, x_data, x_scale)?;

    let heights: Vec<u32> = figure
        .panels
        .iter()
        .enumerate()
        .map(|(i, panel)| {
            let caption = if panel.title.is_empty() {
                GAP
            } else {
                CAPTION_HEIGHT
            };
            let axis = if i + 1 == figure.panels.len() {
                X_LABEL_AREA
            } else {
                GAP
            };
            caption + panel.height + axis
        })
        .collect();
    let title = if figure.title.is_empty() {
        0
    } else {
        TITLE_HEIGHT
    };
    let height = title + heights.iter().sum::<u32>();

    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (figure.width, height)).into_drawing_area();
        root.fill(&WHITE).map_err(plot_error)?;
        let body = if figure.title.is_empty() {
            root.clone()
        } else {
            root.titled(&figure.title, (FONT, 24).into_font().color(&INK))
                .map_err(plot_error)?
        };
        let mut rest = body;
        for (i, panel) in figure.panels.iter().enumerate() {
            let (area, below) = rest.split_vertically(heights[i]);
            let last = i + 1 == figure.panels.len();
            draw_panel(&area, figure, panel, &runs[i], &x_ticks, last)?;
            rest = below;
        }
        root.present().map_err(plot_error)?;
    }
    Ok(svg)
}

fn draw_panel(
    area: &DrawingArea<SVGBackend, Shift>,
    figure: &Figure,
    panel: &Panel,
    runs: &[Vec<Vec<(f64, f64)>>],
    x_ticks: &Ticks,
    last: bool,
) -> Result<(), PlotError> {
    let y_data = extent(
        runs.iter().flatten().flatten().map(|p| p.1).chain(
            panel
                .horizontal
                .iter()
                .filter_map(|r| r.at.position(panel.y_scale)),
        ),
    );
    let y_ticks = axis_ticks(panel.y_range, y_data, panel.y_scale)?;

    let mut builder = ChartBuilder::on(area);
    builder
        .margin_right(24)
        .margin_left(10)
        .margin_top(if panel.title.is_empty() { GAP } else { 4 })
        .set_label_area_size(LabelAreaPosition::Left, Y_LABEL_AREA)
        .set_label_area_size(
            LabelAreaPosition::Bottom,
            if last { X_LABEL_AREA } else { GAP },
        );
    if !panel.title.is_empty() {
        builder.caption(&panel.title, (FONT, 19).into_font().color(&INK));
    }
    let mut chart = builder
        .build_cartesian_2d(x_ticks.clone(), y_ticks.clone())
        .map_err(plot_error)?;

    let x_label = |v: &f64| {
        if last {
            x_ticks.label(*v)
        } else {
            String::new()
        }
    };
    let y_label = |v: &f64| y_ticks.label(*v);
    let mut mesh = chart.configure_mesh();
    mesh.bold_line_style(GRID)
        .light_line_style(FAINT_GRID)
        .axis_style(INK)
        .label_style((FONT, 16).into_font().color(&INK))
        .axis_desc_style((FONT, 17).into_font().color(&INK))
        .x_label_formatter(&x_label)
        .y_label_formatter(&y_label)
        .y_desc(panel.y_label.as_str());
    if last {
        mesh.x_desc(figure.x_label.as_str());
    }
    mesh.draw().map_err(plot_error)?;

    let (y_low, y_high) = (y_ticks.low, y_ticks.high);
    let label_font = (FONT, 15).into_font().color(&RULE);
    for shade in &panel.shades {
        let (Some(from), Some(to)) = (
            shade.from.position(figure.x_scale),
            shade.to.position(figure.x_scale),
        ) else {
            continue;
        };
        let (from, to) = (from.max(x_ticks.low), to.min(x_ticks.high));
        if from >= to {
            continue;
        }
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(from, y_low), (to, y_high)],
                SHADE.mix(0.45).filled(),
            )))
            .map_err(plot_error)?;
        if !shade.label.is_empty() {
            chart
                .draw_series(std::iter::once(
                    EmptyElement::at((from, y_high))
                        + Text::new(shade.label.clone(), (4, 4), label_font.clone()),
                ))
                .map_err(plot_error)?;
        }
    }
    let rule_style = ShapeStyle::from(&RULE).stroke_width(1);
    for rule in &panel.vertical {
        let Some(x) = rule.at.position(figure.x_scale) else {
            continue;
        };
        if x < x_ticks.low || x > x_ticks.high {
            continue;
        }
        chart
            .draw_series(DashedLineSeries::new(
                vec![(x, y_low), (x, y_high)],
                4,
                4,
                rule_style,
            ))
            .map_err(plot_error)?;
        if !rule.label.is_empty() {
            // Near the right edge the label goes to the left of its line (about 7 px a
            // character at this size).
            let near_right = (x - x_ticks.low) > 0.85 * (x_ticks.high - x_ticks.low);
            let dx = if near_right {
                -(rule.label.chars().count() as i32 * 7 + 4)
            } else {
                4
            };
            chart
                .draw_series(std::iter::once(
                    EmptyElement::at((x, y_high))
                        + Text::new(rule.label.clone(), (dx, 16), label_font.clone()),
                ))
                .map_err(plot_error)?;
        }
    }
    for rule in &panel.horizontal {
        let Some(y) = rule.at.position(panel.y_scale) else {
            continue;
        };
        if y < y_low || y > y_high {
            continue;
        }
        chart
            .draw_series(DashedLineSeries::new(
                vec![(x_ticks.low, y), (x_ticks.high, y)],
                6,
                3,
                rule_style,
            ))
            .map_err(plot_error)?;
        if !rule.label.is_empty() {
            chart
                .draw_series(std::iter::once(
                    EmptyElement::at((x_ticks.low, y))
                        + Text::new(rule.label.clone(), (6, 4), label_font.clone()),
                ))
                .map_err(plot_error)?;
        }
    }

    for (index, series) in panel.series.iter().enumerate() {
        let color = to_color(panel.series_color(index));
        let style = ShapeStyle::from(&color).stroke_width(2);
        let mut labelled = false;
        for run in &runs[index] {
            let run: Vec<(f64, f64)> = run
                .iter()
                .copied()
                .filter(|(x, y)| {
                    *x >= x_ticks.low - 1e-9
                        && *x <= x_ticks.high + 1e-9
                        && *y >= y_low - 1e-9
                        && *y <= y_high + 1e-9
                })
                .collect();
            if run.is_empty() {
                continue;
            }
            let annotation = match series.style {
                SeriesStyle::Line => chart
                    .draw_series(LineSeries::new(run, style))
                    .map_err(plot_error)?,
                SeriesStyle::Dashed => chart
                    .draw_series(DashedLineSeries::new(run, 7, 5, style))
                    .map_err(plot_error)?,
                SeriesStyle::Markers => chart
                    .draw_series(
                        run.into_iter()
                            .map(|p| Circle::new(p, 4, color.stroke_width(1))),
                    )
                    .map_err(plot_error)?,
            };
            if !labelled && !series.label.is_empty() {
                labelled = true;
                let annotation = annotation.label(series.label.clone());
                // The legend's sample: a short line, a dashed line, or a marker.
                let line = ShapeStyle::from(&color).stroke_width(2);
                match series.style {
                    SeriesStyle::Line => annotation
                        .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 22, y)], line)),
                    SeriesStyle::Dashed => annotation.legend(move |(x, y)| {
                        EmptyElement::at((x, y))
                            + PathElement::new(vec![(0, 0), (7, 0)], line)
                            + PathElement::new(vec![(12, 0), (19, 0)], line)
                    }),
                    SeriesStyle::Markers => annotation.legend(move |(x, y)| {
                        EmptyElement::at((x + 11, y))
                            + Circle::new((0, 0), 3, color.stroke_width(1))
                    }),
                };
            }
        }
    }

    let position = match panel.legend {
        LegendPosition::UpperRight => Some(SeriesLabelPosition::UpperRight),
        LegendPosition::UpperLeft => Some(SeriesLabelPosition::UpperLeft),
        LegendPosition::LowerLeft => Some(SeriesLabelPosition::LowerLeft),
        LegendPosition::LowerRight => Some(SeriesLabelPosition::LowerRight),
        LegendPosition::Hidden => None,
    };
    let any_label = panel.series.iter().any(|s| !s.label.is_empty());
    if let (Some(position), true) = (position, any_label) {
        chart
            .configure_series_labels()
            .position(position)
            .margin(10)
            .legend_area_size(28)
            .background_style(WHITE.mix(0.9))
            .border_style(GRID)
            .label_font((FONT, 16).into_font().color(&INK))
            .draw()
            .map_err(plot_error)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::*;

    fn power_law(n: usize, exponent: f64, scale: f64) -> Vec<(PlotNumber, PlotNumber)> {
        (1..=n)
            .map(|k| {
                let k = k as f64;
                (
                    PlotNumber::from_f64(k),
                    PlotNumber::from_log10(1, scale + exponent * k.log10()),
                )
            })
            .collect()
    }

    #[test]
    fn one_polyline_per_line_series_and_a_circle_per_marker() {
        let figure = Figure::new("k", Scale::Log).panel(
            Panel::new("a(k)", Scale::Log)
                .series(Series::line("direct", power_law(500, -2.5, 0.0)))
                .series(Series::markers("closed form", power_law(5, -2.5, 0.0))),
        );
        let svg = figure.to_svg().unwrap();
        let line = PALETTE[0].hex();
        let marker = PALETTE[1].hex();
        let polylines = svg
            .lines()
            .filter(|l| l.starts_with("<polyline") && l.contains(&line))
            .count();
        assert!(polylines >= 1, "{svg}");
        let circles = svg
            .lines()
            .filter(|l| l.starts_with("<circle") && l.contains(&marker))
            .count();
        // Five data markers and one in the legend.
        assert_eq!(circles, 6);
        assert!(svg.contains("10⁻"), "decade labels");
    }

    #[test]
    fn values_far_below_f64_plot() {
        let figure = Figure::new("k", Scale::Log).panel(
            Panel::new("a(k)", Scale::Log)
                .series(Series::line("tiny", power_law(100, -3.0, -4000.0))),
        );
        let svg = figure.to_svg().unwrap();
        assert!(svg.contains("<polyline"));
        assert!(svg.contains("10⁻⁴⁰⁰⁰"), "{svg}");
    }

    #[test]
    fn long_series_are_thinned() {
        let figure = Figure::new("k", Scale::Linear).panel(
            Panel::new("a(k)", Scale::Log)
                .series(Series::line("long", power_law(100_000, -1.0, 0.0))),
        );
        let svg = figure.to_svg().unwrap();
        let line = svg
            .lines()
            .find(|l| l.starts_with("<polyline") && l.contains(&PALETTE[0].hex()))
            .unwrap();
        let points = line.split("points=\"").nth(1).unwrap().split(' ').count();
        assert!(points <= MAX_POINTS_PER_SERIES + 1, "{points}");
        assert!(svg.len() < 200_000);
    }

    #[test]
    fn panels_share_the_x_axis_with_shades_and_rules() {
        let figure = Figure::new("ρ", Scale::Linear)
            .title("Across ρ")
            .panel(
                Panel::new("rate", Scale::Linear)
                    .series(Series::line(
                        "r",
                        (0..50)
                            .map(|i| {
                                let x = i as f64 / 50.0;
                                (
                                    PlotNumber::from_f64(x),
                                    PlotNumber::from_f64(10.0 * (1.0 - x * x)),
                                )
                            })
                            .collect(),
                    ))
                    .shade(
                        PlotNumber::from_f64(0.2),
                        PlotNumber::from_f64(0.4),
                        "mean infinite",
                    )
                    .vertical(PlotNumber::from_f64(0.5), "c = 5"),
            )
            .panel(
                Panel::new("|error|", Scale::Log)
                    .series(Series::dashed(
                        "tail law",
                        (1..50)
                            .map(|i| {
                                let x = i as f64 / 50.0;
                                (PlotNumber::from_f64(x), PlotNumber::from_f64(x.powi(3)))
                            })
                            .collect(),
                    ))
                    .horizontal(PlotNumber::from_f64(1e-3), "tolerance"),
            );
        let svg = figure.to_svg().unwrap();
        for text in [
            "Across ρ",
            "mean infinite",
            "c = 5",
            "tolerance",
            "tail law",
        ] {
            assert!(svg.contains(text), "{text}");
        }
        // The x tick labels appear once (under the last panel only).
        assert_eq!(svg.matches("\n0.2\n").count(), 1, "{svg}");
    }

    #[test]
    fn an_empty_figure_is_an_error_not_a_panic() {
        assert!(Figure::new("k", Scale::Log).to_svg().is_err());
        let empty = Figure::new("k", Scale::Log).panel(Panel::new("a", Scale::Log));
        assert!(empty.to_svg().is_ok());
    }
}
