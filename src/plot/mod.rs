//! Figures as standalone SVG: log or linear axes with decade labels, several series (lines,
//! dashed lines, markers), shaded x-ranges, labelled vertical and horizontal lines, several
//! panels sharing one x axis, and heat maps. Used by the HTML report, `table --format svg`
//! and `sweep`.
//!
//! Values are [`PlotNumber`]s — a sign and log10 of the magnitude — so a value like 10^-5021643
//! (far outside `f64`) still has a place on a logarithmic axis. Axis geometry, ticks, paths and
//! text come from the `plotters` crate's SVG backend; this module only decides ranges, tick
//! positions, labels, thinning and styles. `f64` appears here only to place points.
//!
//! ```
//! use telescope::plot::{Figure, Panel, PlotNumber, Scale, Series};
//! let points: Vec<_> = (1..=100)
//!     .map(|k| (PlotNumber::from_f64(k as f64), PlotNumber::from_log10(1, -2.5 * (k as f64).log10())))
//!     .collect();
//! let figure = Figure::new("k", Scale::Log)
//!     .panel(Panel::new("a(k)", Scale::Log).series(Series::line("direct", points)));
//! let svg = figure.to_svg().unwrap();
//! assert!(svg.starts_with("<svg") && svg.contains("<polyline"));
//! ```

mod axis;
mod draw;
mod heatmap;
mod thin;

pub use axis::{superscript, tick_label, Ticks};
pub use heatmap::HeatMap;
pub use thin::{thin_points, MAX_POINTS_PER_SERIES};

use crate::numeric::LogReal;

/// How an axis maps values to positions.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Scale {
    Linear,
    /// Decades equally spaced; the magnitude |v| is plotted and zeros are left out.
    Log,
}

/// A real number for plotting: its sign and log10 of its magnitude, so that values of any size
/// can be placed on a logarithmic axis. Only for placing points, never for reported digits.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PlotNumber {
    /// -1, 0 or +1 (0: the value is zero).
    pub sign: i8,
    /// log10 |v|; NaN marks a value that cannot be plotted.
    pub log10_abs: f64,
}

impl PlotNumber {
    pub const ZERO: PlotNumber = PlotNumber {
        sign: 0,
        log10_abs: f64::NEG_INFINITY,
    };

    pub fn from_f64(value: f64) -> PlotNumber {
        if value == 0.0 {
            return PlotNumber::ZERO;
        }
        if !value.is_finite() {
            return PlotNumber {
                sign: 0,
                log10_abs: f64::NAN,
            };
        }
        PlotNumber {
            sign: if value < 0.0 { -1 } else { 1 },
            log10_abs: value.abs().log10(),
        }
    }

    /// `sign · 10^log10_abs`.
    pub fn from_log10(sign: i8, log10_abs: f64) -> PlotNumber {
        if sign == 0 {
            return PlotNumber::ZERO;
        }
        PlotNumber {
            sign: sign.signum(),
            log10_abs,
        }
    }

    /// A sign-and-log value from `numeric` (any size).
    pub fn from_log_real(value: &LogReal) -> PlotNumber {
        if value.is_zero() {
            return PlotNumber::ZERO;
        }
        PlotNumber::from_log10(value.sign, value.ln_abs.to_f64() / std::f64::consts::LN_10)
    }

    /// A decimal string as printed by telescope (`1.25`, `-3.5e-5021643`, `0`); None when it
    /// is not one.
    pub fn from_decimal(text: &str) -> Option<PlotNumber> {
        let text = text.trim();
        let (negative, unsigned) = match text.strip_prefix('-') {
            Some(rest) => (true, rest),
            None => (false, text.strip_prefix('+').unwrap_or(text)),
        };
        let (mantissa, exponent) = match unsigned.split_once(['e', 'E']) {
            Some((m, e)) => (m, e.parse::<i64>().ok()?),
            None => (unsigned, 0),
        };
        let mantissa: f64 = mantissa.parse().ok()?;
        if !mantissa.is_finite() || mantissa < 0.0 {
            return None;
        }
        if mantissa == 0.0 {
            return Some(PlotNumber::ZERO);
        }
        let sign = if negative { -1 } else { 1 };
        Some(PlotNumber::from_log10(
            sign,
            mantissa.log10() + exponent as f64,
        ))
    }

    /// The position on an axis of this scale: log10 |v| on a log axis (None for zero), the value
    /// itself on a linear one (None when it overflows `f64`).
    pub fn position(&self, scale: Scale) -> Option<f64> {
        if self.log10_abs.is_nan() {
            return None;
        }
        match scale {
            Scale::Log => (self.sign != 0 && self.log10_abs.is_finite()).then_some(self.log10_abs),
            Scale::Linear => {
                if self.sign == 0 {
                    return Some(0.0);
                }
                let value = f64::from(self.sign) * 10f64.powf(self.log10_abs);
                value.is_finite().then_some(value)
            }
        }
    }
}

