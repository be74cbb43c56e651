//! Power products of named variables, and the term order polynomials are listed in.

use std::cmp::Ordering;
use std::fmt;
use std::sync::Arc;

/// A variable's name: shared, so that copying a monomial copies pointers, not strings.
type Name = Arc<str>;

/// Name order; the same allocation (a name copied along a computation) is equal at once.
fn cmp_names(a: &Name, b: &Name) -> Ordering {
    if Arc::ptr_eq(a, b) {
        Ordering::Equal
    } else {
        a.cmp(b)
    }
}

/// A power product such as `rho^2*k`: `(name, exponent)` pairs sorted by name, every exponent
/// positive, so that equal products are equal values. The empty product is `1`.
///
/// The derived `Ord` is only a storage order (by name, then exponent); the order in which a
/// polynomial lists its terms is [`Monomial::canonical_cmp`].
#[derive(Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Monomial(Vec<(Name, u32)>);

impl Monomial {
    pub fn one() -> Self {
        Monomial(Vec::new())
    }

    pub fn var(name: &str) -> Self {
        Monomial(vec![(Name::from(name), 1)])
    }

    /// Builds a product from `(name, exponent)` pairs in any order; repeated names multiply,
    /// zero exponents vanish.
    pub fn from_factors<S: AsRef<str>>(factors: impl IntoIterator<Item = (S, u32)>) -> Self {
        factors
            .into_iter()
            .filter(|(_, e)| *e > 0)
            .fold(Monomial::one(), |acc, (name, e)| {
                acc.mul(&Monomial(vec![(Name::from(name.as_ref()), e)]))
            })
    }

    pub fn is_one(&self) -> bool {
        self.0.is_empty()
    }

    /// Total degree.
    pub fn degree(&self) -> u32 {
        self.0.iter().map(|(_, e)| e).sum()
    }

    pub fn degree_in(&self, var: &str) -> u32 {
        self.0
            .iter()
            .find(|(name, _)| &**name == var)
            .map_or(0, |(_, e)| *e)
    }

    /// `(name, exponent)` pairs sorted by name.
    pub fn factors(&self) -> impl Iterator<Item = (&str, u32)> {
        self.0.iter().map(|(name, e)| (&**name, *e))
    }

    pub fn mul(&self, other: &Monomial) -> Monomial {
        let mut out = Vec::with_capacity(self.0.len() + other.0.len());
        let (mut i, mut j) = (0, 0);
        while i < self.0.len() && j < other.0.len() {
            let (a, b) = (&self.0[i], &other.0[j]);
            match cmp_names(&a.0, &b.0) {
                Ordering::Less => {
                    out.push(a.clone());
                    i += 1;
                }
                Ordering::Greater => {
                    out.push(b.clone());
                    j += 1;
                }
                Ordering::Equal => {
                    out.push((a.0.clone(), a.1 + b.1));
                    i += 1;
                    j += 1;
                }
            }
        }
        out.extend_from_slice(&self.0[i..]);
        out.extend_from_slice(&other.0[j..]);
        Monomial(out)
    }

    /// `self / other` when every exponent of `other` is at most the one in `self`.
    pub fn checked_div(&self, other: &Monomial) -> Option<Monomial> {
        let mut out = Vec::with_capacity(self.0.len());
        let mut rest = other.0.iter().peekable();
        for (name, e) in &self.0 {
            let taken = match rest.peek() {
                Some((other_name, other_e)) if other_name == name => {
                    let other_e = *other_e;
                    rest.next();
                    if other_e > *e {
                        return None;
                    }
                    other_e
                }
                Some((other_name, _)) if other_name < name => return None,
                _ => 0,
            };
            if *e > taken {
                out.push((name.clone(), e - taken));
            }
        }
        if rest.next().is_some() {
            return None;
        }
        Some(Monomial(out))
    }

    /// The same product with `var` removed, and the exponent it had.
    pub fn split_var(&self, var: &str) -> (Monomial, u32) {
        let exponent = self.degree_in(var);
        let rest = self.0.iter().filter(|(name, _)| &**name != var).cloned();
        (Monomial(rest.collect()), exponent)
    }

