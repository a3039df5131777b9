//! A small, safe expression language for one-dimensional potentials `V(x)`.
//!
//! An input file names a potential by a formula such as
//! `a * sin(x / b)^2 - c` together with a table of named constants. This
//! module compiles such text once into a flat postfix program that is then
//! evaluated at every grid point without allocation.
//!
//! # Grammar
//!
//! ```text
//! expr    := operand (binop operand)*
//! operand := number | name | name "(" args ")" | "(" expr ")" | ("-" | "+") operand
//! binop   := "+" | "-" | "*" | "/" | "^"
//! args    := expr ("," expr)*
//! number  := digits ["." [digits]] [exponent] | "." digits [exponent]
//! exponent := ("e" | "E") ["+" | "-"] digits
//! ```
//!
//! Names are the variable `x`, the built-in `pi`, the caller's constants and
//! the functions `sin cos tan exp ln sqrt abs cosh sinh tanh` (one argument)
//! and `min max` (two arguments). Binding, from weakest to strongest:
//!
//! | operators   | associativity |
//! |-------------|---------------|
//! | `+ -`       | left          |
//! | `* /`       | left          |
//! | unary `- +` | prefix        |
//! | `^`         | right         |
//!
//! so `-x^2 = -(x^2)`, `2^3^2 = 2^(3^2) = 512`, `2^-1 = 0.5` and
//! `8/4/2 = (8/4)/2 = 1`, as in ordinary mathematical notation. Implicit
//! multiplication (`2x`, `(x)(x)`, `2 sin(x)`) is rejected with a clear error.
//!
//! # Method
//!
//! The parser is a top-down operator-precedence ("Pratt") parser:
//! V. R. Pratt, "Top down operator precedence", Proc. 1st ACM Symposium on
//! Principles of Programming Languages (1973), pp. 41-51. Each binary
//! operator has a left binding power; a sub-expression keeps absorbing
//! operators whose binding power exceeds the one it was called with.
//! Right associativity of `^` comes from parsing its right operand with a
//! binding power one lower than its own.
//!
//! After parsing, every sub-tree that does not depend on `x` is folded to a
//! number, and the tree is flattened to postfix (reverse Polish) order,
//! evaluated with a fixed-size value stack (Aho, Lam, Sethi and Ullman,
//! *Compilers: Principles, Techniques, and Tools*, 2nd ed., sec. 2.8 and
//! 8.5 for postfix code and constant folding). Folding performs exactly the
//! same floating-point operations in the same order as run-time evaluation,
//! so the result is bit-identical to evaluating the written tree directly.
//!
//! Evaluation follows IEEE 754: `1/0` gives infinity, `sqrt(-1)` and `ln(-1)`
//! give NaN. The caller checks finiteness at each grid point. `min` and `max`
//! return NaN when either argument is NaN, so bad values are never hidden.

use std::collections::BTreeMap;

/// Greatest nesting depth accepted: both the depth of parentheses / unary
/// signs while parsing and the height of the expression tree. Deeper input
/// is reported as [`FormulaErrorKind::TooDeep`] instead of exhausting the
/// stack.
pub const MAX_DEPTH: usize = 256;

/// Values kept on the stack without heap allocation during evaluation.
const INLINE_STACK: usize = 32;

/// Binding powers of the Pratt parser (higher binds tighter).
const BP_SUM: u8 = 10;
const BP_PRODUCT: u8 = 20;
const BP_PREFIX: u8 = 30;
const BP_POWER: u8 = 40;

/// One-argument built-in functions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Func1 {
    Sin,
    Cos,
    Tan,
    Exp,
    Ln,
    Sqrt,
    Abs,
    Cosh,
    Sinh,
    Tanh,
}

impl Func1 {
    const ALL: [(&'static str, Func1); 10] = [
        ("sin", Func1::Sin),
        ("cos", Func1::Cos),
        ("tan", Func1::Tan),
        ("exp", Func1::Exp),
        ("ln", Func1::Ln),
        ("sqrt", Func1::Sqrt),
        ("abs", Func1::Abs),
        ("cosh", Func1::Cosh),
        ("sinh", Func1::Sinh),
        ("tanh", Func1::Tanh),
    ];

    fn apply(self, v: f64) -> f64 {
        match self {
            Func1::Sin => v.sin(),
            Func1::Cos => v.cos(),
            Func1::Tan => v.tan(),
            Func1::Exp => v.exp(),
            Func1::Ln => v.ln(),
            Func1::Sqrt => v.sqrt(),
            Func1::Abs => v.abs(),
            Func1::Cosh => v.cosh(),
            Func1::Sinh => v.sinh(),
            Func1::Tanh => v.tanh(),
        }
    }
}

/// Two-argument built-in functions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Func2 {
    Min,
    Max,
}

