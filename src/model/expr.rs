//! Expressions of the rule language turned into exact algebra.
//!
//! A ratio expression becomes a [`ProductForm`]: a constant (a rational function of the
//! parameters) times powers of polynomials that contain the index. Products and quotients keep
//! the user's factorisation; a sum is expanded into one polynomial factor (then split by
//! `normal_form`). Every parameter polynomial divided by is recorded, so that `rho ≠ 1`
//! survives even when `(1-rho)/(1-rho)` cancels.

use num_traits::ToPrimitive;

use super::size::{
    too_large, MAX_DEGREE_TIMES_BITS, MAX_EXPANDED_TERMS, MAX_EXPANSION_WORK, MAX_PARAMETER_DEGREE,
};
use crate::algebra::{Poly, RatFunc};
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{BinOp, Expr, ExprKind};

/// Functions of the claim language; not allowed inside a ratio rule.
pub const FUNCTION_NAMES: &[&str] = &[
    "Gamma",
    "Beta",
    "binomial",
    "factorial",
    "rising",
    "pochhammer",
    "exp",
    "log",
    "sqrt",
];

/// Names that are constants, never parameters.
pub const CONSTANT_NAMES: &[&str] = &["pi"];

/// What the expression converter needs to know about names.
pub struct Names<'a> {
    /// The index variable (`k`).
    pub index: &'a str,
    /// The sequence name; it may not appear inside a ratio.
    pub sequence: &'a str,
    /// Parameters met so far, in order of first appearance.
    pub params: Vec<String>,
    /// Products of two terms spent so far adding and multiplying the rule's rational
    /// functions (bounded by `MAX_EXPANSION_WORK`).
    pub work: u64,
}

impl Names<'_> {
    /// Charges the products of terms that `a + b` or `a · b` of rational functions takes
    /// (each numerator by the other denominator, and the denominators), refusing the
    /// expression once the rule has spent more than `MAX_EXPANSION_WORK`.
    fn charge(&mut self, a: &RatFunc, b: &RatFunc, span: &Span) -> Result<(), Diagnostic> {
        let t = |p: &Poly| p.term_count() as u64;
        let (an, ad, bn, bd) = (t(a.numer()), t(a.denom()), t(b.numer()), t(b.denom()));
        let cost = an * bd + bn * ad + ad * bd + an * bn;
        self.work = self.work.saturating_add(cost);
        if self.work > MAX_EXPANSION_WORK {
            return Err(too_large(
                format!(
                    "expanding the rule takes over {MAX_EXPANSION_WORK} products of terms"
                ),
                span.clone(),
            )
            .with_help(
                "telescope answers in seconds; write the rule as a product of factors linear in k, with the parameters' expressions simplified",
            ));
        }
        Ok(())
    }
}

impl Names<'_> {
    fn note_param(&mut self, name: &str) {
        if !self.params.iter().any(|p| p == name) {
            self.params.push(name.to_string());
        }
    }
}

/// One factor that depends on the index: `poly^exponent`.
#[derive(Clone, Debug)]
pub struct IndexFactor {
    pub poly: Poly,
    pub exponent: i32,
    pub span: Span,
}

/// `constant · Π factors`.
#[derive(Clone, Debug)]
pub struct ProductForm {
    pub constant: RatFunc,
    pub factors: Vec<IndexFactor>,
    /// Parameter polynomials that were divided by (each must not vanish).
    pub divisors: Vec<(Poly, Span)>,
}

impl ProductForm {
    pub(crate) fn constant(c: RatFunc) -> Self {
        ProductForm {
            constant: c,
            factors: Vec::new(),
            divisors: Vec::new(),
        }
    }

    pub(crate) fn times(mut self, other: ProductForm, sign: i32) -> ProductForm {
        self.divisors.extend(other.divisors);
        for mut f in other.factors {
            f.exponent *= sign;
            self.factors.push(f);
        }
        self.constant = if sign > 0 {
            &self.constant * &other.constant
        } else {
            // Division by zero is checked by the caller before this point.
            self.constant
                .checked_div(&other.constant)
                .expect("divisor checked non-zero")
        };
        self
    }

