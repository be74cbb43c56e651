//! The analyses (tail law, total, mean, variance, `--normalize`) against published values:
//! `tests/reference/distributions.json` (each case names its source, e.g. "scipy.stats.yulesimon
//! (SciPy 1.17.1)"; values by mpmath at 60 digits, 40 printed) and independent mpmath values
//! written here with their provenance.

mod common;
use common::{params_of, reference_cases as cases};

use std::collections::BTreeMap;
use std::process::Command;

use num_bigint::BigInt;
use num_traits::{Signed, Zero};
use serde_json::Value;

use telescope::algebra::{parse_q, Q};
use telescope::analysis::{
    analyse, moment_sums, numeric_corrections, AnalysisRequest, Finiteness, NumericRule,
    RisingForm, SumMethod,
};
use telescope::model::build_problem;
use telescope::solve::{solve, SupportEnd};
use telescope::table::{build_normalized_table, TableRequest};

fn q(s: &str) -> Q {
    parse_q(s).unwrap_or_else(|| panic!("not a number: {s}"))
}

/// |got/expected − 1| < 10^(−digits) (or |got| < 10^(−digits) when expected is 0).
fn agree(got: &str, expected: &str, digits: i32) -> bool {
    let (g, e) = (q(got), q(expected));
    let tolerance = Q::new(BigInt::from(1), BigInt::from(10).pow(digits as u32));
    if e.is_zero() {
        return g.abs() < tolerance;
    }
    ((&g - &e) / &e).abs() < tolerance
}

fn analysis_of(
    rule: &str,
    values: &BTreeMap<String, Q>,
    digits: u32,
) -> telescope::analysis::Analysis {
    let problem = build_problem(rule).unwrap();
    let solution = solve(&problem, values).unwrap();
    let request = AnalysisRequest {
        terms: 2,
        digits,
        normalize: false,
    };
    analyse(&problem, &solution, &request).unwrap()
}

/// Total, mean, variance and tail prefactor to 30 digits, for one rule of a case.
fn check_case(case: &Value, rule: &str, values: &BTreeMap<String, Q>) {
    let id = case["id"].as_str().unwrap();
    let source = case["source"].as_str().unwrap();
    let a = analysis_of(rule, values, 40);
    let total = a
        .normalization
        .value
        .as_ref()
        .unwrap_or_else(|| panic!("{id}: no total"));
    // Source: the case's `source` field (SciPy distribution; mpmath values at 60 digits).
    let expected = case["total_unnormalized"].as_str().unwrap();
    assert!(
        agree(&total.value, expected, 30),
        "{id} ({source}) total {} vs {expected}",
        total.value
    );
    let mean = a
        .mean
        .value
        .as_ref()
        .unwrap_or_else(|| panic!("{id}: no mean"));
    let expected = case["mean"].as_str().unwrap();
    assert!(
        agree(&mean.value, expected, 30),
        "{id} ({source}) mean {} vs {expected}",
        mean.value
    );
    let variance = a
        .variance
        .value
        .as_ref()
        .unwrap_or_else(|| panic!("{id}: no variance"));
    let expected = case["variance"].as_str().unwrap();
    assert!(
        agree(&variance.value, expected, 30),
        "{id} ({source}) variance {} vs {expected}",
        variance.value
    );
    // Where a closed form and the numeric sum both exist they must agree beyond 30 digits.
    for n in [total, mean, variance] {
        if let Some(check) = &n.check {
            assert!(
                q(check) < q("1e-35"),
                "{id}: closed form vs numeric sum {check}"
            );
        }
    }
    match case["tail"]["prefactor_C"].as_str() {
        Some(c) => {
            let numbers = a.tail.as_ref().unwrap().numbers.as_ref().unwrap();
            assert!(
                agree(&numbers.prefactor, c, 30),
                "{id} ({source}) C {} vs {c}",
                numbers.prefactor
            );
            assert_eq!(
                q(&numbers.rate),
                q(case["tail"]["geometric_rate"].as_str().unwrap()),
                "{id}"
            );
            assert_eq!(
                q(&numbers.power),
                q(case["tail"]["power"].as_str().unwrap()),
                "{id}"
            );
        }
        None => {
            if case["support_last"].is_null() {
                // Poisson: no r^k k^θ law; the Stirling form carries the factorial growth.
                assert_eq!(a.tail.as_ref().unwrap().law.factorial_power, -1, "{id}");
            } else {
                assert!(a.tail.is_none(), "{id}: finite support has no tail law");
            }
        }
    }
}

