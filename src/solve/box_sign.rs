//! The sign of a rational function of several parameters over the box of their declared
//! ranges, by interval arithmetic on the monomials (Moore, Kearfott, Cloud, *Introduction to
//! Interval Analysis*, SIAM 2009, ch. 2). The enclosure is never too narrow, so a sign it
//! proves holds at every admissible point; an undecided sign means "not proved", never
//! "changes sign". Exact for a polynomial affine in the parameters (each appears once).

use num_traits::{One, Signed, Zero};

use crate::algebra::{Poly, RatFunc, Q};
use crate::model::Param;

use super::ranges::{Extended, Interval};

/// A sign that holds on the whole box.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BoxSign {
    Positive,
    Negative,
    /// ≥ 0 everywhere (zero possibly attained).
    NonNegative,
    /// ≤ 0 everywhere (zero possibly attained).
    NonPositive,
}

/// One end of an enclosure: the value and whether it may be attained.
#[derive(Clone, Debug)]
struct End {
    value: Extended,
    attained: bool,
}

#[derive(Clone, Debug)]
struct Enclosure {
    low: End,
    high: End,
}

impl Enclosure {
    fn point(q: Q) -> Enclosure {
        let end = End {
            value: Extended::Finite(q),
            attained: true,
        };
        Enclosure {
            low: end.clone(),
            high: end,
        }
    }

    fn of_interval(i: &Interval) -> Enclosure {
        Enclosure {
            low: End {
                value: i.low.clone(),
                attained: i.low_included,
            },
            high: End {
                value: i.high.clone(),
                attained: i.high_included,
            },
        }
    }

    fn add(&self, other: &Enclosure) -> Enclosure {
        let sum = |a: &End, b: &End| End {
            value: add_extended(&a.value, &b.value),
            attained: a.attained && b.attained,
        };
        Enclosure {
            low: sum(&self.low, &other.low),
            high: sum(&self.high, &other.high),
        }
    }

    fn mul(&self, other: &Enclosure) -> Enclosure {
        let is_attained_zero =
            |e: &End| e.attained && matches!(&e.value, Extended::Finite(v) if v.is_zero());
        let mut products: Vec<End> = Vec::new();
        for a in [&self.low, &self.high] {
            for b in [&other.low, &other.high] {
                products.push(End {
                    value: mul_extended(&a.value, &b.value),
                    attained: (a.attained && b.attained)
                        || is_attained_zero(a)
                        || is_attained_zero(b),
                });
            }
        }
        let pick = |want_low: bool| -> End {
            let best = products
                .iter()
                .map(|e| e.value.clone())
                .reduce(|x, y| if (y < x) == want_low { y } else { x })
                .expect("four products");
            let attained = products.iter().any(|e| e.value == best && e.attained);
            End {
                value: best,
                attained,
            }
        };
        Enclosure {
            low: pick(true),
            high: pick(false),
        }
    }

    /// x^e for a variable enclosure, tightened to ≥ 0 for even e.
    fn pow(&self, e: u32) -> Enclosure {
        let mut out = Enclosure::point(Q::one());
        for _ in 0..e {
            out = out.mul(self);
        }
        if e % 2 == 0 && out.low.value < Extended::Finite(Q::zero()) {
            out.low = End {
                value: Extended::Finite(Q::zero()),
                attained: true,
            };
        }
        out
    }

    fn sign(&self) -> Option<BoxSign> {
        let zero = Extended::Finite(Q::zero());
        if self.low.value > zero || (self.low.value == zero && !self.low.attained) {
            Some(BoxSign::Positive)
        } else if self.high.value < zero || (self.high.value == zero && !self.high.attained) {
            Some(BoxSign::Negative)
        } else if self.low.value == zero {
            Some(BoxSign::NonNegative)
        } else if self.high.value == zero {
            Some(BoxSign::NonPositive)
        } else {
            None
        }
    }
}

fn add_extended(a: &Extended, b: &Extended) -> Extended {
    use Extended::*;
    match (a, b) {
        (Finite(x), Finite(y)) => Finite(x + y),
        (MinusInfinity, _) | (_, MinusInfinity) => MinusInfinity,
        _ => PlusInfinity,
    }
}

/// The product of two ends, with 0·∞ = 0 (the hull of the products is still right:
/// the other corners carry the unbounded side).
fn mul_extended(a: &Extended, b: &Extended) -> Extended {
    use Extended::*;
    match (a, b) {
        (Finite(x), Finite(y)) => Finite(x * y),
        (Finite(x), inf) | (inf, Finite(x)) => {
            if x.is_zero() {
                Finite(Q::zero())
            } else if (x.is_positive()) == (*inf == PlusInfinity) {
                PlusInfinity
            } else {
                MinusInfinity
            }
        }
        (x, y) => {
            if x == y {
                PlusInfinity
            } else {
                MinusInfinity
            }
        }
    }
}

