//! The library's front door: read an input (rule string, model file or standard input),
//! interpret command-line values, and run a job. `main.rs` only wires arguments to these.

use std::collections::BTreeMap;
use std::io::Read;
use std::path::Path;

use num_bigint::BigInt;

use crate::algebra::{parse_q, Q};
use crate::diagnostic::Diagnostic;
use crate::model::{build_model, build_problem, Model, Param, Problem};
use crate::piecewise::{solve_model, ModelSolution};
use crate::solve::{solve, Solution};

/// The text of an input and the name to show in messages.
#[derive(Clone, Debug)]
pub struct Input {
    pub name: String,
    pub text: String,
}

/// A failure the user can act on; `main` prints it and exits with code 2.
#[derive(Debug)]
pub enum Error {
    /// Something wrong at a place in the input text.
    Input {
        input: Input,
        diagnostic: Diagnostic,
    },
    /// Something wrong with a command-line argument.
    Usage(String),
}

impl Error {
    pub fn render(&self) -> String {
        match self {
            Error::Input { input, diagnostic } => diagnostic.render(&input.name, &input.text),
            Error::Usage(message) => format!("error: {message}\n"),
        }
    }
}

/// Largest input accepted (absurd sizes are refused).
const MAX_INPUT_BYTES: usize = 1 << 20;

/// `-` reads standard input; an existing file is read; anything else is the rule itself.
pub fn read_input(arg: &str) -> Result<Input, Error> {
    let input = if arg == "-" {
        let mut text = String::new();
        std::io::stdin()
            .read_to_string(&mut text)
            .map_err(|e| Error::Usage(format!("cannot read standard input: {e}")))?;
        Input {
            name: "<stdin>".into(),
            text,
        }
    } else if Path::new(arg).is_file() {
        let text = std::fs::read_to_string(arg)
            .map_err(|e| Error::Usage(format!("cannot read {arg}: {e}")))?;
        Input {
            name: arg.to_string(),
            text,
        }
    } else if looks_like_a_path(arg) {
        return Err(Error::Usage(format!(
            "{arg}: no such file (a rule given in quotes needs its brackets, e.g. `(k-1)/(k+2)`)"
        )));
    } else {
        Input {
            name: "<rule>".into(),
            text: arg.to_string(),
        }
    };
    if input.text.len() > MAX_INPUT_BYTES {
        return Err(Error::Usage(format!(
            "{} is {} bytes; inputs are limited to {MAX_INPUT_BYTES}",
            input.name,
            input.text.len()
        )));
    }
    Ok(input)
}

/// A name that is meant as a file, not a rule: no brackets, spaces or `=`, and either the
/// model files' extension or a directory part that exists (a bare ratio like `1/k` has none).
fn looks_like_a_path(arg: &str) -> bool {
    if arg.contains(|c: char| c.is_whitespace() || "()=".contains(c)) {
        return false;
    }
    let dir = Path::new(arg).parent();
    arg.ends_with(".rule") || dir.is_some_and(|d| !d.as_os_str().is_empty() && d.is_dir())
}

/// Parses and interprets the input.
pub fn load_problem(input: &Input) -> Result<Problem, Error> {
    build_problem(&input.text).map_err(|diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    })
}

/// Parses and interprets a whole model (pieces, boundary, derivation).
pub fn load_model(input: &Input) -> Result<Model, Error> {
    build_model(&input.text).map_err(|diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    })
}

/// `NAME=VALUE` pairs, exact, checked against the model's parameters and declared ranges.
pub fn parse_values(problem: &Problem, pairs: &[String]) -> Result<BTreeMap<String, Q>, Error> {
    parse_values_for(&problem.params, pairs)
}

