//! Where inequalities hold on the declared ranges: a conjunction of `f_i > 0` in one parameter
//! solved exactly into intervals, and one inequality in several parameters solved for a
//! parameter in which it is linear.
//!
//! One parameter: every `f_i = N_i/D_i` keeps its sign between consecutive real zeros of
//! Π N_i·D_i (intermediate value theorem), so the range is cut at those zeros — rational ones
//! exact, irrational ones as isolated algebraic numbers ([`super::algebraic`]) — and each
//! piece is decided at one rational point inside it.

use num_bigint::BigInt;
use num_traits::{One, Signed, Zero};

use crate::algebra::{rational_roots, RatFunc, Q};
use crate::model::Param;

use super::algebraic::{isolate, quotient, separate, squarefree, Algebraic};
use super::box_sign::{box_sign, poly_sign, BoxSign};
use super::ranges::{evaluate, trim, Extended, Interval};
use crate::algebra::univariate_gcd;

/// An end of a solution interval.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Bound {
    MinusInfinity,
    PlusInfinity,
    Rational(Q),
    Algebraic(Box<Algebraic>),
}

/// An interval of parameter values; for an integer parameter both finite ends are integers
/// and included (the interval stands for the integers in it).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Piece {
    pub low: Bound,
    pub low_included: bool,
    pub high: Bound,
    pub high_included: bool,
}

/// Where a conjunction of inequalities in one parameter holds and where it fails, within the
/// parameter's declared range.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Split {
    pub param: String,
    pub integer: bool,
    pub holds: Vec<Piece>,
    pub fails: Vec<Piece>,
    /// Some points of the range are in neither list (the zeros of `open_at`).
    pub has_open_points: bool,
}

/// `param > bound` (or `<`) solves the inequality; `bound` depends on `remaining`.
#[derive(Clone, Debug, PartialEq)]
pub struct LinearSolution {
    pub param: String,
    pub greater: bool,
    pub bound: RatFunc,
    pub remaining: Vec<String>,
}

/// A cut point inside the range.
#[derive(Clone, Debug)]
enum Point {
    Rational(Q),
    Algebraic(Box<Algebraic>),
}

impl Point {
    /// A rational at or just above the point (strictly above for an algebraic number).
    fn upper_rational(&self) -> Q {
        match self {
            Point::Rational(q) => q.clone(),
            Point::Algebraic(a) => a.high.clone(),
        }
    }

    fn lower_rational(&self) -> Q {
        match self {
            Point::Rational(q) => q.clone(),
            Point::Algebraic(a) => a.low.clone(),
        }
    }

    fn bound(&self) -> Bound {
        match self {
            Point::Rational(q) => Bound::Rational(q.clone()),
            Point::Algebraic(a) => Bound::Algebraic(a.clone()),
        }
    }
}

/// `(N, D)` pairs meaning `N/D > 0`, coefficients in the parameter.
pub type Inequalities = [(Vec<Q>, Vec<Q>)];

fn all_hold(inequalities: &Inequalities, x: &Q) -> bool {
    inequalities.iter().all(|(n, d)| {
        let den = evaluate(d, x);
        !den.is_zero() && (evaluate(n, x) / den).is_positive()
    })
}

fn bound_of(x: &Extended) -> Bound {
    match x {
        Extended::MinusInfinity => Bound::MinusInfinity,
        Extended::PlusInfinity => Bound::PlusInfinity,
        Extended::Finite(q) => Bound::Rational(q.clone()),
    }
}

/// Solves the conjunction on `range`; `digits` for the decimals of irrational ends.
pub fn split_univariate(
    param: &str,
    integer: bool,
    inequalities: &Inequalities,
    range: &Interval,
    digits: u32,
) -> Split {
    split_univariate_open(param, integer, inequalities, &[], range, digits)
}

/// `p` divided by its leading coefficient (the zero polynomial as it is): two polynomials
/// with the same zeros up to a constant factor become equal.
fn monic(p: &[Q]) -> Vec<Q> {
    let p = trim(p.to_vec());
    match p.last() {
        Some(lead) if !lead.is_one() => {
            let lead = lead.clone();
            p.iter().map(|c| c / &lead).collect()
        }
        _ => p,
    }
}