/// An enclosure of `p` over the box; `None` when a variable has no declaration.
fn enclose(p: &Poly, params: &[Param]) -> Option<Enclosure> {
    let mut total = Enclosure::point(Q::zero());
    for (monomial, c) in p.terms() {
        let mut term = Enclosure::point(c.clone());
        for (name, e) in monomial.factors() {
            let param = params.iter().find(|p| p.name == name)?;
            term = term.mul(&Enclosure::of_interval(&Interval::of_param(param)).pow(e));
        }
        total = total.add(&term);
    }
    Some(total)
}

/// The sign of `p` on the box of declared ranges, when interval arithmetic proves one.
pub fn poly_sign(p: &Poly, params: &[Param]) -> Option<BoxSign> {
    enclose(p, params)?.sign()
}

/// The sign of `f = N/D` on the box, when the signs of N and D are proved (D strictly).
pub fn box_sign(f: &RatFunc, params: &[Param]) -> Option<BoxSign> {
    use BoxSign::*;
    let num = poly_sign(f.numer(), params)?;
    let den = poly_sign(f.denom(), params)?;
    let flip = |s: BoxSign| match s {
        Positive => Negative,
        Negative => Positive,
        NonNegative => NonPositive,
        NonPositive => NonNegative,
    };
    match den {
        Positive => Some(num),
        Negative => Some(flip(num)),
        NonNegative | NonPositive => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    fn positive(name: &str) -> Param {
        Param {
            lower: Some((q(0, 1), false)),
            ..Param::undeclared(name)
        }
    }

    #[test]
    fn quotients_and_products_of_positive_parameters_are_positive() {
        // ν/β with ν, β > 0, and 1 − ν/β can be either sign.
        let params = [positive("nu"), positive("beta")];
        let ratio = RatFunc::var("nu")
            .checked_div(&RatFunc::var("beta"))
            .unwrap();
        assert_eq!(box_sign(&ratio, &params), Some(BoxSign::Positive));
        assert_eq!(box_sign(&(&RatFunc::one() - &ratio), &params), None);
        // −ν·β − 2 < 0
        let product = &(&RatFunc::var("nu") * &RatFunc::var("beta")) + &RatFunc::from_integer(2);
        assert_eq!(box_sign(&-product, &params), Some(BoxSign::Negative));
    }

    #[test]
    fn closed_ends_and_even_powers() {
        // x in [0, 1]: x ≥ 0 with zero attained; x² − 1 ≤ 0; on [−1, 2], x² ≥ 0.
        let x = Param {
            lower: Some((q(0, 1), true)),
            upper: Some((q(1, 1), true)),
            ..Param::undeclared("x")
        };
        let var = RatFunc::var("x");
        assert_eq!(
            box_sign(&var, std::slice::from_ref(&x)),
            Some(BoxSign::NonNegative)
        );
        let square = &var * &var;
        assert_eq!(
            box_sign(&(&square - &RatFunc::one()), &[x]),
            Some(BoxSign::NonPositive)
        );
        let wide = Param {
            lower: Some((q(-1, 1), true)),
            upper: Some((q(2, 1), true)),
            ..Param::undeclared("x")
        };
        assert_eq!(box_sign(&square, &[wide]), Some(BoxSign::NonNegative));
        // An undeclared parameter decides nothing.
        assert_eq!(box_sign(&RatFunc::var("y"), &[]), None);
    }

    use crate::algebra::Poly;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(300))]

        /// A sign the enclosure proves holds at every sampled point of the box.
        #[test]
        fn proven_signs_hold_at_sampled_points(
            terms in proptest::collection::vec((-3i64..=3, 0u32..=2, 0u32..=2), 1..=4),
            den in proptest::collection::vec((-3i64..=3, 0u32..=1, 0u32..=1), 1..=2),
            x_low in -2i64..=1,
            y_low in -2i64..=1,
            points in proptest::collection::vec((0i64..40, 0i64..40), 10),
        ) {
            let poly = |t: &[(i64, u32, u32)]| {
                t.iter().fold(Poly::zero(), |acc, (c, ex, ey)| {
                    let m = &Poly::var("x").pow(*ex) * &Poly::var("y").pow(*ey);
                    &acc + &m.scale(&q(*c, 1))
                })
            };
            let (n, d) = (poly(&terms), poly(&den));
            prop_assume!(!d.is_zero());
            let f = RatFunc::new(n, d).unwrap();
            let declared = |name: &str, low: i64| Param {
                lower: Some((q(low, 1), true)),
                upper: Some((q(low + 4, 1), false)),
                ..Param::undeclared(name)
            };
            let params = [declared("x", x_low), declared("y", y_low)];
            let Some(sign) = box_sign(&f, &params) else { return Ok(()); };
            for (a, b) in points {
                let values = [
                    ("x".to_string(), q(x_low, 1) + q(a, 10)),
                    ("y".to_string(), q(y_low, 1) + q(b, 10)),
                ]
                .into();
                let Ok(v) = f.eval(&values) else { continue };
                let ok = match sign {
                    BoxSign::Positive => v.is_positive(),
                    BoxSign::Negative => v.is_negative(),
                    BoxSign::NonNegative => !v.is_negative(),
                    BoxSign::NonPositive => !v.is_positive(),
                };
                prop_assert!(ok, "{:?} but f = {} at {:?}", sign, v, values);
            }
        }
    }
}
