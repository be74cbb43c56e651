//! Regression tests for inputs that once panicked or ran for minutes (issue 13: the first
//! outside fuzz run, and the proptest and cargo-fuzz findings since). Each input must give an
//! answer or a clear refusal with exit code 2 — never a panic (exit 101) or a hang.

mod common;

use std::io::Write;
use std::process::{Command, Output, Stdio};

use telescope::analysis::{analyse, AnalysisRequest, Finiteness};
use telescope::model::build_problem;
use telescope::solve::solve;

/// Runs the binary with `input` on standard input.
fn with_stdin(args: &[&str], input: &str) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("binary runs");
    // A usage error exits before reading: a closed pipe is not the test's concern.
    let _ = child.stdin.take().unwrap().write_all(input.as_bytes());
    child.wait_with_output().unwrap()
}

fn text(bytes: &[u8]) -> String {
    String::from_utf8_lossy(bytes).into_owned()
}

/// Supports that end after one or two terms whose terms cancel: the total is 0 and the
/// moments, which divide by it, are undefined (they once divided by zero in rug).
#[test]
fn short_supports_with_a_zero_total_do_not_panic() {
    for rule in [
        "a(k)/a(k-1) = k-3",              // a(1) = 1, a(2) = -1, a(3) = 0
        "a(k)/a(k-1) = (k-1) for k >= 0", // a(-1) = 1, a(0) = -1, a(1) = 0
    ] {
        let out = with_stdin(&["solve", "-"], rule);
        assert_eq!(out.status.code(), Some(0), "{rule}: {}", text(&out.stderr));
        let stdout = text(&out.stdout);
        assert!(stdout.contains("value      0 exactly"), "{stdout}");
        assert!(stdout.contains("mean         undefined"), "{stdout}");
        let json = with_stdin(&["solve", "-", "--format", "json"], rule);
        assert_eq!(json.status.code(), Some(0));
        let v: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
        assert!(v["mean"]["finite"].is_null() && v["mean"]["value"].is_null());
        // No a(b) makes a zero total 1.
        let table = with_stdin(&["table", "-", "--normalize", "--k", "0..3"], rule);
        assert_eq!(table.status.code(), Some(2), "{}", text(&table.stderr));
        assert!(text(&table.stderr).contains("the total is 0"));
        let solve = with_stdin(&["solve", "-", "--normalize"], rule);
        assert_eq!(solve.status.code(), Some(0));
        assert!(text(&solve.stdout).contains("no a(b) makes it 1"));
    }
}

/// The library reports the same without the binary: a total of exactly 0 and undefined moments.
#[test]
fn the_analysis_marks_moments_of_a_zero_total_undefined() {
    let problem = build_problem("a(k)/a(k-1) = k-3").unwrap();
    let solution = solve(&problem, &Default::default()).unwrap();
    let analysis = analyse(&problem, &solution, &AnalysisRequest::default()).unwrap();
    assert_eq!(
        analysis.normalization.value.unwrap().exact.as_deref(),
        Some("0")
    );
    assert!(matches!(analysis.mean.finiteness, Finiteness::Undefined(_)));
    assert!(matches!(
        analysis.variance.finiteness,
        Finiteness::Undefined(_)
    ));
}

/// Supports of one or two terms whose totals do not vanish still get their moments, for every
/// command.
#[test]
fn short_supports_answer_every_command() {
    for rule in [
        "a(k)/a(k-1) = k-2",
        "a(k)/a(k-1) = (3-k)/(k+1)",
        "a(k)/a(k-1) = k for k >= 0",
        "a(k)/a(k-1) = -(k-3)",
        "a(k)/a(k-1) = (k-3)^2",
    ] {
        for args in [
            vec!["solve", "-"],
            vec!["solve", "-", "--normalize", "--terms", "4"],
            vec!["table", "-", "--k=-2..6", "--check-all"],
            vec!["check", "-", "--claim", "a(1) (-1)^k"],
        ] {
            let out = with_stdin(&args, rule);
            let code = out.status.code();
            assert!(
                matches!(code, Some(0..=2)),
                "{rule} {args:?}: {code:?} {}",
                text(&out.stderr)
            );
        }
    }
    // a(1) = 1, a(2) = (3-2)/3 = 1/3, a(3) = 0: the total is 4/3 and the mean (1 + 2/3)/(4/3) = 5/4.
    let out = with_stdin(
        &["solve", "-", "--format", "json"],
        "a(k)/a(k-1) = (3-k)/(k+1)",
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["normalization"]["exact"], "4/3");
    assert_eq!(v["mean"]["exact"], "5/4");
}

