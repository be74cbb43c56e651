//! What a sweep is asked to do, read from the command line: the varied parameters and their
//! points (`--vary NAME=A..B`, `--points`, `--step`, `--log`) and the quantities
//! (`--quantities rate,theta,total,…`). Every refusal points into the argument it came from.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive};

use crate::algebra::{parse_q, Q};
use crate::diagnostic::Diagnostic;
use crate::model::Model;
use crate::probability::{parse_event, Event};

/// Fewest and most points along one axis, and in a whole grid.
pub const MIN_POINTS: u64 = 2;
pub const MAX_POINTS: u64 = 1_000_000;
/// Points along an axis when neither `--points` nor `--step` is given.
pub const DEFAULT_POINTS: u64 = 51;
/// Significant digits of a point placed on a log scale (the point itself is then exact).
const LOG_POINT_DIGITS: usize = 8;
/// Largest `K − b` for `a(K)`: the value is a direct product of that many factors.
pub const MAX_TERM_STEPS: u64 = 1_000_000;

/// An argument that was refused: its flag, its text, and where in it the problem is.
#[derive(Clone, Debug, PartialEq)]
pub struct ArgError {
    pub flag: String,
    pub text: String,
    pub diagnostic: Diagnostic,
}

fn refuse(flag: &str, text: &str, span: std::ops::Range<usize>, message: String) -> ArgError {
    ArgError {
        flag: flag.to_string(),
        text: text.to_string(),
        diagnostic: Diagnostic::new(message, span),
    }
}

trait Hint {
    fn hint(self, help: impl Into<String>) -> Self;
}

impl Hint for ArgError {
    fn hint(mut self, help: impl Into<String>) -> Self {
        self.diagnostic = self.diagnostic.with_help(help);
        self
    }
}

/// One varied parameter and the exact values it takes, ascending.
#[derive(Clone, Debug, PartialEq)]
pub struct Axis {
    pub name: String,
    pub from: Q,
    pub to: Q,
    pub log: bool,
    pub values: Vec<Q>,
}

/// How the points along each axis are placed.
#[derive(Clone, Debug, Default)]
pub struct Spacing {
    pub points: Option<u64>,
    pub step: Option<String>,
    pub log: bool,
}

/// One quantity of the sweep.
#[derive(Clone, Debug, PartialEq)]
pub enum Quantity {
    /// r in a(k) ~ C·r^k·k^θ
    Rate,
    /// θ
    Theta,
    /// C (with a(b) = 1)
    Prefactor,
    /// Σ a(k) with a(b) = 1
    Total,
    Mean,
    Variance,
    /// a(K) with a(b) = 1
    Term(BigInt),
    /// The probability of a range of k under the normalised law, `P(k >= 10)`,
    /// `P(2 <= k <= c)` (the event as written, and as read by `probability::parse_event`).
    Probability(Event),
}

impl Quantity {
    /// The column name (CSV header, JSON key).
    pub fn key(&self, sequence: &str) -> String {
        match self {
            Quantity::Rate => "rate".into(),
            Quantity::Theta => "theta".into(),
            Quantity::Prefactor => "prefactor".into(),
            Quantity::Total => "total".into(),
            Quantity::Mean => "mean".into(),
            Quantity::Variance => "variance".into(),
            Quantity::Term(k) => format!("{sequence}({k})"),
            Quantity::Probability(e) => {
                let compact: String = e.text.chars().filter(|c| !c.is_whitespace()).collect();
                format!("P({compact})")
            }
        }
    }

    /// Which finiteness requirement governs it: 0 total, 1 mean, 2 variance.
    pub fn moment(&self) -> Option<usize> {
        match self {
            Quantity::Total => Some(0),
            Quantity::Mean => Some(1),
            Quantity::Variance => Some(2),
            _ => None,
        }
    }
}

/// The default quantities: r, θ, total, mean, variance.
pub fn default_quantities() -> Vec<Quantity> {
    vec![
        Quantity::Rate,
        Quantity::Theta,
        Quantity::Total,
        Quantity::Mean,
        Quantity::Variance,
    ]
}

