//! An input read once, checked as often as a study needs.
//!
//! A [`Document`] holds an input's text, known to be TOML, and the table
//! files its terms read ([`TableCache`]). [`Document::model`] applies a set
//! of `--set` overrides to a fresh tree of that text and checks it, exactly
//! as [`load`](super::load) does (same messages, same locations), without
//! reading any file again: a sweep's cases, a fit's evaluations and a band
//! study's finite chains each cost one check, not one read of the input and
//! its tables. A document is `Send + Sync`, so cases can be checked in
//! parallel.
//!
//! The tree itself is not kept between models: the TOML reader's tree
//! borrows the text it was read from, so a document that kept both would
//! refer to itself. Reading the held text again (with the overrides and
//! serde's pass, `Document::raw`) costs tens of microseconds, about two
//! thirds of a model's check for a small input and nothing beside a solve;
//! `benches/input.rs` measures it beside a fresh `load`.

use std::path::{Path, PathBuf};

use serde::Deserialize;
use toml::de::{DeTable, DeValue};
use toml::Spanned;

use super::check::Checker;
use super::error::{self, InputError, Location, SourceText};
use super::model::Model;
use super::overrides::{self, Override};
use super::raw::RawInput;
use super::syntax;
use super::tables::TableCache;

/// An input file's text, parsed once; see the [module docs](self).
#[derive(Debug)]
pub struct Document {
    name: String,
    text: String,
    base_dir: PathBuf,
    tables: TableCache,
}

impl Document {
    /// Reads and parses the input file at `path`; table files are looked up
    /// relative to its folder. Errors: the file cannot be read, is not
    /// UTF-8, or is not TOML (located at the fault).
    pub fn open(path: &Path) -> Result<Self, InputError> {
        let name = path.display().to_string();
        let bytes = crate::files::read_capped(path).map_err(|e| {
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
        Self::from_text(&name, text, base)
    }

    /// Parses an input given as text, named `name` in messages; table files
    /// are looked up relative to `base_dir`. Errors: the text is not TOML.
    pub fn from_text(name: &str, text: String, base_dir: &Path) -> Result<Self, InputError> {
        let doc = Self {
            name: name.to_string(),
            text,
            base_dir: base_dir.to_path_buf(),
            tables: TableCache::new(),
        };
        // A syntax error is the document's, found once, here.
        doc.tree()?;
        Ok(doc)
    }

    /// The parsed tree of the text (without overrides).
    fn tree(&self) -> Result<Spanned<DeTable<'_>>, InputError> {
        DeTable::parse(&self.text).map_err(|e| syntax::toml_error(&self.source(&[]), &[], &e))
    }

    /// The input's name, as messages give it.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The input's text.
    pub fn text(&self) -> &str {
        &self.text
    }

    /// The folder table files are looked up in.
    pub fn base_dir(&self) -> &Path {
        &self.base_dir
    }

    /// The tables read so far; [`TableCache::reads`] counts the reads.
    pub fn tables(&self) -> &TableCache {
        &self.tables
    }

    /// The text and the overrides, for locating faults.
    pub fn source(&self, overrides: &[Override]) -> SourceText {
        SourceText {
            name: self.name.clone(),
            text: self.text.clone(),
            overrides: overrides.iter().map(Override::text).collect(),
        }
    }

    /// The checked model of the input with `overrides` applied (in order,
    /// each checked like a value in the file), and the source to locate
    /// later faults in. Table files are read on their first use only.
    pub fn model(&self, overrides: &[Override]) -> Result<(Model, SourceText), InputError> {
        let source = self.source(overrides);
        let raw = self.raw(&source, overrides)?;
        let model = Checker::new(&source, &self.base_dir, &self.tables).check(raw)?;
        Ok((model, source))
    }

    /// The raw mirror of the input with `overrides` applied, not yet
    /// checked.
    pub fn raw(&self, source: &SourceText, overrides: &[Override]) -> Result<RawInput, InputError> {
        let tree = self.with_overrides(source, overrides)?;
        let de = toml::de::Deserializer::from(tree);
        RawInput::deserialize(de).map_err(|e| syntax::toml_error(source, overrides, &e))
    }

    /// The current value of the dotted key `key` (lists counted from 1:
    /// `term.2.height`, `chain.site.1.height`) once `overrides` are applied,
    /// as written (in the input's units), or `None` when the input gives no
    /// value there (a default applies, or the path names nothing). The key
    /// is followed by the same walker as `--set`. Errors: an override that
    /// cannot be applied.
    pub fn value(
        &self,
        key: &str,
        overrides: &[Override],
    ) -> Result<Option<toml::Value>, InputError> {
        let source = self.source(overrides);
        let mut tree = self.with_overrides(&source, overrides)?;
        let Some(found) = overrides::lookup(tree.get_mut(), key) else {
            return Ok(None);
        };
        let value = Spanned::new(0..0, found.clone());
        Ok(toml::Value::deserialize(toml::de::ValueDeserializer::from(value)).ok())
    }

    /// The tree with `overrides` applied, in order.
    fn with_overrides<'d>(
        &'d self,
        source: &SourceText,
        overrides: &'d [Override],
    ) -> Result<Spanned<DeTable<'d>>, InputError> {
        let mut tree = self.tree()?;
        for (i, ov) in overrides.iter().enumerate() {
            let value: DeValue<'d> = overrides::parse_value(&ov.value);
            overrides::apply(tree.get_mut(), ov, value, i).map_err(|m| {
                InputError::new(
                    source.locate(Some(error::OVERRIDE_BASE + i..error::OVERRIDE_BASE + i + 1)),
                    ov.key.clone(),
                    m,
                )
            })?;
        }
        Ok(tree)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ov(text: &str) -> Override {
        Override::parse(text).unwrap()
    }

