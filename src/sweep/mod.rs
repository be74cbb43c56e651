//! `telescope sweep`: the answers (tail rate and exponent, prefactor, total, mean, variance,
//! a(K)) across a range of one parameter, or a grid of two.
//!
//! The rule is solved and analysed **once** with the varied parameters symbolic ([`Plan`]);
//! each point then only decides the conditions and evaluates the closed forms (exactly when
//! they are rational), falling back to the numeric sums where a number has no closed form.
//! Points run in parallel (rayon) and come back in order. Where a quantity changes
//! finiteness inside the range, [`boundaries`] finds the exact parameter value from the
//! one-parameter rational inequality that governs it, or brackets it and says so.
//!
//! ```
//! use std::collections::BTreeMap;
//! use telescope::sweep::{spec, Plan, SweepRequest, ProgressMode};
//! let model = telescope::model::build_model(
//!     "param rho in (0, 1)\nn(k)/n(k-1) = (1-rho)(k-1)/(1 + (1-rho) k) for k >= 2").unwrap();
//! let fixed = BTreeMap::new();
//! let spacing = spec::Spacing { points: Some(5), ..Default::default() };
//! let axis = spec::parse_vary("rho=0.1..0.9", &model, &fixed, &spacing).unwrap();
//! let plan = Plan::new(&model, &fixed).unwrap();
//! let request = SweepRequest::new(vec![axis], spec::default_quantities(), 30);
//! let sweep = telescope::sweep::run(&plan, &request, ProgressMode::Hidden).unwrap();
//! // the variance is finite for rho > 1/2, exactly
//! assert_eq!(sweep.boundaries[0].location.to_string(), "1/2");
//! ```

pub mod boundaries;
pub mod command;
mod point;
pub mod progress;
pub mod spec;

use std::collections::BTreeMap;
use std::time::{Duration, Instant};

use num_bigint::BigInt;
use rayon::prelude::*;

use crate::algebra::Q;
use crate::analysis::{analyse, Analysis, AnalysisRequest, Inequality, RisingForm};
use crate::budget::{Budget, Estimate, OverBudget};
use crate::diagnostic::Diagnostic;
use crate::model::{Model, Problem};
use crate::solve::{rule_conditions, solve, Condition, Solution};

pub use boundaries::{Boundary, Location};
pub use progress::ProgressMode;
pub use spec::{Axis, Quantity};

/// The symbolic work, done once: the rule solved and analysed with the varied parameters
/// left as symbols (the fixed ones substituted where the solver uses them).
#[derive(Clone, Debug)]
pub struct RulePlan {
    pub problem: Problem,
    pub solution: Solution,
    pub analysis: Analysis,
    /// The rule's own conditions (not the simplest form's): a point where one fails is
    /// outside the model.
    pub conditions: Vec<Condition>,
    pub form: RisingForm,
}

impl RulePlan {
    fn new(problem: Problem, fixed: &BTreeMap<String, Q>) -> Result<RulePlan, Diagnostic> {
        let solution = solve(&problem, fixed)?;
        let conditions = rule_conditions(&problem, &solution.ratio, fixed)?;
        // Numbers are per point; this pass is symbolic only (no digits are produced).
        let request = AnalysisRequest {
            terms: 0,
            digits: 30,
            normalize: false,
        };
        let analysis = analyse(&problem, &solution, &request)?;
        let form = RisingForm::from_ratio(&problem.ratio);
        Ok(RulePlan {
            problem,
            solution,
            analysis,
            conditions,
            form,
        })
    }

    /// The symbolic requirements for a finite total (0), mean (1) or variance (2).
    pub fn requirements(&self, moment: usize) -> &[crate::analysis::Requirement] {
        match moment {
            0 => &self.analysis.normalization.requirements,
            1 => &self.analysis.mean.requirements,
            _ => &self.analysis.variance.requirements,
        }
    }
}

/// What a sweep knows before its first point.
#[derive(Clone, Debug)]
pub struct Plan {
    pub model: Model,
    pub fixed: BTreeMap<String, Q>,
    pub base_index: BigInt,
    /// A one-rule model: its plan, from which every point is evaluated. A piecewise model:
    /// the plan of its open last piece (when the breakpoints are fixed), which governs the
    /// finiteness of the total, mean and variance and so gives the exact boundaries; its
    /// points are solved one by one, since the pieces are joined from the values.
    pub rule: Option<RulePlan>,
    pub piecewise: bool,
}

