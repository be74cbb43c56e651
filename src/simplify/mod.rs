//! From the telescoped Gamma quotient to the simplest valid form.
//!
//! The rewrites are data ([`rules::RULES`]): each has a name, a source and a function listing
//! every place it applies. The driver searches over them best-first: every product reached is
//! brought into a canonical shape ([`tidy`]) and scored by [`measure`] (fewest special-function
//! factors, then written size); the best one wins, and the path to it is the derivation. Every
//! rule is an identity of the Gamma function, so every form reached has the value of the raw one
//! wherever both are defined (checked numerically in `tests/simplify.rs`).
//!
//! ```
//! use std::collections::BTreeMap;
//! use telescope::closed_form::Factor;
//! let problem = telescope::model::build_problem("a(k)/a(k-1) = (k-1)/(k+2)  for k >= 4").unwrap();
//! let solution = telescope::solve::solve(&problem, &BTreeMap::new()).unwrap();
//! // Γ(k)Γ(6)/(Γ(3)Γ(k+3)) becomes 60/(k(k+1)(k+2)): no special function left.
//! assert!(solution.simplest.product.factors.iter().all(|f| !f.is_special()));
//! ```

pub mod exact_values;
pub mod measure;
pub mod pairs;
pub mod rules;
pub mod tidy;

pub use measure::{measure, Measure};
pub use rules::{rule_named, Context, Rule, RULES};
pub use tidy::tidy;

use std::cmp::Reverse;
use std::collections::hash_map::DefaultHasher;
use std::collections::{BinaryHeap, HashSet};
use std::hash::{Hash, Hasher};

use crate::closed_form::{ClosedForm, Product};

/// Products expanded before the search stops; the forms met in practice need a few dozen.
const SEARCH_LIMIT: usize = 400;
/// The search also stops after this many expansions without a better form: the rewrites
/// that pay off only after another (Beta pairing, then the recurrence) need two or three.
const PATIENCE: usize = 24;

/// One derivation step: the rule used and the whole form after it.
#[derive(Clone, Debug)]
pub struct Step {
    pub rule: Rule,
    pub form: ClosedForm,
}

/// The simplest form found and how it was reached from the telescoped one.
#[derive(Clone, Debug)]
pub struct Simplified {
    pub simplest: ClosedForm,
    pub steps: Vec<Step>,
}

struct Node {
    product: Product,
    parent: Option<(usize, Rule)>,
    depth: usize,
}

/// A fingerprint of a tidy product (a collision could only hide a form, never give a wrong
/// one).
fn key(p: &Product) -> u64 {
    let mut hasher = DefaultHasher::new();
    p.coefficient.hash(&mut hasher);
    p.factors.hash(&mut hasher);
    hasher.finish()
}

/// Searches the rewrites for the simplest form of `raw`.
pub fn simplify(raw: &ClosedForm, context: &Context) -> Simplified {
    let start = tidy(raw.product.clone());
    let mut nodes = vec![Node {
        product: start.clone(),
        parent: None,
        depth: 0,
    }];
    let mut seen: HashSet<u64> = HashSet::from([key(&start)]);
    let mut queue = BinaryHeap::from([Reverse((measure(&start), 0usize, 0usize))]);
    let mut best = 0usize;
    let mut expanded = 0usize;
    let mut since_improvement = 0usize;
    while let Some(Reverse((_, _, index))) = queue.pop() {
        if expanded == SEARCH_LIMIT || since_improvement == PATIENCE {
            break;
        }
        expanded += 1;
        since_improvement += 1;
        for rule in RULES {
            for candidate in (rule.apply)(&nodes[index].product, context) {
                let candidate = tidy(candidate);
                if !seen.insert(key(&candidate)) {
                    continue;
                }
                let depth = nodes[index].depth + 1;
                let score = measure(&candidate);
                let id = nodes.len();
                nodes.push(Node {
                    product: candidate,
                    parent: Some((index, *rule)),
                    depth,
                });
                if (score, depth) < (measure(&nodes[best].product), nodes[best].depth) {
                    best = id;
                    since_improvement = 0;
                }
                queue.push(Reverse((score, depth, id)));
            }
        }
    }
    let form = |product: &Product| ClosedForm {
        sequence: raw.sequence.clone(),
        base_index: raw.base_index.clone(),
        product: product.clone(),
    };
    let mut steps = Vec::new();
    let mut at = best;
    while let Some((parent, rule)) = nodes[at].parent {
        steps.push(Step {
            rule,
            form: form(&nodes[at].product),
        });
        at = parent;
    }
    steps.reverse();
    Simplified {
        simplest: form(&nodes[best].product),
        steps,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::RatFunc;
    use crate::closed_form::{Affine, Factor};
    use exact_values::gamma;

    fn raw(factors: Vec<Factor>) -> ClosedForm {
        ClosedForm {
            sequence: "a".into(),
            base_index: 1.into(),
            product: Product {
                coefficient: RatFunc::one(),
                factors,
            },
        }
    }

    #[test]
    fn yule_simon_shape_needs_two_rules_in_a_row() {
        // Γ(k)Γ(α+2)/(Γ(1)Γ(k+α+1)) = (α+1) B(k, α+1): DLMF 5.4.1, 5.12.1 then 5.5.1.
        let alpha = RatFunc::var("alpha");
        let one = RatFunc::one();
        let form = raw(vec![
            gamma(Affine::k_plus(RatFunc::zero()), 1),
            gamma(Affine::constant(&alpha + &RatFunc::from_integer(2)), 1),
            gamma(Affine::constant(one.clone()), -1),
            gamma(Affine::k_plus(&alpha + &one), -1),
        ]);
        let out = simplify(&form, &Context::default());
        assert_eq!(
            out.simplest.product.factors,
            vec![
                Factor::Linear {
                    arg: Affine::constant(&alpha + &one),
                    exponent: 1
                },
                Factor::Beta {
                    a: Affine::k_plus(RatFunc::zero()),
                    b: Affine::constant(&alpha + &one),
                    exponent: 1
                }
            ]
        );
        let names: Vec<&str> = out.steps.iter().map(|s| s.rule.name).collect();
        assert!(names.contains(&"beta-pairing"), "{names:?}");
        assert!(names.contains(&"gamma-constant-shift"), "{names:?}");
    }

    #[test]
    fn nothing_to_do_gives_no_steps() {
        let form = raw(vec![gamma(
            Affine::k_plus(RatFunc::constant(crate::algebra::q(1, 3))),
            1,
        )]);
        let out = simplify(&form, &Context::default());
        assert!(out.steps.is_empty());
        assert_eq!(out.simplest.product, form.product);
    }
}
