//! Faults the TOML reader and serde find (syntax, unknown keys, values of
//! the wrong type), turned into located [`InputError`]s in plain words.
//!
//! The reader's own wording names Rust types (`expected i64`, `expected
//! struct RawDomain`); [`plain_message`] says the same in the words of the
//! input file (`expected a whole number`, `expected a table`). A fault the
//! reader reports without a place (a dotted key nested past its recursion
//! limit) is located here by reading the text.

use super::error::{self, InputError, Location, SourceText};
use super::overrides::Override;

/// The deepest nesting of dotted keys the TOML reader accepts: it stops at
/// 80 levels (the `toml` crate's recursion limit, read from its source).
pub const READER_DEPTH_LIMIT: usize = 80;

/// The located error for a fault of the TOML reader or of serde in
/// `source` (its text and the overrides applied to it).
pub fn toml_error(source: &SourceText, overrides: &[Override], e: &toml::de::Error) -> InputError {
    let raw = e.message().trim();
    let span = e.span();
    if span.is_none() && raw.contains("recursion limit") {
        return too_deep(source);
    }
    let location = source.locate(span.clone());
    let message = plain_message(raw);
    let mut key = span
        .map(|s| key_at(source, s.start, overrides))
        .unwrap_or_default();
    // A missing key has no span of its own: the error points at its table,
    // so name the key inside it.
    if let Some(field) = raw
        .strip_prefix("missing field `")
        .and_then(|m| m.split('`').next())
    {
        key = if key.is_empty() {
            field.to_string()
        } else {
            format!("{key}.{field}")
        };
    }
    InputError::new(location, key, message)
}

/// serde's and the TOML reader's wording, with Rust's type names replaced
/// by the input file's words: `i64` is a whole number, `f64` a number, a
/// struct or map a table, a sequence a list.
pub fn plain_message(message: &str) -> String {
    // An integer beyond i64 reaches serde as an i128.
    if let Some(n) = message
        .strip_prefix("invalid type: integer `")
        .and_then(|m| m.strip_suffix("` as i128, expected i64"))
    {
        return format!(
            "the whole number `{n}` is too large (the largest is {})",
            i64::MAX
        );
    }
    let mut out = message.to_string();
    for (from, to) in [
        ("expected i64", "expected a whole number"),
        ("expected f64", "expected a number"),
        ("expected a sequence", "expected a list"),
        ("expected a map", "expected a table"),
        ("invalid type: sequence", "invalid type: a list"),
        ("invalid type: map", "invalid type: a table"),
        ("invalid type: floating point", "invalid type: the number"),
        ("invalid type: integer", "invalid type: the whole number"),
    ] {
        out = out.replace(from, to);
    }
    // `expected struct RawDomain` and the like name the mirror's types, all
    // of which are tables of the input.
    while let Some(at) = out.find("expected struct ") {
        let name = at + "expected struct ".len();
        let end = out[name..]
            .find(|c: char| !(c.is_alphanumeric() || c == '_'))
            .map_or(out.len(), |e| name + e);
        out.replace_range(at..end, "expected a table");
    }
    out
}

/// The error for a dotted key nested past the reader's limit, located at
/// the line holding the most deeply dotted key (the reader gives no place).
fn too_deep(source: &SourceText) -> InputError {
    let text = &source.text;
    let mut best: Option<(usize, usize)> = None; // (dots, byte offset)
    let mut line_start = 0;
    for line in text.split_inclusive('\n') {
        if let Some((dots, at)) = deepest_key(line) {
            if best.is_none_or(|(d, _)| dots > d) {
                best = Some((dots, line_start + at));
            }
        }
        line_start += line.len();
    }
    let (location, parts) = match best {
        Some((dots, offset)) => (error::locate_in(&source.name, text, offset), dots + 1),
        None => (
            Location {
                file: source.name.clone(),
                line: 0,
                column: 0,
                line_text: None,
            },
            READER_DEPTH_LIMIT,
        ),
    };
    let mut e = InputError::new(
        location,
        "",
        format!(
            "a dotted key of {parts} parts is nested too deeply to read (the reader stops at {READER_DEPTH_LIMIT} levels); chainwell's keys have at most 4 parts, such as term.1.constants.a"
        ),
    );
    // The quoted line would be hundreds of characters of `a.a.a`: keep its
    // start only.
    if let Some(t) = &mut e.location.line_text {
        if t.chars().count() > 80 {
            *t = t.chars().take(77).chain("...".chars()).collect();
        }
    }
    e
}