impl Plan {
    /// Solves and analyses `model` with the `fixed` values, once.
    pub fn new(model: &Model, fixed: &BTreeMap<String, Q>) -> Result<Plan, Diagnostic> {
        let base_index = model.base_index(fixed)?;
        if model.is_piecewise() {
            let last = model
                .resolve(fixed)
                .ok()
                .and_then(|pieces| pieces.into_iter().last())
                .filter(|p| p.last_index.is_none());
            let rule = last.and_then(|p| RulePlan::new(p.problem, fixed).ok());
            return Ok(Plan {
                model: model.clone(),
                fixed: fixed.clone(),
                base_index,
                rule,
                piecewise: true,
            });
        }
        let problem = model.resolve(fixed)?.remove(0).problem;
        Ok(Plan {
            model: model.clone(),
            fixed: fixed.clone(),
            base_index,
            rule: Some(RulePlan::new(problem, fixed)?),
            piecewise: false,
        })
    }
}

/// What to sweep.
#[derive(Clone, Debug)]
pub struct SweepRequest {
    /// One axis, or two for a grid.
    pub axes: Vec<Axis>,
    pub quantities: Vec<Quantity>,
    pub digits: u32,
    /// Points at which closed-form numbers are also summed numerically, as evidence (the
    /// first, the last and evenly spread ones); 0 for none.
    pub check_points: usize,
    /// The time budget, judged after the first and last points are timed (unlimited unless
    /// set: `telescope sweep` sets the command's).
    pub budget: Budget,
}

impl SweepRequest {
    pub fn new(axes: Vec<Axis>, quantities: Vec<Quantity>, digits: u32) -> SweepRequest {
        SweepRequest {
            axes,
            quantities,
            digits,
            check_points: DEFAULT_CHECK_POINTS,
            budget: Budget {
                max_seconds: f64::INFINITY,
            },
        }
    }
}

/// Points cross-checked by the numeric sums by default.
pub const DEFAULT_CHECK_POINTS: usize = 5;

/// A number at a point.
#[derive(Clone, Debug, PartialEq)]
pub struct Number {
    /// `digits` significant digits.
    pub value: String,
    /// The exact rational, when it is one.
    pub exact: Option<Q>,
    /// Bound on the absolute error of `value` before rounding ("0" when exact).
    pub error_bound: String,
    /// How it was obtained (closed form by which theorem, numeric sum, direct product).
    pub method: String,
}

/// Why a cell is empty.
#[derive(Clone, Debug, PartialEq)]
pub enum Missing {
    /// A condition of the rule fails: the model is not valid at this point.
    Invalid(Condition, String),
    /// The quantity is infinite; the requirement that fails (when it is one) and why.
    Infinite {
        failed: Option<Inequality>,
        why: crate::solve::reason::Reason,
    },
    /// The support ends at this k: there is no tail law.
    NoTail(BigInt),
    /// It could not be computed here; why.
    Unavailable(String),
}

#[derive(Clone, Debug, PartialEq)]
pub enum Cell {
    Value(Number),
    Missing(Missing),
}

/// One point: the values of the varied parameters (in axis order) and one cell per quantity.
#[derive(Clone, Debug)]
pub struct Point {
    pub at: Vec<Q>,
    pub cells: Vec<Cell>,
}

/// The numeric sum's relative difference from the closed form at a point.
#[derive(Clone, Debug)]
pub struct Check {
    pub point: usize,
    pub quantity: Quantity,
    pub rel_diff: String,
}

/// The result of a sweep.
#[derive(Clone, Debug)]
pub struct Sweep {
    pub sequence: String,
    pub index: String,
    pub base_index: BigInt,
    pub axes: Vec<Axis>,
    pub fixed: BTreeMap<String, Q>,
    pub quantities: Vec<Quantity>,
    pub digits: u32,
    /// Grid order: the first axis outermost.
    pub points: Vec<Point>,
    pub boundaries: Vec<Boundary>,
    pub checks: Vec<Check>,
    /// Wall-clock time of the first point, and the threads used.
    pub first_point: Duration,
    pub threads: usize,
}

/// Every point of the grid, the first axis outermost.
pub fn grid(axes: &[Axis]) -> Vec<Vec<Q>> {
    let mut out: Vec<Vec<Q>> = vec![Vec::new()];
    for axis in axes {
        out = out
            .into_iter()
            .flat_map(|prefix| {
                axis.values.iter().map(move |v| {
                    let mut p = prefix.clone();
                    p.push(v.clone());
                    p
                })
            })
            .collect();
    }
    out
}

