//! End-to-end tests of the two entry points: whole models, the messages a user sees
//! (checked by line and column), and robustness against arbitrary text.

use super::*;
use proptest::prelude::*;

const SPEC_MODEL: &str = "\
# comment
param rho in (0, 1)            # open interval;  [0, 1] closed; (0, 1] etc. mixed
param alpha > 0                # also >=, <, <=
param N integer >= 1           # `integer` flag, optional constraint
param lambda, mu > 0           # several names sharing one constraint
param c integer in [1, 10]
n(k)/n(k-1) = (1-rho)(k-1) / (1 + (1-rho) k)   for k >= 2
n_k/n_{k-1} = (k-1)/(k+alpha)
(k-1)/(k+2)   for k >= 4                         # a bare expression = the ratio itself
(k+2) p(k) = (k-1) p(k-1)   for k >= 4          # balance equation
n(1) = rho - (1-rho) n(1)                        # boundary equation
birth(k) = lambda ;  death(k) = k mu             # rates
a(k)/a(k-1) = c/k    for 1 <= k <= c             # piecewise ranges
a(k)/a(k-1) = c/k    for k > c
";

#[test]
fn the_whole_example_model_parses() {
    let model = parse_model(SPEC_MODEL).unwrap();
    assert_eq!(model.statements.len(), 14);
    let params = model
        .statements
        .iter()
        .filter(|s| matches!(s.kind, StatementKind::Param(_)))
        .count();
    assert_eq!(params, 5);
    // Every statement's span starts where its text starts on its line.
    for s in &model.statements {
        let text = &SPEC_MODEL[s.span.clone()];
        assert!(!text.starts_with(' ') && !text.ends_with(' '), "{text:?}");
    }
}

#[test]
fn a_rule_string_is_a_one_statement_model() {
    let model = parse_model("a(k)/a(k-1) = (k-1)/(k+2) for k >= 1").unwrap();
    assert_eq!(model.statements.len(), 1);
    assert_eq!(model.statements[0].span, 0..36);
}

#[test]
fn parse_expr_reads_one_whole_expression() {
    let e = parse_expr("  1/2k  # half over k").unwrap();
    assert_eq!(display_expr(&e), "(1 / (2 * k))");
    assert_eq!(e.span, 2..6);
    // "0.3" is 3/10, exactly (common practice: decimal input is exact).
    assert_eq!(display_expr(&parse_expr("0.3").unwrap()), "3/10");
}

/// (input, line, column, words the message must contain)
const MALFORMED: &[(&str, usize, usize, &str)] = &[
    ("", 1, 1, "no statement"),
    ("# only a comment\n\n", 3, 1, "no statement"),
    ("k + $", 1, 5, "unexpected character `$`"),
    ("n(k)/n(k-1) = (k-1", 1, 15, "unclosed parenthesis"),
    (
        "param rho in (0, 1)\nn(k)/n(k-1) = k +",
        2,
        17,
        "missing an operand after `+`",
    ),
    ("a(k) = b(k) = c", 1, 13, "only one `=`"),
    ("param a > 0\n(k-1)/k for", 2, 9, "no relation"),
    ("(k-1)/k for k", 1, 9, "no relation"),
    ("x = 1.2.3", 1, 5, "`1.2.3` is not a number"),
    ("x = 2.5e-", 1, 8, "exponent of this number is missing"),
    ("x = 4e1001 * k", 1, 7, "this exponent is too large"),
    ("x = k^", 1, 6, "missing an exponent after `^`"),
    ("param for > 0", 1, 7, "`for` is a reserved word"),
    ("in(k) = 2", 1, 1, "`in` is a reserved word"),
    ("param\n", 1, 1, "`param` needs a name"),
    ("=", 1, 1, "missing left-hand side"),
    ("x = (k-1))", 1, 10, "no open `(`"),
    (
        "n_{k-1 = 2",
        1,
        8,
        "expected `}` to close the subscript brace, found `=`",
    ),
    ("f(k,) = 1", 1, 5, "expected an argument after `,`"),
    ("k >= 2", 1, 3, "comparisons belong in a `for` clause"),
    ("param rho in (0, 1\nk", 1, 14, "unclosed interval"),
    ("x = 1 -\n  2", 1, 7, "missing an operand after `-`"),
    ("x = ρ k", 1, 5, "unexpected character `ρ`"),
    ("x = 2 ≥ k", 1, 7, "comparisons belong"),
    ("x = k for 1 <= k >= 3", 1, 18, "one way"),
];

