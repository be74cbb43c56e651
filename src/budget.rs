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
/// `solve` with values: the numeric sums grow with about the cube of the digits (the
/// citation rule: 250 digits 0.05 s, 500 digits 0.28 s, 1000 digits 1.5 s; twice that here,
/// for rules with more factors and a finite variance).
const SUM_DIGIT3_SECONDS: f64 = 3.0e-9;
/// Symbolic tail corrections: about ×1.37 per term (--terms 12 on the citation rule 0.3 s,
/// 16: 1.5 s, 20: 5 s), times the number of parameters in the shifts.
const TERMS_SECONDS: f64 = 0.007;
const TERMS_GROWTH: f64 = 1.37;
/// `check`: per comparison point, k value and digit (about 20 k values per point).
const CHECK_SECONDS: f64 = 2.0e-6;

/// Likelihood evaluations of a fit, counted (one real parameter of the citation rule,
/// intervals included: 143; the negative binomial's two: 5,365; a binomial's integer N with
/// p: 1,500 to 2,700). A cold maximisation over r real parameters: a grid of 7^r points,
/// then Nelder–Mead and the Newton polish; a warm one (a profile point, a bootstrap refit)
/// starts near the answer. Each integer parameter multiplies a maximisation by the integer
/// points its search visits; each interval end takes about 20 profile points.
const COLD_EVALUATIONS_PER_PARAMETER: f64 = 300.0;
const WARM_EVALUATIONS_PER_PARAMETER: f64 = 60.0;
const INTEGER_POINTS: f64 = 20.0;
const PROFILE_POINTS: f64 = 40.0;
/// A draw, counted and tallied (10^6 draws: 0.05 s to draw, about 0.15 s with the counting a
/// bootstrap replicate adds).
const DRAW_SECONDS: f64 = 1.5e-7;
/// A draw of `sample`, printed (10^6 draws in CSV: 0.10 s).
const SAMPLE_DRAW_SECONDS: f64 = 1.0e-7;

/// The size of a fit, for [`Estimate::fit`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FitWork {
    /// One evaluation of the log-likelihood, timed.
    pub evaluation_seconds: f64,
    pub real: usize,
    pub integer: usize,
    /// Profile intervals and goodness of fit (not with estimates only).
    pub intervals: bool,
    pub bootstrap: usize,
    pub observations: u64,
    pub threads: usize,
}

/// A cost estimate: the expected seconds and what they are made of, in words.
#[derive(Clone, Debug, PartialEq)]
pub struct Estimate {
    pub seconds: f64,
    /// The size of the work, for the refusal message (e.g. "20000 rows at 50 digits").
    pub work: String,
    /// How to ask for less of it, for the refusal message.
    pub less: &'static str,
}

