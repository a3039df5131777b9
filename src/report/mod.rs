//! Reports of results, one file per document, in the input's units: JSON
//! documents (the contract's keys), readable tables, tidy CSV files, and the
//! figures built from results.
//!
//! - [`envelope`]: what every document carries (program, input echo).
//! - [`solve`], [`solve_table`], [`solve_csv`]: one solve.
//! - [`response`](mod@response): the static response's object, lines and
//!   scaling exponents.
//! - [`sweep`]: the sweep document, table and CSV.
//! - [`fit`] and [`target`]: fits and design targets.
//! - [`bands`]: the bands document, table and CSV.
//! - [`converge`]: convergence studies.
//! - [`figure`]: figures of every result, ready for [`crate::plot`].

pub mod bands;
pub mod converge;
pub mod envelope;
pub mod figure;
pub mod fit;
pub mod response;
pub mod solve;
pub mod solve_csv;
pub mod solve_table;
pub mod sweep;
pub mod target;

/// A length derived from decimal inputs (`bonds × bond_length + 2 ×
/// end_extension`), rounded to 12 significant digits so the rounding of
/// binary arithmetic does not show: a 7 Å box prints as 7, not
/// 6.999999999999999. Twelve digits keep far more than any input gives.
pub fn derived(x: f64) -> f64 {
    if !x.is_finite() || x == 0.0 {
        return x;
    }
    format!("{x:.11e}").parse().unwrap_or(x)
}

/// `text` with every negative zero written without its sign: a number
/// such as `-0.0000000000` or `-0.0e0` that rounding made zero becomes
/// `0.0000000000` (tables print values rounded to fixed digits, and a
/// sign on a zero only misleads); after a space the sign becomes a space,
/// so right-aligned columns stay aligned.
pub fn no_negative_zero(text: &str) -> String {
    let b = text.as_bytes();
    let mut out = String::with_capacity(text.len());
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        let starts_number = c == b'-'
            && (i == 0 || !(b[i - 1].is_ascii_alphanumeric() || b[i - 1] == b'.'))
            && b.get(i + 1).is_some_and(|d| d.is_ascii_digit());
        if starts_number {
            // The mantissa: digits and one point.
            let mut j = i + 1;
            while j < b.len() && (b[j].is_ascii_digit() || b[j] == b'.') {
                j += 1;
            }
            let zero = b[i + 1..j].iter().all(|d| *d == b'0' || *d == b'.');
            if zero {
                // A space keeps right-aligned columns in place.
                if i == 0 || b[i - 1] == b' ' {
                    out.push(' ');
                }
                i += 1;
                continue;
            }
        }
        // Copy one whole character.
        let ch = text[i..].chars().next().unwrap_or(' ');
        out.push(ch);
        i += ch.len_utf8();
    }
    out
}

#[cfg(test)]
mod tests {
    use super::no_negative_zero;

    #[test]
    fn derived_lengths_print_as_their_decimals() {
        // 3 bonds of 1.4 Å and two ends of 1.4 Å: 7 Å exactly in decimal.
        let l = 3.0 * 1.4 + 2.0 * 1.4;
        assert_ne!(l, 7.0);
        assert_eq!(super::derived(l), 7.0);
        assert_eq!(super::derived(0.1 + 0.2), 0.3);
        assert_eq!(super::derived(1.234_567_890_123_4), 1.234_567_890_12);
    }

    #[test]
    fn negative_zeros_lose_their_sign() {
        assert_eq!(
            no_negative_zero("E = -0.0000000000 eV"),
            "E =  0.0000000000 eV"
        );
        assert_eq!(no_negative_zero("a (-0.00e0) b"), "a (0.00e0) b");
        assert_eq!(no_negative_zero("-0.001 and -3"), "-0.001 and -3");
        assert_eq!(no_negative_zero("x-0 λ −0"), "x-0 λ −0");
        assert_eq!(no_negative_zero("1e-0"), "1e-0");
    }
}
