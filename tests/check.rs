//! `telescope check`: correct claims proved in every equal form, each kind of error planted on
//! purpose and diagnosed, for the published reference cases (`tests/reference/
//! distributions.json`, each with its `source`) and the example models; exit codes and
//! snapshots of the JSON output through the binary.

mod common;
use common::telescope;

use std::collections::BTreeMap;

use serde_json::Value;

use telescope::algebra::{parse_q, Q};
use telescope::check::{check_claim, CheckError, CheckReport, CheckRequest, Kind, Verdict};
use telescope::model::build_problem;
use telescope::render;

fn reference(id: &str) -> Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/distributions.json"
    ))
    .unwrap();
    let v: Value = serde_json::from_str(&text).unwrap();
    v["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["id"] == id)
        .unwrap_or_else(|| panic!("no case {id}"))
        .clone()
}

fn example(name: &str) -> String {
    std::fs::read_to_string(format!(
        "{}/examples/{name}.rule",
        env!("CARGO_MANIFEST_DIR")
    ))
    .unwrap()
}

fn run(rule: &str, claim: &str, values: &[(&str, &str)], base: Option<&str>) -> CheckReport {
    let problem = build_problem(rule).unwrap_or_else(|e| panic!("{rule}: {e}"));
    let mut request = CheckRequest::new(claim);
    request.values = values
        .iter()
        .map(|(n, v)| (n.to_string(), parse_q(v).unwrap()))
        .collect::<BTreeMap<String, Q>>();
    request.base = base.map(|b| parse_q(b).unwrap());
    match check_claim(&problem, &request) {
        Ok(r) => r,
        Err(CheckError::Claim(d)) | Err(CheckError::Rule(d)) => panic!("{claim}: {d}"),
    }
}

fn proved(rule: &str, claim: &str) {
    let r = run(rule, claim, &[], None);
    assert_eq!(
        r.verdict,
        Verdict::Proved,
        "{claim}\n{}",
        render::check_text(&r)
    );
}

fn kind_of(r: &CheckReport) -> Kind {
    assert_eq!(r.verdict, Verdict::Refuted, "{}", render::check_text(r));
    r.diagnosis.as_ref().unwrap().kind
}

fn exact_text(q: &Option<telescope::check::Quantity>) -> String {
    let q = q.as_ref().expect("a quantity");
    match (&q.exact, &q.near) {
        (Some(e), _) => {
            assert_eq!(e.half_pi, 0);
            e.rational.to_string()
        }
        (None, Some(f)) => f.to_string(),
        (None, None) => q.decimal.clone(),
    }
}

// --- the "done when" -------------------------------------------------------------

/// Yule–Simon with alpha = 5/2 (reference case `yule_simon`, source "scipy.stats.yulesimon
/// (SciPy 1.17.1), pmf alpha*B(k, alpha+1)"): a(k)/a(1) = pmf(k)/pmf(1) = (alpha+1)·B(k, alpha+1)
/// because pmf(1) = alpha·B(1, alpha+1) = alpha/(alpha+1) (DLMF 5.12.1); for alpha = 5/2 the
/// constant is 7/2.
const YULE: &str = "n(k)/n(k-1) = (k-1)/(k+5/2) for k >= 2";

#[test]
fn the_beta_form_claim_is_proved() {
    let r = run(YULE, "n(1) * (7/2) * Beta(k, 7/2)", &[], None);
    assert_eq!(r.verdict, Verdict::Proved, "{}", render::check_text(&r));
    let e = r.exact.as_ref().unwrap();
    assert!(e.ratios_agree && e.base_agrees);
}

#[test]
fn without_its_constant_the_claim_is_refuted_naming_seven_halves() {
    let r = run(YULE, "n(1) * Beta(k, 7/2)", &[], None);
    assert_eq!(kind_of(&r), Kind::ConstantFactor);
    let d = r.diagnosis.as_ref().unwrap();
    assert_eq!(exact_text(&d.missing), "7/2");
    assert_eq!(exact_text(&d.factor), "2/7");
    assert!(render::check_text(&r).contains("misses the factor 7/2"));
}