/// Large powers are judged from the syntax tree and refused before anything is expanded.
#[test]
fn absurd_sizes_are_refused_at_once() {
    let refused = [
        // the outside fuzz run's input: 18 s to refuse before
        "p(k) = (rhok-1) ^1000p(k-1)^1000/(k+2)",
        // a balance equation whose coefficient would be expanded first
        "p(k) = (rho-1)^1000 p(k-1)/(k+2)",
        // over 100 s each before
        "p(k)/p(k-1) = (rho k-1)^1000/(k+2)",
        "p(k)/p(k-1) = (rho-1)^1000 (k+1)/(k+2)",
        // 9 s before
        "p(k)/p(k-1) = (k+1)^1000/(k+2)^1000",
        // nested powers whose exponents multiply past i32
        "((((k+1)^1000)^1000)^1000)^1000",
        // numbers of millions of digits
        "(10^1000)^1000 (k+1)/(k+2)",
        // many parameters in an expanded power
        "(rho+s+t-1)^20 (k+1)/(k+2)",
    ];
    for rule in refused {
        for args in [
            vec!["solve", "-"],
            vec!["table", "-", "--k", "1..3"],
            vec!["check", "-", "--claim", "a(1)"],
        ] {
            let out = with_stdin(&args, rule);
            assert_eq!(out.status.code(), Some(2), "{rule} {args:?}");
            let stderr = text(&out.stderr);
            assert!(stderr.contains("too large"), "{rule}: {stderr}");
            assert!(stderr.contains("column"), "{stderr}");
        }
    }
    // The same judgement for claims.
    let out = common::telescope(&[
        "check",
        "a(k)/a(k-1) = (k+1)/(k+2)",
        "--claim",
        "a(1) ((k+1)^1000)^1000",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("too large"));
}

/// A stray `^1000` or `/` in an example file gives an answer or a refusal (the mutations that
/// ran past 15 s in the outside fuzz run were of this kind).
#[test]
fn mutated_examples_answer_or_refuse() {
    for (name, source) in common::examples() {
        let rule_line = source
            .lines()
            .find(|l| l.contains("(k") && !l.trim_start().starts_with('#'))
            .unwrap_or_else(|| panic!("{name} has a rule"));
        for (from, to) in [
            ("(k", "(k^1000"),
            ("(k", "/(k"),
            (")", ")^1000"),
            ("k", "k^-1000"),
        ] {
            let mutated = source.replacen(rule_line, &rule_line.replacen(from, to, 1), 1);
            for args in [vec!["solve", "-"], vec!["check", "-", "--claim", "a(1) k"]] {
                let out = with_stdin(&args, &mutated);
                assert!(
                    matches!(out.status.code(), Some(0..=2)),
                    "{name} with {to}: {}",
                    text(&out.stderr)
                );
            }
        }
    }
}

/// `table --check-all` over 10^7 rows at 50 digits ran for many minutes with no sign of life:
/// it is refused before it starts, with the estimate and the way to proceed.
#[test]
fn work_beyond_the_budget_is_refused_with_the_estimate() {
    let rule = "a(k)/a(k-1) = (k-1)/(k+5/2) for k >= 2";
    let out = common::telescope(&[
        "table",
        rule,
        "--k",
        "1..10000000",
        "--digits",
        "50",
        "--check-all",
    ]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert!(stderr.contains("10000000 rows at 50 digits"), "{stderr}");
    assert!(stderr.contains("--max-seconds"), "{stderr}");
    // A small budget refuses small work too; a large one admits it.
    let tight = common::telescope(&["table", rule, "--k", "1..2000", "--max-seconds", "0.001"]);
    assert_eq!(tight.status.code(), Some(2));
    let ok = common::telescope(&["table", rule, "--k", "1..20", "--max-seconds", "1000"]);
    assert_eq!(ok.status.code(), Some(0));
    let solve = common::telescope(&["solve", rule, "--terms", "20", "--max-seconds", "0.000001"]);
    assert_eq!(solve.status.code(), Some(2));
    assert!(text(&solve.stderr).contains("20 tail corrections"));
}

/// cargo-fuzz `parse` target, finding 1: a later piece of a piecewise rate without a range
/// panicked ("later pieces have ranges") in model::rates.
#[test]
fn a_later_rate_piece_without_a_range_is_refused() {
    let model = "param lambda, mu > 0\nparam c integer >= 1\nbirth(k) = lambda\n\
                 death(k) = k mu     for 0 <= k <= c\ndeath(k) = c mu     fontegerc";
    let out = with_stdin(&["solve", "-"], model);
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stderr));
    assert!(
        text(&out.stderr).contains("has no range"),
        "{}",
        text(&out.stderr)
    );
    telescope::fuzzing::parse_bytes(model.as_bytes());
}