/// Pairwise coprime polynomials with the zeros of the squarefree `polys`: a factor common to
/// two is split off as its own (a coprime base), so each zero is a root of exactly one.
fn coprime_base(mut pending: Vec<Vec<Q>>) -> Vec<Vec<Q>> {
    let mut base: Vec<Vec<Q>> = Vec::new();
    while let Some(p) = pending.pop() {
        let p = trim(p);
        if p.len() <= 1 {
            continue;
        }
        let common = base.iter().enumerate().find_map(|(i, b)| {
            let g = trim(univariate_gcd(&p, b));
            (g.len() > 1).then_some((i, g))
        });
        match common {
            None => base.push(p),
            // Each split lowers the total degree by deg g ≥ 1, so this ends.
            Some((i, g)) => {
                let b = base.swap_remove(i);
                pending.extend([quotient(&p, &g), quotient(&b, &g), g]);
            }
        }
    }
    base
}

/// The irrational cuts: the zeros of each base polynomial inside the range, isolated one
/// polynomial at a time, then halved until no two isolating intervals meet (they are distinct
/// numbers, so this ends). Isolating the product instead took 2.2 s for two quintics with
/// 729-bit coefficients, 9 ms for each alone (a fuzz finding).
fn isolate_apart(base: Vec<Vec<Q>>, range: &Interval) -> Vec<Algebraic> {
    let mut cuts: Vec<Algebraic> = base
        .iter()
        .flat_map(|p| isolate(p, &range.low, &range.high, 0))
        .collect();
    loop {
        cuts.sort_by(|x, y| x.low.cmp(&y.low));
        let Some(i) = cuts.windows(2).position(|w| w[0].high >= w[1].low) else {
            return cuts;
        };
        let (left, right) = cuts.split_at_mut(i + 1);
        separate(&mut left[i], &mut right[0]);
    }
}