/// A colour as red, green, blue.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Rgb(pub u8, pub u8, pub u8);

impl Rgb {
    /// `#rrggbb`, as the SVG attributes carry it (tests look series up by colour).
    pub fn hex(&self) -> String {
        format!("#{:02X}{:02X}{:02X}", self.0, self.1, self.2)
    }
}

/// The default colours, one per series in order: ink blue, brick red, moss green, ochre,
/// plum, slate. Chosen to stay apart in print and for common colour-vision deficiencies.
pub const PALETTE: [Rgb; 6] = [
    Rgb(0x1F, 0x3A, 0x68),
    Rgb(0xB0, 0x3A, 0x2E),
    Rgb(0x3C, 0x7A, 0x3F),
    Rgb(0xC4, 0x8A, 0x16),
    Rgb(0x7A, 0x3E, 0x7D),
    Rgb(0x55, 0x66, 0x77),
];

/// How a series is drawn.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SeriesStyle {
    /// A solid line through the points.
    Line,
    /// A dashed line through the points.
    Dashed,
    /// An open circle at each point, no line.
    Markers,
}

/// One data series: a label for the legend, a style, a colour and the points in order of x.
/// A point that cannot be placed (zero on a log axis, outside `f64` on a linear one) breaks
/// the line there.
#[derive(Clone, Debug)]
pub struct Series {
    pub label: String,
    pub style: SeriesStyle,
    /// None: the palette colour for the series' position in its panel.
    pub color: Option<Rgb>,
    pub points: Vec<(PlotNumber, PlotNumber)>,
}

impl Series {
    pub fn new(label: &str, style: SeriesStyle, points: Vec<(PlotNumber, PlotNumber)>) -> Series {
        Series {
            label: label.to_string(),
            style,
            color: None,
            points,
        }
    }

    pub fn line(label: &str, points: Vec<(PlotNumber, PlotNumber)>) -> Series {
        Series::new(label, SeriesStyle::Line, points)
    }

    pub fn dashed(label: &str, points: Vec<(PlotNumber, PlotNumber)>) -> Series {
        Series::new(label, SeriesStyle::Dashed, points)
    }

    pub fn markers(label: &str, points: Vec<(PlotNumber, PlotNumber)>) -> Series {
        Series::new(label, SeriesStyle::Markers, points)
    }

    pub fn color(mut self, color: Rgb) -> Series {
        self.color = Some(color);
        self
    }
}

/// A shaded band over an x-range, with an optional label at its top.
#[derive(Clone, Debug)]
pub struct Shade {
    pub from: PlotNumber,
    pub to: PlotNumber,
    pub label: String,
}

/// A labelled line across the plot: vertical at an x value, or horizontal at a y value.
#[derive(Clone, Debug)]
pub struct Rule {
    pub at: PlotNumber,
    pub label: String,
}

/// Where the legend sits inside a panel.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LegendPosition {
    UpperRight,
    UpperLeft,
    LowerLeft,
    LowerRight,
    /// No legend.
    Hidden,
}

/// One plot area. Panels of a [`Figure`] are stacked and share the x axis.
#[derive(Clone, Debug)]
pub struct Panel {
    pub title: String,
    pub y_label: String,
    pub y_scale: Scale,
    /// (low, high) in values; None: from the data, widened to whole ticks.
    pub y_range: Option<(PlotNumber, PlotNumber)>,
    pub series: Vec<Series>,
    /// Shaded x-ranges, drawn under everything else.
    pub shades: Vec<Shade>,
    /// Vertical lines at x values (breakpoints, thresholds), dashed and labelled.
    pub vertical: Vec<Rule>,
    /// Horizontal lines at y values (a tolerance), dashed and labelled.
    pub horizontal: Vec<Rule>,
    pub legend: LegendPosition,
    /// Height of the plot area in pixels (axes' labels excluded).
    pub height: u32,
}

impl Panel {
    pub fn new(y_label: &str, y_scale: Scale) -> Panel {
        Panel {
            title: String::new(),
            y_label: y_label.to_string(),
            y_scale,
            y_range: None,
            series: Vec::new(),
            shades: Vec::new(),
            vertical: Vec::new(),
            horizontal: Vec::new(),
            legend: LegendPosition::UpperRight,
            height: 300,
        }
    }

    pub fn title(mut self, title: &str) -> Panel {
        self.title = title.to_string();
        self
    }

    pub fn series(mut self, series: Series) -> Panel {
        self.series.push(series);
        self
    }

    pub fn y_range(mut self, low: PlotNumber, high: PlotNumber) -> Panel {
        self.y_range = Some((low, high));
        self
    }