/// Every long-running command judges its cost first: `report`, `sweep`, `fit` (with its
/// bootstrap) and `sample` refuse work beyond the budget with the estimate and the
/// `--max-seconds` to pass, before doing any of it.
#[test]
fn every_command_is_judged_against_the_budget() {
    let poisson = "param lambda > 0\na(k)/a(k-1) = lambda/k for k >= 1";
    let data = "tests/reference/randhie_mdvis_counts.csv";
    let cases: Vec<(Vec<&str>, &str)> = vec![
        (
            vec!["fit", poisson, "--data", data, "--bootstrap", "100000"],
            "100000 bootstrap refits of 20190 observations",
        ),
        (
            vec![
                "sample",
                poisson,
                "--param",
                "lambda=2",
                "--n",
                "100000000",
                "--max-seconds",
                "1",
            ],
            "100000000 draws",
        ),
        (
            vec![
                "sweep",
                "examples/citation_growth.rule",
                "--vary",
                "rho=0.1..0.9",
                "--points",
                "1000",
                "--max-seconds",
                "0.000001",
            ],
            "1000 points of 5 quantities at 30 digits",
        ),
        (
            vec![
                "report",
                "examples/citation_growth.rule",
                "--param",
                "rho=3/10",
                "--k",
                "1..10000000",
                "-o",
                "-",
            ],
            "10000000 rows at 30 digits",
        ),
    ];
    for (args, work) in cases {
        let started = std::time::Instant::now();
        let out = common::telescope(&args);
        let stderr = text(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(
            stderr.contains(work) && stderr.contains("--max-seconds"),
            "{args:?}: {stderr}"
        );
        assert!(out.stdout.is_empty(), "{args:?} printed before refusing");
        // Refused before the work: far below the 10 s budget (a generous bound, not a timing goal).
        assert!(started.elapsed().as_secs() < 5, "{args:?}");
    }
}

/// A fit whose deadline passes stops at once and says so, with no estimate; the bootstrap's
/// refits stop the same way.
#[test]
fn a_fit_past_its_deadline_says_so_without_an_estimate() {
    use telescope::data::Counts;
    use telescope::fit::{fit, FitFailure, FitRequest};
    let problem = build_problem("param lambda > 0\na(k)/a(k-1) = lambda/k for k >= 1").unwrap();
    let counts = Counts::from_pairs([(0, 7), (1, 12), (2, 9), (3, 5)]);
    let request = FitRequest {
        deadline: Some(std::time::Instant::now()),
        max_seconds: Some(3.0),
        ..FitRequest::default()
    };
    let report = fit(&problem, &counts, &request);
    match report.outcome {
        Err(FitFailure::OverBudget(why)) => {
            assert!(
                why.contains("3 s") && why.contains("--max-seconds 12"),
                "{why}"
            )
        }
        other => panic!("{other:?}"),
    }
}

/// A binomial's N on overdispersed counts has no maximum (the likelihood rises towards the
/// Poisson limit as N → ∞, common practice). The integer search once stalled on rounding near
/// N = 2^30 and the profile intervals then ran for over ten minutes; it is now a boundary
/// maximum, said in words.
#[test]
fn a_binomial_n_without_a_maximum_is_a_boundary() {
    use telescope::data::Counts;
    use telescope::fit::{fit, FitFailure, FitRequest};
    let problem = build_problem(
        "param N integer >= 1\nparam p in (0, 1)\na(k)/a(k-1) = p (N-k+1)/((1-p) k) for k >= 1",
    )
    .unwrap();
    // Sample variance 1.79 above the mean 1.64.
    let counts = Counts::from_pairs([(0, 7), (1, 12), (2, 9), (3, 5), (4, 2), (6, 1)]);
    let report = fit(&problem, &counts, &FitRequest::default());
    match report.outcome {
        Err(FitFailure::Boundary(why)) => assert!(why.contains("N → ∞"), "{why}"),
        other => panic!("{other:?}"),
    }
}

/// cargo-fuzz `model` finding (timeout): a shift of 10^98 in a denominator. The Sturm search
/// for the conditions' rational roots bisected with rationals whose normalisation dominated
/// (3.9 s), and the term-by-term sum could start its tail bound only beyond k = 10^98, so it
/// summed 10^6 terms and gave up (6 s more). Now the symbolic solve and the sums answer at
/// once: a(2) ≈ 1.4e-97, so the total is 1 to every printed digit, from 3 terms.
#[test]
fn a_huge_denominator_shift_is_summed_in_a_few_terms() {
    let rule = "n(k)/(rho)(k-1)/(77777777777777777777777777777777777777777777777777777777777777777777777777777777777777777777777771+(1-rho)k)";
    let symbolic = with_stdin(&["solve", "-"], rule);
    assert_eq!(
        symbolic.status.code(),
        Some(0),
        "{}",
        text(&symbolic.stderr)
    );
    assert!(text(&symbolic.stdout).contains("₁F₁(2;"));
    let out = with_stdin(
        &[
            "solve", "-", "--param", "n=16/7", "--param", "rho=3/7", "--digits", "12",
        ],
        rule,
    );
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    assert!(
        stdout.contains("value      1.00000000000 (error ≤")
            && stdout.contains("3 terms summed directly"),
        "{stdout}"
    );
}

/// cargo-fuzz `model` and `claim` findings (panic in debug builds, a wrapped precision in
/// release): the closed form's working precision was summed in u32 from the logarithm of its
/// terms, which for a number with 90 digits in a shift is unbounded. It is now summed in u64
/// and capped (`MAX_CLOSED_FORM_BITS`); beyond the cap the evaluation says so.
#[test]
fn an_unbounded_working_precision_is_refused_not_wrapped() {
    let model = b"b(k)/a/555555555555555555555555555555555555555555555555555555555555555555555555555555555555555555b a(t)/a /a kk-2 kk-3";
    telescope::fuzzing::model_pipeline(model);
    let claim = b"a3333-a1/3*alpha +(1- k)561404245424526665009960500*4656140424524452";
    telescope::fuzzing::claim_check(claim);
}

/// cargo-fuzz `parse` finding (timeout): sums of fractions in 15 names, brought over common
/// denominators, grew past 3,600 terms and the gcds of each further sum ran for minutes. Every
/// step is now checked against the 1000-term limit; the refusal names the sum, at once.
#[test]
fn fractions_over_a_growing_common_denominator_are_refused() {
    let input = "a/a-k k-(nk)1/n(2-rho)An(k-or1rRok-1n(k)/n(k-2)mua/a-k k-(nk)1/n(2-rho)An(k-or1rRok-1n(k)/n(k-2)mu (1-rho)An1)1u1rRok- k-(nk)1/n(2-rho)An(k-r1orRok-1n(k)/n(k-2)mu (1-rho)An1)1u1rRok-1n(k)/n(k-2)mu (1-rho)1n(k)/n(k- m)u2(1-rho)An(k-o+k) (1-rho)An1)1u1rRok- k-(nk)1/n(2-rho)An(k-r1orRok-1n(k)/n(k-2)mu (1-rho)An1)1u1rRok-1n(k)/n(k-2)mu (1-rho)1n(k)/n(k- m)u2(1-rho)An(k-o+k)";
    let out = with_stdin(&["solve", "-"], input);
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert!(
        stderr.contains("too large to work with: expanded, it has")
            && stderr.contains("(at most 1000)"),
        "{stderr}"
    );
    // A product of parameter sums expands as well: 2^14 terms.
    let product = "a(k)/a(k-1) = (c1+b)(c+d)(e+f)(g+h)(i+j)(l+m)(n+o)(p+q)(r+s)(t+u)(v+w)(x+y)(z1+z2)(z3+z4)/(k+1)";
    let out = with_stdin(&["solve", "-"], product);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("expanded, it has 1024 terms"));
}

/// cargo-fuzz `model` finding (timeout): `(Z k + 3)^90` with `Zk` read as one parameter name,
/// degree 90 in a parameter. The per-name limit of 120 let it through, but the tail
/// corrections, moments and conditions multiply parameter polynomials out, at about the cube
/// of the degree: `(rho-1)^120 (k+1)/(k+2)` took 28 s. Parameters are now limited to degree
/// 48 (0.9 s); the index keeps 120, since index factors stay factored.
#[test]
fn a_parameter_of_high_degree_is_refused_and_the_index_is_not() {
    let out = with_stdin(
        &["solve", "-"],
        "pk+3(k)/p(k-1) (ZZZZZZZZZZZZZZZZZZZZZZZZZZZk+3)^90+00",
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr)
        .contains("degree 90 in the parameter ZZZZZZZZZZZZZZZZZZZZZZZZZZZk (at most 48)"));
    let out = with_stdin(&["solve", "-"], "p(k)/p(k-1) = (rho-1)^120 (k+1)/(k+2)");
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("degree 120 in the parameter rho"));
    // At the limits the rules are built (the whole solve at degree 48 takes about a second
    // in a release build, far longer in the debug build the tests use).
    for rule in [
        "p(k)/p(k-1) = (rho-1)^48 (k+1)/(k+2)",
        "p(k)/p(k-1) = (k+1)^60/(k+2)^60",
    ] {
        assert!(build_problem(rule).is_ok(), "{rule}");
    }
}

