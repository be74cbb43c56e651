//! Formulas of the analysis as layout nodes: rational functions written factored, exact terms
//! (Gamma values, powers, exp, ln, √π), hypergeometric series and inequalities.

use num_traits::{One, Signed};

use crate::algebra::{rational_roots, Poly, RatFunc, Q};
use crate::analysis::{Atom, Expr, HyperSeries, Inequality, Term};

use super::super::node::{Function, Node};
use super::super::{latex, text, to_node};

/// A rational function of the parameters laid out for reading: rational content in front,
/// univariate polynomials split at their rational roots (`α²/((α − 1)²(α − 2))`), so the
/// results look the way they are written in the literature. Layout only: the value is the
/// same `RatFunc`.
pub fn ratfunc_node(r: &RatFunc) -> Node {
    if let Some(c) = r.as_constant() {
        return to_node::rational(&c);
    }
    if let Some(p) = r.as_poly() {
        if p.total_degree() <= 1 {
            return to_node::poly(&p);
        }
    }
    let (num_scale, mut top) = factored(r.numer());
    let (den_scale, mut bottom) = factored(r.denom());
    let mut scale = num_scale / den_scale;
    if scale.is_negative() {
        // Absorb the minus sign into a linear factor: n(1 − p)/p, not −n(p − 1)/p.
        let flip = |factors: &mut Vec<(Poly, u32)>| -> bool {
            match factors.iter_mut().find(|(f, m)| {
                // only x − c becomes c − x; x + c stays and the sign stays in front
                let negative_constant = f.terms().any(|(m, c)| m.degree() == 0 && c.is_negative());
                f.total_degree() == 1 && negative_constant && m % 2 == 1
            }) {
                Some(f) => {
                    f.0 = -f.0.clone();
                    true
                }
                None => false,
            }
        };
        if flip(&mut top) || flip(&mut bottom) {
            scale = -scale;
        }
    }
    let negative = scale.is_negative();
    let magnitude = scale.abs();
    let nodes = |factors: Vec<(Poly, u32)>| -> Vec<Node> {
        factors
            .into_iter()
            .map(|(f, m)| Node::pow(to_node::poly(&f), Node::int(m as i64)))
            .collect()
    };
    let mut top = nodes(top);
    let mut bottom = nodes(bottom);
    if !magnitude.numer().is_one() {
        top.insert(0, Node::Int(magnitude.numer().clone()));
    }
    if !magnitude.denom().is_one() {
        bottom.insert(0, Node::Int(magnitude.denom().clone()));
    }
    let node = Node::frac(Node::product(top), Node::product(bottom));
    if negative {
        node.negate()
    } else {
        node
    }
}

/// Highest degree split at its rational roots for display (beyond it, only powers of one
/// linear factor are recognised).
const MAX_FACTORED_DEGREE: usize = 8;

/// Whether `Σ c_i x^i` (degree n) is `c_n (x − r)^n`, with r = −c_{n−1}/(n c_n) (the mean
/// of the roots); checked exactly by the binomial theorem.
fn is_linear_power(coeffs: &[Q]) -> bool {
    let n = coeffs.len() - 1;
    let lead = &coeffs[n];
    let r = -(&coeffs[n - 1] / (lead * Q::from_integer(n.into())));
    // c_j = lead · C(n, j) · (−r)^(n−j)
    let mut expected = lead.clone();
    let mut ok = true;
    for j in (0..n).rev() {
        // C(n, j) = C(n, j+1) · (j+1)/(n−j)
        expected = &expected * -&r * Q::new((j + 1).into(), (n - j).into());
        if expected != coeffs[j] {
            ok = false;
            break;
        }
    }
    ok
}

/// `p = scale · Π factor^multiplicity`: a common monomial split off, then a univariate rest
/// split at its rational roots into integer linear factors.
fn factored(p: &Poly) -> (Q, Vec<(Poly, u32)>) {
    if let Some(c) = p.as_constant() {
        return (c, Vec::new());
    }
    let (content, primitive) = p.content_and_primitive();
    let mut factors: Vec<(Poly, u32)> = Vec::new();
    // The common monomial: each variable to its smallest power over the terms.
    let mut rest = primitive.clone();
    for var in primitive.variables() {
        let lowest = primitive
            .terms()
            .map(|(m, _)| {
                m.factors()
                    .find(|(n, _)| *n == var)
                    .map(|(_, e)| e)
                    .unwrap_or(0)
            })
            .min()
            .unwrap_or(0);
        if lowest > 0 {
            let x = Poly::var(&var);
            let divisor = x.pow(lowest);
            if let Some(q) = rest.div_exact(&divisor) {
                rest = q;
                factors.push((x, lowest));
            }
        }
    }
    let vars = rest.variables();
    let univariate = vars.len() == 1;
    let coeffs = vars
        .iter()
        .next()
        .filter(|_| univariate)
        .and_then(|v| rest.univariate_coeffs(v).map(|c| (v.clone(), c)));
    let mut rebuilt = factors
        .iter()
        .fold(Poly::one(), |acc, (f, m)| &acc * &f.pow(*m));
    match coeffs {
        // Sturm chains (and square-free parts) of long polynomials with large coefficients
        // cost seconds (the numerator of c₁₂ of a one-parameter rule has degree 24): those
        // are split only when they are a power of one linear factor, a cheap exact test.
        Some((var, coeffs))
            if rest.total_degree() > 1
                && (coeffs.len() <= MAX_FACTORED_DEGREE + 1 || is_linear_power(&coeffs)) =>
        {
            let (roots, cofactor) = rational_roots(&coeffs);
            let x = Poly::var(&var);
            for (root, multiplicity) in roots {
                // (d·x − n) for the root n/d
                let d = Poly::constant(Q::from_integer(root.denom().clone()));
                let n = Poly::constant(Q::from_integer(root.numer().clone()));
                let linear = &(&d * &x) - &n;
                rebuilt = &rebuilt * &linear.pow(multiplicity);
                factors.push((linear, multiplicity));
            }
            if cofactor.len() > 1 {
                let (_, left) = Poly::from_univariate(&var, &cofactor).content_and_primitive();
                rebuilt = &rebuilt * &left;
                factors.push((left, 1));
            }
        }
        _ => {
            if !rest.is_one() {
                rebuilt = &rebuilt * &rest;
                factors.push((rest, 1));
            }
        }
    }
    let ratio = primitive
        .div_exact(&rebuilt)
        .and_then(|q| q.as_constant())
        .unwrap_or_else(Q::one);
    (content * ratio, factors)
}

