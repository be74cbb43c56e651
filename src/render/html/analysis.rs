//! Sections 6 and 7: the tail law with its corrections; the total, the mean and the variance
//! with their closed forms, conditions, values, methods and error bounds.

use crate::algebra::RatFunc;
use crate::analysis::Region;
use crate::analysis::{Analysis, Finiteness, HyperSeries, Inequality, NumberReport, Requirement};
use crate::probability::{Event, EventBound};

use super::super::analysis_output::{expr_node, prefactor_node, ratfunc_node};
use super::super::escape::escape_text;
use super::super::mathml::{mo, Math};
use super::super::node::Node;
use super::super::region::{region_latex_parts, region_words};
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
        return String::new();
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
    let with_value = |quantity: &str, symbolic: Math, value: Option<&String>| -> String {
        let mut s = symbolic.element(false);
        if let Some(v) = value {
            s += &format!(" = {}", value_span(quantity, v));
        }
        s
    };
    let mut facts = String::new();
    facts += &fact(
        "C",
        &with_value(
            "prefactor",
            Math::node(&prefactor_node(a, t)),
            numbers.map(|n| &n.prefactor),
        ),
    );
    if !law.rate.is_one() {
        facts += &fact(
            "r",
            &with_value(
                "rate",
                Math::node(&ratfunc_node(&law.rate)),
                numbers.map(|n| &n.rate),
            ),
        );
    }
    facts += &fact(
        "θ",
        &with_value(
            "power",
            Math::node(&ratfunc_node(&law.power)),
            numbers.map(|n| &n.power),
        ),
    );
    if let Some(gamma) = law.tail_exponent() {
        facts += &fact(
            "tail exponent γ = −θ",
            &with_value(
                "tail-exponent",
                Math::node(&ratfunc_node(&gamma)),
                numbers.and_then(|n| n.tail_exponent.as_ref()),
            ),
        );
    }
    for (n, c) in law.corrections.iter().enumerate() {
        facts += &fact(
            &format!("c{}", super::super::analysis_output::subscript(n + 1)),
            &with_value(
                &format!("correction-{}", n + 1),
                Math::node(&ratfunc_node(c)),
                numbers.and_then(|v| v.corrections.get(n)),
            ),
        );
    }
    if let Some(omitted) = &law.omitted {
        use super::super::analysis_output::{omitted_label, omitted_reason};
        let mut content = escape_text(&omitted_reason(omitted));
        let values: Vec<String> = (omitted.first..=omitted.last)
            .filter_map(|n| {
                let value = numbers.and_then(|v| v.corrections.get(n - 1))?;
                Some(format!(
                    "c{} = {}",
                    super::super::analysis_output::subscript(n),
                    value_span(&format!("correction-{n}"), value)
                ))
            })
            .collect();
        if !values.is_empty() {
            content += &format!("; at the given values: {}", values.join(", "));
        }
        facts += &fact(&omitted_label(omitted), &content);
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

/// Where a condition holds and fails, as formulas (the region's text in MathML, its LaTeX as
/// the annotation).
pub(crate) fn region_html(region: &Region) -> String {
    let (holds, fails, note) = region_words(region);
    let (holds_tex, fails_tex, _) = region_latex_parts(region);
    let math = |text: &str, tex: &str| {
        Math::raw(format!("<mtext>{}</mtext>", escape_text(text)), tex).element(false)
    };
    let mut out = format!("holds for {}", math(&holds, &holds_tex));
    if !fails.is_empty() {
        out += &format!(", fails for {}", math(&fails, &fails_tex));
    }
    if let Some(n) = note {
        out += &format!(" ({})", escape_text(&n));
    }
    out
}

fn requirements(list: &[Requirement]) -> String {
    if list.is_empty() {
        return String::new();
    }
    let mut out = String::from("<ul class=\"requirements\">\n");
    for r in list {
        let (word, why) = super::super::analysis_output::verdict_parts(&r.verdict);
        let why = why
            .filter(|w| !w.is_empty())
            .map(|w| format!(": {}", super::super::reason::html(w)))
            .unwrap_or_default();
        let region = r
            .region
            .as_ref()
            .map(|g| format!("; {}", region_html(g)))
            .unwrap_or_default();
        out += &format!(
            "<li>{} — {}; <span class=\"status-{word}\">{word}{}</span>{region}</li>\n",
            inequality_math(&r.inequality).element(false),
            escape_text(&r.purpose),
            why
        );
    }
    out + "</ul>\n"
}

/// The finiteness in words, as HTML (the reason's formulas as inline MathML).
fn finiteness_words(f: &Finiteness) -> String {
    use super::super::reason::html;
    match f {
        Finiteness::Finite => "finite".into(),
        Finiteness::Infinite(why) => format!("infinite ({})", html(why)),
        Finiteness::Undecided => "finite where the conditions hold".into(),
        Finiteness::Undefined(why) => format!("undefined ({})", html(why)),
    }
}

fn number_facts(quantity: &str, n: &NumberReport) -> String {
    let mut facts = fact("value", &value_span(quantity, &n.value));
    if let Some(exact) = &n.exact {
        facts += &fact(
            "exactly",
            &format!(
                "<span class=\"value\">{}</span>",
                escape_text(&crate::render::shown_exact(exact))
            ),
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
        return String::new();
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
    let mut total = sigma.then(seq_k);
    if let Some(series) = &norm.series {
        total = total.op("=", "=", a_b.clone().times(series_math(series)));
    }
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
    if norm.series.is_some() {
        out += &total.element(true);
        out += "\n";
    } else {
        out += &format!(
            "<p>{} over every piece of the support:</p>\n",
            total.element(false)
        );
    }
    out += "<dl class=\"facts\">\n";
    if let Some((_, theorem)) = &norm.closed_form {
        out += &fact("closed form by", &escape_text(theorem.name()));
    }
    if norm.finite_support {
        out += &fact("support", "finite: a finite sum");
    }
    out += &fact("the total is", &finiteness_words(&norm.finiteness));
    if let Some(region) = &norm.finite_for {
        out += &fact("finite", &region_html(region));
    }
    if let Some(v) = &norm.value {
        out += &number_facts("total", v);
        out += &fact("in units of", &format!("{} = 1", a_b.element(false)));
    }
    if let Some(parts) = &norm.parts {
        out += &fact(
            "up to the last breakpoint",
            &format!(
                "<span class=\"value\">{}</span> exactly",
                escape_text(&crate::render::shown_exact(&parts.finite_part))
            ),
        );
        if let Some(tail) = &parts.tail_part {
            let bound = match (&parts.tail_exact, &parts.tail_error_bound) {
                (true, _) => " exactly".to_string(),
                (false, Some(b)) => format!(" (error ≤ {})", escape_text(b)),
                (false, None) => String::new(),
            };
            out += &fact(
                "beyond it",
                &format!("<span class=\"value\">{}</span>{bound}", escape_text(tail)),
            );
        }
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
            &finiteness_words(&m.finiteness),
        );
        if let Some(region) = &m.finite_for {
            out += &fact("finite", &region_html(region));
        }
        if let Some(v) = &m.value {
            out += &number_facts(quantity, v);
        }
        out += "</dl>\n";
        out += &requirements(&m.requirements);
    }
    out
}

/// `P(k ≥ c)`, `P(a ≤ k ≤ b)`, `P(k = c)` as a formula (the layout of
/// `probability_output::event_strings`).
fn event_math(e: &Event) -> Math {
    let bound = |b: &EventBound| Math::node(&ratfunc_node(&b.value));
    let k = Math::node(&Node::sym(&e.index));
    let less = |strict: bool| if strict { ("<", "<") } else { ("≤", "\\le") };
    let greater = |strict: bool| if strict { (">", ">") } else { ("≥", "\\ge") };
    let inner = match (&e.lower, &e.upper) {
        (Some(lo), Some(hi)) if lo == hi => k.op("=", "=", bound(lo)),
        (Some(lo), Some(hi)) => {
            let (a, a_tex) = less(lo.strict);
            let (b, b_tex) = less(hi.strict);
            bound(lo).op(a, a_tex, k).op(b, b_tex, bound(hi))
        }
        (Some(lo), None) => {
            let (a, a_tex) = greater(lo.strict);
            k.op(a, a_tex, bound(lo))
        }
        (None, Some(hi)) => {
            let (a, a_tex) = less(hi.strict);
            k.op(a, a_tex, bound(hi))
        }
        (None, None) => k,
    };
    Math::raw("<mi>P</mi>", "P").then(inner.parenthesised())
}

/// The `--prob` answers under the normalised law (nothing when none was asked for).
pub(super) fn probabilities(page: &ReportPage) -> String {
    if page.probabilities.is_empty() {
        return String::new();
    }
    let mut out = String::from("<h3>Probabilities under the normalised law</h3>\n<table class=\"probabilities\">\n<thead><tr><th>event</th><th>value</th><th>exactly</th><th>error bound</th><th>obtained by</th></tr></thead>\n<tbody>\n");
    for (i, p) in page.probabilities.iter().enumerate() {
        let cells = match &p.value {
            Some(v) => format!(
                "<td>{}</td><td class=\"number\">{}</td><td class=\"number\">{}</td><td>{}</td>",
                value_span(&format!("probability-{}", i + 1), &v.value),
                escape_text(
                    &v.exact
                        .as_deref()
                        .map(crate::render::shown_exact)
                        .unwrap_or_default()
                ),
                escape_text(&v.error_bound),
                escape_text(&v.method)
            ),
            None => format!(
                "<td colspan=\"4\">{}</td>",
                escape_text(p.note.as_deref().unwrap_or("no value"))
            ),
        };
        out += &format!(
            "<tr><td>{}</td>{cells}</tr>\n",
            event_math(&p.event).element(false)
        );
    }
    out + "</tbody>\n</table>\n"
}