/// cargo-fuzz `model` finding (timeout): a denominator factor k − H with H about 10^53. The
/// term-by-term sum can bound its remainder only beyond k = H, so it summed 10^6 terms (24 s)
/// before giving up. It now gives up at once, saying where the factor changes sign.
#[test]
fn a_sign_change_beyond_reach_is_said_at_once() {
    let out = with_stdin(
        &["solve", "-", "--param", "rho=2", "--digits", "12"],
        "a(k)/a(k-1) = -2/(k - 95013133350911520921726799805416395552341536708355503.5 + rho)",
    );
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    assert!(
        stdout.contains("a denominator factor of the rule changes sign at k = ")
            && stdout.contains("(more than 1000000 terms)"),
        "{stdout}"
    );
}

/// cargo-fuzz `parse` finding (timeout): nested fractions in k and three other names, about a
/// hundred terms each. Bringing them to normal form ran the multivariate gcd, whose degree
/// bounds evaluated the other names at integer points over Q: numbers of thousands of digits,
/// minutes per rule. The bounds are now taken modulo a prime (`algebra::modular`, 26 ms for
/// the whole solve in a release build), and the rule gets its refusal: after cancellation a
/// factor of degree 7 in k with parameter coefficients is left.
#[test]
fn nested_fractions_in_four_names_are_answered() {
    let input = "n(k)/n(n(k)/n(kq) - (k--1) - (k-2)/- (k--1) - (k-2)/(k0- (k-2)/(k0-k1) - (k--1) - (k-2)/- (k--1) - (k-2)/(k0-1-(k0-1-1)1k-2)/(k0-k1) - (k--0) - (k-2)/- (k--1) - (k-2)/(k0-1-(k0-1-1)1) - (k-2)/-1)1) - (k-2)/(k0-k1) - (k--1) - (k-2)/- (k--1) - (k-2)/(k0-1-(k0-1-1)1) - (k-2)/(k0-1-1)";
    let out = with_stdin(&["solve", "-"], input);
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert!(
        stderr.contains("this factor has degree 7 in k and coefficients that depend on parameters"),
        "{stderr}"
    );
}

/// cargo-fuzz `model` findings (timeouts, 6 s to over a minute): rules whose shifts involve
/// up to 16 names and 17- to 40-digit numbers. Their second tail correction has 15,000 to
/// 32,000 terms over the common denominator, and building and reducing it was the time. The
/// corrections now stop at the first one that passes 2000 terms, or whose products of terms
/// would pass 200,000, and the output says which were left out and why.
#[test]
fn tail_corrections_too_large_to_read_are_left_out_and_said() {
    // Many names, long numbers: the work limit stops c₂ before it is built.
    let many_names = "(k-B-666666666666666kVVVVVVVVVVVVVVVVVV6666666k)/p(k-1) (k+3(k+3h)10rho+00+3(k+3h)10rh)/p(k-1) (k+3(k+3h)10rho+00+3VVVVVV6666667k)/p(k-1) (k+3(k+3(k+3h)10rhk+3h0r)1ho+00h)";
    let out = with_stdin(&["solve", "-", "--format", "json"], many_names);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let omitted = &json["tail"]["corrections_omitted"];
    assert_eq!(omitted["first"], 2, "{omitted}");
    assert_eq!(omitted["last"], 2);
    assert!(omitted["terms"].is_null());
    assert_eq!(omitted["max_work"], 200_000);
    assert_eq!(json["tail"]["corrections"].as_array().unwrap().len(), 1);
    telescope::fuzzing::model_pipeline(many_names.as_bytes());

    // Three parameter factors above and three below, an ordinary rule: c₅ has 3646 terms
    // (c₁₂ had 369,286, four minutes to reduce). c₁ … c₄ are written, the rest are named.
    let six = "a(k)/a(k-1) = (k+alpha)*(k+beta)*(k+eps)/((k+gam)*(k+delta)*(k+zeta))";
    let out = with_stdin(&["solve", "-", "--terms", "12"], six);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    assert!(stdout.contains("  c₄   "), "{stdout}");
    assert!(
        stdout.contains(
            "  c₅…c₁₂     too large to write out: c₅ has 3646 terms over the common denominator (at most 2000)"
        ),
        "{stdout}"
    );
    // With every parameter given, the numbers of the unwritten corrections are still there.
    let values = [
        "alpha=1/2",
        "beta=3/2",
        "eps=1/3",
        "gam=3",
        "delta=5/2",
        "zeta=2",
    ];
    let mut args = vec!["solve", "-", "--terms", "12", "--format", "json"];
    for v in &values {
        args.extend(["--param", v]);
    }
    let out = with_stdin(&args, six);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let tail = &json["tail"];
    assert_eq!(tail["corrections"].as_array().unwrap().len(), 4);
    let omitted = &tail["corrections_omitted"];
    assert_eq!(
        (omitted["first"].clone(), omitted["last"].clone()),
        (5.into(), 12.into())
    );
    assert_eq!(omitted["terms"], 3646);
    assert_eq!(omitted["values"].as_array().unwrap().len(), 8, "{omitted}");
}

/// cargo-fuzz `model` finding (timeout, over a minute): a rule in 16 names whose total has a
/// closed form of 25,000 characters. Inverting the power in it ran a gcd of two large coprime
/// polynomials (now `RatFunc::inv` swaps numerator and denominator without one, 1.3 s for the
/// whole input in a release build), and the mean and variance multiplied such forms. Closed
/// means and variances are now built only from forms of at most 200 polynomial terms; this
/// one states the total's closed form and, for the mean and variance, only their conditions.
#[test]
fn a_closed_total_too_large_to_square_gives_no_closed_mean() {
    let input = "d(kl)/ib(k)(b (k)/fo1u(k+1m/am (k+1ak/m)(kl)/ib(k)/b (k)/fo1u(k+1mu) p/2ak k-k k-3u) p/2ak k-(kl)/ib(k)/b (k)/fo1u(k+1mu) pjpk (e)^11+00b+Fk1)cmu p(k+1)   for kc >= 0";
    let out = with_stdin(&["solve", "-"], input);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    let after_total = stdout.split("\ntotal ").nth(1).expect("a total section");
    assert!(
        after_total.contains("  closed form  a(-1) · cmu·p·"),
        "{stdout}"
    );
    let moments = after_total.split("\nmean ").nth(1).expect("a mean section");
    assert!(!moments.contains("closed form"), "{moments}");
}

