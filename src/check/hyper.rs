//! Recognising a claim as a hypergeometric term in k: a rational function of k and the
//! parameters times typed factors (`closed_form::Factor`: Gamma, Beta, binomial, factorial,
//! rising factorial, powers) whose arguments are linear in k with whole-number slope, times
//! constants that do not depend on k. For such a term claim(k)/claim(k−1) is a rational
//! function, which is what the exact route compares with the rule.

use num_traits::{Signed, ToPrimitive};

use crate::algebra::{Poly, RatFunc, Q};
use crate::closed_form::{Affine, Factor};
use crate::diagnostic::{Diagnostic, Span};
use crate::syntax::BinOp;

use super::claim::{Claim, ClaimKind, Function};

/// Largest |slope| of k inside a Gamma-type argument (Γ(2k) is fine, Γ(10^6 k) is refused:
/// its ratio would be a polynomial of degree 10^6).
const MAX_SLOPE: i64 = 64;
/// Largest whole-number exponent taken symbolically.
const MAX_POWER: i64 = 1000;

/// `rational · Π factors · Π constants^e · a(b)^base_power`.
#[derive(Clone, Debug, PartialEq)]
pub struct HyperTerm {
    /// A rational function of the index and the parameters.
    pub rational: RatFunc,
    /// Special functions and powers, arguments linear in k.
    pub factors: Vec<Factor>,
    /// Pieces free of k that are not rational (exp(2), log 3, Gamma(pi)), to integer powers.
    pub constants: Vec<(Claim, i32)>,
    /// The power of the base term a(b) (1 in a well-formed claim that names it).
    pub base_power: i32,
}

/// Why a claim is not a hypergeometric term; the numeric route still applies.
#[derive(Clone, Debug, PartialEq)]
pub struct NotHypergeometric {
    pub reason: String,
    pub span: Span,
}

/// What stops the recognition: a claim outside the class, or a claim that is plainly wrong.
#[derive(Debug)]
pub enum Stop {
    Outside(NotHypergeometric),
    Bad(Diagnostic),
}

fn outside<T>(reason: impl Into<String>, span: &Span) -> Result<T, Stop> {
    Err(Stop::Outside(NotHypergeometric {
        reason: reason.into(),
        span: span.clone(),
    }))
}

impl HyperTerm {
    fn rational(r: RatFunc) -> Self {
        HyperTerm {
            rational: r,
            factors: Vec::new(),
            constants: Vec::new(),
            base_power: 0,
        }
    }

    /// The rational function, when that is all there is.
    pub fn as_rational(&self) -> Option<&RatFunc> {
        (self.factors.is_empty() && self.constants.is_empty() && self.base_power == 0)
            .then_some(&self.rational)
    }

    fn is_free_of(&self, index: &str) -> bool {
        !self.rational.contains_var(index) && !self.factors.iter().any(|f| f.depends_on_k())
    }

    fn times(mut self, other: HyperTerm) -> HyperTerm {
        self.rational = &self.rational * &other.rational;
        self.factors.extend(other.factors);
        self.constants.extend(other.constants);
        self.base_power += other.base_power;
        self
    }

    /// The term to an integer power; `None` for zero to a negative power.
    fn powi(mut self, n: i32) -> Option<HyperTerm> {
        self.rational = self.rational.pow(n)?;
        self.factors = self.factors.iter().map(|f| scale_factor(f, n)).collect();
        for c in &mut self.constants {
            c.1 *= n;
        }
        self.base_power *= n;
        Some(self)
    }
}

/// A factor raised to the integer power `n`.
pub fn scale_factor(f: &Factor, n: i32) -> Factor {
    let mut f = f.clone();
    match &mut f {
        Factor::Gamma { exponent, .. }
        | Factor::Linear { exponent, .. }
        | Factor::Rising { exponent, .. }
        | Factor::Beta { exponent, .. }
        | Factor::Factorial { exponent, .. }
        | Factor::Binomial { exponent, .. } => *exponent *= n,
        Factor::Power { exponent, .. } => {
            exponent.k_coeff *= n as i64;
            exponent.constant = &exponent.constant * &RatFunc::from_integer(n as i64);
        }
        Factor::SqrtPi { half_exponent } => *half_exponent *= n,
    }
    f
}

