//! `telescope sweep --format svg`, drawn with the report's plotting code (`crate::plot`):
//! one panel per quantity over the varied parameter (a log axis with `--log`), the ranges
//! where a quantity is infinite shaded, every boundary a labelled vertical line; for a grid,
//! a heat map of the first quantity. Layout only: the numbers and boundaries come from
//! `sweep`; f64 is used only to place points.

use num_traits::ToPrimitive;

use crate::algebra::Q;
use crate::plot::{
    Figure, HeatMap, LegendPosition, Panel, PlotError, PlotNumber, Scale, Series, PALETTE,
};
use crate::sweep::boundaries::Bracket;
use crate::sweep::{Cell, Location, Missing, Quantity, Sweep};

use super::node::Node;
use super::text;

fn name(n: &str) -> String {
    text::write(&Node::sym(n))
}

fn x_of(q: &Q) -> PlotNumber {
    PlotNumber::from_f64(q.to_f64().unwrap_or(f64::NAN))
}

fn title(q: &Quantity, sweep: &Sweep) -> String {
    match q {
        Quantity::Rate => "tail rate r".into(),
        Quantity::Theta => "tail power θ".into(),
        Quantity::Prefactor => "tail prefactor C".into(),
        Quantity::Total => format!("total Σ {}(k)", sweep.sequence),
        Quantity::Mean => "mean".into(),
        Quantity::Variance => "variance".into(),
        Quantity::Term(k) => format!("{}({k})", sweep.sequence),
        Quantity::Probability(e) => super::probability_output::event_strings(e).0,
    }
}

/// The value of a cell as a plot position, when it has one.
fn y_of(cell: &Cell) -> Option<PlotNumber> {
    match cell {
        Cell::Value(n) => PlotNumber::from_decimal(&n.value),
        Cell::Missing(_) => None,
    }
}

/// A boundary's place on the axis, and its label.
fn boundary_mark(location: &Location, param: &str) -> (PlotNumber, String) {
    let p = name(param);
    match location {
        Location::Exact(q) => (x_of(q), format!("{p} = {q}")),
        Location::Bracketed { low, high, by } => {
            let mid = (low + high) / Q::from_integer(2.into());
            let approx = match by {
                Bracket::Bisection => format!("{p} ≈ {:.6}", mid.to_f64().unwrap_or(f64::NAN)),
                Bracket::SweepPoints => format!(
                    "{p} ≈ {:.4} (between points)",
                    mid.to_f64().unwrap_or(f64::NAN)
                ),
            };
            (x_of(&mid), approx)
        }
    }
}

/// Quantities whose values span many decades get a log y axis (when they keep one sign).
fn y_scale(values: &[PlotNumber], quantity: &Quantity) -> Scale {
    let spread = matches!(
        quantity,
        Quantity::Rate
            | Quantity::Term(_)
            | Quantity::Prefactor
            | Quantity::Total
            | Quantity::Mean
            | Quantity::Variance
    );
    if !spread || values.is_empty() {
        return Scale::Linear;
    }
    let one_sign = values.iter().all(|v| v.sign > 0);
    let (lo, hi) = values
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v.log10_abs), hi.max(v.log10_abs))
        });
    if one_sign && hi - lo > 3.0 {
        Scale::Log
    } else {
        Scale::Linear
    }
}