#[test]
fn every_reference_case_total_mean_variance_and_prefactor_from_the_numeric_rule() {
    let cases = cases();
    assert!(cases.len() >= 6);
    for case in &cases {
        check_case(case, case["rule"].as_str().unwrap(), &BTreeMap::new());
    }
}

#[test]
fn every_reference_case_from_the_symbolic_rule_with_param_values() {
    for case in &cases() {
        check_case(
            case,
            case["rule_symbolic"].as_str().unwrap(),
            &params_of(case),
        );
    }
}

#[test]
fn numeric_summation_alone_reproduces_every_reference_case() {
    // Independent of the closed forms: the sums Σ k^j a(k) themselves.
    for case in &cases() {
        let id = case["id"].as_str().unwrap();
        let problem = build_problem(case["rule"].as_str().unwrap()).unwrap();
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        let rule = NumericRule {
            form: RisingForm::from_ratio(&problem.ratio),
            base_index: solution.base_index.clone(),
            last: match &solution.support.last {
                SupportEnd::At(n) => Some(n.clone()),
                _ => None,
            },
        };
        let sums = moment_sums(&rule, 40).unwrap();
        let [s0, s1, s2] = sums.sums.clone().map(|s| s.unwrap());
        let digits = |x: &rug::Float| telescope::numeric::float_to_decimal(x, 40);
        let mean = rug::Float::with_val(300, &s1.value / &s0.value);
        let second = rug::Float::with_val(300, &s2.value / &s0.value);
        let variance =
            rug::Float::with_val(300, &second - rug::Float::with_val(300, mean.square_ref()));
        // Source: the case's `source` (SciPy; mpmath 60 digits).
        assert!(
            agree(
                &digits(&s0.value),
                case["total_unnormalized"].as_str().unwrap(),
                30
            ),
            "{id}"
        );
        assert!(
            agree(&digits(&mean), case["mean"].as_str().unwrap(), 30),
            "{id}"
        );
        assert!(
            agree(&digits(&variance), case["variance"].as_str().unwrap(), 30),
            "{id}"
        );
        if id == "yule_simon" {
            assert!(
                matches!(sums.method, SumMethod::EulerMaclaurin { .. }),
                "{:?}",
                sums.method
            );
        }
    }
}

#[test]
fn tail_corrections_reproduce_the_published_tail_checks() {
    // tail_check.ratio = a(k)/(C r^k k^θ) at k = 10^8, by mpmath at 60 digits; our
    // 1 + c₁/k + … + c₅/k⁵ (Bernoulli polynomials, DLMF 5.11.8) must give it to 30 digits.
    for case in &cases() {
        let id = case["id"].as_str().unwrap();
        let Some(ratio) = case["tail_check"]["ratio"].as_str() else {
            continue;
        };
        let problem = build_problem(case["rule"].as_str().unwrap()).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        let c = numeric_corrections(&form, &BTreeMap::new(), 5).unwrap();
        let k = Q::from_integer(BigInt::from(100_000_000u64));
        let mut sum = Q::zero();
        let mut power = Q::from_integer(BigInt::from(1));
        for cn in &c {
            sum += cn * &power;
            power /= &k;
        }
        let got =
            telescope::numeric::rational_to_decimal(&telescope::numeric::to_rug_rational(&sum), 40);
        assert!(agree(&got, ratio, 30), "{id}: {got} vs {ratio}");
    }
}

