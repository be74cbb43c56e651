//! Probabilities of ranges of k under the normalised law `a(k) / Σ a`, and the moments of a
//! whole model (single rule or pieces, infinite or finite state space) from the same sums.
//!
//! An [`Event`] (`k >= c`, `k <= K`, `K1 <= k <= K2`, `k = c`) is read with [`parse_event`];
//! a [`Law`] is built once per parameter point from a solved model and answers
//! [`Law::probability`] for any number of events. `P = Σ_{range} a(k) / Σ_{support} a(k)`,
//! both sums from a(b) = 1: exact rationals where the range is finite or the tail has a
//! rational closed form (a geometric tail by the binomial theorem), closed forms by Gauss,
//! Chu–Vandermonde or the exponential series where they apply, and numeric sums with an error
//! bound otherwise. No subtraction is involved, so a tiny `P(k ≥ K)` keeps its digits.
//!
//! ```
//! use std::collections::BTreeMap;
//! use telescope::algebra::q;
//! use telescope::model::build_model;
//! use telescope::piecewise::solve_model;
//! use telescope::probability::{parse_event, Law};
//! // A single-server queue with load 1/2: π(k) ∝ (1/2)^k, so P(k ≥ 3) = (1/2)^3.
//! let model = build_model("param rho in (0, 1)\nbirth(k) = rho ; death(k) = 1").unwrap();
//! let values: BTreeMap<_, _> = [("rho".to_string(), q(1, 2))].into_iter().collect();
//! let solved = solve_model(&model, &values).unwrap();
//! let law = Law::new(&solved, 30);
//! let event = parse_event("k >= 3", "k", &model.params).unwrap();
//! let p = law.probability(&event);
//! assert_eq!(p.value.unwrap().exact.as_deref(), Some("1/8"));
//! ```

mod closed;
mod mass;
mod model;
mod spec;

pub use closed::closed_probability;
pub use mass::{MassError, Moments, Sum, Support, MAX_EXACT_STEPS};
pub use model::{analyse_model, join_factor, normalized_piecewise_table};
pub use spec::{parse_event, Event, EventBound, IndexRange};

use rug::Float;

use crate::numeric::decimal;
use crate::piecewise::ModelSolution;

/// A probability (or a moment) to the requested digits with its provenance.
#[derive(Clone, Debug, PartialEq)]
pub struct Value {
    /// Decimal string, `digits` significant digits.
    pub value: String,
    /// The exact rational (`3/8`) when it is one.
    pub exact: Option<String>,
    /// Bound on the absolute error of `value` before rounding to `digits` digits (`0` when exact).
    pub error_bound: String,
    /// How the sums were found, in words.
    pub method: String,
    /// The closed form's relative difference from an independent numeric sum, when both exist.
    pub check_rel_diff: Option<String>,
}

/// The answer for one event.
#[derive(Clone, Debug)]
pub struct Probability {
    pub event: Event,
    /// The event's integer range with the parameters' values (`None` when a value is missing).
    pub range: Option<IndexRange>,
    /// `None` with a `note` saying why (a missing value, a divergent total, a range too long).
    pub value: Option<Value>,
    pub note: Option<String>,
    /// The probability as a formula in the parameters (single open-ended rules whose total and
    /// tails have closed forms), valid where the total converges and the bounds are integers.
    pub closed_form: Option<crate::analysis::Expr>,
}

/// Mean and variance of the normalised law, each `None` with a reason when infinite or not
/// computed.
#[derive(Clone, Debug)]
pub struct LawMoments {
    pub mean: Result<Value, String>,
    pub variance: Result<Value, String>,
}

/// The normalised law of a solved model whose every parameter has a value.
pub struct Law<'a> {
    support: Support<'a>,
    total: Result<Moments, MassError>,
}

