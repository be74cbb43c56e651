//! The direct product a(k) = a(b) · Π_{j=b+1..k} R(j): the independent evidence every closed
//! form is checked against.
//!
//! Two routes. When the range is modest the product is exact (GMP rationals). Otherwise it runs
//! in MPFR with a precision chosen from an a-priori error bound: every step multiplies by exact
//! integers (offsets are written over a common denominator once), so each step costs one
//! rounding per factor, and after n steps the relative error is at most
//! (1+u)^(n·m) − 1 ≤ 1.01·n·m·u with u = 2^(1−p) and m roundings per step (standard
//! floating-point error analysis, Higham, *Accuracy and Stability of Numerical Algorithms*,
//! 2nd ed., Lemma 3.1).

use rug::ops::Pow;
use rug::{Float, Integer, Rational};

use super::{bits_for_digits, GUARD_BITS};

/// One factor `(k + offset)^exponent` (k_sign = +1) or `(offset − k)^exponent` (k_sign = −1).
#[derive(Clone, Debug)]
pub struct NumericFactor {
    pub k_sign: i8,
    pub offset: Rational,
    pub exponent: i32,
}

/// R(k) = constant · Π factors, with every parameter already replaced by its value.
#[derive(Clone, Debug)]
pub struct NumericRatio {
    pub constant: Rational,
    pub factors: Vec<NumericFactor>,
}

impl NumericRatio {
    /// R(j) exactly; `Err` names the factor whose denominator vanishes.
    pub fn at(&self, j: &Integer) -> Result<Rational, DirectError> {
        let mut value = self.constant.clone();
        for (index, factor) in self.factors.iter().enumerate() {
            let linear = factor_value(factor, j);
            if linear == 0 {
                if factor.exponent < 0 {
                    return Err(DirectError::ZeroDenominator {
                        k: j.clone(),
                        factor: index,
                    });
                }
                return Ok(Rational::new());
            }
            let power = pow_rational(&linear, factor.exponent);
            value *= power;
        }
        Ok(value)
    }
}

fn factor_value(factor: &NumericFactor, j: &Integer) -> Rational {
    if factor.k_sign >= 0 {
        Rational::from(&factor.offset + j)
    } else {
        Rational::from(&factor.offset - j)
    }
}

fn pow_rational(x: &Rational, e: i32) -> Rational {
    let mut result = Rational::from(1);
    for _ in 0..e.unsigned_abs() {
        result *= x;
    }
    if e < 0 {
        result.recip_mut();
    }
    result
}

#[derive(Clone, Debug, PartialEq)]
pub enum DirectError {
    /// The rule divides by zero at this k (index into `factors`).
    ZeroDenominator { k: Integer, factor: usize },
    /// A requested row lies before the base index.
    BeforeBase { k: Integer },
    /// The product would need more steps than allowed.
    TooManySteps { steps: Integer, limit: u64 },
}

/// A directly computed a(k).
#[derive(Clone, Debug)]
pub enum DirectValue {
    Exact(Rational),
    /// `mantissa · 2^exp2` with a proven bound on the relative error.
    Approx {
        mantissa: Float,
        exp2: i64,
        rel_error_bound: Float,
    },
}

/// Iterates a(k) for consecutive k, exactly or in MPFR.
pub struct RunningProduct {
    ratio: NumericRatio,
    k: Integer,
    state: State,
}

enum State {
    Exact(Rational),
    Approx(ApproxState),
}

struct ApproxState {
    value: Float,
    exp2: i64,
    /// c / Π q_i^e_i: the constant after moving every offset's denominator q_i into it.
    scaled_constant: Float,
    /// Whether `scaled_constant` is exactly 1.
    constant_is_one: bool,
    /// Current integer q_i·(±k) + p_i for each factor.
    numerators: Vec<Integer>,
    steps: u64,
    roundings_per_step: u64,
    unit: Float,
}

impl ApproxState {
    /// One rounding for the base value and one for the scaled constant, plus m per step.
    fn bound(&self) -> Float {
        let roundings = self.steps * self.roundings_per_step + 2;
        Float::with_val(64, &self.unit * roundings) * 1.01f32
    }
}