#[test]
fn yule_simon_five_halves_exact_at_fifty_digits() {
    // scipy.stats.yulesimon, alpha = 5/2: total 1/pmf(1) = (α+1)/α = 7/5, mean α/(α−1) = 5/3,
    // variance α²/((α−1)²(α−2)) = 50/9 (SciPy docs); C = Γ(α+2) = Γ(9/2).
    let values: BTreeMap<String, Q> = [("alpha".to_string(), q("5/2"))].into();
    let a = analysis_of("a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2", &values, 50);
    let total = a.normalization.value.unwrap();
    assert_eq!(total.exact.as_deref(), Some("7/5"));
    assert_eq!(
        total.value,
        "1.4000000000000000000000000000000000000000000000000"
    );
    let mean = a.mean.value.unwrap();
    assert_eq!(mean.exact.as_deref(), Some("5/3"));
    assert_eq!(
        mean.value,
        "1.6666666666666666666666666666666666666666666666667"
    );
    let variance = a.variance.value.unwrap();
    assert_eq!(variance.exact.as_deref(), Some("50/9"));
    assert_eq!(
        variance.value,
        "5.5555555555555555555555555555555555555555555555556"
    );
    // The Euler–Maclaurin sums agree with the exact values to every one of the 50 digits.
    for check in [total.check, mean.check, variance.check] {
        assert!(q(&check.unwrap()) < q("1e-50"));
    }
    let tail = a.tail.unwrap();
    assert_eq!(
        tail.law.tail_exponent().unwrap().eval(&values),
        Ok(q("7/2"))
    );
    // Γ(9/2) = 11.631728396567448929144224109426265262108918305803 (mpmath 1.3.0,
    // mp.dps = 60: gamma(mpf(9)/2)); reference file prefactor_C 11.63172839656744892914…
    let numbers = tail.numbers.unwrap();
    assert_eq!(
        numbers.prefactor,
        "11.631728396567448929144224109426265262108918305803"
    );
    assert_eq!(numbers.power, "-7/2");
    assert_eq!(numbers.tail_exponent.as_deref(), Some("7/2"));
    // The law with two corrections against the closed form at k = 10^6 + 1: the difference
    // is the size of the first omitted term.
    let check = numbers.check.unwrap();
    let (rel, next) = (q(&check.rel_diff), q(&check.next_term));
    assert!(
        rel < &next * Q::from_integer(BigInt::from(2))
            && rel > &next / Q::from_integer(BigInt::from(2))
    );
}

#[test]
fn power_law_with_no_closed_form_is_summed_to_fifty_digits() {
    // Σ_{k≥1} a(k) for a(k)/a(k−1) = (k−1)(k+1/2)/((k+1/3)(k+3/4)) is 3F2(1, 1, 5/2; 7/3, 11/4; 1)
    // = 2.73738603726739975660641036067185183310422387885765969661871
    // (mpmath 1.3.0, mp.dps = 60: hyp3f2(1, 5/2, 1, 7/3, 11/4, 1)); tail exponent 19/12.
    let a = analysis_of(
        "a(k)/a(k-1) = (k-1)/(k+1/3) * (k+1/2)/(k+3/4) for k >= 2",
        &BTreeMap::new(),
        50,
    );
    assert!(a.normalization.closed_form.is_none());
    let total = a.normalization.value.unwrap();
    assert_eq!(
        total.value,
        "2.7373860372673997566064103606718518331042238788577"
    );
    assert!(q(&total.error_bound) < q("1e-51"), "{}", total.error_bound);
    assert!(total.method.contains("Euler–Maclaurin"), "{}", total.method);
    // C = 7Γ(1/3)Γ(3/4)/(9√π) = 1.44054602703097510624669674202630304955775701742818
    // (mpmath 1.3.0, mp.dps = 60)
    let numbers = a.tail.unwrap().numbers.unwrap();
    assert_eq!(
        numbers.prefactor,
        "1.4405460270309751062466967420263030495577570174282"
    );
    // γ = 19/12 < 2: the mean diverges, reported with the failed condition.
    assert!(matches!(a.mean.finiteness, Finiteness::Infinite(_)));
    assert!(a.mean.requirements.iter().any(|r| r.fails()));
    assert!(matches!(a.variance.finiteness, Finiteness::Infinite(_)));
}