/// cargo-fuzz `claim` finding (timeout; 37 s for `solve` on the command line): a rule with
/// 3,000-digit constants. Its first tail correction has few terms, but products of such
/// coefficients cost thousands of times a small one's, so the work limit of the corrections
/// now weighs each product by the size of its coefficients, and decimal exponents stop at
/// 1000 (a thousand digits is past any constant a model carries).
#[test]
fn thousand_digit_constants_leave_corrections_out_and_longer_ones_are_refused() {
    let rule = "a(k)/a(k-1) = (k + 45e999*alpha)*(k + beta)/((k + 7e998*gam)*(k + delta + 2))";
    let out = with_stdin(&["solve", "-", "--terms", "6", "--format", "json"], rule);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let omitted = &json["tail"]["corrections_omitted"];
    assert_eq!(omitted["first"], 2, "{omitted}");
    assert_eq!(omitted["last"], 6);
    assert!(omitted["terms"].is_null(), "the work limit stopped it");
    assert_eq!(json["tail"]["corrections"].as_array().unwrap().len(), 1);

    let out = with_stdin(&["solve", "-"], "a(k)/a(k-1) = (k + 45e1001*alpha)/(k + 2)");
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert!(stderr.contains("this exponent is too large"), "{stderr}");
    assert!(
        stderr.contains("exponents up to 1000 are accepted"),
        "{stderr}"
    );
    assert!(stderr.contains("line 1, column 23"), "{stderr}");
}

/// cargo-fuzz `model` finding (timeout, 7 s): a shift of about 10^14 over k², so the terms
/// grow for half a million steps before they decay, and the term-by-term sum ran them all.
/// The sum's steps now reduce R(k) once rather than once per factor, reuse their working
/// values and check the remainder bound on every 16th step after the first 1024 (3.7 s for
/// that input). And when the bound on |R(m)| beyond the last step the sum could reach is
/// still at least 1, the sum is refused before its first step: here a shift of 10^13.
#[test]
fn a_sum_that_cannot_end_within_its_step_limit_is_refused_at_once() {
    let out = with_stdin(&["solve", "-"], "a(k)/a(k-1) = (k + 10^13)/(2*k*(k+1))");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    assert!(
        stdout.contains("numeric    no value: the terms decay too slowly to sum 1000000 of them"),
        "{stdout}"
    );
}

/// cargo-fuzz `claim` finding (timeout, 4 s): the claim `3888!8888888888888888888` against
/// the generated rule. Γ(3888) was walked as 3887 products of `num` rationals, each reduced
/// by a gcd; it is now a GMP factorial (a unit test in `check::exact` checks the values).
#[test]
fn a_claim_with_a_factorial_of_thousands_is_checked() {
    telescope::fuzzing::claim_check(b"\n3888!8888888888888888888");
    // 3888! = 3.256…e12270: log10 3888! = 12270.51 from Python's math.lgamma(3889)/ln 10.
    let out = with_stdin(
        &["check", "-", "--claim", "3888! * (1/2)^(k-1)"],
        "a(k)/a(k-1) = 1/2",
    );
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    assert!(stdout.contains("verdict      REFUTED"), "{stdout}");
    assert!(
        stdout.contains("wrong base value: the claim solves the rule but starts from a(1) = 3.25612483973e12270, not 1"),
        "{stdout}"
    );
}

/// cargo-fuzz `model` finding (timeout, 10 s): `(s+1-8)^20 (03)`, the rule 3(s − 7)^20. The
/// total converges for |3(s − 7)^20| < 1, and the Sturm chain that isolates the two roots
/// was evaluated in `num` rationals, a gcd at every Horner step on coefficients of hundreds
/// of digits; it is now evaluated in GMP (0.4 s for the whole input). The roots are
/// 7 ∓ 3^(−1/20) (Python: 7 - 3**(-1/20) = 6.053449177359841).
#[test]
fn the_range_of_a_rate_of_degree_twenty_is_isolated() {
    let out = with_stdin(&["solve", "-"], "a(k)/a(k-1) = 3*(s-7)^20");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    let total = stdout.lines().find(|l| l.contains("total is")).unwrap();
    assert!(total.contains("≈ 6.05344917735984"), "{total}");
    assert!(total.contains("≈ 7.94655082264015"), "{total}");
}

#[test]
fn a_long_finite_support_with_sixty_digit_shifts_is_summed() {
    // Fuzz finding (model/finding_5b425354…): 6,666 states whose steps carry 60-digit shifts
    // took minutes as a walk in reduced rationals (a gcd per step on numbers that grow by 400
    // bits a step). Binary splitting keeps the sums in integers and rounds them once.
    let rule = "a(k)/a(k-1) = (6667 - k)(k + 123456789012345678901234567890123456789012345678901234567890)\
                / (k (k + 98765432109876543210987654321098765432109876543210987654321)) for k >= 1";
    let out = with_stdin(&["solve", "-"], rule);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let stdout = text(&out.stdout);
    // The same sums by a running product in mpmath 1.3.0 at 70 digits (computed for this test):
    // total 4.45298338169181299179173317564e+2347, mean 3703.33331833483325759090795083,
    // variance 1645.92592759242590059512562758.
    for value in [
        "4.45298338169181299179173317564e2347",
        "3703.33331833483325759090795083",
        "1645.92592759242590059512562758",
    ] {
        assert!(stdout.contains(value), "{value} in {stdout}");
    }
    assert!(
        stdout.contains("sum of 6667 terms in exact integers, rounded once"),
        "{stdout}"
    );
}