#[test]
fn shifted_by_one_the_claim_is_refuted_as_an_index_shift() {
    let r = run(YULE, "n(1) * (7/2) * Beta(k+1, 7/2)", &[], None);
    assert_eq!(kind_of(&r), Kind::IndexShift);
    let d = r.diagnosis.as_ref().unwrap();
    assert_eq!(d.shift, Some(1));
    // claim(k) = truth(k+1) exactly: no constant factor on top of the shift.
    assert!(d.factor.is_none());
    let r = run(YULE, "n(1) * (7/2) * Beta(k+2, 7/2)", &[], None);
    assert_eq!(r.diagnosis.as_ref().unwrap().shift, Some(2));
}

#[test]
fn a_claim_with_exp_of_a_nonlinear_expression_gets_a_numeric_verdict() {
    // exp(ln Γ(k) − ln Γ(k + 7/2)) = Γ(k)/Γ(k + 7/2), written so that it is not a
    // hypergeometric term syntactically; Γ(9/2)·Γ(k)/Γ(k+7/2) = (7/2)·B(k, 7/2) (DLMF 5.12.1).
    let claim = "n(1) * Gamma(9/2) * exp(log(Gamma(k)) - log(Gamma(k + 7/2)))";
    let r = run(YULE, claim, &[], None);
    assert_eq!(r.verdict, Verdict::HoldsNumerically);
    assert!(r.exact.is_none());
    let why = r.numeric_only.as_ref().unwrap();
    assert!(
        why.reason.contains("not a rational function"),
        "{}",
        why.reason
    );
    let text = render::check_text(&r);
    assert!(text.contains("HOLDS NUMERICALLY (not proved)"), "{text}");
    assert!(text.contains("numeric only"), "{text}");
    // k² in an exponent: refuted numerically, and the far growth is not mistaken for r^k k^δ.
    let r = run(
        YULE,
        "n(1) * (7/2) * Beta(k, 7/2) * exp(k^2/10^9)",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::PartsAt);
    assert!(r.numeric_only.is_some());
}

// --- equal forms are all proved ------------------------------------------------------------

#[test]
fn beta_gamma_factorial_and_rising_forms_of_yule_simon_are_all_proved() {
    // Γ(9/2)Γ(k)/Γ(k+7/2) = (7/2)B(k, 7/2) (DLMF 5.12.1); (k−1)! = Γ(k) (DLMF 5.4.1);
    // (9/2)_{k−1} = Γ(k+7/2)/Γ(9/2) (DLMF 5.2.5)
    for claim in [
        "n(1) * (7/2) * Beta(k, 7/2)",
        "n(1) * Gamma(9/2) * Gamma(k) / Gamma(k + 7/2)",
        "n(1) * (k-1)! * Gamma(9/2) / Gamma(k + 7/2)",
        "n(1) * factorial(k-1) / rising(9/2, k-1)",
        "n(1) * Beta(k, 7/2) / Beta(1, 7/2)",
        "n(1) * 105 sqrt(pi) / 16 * Gamma(k) / Gamma(k + 7/2)",
    ] {
        proved(YULE, claim);
    }
}

#[test]
fn symbolic_yule_simon_is_proved_for_every_alpha() {
    // rule_symbolic of `yule_simon` (scipy.stats.yulesimon): a(k)/a(1) = (alpha+1)B(k, alpha+1)
    let case = reference("yule_simon");
    let rule = case["rule_symbolic"].as_str().unwrap();
    let r = run(rule, "a(1) * (alpha + 1) * Beta(k, alpha + 1)", &[], None);
    assert_eq!(r.verdict, Verdict::Proved);
    assert!(matches!(
        r.exact.as_ref().unwrap().base_check,
        telescope::check::BaseCheck::Exact(_)
    ));
    // The pmf itself, alpha·B(k, alpha+1), misses the factor (alpha+1)/alpha, exactly.
    let r = run(rule, "a(1) * alpha * Beta(k, alpha + 1)", &[], None);
    assert_eq!(kind_of(&r), Kind::ConstantFactor);
    assert_eq!(
        exact_text(&r.diagnosis.as_ref().unwrap().missing),
        "(alpha + 1)/alpha"
    );
}

