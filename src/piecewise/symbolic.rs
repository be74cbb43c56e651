//! Piecewise models whose breakpoints stay symbolic (`param c integer >= 1`, pieces
//! `for 1 <= k <= c` and `for k > c`, no value of c): each piece is solved in its local index
//! j = k − s (s = its first index − 1, a polynomial in the integer parameters), which starts
//! at 1 from a numeric base, and the closed form is moved back to k by substituting
//! j = k − s in every Gamma, power and factorial argument. The joins a(s) are the earlier
//! pieces' closed forms at their symbolic last index, and the total is a sum of finite sums
//! with symbolic limits (in closed form when the piece is geometric, written with Σ otherwise)
//! plus the open last piece's series from its base (closed by a theorem where one applies).
//! Numbers come once the breakpoints have values, through the ordinary piecewise route.

use std::collections::BTreeMap;

use num_bigint::BigInt;

use crate::algebra::{RatFunc, Q};
use crate::analysis::{closed_sum, Expr, HyperSeries, RisingForm, Term, Theorem};
use crate::closed_form::{Affine, Factor, Product};
use crate::diagnostic::Diagnostic;
use crate::model::{Model, Problem};
use crate::ratio::{LinearFactor, Orientation, Ratio};
use crate::solve::{solve, Solution};

/// One piece with its symbolic range.
#[derive(Clone, Debug)]
pub struct SymbolicPiece {
    /// The first k of the piece, and its last (`None`: open).
    pub first: RatFunc,
    pub last: Option<RatFunc>,
    /// s = first − 1: the piece's own base index, a(k) = a(s)·P(k − s).
    pub shift: RatFunc,
    /// The rule in the local index j = k − s, from j = 1.
    pub local: Problem,
    pub solution: Solution,
    /// P(k − s): the simplest closed form with j = k − s substituted back.
    pub in_k: Product,
    /// P(n) with n = last − s: the factor that carries a(s) to a(last) (`None` when open).
    pub at_end: Option<Product>,
}

/// One part of the total Σ a(k)/a(b).
#[derive(Clone, Debug)]
pub struct TotalPart {
    pub piece: usize,
    /// Σ over j = from ..= to (`to = None`: to infinity) of the piece's P(j).
    pub from: i64,
    pub to: Option<RatFunc>,
    /// The sum in closed form, and how: a finite geometric sum, or a theorem for the series.
    pub closed: Option<(Expr, String)>,
    /// The series from j = 0 when there is no closed form (for display).
    pub series: Option<HyperSeries>,
}

/// A piecewise model solved with symbolic breakpoints.
#[derive(Clone, Debug)]
pub struct SymbolicModel {
    pub sequence: String,
    pub index: String,
    pub base_index: BigInt,
    pub pieces: Vec<SymbolicPiece>,
    /// Σ a(k)/a(b) = Σ_i (Π_{i' < i} P_{i'}(n_{i'})) · part_i.
    pub total: Vec<TotalPart>,
}

/// Whether a model needs the symbolic route: a bound that still holds a parameter.
pub fn has_symbolic_breakpoints(model: &Model, values: &BTreeMap<String, Q>) -> bool {
    model.pieces.iter().any(|p| {
        let open = |r: &RatFunc| r.eval(values).is_err();
        open(&p.first) || p.last.as_ref().is_some_and(open)
    })
}

/// `R(s + j)` as a rule in j.
pub fn shifted_ratio(ratio: &Ratio, s: &RatFunc) -> Ratio {
    Ratio {
        constant: ratio.constant.clone(),
        factors: ratio
            .factors
            .iter()
            .map(|f| LinearFactor {
                shift: match f.orientation {
                    Orientation::Rising => &f.shift + s,
                    Orientation::Falling => &f.shift - s,
                },
                ..f.clone()
            })
            .collect(),
    }
}

/// Every argument `α + β·j` rewritten by `f`.
fn map_affine(p: &Product, f: &impl Fn(&Affine) -> Affine) -> Product {
    let factors = p
        .factors
        .iter()
        .map(|factor| match factor {
            Factor::Gamma { arg, exponent } => Factor::Gamma {
                arg: f(arg),
                exponent: *exponent,
            },
            Factor::Power { base, exponent } => Factor::Power {
                base: base.clone(),
                exponent: f(exponent),
            },
            Factor::Linear { arg, exponent } => Factor::Linear {
                arg: f(arg),
                exponent: *exponent,
            },
            Factor::Rising {
                base,
                count,
                exponent,
            } => Factor::Rising {
                base: f(base),
                count: f(count),
                exponent: *exponent,
            },
            Factor::Beta { a, b, exponent } => Factor::Beta {
                a: f(a),
                b: f(b),
                exponent: *exponent,
            },
            Factor::Factorial { arg, exponent } => Factor::Factorial {
                arg: f(arg),
                exponent: *exponent,
            },
            Factor::Binomial {
                top,
                bottom,
                exponent,
            } => Factor::Binomial {
                top: f(top),
                bottom: f(bottom),
                exponent: *exponent,
            },
            Factor::SqrtPi { half_exponent } => Factor::SqrtPi {
                half_exponent: *half_exponent,
            },
        })
        .collect();
    Product {
        coefficient: p.coefficient.clone(),
        factors,
    }
}

