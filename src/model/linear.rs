//! An equation's sides as linear combinations of sequence terms: `Σ c_s(k) · a(k+s)` plus
//! terms free of the sequence. Balance equations and boundary equations both start here.
//!
//! Sub-expressions that do not mention the sequence go through [`to_product`], so a product
//! the user wrote keeps its factors; only coefficients met in several places are added up
//! (and then expanded into one polynomial, as `to_product` does for any sum).

use num_bigint::BigInt;

use crate::algebra::RatFunc;
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::{BinOp, Expr, ExprKind};

use super::expr::{from_ratfunc, to_product, Names, ProductForm};

/// Where a sequence term sits: `a(k + s)` or `a(m)` at a fixed index.
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum TermAt {
    Shift(i64),
    Fixed(BigInt),
}

/// One collected term: its coefficient and where the user first wrote it.
#[derive(Clone, Debug)]
pub struct LinearTerm {
    pub at: TermAt,
    pub coefficient: ProductForm,
    pub span: Span,
}

/// `Σ coefficient · a(at) + free`.
#[derive(Clone, Debug)]
pub struct LinearForm {
    pub terms: Vec<LinearTerm>,
    /// The part without the sequence, if any was written.
    pub free: Option<(ProductForm, Span)>,
}

impl LinearForm {
    fn free(form: ProductForm, span: Span) -> Self {
        LinearForm {
            terms: Vec::new(),
            free: Some((form, span)),
        }
    }

    fn scaled(mut self, by: &ProductForm) -> Self {
        for t in &mut self.terms {
            t.coefficient = by.clone().times(t.coefficient.clone(), 1);
        }
        if let Some((f, _)) = &mut self.free {
            *f = by.clone().times(f.clone(), 1);
        }
        self
    }

    fn negated(mut self) -> Self {
        for t in &mut self.terms {
            t.coefficient = t.coefficient.clone().negated();
        }
        if let Some((f, _)) = &mut self.free {
            *f = f.clone().negated();
        }
        self
    }

    /// `self + sign · other`, adding coefficients of equal terms.
    pub fn plus(mut self, other: LinearForm, sign: i32, index: &str) -> Self {
        let other = if sign < 0 { other.negated() } else { other };
        for t in other.terms {
            match self.terms.iter_mut().find(|s| s.at == t.at) {
                Some(existing) => {
                    existing.coefficient =
                        add(&existing.coefficient, &t.coefficient, index, &existing.span);
                }
                None => self.terms.push(t),
            }
        }
        self.free = match (self.free.take(), other.free) {
            (None, f) | (f, None) => f,
            (Some((a, span)), Some((b, _))) => {
                let sum = add(&a, &b, index, &span);
                Some((sum, span))
            }
        };
        self
    }

    /// The coefficient of `a(at)`, if the term occurs.
    pub fn coefficient(&self, at: &TermAt) -> Option<&LinearTerm> {
        self.terms.iter().find(|t| &t.at == at)
    }

    /// Drops terms whose coefficients cancelled to zero.
    pub fn without_zero_terms(mut self) -> Self {
        self.terms.retain(|t| !t.coefficient.is_zero());
        if matches!(&self.free, Some((f, _)) if f.is_zero()) {
            self.free = None;
        }
        self.terms.sort_by(|a, b| a.at.cmp(&b.at));
        self
    }
}

fn add(a: &ProductForm, b: &ProductForm, index: &str, span: &Span) -> ProductForm {
    let sum = &a.expand() + &b.expand();
    let mut form = from_ratfunc(&sum, index, span.clone());
    form.divisors.extend(a.divisors.iter().cloned());
    form.divisors.extend(b.divisors.iter().cloned());
    form
}

/// Whether `e` mentions the sequence `name` anywhere.
pub fn mentions(e: &Expr, name: &str) -> bool {
    let mut found = false;
    e.walk(&mut |node| match &node.kind {
        ExprKind::Call { name: n, .. } | ExprKind::Subscript { name: n, .. } if n == name => {
            found = true
        }
        ExprKind::Ident(n) if n == name => found = true,
        _ => {}
    });
    found
}

