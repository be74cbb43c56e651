//! The analysis of a whole model — several pieces, or a state space cut at a capacity — in
//! the single rule's shape ([`Analysis`]): the total over the support, mean and variance of
//! the normalised law (from [`Law`]: exact where every part is exact, numeric with a bound
//! otherwise), and the tail law of the open last piece with its prefactor in units of the
//! first base term a(b) (the last piece's own prefactor times the exact join factor
//! a(b')/a(b), a rational function of the parameters).

use num_bigint::BigInt;
use num_traits::ToPrimitive;
use rug::Float;

use crate::algebra::{RatFunc, Q};
use crate::analysis::{
    analyse, Analysis, AnalysisRequest, Finiteness, Moment, Normalization, NumberReport, TotalParts,
};
use crate::diagnostic::Diagnostic;
use crate::numeric::decimal;
use crate::piecewise::ModelSolution;
use crate::ratio::{Orientation, Ratio};

use super::{Law, MassError, Sum, Value};

/// Longest run of earlier pieces whose join factor is multiplied out symbolically.
const MAX_JOIN_STEPS: u64 = 400;

/// The model-level analysis; `solve` renders it exactly as a single rule's.
pub fn analyse_model(
    solved: &ModelSolution,
    request: &AnalysisRequest,
) -> Result<Analysis, Diagnostic> {
    let first = &solved.pieces[0].problem;
    let last = solved.tail_piece();
    let values = &solved.values;
    let base = solved.base_index();
    let numeric = first.params.iter().all(|p| values.contains_key(&p.name));
    let open = last.last_index.is_none();
    // The open last piece's own analysis gives the convergence conditions and the tail law.
    let piece = if open {
        let inner = AnalysisRequest {
            digits: request.digits + 5,
            normalize: false,
            ..request.clone()
        };
        Some(analyse(&last.problem, &last.solution, &inner)?)
    } else {
        None
    };
    let law = numeric.then(|| Law::new(solved, request.digits));
    let total = law.as_ref().map(|l| l.total());
    let finite_support = law.as_ref().map_or(!open, |l| l.support_end().is_some());
    let finiteness = match (&total, &piece) {
        (Some(Ok(_)), _) => Finiteness::Finite,
        (Some(Err(MassError::Divergent(why))), _) => Finiteness::Infinite(why.clone().into()),
        (_, Some(p)) => p.normalization.finiteness.clone(),
        (_, None) => Finiteness::Finite,
    };
    let requirements = match (&piece, finite_support) {
        (Some(p), false) => p.normalization.requirements.clone(),
        _ => Vec::new(),
    };
    let numeric_note = if !numeric {
        Some("give every parameter a value (--param) to sum the pieces".to_string())
    } else {
        match &total {
            Some(Err(MassError::Unsupported(why))) => Some(why.clone()),
            _ => None,
        }
    };
    let total_value = total.as_ref().and_then(|t| t.ok()).map(|m| {
        let s0 = m.sums[0].as_ref().expect("a summed total has its value");
        to_report(s0, m.method.join("; "), m.check.as_ref(), request.digits)
    });
    let parts = law
        .as_ref()
        .and_then(|l| total_parts(l, solved, request.digits));
    let base_value = if request.normalize {
        let inverse = total.as_ref().and_then(|t| t.ok()).and_then(|m| {
            let s0 = m.sums[0].as_ref()?;
            let one = Sum::exact(rug::Rational::from(1), s0.value.prec());
            one.ratio(s0)
        });
        Some((
            None,
            inverse.map(|i| to_report(&i, "1 / total".into(), None, request.digits)),
        ))
    } else {
        None
    };
    let normalization = Normalization {
        base_index: base.clone(),
        series: None,
        closed_form: None,
        requirements: requirements.clone(),
        finiteness: finiteness.clone(),
        value: total_value,
        base_value,
        finite_support,
        numeric_note,
        parts,
        // Where the ranges leave the total open, the open last piece says where it is finite.
        finite_for: match (&piece, &finiteness) {
            (Some(p), Finiteness::Undecided) => p.normalization.finite_for.clone(),
            _ => None,
        },
    };
    let moments = law.as_ref().map(|l| l.moments());
    let moment = |j: usize| -> Moment {
        let reqs = match (&piece, finite_support) {
            (Some(p), false) => {
                if j == 1 {
                    p.mean.requirements.clone()
                } else {
                    p.variance.requirements.clone()
                }
            }
            _ => Vec::new(),
        };
        let from_piece = piece.as_ref().filter(|_| !finite_support).map(|p| {
            if j == 1 {
                p.mean.finiteness.clone()
            } else {
                p.variance.finiteness.clone()
            }
        });
        let computed = moments
            .as_ref()
            .map(|m| if j == 1 { &m.mean } else { &m.variance });
        let (finiteness, value) = match (computed, &finiteness) {
            (_, Finiteness::Infinite(_)) => (
                Finiteness::Infinite("the total diverges, so there is no distribution".into()),
                None,
            ),
            (Some(Ok(v)), _) => (Finiteness::Finite, Some(value_report(v))),
            (Some(Err(why)), _) if why.contains("diverges") => {
                (Finiteness::Infinite(why.clone().into()), None)
            }
            _ => (from_piece.unwrap_or(Finiteness::Finite), None),
        };
        let finite_for = match (&piece, &finiteness) {
            (Some(p), Finiteness::Undecided) if j == 1 => p.mean.finite_for.clone(),
            (Some(p), Finiteness::Undecided) => p.variance.finite_for.clone(),
            _ => None,
        };
        Moment {
            closed_form: None,
            requirements: reqs,
            finiteness,
            value,
            finite_for,
        }
    };
    let (mean, variance) = (moment(1), moment(2));
    let tail = piece.and_then(|p| {
        let mut t = p.tail?;
        let join = join_factor(solved)?;
        t.law.prefactor_term = t.law.prefactor_term.scale(&join);
        if let Some(numbers) = &mut t.numbers {
            // C = join · C_piece evaluated afresh from its exact term (Gamma values, powers).
            let prec = t_prec(request.digits);
            let mut c = t.law.prefactor_term.to_float(values, prec)?;
            // Under --normalize C/total, when the total is exact (the formula says so too).
            if let Some(q) = exact_inverse_total(&normalization, request) {
                c *= q;
            }
            numbers.prefactor = decimal::float_to_decimal(&c, request.digits);
        }
        if request.normalize {
            // C/total as a formula when the total is an exact rational.
            let exact_total = normalization
                .value
                .as_ref()
                .and_then(|v| v.exact.as_ref())
                .and_then(|q| crate::algebra::parse_q(q));
            t.normalized_prefactor = exact_total.and_then(|q| {
                let inv = RatFunc::constant(q).inv()?;
                Some(t.law.prefactor_term.scale(&inv))
            });
        }
        Some(t)
    });
    Ok(Analysis {
        index: first.index.clone(),
        sequence: first.sequence.clone(),
        digits: request.digits,
        normalize: request.normalize,
        tail,
        normalization,
        mean,
        variance,
    })
}

