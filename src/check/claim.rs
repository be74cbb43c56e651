//! The claim language: the rule language's expressions plus special functions, read into a
//! tree where every name has its meaning (index, parameter, constant, base term, function).
//!
//! Parsing is `syntax::parse_expr`; this module only decides what each name means and
//! refuses, with the column, what has none (unknown names, wrong arity, a sequence term
//! other than the base term).

use num_bigint::BigInt;

use crate::algebra::Q;
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{BinOp, Expr, ExprKind};

/// A function of the claim language.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Function {
    Gamma,
    Beta,
    Binomial,
    Factorial,
    /// Pochhammer's rising factorial (x)_n, written `rising(x, n)` or `pochhammer(x, n)`.
    Rising,
    Exp,
    Log,
    Sqrt,
}

impl Function {
    /// The function a name stands for, if any.
    pub fn from_name(name: &str) -> Option<Function> {
        Some(match name {
            "Gamma" => Function::Gamma,
            "Beta" => Function::Beta,
            "binomial" => Function::Binomial,
            "factorial" => Function::Factorial,
            "rising" | "pochhammer" => Function::Rising,
            "exp" => Function::Exp,
            "log" => Function::Log,
            "sqrt" => Function::Sqrt,
            _ => return None,
        })
    }

    pub fn arity(self) -> usize {
        match self {
            Function::Beta | Function::Binomial | Function::Rising => 2,
            _ => 1,
        }
    }

    pub fn name(self) -> &'static str {
        match self {
            Function::Gamma => "Gamma",
            Function::Beta => "Beta",
            Function::Binomial => "binomial",
            Function::Factorial => "factorial",
            Function::Rising => "rising",
            Function::Exp => "exp",
            Function::Log => "log",
            Function::Sqrt => "sqrt",
        }
    }

    fn usage(self) -> &'static str {
        match self {
            Function::Gamma => "Gamma(x)",
            Function::Beta => "Beta(a, b)",
            Function::Binomial => "binomial(n, m)",
            Function::Factorial => "factorial(n) or n!",
            Function::Rising => "rising(x, n) (or pochhammer(x, n)) for (x)_n",
            Function::Exp => "exp(x)",
            Function::Log => "log(x)",
            Function::Sqrt => "sqrt(x)",
        }
    }
}

/// Every function name a claim may use, for messages.
pub const FUNCTION_LIST: &str =
    "Gamma, Beta, binomial, factorial (or !), rising / pochhammer, exp, log, sqrt";

#[derive(Clone, Debug, PartialEq)]
pub enum ClaimKind {
    Number(Q),
    Param(String),
    /// The index variable `k`.
    Index,
    Pi,
    /// The base term a(b), written `n(1)` (or `n_1`).
    Base,
    Neg(Box<Claim>),
    Binary(BinOp, Box<Claim>, Box<Claim>),
    Call(Function, Vec<Claim>),
}

/// A claim expression with meaning attached and the span of what the user wrote.
#[derive(Clone, Debug, PartialEq)]
pub struct Claim {
    pub kind: ClaimKind,
    pub span: Span,
}

impl Claim {
    fn new(kind: ClaimKind, span: Span) -> Self {
        Claim { kind, span }
    }

    /// Whether the index appears anywhere.
    pub fn mentions_index(&self) -> bool {
        self.any(&|c| matches!(c.kind, ClaimKind::Index))
    }

    /// Whether the base term appears anywhere.
    pub fn mentions_base(&self) -> bool {
        self.any(&|c| matches!(c.kind, ClaimKind::Base))
    }

    fn any(&self, test: &dyn Fn(&Claim) -> bool) -> bool {
        if test(self) {
            return true;
        }
        match &self.kind {
            ClaimKind::Neg(inner) => inner.any(test),
            ClaimKind::Binary(_, l, r) => l.any(test) || r.any(test),
            ClaimKind::Call(_, args) => args.iter().any(|a| a.any(test)),
            _ => false,
        }
    }
}

