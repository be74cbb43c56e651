//! Closed forms of hypergeometric sums by the classical theorems, applied after equal upper
//! and lower parameters have cancelled.

use super::hypergeometric::HyperSeries;
use super::symbolic::Term;
use crate::algebra::RatFunc;

/// Which theorem gave a closed form.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Theorem {
    /// A zero upper parameter: only the first term is non-zero.
    FirstTermOnly,
    /// 0F0(;;z) = e^z (DLMF 4.2.19)
    ExponentialSeries,
    /// 1F0(a;;z) = (1−z)^(−a) (DLMF 15.4.6 with b = c; the binomial theorem)
    BinomialTheorem,
    /// 2F1(a,b;c;1) = Γ(c)Γ(c−a−b)/(Γ(c−a)Γ(c−b)) (DLMF 15.4.20)
    Gauss,
    /// 2F1(−n,b;c;1) = (c−b)_n/(c)_n (DLMF 15.4.24)
    ChuVandermonde,
    /// 2F1(1,1;2;z) = −ln(1−z)/z (DLMF 15.4.1)
    LogarithmSeries,
}

impl Theorem {
    pub fn name(&self) -> &'static str {
        match self {
            Theorem::FirstTermOnly => "a zero upper parameter (only the first term)",
            Theorem::ExponentialSeries => "the exponential series (DLMF 4.2.19)",
            Theorem::BinomialTheorem => "the binomial theorem (DLMF 15.4.6)",
            Theorem::Gauss => "Gauss's theorem (DLMF 15.4.20)",
            Theorem::ChuVandermonde => "Chu–Vandermonde (DLMF 15.4.24)",
            Theorem::LogarithmSeries => "the logarithm series (DLMF 15.4.1)",
        }
    }
}

/// The sum of the series in closed form, when a theorem applies. Convergence is not decided
/// here: the caller states it from the tail law (the theorems hold wherever the series
/// converges, and for every z when the series terminates).
pub fn closed_sum(series: &HyperSeries) -> Option<(Term, Theorem)> {
    let z = &series.argument;
    let one = RatFunc::one();
    if series.upper.iter().any(|a| a.is_zero()) {
        return Some((Term::rational(one), Theorem::FirstTermOnly));
    }
    match (series.upper.as_slice(), series.lower.as_slice()) {
        ([], []) => Some((Term::exp(z.clone()), Theorem::ExponentialSeries)),
        ([a], []) => {
            // (1 − z)^(−a)
            Some((Term::power(&one - z, -a.clone()), Theorem::BinomialTheorem))
        }
        ([a, b], [c]) if z.is_one() => {
            // Γ(c)Γ(c−a−b)/(Γ(c−a)Γ(c−b)); for a terminating series it is the
            // Chu–Vandermonde sum (c−b)_n/(c)_n written with Gamma values.
            let value = Term::gamma(c.clone(), 1)
                .mul(&Term::gamma(&(c - a) - b, 1))
                .mul(&Term::gamma(c - a, -1))
                .mul(&Term::gamma(c - b, -1));
            let theorem = if series.terminating_at().is_some() {
                Theorem::ChuVandermonde
            } else {
                Theorem::Gauss
            };
            Some((value, theorem))
        }
        ([a, b], [c]) if a.is_one() && b.is_one() && *c == RatFunc::from_integer(2) => {
            // −ln(1−z)/z
            let value = Term::log(&one - z).scale(&-z.inv()?);
            Some((value, Theorem::LogarithmSeries))
        }
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::{q, Q};
    use crate::analysis::hypergeometric::RisingForm;
    use crate::model::build_problem;
    use std::collections::BTreeMap;

    fn sum_of(rule: &str) -> (Term, Theorem) {
        let problem = build_problem(rule).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        closed_sum(&HyperSeries::of_sum(&form, &problem.base_index())).unwrap()
    }

    #[test]
    fn yule_simon_total_by_gauss() {
        // Σ a(k) = (α+1)/α with a(1) = 1 (reference file: total_unnormalized_closed_form)
        let (t, th) = sum_of("a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2");
        assert_eq!(th, Theorem::Gauss);
        let alpha = RatFunc::var("alpha");
        let expected = (&alpha + &RatFunc::one()).checked_div(&alpha).unwrap();
        assert_eq!(t.as_rational(), Some(&expected));
    }

    #[test]
    fn poisson_negative_binomial_logarithmic_binomial() {
        // exp(λ) (scipy.stats.poisson normalisation)
        let (t, th) = sum_of("a(k)/a(k-1) = lambda/k for k >= 1");
        assert_eq!(th, Theorem::ExponentialSeries);
        assert_eq!(t, Term::exp(RatFunc::var("lambda")));
        // p^(−n) (scipy.stats.nbinom normalisation)
        let (t, th) = sum_of("a(k)/a(k-1) = (k+n-1)*(1-p)/k for k >= 1");
        assert_eq!(th, Theorem::BinomialTheorem);
        assert_eq!(t, Term::power(RatFunc::var("p"), -RatFunc::var("n")));
        // −ln(1−p)/p (scipy.stats.logser normalisation)
        let (t, th) = sum_of("a(k)/a(k-1) = p*(k-1)/k for k >= 2");
        assert_eq!(th, Theorem::LogarithmSeries);
        let values: BTreeMap<String, Q> = [("p".to_string(), q(3, 5))].into();
        let v = t.to_float(&values, 200).unwrap();
        // 1.527151219790258441972545352946685119084 (reference file, logarithmic total)
        assert!(crate::analysis::symbolic::agrees(
            &v,
            "1.527151219790258441972545352946685119084",
            35
        ));
        // (1−p)^(−12) for n = 12, p = 3/10 (scipy.stats.binom normalisation)
        let (t, th) = sum_of("a(k)/a(k-1) = (12-k+1)*(3/10)/(k*(1-3/10)) for k >= 1");
        assert_eq!(th, Theorem::BinomialTheorem);
        assert_eq!(t.as_rational(), Some(&RatFunc::constant(q(7, 10).pow(-12))));
    }
}
