//! Axis ranges, tick positions and tick labels. Positions are in axis units: the value on a
//! linear axis, log10 of the magnitude on a log axis (so decades are integers).

use plotters::coord::ranged1d::{DefaultFormatting, KeyPointHint, Ranged};

use super::Scale;

/// The ticks of one axis: the range they cover and the labelled (major) and unlabelled (minor)
/// positions, all in axis units.
#[derive(Clone, Debug, PartialEq)]
pub struct Ticks {
    pub low: f64,
    pub high: f64,
    pub major: Vec<f64>,
    pub minor: Vec<f64>,
    pub scale: Scale,
}

/// At most this many labelled ticks on an axis (common practice for a readable axis).
const MAX_MAJOR: f64 = 8.0;

/// 1, 2 or 5 times a power of ten, the smallest at least `raw`.
fn nice_step(raw: f64) -> f64 {
    let power = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|m| m * power)
        .find(|step| *step >= raw * (1.0 - 1e-12))
        .unwrap_or(10.0 * power)
}

impl Ticks {
    /// Ticks for data spanning `low..=high` (axis units); the range is widened outward to
    /// whole ticks (whole decades on a log axis spanning more than one).
    pub fn covering(low: f64, high: f64, scale: Scale) -> Ticks {
        let (low, high) = if high - low < 1e-9 * (1.0 + low.abs().max(high.abs())) {
            let pad = match scale {
                Scale::Log => 0.5,
                Scale::Linear => (low.abs() * 0.1).max(0.5),
            };
            (low - pad, high + pad)
        } else {
            (low, high)
        };
        match scale {
            Scale::Log if high - low >= 1.0 => Self::decades(low, high),
            Scale::Log => Self::within_decade(low, high),
            Scale::Linear => Self::linear(low, high),
        }
    }

    /// Ticks over exactly `low..=high`, without widening (a range the caller fixed).
    pub fn fixed(low: f64, high: f64, scale: Scale) -> Ticks {
        let mut ticks = Self::covering(low, high, scale);
        let inside = |v: &f64| *v >= low - 1e-9 && *v <= high + 1e-9;
        ticks.major.retain(inside);
        ticks.minor.retain(inside);
        ticks.low = low;
        ticks.high = high;
        ticks
    }

    fn linear(low: f64, high: f64) -> Ticks {
        let step = nice_step((high - low) / (MAX_MAJOR - 1.0));
        let first = (low / step).floor();
        let last = (high / step).ceil();
        let major: Vec<f64> = (0..=(last - first) as i64)
            .map(|i| clean((first + i as f64) * step, step))
            .collect();
        Ticks {
            low: first * step,
            high: last * step,
            major,
            minor: Vec::new(),
            scale: Scale::Linear,
        }
    }

    /// Whole decades, every one or every 2, 5, 10, … decades when they are many; the range
    /// ends at the data's outer decades, not at a multiple of the step.
    fn decades(low: f64, high: f64) -> Ticks {
        let (low, high) = (low.floor(), high.ceil());
        let step = nice_step((high - low) / (MAX_MAJOR - 1.0)).max(1.0);
        let first = (low / step).ceil();
        let last = (high / step).floor();
        let major: Vec<f64> = (0..=(last - first).max(0.0) as i64)
            .map(|i| (first + i as f64) * step)
            .collect();
        // Minor ticks at 2…9 within each decade while the decades are few, else at skipped
        // decades.
        let mut minor = Vec::new();
        if step == 1.0 && high - low <= 6.0 {
            for decade in low as i64..high as i64 {
                minor.extend((2..10).map(|m| decade as f64 + f64::from(m).log10()));
            }
        } else if step > 1.0 && step <= 10.0 {
            for decade in low as i64..=high as i64 {
                if decade as f64 % step != 0.0 {
                    minor.push(decade as f64);
                }
            }
        }
        Ticks {
            low,
            high,
            major,
            minor,
            scale: Scale::Log,
        }
    }

