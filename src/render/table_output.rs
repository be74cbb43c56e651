//! `telescope table` in text, CSV and JSON.

use std::fmt::Write;

use serde_json::{json, Value};

use crate::table::{DirectMethod, Row, RowSink, Table};

fn method(t: &Table) -> String {
    match t.method {
        DirectMethod::Exact => "exact rational product".to_string(),
        DirectMethod::Mpfr { bits } => format!("MPFR running product, {bits} bits"),
    }
}

fn params(t: &Table) -> String {
    t.params
        .iter()
        .map(|(k, v)| format!("{k} = {v}"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Aligned columns with a header and a footer that states the evidence.
pub fn table_text(t: &Table) -> String {
    let kw = t
        .rows
        .iter()
        .map(|r| r.k.to_string().len())
        .max()
        .unwrap_or(1)
        .max(1);
    let dw = t
        .rows
        .iter()
        .map(|r| r.direct.chars().count())
        .max()
        .unwrap_or(6)
        .max(6);
    let cw = t
        .rows
        .iter()
        .filter_map(|r| r.closed.as_ref().map(|c| c.chars().count()))
        .max()
        .unwrap_or(11)
        .max(11);
    let mut out = String::new();
    if !t.params.is_empty() {
        out += &format!("# {}\n", params(t));
    }
    out += &format!(
        "{:>kw$}  {:<dw$}  {:<cw$}  rel. diff\n",
        "k", "direct", "closed form"
    );
    for r in &t.rows {
        out += &format!(
            "{:>kw$}  {:<dw$}  {:<cw$}  {}\n",
            r.k.to_string(),
            r.direct,
            r.closed.as_deref().unwrap_or("·"),
            r.rel_diff.as_deref().unwrap_or("·"),
        );
    }
    out += &format!(
        "# {} digits; direct values by {} (relative error ≤ {})\n",
        t.digits,
        method(t),
        t.direct_error_bound
    );
    out += &format!(
        "# closed form checked at {} of {} rows; largest relative difference {}\n",
        t.checked_rows.len(),
        t.rows.len(),
        t.max_rel_diff
    );
    out
}

/// Comma-separated values with a header row; unchecked cells are empty.
pub fn table_csv(t: &Table) -> String {
    let mut csv = CsvRows::new(t.digits);
    csv.expect(t.rows.len() as u64);
    for row in &t.rows {
        csv.write(row);
    }
    csv.finish()
}

/// A CSV table written row by row as the rows are made (`build_table_into`), so that the rows
/// are never all held at once.
pub struct CsvRows {
    out: String,
    digits: u32,
}

impl CsvRows {
    /// `digits`: the table's significant digits (to guess the length of a row).
    pub fn new(digits: u32) -> Self {
        CsvRows {
            out: String::from("k,direct,closed,rel_diff\n"),
            digits,
        }
    }

    fn write(&mut self, r: &Row) {
        // Writing into a String cannot fail.
        let _ = write!(self.out, "{},", r.k);
        self.out.push_str(&r.direct);
        self.out.push(',');
        self.out.push_str(r.closed.as_deref().unwrap_or(""));
        self.out.push(',');
        self.out.push_str(r.rel_diff.as_deref().unwrap_or(""));
        self.out.push('\n');
    }

    pub fn finish(self) -> String {
        self.out
    }
}

impl RowSink for CsvRows {
    fn expect(&mut self, rows: u64) {
        // A row is about as long as its direct value (digits, point, exponent) plus the index
        // and the commas; checked rows are longer, but few.
        let typical = self.digits as usize + 16;
        self.out
            .reserve((rows.min(MAX_CSV_RESERVE_ROWS) as usize).saturating_mul(typical));
    }

    fn take(&mut self, row: Row) {
        self.write(&row);
    }
}

/// Space is reserved up front for at most this many rows; longer tables grow as they go.
const MAX_CSV_RESERVE_ROWS: u64 = 1_000_000;

pub fn table_json(t: &Table) -> Value {
    json!({
        "digits": t.digits.to_string(),
        "params": t.params.iter().map(|(k, v)| (k.clone(), Value::String(v.to_string()))).collect::<serde_json::Map<_, _>>(),
        "base_value": t.base_value.to_string(),
        "direct_method": method(t),
        "direct_error_bound": t.direct_error_bound,
        "rows": t.rows.iter().map(|r| json!({
            "k": r.k.to_string(),
            "direct": r.direct,
            "closed": r.closed,
            "rel_diff": r.rel_diff,
        })).collect::<Vec<_>>(),
        "max_rel_diff": t.max_rel_diff,
        "checked_rows": t.checked_rows.iter().map(|k| k.to_string()).collect::<Vec<_>>(),
    })
}
