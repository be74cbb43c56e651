//! `telescope sweep` in text, CSV (long format) and JSON. Layout only: every number and
//! every boundary comes ready from `sweep`.

use serde_json::{json, Map, Value};

use crate::algebra::Q;
use crate::numeric::{decimal, to_rug_rational};
use crate::sweep::boundaries::{Bracket, State};
use crate::sweep::{Boundary, Cell, Location, Missing, Number, Quantity, Sweep};

use super::analysis_output::formula::inequality_strings;
use super::node::Node;
use super::solve_output::condition_strings;
use super::text;

/// A parameter's name as printed (Greek letters as letters).
fn name(n: &str) -> String {
    text::write(&Node::sym(n))
}

/// How a quantity is headed in text.
fn title(q: &Quantity, sweep: &Sweep) -> String {
    match q {
        Quantity::Rate => "r".into(),
        Quantity::Theta => "θ".into(),
        Quantity::Prefactor => "C".into(),
        Quantity::Total => "total".into(),
        Quantity::Mean => "mean".into(),
        Quantity::Variance => "variance".into(),
        Quantity::Term(k) => format!("{}({k})", sweep.sequence),
        Quantity::Probability(e) => super::probability_output::event_strings(e).0,
    }
}

/// An exact value as a short exact decimal when it is one (denominator 2^a·5^b, at most 15
/// significant digits), otherwise as a fraction: a parameter value, printed without loss.
pub fn exact_text(q: &Q) -> String {
    let mut d = q.denom().clone();
    for p in [2u32, 5] {
        while (&d % p) == 0u32.into() {
            d /= p;
        }
    }
    if d == 1u32.into() {
        let digits = decimal::rational_to_decimal(&to_rug_rational(q), 15);
        if crate::algebra::parse_q(&digits).as_ref() == Some(q) {
            return trim_zeros(&digits);
        }
    }
    q.to_string()
}

fn trim_zeros(s: &str) -> String {
    if !s.contains('.') || s.contains('e') {
        return s.to_string();
    }
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// Why one cell is empty: the words after the quantity's name ("infinite: needs …", ": …"),
/// or a reason that stands alone (outside the model, no tail law).
fn missing_reason(m: &Missing, sweep: &Sweep) -> (bool, String) {
    match m {
        Missing::Invalid(c, why) => {
            let (text, _) = condition_strings(c);
            (false, format!("outside the model: {text} fails ({why})"))
        }
        Missing::Infinite {
            failed: Some(i), ..
        } => {
            let (text, _) = inequality_strings(i);
            (true, format!(" infinite: needs {text}"))
        }
        Missing::Infinite { why, .. } => (true, format!(" infinite: {}", super::reason::text(why))),
        Missing::NoTail(end) => (
            false,
            format!(
                "no tail law: the support ends at {} = {end}",
                name(&sweep.index)
            ),
        ),
        Missing::Unavailable(why) => (true, format!(": {why}")),
    }
}

/// The note of one empty cell.
fn missing_note(q: &Quantity, m: &Missing, sweep: &Sweep) -> String {
    match missing_reason(m, sweep) {
        (true, reason) => format!("{}{reason}", title(q, sweep)),
        (false, reason) => reason,
    }
}

/// The note of a point: each reason once, with the quantities it applies to
/// ("mean, variance infinite: needs …").
fn point_note(cells: &[Cell], sweep: &Sweep) -> Option<String> {
    let mut groups: Vec<(bool, String, Vec<String>)> = Vec::new();
    for (q, c) in sweep.quantities.iter().zip(cells) {
        if let Cell::Missing(m) = c {
            let (named, reason) = missing_reason(m, sweep);
            match groups.iter_mut().find(|g| g.1 == reason) {
                Some(g) => g.2.push(title(q, sweep)),
                None => groups.push((named, reason, vec![title(q, sweep)])),
            }
        }
    }
    let notes: Vec<String> = groups
        .into_iter()
        .map(|(named, reason, titles)| {
            if named {
                format!("{}{reason}", titles.join(", "))
            } else {
                reason
            }
        })
        .collect();
    (!notes.is_empty()).then(|| notes.join("; "))
}

fn state_word(s: State) -> &'static str {
    match s {
        State::Finite => "finite",
        State::Infinite => "infinite",
        State::Invalid => "outside the model",
    }
}

