//! Section 8: the plots and the evidence table (first rows, every checked row, last rows).

use crate::table::{DirectMethod, Row, Table};

use super::super::escape::escape_text;
use super::super::figures::{differences_panel, values_panel, PlotContext};
use super::super::greek::text_name;
use super::{missing_note, ReportPage};
use crate::plot::{Figure, Scale};

/// Rows shown from the start and from the end of the table.
const FIRST_ROWS: usize = 10;
const LAST_ROWS: usize = 5;

pub(crate) fn plot_context(page: &ReportPage) -> PlotContext {
    PlotContext {
        sequence: page.model.sequence.clone(),
        index: page.model.index.clone(),
        log_index: page.log_index,
        breakpoints: page.solved.breakpoints(),
        tail_law: page.tail_curve.clone(),
    }
}

fn figure(svg: Result<String, crate::plot::PlotError>, caption: &str) -> String {
    match svg {
        Ok(svg) => format!(
            "<figure>\n{svg}<figcaption>{}</figcaption>\n</figure>\n",
            escape_text(caption)
        ),
        Err(e) => format!("<p class=\"warning\">{}</p>\n", escape_text(&e.to_string())),
    }
}

fn row_html(row: &Row, checked: bool) -> String {
    let cell = |s: Option<&String>| {
        format!(
            "<td class=\"number\">{}</td>",
            s.map(|s| escape_text(s)).unwrap_or_default()
        )
    };
    format!(
        "<tr{}><td>{}</td>{}{}{}</tr>\n",
        if checked { " class=\"checked\"" } else { "" },
        row.k,
        cell(Some(&row.direct)),
        cell(row.closed.as_ref()),
        cell(row.rel_diff.as_ref())
    )
}

fn table_html(page: &ReportPage, table: &Table) -> String {
    let (n, k) = (
        text_name(&page.model.sequence),
        text_name(&page.model.index),
    );
    let mut out = format!(
        "<table class=\"evidence\">\n<thead><tr><th>{k}</th><th>{n}({k}), direct product</th><th>closed form</th><th>relative difference</th></tr></thead>\n<tbody>\n"
    );
    let total = table.rows.len();
    let mut previous: Option<usize> = None;
    for (i, row) in table.rows.iter().enumerate() {
        let checked = row.closed.is_some();
        if !(i < FIRST_ROWS || i + LAST_ROWS >= total || checked) {
            continue;
        }
        if let Some(p) = previous {
            if i > p + 1 {
                let skipped = i - p - 1;
                let word = if skipped == 1 { "row" } else { "rows" };
                out += &format!(
                    "<tr class=\"gap\"><td colspan=\"4\">⋯ {skipped} {word} ⋯</td></tr>\n"
                );
            }
        }
        out += &row_html(row, checked);
        previous = Some(i);
    }
    out + "</tbody>\n</table>\n"
}

pub(super) fn evidence(page: &ReportPage) -> String {
    let Some(table) = &page.table else {
        return missing_note(page);
    };
    let context = plot_context(page);
    let scale = if context.log_index {
        Scale::Log
    } else {
        Scale::Linear
    };
    let k = text_name(&page.model.index);
    let axes = if context.log_index {
        "log–log axes (a power-law tail)"
    } else {
        "log–linear axes (a geometric or faster tail, or a finite support)"
    };
    let mut out = String::new();
    let values = Figure::new(&k, scale)
        .panel(values_panel(table, &context).height(340))
        .to_svg();
    let mut caption = format!(
        "Figure 1. {}({k}) against {k} on {axes}: the direct product as a line, the closed form at the checked rows as circles",
        text_name(&page.model.sequence)
    );
    if context.tail_law.is_some() {
        caption += ", the leading term of the tail law dashed";
    }
    if !context.breakpoints.is_empty() {
        caption += ", the breakpoints between pieces as vertical lines";
    }
    caption += ".";
    out += &figure(values, &caption);
    let differences = Figure::new(&k, scale)
        .panel(differences_panel(table, &context))
        .to_svg();
    out += &figure(
        differences,
        &format!(
            "Figure 2. The relative difference |direct/closed − 1| at the checked rows, against the tolerance 10{} of the chosen digits.",
            crate::plot::superscript(-i64::from(table.digits))
        ),
    );
    let method = match &table.method {
        DirectMethod::Exact => "exact rational arithmetic".to_string(),
        DirectMethod::Mpfr { bits } => format!("MPFR at {bits} bits"),
    };
    out += &format!(
        "<dl class=\"facts\">\n<dt>rows</dt><dd>{} … {} ({} rows, {} checked against the closed form)</dd>\n<dt>largest relative difference</dt><dd><span class=\"value\" data-quantity=\"max-rel-diff\">{}</span></dd>\n<dt>direct product</dt><dd>{} (relative error ≤ {})</dd>\n<dt>base value</dt><dd>{}</dd>\n</dl>\n",
        table.rows.first().map(|r| r.k.to_string()).unwrap_or_default(),
        table.rows.last().map(|r| r.k.to_string()).unwrap_or_default(),
        table.rows.len(),
        table.checked_rows.len(),
        escape_text(&table.max_rel_diff),
        escape_text(&method),
        escape_text(&table.direct_error_bound),
        escape_text(&table.base_value.to_string()),
    );
    out += &table_html(page, table);
    out
}
