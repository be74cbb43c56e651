//! Exact polynomials and rational functions over the rationals in named parameters.
