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
//! Nesting (parentheses, unary signs, function calls, the exponent of `^`)
//! is limited to [`MAX_DEPTH`] levels, so that no input can exhaust the
//! stack; the length of a flat sum or product is not limited.
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

//!
//! # Corners
//!
//! `abs`, `min` and `max` make corners: `V` is continuous there but its
//! slope jumps, which costs finite differences their order.
//! [`Formula::kinks`] finds them on an interval; its docs give the method
//! and what it can miss.
//!
//! # Files
//!
//! `lex` (tokens, numbers), `parse` (the Pratt parser and its tree), `fold`
//! (constant folding, postfix code, corner sites), `eval` (functions,
//! operators and the postfix program), `kinks` (sign changes of the corner
//! sites), `error` (errors and name suggestions).

use std::collections::BTreeMap;

mod error;
mod eval;
mod fold;
mod kinks;
mod lex;
mod parse;
#[cfg(test)]
mod tests;

pub use error::{FormulaError, FormulaErrorKind};
pub use kinks::{BRACKET_TOLERANCE, KINK_SAMPLES};

use eval::{Op, Program};

/// Greatest nesting depth accepted: parentheses, unary signs, function
/// calls and exponents of `^` enclosing any point of the expression. Deeper
/// input is reported as [`FormulaErrorKind::TooDeep`] instead of exhausting
/// the stack. The length of a flat sum or product is not limited.
pub const MAX_DEPTH: usize = 256;

/// A compiled potential expression `V(x)`.
///
/// Built once by [`Formula::parse`]; [`Formula::eval`] then costs a short
/// loop over a flat postfix program with no allocation (for programs whose
/// value stack fits in 32 entries, which is all but pathological ones).
/// `Formula` is `Send + Sync` and can be evaluated from many threads.
#[derive(Debug, Clone, PartialEq)]
pub struct Formula {
    program: Program,
    uses_x: bool,
    /// Arguments whose sign changes are corners (see [`Formula::kinks`]).
    corners: Vec<Program>,
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
            if parse::is_reserved(name) {
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
        let toks = lex::tokenize(&chars)?;
        let folded = fold::fold(parse::parse_tokens(toks, constants)?);
        let mut ops = Vec::new();
        fold::emit(&folded, &mut ops);
        let uses_x = ops.contains(&Op::X);
        Ok(Formula {
            program: Program::new(ops),
            uses_x,
            corners: fold::corner_sites(&folded),
        })
    }

    /// Evaluates `V(x)` with IEEE 754 semantics: the result may be infinite
    /// or NaN (division by zero, `ln` of a negative number...); the caller
    /// checks finiteness and reports the offending `x`.
    pub fn eval(&self, x: f64) -> f64 {
        self.program.eval(x)
    }

    /// Whether `x` appears in the compiled expression; false for a constant
    /// potential such as `2 * a`, which folds to a single number. (Folding
    /// does not simplify algebraically, so `0 * x` still uses `x`.)
    pub fn uses_x(&self) -> bool {
        self.uses_x
    }

    /// The corners of the formula strictly inside `(from, to)` (same units
    /// as `x`), sorted, each once: the points where the argument `g` of an
    /// `abs(g)`, or `a - b` of a `min(a, b)` or `max(a, b)`, changes sign.
    /// There `V` is continuous but its slope generally jumps. Nested calls
    /// all count (`abs(x - 1) + min(x, 2 * x)` has corners at 0 and 1).
    ///
    /// A zero of the argument without a sign change is no corner (`abs((x -
    /// 1)^2)` is smooth), nor is a sign change through a pole (`abs(1 / x)`).
    /// A sign change at which the slopes happen to agree (`max(x^3, 0)`) is
    /// listed all the same: only a higher derivative jumps there.
    ///
    /// Found by sampling each argument at [`KINK_SAMPLES`]` + 1` equally
    /// spaced points and bisecting every sign change to about 1e-15 of
    /// `max(|from|, |to|)`. Two corners of one argument closer together than
    /// `(to - from) / KINK_SAMPLES` can be missed, and so can sign changes
    /// beside points where the argument is NaN. Empty unless `from < to`,
    /// both finite. Costs `KINK_SAMPLES + 1` evaluations of each argument
    /// and about 40 more per corner found.
    ///
    /// ```
    /// use std::collections::BTreeMap;
    /// use chainwell::potential::formula::Formula;
    /// let f = Formula::parse("2 * abs(x - 0.5) + max(x, 1)", &BTreeMap::new()).unwrap();
    /// let k = f.kinks(-20.0, 20.0);
    /// assert_eq!(k.len(), 2);
    /// assert!((k[0] - 0.5).abs() < 1e-13 && (k[1] - 1.0).abs() < 1e-13);
    /// ```
    pub fn kinks(&self, from: f64, to: f64) -> Vec<f64> {
        kinks::corners(&self.corners, from, to)
    }
}
