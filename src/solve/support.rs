//! Where the sequence lives and when the closed form is valid.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::Zero;

use crate::algebra::{rational_roots, Poly, RatFunc, Q};
use crate::closed_form::{ClosedForm, Factor};
use crate::diagnostic::Diagnostic;
use crate::model::Problem;
use crate::ratio::{LinearFactor, Ratio};

use super::inequality::{split_univariate, Split};
use super::ranges::{
    integers_reached, range_contains, takes_integer_at_least, vanishes_somewhere, Interval, Verdict,
};
use super::reason::Reason;
use super::telescope::numeric_shift;

/// The index range on which a(k) is non-zero.
#[derive(Clone, Debug, PartialEq)]
pub struct Support {
    /// The base index b.
    pub first: BigInt,
    pub last: SupportEnd,
}

#[derive(Clone, Debug, PartialEq)]
pub enum SupportEnd {
    /// a(k) ≠ 0 for every k ≥ b (given the conditions).
    Infinite,
    /// The last non-zero term.
    At(BigInt),
    /// Ends at `last` when `last + 1` is an integer ≥ the rule's first index; infinite otherwise.
    /// `certain` is set when the parameters' declarations make `last` an integer.
    Symbolic { last: RatFunc, certain: bool },
}

/// What must hold for the closed form to be right.
#[derive(Clone, Debug, PartialEq)]
pub struct Condition {
    pub kind: ConditionKind,
    /// Why, in words (no formulas: renderers format `kind`).
    pub reason: String,
    pub status: Status,
    /// Where it holds on the declared range when the range leaves it open (one parameter).
    pub holds_for: Option<Split>,
}

#[derive(Clone, Debug, PartialEq)]
pub enum ConditionKind {
    /// expr ≠ 0
    NonZero(RatFunc),
    /// param ≠ value
    NotEqual { param: String, value: Q },
    /// expr ∉ {min, min+1, min+2, …}
    NotIntegerAtLeast { expr: RatFunc, min: BigInt },
}

#[derive(Clone, Debug, PartialEq)]
pub enum Status {
    /// Not decided from what is known.
    Undecided,
    /// Not decided, and the ranges could not settle it; the string says why (several
    /// parameters, the range leaves both outcomes possible, an irrational breakpoint).
    NotDecided(String),
    /// Holds; the reason says what settles it (`ρ = 3/10`).
    Holds(Reason),
    /// Holds for every value the declared ranges of these parameters allow.
    SettledByRange(Vec<String>),
    /// Fails, and why.
    Fails(Reason),
}

fn value_of(expr: &RatFunc, values: &BTreeMap<String, Q>) -> Option<Q> {
    numeric_shift(expr, values)
}

fn integer_at_least(q: &Q, min: &BigInt) -> bool {
    q.is_integer() && q.to_integer() >= *min
}

/// Finds the last index of the support and refuses a denominator that vanishes inside it.
pub fn find_support(
    problem: &Problem,
    ratio: &Ratio,
    values: &BTreeMap<String, Q>,
) -> Result<Support, Diagnostic> {
    let first_index = &problem.first_index;
    let mut end: Option<BigInt> = None;
    let mut symbolic: Option<(RatFunc, bool)> = None;
    for factor in ratio.numerator_factors() {
        let root = factor.root();
        match value_of(&root, values) {
            Some(r) => {
                if integer_at_least(&r, first_index) {
                    let last = r.to_integer() - 1;
                    end = Some(match end {
                        Some(e) if e <= last => e,
                        _ => last,
                    });
                }
            }
            None => {
                // A root the declared ranges keep off the integers ≥ the first index never
                // ends the support: `k + r − 1` with r > 0 is non-zero for every k ≥ 1.
                let verdict = takes_integer_at_least(&root, first_index, problem, values);
                if verdict != Verdict::Never && symbolic.is_none() {
                    // Certain when the ranges put the root on an integer ≥ the first index
                    // for every admissible value (e.g. `N − k + 1` with N integer ≥ 1).
                    let certain = verdict == Verdict::Always || is_integer_valued(&root, problem);
                    symbolic = Some((&root - &RatFunc::one(), certain));
                }
            }
        }
    }
    for factor in ratio.denominator_factors() {
        let root = factor.root();
        if let Some(r) = value_of(&root, values) {
            let inside = match &end {
                Some(e) => r.is_integer() && r.to_integer() <= e + 1,
                None => true,
            };
            if integer_at_least(&r, first_index) && inside {
                return Err(vanishing_denominator(problem, factor, &r));
            }
        }
    }
    let last = match (end, symbolic) {
        (Some(e), _) => SupportEnd::At(e),
        (None, Some((last, certain))) => SupportEnd::Symbolic { last, certain },
        (None, None) => SupportEnd::Infinite,
    };
    Ok(Support {
        first: problem.base_index(),
        last,
    })
}

