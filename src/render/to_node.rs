//! Turning exact algebra and closed forms into layout nodes. Pure presentation choices:
//! term order, which sign to show, where rational content goes.

use num_bigint::BigInt;
use num_traits::{One, Signed};

use crate::algebra::{Monomial, Poly, RatFunc, Q};
use crate::closed_form::{Affine, ClosedForm, Factor, Product};
use crate::ratio::{LinearFactor, Orientation, Ratio};

use super::node::{Function, Node};

/// A rational number.
pub fn rational(q: &Q) -> Node {
    let magnitude = q.abs();
    let node = Node::frac(
        Node::Int(magnitude.numer().clone()),
        Node::Int(magnitude.denom().clone()),
    );
    if q.is_negative() {
        node.negate()
    } else {
        node
    }
}

fn monomial(m: &Monomial) -> Vec<Node> {
    m.factors()
        .map(|(name, e)| Node::pow(Node::sym(name), Node::int(e as i64)))
        .collect()
}

/// Terms of a polynomial in display order: by degree, highest first, but a leading negative
/// term gives way to the first positive one (`1 − ρ`, not `−ρ + 1`).
fn ordered_terms(p: &Poly) -> Vec<(Monomial, Q)> {
    let mut terms: Vec<(Monomial, Q)> = p.terms().map(|(m, c)| (m.clone(), c.clone())).collect();
    if terms.first().map(|(_, c)| c.is_negative()).unwrap_or(false) {
        if let Some(i) = terms.iter().position(|(_, c)| c.is_positive()) {
            let t = terms.remove(i);
            terms.insert(0, t);
        }
    }
    terms
}

/// A polynomial as a sum.
pub fn poly(p: &Poly) -> Node {
    if p.is_zero() {
        return Node::int(0);
    }
    let mut terms = Vec::new();
    for (m, c) in ordered_terms(p) {
        let mut items = Vec::new();
        let magnitude = c.abs();
        let vars = monomial(&m);
        if vars.is_empty() || !magnitude.is_one() {
            items.push(rational(&magnitude));
        }
        items.extend(vars);
        let term = Node::product(items);
        terms.push(if c.is_negative() { term.negate() } else { term });
    }
    if terms.len() == 1 {
        terms.pop().unwrap()
    } else {
        Node::Sum(terms)
    }
}

/// How awkward a polynomial looks: a leading minus sign, the number of minus signs, and a
/// negative constant term (`1 − ρ` reads better than `ρ − 1` in a denominator).
fn negative_count(p: &Poly) -> (usize, usize, usize) {
    let order = ordered_terms(p);
    let leading = order
        .first()
        .map(|(_, c)| c.is_negative() as usize)
        .unwrap_or(0);
    let constant_negative = order
        .iter()
        .any(|(m, c)| m.degree() == 0 && c.is_negative()) as usize;
    (
        leading,
        order.iter().filter(|(_, c)| c.is_negative()).count(),
        constant_negative,
    )
}

/// A rational function of the parameters, with the sign and rational content placed the way
/// a person would write them: `(2 − ρ)/(1 − ρ)`, `1/(2(1 − ρ))`.
pub fn ratfunc(r: &RatFunc) -> Node {
    if let Some(c) = r.as_constant() {
        return rational(&c);
    }
    let (mut num, mut den) = (r.numer().clone(), r.denom().clone());
    let (nl, nn, _) = negative_count(&num);
    let (dl, dn, dc) = negative_count(&den);
    let (fnl, fnn, _) = negative_count(&-num.clone());
    let (fdl, fdn, fdc) = negative_count(&-den.clone());
    // A constant denominator keeps its sign (−(α + 1), never (α + 1)/(−1)).
    if den.as_constant().is_none() && (fnl + fdl, fnn + fdn, fdc) < (nl + dl, nn + dn, dc) {
        num = -num;
        den = -den;
    }
    // Clear the numerator's fractions into the denominator: (1/2)/(1 − ρ) → 1/(2(1 − ρ)).
    let (content, _) = num.content_and_primitive();
    let scale = content.denom().clone();
    let num_node = poly(&num.scale(&Q::from_integer(scale.clone())));
    if den.is_one() && scale.is_one() {
        return num_node;
    }
    let den_node = if scale.is_one() {
        poly(&den)
    } else {
        Node::product(vec![Node::Int(scale), poly(&den)])
    };
    Node::frac(num_node, den_node)
}

