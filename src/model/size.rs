//! How large an expression becomes once expanded, judged from the syntax tree alone, so that
//! an absurd input (`(rho k - 1)^1000`, `((k+1)^1000)^1000`, a sum raised to a high power) is
//! refused at once, before any polynomial is built.
//!
//! The bounds are over-estimates from the tree's shape: a name has degree 1 in itself,
//! products and quotients add degrees, sums take the larger, and a power multiplies by its
//! exponent. Nothing here knows which name is the index; every name is bounded alike.

use std::collections::BTreeMap;

use num_traits::{Signed, ToPrimitive};

use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{self, BinOp, Expr, ExprKind, ParamConstraint, StatementKind};

/// Highest degree in any one name (numerator and denominator together). Solving, the tail
/// law, the sums and parameter gcds all grow with it; 120 keeps `solve` within about a
/// second (measured before this limit: `(k+1)^60/(k+2)^60` 0.03 s, `(rho-1)^128 (k+1)/(k+2)`
/// 1.2 s, `(k+1)^1000/(k+2)^1000` 9 s, `(rho k-1)^1000/(k+2)` over 100 s).
pub const MAX_DEGREE: u64 = 120;
/// Highest degree in any one parameter (checked as the rule is built, where the index is
/// known: `model/expr.rs`). The index may go to `MAX_DEGREE`, since index factors stay
/// factored; parameter polynomials are multiplied out in the tail law, moments and conditions.
pub const MAX_PARAMETER_DEGREE: u64 = 48;
/// Most monomials an expanded sum may have (`(rho + s - 1)^32` has 561 and takes 0.5 s;
/// `(rho + s + t - 1)^20`, 1771, took 1.3 s before this limit).
pub const MAX_EXPANDED_TERMS: u64 = 1000;
/// Largest degree in a parameter times the bit length of the coefficients (numerator and
/// denominator) of a parameter polynomial of degree 2 or more. The conditions isolate the
/// real roots of such polynomials and their products; `(s + 2·10^38)^40` (5,090-bit
/// coefficients, 203,600) ran past 5 minutes. The same bound holds for a factor of degree 2
/// or more in the index with numeric coefficients (`model/normal_form.rs`), whose rational
/// roots a Sturm search finds: degree 6 with 1,800-bit coefficients took 0.17 s, with 12,960
/// bits 17 s.
pub const MAX_DEGREE_TIMES_BITS: u64 = 5_000;
/// Most products of two terms spent adding and multiplying one rule's rational functions
/// (`model/expr.rs`). The shipped examples spend at most 36. Over the 5,872 inputs of the
/// parse fuzz corpus, those past 200,000 took up to 7 s and those within it at most 1.5 s
/// (nested sums of fractions, each sum a gcd of polynomials of hundreds of terms).
pub const MAX_EXPANSION_WORK: u64 = 200_000;
/// Most bits in a number the expression can produce (about 6000 decimal digits).
pub const MAX_NUMBER_BITS: u64 = 20_000;

/// Upper bounds on the expanded size of one sub-expression.
#[derive(Clone, Debug, Default)]
struct Size {
    /// Degree in each name.
    degrees: BTreeMap<String, u64>,
    /// Total degree.
    total: u64,
    /// Bits of the largest number (numerator and denominator).
    bits: u64,
    /// Monomials after expansion.
    terms: u64,
    /// True when the expression is (or contains, under a power) a sum.
    sum: bool,
}

impl Size {
    fn max_degree(&self) -> (u64, Option<&str>) {
        self.degrees
            .iter()
            .max_by_key(|(_, d)| **d)
            .map(|(n, d)| (*d, Some(n.as_str())))
            .unwrap_or((0, None))
    }

    fn times(mut self, other: Size) -> Size {
        for (name, d) in other.degrees {
            let e = self.degrees.entry(name).or_insert(0);
            *e = e.saturating_add(d);
        }
        self.total = self.total.saturating_add(other.total);
        self.bits = self.bits.saturating_add(other.bits);
        self.terms = self.terms.saturating_mul(other.terms);
        self.sum |= other.sum;
        self
    }

