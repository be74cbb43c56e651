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
                    let juxtapose = Node::juxtaposes(&items[i - 1], item);
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