fn t_prec(digits: u32) -> u32 {
    crate::numeric::bits_for_digits(digits + 10) + crate::numeric::GUARD_BITS
}

/// 1/total when `--normalize` found it as an exact rational.
fn exact_inverse_total(n: &Normalization, request: &AnalysisRequest) -> Option<rug::Rational> {
    if !request.normalize {
        return None;
    }
    let report = n.base_value.as_ref()?.1.as_ref()?;
    report.exact.as_ref()?.parse::<rug::Rational>().ok()
}

/// a(b')/a(b) with b' the last piece's base: the product of the earlier pieces' ratios, as a
/// rational function of the parameters (`None` beyond [`MAX_JOIN_STEPS`] steps).
pub fn join_factor(solved: &ModelSolution) -> Option<RatFunc> {
    let base = solved.base_index();
    let last_base = solved.tail_piece().problem.base_index();
    if (&last_base - &base).to_u64()? > MAX_JOIN_STEPS {
        return None;
    }
    let mut product = RatFunc::one();
    let mut k = &base + 1;
    while k <= last_base {
        let piece = &solved.pieces[solved.piece_at(&k)?];
        product = &product * &ratio_at(&piece.problem.ratio, &k)?;
        k += 1;
    }
    Some(product)
}

/// R(k) at an integer k with the parameters kept symbolic.
fn ratio_at(ratio: &Ratio, k: &BigInt) -> Option<RatFunc> {
    let kr = RatFunc::constant(Q::from_integer(k.clone()));
    let mut out = ratio.constant.clone();
    for f in &ratio.factors {
        let linear = match f.orientation {
            Orientation::Rising => &kr + &f.shift,
            Orientation::Falling => &f.shift - &kr,
        };
        if linear.is_zero() && f.exponent < 0 {
            return None;
        }
        out = &out * &linear.pow(f.exponent)?;
    }
    Some(out)
}