/// `k_coeff·k + c` with the index named `index`.
pub fn affine(a: &Affine, index: &str) -> Node {
    let c = ratfunc(&a.constant);
    let k_part = match a.k_coeff {
        0 => return c,
        1 => Node::sym(index),
        -1 => Node::sym(index).negate(),
        n => {
            let node = Node::product(vec![Node::Int(BigInt::from(n.abs())), Node::sym(index)]);
            if n < 0 {
                node.negate()
            } else {
                node
            }
        }
    };
    if a.constant.is_zero() {
        return k_part;
    }
    let mut terms = Vec::new();
    let c_terms = match c {
        Node::Sum(inner) => inner,
        other => vec![other],
    };
    match k_part {
        // c − k: constant first.
        Node::Neg(_) => {
            terms.extend(c_terms);
            terms.push(k_part);
        }
        _ => {
            terms.push(k_part);
            terms.extend(c_terms);
        }
    }
    Node::Sum(terms)
}

/// A linear factor of the rule: `k + α` or `β − k`.
pub fn linear_factor(f: &LinearFactor, index: &str) -> Node {
    let a = match f.orientation {
        Orientation::Rising => Affine::k_plus(f.shift.clone()),
        Orientation::Falling => Affine::c_minus_k(f.shift.clone()),
    };
    affine(&a, index)
}

fn with_power(node: Node, exponent: i32) -> Node {
    Node::pow(node, Node::int(exponent.abs() as i64))
}

/// R(k) in factor normal form.
pub fn ratio(r: &Ratio, index: &str) -> Node {
    let mut top = Vec::new();
    let mut bottom = Vec::new();
    let negative = split_constant(&r.constant, &mut top, &mut bottom);
    for f in &r.factors {
        let node = with_power(linear_factor(f, index), f.exponent);
        if f.exponent > 0 {
            top.push(node);
        } else {
            bottom.push(node);
        }
    }
    signed(
        Node::frac(Node::product(top), Node::product(bottom)),
        negative,
    )
}

/// Puts the magnitude of `c` into `top`/`bottom`; returns whether `c` is negative, so that the
/// caller writes one minus sign in front (`−(k − 1/2)/(2(k + 2))`, not `−1(k − 1/2)/…`).
fn split_constant(c: &RatFunc, top: &mut Vec<Node>, bottom: &mut Vec<Node>) -> bool {
    if c.is_one() {
        return false;
    }
    let (node, negative) = match ratfunc(c) {
        Node::Neg(inner) => (*inner, true),
        other => (other, false),
    };
    match node {
        Node::Frac(n, d) => {
            top.push(*n);
            bottom.push(*d);
        }
        other => top.push(other),
    }
    negative
}

fn signed(node: Node, negative: bool) -> Node {
    if negative {
        node.negate()
    } else {
        node
    }
}

