//! Axis titles in words and symbols with units, never an input key or a
//! column name: `chain.bonds` is "bonds in the chain", `wavelength_nm` is
//! "λ_max (nm)", a length in angstrom is in "Å".
//!
//! Units follow the SI brochure's typography (BIPM, The International
//! System of Units, 9th ed. (2019), 5.4): a space between factors,
//! negative exponents as superscripts (`L mol⁻¹ cm⁻¹`), the unit in
//! parentheses after the quantity.

/// The typographic symbol of a unit label as chainwell writes it in
/// documents: "angstrom" is "Å", "cm-1" is "cm⁻¹", "kJ/mol" is
/// "kJ mol⁻¹", "1/angstrom" is "Å⁻¹"; other labels are returned as given.
pub fn unit_symbol(label: &str) -> String {
    let l = label.trim();
    if let Some(rest) = l.strip_prefix("1/") {
        return format!("{}⁻¹", unit_symbol(rest));
    }
    match l {
        "angstrom" | "Angstrom" | "A" => "Å".into(),
        "bohr" => "a₀".into(),
        "hartree" | "Eh" => "Eₕ".into(),
        "cm-1" | "cm^-1" => "cm⁻¹".into(),
        "kJ/mol" => "kJ mol⁻¹".into(),
        "eV/angstrom" => "eV Å⁻¹".into(),
        "eV/angstrom^2" => "eV Å⁻²".into(),
        "L/(mol cm)" | "L mol-1 cm-1" => "L mol⁻¹ cm⁻¹".into(),
        other => other.to_string(),
    }
}

/// `name (unit)` with the unit as its symbol, or just `name` when the
/// unit is empty.
pub fn with_unit(name: &str, unit: &str) -> String {
    let u = unit_symbol(unit);
    if u.is_empty() {
        name.to_string()
    } else {
        format!("{name} ({u})")
    }
}

/// What the last part of a key measures: words and the kind of unit.
#[derive(Clone, Copy)]
enum Dim {
    Length,
    Energy,
    InverseLength,
    Slope,
    Stiffness,
    Mass,
    Count,
}

fn field(name: &str) -> Option<(&'static str, Dim)> {
    Some(match name {
        "bonds" => ("bonds in the chain", Dim::Count),
        "bond_length" => ("bond length", Dim::Length),
        "end_extension" => ("end extension", Dim::Length),
        "alternation" => ("bond alternation", Dim::Energy),
        "end_cap_height" => ("end-cap height", Dim::Energy),
        "end_cap_width" => ("end-cap width", Dim::Length),
        "charge" => ("charge", Dim::Count),
        "electrons" => ("π electrons", Dim::Count),
        "atom" => ("atom", Dim::Count),
        "height" => ("height", Dim::Energy),
        "depth" => ("depth", Dim::Energy),
        "amplitude" => ("amplitude", Dim::Energy),
        "width" => ("width", Dim::Length),
        "center" => ("centre", Dim::Length),
        "from" => ("left end", Dim::Length),
        "to" => ("right end", Dim::Length),
        "period" => ("period", Dim::Length),
        "phase" => ("phase", Dim::Length),
        "origin" => ("origin", Dim::Length),
        "slope" => ("slope", Dim::Slope),
        "stiffness" => ("stiffness", Dim::Stiffness),
        "range" => ("range", Dim::InverseLength),
        "mass" => ("particle mass", Dim::Mass),
        "points" => ("grid points", Dim::Count),
        "spacing" => ("grid spacing h", Dim::Length),
        "order" => ("accuracy order", Dim::Count),
        "count" => ("levels computed", Dim::Count),
        "first" => ("lowest level computed", Dim::Count),
        "alpha" => ("Hückel α", Dim::Energy),
        "beta" => ("Hückel β", Dim::Energy),
        "beta_double" => ("Hückel β of double bonds", Dim::Energy),
        "beta_single" => ("Hückel β of single bonds", Dim::Energy),
        "huang_rhys" => ("Huang–Rhys factor S", Dim::Count),
        "vibrational_quantum" => ("vibrational quantum ħω", Dim::Energy),
        _ => return None,
    })
}