/// `r` as `s·k + c` with a whole-number slope s and c free of k.
pub fn affine_in(r: &RatFunc, index: &str) -> Option<Affine> {
    if r.denom().contains_var(index) {
        return None;
    }
    let coeffs = r.numer().coeffs_in(index);
    if coeffs.len() > 2 {
        return None;
    }
    let part = |i: usize| -> Option<RatFunc> {
        let c = coeffs.get(i).cloned().unwrap_or_else(Poly::zero);
        RatFunc::new(c, r.denom().clone())
    };
    let slope = part(1)?.as_constant()?;
    if !slope.is_integer() {
        return None;
    }
    let k_coeff = slope.to_integer().to_i64()?;
    Some(Affine {
        k_coeff,
        constant: part(0)?,
    })
}

/// Recognises the claim as a hypergeometric term in `index`.
pub fn hypergeometric_term(claim: &Claim, index: &str) -> Result<HyperTerm, Stop> {
    let span = &claim.span;
    match &claim.kind {
        ClaimKind::Number(q) => Ok(HyperTerm::rational(RatFunc::constant(q.clone()))),
        ClaimKind::Param(name) => Ok(HyperTerm::rational(RatFunc::var(name))),
        ClaimKind::Index => Ok(HyperTerm::rational(RatFunc::var(index))),
        ClaimKind::Pi => {
            let mut t = HyperTerm::rational(RatFunc::one());
            // π = (√π)^2, the constant Gamma at half-integers leaves (DLMF 5.4.6)
            t.factors.push(Factor::SqrtPi { half_exponent: 2 });
            Ok(t)
        }
        ClaimKind::Base => {
            let mut t = HyperTerm::rational(RatFunc::one());
            t.base_power = 1;
            Ok(t)
        }
        ClaimKind::Neg(inner) => {
            let mut t = hypergeometric_term(inner, index)?;
            t.rational = -t.rational;
            Ok(t)
        }
        ClaimKind::Binary(op, lhs, rhs) => binary(claim, *op, lhs, rhs, index),
        ClaimKind::Call(function, args) => call(claim, *function, args, index),
    }
    .map_err(|stop| match stop {
        // Keep the innermost reason; only fill in a span that is missing.
        Stop::Outside(mut o) if o.span.is_empty() => {
            o.span = span.clone();
            Stop::Outside(o)
        }
        other => other,
    })
}

fn binary(
    whole: &Claim,
    op: BinOp,
    lhs: &Claim,
    rhs: &Claim,
    index: &str,
) -> Result<HyperTerm, Stop> {
    let l = hypergeometric_term(lhs, index)?;
    match op {
        BinOp::Mul | BinOp::ImplicitMul => Ok(l.times(hypergeometric_term(rhs, index)?)),
        BinOp::Div => {
            let r = hypergeometric_term(rhs, index)?;
            if r.rational.is_zero() {
                return Err(Stop::Bad(Diagnostic::new(
                    "the claim divides by zero here",
                    rhs.span.clone(),
                )));
            }
            let inverse = r.powi(-1).expect("checked non-zero");
            Ok(l.times(inverse))
        }
        BinOp::Add | BinOp::Sub => {
            let r = hypergeometric_term(rhs, index)?;
            if let (Some(a), Some(b)) = (l.as_rational(), r.as_rational()) {
                let sum = if op == BinOp::Add { a + b } else { a - b };
                return Ok(HyperTerm::rational(sum));
            }
            if l.is_free_of(index) && r.is_free_of(index) && !whole.mentions_base() {
                return Ok(constant_piece(whole));
            }
            if whole.mentions_base() {
                return outside(
                    "the base term stands inside a sum, so the claim is not proportional to it",
                    &whole.span,
                );
            }
            outside(
                "a sum of terms that are not rational functions of the index",
                &whole.span,
            )
        }
        BinOp::Pow => power(whole, l, rhs, index),
    }
}

