//! Constant folding, postfix code generation and the corner sites of a tree.
//!
//! Every sub-tree that does not depend on `x` is replaced by its value
//! (Aho, Lam, Sethi and Ullman, *Compilers: Principles, Techniques, and
//! Tools*, 2nd ed., sec. 8.5). Folding performs exactly the same
//! floating-point operations in the same order as run-time evaluation, so the
//! result is bit-identical to evaluating the written tree directly: in a
//! chain `((a op b) op c) ...` only a constant prefix is folded, since
//! `(x + 1) + 2` must not become `x + 3`.
//!
//! The recursion here follows the tree's nesting, which the parser limits to
//! [`super::MAX_DEPTH`] (chains of any length are walked by loops).

use super::eval::{BinOp, Func1, Op, Program};
use super::parse::Node;

/// Replaces every sub-tree that does not depend on `x` by its value. After
/// folding, a node depends on `x` exactly when it is not a `Num`.
pub(super) fn fold(node: Node) -> Node {
    match node {
        Node::Num(_) | Node::X => node,
        Node::Neg(a) => match fold(*a) {
            Node::Num(v) => Node::Num(-v),
            a => Node::Neg(Box::new(a)),
        },
        Node::Chain(first, rest) => {
            let mut head = fold(*first);
            let mut kept: Vec<(BinOp, Node)> = Vec::new();
            for (op, r) in rest {
                let r = fold(r);
                match (&head, &r) {
                    (Node::Num(p), Node::Num(q)) if kept.is_empty() => {
                        head = Node::Num(op.apply(*p, *q));
                    }
                    _ => kept.push((op, r)),
                }
            }
            if kept.is_empty() {
                head
            } else {
                Node::Chain(Box::new(head), kept)
            }
        }
        Node::Call1(f, a) => match fold(*a) {
            Node::Num(v) => Node::Num(f.apply(v)),
            a => Node::Call1(f, Box::new(a)),
        },
        Node::Call2(f, a, b) => match (fold(*a), fold(*b)) {
            (Node::Num(p), Node::Num(q)) => Node::Num(f.apply(p, q)),
            (a, b) => Node::Call2(f, Box::new(a), Box::new(b)),
        },
    }
}

/// Appends the postfix code of `node` to `ops`.
pub(super) fn emit(node: &Node, ops: &mut Vec<Op>) {
    match node {
        Node::Num(v) => ops.push(Op::Const(*v)),
        Node::X => ops.push(Op::X),
        Node::Neg(a) => {
            emit(a, ops);
            ops.push(Op::Neg);
        }
        Node::Chain(first, rest) => {
            emit(first, ops);
            for (op, r) in rest {
                emit(r, ops);
                ops.push(Op::Bin(*op));
            }
        }
        Node::Call1(f, a) => {
            emit(a, ops);
            ops.push(Op::Call1(*f));
        }
        Node::Call2(f, a, b) => {
            emit(a, ops);
            emit(b, ops);
            ops.push(Op::Call2(*f));
        }
    }
}

/// The programs whose sign changes are the corners of a folded tree: the
/// argument `g` of every `abs(g)`, and `a - b` of every `min(a, b)` and
/// `max(a, b)`, each once, that depends on `x`. Nested sites are all listed
/// (`abs(abs(x) - 1)` gives `x` and `abs(x) - 1`).
pub(super) fn corner_sites(node: &Node) -> Vec<Program> {
    let mut out = Vec::new();
    collect(node, &mut out);
    out
}

fn add(out: &mut Vec<Program>, ops: Vec<Op>) {
    let p = Program::new(ops);
    if !out.contains(&p) {
        out.push(p);
    }
}

fn collect(node: &Node, out: &mut Vec<Program>) {
    match node {
        Node::Num(_) | Node::X => {}
        Node::Neg(a) => collect(a, out),
        Node::Chain(first, rest) => {
            collect(first, out);
            for (_, r) in rest {
                collect(r, out);
            }
        }
        Node::Call1(f, a) => {
            if *f == Func1::Abs && !matches!(**a, Node::Num(_)) {
                let mut ops = Vec::new();
                emit(a, &mut ops);
                add(out, ops);
            }
            collect(a, out);
        }
        Node::Call2(_, a, b) => {
            // Folded: a call survives only when an argument uses x.
            let mut ops = Vec::new();
            emit(a, &mut ops);
            emit(b, &mut ops);
            ops.push(Op::Bin(BinOp::Sub));
            add(out, ops);
            collect(a, out);
            collect(b, out);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::eval::Func2;
    use super::*;

    fn chain(first: Node, rest: Vec<(BinOp, Node)>) -> Node {
        Node::Chain(Box::new(first), rest)
    }

    #[test]
    fn only_a_constant_prefix_of_a_chain_folds() {
        // 2 * 3 + x + 1 + 2 -> 6 + x + 1 + 2: (6 + x) + 1 is not folded,
        // so that the run-time operations stay those written.
        let t = chain(
            Node::Num(2.0),
            vec![
                (BinOp::Mul, Node::Num(3.0)),
                (BinOp::Add, Node::X),
                (BinOp::Add, Node::Num(1.0)),
                (BinOp::Add, Node::Num(2.0)),
            ],
        );
        let want = chain(
            Node::Num(6.0),
            vec![
                (BinOp::Add, Node::X),
                (BinOp::Add, Node::Num(1.0)),
                (BinOp::Add, Node::Num(2.0)),
            ],
        );
        assert_eq!(fold(t), want);
    }

    #[test]
    fn a_long_flat_chain_folds_and_emits_without_recursion() {
        // 5000 terms of 1: a loop, not 5000 nested calls.
        let t = chain(Node::Num(1.0), vec![(BinOp::Add, Node::Num(1.0)); 4999]);
        assert_eq!(fold(t), Node::Num(5000.0));
        let t = chain(Node::X, vec![(BinOp::Add, Node::X); 4999]);
        let mut ops = Vec::new();
        emit(&fold(t), &mut ops);
        let p = Program::new(ops);
        assert_eq!(p.ops.len(), 2 * 5000 - 1);
        assert_eq!(p.stack_depth, 2);
        assert_eq!(p.eval(0.5), 2500.0);
    }

    #[test]
    fn corner_sites_of_nested_calls() {
        // abs(x - 1) + min(x, 2 * x): sites x - 1 and x - 2 * x.
        let t = fold(chain(
            Node::Call1(
                Func1::Abs,
                Box::new(chain(Node::X, vec![(BinOp::Sub, Node::Num(1.0))])),
            ),
            vec![(
                BinOp::Add,
                Node::Call2(
                    Func2::Min,
                    Box::new(Node::X),
                    Box::new(chain(Node::Num(2.0), vec![(BinOp::Mul, Node::X)])),
                ),
            )],
        ));
        let sites = corner_sites(&t);
        assert_eq!(sites.len(), 2);
        assert_eq!(sites[0].eval(3.0), 2.0);
        assert_eq!(sites[1].eval(3.0), -3.0);
        // A constant argument folds away and leaves no site.
        let t = fold(Node::Call1(Func1::Abs, Box::new(Node::Num(-2.0))));
        assert!(corner_sites(&t).is_empty());
        // The same site twice is listed once.
        let abs_x = Node::Call1(Func1::Abs, Box::new(Node::X));
        let t = fold(chain(abs_x.clone(), vec![(BinOp::Add, abs_x)]));
        assert_eq!(corner_sites(&t).len(), 1);
    }
}