    /// `self / other`, recording `other` as a divisor when it depends on parameters; `None`
    /// when `other` is zero.
    pub(crate) fn divided_by(self, mut other: ProductForm, span: Span) -> Option<ProductForm> {
        if other.constant.is_zero() {
            return None;
        }
        if other.constant.numer().as_constant().is_none() {
            other.divisors.push((other.constant.numer().clone(), span));
        }
        Some(self.times(other, -1))
    }

    pub(crate) fn negated(mut self) -> ProductForm {
        self.constant = -self.constant;
        self
    }

    /// Whether the product is identically zero.
    pub fn is_zero(&self) -> bool {
        self.constant.is_zero()
    }

    /// Expands everything into one rational function of the index and the parameters.
    pub fn expand(&self) -> RatFunc {
        let mut value = self.constant.clone();
        for f in &self.factors {
            let base = RatFunc::from_poly(f.poly.clone());
            value = &value * &base.pow(f.exponent).expect("index factors are non-zero");
        }
        value
    }
}

/// Converts a ratio expression.
pub fn to_product(expr: &Expr, names: &mut Names) -> Result<ProductForm, Diagnostic> {
    let span = expr.span.clone();
    match &expr.kind {
        ExprKind::Number(q) => Ok(ProductForm::constant(RatFunc::constant(q.clone()))),
        ExprKind::Ident(name) => ident(name, span, names),
        ExprKind::Subscript { name, index } => {
            if name == names.sequence {
                return Err(sequence_inside(name, span));
            }
            let full = subscripted_name(name, index)?;
            ident(&full, span, names)
        }
        ExprKind::Call {
            name,
            name_span,
            args,
            ..
        } => {
            if name == names.sequence {
                return Err(sequence_inside(name, span));
            }
            if FUNCTION_NAMES.contains(&name.as_str()) {
                return Err(Diagnostic::new(
                    format!("the function `{name}` cannot appear in a ratio rule"),
                    name_span.clone(),
                )
                .with_help(
                    "R(k) must be a product of factors linear in k, e.g. (k-1)/(k+2); functions belong in claims (`telescope check --claim`)",
                ));
            }
            if args.len() != 1 {
                return Err(Diagnostic::new(
                    format!("unknown function `{name}` with {} arguments", args.len()),
                    name_span.clone(),
                )
                .with_help("write products with `*`, e.g. rho*(k-1)"));
            }
            // `k(k+1)` or `rho(1-k)`: implicit multiplication.
            let head = ident(name, name_span.clone(), names)?;
            let arg = to_product(&args[0], names)?;
            Ok(head.times(arg, 1))
        }
        ExprKind::Neg(inner) => {
            let mut p = to_product(inner, names)?;
            p.constant = -p.constant;
            Ok(p)
        }
        ExprKind::Factorial(_) => Err(Diagnostic::new(
            "a factorial cannot appear in a ratio rule",
            span,
        )
        .with_help("write the ratio of consecutive terms instead: k!/(k-1)! is just k")),
        ExprKind::Binary { op, lhs, rhs } => match op {
            BinOp::Mul | BinOp::ImplicitMul => {
                let l = to_product(lhs, names)?;
                let r = to_product(rhs, names)?;
                names.charge(&l.constant, &r.constant, &span)?;
                let product = l.times(r, 1);
                within_size(&product.constant, names.index, &span)?;
                Ok(product)
            }
            BinOp::Div => {
                let l = to_product(lhs, names)?;
                let mut r = to_product(rhs, names)?;
                if r.constant.is_zero() {
                    return Err(Diagnostic::new("division by zero", rhs.span.clone()));
                }
                if r.constant.numer().as_constant().is_none() {
                    r.divisors
                        .push((r.constant.numer().clone(), rhs.span.clone()));
                }
                names.charge(&l.constant, &r.constant, &span)?;
                let quotient = l.times(r, -1);
                within_size(&quotient.constant, names.index, &span)?;
                Ok(quotient)
            }
            BinOp::Add | BinOp::Sub => {
                let l = to_product(lhs, names)?;
                let r = to_product(rhs, names)?;
                let (a, b) = (l.expand(), r.expand());
                within_size(&a, names.index, &lhs.span)?;
                within_size(&b, names.index, &rhs.span)?;
                names.charge(&a, &b, &span)?;
                let sum = if *op == BinOp::Add { &a + &b } else { &a - &b };
                within_size(&sum, names.index, &span)?;
                let mut form = from_ratfunc(&sum, names.index, span);
                form.divisors.extend(l.divisors);
                form.divisors.extend(r.divisors);
                Ok(form)
            }
            BinOp::Pow => {
                let base = to_product(lhs, names)?;
                let n = integer_exponent(rhs, names)?;
                let raised = power(base, n, span.clone())?;
                within_size(&raised.constant, names.index, &span)?;
                Ok(raised)
            }
        },
    }
}