#[test]
fn binomial_forms_are_proved() {
    // `binomial`: source "scipy.stats.binom (SciPy 1.17.1), pmf C(n,k)*p^k*(1-p)^(n-k)";
    // a(k)/a(0) = C(n,k)(p/(1−p))^k (DLMF 26.3.1 for C(n,k) = n!/(k!(n−k)!))
    let case = reference("binomial");
    let rule = case["rule"].as_str().unwrap();
    for claim in [
        "a(0) * binomial(12, k) * (3/7)^k",
        "a(0) * 12! / (k! * (12-k)!) * (3/7)^k",
        "a(0) * Gamma(13) / (Gamma(k+1) * Gamma(13-k)) * (3/10)^k * (7/10)^(12-k) / (7/10)^12",
    ] {
        proved(rule, claim);
    }
    let symbolic = format!(
        "param n integer >= 1\nparam p in (0, 1)\n{}",
        case["rule_symbolic"].as_str().unwrap()
    );
    for claim in [
        "a(0) binomial(n, k) p^k (1-p)^(n-k) / (1-p)^n",
        "a(0) * binomial(n, k) * (p/(1-p))^k",
        "a(0) * n! / (k! * (n-k)!) * p^k * (1-p)^(-k)",
    ] {
        proved(&symbolic, claim);
    }
}

#[test]
fn negative_binomial_poisson_logarithmic_and_geometric_claims_are_proved() {
    // `negative_binomial` (scipy.stats.nbinom: Gamma(k+n)/(k!Gamma(n)) p^n (1-p)^k),
    // `poisson` (scipy.stats.poisson: exp(-lambda) lambda^k/k!), `logarithmic`
    // (scipy.stats.logser: -p^k/(k log(1-p))), `geometric` (scipy.stats.geom: (1-p)^(k-1) p):
    // each divided by its pmf at the base index.
    let cases = [
        (
            "negative_binomial",
            "a(0) * Gamma(k + n) / (k! * Gamma(n)) * (1-p)^k",
        ),
        (
            "negative_binomial",
            "a(0) * binomial(k + n - 1, k) * (1-p)^k",
        ),
        ("negative_binomial", "a(0) * rising(n, k) / k! * (1-p)^k"),
        ("poisson", "a(0) * lambda^k / k!"),
        ("poisson", "a(0) * lambda^k / Gamma(k + 1)"),
        ("logarithmic", "a(1) * p^(k-1) / k"),
        ("geometric", "a(1) * (1-p)^(k-1)"),
    ];
    for (id, claim) in cases {
        let case = reference(id);
        proved(case["rule_symbolic"].as_str().unwrap(), claim);
        // The same claim with the case's published values in place of the parameters.
        let params = case["params"].as_object().unwrap();
        let values: Vec<(&str, &str)> = params
            .iter()
            .map(|(k, v)| (k.as_str(), v.as_str().unwrap()))
            .collect();
        let r = run(
            case["rule_symbolic"].as_str().unwrap(),
            claim,
            &values,
            None,
        );
        assert_eq!(r.verdict, Verdict::Proved, "{id}: {claim}");
    }
}

// --- each kind of error, planted -----------------------------------------------------------

#[test]
fn the_normalised_pmf_is_diagnosed_as_a_wrong_base_value() {
    // scipy.stats.poisson pmf exp(−λ)λ^k/k! has pmf(0) = exp(−λ), not the base value 1.
    let case = reference("poisson");
    let rule = case["rule"].as_str().unwrap();
    let r = run(rule, "exp(-7/2) * (7/2)^k / k!", &[], None);
    assert_eq!(kind_of(&r), Kind::WrongBaseValue);
    let d = r.diagnosis.as_ref().unwrap();
    // exp(−7/2) (mpmath 1.3.0, mp.dps = 60: exp(-3.5) = 0.0301973834223185007...)
    assert_eq!(d.claim_at_base.as_deref(), Some("0.0301973834223"));
    assert_eq!(d.base_value, Some(Q::from_integer(1.into())));
    // A claim normalised to a(0) = 1 checked against --base 3 misses the factor 3.
    let r = run(rule, "(7/2)^k / k!", &[], Some("3"));
    assert_eq!(kind_of(&r), Kind::WrongBaseValue);
    let d = r.diagnosis.as_ref().unwrap();
    assert_eq!(exact_text(&d.missing), "3");
    // A claim that is not proportional to the base term at all.
    let r = run(YULE, "n(1)^2 * (7/2) * Beta(k, 7/2)", &[], None);
    assert_eq!(kind_of(&r), Kind::WrongBaseValue);
    assert_eq!(r.diagnosis.as_ref().unwrap().base_power, Some(2));
}

