//! Probabilities of ranges of k and the moments of whole models, against published queueing
//! formulas evaluated here in exact rationals (never against our own output).

mod common;

use std::collections::BTreeMap;

use num_bigint::BigInt;
use rug::ops::Pow;
use rug::Rational;
use telescope::algebra::{q, Q};
use telescope::model::build_model;
use telescope::numeric::rational_to_decimal;
use telescope::piecewise::solve_model;
use telescope::probability::{parse_event, Law, Probability};

/// An M/M/c queue as a birth–death chain (arrival rate A, service rate 1 per busy server).
const ERLANG_C_MODEL: &str = "param A > 0\nparam c integer >= 1\nbirth(k) = A\n\
     death(k) = k for 1 <= k <= c\ndeath(k) = c for k > c";

fn values(pairs: &[(&str, Q)]) -> BTreeMap<String, Q> {
    pairs
        .iter()
        .map(|(n, v)| (n.to_string(), v.clone()))
        .collect()
}

fn to_rug(x: &Q) -> Rational {
    telescope::numeric::to_rug_rational(x)
}

fn factorial(n: u32) -> Rational {
    Rational::from((1..=n).fold(rug::Integer::from(1), |acc, i| acc * i))
}

fn answer(model: &str, vals: &BTreeMap<String, Q>, events: &[&str]) -> Vec<Probability> {
    let model = build_model(model).unwrap();
    let solved = solve_model(&model, vals).unwrap();
    let law = Law::new(&solved, 30);
    events
        .iter()
        .map(|e| law.probability(&parse_event(e, &model.index, &model.params).unwrap()))
        .collect()
}

/// The exact value and its 30-digit decimal must both match.
fn assert_exact(p: &Probability, expected: &Rational) {
    let v = p
        .value
        .as_ref()
        .unwrap_or_else(|| panic!("{}: {:?}", p.event.text, p.note));
    assert_eq!(
        v.exact.as_deref(),
        Some(expected.to_string().as_str()),
        "{}",
        p.event.text
    );
    assert_eq!(
        v.value,
        rational_to_decimal(expected, 30),
        "{}",
        p.event.text
    );
    assert_eq!(v.error_bound, "0");
}

/// Erlang's C formula (A. K. Erlang, 1917; in this form e.g. L. Kleinrock, *Queueing Systems*
/// Vol. 1, 1975, eq. 3.40): P(wait) = [A^c/c! · c/(c−A)] / [Σ_{k<c} A^k/k! + A^c/c! · c/(c−A)].
fn erlang_c(c: u32, a: &Rational) -> Rational {
    let waiting =
        (a.clone().pow(c) / factorial(c)) * Rational::from(c) / (Rational::from(c) - a.clone());
    let idle: Rational = (0..c)
        .map(|k| a.clone().pow(k) / factorial(k))
        .fold(Rational::new(), |s, t| s + t);
    &waiting / Rational::from(&idle + &waiting)
}

#[test]
fn erlang_c_for_one_to_ten_servers_to_thirty_digits() {
    for c in 1..=10u32 {
        // Loads below c: light, half and heavy traffic.
        for load in [q(1, 3), q(1, 2), q(9, 10)] {
            let a = &load * Q::from_integer(c.into());
            let vals = values(&[("A", a.clone()), ("c", q(c as i64, 1))]);
            let ps = answer(ERLANG_C_MODEL, &vals, &["k >= c"]);
            assert_exact(&ps[0], &erlang_c(c, &to_rug(&a)));
        }
    }
}

