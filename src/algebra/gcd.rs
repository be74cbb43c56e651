//! Multivariate polynomial gcd over Q.
//!
//! Recursive scheme (Geddes, Czapor, Labahn, "Algorithms for Computer Algebra", ch. 7): view
//! both polynomials as univariate in one main variable with coefficients in the remaining
//! variables; the gcd is gcd(contents) times the gcd of the primitive parts. Contents are
//! gcds of polynomials in fewer variables, so the recursion ends at constants.
//!
//! Remainder sequences swell quickly in several variables, so cheap exits come first: common
//! monomial factors are split off, evaluation images bound the degree of the gcd in each
//! variable (a bound of 0 in the main variable means the primitive parts are coprime, the
//! usual case when adding rational functions), and a divisibility test catches `b | a`. Only
//! what is left goes through the subresultant remainder sequence.

use std::collections::BTreeMap;

use num_traits::One;

use super::dense;
use super::modular;
use super::monomial::Monomial;
use super::poly::Poly;
use super::rational::Q;

pub(crate) fn gcd(a: &Poly, b: &Poly) -> Poly {
    gcd_with(a, b, true)
}

/// [`gcd`], with the cheap exits switched off at the top level when `shortcuts` is false (so
/// that the tests can compare both routes).
fn gcd_with(a: &Poly, b: &Poly, shortcuts: bool) -> Poly {
    if a.is_zero() {
        return normalise(b);
    }
    if b.is_zero() {
        return normalise(a);
    }
    // Cheap exits before any splitting: a non-zero constant is a unit, and gcd(a, a) is a
    // itself. Both are frequent (rational functions over the denominator 1, sums of equal
    // denominators) and give the same normalised answer as the general path.
    if shortcuts && (is_constant(a) || is_constant(b)) {
        return Poly::one();
    }
    if shortcuts && a == b {
        return normalise(a);
    }
    // Primitive integer parts first (the gcd is defined up to a unit): every product and
    // sum below is then one of integers. With rational coefficients `num` reduced each one by
    // its binary gcd, 99% of 22 s on a fuzzed rule whose moments multiplied rational functions
    // in six names with 692-bit fractions.
    let (a, b) = (normalise(a), normalise(b));
    let (monomial_a, a) = split_monomial_content(&a);
    let (monomial_b, b) = split_monomial_content(&b);
    let common_monomial = Poly::from_term(monomial_gcd(&monomial_a, &monomial_b), Q::one());
    if let Some(rest) = small_case_gcd(&a, &b).filter(|_| shortcuts) {
        return normalise(&(&rest * &common_monomial));
    }
    let bounds = degree_bounds(&a, &b);
    if bounds.iter().all(|(_, bound)| *bound == Some(0)) {
        // Degree 0 in every variable: the gcd is a constant (the usual case when adding
        // rational functions), and no content needs computing.
        return common_monomial;
    }
    let Some((main, bound)) = choose_main_variable(&a, &b, &bounds) else {
        return common_monomial;
    };
    // The content of the gcd divides the gcd, so its degree in each other variable is within
    // that variable's bound: bounds of 0 everywhere else make it a constant.
    let content = if bounds
        .iter()
        .all(|(var, bound)| *var == main || *bound == Some(0))
    {
        Poly::one()
    } else {
        common_content_in(&a, &b, &main)
    };
    let (a, b) = if content.is_one() {
        (a, b)
    } else {
        let divide = |p: &Poly| {
            p.div_exact(&content)
                .expect("the content divides the input")
        };
        (divide(&a), divide(&b))
    };
    let primitive = primitive_gcd_in(a, b, &main, bound);
    normalise(&(&(&content * &primitive) * &common_monomial))
}