fn vanishing_denominator(problem: &Problem, factor: &LinearFactor, root: &Q) -> Diagnostic {
    let span = factor.span.clone().unwrap_or(problem.rule_span.clone());
    let k = root.to_integer();
    Diagnostic::new(
        format!(
            "the rule divides by zero at k = {k}: this factor of the denominator vanishes there"
        ),
        span,
    )
    .with_help(format!(
        "a(k)/a(k-1) is undefined at k = {k}; start the rule later (`for k >= {}`) or check the factor",
        &k + 1
    ))
}

/// True when every variable of `expr` is a declared integer parameter and `expr` is a
/// polynomial with integer coefficients.
fn is_integer_valued(expr: &RatFunc, problem: &Problem) -> bool {
    let Some(poly) = expr.as_poly() else {
        return false;
    };
    let all_integer_params = poly
        .variables()
        .iter()
        .all(|v| problem.param(v).map(|p| p.integer).unwrap_or(false));
    all_integer_params && poly.terms().all(|(_, c)| c.is_integer())
}

/// The conditions under which the closed form holds, decided where the values allow.
pub fn conditions(
    problem: &Problem,
    ratio: &Ratio,
    values: &BTreeMap<String, Q>,
) -> Result<Vec<Condition>, Diagnostic> {
    let mut out: Vec<Condition> = Vec::new();
    // Every parameter polynomial the rule divides by must not vanish.
    let mut divisors: Vec<Poly> = problem.divisors.iter().map(|(p, _)| p.clone()).collect();
    divisors.push(ratio.constant.denom().clone());
    for factor in &ratio.factors {
        divisors.push(factor.shift.denom().clone());
    }
    let mut seen: Vec<Poly> = Vec::new();
    for divisor in divisors {
        if divisor.as_constant().is_some() {
            continue;
        }
        let (_, primitive) = divisor.content_and_primitive();
        if seen.contains(&primitive) {
            continue;
        }
        seen.push(primitive.clone());
        for kind in nonzero_conditions(&primitive) {
            push_unique(
                &mut out,
                kind,
                "the rule's coefficients divide by this expression",
                problem,
                values,
            );
        }
    }
    // A vanishing constant would make every term after the base zero.
    if ratio.constant.as_constant().is_none() {
        let (_, primitive) = ratio.constant.numer().content_and_primitive();
        for kind in nonzero_conditions(&primitive) {
            push_unique(
                &mut out,
                kind,
                "otherwise the constant factor of the rule is zero and the sequence stops at the base term",
                problem,
                values,
            );
        }
    }
    // Denominator factors must not vanish at an integer k in the rule's range.
    for factor in ratio.denominator_factors() {
        let root = factor.root();
        if root.as_constant().is_some() {
            continue;
        }
        let kind = ConditionKind::NotIntegerAtLeast {
            expr: root,
            min: problem.first_index.clone(),
        };
        push_unique(
            &mut out,
            kind,
            "a factor of the rule's denominator would vanish at that k",
            problem,
            values,
        );
    }
    for condition in &out {
        if let Status::Fails(why) = &condition.status {
            return Err(Diagnostic::new(
                format!(
                    "a condition of the rule fails: {}",
                    crate::render::reason::text(why)
                ),
                problem.rule_span.clone(),
            )
            .with_help("choose other values with --param"));
        }
    }
    Ok(out)
}