const QUANTITY_HELP: &str = "choose from rate, theta, prefactor, total, mean, variance, a(K) for a whole number K (the sequence's own name works too: n(10)) and probabilities such as P(k >= 10), separated by commas";

/// `--quantities rate,theta,a(10)`.
pub fn parse_quantities(text: &str, model: &Model) -> Result<Vec<Quantity>, ArgError> {
    let flag = "--quantities";
    let mut out = Vec::new();
    let mut start = 0;
    for item in text.split(',') {
        let span = start..start + item.len();
        start += item.len() + 1;
        let trimmed = item.trim();
        let lead = item.len() - item.trim_start().len();
        let span_trimmed = span.start + lead..span.start + lead + trimmed.len().max(1);
        let bad = |message: String| refuse(flag, text, span_trimmed.clone(), message);
        let q = match trimmed {
            "rate" | "r" => Quantity::Rate,
            "theta" | "power" => Quantity::Theta,
            "prefactor" | "C" => Quantity::Prefactor,
            "total" => Quantity::Total,
            "mean" => Quantity::Mean,
            "variance" => Quantity::Variance,
            "" => return Err(bad("an empty quantity".into()).hint(QUANTITY_HELP)),
            other => {
                if let Some(k) = term_index(other, &model.sequence) {
                    let k = k.ok_or_else(|| {
                        bad(format!("`{other}`: K must be a whole number"))
                            .hint("write a(10), with the index as a number")
                    })?;
                    Quantity::Term(k)
                } else if let Some(inner) =
                    other.strip_prefix("P(").and_then(|t| t.strip_suffix(')'))
                {
                    let offset = span_trimmed.start + 2;
                    let event =
                        parse_event(inner, &model.index, &model.params).map_err(|d| ArgError {
                            flag: flag.to_string(),
                            text: text.to_string(),
                            diagnostic: Diagnostic {
                                span: d.span.start + offset..d.span.end + offset,
                                ..d
                            },
                        })?;
                    Quantity::Probability(event)
                } else {
                    return Err(bad(format!("unknown quantity `{other}`")).hint(QUANTITY_HELP));
                }
            }
        };
        if out.contains(&q) {
            return Err(bad(format!("`{trimmed}` is listed twice")));
        }
        out.push(q);
    }
    Ok(out)
}

/// `a(10)` or `n(10)`: Some(Some(K)), Some(None) for a non-integer index, None otherwise.
fn term_index(text: &str, sequence: &str) -> Option<Option<BigInt>> {
    let inner = text.strip_suffix(')')?;
    let (name, index) = inner.split_once('(')?;
    if name.trim() != "a" && name.trim() != sequence {
        return None;
    }
    Some(index.trim().parse::<BigInt>().ok())
}

