//! The one memory model of a solve: what each method allocates, and the
//! limit it is held to ([`EigenParams::memory_limit`](super::EigenParams)).
//!
//! The estimates count the `f64` arrays a method holds at its peak, per
//! point of the grid (`n`) and per wanted level (`k`):
//!
//! | method | arrays at the peak |
//! | --- | --- |
//! | `Dense` | four n x n matrices (the matrix, its copy inside the QR, the vectors, the reduction) |
//! | `Tridiagonal` | k vectors, three work vectors per thread, four more |
//! | `Guided` | k vectors, per thread one LDL^T and four work vectors |
//! | `ShiftInvert` | the Lanczos basis (2 (k + 4) + 40 steps), the locked vectors and their refined copies (3 (k + 4)), one LDL^T |
//!
//! The `Tridiagonal` and `Guided` rows come to 8 bytes per point and level
//! (the level vectors themselves) plus a fixed number of work vectors; the
//! earlier model charged 24 bytes per point and level for the same path.
//! The limit defaults to half the machine's memory (`MemTotal` of
//! `/proc/meminfo`, Linux), and to 4 GiB where that cannot be read.

use super::params::Method;

/// Bytes in a GiB.
pub const GIB: usize = 1 << 30;

/// The limit where the machine's memory cannot be read: 4 GiB.
pub const FALLBACK_LIMIT: usize = 4 * GIB;

/// The machine's memory in bytes (`MemTotal` of `/proc/meminfo`), `None`
/// where it cannot be read (not Linux, no `/proc`).
pub fn machine_memory() -> Option<usize> {
    let text = std::fs::read_to_string("/proc/meminfo").ok()?;
    parse_meminfo(&text)
}

/// `MemTotal` in bytes from the text of `/proc/meminfo` (`MemTotal: 24576000 kB`).
pub fn parse_meminfo(text: &str) -> Option<usize> {
    let line = text.lines().find(|l| l.starts_with("MemTotal:"))?;
    let mut words = line["MemTotal:".len()..].split_whitespace();
    let value: usize = words.next()?.parse().ok()?;
    let unit = match words.next() {
        Some("kB") => 1024,
        None => 1,
        Some(_) => return None,
    };
    value.checked_mul(unit).filter(|&b| b > 0)
}

/// The default limit: half the machine's memory, or [`FALLBACK_LIMIT`].
pub fn default_limit() -> usize {
    machine_memory().map_or(FALLBACK_LIMIT, |m| m / 2)
}

/// Worker threads the parallel parts run on.
fn threads() -> usize {
    rayon::current_num_threads().max(1)
}

/// Bytes of an LDL^T factorisation of an n x n matrix of half-bandwidth p.
pub fn ldlt_bytes(n: usize, p: usize) -> usize {
    n.saturating_mul(8 * (2 * p + 2))
}

/// Bytes `method` (never `Auto`) holds at its peak for `count` levels of an
/// n x n problem of half-bandwidth `p`. Saturates instead of overflowing.
pub fn eigen_bytes(method: Method, n: usize, p: usize, count: usize) -> usize {
    let vectors = |m: usize| n.saturating_mul(8).saturating_mul(m);
    match method {
        Method::Dense => n.saturating_mul(n).saturating_mul(8 * 4),
        Method::Tridiagonal => vectors(count.saturating_add(3 * threads() + 4)),
        Method::Guided => vectors(count.saturating_add(4 * threads()))
            .saturating_add(ldlt_bytes(n, p).saturating_mul(threads())),
        Method::ShiftInvert | Method::Auto => {
            let steps = 2 * count.saturating_add(4) + 40;
            vectors(steps.saturating_add(3 * count.saturating_add(4)))
                .saturating_add(ldlt_bytes(n, p))
        }
    }
}

/// The message's figure: bytes in GB (10^9 bytes), one decimal.
pub fn gigabytes(bytes: f64) -> String {
    format!("{:.1} GB", bytes / 1e9)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn meminfo_total_is_read_in_bytes() {
        // the format of proc(5), "MemTotal: N kB"
        let text = "MemTotal:       24576000 kB\nMemFree:  100 kB\n";
        assert_eq!(parse_meminfo(text), Some(24_576_000 * 1024));
        assert_eq!(parse_meminfo("MemFree: 1 kB\n"), None);
        assert_eq!(parse_meminfo("MemTotal: lots kB\n"), None);
        assert!(default_limit() >= GIB / 2);
    }

    #[test]
    fn estimates_grow_with_levels_and_saturate() {
        let one = eigen_bytes(Method::Tridiagonal, 1_000_000, 1, 1);
        let many = eigen_bytes(Method::Tridiagonal, 1_000_000, 1, 201);
        // 200 more levels are 200 more vectors of 8 bytes per point
        assert_eq!(many - one, 200 * 8 * 1_000_000);
        assert_eq!(eigen_bytes(Method::Dense, usize::MAX, 1, 1), usize::MAX);
        assert!(eigen_bytes(Method::ShiftInvert, 1000, 4, 10) > 1000 * 8 * 10);
    }
}
