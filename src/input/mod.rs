//! Reading an input file: TOML text to the checked [`Model`].
//!
//! Two stages, as in the house style: [`raw`] mirrors the TOML with the span
//! of every value; [`check`] validates it and converts it to the typed
//! [`model`]. Overrides (`--set KEY=VALUE`, [`overrides`]) are applied to the
//! parsed tree in between, so they are checked like values in the file.

pub mod check;
pub mod error;
pub mod model;
pub mod overrides;
pub mod raw;

use std::path::Path;

use serde::Deserialize;
use toml::de::DeTable;
use toml::Spanned;

pub use error::{InputError, Location, SourceText};
pub use model::Model;
pub use overrides::Override;

/// Reads, overrides and checks the input file at `path`.
pub fn load(path: &Path, overrides: &[Override]) -> Result<(Model, SourceText), InputError> {
    let name = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| {
        let location = Location {
            file: name.clone(),
            line: 0,
            column: 0,
            line_text: None,
        };
        InputError::new(location, "", format!("cannot read the input file: {e}"))
    })?;
    let text = String::from_utf8(bytes).map_err(|e| {
        // Point at the first bad byte: the text before it is valid UTF-8.
        let valid = e.utf8_error().valid_up_to();
        let head = String::from_utf8_lossy(&e.as_bytes()[..valid]);
        let mut location = error::locate_in(&name, &head, valid);
        location.line_text = None;
        InputError::new(
            location,
            "",
            format!("the input file is not UTF-8 text (bad byte at offset {valid})"),
        )
    })?;
    let base = path.parent().unwrap_or_else(|| Path::new("."));
    load_str(&name, text, base, overrides)
}

/// Overrides and checks an input given as text; table files are looked up
/// relative to `base_dir`.
pub fn load_str(
    name: &str,
    text: String,
    base_dir: &Path,
    overrides: &[Override],
) -> Result<(Model, SourceText), InputError> {
    let source = SourceText {
        name: name.to_string(),
        text,
        overrides: overrides.iter().map(Override::text).collect(),
    };
    let raw = parse_raw(&source, overrides)?;
    let model = check::Checker::new(&source, base_dir).check(raw)?;
    Ok((model, source))
}

/// Parses the text and applies the overrides, giving the raw mirror.
pub fn parse_raw(source: &SourceText, overrides: &[Override]) -> Result<raw::RawInput, InputError> {
    let toml_error = |e: toml::de::Error| {
        let span = e.span();
        let location = source.locate(span.clone());
        let message = e.message().trim().to_string();
        let mut key = span
            .map(|s| key_at(source, s.start, overrides))
            .unwrap_or_default();
        // A missing key has no span of its own: the error points at its
        // table, so name the key inside it.
        if let Some(field) = message
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
    };
    let root = DeTable::parse(&source.text).map_err(toml_error)?;
    let root_span = root.span();
    let mut table = root.into_inner();
    for (i, ov) in overrides.iter().enumerate() {
        let value = overrides::parse_value(&ov.value);
        overrides::apply(&mut table, ov, value, i).map_err(|m| {
            InputError::new(
                source.locate(Some(error::OVERRIDE_BASE + i..error::OVERRIDE_BASE + i + 1)),
                ov.key.clone(),
                m,
            )
        })?;
    }
    let de = toml::de::Deserializer::from(Spanned::new(root_span, table));
    raw::RawInput::deserialize(de).map_err(toml_error)
}

/// The dotted key written at byte `offset`: the `[section]` above it and the
/// `name =` on its line (best effort, for messages about TOML-level faults).
fn key_at(source: &SourceText, offset: usize, overrides: &[Override]) -> String {
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