/// One factor and whether it belongs in the denominator.
pub fn factor(f: &Factor, index: &str) -> (Node, bool) {
    let arg = |a: &Affine| affine(a, index);
    let (node, exponent) = match f {
        Factor::Gamma { arg: a, exponent } => {
            (Node::Call(Function::Gamma, vec![arg(a)]), *exponent)
        }
        Factor::Linear { arg: a, exponent } => (arg(a), *exponent),
        Factor::Power { base, exponent } => {
            return (Node::pow(ratfunc(base), arg(exponent)), false);
        }
        Factor::Rising {
            base,
            count,
            exponent,
        } => (
            Node::Rising(Box::new(arg(base)), Box::new(arg(count))),
            *exponent,
        ),
        Factor::Beta { a, b, exponent } => {
            (Node::Call(Function::Beta, vec![arg(a), arg(b)]), *exponent)
        }
        Factor::Factorial { arg: a, exponent } => (Node::Factorial(Box::new(arg(a))), *exponent),
        Factor::Binomial {
            top,
            bottom,
            exponent,
        } => (
            Node::Binomial(Box::new(arg(top)), Box::new(arg(bottom))),
            *exponent,
        ),
        Factor::SqrtPi { half_exponent } => {
            let pi = Node::sym("pi");
            let n = half_exponent.abs();
            let node = if n % 2 == 1 {
                let root = Node::Call(Function::Sqrt, vec![pi]);
                if n == 1 {
                    root
                } else {
                    Node::product(vec![
                        Node::pow(Node::sym("pi"), Node::int((n / 2) as i64)),
                        root,
                    ])
                }
            } else {
                Node::pow(pi, Node::int((n / 2) as i64))
            };
            return (node, *half_exponent < 0);
        }
    };
    (with_power(node, exponent), exponent < 0)
}

/// A product of factors with its coefficient, optionally preceded by extra numerator items.
///
/// A fractional coefficient is kept whole (`(7/2)·a(1)·B(k, 7/2)`) unless other factors already
/// make a denominator, which it then joins (`60/(k(k + 1)(k + 2))`).
///
/// The coefficient's numerator comes first, before the `lead` items: `2·w(0)·(λ/μ)^k/(k + 2)!`.
pub fn product(p: &Product, index: &str, lead: Vec<Node>) -> Node {
    let mut top = Vec::new();
    let mut lead = lead;
    let mut bottom = Vec::new();
    let mut rest_top = Vec::new();
    for f in &p.factors {
        let (node, below) = factor(f, index);
        if below {
            bottom.push(node);
        } else if !f.depends_on_k() && !f.is_special() {
            // Constant factors such as (α + 1) read as part of the coefficient.
            top.push(node);
        } else {
            rest_top.push(node);
        }
    }
    let mut negative = false;
    if bottom.is_empty() {
        if !p.coefficient.is_one() {
            let (node, minus) = match ratfunc(&p.coefficient) {
                Node::Neg(inner) => (*inner, true),
                other => (other, false),
            };
            negative = minus;
            top.insert(0, node);
        }
    } else {
        let mut coefficient_bottom = Vec::new();
        let mut coefficient_top = Vec::new();
        negative = split_constant(
            &p.coefficient,
            &mut coefficient_top,
            &mut coefficient_bottom,
        );
        coefficient_top.append(&mut top);
        top = coefficient_top;
        coefficient_bottom.append(&mut bottom);
        bottom = coefficient_bottom;
    }
    top.append(&mut lead);
    top.append(&mut rest_top);
    signed(
        Node::frac(Node::product(top), Node::product(bottom)),
        negative,
    )
}

/// `a(b) · product`, the right-hand side of a closed form.
pub fn closed_form_rhs(form: &ClosedForm, index: &str) -> Node {
    let base = Node::Term(
        form.sequence.clone(),
        Box::new(Node::Int(form.base_index.clone())),
    );
    product(&form.product, index, vec![base])
}

/// `a(k)`, the left-hand side.
pub fn sequence_at(sequence: &str, index: &str) -> Node {
    Node::Term(sequence.to_string(), Box::new(Node::sym(index)))
}

/// `a(k−1)`.
pub fn sequence_before(sequence: &str, index: &str) -> Node {
    Node::Term(
        sequence.to_string(),
        Box::new(Node::Sum(vec![Node::sym(index), Node::int(1).negate()])),
    )
}
