//! `telescope sample` output: the draws, one per line, after a commented summary (text) or
//! under a `k` header (CSV). Both read back with `fit --data`.

use std::fmt::Write;

use rug::Float;

use crate::numeric::decimal::float_to_decimal;
use crate::sample::{SampleRun, TailDraw};

/// A double in `digits` significant digits (for statistics that live in double precision).
pub fn number(x: f64, digits: u32) -> String {
    if !x.is_finite() {
        return if x.is_nan() {
            "nan".into()
        } else if x > 0.0 {
            "inf".into()
        } else {
            "-inf".into()
        };
    }
    float_to_decimal(&Float::with_val(53, x), digits)
}

/// Parameter values as `name = value` (exact).
pub fn values_text(values: &std::collections::BTreeMap<String, crate::algebra::Q>) -> String {
    values
        .iter()
        .map(|(n, v)| format!("{n} = {v}"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// The summary lines (each starting with `# `).
pub fn sample_summary(run: &SampleRun, rule: &str) -> String {
    let s = &run.sampler;
    let mut out = String::new();
    let _ = writeln!(out, "# {} draws from {rule}", run.draws.len());
    if !run.law.values.is_empty() {
        let _ = writeln!(out, "# parameters: {}", values_text(&run.law.values));
    }
    let _ = writeln!(
        out,
        "# seed {} (ChaCha8 stream 0; reproduce with --seed {})",
        run.seed, run.seed
    );
    let _ = writeln!(out, "# total: {}", run.law.route.describe());
    let _ = writeln!(
        out,
        "# inverse CDF tabulated for k = {}..{}; each p(k) to relative error ≤ {} before rounding to double",
        s.first,
        s.last_tabulated(),
        number(s.pmf_rel_error, 2)
    );
    let tail = match &s.tail {
        TailDraw::None if s.mass_beyond == 0.0 => {
            "the support ends there: no mass beyond".to_string()
        }
        TailDraw::None => format!(
            "mass beyond: {} (below the resolution of a draw)",
            number(s.mass_beyond, 3)
        ),
        TailDraw::PowerLaw { theta } => format!(
            "mass beyond: {} ± {}, drawn from the tail law a(k) ~ C·k^({})",
            number(s.mass_beyond, 3),
            number(s.mass_beyond_error, 1),
            number(*theta, 6)
        ),
        TailDraw::Geometric { rate } => format!(
            "mass beyond: {} ± {}, drawn geometrically with rate R(K+1) = {}",
            number(s.mass_beyond, 3),
            number(s.mass_beyond_error, 1),
            number(*rate, 6)
        ),
    };
    let _ = writeln!(out, "# {tail}");
    out
}

/// Summary, then `k` and one draw per line.
pub fn sample_text(run: &SampleRun, rule: &str) -> String {
    let mut out = sample_summary(run, rule);
    out.push_str(&sample_csv(run));
    out
}

/// `k` and one draw per line.
pub fn sample_csv(run: &SampleRun) -> String {
    let mut out = String::with_capacity(run.draws.len() * 4 + 2);
    out.push_str("k\n");
    for k in &run.draws {
        let _ = writeln!(out, "{k}");
    }
    out
}

/// `a(k)/a(k−1) = R(k) for k ≥ M` in text.
pub fn rule_text(problem: &crate::model::Problem) -> String {
    let (lhs, rhs) = super::solve_output::rule_nodes(problem);
    format!(
        "{} = {} for {} ≥ {}",
        super::text::write(&lhs),
        super::text::write(&rhs),
        problem.index,
        problem.first_index
    )
}