/// The gcd (up to a unit) of two non-zero polynomials free of monomial factors, in the cases
/// that need no recursion; `None` otherwise.
/// - A constant is a unit.
/// - A polynomial of total degree 1 is irreducible, so the gcd is that polynomial when it
///   divides the other and 1 when it does not.
/// - Two polynomials in the same single variable: Euclid's algorithm over Q on the dense
///   coefficients, which is what the degree bound would compute anyway.
fn small_case_gcd(a: &Poly, b: &Poly) -> Option<Poly> {
    if is_constant(a) || is_constant(b) {
        return Some(Poly::one());
    }
    for (linear, other) in [(a, b), (b, a)] {
        if linear.total_degree() == 1 {
            let divides = other.div_exact(linear).is_some();
            return Some(if divides { linear.clone() } else { Poly::one() });
        }
    }
    let variables = a.variables();
    if variables.len() == 1 && b.variables() == variables {
        let var = variables.first().expect("one variable");
        let coeffs = |p: &Poly| p.univariate_coeffs(var).expect("only this variable");
        let g = dense::gcd(&coeffs(a), &coeffs(b));
        return Some(Poly::from_univariate(var, &g));
    }
    None
}

/// Whether a non-zero polynomial has no variable.
fn is_constant(p: &Poly) -> bool {
    p.term_count() == 1 && p.leading_term().is_some_and(|(m, _)| m.is_one())
}

/// The largest monomial dividing every term, and the quotient.
fn split_monomial_content(p: &Poly) -> (Monomial, Poly) {
    let mut terms = p.terms();
    let (first, _) = terms.next().expect("non-zero");
    let common = terms.fold(first.clone(), |acc, (m, _)| monomial_gcd(&acc, m));
    if common.is_one() {
        return (common, p.clone());
    }
    let quotient = Poly::from_terms(p.terms().map(|(m, c)| {
        let reduced = m.checked_div(&common).expect("divides every term");
        (reduced, c.clone())
    }));
    (common, quotient)
}

/// Least exponent of each variable.
fn monomial_gcd(a: &Monomial, b: &Monomial) -> Monomial {
    Monomial::from_factors(
        a.factors()
            .map(|(name, e)| (name, e.min(b.degree_in(name)))),
    )
}

/// The degree bound of the gcd in every variable of either input (see [`degree_bound`]): 0
/// for a variable only one input contains, `None` where no tried point was usable.
fn degree_bounds(a: &Poly, b: &Poly) -> Vec<(String, Option<u32>)> {
    let mut variables = a.variables();
    variables.extend(b.variables());
    let variables: Vec<String> = variables.into_iter().collect();
    // One point per attempt for every variable; each image leaves its own variable free.
    let points: Vec<BTreeMap<&str, u64>> = (0..DEGREE_BOUND_ATTEMPTS)
        .map(|attempt| modular::point(&variables, attempt))
        .collect();
    variables
        .iter()
        .map(|var| {
            let bound = if a.contains_var(var) && b.contains_var(var) {
                degree_bound_at(a, b, var, &points)
            } else {
                Some(0)
            };
            (var.clone(), bound)
        })
        .collect()
}

/// Picks the main variable, with the degree bound of the gcd in it when one was computed.
/// First choice: a variable only one input contains (the gcd is then the common content of
/// the coefficients in it); next, one whose degree bound is 0; otherwise the smallest bound,
/// so the remainder sequence is short, and of those the lowest degree. `None` when neither
/// input has a variable.
fn choose_main_variable(
    a: &Poly,
    b: &Poly,
    bounds: &[(String, Option<u32>)],
) -> Option<(String, Option<u32>)> {
    if let Some((var, _)) = bounds
        .iter()
        .find(|(v, _)| !a.contains_var(v) || !b.contains_var(v))
    {
        return Some((var.clone(), None));
    }
    // Among equal bounds, the lowest degree: the pseudo-divisions raise leading coefficients
    // to the difference of the degrees (a fuzzed rule chose k, of degrees 35 and 5, over
    // names of degree 1, and its remainder sequence ran past 5 minutes).
    let bounded = bounds
        .iter()
        .filter_map(|(v, bound)| bound.map(|bound| (bound, a.degree_in(v).max(b.degree_in(v)), v)))
        .min();
    match bounded {
        Some((bound, _, var)) => Some((var.clone(), Some(bound))),
        None => bounds.first().map(|(v, _)| (v.clone(), None)),
    }
}

