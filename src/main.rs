//! The `telescope` command: argument wiring only; all the work is in the library.

use std::process::ExitCode;

use clap::{Parser, Subcommand, ValueEnum};

use num_traits::ToPrimitive;

use telescope::analysis::{analyse, AnalysisRequest};
use telescope::budget::{self, Budget, Estimate};
use telescope::html_report;
use telescope::piecewise::build_piecewise_table;
use telescope::probability::{analyse_model, normalized_piecewise_table};
use telescope::render;
use telescope::session::{self, Error};
use telescope::table::{build_normalized_table, build_table, build_table_into, TableRequest};

#[derive(Parser)]
#[command(
    name = "telescope",
    version,
    about = "Solve ratio rules a(k)/a(k-1) = R(k) into checked Gamma/Beta closed forms"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
    /// Time budget in seconds: work estimated to take longer is refused before it starts
    /// (default 10).
    #[arg(long, global = true, value_name = "SECONDS")]
    max_seconds: Option<f64>,
}

#[derive(Subcommand)]
enum Command {
    /// Closed form, support and conditions of a rule.
    Solve {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// A parameter value, exact: NAME=3/10 or NAME=0.3 (repeatable).
        #[arg(long = "param", value_name = "NAME=VALUE", allow_hyphen_values = true)]
        params: Vec<String>,
        #[arg(long, value_enum, default_value_t = SolveFormat::Text)]
        format: SolveFormat,
        /// Add the derivation: the telescoped product, the Gamma form, every rewrite.
        #[arg(long)]
        steps: bool,
        /// With --format latex: a complete document (pdflatex + amsmath).
        #[arg(long)]
        standalone: bool,
        /// Correction terms c₁…c_N of the tail law.
        #[arg(long, default_value_t = 2)]
        terms: usize,
        /// Significant digits of the total, mean, variance and prefactor.
        #[arg(long, default_value_t = 30)]
        digits: u32,
        /// Treat the sequence as a probability distribution: a(b) so that the total is 1.
        #[arg(long)]
        normalize: bool,
        /// A probability under the normalised law: "k >= K", "k <= K", "K1 <= k <= K2",
        /// "k = K", bounds in the parameters (repeatable).
        #[arg(long = "prob", value_name = "EVENT", allow_hyphen_values = true)]
        prob: Vec<String>,
    },
    /// Direct products next to the closed form, with their relative difference.
    Table {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// The rows, A..B.
        #[arg(long = "k", value_name = "A..B", allow_hyphen_values = true)]
        k: String,
        #[arg(long = "param", value_name = "NAME=VALUE", allow_hyphen_values = true)]
        params: Vec<String>,
        /// Significant digits of every printed value.
        #[arg(long, default_value_t = 30)]
        digits: u32,
        /// The base term's value a(b) (default: the model's boundary equation, else 1).
        #[arg(long, value_name = "VALUE", allow_hyphen_values = true)]
        base: Option<String>,
        /// Check the closed form on every row, not a log-spaced sample.
        #[arg(long)]
        check_all: bool,
        /// a(b) chosen so that the total over the support is 1 (instead of --base).
        #[arg(long, conflicts_with = "base")]
        normalize: bool,
        #[arg(long, value_enum, default_value_t = TableFormat::Text)]
        format: TableFormat,
    },
    /// A self-contained HTML page: formulas (MathML), derivation, evidence table and plots.
    Report {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        #[arg(long = "param", value_name = "NAME=VALUE")]
        params: Vec<String>,
        /// Significant digits of every number on the page.
        #[arg(long, default_value_t = 30)]
        digits: u32,
        /// The rows of the evidence table and the plots, A..B (default: from the support and
        /// the tail).
        #[arg(long = "k", value_name = "A..B")]
        k: Option<String>,
        /// The page's file (default: the model file's stem + .html, or report.html); - for
        /// standard output.
        #[arg(short = 'o', long = "output", value_name = "FILE")]
        output: Option<String>,
        /// A probability under the normalised law: "k >= K", "k <= K", "K1 <= k <= K2",
        /// "k = K" (repeatable).
        #[arg(long = "prob", value_name = "EVENT", allow_hyphen_values = true)]
        prob: Vec<String>,
    },
    /// Prove or refute a claimed closed form, and say what is wrong with it.
    Check {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// The claimed a(k), e.g. "n(1) * (7/2) * Beta(k, 7/2)".
        #[arg(long, value_name = "EXPR", allow_hyphen_values = true)]
        claim: String,
        #[arg(long = "param", value_name = "NAME=VALUE", allow_hyphen_values = true)]
        params: Vec<String>,
        /// The base term's value a(b) (default 1).
        #[arg(long, value_name = "VALUE", allow_hyphen_values = true)]
        base: Option<String>,
        /// Significant digits of the numeric comparison.
        #[arg(long, default_value_t = telescope::check::DEFAULT_DIGITS)]
        digits: u32,
        #[arg(long, value_enum, default_value_t = CheckFormat::Text)]
        format: CheckFormat,
    },
    /// The answers across a parameter range (or a grid of two): rate, exponent, total, moments.
    Sweep {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// The varied parameter and its range, NAME=A..B; twice for a grid.
        #[arg(long, value_name = "NAME=A..B", required = true)]
        vary: Vec<String>,
        /// Points along each varied parameter, ends included (default 51).
        #[arg(long, value_name = "N")]
        points: Option<u64>,
        /// Walk from A by this step instead (exact: 0.05 or 1/20).
        #[arg(long, value_name = "S")]
        step: Option<String>,
        /// Log-spaced points (and a log axis in SVG).
        #[arg(long)]
        log: bool,
        #[arg(long = "param", value_name = "NAME=VALUE")]
        params: Vec<String>,
        /// Comma-separated: rate, theta, prefactor, total, mean, variance, a(K).
        #[arg(long, value_name = "LIST")]
        quantities: Option<String>,
        /// Significant digits of every number.
        #[arg(long, default_value_t = 30)]
        digits: u32,
        #[arg(long, value_enum, default_value_t = SweepFormat::Text)]
        format: SweepFormat,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
    /// Independent draws from the normalised law (inverse CDF over the running product).
    Sample {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// A parameter value, exact (every parameter needs one).
        #[arg(long = "param", value_name = "NAME=VALUE")]
        params: Vec<String>,
        /// Number of draws.
        #[arg(long, value_name = "N")]
        n: usize,
        /// Seed of the random stream (default: from the clock, and printed).
        #[arg(long, value_name = "S")]
        seed: Option<u64>,
        #[arg(long, value_enum, default_value_t = SampleFormat::Text)]
        format: SampleFormat,
    },
    /// Maximum-likelihood fit of the parameters to observed counts, with errors, intervals
    /// and goodness of fit; several INPUTs are ranked by AIC.
    Fit {
        /// Rules in quotes, model files, or - for standard input.
        #[arg(required = true)]
        inputs: Vec<String>,
        /// Observed counts: CSV `k,count` or one observed k per line; - for standard input.
        #[arg(long, value_name = "FILE")]
        data: String,
        /// Hold a parameter at a value instead of fitting it (repeatable).
        #[arg(long = "param", value_name = "NAME=VALUE")]
        params: Vec<String>,
        /// Leave out k < K and renormalise the law over k ≥ K.
        #[arg(long = "k-min", value_name = "K", allow_hyphen_values = true)]
        k_min: Option<i64>,
        /// Parametric-bootstrap replicates for the Kolmogorov–Smirnov p-value.
        #[arg(long, value_name = "N", default_value_t = 0)]
        bootstrap: usize,
        /// Seed of the bootstrap's random streams (default: from the clock, and printed).
        #[arg(long, value_name = "S")]
        seed: Option<u64>,
        #[arg(long, value_enum, default_value_t = FitFormat::Text)]
        format: FitFormat,
    },
}

#[derive(Clone, Copy, ValueEnum)]
enum SweepFormat {
    Text,
    Csv,
    Json,
    Svg,
}

#[derive(Clone, Copy, ValueEnum)]
enum FitFormat {
    Text,
    Json,
}

#[derive(Clone, Copy, ValueEnum)]
enum SampleFormat {
    Text,
    Csv,
}

#[derive(Clone, Copy, ValueEnum)]
enum CheckFormat {
    Text,
    Json,
}

#[derive(Clone, Copy, ValueEnum)]
enum SolveFormat {
    Text,
    Latex,
    Json,
}

#[derive(Clone, Copy, ValueEnum)]
enum TableFormat {
    Text,
    Csv,
    Json,
    /// Plot (1) of the report alone: a(k) against k, as SVG.
    Svg,
}

/// Largest `--digits` accepted.
const MAX_DIGITS: u32 = 10_000;
/// Largest `--terms` accepted: c_n is built over one common denominator (analysis::tail), so
/// --terms 12 on the citation rule takes 0.3 s and 20 a few seconds.
const MAX_TERMS: usize = 20;
/// Largest `--digits` for `solve` and `report`, whose sums grow with about the cube of the
/// digits (1000 digits of the citation example: 1.5 s; 2000: about 30 s).
const MAX_SOLVE_DIGITS: u32 = 1000;

/// Refuses work estimated beyond the budget (exit 2, with the estimate and `--max-seconds`).
fn admit(budget: Budget, estimate: &Estimate) -> Result<(), Error> {
    budget
        .admit(estimate)
        .map_err(|over| Error::Usage(over.to_string()))
}

fn run(cli: Cli) -> Result<String, Error> {
    let budget = Budget::with_max_seconds(cli.max_seconds);
    match cli.command {
        // `main` calls `run_check` itself, to turn a refuted claim into exit code 1.
        command @ Command::Check { .. } => run_check(command, budget).map(|(out, _)| out),
        Command::Solve {
            input,
            params,
            format,
            steps,
            standalone,
            terms,
            digits,
            normalize,
            prob,
        } => {
            if standalone && !matches!(format, SolveFormat::Latex) {
                return Err(Error::Usage(
                    "--standalone makes a LaTeX document: use it with --format latex".into(),
                ));
            }
            if digits == 0 || digits > MAX_SOLVE_DIGITS {
                return Err(Error::Usage(format!(
                    "--digits {digits}: choose 1 to {MAX_SOLVE_DIGITS}"
                )));
            }
            if terms > MAX_TERMS {
                return Err(Error::Usage(format!(
                    "--terms {terms}: choose 0 to {MAX_TERMS}"
                )));
            }
            let layout = render::SolveLayout { steps, standalone };
            let input = session::read_input(&input)?;
            let model = session::load_model(&input)?;
            let values = session::parse_values_for(&model.params, &params)?;
            let numeric = model.params.iter().all(|p| values.contains_key(&p.name));
            let free = model.params.len() - values.len().min(model.params.len());
            admit(
                budget,
                &Estimate::solve(terms, free, numeric.then_some(digits)),
            )?;
            if model.is_piecewise()
                && telescope::piecewise::symbolic::has_symbolic_breakpoints(&model, &values)
            {
                if normalize {
                    return Err(Error::Usage(
                        "--normalize needs the breakpoints' values (--param c=…); without them solve gives the symbolic forms".into(),
                    ));
                }
                let events = session::parse_events(&model, &prob)?;
                let symbolic = telescope::piecewise::symbolic::solve_symbolic(&model, &values)
                    .map_err(|diagnostic| Error::Input {
                        input: input.clone(),
                        diagnostic,
                    })?;
                return Ok(match format {
                    SolveFormat::Text => {
                        render::symbolic_output::symbolic_text(&model, &symbolic, &events)
                    }
                    SolveFormat::Latex => {
                        render::symbolic_output::symbolic_latex(&symbolic, &events)
                    }
                    SolveFormat::Json => pretty(&render::symbolic_output::symbolic_json(
                        &model, &symbolic, &events,
                    )),
                });
            }
            let solved = session::run_solve_model(&input, &model, &values)?;
            let events = session::parse_events(&model, &prob)?;
            let probabilities = telescope::probability::probabilities(&solved, &events, digits);
            let to_error = |diagnostic| Error::Input {
                input: input.clone(),
                diagnostic,
            };
            let request = AnalysisRequest {
                terms,
                digits,
                normalize,
            };
            let analysis = if model.is_piecewise() {
                analyse_model(&solved, &request).map_err(to_error)?
            } else {
                let piece = &solved.pieces[0];
                analyse(&piece.problem, &piece.solution, &request).map_err(to_error)?
            };
            let format = match format {
                SolveFormat::Text => render::SolveFormat::Text,
                SolveFormat::Latex => render::SolveFormat::Latex,
                SolveFormat::Json => render::SolveFormat::Json,
            };
            let report = render::SolveReport {
                analysis: Some(&analysis),
                digits,
                probabilities: &probabilities,
            };
            Ok(render::solve_report(
                &model, &solved, &report, format, layout,
            ))
        }
        Command::Sweep {
            input,
            vary,
            points,
            step,
            log,
            params,
            quantities,
            digits,
            format,
            quiet,
        } => {
            use telescope::sweep::command::{run_command, SweepArgs, SweepFormat as Out};
            run_command(SweepArgs {
                input,
                vary,
                points,
                step,
                log,
                params,
                quantities,
                digits,
                format: match format {
                    SweepFormat::Text => Out::Text,
                    SweepFormat::Csv => Out::Csv,
                    SweepFormat::Json => Out::Json,
                    SweepFormat::Svg => Out::Svg,
                },
                quiet,
                budget,
            })
        }
        Command::Report {
            input,
            params,
            digits,
            k,
            output,
            prob,
        } => {
            if digits == 0 || digits > MAX_SOLVE_DIGITS {
                return Err(Error::Usage(format!(
                    "--digits {digits}: choose 1 to {MAX_SOLVE_DIGITS}"
                )));
            }
            let request = html_report::ReportRequest {
                input_arg: input.clone(),
                params,
                digits,
                k,
                terms: 2,
                prob,
                budget,
            };
            let text = session::read_input(&input)?;
            let page = html_report::build_report(&text, &request)?;
            let html = render::html::report_html(&page);
            let path = match output.as_deref() {
                Some("-") => return Ok(html),
                Some(path) => std::path::PathBuf::from(path),
                None => html_report::default_output(&input),
            };
            html_report::write_atomically(&path, &html)?;
            eprintln!(
                "wrote {} ({} kB)",
                path.display(),
                html.len().div_ceil(1000)
            );
            Ok(String::new())
        }
        Command::Fit {
            inputs,
            data,
            params,
            k_min,
            bootstrap,
            seed,
            format,
        } => {
            let options = session::FitOptions {
                params: &params,
                k_min,
                bootstrap,
                seed: seed.unwrap_or_else(session::clock_seed),
                budget,
            };
            run_fit(&inputs, &data, &options, format)
        }
        Command::Sample {
            input,
            params,
            n,
            seed,
            format,
        } => run_sample(&input, &params, n, seed, format, budget),
        Command::Table {
            input,
            k,
            params,
            digits,
            base,
            check_all,
            normalize,
            format,
        } => {
            if digits == 0 || digits > MAX_DIGITS {
                return Err(Error::Usage(format!(
                    "--digits {digits}: choose 1 to {MAX_DIGITS}"
                )));
            }
            let (from, to) = session::parse_k_range(&k)?;
            let input = session::read_input(&input)?;
            let model = session::load_model(&input)?;
            let rows = (&to - &from + 1u32).to_u64().unwrap_or(u64::MAX);
            let checked = if check_all { rows } else { 64.min(rows) };
            let factors = model.pieces.iter().map(|p| p.ratio.factors.len()).max();
            let mut estimate = Estimate::table(rows, digits, checked, factors.unwrap_or(1));
            if normalize {
                estimate = estimate.and(Estimate::solve(0, 0, Some(digits + 5)));
            }
            admit(budget, &estimate)?;
            let values = session::parse_values_for(&model.params, &params)?;
            let base_value = session::base_value(&model, &values, base.as_deref())?;
            let solved = session::run_solve_model(&input, &model, &values)?;
            let request = TableRequest {
                from,
                to,
                digits,
                base_value,
                check_all,
            };
            let to_error = |diagnostic| Error::Input {
                input: input.clone(),
                diagnostic,
            };
            if normalize {
                let table = if model.is_piecewise() {
                    normalized_piecewise_table(&solved, &request, model.pieces[0].span.clone())
                } else {
                    let piece = &solved.pieces[0];
                    build_normalized_table(&piece.problem, &piece.solution, &request)
                }
                .map_err(to_error)?;
                return Ok(match format {
                    TableFormat::Text => render::analysis_output::normalized_table_text(&table),
                    TableFormat::Csv => render::table_csv(&table.table),
                    TableFormat::Json => {
                        pretty(&render::analysis_output::normalized_table_json(&table))
                    }
                    TableFormat::Svg => html_report::table_svg(&solved, &table.table)?,
                });
            }
            if matches!(format, TableFormat::Csv) && !model.is_piecewise() {
                // Rows are written as they are made: a long table is never held in memory.
                let mut csv = render::CsvRows::new(request.digits);
                let piece = &solved.pieces[0];
                build_table_into(&piece.problem, &piece.solution, &request, &mut csv)
                    .map_err(to_error)?;
                return Ok(csv.finish());
            }
            let built = if model.is_piecewise() {
                build_piecewise_table(&solved, &request, model.pieces[0].span.clone())
            } else {
                build_table(
                    &solved.pieces[0].problem,
                    &solved.pieces[0].solution,
                    &request,
                )
            };
            let table = built.map_err(to_error)?;
            Ok(match format {
                TableFormat::Text => render::table_text(&table),
                TableFormat::Csv => render::table_csv(&table),
                TableFormat::Json => pretty(&render::table_json(&table)),
                TableFormat::Svg => html_report::table_svg(&solved, &table)?,
            })
        }
    }
}

/// `telescope sample`.
fn run_sample(
    input: &str,
    params: &[String],
    n: usize,
    seed: Option<u64>,
    format: SampleFormat,
    budget: Budget,
) -> Result<String, Error> {
    let input = session::read_input(input)?;
    let problem = session::load_problem(&input)?;
    let values = session::parse_values(&problem, params)?;
    let estimate = Estimate::sample(n as u64);
    admit(budget, &estimate)?;
    let seed = seed.unwrap_or_else(session::clock_seed);
    let spinner = budget::Progress::spinner("drawing", estimate.seconds);
    let run = session::run_sample(&problem, &values, n, seed)?;
    drop(spinner);
    Ok(match format {
        SampleFormat::Text => {
            let rule = render::sample_output::rule_text(&problem);
            render::sample_output::sample_text(&run, &rule)
        }
        SampleFormat::Csv => render::sample_output::sample_csv(&run),
    })
}

/// `telescope fit`.
fn run_fit(
    inputs: &[String],
    data: &str,
    options: &session::FitOptions,
    format: FitFormat,
) -> Result<String, Error> {
    use render::fit_output::{comparison_json, comparison_text, fit_json, fit_text, FitHeading};
    if data == "-" && inputs.iter().any(|i| i == "-") {
        return Err(Error::Usage(
            "--data - and INPUT - both want standard input; put one in a file".into(),
        ));
    }
    let (data_input, counts) = session::read_counts(data)?;
    let mut fitted = session::run_fit(inputs, &counts, options)?;
    let data_name = data_input.name;
    if fitted.len() == 1 {
        let model = &fitted[0];
        let rule = render::sample_output::rule_text(&model.problem);
        let heading = FitHeading {
            rule: &rule,
            data: &data_name,
        };
        return Ok(match format {
            FitFormat::Text => fit_text(&model.report, &heading),
            FitFormat::Json => pretty(&fit_json(&model.report, &heading)),
        });
    }
    let mut reports: Vec<(String, telescope::fit::FitReport)> =
        fitted.drain(..).map(|m| (m.name, m.report)).collect();
    telescope::fit::rank_by_aic(&mut reports);
    Ok(match format {
        FitFormat::Text => comparison_text(&reports, &data_name),
        FitFormat::Json => pretty(&comparison_json(&reports, &data_name)),
    })
}

/// `telescope check`: the report, and whether the claim holds (proved or holds numerically).
fn run_check(command: Command, budget: Budget) -> Result<(String, bool), Error> {
    use telescope::check::{check_claim, CheckError, CheckRequest, Verdict, MIN_DIGITS};
    let Command::Check {
        input,
        claim,
        params,
        base,
        digits,
        format,
    } = command
    else {
        return Err(Error::Usage("not a check".into()));
    };
    if !(MIN_DIGITS..=MAX_DIGITS).contains(&digits) {
        return Err(Error::Usage(format!(
            "--digits {digits}: choose {MIN_DIGITS} to {MAX_DIGITS} for a check"
        )));
    }
    let input = session::read_input(&input)?;
    let problem = session::load_problem(&input)?;
    let values = session::parse_values(&problem, &params)?;
    // Three points per free parameter (check::points), or the one point of the values.
    let free = problem.params.len().saturating_sub(values.len());
    admit(budget, &Estimate::check(3 * free.max(1), digits))?;
    let base = base
        .map(|b| session::parse_value("--base", &b))
        .transpose()?;
    let request = CheckRequest {
        claim: claim.clone(),
        values,
        base,
        digits,
    };
    let report = check_claim(&problem, &request).map_err(|e| match e {
        // Claim errors point into the claim, rule errors into the rule.
        CheckError::Claim(diagnostic) => Error::Input {
            input: session::Input {
                name: "--claim".into(),
                text: claim.clone(),
            },
            diagnostic,
        },
        CheckError::Rule(diagnostic) => Error::Input {
            input: input.clone(),
            diagnostic,
        },
    })?;
    let out = match format {
        CheckFormat::Text => render::check_text(&report),
        CheckFormat::Json => pretty(&render::check_json(&report)),
    };
    Ok((out, report.verdict != Verdict::Refuted))
}

fn pretty(v: &serde_json::Value) -> String {
    serde_json::to_string_pretty(v).expect("JSON values always serialise") + "\n"
}

fn main() -> ExitCode {
    budget::enable_progress(std::io::IsTerminal::is_terminal(&std::io::stderr()));
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    let outcome = match cli.command {
        Command::Check { .. } => run_check(cli.command, Budget::with_max_seconds(cli.max_seconds)),
        _ => run(cli).map(|out| (out, true)),
    };
    match outcome {
        Ok((out, holds)) => {
            // A reader that stops early (`| head`) closes the pipe; that is not an error of ours,
            // and `print!` would panic on it.
            let _ = std::io::Write::write_all(&mut std::io::stdout().lock(), out.as_bytes());
            // A refuted claim is a result, not an error: its report goes to stdout, exit 1.
            ExitCode::from(if holds { 0 } else { 1 })
        }
        Err(e) => {
            eprint!("{}", e.render());
            ExitCode::from(2)
        }
    }
}
