//! From the model to the rule: balance equations, birth–death rates, boundary terms and
//! piecewise rules, checked against the published results they must reproduce.

mod common;
use common::telescope;

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_traits::{One, Zero};

use telescope::algebra::{q, RatFunc, Q};
use telescope::model::{build_model, Assumption, Model, RuleSource};
use telescope::numeric::rational_to_decimal;
use telescope::numeric::to_rug_rational;
use telescope::piecewise::{
    build_piecewise_table, exact_terms, solve_model, ModelSolution, PiecewiseEvaluator,
};
use telescope::solve::SupportEnd;
use telescope::table::TableRequest;

fn values(pairs: &[(&str, Q)]) -> BTreeMap<String, Q> {
    pairs
        .iter()
        .map(|(n, v)| (n.to_string(), v.clone()))
        .collect()
}

fn model(text: &str) -> Model {
    build_model(text).unwrap_or_else(|e| panic!("{}", e.render("<test>", text)))
}

fn solved(text: &str, vals: &BTreeMap<String, Q>) -> (Model, ModelSolution) {
    let m = model(text);
    let s = solve_model(&m, vals).unwrap_or_else(|e| panic!("{}", e.render("<test>", text)));
    (m, s)
}

fn factorial(n: u32) -> Q {
    (1..=n).fold(Q::one(), |acc, j| acc * Q::from_integer(j.into()))
}

fn power(x: &Q, n: u32) -> Q {
    (0..n).fold(Q::one(), |acc, _| acc * x)
}

fn binomial(n: u32, k: u32) -> Q {
    factorial(n) / (factorial(k) * factorial(n - k))
}

fn rational_to_q(r: &Q) -> rug::Rational {
    to_rug_rational(r)
}

const SIMON: &str = "param rho in (0, 1)
n(k) = (1-rho)((k-1) n(k-1) - k n(k))   for k >= 2
n(1) = rho - (1-rho) n(1)";

#[test]
fn simon_balance_gives_yule_simon_with_alpha_one_over_one_minus_rho() {
    // Simon (1955), "On a class of skew distribution functions", Biometrika 42: the stationary
    // balance gives the Yule–Simon law f(k) = α B(k, α+1) with α = 1/(1−ρ), whose ratio is
    // f(k)/f(k−1) = (k−1)/(k+α) (scipy.stats.yulesimon documentation).
    let m = model(SIMON);
    assert!(matches!(
        m.pieces[0].derivation.source,
        RuleSource::Balance { .. }
    ));
    let ratio = &m.pieces[0].ratio;
    let rho = RatFunc::var("rho");
    let alpha = RatFunc::one()
        .checked_div(&(&RatFunc::one() - &rho))
        .unwrap();
    assert!(ratio.constant.is_one());
    let shifts: Vec<(RatFunc, i32)> = ratio
        .factors
        .iter()
        .map(|f| (f.shift.clone(), f.exponent))
        .collect();
    assert_eq!(shifts, vec![(RatFunc::from_integer(-1), 1), (alpha, -1)]);
    assert_eq!(m.pieces[0].first, RatFunc::from_integer(2));
    // The boundary n(1) = ρ − (1−ρ) n(1) gives n(1) = ρ/(2−ρ) = ρ·f(1), f(1) = α/(α+1).
    let boundary = m.boundary.as_ref().unwrap();
    assert_eq!(boundary.index, BigInt::from(1));
    let expected = rho
        .checked_div(&(&RatFunc::from_integer(2) - &rho))
        .unwrap();
    assert_eq!(boundary.value, expected);
}