/// `lhs − rhs` as a linear form in the sequence `names.sequence`.
pub fn collect_equation(
    lhs: &Expr,
    rhs: &Expr,
    names: &mut Names,
) -> Result<LinearForm, Diagnostic> {
    let left = linear_form(lhs, names)?;
    let right = linear_form(rhs, names)?;
    Ok(left.plus(right, -1, names.index).without_zero_terms())
}

/// One side of an equation as a linear form.
pub fn linear_form(e: &Expr, names: &mut Names) -> Result<LinearForm, Diagnostic> {
    let sequence = names.sequence.to_string();
    if !mentions(e, &sequence) {
        return Ok(LinearForm::free(to_product(e, names)?, e.span.clone()));
    }
    let span = e.span.clone();
    match &e.kind {
        ExprKind::Call { name, args, .. } if *name == sequence => {
            if args.len() != 1 {
                return Err(Diagnostic::new(
                    format!("`{name}` takes one index, like {name}(k)"),
                    span,
                ));
            }
            sequence_term(&args[0], span, names)
        }
        ExprKind::Subscript { name, index } if *name == sequence => {
            sequence_term(index, span, names)
        }
        ExprKind::Ident(_) => Err(Diagnostic::new(
            format!("`{sequence}` needs its index here, like {sequence}(k) or {sequence}(k-1)"),
            span,
        )),
        ExprKind::Neg(inner) => Ok(linear_form(inner, names)?.negated()),
        ExprKind::Binary { op, lhs, rhs } => match op {
            BinOp::Add | BinOp::Sub => {
                let l = linear_form(lhs, names)?;
                let r = linear_form(rhs, names)?;
                let sign = if *op == BinOp::Add { 1 } else { -1 };
                Ok(l.plus(r, sign, names.index))
            }
            BinOp::Mul | BinOp::ImplicitMul => {
                let (l, r) = (mentions(lhs, &sequence), mentions(rhs, &sequence));
                if l && r {
                    return Err(not_linear(
                        span,
                        &sequence,
                        "it multiplies two terms of the sequence",
                    ));
                }
                let (with, without) = if l { (lhs, rhs) } else { (rhs, lhs) };
                let factor = to_product(without, names)?;
                let mut form = linear_form(with, names)?.scaled(&factor);
                if form.terms.len() == 1 && form.free.is_none() {
                    // `(k+2) n(k)`: the term the user sees is the whole product.
                    form.terms[0].span = span;
                }
                Ok(form)
            }
            BinOp::Div => {
                if mentions(rhs, &sequence) {
                    return Err(not_linear(
                        rhs.span.clone(),
                        &sequence,
                        "a term of the sequence stands in a denominator",
                    )
                    .with_help(format!(
                        "multiply out the denominator; note that juxtaposition binds tighter than `/`, so `a/b {sequence}(k)` is a/(b·{sequence}(k)): write `a/b * {sequence}(k)`"
                    )));
                }
                let divisor = to_product(rhs, names)?;
                let one = ProductForm::constant(RatFunc::one());
                let inverse = one
                    .divided_by(divisor, rhs.span.clone())
                    .ok_or_else(|| Diagnostic::new("division by zero", rhs.span.clone()))?;
                Ok(linear_form(lhs, names)?.scaled(&inverse))
            }
            BinOp::Pow => {
                let is_one = matches!(&rhs.kind, ExprKind::Number(q) if q == &num_rational::BigRational::from_integer(1.into()));
                if mentions(rhs, &sequence) || !is_one {
                    return Err(not_linear(
                        span,
                        &sequence,
                        "a term of the sequence is raised to a power",
                    ));
                }
                linear_form(lhs, names)
            }
        },
        ExprKind::Call {
            name,
            name_span,
            args,
            ..
        } if args.len() == 1 => {
            // `rho(k n(k) - …)`: implicit multiplication by a name.
            let head = Expr::new(ExprKind::Ident(name.clone()), name_span.clone());
            let factor = to_product(&head, names)?;
            Ok(linear_form(&args[0], names)?.scaled(&factor))
        }
        ExprKind::Factorial(_) | ExprKind::Call { .. } | ExprKind::Subscript { .. } => {
            Err(not_linear(
                span,
                &sequence,
                "a term of the sequence sits inside a function",
            ))
        }
        ExprKind::Number(_) => unreachable!("a number never mentions the sequence"),
    }
}

