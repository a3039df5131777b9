//! Reading an input file: TOML text to the checked [`Model`].
//!
//! Two stages, as in the house style: [`raw`] mirrors the TOML with the span
//! of every value; [`check`] validates it and converts it to the typed
//! [`model`]. Overrides (`--set KEY=VALUE`, [`overrides`]) are applied to the
//! parsed tree in between, so they are checked like values in the file.
//! A [`Document`] reads and parses an input once and checks it as often as
//! a study needs, with the table files it names read once ([`tables`]);
//! [`load`] and [`load_str`] check one model of a fresh document. Faults of
//! the TOML reader itself are put in plain words by [`syntax`].

pub mod check;
pub mod document;
pub mod error;
pub mod model;
pub mod overrides;
pub mod raw;
pub mod syntax;
pub mod tables;

use std::path::Path;

pub use document::Document;
pub use error::{escape_control, InputError, Location, SourceText};
pub use model::Model;
pub use overrides::Override;

/// Reads, overrides and checks the input file at `path`.
pub fn load(path: &Path, overrides: &[Override]) -> Result<(Model, SourceText), InputError> {
    Document::open(path)?.model(overrides)
}

/// Overrides and checks an input given as text; table files are looked up
/// relative to `base_dir`.
pub fn load_str(
    name: &str,
    text: String,
    base_dir: &Path,
    overrides: &[Override],
) -> Result<(Model, SourceText), InputError> {
    Document::from_text(name, text, base_dir)?.model(overrides)
}

/// Parses the text and applies the overrides, giving the raw mirror
/// (unchecked). Table files are not read at this stage.
pub fn parse_raw(source: &SourceText, overrides: &[Override]) -> Result<raw::RawInput, InputError> {
    let doc = Document::from_text(&source.name, source.text.clone(), Path::new("."))?;
    doc.raw(source, overrides)
}