/// As [`split_univariate`], but the zeros of the `open_at` polynomials are left out of both
/// lists: points where the inequalities fail but the question they stand for is not decided
/// (|r| = 1 for a convergence rate r).
pub fn split_univariate_open(
    param: &str,
    integer: bool,
    inequalities: &Inequalities,
    open_at: &[Vec<Q>],
    range: &Interval,
    digits: u32,
) -> Split {
    // The cuts are the zeros of Π N_i·D_i·P_j. Each distinct factor is taken once (a repeated
    // one adds no zero, and conditions repeat theirs: an `open_at` polynomial is the numerator
    // of its own inequality) and gives up its rational roots on its own; what is left is
    // isolated factor by factor over a coprime base. A fuzz finding repeated a degree-5
    // factor with 656-bit coefficients four times and searched and isolated the roots of the
    // degree-30 product: 13 s, now 0.3 s.
    let mut distinct: Vec<Vec<Q>> = Vec::new();
    for p in inequalities.iter().flat_map(|(n, d)| [n, d]).chain(open_at) {
        let p = monic(p);
        if p.len() != 1 && !distinct.contains(&p) {
            distinct.push(p);
        }
    }
    let roots_of: Vec<(Vec<Q>, Vec<Q>)> = distinct
        .iter()
        .map(|p| {
            let (roots, cofactor) = rational_roots(p);
            (roots.into_iter().map(|(r, _)| r).collect(), cofactor)
        })
        .collect();
    let cofactor_of = |p: &[Q]| -> Vec<Q> {
        let p = monic(p);
        distinct
            .iter()
            .position(|d| *d == p)
            .map_or(p, |i| roots_of[i].1.clone())
    };
    let open_factors: Vec<Vec<Q>> = open_at
        .iter()
        .map(|p| squarefree(&cofactor_of(p)))
        .collect();
    // The verdict at a point: open where an `open_at` polynomial vanishes.
    let at_rational = |q: &Q| -> Option<bool> {
        if open_at.iter().any(|p| evaluate(p, q).is_zero()) {
            None
        } else {
            Some(all_hold(inequalities, q))
        }
    };
    let inside = |q: &Q| {
        let x = Extended::Finite(q.clone());
        x > range.low && x < range.high
    };
    let mut rational: Vec<Q> = roots_of
        .iter()
        .flat_map(|(roots, _)| roots.iter().cloned())
        .filter(|r| inside(r))
        .collect();
    rational.sort();
    rational.dedup();
    // Decimals wait until each cut has its own polynomial (below).
    let cofactors = roots_of.iter().map(|(_, c)| squarefree(c)).collect();
    let mut irrational = isolate_apart(coprime_base(cofactors), range);
    // Each cut as a root of the smallest factor it comes from (its own N_i or D_i), so that
    // it reads as simply as it can: √2, not a root of the whole product.
    let mut factors: Vec<Vec<Q>> = Vec::new();
    for p in inequalities.iter().flat_map(|(n, d)| [n, d]) {
        let p = monic(p);
        if p.len() > 2 && !factors.contains(&p) {
            factors.push(p);
        }
    }
    let factors: Vec<Vec<Q>> = factors
        .iter()
        .map(|p| squarefree(&cofactor_of(p)))
        .filter(|p| p.len() > 2)
        .collect();
    for a in &mut irrational {
        let smallest = factors
            .iter()
            .filter(|f| a.changes_sign(f))
            .min_by_key(|f| f.len());
        match smallest {
            Some(f) => *a = a.with_factor(f, digits),
            None => a.decimal = a.decimal_digits(digits),
        }
    }
    // Each irrational cut is refined until no rational cut lies in its interval; then the
    // intervals order them.
    let finite_ends = [&range.low, &range.high]
        .into_iter()
        .filter_map(|e| match e {
            Extended::Finite(q) => Some(q.clone()),
            _ => None,
        });
    let separate: Vec<Q> = rational.iter().cloned().chain(finite_ends).collect();
    for a in &mut irrational {
        for r in &separate {
            a.is_below(r);
        }
    }
    let mut points: Vec<Point> = rational.into_iter().map(Point::Rational).collect();
    points.extend(
        irrational
            .into_iter()
            .map(|a| Point::Algebraic(Box::new(a))),
    );
    points.sort_by(|a, b| match (a, b) {
        (Point::Rational(x), Point::Rational(y)) => x.cmp(y),
        (Point::Algebraic(x), Point::Algebraic(y)) => x.low.cmp(&y.low),
        // Separated above: the rational lies outside the closed isolating interval.
        (Point::Rational(x), Point::Algebraic(y)) => x.cmp(&y.low),
        (Point::Algebraic(x), Point::Rational(y)) => x.high.cmp(y),
    });
    // The elements along the range: [low end], segment, point, segment, …, [high end].
    struct Element {
        low: Bound,
        low_included: bool,
        high: Bound,
        high_included: bool,
        /// `None`: neither holds nor fails (see `open_at`).
        holds: Option<bool>,
    }
    let mut elements: Vec<Element> = Vec::new();
    if let (Extended::Finite(q), true) = (&range.low, range.low_included) {
        elements.push(Element {
            low: Bound::Rational(q.clone()),
            low_included: true,
            high: Bound::Rational(q.clone()),
            high_included: true,
            holds: at_rational(q),
        });
    }
    let ends: Vec<(Bound, Option<Q>)> = std::iter::once((bound_of(&range.low), None))
        .chain(points.iter().map(|p| (p.bound(), None)))
        .chain(std::iter::once((bound_of(&range.high), None)))
        .collect();
    for i in 0..ends.len() - 1 {
        // The open segment between cut i and cut i + 1, decided at a rational inside it.
        let left = if i == 0 {
            match &range.low {
                Extended::Finite(q) => Some(q.clone()),
                _ => None,
            }
        } else {
            Some(points[i - 1].upper_rational())
        };
        let right = if i + 1 == ends.len() - 1 {
            match &range.high {
                Extended::Finite(q) => Some(q.clone()),
                _ => None,
            }
        } else {
            Some(points[i].lower_rational())
        };
        let sample = match (left, right) {
            (Some(l), Some(r)) => (l + r) / Q::from_integer(2.into()),
            (Some(l), None) => l + Q::one(),
            (None, Some(r)) => r - Q::one(),
            (None, None) => Q::zero(),
        };
        elements.push(Element {
            low: ends[i].0.clone(),
            low_included: false,
            high: ends[i + 1].0.clone(),
            high_included: false,
            holds: Some(all_hold(inequalities, &sample)),
        });
        if i < points.len() {
            // At a cut some N_i or D_i vanishes; a rational cut is decided by value, an
            // irrational one is a zero of some N_i or D_i, where f_i > 0 fails.
            let holds = match &points[i] {
                Point::Rational(q) => at_rational(q),
                Point::Algebraic(a) if open_factors.iter().any(|f| a.changes_sign(f)) => None,
                Point::Algebraic(_) => Some(false),
            };
            let b = points[i].bound();
            elements.push(Element {
                low: b.clone(),
                low_included: true,
                high: b,
                high_included: true,
                holds,
            });
        }
    }
    if let (Extended::Finite(q), true) = (&range.high, range.high_included) {
        elements.push(Element {
            low: Bound::Rational(q.clone()),
            low_included: true,
            high: Bound::Rational(q.clone()),
            high_included: true,
            holds: at_rational(q),
        });
    }
    let mut holds: Vec<Piece> = Vec::new();
    let mut fails: Vec<Piece> = Vec::new();
    let has_open_points = elements.iter().any(|e| e.holds.is_none());
    let mut current: Option<(Option<bool>, Piece)> = None;
    for e in elements {
        match &mut current {
            Some((verdict, piece)) if *verdict == e.holds => {
                piece.high = e.high;
                piece.high_included = e.high_included;
            }
            _ => {
                if let Some((Some(verdict), piece)) = current.take() {
                    if verdict { &mut holds } else { &mut fails }.push(piece);
                }
                current = Some((
                    e.holds,
                    Piece {
                        low: e.low,
                        low_included: e.low_included,
                        high: e.high,
                        high_included: e.high_included,
                    },
                ));
            }
        }
    }
    if let Some((Some(verdict), piece)) = current {
        if verdict { &mut holds } else { &mut fails }.push(piece);
    }
    if integer {
        holds = join_integer_pieces(holds.into_iter().filter_map(integer_piece).collect());
        fails = join_integer_pieces(fails.into_iter().filter_map(integer_piece).collect());
    }
    Split {
        param: param.to_string(),
        integer,
        holds,
        fails,
        has_open_points,
    }
}

