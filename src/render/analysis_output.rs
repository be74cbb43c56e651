//! The analysis sections of `telescope solve`: tail law, total, mean and variance, as text,
//! LaTeX and the JSON fields `tail`, `normalization`, `mean`, `variance`. Layout only: every
//! number and formula comes from `analysis`.

use serde_json::{json, Map, Value};

use num_traits::{One, Signed};

use crate::algebra::{rational_roots, Poly, RatFunc, Q};
use crate::analysis::{
    Analysis, Atom, Expr, Finiteness, HyperSeries, Inequality, Moment, NumberReport, Requirement,
    Term, Verdict,
};

use super::node::{Function, Node};
use super::{latex, text, to_node};

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
        Some((var, coeffs)) if rest.total_degree() > 1 => {
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

fn both(node: &Node) -> (String, String) {
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

fn subscript(n: usize) -> String {
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

fn verdict_strings(v: &Verdict) -> (&'static str, Option<&str>) {
    match v {
        Verdict::Holds(why) => ("holds", Some(why)),
        Verdict::Fails(why) => ("fails", Some(why)),
        Verdict::Undecided => ("undecided", None),
    }
}

fn requirement_text(r: &Requirement) -> String {
    if let Inequality::Never(why) = &r.inequality {
        return format!("{}: no — {why}", r.purpose);
    }
    let (t, _) = inequality_strings(&r.inequality);
    let (word, why) = verdict_strings(&r.verdict);
    match why {
        Some(w) if !w.is_empty() => format!("{t}   ({}; {word}: {w})", r.purpose),
        _ => format!("{t}   ({}; {word})", r.purpose),
    }
}

fn number_text(n: &NumberReport, note: &str) -> String {
    let mut out = n.value.clone();
    match &n.exact {
        Some(q) if *q != n.value => out += &format!(" = {q} exactly"),
        Some(_) => out += " exactly",
        None => out += &format!(" (error ≤ {})", n.error_bound),
    }
    out += note;
    out += &format!("; {}", n.method);
    if let Some(check) = &n.check {
        out += &format!("; numeric sum agrees to {check}");
    }
    out
}

/// The prefactor as shown: `a(b)·C`, or the normalised `C/total`.
fn prefactor_node(a: &Analysis, t: &crate::analysis::TailReport) -> Node {
    // Rendered from the exact term (the same value as `law.prefactor`), which writes 2^(1/2)
    // as √2 and keeps numbers apart from powers.
    match &t.normalized_prefactor {
        Some(term) => term_node(term),
        None => times(
            base_term(a, &a.normalization.base_index),
            term_node(&t.law.prefactor_term),
        ),
    }
}

/// `lead · node`, with `lead` joining the numerator of a fraction.
fn times(lead: Node, node: Node) -> Node {
    match node {
        Node::Frac(n, d) => Node::frac(Node::product(vec![lead, *n]), *d),
        Node::Neg(inner) => times(lead, *inner).negate(),
        other => Node::product(vec![lead, other]),
    }
}

fn base_term(a: &Analysis, b: &num_bigint::BigInt) -> Node {
    Node::Term(a.sequence.clone(), Box::new(Node::Int(b.clone())))
}

/// The law's shape with the rate and the power written out, e.g.
/// `C · q^k · (k/e)^(−k) · k^(r − 1) · (1 + c₁/k + c₂/k² + …)`.
fn law_shape(a: &Analysis, law: &crate::analysis::Tail) -> String {
    let k = &a.index;
    let d = law.factorial_power;
    let terms = law.corrections.len();
    let mut parts = vec!["C".to_string()];
    if !law.rate.is_one() {
        parts.push(text::write(&Node::pow(
            ratfunc_node(&law.rate),
            Node::sym(k),
        )));
    }
    match d {
        0 => {}
        1 => parts.push(format!("({k}/e)^{k}")),
        -1 => parts.push(format!("({k}/e)^(−{k})")),
        d if d < 0 => parts.push(format!("({k}/e)^(−{}{k})", -d)),
        d => parts.push(format!("({k}/e)^({d}{k})")),
    }
    if !law.power.is_zero() {
        parts.push(text::write(&Node::pow(
            Node::sym(k),
            ratfunc_node(&law.power),
        )));
    }
    let mut series = String::from("1");
    let supers = ["", "", "²", "³", "⁴", "⁵", "⁶", "⁷", "⁸", "⁹"];
    for n in 1..=terms {
        let power = if n < supers.len() {
            supers[n].to_string()
        } else {
            format!("^{n}")
        };
        series += &format!(" + c{}/{k}{power}", subscript(n));
    }
    series += " + …";
    parts.push(format!("({series})"));
    format!("{}({k}) ~ {}", a.sequence, parts.join(" · "))
}

fn finiteness_word(f: &Finiteness) -> String {
    match f {
        Finiteness::Finite => "finite".into(),
        Finiteness::Infinite(why) => format!("infinite ({why})"),
        Finiteness::Undecided => "finite where the conditions below hold".into(),
    }
}

/// The text sections appended to `solve`'s report.
pub fn analysis_text(a: &Analysis) -> String {
    let mut out = String::new();
    let index = &a.index;
    if let Some(t) = &a.tail {
        let law = &t.law;
        out += &format!(
            "tail law     {}{}\n",
            law_shape(a, law),
            if t.conditional {
                "   (when the support is infinite)"
            } else {
                ""
            }
        );
        out += &format!("  C          {}\n", text::write(&prefactor_node(a, t)));
        if !law.rate.is_one() {
            out += &format!("  rate       {}\n", text::write(&ratfunc_node(&law.rate)));
        }
        out += &format!("  power      {}", text::write(&ratfunc_node(&law.power)));
        if let Some(gamma) = law.tail_exponent() {
            out += &format!(
                "   (power-law tail exponent γ = −θ = {})",
                text::write(&ratfunc_node(&gamma))
            );
        }
        out += "\n";
        for (n, c) in law.corrections.iter().enumerate() {
            out += &format!(
                "  c{:<10}{}\n",
                subscript(n + 1),
                text::write(&ratfunc_node(c))
            );
        }
        if let Some(nums) = &t.numbers {
            out += &format!("  C ≈        {}\n", nums.prefactor);
            if let Some(check) = &nums.check {
                out += &format!(
                    "  check      at {index} = {}: |a({index})/law − 1| = {} (next term of the law: {})\n",
                    check.k, check.rel_diff, check.next_term
                );
            }
        }
    }
    let norm = &a.normalization;
    let b = &norm.base_index;
    let (series_text, _) = series_strings(&norm.series);
    let a_b = text::write(&base_term(a, b));
    out += &format!(
        "total        Σ_{{{index}≥{b}}} {}({index}) = {a_b} · {series_text}\n",
        a.sequence
    );
    if let Some((e, theorem)) = &norm.closed_form {
        let value = match expr_node(e) {
            sum @ Node::Sum(_) => format!("({})", text::write(&sum)),
            other => text::write(&other),
        };
        out += &format!("  closed form  {a_b} · {value}   by {}\n", theorem.name());
    }
    if norm.finite_support {
        out += "  finite support: a finite sum\n";
    }
    for r in &norm.requirements {
        out += &format!("  condition  {}\n", requirement_text(r));
    }
    out += &format!("  total is   {}\n", finiteness_word(&norm.finiteness));
    if let Some(v) = &norm.value {
        out += &format!(
            "  value      {}\n",
            number_text(v, &format!(" with {a_b} = 1"))
        );
    }
    if let Some(note) = &norm.numeric_note {
        out += &format!("  numeric    no value: {note}\n");
    }
    if let Some((expr, number)) = &norm.base_value {
        if let Some(e) = expr {
            out += &format!("  normalised {a_b} = {}\n", text::write(&expr_node(e)));
        }
        if let Some(n) = number {
            out += &format!("  normalised {a_b} = {}\n", number_text(n, ""));
        }
    }
    out += &moment_text("mean", &a.mean);
    out += &moment_text("variance", &a.variance);
    out
}

fn moment_text(name: &str, m: &Moment) -> String {
    let mut out = format!("{name:<13}{}\n", finiteness_word(&m.finiteness));
    if let Some((e, _)) = &m.closed_form {
        if !matches!(m.finiteness, Finiteness::Infinite(_)) {
            out += &format!("  closed form  {}\n", text::write(&expr_node(e)));
        }
    }
    for r in &m.requirements {
        out += &format!("  condition  {}\n", requirement_text(r));
    }
    if let Some(v) = &m.value {
        out += &format!("  value      {}\n", number_text(v, ""));
    }
    out
}

/// A LaTeX fragment (amsmath) with the tail law, the total and the moments.
pub fn analysis_latex(a: &Analysis) -> String {
    let index = &a.index;
    let mut lines = Vec::new();
    let seq_k = latex::write(&to_node::sequence_at(&a.sequence, index));
    if let Some(t) = &a.tail {
        let law = &t.law;
        let mut parts = Vec::new();
        parts.push(latex::write(&prefactor_node(a, t)));
        if !law.rate.is_one() {
            parts.push(format!(
                "{}^{{{index}}}",
                latex::write(&Node::pow(ratfunc_node(&law.rate), Node::int(1)))
            ));
        }
        if law.factorial_power != 0 {
            parts.push(format!(
                "\\left(\\frac{{{index}}}{{e}}\\right)^{{{}{index}}}",
                law.factorial_power
            ));
        }
        parts.push(format!(
            "{index}^{{{}}}",
            latex::write(&ratfunc_node(&law.power))
        ));
        let mut series = String::from("1");
        for (n, c) in law.corrections.iter().enumerate() {
            if c.is_zero() {
                continue;
            }
            let node = ratfunc_node(c);
            let (sign, body) = match node {
                Node::Neg(inner) => ("-", *inner),
                other => ("+", other),
            };
            let body = match body {
                Node::Sum(_) => format!("\\left({}\\right)", latex::write(&body)),
                other => latex::write(&other),
            };
            series += &format!(" {sign} {body}\\,{index}^{{-{}}}", n + 1);
        }
        series += " + \\dotsb";
        parts.push(format!("\\left({series}\\right)"));
        lines.push(format!(
            "  {seq_k} &\\sim {} && {index} \\to \\infty",
            parts.join("\\,")
        ));
    }
    let norm = &a.normalization;
    let b = &norm.base_index;
    let a_b = latex::write(&base_term(a, b));
    let (_, series) = series_strings(&norm.series);
    let mut total = format!("  \\sum_{{{index} \\ge {b}}} {seq_k} &= {a_b}\\,{series}");
    if let Some((e, _)) = &norm.closed_form {
        total += &format!(" = {a_b}\\,{}", wrap_sum(&expr_node(e)));
    }
    lines.push(total);
    for (name, m) in [
        ("\\operatorname{E}", &a.mean),
        ("\\operatorname{Var}", &a.variance),
    ] {
        match (&m.finiteness, &m.closed_form) {
            (Finiteness::Infinite(_), _) => lines.push(format!("  {name}[{index}] &= \\infty")),
            (_, Some((e, _))) => lines.push(format!(
                "  {name}[{index}] &= {}",
                latex::write(&expr_node(e))
            )),
            _ => {}
        }
    }
    let mut out = String::from("\\begin{align*}\n");
    out += &lines.join(" \\\\\n");
    out += "\n\\end{align*}\n";
    let conditions: Vec<String> = norm
        .requirements
        .iter()
        .chain(&a.mean.requirements)
        .chain(&a.variance.requirements)
        .filter(
            |r| !matches!(r.inequality, Inequality::Positive(ref e) if e.as_constant().is_some()),
        )
        .map(|r| {
            format!(
                "${}$ ({})",
                inequality_strings(&r.inequality).1,
                latex_purpose(&r.purpose)
            )
        })
        .collect();
    if !conditions.is_empty() {
        let mut unique: Vec<String> = Vec::new();
        for c in conditions {
            if !unique.contains(&c) {
                unique.push(c);
            }
        }
        out += &format!("where {}.\n", unique.join("; "));
    }
    out
}

/// The purpose in plain ASCII words (the text form uses Σ and ², which amsmath alone does not
/// typeset outside math mode).
fn latex_purpose(purpose: &str) -> &'static str {
    if purpose.contains("mean") {
        "finite mean"
    } else if purpose.contains("variance") {
        "finite variance"
    } else {
        "convergent total"
    }
}

fn wrap_sum(n: &Node) -> String {
    match n {
        Node::Sum(_) => format!("\\left({}\\right)", latex::write(n)),
        other => latex::write(other),
    }
}

fn formula(node: &Node) -> Map<String, Value> {
    let mut m = Map::new();
    m.insert("text".into(), Value::String(text::write(node)));
    m.insert("latex".into(), Value::String(latex::write(node)));
    m
}

fn with_value(node: &Node, value: Option<&str>) -> Value {
    let mut m = formula(node);
    if let Some(v) = value {
        m.insert("value".into(), Value::String(v.to_string()));
    }
    Value::Object(m)
}

fn requirement_json(r: &Requirement) -> Value {
    let (t, l) = inequality_strings(&r.inequality);
    let (word, why) = verdict_strings(&r.verdict);
    json!({ "text": t, "latex": l, "purpose": r.purpose, "status": word, "settled_by": why })
}

fn finite_json(f: &Finiteness) -> Value {
    match f {
        Finiteness::Finite => Value::Bool(true),
        Finiteness::Infinite(_) => Value::Bool(false),
        Finiteness::Undecided => Value::Null,
    }
}

fn number_fields(m: &mut Map<String, Value>, n: Option<&NumberReport>) {
    m.insert(
        "value".into(),
        n.map(|n| Value::String(n.value.clone()))
            .unwrap_or(Value::Null),
    );
    m.insert(
        "exact".into(),
        n.and_then(|n| n.exact.clone())
            .map(Value::String)
            .unwrap_or(Value::Null),
    );
    m.insert(
        "error_bound".into(),
        n.map(|n| Value::String(n.error_bound.clone()))
            .unwrap_or(Value::Null),
    );
    m.insert(
        "method".into(),
        n.map(|n| Value::String(n.method.clone()))
            .unwrap_or(Value::Null),
    );
    m.insert(
        "check_rel_diff".into(),
        n.and_then(|n| n.check.clone())
            .map(Value::String)
            .unwrap_or(Value::Null),
    );
}

fn moment_json(m: &Moment) -> Value {
    if matches!(m.finiteness, Finiteness::Infinite(_)) {
        return Value::Null;
    }
    let mut out = Map::new();
    out.insert(
        "closed_form".into(),
        m.closed_form
            .as_ref()
            .map(|(e, _)| Value::Object(formula(&expr_node(e))))
            .unwrap_or(Value::Null),
    );
    out.insert(
        "condition".into(),
        Value::Array(m.requirements.iter().map(requirement_json).collect()),
    );
    out.insert("finite".into(), finite_json(&m.finiteness));
    number_fields(&mut out, m.value.as_ref());
    Value::Object(out)
}

/// The JSON fields `tail`, `normalization`, `mean`, `variance` and `divergent`.
pub fn analysis_json(a: &Analysis) -> Map<String, Value> {
    let mut out = Map::new();
    let tail = a.tail.as_ref().map(|t| {
        let law = &t.law;
        let nums = t.numbers.as_ref();
        json!({
            "rate": with_value(&ratfunc_node(&law.rate), nums.map(|n| n.rate.as_str())),
            "power": with_value(&ratfunc_node(&law.power), nums.map(|n| n.power.as_str())),
            "factorial_power": law.factorial_power.to_string(),
            "prefactor": with_value(&prefactor_node(a, t), nums.map(|n| n.prefactor.as_str())),
            "prefactor_normalized": t.normalized_prefactor.is_some(),
            "corrections": law.corrections.iter().enumerate().map(|(i, c)| {
                with_value(&ratfunc_node(c), nums.and_then(|n| n.corrections.get(i)).map(|s| s.as_str()))
            }).collect::<Vec<_>>(),
            "tail_exponent": law.tail_exponent().map(|g| {
                with_value(&ratfunc_node(&g), nums.and_then(|n| n.tail_exponent.as_deref()))
            }),
            "conditional": t.conditional,
            "check": nums.and_then(|n| n.check.as_ref()).map(|c| json!({
                "k": c.k.to_string(), "rel_diff": c.rel_diff, "next_term": c.next_term,
            })),
        })
    });
    out.insert("tail".into(), tail.unwrap_or(Value::Null));
    let norm = &a.normalization;
    let mut n = Map::new();
    let (st, sl) = series_strings(&norm.series);
    n.insert("series".into(), json!({ "text": st, "latex": sl }));
    n.insert(
        "closed_form".into(),
        norm.closed_form
            .as_ref()
            .map(|(e, th)| {
                let mut m = formula(&expr_node(e));
                m.insert("theorem".into(), Value::String(th.name().into()));
                Value::Object(m)
            })
            .unwrap_or(Value::Null),
    );
    n.insert(
        "condition".into(),
        Value::Array(norm.requirements.iter().map(requirement_json).collect()),
    );
    n.insert("finite".into(), finite_json(&norm.finiteness));
    n.insert("finite_support".into(), Value::Bool(norm.finite_support));
    number_fields(&mut n, norm.value.as_ref());
    n.insert(
        "numeric_note".into(),
        norm.numeric_note
            .clone()
            .map(Value::String)
            .unwrap_or(Value::Null),
    );
    n.insert(
        "base_value".into(),
        match &norm.base_value {
            Some((expr, number)) => {
                let mut m = expr
                    .as_ref()
                    .map(|e| formula(&expr_node(e)))
                    .unwrap_or_default();
                number_fields(&mut m, number.as_ref());
                Value::Object(m)
            }
            None => Value::Null,
        },
    );
    out.insert("normalization".into(), Value::Object(n));
    out.insert("mean".into(), moment_json(&a.mean));
    out.insert("variance".into(), moment_json(&a.variance));
    let mut divergent = Vec::new();
    for (name, f, reqs) in [
        ("total", &norm.finiteness, &norm.requirements),
        ("mean", &a.mean.finiteness, &a.mean.requirements),
        ("variance", &a.variance.finiteness, &a.variance.requirements),
    ] {
        if let Finiteness::Infinite(why) = f {
            let failed: Vec<Value> = reqs
                .iter()
                .filter(|r| r.fails())
                .map(requirement_json)
                .collect();
            divergent.push(json!({ "quantity": name, "reason": why, "failed": failed }));
        }
    }
    out.insert("divergent".into(), Value::Array(divergent));
    out
}

/// `table --normalize` as text: the table, then what normalising did and its bound.
pub fn normalized_table_text(n: &crate::table::NormalizedTable) -> String {
    let mut out = super::table_text(&n.table);
    out += &format!(
        "# normalised: a(b) = {} (1/total by {}); the total over the whole support is 1 within a relative {}\n",
        n.base_value, n.method, n.total_error_bound
    );
    out += &format!(
        "# the printed rows sum to {} (± {} from rounding the rows)\n",
        n.rows_sum, n.rows_rounding_bound
    );
    out
}

/// `table --normalize --format json`: the table's fields plus `normalization`.
pub fn normalized_table_json(n: &crate::table::NormalizedTable) -> Value {
    let mut v = super::table_json(&n.table);
    if let Value::Object(m) = &mut v {
        m.insert(
            "normalization".into(),
            json!({
                "base_value": n.base_value,
                "method": n.method,
                "total_error_bound": n.total_error_bound,
                "rows_sum": n.rows_sum,
                "rows_rounding_bound": n.rows_rounding_bound,
            }),
        );
    }
    v
}
