//! A fully parenthesised text form of an expression, so tests can state the tree's shape
//! in one readable line.

use super::ast::{Expr, ExprKind};

/// A fully parenthesised rendering, for tests and debugging: `1/2k` is `(1 / (2 * k))`.
pub fn display_expr(e: &Expr) -> String {
    match &e.kind {
        ExprKind::Number(value) => {
            if value.is_integer() {
                value.numer().to_string()
            } else {
                format!("{}/{}", value.numer(), value.denom())
            }
        }
        ExprKind::Ident(name) => name.clone(),
        ExprKind::Subscript { name, index } => format!("{name}_{{{}}}", display_expr(index)),
        ExprKind::Call {
            name, args, spaced, ..
        } => {
            let args: Vec<String> = args.iter().map(display_expr).collect();
            let gap = if *spaced { " " } else { "" };
            format!("{name}{gap}({})", args.join(", "))
        }
        ExprKind::Neg(inner) => format!("(-{})", display_expr(inner)),
        ExprKind::Binary { op, lhs, rhs } => {
            format!(
                "({} {} {})",
                display_expr(lhs),
                op.symbol(),
                display_expr(rhs)
            )
        }
        ExprKind::Factorial(inner) => format!("({}!)", display_expr(inner)),
    }
}