/// Integer pieces in order, with neighbours (`… ≤ n` then `n + 1 ≤ …`) joined.
fn join_integer_pieces(pieces: Vec<Piece>) -> Vec<Piece> {
    let mut out: Vec<Piece> = Vec::new();
    for piece in pieces {
        if let Some(last) = out.last_mut() {
            if let (Bound::Rational(h), Bound::Rational(l)) = (&last.high, &piece.low) {
                if h + Q::one() == *l {
                    last.high = piece.high;
                    last.high_included = piece.high_included;
                    continue;
                }
            }
        }
        out.push(piece);
    }
    out
}

/// The integers of a piece as a closed interval with integer ends; `None` when it has none.
fn integer_piece(piece: Piece) -> Option<Piece> {
    let low = match piece.low {
        Bound::Rational(q) => {
            let mut c = q.ceil();
            if c == q && !piece.low_included {
                c += Q::one();
            }
            Some(c.to_integer())
        }
        Bound::Algebraic(mut a) => Some(a.floor() + 1),
        _ => None,
    };
    let high = match piece.high {
        Bound::Rational(q) => {
            let mut f = q.floor();
            if f == q && !piece.high_included {
                f -= Q::one();
            }
            Some(f.to_integer())
        }
        Bound::Algebraic(mut a) => Some(a.floor()),
        _ => None,
    };
    if let (Some(l), Some(h)) = (&low, &high) {
        if l > h {
            return None;
        }
    }
    let to_bound = |v: Option<BigInt>, infinite: Bound| match v {
        Some(n) => (Bound::Rational(Q::from_integer(n)), true),
        None => (infinite, false),
    };
    let (low, low_included) = to_bound(low, Bound::MinusInfinity);
    let (high, high_included) = to_bound(high, Bound::PlusInfinity);
    Some(Piece {
        low,
        low_included,
        high,
        high_included,
    })
}