#[test]
fn simon_total_is_rho_and_mean_is_one_over_rho_exactly() {
    // Yule–Simon mean α/(α−1) (scipy.stats.yulesimon documentation) equals 1/ρ for α = 1/(1−ρ)
    // (Simon 1955). Exact check: from the ratio (k+α) n(k) = (k−1) n(k−1) the partial sums
    // T_K = Σ_{k≤K} n(k) and M_K = Σ_{k≤K} k n(k) obey, for every K (telescoping the balance;
    // derived here, and checked term by term below):
    //     α T_K + K n(K) = (α+1) n(1),   (α−1) M_K + K(K+1) n(K) = (α+1) n(1).
    // (The first is scipy's survival function K·B(K, α+1) = K f(K)/α in disguise.) With
    // K² n(K) → 0 (tail exponent α+1 > 2 for ρ < 1), T_∞ = (α+1) n(1)/α and
    // M_∞ = (α+1) n(1)/(α−1).
    for rho in [q(3, 10), q(1, 2), q(2, 3)] {
        let vals = values(&[("rho", rho.clone())]);
        let (m, s) = solved(SIMON, &vals);
        let n1 = m.boundary.as_ref().unwrap().value.eval(&vals).unwrap();
        assert_eq!(n1, &rho / (Q::from_integer(2.into()) - &rho));
        let alpha = Q::one() / (Q::one() - &rho);
        let terms = exact_terms(&s, &n1, &BigInt::from(300)).unwrap();
        let (mut t, mut mk) = (Q::zero(), Q::zero());
        for (i, n) in terms.iter().enumerate() {
            let k = Q::from_integer((i as i64 + 1).into());
            t += n;
            mk += &k * n;
            let total_invariant = &alpha * &t + &k * n;
            assert_eq!(total_invariant, (&alpha + Q::one()) * &n1, "T_K at K = {k}");
            let mean_invariant = (&alpha - Q::one()) * &mk + &k * (&k + Q::one()) * n;
            assert_eq!(mean_invariant, (&alpha + Q::one()) * &n1, "M_K at K = {k}");
        }
        // Σ n(k) = ρ: each token is a new word with probability ρ (Simon 1955).
        let limit_total = (&alpha + Q::one()) * &n1 / &alpha;
        assert_eq!(limit_total, rho, "Σ n(k) = ρ");
        let limit_mean_sum = (&alpha + Q::one()) * &n1 / (&alpha - Q::one());
        assert_eq!(limit_mean_sum, Q::one(), "Σ k n(k) = 1");
        assert_eq!(
            &limit_mean_sum / &limit_total,
            Q::one() / &rho,
            "mean = 1/ρ"
        );
    }
}

#[test]
fn immigration_death_rates_give_poisson() {
    // birth λ, death kμ: the infinite-server queue (M/M/∞), stationary law Poisson(λ/μ)
    // (e.g. Kleinrock, Queueing Systems Vol. 1, 1975, the M/M/∞ section — from memory);
    // Poisson pmf ratio p(k)/p(k−1) = a/k (scipy.stats.poisson documentation).
    let text = "param lambda, mu > 0\nbirth(k) = lambda\ndeath(k) = k mu";
    let m = model(text);
    assert_eq!(m.sequence, "p");
    assert!(m.pieces[0]
        .derivation
        .assumptions
        .contains(&Assumption::DetailedBalance));
    let ratio = &m.pieces[0].ratio;
    assert_eq!(
        ratio.constant,
        RatFunc::var("lambda")
            .checked_div(&RatFunc::var("mu"))
            .unwrap()
    );
    assert_eq!(ratio.factors.len(), 1);
    assert_eq!(ratio.factors[0].shift, RatFunc::zero());
    assert_eq!(ratio.factors[0].exponent, -1);
    assert_eq!(m.pieces[0].first, RatFunc::one());
    let vals = values(&[("lambda", q(3, 1)), ("mu", q(2, 1))]);
    let (_, s) = solved(text, &vals);
    let a = q(3, 2);
    let terms = exact_terms(&s, &Q::one(), &BigInt::from(40)).unwrap();
    for (k, t) in terms.iter().enumerate() {
        // p(k)/p(0) = a^k/k! (Poisson pmf up to e^{−a})
        assert_eq!(*t, power(&a, k as u32) / factorial(k as u32), "k = {k}");
    }
}

#[test]
fn ehrenfest_rates_give_binomial_half() {
    // Ehrenfest urn: birth (N−k)/N, death k/N, stationary law Binomial(N, 1/2)
    // (Ehrenfest & Ehrenfest 1907; Kac 1947, "Random walk and the theory of Brownian motion").
    let text = "param N integer >= 1
birth(k) = (N - k)/N   for 0 <= k <= N
death(k) = k/N         for 0 <= k <= N";
    let m = model(text);
    assert!(m.pieces[0]
        .derivation
        .assumptions
        .iter()
        .any(|a| matches!(a, Assumption::StateSpaceEnds { .. })));
    for n in [1u32, 5, 12] {
        let vals = values(&[("N", Q::from_integer(n.into()))]);
        let (_, s) = solved(text, &vals);
        assert_eq!(
            s.pieces[0].solution.support.last,
            SupportEnd::At(BigInt::from(n))
        );
        let terms = exact_terms(&s, &Q::one(), &BigInt::from(n + 3)).unwrap();
        let total: Q = terms.iter().fold(Q::zero(), |a, t| a + t);
        assert_eq!(total, power(&q(2, 1), n), "Σ C(N,k) = 2^N");
        for (k, t) in terms.iter().enumerate() {
            let k = k as u32;
            let expected = if k <= n { binomial(n, k) } else { Q::zero() };
            // p(k) = C(N,k)/2^N after normalising
            assert_eq!(
                t / &total,
                expected / power(&q(2, 1), n),
                "N = {n}, k = {k}"
            );
        }
    }
}