#[test]
fn erlang_c_mean_queue_length() {
    // Lq = P(wait)·A/(c − A) (Kleinrock 1975, eq. 3.41 with ρ = A/c), and the mean number of
    // busy servers is A (Little's law, common practice), so E[k] = Lq + A.
    for c in 1..=10u32 {
        let a = q(3, 4) * Q::from_integer(c.into());
        let vals = values(&[("A", a.clone()), ("c", q(c as i64, 1))]);
        let model = build_model(ERLANG_C_MODEL).unwrap();
        let solved = solve_model(&model, &vals).unwrap();
        let moments = Law::new(&solved, 30).moments();
        let ar = to_rug(&a);
        let lq = erlang_c(c, &ar) * ar.clone() / (Rational::from(c) - ar.clone());
        let mean = moments.mean.unwrap();
        assert_eq!(
            mean.exact,
            Some(Rational::from(&lq + &ar).to_string()),
            "c = {c}"
        );
        assert!(moments.variance.is_ok());
    }
}

#[test]
fn ranges_below_above_and_between_add_up() {
    let vals = values(&[("A", q(7, 2)), ("c", q(5, 1))]);
    let ps = answer(
        ERLANG_C_MODEL,
        &vals,
        &[
            "k <= c - 1",
            "k >= c",
            "2 <= k <= 2c",
            "k < 2",
            "k > 2c",
            "k = 0",
        ],
    );
    let exact = |i: usize| -> Rational {
        ps[i]
            .value
            .as_ref()
            .unwrap()
            .exact
            .as_ref()
            .unwrap()
            .parse()
            .unwrap()
    };
    assert_eq!(exact(0) + exact(1), 1);
    assert_eq!(exact(2) + exact(3) + exact(4), 1);
    // π(0) = 1/(Σ_{k<c} A^k/k! + A^c/c!·c/(c−A)) (Kleinrock 1975, eq. 3.39)
    let a = Rational::from((7, 2));
    let idle: Rational = (0..5u32)
        .map(|k| a.clone().pow(k) / factorial(k))
        .fold(Rational::new(), |s, t| s + t);
    let waiting = (a.clone().pow(5u32) / factorial(5)) * 5u32 / (Rational::from(5) - a);
    assert_eq!(exact(5), Rational::from(1) / (idle + waiting));
    assert_eq!(ps[1].range.as_ref().unwrap().first, Some(BigInt::from(5)));
}

#[test]
fn a_tiny_tail_keeps_its_digits() {
    // P(k ≥ 200) for M/M/1 with ρ = 1/10 is ρ^200 (geometric law, common practice): 1e-200,
    // far below what 1 − P(k < 200) could show.
    let ps = answer(
        "param rho in (0, 1)\nbirth(k) = rho ; death(k) = 1",
        &values(&[("rho", q(1, 10))]),
        &["k >= 200"],
    );
    assert_exact(&ps[0], &Rational::from((1, 10)).pow(200u32));
}

#[test]
fn power_law_tails_are_summed_numerically_with_a_bound() {
    // Yule–Simon with ρ = 2 (Simon 1955): p(k) = ρ B(k, ρ+1), so P(k ≥ K) = K·B(K, ρ+1)·… ;
    // for ρ = 2 the tail is P(k ≥ K) = 2/(K(K+1)) (telescoping 4/(k(k+1)(k+2)), common practice).
    let ps = answer(
        "a(k)/a(k-1) = (k-1)/(k+2) for k >= 2",
        &BTreeMap::new(),
        &["k >= 10", "k >= 1000"],
    );
    assert_exact(&ps[0], &Rational::from((2, 110)));
    assert_exact(&ps[1], &Rational::from((2, 1000 * 1001)));
    // Without a closed form for the tail (a 3F2 at 1), the numeric route with its bound.
    let ps = answer(
        "a(k)/a(k-1) = (k-1)(k+1/3)/((k+3)(k+1/2)) for k >= 2",
        &BTreeMap::new(),
        &["k >= 50", "k <= 49"],
    );
    let v: Vec<rug::Float> = ps
        .iter()
        .map(|p| {
            let v = p.value.as_ref().unwrap();
            assert!(v.exact.is_none());
            assert!(
                v.error_bound.parse::<f64>().unwrap() < 1e-31,
                "{}",
                v.error_bound
            );
            rug::Float::with_val(200, rug::Float::parse(&v.value).unwrap())
        })
        .collect();
    let sum = rug::Float::with_val(200, &v[0] + &v[1]) - 1u32;
    assert!(
        sum.clone().abs() < 1e-28,
        "P(k ≥ 50) + P(k ≤ 49) − 1 = {sum}"
    );
}