/// `expr > 0` in several parameters, solved for the first declared parameter in which the
/// numerator is linear with a coefficient of proven sign, when the denominator's sign is
/// proven too (both on the box of declared ranges). `None` otherwise.
pub fn solve_linear(expr: &RatFunc, params: &[Param]) -> Option<LinearSolution> {
    let den_sign = match box_sign(&RatFunc::from_poly(expr.denom().clone()), params)? {
        BoxSign::Positive => 1,
        BoxSign::Negative => -1,
        _ => return None,
    };
    let num = expr.numer();
    let variables = num.variables();
    for param in params.iter().filter(|p| variables.contains(&p.name)) {
        let name = &param.name;
        if num.degree_in(name) != 1 {
            continue;
        }
        let coeffs = num.coeffs_in(name);
        let (constant, slope) = (&coeffs[0], &coeffs[1]);
        let slope_sign = match poly_sign(slope, params) {
            Some(BoxSign::Positive) => 1,
            Some(BoxSign::Negative) => -1,
            _ => continue,
        };
        let bound = RatFunc::new(-constant.clone(), slope.clone())?;
        let remaining: Vec<String> = bound.variables().into_iter().collect();
        if remaining.is_empty() {
            continue;
        }
        return Some(LinearSolution {
            param: name.clone(),
            greater: den_sign * slope_sign > 0,
            bound,
            remaining,
        });
    }
    None
}