#[test]
fn a_rate_of_many_terms_keeps_its_power_in_the_prefactor() {
    // Fuzz finding (model/finding_02c609bc…): the prefactor C = r^(−b)·… of a rule whose rate r
    // is a sum of twenty names expanded r^(−4) into tens of thousands of terms (11 s). A rate
    // of many terms now stays a power, and its value (here of a negative rate) is that of the
    // same rule with the rate as one name.
    let sum = "a(k)/a(k-1) = (a1+a2+a3+a4+a5+a6+a7+a8)(k+1)/(k+3) for k >= 5";
    let values = [
        "a1=1/2", "a2=1/3", "a3=-1/5", "a4=1/7", "a5=-2", "a6=1/11", "a7=1/13", "a8=-1/17",
    ];
    let mut args = vec!["solve", "-"];
    for v in &values {
        args.extend(["--param", v]);
    }
    let out = with_stdin(&args, sum);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let long = text(&out.stdout);
    assert!(
        long.contains("C          a(4)·42(a1 + a2 + a3 + a4 + a5 + a6 + a7 + a8)^(−4)"),
        "{long}"
    );
    // r = 1/2 + 1/3 − 1/5 + 1/7 − 2 + 1/11 + 1/13 − 1/17 = −569117/510510 (by hand).
    let out = with_stdin(
        &["solve", "-", "--param", "r=-569117/510510"],
        "a(k)/a(k-1) = r (k+1)/(k+3) for k >= 5",
    );
    let short = text(&out.stdout);
    assert!(short.contains("C          a(4)·42/r⁴"), "{short}");
    let c = |s: &str| {
        s.lines()
            .find(|l| l.trim_start().starts_with("C ≈"))
            .map(str::to_string)
            .unwrap_or_default()
    };
    assert!(
        !c(&long).is_empty() && c(&long) == c(&short),
        "{long}\n{short}"
    );
    // The fuzz input itself answers at once.
    let finding =
        include_str!("../fuzz/corpus/model/finding_02c609bcf1ee798c06842715bda96c9a2642f758");
    let out = with_stdin(&["solve", "-"], finding);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    assert!(
        text(&out.stdout).contains(")^(−4)"),
        "{}",
        text(&out.stdout)
    );
}

#[test]
fn a_rule_whose_expansion_takes_too_much_work_is_refused_at_once() {
    // Fuzz findings (parse/finding_fdbcdef5…, finding_cae8a41f… and four more): nested sums
    // of fractions in a dozen names, each sum a gcd of polynomials of hundreds of terms, took
    // 2–7 s before they were judged. The products of terms spent expanding a rule are now
    // counted and bounded (200,000; the shipped examples spend at most 36).
    let finding =
        include_str!("../fuzz/corpus/parse/finding_fdbcdef5099745618dbc4a4deaa6b1c60f16e050");
    let out = with_stdin(&["solve", "-"], finding);
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stdout));
    let err = text(&out.stderr);
    assert!(
        err.contains("expanding the rule takes over 200000 products of terms")
            && err.contains("column 9")
            && err.contains('^'),
        "{err}"
    );
    // A sum of a few fractions, as researchers write them, is far inside the bound.
    let out = with_stdin(
        &["solve", "-"],
        "a(k)/a(k-1) = (rho/(k+1) + rho/(k+2)) * (k+1)(k+2)/((k+4)(k+5)(k+6))",
    );
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
}

#[test]
fn a_high_power_of_a_long_constant_is_refused_at_once() {
    // Fuzz finding (model/finding_9f67842d…): (s + 2·10^38)^40 has 5,090-bit coefficients, and
    // isolating the roots of its conditions ran past 5 minutes. The degree in a parameter
    // times the coefficients' bit length is bounded (5,000); small shifts keep high powers.
    let out = with_stdin(
        &["solve", "-"],
        "(s+199999999999999999999999999999999999999-4)^40\n",
    );
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stdout));
    let err = text(&out.stderr);
    assert!(
        err.contains("degree 40 in the parameter s with 5091-bit coefficients")
            && err.contains("column 1")
            && err.contains('^'),
        "{err}"
    );
    for rule in [
        "(s-7)^20*3",
        "(rho-1)^48 (k+1)/(k+2)",
        "(s+10^20)^4/((s+3)^4)",
    ] {
        let out = with_stdin(&["solve", "-"], rule);
        assert_eq!(out.status.code(), Some(0), "{rule}: {}", text(&out.stderr));
    }
}

#[test]
fn an_index_polynomial_with_long_coefficients_is_refused_at_once() {
    // Fuzz finding (parse/timeout-7a88343a…): a sum of fractions with 234^801 in it expands to
    // a degree-6 polynomial in k with 12,960-bit coefficients, whose rational roots the Sturm
    // search took 17 s to rule out. Numeric index factors of degree 2 or more obey the same
    // degree × bits bound (5,000) as parameter polynomials.
    let rule = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/fuzz/corpus/parse/timeout-7a88343acd655691b71263ff36f20ff7686367af"
    ))
    .unwrap();
    let out = with_stdin(&["solve", "-"], &rule);
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stdout));
    let err = text(&out.stderr);
    assert!(
        err.contains("degree 6 in k with 12960-bit coefficients")
            && err.contains("column 18")
            && err.contains('^'),
        "{err}"
    );
    // Expanded quadratics with 60-digit roots, (k + 10^60)(k + 2·10^60) and its mirror, still
    // split into their linear factors (common practice: Vieta's formulas).
    for rule in [
        "a(k)/a(k-1) = (k^2 + 3*10^60 k + 2*10^120)/(k^2 + 3k + 2)",
        "a(k)/a(k-1) = (k^2 - 3*10^60 k + 2*10^120)/((k+1)^2)",
    ] {
        let out = with_stdin(&["solve", "-"], rule);
        assert_eq!(out.status.code(), Some(0), "{rule}: {}", text(&out.stderr));
        let shown = text(&out.stdout);
        assert!(
            shown.contains("1000000000000000000000000000000000000000000000000000000000000"),
            "{rule}: {shown}"
        );
    }
}

#[test]
fn a_twentieth_power_against_an_eighth_places_its_cuts() {
    // Found by hand (sixth session): the convergence cut of (s + 1000)^20/(s + 2)^8 is a root
    // of (s + 1000)^20 − (s + 2)^8; isolating it converted the whole Sturm chain to GMP at
    // every bisection point (5.8 s). Both real roots against mpmath 1.3.0
    // (`findroot((s+1000)**20 - (s+2)**8, x0)` at 50 digits, x0 = −984.26 and −1015.9):
    // −984.26411002183057854430257001642… and −1015.9369193449807499013499393921…
    let out = with_stdin(
        &["solve", "-"],
        "a(k)/a(k-1) = (s+10^3)^20/((s+2)^8) * (k+1)/(k+3)   for k >= 1\n",
    );
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    for root in [
        "≈ -984.264110021830578544302570016",
        "≈ -1015.93691934498074990134993939",
    ] {
        assert!(shown.contains(root), "{root}: {shown}");
    }
}