/// `NAME=VALUE` pairs checked against a list of parameters.
pub fn parse_values_for(params: &[Param], pairs: &[String]) -> Result<BTreeMap<String, Q>, Error> {
    let mut values = BTreeMap::new();
    for pair in pairs {
        let Some((name, value)) = pair.split_once('=') else {
            return Err(Error::Usage(format!(
                "--param {pair}: expected NAME=VALUE, e.g. --param rho=3/10"
            )));
        };
        let (name, value) = (name.trim(), value.trim());
        let Some(param) = params.iter().find(|p| p.name == name) else {
            let known: Vec<&str> = params.iter().map(|p| p.name.as_str()).collect();
            let list = if known.is_empty() {
                "none".to_string()
            } else {
                known.join(", ")
            };
            return Err(Error::Usage(format!(
                "--param {pair}: the model has no parameter `{name}` (its parameters: {list})"
            )));
        };
        let Some(q) = parse_q(value) else {
            return Err(Error::Usage(format!(
                "--param {pair}: `{value}` is not a number (write 3/10, 0.3 or 12)"
            )));
        };
        if !param.admits(&q) {
            return Err(Error::Usage(format!(
                "--param {pair}: {value} is outside the declared range of `{name}`"
            )));
        }
        if values.insert(name.to_string(), q).is_some() {
            return Err(Error::Usage(format!("--param {name} is given twice")));
        }
    }
    Ok(values)
}

/// An exact value such as `--base 5/7`.
pub fn parse_value(flag: &str, text: &str) -> Result<Q, Error> {
    parse_q(text.trim()).ok_or_else(|| {
        Error::Usage(format!(
            "{flag} {text}: not a number (write 3/10, 0.3 or 12)"
        ))
    })
}

/// `A..B` with integers A ≤ B.
pub fn parse_k_range(text: &str) -> Result<(BigInt, BigInt), Error> {
    let bad = || {
        Error::Usage(format!(
            "--k {text}: expected A..B with whole numbers, e.g. --k 1..100"
        ))
    };
    let (a, b) = text.split_once("..").ok_or_else(bad)?;
    let a: BigInt = a.trim().parse().map_err(|_| bad())?;
    let b: BigInt = b.trim().parse().map_err(|_| bad())?;
    if b < a {
        return Err(Error::Usage(format!(
            "--k {text}: the range is empty (A > B)"
        )));
    }
    Ok((a, b))
}

/// Solves with the given values; messages point into the input.
pub fn run_solve(
    input: &Input,
    problem: &Problem,
    values: &BTreeMap<String, Q>,
) -> Result<Solution, Error> {
    solve(problem, values).map_err(|diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    })
}

/// Solves every piece of a model with the given values; messages point into the input.
pub fn run_solve_model(
    input: &Input,
    model: &Model,
    values: &BTreeMap<String, Q>,
) -> Result<ModelSolution, Error> {
    solve_model(model, values).map_err(|diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    })
}

/// The base term's value: `--base`, else the model's boundary equation evaluated, else 1.
pub fn base_value(
    model: &Model,
    values: &BTreeMap<String, Q>,
    flag: Option<&str>,
) -> Result<Q, Error> {
    match (&model.boundary, flag) {
        (Some(b), Some(_)) => Err(Error::Usage(format!(
            "--base: the model fixes {}({}) by its boundary equation; drop --base or the equation",
            model.sequence, b.index
        ))),
        (None, Some(text)) => parse_value("--base", text),
        (Some(b), None) => b.value.eval(values).map_err(|e| {
            Error::Usage(format!(
                "the boundary value {}({}) cannot be evaluated with these parameters ({e}); give every parameter with --param",
                model.sequence, b.index
            ))
        }),
        (None, None) => Ok(Q::from_integer(1.into())),
    }
}

/// `--prob` events, read against the model's index and parameters; messages point into the
/// event text.
pub fn parse_events(
    model: &Model,
    texts: &[String],
) -> Result<Vec<crate::probability::Event>, Error> {
    texts
        .iter()
        .map(|text| {
            crate::probability::parse_event(text, &model.index, &model.params).map_err(
                |diagnostic| Error::Input {
                    input: Input {
                        name: "--prob".into(),
                        text: text.clone(),
                    },
                    diagnostic,
                },
            )
        })
        .collect()
}
