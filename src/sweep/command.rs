//! `telescope sweep` from its command-line arguments to the printed output: the one call
//! `main.rs` makes.

use crate::render::sweep_output;
use crate::session::{self, Error, Input};

use super::spec::{self, ArgError, Spacing};
use super::{run, Plan, ProgressMode, SweepRequest};

/// Output formats of `sweep`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SweepFormat {
    Text,
    Csv,
    Json,
    Svg,
}

/// The arguments of `telescope sweep`, as typed.
#[derive(Clone, Debug)]
pub struct SweepArgs {
    pub input: String,
    /// `NAME=A..B`, once or twice.
    pub vary: Vec<String>,
    pub points: Option<u64>,
    pub step: Option<String>,
    pub log: bool,
    pub params: Vec<String>,
    pub quantities: Option<String>,
    pub digits: u32,
    pub format: SweepFormat,
    pub quiet: bool,
    pub budget: crate::budget::Budget,
}

/// Largest `--digits` (as for `solve`, whose sums the sweep shares).
pub const MAX_DIGITS: u32 = 500;

impl From<ArgError> for Error {
    fn from(e: ArgError) -> Error {
        Error::Input {
            input: Input {
                name: e.flag,
                text: e.text,
            },
            diagnostic: e.diagnostic,
        }
    }
}

/// Reads, plans, runs and renders a sweep.
pub fn run_command(args: SweepArgs) -> Result<String, Error> {
    if args.digits == 0 || args.digits > MAX_DIGITS {
        return Err(Error::Usage(format!(
            "--digits {}: choose 1 to {MAX_DIGITS}",
            args.digits
        )));
    }
    if args.vary.is_empty() || args.vary.len() > 2 {
        return Err(Error::Usage(format!(
            "give --vary NAME=A..B once (a range) or twice (a grid), not {} times",
            args.vary.len()
        )));
    }
    let input = session::read_input(&args.input)?;
    let model = session::load_model(&input)?;
    let fixed = session::parse_values_for(&model.params, &args.params)?;
    let spacing = Spacing {
        points: args.points,
        step: args.step.clone(),
        log: args.log,
    };
    let axes = args
        .vary
        .iter()
        .map(|v| spec::parse_vary(v, &model, &fixed, &spacing))
        .collect::<Result<Vec<_>, _>>()?;
    spec::check_grid(&axes)?;
    spec::check_fixed(&model, &fixed, &axes)?;
    let quantities = match &args.quantities {
        Some(text) => spec::parse_quantities(text, &model)?,
        None => spec::default_quantities(),
    };
    let plan = Plan::new(&model, &fixed).map_err(|diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    })?;
    if let Some(text) = &args.quantities {
        spec::check_terms(&quantities, &plan.base_index, text)?;
    }
    let mut request = SweepRequest::new(axes, quantities, args.digits);
    request.budget = args.budget;
    let mode = if args.quiet {
        ProgressMode::Hidden
    } else {
        ProgressMode::Auto
    };
    let sweep = run(&plan, &request, mode).map_err(|over| Error::Usage(over.to_string()))?;
    Ok(match args.format {
        SweepFormat::Text => sweep_output::sweep_text(&sweep),
        SweepFormat::Csv => sweep_output::sweep_csv(&sweep),
        SweepFormat::Json => {
            serde_json::to_string_pretty(&sweep_output::sweep_json(&sweep))
                .expect("JSON values always serialise")
                + "\n"
        }
        SweepFormat::Svg => crate::render::sweep_svg::sweep_svg(&sweep)
            .map_err(|e| Error::Usage(format!("the figure could not be drawn: {}", e.0)))?,
    })
}
