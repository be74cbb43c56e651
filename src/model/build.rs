//! From a parsed model file to a [`Model`] (and, for one rule, a [`Problem`]): sort the
//! statements into parameters, rules (ratios and balance equations), rates and a boundary
//! equation; find the sequence and the index; read each piece's range.

use std::collections::BTreeMap;

use crate::algebra::{RatFunc, Q};
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{
    self, BinOp, CmpOp, Expr, ExprKind, ParamConstraint, RangeClause, StatementKind,
};

use super::balance::balance_rule;
use super::boundary::boundary_value;
use super::derivation::{Derivation, RuleSource};
use super::expr::{to_product, Names, CONSTANT_NAMES, FUNCTION_NAMES};
use super::linear::collect_equation;
use super::normal_form::normal_form;
use super::piecewise::{check_consecutive, index_range};
use super::problem::{Model, Param, Piece, Problem};
use super::rates::{rate_lhs, rate_pieces, RateStatement};

/// Default first index of a rule without `for`: the base term is a(1).
pub const DEFAULT_FIRST_INDEX: i64 = 2;

/// Sequence name used for a bare ratio expression.
pub const DEFAULT_SEQUENCE: &str = "a";

/// Names tried, in order, for the sequence of a bare ratio when `a` is taken.
const SPARE_SEQUENCE_NAMES: [&str; 8] = ["u", "v", "w", "y", "f", "g", "h", "q"];

/// The sequence name of a bare ratio: [`DEFAULT_SEQUENCE`] unless the expression uses it as a
/// plain name (a parameter: in a bare ratio no sequence term is written, so `a` without an
/// index argument is not one) or a `param` declares it; then the first spare name not used.
fn bare_sequence_name(parsed: &syntax::Model, expr: &Expr, index: &str) -> String {
    let mut used: Vec<String> = vec![index.to_string()];
    expr.walk(&mut |node| {
        if let ExprKind::Ident(name) = &node.kind {
            used.push(name.clone());
        }
    });
    for statement in &parsed.statements {
        if let StatementKind::Param(decl) = &statement.kind {
            used.extend(decl.names.iter().map(|(name, _)| name.clone()));
        }
    }
    let free = |name: &str| !used.iter().any(|u| u == name);
    std::iter::once(DEFAULT_SEQUENCE)
        .chain(SPARE_SEQUENCE_NAMES)
        .find(|name| free(name))
        .map(str::to_string)
        .unwrap_or_else(|| {
            (1u32..)
                .map(|i| format!("{DEFAULT_SEQUENCE}{i}"))
                .find(|name| free(name))
                .expect("a free name")
        })
}

/// Sequence name of a model given only by rates (π in the texts; `pi` is the constant).
pub const RATES_SEQUENCE: &str = "p";

/// Parses and interprets a model of one rule (a file or a one-line rule): the [`Problem`]
/// that `solve` takes. A piecewise model is refused here; [`build_model`] reads it.
pub fn build_problem(text: &str) -> Result<Problem, Diagnostic> {
    let model = build_model(text)?;
    if model.is_piecewise() {
        return Err(Diagnostic::new(
            format!(
                "this model has {} piece(s) or a bounded state space; a single problem holds one open-ended rule",
                model.pieces.len()
            ),
            model
                .pieces
                .get(1)
                .map(|p| p.span.clone())
                .or_else(|| model.pieces.last().and_then(|p| p.range_span.clone()))
                .unwrap_or(0..0),
        )
        .with_help("read it with build_model and solve it piece by piece (telescope solve does)"));
    }
    let mut resolved = model.resolve(&BTreeMap::new())?;
    Ok(resolved.remove(0).problem)
}

/// A rule statement before interpretation.
enum RuleStatement<'a> {
    /// `n(k)/n(k-1) = rhs` or a bare `rhs`.
    Ratio {
        sequence: String,
        index: String,
        rhs: &'a Expr,
        range: Option<&'a RangeClause>,
        statement: &'a syntax::Statement,
    },
    /// Any other equation that involves the index: a balance.
    Balance {
        lhs: &'a Expr,
        rhs: &'a Expr,
        range: Option<&'a RangeClause>,
        statement: &'a syntax::Statement,
    },
}

impl RuleStatement<'_> {
    fn statement(&self) -> &syntax::Statement {
        match self {
            RuleStatement::Ratio { statement, .. } | RuleStatement::Balance { statement, .. } => {
                statement
            }
        }
    }

    fn range(&self) -> Option<&RangeClause> {
        match self {
            RuleStatement::Ratio { range, .. } | RuleStatement::Balance { range, .. } => *range,
        }
    }
}