impl Func2 {
    const ALL: [(&'static str, Func2); 2] = [("min", Func2::Min), ("max", Func2::Max)];

    /// NaN-propagating minimum / maximum.
    fn apply(self, a: f64, b: f64) -> f64 {
        if a.is_nan() || b.is_nan() {
            return f64::NAN;
        }
        match self {
            Func2::Min => a.min(b),
            Func2::Max => a.max(b),
        }
    }
}

/// Binary arithmetic operators.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum BinOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
}

impl BinOp {
    fn apply(self, a: f64, b: f64) -> f64 {
        match self {
            BinOp::Add => a + b,
            BinOp::Sub => a - b,
            BinOp::Mul => a * b,
            BinOp::Div => a / b,
            BinOp::Pow => a.powf(b),
        }
    }
}

/// Whether `name` is reserved: the variable, `pi` or a function name.
fn is_reserved(name: &str) -> bool {
    name == "x"
        || name == "pi"
        || Func1::ALL.iter().any(|p| p.0 == name)
        || Func2::ALL.iter().any(|p| p.0 == name)
}

/// What kind of fault a [`FormulaError`] reports.
///
/// The messages are written to follow a location prefix such as
/// `error: FILE:LINE:COL: `.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum FormulaErrorKind {
    /// The expression is empty or only whitespace.
    #[error("the expression is empty")]
    Empty,
    /// A character that is not part of the expression language.
    #[error("unexpected character `{found}` in expression")]
    UnexpectedChar {
        /// The offending character.
        found: char,
    },
    /// A malformed or out-of-range number such as `1e+`, `1.2.3` or `1e999`.
    #[error("malformed or out-of-range number `{text}` in expression")]
    BadNumber {
        /// The text of the number as written.
        text: String,
    },
    /// A token that cannot stand where it was found (for example `*` where
    /// an operand is needed).
    #[error("expected {expected} but found `{found}` in expression")]
    UnexpectedToken {
        /// The text of the token found.
        found: String,
        /// What the parser was looking for.
        expected: &'static str,
    },
    /// The expression stops while something is still needed; the offset is
    /// one past the last character.
    #[error("the expression ends early: expected {expected}")]
    UnexpectedEnd {
        /// What the parser was looking for.
        expected: &'static str,
    },
    /// An opening parenthesis is never closed; the offset points at it.
    #[error("this `(` is never closed")]
    UnbalancedParen,
    /// A name that is neither `x`, `pi`, a function nor a given constant.
    #[error(
        "unknown name `{name}` in expression{}",
        match suggestion {
            Some(s) => format!(" (did you mean `{s}`?)"),
            None => String::new(),
        }
    )]
    UnknownName {
        /// The name as written.
        name: String,
        /// The closest known name by edit distance, when it is close.
        suggestion: Option<String>,
    },
    /// A function called with the wrong number of arguments; the offset
    /// points at the function name.
    #[error(
        "function `{function}` takes {expected} argument{} but was given {found}",
        if *expected == 1 { "" } else { "s" }
    )]
    WrongArity {
        /// The function name.
        function: String,
        /// Number of arguments the function takes.
        expected: usize,
        /// Number of arguments written.
        found: usize,
    },
    /// A constant whose name is reserved (`x`, `pi` or a function name).
    #[error("constant `{name}` cannot be defined: the name is reserved in expressions")]
    ConstantShadows {
        /// The reserved name.
        name: String,
    },
    /// A constant whose value is infinite or NaN.
    #[error("constant `{name}` is not a finite number")]
    NonFiniteConstant {
        /// The constant's name.
        name: String,
    },
    /// Two operands written side by side, such as `2x` or `(x)(x)`; the
    /// offset points at the second operand.
    #[error(
        "missing operator before `{found}` (implicit multiplication is not allowed; write `*`)"
    )]
    ImplicitMultiplication {
        /// The text of the second operand's first token.
        found: String,
    },
    /// Input left over after a complete expression, such as an unmatched `)`.
    #[error("unexpected `{found}` after a complete expression")]
    TrailingInput {
        /// The text of the first left-over token.
        found: String,
    },
    /// Nesting deeper than [`MAX_DEPTH`].
    #[error("the expression is nested more than {limit} levels deep")]
    TooDeep {
        /// The limit, [`MAX_DEPTH`].
        limit: usize,
    },
}

/// An error found while compiling a [`Formula`].
///
/// The offset is the 0-based character column inside the source text where
/// the fault is (one past the last character for a premature end; 0 for
/// faults in the constants table, which has no place in the source), for
/// caret diagnostics. Display gives the kind's message only.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{kind}")]
pub struct FormulaError {
    offset: usize,
    kind: FormulaErrorKind,
}

impl FormulaError {
    fn new(offset: usize, kind: FormulaErrorKind) -> Self {
        FormulaError { offset, kind }
    }

    /// 0-based character column of the fault inside the source text.
    pub fn offset(&self) -> usize {
        self.offset
    }

    /// What went wrong.
    pub fn kind(&self) -> &FormulaErrorKind {
        &self.kind
    }
}

/// A lexical token.
#[derive(Debug, Clone, PartialEq)]
enum Tok {
    Num(f64),
    Name(String),
    Plus,
    Minus,
    Star,
    Slash,
    Caret,
    Open,
    Close,
    Comma,
    End,
}

/// A token with its 0-based character offset and its text.
#[derive(Debug, Clone)]
struct Token {
    tok: Tok,
    at: usize,
    text: String,
}

fn is_name_start(c: char) -> bool {
    c.is_alphabetic() || c == '_'
}

