//! Sections 6 and 7: the tail law with its corrections; the total, the mean and the variance
//! with their closed forms, conditions, values, methods and error bounds.

use crate::algebra::RatFunc;
use crate::analysis::{Analysis, Finiteness, HyperSeries, Inequality, NumberReport, Requirement};

use super::super::analysis_output::{expr_node, prefactor_node, ratfunc_node};
use super::super::escape::escape_text;
use super::super::mathml::{mo, Math};
use super::super::model_output::sum_json;
use super::super::node::Node;
use super::super::to_node;
use super::ReportPage;

fn k_of(a: &Analysis) -> Math {
    Math::node(&Node::sym(&a.index))
}

/// `c_n` as an identifier with a subscript.
fn indexed(letter: &str, n: usize) -> Math {
    Math::raw(
        format!("<msub><mi>{letter}</mi><mn>{n}</mn></msub>"),
        format!("{letter}_{{{n}}}"),
    )
}

/// `C·r^k·(k/e)^(d·k)·k^θ·(1 + c₁/k + … )`, the law's shape with named constants.
fn law_shape(a: &Analysis, law: &crate::analysis::Tail) -> Math {
    let k = &a.index;
    let mut shape = Math::ident("C");
    if !law.rate.is_one() {
        shape = shape.times(Math::ident("r").sup(k_of(a)));
    }
    if law.factorial_power != 0 {
        let exponent = Node::product(vec![Node::int(law.factorial_power), Node::sym(k)]);
        let k_over_e = Math::raw(
            format!(
                "<mfrac>{}<mi>e</mi></mfrac>",
                Math::node(&Node::sym(k)).mathml()
            ),
            format!("\\frac{{{}}}{{e}}", Math::node(&Node::sym(k)).latex()),
        );
        shape = shape.times(k_over_e.parenthesised().sup(Math::node(&exponent)));
    }
    if !law.power.is_zero() {
        shape = shape.times(k_of(a).sup(Math::ident("θ").then(Math::raw("", ""))));
    }
    let mut series = Math::node(&Node::int(1));
    for n in 1..=law.corrections.len() {
        let term = Math::raw(
            format!(
                "<mfrac>{}{}</mfrac>",
                indexed("c", n).mathml(),
                if n == 1 {
                    Math::node(&Node::sym(k)).mathml().to_string()
                } else {
                    Math::node(&Node::pow(Node::sym(k), Node::int(n as i64)))
                        .mathml()
                        .to_string()
                }
            ),
            format!(
                "\\frac{{c_{{{n}}}}}{{{}}}",
                Math::node(&Node::pow(Node::sym(k), Node::int(n as i64))).latex()
            ),
        );
        series = series.op("+", "+", term);
    }
    series = series.op("+", "+", Math::raw(mo("⋯"), "\\dotsb"));
    shape.times(series.parenthesised())
}

fn fact(label: &str, content: &str) -> String {
    format!("<dt>{}</dt><dd>{content}</dd>\n", escape_text(label))
}

fn value_span(quantity: &str, value: &str) -> String {
    format!(
        "<span class=\"value\" data-quantity=\"{quantity}\">{}</span>",
        escape_text(value)
    )
}

pub(super) fn tail(page: &ReportPage) -> String {
    let Some(a) = &page.analysis else {
        return "<p>The tail law of a piecewise model is not derived yet; it is the tail law of the last piece's rule (section 2).</p>\n".into();
    };
    let Some(t) = &a.tail else {
        return "<p>The support is finite: there is no tail.</p>\n".into();
    };
    let law = &t.law;
    let seq = Math::node(&to_node::sequence_at(&a.sequence, &a.index));
    let mut out = seq
        .op("∼", "\\sim", law_shape(a, law))
        .then(Math::raw("<mspace width=\"1.5em\"/>", "\\qquad"))
        .then(k_of(a).op("→", "\\to", Math::raw(mo("∞"), "\\infty")))
        .element(true);
    out += "\n";
    if t.conditional {
        out += "<p>This law holds when the support is infinite (its end depends on the parameters).</p>\n";
    }
    let numbers = t.numbers.as_ref();
    let with_value = |symbolic: Math, value: Option<&String>| -> String {
        let mut s = symbolic.element(false);
        if let Some(v) = value {
            s += &format!(" = {}", value_span("", v));
        }
        s
    };
    let mut facts = String::new();
    facts += &fact(
        "C",
        &with_value(
            Math::node(&prefactor_node(a, t)),
            numbers.map(|n| &n.prefactor),
        ),
    );
    if !law.rate.is_one() {
        facts += &fact(
            "r",
            &with_value(
                Math::node(&ratfunc_node(&law.rate)),
                numbers.map(|n| &n.rate),
            ),
        );
    }
    facts += &fact(
        "θ",
        &with_value(
            Math::node(&ratfunc_node(&law.power)),
            numbers.map(|n| &n.power),
        ),
    );
    if let Some(gamma) = law.tail_exponent() {
        facts += &fact(
            "tail exponent γ = −θ",
            &with_value(
                Math::node(&ratfunc_node(&gamma)),
                numbers.and_then(|n| n.tail_exponent.as_ref()),
            ),
        );
    }
    for (n, c) in law.corrections.iter().enumerate() {
        facts += &fact(
            &format!("c{}", super::super::analysis_output::subscript(n + 1)),
            &with_value(
                Math::node(&ratfunc_node(c)),
                numbers.and_then(|v| v.corrections.get(n)),
            ),
        );
    }
    out += &format!("<dl class=\"facts\">\n{facts}</dl>\n");
    out += "<p>From Stirling's series for the Gamma quotient with Bernoulli polynomials (DLMF 5.11.8, 5.11.13).</p>\n";
    if let Some(check) = numbers.and_then(|n| n.check.as_ref()) {
        out += &format!(
            "<p>Check: at {} = {}, |a({})/law − 1| = {}; the first omitted term is {}.</p>\n",
            escape_text(&a.index),
            check.k,
            escape_text(&a.index),
            value_span("tail-check", &check.rel_diff),
            escape_text(&check.next_term)
        );
    }
    out
}

