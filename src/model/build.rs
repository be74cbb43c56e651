//! From a parsed model file to a [`Problem`]: find the rule, its sequence and index, the
//! first index from the `for` clause, and the parameters with their declared ranges.

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use crate::algebra::Q;
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{
    self, BinOp, CmpOp, Expr, ExprKind, ParamConstraint, RangeClause, StatementKind,
};

use super::expr::{to_product, Names};
use super::normal_form::normal_form;
use super::problem::{Param, Problem};

/// Default first index of a rule without `for`: the base term is a(1).
pub const DEFAULT_FIRST_INDEX: i64 = 2;

/// Sequence name used for a bare ratio expression.
pub const DEFAULT_SEQUENCE: &str = "a";

/// The largest first index accepted (absurd sizes are refused, not attempted).
const MAX_FIRST_INDEX: i64 = 1_000_000_000_000_000_000;

/// Parses and interprets a model (a file or a one-line rule).
pub fn build_problem(text: &str) -> Result<Problem, Diagnostic> {
    let model = syntax::parse_model(text)?;
    let mut declared: Vec<Param> = Vec::new();
    let mut rule: Option<(&syntax::Statement, RuleShape)> = None;
    for statement in &model.statements {
        match &statement.kind {
            StatementKind::Param(decl) => {
                for (name, span) in &decl.names {
                    if declared.iter().any(|p| &p.name == name) {
                        return Err(Diagnostic::new(
                            format!("parameter `{name}` is declared twice"),
                            span.clone(),
                        ));
                    }
                    declared.push(param_from_decl(name, span, decl)?);
                }
            }
            StatementKind::Equation { lhs, rhs, range } => {
                let shape = ratio_lhs(lhs)?;
                if rule.is_some() {
                    return Err(one_rule_only(statement.span.clone()));
                }
                rule = Some((
                    statement,
                    RuleShape {
                        sequence: shape.0,
                        index: shape.1,
                        rhs: rhs.clone(),
                        range: range.clone(),
                    },
                ));
            }
            StatementKind::Bare { expr, range } => {
                if rule.is_some() {
                    return Err(one_rule_only(statement.span.clone()));
                }
                let index = range
                    .as_ref()
                    .map(|r| r.var.clone())
                    .unwrap_or_else(|| "k".to_string());
                rule = Some((
                    statement,
                    RuleShape {
                        sequence: DEFAULT_SEQUENCE.to_string(),
                        index,
                        rhs: expr.clone(),
                        range: range.clone(),
                    },
                ));
            }
        }
    }
    let Some((statement, shape)) = rule else {
        return Err(Diagnostic::new(
            "no rule found: the input declares parameters but gives no ratio",
            text.len()..text.len(),
        )
        .with_help("add a line such as  n(k)/n(k-1) = (k-1)/(k+2)  for k >= 2"));
    };
    let first_index = first_index(shape.range.as_ref(), &shape.index)?;
    let mut names = Names {
        index: &shape.index,
        sequence: &shape.sequence,
        params: Vec::new(),
    };
    let form = to_product(&shape.rhs, &mut names)?;
    let ratio = normal_form(&form, &shape.index)?;
    let mut params = declared.clone();
    for name in &names.params {
        if !params.iter().any(|p| &p.name == name) {
            params.push(Param::undeclared(name));
        }
    }
    Ok(Problem {
        sequence: shape.sequence,
        index: shape.index.clone(),
        params,
        ratio,
        first_index,
        divisors: form.divisors,
        rule_span: statement.span.clone(),
    })
}

struct RuleShape {
    sequence: String,
    index: String,
    rhs: Expr,
    range: Option<RangeClause>,
}

fn one_rule_only(span: Span) -> Diagnostic {
    Diagnostic::new("a second rule: a model holds one ratio rule", span)
        .with_help("split the model into separate files, one rule each")
}

