//! The sequence as a hypergeometric term: every factor of the rule written `k + α`, and the
//! sum `Σ_{k≥b} a(k)` as `a(b) · pFq(a₁…a_p; b₁…b_q; z)`.

use num_bigint::BigInt;
use num_traits::Zero;

use crate::algebra::{RatFunc, Q};
use crate::ratio::{Orientation, Ratio};

/// `R(k) = constant · Π (k + shift)^exponent`, every factor rising. A factor written `β − k`
/// becomes `−(k − β)`, its sign going into the constant: the form the asymptotics and the
/// series need (the solver keeps `β − k` because it telescopes into finite support).
#[derive(Clone, Debug, PartialEq)]
pub struct RisingForm {
    pub constant: RatFunc,
    pub factors: Vec<(RatFunc, i32)>,
}

impl RisingForm {
    pub fn from_ratio(ratio: &Ratio) -> RisingForm {
        let mut constant = ratio.constant.clone();
        let mut factors: Vec<(RatFunc, i32)> = Vec::new();
        for f in &ratio.factors {
            let shift = match f.orientation {
                Orientation::Rising => f.shift.clone(),
                Orientation::Falling => {
                    if f.exponent % 2 != 0 {
                        constant = -constant;
                    }
                    -f.shift.clone()
                }
            };
            match factors.iter_mut().find(|(s, _)| *s == shift) {
                Some(existing) => existing.1 += f.exponent,
                None => factors.push((shift, f.exponent)),
            }
        }
        factors.retain(|(_, e)| *e != 0);
        RisingForm { constant, factors }
    }

    /// Degree of the numerator minus that of the denominator in `k`.
    pub fn degree_difference(&self) -> i64 {
        self.factors.iter().map(|(_, e)| *e as i64).sum()
    }

    /// With the given values substituted (unbound names stay symbolic).
    pub fn substituted(&self, values: &std::collections::BTreeMap<String, Q>) -> RisingForm {
        let sub = |r: &RatFunc| r.eval_partial(values).unwrap_or_else(|_| r.clone());
        RisingForm {
            constant: sub(&self.constant),
            factors: self.factors.iter().map(|(s, e)| (sub(s), *e)).collect(),
        }
    }
}

/// `Σ_{n≥0} Π(a_i)_n / Π(b_j)_n · z^n / n!`: the generalised hypergeometric series in its
/// usual normalisation (DLMF 16.2.1), equal upper and lower parameters cancelled.
#[derive(Clone, Debug, PartialEq)]
pub struct HyperSeries {
    pub upper: Vec<RatFunc>,
    pub lower: Vec<RatFunc>,
    pub argument: RatFunc,
}

impl HyperSeries {
    /// `Σ_{k≥b} a(k)/a(b)` for `a(k)/a(k−1) = R(k)`: with `n = k − b`, the term ratio is
    /// `R(b+n+1) = z · Π (n + b + 1 + α_i)^e_i`, so the parameters are `b + 1 + α_i`
    /// (repeated |e_i| times) and `1` joins the upper ones for the missing `n!`.
    pub fn of_sum(form: &RisingForm, base_index: &BigInt) -> HyperSeries {
        let start = RatFunc::constant(Q::from_integer(base_index + 1));
        let mut upper = Vec::new();
        let mut lower = Vec::new();
        for (shift, e) in &form.factors {
            let p = &start + shift;
            for _ in 0..e.unsigned_abs() {
                if *e > 0 {
                    upper.push(p.clone());
                } else {
                    lower.push(p.clone());
                }
            }
        }
        upper.push(RatFunc::one());
        HyperSeries {
            upper,
            lower,
            argument: form.constant.clone(),
        }
        .cancelled()
    }

    /// Removes parameters that appear both above and below: `(c)_n/(c)_n = 1`.
    pub fn cancelled(mut self) -> HyperSeries {
        let mut i = 0;
        while i < self.upper.len() {
            if let Some(j) = self.lower.iter().position(|b| *b == self.upper[i]) {
                self.upper.remove(i);
                self.lower.remove(j);
            } else {
                i += 1;
            }
        }
        self
    }

    /// `Σ n(n−1)…(n−r+1) t_n = z^r Π(a)_r/Π(b)_r · F(a+r; b+r; z)` (DLMF 16.3.1, the
    /// derivative of the series): returns the factor in front and the shifted series.
    pub fn factorial_moment(&self, r: u32) -> (RatFunc, HyperSeries) {
        let mut factor = self.argument.pow(r as i32).expect("non-negative power");
        for a in &self.upper {
            factor = &factor * &rising_ratfunc(a, r);
        }
        for b in &self.lower {
            factor = factor
                .checked_div(&rising_ratfunc(b, r))
                .unwrap_or_else(RatFunc::zero);
        }
        let by = RatFunc::from_integer(r as i64);
        let shifted = HyperSeries {
            upper: self.upper.iter().map(|a| a + &by).collect(),
            lower: self.lower.iter().map(|b| b + &by).collect(),
            argument: self.argument.clone(),
        }
        .cancelled();
        (factor, shifted)
    }