/// Primitive part with integer coefficients and positive leading coefficient; zero stays zero.
fn normalise(p: &Poly) -> Poly {
    p.content_and_primitive().1
}

/// The gcd of every coefficient of `a` and of `b` as polynomials in `var` (coefficients do
/// not contain `var`): the content the two share. Smallest coefficients first, stopping at
/// the first unit, so that a coprime pair costs a few small gcds rather than the two whole
/// contents. For non-zero `a` and `b` only.
fn common_content_in(a: &Poly, b: &Poly, var: &str) -> Poly {
    let mut coeffs = a.coeffs_in(var);
    coeffs.extend(b.coeffs_in(var));
    content_of(coeffs)
}

/// The gcd of a list of polynomials, not all zero: smallest first, stopping at the first unit.
fn content_of(mut coeffs: Vec<Poly>) -> Poly {
    coeffs.retain(|c| !c.is_zero());
    if coeffs.iter().any(is_constant) {
        return Poly::one();
    }
    coeffs.sort_by_key(Poly::term_count);
    let mut content = Poly::zero();
    for coeff in &coeffs {
        content = gcd(&content, coeff);
        if content.is_one() {
            break;
        }
    }
    content
}

/// Primitive part of `p` as a polynomial in `var`: `p` divided by the gcd of its coefficients.
/// For non-zero `p` only.
fn primitive_part_in(p: &Poly, var: &str) -> Poly {
    let content = content_of(p.coeffs_in(var));
    if content.is_one() {
        return normalise(p);
    }
    let primitive = p
        .div_exact(&content)
        .expect("the content divides every coefficient");
    normalise(&primitive)
}

/// Gcd of two non-zero polynomials whose coefficients in `var` have no common factor (each
/// may still have a content of its own: the remainder sequence does not need primitive
/// inputs); `known_bound` is a degree bound in `var` already computed for them (or for any
/// multiples by factors free of `var`).
fn primitive_gcd_in(a: Poly, b: Poly, var: &str, known_bound: Option<u32>) -> Poly {
    let (higher, lower) = if a.degree_in(var) >= b.degree_in(var) {
        (a, b)
    } else {
        (b, a)
    };
    if lower.degree_in(var) == 0 {
        // Primitive in `var` and free of it: a constant, coprime to everything.
        return Poly::one();
    }
    let bound = known_bound.or_else(|| degree_bound(&higher, &lower, var));
    if bound == Some(0) {
        return Poly::one();
    }
    if bound == Some(lower.degree_in(var)) && higher.div_exact(&lower).is_some() {
        return lower;
    }
    subresultant_gcd(higher, lower, var)
}

/// Upper bound on the degree in `var` of gcd(a, b): the degree of the gcd of the univariate
/// images modulo a prime at a point where neither leading coefficient vanishes (see
/// [`modular`]). `None` if no tried point was usable.
fn degree_bound(a: &Poly, b: &Poly, var: &str) -> Option<u32> {
    let mut variables = a.variables();
    variables.extend(b.variables());
    let variables: Vec<String> = variables.into_iter().collect();
    let points: Vec<BTreeMap<&str, u64>> = (0..DEGREE_BOUND_ATTEMPTS)
        .map(|attempt| modular::point(&variables, attempt))
        .collect();
    degree_bound_at(a, b, var, &points)
}

/// Points tried for a degree bound before giving up.
const DEGREE_BOUND_ATTEMPTS: u64 = 4;