#[test]
fn index_shifts_both_ways_are_found() {
    // Poisson (scipy.stats.poisson): λ^(k−1)/(k−1)! is the truth at k − 1.
    let rule = reference("poisson")["rule_symbolic"]
        .as_str()
        .unwrap()
        .to_string();
    let r = run(&rule, "a(0) * lambda^(k-1) / (k-1)!", &[], None);
    assert_eq!(kind_of(&r), Kind::IndexShift);
    assert_eq!(r.diagnosis.as_ref().unwrap().shift, Some(-1));
    // Binomial (scipy.stats.binom) with C(n, k+1): shifted by one and off by a constant.
    let case = reference("binomial");
    let r = run(
        case["rule"].as_str().unwrap(),
        "a(0) * binomial(12, k+1) * (3/7)^k",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::IndexShift);
    let d = r.diagnosis.as_ref().unwrap();
    assert_eq!(d.shift, Some(1));
    // truth(k+1) = C(12,k+1)(3/7)^(k+1), so claim(k)/truth(k+1) = 7/3 (common practice algebra)
    assert_eq!(exact_text(&d.factor), "7/3");
}

#[test]
fn a_wrong_power_of_k_is_estimated() {
    // Yule–Simon with alpha + 1 replaced by alpha (a classic slip): (5/2)·B(k, 5/2) decays
    // like k^(−5/2) instead of k^(−7/2) (tail power −(alpha+1), reference case `yule_simon`).
    let r = run(YULE, "n(1) * (5/2) * Beta(k, 5/2)", &[], None);
    assert_eq!(kind_of(&r), Kind::WrongPowerOfK);
    assert_eq!(
        exact_text(&r.diagnosis.as_ref().unwrap().exponent_error),
        "1"
    );
    // The same slip hidden from the exact route: the numeric estimate from k = 10^5, 10^6.
    let r = run(
        YULE,
        "n(1) * Gamma(7/2) * exp(log(Gamma(k)) - log(Gamma(k + 5/2)))",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::WrongPowerOfK);
    let e = r
        .diagnosis
        .as_ref()
        .unwrap()
        .exponent_error
        .clone()
        .unwrap();
    assert!(e.exact.is_none());
    assert_eq!(e.near, Some(Q::from_integer(1.into())));
}

#[test]
fn a_wrong_geometric_rate_is_named() {
    // Geometric (scipy.stats.geom): p^(k−1) in place of (1−p)^(k−1): rate off by p/(1−p).
    let rule = reference("geometric")["rule_symbolic"]
        .as_str()
        .unwrap()
        .to_string();
    let r = run(&rule, "a(1) * p^(k-1)", &[], None);
    assert_eq!(kind_of(&r), Kind::WrongGeometricRate);
    assert_eq!(
        exact_text(&r.diagnosis.as_ref().unwrap().rate_error),
        "-p/(p - 1)"
    );
    // Poisson with 2λ: rate off by 2, found numerically when the claim hides it in exp.
    let rule = reference("poisson")["rule"].as_str().unwrap().to_string();
    let r = run(&rule, "a(0) * exp(k * log(7)) / k!", &[], None);
    assert_eq!(kind_of(&r), Kind::WrongGeometricRate);
    let q = r.diagnosis.as_ref().unwrap().rate_error.clone().unwrap();
    assert_eq!(q.near, Some(Q::from_integer(2.into())));
}

