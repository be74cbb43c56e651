//! The evidence table: a(k) by direct product for a range of k, the closed form evaluated
//! independently at a log-spaced sample of rows (or every row), and their relative difference.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::ToPrimitive;
use rug::ops::Pow;
use rug::{Float, Rational};

use crate::algebra::Q;
use crate::diagnostic::{Diagnostic, Span};
use crate::model::Problem;
use crate::numeric::{
    decimal, evaluate_closed_form, to_rug_integer, to_rug_rational, DirectError, DirectValue,
    LogReal, NumericFactor, NumericRatio, RunningProduct,
};
use crate::ratio::Orientation;
use crate::solve::Solution;

/// At most this many rows in one table (absurd sizes are refused, not attempted).
pub const MAX_ROWS: u64 = 10_000_000;
/// At most this many multiplications from the base to the last row.
pub const MAX_STEPS: u64 = 100_000_000;
/// Up to this many steps the direct product is exact (GMP rationals).
pub const EXACT_STEPS: u64 = 3_000;
/// Rows checked against the closed form besides the first and the last.
pub const SAMPLE_ROWS: usize = 40;

#[derive(Clone, Debug)]
pub struct TableRequest {
    pub from: BigInt,
    pub to: BigInt,
    pub digits: u32,
    /// a(b); 1 unless `--base` sets it.
    pub base_value: Q,
    pub check_all: bool,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    pub k: BigInt,
    pub direct: String,
    /// The closed form at this k, on checked rows.
    pub closed: Option<String>,
    /// |direct/closed − 1|, on checked rows.
    pub rel_diff: Option<String>,
}

#[derive(Clone, Debug, PartialEq)]
pub enum DirectMethod {
    Exact,
    Mpfr { bits: u32 },
}

#[derive(Clone, Debug, PartialEq)]
pub struct Table {
    pub digits: u32,
    pub params: BTreeMap<String, Q>,
    pub base_value: Q,
    pub rows: Vec<Row>,
    pub checked_rows: Vec<BigInt>,
    pub max_rel_diff: String,
    pub method: DirectMethod,
    /// Proven bound on the direct values' relative error ("0" when exact).
    pub direct_error_bound: String,
}

/// A direct product that the table walks row by row: the running product of one rule, or the
/// chain across the pieces of a piecewise model.
pub trait DirectSource {
    /// Steps forward until the current index is `k`.
    fn advance_to(&mut self, k: &BigInt) -> Result<(), DirectError>;
    /// Moves from a(k) to a(k+1).
    fn step(&mut self) -> Result<(), DirectError>;
    /// The current value with `digits` significant digits.
    fn decimal(&self, digits: u32) -> String;
    /// The current value as sign and logarithm, at `prec` bits.
    fn log(&self, prec: u32) -> LogReal;
    /// The proven bound on the current value's relative error; None when it is exact.
    fn error_bound(&self) -> Option<Float>;
    /// Whether `error_bound` never decreases from one step to the next, so that the bound at
    /// the last row is the largest (the table then asks for it once instead of on every row).
    fn bound_only_grows(&self) -> bool {
        false
    }
}

impl DirectSource for RunningProduct {
    fn advance_to(&mut self, k: &BigInt) -> Result<(), DirectError> {
        let target = to_rug_integer(k);
        while *self.index() < target {
            RunningProduct::step(self)?;
        }
        Ok(())
    }

    fn step(&mut self) -> Result<(), DirectError> {
        RunningProduct::step(self)
    }

    fn decimal(&self, digits: u32) -> String {
        match self.value_ref() {
            Ok(q) => decimal::rational_to_decimal(q, digits),
            Err((mantissa, 0)) => decimal::float_to_decimal(mantissa, digits),
            Err((mantissa, exp2)) => {
                LogReal::from_scaled(mantissa, exp2, mantissa.prec() + 64).to_decimal(digits)
            }
        }
    }

    fn log(&self, prec: u32) -> LogReal {
        match self.value_ref() {
            Ok(q) => LogReal::from_rational(q, prec),
            Err((mantissa, exp2)) => LogReal::from_scaled(mantissa, exp2, prec),
        }
    }

    fn error_bound(&self) -> Option<Float> {
        RunningProduct::error_bound(self)
    }

    /// The bound counts the roundings made so far (Higham's γ_n), and every step adds some.
    fn bound_only_grows(&self) -> bool {
        true
    }
}