const DESK: &str = "param lambda, mu > 0
param c integer >= 1
birth(k) = lambda
death(k) = k mu     for 1 <= k <= c
death(k) = c mu     for k > c";

/// Erlang's C formula, the probability that an arrival waits in M/M/c with offered load a < c:
/// C(c, a) = (a^c/c!)·c/(c−a) / (Σ_{k<c} a^k/k! + (a^c/c!)·c/(c−a))
/// (Erlang 1917; e.g. Gross & Harris, Fundamentals of Queueing Theory, the M/M/c section).
fn erlang_c(c: u32, a: &Q) -> Q {
    let c_q = Q::from_integer(c.into());
    let top = power(a, c) / factorial(c) * &c_q / (&c_q - a);
    let below: Q = (0..c).fold(Q::zero(), |acc, k| acc + power(a, k) / factorial(k));
    &top / (below + &top)
}

#[test]
fn multi_server_queue_reproduces_erlang_c() {
    for (c, lambda, mu) in [(3u32, q(2, 1), q(1, 1)), (5, q(7, 2), q(4, 5))] {
        let vals = values(&[
            ("c", Q::from_integer(c.into())),
            ("lambda", lambda.clone()),
            ("mu", mu.clone()),
        ]);
        let (_, s) = solved(DESK, &vals);
        assert_eq!(s.pieces.len(), 2);
        assert_eq!(s.breakpoints(), vec![BigInt::from(c)]);
        let law = telescope::probability::Law::new(&s, 30);
        let event = telescope::probability::parse_event("k >= c", "k", &s.pieces[0].problem.params)
            .unwrap();
        let p = law.probability(&event).value.unwrap();
        let terms = exact_terms(&s, &Q::one(), &BigInt::from(c)).unwrap();
        let waiting: Q = telescope::algebra::parse_q(p.exact.as_deref().unwrap()).unwrap();
        let a = &lambda / &mu;
        let expected = erlang_c(c, &a);
        assert_eq!(waiting, expected, "c = {c}, a = {a}");
        let shown = rational_to_decimal(&rational_to_q(&waiting), 30);
        assert_eq!(shown, rational_to_decimal(&rational_to_q(&expected), 30));
        // The same probability from the joined closed form (MPFR), to 30 digits.
        let closed = PiecewiseEvaluator::new(&s, &Q::one(), 40).unwrap();
        let at_c = closed.value(&BigInt::from(c)).unwrap();
        assert_eq!(
            at_c.to_decimal(30),
            rational_to_decimal(&rational_to_q(&terms[c as usize]), 30)
        );
    }
    // A first value from the textbook formula, for the record: C(3, 2) = 4/9
    // (a^c/c!·c/(c−a) = 8/6·3 = 4, Σ_{k<3} 2^k/k! = 5, 4/(5+4)); computed by hand.
    assert_eq!(erlang_c(3, &q(2, 1)), q(4, 9));
}

#[test]
fn piecewise_tables_agree_with_the_direct_product_across_the_breakpoint() {
    let vals = values(&[("c", q(4, 1)), ("lambda", q(3, 1)), ("mu", q(1, 1))]);
    let (m, s) = solved(DESK, &vals);
    for (to, digits) in [(40i64, 40u32), (6000, 30)] {
        let request = TableRequest {
            from: BigInt::zero(),
            to: BigInt::from(to),
            digits,
            base_value: Q::one(),
            check_all: false,
        };
        let table = build_piecewise_table(&s, &request, m.pieces[0].span.clone()).unwrap();
        // the rows on both sides of the breakpoint are always checked
        assert!(table.checked_rows.contains(&BigInt::from(4)));
        assert!(table.checked_rows.contains(&BigInt::from(5)));
        let worst: f64 = table.max_rel_diff.parse().unwrap();
        assert!(
            worst < 10f64.powi(-(digits as i32)),
            "{to} rows at {digits} digits: {worst}"
        );
        // p(5) = p(4)·λ/(cμ) = (3^4/4!)·(3/4) (M/M/c, geometric beyond c)
        let row5 = &table.rows[5];
        let expected = power(&q(3, 1), 4) / factorial(4) * q(3, 4);
        assert_eq!(
            row5.direct,
            rational_to_decimal(&rational_to_q(&expected), digits)
        );
        assert_eq!(row5.closed.as_deref(), Some(row5.direct.as_str()));
    }
}