impl<'a> Law<'a> {
    /// Sums the whole support once (to `digits` significant digits for every answer).
    pub fn new(solved: &'a ModelSolution, digits: u32) -> Law<'a> {
        let support = Support::new(solved, digits);
        let total = support.moments(None, None);
        Law { support, total }
    }

    /// Σ k^j a(k) over the whole support with a(b) = 1.
    pub fn total(&self) -> Result<&Moments, &MassError> {
        self.total.as_ref()
    }

    /// Σ k^j a(k) over `first..=last` (either open) with a(b) = 1.
    pub fn part(
        &self,
        first: Option<&num_bigint::BigInt>,
        last: Option<&num_bigint::BigInt>,
    ) -> Result<Moments, MassError> {
        self.support.moments(first, last)
    }

    /// The last index of the support, `None` when it is infinite.
    pub fn support_end(&self) -> Option<&num_bigint::BigInt> {
        self.support.end.as_ref()
    }

    /// P(event) under the normalised law.
    pub fn probability(&self, event: &Event) -> Probability {
        let mut out = Probability {
            event: event.clone(),
            range: None,
            value: None,
            note: None,
            closed_form: None,
        };
        let range = match event.resolve(&self.support.solved.values) {
            Ok(r) => r,
            Err(why) => {
                out.note = Some(why);
                return out;
            }
        };
        out.range = Some(range.clone());
        let total = match &self.total {
            Ok(t) => t,
            Err(e) => {
                out.note = Some(describe(e, "the total"));
                return out;
            }
        };
        let part = match self.part_of(&range, total) {
            Ok(p) => p,
            Err(e) => {
                out.note = Some(describe(&e, "the range"));
                return out;
            }
        };
        let (Some(numerator), Some(denominator)) = (&part.sums[0], &total.sums[0]) else {
            out.note = Some("the total diverges".into());
            return out;
        };
        let Some(p) = numerator.ratio(denominator) else {
            out.note = Some("the total is zero".into());
            return out;
        };
        let mut method = part.method.join("; ");
        if p.exact.is_none() || denominator.exact.is_none() {
            method = format!(
                "{method}; divided by the total ({})",
                total.method.join("; ")
            );
        } else {
            method = format!("{method}, over the exact total");
        }
        let check = worst(part.check.as_ref(), total.check.as_ref());
        out.value = Some(self.report(&p, method, check));
        out
    }

    /// Σ a(k) over the event's range; a range ending too far out for an exact walk, in an
    /// open last piece, is summed as Σ_{k≥first} − Σ_{k>last} (the second far out, in closed
    /// form): a subtraction, harmless because the part removed is the smaller.
    fn part_of(&self, range: &IndexRange, total: &Moments) -> Result<Moments, MassError> {
        let direct = self
            .support
            .moments(range.first.as_ref(), range.last.as_ref());
        let (Err(MassError::Unsupported(_)), Some(last), None) =
            (&direct, &range.last, &self.support.end)
        else {
            return direct;
        };
        let beyond = self.support.moments(Some(&(last + 1)), None)?;
        let from = match &range.first {
            Some(f) => self.support.moments(Some(f), None)?,
            None => total.clone(),
        };
        let (Some(a), Some(b)) = (&from.sums[0], &beyond.sums[0]) else {
            return direct;
        };
        let mut method = vec![format!(
            "the sum from the first index minus the tail beyond k = {last}"
        )];
        method.extend(beyond.method.iter().cloned());
        Ok(Moments {
            sums: [Some(a.minus(b)), None, None],
            method,
            check: beyond.check,
            theorem: beyond.theorem,
        })
    }

    /// Mean Σk a/Σa and variance Σk² a/Σa − mean² of the normalised law.
    pub fn moments(&self) -> LawMoments {
        let total = match &self.total {
            Ok(t) => t,
            Err(e) => {
                let why = describe(e, "the total");
                return LawMoments {
                    mean: Err(why.clone()),
                    variance: Err(why),
                };
            }
        };
        let [Some(s0), s1, s2] = &total.sums else {
            let why = "the total diverges".to_string();
            return LawMoments {
                mean: Err(why.clone()),
                variance: Err(why),
            };
        };
        let method = total.method.join("; ");
        let check = total.check.as_ref();
        let infinite = |j: &str| {
            format!(
                "Σ {j}·a(k) diverges: the {} is infinite",
                if j == "k" { "mean" } else { "variance" }
            )
        };
        let Some(mean) = s1.as_ref().and_then(|s1| s1.ratio(s0)) else {
            return LawMoments {
                mean: Err(infinite("k")),
                variance: Err(infinite("k")),
            };
        };
        let mean_value = Ok(self.report(&mean, method.clone(), check));
        let Some(second) = s2.as_ref().and_then(|s2| s2.ratio(s0)) else {
            return LawMoments {
                mean: mean_value,
                variance: Err(infinite("k²")),
            };
        };
        let variance = match (&second.exact, &mean.exact) {
            (Some(e2), Some(m)) => Sum::exact(e2 - rug::Rational::from(m * m), s0.value.prec()),
            _ => {
                let prec = s0.value.prec();
                let m2 = Float::with_val(prec, mean.value.square_ref());
                let value = Float::with_val(prec, &second.value - &m2);
                // |E2 − m²| errors: e_E2 + (2|m| + e_m)·e_m, plus two roundings.
                let ulp = Float::with_val(64, Float::i_exp(1, 2 - prec as i32));
                let error = Float::with_val(64, &second.error)
                    + (Float::with_val(64, mean.value.abs_ref()) * 2u32 + &mean.error)
                        * &mean.error
                    + Float::with_val(64, second.value.abs_ref()) * ulp;
                Sum {
                    value,
                    error,
                    exact: None,
                }
            }
        };
        LawMoments {
            mean: mean_value,
            variance: Ok(self.report(&variance, method, check)),
        }
    }

    fn report(&self, s: &Sum, method: String, check: Option<&Float>) -> Value {
        value_of(s, method, check, self.support.digits)
    }
}

/// A sum as reported: exact rational or decimal with its bound.
pub(crate) fn value_of(s: &Sum, method: String, check: Option<&Float>, digits: u32) -> Value {
    match &s.exact {
        Some(q) => Value {
            value: decimal::rational_to_decimal(q, digits),
            exact: Some(q.to_string()),
            error_bound: "0".into(),
            method,
            check_rel_diff: check.map(decimal::short),
        },
        None => Value {
            value: decimal::float_to_decimal(&s.value, digits),
            exact: None,
            error_bound: decimal::short(&s.error),
            method,
            check_rel_diff: check.map(decimal::short),
        },
    }
}

fn worst<'f>(a: Option<&'f Float>, b: Option<&'f Float>) -> Option<&'f Float> {
    match (a, b) {
        (Some(x), Some(y)) => Some(if x >= y { x } else { y }),
        (x, y) => x.or(y),
    }
}

fn describe(e: &MassError, what: &str) -> String {
    match e {
        MassError::Divergent(why) => {
            format!("{what} diverges ({why}): there is no normalised law")
        }
        MassError::Unsupported(why) => format!("{what} cannot be summed: {why}"),
    }
}

/// Answers every event for a solved model; when a parameter has no value, each answer says
/// which (the law needs numbers).
pub fn probabilities(solved: &ModelSolution, events: &[Event], digits: u32) -> Vec<Probability> {
    let missing: Vec<&str> = solved.pieces[0]
        .problem
        .params
        .iter()
        .filter(|p| !solved.values.contains_key(&p.name))
        .map(|p| p.name.as_str())
        .collect();
    if !missing.is_empty() {
        let note = format!(
            "probabilities need every parameter's value (missing: {}; give them with --param)",
            missing.join(", ")
        );
        return events
            .iter()
            .map(|e| Probability {
                event: e.clone(),
                range: None,
                value: None,
                note: Some(note.clone()),
                closed_form: closed_form(solved, e),
            })
            .collect();
    }
    if events.is_empty() {
        // The law's total is summed eagerly: nothing to ask of it, nothing to sum.
        return Vec::new();
    }
    let law = Law::new(solved, digits);
    events
        .iter()
        .map(|e| {
            let mut p = law.probability(e);
            p.closed_form = closed_form(solved, e);
            check_closed_form(&mut p, &solved.values, digits);
            p
        })
        .collect()
}

/// The closed form of an event's probability for a single open-ended rule.
fn closed_form(solved: &ModelSolution, event: &Event) -> Option<crate::analysis::Expr> {
    let [piece] = solved.pieces.as_slice() else {
        return None;
    };
    if piece.last_index.is_some() {
        return None;
    }
    closed_probability(&piece.problem, &piece.solution, event)
}

/// The closed form evaluated at the values against the summed value: its relative difference
/// joins `check_rel_diff` (a closed form that disagrees is dropped: it would be wrong there).
fn check_closed_form(
    p: &mut Probability,
    values: &std::collections::BTreeMap<String, crate::algebra::Q>,
    digits: u32,
) {
    let (Some(e), Some(v)) = (&p.closed_form, &mut p.value) else {
        return;
    };
    let prec = crate::numeric::bits_for_digits(digits + 10) + crate::numeric::GUARD_BITS;
    let Some((closed, _)) = e.to_float(values, prec) else {
        return;
    };
    // The exact rational when there is one, else the printed decimal (then the check can
    // show no less than its rounding).
    let summed = match v
        .exact
        .as_ref()
        .and_then(|q| q.parse::<rug::Rational>().ok())
    {
        Some(q) => Float::with_val(prec, &q),
        None => match Float::parse(&v.value) {
            Ok(f) => Float::with_val(prec, f),
            Err(_) => return,
        },
    };
    let scale = Float::with_val(64, summed.abs_ref()).max(&Float::with_val(64, 1e-300));
    let diff = Float::with_val(64, &closed - &summed).abs() / scale;
    let tolerance = Float::with_val(
        64,
        rug::ops::Pow::pow(Float::with_val(64, 10), 3 - digits as i32),
    );
    if diff > tolerance {
        p.closed_form = None;
        return;
    }
    let shown = decimal::short(&diff);
    v.check_rel_diff = Some(match &v.check_rel_diff {
        Some(c) if c.parse::<f64>().unwrap_or(0.0) > diff.to_f64() => c.clone(),
        _ => shown,
    });
}
