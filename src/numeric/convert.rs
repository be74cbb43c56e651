//! Conversions between the algebra's exact numbers (`num`) and GMP numbers (`rug`); they
//! live in [`crate::algebra::rational`], which evaluates polynomials with GMP.

pub use crate::algebra::{from_rug_integer, from_rug_rational, to_rug_integer, to_rug_rational};

#[cfg(test)]
mod tests {
    use super::*;
    use num_bigint::BigInt;
    use num_rational::BigRational;
    use rug::Rational;

    #[test]
    fn round_trips_large_and_negative_values() {
        let n: BigInt = "-123456789012345678901234567890123".parse().unwrap();
        assert_eq!(
            to_rug_integer(&n).to_string(),
            "-123456789012345678901234567890123"
        );
        let q = BigRational::new(BigInt::from(-6), BigInt::from(4));
        assert_eq!(to_rug_rational(&q), Rational::from((-3, 2)));
        let big = BigRational::new(n, BigInt::from(7) << 200);
        assert_eq!(from_rug_rational(&to_rug_rational(&big)), big);
    }
}
