//! Time budgets: every command estimates its cost before it starts, refuses work beyond the
//! budget with the estimate and the way to proceed (`--max-seconds`), and shows a progress bar
//! on standard error for work expected to take more than a second.
//!
//! The estimates are rough models (seconds = a constant × the work's size), calibrated on the
//! release build on one core of the development machine (figures beside each constant); they
//! aim at the right order of magnitude, which is what a refusal needs. `f64` is used only here,
//! for times — never for a reported digit.
//!
//! How a command uses it:
//!
//! ```
//! use telescope::budget::{Budget, Estimate};
//! let estimate = Estimate::table(20_000, 50, 20_000, 2);
//! assert!(Budget::default().admit(&estimate).is_ok());
//! let huge = Estimate::table(10_000_000, 50, 10_000_000, 2);
//! let refusal = Budget::default().admit(&huge).unwrap_err();
//! assert!(refusal.to_string().contains("--max-seconds"));
//! ```

use std::fmt;
use std::sync::atomic::{AtomicBool, Ordering};

/// The default budget of a command, in seconds.
pub const DEFAULT_MAX_SECONDS: f64 = 10.0;

/// Work expected to take longer than this shows a progress bar (when stderr is a terminal).
pub const PROGRESS_AFTER_SECONDS: f64 = 1.0;

/// Seconds per direct-product row, plus per row and digit (20,000 rows at 50 digits: 0.26 s;
/// at 500 digits: 0.51 s).
const ROW_SECONDS: f64 = 1.0e-5;
const ROW_DIGIT_SECONDS: f64 = 4.0e-8;
/// Seconds per checked row, digit and factor of R(k): the closed form by log-Gamma (20,000
/// checked rows of a two-factor rule at 50 digits: 5.3 s; at 500 digits: 48 s).
const CHECKED_ROW_SECONDS: f64 = 2.5e-6;
/// `solve` with values: the numeric sums grow with the square of the digits (500 digits of
/// the citation rule: 2.2 s; 1000: about 8 s).
const SUM_DIGIT2_SECONDS: f64 = 8.0e-6;
/// Symbolic tail corrections: about ×1.37 per term (--terms 12 on the citation rule 0.3 s,
/// 16: 1.5 s, 20: 5 s), times the number of parameters in the shifts.
const TERMS_SECONDS: f64 = 0.007;
const TERMS_GROWTH: f64 = 1.37;
/// `check`: per comparison point, k value and digit (about 20 k values per point).
const CHECK_SECONDS: f64 = 2.0e-6;

/// A cost estimate: the expected seconds and what they are made of, in words.
#[derive(Clone, Debug, PartialEq)]
pub struct Estimate {
    pub seconds: f64,
    /// The size of the work, for the refusal message (e.g. "20000 rows at 50 digits").
    pub work: String,
}

impl Estimate {
    /// Nothing worth measuring.
    pub fn trivial(work: impl Into<String>) -> Estimate {
        Estimate {
            seconds: 0.0,
            work: work.into(),
        }
    }

    /// A table: `rows` direct values at `digits` digits, `checked` of them against the closed
    /// form, whose rule has `factors` linear factors.
    pub fn table(rows: u64, digits: u32, checked: u64, factors: usize) -> Estimate {
        let d = digits as f64;
        let seconds = rows as f64 * (ROW_SECONDS + ROW_DIGIT_SECONDS * d)
            + checked as f64 * CHECKED_ROW_SECONDS * d * factors.max(1) as f64;
        Estimate {
            seconds,
            work: format!(
                "{rows} rows at {digits} digits, {checked} checked against the closed form"
            ),
        }
    }

    /// `solve`: `terms` symbolic tail corrections over `parameters` free parameters, and, when
    /// every parameter has a value, the numeric sums to `digits` digits.
    pub fn solve(terms: usize, parameters: usize, digits: Option<u32>) -> Estimate {
        let symbolic = if terms <= 4 {
            0.0
        } else {
            TERMS_SECONDS * TERMS_GROWTH.powi(terms as i32 - 12) * parameters.max(1) as f64
        };
        let sums = digits.map_or(0.0, |d| SUM_DIGIT2_SECONDS * (d as f64).powi(2));
        let mut work = format!("{terms} tail corrections");
        if let Some(d) = digits {
            work += &format!(", sums to {d} digits");
        }
        Estimate {
            seconds: symbolic + sums,
            work,
        }
    }

    /// `check`: `points` parameter points, each compared at about 20 values of k to `digits`
    /// digits.
    pub fn check(points: usize, digits: u32) -> Estimate {
        Estimate {
            seconds: CHECK_SECONDS * points as f64 * 20.0 * digits as f64,
            work: format!("{points} parameter points at {digits} digits"),
        }
    }