/// [`degree_bound`] at given points (values for every variable; `var`'s own is ignored).
fn degree_bound_at(a: &Poly, b: &Poly, var: &str, points: &[BTreeMap<&str, u64>]) -> Option<u32> {
    let (degree_a, degree_b) = (a.degree_in(var) as usize, b.degree_in(var) as usize);
    for point in points {
        let (Some(image_a), Some(image_b)) =
            (modular::image(a, var, point), modular::image(b, var, point))
        else {
            continue;
        };
        if image_a[degree_a] == 0 || image_b[degree_b] == 0 {
            // A leading coefficient vanishes here: the images could lose a common factor.
            continue;
        }
        return modular::gcd_degree(&image_a, &image_b).map(|d| d as u32);
    }
    None
}

/// Last non-zero member of the subresultant remainder sequence, made primitive in `var`
/// (Knuth, TAOCP vol. 2, §4.6.1, Algorithm C; Brown and Traub 1971). Its exact divisions
/// keep coefficients small without a gcd per step.
fn subresultant_gcd(higher: Poly, lower: Poly, var: &str) -> Poly {
    let (mut a, mut b) = (higher, lower);
    let (mut g, mut h) = (Poly::one(), Poly::one());
    loop {
        let delta = a.degree_in(var) - b.degree_in(var);
        let remainder = pseudo_remainder(&a, &b, var);
        if remainder.is_zero() {
            return primitive_part_in(&b, var);
        }
        if remainder.degree_in(var) == 0 {
            return Poly::one();
        }
        let divisor = &g * &h.pow(delta);
        a = b;
        b = remainder
            .div_exact(&divisor)
            .expect("subresultant division is exact");
        g = a.leading_coeff_in(var);
        h = if delta == 0 {
            h
        } else {
            g.pow(delta)
                .div_exact(&h.pow(delta - 1))
                .expect("subresultant division is exact")
        };
    }
}

/// `lc(b)^(deg a - deg b + 1) * a` reduced modulo `b` in `var` (pseudo-division, Knuth,
/// TAOCP vol. 2, §4.6.1, Algorithm R); the full power of the leading coefficient is what the
/// subresultant divisions assume.
fn pseudo_remainder(a: &Poly, b: &Poly, var: &str) -> Poly {
    let degree_b = b.degree_in(var);
    let lead_b = b.leading_coeff_in(var);
    let mut steps_left = a.degree_in(var) + 1 - degree_b;
    let mut remainder = a.clone();
    while !remainder.is_zero() && remainder.degree_in(var) >= degree_b {
        let degree_r = remainder.degree_in(var);
        let lead_r = remainder.leading_coeff_in(var);
        let shift = Poly::var(var).pow(degree_r - degree_b);
        remainder = &remainder * &lead_b - &(&lead_r * &shift) * b;
        steps_left -= 1;
    }
    &remainder * &lead_b.pow(steps_left)
}

#[cfg(test)]
mod tests {
    use crate::algebra::rational::q;
    use crate::algebra::Poly;

    fn v(name: &str) -> Poly {
        Poly::var(name)
    }
    fn c(n: i64) -> Poly {
        Poly::from_integer(n)
    }

    #[test]
    fn zero_and_constant_cases() {
        let p = c(2) * v("x") + c(4);
        assert_eq!(Poly::gcd(&Poly::zero(), &Poly::zero()), Poly::zero());
        assert_eq!(Poly::gcd(&Poly::zero(), &p), v("x") + c(2));
        assert_eq!(Poly::gcd(&p, &Poly::zero()), v("x") + c(2));
        assert_eq!(Poly::gcd(&c(6), &p), Poly::one());
        assert_eq!(Poly::gcd(&Poly::constant(q(-1, 3)), &p), Poly::one());
        assert_eq!(Poly::gcd(&c(6), &c(4)), Poly::one());
        assert_eq!(Poly::gcd(&Poly::zero(), &c(-7)), Poly::one());
    }