/// MPFR exponents beyond this are moved into `exp2` (MPFR's own range is about ±2^30).
const RENORMALISE_AT: i32 = 1 << 28;

impl RunningProduct {
    /// Starts at a(base) = `base_value`. `exact` chooses GMP rationals; otherwise MPFR with
    /// enough bits that `max_steps` steps keep `digits` digits correct.
    pub fn new(
        ratio: NumericRatio,
        base_index: Integer,
        base_value: Rational,
        exact: bool,
        digits: u32,
        max_steps: u64,
    ) -> Self {
        let state = if exact {
            State::Exact(base_value)
        } else {
            let roundings_per_step = 1 + ratio
                .factors
                .iter()
                .map(|f| f.exponent.unsigned_abs() as u64)
                .sum::<u64>();
            let budget = (max_steps.max(1) as f64 * roundings_per_step as f64 + 2.0).log2();
            let prec = bits_for_digits(digits) + GUARD_BITS + budget.ceil() as u32;
            let mut scaled = ratio.constant.clone();
            let mut numerators = Vec::with_capacity(ratio.factors.len());
            for factor in &ratio.factors {
                let q = factor.offset.denom().clone();
                let p = factor.offset.numer().clone();
                let start = if factor.k_sign >= 0 {
                    Integer::from(&q * &base_index) + &p
                } else {
                    p - Integer::from(&q * &base_index)
                };
                numerators.push(start);
                let q_power = q.pow(factor.exponent.unsigned_abs());
                if factor.exponent > 0 {
                    scaled /= Rational::from(q_power);
                } else {
                    scaled *= Rational::from(q_power);
                }
            }
            State::Approx(ApproxState {
                value: Float::with_val(prec, &base_value),
                exp2: 0,
                constant_is_one: scaled == 1,
                scaled_constant: Float::with_val(prec, &scaled),
                numerators,
                steps: 0,
                roundings_per_step,
                unit: Float::with_val(64, Float::i_exp(1, 1 - prec as i32)),
            })
        };
        RunningProduct {
            ratio,
            k: base_index,
            state,
        }
    }

    pub fn index(&self) -> &Integer {
        &self.k
    }

    /// Moves from a(k) to a(k+1).
    pub fn step(&mut self) -> Result<(), DirectError> {
        match &mut self.state {
            State::Exact(value) => {
                let next = Integer::from(&self.k + 1);
                if *value != 0 {
                    let r = self.ratio.at(&next)?;
                    *value *= r;
                } else {
                    // Past the end of the support; the rule may still divide by zero there.
                    self.ratio.at(&next)?;
                }
            }
            State::Approx(state) => {
                for (numerator, factor) in state.numerators.iter_mut().zip(&self.ratio.factors) {
                    let q = factor.offset.denom();
                    if factor.k_sign >= 0 {
                        *numerator += q;
                    } else {
                        *numerator -= q;
                    }
                }
                for (index, (numerator, factor)) in
                    state.numerators.iter().zip(&self.ratio.factors).enumerate()
                {
                    if *numerator == 0 {
                        if factor.exponent < 0 {
                            return Err(DirectError::ZeroDenominator {
                                k: Integer::from(&self.k + 1),
                                factor: index,
                            });
                        }
                        state.value = Float::new(state.value.prec());
                    }
                }
                if !state.value.is_zero() {
                    // Multiplying by exactly 1 is exact: skipping it changes neither the value
                    // nor the bound (which still counts that rounding).
                    if !state.constant_is_one {
                        state.value *= &state.scaled_constant;
                    }
                    for (numerator, factor) in state.numerators.iter().zip(&self.ratio.factors) {
                        // A machine-word integer goes to MPFR's _si routines, a larger one to
                        // the _z routines; both round correctly, so the value is the same.
                        let small = numerator.to_i64();
                        for _ in 0..factor.exponent.unsigned_abs() {
                            match (factor.exponent > 0, small) {
                                (true, Some(n)) => state.value *= n,
                                (true, None) => state.value *= numerator,
                                (false, Some(n)) => state.value /= n,
                                (false, None) => state.value /= numerator,
                            }
                        }
                    }
                    if let Some(e) = state.value.get_exp() {
                        if !(-RENORMALISE_AT..=RENORMALISE_AT).contains(&e) {
                            state.value >>= e;
                            state.exp2 += e as i64;
                        }
                    }
                }
                state.steps += 1;
            }
        }
        self.k += 1;
        Ok(())
    }