#[test]
fn divergent_totals_and_moments_name_the_failed_condition() {
    let rule = "a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2";
    // α = 3/2: mean finite (α > 1), variance infinite (needs α > 2) (SciPy yulesimon docs)
    let values: BTreeMap<String, Q> = [("alpha".to_string(), q("3/2"))].into();
    let a = analysis_of(rule, &values, 20);
    assert_eq!(a.mean.value.unwrap().exact.as_deref(), Some("3"));
    assert!(matches!(a.variance.finiteness, Finiteness::Infinite(_)));
    assert!(a.variance.value.is_none());
    // α = 1/2: total finite 3, mean infinite
    let values: BTreeMap<String, Q> = [("alpha".to_string(), q("1/2"))].into();
    let a = analysis_of(rule, &values, 20);
    assert_eq!(a.normalization.value.unwrap().exact.as_deref(), Some("3"));
    assert!(matches!(a.mean.finiteness, Finiteness::Infinite(_)));
    // a(k) ~ k: the total diverges (θ = 1 ≥ −1); R(k) = 2: geometric growth; R(k) = k: factorial
    for rule in [
        "a(k)/a(k-1) = (k+1)/k for k >= 1",
        "a(k)/a(k-1) = 2 for k >= 1",
        "a(k)/a(k-1) = k for k >= 1",
    ] {
        let a = analysis_of(rule, &BTreeMap::new(), 20);
        assert!(
            matches!(a.normalization.finiteness, Finiteness::Infinite(_)),
            "{rule}"
        );
        assert!(a.normalization.value.is_none(), "{rule}");
        assert!(
            a.normalization.requirements.iter().any(|r| r.fails()),
            "{rule}"
        );
    }
}

/// The reasons of a failed condition are typeset, never the algebra's ASCII. The citation
/// rule's law falls like k^(−1 − 1/(1 − ρ)) (Simon 1955, Biometrika 42, tail exponent of the
/// Yule process, from memory), so the variance needs 1/(1 − ρ) > 2: at ρ = 1/2 it is infinite.
#[test]
fn failed_condition_reasons_are_typeset() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/citation_growth.rule"
    ))
    .unwrap();
    let problem = build_problem(&text).unwrap();
    let values: BTreeMap<String, Q> = [("rho".to_string(), q("1/2"))].into();
    let solution = solve(&problem, &values).unwrap();
    let a = analyse(&problem, &solution, &AnalysisRequest::default()).unwrap();
    assert!(matches!(a.variance.finiteness, Finiteness::Infinite(_)));
    let rendered = telescope::render::analysis_text(&a);
    assert!(
        rendered.contains("fails: (1 − 2ρ)/(ρ − 1) = 0 with ρ = 1/2"),
        "{rendered}"
    );
    assert!(
        !rendered.contains("rho") && !rendered.contains('*'),
        "{rendered}"
    );
    insta::assert_snapshot!("citation_rho_half_analysis_text", rendered);
    let latex = telescope::render::analysis_latex(&a);
    assert!(latex.contains("$\\rho = \\frac{1}{2}$"), "{latex}");
    assert!(
        !latex.contains("rho = 1/2") && !latex.contains("*rho"),
        "{latex}"
    );
    insta::assert_snapshot!("citation_rho_half_analysis_latex", latex);
}

