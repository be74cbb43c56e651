//! Conversions from the algebra's exact numbers (`num`) to GMP numbers (`rug`).

use num_bigint::{BigInt, Sign};
use num_rational::BigRational;
use rug::integer::Order;
use rug::{Integer, Rational};

pub fn to_rug_integer(n: &BigInt) -> Integer {
    let (sign, magnitude) = n.to_bytes_le();
    let value = Integer::from_digits(&magnitude, Order::Lsf);
    if sign == Sign::Minus {
        -value
    } else {
        value
    }
}

pub fn to_rug_rational(q: &BigRational) -> Rational {
    Rational::from((to_rug_integer(q.numer()), to_rug_integer(q.denom())))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_trips_large_and_negative_values() {
        let n: BigInt = "-123456789012345678901234567890123".parse().unwrap();
        assert_eq!(
            to_rug_integer(&n).to_string(),
            "-123456789012345678901234567890123"
        );
        let q = BigRational::new(BigInt::from(-6), BigInt::from(4));
        assert_eq!(to_rug_rational(&q), Rational::from((-3, 2)));
    }
}