/// Where a table's rows go as they are made: kept in memory (`Vec<Row>`), or written out at
/// once (`render::CsvRows`), so that a long table need not hold every row.
pub trait RowSink {
    /// The number of rows about to come (for reserving space).
    fn expect(&mut self, _rows: u64) {}
    fn take(&mut self, row: Row);
}

impl RowSink for Vec<Row> {
    fn expect(&mut self, rows: u64) {
        self.reserve(rows.min(MAX_ROWS) as usize);
    }

    fn take(&mut self, row: Row) {
        self.push(row);
    }
}

/// The checks every table makes before it multiplies anything; returns the number of rows and
/// of steps from the base term to the last row.
pub(crate) fn check_request(
    base: &BigInt,
    missing: &[&str],
    request: &TableRequest,
    here: &Span,
) -> Result<(u64, u64), Diagnostic> {
    let fail = |message: String| Diagnostic::new(message, here.clone());
    if !missing.is_empty() {
        let example = missing
            .iter()
            .map(|m| format!("--param {m}=…"))
            .collect::<Vec<_>>()
            .join(" ");
        return Err(fail(format!(
            "a table needs a value for every parameter; missing: {}",
            missing.join(", ")
        ))
        .with_help(format!("add {example}")));
    }
    if request.from < *base {
        return Err(fail(format!(
            "the table starts at k = {} but the sequence starts at its base term k = {base}",
            request.from
        ))
        .with_help(format!("use --k {base}..{}", request.to)));
    }
    if request.to < request.from {
        return Err(fail("the range of k is empty (A > B in --k A..B)".into()));
    }
    let rows = (&request.to - &request.from + 1u32)
        .to_u64()
        .unwrap_or(u64::MAX);
    if rows > MAX_ROWS {
        return Err(fail(format!(
            "{rows} rows is too many for one table (at most {MAX_ROWS})"
        )));
    }
    let steps = (&request.to - base).to_u64().unwrap_or(u64::MAX);
    if steps > MAX_STEPS {
        return Err(fail(format!(
            "the direct product up to k = {} needs {steps} multiplications (at most {MAX_STEPS})",
            request.to
        ))
        .with_help("the direct product runs from the base term; for large k, `telescope solve --param …` gives the tail law with its prefactor and corrections"));
    }
    Ok((rows, steps))
}

/// The message for a direct product that cannot go on.
pub(crate) fn direct_error(e: DirectError, here: &Span) -> Diagnostic {
    let message = match e {
        DirectError::ZeroDenominator { k, .. } => {
            format!("with these parameter values the rule divides by zero at k = {k}")
        }
        DirectError::BeforeBase { k } => format!("k = {k} lies before the base term"),
        DirectError::TooManySteps { steps, limit } => {
            format!("{steps} steps exceed the limit {limit}")
        }
    };
    Diagnostic::new(message, here.clone())
}

/// What a table's rows showed, whatever the direct product and the closed form are (the rows
/// themselves went to a `RowSink`).
pub(crate) struct FilledRows {
    pub checked_rows: Vec<BigInt>,
    pub max_rel_diff: String,
    /// The largest relative error bound of a direct value (0 when exact).
    pub worst_bound: Float,
}

/// Walks `source` over the requested rows, evaluating `closed` at the sampled offsets (sorted)
/// and comparing it with the direct value there; every row goes to `sink`.
pub(crate) fn fill_rows(
    source: &mut impl DirectSource,
    request: &TableRequest,
    rows: u64,
    sample: &[u64],
    here: &Span,
    mut closed: impl FnMut(&BigInt) -> Result<LogReal, String>,
    sink: &mut impl RowSink,
) -> Result<FilledRows, Diagnostic> {
    source
        .advance_to(&request.from)
        .map_err(|e| direct_error(e, here))?;
    sink.expect(rows);
    let mut out = FilledRows {
        checked_rows: Vec::new(),
        max_rel_diff: String::new(),
        worst_bound: Float::new(64),
    };
    let mut max_rel = Float::new(64);
    let mut next_sample = 0usize;
    let expected = crate::budget::Estimate::table(rows, request.digits, sample.len() as u64, 2);
    let progress = crate::budget::Progress::new("table rows", rows, expected.seconds);
    let bound_only_grows = source.bound_only_grows();
    let mut k = request.from.clone();
    for offset in 0..rows {
        if offset % 1024 == 1023 {
            progress.inc(1024);
        }
        if offset > 0 {
            source.step().map_err(|e| direct_error(e, here))?;
            k += 1u32;
        }
        if !bound_only_grows || offset + 1 == rows {
            if let Some(bound) = source.error_bound() {
                if bound > out.worst_bound {
                    out.worst_bound = bound;
                }
            }
        }
        let mut row = Row {
            k: k.clone(),
            direct: source.decimal(request.digits),
            closed: None,
            rel_diff: None,
        };
        if next_sample < sample.len() && sample[next_sample] == offset {
            next_sample += 1;
            let value = closed(&k).map_err(|e| {
                Diagnostic::new(
                    format!("the closed form cannot be evaluated at k = {k}: {e}"),
                    here.clone(),
                )
            })?;
            let prec = value.ln_abs.prec().max(64);
            let rel = source.log(prec).rel_diff(&value, 64);
            if rel > max_rel {
                max_rel = rel.clone();
            }
            row.closed = Some(value.to_decimal(request.digits));
            row.rel_diff = Some(decimal::short(&rel));
            out.checked_rows.push(k.clone());
        }
        sink.take(row);
    }
    out.max_rel_diff = decimal::short(&max_rel);
    Ok(out)
}