fn not_linear(span: Span, sequence: &str, why: &str) -> Diagnostic {
    Diagnostic::new(
        format!("this term is not linear in {sequence}: {why}"),
        span,
    )
    .with_help(format!(
        "a balance equation must be a sum of terms (coefficient) · {sequence}(k + shift), the coefficients free of {sequence}"
    ))
}

/// `a(k + s)` (s a whole number) or `a(m)` (m a whole number).
fn sequence_term(arg: &Expr, span: Span, names: &mut Names) -> Result<LinearForm, Diagnostic> {
    let bad = || {
        Diagnostic::new(
            format!(
                "the index of `{}` must be {} plus or minus a whole number, or a whole number",
                names.sequence, names.index
            ),
            arg.span.clone(),
        )
        .with_help(format!(
            "write {0}({1}), {0}({1}-1), {0}({1}+1) or {0}(1)",
            names.sequence, names.index
        ))
    };
    let mut scratch = Names {
        index: names.index,
        sequence: names.sequence,
        params: Vec::new(),
        work: 0,
    };
    let value = to_product(arg, &mut scratch).map_err(|_| bad())?.expand();
    if !scratch.params.is_empty() {
        return Err(bad());
    }
    let poly = value.as_poly().ok_or_else(bad)?;
    let coeffs = poly.univariate_coeffs(names.index).ok_or_else(bad)?;
    let constant = coeffs.first().cloned().unwrap_or_default();
    if !constant.is_integer() {
        return Err(bad());
    }
    let at = match coeffs.len() {
        0 | 1 => TermAt::Fixed(constant.to_integer()),
        2 if coeffs[1] == num_rational::BigRational::from_integer(1.into()) => {
            use num_traits::ToPrimitive;
            let shift = constant.to_integer().to_i64().ok_or_else(bad)?;
            TermAt::Shift(shift)
        }
        _ => return Err(bad()),
    };
    Ok(LinearForm {
        terms: vec![LinearTerm {
            at,
            coefficient: ProductForm::constant(RatFunc::one()),
            span,
        }],
        free: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::parse_model;
    use crate::syntax::StatementKind;

    fn collect(text: &str) -> Result<LinearForm, Diagnostic> {
        let model = parse_model(text).unwrap();
        let StatementKind::Equation { lhs, rhs, .. } = &model.statements[0].kind else {
            panic!()
        };
        let mut names = Names {
            index: "k",
            sequence: "n",
            params: Vec::new(),
            work: 0,
        };
        collect_equation(lhs, rhs, &mut names)
    }

    #[test]
    fn terms_on_both_sides_are_collected() {
        let form = collect("n(k) = (1-rho)((k-1) n(k-1) - k n(k))").unwrap();
        let at: Vec<_> = form.terms.iter().map(|t| t.at.clone()).collect();
        assert_eq!(at, vec![TermAt::Shift(-1), TermAt::Shift(0)]);
        assert!(form.free.is_none());
        // n(k)(1 + (1-rho)k) = (1-rho)(k-1) n(k-1)
        let current = form.coefficient(&TermAt::Shift(0)).unwrap();
        let k = RatFunc::var("k");
        let rho = RatFunc::var("rho");
        let one = RatFunc::one();
        assert_eq!(current.coefficient.expand(), &one + &(&(&one - &rho) * &k));
    }

    #[test]
    fn fixed_terms_and_free_terms() {
        let form = collect("n(1) = rho - (1-rho) n(1)").unwrap();
        assert_eq!(form.terms.len(), 1);
        assert_eq!(form.terms[0].at, TermAt::Fixed(1.into()));
        assert!(form.free.is_some());
    }

    #[test]
    fn non_linear_terms_are_refused_with_their_place() {
        let e = collect("n(k) n(k-1) = k").unwrap_err();
        assert!(e.message.contains("multiplies two terms"), "{e:?}");
        assert_eq!(e.span, 0..11);
        let e = collect("k = n(k)/n(k-1)").unwrap_err();
        assert!(e.message.contains("denominator"), "{e:?}");
        assert_eq!(e.span, 9..15);
        let e = collect("n(k)^2 = k n(k-1)").unwrap_err();
        assert!(e.message.contains("power"), "{e:?}");
        let e = collect("n(2k) = n(k-1)").unwrap_err();
        assert!(e.message.contains("index of `n`"), "{e:?}");
        assert_eq!(e.span, 2..4);
    }
}
