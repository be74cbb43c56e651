//! Mean and variance in closed form. `k·a(k)` and `k²·a(k)` are hypergeometric terms again,
//! so the sum theorems apply to them; two routes are tried, because each reaches cases the
//! other does not:
//!
//! - factorial moments: `Σ n(n−1)…(n−r+1) t_n = z^r Π(a)_r/Π(b)_r · F(a+r; b+r; z)`
//!   (DLMF 16.3.1), with `n = k − b`;
//! - weights `(n+1)^r`, which add the parameter pair 2 / 1 to the series (`(n+1) = (2)_n/(1)_n`)
//!   and often cancel into a simpler one (the logarithmic series becomes geometric).

use num_bigint::BigInt;

use super::hypergeometric::HyperSeries;
use super::sums::{closed_sum, Theorem};
use super::symbolic::{Expr, Term};
use crate::algebra::{RatFunc, Q};

/// Mean and variance as exact expressions (for a(b) = 1 they do not depend on a(b)).
#[derive(Clone, Debug, PartialEq)]
pub struct ClosedMoments {
    pub mean: Option<(Expr, Vec<Theorem>)>,
    pub variance: Option<(Expr, Vec<Theorem>)>,
}

/// One moment piece and the theorem that summed it, when one did.
type Piece = Option<(Term, Theorem)>;

fn constant(b: &BigInt) -> RatFunc {
    RatFunc::constant(Q::from_integer(b.clone()))
}

/// The largest closed form (in terms of its polynomials, [`Term::size`]) that the mean and
/// variance are built from: the total's, each moment sum's and each product's. The shipped
/// examples stay under a dozen; a fuzzed rule in 16 names had a closed total of 25,000
/// characters, and multiplying such forms (E[n]² for the variance) ran for minutes. Past the
/// limit the closed form is not offered and the numbers are still summed.
pub const MAX_CLOSED_MOMENT_SIZE: usize = 200;

fn small(t: &Term) -> bool {
    t.size() <= MAX_CLOSED_MOMENT_SIZE
}

/// `(E[n], E[n(n−1)])` by factorial moments, divided by the total `total`.
fn factorial_route(series: &HyperSeries, total_inv: &Term) -> (Piece, Piece) {
    let piece = |r: u32| -> Piece {
        let (factor, shifted) = series.factorial_moment(r);
        if factor.is_zero() {
            return Some((Term::rational(RatFunc::zero()), Theorem::FirstTermOnly));
        }
        let (sum, theorem) = closed_sum(&shifted).filter(|(s, _)| small(s))?;
        let moment = sum.scale(&factor).mul(total_inv);
        small(&moment).then_some((moment, theorem))
    };
    (piece(1), piece(2))
}

/// `(E[n+1], E[(n+1)²])` by the weights `(n+1)^r`.
fn weight_route(series: &HyperSeries, total_inv: &Term) -> (Piece, Piece) {
    let piece = |r: u32| -> Piece {
        let (sum, theorem) =
            closed_sum(&series.weighted_by_n_plus_one(r)).filter(|(s, _)| small(s))?;
        let moment = sum.mul(total_inv);
        small(&moment).then_some((moment, theorem))
    };
    (piece(1), piece(2))
}

/// Mean and variance of k (support starting at `base`) from the series of the total and its
/// closed form.
pub fn closed_moments(series: &HyperSeries, total: &Term, base: &BigInt) -> ClosedMoments {
    let Some(total_inv) = total.inv().filter(small) else {
        return ClosedMoments {
            mean: None,
            variance: None,
        };
    };
    let b = constant(base);
    let mut mean = None;
    let mut variance = None;
    let (first, second) = factorial_route(series, &total_inv);
    if let Some((en, th1)) = &first {
        // E[k] = b + E[n]
        let m = Expr::from_term(en.clone()).plus_term(Term::rational(b.clone()));
        mean = Some((simplify(m), vec![*th1]));
        if let Some((enn, th2)) = &second {
            // Var = E[n(n−1)] + E[n] − E[n]²
            let e = Expr::from_term(enn.clone())
                .plus_term(en.clone())
                .plus_term(en.mul(en).scale(&-RatFunc::one()));
            variance = Some((simplify(e), vec![*th1, *th2]));
        }
    }
    if mean.is_none() || variance.is_none() {
        let (first, second) = weight_route(series, &total_inv);
        if let Some((e1, th1)) = &first {
            if mean.is_none() {
                // E[k] = (b − 1) + E[n+1]
                let m = Expr::from_term(e1.clone()).plus_term(Term::rational(&b - &RatFunc::one()));
                mean = Some((simplify(m), vec![*th1]));
            }
            if let (None, Some((e2, th2))) = (&variance, &second) {
                // Var = E[(n+1)²] − E[n+1]²
                let e = Expr::from_term(e2.clone()).plus_term(e1.mul(e1).scale(&-RatFunc::one()));
                variance = Some((simplify(e), vec![*th1, *th2]));
            }
        }
    }
    ClosedMoments { mean, variance }
}

