//! The analysis sections of `telescope solve`: tail law, total, mean and variance, as text,
//! LaTeX and the JSON fields `tail`, `normalization`, `mean`, `variance`. Layout only: every
//! number and formula comes from `analysis`.

pub(crate) mod formula;
mod json;

pub use formula::{expr_node, inequality_strings, ratfunc_node, series_strings, term_node};
pub use json::analysis_json;

use serde_json::{json, Value};

use crate::analysis::{
    Analysis, Finiteness, Inequality, Moment, NumberReport, OmittedCorrections, Region,
    Requirement, Verdict,
};
pub(crate) use formula::subscript;

use super::node::Node;
use super::reason;
use super::region::{region_latex, region_text, region_words};
use super::{latex, text, to_node};
use crate::solve::reason::Reason;

/// The verdict in one word and its reason.
pub(super) fn verdict_parts(v: &Verdict) -> (&'static str, Option<&Reason>) {
    match v {
        Verdict::Holds(why) => ("holds", Some(why)),
        Verdict::Fails(why) => ("fails", Some(why)),
        Verdict::Undecided => ("undecided", None),
    }
}

/// The verdict in one word and its reason as text.
pub(super) fn verdict_strings(v: &Verdict) -> (&'static str, Option<String>) {
    let (word, why) = verdict_parts(v);
    (word, why.map(reason::text))
}

fn requirement_text(r: &Requirement) -> String {
    if let Inequality::Never(why) = &r.inequality {
        return format!("{}: no — {why}", r.purpose);
    }
    let (t, _) = inequality_strings(&r.inequality);
    if let (Verdict::Undecided, Some(region)) = (&r.verdict, &r.region) {
        // `α > 0 (…; holds for α > 0, …)` says it twice: then only where it fails.
        let (holds, fails, _) = region_words(region);
        let words = if holds == t && !fails.is_empty() {
            format!("fails for {fails}")
        } else {
            region_text(region, "holds", "fails")
        };
        return format!("{t}   ({}; {words})", r.purpose);
    }
    let (word, why) = verdict_strings(&r.verdict);
    match why {
        Some(w) if !w.is_empty() => format!("{t}   ({}; {word}: {w})", r.purpose),
        _ => format!("{t}   ({}; {word})", r.purpose),
    }
}

