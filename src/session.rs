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

/// A seed from the clock, for runs without `--seed` (the output prints it).
pub fn clock_seed() -> u64 {
    use std::time::{SystemTime, UNIX_EPOCH};
    SystemTime::now()
        .duration_since(UNIX_EPOCH)
        .map(|d| d.as_nanos() as u64)
        .unwrap_or(0)
}

/// Largest `sample --n`.
pub const MAX_DRAWS: usize = 100_000_000;

/// `sample`: every parameter needs a value; the law must be a normalisable probability law.
pub fn run_sample(
    problem: &Problem,
    values: &BTreeMap<String, Q>,
    n: usize,
    seed: u64,
) -> Result<crate::sample::SampleRun, Error> {
    if n > MAX_DRAWS {
        return Err(Error::Usage(format!(
            "--n {n}: at most {MAX_DRAWS} draws at a time"
        )));
    }
    let missing: Vec<&str> = problem
        .params
        .iter()
        .filter(|p| !values.contains_key(&p.name))
        .map(|p| p.name.as_str())
        .collect();
    if !missing.is_empty() {
        return Err(Error::Usage(format!(
            "sample draws from one law: give every parameter a value (missing: --param {}=…)",
            missing.join("=… --param ")
        )));
    }
    crate::sample::sample_law(problem, values, n, seed)
        .map_err(|e| Error::Usage(format!("cannot sample this law: {}", e.message())))
}

/// Reads observed counts from a file or standard input (`-`); a bad row points at its line.
pub fn read_counts(arg: &str) -> Result<(Input, crate::data::Counts), Error> {
    let input = if arg == "-" {
        let mut text = String::new();
        std::io::stdin()
            .read_to_string(&mut text)
            .map_err(|e| Error::Usage(format!("cannot read standard input: {e}")))?;
        Input {
            name: "<stdin>".into(),
            text,
        }
    } else {
        let text = std::fs::read_to_string(arg)
            .map_err(|e| Error::Usage(format!("--data {arg}: cannot read it: {e}")))?;
        Input {
            name: arg.to_string(),
            text,
        }
    };
    let counts = crate::data::parse_counts(&input.text).map_err(|diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    })?;
    if counts.total() == 0 {
        return Err(Error::Usage(format!(
            "--data {}: no observations in it",
            input.name
        )));
    }
    Ok((input, counts))
}

/// One fitted model of `fit`: the argument that named it, its rule and the report.
pub struct FittedModel {
    pub name: String,
    pub problem: Problem,
    pub report: crate::fit::FitReport,
}

/// What `fit` was asked beyond the models and the data.
pub struct FitOptions<'a> {
    pub params: &'a [String],
    pub k_min: Option<i64>,
    pub bootstrap: usize,
    pub seed: u64,
    pub budget: crate::budget::Budget,
}

/// Largest `--bootstrap`.
pub const MAX_BOOTSTRAP: usize = 100_000;

/// Fits every model to the same counts. With several models and no `--k-min`, all are fitted
/// over k ≥ the largest base index, so that their likelihoods (and AICs) see the same data.
pub fn run_fit(
    inputs: &[String],
    counts: &crate::data::Counts,
    options: &FitOptions,
) -> Result<Vec<FittedModel>, Error> {
    if options.bootstrap > MAX_BOOTSTRAP {
        return Err(Error::Usage(format!(
            "--bootstrap {}: at most {MAX_BOOTSTRAP} replicates",
            options.bootstrap
        )));
    }
    if inputs.iter().filter(|i| *i == "-").count() > 1 {
        return Err(Error::Usage("only one INPUT can be standard input".into()));
    }
    let mut problems = Vec::new();
    for arg in inputs {
        let input = read_input(arg)?;
        problems.push((arg.clone(), load_problem(&input)?));
    }
    // Each --param applies to the models that have the parameter.
    for pair in options.params {
        let name = pair
            .split_once('=')
            .map_or(pair.as_str(), |(n, _)| n)
            .trim();
        if !problems.iter().any(|(_, p)| p.param(name).is_some()) {
            let single = problems.len() == 1;
            if single {
                parse_values(&problems[0].1, std::slice::from_ref(pair))?;
            }
            return Err(Error::Usage(format!(
                "--param {pair}: no model has a parameter `{name}`"
            )));
        }
    }
    let k_min = match options.k_min {
        Some(k) => Some(k),
        None if problems.len() > 1 => problems
            .iter()
            .filter_map(|(_, p)| num_traits::ToPrimitive::to_i64(&p.base_index()))
            .max(),
        None => None,
    };
    // Every model's cost is estimated before any is fitted; the whole command has one budget.
    let started = std::time::Instant::now();
    let deadline = std::time::Duration::try_from_secs_f64(options.budget.max_seconds)
        .ok()
        .and_then(|d| started.checked_add(d));
    let mut planned = Vec::new();
    let mut estimate: Option<crate::budget::Estimate> = None;
    for (name, problem) in problems {
        let own: Vec<String> = options
            .params
            .iter()
            .filter(|pair| {
                let n = pair
                    .split_once('=')
                    .map_or(pair.as_str(), |(n, _)| n)
                    .trim();
                problem.param(n).is_some()
            })
            .cloned()
            .collect();
        let fixed = parse_values(&problem, &own)?;
        let request = crate::fit::FitRequest {
            k_min,
            fixed,
            bootstrap: options.bootstrap,
            seed: options.seed,
            progress: true,
            estimates_only: false,
            deadline,
            max_seconds: Some(options.budget.max_seconds),
        };
        let cost = crate::fit::estimate_cost(&problem, counts, &request);
        estimate = Some(match estimate {
            None => cost,
            Some(e) => e.and(cost),
        });
        planned.push((name, problem, request));
    }
    if let Some(estimate) = &estimate {
        options
            .budget
            .admit(estimate)
            .map_err(|over| Error::Usage(over.to_string()))?;
    }
    // The bootstrap draws its own bar; without one the fit shows a spinner when it is long.
    let expected = estimate.map_or(0.0, |e| e.seconds);
    let spinner = if options.bootstrap == 0 {
        crate::budget::Progress::spinner("fitting", expected)
    } else {
        crate::budget::Progress::hidden()
    };
    let mut out = Vec::new();
    for (name, problem, request) in planned {
        let report = crate::fit::fit(&problem, counts, &request);
        out.push(FittedModel {
            name,
            problem,
            report,
        });
    }
    drop(spinner);
    Ok(out)
}