/// The most dots in one run of key characters on `line` (outside quotes,
/// best effort), with the byte offset where that run starts; `None` when
/// the line has no dotted key.
fn deepest_key(line: &str) -> Option<(usize, usize)> {
    let mut best: Option<(usize, usize)> = None;
    let mut run_start = 0;
    let mut dots = 0;
    for (i, c) in line.char_indices() {
        let key_char =
            c.is_alphanumeric() || matches!(c, '.' | '_' | '-' | ' ' | '\t' | '"' | '\'');
        if !key_char {
            if dots > 0 && best.is_none_or(|(d, _)| dots > d) {
                best = Some((dots, run_start));
            }
            dots = 0;
            run_start = i + c.len_utf8();
        } else if c == '.' {
            dots += 1;
        }
    }
    if dots > 0 && best.is_none_or(|(d, _)| dots > d) {
        best = Some((dots, run_start));
    }
    // Skip the blanks that lead the run.
    best.map(|(d, s)| {
        let lead = line[s..].len() - line[s..].trim_start().len();
        (d, s + lead)
    })
}

/// The dotted key written at byte `offset`: the `[section]` above it and the
/// `name =` on its line (best effort, for messages about TOML-level faults).
pub fn key_at(source: &SourceText, offset: usize, overrides: &[Override]) -> String {
    if offset >= error::OVERRIDE_BASE {
        return overrides
            .get(offset - error::OVERRIDE_BASE)
            .map(|o| o.key.clone())
            .unwrap_or_default();
    }
    let text = &source.text;
    let offset = offset.min(text.len());
    let head = text.get(..offset).unwrap_or("");
    let line_start = head.rfind('\n').map_or(0, |i| i + 1);
    let line = text[line_start..].lines().next().unwrap_or("");
    let name = line.split_once('=').map(|(k, _)| k.trim().to_string());
    // The section header on this line (an error at a table points at its
    // header), else the nearest one above.
    let section = std::iter::once(line)
        .filter(|l| l.trim_start().starts_with('['))
        .chain(head[..line_start].lines().rev())
        .map(str::trim)
        .find(|l| l.starts_with('['))
        .and_then(|l| l.trim_start_matches('[').split(']').next())
        .map(|l| l.trim().to_string());
    match (section, name) {
        (Some(s), Some(n)) if !line.trim_start().starts_with('[') => format!("{s}.{n}"),
        (Some(s), _) => s,
        (None, Some(n)) => n,
        (None, None) => String::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rust_type_names_become_plain_words() {
        assert_eq!(
            plain_message("invalid type: floating point `4.5`, expected i64"),
            "invalid type: the number `4.5`, expected a whole number"
        );
        assert_eq!(
            plain_message("invalid type: string \"x\", expected f64"),
            "invalid type: string \"x\", expected a number"
        );
        assert_eq!(
            plain_message("invalid type: integer `3`, expected struct RawDomain"),
            "invalid type: the whole number `3`, expected a table"
        );
        assert_eq!(
            plain_message("invalid type: sequence, expected struct RawGrid or x"),
            "invalid type: a list, expected a table or x"
        );
        assert_eq!(
            plain_message("invalid type: integer `99999999999999999999` as i128, expected i64"),
            "the whole number `99999999999999999999` is too large (the largest is 9223372036854775807)"
        );
        assert_eq!(plain_message("unknown field `x`"), "unknown field `x`");
    }

    #[test]
    fn the_most_deeply_dotted_key_is_found() {
        assert_eq!(deepest_key("x = 1.5\n"), Some((1, 4)));
        assert_eq!(deepest_key("[a.b.c]\n"), Some((2, 1)));
        assert_eq!(deepest_key("  p.q = 1\n"), Some((1, 2)));
        assert_eq!(deepest_key("[grid]\n"), None);
    }
}
