//! `telescope report`: everything the HTML page shows, computed here and handed to
//! `render::html` for layout — the solution, the analysis (the model-level one for piecewise
//! models), the `--prob` answers, the evidence table with its plot points, and the commands
//! that reproduce the page — and the file written atomically (a temporary file in the same
//! folder, then a rename).

use std::io::Write;
use std::path::{Path, PathBuf};

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use crate::algebra::Q;
use crate::analysis::{analyse, Analysis, AnalysisRequest, TailReport};
use crate::budget::{Budget, Estimate, OverBudget};
use crate::numeric::{rational_to_decimal, to_rug_rational};
use crate::piecewise::build_piecewise_table;
use crate::plot::PlotNumber;
use crate::probability::{analyse_model, probabilities};
use crate::render::figures::{PlotContext, TailCurve};
use crate::render::html::ReportPage;
use crate::session::{self, Error, Input};
use crate::solve::SupportEnd;
use crate::table::{build_table, Table, TableRequest};

/// What the user asked for.
#[derive(Clone, Debug)]
pub struct ReportRequest {
    /// The INPUT argument as typed (for the commands that reproduce the page).
    pub input_arg: String,
    /// `--param NAME=VALUE`, as typed.
    pub params: Vec<String>,
    pub digits: u32,
    /// `--k A..B`, as typed; None: chosen from the support and the tail.
    pub k: Option<String>,
    /// Correction terms of the tail law.
    pub terms: usize,
    /// `--prob` events under the normalised law ("k >= 10", "2 <= k <= N").
    pub prob: Vec<String>,
    /// The time budget: the analysis's sums are judged before they start, the table once
    /// its rows are known.
    pub budget: Budget,
}

fn over_budget(over: OverBudget) -> Error {
    Error::Usage(over.to_string())
}

/// Rows of the default table: a power-law tail over four decades, a geometric or faster
/// one over a thousand steps (it has long left every double's range by then).
const POWER_LAW_ROWS: u64 = 10_000;
const FAST_TAIL_ROWS: u64 = 1_000;
/// Points on the dashed tail-law curve.
const TAIL_CURVE_POINTS: usize = 240;

/// Computes the whole report; the page is `render::html::report_html(&page)`.
pub fn build_report(input: &Input, request: &ReportRequest) -> Result<ReportPage, Error> {
    let model = session::load_model(input)?;
    let values = session::parse_values_for(&model.params, &request.params)?;
    let solved = session::run_solve_model(input, &model, &values)?;
    let to_error = |diagnostic| Error::Input {
        input: input.clone(),
        diagnostic,
    };
    let missing: Vec<String> = model
        .params
        .iter()
        .filter(|p| !values.contains_key(&p.name))
        .map(|p| p.name.clone())
        .collect();
    let free = missing.len();
    let sums = Estimate::solve(request.terms, free, free.eq(&0).then_some(request.digits));
    request.budget.admit(&sums).map_err(over_budget)?;
    let analysis_request = AnalysisRequest {
        terms: request.terms,
        digits: request.digits,
        normalize: false,
    };
    let analysis = if model.is_piecewise() {
        analyse_model(&solved, &analysis_request).map_err(to_error)?
    } else {
        let piece = &solved.pieces[0];
        analyse(&piece.problem, &piece.solution, &analysis_request).map_err(to_error)?
    };
    let analysis = Some(analysis);
    let events = session::parse_events(&model, &request.prob)?;
    let probabilities = probabilities(&solved, &events, request.digits);

    let mut table = None;
    let mut k_range = None;
    let mut tail_curve = None;
    if missing.is_empty() {
        let (from, to) = match &request.k {
            Some(text) => session::parse_k_range(text)?,
            None => default_rows(&solved, analysis.as_ref()),
        };
        let rows = (&to - &from + 1u32).to_u64().unwrap_or(u64::MAX);
        let factors = model.pieces.iter().map(|p| p.ratio.factors.len()).max();
        let table_cost = Estimate::table(rows, request.digits, 64.min(rows), factors.unwrap_or(1));
        request
            .budget
            .admit(&sums.clone().and(table_cost))
            .map_err(over_budget)?;
        let base_value = session::base_value(&model, &values, None)?;
        let table_request = TableRequest {
            from: from.clone(),
            to: to.clone(),
            digits: request.digits,
            base_value: base_value.clone(),
            check_all: false,
        };
        let built = if model.is_piecewise() {
            build_piecewise_table(&solved, &table_request, model.pieces[0].span.clone())
        } else {
            build_table(
                &solved.pieces[0].problem,
                &solved.pieces[0].solution,
                &table_request,
            )
        };
        table = Some(built.map_err(to_error)?);
        if let Some(tail) = analysis.as_ref().and_then(|a| a.tail.as_ref()) {
            tail_curve = tail_law_curve(tail, &base_value, &from, &to);
        }
        k_range = Some((from, to));
    }
    let commands = reproduce_commands(request, k_range.as_ref());
    let log_index = is_power_law(&solved, analysis.as_ref())
        && k_range
            .as_ref()
            .map_or(true, |(from, _)| from > &BigInt::from(0));
    Ok(ReportPage {
        input: input.clone(),
        model,
        solved,
        analysis,
        probabilities,
        table,
        tail_curve,
        log_index,
        missing,
        digits: request.digits,
        commands,
        version: env!("CARGO_PKG_VERSION").to_string(),
    })
}