fn is_name_char(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// Splits the source into tokens; the last token is always `End`.
fn tokenize(chars: &[char]) -> Result<Vec<Token>, FormulaError> {
    let digit_at = |k: usize| chars.get(k).is_some_and(|d| d.is_ascii_digit());
    let mut out = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        if c.is_whitespace() {
            i += 1;
            continue;
        }
        let start = i;
        let single = match c {
            '+' => Some(Tok::Plus),
            '-' => Some(Tok::Minus),
            '*' => Some(Tok::Star),
            '/' => Some(Tok::Slash),
            '^' => Some(Tok::Caret),
            '(' => Some(Tok::Open),
            ')' => Some(Tok::Close),
            ',' => Some(Tok::Comma),
            _ => None,
        };
        if let Some(tok) = single {
            out.push(Token {
                tok,
                at: start,
                text: c.to_string(),
            });
            i += 1;
        } else if c.is_ascii_digit() || (c == '.' && digit_at(i + 1)) {
            let (value, end) = lex_number(chars, start)?;
            out.push(Token {
                tok: Tok::Num(value),
                at: start,
                text: chars[start..end].iter().collect(),
            });
            i = end;
        } else if is_name_start(c) {
            while i < chars.len() && is_name_char(chars[i]) {
                i += 1;
            }
            let name: String = chars[start..i].iter().collect();
            out.push(Token {
                tok: Tok::Name(name.clone()),
                at: start,
                text: name,
            });
        } else {
            return Err(FormulaError::new(
                start,
                FormulaErrorKind::UnexpectedChar { found: c },
            ));
        }
    }
    out.push(Token {
        tok: Tok::End,
        at: chars.len(),
        text: String::new(),
    });
    Ok(out)
}

/// Reads a number starting at `start`; returns its value and the index just
/// past it.
fn lex_number(chars: &[char], start: usize) -> Result<(f64, usize), FormulaError> {
    let digit_at = |k: usize| chars.get(k).is_some_and(|d| d.is_ascii_digit());
    let mut i = start;
    while digit_at(i) {
        i += 1;
    }
    if chars.get(i) == Some(&'.') {
        i += 1;
        while digit_at(i) {
            i += 1;
        }
    }
    let mut bad = false;
    if matches!(chars.get(i), Some('e' | 'E')) {
        let mut j = i + 1;
        if matches!(chars.get(j), Some('+' | '-')) {
            j += 1;
        }
        if digit_at(j) {
            while digit_at(j) {
                j += 1;
            }
            i = j;
        } else {
            bad = true;
        }
    }
    // A second decimal point glued to the number is malformed.
    if chars.get(i) == Some(&'.') {
        bad = true;
    }
    if bad {
        // Report the whole run of number-like characters.
        let mut j = start;
        while j < chars.len() {
            let c = chars[j];
            let sign_after_e =
                matches!(c, '+' | '-') && j > start && matches!(chars[j - 1], 'e' | 'E');
            if c.is_ascii_alphanumeric() || c == '.' || sign_after_e {
                j += 1;
            } else {
                break;
            }
        }
        return Err(FormulaError::new(
            start,
            FormulaErrorKind::BadNumber {
                text: chars[start..j].iter().collect(),
            },
        ));
    }
    let text: String = chars[start..i].iter().collect();
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok((v, i)),
        _ => Err(FormulaError::new(
            start,
            FormulaErrorKind::BadNumber { text },
        )),
    }
}

/// Expression tree produced by the parser.
#[derive(Debug, Clone, PartialEq)]
enum Node {
    Num(f64),
    X,
    Neg(Box<Node>),
    Bin(BinOp, Box<Node>, Box<Node>),
    Call1(Func1, Box<Node>),
    Call2(Func2, Box<Node>, Box<Node>),
}

/// A parsed sub-tree with its height (a leaf has height 1).
struct Sub {
    node: Node,
    height: usize,
}

const EXPECT_OPERAND: &str = "a number, a name or `(`";
const EXPECT_OPEN: &str = "`(` after the function name";