#[test]
fn missing_values_and_divergent_totals_are_explained() {
    let model = build_model(ERLANG_C_MODEL).unwrap();
    let vals = values(&[("c", q(2, 1))]);
    let solved = solve_model(&model, &vals).unwrap();
    let event = parse_event("k >= c", "k", &model.params).unwrap();
    let ps = telescope::probability::probabilities(&solved, std::slice::from_ref(&event), 30);
    assert!(ps[0].note.as_ref().unwrap().contains("missing: A"));
    // A ≥ c: the queue grows without bound and there is no stationary law.
    let vals = values(&[("A", q(3, 1)), ("c", q(2, 1))]);
    let solved = solve_model(&model, &vals).unwrap();
    let p = Law::new(&solved, 30).probability(&event);
    assert!(p.value.is_none());
    assert!(
        p.note.as_ref().unwrap().contains("diverges"),
        "{:?}",
        p.note
    );
}

#[test]
fn solve_prints_probabilities_in_json_and_text() {
    let out = common::telescope(&[
        "solve",
        "examples/repair_counter.rule",
        "--param",
        "lambda=3",
        "--param",
        "mu=1",
        "--param",
        "c=4",
        "--prob",
        "k >= c",
        "--format",
        "json",
    ]);
    assert!(out.status.success());
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let p = &json["probabilities"][0];
    // Erlang C with A = 3, c = 4: (81/24·4)/(13 + 27/2) = 27/53 (Kleinrock 1975, eq. 3.40)
    assert_eq!(p["exact"], "27/53");
    assert_eq!(p["first"], "4");
    assert_eq!(p["text"], "P(k ≥ c)");
    let out = common::telescope(&[
        "solve",
        "examples/repair_counter.rule",
        "--param",
        "c=4",
        "--prob",
        "k >= d",
    ]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("--prob") && err.contains('^'), "{err}");
}

fn binomial(n: u32, k: u32) -> Rational {
    factorial(n) / factorial(k) / factorial(n - k)
}

fn exact_of(p: &Probability) -> Rational {
    let v = p
        .value
        .as_ref()
        .unwrap_or_else(|| panic!("{}: {:?}", p.event.text, p.note));
    v.exact.as_ref().expect("exact").parse().unwrap()
}

/// Erlang's loss system M/M/c/c: c servers and no waiting room (births stop at c − 1).
const ERLANG_B_MODEL: &str = "param A > 0\nparam c integer >= 1\n\
     birth(k) = A for 0 <= k <= c - 1\ndeath(k) = k mu\nparam mu > 0";

#[test]
fn erlang_b_blocking_of_the_loss_system() {
    // Erlang's B formula (Erlang 1917; e.g. Kleinrock 1975, Vol. 1, §3.6, from memory):
    // B(c, A) = (A^c/c!) / Σ_{k=0..c} A^k/k!, the probability that all c servers are busy.
    for c in 1..=10u32 {
        for a in [q(1, 2), q(3, 1), Q::from_integer((2 * c).into())] {
            let vals = values(&[("A", a.clone()), ("c", q(c as i64, 1)), ("mu", q(1, 1))]);
            let ps = answer(ERLANG_B_MODEL, &vals, &["k = c", "k > c"]);
            let ar = to_rug(&a);
            let top = ar.clone().pow(c) / factorial(c);
            let all: Rational = (0..=c)
                .map(|k| ar.clone().pow(k) / factorial(k))
                .fold(Rational::new(), |s, t| s + t);
            assert_exact(&ps[0], &(top / all));
            // Nothing beyond the last state.
            assert_exact(&ps[1], &Rational::new());
        }
    }
    // A ratio rule cut by a range says the same: a(k)/a(k−1) = A/k for 1 <= k <= c.
    let vals = values(&[("A", q(3, 1)), ("c", q(4, 1))]);
    let ps = answer(
        "param A > 0\nparam c integer >= 1\na(k)/a(k-1) = A/k for 1 <= k <= c",
        &vals,
        &["k = c"],
    );
    // B(4, 3) = (81/24)/(1 + 3 + 9/2 + 9/2 + 27/8) = 27/131 (by hand from the formula above)
    assert_exact(&ps[0], &Rational::from((27, 131)));
}

