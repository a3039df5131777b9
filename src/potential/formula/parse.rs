//! The Pratt parser: tokens to an expression tree.
//!
//! Top-down operator precedence (V. R. Pratt, "Top down operator
//! precedence", Proc. 1st ACM Symposium on Principles of Programming
//! Languages (1973), pp. 41-51). Each binary operator has a left binding
//! power; a sub-expression keeps absorbing operators whose binding power
//! exceeds the one it was called with. Right associativity of `^` comes from
//! parsing its right operand with a binding power one lower than its own.
//!
//! A run of left-associative operators at one level (`a + b - c * d`) is
//! kept as one [`Node::Chain`] of operands rather than a left-leaning tree,
//! so that a flat sum of any length costs no recursion, neither here nor in
//! folding and code generation. Recursion happens only where the text
//! nests: parentheses, unary signs, function arguments and the right operand
//! of `^`. That nesting is what [`MAX_DEPTH`] limits.

use std::collections::BTreeMap;

use super::error::{suggest, FormulaError, FormulaErrorKind};
use super::eval::{BinOp, Func1, Func2};
use super::lex::{Tok, Token};
use super::MAX_DEPTH;

/// Binding powers of the Pratt parser (higher binds tighter).
const BP_SUM: u8 = 10;
const BP_PRODUCT: u8 = 20;
const BP_PREFIX: u8 = 30;
const BP_POWER: u8 = 40;

pub(super) const EXPECT_OPERAND: &str = "a number, a name or `(`";
pub(super) const EXPECT_OPEN: &str = "`(` after the function name";

/// Whether `name` is reserved: the variable, `pi` or a function name.
pub(super) fn is_reserved(name: &str) -> bool {
    name == "x"
        || name == "pi"
        || Func1::ALL.iter().any(|p| p.0 == name)
        || Func2::ALL.iter().any(|p| p.0 == name)
}

/// Expression tree produced by the parser.
#[derive(Debug, Clone, PartialEq)]
pub(super) enum Node {
    Num(f64),
    X,
    Neg(Box<Node>),
    /// `((first op_1 r_1) op_2 r_2) ...`, evaluated left to right; the list
    /// is never empty.
    Chain(Box<Node>, Vec<(BinOp, Node)>),
    Call1(Func1, Box<Node>),
    Call2(Func2, Box<Node>, Box<Node>),
}

/// Parses a whole token list (ending in `End`) into a tree, refusing
/// trailing input.
pub(super) fn parse_tokens(
    toks: Vec<Token>,
    constants: &BTreeMap<String, f64>,
) -> Result<Node, FormulaError> {
    let mut parser = Parser {
        toks,
        pos: 0,
        depth: 0,
        constants,
    };
    let tree = parser.expr(0)?;
    let rest = parser.peek();
    if rest.tok != Tok::End {
        return Err(FormulaError::new(
            rest.at,
            FormulaErrorKind::TrailingInput {
                found: rest.text.clone(),
            },
        ));
    }
    Ok(tree)
}

struct Parser<'a> {
    toks: Vec<Token>,
    pos: usize,
    /// Constructs (parentheses, signs, calls, exponents) enclosing the
    /// current position.
    depth: usize,
    constants: &'a BTreeMap<String, f64>,
}

