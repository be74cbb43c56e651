//! The report's two plots, from an evidence table: (1) a(k) against k — the direct values as a
//! line, the checked closed-form rows as markers, the tail law dashed; (2) the relative
//! difference between direct and closed values at the checked rows, with the tolerance of the
//! chosen digits. Breakpoints of piecewise models are marked on both. Layout only: every
//! value comes from the table (decimal strings placed as sign-and-log plot numbers).

use num_bigint::BigInt;

use crate::plot::{
    superscript, Figure, LegendPosition, Panel, PlotError, PlotNumber, Scale, Series,
};
use crate::table::Table;

use super::greek::text_name;

/// What the plots show besides the table.
#[derive(Clone, Debug, Default)]
pub struct PlotContext {
    /// The sequence's and the index's names (`n`, `k`).
    pub sequence: String,
    pub index: String,
    /// k on a log axis (a power-law tail); linear otherwise.
    pub log_index: bool,
    /// The last index of every piece but the last.
    pub breakpoints: Vec<BigInt>,
    /// The tail law's leading term at some k, when known.
    pub tail_law: Option<TailCurve>,
}

/// The leading term of the tail law, `C·r^k·(k/e)^(d·k)·k^θ`, at some k, with its legend.
#[derive(Clone, Debug, PartialEq)]
pub struct TailCurve {
    pub label: String,
    pub points: Vec<(PlotNumber, PlotNumber)>,
}

fn k_number(k: &BigInt) -> PlotNumber {
    // f64 only to place the point.
    PlotNumber::from_f64(k.to_string().parse::<f64>().unwrap_or(f64::NAN))
}

fn index_scale(context: &PlotContext) -> Scale {
    if context.log_index {
        Scale::Log
    } else {
        Scale::Linear
    }
}

/// Vertical lines at the breakpoints, labelled when `labelled` (plot 1; plot 2 repeats the
/// lines without words, which its legend would cover).
fn mark_breakpoints(mut panel: Panel, context: &PlotContext, labelled: bool) -> Panel {
    for b in &context.breakpoints {
        let label = if labelled {
            format!("{} = {b}", text_name(&context.index))
        } else {
            String::new()
        };
        panel = panel.vertical(k_number(b), &label);
    }
    panel
}

/// Plot (1): |a(k)| against k.
pub fn values_panel(table: &Table, context: &PlotContext) -> Panel {
    let (n, k) = (text_name(&context.sequence), text_name(&context.index));
    let direct: Vec<(PlotNumber, PlotNumber)> = table
        .rows
        .iter()
        .filter_map(|row| Some((k_number(&row.k), PlotNumber::from_decimal(&row.direct)?)))
        .collect();
    let checked: Vec<(PlotNumber, PlotNumber)> = table
        .rows
        .iter()
        .filter_map(|row| {
            let closed = row.closed.as_ref()?;
            Some((k_number(&row.k), PlotNumber::from_decimal(closed)?))
        })
        .collect();
    let signed = direct.iter().any(|(_, y)| y.sign < 0);
    let label = if signed {
        format!("|{n}({k})|")
    } else {
        format!("{n}({k})")
    };
    let mut panel = Panel::new(&label, Scale::Log)
        .series(Series::line("direct product", direct))
        .series(Series::markers("closed form (checked rows)", checked));
    if let Some(law) = &context.tail_law {
        panel = panel.series(Series::dashed(&law.label, law.points.clone()));
    }
    mark_breakpoints(panel, context, true)
}

/// Plot (2): |direct/closed − 1| at the checked rows, with the tolerance 10^−digits. Rows that
/// agree exactly (difference 0) sit on the lower edge, in a series of their own.
pub fn differences_panel(table: &Table, context: &PlotContext) -> Panel {
    let tolerance = PlotNumber::from_log10(1, -f64::from(table.digits));
    let differences: Vec<(PlotNumber, PlotNumber)> = table
        .rows
        .iter()
        .filter_map(|row| {
            Some((
                k_number(&row.k),
                PlotNumber::from_decimal(row.rel_diff.as_ref()?)?,
            ))
        })
        .collect();
    let smallest = differences
        .iter()
        .filter(|(_, d)| d.sign != 0)
        .map(|(_, d)| d.log10_abs)
        .fold(tolerance.log10_abs, f64::min);
    let largest = differences
        .iter()
        .filter(|(_, d)| d.sign != 0)
        .map(|(_, d)| d.log10_abs)
        .fold(tolerance.log10_abs, f64::max);
    let floor = (smallest - 1.0).floor();
    // Room above the highest point for the legend.
    let ceiling = (largest + 4.0).ceil().max(floor + 2.0);
    let (exact, inexact): (Vec<_>, Vec<_>) =
        differences.into_iter().partition(|(_, d)| d.sign == 0);
    let mut panel = Panel::new("relative difference", Scale::Log)
        .height(220)
        .y_range(
            PlotNumber::from_log10(1, floor),
            PlotNumber::from_log10(1, ceiling),
        )
        .series(Series::markers("|direct/closed − 1|", inexact))
        .horizontal(
            tolerance,
            &format!(
                "tolerance 10{} (--digits {})",
                superscript(-i64::from(table.digits)),
                table.digits
            ),
        )
        .legend(LegendPosition::UpperRight);
    if !exact.is_empty() {
        let on_floor = exact
            .into_iter()
            .map(|(k, _)| (k, PlotNumber::from_log10(1, floor)))
            .collect();
        panel = panel.series(Series::markers(
            "equal (difference 0), on the lower edge",
            on_floor,
        ));
    }
    mark_breakpoints(panel, context, false)
}

/// Plot (1) alone (`table --format svg`).
pub fn values_svg(table: &Table, context: &PlotContext) -> Result<String, PlotError> {
    Figure::new(&text_name(&context.index), index_scale(context))
        .panel(values_panel(table, context).height(360))
        .to_svg()
}

/// Plot (2) alone.
pub fn differences_svg(table: &Table, context: &PlotContext) -> Result<String, PlotError> {
    Figure::new(&text_name(&context.index), index_scale(context))
        .panel(differences_panel(table, context))
        .to_svg()
}
