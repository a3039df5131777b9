//! Errors in an input, located at a file, line and column.
//!
//! Every fault in an input file, in a `--set` override or in a file the input
//! refers to (a potential table) becomes an [`InputError`] that names where
//! it is, the key at fault and what is wrong, and quotes the offending line.

use std::fmt;
use std::ops::Range;

/// Spans at or above this offset belong to the `--set` overrides, not to the
/// file: override `i` has span `OVERRIDE_BASE + i`.
pub const OVERRIDE_BASE: usize = 1 << 40;

/// Where a value came from, resolved to text coordinates.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct Location {
    /// The file (as the user named it), or `--set KEY=VALUE`.
    pub file: String,
    /// 1-based line (0 when unknown or from the command line).
    pub line: usize,
    /// 1-based column in characters (0 when unknown).
    pub column: usize,
    /// The full text of that line, for the error display.
    #[serde(skip)]
    pub line_text: Option<String>,
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let file = escape_control(&self.file);
        if self.line == 0 {
            write!(f, "{file}")
        } else {
            write!(f, "{file}:{}:{}", self.line, self.column)
        }
    }
}

/// `text` with every control character but the tab (ESC, BEL, NUL, carriage
/// return, newline, ...) written as a visible escape: `\n`, `\r`, and
/// `\u{1b}` for the others. Text from an input (a title, a key, a quoted
/// line, a file name) goes through this before it reaches a terminal, so
/// that it cannot move the cursor, recolour the screen or hide the message.
pub fn escape_control(text: &str) -> std::borrow::Cow<'_, str> {
    if !text.chars().any(is_escaped) {
        return std::borrow::Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len() + 8);
    for c in text.chars() {
        match c {
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            c if is_escaped(c) => out.push_str(&format!("\\u{{{:x}}}", c as u32)),
            c => out.push(c),
        }
    }
    std::borrow::Cow::Owned(out)
}

/// Control characters that [`escape_control`] rewrites: all but the tab,
/// which only moves to the next column and is common as indentation.
fn is_escaped(c: char) -> bool {
    c.is_control() && c != '\t'
}

/// An input file's text, its name, and the overrides applied to it: what is
/// needed to turn a byte span into a [`Location`].
#[derive(Debug, Clone)]
pub struct SourceText {
    /// The file name as the user gave it.
    pub name: String,
    /// The file's contents.
    pub text: String,
    /// The `--set` overrides, as `KEY=VALUE` strings, in order.
    pub overrides: Vec<String>,
}

impl SourceText {
    /// Resolves a byte span of the text (or an override marker) to a location.
    pub fn locate(&self, span: Option<Range<usize>>) -> Location {
        let Some(span) = span else {
            return Location {
                file: self.name.clone(),
                line: 0,
                column: 0,
                line_text: None,
            };
        };
        if span.start >= OVERRIDE_BASE {
            let i = span.start - OVERRIDE_BASE;
            let text = self.overrides.get(i).map(String::as_str).unwrap_or("?");
            return Location {
                file: format!("--set {text}"),
                line: 0,
                column: 0,
                line_text: None,
            };
        }
        locate_in(&self.name, &self.text, span.start)
    }
}