#[test]
fn finite_waiting_room_single_server_blocking() {
    // M/M/1/K: P(k = K) = (1 − ρ)ρ^K/(1 − ρ^(K+1)) (e.g. Kleinrock 1975, Vol. 1, §3.6, from
    // memory; the truncated geometric law, common practice), and 1/(K+1) at ρ = 1.
    let model =
        "param rho > 0\nparam K integer >= 1\nbirth(k) = rho for 0 <= k <= K-1\ndeath(k) = 1";
    for big_k in [1u32, 2, 5, 10, 40] {
        for rho in [q(1, 3), q(9, 10), q(1, 1), q(5, 2)] {
            let vals = values(&[("rho", rho.clone()), ("K", q(big_k as i64, 1))]);
            let ps = answer(model, &vals, &["k = K", "k >= K + 1"]);
            let r = to_rug(&rho);
            let expected = if rho == q(1, 1) {
                Rational::from((1, big_k + 1))
            } else {
                (Rational::from(1) - r.clone()) * r.clone().pow(big_k)
                    / (Rational::from(1) - r.clone().pow(big_k + 1))
            };
            assert_exact(&ps[0], &expected);
            assert_exact(&ps[1], &Rational::new());
        }
    }
}

#[test]
fn engset_blocking_of_a_finite_source_loss_system() {
    // N sources, each idle one calling at rate beta; c servers at rate mu; no queue:
    // birth(k) = (N − k) beta for k < c, death(k) = k mu. Engset (1918), e.g. Kleinrock 1975,
    // Vol. 1, §3.9 (from memory): time congestion E = C(N,c) a^c / Σ_{k=0..c} C(N,k) a^k with
    // a = beta/mu, and the blocking seen by arrivals is the same formula with N − 1 sources.
    let model = "param N integer >= 1\nparam c integer >= 1\nparam beta, mu > 0\n\
                 birth(k) = (N - k) beta for 0 <= k <= c - 1\ndeath(k) = k mu";
    for (n, c, a) in [
        (10u32, 3u32, q(1, 5)),
        (20, 5, q(1, 10)),
        (7, 6, q(2, 1)),
        (30, 10, q(1, 3)),
    ] {
        let engset = |sources: u32| -> Rational {
            let ar = to_rug(&a);
            let term = |k: u32| binomial(sources, k) * ar.clone().pow(k);
            let all: Rational = (0..=c).map(term).fold(Rational::new(), |s, t| s + t);
            term(c) / all
        };
        for sources in [n, n - 1] {
            let vals = values(&[
                ("N", q(sources as i64, 1)),
                ("c", q(c as i64, 1)),
                ("beta", a.clone()),
                ("mu", q(1, 1)),
            ]);
            let ps = answer(model, &vals, &["k = c"]);
            assert_eq!(exact_of(&ps[0]), engset(sources), "N = {sources}, c = {c}");
        }
    }
}