/// The total split at the last piece's base b': Σ_{k≤b'} (exact) and Σ_{k>b'}.
fn total_parts(law: &Law, solved: &ModelSolution, digits: u32) -> Option<TotalParts> {
    if solved.pieces.len() < 2 {
        return None;
    }
    let split = solved.tail_piece().problem.base_index();
    let head = law.part(None, Some(&split)).ok()?;
    let head_sum = head.sums[0].as_ref()?;
    let finite_part = head_sum.exact.as_ref()?.to_string();
    let tail = law.part(Some(&(&split + 1)), None);
    let (tail_part, tail_exact, tail_error_bound) =
        match tail.as_ref().ok().and_then(|m| m.sums[0].clone()) {
            Some(s) => match &s.exact {
                Some(q) => (Some(q.to_string()), true, None),
                None => (
                    Some(decimal::float_to_decimal(&s.value, digits)),
                    false,
                    Some(decimal::short(&s.error)),
                ),
            },
            None => (None, false, None),
        };
    Some(TotalParts {
        finite_part,
        tail_part,
        tail_exact,
        tail_error_bound,
    })
}

/// `table --normalize` for a piecewise or finite model: a(b) = 1/total from the whole
/// model's sum (exact when the total is), then the chained table from it.
pub fn normalized_piecewise_table(
    solved: &ModelSolution,
    request: &crate::table::TableRequest,
    span: crate::diagnostic::Span,
) -> Result<crate::table::NormalizedTable, Diagnostic> {
    let fail = |why: String| Diagnostic::new(why, span.clone());
    let law = Law::new(solved, request.digits + 5);
    let total = law.total().map_err(|e| {
        fail(match e {
            MassError::Divergent(why) => format!("--normalize: the total diverges ({why})"),
            MassError::Unsupported(why) => {
                format!("--normalize: the total cannot be computed: {why}")
            }
        })
    })?;
    let s0 = total.sums[0]
        .as_ref()
        .ok_or_else(|| fail("--normalize: the total diverges".into()))?;
    let one = Sum::exact(rug::Rational::from(1), s0.value.prec());
    let base = one
        .ratio(s0)
        .ok_or_else(|| fail("--normalize: the total is zero".into()))?;
    let bounded = crate::analysis::Bounded {
        value: base.value,
        error: base.error,
        exact: base.exact,
    };
    let method = format!("1 / total over the pieces ({})", total.method.join("; "));
    crate::table::normalized_table_with(&bounded, method, request, |r| {
        crate::piecewise::build_piecewise_table(solved, r, span.clone())
    })
}

fn to_report(s: &Sum, method: String, check: Option<&Float>, digits: u32) -> NumberReport {
    value_report(&super::value_of(s, method, check, digits))
}

fn value_report(v: &Value) -> NumberReport {
    NumberReport {
        value: v.value.clone(),
        exact: v.exact.clone(),
        error_bound: v.error_bound.clone(),
        method: v.method.clone(),
        check: v.check_rel_diff.clone(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::model::build_model;
    use crate::piecewise::solve_model;
    use std::collections::BTreeMap;

    #[test]
    fn the_join_factor_is_the_product_of_the_earlier_ratios() {
        // a(k)/a(k−1) = 3/k up to c = 3: a(3)/a(0) = 3·3/2·1 = 9/2 (arithmetic by hand)
        let model = build_model(
            "param c integer >= 1\na(k)/a(k-1) = 3/k for 1 <= k <= c\na(k)/a(k-1) = 1/2 for k > c",
        )
        .unwrap();
        let values: BTreeMap<String, Q> = [("c".to_string(), q(3, 1))].into_iter().collect();
        let solved = solve_model(&model, &values).unwrap();
        assert_eq!(join_factor(&solved), Some(RatFunc::constant(q(9, 2))));
        let analysis = analyse_model(&solved, &AnalysisRequest::default()).unwrap();
        // total = (1 + 3 + 9/2 + 9/2) + 9/2 · (1/2)/(1 − 1/2) = 13 + 9/2 (geometric tail,
        // common practice)
        let total = analysis.normalization.value.unwrap();
        assert_eq!(total.exact.as_deref(), Some("35/2"));
        let parts = analysis.normalization.parts.unwrap();
        assert_eq!(parts.finite_part, "13");
        assert_eq!(parts.tail_part.as_deref(), Some("9/2"));
        // mean = (0 + 3 + 9 + 27/2 + Σ_{n≥1} (3+n)·(9/2)·2^(−n)) / (35/2) = (51/2 + 45/2)/(35/2)
        // = 96/35 (Σ_{n≥1} (3+n) 2^(−n) = 3 + 2 = 5, common practice)
        assert_eq!(analysis.mean.value.unwrap().exact.as_deref(), Some("96/35"));
    }
}
