//! Exact finite sums of a first-order product by binary splitting.
//!
//! For terms u(k) = Π_{m=first+1}^{k} r(m) (u(first) = 1) over k = first, …, last, the sums
//! Σ k^j u(k) (j < the number of weights) are returned as integer fractions T_j / Q, and the
//! last term u(last) as P / Q. Each step r(m) = p(m)/q(m) comes as two integers, never reduced.
//!
//! A left-to-right walk that adds reduced rationals costs a gcd per step on numbers that grow by
//! the size of p(m) q(m) every step: quadratic in the number of steps, with a large constant
//! (a rule with 60-digit shifts and 6,666 steps took minutes). Splitting the range in halves
//! and combining the halves with
//!
//! ```text
//! P = P_l P_r,   Q = Q_l Q_r,   T_j = Q_r T_l,j + P_l T_r,j
//! ```
//!
//! (the classical binary splitting of hypergeometric-type series; Haible and Papanikolaou,
//! "Fast multiprecision evaluation of series of rational numbers", 1998) multiplies numbers of
//! balanced sizes, which GMP does in quasi-linear time, and leaves a single reduction to the
//! caller.

use rug::Integer;

/// The sums and the last term over a range, as fractions with the common denominator `q`.
#[derive(Clone, Debug)]
pub struct SplitSums {
    /// Σ_k k^j u(k) = t[j] / q.
    pub t: Vec<Integer>,
    /// u(last) = p / q.
    pub p: Integer,
    pub q: Integer,
}

struct Node {
    p: Integer,
    q: Integer,
    t: Vec<Integer>,
}

/// The sums Σ_{k=first}^{first+count−1} k^j u(k) for j < `weights`, and u(last), where
/// `step(m)` gives r(m) = p/q for m = first+1, …, first+count−1 (q ≠ 0; a pole is the
/// caller's error). Once a step returns p = 0 every later term is zero and `step` is not
/// called again, so a rule may have poles beyond the end of its support. `count` ≥ 1.
pub fn split_sums<E>(
    first: &Integer,
    count: u64,
    weights: usize,
    mut step: impl FnMut(&Integer) -> Result<(Integer, Integer), E>,
) -> Result<SplitSums, E> {
    assert!(count >= 1, "an empty range has no last term");
    let mut ended = false;
    let node = split(first, 0, count, count, weights, &mut step, &mut ended)?;
    Ok(SplitSums {
        t: node.t,
        p: node.p,
        q: node.q,
    })
}

/// Leaves i in [lo, hi) of a range of `count` terms: the leaf i holds the term k = first + i
/// and the step r(k+1) out of it (1 for the last term).
fn split<E>(
    first: &Integer,
    lo: u64,
    hi: u64,
    count: u64,
    weights: usize,
    step: &mut impl FnMut(&Integer) -> Result<(Integer, Integer), E>,
    ended: &mut bool,
) -> Result<Node, E> {
    if hi - lo == 1 {
        let k = Integer::from(first + lo);
        let (p, q) = if lo + 1 == count || *ended {
            (Integer::from(1), Integer::from(1))
        } else {
            let (p, q) = step(&Integer::from(&k + 1))?;
            *ended = p == 0;
            (p, q)
        };
        let mut t = Vec::with_capacity(weights);
        let mut w = q.clone();
        for j in 0..weights {
            if j + 1 < weights {
                let next = Integer::from(&w * &k);
                t.push(std::mem::replace(&mut w, next));
            } else {
                t.push(std::mem::take(&mut w));
            }
        }
        return Ok(Node { p, q, t });
    }
    let mid = lo + (hi - lo) / 2;
    let left = split(first, lo, mid, count, weights, step, ended)?;
    let right = split(first, mid, hi, count, weights, step, ended)?;
    let t = left
        .t
        .into_iter()
        .zip(right.t)
        .map(|(tl, tr)| tl * &right.q + Integer::from(&left.p * &tr))
        .collect();
    Ok(Node {
        p: left.p * right.p,
        q: left.q * right.q,
        t,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::ops::Pow;
    use rug::Rational;

    /// The same sums by a plain walk in reduced rationals.
    fn walk(first: i64, count: u64, weights: usize, r: impl Fn(i64) -> Rational) -> Vec<Rational> {
        let mut u = Rational::from(1);
        let mut sums = vec![Rational::new(); weights];
        for i in 0..count as i64 {
            let k = first + i;
            if i > 0 {
                u *= r(k);
            }
            let mut w = u.clone();
            for s in sums.iter_mut() {
                *s += &w;
                w *= k;
            }
        }
        sums
    }

    #[test]
    fn binomial_sums_and_last_term() {
        // r(m) = (n − m + 1)/m · x gives u(k) = C(n, k) x^k from k = 0: Σ u = (1 + x)^n
        // (binomial theorem, DLMF 1.2.2), Σ k u = n x (1 + x)^(n−1) (its derivative times x).
        let (n, x) = (40i64, Rational::from((2, 3)));
        let s = split_sums(&Integer::from(0), (n + 1) as u64, 2, |m| {
            Ok::<_, ()>((
                Integer::from(n - m.to_i64().unwrap() + 1) * x.numer(),
                Integer::from(m * x.denom()),
            ))
        })
        .unwrap();
        let one_plus_x = Rational::from(1) + &x;
        let total = one_plus_x.clone().pow(40u32);
        assert_eq!(Rational::from((s.t[0].clone(), s.q.clone())), total);
        let mean = Rational::from(n) * &x * one_plus_x.pow(39u32);
        assert_eq!(Rational::from((s.t[1].clone(), s.q.clone())), mean);
        // u(n) = x^n.
        assert_eq!(Rational::from((s.p.clone(), s.q.clone())), x.pow(40u32));
    }

    #[test]
    fn agrees_with_a_walk_at_every_length() {
        // r(m) = −(2m − 7)/(3m + 1): signs, a factor that changes sign, odd and even lengths.
        let r = |m: i64| Rational::from((-(2 * m - 7), 3 * m + 1));
        for count in 1..=37u64 {
            let s = split_sums(&Integer::from(-2), count, 3, |m| {
                let q = r(m.to_i64().unwrap());
                Ok::<_, ()>((q.numer().clone(), q.denom().clone()))
            })
            .unwrap();
            let expected = walk(-2, count, 3, r);
            for (j, want) in expected.iter().enumerate() {
                assert_eq!(
                    Rational::from((s.t[j].clone(), s.q.clone())),
                    *want,
                    "count {count}, j {j}"
                );
            }
        }
    }

    #[test]
    fn steps_after_a_zero_are_not_taken() {
        // r(m) = (5 − m)/(m − 9): zero at m = 5, a pole at m = 9 that the sum never reaches.
        let s = split_sums(&Integer::from(0), 20, 1, |m| {
            let m = m.to_i64().unwrap();
            assert!(m <= 5, "step {m} taken after the zero");
            Ok::<_, ()>((Integer::from(5 - m), Integer::from(m - 9)))
        })
        .unwrap();
        let expected = walk(0, 5, 1, |m| Rational::from((5 - m, m - 9)));
        assert_eq!(Rational::from((s.t[0].clone(), s.q.clone())), expected[0]);
        assert_eq!(s.p, 0);
    }

    #[test]
    fn a_pole_is_the_callers_error() {
        let e = split_sums(&Integer::from(1), 10, 1, |m| {
            if *m == 4 {
                Err(format!("pole at {m}"))
            } else {
                Ok((Integer::from(1), Integer::from(2)))
            }
        });
        assert_eq!(e.unwrap_err(), "pole at 4");
    }
}
