//! The `telescope` command: argument wiring only; all the work is in the library.

use std::process::ExitCode;

use clap::{Parser, Subcommand, ValueEnum};

use telescope::algebra::Q;
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
        /// Add the derivation: the telescoped product, the Gamma form, every rewrite.
        #[arg(long)]
        steps: bool,
        /// With --format latex: a complete document (pdflatex + amsmath).
        #[arg(long)]
        standalone: bool,
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
            steps,
            standalone,
        } => {
            if standalone && !matches!(format, SolveFormat::Latex) {
                return Err(Error::Usage(
                    "--standalone makes a LaTeX document: use it with --format latex".into(),
                ));
            }
            let layout = render::SolveLayout { steps, standalone };
            let input = session::read_input(&input)?;
            let problem = session::load_problem(&input)?;
            let values = session::parse_values(&problem, &params)?;
            let solution = session::run_solve(&input, &problem, &values)?;
            Ok(match format {
                SolveFormat::Text => render::solve_text_with(&problem, &solution, layout),
                SolveFormat::Latex => render::solve_latex_with(&problem, &solution, layout),
                SolveFormat::Json => pretty(&render::solve_json(&problem, &solution)),
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
            let table =
                build_table(&problem, &solution, &request).map_err(|diagnostic| Error::Input {
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
