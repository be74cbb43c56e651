//! Index ranges of rule pieces (`for k >= 2`, `for 1 <= k <= c`, `for k > c`) and the check
//! that pieces follow each other without gap or overlap.

use num_traits::ToPrimitive;

use crate::algebra::RatFunc;
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{Expr, RangeClause};

use super::expr::{to_product, Names};
use super::problem::{Param, Piece};

/// The largest bound accepted (absurd sizes are refused, not attempted).
const MAX_BOUND: i64 = 1_000_000_000_000_000_000;

/// Where a piece holds: `first ≤ k ≤ last` (no `last`: to infinity).
#[derive(Clone, Debug)]
pub struct IndexRange {
    pub first: RatFunc,
    pub last: Option<(RatFunc, Span)>,
    pub span: Option<Span>,
}

/// Reads a range clause; `default_first` applies when there is none. Bounds are whole numbers
/// or expressions in declared integer parameters.
pub fn index_range(
    range: Option<&RangeClause>,
    index: &str,
    default_first: i64,
    declared: &[Param],
) -> Result<IndexRange, Diagnostic> {
    let Some(range) = range else {
        return Ok(IndexRange {
            first: RatFunc::from_integer(default_first),
            last: None,
            span: None,
        });
    };
    if range.var != index {
        return Err(Diagnostic::new(
            format!(
                "the range is over `{}` but the rule's index is `{index}`",
                range.var
            ),
            range.var_span.clone(),
        ));
    }
    let Some(lower) = &range.lower else {
        return Err(Diagnostic::new(
            "the range needs a lower bound, e.g. k >= 2",
            range.span.clone(),
        ));
    };
    let mut first = bound_value(&lower.value, declared, "the first index")?;
    if lower.strict {
        first = &first + &RatFunc::one();
    }
    let last = match &range.upper {
        Some(upper) => {
            let mut last = bound_value(&upper.value, declared, "the last index")?;
            if upper.strict {
                last = &last - &RatFunc::one();
            }
            Some((last, upper.value.span.clone()))
        }
        None => None,
    };
    Ok(IndexRange {
        first,
        last,
        span: Some(range.span.clone()),
    })
}

/// A bound: a whole number, or a polynomial in declared integer parameters.
fn bound_value(e: &Expr, declared: &[Param], what: &str) -> Result<RatFunc, Diagnostic> {
    let mut names = Names {
        index: "",
        sequence: "",
        params: Vec::new(),
        work: 0,
    };
    let number_expected = || {
        Diagnostic::new("expected a number here", e.span.clone()).with_help(
            "bounds and ranges must be whole numbers such as 2, or a parameter declared `param c integer >= 1`",
        )
    };
    let form = to_product(e, &mut names).map_err(|_| number_expected())?;
    if !form.factors.is_empty() {
        return Err(number_expected());
    }
    let value = form.constant;
    if let Some(q) = value.as_constant() {
        if !q.is_integer() {
            return Err(Diagnostic::new(
                format!("{what} must be a whole number"),
                e.span.clone(),
            ));
        }
        let too_big = q
            .to_integer()
            .to_i64()
            .map(|v| v.abs() > MAX_BOUND)
            .unwrap_or(true);
        if too_big {
            return Err(Diagnostic::new(
                format!("{what} is absurdly large (at most 10^18 in size)"),
                e.span.clone(),
            ));
        }
        return Ok(value);
    }
    for name in &names.params {
        let integer = declared.iter().any(|p| &p.name == name && p.integer);
        if !integer {
            return Err(Diagnostic::new(
                format!("the bound uses `{name}`, which is not declared as an integer parameter"),
                e.span.clone(),
            )
            .with_help(format!(
                "declare it, e.g. `param {name} integer >= 1`, and give its value with --param {name}=…"
            )));
        }
    }
    if value.as_poly().is_none() {
        return Err(number_expected());
    }
    Ok(value)
}

/// Checks that each piece starts right after the previous one ends and that only the last
/// piece is open-ended.
pub fn check_consecutive(pieces: &[Piece]) -> Result<(), Diagnostic> {
    for pair in pieces.windows(2) {
        let (before, after) = (&pair[0], &pair[1]);
        let here = after.range_span.clone().unwrap_or(after.span.clone());
        let Some(last) = &before.last else {
            return Err(Diagnostic::new(
                "an earlier piece already runs to infinity, so this one never applies",
                here,
            )
            .with_help("give every piece but the last an upper bound, e.g. `for 1 <= k <= c` then `for k > c`"));
        };
        let next = last + &RatFunc::one();
        if after.first != next {
            return Err(Diagnostic::new(
                "this range must start right after the previous piece ends",
                here,
            )
            .with_help(
                "pieces must be written in order and cover consecutive ranges, e.g. `for 1 <= k <= c` then `for k > c`",
            ));
        }
    }
    Ok(())
}