fn push_unique(
    out: &mut Vec<Condition>,
    kind: ConditionKind,
    reason: &str,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) {
    if out.iter().any(|c| c.kind == kind) {
        return;
    }
    let status = match decide(&kind, values) {
        Status::Undecided => decide_from_ranges(&kind, problem, values),
        decided => decided,
    };
    let holds_for = match status {
        Status::NotDecided(_) => holds_for(&kind, problem, values),
        _ => None,
    };
    out.push(Condition {
        kind,
        reason: reason.to_string(),
        status,
        holds_for,
    });
}

/// Digits of irrational interval ends in `holds_for`.
const HOLDS_FOR_DIGITS: u32 = 30;

/// Where a condition in one parameter holds on its declared range: the range without the
/// excluded values, each written as `(e − v)² > 0` for [`split_univariate`].
fn holds_for(
    kind: &ConditionKind,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) -> Option<Split> {
    let (expr, excluded): (RatFunc, Vec<BigInt>) = match kind {
        ConditionKind::NotEqual { param, value } => (
            &RatFunc::var(param) - &RatFunc::constant(value.clone()),
            vec![BigInt::zero()],
        ),
        ConditionKind::NonZero(expr) => (expr.clone(), vec![BigInt::zero()]),
        ConditionKind::NotIntegerAtLeast { expr, min } => {
            (expr.clone(), integers_reached(expr, min, problem, values)?)
        }
    };
    let expr = expr.eval_partial(values).ok()?;
    let variables = expr.variables();
    if variables.len() != 1 {
        return None;
    }
    let name = variables.into_iter().next()?;
    let param = problem.param(&name)?;
    let inequalities: Vec<(Vec<Q>, Vec<Q>)> = excluded
        .iter()
        .map(|m| {
            let gap = &expr - &RatFunc::constant(Q::from_integer(m.clone()));
            let square = &gap * &gap;
            let coeffs = |p: &Poly| p.univariate_coeffs(&name).unwrap_or_default();
            (coeffs(square.numer()), coeffs(square.denom()))
        })
        .collect();
    let split = split_univariate(
        &name,
        param.integer,
        &inequalities,
        &Interval::of_param(param),
        HOLDS_FOR_DIGITS,
    );
    (split.everywhere() != Some(true)).then_some(split)
}

/// Turns `p ≠ 0` into `param ≠ root` conditions when p is univariate with rational roots.
fn nonzero_conditions(p: &Poly) -> Vec<ConditionKind> {
    let variables = p.variables();
    if variables.len() == 1 {
        let var = variables.iter().next().unwrap().clone();
        let coeffs: Vec<Q> = p
            .coeffs_in(&var)
            .iter()
            .map(|c| c.as_constant().unwrap_or_else(Q::zero))
            .collect();
        let (roots, cofactor) = rational_roots(&coeffs);
        let mut out: Vec<ConditionKind> = roots
            .into_iter()
            .map(|(value, _)| ConditionKind::NotEqual {
                param: var.clone(),
                value,
            })
            .collect();
        if cofactor.len() > 1 {
            let rest: Vec<Poly> = cofactor.into_iter().map(Poly::constant).collect();
            out.push(ConditionKind::NonZero(RatFunc::from_poly(
                Poly::from_coeffs_in(&var, &rest),
            )));
        }
        return out;
    }
    vec![ConditionKind::NonZero(RatFunc::from_poly(p.clone()))]
}

fn decide(kind: &ConditionKind, values: &BTreeMap<String, Q>) -> Status {
    let shown = |expr: &RatFunc| Reason::values_of(expr, values);
    match kind {
        ConditionKind::NonZero(expr) => match expr.eval(values) {
            Ok(v) if v.is_zero() => {
                Status::Fails(shown(expr).then_words("makes a divisor of the rule zero"))
            }
            Ok(_) => Status::Holds(shown(expr)),
            Err(_) => Status::Undecided,
        },
        ConditionKind::NotEqual { param, value } => match values.get(param) {
            Some(v) if v == value => Status::Fails(
                Reason::default()
                    .then_value(param, v)
                    .then_words("is excluded"),
            ),
            Some(v) => Status::Holds(Reason::default().then_value(param, v)),
            None => Status::Undecided,
        },
        ConditionKind::NotIntegerAtLeast { expr, min } => match expr.eval(values) {
            Ok(v) if integer_at_least(&v, min) => Status::Fails(
                Reason::words(format!("a denominator factor vanishes at k = {v} with"))
                    .then_values_of(expr, values),
            ),
            Ok(_) => Status::Holds(shown(expr)),
            Err(_) => Status::Undecided,
        },
    }
}