    /// Less than a decade: ticks at linear steps of the value, placed at their logarithms.
    fn within_decade(low: f64, high: f64) -> Ticks {
        let (value_low, value_high) = (10f64.powf(low), 10f64.powf(high));
        let linear = Self::linear(value_low, value_high);
        let major: Vec<f64> = linear
            .major
            .iter()
            .filter(|v| **v > 0.0)
            .map(|v| v.log10())
            .collect();
        // A range widened down to 0 would be −∞ on the log axis: keep the data's end then.
        let low_tick = if linear.low > 0.0 {
            linear.low.log10()
        } else {
            low
        };
        Ticks {
            low: low_tick.min(low),
            high: linear.high.log10().max(high),
            major,
            minor: Vec::new(),
            scale: Scale::Log,
        }
    }

    /// The label of a major tick.
    pub fn label(&self, position: f64) -> String {
        tick_label(position, self.scale)
    }
}

/// Ticks as a plotters coordinate: a linear map of axis units to pixels, our own tick
/// positions as its key points (major for the bold grid and labels, minor for the light grid).
impl Ranged for Ticks {
    type FormatOption = DefaultFormatting;
    type ValueType = f64;

    fn map(&self, value: &f64, limit: (i32, i32)) -> i32 {
        let fraction = if self.high > self.low {
            (value - self.low) / (self.high - self.low)
        } else {
            0.5
        };
        let pixels = f64::from(limit.1 - limit.0) * fraction;
        limit.0 + pixels.round().clamp(-1e6, 1e6) as i32
    }

    fn key_points<Hint: KeyPointHint>(&self, hint: Hint) -> Vec<f64> {
        if hint.weight().allow_light_points() {
            self.minor.clone()
        } else {
            self.major.clone()
        }
    }

    fn range(&self) -> std::ops::Range<f64> {
        self.low..self.high
    }
}

/// Rounds away the float noise of `i·step` (so 0.30000000000000004 prints as 0.3).
fn clean(value: f64, step: f64) -> f64 {
    let places = (-step.log10().floor()).max(0.0) as i32 + 1;
    let factor = 10f64.powi(places);
    (value * factor).round() / factor
}

/// `10⁻³⁰⁰` for a whole decade on a log axis (1 and 10 for the first two), the value itself
/// otherwise; linear values beyond 10⁶ or below 10⁻⁴ as `m×10ⁿ`.
pub fn tick_label(position: f64, scale: Scale) -> String {
    match scale {
        Scale::Log => {
            let decade = position.round();
            if (position - decade).abs() < 1e-9 {
                return match decade as i64 {
                    0 => "1".to_string(),
                    1 => "10".to_string(),
                    n => format!("10{}", superscript(n)),
                };
            }
            let exponent = position.floor();
            let mantissa = 10f64.powf(position - exponent);
            let mantissa = (mantissa * 1000.0).round() / 1000.0;
            if (-4.0..6.0).contains(&exponent) {
                plain(10f64.powf(position))
            } else {
                format!("{}×10{}", plain(mantissa), superscript(exponent as i64))
            }
        }
        Scale::Linear => {
            let magnitude = position.abs();
            if magnitude != 0.0 && !(1e-4..1e6).contains(&magnitude) {
                let exponent = magnitude.log10().floor();
                let mantissa = position / 10f64.powf(exponent);
                let mantissa = (mantissa * 1000.0).round() / 1000.0;
                if mantissa.abs() == 1.0 {
                    let sign = if mantissa < 0.0 { "−" } else { "" };
                    return format!("{sign}10{}", superscript(exponent as i64));
                }
                return format!("{}×10{}", plain(mantissa), superscript(exponent as i64));
            }
            plain(position)
        }
    }
}

