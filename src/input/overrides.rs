//! `--set KEY=VALUE`: overriding one input value by its dotted path.
//!
//! Overrides are applied to the parsed TOML tree before it is deserialised,
//! so an override is checked exactly like a value written in the file. Keys
//! are dotted paths (`grid.points`, `chain.bonds`); an array of tables is
//! indexed from 1 (`term.2.height`, `chain.site.1.height`), as the user counts
//! them. A value is read as TOML (`3`, `1.5e-3`, `true`, `"text"`); anything
//! that is not a TOML value is taken as a bare string (`walls`). Each
//! overridden value carries the span marker [`OVERRIDE_BASE`]` + i`, so an
//! error in it is reported against the `--set` that wrote it. An override of
//! `grid.points`, `grid.spacing` or `grid.tolerance` replaces whichever of
//! the three the file gives.

use std::borrow::Cow;
use std::ops::Range;

use toml::de::{DeTable, DeValue};
use toml::Spanned;

use super::error::OVERRIDE_BASE;

/// The keys of `[grid]` of which an input gives at most one.
const RESOLUTION_KEYS: [&str; 3] = ["points", "spacing", "tolerance"];

/// One `KEY=VALUE` override.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Override {
    /// Dotted key.
    pub key: String,
    /// Value text.
    pub value: String,
}

impl Override {
    /// Splits `KEY=VALUE`.
    pub fn parse(text: &str) -> Result<Self, String> {
        let (key, value) = text
            .split_once('=')
            .ok_or_else(|| format!("`{text}` is not KEY=VALUE"))?;
        let key = key.trim();
        if key.is_empty() || key.split('.').any(str::is_empty) {
            return Err(format!("`{key}` is not a dotted key such as grid.points"));
        }
        Ok(Self {
            key: key.to_string(),
            value: value.trim().to_string(),
        })
    }

    /// The text as the user wrote it, for messages.
    pub fn text(&self) -> String {
        format!("{}={}", self.key, self.value)
    }
}

/// Applies override number `index`, whose value is already parsed (see
/// [`parse_value`]), to the document tree. Missing tables on the path are
/// created. Errors name the part of the path that cannot take a value (an
/// array index out of range, a value where a table is needed).
pub fn apply<'a>(
    root: &mut DeTable<'a>,
    ov: &Override,
    mut value: DeValue<'a>,
    index: usize,
) -> Result<(), String> {
    let marker = OVERRIDE_BASE + index;
    let span = marker..marker + 1;
    set_spans(&mut value, &span);
    let parts: Vec<&str> = ov.key.split('.').collect();
    let (table, i) = walk(root, &parts, Some(&span))?;
    if i >= parts.len() {
        return Err(format!("`{}` names a table entry, not a value", ov.key));
    }
    // The grid's resolution is one of three keys: overriding one replaces
    // whichever the file gives, as `--set grid.points=N` is meant to.
    if i == 1 && parts[0] == "grid" && RESOLUTION_KEYS.contains(&parts[1]) {
        for other in RESOLUTION_KEYS.iter().filter(|k| **k != parts[1]) {
            table.remove(*other);
        }
    }
    table.insert(
        Spanned::new(span.clone(), Cow::Owned(parts[i].to_string())),
        Spanned::new(span, value),
    );
    Ok(())
}

/// The value a dotted key names in the tree (lists counted from 1, as in
/// [`apply`]), or `None` when the tree has no such value.
pub fn lookup<'t, 'a>(root: &'t mut DeTable<'a>, key: &str) -> Option<&'t DeValue<'a>> {
    let parts: Vec<&str> = key.split('.').collect();
    let (table, i) = walk(root, &parts, None).ok()?;
    parts
        .get(i)
        .and_then(|name| table.get(*name))
        .map(Spanned::get_ref)
}