/// The figure of a one-parameter sweep.
pub fn sweep_svg(sweep: &Sweep) -> Result<String, PlotError> {
    if sweep.axes.len() == 2 {
        return heat_map(sweep);
    }
    let axis = &sweep.axes[0];
    let x_scale = if axis.log { Scale::Log } else { Scale::Linear };
    let mut figure = Figure::new(&name(&axis.name), x_scale)
        .title(&format!(
            "{} across {} = {} … {}",
            sweep.sequence,
            name(&axis.name),
            super::sweep_output::exact_text(&axis.from),
            super::sweep_output::exact_text(&axis.to)
        ))
        .x_range(x_of(&axis.from), x_of(&axis.to));
    let xs: Vec<PlotNumber> = axis.values.iter().map(x_of).collect();
    for (qi, quantity) in sweep.quantities.iter().enumerate() {
        let cells: Vec<&Cell> = sweep.points.iter().map(|p| &p.cells[qi]).collect();
        let present: Vec<PlotNumber> = cells.iter().filter_map(|c| y_of(c)).collect();
        let label = title(quantity, sweep);
        let mut panel = Panel::new(&label, y_scale(&present, quantity))
            .legend(LegendPosition::Hidden)
            .height(170);
        // one line per run of consecutive values, so that a gap stays a gap
        let mut run: Vec<(PlotNumber, PlotNumber)> = Vec::new();
        let color = PALETTE[qi % PALETTE.len()];
        let mut runs = Vec::new();
        for (x, c) in xs.iter().zip(&cells) {
            match y_of(c) {
                Some(y) => run.push((*x, y)),
                None if !run.is_empty() => runs.push(std::mem::take(&mut run)),
                None => {}
            }
        }
        if !run.is_empty() {
            runs.push(run);
        }
        for r in runs {
            let series = if r.len() == 1 {
                Series::markers(&label, r)
            } else {
                Series::line(&label, r)
            };
            panel = panel.series(series.color(color));
        }
        // shade runs of infinite (or invalid) cells, reaching halfway to their neighbours
        let state = |c: &Cell| match c {
            Cell::Missing(Missing::Infinite { .. }) => Some("infinite"),
            Cell::Missing(Missing::Invalid(..)) => Some("outside the model"),
            Cell::Missing(Missing::Unavailable(_)) => Some("no value"),
            _ => None,
        };
        let mut i = 0;
        while i < cells.len() {
            let Some(word) = state(cells[i]) else {
                i += 1;
                continue;
            };
            let mut j = i;
            while j + 1 < cells.len() && state(cells[j + 1]) == Some(word) {
                j += 1;
            }
            let edge = |a: usize, b: usize| -> PlotNumber {
                let (qa, qb) = (&axis.values[a], &axis.values[b]);
                let inside = sweep.boundaries.iter().find_map(|bd| match &bd.location {
                    Location::Exact(q) if bd.quantity == *quantity && q >= qa && q <= qb => {
                        Some(q.clone())
                    }
                    _ => None,
                });
                x_of(&inside.unwrap_or_else(|| (qa + qb) / Q::from_integer(2.into())))
            };
            let from = if i == 0 { xs[0] } else { edge(i - 1, i) };
            let to = if j + 1 == cells.len() {
                xs[j]
            } else {
                edge(j, j + 1)
            };
            panel = panel.shade(from, to, &format!("{label}: {word}"));
            i = j + 1;
        }
        for b in sweep.boundaries.iter().filter(|b| b.quantity == *quantity) {
            let (at, text) = boundary_mark(&b.location, &b.param);
            panel = panel.vertical(at, &text);
        }
        figure = figure.panel(panel);
    }
    figure.to_svg()
}

/// A grid: the first quantity as a heat map over the two varied parameters.
fn heat_map(sweep: &Sweep) -> Result<String, PlotError> {
    let (ax, ay) = (&sweep.axes[0], &sweep.axes[1]);
    let quantity = &sweep.quantities[0];
    let ny = ay.values.len();
    let mut values = vec![vec![None; ax.values.len()]; ny];
    for (i, p) in sweep.points.iter().enumerate() {
        let (xi, yi) = (i / ny, i % ny);
        values[yi][xi] = y_of(&p.cells[0]).and_then(|v| v.position(Scale::Linear));
    }
    let scale = |log: bool| if log { Scale::Log } else { Scale::Linear };
    HeatMap {
        title: format!(
            "{} over {} and {} (grey: infinite or outside the model)",
            title(quantity, sweep),
            name(&ax.name),
            name(&ay.name)
        ),
        x_label: name(&ax.name),
        x_scale: scale(ax.log),
        xs: ax.values.iter().map(x_of).collect(),
        y_label: name(&ay.name),
        y_scale: scale(ay.log),
        ys: ay.values.iter().map(x_of).collect(),
        values,
        value_label: title(quantity, sweep),
        width: 760,
        height: 560,
    }
    .to_svg()
}