#[test]
fn a_last_ratio_piece_with_an_upper_bound_ends_the_support() {
    // M/M/c/K: π(k) ∝ A^k/k! for k ≤ c and A^c/c!·(A/c)^(k−c) for c < k ≤ K (e.g. Gross &
    // Harris, Fundamentals of Queueing Theory, the M/M/c/K section, from memory).
    let model = "param A > 0\nparam c, K integer >= 1\n\
                 p(k)/p(k-1) = A/k for 1 <= k <= c\np(k)/p(k-1) = A/c for c < k <= K";
    let (c, big_k) = (3u32, 7u32);
    let a = Rational::from((5, 2));
    let weight = |k: u32| -> Rational {
        if k <= c {
            a.clone().pow(k) / factorial(k)
        } else {
            a.clone().pow(c) / factorial(c) * (a.clone() / c).pow(k - c)
        }
    };
    let all: Rational = (0..=big_k).map(weight).fold(Rational::new(), |s, t| s + t);
    let vals = values(&[("A", q(5, 2)), ("c", q(3, 1)), ("K", q(7, 1))]);
    let ps = answer(model, &vals, &["k = K", "k >= c", "k > K"]);
    assert_exact(&ps[0], &(weight(big_k) / all.clone()));
    let waiting: Rational = (c..=big_k).map(weight).fold(Rational::new(), |s, t| s + t);
    assert_exact(&ps[1], &(waiting / all));
    assert_exact(&ps[2], &Rational::new());
    // The whole-model analysis knows the support is finite: no tail law, exact moments.
    let m = build_model(model).unwrap();
    let solved = solve_model(&m, &vals).unwrap();
    let a = telescope::probability::analyse_model(&solved, &Default::default()).unwrap();
    assert!(a.tail.is_none());
    assert!(a.normalization.finite_support);
    assert!(a.mean.value.unwrap().exact.is_some());
}

#[test]
fn piecewise_tables_normalise_and_stop_at_the_last_state() {
    // M/M/2/4 with A = 3: weights 1, 3, 9/2, 27/4, 81/8 (the M/M/c/K law above), total 203/8,
    // so p(0) = 8/203; beyond K = 4 every row is 0.
    let out = common::telescope(&[
        "table",
        "examples/barber_chairs.rule",
        "--param",
        "c=2",
        "--param",
        "K=4",
        "--param",
        "A=3",
        "--k",
        "0..6",
        "--normalize",
        "--format",
        "json",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["base_value"], "8/203");
    assert_eq!(json["normalization"]["total_error_bound"], "0");
    assert_eq!(json["rows"][5]["direct"], "0");
    assert_eq!(json["rows"][6]["closed"], "0");
    let sum: f64 = json["normalization"]["rows_sum"]
        .as_str()
        .unwrap()
        .parse()
        .unwrap();
    assert!((sum - 1.0).abs() < 1e-12, "{sum}");
    // An open model: M/M/3 with load 2 has p(0) = 1/9 (Kleinrock 1975, eq. 3.39).
    let out = common::telescope(&[
        "table",
        "examples/repair_counter.rule",
        "--param",
        "c=3",
        "--param",
        "lambda=2",
        "--param",
        "mu=1",
        "--k",
        "0..3",
        "--normalize",
        "--format",
        "json",
    ]);
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["base_value"], "1/9");
}