    #[test]
    fn univariate_gcd() {
        // (x-1)(x+2) and (x-1)(x-3) share x - 1.
        let x = v("x");
        let a = (&x - c(1)) * (&x + c(2));
        let b = (&x - c(1)) * (&x - c(3));
        assert_eq!(Poly::gcd(&a, &b), &x - c(1));
        assert_eq!(Poly::gcd(&(&x + c(2)), &(&x - c(3))), Poly::one());
        // Rational coefficients: gcd(x/2 - 1/3, 3x^2 - 2x) = 3x - 2.
        let rational = x.scale(&q(1, 2)) - Poly::constant(q(1, 3));
        assert_eq!(
            Poly::gcd(&rational, &(c(3) * x.pow(2) - c(2) * &x)),
            c(3) * &x - c(2)
        );
    }

    #[test]
    fn normalised_sign_and_content() {
        let x = v("x");
        let y = v("y");
        let g = Poly::gcd(&(c(-4) * (&x - &y)), &(c(-6) * (&x - &y) * &x));
        assert_eq!(g, &x - &y);
        assert_eq!(Poly::gcd(&(-&x), &(-&x)), x);
    }

    #[test]
    fn three_variable_common_factor() {
        // gcd((x+y)(x-2z)(y+1), (x+y)^2 (y+1) z) = (x+y)(y+1).
        let (x, y, z) = (v("x"), v("y"), v("z"));
        let a = (&x + &y) * (&x - c(2) * &z) * (&y + c(1));
        let b = (&x + &y).pow(2) * (&y + c(1)) * &z;
        let expected = (&x + &y) * (&y + c(1));
        assert_eq!(Poly::gcd(&a, &b), expected);
        assert_eq!(Poly::gcd(&b, &a), expected);
    }

    #[test]
    fn a_content_shared_by_both_inputs_beside_contents_of_their_own() {
        use super::gcd_with;
        // (yz + 1)(x² + y)(z + 2) and (yz + 1)(x² + x + z)(y + 3): as polynomials in x each
        // has a content of its own, and only yz + 1 is common.
        let (x, y, z) = (v("x"), v("y"), v("z"));
        let shared = &y * &z + c(1);
        let a = &shared * (x.pow(2) + &y) * (&z + c(2));
        let b = &shared * (x.pow(2) + &x + &z) * (&y + c(3));
        for (a, b) in [(&a, &b), (&b, &a)] {
            assert_eq!(Poly::gcd(a, b), shared);
            assert_eq!(gcd_with(a, b, false), shared);
        }
        // Content and primitive part both shared: (y + 1)²(x + y) and (y + 1)(x + y)(x − 1).
        let a = (&y + c(1)).pow(2) * (&x + &y);
        let b = (&y + c(1)) * (&x + &y) * (&x - c(1));
        let expected = (&y + c(1)) * (&x + &y);
        assert_eq!(Poly::gcd(&a, &b), expected);
        assert_eq!(gcd_with(&a, &b, false), expected);
    }

    #[test]
    fn gcd_with_parameters_in_coefficients() {
        // (k + rho)(k - 1) and (k + rho)(rho k + 1): common factor k + rho.
        let (k, rho) = (v("k"), v("rho"));
        let a = (&k + &rho) * (&k - c(1));
        let b = (&k + &rho) * (&rho * &k + c(1));
        assert_eq!(Poly::gcd(&a, &b), &k + &rho);
        // Content only: gcd(rho k + rho, rho^2) = rho.
        assert_eq!(Poly::gcd(&(&rho * &k + &rho), &rho.pow(2)), rho);
    }

