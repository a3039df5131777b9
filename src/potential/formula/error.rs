//! Errors of the formula compiler and the "did you mean" suggestions for
//! unknown names.

use std::collections::BTreeMap;

use super::eval::{Func1, Func2};

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
    /// Parentheses, signs, function calls or powers (`a^b^c` nests to the
    /// right) nested more than [`MAX_DEPTH`](super::MAX_DEPTH) deep; the offset points at the
    /// first construct beyond the limit. Long flat sums and products are
    /// not nested and have no limit.
    #[error("the expression is nested more than {limit} levels deep")]
    TooDeep {
        /// The limit, [`MAX_DEPTH`](super::MAX_DEPTH).
        limit: usize,
    },
}

/// An error found while compiling a [`Formula`](super::Formula).
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
    pub(super) fn new(offset: usize, kind: FormulaErrorKind) -> Self {
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
pub(super) fn suggest(name: &str, constants: &BTreeMap<String, f64>) -> Option<String> {
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

#[cfg(test)]
mod tests {
    use super::*;

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
}