/// Line and column (1-based, columns in characters) of byte `offset` in `text`.
pub fn locate_in(name: &str, text: &str, offset: usize) -> Location {
    let offset = offset.min(text.len());
    let before = &text[..floor_char_boundary(text, offset)];
    let line = before.matches('\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    let column = before[line_start..].chars().count() + 1;
    let line_text = text[line_start..].lines().next().unwrap_or("").to_string();
    Location {
        file: name.to_string(),
        line,
        column,
        line_text: Some(line_text),
    }
}

fn floor_char_boundary(s: &str, mut i: usize) -> usize {
    while i > 0 && !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

/// A fault in the input: where, which key, what. Displayed with control
/// characters escaped ([`escape_control`]).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{location}: {}{}", key_prefix(.key), escape_control(.message))]
pub struct InputError {
    /// Where the fault is.
    pub location: Location,
    /// The dotted key at fault (`grid.points`, `term[2].height`), empty when
    /// the fault is not tied to one key (a TOML syntax error).
    pub key: String,
    /// What is wrong, naming the bad value.
    pub message: String,
}

fn key_prefix(key: &str) -> String {
    if key.is_empty() {
        String::new()
    } else {
        format!("`{}`: ", escape_control(key))
    }
}

impl InputError {
    /// An error at `location` for `key`.
    pub fn new(location: Location, key: impl Into<String>, message: impl Into<String>) -> Self {
        Self {
            location,
            key: key.into(),
            message: message.into(),
        }
    }

    /// The error as the command line prints it: the message, then the
    /// offending line with a caret under the column.
    pub fn render(&self) -> String {
        let mut out = format!("error: {self}");
        if let Some(raw) = &self.location.line_text {
            let num = self.location.line.to_string();
            let pad = " ".repeat(num.len());
            // The caret goes under the column's character as displayed:
            // escapes widen what comes before it.
            let before: String = raw
                .chars()
                .take(self.location.column.saturating_sub(1))
                .collect();
            let caret_pad: String = escape_control(&before)
                .chars()
                .map(|c| if c == '\t' { '\t' } else { ' ' })
                .collect();
            let text = escape_control(raw);
            out.push_str(&format!(
                "\n {pad} |\n {num} | {text}\n {pad} | {caret_pad}^"
            ));
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn locate_counts_lines_and_characters() {
        let text = "a = 1\nbé = 2\n  c = x\n";
        let at = text.find('x').unwrap();
        let loc = locate_in("f.toml", text, at);
        assert_eq!((loc.line, loc.column), (3, 7));
        let at = text.find('2').unwrap();
        let loc = locate_in("f.toml", text, at);
        // 'é' is two bytes but one column.
        assert_eq!((loc.line, loc.column), (2, 6));
        assert_eq!(loc.line_text.as_deref(), Some("bé = 2"));
    }

    #[test]
    fn control_characters_are_escaped_in_messages() {
        assert_eq!(escape_control("plain é"), "plain é");
        assert_eq!(
            escape_control("a\u{1b}[31mb\u{7}\t\n\r\0"),
            "a\\u{1b}[31mb\\u{7}\t\\n\\r\\u{0}"
        );
        let src = SourceText {
            name: "in\u{1b}.toml".into(),
            text: "title = 3\u{1b}x\n".into(),
            overrides: vec![],
        };
        let e = InputError::new(src.locate(Some(10..11)), "ti\u{7}tle", "bad \u{1b}[2J");
        let r = e.render();
        assert!(!r.chars().any(|c| is_escaped(c) && c != '\n'), "{r:?}");
        assert!(
            r.starts_with("error: in\\u{1b}.toml:1:11: `ti\\u{7}tle`: bad \\u{1b}[2J"),
            "{r}"
        );
        // The caret stands under the `x`, after the widened escape.
        let lines: Vec<&str> = r.lines().collect();
        let quoted = lines[2].find('x').unwrap();
        assert_eq!(lines[3].find('^'), Some(quoted), "{r}");
    }

    #[test]
    fn rendered_error_names_file_line_column_and_key() {
        let src = SourceText {
            name: "in.toml".into(),
            text: "[grid]\npoints = -3\n".into(),
            overrides: vec![],
        };
        let e = InputError::new(src.locate(Some(16..18)), "grid.points", "must be positive");
        let r = e.render();
        assert!(
            r.starts_with("error: in.toml:2:10: `grid.points`: must be positive"),
            "{r}"
        );
        assert!(r.contains("points = -3"));
        let o = SourceText {
            overrides: vec!["grid.points=0".into()],
            ..src
        };
        let e = InputError::new(
            o.locate(Some(OVERRIDE_BASE..OVERRIDE_BASE + 1)),
            "grid.points",
            "bad",
        );
        assert!(e.to_string().starts_with("--set grid.points=0: "), "{e}");
    }
}