/// Builds the table for a solved problem. Every parameter must have a value.
pub fn build_table(
    problem: &Problem,
    solution: &Solution,
    request: &TableRequest,
) -> Result<Table, Diagnostic> {
    let mut rows = Vec::new();
    let mut table = build_table_into(problem, solution, request, &mut rows)?;
    table.rows = rows;
    Ok(table)
}

/// `build_table` with the rows sent to `sink` as they are made; the returned table has no
/// rows, only what they showed (checked rows, largest difference, the direct method's bound).
pub fn build_table_into(
    problem: &Problem,
    solution: &Solution,
    request: &TableRequest,
    sink: &mut impl RowSink,
) -> Result<Table, Diagnostic> {
    let here = problem.rule_span.clone();
    let values = &solution.values;
    let missing: Vec<&str> = problem
        .params
        .iter()
        .filter(|p| !values.contains_key(&p.name))
        .map(|p| p.name.as_str())
        .collect();
    let base = &solution.base_index;
    let (rows, steps) = check_request(base, &missing, request, &here)?;
    let exact = steps <= EXACT_STEPS;
    let base_value = to_rug_rational(&request.base_value);
    let mut run = RunningProduct::new(
        numeric_ratio(problem, values),
        to_rug_integer(base),
        base_value.clone(),
        exact,
        request.digits,
        steps,
    );
    let sample = sample_offsets(rows, request.check_all);
    let filled = fill_rows(
        &mut run,
        request,
        rows,
        &sample,
        &here,
        |k| {
            evaluate_closed_form(
                &solution.closed_form,
                k,
                values,
                &base_value,
                request.digits,
            )
            .map_err(|e| format!("{e:?}"))
        },
        sink,
    )?;
    let method = match run.value() {
        DirectValue::Approx { mantissa, .. } => DirectMethod::Mpfr {
            bits: mantissa.prec(),
        },
        DirectValue::Exact(_) => DirectMethod::Exact,
    };
    Ok(Table {
        digits: request.digits,
        params: values.clone(),
        base_value: request.base_value.clone(),
        rows: Vec::new(),
        checked_rows: filled.checked_rows,
        max_rel_diff: filled.max_rel_diff,
        method,
        direct_error_bound: if exact {
            "0".into()
        } else {
            decimal::short(&filled.worst_bound)
        },
    })
}

/// The rule as written (not the solver's re-oriented copy) with values substituted: the
/// direct product must not share any step with the closed form.
pub fn numeric_ratio(problem: &Problem, values: &BTreeMap<String, Q>) -> NumericRatio {
    let constant = problem
        .ratio
        .constant
        .eval(values)
        .expect("all parameters have values");
    NumericRatio {
        constant: to_rug_rational(&constant),
        factors: problem
            .ratio
            .factors
            .iter()
            .map(|f| NumericFactor {
                k_sign: match f.orientation {
                    Orientation::Rising => 1,
                    Orientation::Falling => -1,
                },
                offset: to_rug_rational(&f.shift.eval(values).expect("all parameters have values")),
                exponent: f.exponent,
            })
            .collect(),
    }
}