/// The default rows: the whole support when it is finite (at most `POWER_LAW_ROWS`), four
/// decades for a power-law tail, a thousand steps for a geometric or faster one; a piecewise
/// model's rows reach well past its last breakpoint.
fn default_rows(
    solved: &crate::piecewise::ModelSolution,
    analysis: Option<&Analysis>,
) -> (BigInt, BigInt) {
    let first = solved.base_index();
    // The support ends where the last piece ends (a finite state space) or where its rule
    // vanishes, whichever comes first.
    let last_piece = solved.tail_piece();
    let end = match (&last_piece.last_index, &last_piece.solution.support.last) {
        (Some(piece_end), SupportEnd::At(zero)) => Some(piece_end.clone().min(zero.clone())),
        (Some(piece_end), _) => Some(piece_end.clone()),
        (None, SupportEnd::At(zero)) => Some(zero.clone()),
        (None, _) => None,
    };
    if let Some(last) = end {
        let cap = &first + BigInt::from(POWER_LAW_ROWS - 1);
        return (first, last.min(cap));
    }
    let rows = if is_power_law(solved, analysis) {
        POWER_LAW_ROWS
    } else {
        FAST_TAIL_ROWS
    };
    let mut to = &first + BigInt::from(rows - 1);
    if let Some(last_break) = solved.breakpoints().last() {
        // Show the tail piece over a few times the length of the pieces before it.
        to = to.max(last_break * BigInt::from(4));
    }
    (first, to)
}

/// Whether the (last piece's) tail is a power law: r = 1 and no factorial power, i.e. R(k) → 1
/// with equal degrees. From the analysis when there is one, else from the rule's degrees and
/// its constant at the given values.
pub fn is_power_law(solved: &crate::piecewise::ModelSolution, analysis: Option<&Analysis>) -> bool {
    if let Some(a) = analysis {
        return a
            .tail
            .as_ref()
            .is_some_and(|t| t.law.rate.is_one() && t.law.factorial_power == 0);
    }
    let piece = solved.tail_piece();
    let ratio = &piece.problem.ratio;
    if ratio.degree_difference() != 0 {
        return false;
    }
    ratio
        .constant
        .eval(&solved.values)
        .is_ok_and(|c| c == Q::from_integer(1.into()) || c == Q::from_integer((-1).into()))
}

