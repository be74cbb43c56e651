//! The LaTeX output is meant to be pasted into a paper: it must compile with pdflatex and
//! amsmath alone. A structural check always runs; the full compile runs when `pdflatex` is
//! installed and says so when it is skipped.

mod common;
use common::{breakpoint_values, examples, telescope};

use std::path::PathBuf;
use std::process::Command;

use telescope::model::build_model;
use telescope::piecewise::solve_model;
use telescope::render::{self, SolveFormat, SolveLayout, SolveReport};

/// Control sequences the output may use: the LaTeX kernel, amsmath, and nothing else.
const ALLOWED: &[&str] = &[
    // document structure (LaTeX kernel)
    "documentclass",
    "usepackage",
    "begin",
    "end",
    "section",
    // amsmath
    "frac",
    "binom",
    "text",
    "intertext",
    "qquad",
    "quad",
    // kernel math
    "left",
    "right",
    "Gamma",
    "mathrm",
    "mathit",
    "prod",
    "sqrt",
    "pi",
    "neq",
    "notin",
    "dots",
    "ge",
    "le",
    "exp",
    "ln",
    "in",
    "cdot",
    // Greek letters (kernel)
    "alpha",
    "beta",
    "gamma",
    "delta",
    "varepsilon",
    "zeta",
    "eta",
    "theta",
    "iota",
    "kappa",
    "lambda",
    "mu",
    "nu",
    "xi",
    "rho",
    "sigma",
    "tau",
    "upsilon",
    "phi",
    "chi",
    "psi",
    "omega",
    "Delta",
    "Theta",
    "Lambda",
    "Xi",
    "Pi",
    "Sigma",
    "Upsilon",
    "Phi",
    "Psi",
    "Omega",
];

/// Control-symbol escapes that are kernel syntax: `\\`, `\,`, `\{`, `\}`.
const ALLOWED_SYMBOLS: &[char] = &['\\', ',', '{', '}'];

/// Extra rules whose output exercises other notation: Pochhammer symbols, √π, factorials.
const MORE_RULES: &[(&str, &str)] = &[
    (
        "half_integers",
        "a(k)/a(k-1) = -(k-1/2)/(2(k+2))  for k >= 2",
    ),
    (
        "pochhammer",
        "param c > 0\na(k)/a(k-1) = (k+c+6)/(k+c-1)  for k >= 1",
    ),
    ("attachment", "a(k)/a(k-1) = (k-1)/(k+2)  for k >= 4"),
];

fn documents() -> Vec<(String, String, bool, bool)> {
    let layout = SolveLayout {
        steps: true,
        standalone: true,
    };
    let mut all = examples();
    all.extend(
        MORE_RULES
            .iter()
            .map(|(n, r)| (n.to_string(), r.to_string())),
    );
    all.into_iter()
        .map(|(name, text)| {
            // The same path as `telescope solve --format latex --steps --standalone`;
            // piecewise breakpoints (integer parameters) are set to 3.
            let model = build_model(&text).unwrap();
            let values = breakpoint_values(&model);
            let solved = solve_model(&model, &values).unwrap();
            let doc = render::solve_report(
                &model,
                &solved,
                &SolveReport::default(),
                SolveFormat::Latex,
                layout,
            );
            (
                name,
                doc,
                render::has_derivation(&model),
                model.is_piecewise(),
            )
        })
        .collect()
}

/// Balanced braces (ignoring `\{` `\}`), balanced environments, known macros, ASCII only.
fn structural_problems(doc: &str) -> Vec<String> {
    let mut problems = Vec::new();
    if !doc.is_ascii() {
        problems.push("non-ASCII characters (pdflatex needs inputenc for them)".into());
    }
    let chars: Vec<char> = doc.chars().collect();
    let mut depth = 0i64;
    let mut environments: Vec<String> = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        match chars[i] {
            '\\' => {
                let next = chars.get(i + 1).copied().unwrap_or(' ');
                if next.is_ascii_alphabetic() {
                    let name: String = chars[i + 1..]
                        .iter()
                        .take_while(|c| c.is_ascii_alphabetic())
                        .collect();
                    if !ALLOWED.contains(&name.as_str()) {
                        problems.push(format!("macro \\{name} is not on the allow-list"));
                    }
                    let after = i + 1 + name.len();
                    if name == "begin" || name == "end" {
                        let env: String = chars[after..]
                            .iter()
                            .skip(1)
                            .take_while(|c| **c != '}')
                            .collect();
                        if name == "begin" {
                            environments.push(env);
                        } else if environments.pop().as_deref() != Some(env.as_str()) {
                            problems.push(format!(
                                "\\end{{{env}}} does not close the open environment"
                            ));
                        }
                    }
                    i = after;
                    continue;
                }
                if !ALLOWED_SYMBOLS.contains(&next) {
                    problems.push(format!("control symbol \\{next} is not on the allow-list"));
                }
                i += 2;
                continue;
            }
            '{' => depth += 1,
            '}' => {
                depth -= 1;
                if depth < 0 {
                    problems.push("a closing brace without an opening one".into());
                    depth = 0;
                }
            }
            _ => {}
        }
        i += 1;
    }
    if depth != 0 {
        problems.push(format!("{depth} unclosed braces"));
    }
    if !environments.is_empty() {
        problems.push(format!("unclosed environments {environments:?}"));
    }
    problems
}