struct Parser<'a> {
    toks: Vec<Token>,
    pos: usize,
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

    fn too_deep(at: usize) -> FormulaError {
        FormulaError::new(at, FormulaErrorKind::TooDeep { limit: MAX_DEPTH })
    }

    /// Parses an expression whose operators all bind tighter than `min_bp`.
    fn expr(&mut self, min_bp: u8) -> Result<Sub, FormulaError> {
        self.depth += 1;
        if self.depth > MAX_DEPTH {
            return Err(Self::too_deep(self.peek().at));
        }
        let mut lhs = self.operand()?;
        loop {
            let t = self.peek();
            let (op, lbp, rbp) = match t.tok {
                Tok::Plus => (BinOp::Add, BP_SUM, BP_SUM),
                Tok::Minus => (BinOp::Sub, BP_SUM, BP_SUM),
                Tok::Star => (BinOp::Mul, BP_PRODUCT, BP_PRODUCT),
                Tok::Slash => (BinOp::Div, BP_PRODUCT, BP_PRODUCT),
                Tok::Caret => (BinOp::Pow, BP_POWER, BP_POWER - 1),
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
            let rhs = self.expr(rbp)?;
            let height = 1 + lhs.height.max(rhs.height);
            if height > MAX_DEPTH {
                return Err(Self::too_deep(op_at));
            }
            lhs = Sub {
                node: Node::Bin(op, Box::new(lhs.node), Box::new(rhs.node)),
                height,
            };
        }
        self.depth -= 1;
        Ok(lhs)
    }

    /// Parses one operand: a number, name, call, parenthesised expression or
    /// signed operand.
    fn operand(&mut self) -> Result<Sub, FormulaError> {
        let t = self.advance();
        match t.tok {
            Tok::Num(v) => Ok(Sub {
                node: Node::Num(v),
                height: 1,
            }),
            Tok::Minus => {
                let inner = self.expr(BP_PREFIX)?;
                if inner.height + 1 > MAX_DEPTH {
                    return Err(Self::too_deep(t.at));
                }
                Ok(Sub {
                    node: Node::Neg(Box::new(inner.node)),
                    height: inner.height + 1,
                })
            }
            Tok::Plus => self.expr(BP_PREFIX),
            Tok::Open => {
                let inner = self.expr(0)?;
                self.close(t.at, "`)`")?;
                Ok(inner)
            }
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
    fn name(&mut self, name: String, at: usize) -> Result<Sub, FormulaError> {
        let leaf = |node| Ok(Sub { node, height: 1 });
        if name == "x" {
            return leaf(Node::X);
        }
        if name == "pi" {
            return leaf(Node::Num(std::f64::consts::PI));
        }
        if let Some(&v) = self.constants.get(&name) {
            return leaf(Node::Num(v));
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
        let mut args: Vec<Sub> = Vec::new();
        if self.peek().tok != Tok::Close {
            loop {
                args.push(self.expr(0)?);
                if self.peek().tok == Tok::Comma {
                    self.advance();
                } else {
                    break;
                }
            }
        }
        self.close(open.at, "`,` or `)`")?;
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
        let height = 1 + args.iter().map(|a| a.height).max().unwrap_or(0);
        if height > MAX_DEPTH {
            return Err(Self::too_deep(at));
        }
        let mut it = args.into_iter().map(|a| Box::new(a.node));
        let node = match (f1, f2, it.next(), it.next()) {
            (Some(f), _, Some(a), None) => Node::Call1(f, a),
            (None, Some(f), Some(a), Some(b)) => Node::Call2(f, a, b),
            // The argument count was checked just above.
            _ => unreachable!("arity checked before building the call"),
        };
        Ok(Sub { node, height })
    }
}

/// Edit distance between two strings counted in characters: insertions,
/// deletions, substitutions and swaps of two neighbours each cost 1 (the
/// "optimal string alignment" form of the Damerau-Levenshtein distance;
/// F. J. Damerau, Commun. ACM 7 (1964) 171; V. I. Levenshtein, Sov. Phys.
/// Dokl. 10 (1966) 707).
fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    // d[i][j]: distance between the first i chars of a and the first j of b.
    let mut d = vec![vec![0usize; b.len() + 1]; a.len() + 1];
    for (i, row) in d.iter_mut().enumerate() {
        row[0] = i;
    }
    for (j, cell) in d[0].iter_mut().enumerate() {
        *cell = j;
    }
    for i in 1..=a.len() {
        for j in 1..=b.len() {
            let cost = usize::from(a[i - 1] != b[j - 1]);
            let mut best = (d[i - 1][j] + 1)
                .min(d[i][j - 1] + 1)
                .min(d[i - 1][j - 1] + cost);
            if i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1] {
                best = best.min(d[i - 2][j - 2] + 1);
            }
            d[i][j] = best;
        }
    }
    d[a.len()][b.len()]
}

/// The closest known name to `name`, if it is close enough to be a likely
/// typo: the same letters in another case, or within 1 edit for names of
/// 2-4 characters and 2 edits for longer names. Ties go to a name with the
/// same first letter, then to the name that sorts first.
fn suggest(name: &str, constants: &BTreeMap<String, f64>) -> Option<String> {
    let mut known: Vec<&str> = vec!["x", "pi"];
    known.extend(Func1::ALL.iter().map(|p| p.0));
    known.extend(Func2::ALL.iter().map(|p| p.0));
    known.extend(constants.keys().map(String::as_str));
    known.sort_unstable();
    let lower = name.to_lowercase();
    if let Some(k) = known.iter().find(|k| **k == lower) {
        return Some((*k).to_string());
    }
    let limit = match name.chars().count() {
        0..=1 => return None,
        2..=4 => 1,
        _ => 2,
    };
    let first = name.chars().next();
    known
        .iter()
        .map(|k| (edit_distance(name, k), *k))
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, k)| (*d, k.chars().next() != first))
        .map(|(_, k)| k.to_string())
}