#[test]
fn otherwise_the_first_parting_point_is_shown() {
    // (1 + 1/k²) changes only the O(1/k²) terms: no constant, shift, power or rate explains it.
    let r = run(YULE, "n(1) * (7/2) * Beta(k, 7/2) * (1 + 1/k^2)", &[], None);
    assert_eq!(kind_of(&r), Kind::PartsAt);
    let p = r.diagnosis.as_ref().unwrap().parting.clone().unwrap();
    assert_eq!(p.k, 1.into());
    // claim(1) = 2 while the truth is 1 (common practice arithmetic)
    assert!(p.claim.starts_with("2.0000"), "{}", p.claim);
    assert!(p.truth.starts_with("1.0000"), "{}", p.truth);
}

#[test]
fn a_claim_right_in_form_but_undefined_somewhere_is_refuted_where_it_fails() {
    // Γ(k−5)/Γ(k−5) cancels in the ratio and at the base, but it is 0/0 … at k = 1 … 5
    // (poles of Γ, DLMF 5.2.1): the values decide.
    let r = run(
        YULE,
        "n(1) * (7/2) * Beta(k, 7/2) * Gamma(k-5)/Gamma(k-5)",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::PartsAt);
    let p = r.diagnosis.as_ref().unwrap().parting.clone().unwrap();
    assert_eq!(p.k, 1.into());
    assert!(p.claim.starts_with("undefined"), "{}", p.claim);
}

// --- the example models -------------------------------------------------------------------

#[test]
fn the_examples_claims_are_proved_and_their_slips_found() {
    // Each closed form follows from the telescoped product (DLMF 5.2.5) of the example's rule.
    let citation = example("citation_growth");
    proved(
        &citation,
        "n(1) * Gamma(k) * Gamma(2 + 1/(1-rho)) / Gamma(k + 1 + 1/(1-rho))",
    );
    proved(&citation, "n(1) * (1 + 1/(1-rho)) * Beta(k, 1 + 1/(1-rho))");
    let r = run(
        &citation,
        "n(1) * (1 + 1/(1-rho)) * Beta(k, 2 + 1/(1-rho))",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::WrongPowerOfK);
    assert_eq!(
        exact_text(&r.diagnosis.as_ref().unwrap().exponent_error),
        "-1"
    );

    let lockers = example("gym_lockers");
    proved(&lockers, "a(0) * binomial(N, k) * (p/(1-p))^k");
    let r = run(
        &lockers,
        "a(0) * binomial(N, k) * (p/(1-p))^(k+1)",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::ConstantFactor);
    assert_eq!(
        exact_text(&r.diagnosis.as_ref().unwrap().missing),
        "(-p + 1)/p"
    );

    let desk = example("help_desk_queue");
    proved(&desk, "w(0) * (lambda/mu)^k * 2 / (k+2)!");
    // (k+1)! for (k+2)!: the truth one step earlier, times λ/μ.
    let r = run(&desk, "w(0) * (lambda/mu)^k * 2 / (k+1)!", &[], None);
    assert_eq!(kind_of(&r), Kind::IndexShift);
    let d = r.diagnosis.as_ref().unwrap();
    assert_eq!(d.shift, Some(-1));
    assert_eq!(exact_text(&d.factor), "lambda/mu");
    // An extra factor k + 1: the power of k is one too high.
    let r = run(
        &desk,
        "w(0) * (lambda/mu)^k * 2 * (k+1) / (k+2)!",
        &[],
        None,
    );
    assert_eq!(kind_of(&r), Kind::WrongPowerOfK);
    assert_eq!(
        exact_text(&r.diagnosis.as_ref().unwrap().exponent_error),
        "1"
    );

    let seeds = example("seed_clusters");
    proved(&seeds, "s(0) * q^k * rising(r, k) / k!");
    proved(&seeds, "s(0) * q^k * binomial(k + r - 1, k)");
    let r = run(&seeds, "s(0) * q^(k-1) * binomial(k + r - 1, k)", &[], None);
    assert_eq!(kind_of(&r), Kind::ConstantFactor);
    assert_eq!(exact_text(&r.diagnosis.as_ref().unwrap().missing), "q");
}

// --- through the binary ---------------------------------------------------------------------