/// The indices of the cross-checked points: the first, the last, evenly between.
fn check_indices(n: usize, wanted: usize) -> Vec<usize> {
    if wanted == 0 || n == 0 {
        return Vec::new();
    }
    if wanted == 1 {
        return vec![0];
    }
    let mut out: Vec<usize> = (0..wanted)
        .map(|i| i * (n - 1) / (wanted - 1).max(1))
        .collect();
    out.dedup();
    out
}

/// Runs the sweep: the first point alone (to time it and decide on a progress bar), the rest
/// in parallel, in order.
pub fn run(plan: &Plan, request: &SweepRequest, mode: ProgressMode) -> Result<Sweep, OverBudget> {
    let points = grid(&request.axes);
    let checked = check_indices(points.len(), request.check_points);
    let names: Vec<&str> = request.axes.iter().map(|a| a.name.as_str()).collect();
    let evaluate = |i: usize| {
        // A failure inside the numeric layers at one point must not cost the others: that
        // point's cells say so, and the rest of the sweep stands.
        std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            point::evaluate(
                plan,
                &names,
                &points[i],
                &request.quantities,
                request.digits,
                checked.binary_search(&i).is_ok(),
            )
        }))
        .unwrap_or_else(|_| {
            let cell = Cell::Missing(Missing::Unavailable(
                "an internal error stopped the evaluation at this point (please report it)".into(),
            ));
            (vec![cell; request.quantities.len()], Vec::new())
        })
    };
    // The first two points are timed before the rest start. The first also fills caches
    // and, like every checked point, sums numerically as evidence; the second is an ordinary
    // point: the checked points at the first's cost and the others at the second's, over the
    // threads, are the sweep's estimate for the budget.
    let timed = |i: usize| {
        let started = Instant::now();
        let out = evaluate(i);
        (out, started.elapsed().as_secs_f64())
    };
    let (first, first_seconds) = timed(0);
    let (second, second_seconds) = if points.len() > 1 {
        let (out, seconds) = timed(1);
        (Some(out), seconds)
    } else {
        (None, 0.0)
    };
    let threads = rayon::current_num_threads();
    let rest = points.len().saturating_sub(2);
    let checked_rest = checked.iter().filter(|i| **i >= 2).count();
    let estimate = Estimate::probed(
        rest - checked_rest,
        second_seconds,
        threads,
        format!(
            "{} points of {} quantities at {} digits",
            points.len(),
            request.quantities.len(),
            request.digits
        ),
    )
    .plus_seconds(checked_rest as f64 * first_seconds / threads.max(1) as f64);
    request.budget.admit(&estimate)?;
    let bar = progress::start(mode, estimate.seconds, rest);
    let others: Vec<_> = (2..points.len())
        .into_par_iter()
        .map(|i| {
            let out = evaluate(i);
            bar.tick();
            out
        })
        .collect();
    bar.finish();
    let results = std::iter::once(first).chain(second).chain(others);
    let mut checks = Vec::new();
    let mut out_points = Vec::with_capacity(points.len());
    for (i, (cells, point_checks)) in results.enumerate() {
        for (quantity, rel_diff) in point_checks {
            checks.push(Check {
                point: i,
                quantity,
                rel_diff,
            });
        }
        out_points.push(Point {
            at: points[i].clone(),
            cells,
        });
    }
    let boundaries = boundaries::find(plan, request, &out_points);
    Ok(Sweep {
        sequence: plan.model.sequence.clone(),
        index: plan.model.index.clone(),
        base_index: plan.base_index.clone(),
        axes: request.axes.clone(),
        fixed: plan.fixed.clone(),
        quantities: request.quantities.clone(),
        digits: request.digits,
        points: out_points,
        boundaries,
        checks,
        first_point: Duration::from_secs_f64(first_seconds),
        threads,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    #[test]
    fn a_grid_runs_the_first_axis_outermost() {
        let axis = |name: &str, values: Vec<Q>| Axis {
            name: name.into(),
            from: values[0].clone(),
            to: values[values.len() - 1].clone(),
            log: false,
            values,
        };
        let g = grid(&[
            axis("a", vec![q(1, 1), q(2, 1)]),
            axis("b", vec![q(5, 1), q(6, 1), q(7, 1)]),
        ]);
        assert_eq!(g.len(), 6);
        assert_eq!(g[1], vec![q(1, 1), q(6, 1)]);
        assert_eq!(g[3], vec![q(2, 1), q(5, 1)]);
    }

    #[test]
    fn checked_points_include_the_ends() {
        assert_eq!(check_indices(1000, 5), vec![0, 249, 499, 749, 999]);
        assert_eq!(check_indices(2, 5), vec![0, 1]);
        assert!(check_indices(10, 0).is_empty());
    }
}
