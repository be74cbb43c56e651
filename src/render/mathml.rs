//! Writes layout nodes as Presentation MathML (MathML Core, rendered natively by current
//! browsers), the third writer beside `text` and `latex`: the same nodes, the same
//! parenthesisation and juxtaposition rules.
//!
//! [`Math`] composes whole formulas (relations, sums, series) from nodes, carrying the
//! MathML and the LaTeX side by side so that every `<math>` element holds its own TeX source
//! as an `<annotation encoding="application/x-tex">`.

use super::escape::escape_text;
use super::greek::text_name;
use super::latex;
use super::node::{Function, Node};

fn precedence(n: &Node) -> u8 {
    // As in the LaTeX writer: fractions are built up, so they need no parentheses in products.
    match n {
        Node::Sum(_) => 1,
        Node::Neg(_) => 2,
        Node::Product(_) => 3,
        Node::Frac(..) => 4,
        Node::Pow(..) => 5,
        _ => 6,
    }
}

/// An operator: `<mo>op</mo>`.
pub fn mo(op: &str) -> String {
    format!("<mo>{}</mo>", escape_text(op))
}

/// Content in stretchy parentheses.
fn paren(inner: &str) -> String {
    format!("<mrow><mo>(</mo>{inner}<mo>)</mo></mrow>")
}

fn wrap(n: &Node, min: u8) -> String {
    let s = write(n);
    if precedence(n) < min {
        paren(&s)
    } else {
        s
    }
}

/// A name: Greek names as their letter, a subscript after `_` (`lambda_0` → λ₀).
pub fn name(name: &str) -> String {
    let (head, sub) = match name.split_once('_') {
        Some((head, sub)) => (head, Some(sub)),
        None => (name, None),
    };
    let head = format!("<mi>{}</mi>", escape_text(&text_name(head)));
    match sub {
        Some(sub) => {
            let sub = if sub.chars().all(|c| c.is_ascii_digit()) {
                format!("<mn>{sub}</mn>")
            } else {
                format!("<mi>{}</mi>", escape_text(sub))
            };
            format!("<msub>{head}{sub}</msub>")
        }
        None => head,
    }
}

/// An upright single-letter function name (Γ, B), as LaTeX's `\Gamma` and `\mathrm{B}`.
fn upright(letter: &str) -> String {
    format!("<mi mathvariant=\"normal\">{letter}</mi>")
}

/// The node as MathML content (no surrounding `<math>`).
pub fn write(n: &Node) -> String {
    match n {
        Node::Int(i) => format!("<mn>{i}</mn>"),
        Node::Symbol(s) => name(s),
        Node::Neg(inner) => format!("<mrow>{}{}</mrow>", mo("−"), wrap(inner, 3)),
        Node::Sum(terms) => {
            let mut out = String::from("<mrow>");
            for (i, t) in terms.iter().enumerate() {
                match (i, t) {
                    (0, _) => out += &wrap(t, 2),
                    (_, Node::Neg(inner)) => {
                        out += &mo("−");
                        out += &wrap(inner, 3);
                    }
                    _ => {
                        out += &mo("+");
                        out += &wrap(t, 2);
                    }
                }
            }
            out + "</mrow>"
        }
        Node::Product(items) => {
            let mut out = String::from("<mrow>");
            for (i, item) in items.iter().enumerate() {
                if i > 0 {
                    // Invisible times; a thin space where LaTeX writes `\,`.
                    if !Node::juxtaposes(&items[i - 1], item) {
                        out += "<mspace width=\"0.1667em\"/>";
                    }
                    out += "<mo>&#x2062;</mo>";
                }
                out += &wrap(item, 3);
            }
            out + "</mrow>"
        }
        Node::Frac(num, den) => format!(
            "<mfrac><mrow>{}</mrow><mrow>{}</mrow></mfrac>",
            write(num),
            write(den)
        ),
        Node::Pow(base, exponent) => {
            let b = match **base {
                Node::Call(..) | Node::Term(..) | Node::Binomial(..) => paren(&write(base)),
                _ => wrap(base, 6),
            };
            format!("<msup><mrow>{b}</mrow><mrow>{}</mrow></msup>", write(exponent))
        }
        Node::Call(f, args) => {
            let inner = args
                .iter()
                .map(write)
                .collect::<Vec<_>>()
                .join(&mo(","));
            let apply = "<mo>&#x2061;</mo>";
            match f {
                Function::Gamma => format!("<mrow>{}{apply}{}</mrow>", upright("Γ"), paren(&inner)),
                Function::Beta => format!("<mrow>{}{apply}{}</mrow>", upright("B"), paren(&inner)),
                Function::Exp => format!("<mrow><mi>exp</mi>{apply}{}</mrow>", paren(&inner)),
                Function::Log => format!("<mrow><mi>ln</mi>{apply}{}</mrow>", paren(&inner)),
                Function::Sqrt => format!("<msqrt>{inner}</msqrt>"),
            }
        }
        Node::Binomial(top, bottom) => format!(
            "<mrow><mo>(</mo><mfrac linethickness=\"0\"><mrow>{}</mrow><mrow>{}</mrow></mfrac><mo>)</mo></mrow>",
            write(top),
            write(bottom)
        ),
        Node::Rising(base, count) => format!(
            "<msub>{}<mrow>{}</mrow></msub>",
            paren(&write(base)),
            write(count)
        ),
        Node::Factorial(inner) => format!("<mrow>{}{}</mrow>", wrap(inner, 6), mo("!")),
        Node::Term(sequence, index) => {
            format!("<mrow>{}{}</mrow>", name(sequence), paren(&write(index)))
        }
    }
}

/// A formula in MathML and LaTeX at once, built from layout nodes and the operators between
/// them.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Math {
    mathml: String,
    latex: String,
}