#[test]
fn normalized_tables_sum_to_one_within_the_stated_bound() {
    for case in &cases() {
        let id = case["id"].as_str().unwrap();
        let problem = build_problem(case["rule"].as_str().unwrap()).unwrap();
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        // Rows far enough out that what lies beyond is below 10^−35 (geometric or factorial
        // decay), or the whole finite support; Yule–Simon's power law adds its known survival
        // function instead.
        let last: i64 = match id {
            "binomial" => 12,
            "yule_simon" => 400,
            "poisson" => 120,
            "geometric" => 330,
            _ => 230,
        };
        let request = TableRequest {
            from: solution.base_index.clone(),
            to: BigInt::from(last),
            digits: 40,
            base_value: Q::from_integer(BigInt::from(1)),
            check_all: false,
        };
        let t = build_normalized_table(&problem, &solution, &request).unwrap();
        let mut sum = q(&t.rows_sum);
        if id == "yule_simon" {
            // P(X > K) = K·B(K, α+1) for Yule–Simon (scipy.stats.yulesimon sf; it telescopes:
            // S(k) − S(k+1) = α B(k, α+1) = pmf(k) with S(k) = Γ(k)Γ(α+1)/Γ(k+α))
            // = 400·B(400, 7/2), by mpmath 1.3.0 at mp.dps = 60: 400*beta(400, mpf(7)/2)
            sum += q("1.02727795005374099149409807356036787261273678022326e-6");
        }
        let bound = q(&t.total_error_bound) + q(&t.rows_rounding_bound) + q("1e-35");
        let off = (sum - Q::from_integer(BigInt::from(1))).abs();
        assert!(off <= bound, "{id}: |Σ − 1| = {off} > {bound}");
    }
}

fn telescope_json(args: &[&str]) -> Value {
    let o = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(args)
        .output()
        .expect("binary runs");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    serde_json::from_slice(&o.stdout).unwrap()
}

#[test]
fn solve_json_carries_tail_normalization_mean_variance() {
    let v = telescope_json(&[
        "solve",
        "a(k)/a(k-1) = (k+n-1)*(1-p)/k for k >= 1",
        "--format",
        "json",
    ]);
    // negative binomial: total p^(−n), mean n(1−p)/p, variance n(1−p)/p² (scipy.stats.nbinom)
    assert_eq!(v["normalization"]["closed_form"]["text"], "p^(−n)");
    assert_eq!(v["normalization"]["series"]["text"], "₁F₀(n; ; 1 − p)");
    assert_eq!(v["normalization"]["condition"][0]["text"], "|1 − p| < 1");
    assert_eq!(v["mean"]["closed_form"]["text"], "n·(1 − p)/p");
    assert_eq!(v["variance"]["closed_form"]["text"], "n·(1 − p)/p²");
    assert_eq!(v["tail"]["power"]["text"], "n − 1");
    assert!(v["tail"]["prefactor"]["latex"]
        .as_str()
        .unwrap()
        .contains("\\Gamma"));
    assert!(v["mean"]["value"].is_null());
    // With values and --normalize: numbers, and the base value that makes the total 1.
    let v = telescope_json(&[
        "solve",
        "a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2",
        "--param",
        "alpha=3/2",
        "--normalize",
        "--format",
        "json",
    ]);
    assert_eq!(v["normalization"]["exact"], "5/3");
    assert_eq!(v["normalization"]["base_value"]["exact"], "3/5");
    assert_eq!(v["mean"]["exact"], "3");
    assert!(v["variance"].is_null());
    assert_eq!(v["divergent"][0]["quantity"], "variance");
    assert_eq!(v["divergent"][0]["failed"][0]["text"], "α − 2 > 0");
    assert_eq!(v["tail"]["tail_exponent"]["text"], "α + 1");
}