fn constant_piece(claim: &Claim) -> HyperTerm {
    let mut t = HyperTerm::rational(RatFunc::one());
    t.constants.push((claim.clone(), 1));
    t
}

fn power(whole: &Claim, base: HyperTerm, exponent: &Claim, index: &str) -> Result<HyperTerm, Stop> {
    let e = hypergeometric_term(exponent, index)?;
    let base_free = base.is_free_of(index) && base.base_power == 0;
    let Some(e) = e.as_rational().cloned() else {
        if e.is_free_of(index) && base_free && !whole.mentions_base() {
            return Ok(constant_piece(whole));
        }
        return outside(
            "a power whose exponent is not a rational function of the parameters and the index",
            &whole.span,
        );
    };
    if !e.contains_var(index) {
        if let Some(n) = e.as_constant() {
            if n.is_integer() && n.abs() <= Q::from_integer(MAX_POWER.into()) {
                let n = n.to_integer().to_i32().expect("bounded above");
                return base.powi(n).ok_or_else(|| {
                    Stop::Bad(Diagnostic::new(
                        "zero to a negative power",
                        whole.span.clone(),
                    ))
                });
            }
        }
        if let (Some(b), true) = (base.as_rational(), base_free) {
            return Ok(power_factor(b.clone(), Affine::constant(e)));
        }
        if base_free && !whole.mentions_base() {
            return Ok(constant_piece(whole));
        }
        return outside(
            "a power of an expression in the index whose exponent is not a whole number",
            &whole.span,
        );
    }
    let Some(exponent_affine) = affine_in(&e, index) else {
        return outside(
            "an exponent that is not linear in the index with a whole-number slope",
            &exponent.span,
        );
    };
    if exponent_affine.k_coeff.abs() > MAX_SLOPE {
        return outside("the slope of the exponent is too large", &exponent.span);
    }
    match (base.as_rational(), base_free) {
        (Some(b), true) => Ok(power_factor(b.clone(), exponent_affine)),
        (None, true) => outside(
            "a constant that is not rational raised to a power of the index: the ratio of consecutive terms is not rational",
            &whole.span,
        ),
        _ => outside("the index appears in both base and exponent", &whole.span),
    }
}

fn power_factor(base: RatFunc, exponent: Affine) -> HyperTerm {
    let mut t = HyperTerm::rational(RatFunc::one());
    t.factors.push(Factor::Power { base, exponent });
    t
}

/// The arguments as affine functions of k, `Ok(None)` when they are free of k but not all
/// rational (the whole call is then a constant piece).
fn affine_args(args: &[Claim], index: &str, whole: &Claim) -> Result<Option<Vec<Affine>>, Stop> {
    let mut out = Vec::new();
    let mut all_free = true;
    let mut all_rational = true;
    for arg in args {
        let t = hypergeometric_term(arg, index)?;
        all_free &= t.is_free_of(index) && t.base_power == 0;
        match t.as_rational() {
            Some(r) => match affine_in(r, index) {
                Some(a) if a.k_coeff.abs() <= MAX_SLOPE => out.push(a),
                Some(_) => return outside("the slope of this argument is too large", &arg.span),
                None => {
                    return outside(
                        format!(
                        "the argument of {} is not linear in the index with a whole-number slope",
                        function_of(whole)
                    ),
                        &arg.span,
                    )
                }
            },
            None => all_rational = false,
        }
    }
    if all_rational {
        return Ok(Some(out));
    }
    if all_free && !whole.mentions_base() {
        return Ok(None);
    }
    outside(
        format!(
            "the argument of {} is not a rational function of the index",
            function_of(whole)
        ),
        &whole.span,
    )
}

fn function_of(claim: &Claim) -> &'static str {
    match &claim.kind {
        ClaimKind::Call(f, _) => f.name(),
        _ => "the function",
    }
}