/// A term as a layout node: coefficient, Gamma values, powers, exp, ln and √π.
pub fn term_node(t: &Term) -> Node {
    let mut top = Vec::new();
    let mut bottom = Vec::new();
    let mut negative = false;
    match ratfunc_node(&t.coefficient) {
        Node::Neg(inner) => {
            negative = true;
            split(*inner, &mut top, &mut bottom);
        }
        other => split(other, &mut top, &mut bottom),
    }
    for (atom, e) in &t.atoms {
        let (node, exponent) = match atom {
            Atom::Gamma(x) => (Node::Call(Function::Gamma, vec![ratfunc_node(&x.0)]), *e),
            Atom::Exp(x) => (Node::Call(Function::Exp, vec![ratfunc_node(&x.0)]), *e),
            Atom::Log(x) => (Node::Call(Function::Log, vec![ratfunc_node(&x.0)]), *e),
            Atom::SqrtPi => {
                let (node, below) = to_node::factor(
                    &crate::closed_form::Factor::SqrtPi { half_exponent: *e },
                    "k",
                );
                if below {
                    bottom.push(node);
                } else {
                    top.push(node);
                }
                continue;
            }
            Atom::Power { base, exponent } => {
                let total = &exponent.0 * &RatFunc::from_integer(*e as i64);
                let half = RatFunc::constant(Q::new(1.into(), 2.into()));
                if total == half {
                    top.push(Node::Call(Function::Sqrt, vec![ratfunc_node(&base.0)]));
                } else if total == -half {
                    bottom.push(Node::Call(Function::Sqrt, vec![ratfunc_node(&base.0)]));
                } else {
                    top.push(Node::pow(ratfunc_node(&base.0), ratfunc_node(&total)));
                }
                continue;
            }
        };
        let powered = Node::pow(node, Node::int(exponent.abs() as i64));
        if exponent < 0 {
            bottom.push(powered);
        } else {
            top.push(powered);
        }
    }
    let node = Node::frac(Node::product(top), Node::product(bottom));
    if negative {
        node.negate()
    } else {
        node
    }
}

fn split(node: Node, top: &mut Vec<Node>, bottom: &mut Vec<Node>) {
    match node {
        Node::Frac(n, d) => {
            top.push(*n);
            bottom.push(*d);
        }
        other => top.push(other),
    }
}

/// A sum of terms.
pub fn expr_node(e: &Expr) -> Node {
    match e.terms.len() {
        0 => Node::int(0),
        1 => term_node(&e.terms[0]),
        _ => Node::Sum(e.terms.iter().map(term_node).collect()),
    }
}

pub(super) fn both(node: &Node) -> (String, String) {
    (text::write(node), latex::write(node))
}

/// `ₚF_q(a…; b…; z)` in text and LaTeX.
pub fn series_strings(s: &HyperSeries) -> (String, String) {
    let list = |v: &[RatFunc], f: fn(&Node) -> String| -> String {
        v.iter()
            .map(|x| f(&ratfunc_node(x)))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let z = ratfunc_node(&s.argument);
    let (p, q) = (s.upper.len(), s.lower.len());
    let text = format!(
        "{}F{}({}; {}; {})",
        subscript(p),
        subscript(q),
        list(&s.upper, text::write),
        list(&s.lower, text::write),
        text::write(&z)
    );
    let latex = format!(
        "{{}}_{{{p}}}F_{{{q}}}\\left({}; {}; {}\\right)",
        list(&s.upper, latex::write),
        list(&s.lower, latex::write),
        latex::write(&z)
    );
    (text, latex)
}

pub(crate) fn subscript(n: usize) -> String {
    n.to_string()
        .chars()
        .map(|c| match c {
            '0' => '₀',
            '1' => '₁',
            '2' => '₂',
            '3' => '₃',
            '4' => '₄',
            '5' => '₅',
            '6' => '₆',
            '7' => '₇',
            '8' => '₈',
            _ => '₉',
        })
        .collect()
}

/// An inequality in text and LaTeX.
pub fn inequality_strings(i: &Inequality) -> (String, String) {
    match i {
        Inequality::Positive(e) => {
            let (t, l) = both(&ratfunc_node(e));
            (format!("{t} > 0"), format!("{l} > 0"))
        }
        Inequality::AbsBelowOne(e) => {
            let (t, l) = both(&ratfunc_node(e));
            (format!("|{t}| < 1"), format!("\\left|{l}\\right| < 1"))
        }
        Inequality::Never(why) => (format!("never ({why})"), "\\text{never}".to_string()),
    }
}