/// Snapshots of the analysis sections for every model in `examples/` (symbolic) and one
/// numeric case: reviewed like code, a change here is a change users see.
#[test]
fn analysis_sections_of_every_example() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/examples");
    let mut files: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.path())
        .filter(|p| p.extension().map(|x| x == "rule").unwrap_or(false))
        .collect();
    files.sort();
    assert!(files.len() >= 3);
    for path in files {
        let name = path.file_stem().unwrap().to_string_lossy().into_owned();
        let text = std::fs::read_to_string(&path).unwrap();
        // Piecewise and finite models are analysed as a whole (tests/snapshots.rs, models.rs).
        if telescope::model::build_model(&text).unwrap().is_piecewise() {
            continue;
        }
        let problem = build_problem(&text).unwrap();
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        let a = analyse(&problem, &solution, &AnalysisRequest::default()).unwrap();
        insta::assert_snapshot!(
            format!("{name}_analysis_text"),
            telescope::render::analysis_text(&a)
        );
        insta::assert_snapshot!(
            format!("{name}_analysis_latex"),
            telescope::render::analysis_latex(&a)
        );
        insta::assert_json_snapshot!(
            format!("{name}_analysis_json"),
            telescope::render::analysis_json(&a)
        );
    }
    let values: BTreeMap<String, Q> = [("alpha".to_string(), q("5/2"))].into();
    let a = analysis_of("a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2", &values, 30);
    insta::assert_snapshot!(
        "yule_simon_5_2_analysis_text",
        telescope::render::analysis_text(&a)
    );
}

fn telescope_run(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(args)
        .output()
        .expect("binary runs")
}

#[test]
fn table_normalize_through_the_binary_and_its_refusals() {
    // Geometric p = 1/4 from k = 1: a(1) = p = 1/4 exactly (scipy.stats.geom pmf(1) = p).
    let o = telescope_run(&[
        "table",
        "a(k)/a(k-1) = 3/4 for k >= 2",
        "--k",
        "1..3",
        "--normalize",
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let v: Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(
        v["normalization"]["base_value"],
        "0.250000000000000000000000000000"
    );
    assert_eq!(v["normalization"]["total_error_bound"], "0");
    assert_eq!(v["rows"][0]["direct"], "0.250000000000000000000000000000");
    let text = telescope_run(&[
        "table",
        "a(k)/a(k-1) = 3/4 for k >= 2",
        "--k",
        "1..3",
        "--normalize",
    ]);
    assert!(String::from_utf8_lossy(&text.stdout).contains("# normalised: a(b) = 0.25"));
    // A divergent total cannot be normalised: a clear message, exit code 2, no panic.
    let o = telescope_run(&[
        "table",
        "a(k)/a(k-1) = (k+1)/k for k >= 1",
        "--k",
        "0..3",
        "--normalize",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("the total diverges"));
    // --normalize and --base exclude each other; absurd --digits / --terms are refused.
    let o = telescope_run(&[
        "table",
        "a(k)/a(k-1) = 1/2",
        "--k",
        "1..3",
        "--normalize",
        "--base",
        "2",
    ]);
    assert_eq!(o.status.code(), Some(2));
    for bad in [["--digits", "0"], ["--terms", "99"]] {
        let o = telescope_run(&["solve", "a(k)/a(k-1) = 1/2", bad[0], bad[1]]);
        assert_eq!(o.status.code(), Some(2), "{bad:?}");
    }
}

#[test]
fn solve_text_and_latex_carry_the_sections() {
    let o = telescope_run(&[
        "solve",
        "a(k)/a(k-1) = lambda/k for k >= 1",
        "--param",
        "lambda=7/2",
        "--normalize",
    ]);
    assert!(o.status.success());
    let out = String::from_utf8_lossy(&o.stdout);
    for section in ["tail law", "total ", "mean ", "variance "] {
        assert!(out.contains(section), "{section}: {out}");
    }
    // exp(−7/2) = 0.0301973834223185007397862923636 (reference file: Poisson pmf(0) at 40 digits)
    assert!(out.contains("normalised a(0) = exp(−λ)"), "{out}");
    assert!(
        out.contains("normalised a(0) = 0.0301973834223185007397862923636"),
        "{out}"
    );
    let o = telescope_run(&[
        "solve",
        "a(k)/a(k-1) = lambda/k for k >= 1",
        "--format",
        "latex",
    ]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.contains("\\sim") && out.contains("\\exp"), "{out}");
    assert_eq!(out.matches('{').count(), out.matches('}').count(), "{out}");
    assert!(
        out.is_ascii() || !out.contains('Σ'),
        "LaTeX must not need Unicode: {out}"
    );
}
