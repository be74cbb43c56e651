//! A heat map: values on a grid of (x, y) cell centres, coloured on a sequential scale, with a
//! colour bar. Cells reach halfway to their neighbours (in axis units).

use plotters::prelude::*;

use super::axis::{tick_label, Ticks};
use super::draw::{
    axis_ticks, extent, plot_error, FONT, INK, TITLE_HEIGHT, X_LABEL_AREA, Y_LABEL_AREA,
};
use super::{PlotError, PlotNumber, Scale};

/// Values `values[row][column]` at x = `xs[column]`, y = `ys[row]`. `None` marks a cell
/// without a value (drawn light grey); the colour scale runs over the values present.
#[derive(Clone, Debug)]
pub struct HeatMap {
    pub title: String,
    pub x_label: String,
    pub x_scale: Scale,
    pub xs: Vec<PlotNumber>,
    pub y_label: String,
    pub y_scale: Scale,
    pub ys: Vec<PlotNumber>,
    pub values: Vec<Vec<Option<f64>>>,
    /// What the colours mean (for the colour bar).
    pub value_label: String,
    pub width: u32,
    pub height: u32,
}

/// Sequential colour anchors, light to dark (our own choice: sand, amber, rust, plum, ink).
const ANCHORS: [(u8, u8, u8); 5] = [
    (0xF6, 0xF0, 0xD8),
    (0xE8, 0xB8, 0x5C),
    (0xC0, 0x5A, 0x2E),
    (0x7A, 0x2E, 0x5E),
    (0x22, 0x1E, 0x44),
];