    /// `Σ (n+1)^r t_n`, a series again: `(n+1) = (2)_n/(1)_n` adds 2 above and 1 below.
    pub fn weighted_by_n_plus_one(&self, r: u32) -> HyperSeries {
        let mut out = self.clone();
        for _ in 0..r {
            out.upper.push(RatFunc::from_integer(2));
            out.lower.push(RatFunc::one());
        }
        out.cancelled()
    }

    /// An upper parameter that is a non-positive integer `−N` (the series stops after N+1
    /// terms), when one is known.
    pub fn terminating_at(&self) -> Option<BigInt> {
        self.upper
            .iter()
            .filter_map(|a| a.as_constant())
            .filter(|a| a.is_integer() && *a <= Q::zero())
            .map(|a| -a.to_integer())
            .min()
    }
}

/// `(x)_r = x(x+1)…(x+r−1)` (DLMF 5.2.4).
pub fn rising_ratfunc(x: &RatFunc, r: u32) -> RatFunc {
    let mut out = RatFunc::one();
    for i in 0..r {
        out = &out * &(x + &RatFunc::from_integer(i as i64));
    }
    out
}

/// `(x)_m` for any integer `m`: `Γ(x+m)/Γ(x)`, which is `1/((x+m)(x+m+1)…(x−1))` for m < 0
/// (DLMF 5.2.5 with DLMF 5.5.1). `None` if a factor of a denominator vanishes.
pub fn gamma_shift_ratio(x: &RatFunc, m: i64) -> Option<RatFunc> {
    if m >= 0 {
        return Some(rising_ratfunc(x, m as u32));
    }
    let start = x + &RatFunc::from_integer(m);
    rising_ratfunc(&start, m.unsigned_abs() as u32).inv()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::build_problem;

    fn series(rule: &str) -> HyperSeries {
        let problem = build_problem(rule).unwrap();
        let form = RisingForm::from_ratio(&problem.ratio);
        HyperSeries::of_sum(&form, &problem.base_index())
    }

    #[test]
    fn yule_simon_is_a_gauss_series_at_one() {
        // Σ_{k≥1} Γ(k)Γ(α+2)/Γ(k+α+1) = 2F1(1, 1; α+2; 1) (SciPy yulesimon pmf α B(k, α+1))
        let s = series("a(k)/a(k-1) = (k-1)/(k+alpha) for k >= 2");
        let alpha = RatFunc::var("alpha");
        assert_eq!(s.upper, vec![RatFunc::one(), RatFunc::one()]);
        assert_eq!(s.lower, vec![&alpha + &RatFunc::from_integer(2)]);
        assert!(s.argument.is_one());
    }

    #[test]
    fn binomial_rule_terminates() {
        // (n−k+1)p/(k(1−p)) from k = 1: 1F0(−n;; −p/(1−p)) (scipy.stats.binom pmf)
        let s = series("a(k)/a(k-1) = (12-k+1)*(3/10)/(k*(1-3/10)) for k >= 1");
        assert_eq!(s.upper, vec![RatFunc::from_integer(-12)]);
        assert!(s.lower.is_empty());
        assert_eq!(s.argument, RatFunc::constant(crate::algebra::q(-3, 7)));
        assert_eq!(s.terminating_at(), Some(BigInt::from(12)));
    }

    #[test]
    fn poisson_is_the_exponential_series() {
        let s = series("a(k)/a(k-1) = lambda/k for k >= 1");
        assert!(s.upper.is_empty() && s.lower.is_empty());
        let (factor, shifted) = s.factorial_moment(1);
        assert_eq!(factor, RatFunc::var("lambda"));
        assert!(shifted.upper.is_empty() && shifted.lower.is_empty());
    }

    #[test]
    fn weights_cancel_into_simpler_series() {
        // Logarithmic series: k a(k) = p^(k−1), a geometric series (scipy.stats.logser)
        let s = series("a(k)/a(k-1) = p*(k-1)/k for k >= 2");
        let w = s.weighted_by_n_plus_one(1);
        assert_eq!(w.upper, vec![RatFunc::one()]);
        assert!(w.lower.is_empty());
    }
}