#[test]
fn a_high_power_keeps_its_gamma_value_in_the_tail_prefactor() {
    // Fuzz finding (model/timeout-bda6beda…): p(k)/p(k−1) = (k + 662)^110 has Γ(664)^(−110) in
    // its tail prefactor, which was folded into a fraction of 176,000 digits (over 10 s in the
    // instrumented fuzz build). A constant Γ power past 20,000 bits now stays a power.
    // C = 2^55 π^55 / Γ(664)^110 by mpmath 1.3.0 at 40 digits: 8.42733014489433465519615363938e-174256.
    let out = with_stdin(&["solve", "-"], "p(k)/p(k-1) = (k+662)^110\n");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(
        shown.contains("p(1)·36028797018963968π⁵⁵/Γ(664)¹¹⁰")
            && shown.contains("C ≈        8.42733014489433465519615363938e-174256"),
        "{shown}"
    );
}

#[test]
fn a_claim_against_a_rule_with_a_five_thousand_digit_constant_is_checked() {
    // Slow claim input (claim/slow-unit-1026f550…, found in the working corpus): a rule whose
    // rate is a 5,300-digit fraction. The exact direct walk grew to a million digits in 200
    // steps, and each closed-form value added long shifts in `num` rationals (2 s in release,
    // over 10 s instrumented). The walk now stops past 2^16 bits and shifts are added in GMP
    // (0.3 s). The verdict and the first difference are the same as before the change (a
    // regression pin from the earlier code, not an outside value).
    let rule = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/fuzz/corpus/claim/slow-unit-1026f550c45c272316d278ab2c3653a988bebb31"
    );
    let out = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(["check", rule, "--claim", "a(1) k"])
        .output()
        .expect("binary runs");
    // Exit 1: the claim is refuted.
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(
        shown.contains("verdict      REFUTED")
            && shown.contains("truth -8.35347281101771298445337e5272"),
        "{shown}"
    );
}

#[test]
fn far_apart_gamma_values_with_a_parameter_fold_in_clusters() {
    // Fuzz finding (model/timeout-5a2b2c19…): for `(k−1)/(k + A/2) for k > 662` the sums
    // folded Γ(A/2 + 663) against Γ(A/2 + 2) into a rising product of degree 661 in A, which
    // took 406 s. Symbolic Gamma values fold only within a spread of degree 48; nearby ones
    // still cancel. At A = 10 the total is ₂F₁(662, 1; 668; 1) = 133.4 and the mean
    // (662·F + (662/668)·₂F₁(663, 2; 669; 1))/F = 827.5 (mpmath 1.3.0 `hyp2f1`, Gauss's
    // theorem at z = 1, DLMF 15.4.20; the mean by DLMF 15.5.1 for the derivative).
    let rule = "a(k)/a(k-1) = (k-1)/(k+A/2) for k >662\n";
    let out = with_stdin(&["solve", "-"], rule);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(
        shown.contains("a(662) · (A + 1324)/A   by Gauss's theorem"),
        "{shown}"
    );
    let out = with_stdin(&["solve", "-", "--param", "A=10"], rule);
    let shown = text(&out.stdout);
    assert!(
        shown.contains("value      133.400000000000000000000000000 = 667/5 exactly")
            && shown.contains("value      827.500000000000000000000000000 = 1655/2 exactly"),
        "{shown}"
    );
}

#[test]
fn a_rate_of_nine_hundred_nine_to_the_thousand_does_not_overflow_the_stack() {
    // Fuzz finding (model/slow-unit-1e2c7e2c…): the rate ρ·909^1000. Its convergence cut
    // ρ = 1/909^1000 was sought by a recursive bisection 19,000 levels deep, which aborted
    // `solve` with a stack overflow (10 s on a larger stack). Degree 1 and 2 take their roots
    // in closed form, and the bisection keeps its intervals on a heap stack.
    let out = with_stdin(&["solve", "-"], "rho(909^1000 )\n");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(shown.contains("tail law"), "{shown}");
}

#[test]
fn a_claim_with_an_exponent_of_minus_two_to_the_sixty_three_is_evaluated() {
    // Fuzz finding (claim/crash-780d6851…): the claim (−5)^(−8)^k reaches the exponent
    // (−8)^21 = −2^63 = i64::MIN, whose `abs` overflowed (a panic with overflow checks, and a
    // wrong exponent 0 without them). Exponents past 10^9 were also called "not a whole
    // number"; any whole exponent now gets its sign from its parity. This test binary has
    // overflow checks on.
    let out = with_stdin(
        &["check", "-", "--claim", "(-5)^(-8)^k"],
        "a(k)/a(k-1) = 1/2 for k >= 20\n",
    );
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(
        shown.contains("verdict      REFUTED") && !shown.contains("not a whole number"),
        "{shown}"
    );
}

#[test]
fn the_diagnosis_of_a_claim_in_ten_names_leaves_a_huge_growth_unread() {
    // Fuzz finding (claim/timeout-d3f9389c…): a balance equation in ten names. Diagnosing the
    // refuted claim a(1)·k read the growth of a quotient of 1,118 terms, a multivariate gcd of
    // leading coefficients: 7 s. Quotients past 400 terms are left unread; the rate, read from
    // the first quotient, is still named.
    let rule = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/fuzz/corpus/claim/timeout-d3f9389cfe967ac91bb30025010f3e004ef99778"
    );
    let out = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(["check", rule, "--claim", "a(1) k"])
        .output()
        .expect("binary runs");
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(
        shown.contains("verdict      REFUTED") && shown.contains("wrong geometric rate"),
        "{shown}"
    );
}

/// `telescope solve` on a file of the model fuzz corpus.
fn solve_corpus_file(name: &str) -> String {
    let path = format!("{}/fuzz/corpus/model/{name}", env!("CARGO_MANIFEST_DIR"));
    let out = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(["solve", &path])
        .output()
        .expect("binary runs");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    text(&out.stdout)
}