/// Follows the dotted key `parts` from `root` down to the table that holds
/// its last part; returns that table and the index of the part it holds
/// (`parts.len()` when the key ends on a list entry, which names a table,
/// not a value). A number after a list's name picks its entry, counted
/// from one. With `create`, missing tables on the path are created with
/// that span; without it, a missing table is an error. Errors name the part of the
/// path that cannot be followed.
fn walk<'t, 'a>(
    root: &'t mut DeTable<'a>,
    parts: &[&str],
    create: Option<&Range<usize>>,
) -> Result<(&'t mut DeTable<'a>, usize), String> {
    let mut table = root;
    let mut i = 0;
    while i + 1 < parts.len() {
        let name = parts[i];
        let next_is_index = parts[i + 1].parse::<usize>().ok();
        if !table.contains_key(name) {
            if next_is_index.is_some() {
                return Err(format!(
                    "`{}` has no entries to index; add them in the file",
                    parts[..=i].join(".")
                ));
            }
            let Some(span) = create else {
                return Err(format!("`{}` is not in the input", parts[..=i].join(".")));
            };
            table.insert(
                Spanned::new(span.clone(), Cow::Owned(name.to_string())),
                Spanned::new(span.clone(), DeValue::Table(DeTable::new())),
            );
        }
        let entry = table
            .get_mut(name)
            .ok_or_else(|| format!("cannot reach `{name}`"))?
            .get_mut();
        match (entry, next_is_index) {
            (DeValue::Array(items), Some(k)) => {
                let len = items.len();
                let item = k
                    .checked_sub(1)
                    .and_then(|j| items.get_mut(j))
                    .ok_or_else(|| {
                        format!(
                            "`{}` has {len} entries; `{}` is out of range (counted from 1)",
                            parts[..=i].join("."),
                            parts[i + 1]
                        )
                    })?;
                match item.get_mut() {
                    DeValue::Table(t) => table = t,
                    _ => return Err(format!("`{}` is not a table", parts[..=i + 1].join("."))),
                }
                i += 2;
            }
            (DeValue::Table(t), None) => {
                table = t;
                i += 1;
            }
            (DeValue::Array(_), None) => {
                return Err(format!(
                    "`{}` is a list; name an entry by its number, e.g. `{}.1.{}`",
                    parts[..=i].join("."),
                    parts[..=i].join("."),
                    parts[i + 1..].join(".")
                ))
            }
            (_, _) => {
                return Err(format!(
                    "`{}` is a value, not a table",
                    parts[..=i].join(".")
                ))
            }
        }
    }
    Ok((table, i))
}

/// Reads an override's value text as a TOML value, or as a bare string when
/// it is not one.
pub fn parse_value(text: &str) -> DeValue<'_> {
    match DeValue::parse(text) {
        Ok(v) => v.into_inner(),
        Err(_) => DeValue::String(Cow::Borrowed(text)),
    }
}

/// Gives every part of an override's value the override's span marker, so
/// that a fault anywhere inside it (an entry of an inline table, an item of
/// a list) is located at the `--set` that wrote it, not in the file.
fn set_spans(v: &mut DeValue<'_>, span: &Range<usize>) {
    match v {
        DeValue::Array(items) => {
            for item in items.iter_mut() {
                let inner = std::mem::replace(item.get_mut(), DeValue::Boolean(false));
                *item = Spanned::new(span.clone(), inner);
                set_spans(item.get_mut(), span);
            }
        }
        DeValue::Table(t) => {
            let entries = std::mem::take(t);
            for (key, item) in entries {
                let mut inner = item.into_inner();
                set_spans(&mut inner, span);
                t.insert(
                    Spanned::new(span.clone(), key.into_inner()),
                    Spanned::new(span.clone(), inner),
                );
            }
        }
        _ => {}
    }
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use super::*;
    use crate::input::model::Resolution;

    // Regression: `--set grid.points=N` on a file that gives grid.spacing
    // was refused as giving both.
    #[test]
    fn a_resolution_override_replaces_the_files_resolution() {
        let text = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\nspacing = 0.1\norder = 2\n";
        let ov = [Override::parse("grid.points=30").unwrap()];
        let (model, _) =
            crate::input::load_str("t.toml", text.into(), Path::new("."), &ov).unwrap();
        assert_eq!(model.grid.resolution, Resolution::Points(30));
        assert_eq!(model.grid.order.get(), 2);
        // Two resolutions in the file itself are still refused.
        let both = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\nspacing = 0.1\npoints = 5\n";
        assert!(crate::input::load_str("t.toml", both.into(), Path::new("."), &[]).is_err());
    }
}