/// The derivation steps are one `align*`; a rule derived from an equation or from rates adds
/// one more before it (the model's derivation); piecewise models have one per piece at most.
fn expected_aligns(doc: &str, derived: bool, piecewise: bool) -> Option<String> {
    let aligns = doc.matches("\\begin{align*}").count();
    let ok = if piecewise {
        aligns >= 1
    } else {
        aligns == 1 + derived as usize
    };
    (!ok).then(|| format!("{aligns} align* blocks (derived: {derived}, piecewise: {piecewise})"))
}

#[test]
fn every_standalone_derivation_is_structurally_sound() {
    for (name, doc, derived, piecewise) in documents() {
        let mut problems = structural_problems(&doc);
        problems.extend(expected_aligns(&doc, derived, piecewise));
        assert!(problems.is_empty(), "{name}: {problems:?}\n{doc}");
        assert!(doc.contains("\\usepackage{amsmath}"), "{name}");
        assert!(!doc.contains("\\usepackage{amssymb}"), "{name}");
    }
}

#[test]
fn the_structural_check_can_fail() {
    assert!(!structural_problems("\\begin{align*} \\frac{1}{2 \\end{align*}").is_empty());
    assert!(!structural_problems("\\begin{align*} \\mathbb{R} \\end{align*}").is_empty());
    assert!(!structural_problems("\\begin{align*} ρ \\end{align*}").is_empty());
    assert!(structural_problems("\\begin{align*} \\frac{1}{2} \\end{align*}").is_empty());
}

fn pdflatex() -> Option<PathBuf> {
    let path = std::env::var_os("PATH")?;
    std::env::split_paths(&path)
        .map(|dir| dir.join("pdflatex"))
        .find(|p| p.is_file())
}

#[test]
fn every_standalone_derivation_compiles_with_pdflatex() {
    let Some(pdflatex) = pdflatex() else {
        println!("skipped: pdflatex is not installed, only the structural check ran");
        return;
    };
    let dir = std::env::temp_dir().join(format!("telescope-latex-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for (name, doc, _, _) in documents() {
        let file = dir.join(format!("{name}.tex"));
        std::fs::write(&file, &doc).unwrap();
        let out = Command::new(&pdflatex)
            .args([
                "-interaction=nonstopmode",
                "-halt-on-error",
                "-no-shell-escape",
            ])
            .arg(&file)
            .current_dir(&dir)
            .output()
            .expect("pdflatex runs");
        assert!(
            out.status.success(),
            "{name}: pdflatex failed\n{}\n{doc}",
            String::from_utf8_lossy(&out.stdout)
        );
        assert!(dir.join(format!("{name}.pdf")).is_file(), "{name}: no PDF");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_flags_reach_the_binary() {
    let o = telescope(&[
        "solve",
        "examples/citation_growth.rule",
        "--format",
        "latex",
        "--steps",
        "--standalone",
    ]);
    assert!(o.status.success());
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.starts_with("\\documentclass{article}"), "{out}");
    assert!(out.contains("\\mathrm{B}"), "{out}");
    assert!(out.contains("DLMF 5.12.1"), "{out}");
    let o = telescope(&["solve", "examples/citation_growth.rule", "--steps"]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.contains("derivation\n"), "{out}");
    // A document needs LaTeX: --standalone with text output is a usage error (exit 2).
    let o = telescope(&["solve", "examples/citation_growth.rule", "--standalone"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("--format latex"));
}