    /// The term order used everywhere: higher total degree first, ties broken
    /// lexicographically with variables ranked by name (`a` outranks `b`), so
    /// `a^2 < a*b < b^2 < a < b < 1` in listing order. This is the graded lexicographic order,
    /// a monomial order (common practice), which exact division relies on.
    pub fn canonical_cmp(&self, other: &Monomial) -> Ordering {
        other
            .degree()
            .cmp(&self.degree())
            .then_with(|| self.lex_cmp(other))
    }

    /// Lexicographic part of [`Monomial::canonical_cmp`]: at the first variable (by name)
    /// whose exponents differ, the larger exponent is listed first.
    pub(crate) fn lex_cmp(&self, other: &Monomial) -> Ordering {
        let (mut i, mut j) = (0, 0);
        loop {
            match (self.0.get(i), other.0.get(j)) {
                (None, None) => return Ordering::Equal,
                (None, Some(_)) => return Ordering::Greater,
                (Some(_), None) => return Ordering::Less,
                (Some((a, ea)), Some((b, eb))) => match cmp_names(a, b) {
                    Ordering::Less => return Ordering::Less,
                    Ordering::Greater => return Ordering::Greater,
                    Ordering::Equal => {
                        if ea != eb {
                            return eb.cmp(ea);
                        }
                        i += 1;
                        j += 1;
                    }
                },
            }
        }
    }
}

impl fmt::Display for Monomial {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.0.is_empty() {
            return write!(f, "1");
        }
        for (index, (name, e)) in self.0.iter().enumerate() {
            if index > 0 {
                write!(f, "*")?;
            }
            if *e == 1 {
                write!(f, "{name}")?;
            } else {
                write!(f, "{name}^{e}")?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(factors: &[(&str, u32)]) -> Monomial {
        Monomial::from_factors(factors.iter().copied())
    }

    #[test]
    fn one_and_var() {
        assert!(Monomial::one().is_one());
        assert_eq!(Monomial::one().degree(), 0);
        assert_eq!(Monomial::var("rho").degree_in("rho"), 1);
        assert_eq!(Monomial::var("rho").degree_in("k"), 0);
        assert_eq!(Monomial::one().to_string(), "1");
    }

    #[test]
    fn from_factors_sorts_merges_and_drops_zero_exponents() {
        let p = m(&[("k", 2), ("alpha", 1), ("k", 1), ("z", 0)]);
        let factors: Vec<_> = p.factors().collect();
        assert_eq!(factors, vec![("alpha", 1), ("k", 3)]);
        assert_eq!(p.degree(), 4);
        assert_eq!(p.to_string(), "alpha*k^3");
    }

    #[test]
    fn mul_and_checked_div() {
        let a = m(&[("x", 2), ("y", 1)]);
        let b = m(&[("y", 2), ("z", 1)]);
        let ab = a.mul(&b);
        assert_eq!(ab, m(&[("x", 2), ("y", 3), ("z", 1)]));
        assert_eq!(ab.checked_div(&b), Some(a.clone()));
        assert_eq!(ab.checked_div(&a), Some(b.clone()));
        assert_eq!(a.checked_div(&b), None);
        assert_eq!(a.checked_div(&m(&[("w", 1)])), None);
        assert_eq!(a.checked_div(&m(&[("z", 1)])), None);
        assert_eq!(a.checked_div(&a), Some(Monomial::one()));
    }

    #[test]
    fn split_var_removes_one_variable() {
        let a = m(&[("k", 3), ("rho", 1)]);
        assert_eq!(a.split_var("k"), (Monomial::var("rho"), 3));
        assert_eq!(a.split_var("N"), (a.clone(), 0));
    }

    #[test]
    fn canonical_order_is_graded_then_lexicographic() {
        // Listing order a^2, a*b, b^2, a, b, 1 (graded lexicographic, common practice).
        let listed = [
            m(&[("a", 2)]),
            m(&[("a", 1), ("b", 1)]),
            m(&[("b", 2)]),
            m(&[("a", 1)]),
            m(&[("b", 1)]),
            Monomial::one(),
        ];
        for (i, x) in listed.iter().enumerate() {
            for (j, y) in listed.iter().enumerate() {
                assert_eq!(x.canonical_cmp(y), i.cmp(&j), "{x} vs {y}");
            }
        }
        assert_eq!(
            m(&[("a", 1), ("c", 2)]).canonical_cmp(&m(&[("b", 3)])),
            Ordering::Less
        );
    }
}
