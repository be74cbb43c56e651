//! A small layout tree for formulas, shared by the text and LaTeX writers so that
//! parenthesisation and sign handling are decided once.

use num_bigint::BigInt;

/// A formula ready to be written out.
#[derive(Clone, Debug, PartialEq)]
pub enum Node {
    /// A non-negative integer.
    Int(BigInt),
    /// A parameter, the index, or a constant name (`pi`).
    Symbol(String),
    Neg(Box<Node>),
    /// Terms added; a `Neg` term is written with a minus sign.
    Sum(Vec<Node>),
    /// Factors multiplied.
    Product(Vec<Node>),
    Frac(Box<Node>, Box<Node>),
    Pow(Box<Node>, Box<Node>),
    /// A named function applied to arguments (`Gamma`, `Beta`).
    Call(Function, Vec<Node>),
    Binomial(Box<Node>, Box<Node>),
    /// Pochhammer's rising factorial (x)_n.
    Rising(Box<Node>, Box<Node>),
    Factorial(Box<Node>),
    /// The sequence at an index: n(1), a(k).
    Term(String, Box<Node>),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Function {
    Gamma,
    Beta,
    Exp,
    Log,
    Sqrt,
}

impl Node {
    pub fn int(n: i64) -> Node {
        Node::Int(BigInt::from(n))
    }

    pub fn sym(s: &str) -> Node {
        Node::Symbol(s.to_string())
    }

    pub fn is_one(&self) -> bool {
        matches!(self, Node::Int(n) if *n == BigInt::from(1))
    }

    pub fn is_zero(&self) -> bool {
        matches!(self, Node::Int(n) if *n == BigInt::from(0))
    }

    /// Negation that folds double minus signs.
    pub fn negate(self) -> Node {
        match self {
            Node::Neg(inner) => *inner,
            other => Node::Neg(Box::new(other)),
        }
    }

    /// Multiplies, dropping factors of one and flattening.
    pub fn product(items: Vec<Node>) -> Node {
        let mut flat = Vec::new();
        let mut negative = false;
        for item in items {
            match item {
                Node::Product(inner) => flat.extend(inner),
                Node::Neg(inner) => {
                    negative = !negative;
                    match *inner {
                        Node::Product(more) => flat.extend(more),
                        // −1 · x is −x: the one goes, the sign stays.
                        one if one.is_one() => {}
                        other => flat.push(other),
                    }
                }
                n if n.is_one() => {}
                n => flat.push(n),
            }
        }
        let node = match flat.len() {
            0 => Node::int(1),
            1 => flat.pop().unwrap(),
            _ => Node::Product(flat),
        };
        if negative {
            node.negate()
        } else {
            node
        }
    }

    /// A quotient, written without a denominator when it is one.
    pub fn frac(num: Node, den: Node) -> Node {
        if den.is_one() {
            return num;
        }
        match num {
            Node::Neg(inner) => Node::Frac(inner, Box::new(den)).negate(),
            other => Node::Frac(Box::new(other), Box::new(den)),
        }
    }

    /// Whether `item` may follow `previous` in a product with no sign between: a number
    /// before a name, a sum or a power of a name (`2ρ`, `2(k + 1)`, `3ρ²`), but never before
    /// a power of a number (`5·3^k`, not `53^k`). Both writers follow this.
    pub fn juxtaposes(previous: &Node, item: &Node) -> bool {
        matches!(previous, Node::Int(_))
            && match item {
                Node::Symbol(_) | Node::Sum(_) => true,
                Node::Pow(base, _) => !matches!(**base, Node::Int(_)),
                _ => false,
            }
    }

    pub fn pow(base: Node, exponent: Node) -> Node {
        if exponent.is_one() {
            return base;
        }
        Node::Pow(Box::new(base), Box::new(exponent))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn minus_one_times_a_sum_is_its_negation() {
        // −1·(a + k) must not keep the 1 (it printed as "−1(a + k)").
        let sum = Node::Sum(vec![Node::sym("a"), Node::sym("k")]);
        let product = Node::product(vec![Node::int(1).negate(), sum.clone()]);
        assert_eq!(product, sum.negate());
    }

    #[test]
    fn a_number_never_touches_a_power_of_a_number_in_either_writer() {
        let power = |base: Node| Node::Pow(Box::new(base), Box::new(Node::sym("k")));
        let five_three_k = Node::Product(vec![Node::int(5), power(Node::int(3))]);
        assert_eq!(super::super::text::write(&five_three_k), "5·3^k");
        assert_eq!(super::super::latex::write(&five_three_k), "5\\,{3}^{k}");
        // A power of a parameter still follows the number directly (common practice).
        let five_rho_k = Node::Product(vec![Node::int(5), power(Node::sym("rho"))]);
        assert_eq!(super::super::text::write(&five_rho_k), "5ρ^k");
        assert!(!super::super::latex::write(&five_rho_k).contains("\\,"));
    }
}