fn call(whole: &Claim, function: Function, args: &[Claim], index: &str) -> Result<HyperTerm, Stop> {
    let special = |factor: fn(Vec<Affine>) -> Factor| -> Result<HyperTerm, Stop> {
        Ok(match affine_args(args, index, whole)? {
            Some(a) => {
                let mut t = HyperTerm::rational(RatFunc::one());
                t.factors.push(factor(a));
                t
            }
            None => constant_piece(whole),
        })
    };
    match function {
        Function::Gamma => special(|a| Factor::Gamma {
            arg: a[0].clone(),
            exponent: 1,
        }),
        Function::Factorial => special(|a| Factor::Factorial {
            arg: a[0].clone(),
            exponent: 1,
        }),
        Function::Beta => special(|a| Factor::Beta {
            a: a[0].clone(),
            b: a[1].clone(),
            exponent: 1,
        }),
        Function::Binomial => special(|a| Factor::Binomial {
            top: a[0].clone(),
            bottom: a[1].clone(),
            exponent: 1,
        }),
        Function::Rising => special(|a| Factor::Rising {
            base: a[0].clone(),
            count: a[1].clone(),
            exponent: 1,
        }),
        Function::Sqrt => {
            let t = hypergeometric_term(&args[0], index)?;
            let free = t.is_free_of(index) && t.base_power == 0;
            match (t.as_rational(), free) {
                (Some(r), true) => Ok(power_factor(
                    r.clone(),
                    Affine::constant(RatFunc::constant(crate::algebra::q(1, 2))),
                )),
                (None, true) if !whole.mentions_base() => Ok(constant_piece(whole)),
                _ => outside("the square root of an expression in the index", &whole.span),
            }
        }
        Function::Exp | Function::Log => {
            let t = hypergeometric_term(&args[0], index)?;
            if t.is_free_of(index) && t.base_power == 0 && !whole.mentions_base() {
                return Ok(constant_piece(whole));
            }
            outside(
                format!(
                    "{} of an expression in the index: the ratio of consecutive terms is not a rational function",
                    function.name()
                ),
                &whole.span,
            )
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::check::claim::{read_claim, ClaimContext};
    use num_bigint::BigInt;

    fn term(text: &str) -> Result<HyperTerm, Stop> {
        let base = BigInt::from(1);
        let cx = ClaimContext {
            index: "k",
            sequence: "n",
            base_index: &base,
            params: vec!["p".into(), "N".into(), "alpha".into()],
        };
        hypergeometric_term(&read_claim(text, &cx).unwrap(), "k")
    }

    #[test]
    fn gamma_beta_binomial_and_powers_are_recognised() {
        let t = term("n(1) * 7/2 * Beta(k, 7/2)").unwrap();
        assert_eq!(t.base_power, 1);
        assert_eq!(t.rational, RatFunc::constant(crate::algebra::q(7, 2)));
        assert_eq!(t.factors.len(), 1);
        let t = term("binomial(N, k) p^k (1-p)^(N-k)").unwrap();
        assert_eq!(t.factors.len(), 3);
        let t = term("exp(-alpha) alpha^k / k! * sqrt(2) * (k^2 + 1)").unwrap();
        assert_eq!(t.constants.len(), 1);
        assert!(t.rational.contains_var("k"));
    }

    #[test]
    fn non_hypergeometric_pieces_are_named() {
        for (text, word) in [
            ("exp(k^2)", "exp"),
            ("Gamma(k^2)", "not linear"),
            ("k^k", "both base and exponent"),
            ("2^(k^2)", "exponent"),
            ("Gamma(k) + 1", "sum"),
            ("pi^k", "not rational"),
            ("log(k)", "log"),
        ] {
            match term(text) {
                Err(Stop::Outside(o)) => assert!(o.reason.contains(word), "{text}: {}", o.reason),
                other => panic!("{text}: {other:?}"),
            }
        }
    }

    #[test]
    fn division_by_an_exact_zero_is_an_input_error() {
        assert!(matches!(term("Gamma(k)/(1-1)"), Err(Stop::Bad(_))));
    }
}