/// The colour of `t` in [0, 1] on the sequential scale.
fn shade(t: f64) -> RGBColor {
    let t = t.clamp(0.0, 1.0) * (ANCHORS.len() - 1) as f64;
    let i = (t.floor() as usize).min(ANCHORS.len() - 2);
    let f = t - i as f64;
    let mix = |a: u8, b: u8| (f64::from(a) + (f64::from(b) - f64::from(a)) * f).round() as u8;
    let (a, b) = (ANCHORS[i], ANCHORS[i + 1]);
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// Cell edges from centres: halfway between neighbours, the outer cells symmetric.
fn edges(centres: &[f64]) -> Vec<f64> {
    match centres.len() {
        0 => Vec::new(),
        1 => vec![centres[0] - 0.5, centres[0] + 0.5],
        n => {
            let mut out = vec![centres[0] - (centres[1] - centres[0]) / 2.0];
            out.extend(centres.windows(2).map(|w| (w[0] + w[1]) / 2.0));
            out.push(centres[n - 1] + (centres[n - 1] - centres[n - 2]) / 2.0);
            out
        }
    }
}

impl HeatMap {
    pub fn to_svg(&self) -> Result<String, PlotError> {
        let place = |values: &[PlotNumber], scale| -> Result<Vec<f64>, PlotError> {
            values
                .iter()
                .map(|v| v.position(scale))
                .collect::<Option<Vec<f64>>>()
                .ok_or_else(|| PlotError("a heat-map coordinate cannot be placed".into()))
        };
        let xs = edges(&place(&self.xs, self.x_scale)?);
        let ys = edges(&place(&self.ys, self.y_scale)?);
        if xs.is_empty() || ys.is_empty() || self.values.len() != self.ys.len() {
            return Err(PlotError("a heat map needs one row of values per y".into()));
        }
        if self.values.iter().any(|row| row.len() != self.xs.len()) {
            return Err(PlotError(
                "a heat map needs one value per x in each row".into(),
            ));
        }
        let x_ticks = Ticks::fixed(xs[0], xs[xs.len() - 1], self.x_scale);
        let y_ticks = Ticks::fixed(ys[0], ys[ys.len() - 1], self.y_scale);
        let values = extent(self.values.iter().flatten().flatten().copied());
        let value_ticks = axis_ticks(None, values, Scale::Linear)?;
        let (v_low, v_high) = values.unwrap_or((0.0, 1.0));
        let to_unit = |v: f64| {
            if v_high > v_low {
                (v - v_low) / (v_high - v_low)
            } else {
                0.5
            }
        };

        let title = if self.title.is_empty() {
            0
        } else {
            TITLE_HEIGHT
        };
        let mut svg = String::new();
        {
            let root = SVGBackend::with_string(&mut svg, (self.width, self.height + title))
                .into_drawing_area();
            root.fill(&WHITE).map_err(plot_error)?;
            let body = if self.title.is_empty() {
                root.clone()
            } else {
                root.titled(&self.title, (FONT, 24).into_font().color(&INK))
                    .map_err(plot_error)?
            };
            let (map_area, bar_area) = body.split_horizontally(self.width.saturating_sub(110));

            let mut chart = ChartBuilder::on(&map_area)
                .margin(12)
                .margin_left(22)
                .set_label_area_size(LabelAreaPosition::Left, Y_LABEL_AREA)
                .set_label_area_size(LabelAreaPosition::Bottom, X_LABEL_AREA)
                .build_cartesian_2d(x_ticks.clone(), y_ticks.clone())
                .map_err(plot_error)?;
            let x_label = |v: &f64| x_ticks.label(*v);
            let y_label = |v: &f64| y_ticks.label(*v);
            chart
                .configure_mesh()
                .disable_mesh()
                .axis_style(INK)
                .label_style((FONT, 16).into_font().color(&INK))
                .axis_desc_style((FONT, 17).into_font().color(&INK))
                .x_label_formatter(&x_label)
                .y_label_formatter(&y_label)
                .x_desc(self.x_label.as_str())
                .y_desc(self.y_label.as_str())
                .draw()
                .map_err(plot_error)?;
            let cells = self.values.iter().enumerate().flat_map(|(row, line)| {
                let ys = &ys;
                let xs = &xs;
                line.iter().enumerate().map(move |(column, value)| {
                    let color = match value {
                        Some(v) if v.is_finite() => shade(to_unit(*v)),
                        _ => RGBColor(0xDD, 0xDD, 0xDD),
                    };
                    Rectangle::new(
                        [(xs[column], ys[row]), (xs[column + 1], ys[row + 1])],
                        color.filled(),
                    )
                })
            });
            chart.draw_series(cells).map_err(plot_error)?;

            // The colour bar: a column of thin bands with the value ticks beside it.
            let mut bar = ChartBuilder::on(&bar_area)
                .margin_top(12)
                .margin_bottom(12 + X_LABEL_AREA)
                .margin_right(50)
                .set_label_area_size(LabelAreaPosition::Right, 0)
                .build_cartesian_2d(0.0..1.0, value_ticks.clone())
                .map_err(plot_error)?;
            let steps = 64;
            let span = value_ticks.high - value_ticks.low;
            bar.draw_series((0..steps).map(|i| {
                let a = value_ticks.low + span * i as f64 / steps as f64;
                let b = value_ticks.low + span * (i + 1) as f64 / steps as f64;
                Rectangle::new([(0.0, a), (1.0, b)], shade(to_unit((a + b) / 2.0)).filled())
            }))
            .map_err(plot_error)?;
            let tick_font = (FONT, 15).into_font().color(&INK);
            bar.draw_series(value_ticks.major.iter().map(|v| {
                EmptyElement::at((1.0, *v))
                    + Text::new(tick_label(*v, Scale::Linear), (6, -6), tick_font.clone())
            }))
            .map_err(plot_error)?;
            bar.draw_series(std::iter::once(
                EmptyElement::at((0.0, value_ticks.high))
                    + Text::new(self.value_label.clone(), (0, -14), tick_font.clone()),
            ))
            .map_err(plot_error)?;
            root.present().map_err(plot_error)?;
        }
        Ok(svg)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_grid_of_values_draws_a_cell_each_and_a_colour_bar() {
        let xs: Vec<PlotNumber> = (1..=4)
            .map(|i| PlotNumber::from_f64(i as f64 / 5.0))
            .collect();
        let ys: Vec<PlotNumber> = (1..=3).map(|i| PlotNumber::from_f64(i as f64)).collect();
        let values: Vec<Vec<Option<f64>>> = (0..3)
            .map(|r| {
                (0..4)
                    .map(|c| if r == c { None } else { Some((r * c) as f64) })
                    .collect()
            })
            .collect();
        let map = HeatMap {
            title: "tail exponent".into(),
            x_label: "ρ".into(),
            x_scale: Scale::Linear,
            xs,
            y_label: "c".into(),
            y_scale: Scale::Linear,
            ys,
            values,
            value_label: "γ".into(),
            width: 600,
            height: 400,
        };
        let svg = map.to_svg().unwrap();
        let rects = svg.lines().filter(|l| l.starts_with("<rect")).count();
        // 12 cells, 64 colour-bar bands, and the background.
        assert!(rects >= 12 + 64, "{rects}");
        assert!(svg.contains("tail exponent"));
        assert!(svg.contains("#DDDDDD"), "a missing value is grey");
    }

    #[test]
    fn mismatched_grids_are_errors() {
        let map = HeatMap {
            title: String::new(),
            x_label: "x".into(),
            x_scale: Scale::Linear,
            xs: vec![PlotNumber::from_f64(1.0)],
            y_label: "y".into(),
            y_scale: Scale::Linear,
            ys: vec![PlotNumber::from_f64(1.0)],
            values: vec![vec![Some(1.0), Some(2.0)]],
            value_label: String::new(),
            width: 300,
            height: 200,
        };
        assert!(map.to_svg().is_err());
    }
}