impl Math {
    /// A node, written by both writers.
    pub fn node(n: &Node) -> Math {
        Math {
            mathml: write(n),
            latex: latex::write(n),
        }
    }

    /// A piece written by hand in both notations (for constructs that have no node, such as
    /// `ₚF_q` or `Σ`); `mathml` must be well-formed MathML content.
    pub fn raw(mathml: impl Into<String>, latex: impl Into<String>) -> Math {
        Math {
            mathml: mathml.into(),
            latex: latex.into(),
        }
    }

    /// Upright words inside a formula.
    pub fn words(text: &str) -> Math {
        Math {
            mathml: format!("<mtext>{}</mtext>", escape_text(text)),
            latex: format!("\\text{{{text}}}"),
        }
    }

    /// An identifier such as `C` or `e`.
    pub fn ident(text: &str) -> Math {
        Math {
            mathml: format!("<mi>{}</mi>", escape_text(text)),
            latex: text.to_string(),
        }
    }

    /// This, an operator (`=`, `≠`, `~`, `∉`…; `latex_op` its LaTeX), then `rhs`.
    pub fn op(self, op: &str, latex_op: &str, rhs: Math) -> Math {
        Math {
            mathml: format!("{}{}{}", self.mathml, mo(op), rhs.mathml),
            latex: format!("{} {latex_op} {}", self.latex, rhs.latex),
        }
    }

    /// This followed by `next` with nothing between (a product or a juxtaposition).
    pub fn then(self, next: Math) -> Math {
        let space = if self.latex.ends_with('}') || next.latex.starts_with('\\') {
            ""
        } else {
            " "
        };
        Math {
            mathml: format!("{}{}", self.mathml, next.mathml),
            latex: format!("{}{space}{}", self.latex, next.latex),
        }
    }

    /// This, a thin space (`\,`), then `next`: a product whose factors should not touch.
    pub fn times(self, next: Math) -> Math {
        Math {
            mathml: format!(
                "{}<mspace width=\"0.1667em\"/><mo>&#x2062;</mo>{}",
                self.mathml, next.mathml
            ),
            latex: format!("{}\\,{}", self.latex, next.latex),
        }
    }

    /// In stretchy parentheses.
    pub fn parenthesised(self) -> Math {
        Math {
            mathml: paren(&self.mathml),
            latex: format!("\\left({}\\right)", self.latex),
        }
    }

    /// Between bars: |x|.
    pub fn absolute(self) -> Math {
        Math {
            mathml: format!("<mrow><mo>|</mo>{}<mo>|</mo></mrow>", self.mathml),
            latex: format!("\\left|{}\\right|", self.latex),
        }
    }

    /// This with a superscript.
    pub fn sup(self, exponent: Math) -> Math {
        Math {
            mathml: format!(
                "<msup><mrow>{}</mrow><mrow>{}</mrow></msup>",
                self.mathml, exponent.mathml
            ),
            latex: format!("{{{}}}^{{{}}}", self.latex, exponent.latex),
        }
    }

    pub fn mathml(&self) -> &str {
        &self.mathml
    }

    pub fn latex(&self) -> &str {
        &self.latex
    }

    /// The whole `<math>` element, its LaTeX as the annotation; `block` for a displayed
    /// formula, else inline.
    pub fn element(&self, block: bool) -> String {
        let display = if block { " display=\"block\"" } else { "" };
        format!(
            "<math{display}><semantics><mrow>{}</mrow><annotation encoding=\"application/x-tex\">{}</annotation></semantics></math>",
            self.mathml,
            escape_text(&self.latex)
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sum(items: Vec<Node>) -> Node {
        Node::Sum(items)
    }

    #[test]
    fn greek_names_subscripts_and_numbers() {
        assert_eq!(write(&Node::sym("rho")), "<mi>ρ</mi>");
        assert_eq!(
            write(&Node::sym("lambda_0")),
            "<msub><mi>λ</mi><mn>0</mn></msub>"
        );
        assert_eq!(write(&Node::int(12)), "<mn>12</mn>");
    }

    #[test]
    fn sums_with_negative_terms_use_a_true_minus() {
        let n = sum(vec![Node::sym("k"), Node::int(1).negate()]);
        assert_eq!(write(&n), "<mrow><mi>k</mi><mo>−</mo><mn>1</mn></mrow>");
    }

    #[test]
    fn a_sum_inside_a_product_gets_parentheses_like_latex() {
        let n = Node::Product(vec![Node::int(2), sum(vec![Node::sym("k"), Node::int(1)])]);
        let m = write(&n);
        assert!(m.contains("<mo>(</mo>"), "{m}");
        assert!(latex::write(&n).contains("\\left("));
        // 2(k + 1) juxtaposes: no thin space, only the invisible times.
        assert!(!m.contains("mspace"), "{m}");
    }

    #[test]
    fn gamma_is_upright_with_function_application() {
        let n = Node::Call(Function::Gamma, vec![Node::sym("k")]);
        assert_eq!(
            write(&n),
            "<mrow><mi mathvariant=\"normal\">Γ</mi><mo>&#x2061;</mo><mrow><mo>(</mo><mi>k</mi><mo>)</mo></mrow></mrow>"
        );
    }

    #[test]
    fn elements_carry_their_tex_escaped() {
        let m = Math::node(&Node::frac(Node::sym("a"), Node::sym("b"))).op(
            "<",
            "<",
            Math::node(&Node::int(1)),
        );
        let e = m.element(true);
        assert!(e.starts_with("<math display=\"block\"><semantics>"));
        assert!(e.contains(
            "<annotation encoding=\"application/x-tex\">\\frac{a}{b} &lt; 1</annotation>"
        ));
        assert!(e.contains("<mo>&lt;</mo>"));
    }
}