    const TABLE_INPUT: &str = "[domain]\nfrom = 0.0\nto = 4.0\n[grid]\npoints = 40\n[[term]]\nshape = \"table\"\nfile = \"well.csv\"\n[[term]]\nshape = \"step\"\nfrom = 1.0\nto = 2.0\nheight = -0.5\n";

    #[test]
    fn a_table_file_is_read_once_for_many_models() {
        let dir = std::env::temp_dir().join(format!("chainwell-doc-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let input = dir.join("in.toml");
        std::fs::write(&input, TABLE_INPUT).unwrap();
        std::fs::write(dir.join("well.csv"), "x,V\n0,0\n2,-1\n4,0\n").unwrap();
        let doc = Document::open(&input).unwrap();
        let (first, _) = doc.model(&[]).unwrap();
        // Neither the input nor its table is read again.
        std::fs::remove_dir_all(&dir).unwrap();
        for k in 1..=5 {
            let height = format!("term.2.height=-{k}");
            let (model, source) = doc.model(&[ov(&height)]).unwrap();
            assert_eq!(model.potential.terms.len(), 2);
            assert_eq!(source.overrides, vec![height]);
            // The shared table gives the same V as the first model's.
            let x = 1.0;
            let table_part = |m: &Model| m.potential.terms[0].eval(x);
            assert_eq!(table_part(&model), table_part(&first));
            // The step's height follows the override: V(1.5) = table + height.
            let v = model.potential.eval(1.5);
            assert_eq!(v, first.potential.terms[0].eval(1.5) - k as f64);
        }
        assert_eq!(doc.tables().reads(), 1);
    }

    #[test]
    fn a_document_is_shared_between_threads() {
        fn send_sync<T: Send + Sync>() {}
        send_sync::<Document>();
        use rayon::prelude::*;
        let dir = std::env::temp_dir().join(format!("chainwell-par-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        std::fs::write(dir.join("well.csv"), "x,V\n0,0\n2,-1\n4,0\n").unwrap();
        let doc = Document::from_text("in.toml", TABLE_INPUT.into(), &dir).unwrap();
        let heights: Vec<f64> = (1..=16)
            .into_par_iter()
            .map(|k| {
                let (m, _) = doc.model(&[ov(&format!("term.2.height=-{k}"))]).unwrap();
                m.potential.eval(1.5) - m.potential.terms[0].eval(1.5)
            })
            .collect();
        std::fs::remove_dir_all(&dir).unwrap();
        let want: Vec<f64> = (1..=16).map(|k| -(k as f64)).collect();
        assert_eq!(heights, want);
        assert_eq!(doc.tables().reads(), 1);
    }

    #[test]
    fn models_of_a_document_match_load_str_and_its_messages() {
        let text = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 40\n";
        let doc = Document::from_text("t.toml", text.into(), Path::new(".")).unwrap();
        let sets = [ov("grid.points=-3")];
        let a = doc.model(&sets).unwrap_err();
        let b = super::super::load_str("t.toml", text.into(), Path::new("."), &sets).unwrap_err();
        assert_eq!(a, b);
        assert!(
            a.to_string()
                .starts_with("--set grid.points=-3: `grid.points`"),
            "{a}"
        );
        let (m, _) = doc.model(&[ov("levels.count=3")]).unwrap();
        assert_eq!(m.levels.count, 3);
        // The tree itself is untouched by overrides.
        let (m, _) = doc.model(&[]).unwrap();
        assert_eq!(m.levels.count, crate::input::model::DEFAULT_COUNT);
    }

    #[test]
    fn values_are_looked_up_by_dotted_keys_counted_from_one() {
        let text = "[chain]\nbonds = 6\n[[chain.site]]\natom = 2\nheight = -1.5\n[[term]]\nshape = \"gauss\"\ncenter = 1.0\nheight = 0.5\nwidth = 1.0\n[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 1.0\nheight = 2\n";
        let doc = Document::from_text("t.toml", text.into(), Path::new(".")).unwrap();
        let get = |key: &str, sets: &[Override]| doc.value(key, sets).unwrap();
        assert_eq!(get("chain.bonds", &[]), Some(toml::Value::Integer(6)));
        assert_eq!(
            get("chain.site.1.height", &[]),
            Some(toml::Value::Float(-1.5))
        );
        assert_eq!(get("term.2.height", &[]), Some(toml::Value::Integer(2)));
        assert_eq!(get("term.1.height", &[]), Some(toml::Value::Float(0.5)));
        // Overrides are applied first.
        let sets = [ov("term.2.height=-0.25"), ov("chain.alternation=0.4")];
        assert_eq!(get("term.2.height", &sets), Some(toml::Value::Float(-0.25)));
        assert_eq!(
            get("chain.alternation", &sets),
            Some(toml::Value::Float(0.4))
        );
        // Absent values and paths that name nothing.
        assert_eq!(get("chain.alternation", &[]), None);
        assert_eq!(get("term.3.height", &[]), None);
        assert_eq!(get("term.0.height", &[]), None);
        assert_eq!(get("grid.points", &[]), None);
        assert_eq!(get("chain.bonds.x", &[]), None);
        // A bad override is an error, located at its flag.
        let e = doc
            .value("chain.bonds", &[ov("term.9.height=1")])
            .unwrap_err();
        assert!(e.to_string().starts_with("--set term.9.height=1: "), "{e}");
    }
}
