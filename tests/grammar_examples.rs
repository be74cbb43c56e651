//! The grammar file documents the language with examples; this keeps them honest.
//! Every `(* example: ... *)` line must parse, and every `(* invalid, column N: ... *)`
//! line must be refused with the error at column N.

use telescope::syntax::parse_model;

const GRAMMAR: &str = include_str!("../grammar/telescope.ebnf");

/// The text of every one-line comment of the form `(* <prefix>...: <text> *)`.
fn annotated_lines(prefix: &str) -> Vec<(String, String)> {
    GRAMMAR
        .lines()
        .map(str::trim)
        .filter_map(|line| line.strip_prefix("(*")?.strip_suffix("*)"))
        .filter_map(|inner| {
            let inner = inner.trim_start().strip_prefix(prefix)?;
            let (label, text) = inner.split_once(':')?;
            Some((label.trim().to_string(), text.trim().to_string()))
        })
        .collect()
}

#[test]
fn every_example_in_the_grammar_parses() {
    let examples = annotated_lines("example");
    assert!(
        examples.len() >= 30,
        "only {} examples found",
        examples.len()
    );
    for (_, example) in examples {
        if let Err(d) = parse_model(&example) {
            panic!("{}", d.render("grammar example", &example));
        }
    }
}

#[test]
fn every_counterexample_in_the_grammar_fails_at_its_column() {
    let invalid = annotated_lines("invalid");
    assert!(
        invalid.len() >= 12,
        "only {} invalid lines found",
        invalid.len()
    );
    for (label, line) in invalid {
        let column: usize = label
            .strip_prefix(", column")
            .and_then(|n| n.trim().parse().ok())
            .unwrap_or_else(|| panic!("bad label {label:?}"));
        match parse_model(&line) {
            Ok(model) => panic!("{line:?} should be refused, parsed as {model:?}"),
            Err(d) => assert_eq!(
                d.line_column(&line),
                (1, column),
                "{}",
                d.render("grammar counterexample", &line)
            ),
        }
    }
}

#[test]
fn the_whole_example_section_parses_as_one_model() {
    let model: Vec<String> = annotated_lines("example")
        .into_iter()
        .map(|(_, t)| t)
        .collect();
    let text = model.join("\n");
    let parsed = parse_model(&text).expect("all examples together form a model");
    assert!(parsed.statements.len() >= 30);
}