impl Split {
    /// Whether the inequalities hold on the whole range (`Some(true)`), nowhere
    /// (`Some(false)`), or on part of it (`None`).
    pub fn everywhere(&self) -> Option<bool> {
        match (self.holds.is_empty(), self.fails.is_empty()) {
            _ if self.has_open_points => None,
            (_, true) => Some(true),
            (true, false) => Some(false),
            _ => None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::q;

    fn range(low: Option<(i64, bool)>, high: Option<(i64, bool)>) -> Interval {
        let end = |e: Option<(i64, bool)>, inf: Extended| match e {
            Some((v, closed)) => (Extended::Finite(q(v, 1)), closed),
            None => (inf, false),
        };
        let (low, low_included) = end(low, Extended::MinusInfinity);
        let (high, high_included) = end(high, Extended::PlusInfinity);
        Interval {
            low,
            low_included,
            high,
            high_included,
        }
    }

    fn rational(v: Q, included: bool) -> (Bound, bool) {
        (Bound::Rational(v), included)
    }

    #[test]
    fn the_variance_condition_of_the_citation_rule() {
        // (1 − 2ρ)/(ρ − 1) > 0 on 0 < ρ < 1 holds exactly for 1/2 < ρ < 1 (by hand: the
        // denominator is negative on the range, the numerator negative for ρ > 1/2).
        let f = [(vec![q(1, 1), q(-2, 1)], vec![q(-1, 1), q(1, 1)])];
        let s = split_univariate(
            "rho",
            false,
            &f,
            &range(Some((0, false)), Some((1, false))),
            20,
        );
        assert_eq!(s.holds.len(), 1);
        let h = &s.holds[0];
        assert_eq!((h.low.clone(), h.low_included), rational(q(1, 2), false));
        assert_eq!((h.high.clone(), h.high_included), rational(q(1, 1), false));
        let f0 = &s.fails[0];
        assert_eq!((f0.low.clone(), f0.low_included), rational(q(0, 1), false));
        assert_eq!((f0.high.clone(), f0.high_included), rational(q(1, 2), true));
        assert_eq!(s.everywhere(), None);
    }

    #[test]
    fn irrational_ends_and_integer_parameters() {
        // 2 − x² > 0 on x ≥ 0: 0 ≤ x < √2; for an integer x ≥ 0: x ∈ {0, 1}.
        let f = [(vec![q(2, 1), q(0, 1), q(-1, 1)], vec![q(1, 1)])];
        let s = split_univariate("x", false, &f, &range(Some((0, true)), None), 10);
        assert_eq!(s.holds.len(), 1);
        let Bound::Algebraic(a) = &s.holds[0].high else {
            panic!("{s:?}")
        };
        assert_eq!(a.decimal, "1.414213562");
        assert!(!s.holds[0].high_included);
        let s = split_univariate("x", true, &f, &range(Some((0, true)), None), 10);
        assert_eq!(s.holds[0].high, Bound::Rational(q(1, 1)));
        assert_eq!(s.fails[0].low, Bound::Rational(q(2, 1)));
        assert_eq!(s.fails[0].high, Bound::PlusInfinity);
        // (2x − 1)² > 0 fails only at x = 1/2: every integer holds, in one piece.
        let g = [(vec![q(1, 1), q(-4, 1), q(4, 1)], vec![q(1, 1)])];
        let s = split_univariate("x", true, &g, &range(Some((-3, true)), Some((3, true))), 10);
        assert_eq!(s.holds.len(), 1, "{s:?}");
        assert!(s.fails.is_empty());
    }

    #[test]
    fn a_conjunction_and_a_removable_point() {
        // |1 − p| < 1 on 0 < p < 1: 1 − (1 − p) > 0 and 1 + (1 − p) > 0 hold everywhere.
        let f = [
            (vec![q(0, 1), q(1, 1)], vec![q(1, 1)]),
            (vec![q(2, 1), q(-1, 1)], vec![q(1, 1)]),
        ];
        let s = split_univariate(
            "p",
            false,
            &f,
            &range(Some((0, false)), Some((1, false))),
            10,
        );
        assert_eq!(s.everywhere(), Some(true));
        // (x − 1)² > 0 on the whole line fails only at x = 1.
        let f = [(vec![q(1, 1), q(-2, 1), q(1, 1)], vec![q(1, 1)])];
        let s = split_univariate("x", false, &f, &range(None, None), 10);
        assert_eq!(s.holds.len(), 2);
        assert_eq!(s.fails.len(), 1);
        assert_eq!(s.fails[0].low, s.fails[0].high);
    }

    #[test]
    fn factors_sharing_a_root_and_roots_a_hair_apart_give_one_cut_each() {
        // (x² − 2)(x² − 3) and x² − 2 share the factor x² − 2; 10^20 x² − 2·10^20 − 1 has the
        // roots ±√(2 + 10^−20), 3.5·10^−21 from ±√2. The coprime base isolates each of the six
        // roots once, and the intervals come out disjoint and ascending (common practice: the
        // coprime base of Collins' cylindrical algebraic decomposition).
        let e20 = q(10, 1).pow(20);
        let polys = vec![
            vec![q(6, 1), q(0, 1), q(-5, 1), q(0, 1), q(1, 1)],
            vec![q(-2, 1), q(0, 1), q(1, 1)],
            vec![-(&e20 * q(2, 1)) - q(1, 1), q(0, 1), e20],
        ];
        let base = coprime_base(polys);
        assert_eq!(base.len(), 3, "{base:?}");
        let cuts = isolate_apart(base, &range(None, None));
        assert!(cuts.windows(2).all(|w| w[0].high < w[1].low), "{cuts:?}");
        let decimals: Vec<String> = cuts.iter().map(|a| a.decimal_digits(25)).collect();
        // √3, √(2 + 10^−20) and √2 to 25 digits by mpmath 1.3.0 (`sqrt` at 40 digits).
        assert_eq!(
            decimals,
            [
                "-1.732050807568877293527446",
                "-1.414213562373095048805224",
                "-1.414213562373095048801689",
                "1.414213562373095048801689",
                "1.414213562373095048805224",
                "1.732050807568877293527446",
            ]
        );
    }

    #[test]
    fn open_points_are_in_neither_list() {
        // |x − 2| < 1 on 0 < x < 3, with |x − 2| = 1 (x = 1) left open: holds on (1, 3),
        // fails on (0, 1).
        let f = [
            (vec![q(3, 1), q(-1, 1)], vec![q(1, 1)]),
            (vec![q(-1, 1), q(1, 1)], vec![q(1, 1)]),
        ];
        let open = [vec![q(3, 1), q(-1, 1)], vec![q(-1, 1), q(1, 1)]];
        let r = range(Some((0, false)), Some((3, false)));
        let s = split_univariate_open("x", false, &f, &open, &r, 10);
        assert_eq!(s.holds[0].low, Bound::Rational(q(1, 1)));
        assert!(!s.holds[0].low_included);
        assert_eq!(s.fails[0].high, Bound::Rational(q(1, 1)));
        assert!(!s.fails[0].high_included);
        // |x| < 1 on 0 < x ≤ 1: holds below 1, open at 1, so not "everywhere".
        let f = [
            (vec![q(1, 1), q(-1, 1)], vec![q(1, 1)]),
            (vec![q(1, 1), q(1, 1)], vec![q(1, 1)]),
        ];
        let open = [f[0].0.clone(), f[1].0.clone()];
        let s = split_univariate_open(
            "x",
            false,
            &f,
            &open,
            &range(Some((0, false)), Some((1, true))),
            10,
        );
        assert!(s.fails.is_empty() && s.has_open_points);
        assert_eq!(s.everywhere(), None);
    }

    #[test]
    fn linear_in_one_of_several_parameters() {
        // (ν − β)/β > 0 with ν, β > 0: ν > β.
        let positive = |n: &str| Param {
            lower: Some((q(0, 1), false)),
            ..Param::undeclared(n)
        };
        let params = [positive("nu"), positive("beta")];
        let e = (&RatFunc::var("nu") - &RatFunc::var("beta"))
            .checked_div(&RatFunc::var("beta"))
            .unwrap();
        let s = solve_linear(&e, &params).unwrap();
        assert_eq!(s.param, "nu");
        assert!(s.greater);
        assert_eq!(s.bound, RatFunc::var("beta"));
        assert_eq!(s.remaining, ["beta"]);
        // β − ν > 0 solved for ν: ν < β.
        let e = &RatFunc::var("beta") - &RatFunc::var("nu");
        let s = solve_linear(&e, &params).unwrap();
        assert_eq!((s.param.as_str(), s.greater), ("nu", false));
        // ν·β − 1: the coefficient β of ν is positive, so ν > 1/β.
        let e = &(&RatFunc::var("nu") * &RatFunc::var("beta")) - &RatFunc::one();
        let s = solve_linear(&e, &params).unwrap();
        assert_eq!(
            s.bound,
            RatFunc::one().checked_div(&RatFunc::var("beta")).unwrap()
        );
    }

    /// Whether `x` lies in the piece (algebraic ends compared by refinement).
    fn piece_contains(p: &Piece, x: &Q) -> bool {
        let above = match &p.low {
            Bound::MinusInfinity => true,
            Bound::PlusInfinity => false,
            Bound::Rational(q) => x > q || (x == q && p.low_included),
            Bound::Algebraic(a) => (**a).clone().is_below(x),
        };
        let below = match &p.high {
            Bound::MinusInfinity => false,
            Bound::PlusInfinity => true,
            Bound::Rational(q) => x < q || (x == q && p.high_included),
            Bound::Algebraic(a) => !(**a).clone().is_below(x),
        };
        above && below
    }

    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(200))]