/// Refuses a rational function whose numerator or denominator, as built, has more than
/// `MAX_EXPANDED_TERMS` terms. The syntax-tree judge (`size.rs`) bounds what a sum or power
/// expands to, but fractions brought over a common denominator multiply their sizes in ways
/// it does not follow, and every further sum then takes multivariate gcds of them (a
/// 372-byte input with 15 names grew to 3,658 terms and ran for minutes). Checked after each
/// step, the refusal comes within milliseconds.
///
/// The same check bounds the degree in each parameter (not the index) by
/// `MAX_PARAMETER_DEGREE`: the tail corrections, moments and conditions are polynomial
/// algebra in the parameters, and their cost grows with about the cube of that degree
/// (`(rho-1)^48 (k+1)/(k+2)` 0.9 s, `^60` 2.1 s, `^120` 28 s). The degree times the
/// coefficients' bit length is bounded too, by `MAX_DEGREE_TIMES_BITS`: the conditions
/// isolate the real roots of such polynomials, whose cost grows with both.
fn within_size(f: &RatFunc, index: &str, span: &Span) -> Result<(), Diagnostic> {
    for poly in [f.numer(), f.denom()] {
        let bits = || {
            poly.terms()
                .map(|(_, c)| c.numer().bits() + c.denom().bits())
                .max()
                .unwrap_or(0)
        };
        for name in poly.variables() {
            let degree = poly.degree_in(&name);
            if name != index && degree as u64 > MAX_PARAMETER_DEGREE {
                return Err(too_large(
                    format!(
                        "degree {degree} in the parameter {name} (at most {MAX_PARAMETER_DEGREE})"
                    ),
                    span.clone(),
                ));
            }
            if name != index && degree > 1 && degree as u64 * bits() > MAX_DEGREE_TIMES_BITS {
                return Err(too_large(
                    format!(
                        "degree {degree} in the parameter {name} with {}-bit coefficients (degree × bits at most {MAX_DEGREE_TIMES_BITS})",
                        bits()
                    ),
                    span.clone(),
                ));
            }
        }
    }
    let terms = f.numer().terms().count().max(f.denom().terms().count());
    if terms > MAX_EXPANDED_TERMS as usize {
        return Err(too_large(
            format!("expanded, it has {terms} terms (at most {MAX_EXPANDED_TERMS})"),
            span.clone(),
        )
        .with_help(
            "telescope answers in seconds; write the rule as a product of factors linear in k, with the parameters' expressions simplified",
        ));
    }
    Ok(())
}

/// The parameter name a subscripted name stands for: `lambda_0`, `x_i`. Only a plain name or
/// a whole number may be a subscript (the grammar allows any expression in braces).
pub fn subscripted_name(name: &str, index: &Expr) -> Result<String, Diagnostic> {
    let subscript = match &index.kind {
        ExprKind::Ident(s) => s.clone(),
        ExprKind::Number(q) if q.is_integer() => q.to_string(),
        _ => {
            return Err(Diagnostic::new(
                format!("the subscript of `{name}` must be a name or a whole number"),
                index.span.clone(),
            )
            .with_help("parameter names may carry a simple subscript such as lambda_0"))
        }
    };
    Ok(format!("{name}_{subscript}"))
}