    fn plus(mut self, other: Size) -> Size {
        for (name, d) in other.degrees {
            let e = self.degrees.entry(name).or_insert(0);
            *e = (*e).max(d);
        }
        self.total = self.total.max(other.total);
        // a/b + c/d = (ad + bc)/bd
        self.bits = self.bits.saturating_add(other.bits).saturating_add(1);
        self.terms = self.terms.saturating_add(other.terms);
        self.sum = true;
        self
    }

    fn power(mut self, n: u64) -> Size {
        for d in self.degrees.values_mut() {
            *d = d.saturating_mul(n);
        }
        self.total = self.total.saturating_mul(n);
        // Expanding a sum: at most the monomials of the bounded degrees, with binomial
        // coefficients below terms^n.
        let monomials = self
            .degrees
            .values()
            .fold(1u64, |a, d| a.saturating_mul(d.saturating_add(1)))
            .min(monomials_up_to(self.total, self.degrees.len() as u64));
        let log_terms = 64 - self.terms.leading_zeros() as u64;
        self.bits = self
            .bits
            .saturating_add(if self.sum { log_terms } else { 0 })
            .saturating_mul(n);
        self.terms = if self.terms <= 1 {
            1
        } else {
            monomials.min(self.terms.saturating_pow(n.min(64) as u32))
        };
        self
    }
}

/// Judges every expression of a parsed model: equations, ranges and parameter bounds.
pub fn judge_model(model: &syntax::Model) -> Result<(), Diagnostic> {
    for statement in &model.statements {
        let (exprs, range): (Vec<&Expr>, _) = match &statement.kind {
            StatementKind::Param(decl) => match &decl.constraint {
                ParamConstraint::None => (vec![], None),
                ParamConstraint::Interval { lo, hi, .. } => (vec![lo, hi], None),
                ParamConstraint::Compare { value, .. } => (vec![value], None),
            },
            StatementKind::Equation { lhs, rhs, range } => (vec![lhs, rhs], range.as_ref()),
            StatementKind::Bare { expr, range } => (vec![expr], range.as_ref()),
        };
        let bounds = range
            .into_iter()
            .flat_map(|r| [&r.lower, &r.upper])
            .flatten()
            .map(|b| &b.value);
        for e in exprs.into_iter().chain(bounds) {
            judge_size(e)?;
        }
    }
    Ok(())
}

/// C(d + v, v): the monomials of total degree at most d in v names (saturating).
fn monomials_up_to(d: u64, v: u64) -> u64 {
    let mut c: u64 = 1;
    for i in 1..=v {
        c = match c.checked_mul(d.saturating_add(i)) {
            Some(x) => x / i,
            None => return u64::MAX,
        };
    }
    c
}

/// Refuses an expression whose expansion would be too large to handle in seconds, pointing
/// at the smallest part that is already too large.
pub fn judge_size(expr: &Expr) -> Result<(), Diagnostic> {
    size(expr).map(|_| ())
}

fn size(expr: &Expr) -> Result<Size, Diagnostic> {
    let out = match &expr.kind {
        ExprKind::Number(q) => Size {
            degrees: BTreeMap::new(),
            total: 0,
            bits: q.numer().bits().saturating_add(q.denom().bits()),
            terms: 1,
            sum: false,
        },
        ExprKind::Ident(name) | ExprKind::Subscript { name, .. } => name_size(name),
        // `rho(k+1)` may be a product or a function; a product is the larger bound.
        ExprKind::Call { name, args, .. } => {
            let mut s = name_size(name);
            for a in args {
                s = s.times(size(a)?);
            }
            s
        }
        ExprKind::Neg(inner) | ExprKind::Factorial(inner) => size(inner)?,
        ExprKind::Binary { op, lhs, rhs } => match op {
            BinOp::Add | BinOp::Sub => size(lhs)?.plus(size(rhs)?),
            BinOp::Mul | BinOp::ImplicitMul | BinOp::Div => size(lhs)?.times(size(rhs)?),
            BinOp::Pow => {
                let base = size(lhs)?;
                match literal_exponent(rhs) {
                    Some(n) => base.power(n),
                    // A symbolic exponent (`rho^k` in a claim) is not expanded.
                    None => base.times(size(rhs)?),
                }
            }
        },
    };
    let expands = matches!(
        &expr.kind,
        ExprKind::Binary {
            op: BinOp::Add | BinOp::Sub | BinOp::Pow,
            ..
        }
    );
    verdict(&out, expands, expr)?;
    Ok(out)
}