/// What the resolver needs to know about the rule.
pub struct ClaimContext<'a> {
    pub index: &'a str,
    pub sequence: &'a str,
    pub base_index: &'a BigInt,
    /// The rule's parameters.
    pub params: Vec<String>,
}

/// Parses and resolves a claim. Spans are byte offsets into `text`.
pub fn read_claim(text: &str, context: &ClaimContext) -> Result<Claim, Diagnostic> {
    let expr = crate::syntax::parse_expr(text)?;
    crate::model::judge_size(&expr)?;
    resolve(&expr, context)
}

fn resolve(expr: &Expr, cx: &ClaimContext) -> Result<Claim, Diagnostic> {
    let span = expr.span.clone();
    let kind = match &expr.kind {
        ExprKind::Number(q) => ClaimKind::Number(q.clone()),
        ExprKind::Ident(name) => return name_meaning(name, span, cx),
        ExprKind::Subscript { name, index } => {
            if name == cx.sequence {
                base_term(name, index, span.clone(), cx)?;
                ClaimKind::Base
            } else {
                let full = crate::model::subscripted_name(name, index)?;
                return name_meaning(&full, span, cx);
            }
        }
        ExprKind::Call {
            name,
            name_span,
            args,
            ..
        } => {
            if name == cx.sequence {
                if args.len() != 1 {
                    return Err(Diagnostic::new(
                        format!(
                            "the base term `{name}` takes one index, e.g. {name}({})",
                            cx.base_index
                        ),
                        name_span.clone(),
                    ));
                }
                base_term(name, &args[0], span.clone(), cx)?;
                ClaimKind::Base
            } else if let Some(function) = Function::from_name(name) {
                if args.len() != function.arity() {
                    return Err(Diagnostic::new(
                        format!(
                            "`{name}` takes {} argument{}, not {}",
                            function.arity(),
                            if function.arity() == 1 { "" } else { "s" },
                            args.len()
                        ),
                        name_span.clone(),
                    )
                    .with_help(format!("write {}", function.usage())));
                }
                let args = args
                    .iter()
                    .map(|a| resolve(a, cx))
                    .collect::<Result<Vec<_>, _>>()?;
                ClaimKind::Call(function, args)
            } else if is_value_name(name, cx) && args.len() == 1 {
                // `k(k+1)`, `rho(1-k)`: implicit multiplication, as in the rule language.
                let head = name_meaning(name, name_span.clone(), cx)?;
                let arg = resolve(&args[0], cx)?;
                ClaimKind::Binary(BinOp::ImplicitMul, Box::new(head), Box::new(arg))
            } else {
                return Err(Diagnostic::new(
                    format!("unknown function `{name}`"),
                    name_span.clone(),
                )
                .with_help(format!(
                    "a claim may use {FUNCTION_LIST}, and the base term {}({})",
                    cx.sequence, cx.base_index
                )));
            }
        }
        ExprKind::Neg(inner) => ClaimKind::Neg(Box::new(resolve(inner, cx)?)),
        ExprKind::Binary {
            op: BinOp::Pow,
            lhs,
            rhs,
        } if exponent_head(rhs, cx).is_some() => return split_exponent(expr, lhs, rhs, cx),
        ExprKind::Binary { op, lhs, rhs } => ClaimKind::Binary(
            *op,
            Box::new(resolve(lhs, cx)?),
            Box::new(resolve(rhs, cx)?),
        ),
        ExprKind::Factorial(inner) => {
            ClaimKind::Call(Function::Factorial, vec![resolve(inner, cx)?])
        }
    };
    Ok(Claim::new(kind, span))
}