#[test]
fn two_long_quintics_in_one_condition_are_cut_one_at_a_time() {
    // Fuzz finding (model/finding_04d7eece…): a rate in ρ whose convergence condition holds
    // two distinct quintics with 729-bit coefficients, each of them four times over. `solve`
    // searched the rational roots of their degree-30 product and isolated the degree-10 rest,
    // once each for the total, the mean and the variance: 13 s. Each distinct factor now gives
    // up its rational roots alone, the rest is isolated one factor at a time over a coprime
    // base, and a condition the three share is decided once: 0.46 s.
    // The cuts against mpmath 1.3.0 (`polyroots` of each quintic as printed, 80 digits,
    // extraprec 4000): both quintics have a root at −6.86855500839184708698075247482e−42 to
    // these digits and one near 17; their roots near 1.6e−17 differ in the 28th digit.
    let shown = solve_corpus_file("finding_04d7eecec88fc0b1bde048ef97fdba0f36179361");
    for cut in [
        "≈ -6.86855500839184708698075247482e-42",
        "≈ 1.63875678383653021686082993385e-17",
        "≈ 1.63875678383653021686082993399e-17",
        "≈ 17.0000000000000000000000000000",
    ] {
        assert!(shown.contains(cut), "{cut}: {shown}");
    }
}

#[test]
fn a_quadratic_cut_near_ten_to_the_thousand_is_placed_at_once() {
    // Fuzz finding (model/finding_25590c39…): the rate A/(B(ρ − ρ²)) with a 2,051-digit A.
    // |rate| < 1 holds outside the roots 1/2 ± √(1/4 + A/B) of two quadratics; their
    // isolating intervals, found together from a bound near 2^13,600, were narrowed by a
    // polynomial converted to GMP at every halving (8.4 s). Each quadratic is now isolated
    // alone and the intervals are separated in GMP: 0.28 s. The cuts against mpmath 1.3.0
    // (1/2 ± sqrt(1/4 + A/B) at 3,000 digits, A and B as printed in the rule).
    let shown = solve_corpus_file("finding_25590c39b438caa1fe0f567e336aa82c7fe1fd2d");
    for cut in [
        "ρ < 1/2 − √",
        "≈ -3.04181719704048196814770671589e1007",
        "ρ > 1/2 + √",
        "≈ 3.04181719704048196814770671589e1007",
    ] {
        assert!(shown.contains(cut), "{cut}: {shown}");
    }
}

#[test]
fn a_value_past_ten_to_the_two_to_the_sixty_one_keeps_its_exponent() {
    // Noticed on the fuzz finding claim/crash-780d6851…: the claim (−5)^((−8)^k) has the ratio
    // (−5)^(−9·(−8)^(k−1)), about 10^(5.8·10^19) at k = 22, and its decimal exponent saturated
    // at 4611686018427387903. The exponent is now written in full. Mantissas and exponents
    // against mpmath 1.3.0 (10^frac(n·log10 5) and floor(n·log10 5), n = −9·(−8)^(k−1), at 60
    // digits).
    let out = with_stdin(
        &["check", "-", "--claim", "(-5)^(-8)^k"],
        "a(k)/a(k-1) = 1/2 for k >= 20\n",
    );
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    for ratio in [
        "k = 20: claim 4.33050214491e906589742708404299,",
        "k = 21: claim 8.08525898445e-7252717941667234398,",
        "k = 22: claim 5.47581181898e58021743533337875176,",
        "k = 23: claim 1.23712015237e-464173948266703001414,",
    ] {
        assert!(shown.contains(ratio), "{ratio}: {shown}");
    }
}

#[test]
fn a_model_file_in_twenty_names_is_solved_and_analysed() {
    // Fuzz finding (model/timeout-4f5f3142…, and slow-unit-f17a32ae… beside it): a model file
    // whose rule holds twenty names (ak, am1, fo1u, kVVVV, …). Its multivariate gcds copied
    // every name once per term, recomputed the variable set and an evaluation point for every
    // variable, and took a Fermat inverse for every integer coefficient; the simplifier
    // reduced a difference by a gcd to see whether it is a number: 13 s in the instrumented
    // build, 6.1 s in release, now 2.4 s (the rest is multiplying polynomials of hundreds of
    // terms). The rule is declared for kc ≥ 20, so its base term is a(19) (the rule as
    // written).
    let input =
        include_str!("../fuzz/corpus/model/timeout-4f5f3142673f28a36536f14dbfc0d72df8504002");
    let out = with_stdin(&["solve", "-"], input);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    assert!(shown.contains("base term    a(19)"), "{shown}");
    assert!(shown.contains("support      19 ≤ kc ≤"), "{shown}");
    // `tests/fuzz_corpus.rs` runs the whole model pipeline on it.
}

#[test]
fn a_gcd_takes_its_main_variable_of_lowest_degree() {
    // Fuzz finding (parse/timeout-f9f0648b…, on the seventh session's final code): nested
    // differences of fractions in k, k0, k1 and klamXda with a k^36. Adding two of them took
    // a gcd whose degree bound was 1 in every name; it chose k, of degrees 35 and 5, and its
    // remainder sequence ran past 5 minutes (a leading coefficient to the 30th power, 22,608
    // terms after one step). Among equal bounds the gcd now takes the name of lowest degree,
    // and the rule is judged at once: its factor of degree 41 in k cannot be split.
    let input =
        include_str!("../fuzz/corpus/parse/timeout-f9f0648babbfbaa741946ca44de9b291cf626dca");
    let out = with_stdin(&["solve", "-"], input);
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stdout));
    let shown = text(&out.stderr);
    assert!(
        shown.contains("this factor has degree 41 in k") && shown.contains("column 8"),
        "{shown}"
    );
}

#[test]
fn moments_in_six_names_with_long_fractions_reduce_in_integers() {
    // Fuzz finding (model/timeout-bd17c584…, on the seventh session's code): a rate in six
    // names (ρ, h, O, o2473…, i666666, i666689) with 40-digit fractions. The closed moments
    // multiply rational functions whose gcd (35 and 112 terms, 692-bit fractions) spent 99% of
    // 22 s in `num`'s binary gcd reducing every rational product; the gcd now makes its
    // inputs integral first: 0.6 s for the whole fuzz pipeline in release.
    let input =
        include_str!("../fuzz/corpus/model/timeout-bd17c5841150d9900aa1f1495f937ea98427f274");
    let out = with_stdin(&["solve", "--terms", "2", "-"], input);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    let mean = shown.split("\nmean").nth(1).expect("a mean is reported");
    assert!(mean.contains("closed form"), "{shown}");
    // `tests/fuzz_corpus.rs` runs the whole model pipeline on it.
}