/// Offsets (from the first row) to check: 0, the last, and a log-spaced set between.
pub fn sample_offsets(rows: u64, all: bool) -> Vec<u64> {
    if rows == 0 {
        return Vec::new();
    }
    if all || rows <= SAMPLE_ROWS as u64 + 2 {
        return (0..rows).collect();
    }
    let last = rows - 1;
    let mut out = vec![0, last];
    let span = (last as f64).ln();
    for i in 1..=SAMPLE_ROWS {
        // Row choice only; no reported digit depends on this floating-point step.
        let offset = (span * i as f64 / (SAMPLE_ROWS + 1) as f64).exp().round() as u64;
        out.push(offset.min(last));
    }
    out.sort_unstable();
    out.dedup();
    out
}

/// The base value as a rug rational (for callers that evaluate single values).
pub fn base_as_rational(q: &Q) -> Rational {
    to_rug_rational(q)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn samples_include_first_and_last() {
        let s = sample_offsets(100_000, false);
        assert_eq!(s.first(), Some(&0));
        assert_eq!(s.last(), Some(&99_999));
        assert!(s.len() > 20 && s.len() <= SAMPLE_ROWS + 2);
        assert_eq!(sample_offsets(5, false), vec![0, 1, 2, 3, 4]);
    }
}

/// A table of the distribution: a(b) chosen so that the total over the support is 1.
#[derive(Clone, Debug, PartialEq)]
pub struct NormalizedTable {
    pub table: Table,
    /// a(b) = 1/Σ a(k), to the table's digits.
    pub base_value: String,
    /// Bound on the relative error of a(b), hence on |Σ_all a(k) − 1|.
    pub total_error_bound: String,
    /// How the total was found (closed form or numeric sum).
    pub method: String,
    /// The printed rows added up exactly.
    pub rows_sum: String,
    /// Half a unit in the last printed place, summed over the rows: how far `rows_sum` may be
    /// from the sum of the unrounded values.
    pub rows_rounding_bound: String,
}

/// `table --normalize`: the total from the analysis, then the table with a(b) = 1/total.
pub fn build_normalized_table(
    problem: &Problem,
    solution: &Solution,
    request: &TableRequest,
) -> Result<NormalizedTable, Diagnostic> {
    let (base, method) =
        crate::analysis::normalizing_base_value(problem, solution, request.digits)?;
    normalized_table_with(&base, method, request, |r| {
        build_table(problem, solution, r)
    })
}

/// The table built by `build` from a(b) = `base` (1/total, with its bound), and the checks of
/// a normalised table: the printed rows added up, with the rounding they carry.
pub fn normalized_table_with(
    base: &crate::analysis::Bounded,
    method: String,
    request: &TableRequest,
    build: impl FnOnce(&TableRequest) -> Result<Table, Diagnostic>,
) -> Result<NormalizedTable, Diagnostic> {
    // The binary value is an exact rational: the table's running product starts from it.
    let base_q: Rational = match &base.exact {
        Some(q) => q.clone(),
        None => base.value.to_rational().unwrap_or_default(),
    };
    let base_value = Q::new(to_bigint(base_q.numer()), to_bigint(base_q.denom()));
    let mut normalized_request = request.clone();
    normalized_request.base_value = base_value;
    let table = build(&normalized_request)?;
    let mut rows_sum = Rational::new();
    let mut rounding = Float::new(64);
    for row in &table.rows {
        let value = crate::algebra::parse_q(&row.direct).unwrap_or_default();
        let value = to_rug_rational(&value);
        // Half a unit in the last of `digits` significant digits: ≤ 5·10^(−digits)·|value|.
        let ulp = Float::with_val(64, &value).abs()
            * Float::with_val(64, 10u32).pow(-(request.digits as i32))
            * 5u32;
        rounding += ulp;
        rows_sum += value;
    }
    let relative = base.relative_error();
    Ok(NormalizedTable {
        base_value: match &base.exact {
            Some(q) => decimal::rational_to_decimal(q, request.digits),
            None => decimal::float_to_decimal(&base.value, request.digits),
        },
        total_error_bound: if base.exact.is_some() {
            "0".into()
        } else {
            decimal::short(&relative)
        },
        method,
        rows_sum: decimal::rational_to_decimal(&rows_sum, request.digits + 3),
        rows_rounding_bound: decimal::short(&rounding),
        table,
    })
}

fn to_bigint(n: &rug::Integer) -> BigInt {
    n.to_string()
        .parse()
        .expect("an integer prints as an integer")
}