/// Settles a condition from the declared parameter ranges where that is exact (see `ranges`).
fn decide_from_ranges(
    kind: &ConditionKind,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) -> Status {
    let settled = |expr: &RatFunc| {
        Status::SettledByRange(
            expr.eval_partial(values)
                .map(|e| e.variables().into_iter().collect())
                .unwrap_or_default(),
        )
    };
    match kind {
        ConditionKind::NotEqual { param, value } => match range_contains(problem, param, value) {
            Some(false) => Status::SettledByRange(vec![param.clone()]),
            Some(true) => {
                Status::NotDecided(format!("{param} = {value} lies inside the declared range"))
            }
            None => Status::Undecided,
        },
        ConditionKind::NonZero(expr) => match vanishes_somewhere(expr, problem, values) {
            Verdict::Never => settled(expr),
            Verdict::Always => Status::Fails("it vanishes on the whole declared range".into()),
            Verdict::Sometimes => {
                Status::NotDecided("it vanishes somewhere inside the declared range".into())
            }
            Verdict::Open(why) => Status::NotDecided(why),
        },
        ConditionKind::NotIntegerAtLeast { expr, min } => {
            match takes_integer_at_least(expr, min, problem, values) {
                Verdict::Never => settled(expr),
                Verdict::Always => Status::Fails(
                    "for every value the declared range allows, a denominator factor vanishes inside the rule's range"
                        .into(),
                ),
                Verdict::Sometimes => Status::NotDecided(
                    "the declared range contains values where it fails".into(),
                ),
                Verdict::Open(why) => Status::NotDecided(why),
            }
        }
    }
}

/// What the simplest form needs beyond what the rule itself needs: a Beta function's second
/// argument and a Gamma of parameters in a numerator must avoid the poles of Γ at 0, −1, −2, …
/// (DLMF 5.2.1), and a constant divisor must not vanish. Only conditions not already in
/// `existing` are returned.
pub fn form_conditions(
    problem: &Problem,
    form: &ClosedForm,
    existing: &[Condition],
    values: &BTreeMap<String, Q>,
) -> Vec<Condition> {
    let mut out: Vec<Condition> = existing.to_vec();
    let symbolic = |c: &RatFunc| c.as_constant().is_none();
    for factor in &form.product.factors {
        match factor {
            Factor::Beta { b, .. } if !b.depends_on_k() && symbolic(&b.constant) => push_unique(
                &mut out,
                ConditionKind::NotIntegerAtLeast {
                    expr: -b.constant.clone(),
                    min: BigInt::zero(),
                },
                "the Beta function of the simplest form needs its second argument off the poles of Gamma",
                problem,
                values,
            ),
            Factor::Gamma { arg, exponent }
                if *exponent > 0 && !arg.depends_on_k() && symbolic(&arg.constant) =>
            {
                push_unique(
                    &mut out,
                    ConditionKind::NotIntegerAtLeast {
                        expr: -arg.constant.clone(),
                        min: BigInt::zero(),
                    },
                    "a Gamma function of the simplest form must stay off its poles",
                    problem,
                    values,
                )
            }
            Factor::Linear { arg, exponent }
                if *exponent < 0 && !arg.depends_on_k() && symbolic(&arg.constant) =>
            {
                let (_, primitive) = arg.constant.numer().content_and_primitive();
                for kind in nonzero_conditions(&primitive) {
                    push_unique(
                        &mut out,
                        kind,
                        "the simplest form divides by this expression",
                        problem,
                        values,
                    );
                }
            }
            _ => {}
        }
    }
    out.split_off(existing.len())
}