/// `C·r^k·(k/e)^(d·k)·k^θ` across the rows (the leading term of the law, without its
/// corrections), as plot points: log-spaced for a power law, evenly spaced otherwise; f64 only
/// to place the curve. The prefactor is scaled by the base value the table uses.
fn tail_law_curve(
    tail: &TailReport,
    base_value: &Q,
    from: &BigInt,
    to: &BigInt,
) -> Option<TailCurve> {
    let numbers = tail.numbers.as_ref()?;
    let prefactor = PlotNumber::from_decimal(&numbers.prefactor)?;
    let base = PlotNumber::from_decimal(&rational_to_decimal(&to_rug_rational(base_value), 20))?;
    let rate = fraction_to_f64(&numbers.rate)?;
    let power = fraction_to_f64(&numbers.power)?;
    let d = tail.law.factorial_power as f64;
    let start = from.to_f64()?.max(1.0);
    let end = to.to_f64()?;
    if end <= start || rate == 0.0 || base.sign == 0 {
        return None;
    }
    let power_law = tail.law.rate.is_one() && tail.law.factorial_power == 0;
    let last = (TAIL_CURVE_POINTS - 1) as f64;
    let mut ks: Vec<f64> = (0..TAIL_CURVE_POINTS)
        .map(|i| {
            let t = i as f64 / last;
            let k = if power_law {
                start * (end / start).powf(t)
            } else {
                start + t * (end - start)
            };
            k.round()
        })
        .collect();
    ks.dedup();
    let log10_e = std::f64::consts::LOG10_E;
    let points = ks
        .into_iter()
        .map(|k| {
            let log10 = prefactor.log10_abs
                + base.log10_abs
                + k * rate.abs().log10()
                + d * k * (k.log10() - log10_e)
                + power * k.log10();
            let alternating = rate < 0.0 && k % 2.0 == 1.0;
            let negative = (prefactor.sign * base.sign < 0) ^ alternating;
            (
                PlotNumber::from_f64(k),
                PlotNumber::from_log10(if negative { -1 } else { 1 }, log10),
            )
        })
        .collect();
    let mut label = String::from("tail law C");
    if !tail.law.rate.is_one() {
        label += "·r^k";
    }
    match tail.law.factorial_power {
        0 => {}
        1 => label += "·(k/e)^k",
        -1 => label += "·(k/e)^(−k)",
        d if d < 0 => label += &format!("·(k/e)^(−{}k)", -d),
        d => label += &format!("·(k/e)^({d}k)"),
    }
    if !tail.law.power.is_zero() {
        label += "·k^θ";
    }
    Some(TailCurve { label, points })
}

/// `-17/7` or `3` or `0.25` as f64 (for placing points only).
fn fraction_to_f64(text: &str) -> Option<f64> {
    match text.split_once('/') {
        Some((n, d)) => Some(n.trim().parse::<f64>().ok()? / d.trim().parse::<f64>().ok()?),
        None => text.trim().parse().ok(),
    }
}

/// A shell word: as is when it is plain, else in single quotes.
fn shell_word(word: &str) -> String {
    let plain = !word.is_empty()
        && word
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || "-_./=:,+".contains(c));
    if plain {
        word.to_string()
    } else {
        format!("'{}'", word.replace('\'', "'\\''"))
    }
}

/// The commands that reproduce the page, its numbers and its table.
fn reproduce_commands(request: &ReportRequest, rows: Option<&(BigInt, BigInt)>) -> Vec<String> {
    let input = shell_word(&request.input_arg);
    let params: String = request
        .params
        .iter()
        .map(|p| format!(" --param {}", shell_word(p)))
        .collect();
    let params: String = params
        + &request
            .prob
            .iter()
            .map(|p| format!(" --prob {}", shell_word(p)))
            .collect::<String>();
    let digits = format!(" --digits {}", request.digits);
    let k = rows
        .map(|(a, b)| format!(" --k {a}..{b}"))
        .unwrap_or_default();
    let mut commands = vec![
        format!("telescope report {input}{params}{digits}{k}"),
        format!("telescope solve {input}{params}{digits} --steps --format json"),
    ];
    if rows.is_some() {
        commands.push(format!(
            "telescope table {input}{params}{digits}{k} --format csv"
        ));
    }
    commands
}

