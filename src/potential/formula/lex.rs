//! Splitting the source text into tokens, and reading numbers.
//!
//! Offsets are 0-based character (not byte) columns, so that a caret under
//! the source lines up for any UTF-8 text.

use super::error::{FormulaError, FormulaErrorKind};

/// A lexical token.
#[derive(Debug, Clone, PartialEq)]
pub(super) enum Tok {
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
pub(super) struct Token {
    pub(super) tok: Tok,
    pub(super) at: usize,
    pub(super) text: String,
}

fn is_name_start(c: char) -> bool {
    c.is_alphabetic() || c == '_'
}

fn is_name_char(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// Splits the source into tokens; the last token is always `End`.
pub(super) fn tokenize(chars: &[char]) -> Result<Vec<Token>, FormulaError> {
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

#[cfg(test)]
mod tests {
    use super::*;

    fn toks(src: &str) -> Vec<Tok> {
        let chars: Vec<char> = src.chars().collect();
        match tokenize(&chars) {
            Ok(t) => t.into_iter().map(|t| t.tok).collect(),
            Err(e) => panic!("`{src}` failed to tokenize: {e}"),
        }
    }

    #[test]
    fn tokens_and_offsets() {
        assert_eq!(
            toks("2*x^-.5"),
            vec![
                Tok::Num(2.0),
                Tok::Star,
                Tok::Name("x".into()),
                Tok::Caret,
                Tok::Minus,
                Tok::Num(0.5),
                Tok::End
            ]
        );
        let chars: Vec<char> = "αβ + 1e3".chars().collect();
        let t = tokenize(&chars).unwrap_or_default();
        let at: Vec<usize> = t.iter().map(|t| t.at).collect();
        // Character columns: "αβ" is one name of two characters.
        assert_eq!(at, vec![0, 3, 5, 8]);
        assert_eq!(t[2].text, "1e3");
    }

    #[test]
    fn a_number_stops_before_a_name() {
        // `2e` is not an exponent without digits: `2ex` is malformed.
        let chars: Vec<char> = "2ex".chars().collect();
        let e = tokenize(&chars).map(|_| ()).unwrap_err();
        assert_eq!(
            e.kind(),
            &FormulaErrorKind::BadNumber { text: "2ex".into() }
        );
    }
}