impl Estimate {
    /// Nothing worth measuring.
    pub fn trivial(work: impl Into<String>) -> Estimate {
        Estimate {
            less: "less work",
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
            less: "fewer rows, digits or checked rows",
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
        let sums = digits.map_or(0.0, |d| SUM_DIGIT3_SECONDS * (d as f64).powi(3));
        let mut work = format!("{terms} tail corrections");
        if let Some(d) = digits {
            work += &format!(", sums to {d} digits");
        }
        Estimate {
            less: "fewer digits or tail corrections",
            seconds: symbolic + sums,
            work,
        }
    }

    /// `check`: `points` parameter points, each compared at about 20 values of k to `digits`
    /// digits.
    pub fn check(points: usize, digits: u32) -> Estimate {
        Estimate {
            less: "fewer digits",
            seconds: CHECK_SECONDS * points as f64 * 20.0 * digits as f64,
            work: format!("{points} parameter points at {digits} digits"),
        }
    }

    /// A fit: the evaluations of ℓ its steps are expected to make, times one timed
    /// evaluation; bootstrap replicates divide over the threads.
    pub fn fit(work: FitWork) -> Estimate {
        let warm = |real: usize, integer: usize| {
            INTEGER_POINTS.powi(integer as i32)
                * (WARM_EVALUATIONS_PER_PARAMETER * real as f64 + 1.0)
        };
        let mut evaluations = if work.integer == 0 {
            7f64.powi(work.real as i32) + COLD_EVALUATIONS_PER_PARAMETER * work.real as f64
        } else {
            warm(work.real, work.integer)
        };
        if work.intervals {
            // Each parameter's profile maximises over the others.
            evaluations +=
                work.real as f64 * PROFILE_POINTS * warm(work.real.saturating_sub(1), work.integer);
            evaluations += work.integer as f64
                * PROFILE_POINTS
                * warm(work.real, work.integer.saturating_sub(1));
        }
        let replicate = warm(work.real, work.integer) * work.evaluation_seconds
            + work.observations as f64 * DRAW_SECONDS;
        let seconds = evaluations * work.evaluation_seconds
            + work.bootstrap as f64 * replicate / work.threads.max(1) as f64;
        let mut words = format!(
            "about {} likelihood evaluations of {} each",
            evaluations.round(),
            seconds_text(work.evaluation_seconds)
        );
        if work.bootstrap > 0 {
            words += &format!(
                ", {} bootstrap refits of {} observations",
                work.bootstrap, work.observations
            );
        }
        Estimate {
            less: "fewer bootstrap replicates, or more parameters held with --param",
            seconds,
            work: words,
        }
    }

    /// `sample`: `n` draws (the inverse CDF's table is small beside them).
    pub fn sample(n: u64) -> Estimate {
        Estimate {
            less: "fewer draws (--n)",
            seconds: n as f64 * SAMPLE_DRAW_SECONDS,
            work: format!("{n} draws"),
        }
    }

    /// Work of `items` independent pieces, one of which was timed at `each` seconds, spread
    /// over `threads` (a sweep's ordinary points, from its second point).
    pub fn probed(items: usize, each: f64, threads: usize, work: impl Into<String>) -> Estimate {
        Estimate {
            less: "fewer points or digits",
            seconds: each * items as f64 / threads.max(1) as f64,
            work: work.into(),
        }
    }

    /// The sum of two estimates (a command that does both); the way to ask for less is the
    /// larger part's.
    pub fn and(self, other: Estimate) -> Estimate {
        Estimate {
            seconds: self.seconds + other.seconds,
            work: format!("{}; {}", self.work, other.work),
            less: if other.seconds > self.seconds {
                other.less
            } else {
                self.less
            },
        }
    }

    /// More seconds of the same work.
    pub fn plus_seconds(mut self, seconds: f64) -> Estimate {
        self.seconds += seconds;
        self
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
            "this would take about {} ({}), beyond the budget of {}; to run it anyway, pass --max-seconds {} (or ask for less: {})",
            seconds_text(self.estimate.seconds),
            self.estimate.work,
            seconds_text(self.max_seconds),
            (self.estimate.seconds * 2.0).ceil().max(1.0) as u64,
            self.estimate.less
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
    if s < 1e-3 {
        format!("{:.0} µs", s * 1e6)
    } else if s < 0.1 {
        format!("{:.0} ms", s * 1e3)
    } else if s < 1.0 {
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

    /// A spinner with the elapsed time and the estimate, for work without countable steps
    /// (an optimiser's iterations), under the same conditions as a bar.
    pub fn spinner(label: &str, expected_seconds: f64) -> Progress {
        let show =
            PROGRESS_ENABLED.load(Ordering::Relaxed) && expected_seconds > PROGRESS_AFTER_SECONDS;
        let bar = show.then(|| {
            let bar = indicatif::ProgressBar::new_spinner();
            let style = indicatif::ProgressStyle::with_template("{spinner} {msg} ({elapsed})")
                .expect("a valid template");
            bar.set_style(style);
            bar.set_message(format!(
                "{label}: about {} expected",
                seconds_text(expected_seconds)
            ));
            bar.enable_steady_tick(std::time::Duration::from_millis(120));
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
    fn fits_count_their_evaluations() {
        // The counted evaluations (see the constants): one real parameter 347 with its
        // interval, two real parameters 5,529.
        let work = |real, integer, bootstrap| FitWork {
            evaluation_seconds: 5e-5,
            real,
            integer,
            intervals: true,
            bootstrap,
            observations: 20_000,
            threads: 2,
        };
        assert!(Estimate::fit(work(1, 0, 0))
            .work
            .contains("about 347 likelihood"));
        assert!(Estimate::fit(work(2, 0, 0))
            .work
            .contains("about 5529 likelihood"));
        // A bootstrap of 10^5 refits of 20,000 observations is far beyond 10 s; 200 are not.
        assert!(Budget::default()
            .admit(&Estimate::fit(work(1, 0, 100_000)))
            .is_err());
        assert!(Budget::default()
            .admit(&Estimate::fit(work(1, 0, 200)))
            .is_ok());
        assert!(Budget::default()
            .admit(&Estimate::sample(1_000_000))
            .is_ok());
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