fn number_text(n: &NumberReport, note: &str) -> String {
    let mut out = n.value.clone();
    match &n.exact {
        Some(q) if *q != n.value => out += &format!(" = {} exactly", crate::render::shown_exact(q)),
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
pub(super) fn prefactor_node(a: &Analysis, t: &crate::analysis::TailReport) -> Node {
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

/// `c₃` or `c₃…c₁₂`: the corrections left unwritten.
pub(crate) fn omitted_label(omitted: &OmittedCorrections) -> String {
    if omitted.first == omitted.last {
        format!("c{}", subscript(omitted.first))
    } else {
        format!("c{}…c{}", subscript(omitted.first), subscript(omitted.last))
    }
}

/// Why the corrections were left unwritten.
pub(crate) fn omitted_reason(omitted: &OmittedCorrections) -> String {
    let first = subscript(omitted.first);
    match omitted.terms {
        Some(terms) => format!(
            "too large to write out: c{first} has {terms} terms over the common denominator (at most {})",
            crate::analysis::MAX_CORRECTION_TERMS
        ),
        None => format!(
            "too large to write out: building c{first} takes more than {} products of terms",
            crate::analysis::MAX_CORRECTION_WORK
        ),
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

fn finiteness_word(f: &Finiteness, finite_for: Option<&Region>) -> String {
    match (f, finite_for) {
        (Finiteness::Finite, _) => "finite".into(),
        (Finiteness::Infinite(why), _) => format!("infinite ({})", reason::text(why)),
        (Finiteness::Undecided, Some(region)) => region_text(region, "finite", "infinite"),
        (Finiteness::Undecided, None) => "finite where the conditions below hold".into(),
        (Finiteness::Undefined(why), _) => format!("undefined ({})", reason::text(why)),
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
        if let Some(omitted) = &law.omitted {
            out += &format!(
                "  {:<11}{}\n",
                omitted_label(omitted),
                omitted_reason(omitted)
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
    let a_b = text::write(&base_term(a, b));
    match &norm.series {
        Some(series) => {
            let (series_text, _) = series_strings(series);
            out += &format!(
                "total        Σ_{{{index}≥{b}}} {}({index}) = {a_b} · {series_text}\n",
                a.sequence
            );
        }
        None => {
            out += &format!(
                "total        Σ_{{{index}≥{b}}} {}({index}) over the pieces\n",
                a.sequence
            );
        }
    }
    if let Some(p) = &norm.parts {
        let tail = p.tail_part.as_deref().unwrap_or("∞");
        out += &format!(
            "  parts      {} (up to the last breakpoint) + {tail} (last piece), with {a_b} = 1\n",
            crate::render::shown_exact(&p.finite_part)
        );
    }
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
    out += &format!(
        "  total is   {}\n",
        finiteness_word(&norm.finiteness, norm.finite_for.as_ref())
    );
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
    let mut out = format!(
        "{name:<13}{}\n",
        finiteness_word(&m.finiteness, m.finite_for.as_ref())
    );
    if let Some((e, _)) = &m.closed_form {
        if !matches!(
            m.finiteness,
            Finiteness::Infinite(_) | Finiteness::Undefined(_)
        ) {
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

/// `p/q` as `\frac{p}{q}`.
fn latex_rational(q: &str) -> String {
    match q.split_once('/') {
        Some((n, d)) => match n.strip_prefix('-') {
            Some(n) => format!("-\\frac{{{n}}}{{{d}}}"),
            None => format!("\\frac{{{n}}}{{{d}}}"),
        },
        None => q.to_string(),
    }
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
    let mut total = match &norm.series {
        Some(series) => format!(
            "  \\sum_{{{index} \\ge {b}}} {seq_k} &= {a_b}\\,{}",
            series_strings(series).1
        ),
        None => match (
            &norm.value,
            &norm.value.as_ref().and_then(|v| v.exact.clone()),
        ) {
            (_, Some(q)) if q.len() < 60 => format!(
                "  \\sum_{{{index} \\ge {b}}} {seq_k} &= {a_b}\\,{}",
                latex_rational(q)
            ),
            (Some(v), _) => format!(
                "  \\sum_{{{index} \\ge {b}}} {seq_k} &\\approx {a_b}\\,{}",
                v.value
            ),
            (None, _) => {
                format!("  \\sum_{{{index} \\ge {b}}} {seq_k} &= \\sum_{{\\text{{pieces}}}}")
            }
        },
    };
    if let Some((e, _)) = &norm.closed_form {
        total += &format!(" = {a_b}\\,{}", wrap_sum(&expr_node(e)));
    }
    lines.push(total);
    for (name, m) in [
        ("\\operatorname{E}", &a.mean),
        ("\\operatorname{Var}", &a.variance),
    ] {
        // Where the ranges leave finiteness open, the line says for which values it holds.
        let domain = match (&m.finiteness, &m.finite_for) {
            (Finiteness::Undecided, Some(region)) => {
                format!(" && \\text{{for }} {}", region_latex(region))
            }
            _ => String::new(),
        };
        match (&m.finiteness, &m.closed_form) {
            (Finiteness::Infinite(_), _) => lines.push(format!("  {name}[{index}] &= \\infty")),
            (Finiteness::Undefined(_), _) => {}
            (_, Some((e, _))) => lines.push(format!(
                "  {name}[{index}] &= {}{domain}",
                latex::write(&expr_node(e))
            )),
            // A piecewise model's moments are numbers (exact where every part is).
            (_, None) if norm.series.is_none() && m.value.is_some() => {
                let v = m.value.as_ref().expect("checked");
                lines.push(match &v.exact {
                    Some(q) if q.len() < 60 => {
                        format!("  {name}[{index}] &= {}", latex_rational(q))
                    }
                    _ => format!("  {name}[{index}] &\\approx {}", v.value),
                })
            }
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
            let domain = match (&r.verdict, &r.region) {
                (Verdict::Undecided, Some(region)) => {
                    format!(", which holds for ${}$", region_latex(region))
                }
                (Verdict::Fails(why), _) if !why.is_empty() => {
                    format!("; fails: {}", reason::latex(why))
                }
                (Verdict::Fails(_), _) => "; fails".into(),
                _ => String::new(),
            };
            format!(
                "${}$ ({}{domain})",
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
    if purpose.ends_with("(finite mean)") {
        "finite mean"
    } else if purpose.ends_with("(finite variance)") {
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