        /// Every rational point of the range lies in exactly one piece, and the piece's side
        /// agrees with the inequalities evaluated there (exact arithmetic).
        #[test]
        fn pieces_agree_with_direct_evaluation(
            n1 in proptest::collection::vec(-4i64..=4, 1..=4),
            d1 in proptest::collection::vec(-3i64..=3, 1..=3),
            n2 in proptest::collection::vec(-4i64..=4, 1..=3),
            low in proptest::option::of((-5i64..=0, any::<bool>())),
            high in proptest::option::of((1i64..=6, any::<bool>())),
            points in proptest::collection::vec((-60i64..=60, 1i64..=7), 12),
        ) {
            let poly = |c: &[i64]| trim(c.iter().map(|v| q(*v, 1)).collect());
            let (n1, d1, n2) = (poly(&n1), poly(&d1), poly(&n2));
            prop_assume!(!n1.is_empty() && !d1.is_empty() && !n2.is_empty());
            let f = [(n1, d1), (n2, vec![q(1, 1)])];
            let r = range(low, high);
            let s = split_univariate("x", false, &f, &r, 8);
            for (a, b) in points {
                let x = q(a, b) / q(10, 1);
                if !r.contains(&x) {
                    continue;
                }
                let in_holds = s.holds.iter().filter(|p| piece_contains(p, &x)).count();
                let in_fails = s.fails.iter().filter(|p| piece_contains(p, &x)).count();
                prop_assert_eq!(in_holds + in_fails, 1, "x = {} in {:?}", x, s);
                prop_assert_eq!(in_holds == 1, all_hold(&f, &x), "x = {}", x);
            }
            // An integer parameter: every integer of the range, in exactly the right list.
            let s = split_univariate("x", true, &f, &r, 8);
            for n in -6..=7 {
                let x = q(n, 1);
                if !r.contains(&x) {
                    continue;
                }
                let in_holds = s.holds.iter().filter(|p| piece_contains(p, &x)).count();
                let in_fails = s.fails.iter().filter(|p| piece_contains(p, &x)).count();
                prop_assert_eq!(in_holds + in_fails, 1, "x = {} in {:?}", x, s);
                prop_assert_eq!(in_holds == 1, all_hold(&f, &x), "x = {}", x);
            }
        }
    }
}