    pub fn shade(mut self, from: PlotNumber, to: PlotNumber, label: &str) -> Panel {
        self.shades.push(Shade {
            from,
            to,
            label: label.to_string(),
        });
        self
    }

    pub fn vertical(mut self, at: PlotNumber, label: &str) -> Panel {
        self.vertical.push(Rule {
            at,
            label: label.to_string(),
        });
        self
    }

    pub fn horizontal(mut self, at: PlotNumber, label: &str) -> Panel {
        self.horizontal.push(Rule {
            at,
            label: label.to_string(),
        });
        self
    }

    pub fn legend(mut self, position: LegendPosition) -> Panel {
        self.legend = position;
        self
    }

    pub fn height(mut self, height: u32) -> Panel {
        self.height = height;
        self
    }

    /// The colour series `index` is drawn in.
    pub fn series_color(&self, index: usize) -> Rgb {
        self.series[index]
            .color
            .unwrap_or(PALETTE[index % PALETTE.len()])
    }
}

/// A figure: one or more panels stacked vertically over one shared x axis (tick labels and
/// the x label only under the last panel).
#[derive(Clone, Debug)]
pub struct Figure {
    pub title: String,
    pub x_label: String,
    pub x_scale: Scale,
    /// (low, high) in values; None: from every panel's data, widened to whole ticks.
    pub x_range: Option<(PlotNumber, PlotNumber)>,
    pub panels: Vec<Panel>,
    /// Width of the whole figure in pixels.
    pub width: u32,
}

impl Figure {
    pub fn new(x_label: &str, x_scale: Scale) -> Figure {
        Figure {
            title: String::new(),
            x_label: x_label.to_string(),
            x_scale,
            x_range: None,
            panels: Vec::new(),
            width: 760,
        }
    }

    pub fn title(mut self, title: &str) -> Figure {
        self.title = title.to_string();
        self
    }

    pub fn panel(mut self, panel: Panel) -> Figure {
        self.panels.push(panel);
        self
    }

    pub fn x_range(mut self, low: PlotNumber, high: PlotNumber) -> Figure {
        self.x_range = Some((low, high));
        self
    }

    pub fn width(mut self, width: u32) -> Figure {
        self.width = width;
        self
    }

    /// The figure as one `<svg>` element (with `viewBox`, so CSS can scale it). Series with
    /// more than [`MAX_POINTS_PER_SERIES`] points are thinned first, keeping each pixel
    /// column's extremes so that spikes stay visible.
    pub fn to_svg(&self) -> Result<String, PlotError> {
        draw::figure_svg(self)
    }
}

/// Drawing failed (the SVG backend reported an error, or the figure has nothing to draw).
#[derive(Clone, Debug, PartialEq)]
pub struct PlotError(pub String);

impl std::fmt::Display for PlotError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "plot: {}", self.0)
    }
}

impl std::error::Error for PlotError {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimal_strings_of_any_size_become_plot_numbers() {
        let tiny = PlotNumber::from_decimal("-3.5e-5021643").unwrap();
        assert_eq!(tiny.sign, -1);
        assert!((tiny.log10_abs - (-5021643.0 + 3.5f64.log10())).abs() < 1e-6);
        assert_eq!(PlotNumber::from_decimal("0").unwrap(), PlotNumber::ZERO);
        assert_eq!(
            PlotNumber::from_decimal("0.25").unwrap().log10_abs,
            0.25f64.log10()
        );
        assert!(PlotNumber::from_decimal("inf").is_none());
        assert!(PlotNumber::from_decimal("1.0e").is_none());
    }

    #[test]
    fn positions_on_log_and_linear_axes() {
        let tiny = PlotNumber::from_log10(1, -400.0);
        assert_eq!(tiny.position(Scale::Log), Some(-400.0));
        assert_eq!(tiny.position(Scale::Linear), Some(0.0));
        assert_eq!(
            PlotNumber::from_log10(1, 400.0).position(Scale::Linear),
            None
        );
        assert_eq!(PlotNumber::ZERO.position(Scale::Log), None);
        assert_eq!(
            PlotNumber::from_f64(-2.0).position(Scale::Linear),
            Some(-2.0)
        );
        // A log axis places the magnitude.
        assert_eq!(PlotNumber::from_f64(-100.0).position(Scale::Log), Some(2.0));
    }

    #[test]
    fn log_reals_far_below_f64_still_have_a_position() {
        let prec = 64;
        let value = LogReal {
            sign: 1,
            ln_abs: rug::Float::with_val(prec, -2000.0) * rug::Float::with_val(prec, 10).ln(),
        };
        let position = PlotNumber::from_log_real(&value)
            .position(Scale::Log)
            .unwrap();
        assert!((position + 2000.0).abs() < 1e-9);
    }
}