#[test]
fn three_term_balance_reduces_to_the_rates() {
    // Zero net flux in λ(k−1)p(k−1) + μ(k+1)p(k+1) − (λ(k)+μ(k))p(k) = 0 gives detailed balance
    // p(k)/p(k−1) = λ(k−1)/μ(k) (Karlin & Taylor, A First Course in Stochastic Processes, §4.7).
    let cases = [
        (
            "0 = lambda p(k-1) + (k+1) mu p(k+1) - (lambda + k mu) p(k)   for k >= 1",
            "birth(k) = lambda; death(k) = k mu",
        ),
        (
            "(lambda + k mu) p(k) = lambda p(k-1) + (k+1) mu p(k+1)   for k >= 1",
            "birth(k) = lambda; death(k) = k mu",
        ),
        (
            "param N integer >= 1
             0 = (N-k+1)/N * p(k-1) + (k+1)/N * p(k+1) - ((N-k)/N + k/N) * p(k)   for k >= 1",
            "param N integer >= 1
             birth(k) = (N-k)/N for 0 <= k <= N; death(k) = k/N for 0 <= k <= N",
        ),
    ];
    for (balance, rates) in cases {
        let b = model(balance);
        let r = model(rates);
        assert_eq!(
            shape(&b.pieces[0].ratio),
            shape(&r.pieces[0].ratio),
            "{balance}"
        );
        assert_eq!(b.pieces[0].first, r.pieces[0].first, "{balance}");
        assert_eq!(
            b.pieces[0].derivation.assumptions,
            vec![Assumption::ZeroFluxAtBoundary]
        );
    }
}

/// A ratio without the source spans (which differ between two texts).
fn shape(
    r: &telescope::ratio::Ratio,
) -> (RatFunc, Vec<(telescope::ratio::Orientation, RatFunc, i32)>) {
    let factors = r
        .factors
        .iter()
        .map(|f| (f.orientation, f.shift.clone(), f.exponent))
        .collect();
    (r.constant.clone(), factors)
}

#[test]
fn refusals_say_which_term_and_why() {
    let cases = [
        ("n(k) n(k-1) = k n(k-1)", "multiplies two terms", 1),
        ("n(k) = 1/n(k-1)", "denominator", 10),
        (
            "(k^2 + a) n(k) = n(k-1)",
            "coefficient of n(k) cannot be factored",
            1,
        ),
        ("(k^2 + 1) n(k) = n(k-1)", "no rational roots", 1),
        ("n(k) = n(k-1) + rho", "homogeneous", 17),
        (
            "0 = lambda p(k-1) + mu p(k+1) - (lambda + 2 mu) p(k)",
            "not −(λ(k) + μ(k)) for λ(k) = lambda, μ(k) = mu",
            33,
        ),
    ];
    for (text, words, column) in cases {
        let o = telescope(&["solve", text]);
        assert_eq!(o.status.code(), Some(2), "{text}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains(words), "{text}: {err}");
        assert!(err.contains(&format!("column {column}")), "{text}: {err}");
    }
}

#[test]
fn the_cli_shows_the_derived_ratio_before_the_solution() {
    let o = telescope(&["solve", "examples/recipe_tags.rule"]);
    assert!(o.status.success());
    let out = String::from_utf8_lossy(&o.stdout);
    let derived = out.find("derived      n(k)/n(k − 1) = (k − 1)/(k + 1/(1 − ρ))");
    let closed = out.find("closed form");
    assert!(derived.is_some() && derived < closed, "{out}");
    assert!(out.contains("boundary     n(1) = ρ/(2 − ρ)"), "{out}");
    // the boundary sets the base value of the table: n(1) = (1/2)/(3/2) = 1/3
    let o = telescope(&[
        "table",
        "examples/recipe_tags.rule",
        "--param",
        "rho=1/2",
        "--k",
        "1..2",
        "--digits",
        "10",
    ]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.contains("0.3333333333"), "{out}");
    let o = telescope(&[
        "solve",
        "examples/repair_counter.rule",
        "--param",
        "c=2",
        "--format",
        "json",
    ]);
    assert!(o.status.success());
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["breakpoints"][0], "2");
    assert_eq!(v["derivation"]["pieces"][1]["form"], "rates");
    assert_eq!(v["pieces"][1]["base_index"], "2");
}