/// `NAME=A..B` checked against the model: a declared parameter with no `--param` value, A < B,
/// both ends inside the declared range (and whole numbers for an integer parameter).
pub fn parse_vary(
    text: &str,
    model: &Model,
    fixed: &BTreeMap<String, Q>,
    spacing: &Spacing,
) -> Result<Axis, ArgError> {
    let flag = "--vary";
    let whole = 0..text.len().max(1);
    let Some(eq) = text.find('=') else {
        return Err(refuse(flag, text, whole, "expected NAME=A..B".into())
            .hint("for example --vary rho=0.05..0.95"));
    };
    let name = text[..eq].trim();
    let name_span = 0..eq.max(1);
    let known: Vec<&str> = model.params.iter().map(|p| p.name.as_str()).collect();
    let list = if known.is_empty() {
        "the model has none".to_string()
    } else {
        format!("the model's parameters: {}", known.join(", "))
    };
    let Some(param) = model.param(name) else {
        let what = if name == model.index {
            format!("`{name}` is the index of the rule, not a parameter")
        } else if name == model.sequence {
            format!("`{name}` is the sequence, not a parameter")
        } else if name.is_empty() {
            "no parameter name before `=`".to_string()
        } else {
            format!("unknown parameter `{name}`")
        };
        return Err(refuse(flag, text, name_span, what).hint(list));
    };
    if fixed.contains_key(name) {
        return Err(refuse(
            flag,
            text,
            name_span,
            format!("`{name}` is also given with --param"),
        )
        .hint(format!("drop --param {name}=… or vary another parameter")));
    }
    let range = &text[eq + 1..];
    let range_start = eq + 1;
    let Some(dots) = range.find("..") else {
        return Err(refuse(
            flag,
            text,
            range_start..text.len().max(range_start + 1),
            "expected a range A..B after `=`".into(),
        )
        .hint(format!("for example --vary {name}=0.1..0.9")));
    };
    let (a_text, b_text) = (&range[..dots], &range[dots + 2..]);
    let a_span = range_start..range_start + a_text.len().max(1);
    let b_span = range_start + dots + 2..text.len().max(range_start + dots + 3);
    let number = |t: &str, span: std::ops::Range<usize>| -> Result<Q, ArgError> {
        parse_q(t).ok_or_else(|| {
            refuse(flag, text, span, format!("`{}` is not a number", t.trim()))
                .hint("write 3/10, 0.3 or 12 (values are exact)")
        })
    };
    let from = number(a_text, a_span.clone())?;
    let to = number(b_text, b_span.clone())?;
    if from >= to {
        return Err(refuse(
            flag,
            text,
            range_start..text.len(),
            format!(
                "the range is empty or reversed ({} ≥ {})",
                a_text.trim(),
                b_text.trim()
            ),
        )
        .hint(format!(
            "give the smaller value first: --vary {name}={}..{}",
            b_text.trim(),
            a_text.trim()
        )));
    }
    let range_words = crate::render::solve_output::param_range_text(param)
        .unwrap_or_else(|| "no declared range".into());
    for (value, span, t) in [(&from, a_span, a_text), (&to, b_span, b_text)] {
        if param.integer && !value.is_integer() {
            return Err(refuse(
                flag,
                text,
                span,
                format!(
                    "`{name}` is an integer parameter and {} is not a whole number",
                    t.trim()
                ),
            )
            .hint("give whole numbers for both ends"));
        }
        if !param.admits(value) {
            return Err(refuse(
                flag,
                text,
                span,
                format!(
                    "{} is outside the declared range of `{name}` ({range_words})",
                    t.trim()
                ),
            )
            .hint("keep both ends inside the range the model declares"));
        }
    }
    if spacing.log && !from.is_positive() {
        return Err(refuse(
            flag,
            text,
            range_start..text.len(),
            "a log scale needs a range of positive values".into(),
        )
        .hint("drop --log or start above 0"));
    }
    let values =
        place_points(&from, &to, param.integer, spacing).map_err(|(flag2, message, help)| {
            ArgError {
                flag: flag2.to_string(),
                text: match flag2 {
                    "--points" => spacing.points.map(|p| p.to_string()).unwrap_or_default(),
                    "--step" => spacing.step.clone().unwrap_or_default(),
                    _ => text.to_string(),
                },
                diagnostic: Diagnostic::new(message, 0..1).with_help(help),
            }
        })?;
    Ok(Axis {
        name: name.to_string(),
        from,
        to,
        log: spacing.log,
        values,
    })
}