    /// The current a(k).
    pub fn value(&self) -> DirectValue {
        match &self.state {
            State::Exact(value) => DirectValue::Exact(value.clone()),
            State::Approx(state) => DirectValue::Approx {
                mantissa: state.value.clone(),
                exp2: state.exp2,
                rel_error_bound: state.bound(),
            },
        }
    }

    /// The bound on the current value's relative error; None on the exact route. Cheaper than
    /// `value()`, which copies the value.
    pub fn error_bound(&self) -> Option<Float> {
        match &self.state {
            State::Exact(_) => None,
            State::Approx(state) => Some(state.bound()),
        }
    }

    /// The current value without copying it: the exact rational, or mantissa and binary
    /// exponent.
    pub fn value_ref(&self) -> Result<&Rational, (&Float, i64)> {
        match &self.state {
            State::Exact(value) => Ok(value),
            State::Approx(state) => Err((&state.value, state.exp2)),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn yule_simon() -> NumericRatio {
        // (k-1)/(k+5/2): Yule–Simon with alpha = 5/2 (scipy.stats.yulesimon; reference file)
        NumericRatio {
            constant: Rational::from(1),
            factors: vec![
                NumericFactor {
                    k_sign: 1,
                    offset: Rational::from(-1),
                    exponent: 1,
                },
                NumericFactor {
                    k_sign: 1,
                    offset: Rational::from((5, 2)),
                    exponent: -1,
                },
            ],
        }
    }

    #[test]
    fn exact_and_mpfr_routes_agree() {
        let mut exact = RunningProduct::new(
            yule_simon(),
            Integer::from(1),
            Rational::from(1),
            true,
            50,
            100,
        );
        let mut approx = RunningProduct::new(
            yule_simon(),
            Integer::from(1),
            Rational::from(1),
            false,
            50,
            100,
        );
        for _ in 0..30 {
            exact.step().unwrap();
            approx.step().unwrap();
        }
        let DirectValue::Exact(q) = exact.value() else {
            panic!()
        };
        let DirectValue::Approx {
            mantissa,
            exp2,
            rel_error_bound,
        } = approx.value()
        else {
            panic!()
        };
        assert_eq!(exp2, 0);
        let truth = Float::with_val(400, &q);
        let diff = Float::with_val(400, &mantissa - &truth);
        let rel = Float::with_val(400, diff / &truth).abs();
        assert!(rel <= rel_error_bound, "{rel} > {rel_error_bound}");
        assert!(rel_error_bound < 1e-52f64);
        // pmf(31)/pmf(1) ratio at k = 31 is exact: Π_{j=2..31} (j-1)/(j+5/2)
        assert_eq!(exact.index(), &31);
    }

    #[test]
    fn numerator_zero_ends_the_support_and_denominator_zero_is_refused() {
        // (13 - k): zero at k = 13 (binomial-type support end, common practice)
        let finite = NumericRatio {
            constant: Rational::from(1),
            factors: vec![NumericFactor {
                k_sign: -1,
                offset: Rational::from(13),
                exponent: 1,
            }],
        };
        let mut run =
            RunningProduct::new(finite, Integer::from(0), Rational::from(1), false, 20, 20);
        for _ in 0..14 {
            run.step().unwrap();
        }
        let DirectValue::Approx { mantissa, .. } = run.value() else {
            panic!()
        };
        assert!(mantissa.is_zero());
        // 1/(k - 3): the rule divides by zero at k = 3
        let bad = NumericRatio {
            constant: Rational::from(1),
            factors: vec![NumericFactor {
                k_sign: 1,
                offset: Rational::from(-3),
                exponent: -1,
            }],
        };
        let mut run = RunningProduct::new(bad, Integer::from(1), Rational::from(1), true, 20, 20);
        run.step().unwrap();
        assert_eq!(
            run.step(),
            Err(DirectError::ZeroDenominator {
                k: Integer::from(3),
                factor: 0
            })
        );
    }
}
