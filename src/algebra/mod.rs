//! Exact polynomials and rational functions over the rationals in named parameters.
//!
//! This is the floor the rest of the crate stands on. It knows nothing about recurrences: the
//! index `k` is just another variable. Everything is exact ([`Q`] is an arbitrary-precision
//! rational); nothing here ever rounds.
//!
//! - [`Monomial`], [`Poly`]: multivariate polynomials over Q, terms listed in graded
//!   lexicographic order (see [`Poly::terms`]).
//! - [`Poly::gcd`]: multivariate gcd (recursive, primitive remainder sequences).
//! - [`RatFunc`]: rational functions in a canonical form, so equal values are equal structs.
//! - [`rational_roots`]: rational roots of a univariate polynomial, with multiplicities.
//! - [`q`], [`parse_q`]: exact rationals from integers and from text such as `0.3`.
//!
//! ```
//! use telescope::algebra::{RatFunc, parse_q};
//!
//! let rho = RatFunc::var("rho");
//! let one = RatFunc::one();
//! // 1 + 1/(1 - rho) = (2 - rho)/(1 - rho)
//! let lhs = &one + &one.checked_div(&(&one - &rho)).unwrap();
//! let rhs = (RatFunc::from_integer(2) - &rho).checked_div(&(&one - &rho)).unwrap();
//! assert_eq!(lhs, rhs);
//! assert_eq!(lhs.to_string(), "(rho - 2)/(rho - 1)");
//!
//! let values = [("rho".to_string(), parse_q("0.3").unwrap())].into();
//! assert_eq!(lhs.eval(&values), Ok(telescope::algebra::q(17, 7)));
//! ```

mod dense;
mod gcd;
mod modular;
mod monomial;
mod poly;
mod poly_ops;
mod ratfunc;
mod ratfunc_ops;
mod rational;
mod roots;

#[cfg(test)]
mod properties;

pub(crate) use dense::gcd as univariate_gcd;
pub(crate) use modular::Residue;
pub use monomial::Monomial;
pub use poly::{Poly, UnboundVariable};
pub use ratfunc::{EvalError, RatFunc};
pub use rational::{
    from_rug_integer, from_rug_rational, is_integer, parse_q, q, to_rug_integer, to_rug_rational, Q,
};
pub use roots::rational_roots;
