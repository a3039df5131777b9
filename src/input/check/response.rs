//! Checking `[response]`: the static response of the filled levels needs
//! hard walls (x is not single-valued on a ring), electrons to fill, and
//! every filled level (and the LUMO, for the filling) among the computed
//! ones.

use toml::Spanned;

use super::{Checker, Result};
use crate::grid::{Boundary, Domain};
use crate::input::model::*;
use crate::input::raw::{RawInput, RawResponse};

impl Checker<'_> {
    pub(super) fn check_response(
        &self,
        r: Option<&Spanned<RawResponse>>,
        domain: &Domain,
        levels: &LevelSpec,
        raw: &RawInput,
    ) -> Result<Option<ResponseSpec>> {
        let Some(r) = r else { return Ok(None) };
        let table = r.get_ref();
        let flag =
            |v: &Option<Spanned<bool>>, default: bool| v.as_ref().map_or(default, |b| *b.get_ref());
        if !flag(&table.enabled, true) {
            return Ok(None);
        }
        if domain.boundary == Boundary::Periodic {
            return Err(self.err(
                r.span(),
                "response",
                "the static response along x needs hard walls (domain.boundary = \"walls\"): on a ring x is not single-valued",
            ));
        }
        let lv = raw.levels.as_ref().map(Spanned::get_ref);
        let levels_span = raw.levels.as_ref().map_or(r.span(), Spanned::span);
        let Some(electrons) = levels.electrons else {
            return Err(self.err(
                r.span(),
                "response",
                "the response is that of the filled levels: give levels.electrons (or build a [chain])",
            ));
        };
        if let Some(b) = lv.and_then(|l| l.below.as_ref()) {
            return Err(self.err(
                b.span(),
                "levels.below",
                "[response] sums every filled level; choose the levels with levels.count instead of levels.below",
            ));
        }
        if levels.first > 1 {
            let span = lv
                .and_then(|l| l.first.as_ref())
                .map_or(levels_span.clone(), Spanned::span);
            return Err(self.err(
                span,
                "levels.first",
                format!(
                    "[response] sums every filled level from level 1, but levels.first = {}; remove levels.first",
                    levels.first
                ),
            ));
        }
        let needed = electrons.div_ceil(2) + 1;
        if levels.count < needed {
            let span = lv
                .and_then(|l| l.count.as_ref())
                .map_or(levels_span, Spanned::span);
            return Err(self.err(
                span,
                "levels.count",
                format!(
                    "[response] needs the {electrons} electrons' levels and the LUMO, levels 1..{needed}, but levels.count = {}",
                    levels.count
                ),
            ));
        }
        Ok(Some(ResponseSpec {
            hyperpolarizabilities: flag(&table.hyperpolarizabilities, true),
            sum_over_states: flag(&table.sum_over_states, true),
        }))
    }
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use crate::input::model::ResponseSpec;

    fn load(text: &str) -> Result<Option<ResponseSpec>, String> {
        crate::input::load_str("t.toml", text.to_string(), Path::new("."), &[])
            .map(|(m, _)| m.response)
            .map_err(|e| e.render())
    }

    #[test]
    fn the_table_turns_the_response_on_with_defaults() {
        let base = "[chain]\nbonds = 6\n[grid]\npoints = 300\n";
        assert_eq!(load(base).unwrap(), None);
        let on = load(&format!("{base}[response]\n")).unwrap().unwrap();
        assert!(on.hyperpolarizabilities && on.sum_over_states);
        let alpha_only = load(&format!(
            "{base}[response]\nhyperpolarizabilities = false\n"
        ))
        .unwrap()
        .unwrap();
        assert!(!alpha_only.hyperpolarizabilities);
        assert_eq!(
            load(&format!("{base}[response]\nenabled = false\n")).unwrap(),
            None
        );
    }

    #[test]
    fn inputs_the_response_cannot_serve_are_refused_at_their_key() {
        let cases = [
            // A ring.
            (
                "[domain]\nfrom = 0.0\nto = 10.0\nboundary = \"periodic\"\n[levels]\nelectrons = 2\n[response]\n",
                "hard walls",
                "t.toml:7",
            ),
            // No electrons.
            ("[domain]\nfrom = 0.0\nto = 10.0\n[response]\n", "levels.electrons", "t.toml:4"),
            // Not every filled level computed.
            (
                "[domain]\nfrom = 0.0\nto = 10.0\n[levels]\nelectrons = 6\nfirst = 2\n[response]\n",
                "levels.first",
                "t.toml:6",
            ),
            (
                "[domain]\nfrom = 0.0\nto = 10.0\n[levels]\nelectrons = 6\ncount = 3\n[response]\n",
                "levels.count",
                "t.toml:6",
            ),
            (
                "[domain]\nfrom = 0.0\nto = 10.0\n[levels]\nelectrons = 6\nbelow = 3.0\n[response]\n",
                "levels.below",
                "t.toml:6",
            ),
            // A key the table does not take.
            ("[chain]\nbonds = 4\n[response]\nfield = 0.1\n", "field", "t.toml:4"),
        ];
        for (text, key, place) in cases {
            let e = load(text).unwrap_err();
            assert!(e.contains(key) && e.contains(place), "{text}: {e}");
        }
    }
}