/// Sums of terms that differ only by a rational factor are already combined by `Expr`; a
/// single rational result is brought to one canonical fraction.
fn simplify(e: Expr) -> Expr {
    match e.as_rational() {
        Some(r) => Expr::from_term(Term::rational(r)),
        None => e,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;
    use crate::analysis::hypergeometric::RisingForm;
    use crate::model::build_problem;

    fn moments(rule: &str) -> ClosedMoments {
        let problem = build_problem(rule).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        let series = HyperSeries::of_sum(&form, &problem.base_index());
        let (total, _) = closed_sum(&series).unwrap();
        closed_moments(&series, &total, &problem.base_index())
    }

    #[test]
    fn yule_simon_mean_and_variance() {
        // mean α/(α−1), variance α²/((α−1)²(α−2)) (SciPy docs, scipy.stats.yulesimon)
        let m = moments("a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2");
        let alpha = RatFunc::var("alpha");
        let one = RatFunc::one();
        let am1 = &alpha - &one;
        let mean = alpha.checked_div(&am1).unwrap();
        assert_eq!(m.mean.unwrap().0.as_rational(), Some(mean));
        let var = (&alpha * &alpha)
            .checked_div(&(&(&am1 * &am1) * &(&alpha - &RatFunc::from_integer(2))))
            .unwrap();
        assert_eq!(m.variance.unwrap().0.as_rational(), Some(var));
    }

    #[test]
    fn poisson_and_negative_binomial_moments() {
        // Poisson: mean = variance = λ (scipy.stats.poisson docs)
        let m = moments("a(k)/a(k-1) = lambda/k for k >= 1");
        let lambda = RatFunc::var("lambda");
        assert_eq!(m.mean.unwrap().0.as_rational(), Some(lambda.clone()));
        assert_eq!(m.variance.unwrap().0.as_rational(), Some(lambda));
        // negative binomial: mean n(1−p)/p, variance n(1−p)/p² (scipy.stats.nbinom docs)
        let m = moments("a(k)/a(k-1) = (k+n-1)*(1-p)/k for k >= 1");
        let n = RatFunc::var("n");
        let p = RatFunc::var("p");
        let nq = &n * &(&RatFunc::one() - &p);
        assert_eq!(m.mean.unwrap().0.as_rational(), nq.checked_div(&p));
        assert_eq!(
            m.variance.unwrap().0.as_rational(),
            nq.checked_div(&(&p * &p))
        );
    }

    #[test]
    fn hypergeometric_distribution_by_chu_vandermonde() {
        // N = 20, K = 7, n = 12: pmf ratio (K−k+1)(n−k+1)/(k(N−K−n+k)); total with a(0) = 1 is
        // C(20,12)/C(13,12) = 9690, mean nK/N = 21/5, variance nK(N−K)(N−n)/(N²(N−1)) = 546/475
        // (scipy.stats.hypergeom docs; Chu–Vandermonde, DLMF 15.4.24)
        let rule = "a(k)/a(k-1) = (8-k)*(13-k)/(k*(k+1)) for k >= 1";
        let problem = build_problem(rule).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        let series = HyperSeries::of_sum(&form, &problem.base_index());
        let (total, theorem) = closed_sum(&series).unwrap();
        assert_eq!(theorem, Theorem::ChuVandermonde);
        assert_eq!(total.as_rational(), Some(&RatFunc::from_integer(9690)));
        let m = closed_moments(&series, &total, &problem.base_index());
        assert_eq!(
            m.mean.unwrap().0.as_rational(),
            Some(RatFunc::constant(q(21, 5)))
        );
        assert_eq!(
            m.variance.unwrap().0.as_rational(),
            Some(RatFunc::constant(q(546, 475)))
        );
    }

    #[test]
    fn binomial_and_logarithmic_moments() {
        // binomial n = 12, p = 3/10: mean np = 18/5, variance np(1−p) = 63/25 (scipy.stats.binom)
        let m = moments("a(k)/a(k-1) = (12-k+1)*(3/10)/(k*(1-3/10)) for k >= 1");
        assert_eq!(
            m.mean.unwrap().0.as_rational(),
            Some(RatFunc::constant(q(18, 5)))
        );
        assert_eq!(
            m.variance.unwrap().0.as_rational(),
            Some(RatFunc::constant(q(63, 25)))
        );
        // logarithmic p: mean −p/((1−p) ln(1−p)) (scipy.stats.logser docs)
        let m = moments("a(k)/a(k-1) = p*(k-1)/k for k >= 2");
        let (mean, _) = m.mean.unwrap();
        let values = [("p".to_string(), q(3, 5))].into();
        let (v, _) = mean.to_float(&values, 200).unwrap();
        // 1.637035001905937168321306418708861857962 (reference file, logarithmic mean)
        assert!(crate::analysis::symbolic::agrees(
            &v,
            "1.637035001905937168321306418708861857962",
            35
        ));
        let (var, _) = m.variance.unwrap();
        let (v, _) = var.to_float(&values, 200).unwrap();
        // 1.412703907299671212484929850881391386036 (reference file, logarithmic variance)
        assert!(crate::analysis::symbolic::agrees(
            &v,
            "1.412703907299671212484929850881391386036",
            35
        ));
    }
}