/// Parses and interprets a whole model: ratio rules, balance equations or birth and death
/// rates (one or several pieces on consecutive index ranges), a boundary equation for the
/// base term, and the parameters.
pub fn build_model(text: &str) -> Result<Model, Diagnostic> {
    let parsed = syntax::parse_model(text)?;
    super::size::judge_model(&parsed)?;
    let mut declared: Vec<Param> = Vec::new();
    let mut rules: Vec<RuleStatement> = Vec::new();
    let mut rate_statements: Vec<RateStatement> = Vec::new();
    let mut others: Vec<&syntax::Statement> = Vec::new();
    for statement in &parsed.statements {
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
                if let Some((kind, arg)) = rate_lhs(lhs) {
                    let ExprKind::Ident(var) = &arg.kind else {
                        return Err(Diagnostic::new(
                            "a rate is given at the plain index, like birth(k) = …",
                            arg.span.clone(),
                        ));
                    };
                    rate_statements.push(RateStatement {
                        kind,
                        var: var.clone(),
                        expr: rhs,
                        range: range.as_ref(),
                        span: statement.span.clone(),
                        text: text[statement.span.clone()].to_string(),
                    });
                } else if looks_like_ratio(lhs) {
                    let (sequence, index) = ratio_lhs(lhs)?;
                    rules.push(RuleStatement::Ratio {
                        sequence,
                        index,
                        rhs,
                        range: range.as_ref(),
                        statement,
                    });
                } else {
                    others.push(statement);
                }
            }
            StatementKind::Bare { expr, range } => {
                let index = range
                    .as_ref()
                    .map(|r| r.var.clone())
                    .unwrap_or_else(|| "k".to_string());
                rules.push(RuleStatement::Ratio {
                    sequence: bare_sequence_name(&parsed, expr, &index),
                    index,
                    rhs: expr,
                    range: range.as_ref(),
                    statement,
                });
            }
        }
    }
    let index = rules
        .iter()
        .find_map(|r| match r {
            RuleStatement::Ratio { index, .. } => Some(index.clone()),
            RuleStatement::Balance { .. } => None,
        })
        .or_else(|| {
            others
                .iter()
                .find_map(|s| statement_range(s).map(|r| r.var.clone()))
        })
        .or_else(|| rate_statements.first().map(|r| r.var.clone()))
        .unwrap_or_else(|| "k".to_string());
    let mut boundaries: Vec<&syntax::Statement> = Vec::new();
    for statement in others {
        let StatementKind::Equation { lhs, rhs, range } = &statement.kind else {
            unreachable!("only equations are kept")
        };
        if range.is_some() || uses_name(lhs, &index) || uses_name(rhs, &index) {
            rules.push(RuleStatement::Balance {
                lhs,
                rhs,
                range: range.as_ref(),
                statement,
            });
        } else {
            boundaries.push(statement);
        }
    }
    rules.sort_by_key(|r| r.statement().span.start);
    if let (true, true, Some(first)) = (
        rules.is_empty(),
        rate_statements.is_empty(),
        boundaries.first(),
    ) {
        return Err(Diagnostic::new(
            "this equation fixes one term, but the model has no rule for general k",
            first.span.clone(),
        )
        .with_help("add the rule, e.g. a balance such as (k+2) n(k) = (k-1) n(k-1) for k >= 2"));
    }
    if rules.is_empty() && rate_statements.is_empty() {
        return Err(Diagnostic::new(
            "no rule found: the input declares parameters but gives no ratio",
            text.len()..text.len(),
        )
        .with_help("add a line such as  n(k)/n(k-1) = (k-1)/(k+2)  for k >= 2"));
    }
    if let (Some(rule), Some(rate)) = (rules.first(), rate_statements.first()) {
        let (a, b) = (rule.statement().span.clone(), rate.span.clone());
        let later = if a.start > b.start { a } else { b };
        return Err(Diagnostic::new(
            "a model gives either rules (ratios, balance equations) or birth and death rates, not both",
            later,
        ));
    }
    let sequence = match rules.iter().find_map(|r| match r {
        RuleStatement::Ratio { sequence, .. } => Some(sequence.clone()),
        RuleStatement::Balance { .. } => None,
    }) {
        Some(s) => s,
        None => {
            let mut candidates: Vec<&syntax::Statement> =
                rules.iter().map(|r| r.statement()).collect();
            candidates.extend(boundaries.iter().copied());
            discover_sequence(&candidates, &index, &declared)?
                .unwrap_or_else(|| RATES_SEQUENCE.to_string())
        }
    };
    let mut discovered: Vec<String> = Vec::new();
    let mut pieces = if rate_statements.is_empty() {
        rule_pieces(&rules, &sequence, &index, &declared, &mut discovered, text)?
    } else {
        rate_pieces(&rate_statements, &sequence, &declared, &mut discovered)?
    };
    check_consecutive(&pieces)?;
    let boundary = match boundaries.as_slice() {
        [] => None,
        [_, second, ..] => {
            return Err(Diagnostic::new(
                "a second boundary equation: the base term is fixed once",
                second.span.clone(),
            ))
        }
        [one] => {
            let StatementKind::Equation { lhs, rhs, .. } = &one.kind else {
                unreachable!("only equations are kept")
            };
            let mut names = Names {
                index: &index,
                sequence: &sequence,
                params: std::mem::take(&mut discovered),
                work: 0,
            };
            let form = collect_equation(lhs, rhs, &mut names);
            discovered = names.params;
            let value = boundary_value(
                &form?,
                &sequence,
                text[one.span.clone()].to_string(),
                one.span.clone(),
            )?;
            let base = &pieces[0].first - &RatFunc::one();
            if base != RatFunc::constant(Q::from_integer(value.index.clone())) {
                return Err(Diagnostic::new(
                    format!(
                        "this fixes {sequence}({}), but the rule's base term is {sequence}({base})",
                        value.index
                    ),
                    one.span.clone(),
                )
                .with_help("a boundary equation gives the base term, the one just before the rule's first index"));
            }
            pieces[0].divisors.extend(value.divisors.iter().cloned());
            Some(value)
        }
    };
    let mut params = declared;
    for name in &discovered {
        if !params.iter().any(|p| &p.name == name) {
            params.push(Param::undeclared(name));
        }
    }
    Ok(Model {
        sequence,
        index,
        params,
        pieces,
        boundary,
    })
}