fn boundary_text(b: &Boundary, sweep: &Sweep) -> String {
    let p = name(&b.param);
    let t = title(&b.quantity, sweep);
    let line = b
        .line
        .as_ref()
        .map(|(n, v)| format!(" (with {} = {})", name(n), exact_text(v)))
        .unwrap_or_default();
    let place = match &b.location {
        Location::Exact(q) => format!("{p} = {} exactly", q),
        Location::Bracketed {
            low,
            high,
            by: Bracket::Bisection,
        } => format!(
            "{p} in [{}, {}] (an irrational root, bracketed by bisection)",
            decimal::rational_to_decimal(&to_rug_rational(low), 25),
            decimal::rational_to_decimal(&to_rug_rational(high), 25)
        ),
        Location::Bracketed { low, high, .. } => format!(
            "{p} between the sweep points {} and {} (bracketed numerically)",
            exact_text(low),
            exact_text(high)
        ),
    };
    let at =
        b.at.map(|s| format!(", {} at it", state_word(s)))
            .unwrap_or_default();
    let from = b
        .requirement
        .as_ref()
        .map(|i| format!("; from {}", inequality_strings(i).0))
        .unwrap_or_default();
    let sides = match (b.below, b.above) {
        (Some(lo), Some(hi)) => format!("{} below, {} above", state_word(lo), state_word(hi)),
        (None, Some(hi)) => format!("{} above", state_word(hi)),
        (Some(lo), None) => format!("{} below", state_word(lo)),
        (None, None) => "changes at".to_string(),
    };
    let edge = match (b.below, b.above) {
        (None, _) => " (the start of the range)",
        (_, None) => " (the end of the range)",
        _ => "",
    };
    format!("{t}: {sides} {place}{edge}{at}{line}{from}")
}

fn header(sweep: &Sweep) -> String {
    let mut out = String::new();
    for a in &sweep.axes {
        out += &format!(
            "vary         {} from {} to {}, {} points{}\n",
            name(&a.name),
            exact_text(&a.from),
            exact_text(&a.to),
            a.values.len(),
            if a.log { ", log-spaced" } else { "" }
        );
    }
    if !sweep.fixed.is_empty() {
        let fixed: Vec<String> = sweep
            .fixed
            .iter()
            .map(|(n, v)| format!("{} = {v}", name(n)))
            .collect();
        out += &format!("parameters   {}\n", fixed.join(", "));
    }
    out += &format!(
        "base term    {}({}) = 1; {} significant digits\n",
        sweep.sequence, sweep.base_index, sweep.digits
    );
    out
}