#[test]
fn malformed_inputs_point_at_the_offending_column() {
    for &(input, line, column, words) in MALFORMED {
        let d = parse_model(input).expect_err(input);
        assert_eq!(d.line_column(input), (line, column), "{input:?}: {d:?}");
        assert!(d.message.contains(words), "{input:?}: {:?}", d.message);
    }
}

#[test]
fn parse_expr_errors() {
    let d = parse_expr("").unwrap_err();
    assert!(d.message.contains("empty input"));
    assert!(parse_expr("# ratio\nk\n\n").is_ok());
    let d = parse_expr("k ; 2").unwrap_err();
    assert_eq!(d.span, 2..3);
    let d = parse_expr("a = b").unwrap_err();
    assert_eq!(d.span, 2..3);
    let d = parse_expr(")").unwrap_err();
    assert_eq!(d.span, 0..1);
    let d = parse_expr("k )").unwrap_err();
    assert_eq!(d.span, 2..3);
}

#[test]
fn rendered_error_has_a_caret_and_a_hint() {
    let input = "param rho in (0, 1)\nn(k)/n(k-1) = (1-rho)(k-1 / (1 + k)";
    let d = parse_model(input).unwrap_err();
    let text = d.render("model.tsc", input);
    assert!(text.contains("unclosed parenthesis"), "{text}");
    assert!(text.contains("line 2, column 22"), "{text}");
    assert!(text.contains("help:"), "{text}");
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(1000))]

    #[test]
    fn no_input_makes_the_parser_panic(text in "[ a-z0-9_{}()\\[\\],.;=<>≤≥+*/^!#\\n$ρe-]{0,40}") {
        let _ = parse_model(&text);
        let _ = parse_expr(&text);
    }

    #[test]
    fn no_sequence_of_words_makes_the_parser_panic(
        words in proptest::collection::vec(
            prop_oneof![
                Just("param"), Just("in"), Just("for"), Just("integer"), Just("k"), Just("n"),
                Just("("), Just(")"), Just("["), Just("]"), Just("_"), Just("_{"), Just("}"),
                Just(","), Just("="), Just(">="), Just("<"), Just("+"), Just("-"), Just("*"),
                Just("/"), Just("^"), Just("!"), Just("2"), Just("0.5"), Just("1e3"),
                Just(";"), Just("\n"), Just(" "), Just("#"),
            ],
            0..25,
        )
    ) {
        let text: String = words.concat();
        if let Err(d) = parse_model(&text) {
            // The span must lie inside the text, so the caret can be drawn.
            prop_assert!(d.span.start <= d.span.end && d.span.end <= text.len(), "{:?}", d);
            let _ = d.render("input", &text);
        }
        let _ = parse_expr(&text);
    }
}

/// Worst shapes at the size limits still parse, print and drop on a test thread's
/// stack (2 MiB), and one step past a limit is a diagnostic.
#[test]
fn inputs_at_the_limits_do_not_exhaust_the_stack() {
    let depth = MAX_EXPR_DEPTH - 1;
    let long_sum = format!("x = 1{}", "+1".repeat(depth));
    let minus_chain = format!("x = {}k", "-".repeat(depth));
    let power_tower = format!("x = 2{}", "^2".repeat(depth));
    let deep = format!("x = {}k{}", "(".repeat(64), ")".repeat(64));
    let deep_calls = format!("x = {}k{}", "f(".repeat(64), ")".repeat(64));
    for text in [long_sum, minus_chain, power_tower, deep, deep_calls] {
        let model = parse_model(&text).unwrap_or_else(|d| panic!("{}", d.message));
        if let StatementKind::Equation { rhs, .. } = &model.statements[0].kind {
            assert!(!display_expr(rhs).is_empty());
        }
    }
    let too_deep = format!("x = {}k{}", "(".repeat(65), ")".repeat(65));
    let d = parse_model(&too_deep).unwrap_err();
    assert_eq!(
        (d.message.as_str(), d.span.start),
        ("brackets are nested too deeply", 68)
    );
    let d = parse_model(&format!("x = {}k", "-".repeat(MAX_EXPR_DEPTH))).unwrap_err();
    assert_eq!(
        (d.message.as_str(), d.span.start),
        ("this expression is nested too deeply", 4 + MAX_EXPR_DEPTH)
    );
    let too_long = format!("x = {}k", "-".repeat(2000));
    assert!(parse_model(&too_long)
        .unwrap_err()
        .message
        .contains("too long"));
    // The length limit is per statement, not per file.
    let many = "x = 1+1+1+1+1+1+1+1+1\n".repeat(500);
    assert_eq!(parse_model(&many).unwrap().statements.len(), 500);
}