impl Parser<'_> {
    fn peek(&self) -> &Token {
        // The token list always ends with `End`, and `pos` never passes it.
        &self.toks[self.pos.min(self.toks.len() - 1)]
    }

    fn advance(&mut self) -> Token {
        let t = self.peek().clone();
        if self.pos < self.toks.len() - 1 {
            self.pos += 1;
        }
        t
    }

    /// Runs `inner` one nesting level deeper; refuses with `TooDeep` at
    /// `at` (the construct that opens the level) beyond [`MAX_DEPTH`].
    fn nested<T>(
        &mut self,
        at: usize,
        inner: impl FnOnce(&mut Self) -> Result<T, FormulaError>,
    ) -> Result<T, FormulaError> {
        if self.depth >= MAX_DEPTH {
            return Err(FormulaError::new(
                at,
                FormulaErrorKind::TooDeep { limit: MAX_DEPTH },
            ));
        }
        self.depth += 1;
        let out = inner(self);
        self.depth -= 1;
        out
    }

    /// Parses an expression whose operators all bind tighter than `min_bp`.
    fn expr(&mut self, min_bp: u8) -> Result<Node, FormulaError> {
        let first = self.operand()?;
        let mut rest: Vec<(BinOp, Node)> = Vec::new();
        loop {
            let t = self.peek();
            let (op, lbp) = match t.tok {
                Tok::Plus => (BinOp::Add, BP_SUM),
                Tok::Minus => (BinOp::Sub, BP_SUM),
                Tok::Star => (BinOp::Mul, BP_PRODUCT),
                Tok::Slash => (BinOp::Div, BP_PRODUCT),
                Tok::Caret => (BinOp::Pow, BP_POWER),
                Tok::Num(_) | Tok::Name(_) | Tok::Open => {
                    return Err(FormulaError::new(
                        t.at,
                        FormulaErrorKind::ImplicitMultiplication {
                            found: t.text.clone(),
                        },
                    ));
                }
                Tok::Close | Tok::Comma | Tok::End => break,
            };
            if lbp <= min_bp {
                break;
            }
            let op_at = t.at;
            self.advance();
            let rhs = if op == BinOp::Pow {
                // `a^b^c = a^(b^c)`: the exponent nests.
                self.nested(op_at, |p| p.expr(BP_POWER - 1))?
            } else {
                // Binds tighter than `op`, so it returns at the next
                // operator of this level: no nesting.
                self.expr(lbp)?
            };
            rest.push((op, rhs));
        }
        Ok(if rest.is_empty() {
            first
        } else {
            Node::Chain(Box::new(first), rest)
        })
    }

    /// Parses one operand: a number, name, call, parenthesised expression or
    /// signed operand.
    fn operand(&mut self) -> Result<Node, FormulaError> {
        let t = self.advance();
        match t.tok {
            Tok::Num(v) => Ok(Node::Num(v)),
            Tok::Minus => {
                let inner = self.nested(t.at, |p| p.expr(BP_PREFIX))?;
                Ok(Node::Neg(Box::new(inner)))
            }
            Tok::Plus => self.nested(t.at, |p| p.expr(BP_PREFIX)),
            Tok::Open => self.nested(t.at, |p| {
                let inner = p.expr(0)?;
                p.close(t.at, "`)`")?;
                Ok(inner)
            }),
            Tok::Name(name) => self.name(name, t.at),
            Tok::End => Err(FormulaError::new(
                t.at,
                FormulaErrorKind::UnexpectedEnd {
                    expected: EXPECT_OPERAND,
                },
            )),
            Tok::Close | Tok::Comma | Tok::Star | Tok::Slash | Tok::Caret => {
                Err(FormulaError::new(
                    t.at,
                    FormulaErrorKind::UnexpectedToken {
                        found: t.text,
                        expected: EXPECT_OPERAND,
                    },
                ))
            }
        }
    }

    /// Consumes the `)` matching the `(` at `open_at`.
    fn close(&mut self, open_at: usize, expected: &'static str) -> Result<(), FormulaError> {
        let t = self.advance();
        match t.tok {
            Tok::Close => Ok(()),
            Tok::End => Err(FormulaError::new(
                open_at,
                FormulaErrorKind::UnbalancedParen,
            )),
            _ => Err(FormulaError::new(
                t.at,
                FormulaErrorKind::UnexpectedToken {
                    found: t.text,
                    expected,
                },
            )),
        }
    }

    /// Resolves a name: the variable, `pi`, a constant or a function call.
    fn name(&mut self, name: String, at: usize) -> Result<Node, FormulaError> {
        if name == "x" {
            return Ok(Node::X);
        }
        if name == "pi" {
            return Ok(Node::Num(std::f64::consts::PI));
        }
        if let Some(&v) = self.constants.get(&name) {
            return Ok(Node::Num(v));
        }
        let f1 = Func1::ALL.iter().find(|(n, _)| *n == name).map(|p| p.1);
        let f2 = Func2::ALL.iter().find(|(n, _)| *n == name).map(|p| p.1);
        if f1.is_none() && f2.is_none() {
            let suggestion = suggest(&name, self.constants);
            return Err(FormulaError::new(
                at,
                FormulaErrorKind::UnknownName { name, suggestion },
            ));
        }
        let open = self.advance();
        match open.tok {
            Tok::Open => {}
            Tok::End => {
                return Err(FormulaError::new(
                    open.at,
                    FormulaErrorKind::UnexpectedEnd {
                        expected: EXPECT_OPEN,
                    },
                ));
            }
            _ => {
                return Err(FormulaError::new(
                    open.at,
                    FormulaErrorKind::UnexpectedToken {
                        found: open.text,
                        expected: EXPECT_OPEN,
                    },
                ));
            }
        }
        let args = self.nested(at, |p| {
            let mut args: Vec<Node> = Vec::new();
            if p.peek().tok != Tok::Close {
                loop {
                    args.push(p.expr(0)?);
                    if p.peek().tok == Tok::Comma {
                        p.advance();
                    } else {
                        break;
                    }
                }
            }
            p.close(open.at, "`,` or `)`")?;
            Ok(args)
        })?;
        let expected = if f1.is_some() { 1 } else { 2 };
        if args.len() != expected {
            return Err(FormulaError::new(
                at,
                FormulaErrorKind::WrongArity {
                    function: name,
                    expected,
                    found: args.len(),
                },
            ));
        }
        let mut it = args.into_iter().map(Box::new);
        Ok(match (f1, f2, it.next(), it.next()) {
            (Some(f), _, Some(a), None) => Node::Call1(f, a),
            (None, Some(f), Some(a), Some(b)) => Node::Call2(f, a, b),
            // The argument count was checked just above.
            _ => unreachable!("arity checked before building the call"),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::lex::tokenize;
    use super::*;

    fn tree(src: &str) -> Node {
        let chars: Vec<char> = src.chars().collect();
        let parsed = tokenize(&chars).and_then(|t| parse_tokens(t, &BTreeMap::new()));
        match parsed {
            Ok(n) => n,
            Err(e) => panic!("`{src}` failed to parse: {e}"),
        }
    }

    fn chain(first: Node, rest: Vec<(BinOp, Node)>) -> Node {
        Node::Chain(Box::new(first), rest)
    }

    #[test]
    fn left_associative_runs_form_one_chain() {
        // 1 - 2 * x + 3 = ((1 - (2 * x)) + 3): ordinary precedence.
        let want = chain(
            Node::Num(1.0),
            vec![
                (
                    BinOp::Sub,
                    chain(Node::Num(2.0), vec![(BinOp::Mul, Node::X)]),
                ),
                (BinOp::Add, Node::Num(3.0)),
            ],
        );
        assert_eq!(tree("1 - 2 * x + 3"), want);
    }

    #[test]
    fn powers_nest_to_the_right() {
        // 2^3^x = 2^(3^x).
        let want = chain(
            Node::Num(2.0),
            vec![(
                BinOp::Pow,
                chain(Node::Num(3.0), vec![(BinOp::Pow, Node::X)]),
            )],
        );
        assert_eq!(tree("2^3^x"), want);
        // -x^2 = -(x^2).
        let want = Node::Neg(Box::new(chain(Node::X, vec![(BinOp::Pow, Node::Num(2.0))])));
        assert_eq!(tree("-x^2"), want);
    }

    #[test]
    fn nesting_limit_counts_enclosing_constructs() {
        let parse = |src: &str| {
            let chars: Vec<char> = src.chars().collect();
            tokenize(&chars).and_then(|t| parse_tokens(t, &BTreeMap::new()))
        };
        let parens = |n: usize| format!("{}x + 1{}", "(".repeat(n), ")".repeat(n));
        assert!(parse(&parens(MAX_DEPTH)).is_ok());
        let e = parse(&parens(MAX_DEPTH + 1)).map(|_| ()).unwrap_err();
        assert_eq!(e.kind(), &FormulaErrorKind::TooDeep { limit: MAX_DEPTH });
        // The offset is the first `(` beyond the limit.
        assert_eq!(e.offset(), MAX_DEPTH);
        // Calls, signs and exponents nest like parentheses.
        let calls = |n: usize| format!("{}x{}", "sin(".repeat(n), ")".repeat(n));
        assert!(parse(&calls(MAX_DEPTH)).is_ok());
        assert!(parse(&calls(MAX_DEPTH + 1)).is_err());
        assert!(parse(&format!("{}x", "-".repeat(MAX_DEPTH))).is_ok());
        assert!(parse(&format!("{}x", "-".repeat(MAX_DEPTH + 1))).is_err());
        let tower = |n: usize| vec!["x"; n + 1].join("^");
        assert!(parse(&tower(MAX_DEPTH)).is_ok());
        assert!(parse(&tower(MAX_DEPTH + 1)).is_err());
    }
}