#[test]
fn symbolic_breakpoints_give_each_piece_and_the_total_with_sigma() {
    // M/M/c with c symbolic: p(k) = p(0)(λ/μ)^k/k! up to c, p(c)(λ/(cμ))^(k−c) beyond, and the
    // total Σ_{j≤c} (λ/μ)^j/j! + (λ/μ)^c/c!·λ/(cμ − λ): Erlang C's denominator (Kleinrock
    // 1975, eq. 3.39) with the truncated exponential sum kept as Σ.
    let out = common::telescope(&["solve", "examples/repair_counter.rule"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8_lossy(&out.stdout);
    for line in [
        "p(k) = p(0)·(λ/μ)^k/k!",
        "p(k) = p(c)·(λ/(c·μ))^(k − c)",
        "Σ_{k≥0} p(k) = p(0)·(Σ_{j=0}^{c} (λ/μ)^j/j! + (λ/μ)^c/c!·λ/(c·μ − λ))",
    ] {
        assert!(text.contains(line), "missing {line}:\n{text}");
    }
    // Events on a breakpoint have symbolic probabilities: Erlang C's P(wait) and, for the
    // loss system, Erlang's B formula (A^c/c!)/Σ_{j≤c} A^j/j! (Erlang 1917) exactly.
    let out = common::telescope(&[
        "solve",
        "examples/repair_counter.rule",
        "--prob",
        "k >= c",
        "--prob",
        "k >= 2",
    ]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("P(k ≥ c) = ((λ/μ)^c/c! + (λ/μ)^c/c!·λ/(c·μ − λ))/(Σ_{j=0}^{c} (λ/μ)^j/j! + (λ/μ)^c/c!·λ/(c·μ − λ))"), "{text}");
    assert!(
        text.contains("P(k ≥ 2): needs the breakpoints' values"),
        "{text}"
    );
    let out = common::telescope(&["solve", "examples/parking_garage.rule", "--prob", "k = c"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("P(k = c) = ((λ/μ)^c/c!)/(Σ_{j=0}^{c} (λ/μ)^j/j!)"),
        "{text}"
    );
    // --normalize needs numbers.
    let out = common::telescope(&["solve", "examples/repair_counter.rule", "--normalize"]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn far_tails_use_the_closed_form_and_agree_with_mpmath() {
    // n(k)/n(k−1) = (k−1)/(k+s) with s = 1/(1−ρ) = 10/7 (ρ = 3/10): a(k) ∝ B(k, s+1), and
    // Σ_{k≥K} B(k, s+1) = B(K, s) since B(k, s) − B(k+1, s) = B(k, s+1) (DLMF 5.12.1 with the
    // Gamma recurrence), so P(k ≥ K) = Γ(K)Γ(s+1)/Γ(K+s). Values from mpmath 1.3 at 40 digits.
    let ps = answer(
        "param rho in (0, 1)\nn(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k) for k >= 2",
        &values(&[("rho", q(3, 10))]),
        &["k >= 10", "k >= 10^7", "k <= 10^7"],
    );
    let v = |i: usize| ps[i].value.as_ref().unwrap().value.clone();
    assert_eq!(v(0), "0.0458041970933118176551956427299");
    assert_eq!(v(1), "1.26582346730758590484614007600e-10");
    assert_eq!(v(2), "0.999999999873417671352431216311");
    for p in &ps[1..] {
        let bound: f64 = p.value.as_ref().unwrap().error_bound.parse().unwrap();
        assert!(bound < 1e-35, "{}: {bound}", p.event.text);
    }
}

#[test]
fn closed_forms_of_probabilities_with_symbolic_parameters() {
    use telescope::render::analysis_output::expr_node;
    let closed = |model: &str, event: &str| -> Option<String> {
        let model = build_model(model).unwrap();
        let solved = solve_model(&model, &BTreeMap::new()).unwrap();
        let e = parse_event(event, &model.index, &model.params).unwrap();
        let ps = telescope::probability::probabilities(&solved, &[e], 30);
        ps[0]
            .closed_form
            .as_ref()
            .map(|e| telescope::render::text::write(&expr_node(e)))
    };
    // M/M/1: π(k) = (1 − ρ)ρ^k, so P(k ≥ K) = ρ^K and P(k ≤ K) = 1 − ρ^(K+1) (geometric law,
    // common practice).
    let mm1 = "param rho in (0, 1)\nparam K integer >= 1\nbirth(k) = rho ; death(k) = 1";
    assert_eq!(closed(mm1, "k >= K").as_deref(), Some("ρ^K"));
    assert_eq!(closed(mm1, "k <= K").as_deref(), Some("1 − ρ^(K + 1)"));
    // Yule–Simon with s = 5/2 (a(k) ∝ B(k, s+1), Simon 1955): P(k ≥ 2) = Γ(2)Γ(s+1)/Γ(2+s)
    // = 1/(s+1) = 2/7 by the telescoping of B(k, s) above.
    assert_eq!(
        closed("a(k)/a(k-1) = (k-1)/(k+5/2) for k >= 2", "k >= 2").as_deref(),
        Some("2/7")
    );
    // Partial sums of a binomial law have no closed form (a 2F1 away from 1): none is claimed.
    assert_eq!(
        closed(
            "param N integer >= 1\nparam p in (0, 1)\na(k)/a(k-1) = (N-k+1)/k * p/(1-p) for k >= 1",
            "k >= 2"
        ),
        None
    );
}

/// P(X ≤ k) for X ~ Binomial(n, 1/4), from its definition Σ_{j≤k} C(n, j) 3^(n−j) / 4^n in exact
/// integers (the mass function of the binomial law, e.g. Feller, *An Introduction to Probability
/// Theory*, Vol. 1, VI.2, from memory).
fn binomial_cdf_quarter(n: u32, k: u32) -> Rational {
    let mut sum = rug::Integer::new();
    for j in 0..=k {
        sum +=
            rug::Integer::from(rug::Integer::binomial_u(n, j)) * rug::Integer::from(3).pow(n - j);
    }
    Rational::from((sum, rug::Integer::from(4).pow(n)))
}

#[test]
fn binomial_laws_over_thousands_of_states() {
    // a(k)/a(k−1) = (N + 1 − k)/(3k) gives a(k) = C(N, k) 3^(−k): the binomial law with
    // p = 1/4. The states are summed by binary splitting; a fraction too long to keep is
    // rounded once, and its digits must still be right.
    let model = "param N integer >= 1\na(k)/a(k-1) = (N + 1 - k)/(3k) for k >= 1";
    // N = 2000: the fractions are kept (an exact value of about 1,200 digits).
    let ps = answer(model, &values(&[("N", q(2000, 1))]), &["k <= 500"]);
    assert_exact(&ps[0], &binomial_cdf_quarter(2000, 500));
    // N = 20000: the total is rounded once; the 30 digits agree with the exact sum (and with
    // 0.50380014499553849792615706256943…, the same sum in Python integers over 4^20000).
    let ps = answer(model, &values(&[("N", q(20000, 1))]), &["k <= 5000"]);
    let v = ps[0].value.as_ref().expect("a value");
    assert_eq!(
        v.value,
        rational_to_decimal(&binomial_cdf_quarter(20000, 5000), 30)
    );
    assert_eq!(v.value, "0.503800144995538497926157062569");
    assert!(v.exact.is_none());
    let bound: f64 = v.error_bound.parse().unwrap();
    assert!(bound > 0.0 && bound < 1e-35, "{bound}");
    assert!(v.method.contains("rounded once"), "{}", v.method);
}

#[test]
fn ranges_that_start_past_the_first_term_and_past_the_support() {
    // a(k)/a(k−1) = (4 − k)/k from a(0) = 1 gives a(k) = C(3, k) (by hand: 1, 3, 3, 1, then 0),
    // the binomial law with n = 3, p = 1/2: P(2 ≤ k ≤ 3) = 4/8, P(k = 1) = 3/8, and nothing
    // at or beyond k = 4 (the walk stops at the zero instead of taking later steps).
    let ps = answer(
        "a(k)/a(k-1) = (4 - k)/k for k >= 1",
        &BTreeMap::new(),
        &["2 <= k <= 3", "k = 1", "k >= 5", "k >= 4"],
    );
    assert_exact(&ps[0], &Rational::from((1, 2)));
    assert_exact(&ps[1], &Rational::from((3, 8)));
    assert_exact(&ps[2], &Rational::new());
    assert_exact(&ps[3], &Rational::new());
}