/// The title of an axis showing input key `key` (a dotted path such as
/// `chain.bonds` or `term.2.height`), in words with its unit, for an input
/// whose lengths are in `length` and energies in `energy` (unit labels as
/// documents print them, e.g. "angstrom", "eV").
pub fn key_title(key: &str, length: &str, energy: &str) -> String {
    let parts: Vec<&str> = key.split('.').collect();
    let last = parts.last().copied().unwrap_or(key);
    // `term.2.height` and `chain.site.1.height` name their table and index.
    let owner = match parts.as_slice() {
        [.., table, index, _] if index.parse::<usize>().is_ok() => {
            format!("{table} {index} ")
        }
        [section, _] if *section == "domain" || *section == "chain" => String::new(),
        _ => String::new(),
    };
    let Some((words, dim)) = field(last) else {
        let plain = key.replace(['.', '_'], " ");
        return plain.split_whitespace().collect::<Vec<_>>().join(" ");
    };
    let words = if owner.is_empty() {
        match (parts.first().copied(), last) {
            (Some("domain"), "from") => "left end of the domain",
            (Some("domain"), "to") => "right end of the domain",
            (Some("chain"), "charge") => "charge of the chain",
            _ => words,
        }
        .to_string()
    } else {
        format!("{owner}{words}")
    };
    let l = unit_symbol(length);
    let unit = match dim {
        Dim::Length => l,
        Dim::Energy => unit_symbol(energy),
        Dim::InverseLength => format!("{l}⁻¹"),
        Dim::Slope => format!("{} {l}⁻¹", unit_symbol(energy)),
        Dim::Stiffness => format!("{} {l}⁻²", unit_symbol(energy)),
        Dim::Mass => "mₑ".into(),
        Dim::Count => String::new(),
    };
    with_unit(&words, &unit)
}

/// The words and the unit of an observed quantity by its name in data
/// files (`gap`, `wavelength_nm`, `homo`, `lumo`, `energy.N`), with the
/// energy unit `energy`.
pub fn quantity_parts(name: &str, energy: &str) -> (String, String) {
    let e = unit_symbol(energy);
    match name {
        "gap" => ("HOMO–LUMO gap".into(), e),
        "wavelength_nm" => ("λ_max".into(), "nm".into()),
        "homo" => ("HOMO energy".into(), e),
        "lumo" => ("LUMO energy".into(), e),
        other => match other.strip_prefix("energy.") {
            Some(n) => (format!("energy of level {n}"), e),
            None => (other.replace(['.', '_'], " "), String::new()),
        },
    }
}

/// The title of an axis showing an observed quantity (see
/// [`quantity_parts`]): words and unit.
pub fn quantity_title(name: &str, energy: &str) -> String {
    let (w, u) = quantity_parts(name, energy);
    with_unit(&w, &u)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keys_become_words_with_units() {
        let t = |k: &str| key_title(k, "angstrom", "eV");
        assert_eq!(t("chain.bonds"), "bonds in the chain");
        assert_eq!(t("chain.bond_length"), "bond length (Å)");
        assert_eq!(t("chain.alternation"), "bond alternation (eV)");
        assert_eq!(t("term.2.height"), "term 2 height (eV)");
        assert_eq!(t("chain.site.1.width"), "site 1 width (Å)");
        assert_eq!(t("term.1.stiffness"), "term 1 stiffness (eV Å⁻²)");
        assert_eq!(t("domain.to"), "right end of the domain (Å)");
        assert_eq!(t("grid.spacing"), "grid spacing h (Å)");
        assert_eq!(
            key_title("term.1.range", "nm", "cm-1"),
            "term 1 range (nm⁻¹)"
        );
        // Unknown keys still lose their dots and underscores.
        assert_eq!(t("spectrum.line_width"), "spectrum line width");
    }

    #[test]
    fn quantities_and_units() {
        assert_eq!(quantity_title("wavelength_nm", "eV"), "λ_max (nm)");
        assert_eq!(quantity_title("gap", "hartree"), "HOMO–LUMO gap (Eₕ)");
        assert_eq!(quantity_title("energy.3", "eV"), "energy of level 3 (eV)");
        assert_eq!(unit_symbol("1/angstrom"), "Å⁻¹");
        assert_eq!(unit_symbol("kJ/mol"), "kJ mol⁻¹");
        assert_eq!(with_unit("n", ""), "n");
    }
}
