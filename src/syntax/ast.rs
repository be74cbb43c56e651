//! The syntax tree: what the user wrote, with byte spans, and no meaning attached.
//!
//! A later layer decides what a name is (sequence, parameter, function, index variable);
//! here `k(k+1)` is a `Call` and `lambda_0` a `Subscript`, exactly as written.

use crate::diagnostic::Span;
use num_rational::BigRational;

#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    Number(BigRational),
    Ident(String),
    Subscript {
        name: String,
        index: Box<Expr>,
    },
    Call {
        name: String,
        name_span: Span,
        args: Vec<Expr>,
        spaced: bool,
    },
    Neg(Box<Expr>),
    Binary {
        op: BinOp,
        lhs: Box<Expr>,
        rhs: Box<Expr>,
    },
    Factorial(Box<Expr>),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
    ImplicitMul,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Model {
    pub statements: Vec<Statement>,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Statement {
    pub kind: StatementKind,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum StatementKind {
    Param(ParamDecl),
    /// `lhs = rhs [for ...]` (ratio rules, balance and boundary equations, rates)
    Equation {
        lhs: Expr,
        rhs: Expr,
        range: Option<RangeClause>,
    },
    /// a bare expression `[for ...]`: the ratio itself
    Bare {
        expr: Expr,
        range: Option<RangeClause>,
    },
}

#[derive(Clone, Debug, PartialEq)]
pub struct ParamDecl {
    pub names: Vec<(String, Span)>,
    pub integer: bool,
    pub constraint: ParamConstraint,
}

#[derive(Clone, Debug, PartialEq)]
pub enum ParamConstraint {
    None,
    Interval {
        lo: Expr,
        lo_closed: bool,
        hi: Expr,
        hi_closed: bool,
    },
    /// `> 0`, `>= 1`, `< 1`, `<= 5`
    Compare {
        op: CmpOp,
        value: Expr,
    },
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CmpOp {
    Lt,
    Le,
    Gt,
    Ge,
}

/// `for k >= 2`, `for 1 <= k <= c`, `for k > c`.
#[derive(Clone, Debug, PartialEq)]
pub struct RangeClause {
    pub var: String,
    pub var_span: Span,
    /// `k >= M` or `M <= k`
    pub lower: Option<Bound>,
    /// `k <= N` or `k < N`
    pub upper: Option<Bound>,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Bound {
    pub value: Expr,
    pub strict: bool,
}

impl Expr {
    pub fn new(kind: ExprKind, span: Span) -> Self {
        Expr { kind, span }
    }

    /// Visits this node and then every sub-expression, depth first, left to right.
    pub fn walk(&self, f: &mut impl FnMut(&Expr)) {
        f(self);
        for child in self.children() {
            child.walk(f);
        }
    }

    /// The direct sub-expressions, left to right.
    pub fn children(&self) -> Vec<&Expr> {
        match &self.kind {
            ExprKind::Number(_) | ExprKind::Ident(_) => Vec::new(),
            ExprKind::Subscript { index, .. } => vec![index],
            ExprKind::Call { args, .. } => args.iter().collect(),
            ExprKind::Neg(inner) | ExprKind::Factorial(inner) => vec![inner],
            ExprKind::Binary { lhs, rhs, .. } => vec![lhs, rhs],
        }
    }

    /// The first node (in prefix order) lying `levels` or more below this one, found
    /// without recursion so that it is safe on any tree.
    pub fn node_at_depth(&self, levels: usize) -> Option<&Expr> {
        let mut stack = vec![(self, 0)];
        while let Some((node, depth)) = stack.pop() {
            if depth >= levels {
                return Some(node);
            }
            stack.extend(node.children().into_iter().rev().map(|c| (c, depth + 1)));
        }
        None
    }
}

impl BinOp {
    /// The operator as the user would write it; juxtaposition shows as `*`.
    pub fn symbol(self) -> &'static str {
        match self {
            BinOp::Add => "+",
            BinOp::Sub => "-",
            BinOp::Mul | BinOp::ImplicitMul => "*",
            BinOp::Div => "/",
            BinOp::Pow => "^",
        }
    }
}

impl CmpOp {
    pub fn symbol(self) -> &'static str {
        match self {
            CmpOp::Lt => "<",
            CmpOp::Le => "<=",
            CmpOp::Gt => ">",
            CmpOp::Ge => ">=",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_bigint::BigInt;

    fn num(n: i64, span: Span) -> Expr {
        Expr::new(
            ExprKind::Number(BigRational::from_integer(BigInt::from(n))),
            span,
        )
    }

    #[test]
    fn walk_visits_every_node_in_prefix_order() {
        // -(k + 2)!
        let k = Expr::new(ExprKind::Ident("k".into()), 2..3);
        let sum = Expr::new(
            ExprKind::Binary {
                op: BinOp::Add,
                lhs: Box::new(k),
                rhs: Box::new(num(2, 4..5)),
            },
            1..6,
        );
        let fact = Expr::new(ExprKind::Factorial(Box::new(sum)), 1..7);
        let neg = Expr::new(ExprKind::Neg(Box::new(fact)), 0..7);
        let mut spans = Vec::new();
        neg.walk(&mut |e| spans.push(e.span.clone()));
        assert_eq!(spans, vec![0..7, 1..7, 1..6, 2..3, 4..5]);
        assert_eq!(neg.node_at_depth(3).map(|e| e.span.clone()), Some(2..3));
        assert_eq!(neg.node_at_depth(4), None);
    }
}