/// Recognises `n(k)/n(k-1)` or `n_k/n_{k-1}` and returns (sequence, index).
fn ratio_lhs(lhs: &Expr) -> Result<(String, String), Diagnostic> {
    let expected = || {
        Diagnostic::new(
            "expected the ratio of consecutive terms on the left, like n(k)/n(k-1)",
            lhs.span.clone(),
        )
        .with_help("write the rule as  n(k)/n(k-1) = R(k)  (or just R(k) on its own)")
    };
    let ExprKind::Binary {
        op: BinOp::Div,
        lhs: top,
        rhs: bottom,
    } = &lhs.kind
    else {
        return Err(expected());
    };
    let (name_top, index_top) = sequence_term(top).ok_or_else(expected)?;
    let ExprKind::Ident(index) = &index_top.kind else {
        return Err(Diagnostic::new(
            "the numerator of the left side must be the sequence at the plain index, like n(k)",
            index_top.span.clone(),
        ));
    };
    let (name_bottom, index_bottom) = sequence_term(bottom).ok_or_else(expected)?;
    if name_bottom != name_top {
        return Err(Diagnostic::new(
            format!("expected `{name_top}` here, the same sequence as in the numerator"),
            bottom.span.clone(),
        ));
    }
    let previous = matches!(&index_bottom.kind,
        ExprKind::Binary { op: BinOp::Sub, lhs: l, rhs: r }
            if matches!(&l.kind, ExprKind::Ident(i) if i == index)
            && matches!(&r.kind, ExprKind::Number(q) if *q == Q::from_integer(1.into())));
    if !previous {
        return Err(Diagnostic::new(
            format!("the denominator must be the previous term, {name_top}({index}-1)"),
            index_bottom.span.clone(),
        ));
    }
    Ok((name_top, index.clone()))
}

fn sequence_term(e: &Expr) -> Option<(String, &Expr)> {
    match &e.kind {
        ExprKind::Call { name, args, .. } if args.len() == 1 => Some((name.clone(), &args[0])),
        ExprKind::Subscript { name, index } => Some((name.clone(), index)),
        _ => None,
    }
}

fn first_index(range: Option<&RangeClause>, index: &str) -> Result<BigInt, Diagnostic> {
    let Some(range) = range else {
        return Ok(BigInt::from(DEFAULT_FIRST_INDEX));
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
    if let Some(upper) = &range.upper {
        return Err(Diagnostic::new(
            "an upper bound on the index is not supported for a single rule",
            upper.value.span.clone(),
        )
        .with_help("a finite support follows from the rule itself, e.g. a factor (N - k + 1)"));
    }
    let Some(lower) = &range.lower else {
        return Err(Diagnostic::new(
            "the range needs a lower bound, e.g. k >= 2",
            range.span.clone(),
        ));
    };
    let value = constant_value(&lower.value)?;
    if !value.is_integer() {
        return Err(Diagnostic::new(
            "the first index must be a whole number",
            lower.value.span.clone(),
        ));
    }
    let mut m = value.to_integer();
    if lower.strict {
        m += 1;
    }
    if m.to_i64()
        .map(|v| v.abs() > MAX_FIRST_INDEX)
        .unwrap_or(true)
    {
        return Err(Diagnostic::new(
            "the first index is absurdly large (at most 10^18 in size)",
            lower.value.span.clone(),
        ));
    }
    Ok(m)
}

/// A number written as an expression (`3`, `-1/2`, `0.25`); parameters are not allowed here.
fn constant_value(e: &Expr) -> Result<Q, Diagnostic> {
    let mut names = Names {
        index: "",
        sequence: "",
        params: Vec::new(),
    };
    let form = to_product(e, &mut names)?;
    let value = if form.factors.is_empty() && names.params.is_empty() {
        form.constant.as_constant()
    } else {
        None
    };
    value.ok_or_else(|| {
        Diagnostic::new("expected a number here", e.span.clone())
            .with_help("bounds and ranges must be numbers such as 2, 1/2 or 0.25")
    })
}

fn param_from_decl(name: &str, span: &Span, decl: &syntax::ParamDecl) -> Result<Param, Diagnostic> {
    if name == "k" {
        return Err(Diagnostic::new(
            "`k` is the index and cannot be a parameter",
            span.clone(),
        ));
    }
    let mut param = Param::undeclared(name);
    param.integer = decl.integer;
    param.declared_at = Some(span.clone());
    match &decl.constraint {
        ParamConstraint::None => {}
        ParamConstraint::Interval {
            lo,
            lo_closed,
            hi,
            hi_closed,
        } => {
            let (lo_value, hi_value) = (constant_value(lo)?, constant_value(hi)?);
            if lo_value > hi_value || (lo_value == hi_value && !(*lo_closed && *hi_closed)) {
                return Err(Diagnostic::new(
                    format!("the range of `{name}` is empty"),
                    lo.span.start..hi.span.end,
                ));
            }
            param.lower = Some((lo_value, *lo_closed));
            param.upper = Some((hi_value, *hi_closed));
        }
        ParamConstraint::Compare { op, value } => {
            let v = constant_value(value)?;
            match op {
                CmpOp::Gt => param.lower = Some((v, false)),
                CmpOp::Ge => param.lower = Some((v, true)),
                CmpOp::Lt => param.upper = Some((v, false)),
                CmpOp::Le => param.upper = Some((v, true)),
            }
        }
    }
    Ok(param)
}