/// The exponent of a power is a single atom, as in the rule language; but the parser reads
/// `p^k (1-p)^(N-k)` as `p^(k((1-p)^(N-k)))` because `k(…)` looks like a call. When the
/// exponent starts with such a name-call, the call's argument is a factor of its own, which
/// is what a reader of a paper means: `p^k · (1-p)^(N-k)`.
fn exponent_head<'e>(
    exponent: &'e Expr,
    cx: &ClaimContext,
) -> Option<(&'e str, &'e Span, &'e Expr)> {
    match &exponent.kind {
        ExprKind::Call {
            name,
            name_span,
            args,
            ..
        } if args.len() == 1 && is_value_name(name, cx) && name != cx.sequence => {
            Some((name.as_str(), name_span, &args[0]))
        }
        ExprKind::Binary {
            op: BinOp::Pow,
            lhs,
            ..
        } => exponent_head(lhs, cx),
        _ => None,
    }
}

/// `base^name(arg)…` → `base^name · arg…` (see [`exponent_head`]).
fn split_exponent(
    whole: &Expr,
    base: &Expr,
    exponent: &Expr,
    cx: &ClaimContext,
) -> Result<Claim, Diagnostic> {
    let (name, name_span, _) = exponent_head(exponent, cx).expect("checked by the caller");
    let power_span = base.span.start..name_span.end;
    let power = Claim::new(
        ClaimKind::Binary(
            BinOp::Pow,
            Box::new(resolve(base, cx)?),
            Box::new(name_meaning(name, name_span.clone(), cx)?),
        ),
        power_span,
    );
    let rest = resolve(&without_head(exponent), cx)?;
    Ok(Claim::new(
        ClaimKind::Binary(BinOp::ImplicitMul, Box::new(power), Box::new(rest)),
        whole.span.clone(),
    ))
}

/// The exponent with its leading name-call replaced by the call's argument.
fn without_head(exponent: &Expr) -> Expr {
    match &exponent.kind {
        ExprKind::Call { args, .. } => args[0].clone(),
        ExprKind::Binary {
            op: BinOp::Pow,
            lhs,
            rhs,
        } => {
            let inner = without_head(lhs);
            let span = inner.span.start..rhs.span.end;
            Expr::new(
                ExprKind::Binary {
                    op: BinOp::Pow,
                    lhs: Box::new(inner),
                    rhs: rhs.clone(),
                },
                span,
            )
        }
        _ => exponent.clone(),
    }
}

fn is_value_name(name: &str, cx: &ClaimContext) -> bool {
    name == cx.index || name == "pi" || cx.params.iter().any(|p| p == name)
}

fn name_meaning(name: &str, span: Span, cx: &ClaimContext) -> Result<Claim, Diagnostic> {
    let kind = if name == cx.index {
        ClaimKind::Index
    } else if name == "pi" {
        ClaimKind::Pi
    } else if cx.params.iter().any(|p| p == name) {
        ClaimKind::Param(name.to_string())
    } else if Function::from_name(name).is_some() {
        return Err(Diagnostic::new(
            format!("`{name}` is a function: it needs its arguments in parentheses"),
            span,
        ));
    } else if name == cx.sequence {
        return Err(Diagnostic::new(
            format!(
                "the sequence `{name}` may appear only as its base term {name}({})",
                cx.base_index
            ),
            span,
        ));
    } else {
        let known = if cx.params.is_empty() {
            "the rule has no parameters".to_string()
        } else {
            format!("the rule's parameters are {}", cx.params.join(", "))
        };
        return Err(
            Diagnostic::new(format!("unknown name `{name}` in the claim"), span).with_help(
                format!(
                    "{known}; the index is {}, and pi is the only named constant",
                    cx.index
                ),
            ),
        );
    };
    Ok(Claim::new(kind, span))
}

