//! Writes layout nodes as LaTeX that compiles with amsmath alone.

use super::greek::latex_name;
use super::node::{Function, Node};

fn precedence(n: &Node) -> u8 {
    match n {
        Node::Sum(_) => 1,
        Node::Neg(_) => 2,
        Node::Product(_) => 3,
        Node::Frac(..) => 4,
        Node::Pow(..) => 5,
        _ => 6,
    }
}

fn paren(s: &str) -> String {
    format!("\\left({s}\\right)")
}

fn wrap(n: &Node, min: u8) -> String {
    let s = write(n);
    if precedence(n) < min {
        paren(&s)
    } else {
        s
    }
}

/// The node as LaTeX math (no surrounding `$`).
pub fn write(n: &Node) -> String {
    match n {
        Node::Int(i) => i.to_string(),
        Node::Symbol(s) => latex_name(s),
        Node::Neg(inner) => format!("-{}", wrap(inner, 3)),
        Node::Sum(terms) => {
            let mut out = String::new();
            for (i, t) in terms.iter().enumerate() {
                match (i, t) {
                    (0, _) => out += &wrap(t, 2),
                    (_, Node::Neg(inner)) => {
                        out += " - ";
                        out += &wrap(inner, 3);
                    }
                    _ => {
                        out += " + ";
                        out += &wrap(t, 2);
                    }
                }
            }
            out
        }
        Node::Product(items) => {
            let mut out = String::new();
            for (i, item) in items.iter().enumerate() {
                if i > 0 {
                    // `5\,{3}^{k}`, not `5{3}^{k}` (which reads 53^k).
                    let juxtapose = matches!(items[i - 1], Node::Int(_))
                        && match item {
                            Node::Symbol(_) | Node::Sum(_) => true,
                            Node::Pow(base, _) => !matches!(**base, Node::Int(_)),
                            _ => false,
                        };
                    out += if juxtapose { "" } else { "\\," };
                }
                out += &wrap(item, 3);
            }
            out
        }
        Node::Frac(num, den) => format!("\\frac{{{}}}{{{}}}", write(num), write(den)),
        Node::Pow(base, exponent) => {
            let b = match **base {
                Node::Call(..) | Node::Term(..) | Node::Binomial(..) => paren(&write(base)),
                _ => wrap(base, 6),
            };
            format!("{{{b}}}^{{{}}}", write(exponent))
        }
        Node::Call(f, args) => {
            let inner = args.iter().map(write).collect::<Vec<_>>().join(", ");
            match f {
                Function::Gamma => format!("\\Gamma{}", paren(&inner)),
                Function::Beta => format!("\\mathrm{{B}}{}", paren(&inner)),
                Function::Exp => format!("\\exp{}", paren(&inner)),
                Function::Log => format!("\\ln{}", paren(&inner)),
                Function::Sqrt => format!("\\sqrt{{{inner}}}"),
            }
        }
        Node::Binomial(top, bottom) => format!("\\binom{{{}}}{{{}}}", write(top), write(bottom)),
        Node::Rising(base, count) => format!("{}_{{{}}}", paren(&write(base)), write(count)),
        Node::Factorial(inner) => format!("{}!", wrap(inner, 6)),
        Node::Term(name, index) => format!("{}{}", latex_name(name), paren(&write(index))),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_number_before_a_power_of_a_number_keeps_its_product_sign() {
        let three_to_k = Node::Pow(
            Box::new(Node::Int(3.into())),
            Box::new(Node::Symbol("k".into())),
        );
        let product = Node::Product(vec![Node::Int(5.into()), three_to_k]);
        assert_eq!(write(&product), "5\\,{3}^{k}");
        let rho_to_k = Node::Pow(
            Box::new(Node::Symbol("rho".into())),
            Box::new(Node::Symbol("k".into())),
        );
        let product = Node::Product(vec![Node::Int(5.into()), rho_to_k]);
        // A power of a parameter still follows the number directly (common practice).
        assert!(!write(&product).contains("\\,"), "{}", write(&product));
    }
}