/// P(j) with j = k − s: `α + β·j` becomes `(α − β·s) + β·k`.
pub fn shift_product(p: &Product, s: &RatFunc) -> Product {
    map_affine(p, &|a: &Affine| Affine {
        k_coeff: a.k_coeff,
        constant: &a.constant - &(&RatFunc::from_integer(a.k_coeff) * s),
    })
}

/// P(n) for a symbolic n: `α + β·n`, no index left.
pub fn product_at(p: &Product, n: &RatFunc) -> Product {
    map_affine(p, &|a: &Affine| Affine {
        k_coeff: 0,
        constant: &a.constant + &(&RatFunc::from_integer(a.k_coeff) * n),
    })
}

/// Solves every piece in its local index; `values` may fix some parameters.
pub fn solve_symbolic(
    model: &Model,
    values: &BTreeMap<String, Q>,
) -> Result<SymbolicModel, Diagnostic> {
    let mut pieces = Vec::new();
    let mut total = Vec::new();
    let base_index = model.base_index(values)?;
    for (i, piece) in model.pieces.iter().enumerate() {
        let shift = &piece.first - &RatFunc::one();
        let local = Problem {
            sequence: model.sequence.clone(),
            index: model.index.clone(),
            params: model.params.clone(),
            ratio: shifted_ratio(&piece.ratio, &shift),
            first_index: BigInt::from(1),
            divisors: piece.divisors.clone(),
            rule_span: piece.span.clone(),
        };
        let solution = solve(&local, values)?;
        let product = &solution.simplest.product;
        let in_k = shift_product(product, &shift);
        let count = piece.last.as_ref().map(|l| l - &shift);
        let at_end = count.as_ref().map(|n| product_at(product, n));
        // The piece's part of the total: j from 0 for the first piece (its base term is the
        // model's), from 1 for the others (their base is the previous piece's last term).
        let from = if i == 0 { 0 } else { 1 };
        let form = RisingForm::from_ratio(&local.ratio).substituted(values);
        let geometric = form.factors.is_empty();
        let closed = match (&count, geometric) {
            // Σ_{j=from}^{n} r^j = (r^from − r^(n+1))/(1 − r) (finite geometric sum, common practice)
            (Some(n), true) if !form.constant.is_one() => {
                let r = form.constant.clone();
                let one_minus = (&RatFunc::one() - &r).inv().map(|inv| {
                    let top = Term::power(r.clone(), n + &RatFunc::one()).scale(&(-RatFunc::one()));
                    let start = Term::rational(r.pow(from as i32).expect("non-negative power"));
                    (start, top, inv)
                });
                one_minus.map(|(start, top, inv)| {
                    (
                        Expr::from_term(start.scale(&inv)).plus_term(top.scale(&inv)),
                        "the finite geometric sum".to_string(),
                    )
                })
            }
            (Some(n), true) => Some((
                Expr::from_term(Term::rational(
                    &(n + &RatFunc::one()) - &RatFunc::from_integer(from),
                )),
                "a sum of equal terms".to_string(),
            )),
            (Some(_), false) => None,
            (None, _) => {
                let series = HyperSeries::of_sum(&form, &BigInt::from(0));
                closed_sum(&series).map(|(t, theorem): (Term, Theorem)| {
                    let e = Expr::from_term(t);
                    // Σ_{j≥1} = Σ_{j≥0} − 1 (the term j = 0 is P(0) = 1).
                    let e = if from == 1 {
                        e.plus_term(Term::rational(-RatFunc::one()))
                    } else {
                        e
                    };
                    (e, theorem.name().to_string())
                })
            }
        };
        let series = (closed.is_none() && count.is_none())
            .then(|| HyperSeries::of_sum(&form, &BigInt::from(0)));
        total.push(TotalPart {
            piece: i,
            from,
            to: count,
            closed,
            series,
        });
        pieces.push(SymbolicPiece {
            first: piece.first.clone(),
            last: piece.last.clone(),
            shift,
            local,
            solution,
            in_k,
            at_end,
        });
    }
    Ok(SymbolicModel {
        sequence: model.sequence.clone(),
        index: model.index.clone(),
        base_index,
        pieces,
        total,
    })
}