fn ident(name: &str, span: Span, names: &mut Names) -> Result<ProductForm, Diagnostic> {
    if name == names.index {
        return Ok(ProductForm {
            constant: RatFunc::one(),
            factors: vec![IndexFactor {
                poly: Poly::var(name),
                exponent: 1,
                span,
            }],
            divisors: Vec::new(),
        });
    }
    if name == names.sequence {
        return Err(sequence_inside(name, span));
    }
    if CONSTANT_NAMES.contains(&name) {
        return Err(Diagnostic::new(
            format!(
                "`{name}` is a constant, not a parameter; a ratio rule has rational coefficients"
            ),
            span,
        )
        .with_help("use a parameter for it, e.g. `c`, and give its value with --param c=3.14159"));
    }
    if FUNCTION_NAMES.contains(&name) {
        return Err(Diagnostic::new(
            format!(
                "`{name}` is a function name; it needs arguments and cannot appear in a ratio rule"
            ),
            span,
        ));
    }
    names.note_param(name);
    Ok(ProductForm::constant(RatFunc::var(name)))
}

fn sequence_inside(name: &str, span: Span) -> Diagnostic {
    Diagnostic::new(
        format!("the sequence `{name}` cannot appear inside its own ratio"),
        span,
    )
    .with_help("the right-hand side R(k) may use only k, numbers and parameters")
}

fn integer_exponent(expr: &Expr, names: &mut Names) -> Result<i32, Diagnostic> {
    let bad = || {
        Diagnostic::new("the exponent must be a whole number", expr.span.clone())
            .with_help("a ratio rule allows integer powers only, e.g. (k+1)^2 or (k+1)^-1")
    };
    let mut scratch = Names {
        index: names.index,
        sequence: names.sequence,
        params: Vec::new(),
        work: 0,
    };
    let value = to_product(expr, &mut scratch).map_err(|_| bad())?;
    if !value.factors.is_empty() {
        return Err(bad());
    }
    let q = value.constant.as_constant().ok_or_else(bad)?;
    if !q.is_integer() {
        return Err(bad());
    }
    let n = q.to_integer().to_i32().filter(|n| n.abs() <= 1000);
    n.ok_or_else(|| {
        Diagnostic::new(
            "this exponent is too large (at most 1000)",
            expr.span.clone(),
        )
    })
}

fn power(base: ProductForm, n: i32, span: Span) -> Result<ProductForm, Diagnostic> {
    if n < 0 && base.constant.is_zero() {
        return Err(Diagnostic::new("zero to a negative power", span));
    }
    let mut out = base;
    out.constant = out.constant.pow(n).expect("checked above");
    for f in &mut out.factors {
        f.exponent *= n;
    }
    if n == 0 {
        out.factors.clear();
        out.constant = RatFunc::one();
    }
    Ok(out)
}

/// Splits a rational function of the index and parameters into the index-free content and the
/// primitive (in the index) numerator and denominator.
pub fn from_ratfunc(r: &RatFunc, index: &str, span: Span) -> ProductForm {
    let (num_content, num_rest) = split_index_content(r.numer(), index);
    let (den_content, den_rest) = split_index_content(r.denom(), index);
    let constant =
        RatFunc::new(num_content, den_content.clone()).expect("content of a non-zero polynomial");
    let mut factors = Vec::new();
    if !num_rest.is_one() {
        factors.push(IndexFactor {
            poly: num_rest,
            exponent: 1,
            span: span.clone(),
        });
    }
    if !den_rest.is_one() {
        factors.push(IndexFactor {
            poly: den_rest,
            exponent: -1,
            span: span.clone(),
        });
    }
    let mut divisors = Vec::new();
    if den_content.as_constant().is_none() {
        divisors.push((den_content, span));
    }
    ProductForm {
        constant,
        factors,
        divisors,
    }
}

/// p = content · rest, where content is the gcd of p's coefficients as a polynomial in the index.
fn split_index_content(p: &Poly, index: &str) -> (Poly, Poly) {
    if !p.contains_var(index) {
        return (p.clone(), Poly::one());
    }
    let mut content = Poly::zero();
    for c in p.coeffs_in(index) {
        content = Poly::gcd(&content, &c);
    }
    if content.is_zero() {
        return (Poly::one(), p.clone());
    }
    let rest = p
        .div_exact(&content)
        .expect("the gcd divides every coefficient");
    (content, rest)
}