    #[test]
    fn cheap_exits_agree_with_the_general_route() {
        use super::gcd_with;
        let (x, y, z) = (v("x"), v("y"), v("z"));
        let pieces = [
            c(6),
            Poly::constant(q(-2, 3)),
            &x + c(1),
            c(2) * &x - c(3),
            &x + &y,
            c(3) * &x - c(2) * &y + &z,
            &y - c(1),
            x.pow(2) + c(1),
            (&x + c(1)) * (&x - c(2)),
            (&x + c(1)).pow(2) * c(4),
            &x * (&x - c(2)),
            &x * &y + c(1),
            (&x + &y) * (&y - c(1)) * &z,
            x.pow(3) - c(8),
        ];
        for a in &pieces {
            for b in &pieces {
                for extra in [c(1), &x + c(1), &x * &y] {
                    let (a, b) = (a * &extra, b * &extra);
                    assert_eq!(
                        gcd_with(&a, &b, true),
                        gcd_with(&a, &b, false),
                        "gcd({a}, {b})"
                    );
                }
            }
        }
    }

    #[test]
    fn modular_degree_bounds_are_exact_on_known_factors() {
        use super::degree_bound;
        // g = (x·y + 1)(x + y² + 3) is common and the cofactors are coprime: the bounds are
        // deg_x g = 2, deg_y g = 3, deg_z g = 0, exact at any lucky point (a random point
        // modulo a 61-bit prime is unlucky with a probability of about degree/2^61; common
        // practice).
        let (x, y, z) = (v("x"), v("y"), v("z"));
        let g = (&x * &y + c(1)) * (&x + y.pow(2) + c(3));
        let a = &g * &(&x - &z);
        let b = &g * &(x.pow(2) + &y * &z + c(7));
        assert_eq!(degree_bound(&a, &b, "x"), Some(2));
        assert_eq!(degree_bound(&a, &b, "y"), Some(3));
        assert_eq!(degree_bound(&a, &b, "z"), Some(0));
        assert_eq!(Poly::gcd(&a, &b), g);
        // Coefficients with denominators and 18-digit numerators reduce the same way.
        let big = Poly::constant(q(123_456_789_012_345_678, 7)) * &y + Poly::constant(q(1, 3));
        let h = &big * &(&x - c(2));
        assert_eq!(degree_bound(&h, &(&big * &(&x + &z)), "x"), Some(0));
        assert_eq!(degree_bound(&h, &(&big * &(&x + &z)), "y"), Some(1));
    }

    #[test]
    fn rational_coefficients_of_two_hundred_digits_give_the_integer_gcd() {
        use super::gcd_with;
        use crate::algebra::rational::Q;
        use num_bigint::BigInt;
        // Constructed common factor (common practice): g = x/7 + (10^200/3)·y − z/11 + 5/13
        // times w − 2/9, against cofactors with fractions of their own. The gcd is g made
        // primitive with integer coefficients, whichever route computes it (inputs with
        // rational coefficients are made integral first: a fuzzed rule with 692-bit fractions
        // spent 22 s in `num`'s reductions of rational products).
        let (x, y, z, w) = (v("x"), v("y"), v("z"), v("w"));
        let big = Poly::constant(Q::new(BigInt::from(10).pow(200), BigInt::from(3)));
        let g = (x.scale(&q(1, 7)) + &big * &y - z.scale(&q(1, 11)) + Poly::constant(q(5, 13)))
            * (&w - Poly::constant(q(2, 9)));
        let a = &g * &(x.pow(2).scale(&q(3, 17)) - &y * &z + Poly::constant(q(1, 19)));
        let b = &g * &(&big * &w * &x + y.pow(2).scale(&q(-5, 23)) + c(1));
        let expected = g.content_and_primitive().1;
        assert!(expected.terms().all(|(_, c)| c.is_integer()));
        assert_eq!(Poly::gcd(&a, &b), expected);
        assert_eq!(gcd_with(&a, &b, false), expected);
        assert_eq!(Poly::gcd(&a.scale(&q(-2, 3)), &b), expected);
    }

    #[test]
    fn coprime_multivariate() {
        let (x, y) = (v("x"), v("y"));
        assert_eq!(Poly::gcd(&(&x + &y), &(&x - &y)), Poly::one());
        assert_eq!(Poly::gcd(&(x.pow(2) + y.pow(2)), &(&x + &y)), Poly::one());
    }
}
