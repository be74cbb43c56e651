//! telescope: solve first-order ratio rules `a(k)/a(k-1) = R(k)` into checked closed forms.

pub mod algebra;
pub mod diagnostic;
pub mod syntax;