/// Aligned columns: the varied parameters, one column per quantity, and a note.
pub fn sweep_text(sweep: &Sweep) -> String {
    let mut head: Vec<String> = sweep.axes.iter().map(|a| name(&a.name)).collect();
    head.extend(sweep.quantities.iter().map(|q| title(q, sweep)));
    head.push("note".into());
    let rows: Vec<Vec<String>> = sweep
        .points
        .iter()
        .map(|p| {
            let mut row: Vec<String> = p.at.iter().map(exact_text).collect();
            row.extend(p.cells.iter().map(|c| match c {
                // short exact values as exact text (1, -39/19, 1.95), others to the digits
                Cell::Value(Number { exact: Some(q), .. }) if exact_text(q).len() <= 16 => {
                    exact_text(q)
                }
                Cell::Value(n) => n.value.clone(),
                Cell::Missing(Missing::Infinite { .. }) => "∞".into(),
                Cell::Missing(_) => "—".into(),
            }));
            row.push(point_note(&p.cells, sweep).unwrap_or_default());
            row
        })
        .collect();
    let columns = head.len();
    let widths: Vec<usize> = (0..columns - 1)
        .map(|i| {
            rows.iter()
                .map(|r| r[i].chars().count())
                .chain([head[i].chars().count()])
                .max()
                .unwrap_or(1)
        })
        .collect();
    let line = |cells: &[String]| -> String {
        let mut s = String::new();
        for (i, c) in cells.iter().enumerate() {
            if i + 1 < columns {
                s += &format!("{c:<w$}  ", w = widths[i]);
            } else {
                s += c;
            }
        }
        s.trim_end().to_string() + "\n"
    };
    let mut out = header(sweep);
    out += "\n";
    out += &line(&head);
    for r in &rows {
        out += &line(r);
    }
    out += "\nboundaries\n";
    if sweep.boundaries.is_empty() {
        out += "  none inside the range for the total, mean or variance\n";
    }
    for b in &sweep.boundaries {
        out += &format!("  {}\n", boundary_text(b, sweep));
    }
    out += &evidence_text(sweep);
    out
}

