//! Properties over random rules with rational linear factors (proptest, seeded so that a
//! failure reproduces): the closed form equals the direct product, the simplest form equals
//! the telescoped one, printing a parsed rule and parsing it again gives the same rule, and
//! `check` proves the solver's own closed form and refutes it times 1 + 1/1000.
//! The direct product here is our own exact rational product of the generated factors
//! (a(k) = a(b)·Π_{j=b+1}^{k} R(j), the definition of the rule), independent of the library's.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngSeed};
use rug::Rational;

use telescope::check::{check_claim, CheckRequest, Verdict, DEFAULT_DIGITS};
use telescope::closed_form::{Affine, ClosedForm, Factor};
use telescope::model::build_problem;
use telescope::numeric::{evaluate_closed_form, to_rug_rational, LogReal};
use telescope::solve::solve;
use telescope::syntax::{display_expr, parse_expr};

/// (p k + q) with p in 1..=2 and q = n/d small.
#[derive(Clone, Debug)]
struct Linear {
    p: i64,
    n: i64,
    d: i64,
}

impl Linear {
    fn text(&self) -> String {
        let k = if self.p == 1 {
            "k".into()
        } else {
            format!("{}k", self.p)
        };
        match self.n.signum() {
            0 => k,
            1 => format!("({k} + {}/{})", self.n, self.d),
            _ => format!("({k} - {}/{})", -self.n, self.d),
        }
    }

    fn at(&self, j: i64) -> BigRational {
        BigRational::new((self.p * j * self.d + self.n).into(), self.d.into())
    }
}

#[derive(Clone, Debug)]
struct Rule {
    constant: (i64, i64),
    top: Vec<Linear>,
    bottom: Vec<Linear>,
    first: i64,
}

impl Rule {
    fn text(&self) -> String {
        let product = |fs: &[Linear]| fs.iter().map(Linear::text).collect::<Vec<_>>().join(" ");
        format!(
            "a(k)/a(k-1) = ({}/{}) * {} / ({})   for k >= {}",
            self.constant.0,
            self.constant.1,
            product(&self.top),
            product(&self.bottom),
            self.first
        )
    }

    /// R(j), or None where the denominator vanishes.
    fn ratio_at(&self, j: i64) -> Option<BigRational> {
        let mut r = BigRational::new(self.constant.0.into(), self.constant.1.into());
        for f in &self.top {
            r *= f.at(j);
        }
        for f in &self.bottom {
            let v = f.at(j);
            if v.is_zero() {
                return None;
            }
            r /= v;
        }
        Some(r)
    }

    /// a(k) with a(b) = 1, exactly.
    fn direct(&self, k: i64) -> Option<BigRational> {
        let mut a = BigRational::one();
        for j in self.first..=k {
            a *= self.ratio_at(j)?;
        }
        Some(a)
    }
}

fn linear() -> impl Strategy<Value = Linear> {
    (1i64..=2, -9i64..=9, 1i64..=4).prop_map(|(p, n, d)| Linear { p, n, d })
}

fn rule() -> impl Strategy<Value = Rule> {
    (
        (prop_oneof![Just(1i64), Just(-1), 1i64..=5], 1i64..=5),
        prop::collection::vec(linear(), 1..=3),
        prop::collection::vec(linear(), 1..=3),
        0i64..=3,
    )
        .prop_map(|(constant, top, bottom, first)| Rule {
            constant,
            top,
            bottom,
            first,
        })
}

fn config(cases: u32) -> Config {
    Config {
        cases,
        rng_seed: RngSeed::Fixed(13),
        failure_persistence: None,
        ..Config::default()
    }
}

fn value(form: &ClosedForm, k: i64) -> Option<LogReal> {
    evaluate_closed_form(form, &k.into(), &BTreeMap::new(), &Rational::from(1), 40).ok()
}

fn agrees(direct: &BigRational, closed: &LogReal) -> bool {
    let exact = LogReal::from_rational(&to_rug_rational(direct), 256);
    if direct.is_zero() || closed.is_zero() {
        return direct.is_zero() && closed.is_zero();
    }
    exact.rel_diff(closed, 64) < 1e-30f64
}