/// Checks that a sequence term is the base term a(b).
fn base_term(name: &str, index: &Expr, span: Span, cx: &ClaimContext) -> Result<(), Diagnostic> {
    let is_base = match &index.kind {
        ExprKind::Number(q) => q.is_integer() && q.to_integer() == *cx.base_index,
        // `n(-2)`: the parser reads the minus as a negation of the number.
        ExprKind::Neg(inner) => matches!(&inner.kind, ExprKind::Number(q)
            if q.is_integer() && -q.to_integer() == *cx.base_index),
        _ => false,
    };
    if is_base {
        return Ok(());
    }
    Err(Diagnostic::new(
        format!(
            "the claim may use the sequence only as its base term {name}({})",
            cx.base_index
        ),
        span,
    )
    .with_help(format!(
        "the rule's base term is {name}({}); write the claim in terms of {} and that term",
        cx.base_index, cx.index
    )))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cx_read(text: &str) -> Result<Claim, Diagnostic> {
        let base = BigInt::from(1);
        let cx = ClaimContext {
            index: "k",
            sequence: "n",
            base_index: &base,
            params: vec!["rho".into(), "lambda_0".into()],
        };
        read_claim(text, &cx)
    }

    #[test]
    fn names_get_their_meaning() {
        let c = cx_read("n(1) * rho^k * Gamma(k + 1) / k! * pi * lambda_0").unwrap();
        assert!(c.mentions_base() && c.mentions_index());
        let c = cx_read("k(k+1) rho(1-k)").unwrap();
        assert!(!c.mentions_base());
        assert!(matches!(
            c.kind,
            ClaimKind::Binary(BinOp::ImplicitMul, _, _)
        ));
    }

    #[test]
    fn a_name_call_in_an_exponent_is_a_separate_factor() {
        let a = cx_read("rho^k (1-rho)^(k+1)").unwrap();
        let b = cx_read("rho^k * (1-rho)^(k+1)").unwrap();
        assert_eq!(strip(&a), strip(&b));
        let a = cx_read("2^k(k+1)").unwrap();
        let b = cx_read("2^k * (k+1)").unwrap();
        assert_eq!(strip(&a), strip(&b));
    }

    /// The tree without spans and with every product written `*`.
    fn strip(c: &Claim) -> String {
        match &c.kind {
            ClaimKind::Binary(op, l, r) => {
                let op = if *op == BinOp::ImplicitMul {
                    BinOp::Mul
                } else {
                    *op
                };
                format!("({} {} {})", strip(l), op.symbol(), strip(r))
            }
            ClaimKind::Neg(i) => format!("-{}", strip(i)),
            ClaimKind::Call(f, args) => format!(
                "{}({})",
                f.name(),
                args.iter().map(strip).collect::<Vec<_>>().join(", ")
            ),
            other => format!("{other:?}"),
        }
    }

    #[test]
    fn bad_claims_point_at_the_culprit() {
        let e = cx_read("Gamma(k, 2)").unwrap_err();
        assert_eq!(e.span, 0..5);
        assert!(e.message.contains("takes 1 argument"), "{}", e.message);
        let e = cx_read("2 * Gama(k)").unwrap_err();
        assert_eq!(e.span, 4..8);
        assert!(e.message.contains("unknown function"));
        let e = cx_read("n(k) * 2").unwrap_err();
        assert_eq!(e.span, 0..4);
        let e = cx_read("Beta(k)").unwrap_err();
        assert!(e.message.contains("takes 2 arguments"));
        let e = cx_read("x * k").unwrap_err();
        assert_eq!(e.span, 0..1);
        assert!(e.help.unwrap().contains("rho"));
        let e = cx_read("(k + 1").unwrap_err();
        assert_eq!(e.span.start, 0);
    }

    #[test]
    fn a_negative_base_index_is_the_base_term() {
        // A rule `for k >= -1` has base term n(-2); the claim wrote exactly that and was told
        // to use n(-2).
        let base = BigInt::from(-2);
        let cx = ClaimContext {
            index: "k",
            sequence: "n",
            base_index: &base,
            params: vec![],
        };
        let c = read_claim("n(-2) (k+2)(k+1)/2", &cx).unwrap();
        assert!(c.mentions_base());
        assert!(read_claim("n(2) (k+2)", &cx).is_err());
    }
}