/// Plot (1) alone for `table --format svg`: a(k) against k, log–log for a power-law tail.
pub fn table_svg(solved: &crate::piecewise::ModelSolution, table: &Table) -> Result<String, Error> {
    let first = table.rows.first().map(|r| r.k.clone()).unwrap_or_default();
    let context = PlotContext {
        sequence: solved.pieces[0].problem.sequence.clone(),
        index: solved.pieces[0].problem.index.clone(),
        log_index: is_power_law(solved, None) && first > BigInt::from(0),
        breakpoints: solved.breakpoints(),
        tail_law: None,
    };
    crate::render::figures::values_svg(table, &context)
        .map_err(|e| Error::Usage(format!("the plot cannot be drawn: {e}")))
}

/// The default output file: the model file's stem + `.html`, or `report.html` for a rule
/// given on the command line or standard input.
pub fn default_output(input_arg: &str) -> PathBuf {
    let path = Path::new(input_arg);
    if input_arg != "-" && path.is_file() {
        if let Some(stem) = path.file_stem() {
            let mut name = stem.to_os_string();
            name.push(".html");
            return PathBuf::from(name);
        }
    }
    PathBuf::from("report.html")
}

/// Writes `contents` to `path` through a temporary file in the same folder and a rename, so
/// a reader never sees half a page and a failure leaves nothing behind.
pub fn write_atomically(path: &Path, contents: &str) -> Result<(), Error> {
    let failed = |what: &str, e: std::io::Error| {
        Error::Usage(format!("cannot write {}: {what}: {e}", path.display()))
    };
    let folder = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = path
        .file_name()
        .ok_or_else(|| Error::Usage(format!("cannot write {}: not a file name", path.display())))?;
    let mut temporary_name = std::ffi::OsString::from(".");
    temporary_name.push(name);
    temporary_name.push(format!(".{}.tmp", std::process::id()));
    let temporary = folder.join(temporary_name);
    let result = std::fs::File::create(&temporary)
        .and_then(|mut file| {
            file.write_all(contents.as_bytes())?;
            file.sync_all()
        })
        .map_err(|e| failed("cannot create it", e))
        .and_then(|()| {
            std::fs::rename(&temporary, path).map_err(|e| failed("cannot move it into place", e))
        });
    if result.is_err() {
        let _ = std::fs::remove_file(&temporary);
    }
    result
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shell_words_are_quoted_only_when_needed() {
        assert_eq!(shell_word("examples/a.rule"), "examples/a.rule");
        assert_eq!(shell_word("rho=3/10"), "rho=3/10");
        assert_eq!(shell_word("n(k)/n(k-1) = 1/k"), "'n(k)/n(k-1) = 1/k'");
        assert_eq!(shell_word("it's"), "'it'\\''s'");
    }

    #[test]
    fn fractions_for_plotting() {
        assert_eq!(fraction_to_f64("-17/7"), Some(-17.0 / 7.0));
        assert_eq!(fraction_to_f64("1"), Some(1.0));
        assert_eq!(fraction_to_f64("x"), None);
    }

    #[test]
    fn an_unwritable_path_fails_and_leaves_nothing() {
        let folder = std::env::temp_dir().join(format!("telescope-report-{}", std::process::id()));
        std::fs::create_dir_all(&folder).unwrap();
        let target = folder.join("missing-folder").join("page.html");
        let error = write_atomically(&target, "<p>x</p>").unwrap_err();
        assert!(
            error.render().contains("missing-folder"),
            "{}",
            error.render()
        );
        let good = folder.join("page.html");
        write_atomically(&good, "<p>x</p>").unwrap();
        assert_eq!(std::fs::read_to_string(&good).unwrap(), "<p>x</p>");
        let leftovers: Vec<_> = std::fs::read_dir(&folder)
            .unwrap()
            .filter_map(|e| e.ok())
            .filter(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
            .collect();
        assert!(leftovers.is_empty());
        std::fs::remove_dir_all(&folder).unwrap();
    }

    #[test]
    fn default_names_follow_the_model_file() {
        assert_eq!(
            default_output("n(k)/n(k-1) = 1/k"),
            PathBuf::from("report.html")
        );
        assert_eq!(default_output("-"), PathBuf::from("report.html"));
    }
}
