//! Thinning long series so a figure stays small: the points are grouped into equal slices of
//! the x axis and each slice keeps its lowest and highest point, in order, so peaks and dips
//! survive (a min–max decimation, common practice for plotting long signals).

use super::{PlotNumber, Scale};

/// At most this many points of one series are drawn.
pub const MAX_POINTS_PER_SERIES: usize = 2000;

/// Positions (axis units) thinned to at most `max` points (at least the first and the last).
pub(crate) fn thin_positions(points: &[(f64, f64)], max: usize) -> Vec<(f64, f64)> {
    let max = max.max(2);
    if points.len() <= max {
        return points.to_vec();
    }
    let slices = (max - 2) / 2;
    let (first, last) = (points[0], points[points.len() - 1]);
    let span = last.0 - first.0;
    let mut out = vec![first];
    if slices == 0 || span.is_nan() || span == 0.0 {
        // No x extent to slice: keep evenly spaced points by index.
        let stride = points.len().div_ceil(max - 1);
        out.extend(points[1..points.len() - 1].iter().step_by(stride).copied());
        out.push(last);
        out.truncate(max - 1);
        out.push(last);
        out.dedup();
        return out;
    }
    let slice_of = |x: f64| (((x - first.0) / span * slices as f64) as usize).min(slices - 1);
    let inner = &points[1..points.len() - 1];
    let mut start = 0;
    while start < inner.len() {
        let slice = slice_of(inner[start].0);
        let mut end = start;
        while end < inner.len() && slice_of(inner[end].0) == slice {
            end += 1;
        }
        let group = &inner[start..end];
        let lowest = (0..group.len())
            .min_by(|a, b| group[*a].1.total_cmp(&group[*b].1))
            .unwrap();
        let highest = (0..group.len())
            .max_by(|a, b| group[*a].1.total_cmp(&group[*b].1))
            .unwrap();
        let (a, b) = (lowest.min(highest), lowest.max(highest));
        out.push(group[a]);
        if b != a {
            out.push(group[b]);
        }
        start = end;
    }
    out.push(last);
    out
}

/// A series thinned to at most `max` points as it would be placed on these axes (points that
/// cannot be placed are dropped).
pub fn thin_points(
    points: &[(PlotNumber, PlotNumber)],
    x_scale: Scale,
    y_scale: Scale,
    max: usize,
) -> Vec<(PlotNumber, PlotNumber)> {
    let placed: Vec<(f64, f64, usize)> = points
        .iter()
        .enumerate()
        .filter_map(|(i, (x, y))| Some((x.position(x_scale)?, y.position(y_scale)?, i)))
        .collect();
    let positions: Vec<(f64, f64)> = placed.iter().map(|(x, y, _)| (*x, *y)).collect();
    let kept = thin_positions(&positions, max);
    // Map kept positions back to the original points, in order.
    let mut out = Vec::with_capacity(kept.len());
    let mut cursor = 0;
    for position in kept {
        while cursor < placed.len() && (placed[cursor].0, placed[cursor].1) != position {
            cursor += 1;
        }
        if cursor < placed.len() {
            out.push(points[placed[cursor].2]);
            cursor += 1;
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_series_keep_their_ends_and_their_spikes() {
        let mut points: Vec<(f64, f64)> = (0..100_000).map(|i| (i as f64, 0.0)).collect();
        points[54_321].1 = 7.0;
        points[12_345].1 = -3.0;
        let thinned = thin_positions(&points, MAX_POINTS_PER_SERIES);
        assert!(thinned.len() <= MAX_POINTS_PER_SERIES);
        assert_eq!(thinned[0], (0.0, 0.0));
        assert_eq!(*thinned.last().unwrap(), (99_999.0, 0.0));
        assert!(thinned.contains(&(54_321.0, 7.0)));
        assert!(thinned.contains(&(12_345.0, -3.0)));
        assert!(thinned.windows(2).all(|w| w[0].0 < w[1].0));
    }

    #[test]
    fn short_series_are_untouched() {
        let points = vec![(1.0, 2.0), (2.0, 3.0)];
        assert_eq!(thin_positions(&points, 2000), points);
    }

    #[test]
    fn thinning_plot_numbers_drops_zeros_on_a_log_axis() {
        let points: Vec<_> = (0..5000)
            .map(|i| {
                let y = if i == 10 { 0.0 } else { 1.0 / (1.0 + i as f64) };
                (
                    PlotNumber::from_f64(1.0 + i as f64),
                    PlotNumber::from_f64(y),
                )
            })
            .collect();
        let thinned = thin_points(&points, Scale::Log, Scale::Log, 500);
        assert!(thinned.len() <= 500);
        assert!(thinned.iter().all(|(_, y)| y.sign != 0));
        assert_eq!(thinned[0], points[0]);
        assert_eq!(*thinned.last().unwrap(), points[4999]);
    }
}
