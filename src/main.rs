//! The `telescope` command: argument wiring only; all the work is in the library.

use std::process::ExitCode;

use clap::{Parser, Subcommand, ValueEnum};

use telescope::piecewise::build_piecewise_table;
use telescope::render;
use telescope::session::{self, Error};
use telescope::table::{build_table, TableRequest};

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
        /// The base term's value a(b) (default: the model's boundary equation, else 1).
        #[arg(long, value_name = "VALUE")]
        base: Option<String>,
        /// Check the closed form on every row, not a log-spaced sample.
        #[arg(long)]
        check_all: bool,
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

fn run(cli: Cli) -> Result<String, Error> {
    match cli.command {
        Command::Solve {
            input,
            params,
            format,
        } => {
            let input = session::read_input(&input)?;
            let model = session::load_model(&input)?;
            let values = session::parse_values_for(&model.params, &params)?;
            if model.is_piecewise() {
                let solved = session::run_solve_model(&input, &model, &values)?;
                let sum = session::model_sum(&model, &solved)?;
                return Ok(match format {
                    SolveFormat::Text => render::piecewise_text(&model, &solved, sum.as_ref()),
                    SolveFormat::Latex => render::piecewise_latex(&model, &solved),
                    SolveFormat::Json => {
                        pretty(&render::piecewise_json(&model, &solved, sum.as_ref()))
                    }
                });
            }
            let solved = session::run_solve_model(&input, &model, &values)?;
            let (problem, solution) = (&solved.pieces[0].problem, &solved.pieces[0].solution);
            // The derivation (equation as written → ratio) comes before the solution.
            let shown = render::has_derivation(&model);
            Ok(match format {
                SolveFormat::Text if shown => {
                    render::derivation_text(&model) + "\n" + &render::solve_text(problem, solution)
                }
                SolveFormat::Text => render::solve_text(problem, solution),
                SolveFormat::Latex if shown => {
                    render::derivation_latex(&model) + &render::solve_latex(problem, solution)
                }
                SolveFormat::Latex => render::solve_latex(problem, solution),
                SolveFormat::Json => {
                    let mut json = render::solve_json(problem, solution);
                    json["derivation"] = render::derivation_json(&model);
                    pretty(&json)
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
            let built = if model.is_piecewise() {
                build_piecewise_table(&solved, &request, model.pieces[0].span.clone())
            } else {
                build_table(
                    &solved.pieces[0].problem,
                    &solved.pieces[0].solution,
                    &request,
                )
            };
            let table = built.map_err(|diagnostic| Error::Input {
                input: input.clone(),
                diagnostic,
            })?;
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