/// Replaces every sub-tree that does not depend on `x` by its value.
fn fold(node: Node) -> Node {
    match node {
        Node::Num(_) | Node::X => node,
        Node::Neg(a) => match fold(*a) {
            Node::Num(v) => Node::Num(-v),
            a => Node::Neg(Box::new(a)),
        },
        Node::Bin(op, a, b) => match (fold(*a), fold(*b)) {
            (Node::Num(p), Node::Num(q)) => Node::Num(op.apply(p, q)),
            (a, b) => Node::Bin(op, Box::new(a), Box::new(b)),
        },
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

/// One instruction of the postfix program.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Op {
    Const(f64),
    X,
    Neg,
    Bin(BinOp),
    Call1(Func1),
    Call2(Func2),
}

/// Appends the postfix code of `node` to `ops`.
fn emit(node: &Node, ops: &mut Vec<Op>) {
    match node {
        Node::Num(v) => ops.push(Op::Const(*v)),
        Node::X => ops.push(Op::X),
        Node::Neg(a) => {
            emit(a, ops);
            ops.push(Op::Neg);
        }
        Node::Bin(op, a, b) => {
            emit(a, ops);
            emit(b, ops);
            ops.push(Op::Bin(*op));
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

/// Runs a postfix program; `stack` must hold at least the program's
/// greatest stack depth.
fn run(ops: &[Op], x: f64, stack: &mut [f64]) -> f64 {
    let mut sp = 0usize;
    for op in ops {
        match *op {
            Op::Const(c) => {
                stack[sp] = c;
                sp += 1;
            }
            Op::X => {
                stack[sp] = x;
                sp += 1;
            }
            Op::Neg => stack[sp - 1] = -stack[sp - 1],
            Op::Bin(b) => {
                sp -= 1;
                stack[sp - 1] = b.apply(stack[sp - 1], stack[sp]);
            }
            Op::Call1(f) => stack[sp - 1] = f.apply(stack[sp - 1]),
            Op::Call2(f) => {
                sp -= 1;
                stack[sp - 1] = f.apply(stack[sp - 1], stack[sp]);
            }
        }
    }
    stack[0]
}

/// A compiled potential expression `V(x)`.
///
/// Built once by [`Formula::parse`]; [`Formula::eval`] then costs a short
/// loop over a flat postfix program with no allocation (for programs whose
/// value stack fits in 32 entries, which is all but pathological ones).
/// `Formula` is `Send + Sync` and can be evaluated from many threads.
#[derive(Debug, Clone, PartialEq)]
pub struct Formula {
    ops: Vec<Op>,
    stack_depth: usize,
    uses_x: bool,
}

impl Formula {
    /// Compiles `source` with the named `constants`.
    ///
    /// Constant names must not be `x`, `pi` or a function name, and their
    /// values must be finite; both are checked (in name order) even for
    /// constants the expression does not use. Errors carry the 0-based
    /// character offset of the fault in `source`.
    ///
    /// ```
    /// use std::collections::BTreeMap;
    /// use chainwell::potential::formula::Formula;
    /// let c = BTreeMap::from([("a".to_string(), 2.0)]);
    /// let f = Formula::parse("-a * x^2 + 1", &c).unwrap();
    /// assert_eq!(f.eval(3.0), -17.0); // -x^2 is -(x^2)
    /// assert_eq!(Formula::parse("2 * sn(x)", &c).unwrap_err().offset(), 4);
    /// ```
    pub fn parse(source: &str, constants: &BTreeMap<String, f64>) -> Result<Formula, FormulaError> {
        for (name, value) in constants {
            if is_reserved(name) {
                return Err(FormulaError::new(
                    0,
                    FormulaErrorKind::ConstantShadows { name: name.clone() },
                ));
            }
            if !value.is_finite() {
                return Err(FormulaError::new(
                    0,
                    FormulaErrorKind::NonFiniteConstant { name: name.clone() },
                ));
            }
        }
        let chars: Vec<char> = source.chars().collect();
        if chars.iter().all(|c| c.is_whitespace()) {
            return Err(FormulaError::new(0, FormulaErrorKind::Empty));
        }
        let toks = tokenize(&chars)?;
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
        let folded = fold(tree.node);
        let mut ops = Vec::new();
        emit(&folded, &mut ops);
        let mut sp = 0usize;
        let mut stack_depth = 0usize;
        for op in &ops {
            match op {
                Op::Const(_) | Op::X => sp += 1,
                Op::Bin(_) | Op::Call2(_) => sp -= 1,
                Op::Neg | Op::Call1(_) => {}
            }
            stack_depth = stack_depth.max(sp);
        }
        let uses_x = ops.contains(&Op::X);
        Ok(Formula {
            ops,
            stack_depth,
            uses_x,
        })
    }

    /// Evaluates `V(x)` with IEEE 754 semantics: the result may be infinite
    /// or NaN (division by zero, `ln` of a negative number...); the caller
    /// checks finiteness and reports the offending `x`.
    pub fn eval(&self, x: f64) -> f64 {
        if let [Op::Const(c)] = self.ops.as_slice() {
            return *c;
        }
        if self.stack_depth <= INLINE_STACK {
            let mut stack = [0.0f64; INLINE_STACK];
            run(&self.ops, x, &mut stack)
        } else {
            let mut stack = vec![0.0f64; self.stack_depth];
            run(&self.ops, x, &mut stack)
        }
    }

    /// Whether `x` appears in the compiled expression; false for a constant
    /// potential such as `2 * a`, which folds to a single number. (Folding
    /// does not simplify algebraically, so `0 * x` still uses `x`.)
    pub fn uses_x(&self) -> bool {
        self.uses_x
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    fn no_constants() -> BTreeMap<String, f64> {
        BTreeMap::new()
    }

    fn eval_at(source: &str, x: f64) -> f64 {
        match Formula::parse(source, &no_constants()) {
            Ok(f) => f.eval(x),
            Err(e) => panic!("`{source}` failed to parse: {e}"),
        }
    }

    fn err(source: &str) -> FormulaError {
        err_with(source, &no_constants())
    }

    fn err_with(source: &str, constants: &BTreeMap<String, f64>) -> FormulaError {
        match Formula::parse(source, constants) {
            Ok(_) => panic!("`{source}` parsed but should fail"),
            Err(e) => e,
        }
    }

    #[test]
    fn precedence_table() {
        // Ordinary mathematical conventions (worked by hand).
        let cases: [(&str, f64, f64); 16] = [
            ("-x^2", 3.0, -9.0),
            ("2^3^2", 0.0, 512.0),
            ("1-2-3", 0.0, -4.0),
            ("8/4/2", 0.0, 1.0),
            ("-2^2", 0.0, -4.0),
            ("(-2)^2", 0.0, 4.0),
            ("2*-3", 0.0, -6.0),
            ("2^-1", 0.0, 0.5),
            ("1+2*3", 0.0, 7.0),
            ("(1+2)*3", 0.0, 9.0),
            ("2*3^2", 0.0, 18.0),
            ("-x*2", 4.0, -8.0),
            ("2^-1*3", 0.0, 1.5),
            ("--x", 5.0, 5.0),
            ("+x - -x", 5.0, 10.0),
            ("x - 1 + 1", 2.0, 2.0),
        ];
        for (src, x, want) in cases {
            assert_eq!(eval_at(src, x), want, "{src} at x = {x}");
        }
    }

    #[test]
    fn number_forms() {
        // Literal values (no source needed).
        assert_eq!(eval_at("1", 0.0), 1.0);
        assert_eq!(eval_at("2.5", 0.0), 2.5);
        assert_eq!(eval_at("1e-3", 0.0), 1e-3);
        assert_eq!(eval_at("1E+3", 0.0), 1e3);
        assert_eq!(eval_at(".5", 0.0), 0.5);
        assert_eq!(eval_at("3.", 0.0), 3.0);
        assert_eq!(eval_at("2.5e2", 0.0), 250.0);
    }

    #[test]
    fn every_function_matches_std() {
        type Unary = fn(f64) -> f64;
        let cases: [(&str, Unary); 10] = [
            ("sin", f64::sin),
            ("cos", f64::cos),
            ("tan", f64::tan),
            ("exp", f64::exp),
            ("ln", f64::ln),
            ("sqrt", f64::sqrt),
            ("abs", f64::abs),
            ("cosh", f64::cosh),
            ("sinh", f64::sinh),
            ("tanh", f64::tanh),
        ];
        for (name, f) in cases {
            let formula = Formula::parse(&format!("{name}(x)"), &no_constants()).unwrap();
            for x in [0.3, 1.7, 2.9, -0.8] {
                let want = f(x);
                let got = formula.eval(x);
                assert!(
                    got == want || (got.is_nan() && want.is_nan()),
                    "{name}({x}) = {got}, std gives {want}"
                );
            }
        }
        assert_eq!(eval_at("min(x, 2)", 3.0), 2.0);
        assert_eq!(eval_at("max(x, 2)", 3.0), 3.0);
        assert_eq!(eval_at("min(-x, x)", 3.0), -3.0);
        assert_eq!(eval_at("max(2, x)", 1.0), 2.0);
        // NaN propagates through min/max (documented choice).
        assert!(eval_at("min(sqrt(x), 1)", -1.0).is_nan());
        assert!(eval_at("max(1, ln(x))", -1.0).is_nan());
    }

    #[test]
    fn ieee_semantics() {
        assert_eq!(eval_at("1/x", 0.0), f64::INFINITY);
        assert!(eval_at("ln(x)", -1.0).is_nan());
        assert!(eval_at("sqrt(x)", -1.0).is_nan());
    }

    #[test]
    fn constants_and_pi() {
        let mut c = BTreeMap::new();
        c.insert("a".to_string(), 1.0);
        c.insert("b".to_string(), 2.0);
        c.insert("c".to_string(), 0.3);
        c.insert("depth_2".to_string(), 4.0);
        let f = Formula::parse("a * sin(x / b)^2 - c", &c).unwrap();
        for x in [0.0f64, 0.7, 3.1] {
            // closed form of the same expression
            let want = (x / 2.0).sin().powf(2.0) - 0.3;
            assert_relative_eq!(f.eval(x), want, max_relative = 1e-15);
        }
        assert!(f.uses_x());
        let g = Formula::parse("depth_2 * cos(pi)", &c).unwrap();
        assert_eq!(g.eval(123.0), -4.0);
        assert!(!g.uses_x());
        // Folded to a single constant.
        assert_eq!(g.ops.len(), 1);
        assert_eq!(eval_at("pi", 0.0), std::f64::consts::PI);
    }

    #[test]
    fn folding_leaves_only_x_dependent_code() {
        let f = Formula::parse("x * (2 * 3 + sin(0))", &no_constants()).unwrap();
        assert_eq!(f.ops, vec![Op::X, Op::Const(6.0), Op::Bin(BinOp::Mul)]);
        assert_eq!(f.stack_depth, 2);
    }

    #[test]
    fn deep_stack_uses_heap_path() {
        // Right-nested sums need one stack slot per level.
        let n = 40;
        let src = format!("{}x{}", "(x+".repeat(n), ")".repeat(n));
        let f = Formula::parse(&src, &no_constants()).unwrap();
        assert!(f.stack_depth > INLINE_STACK);
        assert_eq!(f.eval(1.5), 1.5 * (n as f64 + 1.0));
    }

    #[test]
    fn error_offsets_for_each_kind() {
        use FormulaErrorKind as K;
        let cases: Vec<(&str, usize, K)> = vec![
            ("", 0, K::Empty),
            ("   ", 0, K::Empty),
            ("x $ 2", 2, K::UnexpectedChar { found: '$' }),
            ("x + 1e+", 4, K::BadNumber { text: "1e+".into() }),
            (
                "1.2.3",
                0,
                K::BadNumber {
                    text: "1.2.3".into(),
                },
            ),
            (
                "2 * 1e999",
                4,
                K::BadNumber {
                    text: "1e999".into(),
                },
            ),
            (
                "x + * 2",
                4,
                K::UnexpectedToken {
                    found: "*".into(),
                    expected: EXPECT_OPERAND,
                },
            ),
            (
                "sin x",
                4,
                K::UnexpectedToken {
                    found: "x".into(),
                    expected: EXPECT_OPEN,
                },
            ),
            (
                "(x, 1)",
                2,
                K::UnexpectedToken {
                    found: ",".into(),
                    expected: "`)`",
                },
            ),
            (
                "x *",
                3,
                K::UnexpectedEnd {
                    expected: EXPECT_OPERAND,
                },
            ),
            (
                "2 + cos",
                7,
                K::UnexpectedEnd {
                    expected: EXPECT_OPEN,
                },
            ),
            ("1 + (2 * (x)", 4, K::UnbalancedParen),
            ("max(x, 2", 3, K::UnbalancedParen),
            (
                "1 + sn(x)",
                4,
                K::UnknownName {
                    name: "sn".into(),
                    suggestion: Some("sin".into()),
                },
            ),
            (
                "PI * x",
                0,
                K::UnknownName {
                    name: "PI".into(),
                    suggestion: Some("pi".into()),
                },
            ),
            (
                "x + wobble",
                4,
                K::UnknownName {
                    name: "wobble".into(),
                    suggestion: None,
                },
            ),
            (
                "2 * sin(x, 1)",
                4,
                K::WrongArity {
                    function: "sin".into(),
                    expected: 1,
                    found: 2,
                },
            ),
            (
                "min(x)",
                0,
                K::WrongArity {
                    function: "min".into(),
                    expected: 2,
                    found: 1,
                },
            ),
            (
                "cos()",
                0,
                K::WrongArity {
                    function: "cos".into(),
                    expected: 1,
                    found: 0,
                },
            ),
            ("2x", 1, K::ImplicitMultiplication { found: "x".into() }),
            ("(x)(x)", 3, K::ImplicitMultiplication { found: "(".into() }),
            (
                "2 sin(x)",
                2,
                K::ImplicitMultiplication {
                    found: "sin".into(),
                },
            ),
            ("x + 1)", 5, K::TrailingInput { found: ")".into() }),
            ("x, 2", 1, K::TrailingInput { found: ",".into() }),
        ];
        for (src, offset, kind) in cases {
            let e = err(src);
            assert_eq!((e.offset(), e.kind()), (offset, &kind), "source `{src}`");
        }
    }

    #[test]
    fn offsets_count_characters_not_bytes() {
        // "α" is two bytes in UTF-8 but one column.
        let e = err("x + αβ");
        assert_eq!(
            e.kind(),
            &FormulaErrorKind::UnknownName {
                name: "αβ".into(),
                suggestion: None
            }
        );
        assert_eq!(e.offset(), 4);
        let e = err("αβ + 1 + #");
        assert_eq!(e.offset(), 9);
    }

    #[test]
    fn constant_errors() {
        for reserved in ["x", "pi", "sin", "max"] {
            let mut c = BTreeMap::new();
            c.insert(reserved.to_string(), 1.0);
            let e = err_with("1", &c);
            assert_eq!(e.offset(), 0);
            assert_eq!(
                e.kind(),
                &FormulaErrorKind::ConstantShadows {
                    name: reserved.into()
                }
            );
        }
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let mut c = BTreeMap::new();
            c.insert("depth".to_string(), bad);
            let e = err_with("depth * x", &c);
            assert_eq!(e.offset(), 0);
            assert_eq!(
                e.kind(),
                &FormulaErrorKind::NonFiniteConstant {
                    name: "depth".into()
                }
            );
        }
        // Suggestions also come from the caller's constants (swap of two
        // neighbours counts as one edit).
        let mut c = BTreeMap::new();
        c.insert("width".to_string(), 1.0);
        let e = err_with("x / widht", &c);
        assert_eq!(
            e.kind(),
            &FormulaErrorKind::UnknownName {
                name: "widht".into(),
                suggestion: Some("width".into())
            }
        );
        assert_eq!(e.offset(), 4);
    }

    #[test]
    fn too_deep_is_an_error_not_a_crash() {
        let src = format!("{}x{}", "(".repeat(10_000), ")".repeat(10_000));
        assert!(matches!(err(&src).kind(), FormulaErrorKind::TooDeep { .. }));
        let src = format!("{}x", "-".repeat(10_000));
        assert!(matches!(err(&src).kind(), FormulaErrorKind::TooDeep { .. }));
        // A long flat sum builds a tall left-leaning tree.
        let src = ["x"; 10_000].join("+");
        let e = err(&src);
        assert!(matches!(e.kind(), FormulaErrorKind::TooDeep { .. }));
        // The `+` that made the tree too tall is the MAX_DEPTH-th one.
        assert_eq!(e.offset(), 2 * MAX_DEPTH - 1);
        // Just below the limit is fine.
        let src = ["x"; MAX_DEPTH].join("+");
        assert_eq!(eval_at(&src, 1.0), MAX_DEPTH as f64);
    }

    #[test]
    fn messages_read_well() {
        assert_eq!(
            err("1 + sn(x)").to_string(),
            "unknown name `sn` in expression (did you mean `sin`?)"
        );
        assert_eq!(
            err("2x").to_string(),
            "missing operator before `x` (implicit multiplication is not allowed; write `*`)"
        );
        assert_eq!(
            err("min(x)").to_string(),
            "function `min` takes 2 arguments but was given 1"
        );
        assert_eq!(
            err("sin(x, x)").to_string(),
            "function `sin` takes 1 argument but was given 2"
        );
        assert_eq!(err("(x").to_string(), "this `(` is never closed");
        assert_eq!(
            err("x +").to_string(),
            "the expression ends early: expected a number, a name or `(`"
        );
    }

    #[test]
    fn edit_distance_known_values() {
        // Distances worked by hand.
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("sin", "sin"), 0);
        assert_eq!(edit_distance("sn", "sin"), 1);
        assert_eq!(edit_distance("sni", "sin"), 1);
        assert_eq!(edit_distance("ab", "ba"), 1);
    }

    /// A random expression tree for the round-trip property.
    #[derive(Debug, Clone)]
    enum T {
        Num(f64),
        X,
        Neg(Box<T>),
        Bin(char, Box<T>, Box<T>),
        F1(&'static str, Box<T>),
        F2(&'static str, Box<T>, Box<T>),
    }

    /// Prints with full parentheses.
    fn print(t: &T) -> String {
        match t {
            T::Num(v) => format!("{v}"),
            T::X => "x".into(),
            T::Neg(a) => format!("(-{})", print(a)),
            T::Bin(op, a, b) => format!("({} {op} {})", print(a), print(b)),
            T::F1(name, a) => format!("{name}({})", print(a)),
            T::F2(name, a, b) => format!("{name}({}, {})", print(a), print(b)),
        }
    }

    /// Direct evaluation of the tree with std functions.
    fn direct(t: &T, x: f64) -> f64 {
        match t {
            T::Num(v) => *v,
            T::X => x,
            T::Neg(a) => -direct(a, x),
            T::Bin(op, a, b) => {
                let (p, q) = (direct(a, x), direct(b, x));
                match op {
                    '+' => p + q,
                    '-' => p - q,
                    '*' => p * q,
                    '/' => p / q,
                    _ => p.powf(q),
                }
            }
            T::F1(name, a) => {
                let v = direct(a, x);
                match *name {
                    "sin" => v.sin(),
                    "cos" => v.cos(),
                    "tan" => v.tan(),
                    "exp" => v.exp(),
                    "ln" => v.ln(),
                    "sqrt" => v.sqrt(),
                    "abs" => v.abs(),
                    "cosh" => v.cosh(),
                    "sinh" => v.sinh(),
                    _ => v.tanh(),
                }
            }
            T::F2(name, a, b) => {
                let (p, q) = (direct(a, x), direct(b, x));
                if p.is_nan() || q.is_nan() {
                    f64::NAN
                } else if *name == "min" {
                    p.min(q)
                } else {
                    p.max(q)
                }
            }
        }
    }

    fn tree() -> impl Strategy<Value = T> {
        let leaf = prop_oneof![(0.0f64..10.0).prop_map(T::Num), Just(T::X)];
        leaf.prop_recursive(6, 48, 2, |inner| {
            let ops = vec!['+', '-', '*', '/', '^'];
            let funcs = vec![
                "sin", "cos", "tan", "exp", "ln", "sqrt", "abs", "cosh", "sinh", "tanh",
            ];
            prop_oneof![
                inner.clone().prop_map(|a| T::Neg(Box::new(a))),
                (prop::sample::select(ops), inner.clone(), inner.clone())
                    .prop_map(|(op, a, b)| T::Bin(op, Box::new(a), Box::new(b))),
                (prop::sample::select(funcs), inner.clone())
                    .prop_map(|(f, a)| T::F1(f, Box::new(a))),
                (
                    prop::sample::select(vec!["min", "max"]),
                    inner.clone(),
                    inner
                )
                    .prop_map(|(f, a, b)| T::F2(f, Box::new(a), Box::new(b))),
            ]
        })
    }

    proptest! {
        #[test]
        fn random_ascii_never_panics(src in "[ -~]{0,40}") {
            match Formula::parse(&src, &no_constants()) {
                Ok(f) => {
                    let _ = f.eval(0.5);
                }
                Err(e) => prop_assert!(e.offset() <= src.chars().count()),
            }
        }

        #[test]
        fn random_token_soup_never_panics(
            parts in prop::collection::vec(
                prop::sample::select(vec![
                    "x", "2", ".5", "1e3", "pi", "a", "sin", "min", "(", ")", ",", "+", "-",
                    "*", "/", "^", " ", "e", "1.", "sn",
                ]),
                0..30,
            )
        ) {
            let src: String = parts.concat();
            let mut c = BTreeMap::new();
            c.insert("a".to_string(), 2.0);
            match Formula::parse(&src, &c) {
                Ok(f) => {
                    let _ = f.eval(-1.25);
                }
                Err(e) => prop_assert!(e.offset() <= src.chars().count()),
            }
        }

        #[test]
        fn printed_tree_round_trips(t in tree(), x in -5.0f64..5.0) {
            let src = print(&t);
            let parsed = Formula::parse(&src, &no_constants());
            prop_assert!(parsed.is_ok(), "`{}` failed: {:?}", src, parsed);
            let got = parsed.map(|f| f.eval(x)).unwrap_or(f64::NAN);
            let want = direct(&t, x);
            // Folding and evaluation do the same operations in the same
            // order, so the results are bit-identical.
            prop_assert!(
                got == want || (got.is_nan() && want.is_nan()),
                "`{}` at x = {}: got {}, want {}", src, x, got, want
            );
        }
    }
}