impl SymbolicModel {
    /// Σ a(k)/a(b) once every parameter has a value: each part from its closed form, or its
    /// finite sum term by term from the piece's closed form (MPFR, `digits` digits). The
    /// symbolic total evaluated, for comparison with the exact piecewise sums.
    pub fn evaluate_total(&self, values: &BTreeMap<String, Q>, digits: u32) -> Option<rug::Float> {
        use crate::closed_form::ClosedForm;
        use crate::numeric::{bits_for_digits, evaluate_closed_form, GUARD_BITS};
        let prec = bits_for_digits(digits + 10) + GUARD_BITS;
        let at = |product: &Product, k: &BigInt| -> Option<rug::Float> {
            let form = ClosedForm {
                sequence: self.sequence.clone(),
                base_index: BigInt::from(0),
                product: product.clone(),
            };
            evaluate_closed_form(&form, k, values, &rug::Rational::from(1), digits + 10)
                .ok()?
                .to_float(prec)
        };
        let mut total = rug::Float::new(prec);
        let mut join = rug::Float::with_val(prec, 1);
        for part in &self.total {
            let piece = &self.pieces[part.piece];
            let value = match (&part.closed, &part.to) {
                (Some((e, _)), _) => e.to_float(values, prec)?.0,
                (None, Some(n)) => {
                    let n = n.eval(values).ok()?.to_integer();
                    let mut sum = rug::Float::new(prec);
                    let mut j = BigInt::from(part.from);
                    while j <= n {
                        sum += at(&piece.solution.simplest.product, &j)?;
                        j += 1;
                    }
                    sum
                }
                (None, None) => return None,
            };
            total += rug::Float::with_val(prec, &join * &value);
            if let Some(end) = &piece.at_end {
                join *= at(end, &BigInt::from(0))?;
            }
        }
        Some(total)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::model::build_model;

    #[test]
    fn the_symbolic_total_evaluates_to_the_exact_piecewise_sum() {
        // M/M/c and M/M/c/K written with a symbolic c: the Σ form and the closed tails,
        // evaluated at each c, against the exact sums of the pieces with c given.
        let cases = [
            "param A > 0\nparam c integer >= 1\np(k)/p(k-1) = A/k for 1 <= k <= c\np(k)/p(k-1) = A/c for k > c",
            "param A > 0\nparam c, K integer >= 1\np(k)/p(k-1) = A/k for 1 <= k <= c\np(k)/p(k-1) = A/c for c < k <= K",
        ];
        for text in cases {
            let model = build_model(text).unwrap();
            let symbolic = solve_symbolic(&model, &BTreeMap::new()).unwrap();
            for c in 1..=6i64 {
                let values: BTreeMap<String, Q> = [
                    ("A".to_string(), q(c, 2) + q(1, 3)),
                    ("c".to_string(), q(c, 1)),
                    ("K".to_string(), q(c + 4, 1)),
                ]
                .into_iter()
                .collect();
                let got = symbolic.evaluate_total(&values, 30).unwrap();
                let solved = crate::piecewise::solve_model(&model, &values).unwrap();
                let law = crate::probability::Law::new(&solved, 30);
                let exact = law.total().unwrap().sums[0].clone().unwrap();
                let diff = rug::Float::with_val(64, &got - &exact.value).abs()
                    / rug::Float::with_val(64, &exact.value);
                assert!(diff < 1e-28, "c = {c}: {got} against {}", exact.value);
            }
        }
    }
}

/// One term of a probability's numerator over a symbolic model (each in units of a(b)).
#[derive(Clone, Debug, PartialEq)]
pub enum NumeratorTerm {
    /// a(s_i)/a(b): the term where piece i starts from (i ≥ 1).
    Join(usize),
    /// The total's part of piece i, with its join.
    Part(usize),
    /// a(K)/a(b) for the last state K of a bounded last piece.
    End,
}

impl SymbolicModel {
    /// The numerator of P(event) = numerator / total when the event's bounds fall on the
    /// pieces' edges (k ≥ c, k > c, k = c at a breakpoint c, k = K at the last state);
    /// `None` otherwise (the probability then needs values).
    pub fn event_terms(&self, event: &crate::probability::Event) -> Option<Vec<NumeratorTerm>> {
        let (lower, upper) = event.inclusive_bounds();
        let n = self.pieces.len();
        match (&lower, &upper) {
            (Some(l), None) => {
                for i in 1..n {
                    let p = &self.pieces[i];
                    if *l == p.first {
                        return Some((i..n).map(NumeratorTerm::Part).collect());
                    }
                    if *l == p.shift {
                        let mut terms = vec![NumeratorTerm::Join(i)];
                        terms.extend((i..n).map(NumeratorTerm::Part));
                        return Some(terms);
                    }
                }
                None
            }
            (Some(l), Some(u)) if l == u => {
                if let Some(i) = (1..n).find(|&i| self.pieces[i].shift == *l) {
                    return Some(vec![NumeratorTerm::Join(i)]);
                }
                let last = self.pieces.last()?.last.as_ref()?;
                (last == l).then(|| vec![NumeratorTerm::End])
            }
            _ => None,
        }
    }
}