fn statement_range(s: &syntax::Statement) -> Option<&RangeClause> {
    match &s.kind {
        StatementKind::Equation { range, .. } | StatementKind::Bare { range, .. } => range.as_ref(),
        StatementKind::Param(_) => None,
    }
}

/// Pieces from ratio rules and balance equations, in the order written.
fn rule_pieces(
    rules: &[RuleStatement],
    sequence: &str,
    index: &str,
    declared: &[Param],
    discovered: &mut Vec<String>,
    text: &str,
) -> Result<Vec<Piece>, Diagnostic> {
    let mut pieces = Vec::new();
    for (i, rule) in rules.iter().enumerate() {
        let statement = rule.statement();
        if i > 0 && (rule.range().is_none() || rules[0].range().is_none()) {
            return Err(Diagnostic::new(
                "a second rule: each rule of a model needs its own index range",
                statement.span.clone(),
            )
            .with_help("give the pieces consecutive ranges, e.g. `for 1 <= k <= c` and `for k > c`, or split the model into separate files"));
        }
        let written = vec![(
            text[statement.span.clone()].to_string(),
            statement.span.clone(),
        )];
        let mut names = Names {
            index,
            sequence,
            params: std::mem::take(discovered),
            work: 0,
        };
        let built = match rule {
            RuleStatement::Ratio {
                sequence: own,
                index: own_index,
                rhs,
                ..
            } => {
                if own != sequence || own_index != index {
                    return Err(Diagnostic::new(
                        format!("every piece must be a rule for {sequence}({index})"),
                        statement.span.clone(),
                    ));
                }
                to_product(rhs, &mut names).and_then(|form| {
                    let ratio = normal_form(&form, index)?;
                    Ok((ratio, form, RuleSource::Ratio, Vec::new(), 0))
                })
            }
            RuleStatement::Balance { lhs, rhs, .. } => collect_equation(lhs, rhs, &mut names)
                .and_then(|form| balance_rule(&form, sequence, index, statement.span.clone()))
                .map(|b| (b.ratio, b.form, b.source, b.assumptions, b.index_shift)),
        };
        *discovered = names.params;
        let (ratio, form, source, assumptions, shift) = built?;
        let range = index_range(rule.range(), index, DEFAULT_FIRST_INDEX, declared)?;
        // Without `for` the default speaks of the rule (base term a(1)), not of the equation.
        let shift = RatFunc::from_integer(if rule.range().is_some() { shift } else { 0 });
        pieces.push(Piece {
            ratio,
            first: &range.first + &shift,
            last: range.last.map(|(l, _)| &l + &shift),
            divisors: form.divisors,
            span: statement.span.clone(),
            range_span: range.span,
            derivation: Derivation {
                source,
                written,
                assumptions,
            },
        });
    }
    Ok(pieces)
}

