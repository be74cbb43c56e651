//! The `telescope` command: argument wiring only; all the work is in the library.

use std::process::ExitCode;

use clap::{Parser, Subcommand, ValueEnum};

use telescope::algebra::Q;
use telescope::analysis::{analyse, AnalysisRequest};
use telescope::render;
use telescope::session::{self, Error};
use telescope::table::{build_normalized_table, build_table, TableRequest};

#[derive(Parser)]
#[command(
    name = "telescope",
    version,
    about = "Solve ratio rules a(k)/a(k-1) = R(k) into checked Gamma/Beta closed forms"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Closed form, support and conditions of a rule.
    Solve {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// A parameter value, exact: NAME=3/10 or NAME=0.3 (repeatable).
        #[arg(long = "param", value_name = "NAME=VALUE")]
        params: Vec<String>,
        #[arg(long, value_enum, default_value_t = SolveFormat::Text)]
        format: SolveFormat,
        /// Correction terms c₁…c_N of the tail law.
        #[arg(long, default_value_t = 2)]
        terms: usize,
        /// Significant digits of the total, mean, variance and prefactor.
        #[arg(long, default_value_t = 30)]
        digits: u32,
        /// Treat the sequence as a probability distribution: a(b) so that the total is 1.
        #[arg(long)]
        normalize: bool,
    },
    /// Direct products next to the closed form, with their relative difference.
    Table {
        /// A rule in quotes, a model file, or - for standard input.
        input: String,
        /// The rows, A..B.
        #[arg(long = "k", value_name = "A..B")]
        k: String,
        #[arg(long = "param", value_name = "NAME=VALUE")]
        params: Vec<String>,
        /// Significant digits of every printed value.
        #[arg(long, default_value_t = 30)]
        digits: u32,
        /// The base term's value a(b) (default 1).
        #[arg(long, value_name = "VALUE")]
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
}

/// Largest `--digits` accepted.
const MAX_DIGITS: u32 = 10_000;
/// Largest `--terms` accepted (each term is a Bernoulli polynomial of that degree).
const MAX_TERMS: usize = 40;
/// Largest `--digits` for `solve`, whose sums get slower with the digits.
const MAX_SOLVE_DIGITS: u32 = 2_000;

fn run(cli: Cli) -> Result<String, Error> {
    match cli.command {
        Command::Solve {
            input,
            params,
            format,
            terms,
            digits,
            normalize,
        } => {
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
            let input = session::read_input(&input)?;
            let problem = session::load_problem(&input)?;
            let values = session::parse_values(&problem, &params)?;
            let solution = session::run_solve(&input, &problem, &values)?;
            let request = AnalysisRequest {
                terms,
                digits,
                normalize,
            };
            let analysis =
                analyse(&problem, &solution, &request).map_err(|diagnostic| Error::Input {
                    input: input.clone(),
                    diagnostic,
                })?;
            Ok(match format {
                SolveFormat::Text => {
                    render::solve_text(&problem, &solution) + &render::analysis_text(&analysis)
                }
                SolveFormat::Latex => {
                    render::solve_latex(&problem, &solution) + &render::analysis_latex(&analysis)
                }
                SolveFormat::Json => {
                    let mut v = render::solve_json(&problem, &solution);
                    if let serde_json::Value::Object(m) = &mut v {
                        m.insert("digits".into(), digits.to_string().into());
                        m.extend(render::analysis_json(&analysis));
                    }
                    pretty(&v)
                }
            })
        }
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
            let problem = session::load_problem(&input)?;
            let values = session::parse_values(&problem, &params)?;
            let base_value = match base {
                Some(b) => session::parse_value("--base", &b)?,
                None => Q::from_integer(1.into()),
            };
            let solution = session::run_solve(&input, &problem, &values)?;
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
                let table =
                    build_normalized_table(&problem, &solution, &request).map_err(to_error)?;
                return Ok(match format {
                    TableFormat::Text => render::analysis_output::normalized_table_text(&table),
                    TableFormat::Csv => render::table_csv(&table.table),
                    TableFormat::Json => {
                        pretty(&render::analysis_output::normalized_table_json(&table))
                    }
                });
            }
            let table = build_table(&problem, &solution, &request).map_err(to_error)?;
            Ok(match format {
                TableFormat::Text => render::table_text(&table),
                TableFormat::Csv => render::table_csv(&table),
                TableFormat::Json => pretty(&render::table_json(&table)),
            })
        }
    }
}

fn pretty(v: &serde_json::Value) -> String {
    serde_json::to_string_pretty(v).expect("JSON values always serialise") + "\n"
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match run(cli) {
        Ok(out) => {
            print!("{out}");
            ExitCode::SUCCESS
        }
        Err(e) => {
            eprint!("{}", e.render());
            ExitCode::from(2)
        }
    }
}