    /// The sum of two estimates (a command that does both).
    pub fn and(self, other: Estimate) -> Estimate {
        Estimate {
            seconds: self.seconds + other.seconds,
            work: format!("{}; {}", self.work, other.work),
        }
    }
}

/// The most seconds a command may be expected to take.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Budget {
    pub max_seconds: f64,
}

impl Default for Budget {
    fn default() -> Self {
        Budget {
            max_seconds: DEFAULT_MAX_SECONDS,
        }
    }
}

/// Work refused before it starts.
#[derive(Clone, Debug, PartialEq)]
pub struct OverBudget {
    pub estimate: Estimate,
    pub max_seconds: f64,
}

impl fmt::Display for OverBudget {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "this would take about {} ({}), beyond the budget of {}; to run it anyway, pass --max-seconds {} (or ask for less: fewer rows, digits or checked rows)",
            seconds_text(self.estimate.seconds),
            self.estimate.work,
            seconds_text(self.max_seconds),
            (self.estimate.seconds * 2.0).ceil().max(1.0) as u64
        )
    }
}

impl Budget {
    /// `--max-seconds`, when given.
    pub fn with_max_seconds(max_seconds: Option<f64>) -> Budget {
        max_seconds.map_or_else(Budget::default, |max_seconds| Budget { max_seconds })
    }

    /// Ok when the estimate fits the budget.
    pub fn admit(&self, estimate: &Estimate) -> Result<(), OverBudget> {
        if estimate.seconds <= self.max_seconds {
            Ok(())
        } else {
            Err(OverBudget {
                estimate: estimate.clone(),
                max_seconds: self.max_seconds,
            })
        }
    }
}

fn seconds_text(s: f64) -> String {
    if s < 1.0 {
        format!("{s:.2} s")
    } else if s < 120.0 {
        format!("{s:.1} s")
    } else if s < 7200.0 {
        format!("{:.0} min", s / 60.0)
    } else {
        format!("{:.1} h", s / 3600.0)
    }
}

static PROGRESS_ENABLED: AtomicBool = AtomicBool::new(false);

/// Lets long loops draw progress bars on standard error. The binary calls it when stderr is a
/// terminal; the library never draws one otherwise (tests and scripts see nothing).
pub fn enable_progress(on: bool) {
    PROGRESS_ENABLED.store(on, Ordering::Relaxed);
}

/// A progress bar for a loop of `total` steps, shown only when progress is enabled and the
/// work is expected to take more than [`PROGRESS_AFTER_SECONDS`]; otherwise every call is a
/// no-op.
pub struct Progress {
    bar: Option<indicatif::ProgressBar>,
}

impl Progress {
    pub fn new(label: &str, total: u64, expected_seconds: f64) -> Progress {
        let show =
            PROGRESS_ENABLED.load(Ordering::Relaxed) && expected_seconds > PROGRESS_AFTER_SECONDS;
        let bar = show.then(|| {
            let bar = indicatif::ProgressBar::new(total);
            let style = indicatif::ProgressStyle::with_template(
                "{msg} [{bar:40}] {pos}/{len} ({eta} left)",
            )
            .expect("a valid template")
            .progress_chars("=> ");
            bar.set_style(style);
            bar.set_message(label.to_string());
            bar
        });
        Progress { bar }
    }

    /// A bar that never shows.
    pub fn hidden() -> Progress {
        Progress { bar: None }
    }

    pub fn inc(&self, n: u64) {
        if let Some(bar) = &self.bar {
            bar.inc(n);
        }
    }
}

impl Drop for Progress {
    fn drop(&mut self) {
        if let Some(bar) = &self.bar {
            bar.finish_and_clear();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_issue_s_slow_table_is_refused_and_ordinary_work_admitted() {
        // table --check-all over 10^7 rows at 50 digits ran for many minutes (issue 13)
        let slow = Estimate::table(10_000_000, 50, 10_000_000, 2);
        let refusal = Budget::default().admit(&slow).unwrap_err();
        let text = refusal.to_string();
        assert!(
            text.contains("--max-seconds") && text.contains("10000000 rows"),
            "{text}"
        );
        // …and runs when the user says so.
        assert!(Budget::with_max_seconds(Some(1e9)).admit(&slow).is_ok());
        for ordinary in [
            Estimate::table(100_000, 50, 40, 3),
            Estimate::solve(2, 1, Some(30)),
            Estimate::solve(12, 1, None),
            Estimate::check(9, 30),
        ] {
            assert!(Budget::default().admit(&ordinary).is_ok(), "{ordinary:?}");
        }
        assert!(Budget::default()
            .admit(&Estimate::solve(2, 1, Some(5000)))
            .is_err());
    }

    #[test]
    fn hidden_progress_is_silent() {
        let p = Progress::new("rows", 10, 100.0);
        assert!(
            p.bar.is_none(),
            "progress is off unless the binary enables it"
        );
        p.inc(3);
    }
}