/// A value in the shortest plain decimal form (up to 6 significant digits), with a true minus.
fn plain(value: f64) -> String {
    if value == 0.0 {
        return "0".to_string();
    }
    let digits = 6 - (value.abs().log10().floor() as i32 + 1).clamp(-6, 6);
    let text = format!("{:.*}", digits.clamp(0, 12) as usize, value);
    let text = if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    };
    text.replace('-', "−")
}

/// An integer in Unicode superscript digits (`-300` → `⁻³⁰⁰`).
pub fn superscript(n: i64) -> String {
    n.to_string()
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            _ => '⁹',
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decades_are_labelled_with_superscript_exponents() {
        assert_eq!(tick_label(-300.0, Scale::Log), "10⁻³⁰⁰");
        assert_eq!(tick_label(0.0, Scale::Log), "1");
        assert_eq!(tick_label(1.0, Scale::Log), "10");
        assert_eq!(tick_label(2.0f64.log10(), Scale::Log), "2");
        assert_eq!(tick_label(-5021643.0, Scale::Log), "10⁻⁵⁰²¹⁶⁴³");
        assert_eq!(tick_label(5.0f64.log10() - 7.0, Scale::Log), "5×10⁻⁷");
    }

    #[test]
    fn linear_labels_are_short() {
        assert_eq!(tick_label(0.30000000000000004, Scale::Linear), "0.3");
        assert_eq!(tick_label(-2.5, Scale::Linear), "−2.5");
        assert_eq!(tick_label(1500.0, Scale::Linear), "1500");
        assert_eq!(tick_label(2e7, Scale::Linear), "2×10⁷");
        assert_eq!(tick_label(1e-6, Scale::Linear), "10⁻⁶");
        assert_eq!(tick_label(0.0, Scale::Linear), "0");
    }

    #[test]
    fn a_few_decades_get_every_decade_and_minor_ticks() {
        let ticks = Ticks::covering(-3.2, 0.4, Scale::Log);
        assert_eq!(ticks.major, vec![-4.0, -3.0, -2.0, -1.0, 0.0, 1.0]);
        assert_eq!((ticks.low, ticks.high), (-4.0, 1.0));
        assert_eq!(ticks.minor.len(), 5 * 8);
    }

    #[test]
    fn thousands_of_decades_get_a_nice_step() {
        let ticks = Ticks::covering(-5021643.0, 0.0, Scale::Log);
        assert!(
            ticks.major.len() <= 8 && ticks.major.len() >= 3,
            "{:?}",
            ticks.major
        );
        assert!(ticks.low <= -5021643.0 && ticks.high >= 0.0);
        let step = ticks.major[1] - ticks.major[0];
        assert_eq!(step, 1e6);
    }

    #[test]
    fn less_than_a_decade_gets_linear_values() {
        let ticks = Ticks::covering(2.0f64.log10(), 5.0f64.log10(), Scale::Log);
        let labels: Vec<String> = ticks.major.iter().map(|p| ticks.label(*p)).collect();
        assert!(labels.contains(&"3".to_string()), "{labels:?}");
        assert!(ticks.low <= 2.0f64.log10() && ticks.high >= 5.0f64.log10());
    }

    #[test]
    fn linear_ranges_widen_to_whole_steps() {
        let ticks = Ticks::covering(0.03, 0.97, Scale::Linear);
        assert_eq!((ticks.low, ticks.high), (0.0, 1.0));
        assert!(ticks.major.len() <= 8);
        let flat = Ticks::covering(3.0, 3.0, Scale::Linear);
        assert!(flat.low < 3.0 && flat.high > 3.0);
    }

    #[test]
    fn a_fixed_range_keeps_its_ends() {
        let ticks = Ticks::fixed(-2.5, 0.0, Scale::Log);
        assert_eq!((ticks.low, ticks.high), (-2.5, 0.0));
        assert_eq!(ticks.major, vec![-2.0, -1.0, 0.0]);
    }
}