#[test]
fn exit_codes_are_zero_one_and_two() {
    let ok = telescope(&["check", YULE, "--claim", "n(1) * (7/2) * Beta(k, 7/2)"]);
    assert_eq!(ok.status.code(), Some(0));
    let wrong = telescope(&["check", YULE, "--claim", "n(1) * Beta(k, 7/2)"]);
    assert_eq!(wrong.status.code(), Some(1));
    let numeric = telescope(&[
        "check",
        YULE,
        "--claim",
        "n(1) * Gamma(9/2) * exp(log(Gamma(k)) - log(Gamma(k + 7/2)))",
    ]);
    assert_eq!(numeric.status.code(), Some(0));
    let out = String::from_utf8_lossy(&numeric.stdout);
    assert!(out.contains("numeric only"), "{out}");
}

#[test]
fn bad_claims_exit_two_with_the_column() {
    for (claim, column, words) in [
        ("n(1) * Gama(k)", 8, "unknown function `Gama`"),
        ("n(1) * Beta(k)", 8, "`Beta` takes 2 arguments"),
        ("n(1) * Gamma(k, 2)", 8, "`Gamma` takes 1 argument"),
        ("n(1) * (k + ", 11, "missing an operand after `+`"),
        ("n(2) * k", 1, "base term n(1)"),
        ("x * k", 1, "unknown name `x`"),
        ("k / (2 - 2)", 5, "divides by zero"),
    ] {
        let o = telescope(&["check", YULE, "--claim", claim]);
        assert_eq!(o.status.code(), Some(2), "{claim}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains(words), "{claim}: {err}");
        assert!(
            err.contains(&format!("--claim, line 1, column {column}")),
            "{claim}: {err}"
        );
    }
    let o = telescope(&["check", YULE, "--claim", "k", "--digits", "3"]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn json_output_is_snapshotted() {
    for (name, args) in [
        (
            "proved_beta",
            vec!["--claim", "n(1) * (7/2) * Beta(k, 7/2)"],
        ),
        ("constant_factor", vec!["--claim", "n(1) * Beta(k, 7/2)"]),
        (
            "index_shift",
            vec!["--claim", "n(1) * (7/2) * Beta(k+1, 7/2)"],
        ),
        (
            "numeric_only",
            vec![
                "--claim",
                "n(1) * Gamma(9/2) * exp(log(Gamma(k)) - log(Gamma(k + 7/2)))",
                "--digits",
                "20",
            ],
        ),
    ] {
        let mut all = vec!["check", YULE, "--format", "json"];
        all.extend(args);
        let o = telescope(&all);
        let v: Value = serde_json::from_slice(&o.stdout).unwrap();
        insta::assert_json_snapshot!(format!("check_{name}"), v);
    }
    let o = telescope(&[
        "check",
        "examples/gym_lockers.rule",
        "--claim",
        "a(0) * binomial(N, k) * (p/(1-p))^(k+1)",
        "--param",
        "N=12",
        "--format",
        "json",
    ]);
    assert_eq!(o.status.code(), Some(1));
    let v: Value = serde_json::from_slice(&o.stdout).unwrap();
    insta::assert_json_snapshot!("check_lockers_constant_factor", v);
}

#[test]
fn the_text_report_shows_how_the_claim_was_read() {
    // Juxtaposition binds tighter than `/` (grammar/telescope.ebnf): the (1−p)^k lands in the
    // denominator, which the report makes visible, and the rate comes out as 1/(1−p)².
    let rule = reference("negative_binomial")["rule_symbolic"]
        .as_str()
        .unwrap()
        .to_string();
    let r = run(&rule, "a(0) Gamma(k+n)/(k! Gamma(n)) (1-p)^k", &[], None);
    let text = render::check_text(&r);
    assert!(
        text.contains("read as      a(k) = a(0)·Γ(k + n)/(k!·Γ(n)·(1 − p)^k)"),
        "{text}"
    );
    assert_eq!(kind_of(&r), Kind::WrongGeometricRate);
    insta::assert_snapshot!("check_text_read_as", text);
    let r = run(YULE, "n(1) * Beta(k, 7/2)", &[], None);
    insta::assert_snapshot!("check_text_constant_factor", render::check_text(&r));
}
