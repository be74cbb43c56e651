//! Writes layout nodes as Unicode text (ρ, Γ, −, ², ·).

use super::greek::text_name;
use super::node::{Function, Node};

fn precedence(n: &Node) -> u8 {
    match n {
        Node::Sum(_) => 1,
        Node::Neg(_) => 2,
        Node::Product(_) | Node::Frac(..) => 3,
        Node::Pow(..) => 5,
        _ => 6,
    }
}

fn wrap(n: &Node, min: u8) -> String {
    let s = write(n);
    if precedence(n) < min {
        format!("({s})")
    } else {
        s
    }
}

fn superscript(s: &str) -> Option<String> {
    s.chars()
        .map(|c| match c {
            '0' => Some('⁰'),
            '1' => Some('¹'),
            '2' => Some('²'),
            '3' => Some('³'),
            '4' => Some('⁴'),
            '5' => Some('⁵'),
            '6' => Some('⁶'),
            '7' => Some('⁷'),
            '8' => Some('⁸'),
            '9' => Some('⁹'),
            _ => None,
        })
        .collect()
}

/// The node as text.
pub fn write(n: &Node) -> String {
    match n {
        Node::Int(i) => i.to_string(),
        Node::Symbol(s) => text_name(s),
        Node::Neg(inner) => format!("−{}", wrap(inner, 3)),
        Node::Sum(terms) => {
            let mut out = String::new();
            for (i, t) in terms.iter().enumerate() {
                match (i, t) {
                    (0, _) => out += &wrap(t, 2),
                    (_, Node::Neg(inner)) => {
                        out += " − ";
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
                let piece = match item {
                    Node::Frac(..) => format!("({})", write(item)),
                    _ => wrap(item, 3),
                };
                if i > 0 {
                    let juxtapose = Node::juxtaposes(&items[i - 1], item);
                    if !juxtapose {
                        out += "·";
                    }
                }
                out += &piece;
            }
            out
        }
        Node::Frac(num, den) => {
            let top = match **num {
                Node::Sum(_) | Node::Neg(_) | Node::Frac(..) => format!("({})", write(num)),
                _ => write(num),
            };
            let bottom = if precedence(den) >= 5 {
                write(den)
            } else {
                format!("({})", write(den))
            };
            format!("{top}/{bottom}")
        }
        Node::Pow(base, exponent) => {
            let b = wrap(base, 6);
            let e = write(exponent);
            match (&**exponent, superscript(&e)) {
                (Node::Int(_), Some(sup)) => format!("{b}{sup}"),
                _ if precedence(exponent) >= 6 => format!("{b}^{e}"),
                _ => format!("{b}^({e})"),
            }
        }
        Node::Call(f, args) => {
            let inner = args.iter().map(write).collect::<Vec<_>>().join(", ");
            match f {
                Function::Gamma => format!("Γ({inner})"),
                Function::Beta => format!("B({inner})"),
                Function::Exp => format!("exp({inner})"),
                Function::Log => format!("ln({inner})"),
                Function::Sqrt => {
                    if args.len() == 1 && precedence(&args[0]) >= 6 {
                        format!("√{inner}")
                    } else {
                        format!("√({inner})")
                    }
                }
            }
        }
        Node::Binomial(top, bottom) => format!("binomial({}, {})", write(top), write(bottom)),
        Node::Rising(base, count) => {
            let n = write(count);
            if precedence(count) >= 6 {
                format!("({})_{n}", write(base))
            } else {
                format!("({})_({n})", write(base))
            }
        }
        Node::Factorial(inner) => format!("{}!", wrap(inner, 6)),
        Node::Term(name, index) => format!("{}({})", text_name(name), write(index)),
    }
}