#[test]
fn the_piecewise_sum_is_the_finite_part_plus_the_geometric_tail() {
    // M/M/3 with offered load 2: Σ_{k<3} 2^k/k! = 5, p(3) = 4/3, tail Σ_{k>3} = p(3)·(2/3)/(1/3)
    // = 8/3, total 9 = 5 + 4 (Erlang C's denominator times p(0); computed by hand).
    let o = telescope(&[
        "solve",
        "examples/repair_counter.rule",
        "--param",
        "c=3",
        "--param",
        "lambda=2",
        "--param",
        "mu=1",
    ]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(
        out.contains(
            "parts      19/3 (up to the last breakpoint) + 8/3 (last piece), with p(0) = 1"
        ),
        "{out}"
    );
    assert!(out.contains("= 9 exactly with p(0) = 1"), "{out}");
}

#[test]
fn piecewise_models_need_their_breakpoint_and_consecutive_ranges() {
    // A table needs numbers; solve gives the symbolic forms instead (tests/probability.rs).
    let o = telescope(&["table", "examples/repair_counter.rule", "--k", "0..5"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("--param c="));
    let gap = "a(k)/a(k-1) = 2/k for 1 <= k <= 3\na(k)/a(k-1) = 1/2 for k > 4";
    let e = build_model(gap).unwrap_err();
    assert!(e.message.contains("right after"), "{e:?}");
    assert_eq!(e.line_column(gap), (2, 19));
}

#[test]
fn a_forward_balance_without_range_keeps_the_default_base_term() {
    // (k+1) p(k+1) = lambda p(k): the Poisson balance written forward (ratio λ/k, common
    // practice); with no `for` the rule starts at the default k = 2 like any other rule.
    let m = model("(k+1) p(k+1) = lambda p(k)");
    assert_eq!(m.pieces[0].first, RatFunc::from_integer(2));
    // with a range, the equation's range moves with the index: k ≥ 0 for the equation is
    // k ≥ 1 for the rule.
    let m = model("(k+1) p(k+1) = lambda p(k)   for k >= 0");
    assert_eq!(m.pieces[0].first, RatFunc::one());
}

/// A piecewise model whose last piece has a power-law tail: the tail part comes from the
/// analysis of the last piece. Here Σ_{k≥3} a(k)/a(3) = ₂F₁(3, 1; 11/2; 1) = 3 by Gauss's
/// theorem (DLMF 15.4.20), so the total is 15/8 + (3 − 1)/8 = 17/8.
#[test]
fn a_power_law_last_piece_is_summed_by_the_analysis() {
    let text = "param c integer >= 1\n\
                a(k)/a(k-1) = 1/2  for 1 <= k <= c\n\
                a(k)/a(k-1) = (k-1)/(k+3/2)  for k > c\n";
    let dir = std::env::temp_dir().join("telescope-piecewise-tail.rule");
    std::fs::write(&dir, text).unwrap();
    let o = telescope(&[
        "solve",
        dir.to_str().unwrap(),
        "--param",
        "c=3",
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let n = &v["normalization"];
    assert_eq!(n["parts"]["finite_part"], "15/8");
    // The tail's series has a rational closed form (Gauss), so everything stays exact.
    assert_eq!(n["parts"]["tail_part"], "1/4");
    assert_eq!(n["exact"], "17/8");
    assert_eq!(n["value"], "2.12500000000000000000000000000");
    assert!(n["method"].as_str().unwrap().contains("Gauss"));
}

#[test]
fn a_bare_ratio_takes_a_sequence_name_its_parameters_leave_free() {
    // Issue 14: `a` without an index argument is a parameter of a bare ratio.
    let m = model("z (k + a)(k + b)/((k + c)(k + 1)) for k >= 1");
    assert_eq!(m.sequence, "u");
    assert!(m.params.iter().any(|p| p.name == "a"));
    // A declared parameter counts as used too, wherever the declaration stands.
    let m = model("(k + 1)/(k + 2)\nparam a > 0\nparam u > 0");
    assert_eq!(m.sequence, "v");
    // The sequence written with its index inside its own ratio is still refused.
    let err = build_model("(k + 1)/(k + a(k))").unwrap_err();
    assert!(
        err.message.contains("cannot appear inside its own ratio"),
        "{}",
        err.message
    );
    assert_eq!(model("(k + 1)/(k + 2)").sequence, "a");
}
