//! The evidence table: a(k) by direct product for a range of k, the closed form evaluated
//! independently at a log-spaced sample of rows (or every row), and their relative difference.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::ToPrimitive;
use rug::ops::Pow;
use rug::{Float, Rational};

use crate::algebra::Q;
use crate::diagnostic::Diagnostic;
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

/// Builds the table for a solved problem. Every parameter must have a value.
pub fn build_table(
    problem: &Problem,
    solution: &Solution,
    request: &TableRequest,
) -> Result<Table, Diagnostic> {
    let here = problem.rule_span.clone();
    let values = &solution.values;
    let missing: Vec<&str> = problem
        .params
        .iter()
        .filter(|p| !values.contains_key(&p.name))
        .map(|p| p.name.as_str())
        .collect();
    if !missing.is_empty() {
        let example = missing
            .iter()
            .map(|m| format!("--param {m}=…"))
            .collect::<Vec<_>>()
            .join(" ");
        return Err(Diagnostic::new(
            format!(
                "a table needs a value for every parameter; missing: {}",
                missing.join(", ")
            ),
            here,
        )
        .with_help(format!("add {example}")));
    }
    let base = &solution.base_index;
    if request.from < *base {
        return Err(Diagnostic::new(
            format!(
                "the table starts at k = {} but the sequence starts at its base term k = {base}",
                request.from
            ),
            here,
        )
        .with_help(format!("use --k {base}..{}", request.to)));
    }
    if request.to < request.from {
        return Err(Diagnostic::new(
            "the range of k is empty (A > B in --k A..B)",
            here,
        ));
    }
    let rows = (&request.to - &request.from + 1u32)
        .to_u64()
        .unwrap_or(u64::MAX);
    if rows > MAX_ROWS {
        return Err(Diagnostic::new(
            format!("{rows} rows is too many for one table (at most {MAX_ROWS})"),
            here,
        ));
    }
    let steps = (&request.to - base).to_u64().unwrap_or(u64::MAX);
    if steps > MAX_STEPS {
        return Err(Diagnostic::new(
            format!("the direct product up to k = {} needs {steps} multiplications (at most {MAX_STEPS})", request.to),
            here,
        )
        .with_help("the direct product runs from the base term; for large k, `telescope solve --param …` gives the tail law with its prefactor and corrections"));
    }
    let ratio = numeric_ratio(problem, values);
    let exact = steps <= EXACT_STEPS;
    let base_value = to_rug_rational(&request.base_value);
    let mut run = RunningProduct::new(
        ratio,
        to_rug_integer(base),
        base_value.clone(),
        exact,
        request.digits,
        steps,
    );
    let direct_error = |e: DirectError| -> Diagnostic {
        match e {
            DirectError::ZeroDenominator { k, .. } => Diagnostic::new(
                format!("with these parameter values the rule divides by zero at k = {k}"),
                problem.rule_span.clone(),
            ),
            DirectError::BeforeBase { k } => Diagnostic::new(
                format!("k = {k} lies before the base term"),
                problem.rule_span.clone(),
            ),
            DirectError::TooManySteps { steps, limit } => Diagnostic::new(
                format!("{steps} steps exceed the limit {limit}"),
                problem.rule_span.clone(),
            ),
        }
    };
    let from = to_rug_integer(&request.from);
    while *run.index() < from {
        run.step().map_err(direct_error)?;
    }
    let sample = sample_offsets(rows, request.check_all);
    let mut out_rows = Vec::with_capacity(rows as usize);
    let mut checked_rows = Vec::new();
    let mut max_rel = Float::new(64);
    let mut worst_bound = Float::new(64);
    let mut next_sample = 0usize;
    for offset in 0..rows {
        if offset > 0 {
            run.step().map_err(direct_error)?;
        }
        let k = &request.from + BigInt::from(offset);
        let value = run.value();
        let direct = direct_decimal(&value, request.digits);
        if let DirectValue::Approx {
            rel_error_bound, ..
        } = &value
        {
            if *rel_error_bound > worst_bound {
                worst_bound = rel_error_bound.clone();
            }
        }
        let mut row = Row {
            k: k.clone(),
            direct,
            closed: None,
            rel_diff: None,
        };
        if next_sample < sample.len() && sample[next_sample] == offset {
            next_sample += 1;
            let closed = evaluate_closed_form(
                &solution.closed_form,
                &k,
                values,
                &base_value,
                request.digits,
            )
            .map_err(|e| {
                Diagnostic::new(
                    format!("the closed form cannot be evaluated at k = {k}: {e:?}"),
                    problem.rule_span.clone(),
                )
            })?;
            let prec = closed.ln_abs.prec().max(64);
            let direct_log = direct_log(&value, prec);
            let rel = direct_log.rel_diff(&closed, 64);
            if rel > max_rel {
                max_rel = rel.clone();
            }
            row.closed = Some(closed.to_decimal(request.digits));
            row.rel_diff = Some(decimal::short(&rel));
            checked_rows.push(k);
        }
        out_rows.push(row);
    }
    let bits = match run.value() {
        DirectValue::Approx { mantissa, .. } => Some(mantissa.prec()),
        DirectValue::Exact(_) => None,
    };
    Ok(Table {
        digits: request.digits,
        params: values.clone(),
        base_value: request.base_value.clone(),
        rows: out_rows,
        checked_rows,
        max_rel_diff: decimal::short(&max_rel),
        method: match bits {
            Some(bits) => DirectMethod::Mpfr { bits },
            None => DirectMethod::Exact,
        },
        direct_error_bound: if exact {
            "0".into()
        } else {
            decimal::short(&worst_bound)
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

fn direct_decimal(value: &DirectValue, digits: u32) -> String {
    match value {
        DirectValue::Exact(q) => decimal::rational_to_decimal(q, digits),
        DirectValue::Approx { mantissa, exp2, .. } => {
            if *exp2 == 0 {
                decimal::float_to_decimal(mantissa, digits)
            } else {
                let prec = mantissa.prec() + 64;
                LogReal::from_scaled(mantissa, *exp2, prec).to_decimal(digits)
            }
        }
    }
}

fn direct_log(value: &DirectValue, prec: u32) -> LogReal {
    match value {
        DirectValue::Exact(q) => LogReal::from_rational(q, prec),
        DirectValue::Approx { mantissa, exp2, .. } => LogReal::from_scaled(mantissa, *exp2, prec),
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
    // The binary value is an exact rational: the table's running product starts from it.
    let base_q: Rational = match &base.exact {
        Some(q) => q.clone(),
        None => base.value.to_rational().unwrap_or_default(),
    };
    let base_value = Q::new(to_bigint(base_q.numer()), to_bigint(base_q.denom()));
    let mut normalized_request = request.clone();
    normalized_request.base_value = base_value;
    let table = build_table(problem, solution, &normalized_request)?;
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