/// `n(k)/n(k-1)` shape on the left: two sequence-like terms of the same name divided.
fn looks_like_ratio(lhs: &Expr) -> bool {
    let ExprKind::Binary {
        op: BinOp::Div,
        lhs: top,
        rhs: bottom,
    } = &lhs.kind
    else {
        return false;
    };
    match (sequence_term(top), sequence_term(bottom)) {
        (Some((a, _)), Some((b, _))) => a == b,
        _ => false,
    }
}

fn uses_name(e: &Expr, name: &str) -> bool {
    let mut found = false;
    e.walk(&mut |node| {
        if matches!(&node.kind, ExprKind::Ident(n) if n == name)
            || matches!(&node.kind, ExprKind::Call { name: n, .. } if n == name)
        {
            found = true;
        }
    });
    found
}

/// The sequence of a balance or boundary equation: the one name applied to an index
/// (`n(k-1)`, `n(1)`, `n_k`) that is not the index, a declared parameter or a function.
fn discover_sequence(
    statements: &[&syntax::Statement],
    index: &str,
    declared: &[Param],
) -> Result<Option<String>, Diagnostic> {
    let mut found: Vec<(String, Span)> = Vec::new();
    for statement in statements {
        let StatementKind::Equation { lhs, rhs, .. } = &statement.kind else {
            continue;
        };
        for side in [lhs, rhs] {
            side.walk(&mut |node| {
                let candidate = match &node.kind {
                    ExprKind::Call {
                        name,
                        args,
                        spaced: false,
                        ..
                    } if args.len() == 1 && is_index_position(&args[0], index) => Some(name),
                    ExprKind::Subscript { name, index: sub }
                        if uses_name(sub, index) && is_index_position(sub, index) =>
                    {
                        Some(name)
                    }
                    _ => None,
                };
                if let Some(name) = candidate {
                    let excluded = name == index
                        || FUNCTION_NAMES.contains(&name.as_str())
                        || CONSTANT_NAMES.contains(&name.as_str())
                        || declared.iter().any(|p| &p.name == name);
                    if !excluded && !found.iter().any(|(n, _)| n == name) {
                        found.push((name.clone(), node.span.clone()));
                    }
                }
            });
        }
    }
    match found.as_slice() {
        [] => match statements.first() {
            Some(first) => Err(Diagnostic::new(
                "this equation has no term of a sequence, like n(k) or n(k-1)",
                first.span.clone(),
            )
            .with_help(
                "write a ratio n(k)/n(k-1) = R(k) or a balance such as (k+2) n(k) = (k-1) n(k-1)",
            )),
            None => Ok(None),
        },
        [(name, _)] => Ok(Some(name.clone())),
        [(first, _), (second, span), ..] => Err(Diagnostic::new(
            format!(
                "both `{first}` and `{second}` are applied to an index: which one is the sequence?"
            ),
            span.clone(),
        )
        .with_help(format!(
            "declare the parameter (`param {second} > 0`) or put a space or `*` between it and the bracket"
        ))),
    }
}

/// An index argument: numbers and the index only (`k`, `k-1`, `k+1`, `1`).
fn is_index_position(e: &Expr, index: &str) -> bool {
    let mut ok = true;
    e.walk(&mut |node| match &node.kind {
        ExprKind::Number(_) | ExprKind::Neg(_) => {}
        ExprKind::Binary { op, .. } => {
            if !matches!(op, BinOp::Add | BinOp::Sub) {
                ok = false
            }
        }
        ExprKind::Ident(n) if n == index => {}
        _ => ok = false,
    });
    ok
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

/// A number written as an expression (`3`, `-1/2`, `0.25`); parameters are not allowed here.
fn constant_value(e: &Expr) -> Result<Q, Diagnostic> {
    let mut names = Names {
        index: "",
        sequence: "",
        params: Vec::new(),
        work: 0,
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