proptest! {
    #![proptest_config(config(200))]

    /// The closed form (and the simplest form) equal the direct product at random k to 30
    /// digits (the closed form is evaluated at 40).
    #[test]
    fn closed_form_equals_the_direct_product(rule in rule(), offset in 0i64..60) {
        let problem = build_problem(&rule.text());
        prop_assume!(problem.is_ok());
        let problem = problem.unwrap();
        let solution = solve(&problem, &BTreeMap::new());
        prop_assume!(solution.is_ok());
        let solution = solution.unwrap();
        let k = rule.first + offset;
        let direct = rule.direct(k);
        prop_assume!(direct.is_some());
        let direct = direct.unwrap();
        for form in [&solution.closed_form, &solution.simplest] {
            let closed = value(form, k);
            prop_assert!(closed.is_some(), "{} at k = {k}", rule.text());
            prop_assert!(agrees(&direct, &closed.unwrap()), "{} at k = {k}: {direct}", rule.text());
        }
    }

    /// Printing a parsed rule and parsing it again gives the same expression and the same
    /// rule in factor normal form.
    #[test]
    fn print_then_parse_is_the_same_rule(rule in rule()) {
        let text = rule.text();
        let rhs = text.split_once('=').unwrap().1.split("for").next().unwrap();
        let first = parse_expr(rhs).unwrap();
        let printed = display_expr(&first);
        let second = parse_expr(&printed).unwrap();
        prop_assert_eq!(display_expr(&second), printed.clone());
        let again = format!("a(k)/a(k-1) = {printed}   for k >= {}", rule.first);
        match (build_problem(&text), build_problem(&again)) {
            (Ok(mut a), Ok(mut b)) => {
                // Spans point into different texts.
                for f in a.ratio.factors.iter_mut().chain(b.ratio.factors.iter_mut()) {
                    f.span = None;
                }
                prop_assert_eq!(a.ratio, b.ratio)
            }
            (Err(a), Err(b)) => prop_assert_eq!(a.message, b.message),
            (a, b) => prop_assert!(false, "{text}: {a:?} vs {b:?}"),
        }
    }
}

/// A closed form in the claim language.
fn claim_text(form: &ClosedForm) -> Option<String> {
    let q = |r: &telescope::algebra::RatFunc| r.as_constant().map(|c| format!("({c})"));
    let affine = |a: &Affine| Some(format!("({}*k + {})", a.k_coeff, q(&a.constant)?));
    let mut parts = vec![
        format!("a({})", form.base_index),
        q(&form.product.coefficient)?,
    ];
    for f in &form.product.factors {
        parts.push(match f {
            Factor::Gamma { arg, exponent } => format!("Gamma{}^({exponent})", affine(arg)?),
            Factor::Power { base, exponent } => format!("{}^{}", q(base)?, affine(exponent)?),
            Factor::Linear { arg, exponent } => format!("{}^({exponent})", affine(arg)?),
            Factor::Rising {
                base,
                count,
                exponent,
            } => {
                format!("rising({}, {})^({exponent})", affine(base)?, affine(count)?)
            }
            Factor::Beta { a, b, exponent } => {
                format!("Beta({}, {})^({exponent})", affine(a)?, affine(b)?)
            }
            Factor::Factorial { arg, exponent } => {
                format!("factorial{}^({exponent})", affine(arg)?)
            }
            Factor::Binomial {
                top,
                bottom,
                exponent,
            } => {
                format!(
                    "binomial({}, {})^({exponent})",
                    affine(top)?,
                    affine(bottom)?
                )
            }
            Factor::SqrtPi { half_exponent } => format!("sqrt(pi)^({half_exponent})"),
        });
    }
    Some(parts.join(" * "))
}

proptest! {
    // Each check compares at many k up to 10^6: fewer cases keep the suite quick.
    #![proptest_config(config(24))]

    /// `check` proves the solver's own simplest form and refutes it times 1 + 1/1000.
    #[test]
    fn check_proves_the_solution_and_refutes_a_scaled_one(rule in rule()) {
        let problem = build_problem(&rule.text());
        prop_assume!(problem.is_ok());
        let problem = problem.unwrap();
        let solution = solve(&problem, &BTreeMap::new());
        prop_assume!(solution.is_ok());
        let solution = solution.unwrap();
        // Only infinite supports off the poles: the claim language has no "0 beyond N".
        prop_assume!((rule.first..rule.first + 80).all(|j| rule.ratio_at(j).is_some_and(|r| !r.is_zero())));
        let claim = claim_text(&solution.simplest).unwrap();
        let request = |claim: String| CheckRequest {
            claim,
            values: BTreeMap::new(),
            base: None,
            digits: DEFAULT_DIGITS,
        };
        let proved = check_claim(&problem, &request(claim.clone()));
        prop_assert!(proved.is_ok(), "{}: {claim}", rule.text());
        prop_assert_eq!(proved.unwrap().verdict, Verdict::Proved, "{}: {}", rule.text(), claim);
        let scaled = check_claim(&problem, &request(format!("(1 + 1/1000) * {claim}"))).unwrap();
        prop_assert_eq!(scaled.verdict, Verdict::Refuted, "{}", rule.text());
    }
}

#[test]
fn the_generated_direct_product_is_the_rule() {
    // a(k)/a(k-1) = (k-1)/(k+5/2) from k = 2: a(2) = 1/(9/2) = 2/9 (by hand)
    let rule = Rule {
        constant: (1, 1),
        top: vec![Linear { p: 1, n: -1, d: 1 }],
        bottom: vec![Linear { p: 1, n: 5, d: 2 }],
        first: 2,
    };
    assert_eq!(
        rule.direct(2).unwrap(),
        BigRational::new(2.into(), 9.into())
    );
    assert!(rule.direct(2).unwrap().is_positive());
    let _ = BigInt::zero();
}