fn name_size(name: &str) -> Size {
    Size {
        degrees: BTreeMap::from([(name.to_string(), 1)]),
        total: 1,
        bits: 1,
        terms: 1,
        sum: false,
    }
}

/// |n| for an exponent written as a whole number (`^3`, `^-2`, `^(4)`); saturates for
/// absurd literals. `None` for anything else.
fn literal_exponent(expr: &Expr) -> Option<u64> {
    match &expr.kind {
        ExprKind::Number(q) if q.is_integer() => Some(q.numer().abs().to_u64().unwrap_or(u64::MAX)),
        ExprKind::Number(_) => Some(1),
        ExprKind::Neg(inner) => literal_exponent(inner),
        _ => None,
    }
}

/// The refusal of an expression that is too large: `what` says by which measure. Shared with
/// the checks on the built polynomials (`model/expr.rs`).
pub(crate) fn too_large(what: String, span: Span) -> Diagnostic {
    Diagnostic::new(
        format!("this expression is too large to work with: {what}"),
        span,
    )
    .with_help(
        "telescope answers in seconds; rules of researchers' models have small powers (check the exponents for a stray digit)",
    )
}

fn verdict(s: &Size, expands: bool, expr: &Expr) -> Result<(), Diagnostic> {
    let too_large = |what: String| Err(too_large(what, expr.span.clone()));
    let (degree, name) = s.max_degree();
    if degree > MAX_DEGREE {
        return too_large(format!(
            "degree {} in {} (at most {MAX_DEGREE})",
            shown(degree),
            name.unwrap_or("its names")
        ));
    }
    if expands && s.sum && s.terms > MAX_EXPANDED_TERMS {
        return too_large(format!(
            "expanded, it has up to {} terms (at most {MAX_EXPANDED_TERMS})",
            shown(s.terms)
        ));
    }
    if s.bits > MAX_NUMBER_BITS {
        return too_large(format!(
            "its numbers reach {} bits (at most {MAX_NUMBER_BITS})",
            shown(s.bits)
        ));
    }
    Ok(())
}

fn shown(n: u64) -> String {
    if n == u64::MAX {
        "more than 10^19".into()
    } else {
        n.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::parse_expr;

    fn judged(text: &str) -> Result<(), String> {
        judge_size(&parse_expr(text).unwrap()).map_err(|d| d.message)
    }

    #[test]
    fn ordinary_rules_pass() {
        for text in [
            "(1-rho)(k-1)/(1+(1-rho)k)",
            "(k+1)^2 (k+2)^-3",
            "(rho + s - 1)^32 (k+1)/(k+2)",
            "(k+1)^60/(k+2)^60",
            "1/2k",
            "n(1) * Gamma(k+1)^2 rho^k",
        ] {
            assert_eq!(judged(text), Ok(()), "{text}");
        }
    }

    #[test]
    fn absurd_sizes_are_refused_with_the_place() {
        let expr = parse_expr("(k-1)/(k+2) (rho k-1)^1000").unwrap();
        let err = judge_size(&expr).unwrap_err();
        assert!(err.message.contains("degree 1000"), "{}", err.message);
        // The caret is under the power, not the whole rule.
        assert_eq!(&"(k-1)/(k+2) (rho k-1)^1000"[err.span], "(rho k-1)^1000");
        for text in [
            "(k+1)^1000/(k+2)^1000",
            "((k+1)^1000)^1000",
            "((((k+1)^1000)^1000)^1000)^1000",
            "(rho + s + t - 1)^20",
            "(10^1000)^1000",
            "k^99999999999999999999999",
        ] {
            assert!(judged(text).is_err(), "{text}");
        }
    }
}