/// `ₚF_q(a…; b…; z)`.
fn series_math(s: &HyperSeries) -> Math {
    let list = |v: &[RatFunc]| -> (String, String) {
        let parts: Vec<Math> = v.iter().map(|x| Math::node(&ratfunc_node(x))).collect();
        (
            parts
                .iter()
                .map(|m| m.mathml().to_string())
                .collect::<Vec<_>>()
                .join(&mo(",")),
            parts
                .iter()
                .map(|m| m.latex().to_string())
                .collect::<Vec<_>>()
                .join(", "),
        )
    };
    let (upper, upper_tex) = list(&s.upper);
    let (lower, lower_tex) = list(&s.lower);
    let z = Math::node(&ratfunc_node(&s.argument));
    let (p, q) = (s.upper.len(), s.lower.len());
    Math::raw(
        format!(
            "<mrow><mmultiscripts><mi mathvariant=\"normal\">F</mi><mn>{q}</mn><none/><mprescripts/><mn>{p}</mn><none/></mmultiscripts><mo>&#x2061;</mo><mrow><mo>(</mo>{upper}<mo separator=\"true\">;</mo>{lower}<mo separator=\"true\">;</mo>{}<mo>)</mo></mrow></mrow>",
            z.mathml()
        ),
        format!(
            "{{}}_{{{p}}}F_{{{q}}}\\left({upper_tex}; {lower_tex}; {}\\right)",
            z.latex()
        ),
    )
}

fn inequality_math(i: &Inequality) -> Math {
    match i {
        Inequality::Positive(e) => {
            Math::node(&ratfunc_node(e)).op(">", ">", Math::node(&Node::int(0)))
        }
        Inequality::AbsBelowOne(e) => {
            Math::node(&ratfunc_node(e))
                .absolute()
                .op("<", "<", Math::node(&Node::int(1)))
        }
        Inequality::Never(why) => Math::words(&format!("never ({why})")),
    }
}

fn requirements(list: &[Requirement]) -> String {
    if list.is_empty() {
        return String::new();
    }
    let mut out = String::from("<ul class=\"requirements\">\n");
    for r in list {
        let (word, why) = super::super::analysis_output::verdict_strings(&r.verdict);
        let why = why
            .filter(|w| !w.is_empty())
            .map(|w| format!(": {w}"))
            .unwrap_or_default();
        out += &format!(
            "<li>{} — {}; <span class=\"status-{word}\">{word}{}</span></li>\n",
            inequality_math(&r.inequality).element(false),
            escape_text(&r.purpose),
            escape_text(&why)
        );
    }
    out + "</ul>\n"
}

fn finiteness_words(f: &Finiteness) -> String {
    match f {
        Finiteness::Finite => "finite".into(),
        Finiteness::Infinite(why) => format!("infinite ({why})"),
        Finiteness::Undecided => "finite where the conditions hold".into(),
    }
}

fn number_facts(quantity: &str, n: &NumberReport) -> String {
    let mut facts = fact("value", &value_span(quantity, &n.value));
    if let Some(exact) = &n.exact {
        facts += &fact(
            "exactly",
            &format!("<span class=\"value\">{}</span>", escape_text(exact)),
        );
    }
    facts += &fact(
        "error bound",
        &format!(
            "<span class=\"value\">{}</span>",
            escape_text(&n.error_bound)
        ),
    );
    facts += &fact("obtained by", &escape_text(&n.method));
    if let Some(check) = &n.check {
        facts += &fact(
            "independent check",
            &format!(
                "the numeric sum agrees to a relative {}",
                escape_text(check)
            ),
        );
    }
    facts
}