type PlaceError = (&'static str, String, String);

/// The exact points from A to B: evenly spaced (`--points`), by a step (`--step`), or
/// log-spaced (`--log`, each point rounded to 8 significant digits so that it is a short exact
/// decimal; the ends stay exact). An integer parameter takes whole values only.
fn place_points(from: &Q, to: &Q, integer: bool, spacing: &Spacing) -> Result<Vec<Q>, PlaceError> {
    let span = to - from;
    let count_error = |n: u64| -> PlaceError {
        (
            "--points",
            format!(
                "a sweep of {n} point{}: choose {MIN_POINTS} to {MAX_POINTS} points",
                if n == 1 { "" } else { "s" }
            ),
            "a sweep needs at least two points and stops at a million".into(),
        )
    };
    let mut values: Vec<Q> = match (&spacing.step, spacing.points) {
        (Some(_), Some(_)) => {
            return Err((
                "--step",
                "give either --points or --step, not both".into(),
                "--points N places N points from A to B; --step S walks from A by S".into(),
            ))
        }
        (Some(step), None) => {
            if spacing.log {
                return Err((
                    "--step",
                    "--step walks in equal steps; on a log scale give --points".into(),
                    "for example --log --points 50".into(),
                ));
            }
            let s = parse_q(step).ok_or_else(|| {
                (
                    "--step",
                    format!("`{step}` is not a number"),
                    "write 1/20, 0.05 or 2 (values are exact)".to_string(),
                )
            })?;
            if !s.is_positive() {
                return Err((
                    "--step",
                    format!("the step {step} is not positive"),
                    "give a step above 0".into(),
                ));
            }
            if integer && !s.is_integer() {
                return Err((
                    "--step",
                    format!("the parameter is an integer and the step {step} is not"),
                    "give a whole step".into(),
                ));
            }
            let n: BigInt = (&span / &s).floor().to_integer() + 1;
            let n = n.to_u64().unwrap_or(u64::MAX);
            if !(MIN_POINTS..=MAX_POINTS).contains(&n) {
                return Err((
                    "--step",
                    format!("this step gives {n} points: choose a step that gives {MIN_POINTS} to {MAX_POINTS}"),
                    "a sweep needs at least two points and stops at a million".into(),
                ));
            }
            (0..n)
                .map(|i| from + &s * Q::from_integer(BigInt::from(i)))
                .collect()
        }
        (None, points) => {
            let n = match points {
                Some(n) => n,
                None if integer && !spacing.log => {
                    // every whole value, up to the default count
                    let whole = (span.to_integer() + 1u32).to_u64().unwrap_or(u64::MAX);
                    whole.min(DEFAULT_POINTS.max(2))
                }
                None => DEFAULT_POINTS,
            };
            if !(MIN_POINTS..=MAX_POINTS).contains(&n) {
                return Err(count_error(n));
            }
            let last = Q::from_integer(BigInt::from(n - 1));
            (0..n)
                .map(|i| {
                    let t = Q::from_integer(BigInt::from(i)) / &last;
                    if i == 0 {
                        from.clone()
                    } else if i == n - 1 {
                        to.clone()
                    } else if spacing.log {
                        log_point(from, to, &t)
                    } else {
                        from + &span * t
                    }
                })
                .collect()
        }
    };
    if integer {
        let half = Q::new(BigInt::one(), BigInt::from(2));
        for v in &mut values {
            *v = Q::from_integer((&*v + &half).floor().to_integer());
        }
        values.dedup();
        if values.len() < 2 {
            return Err(count_error(values.len() as u64));
        }
    }
    Ok(values)
}

/// A·(B/A)^t placed with f64 (only the place of a point, which is then exact) and rounded to
/// a short decimal.
fn log_point(from: &Q, to: &Q, t: &Q) -> Q {
    let f = |q: &Q| q.to_f64().unwrap_or(f64::NAN);
    let x = f(from) * (f(to) / f(from)).powf(f(t));
    let text = format!("{:.*e}", LOG_POINT_DIGITS - 1, x);
    let q = parse_q(&text).unwrap_or_else(|| from.clone());
    // rounding never leaves the range
    q.max(from.clone()).min(to.clone())
}

/// The values of every parameter besides the varied ones: each must be given.
pub fn check_fixed(
    model: &Model,
    fixed: &BTreeMap<String, Q>,
    axes: &[Axis],
) -> Result<(), ArgError> {
    let missing: Vec<&str> = model
        .params
        .iter()
        .map(|p| p.name.as_str())
        .filter(|n| !fixed.contains_key(*n) && !axes.iter().any(|a| a.name == *n))
        .collect();
    if missing.is_empty() {
        return Ok(());
    }
    let example: Vec<String> = missing.iter().map(|n| format!("--param {n}=…")).collect();
    let text = axes
        .iter()
        .map(|a| a.name.clone())
        .collect::<Vec<_>>()
        .join(" ");
    Err(refuse(
        "--vary",
        &text,
        0..text.len().max(1),
        format!(
            "every other parameter needs a value: {} has none",
            missing.join(", ")
        ),
    )
    .hint(format!("add {}", example.join(" "))))
}

/// The whole grid must stay within the point limit.
pub fn check_grid(axes: &[Axis]) -> Result<(), ArgError> {
    let total: u128 = axes.iter().map(|a| a.values.len() as u128).product();
    if total > MAX_POINTS as u128 {
        let text = axes
            .iter()
            .map(|a| a.values.len().to_string())
            .collect::<Vec<_>>()
            .join(" × ");
        return Err(refuse(
            "--points",
            &text,
            0..text.len(),
            format!("the grid has {total} points; at most {MAX_POINTS}"),
        )
        .hint("fewer --points per axis"));
    }
    if axes.len() == 2 && axes[0].name == axes[1].name {
        return Err(refuse(
            "--vary",
            &axes[1].name,
            0..axes[1].name.len(),
            format!("`{}` is varied twice", axes[1].name),
        )
        .hint("a grid varies two different parameters"));
    }
    Ok(())
}

/// a(K) needs K ≥ b and at most a million factors.
pub fn check_terms(
    quantities: &[Quantity],
    base_index: &BigInt,
    text: &str,
) -> Result<(), ArgError> {
    for q in quantities {
        if let Quantity::Term(k) = q {
            let steps = k - base_index;
            let at = text.find(&k.to_string()).unwrap_or(0);
            let span = at..at + k.to_string().len();
            if steps.is_negative() {
                return Err(refuse(
                    "--quantities",
                    text,
                    span,
                    format!("the sequence starts at k = {base_index}; a({k}) is not part of it"),
                )
                .hint(format!("choose K ≥ {base_index}")));
            }
            if steps > BigInt::from(MAX_TERM_STEPS) {
                return Err(refuse(
                    "--quantities",
                    text,
                    span,
                    format!(
                        "a({k}) is {steps} factors from the base term; at most {MAX_TERM_STEPS}"
                    ),
                )
                .hint("for large K use the tail law: the quantities rate, theta and prefactor"));
            }
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    fn spacing(points: Option<u64>, step: Option<&str>, log: bool) -> Spacing {
        Spacing {
            points,
            step: step.map(String::from),
            log,
        }
    }

    #[test]
    fn even_points_are_exact_and_include_both_ends() {
        let v = place_points(&q(1, 10), &q(9, 10), false, &spacing(Some(5), None, false)).unwrap();
        assert_eq!(v, vec![q(1, 10), q(3, 10), q(1, 2), q(7, 10), q(9, 10)]);
    }

    #[test]
    fn a_step_walks_from_the_start_and_stops_inside() {
        let v = place_points(
            &q(0, 1),
            &q(1, 1),
            false,
            &spacing(None, Some("0.3"), false),
        )
        .unwrap();
        assert_eq!(v, vec![q(0, 1), q(3, 10), q(3, 5), q(9, 10)]);
    }

    #[test]
    fn log_points_are_short_decimals_between_exact_ends() {
        let v = place_points(&q(1, 1000), &q(1, 1), false, &spacing(Some(4), None, true)).unwrap();
        // 10^-3, 10^-2, 10^-1, 1: exact up to the 8-digit rounding of the inner points
        assert_eq!(v, vec![q(1, 1000), q(1, 100), q(1, 10), q(1, 1)]);
    }

    #[test]
    fn an_integer_parameter_takes_distinct_whole_values() {
        let v = place_points(&q(1, 1), &q(4, 1), true, &spacing(Some(10), None, false)).unwrap();
        assert_eq!(v, vec![q(1, 1), q(2, 1), q(3, 1), q(4, 1)]);
        // by default every whole value (up to the default count)
        let v = place_points(&q(1, 1), &q(5, 1), true, &spacing(None, None, false)).unwrap();
        assert_eq!(v.len(), 5);
    }

    #[test]
    fn counts_outside_two_to_a_million_are_refused() {
        assert!(place_points(&q(0, 1), &q(1, 1), false, &spacing(Some(1), None, false)).is_err());
        assert!(place_points(
            &q(0, 1),
            &q(1, 1),
            false,
            &spacing(Some(1_000_001), None, false)
        )
        .is_err());
        assert!(place_points(&q(0, 1), &q(1, 1), false, &spacing(None, Some("2"), false)).is_err());
        assert!(place_points(
            &q(0, 1),
            &q(1, 1),
            false,
            &spacing(Some(3), Some("0.1"), false)
        )
        .is_err());
    }
}