fn evidence_text(sweep: &Sweep) -> String {
    if sweep.checks.is_empty() {
        return String::new();
    }
    let points: std::collections::BTreeSet<usize> = sweep.checks.iter().map(|c| c.point).collect();
    let worst = sweep
        .checks
        .iter()
        .filter_map(|c| c.rel_diff.parse::<f64>().ok().map(|v| (v, c)))
        .fold(None::<(f64, &str)>, |acc, (v, c)| match acc {
            Some((w, _)) if w >= v => acc,
            _ => Some((v, c.rel_diff.as_str())),
        });
    format!(
        "evidence     closed forms against the independent numeric sums at {} points: largest relative difference {}\n",
        points.len(),
        worst.map(|(_, s)| s).unwrap_or("—")
    )
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Long format: one row per point, the varied parameters first (as exact decimals or
/// fractions), then each quantity's decimal value and its exact value (empty when it has
/// none), then the note.
pub fn sweep_csv(sweep: &Sweep) -> String {
    let mut head: Vec<String> = sweep.axes.iter().map(|a| a.name.clone()).collect();
    for q in &sweep.quantities {
        let key = q.key(&sweep.sequence);
        head.push(key.clone());
        head.push(format!("{key}_exact"));
    }
    head.push("note".into());
    let mut out = head
        .iter()
        .map(|h| csv_field(h))
        .collect::<Vec<_>>()
        .join(",")
        + "\n";
    for p in &sweep.points {
        let mut row: Vec<String> = p.at.iter().map(exact_text).collect();
        for c in &p.cells {
            match c {
                Cell::Value(n) => {
                    row.push(n.value.clone());
                    row.push(n.exact.as_ref().map(|q| q.to_string()).unwrap_or_default());
                }
                Cell::Missing(_) => {
                    row.push(String::new());
                    row.push(String::new());
                }
            }
        }
        row.push(point_note(&p.cells, sweep).unwrap_or_default());
        out += &(row
            .iter()
            .map(|f| csv_field(f))
            .collect::<Vec<_>>()
            .join(",")
            + "\n");
    }
    out
}

fn exact_json(q: &Q, digits: u32) -> Value {
    json!({
        "exact": q.to_string(),
        "value": decimal::rational_to_decimal(&to_rug_rational(q), digits),
    })
}

fn number_json(n: &Number) -> Value {
    json!({
        "value": n.value,
        "exact": n.exact.as_ref().map(|q| q.to_string()),
        "error_bound": n.error_bound,
        "method": n.method,
    })
}

fn boundary_json(b: &Boundary, sweep: &Sweep) -> Value {
    let digits = sweep.digits;
    let (kind, location) = match &b.location {
        Location::Exact(q) => ("exact", json!({ "exact": exact_json(q, digits) })),
        Location::Bracketed { low, high, by } => (
            match by {
                Bracket::Bisection => "bracketed_bisection",
                Bracket::SweepPoints => "bracketed_sweep_points",
            },
            json!({ "low": exact_json(low, digits), "high": exact_json(high, digits) }),
        ),
    };
    let mut m = Map::new();
    m.insert("quantity".into(), json!(b.quantity.key(&sweep.sequence)));
    m.insert("param".into(), json!(b.param));
    m.insert(
        "line".into(),
        b.line
            .as_ref()
            .map(|(n, v)| json!({ "param": n, "value": exact_json(v, digits) }))
            .unwrap_or(Value::Null),
    );
    m.insert("kind".into(), json!(kind));
    if let Value::Object(loc) = location {
        m.extend(loc);
    }
    m.insert("below".into(), json!(b.below.map(state_word)));
    m.insert("at".into(), json!(b.at.map(state_word)));
    m.insert("above".into(), json!(b.above.map(state_word)));
    m.insert(
        "condition".into(),
        b.requirement
            .as_ref()
            .map(|i| {
                let (t, l) = inequality_strings(i);
                json!({ "text": t, "latex": l })
            })
            .unwrap_or(Value::Null),
    );
    m.insert("text".into(), json!(boundary_text(b, sweep)));
    Value::Object(m)
}

/// The whole sweep as JSON (fields documented in the README).
pub fn sweep_json(sweep: &Sweep) -> Value {
    let digits = sweep.digits;
    let keys: Vec<String> = sweep
        .quantities
        .iter()
        .map(|q| q.key(&sweep.sequence))
        .collect();
    let points: Vec<Value> = sweep
        .points
        .iter()
        .map(|p| {
            let mut at = Map::new();
            for (a, v) in sweep.axes.iter().zip(&p.at) {
                at.insert(a.name.clone(), exact_json(v, digits));
            }
            let mut values = Map::new();
            let mut reasons = Map::new();
            for ((q, key), c) in sweep.quantities.iter().zip(&keys).zip(&p.cells) {
                match c {
                    Cell::Value(n) => {
                        values.insert(key.clone(), number_json(n));
                    }
                    Cell::Missing(m) => {
                        values.insert(key.clone(), Value::Null);
                        reasons.insert(key.clone(), json!(missing_note(q, m, sweep)));
                    }
                }
            }
            json!({
                "at": at,
                "values": values,
                "reasons": reasons,
                "note": point_note(&p.cells, sweep),
            })
        })
        .collect();
    let checks: Vec<Value> = sweep
        .checks
        .iter()
        .map(|c| {
            json!({
                "at": sweep.axes.iter().zip(&sweep.points[c.point].at)
                    .map(|(a, v)| (a.name.clone(), json!(v.to_string())))
                    .collect::<Map<String, Value>>(),
                "quantity": c.quantity.key(&sweep.sequence),
                "rel_diff": c.rel_diff,
            })
        })
        .collect();
    json!({
        "sequence": sweep.sequence,
        "index": sweep.index,
        "base_index": sweep.base_index.to_string(),
        "digits": digits.to_string(),
        "vary": sweep.axes.iter().map(|a| json!({
            "name": a.name,
            "from": exact_json(&a.from, digits),
            "to": exact_json(&a.to, digits),
            "points": a.values.len().to_string(),
            "log": a.log,
        })).collect::<Vec<_>>(),
        "params": sweep.fixed.iter().map(|(n, v)| (n.clone(), json!(v.to_string()))).collect::<Map<String, Value>>(),
        "quantities": keys,
        "points": points,
        "boundaries": sweep.boundaries.iter().map(|b| boundary_json(b, sweep)).collect::<Vec<_>>(),
        "checks": checks,
    })
}