pub(super) fn sums(page: &ReportPage) -> String {
    let Some(a) = &page.analysis else {
        return piecewise_sum(page);
    };
    let norm = &a.normalization;
    let k = &a.index;
    let seq_k = Math::node(&to_node::sequence_at(&a.sequence, k));
    let a_b = Math::node(&Node::Term(
        a.sequence.clone(),
        Box::new(Node::Int(norm.base_index.clone())),
    ));
    let sigma = Math::raw(
        format!(
            "<munder><mo>∑</mo><mrow>{}</mrow></munder>",
            k_of(a)
                .op("≥", "\\ge", Math::node(&Node::Int(norm.base_index.clone())))
                .mathml()
        ),
        format!("\\sum_{{{k} \\ge {}}}", norm.base_index),
    );
    let mut total = sigma
        .then(seq_k)
        .op("=", "=", a_b.clone().times(series_math(&norm.series)));
    if let Some((e, _)) = &norm.closed_form {
        let value = Math::node(&expr_node(e));
        let value = if matches!(expr_node(e), Node::Sum(_)) {
            value.parenthesised()
        } else {
            value
        };
        total = total.op("=", "=", a_b.clone().times(value));
    }
    let mut out = String::from("<h3>Total</h3>\n");
    out += &total.element(true);
    out += "\n<dl class=\"facts\">\n";
    if let Some((_, theorem)) = &norm.closed_form {
        out += &fact("closed form by", &escape_text(theorem.name()));
    }
    if norm.finite_support {
        out += &fact("support", "finite: a finite sum");
    }
    out += &fact(
        "the total is",
        &escape_text(&finiteness_words(&norm.finiteness)),
    );
    if let Some(v) = &norm.value {
        out += &number_facts("total", v);
        out += &fact("in units of", &format!("{} = 1", a_b.element(false)));
    }
    if let Some(note) = &norm.numeric_note {
        out += &fact("no value", &escape_text(note));
    }
    out += "</dl>\n";
    out += &requirements(&norm.requirements);
    for (quantity, title, symbol, m) in [
        ("mean", "Mean", "\\operatorname{E}", &a.mean),
        ("variance", "Variance", "\\operatorname{Var}", &a.variance),
    ] {
        out += &format!("<h3>{title}</h3>\n");
        let name = if quantity == "mean" { "E" } else { "Var" };
        let lhs = Math::raw(
            format!("<mi>{name}</mi><mo>[</mo>{}<mo>]</mo>", k_of(a).mathml()),
            format!("{symbol}[{k}]"),
        );
        match (&m.finiteness, &m.closed_form) {
            (Finiteness::Infinite(_), _) => {
                out += &lhs
                    .op("=", "=", Math::raw(mo("∞"), "\\infty"))
                    .element(true);
            }
            (_, Some((e, _))) => {
                out += &lhs.op("=", "=", Math::node(&expr_node(e))).element(true);
            }
            _ => {}
        }
        out += "\n<dl class=\"facts\">\n";
        out += &fact(
            &format!("the {quantity} is"),
            &escape_text(&finiteness_words(&m.finiteness)),
        );
        if let Some(v) = &m.value {
            out += &number_facts(quantity, v);
        }
        out += "</dl>\n";
        out += &requirements(&m.requirements);
    }
    out
}

/// The exact sum over a piecewise model's pieces (the same fields as `solve --format json`).
fn piecewise_sum(page: &ReportPage) -> String {
    let Some(sum) = &page.sum else {
        if page.missing.is_empty() {
            return "<p>The sum over the pieces could not be formed.</p>\n".into();
        }
        return "<p>The sum over the pieces needs a value for every parameter.</p>\n".into();
    };
    let json = sum_json(sum);
    let field = |name: &str| json[name].as_str().map(str::to_string);
    let mut out = String::from("<h3>Total</h3>\n<dl class=\"facts\">\n");
    if let Some(total) = field("total") {
        out += &fact("value", &value_span("total", &total));
    }
    if let Some(finite) = field("finite_part") {
        out += &fact(
            "up to the last breakpoint",
            &format!("<span class=\"value\">{}</span>", escape_text(&finite)),
        );
    }
    if let Some(tail) = field("tail_part") {
        out += &fact(
            "the last piece's tail",
            &format!("<span class=\"value\">{}</span>", escape_text(&tail)),
        );
    }
    out += &fact(
        "obtained by",
        &escape_text(&match (field("tail").as_deref(), field("method")) {
            (Some("exact"), _) => {
                "exact rational sums; the last piece's tail as a geometric series or a finite sum"
                    .to_string()
            }
            (_, Some(method)) => method,
            (Some(status), None) => status.replace('_', " "),
            (None, None) => String::new(),
        }),
    );
    out += &fact(
        "error bound",
        &format!(
            "<span class=\"value\">{}</span>",
            escape_text(&field("error_bound").unwrap_or_else(|| "0 (exact)".into()))
        ),
    );
    let base = page.solved.base_index();
    let unit = if page.model.boundary.is_some() {
        format!("{}({base}) from the boundary equation", page.model.sequence)
    } else {
        format!("{}({base}) = 1", page.model.sequence)
    };
    out += &fact("in units of", &escape_text(&unit));
    out += "</dl>\n<p>The mean and the variance of piecewise models are not computed yet.</p>\n";
    out
}
