//! The term shapes of the input contract and their values.

use std::f64::consts::PI;
use std::sync::Arc;

use super::formula::Formula;
use super::table::Table;

/// One term of the potential. Lengths in Å, energies in eV; windows are
/// half-open `[from, to)`.
#[derive(Debug, Clone)]
pub enum Term {
    /// `height` on `[from, to)`, else 0.
    Step {
        /// Left edge, Å.
        from: f64,
        /// Right edge, Å.
        to: f64,
        /// eV.
        height: f64,
    },
    /// `amplitude cos(2 pi (x - phase) / period)`, inside the window if any.
    Ripple {
        /// eV.
        amplitude: f64,
        /// Å.
        period: f64,
        /// Å.
        phase: f64,
        /// Optional `[from, to)`, Å.
        window: Option<(f64, f64)>,
    },
    /// `stiffness / 2 (x - center)^2`.
    Harmonic {
        /// Å.
        center: f64,
        /// eV/Å².
        stiffness: f64,
    },
    /// `depth (1 - exp(-range (x - center)))^2`.
    Morse {
        /// Å.
        center: f64,
        /// eV.
        depth: f64,
        /// 1/Å.
        range: f64,
    },
    /// `height exp(-(x - center)^2 / (2 width^2))`.
    Gauss {
        /// Å.
        center: f64,
        /// eV.
        height: f64,
        /// Standard deviation, Å.
        width: f64,
    },
    /// `slope (x - origin)`, inside the window if any.
    Linear {
        /// eV/Å.
        slope: f64,
        /// Å.
        origin: f64,
        /// Optional `[from, to)`, Å.
        window: Option<(f64, f64)>,
    },
    /// Values interpolated from a table given in input units.
    Table {
        /// The table, in input units.
        table: Arc<Table>,
        /// Input length unit in Å (x_input = x / length_unit).
        length_unit: f64,
        /// Input energy unit in eV.
        energy_unit: f64,
    },
    /// A user expression of `x` in input units giving input energy units.
    Formula {
        /// The compiled expression.
        formula: Arc<Formula>,
        /// Input length unit in Å.
        length_unit: f64,
        /// Input energy unit in eV.
        energy_unit: f64,
    },
}

fn inside(window: Option<(f64, f64)>, x: f64) -> bool {
    window.is_none_or(|(a, b)| x >= a && x < b)
}

impl Term {
    /// The term's value in eV at `x` in Å.
    pub fn eval(&self, x: f64) -> f64 {
        match self {
            Term::Step { from, to, height } => {
                if x >= *from && x < *to {
                    *height
                } else {
                    0.0
                }
            }
            Term::Ripple {
                amplitude,
                period,
                phase,
                window,
            } => {
                if inside(*window, x) {
                    amplitude * (2.0 * PI * (x - phase) / period).cos()
                } else {
                    0.0
                }
            }
            Term::Harmonic { center, stiffness } => 0.5 * stiffness * (x - center).powi(2),
            Term::Morse {
                center,
                depth,
                range,
            } => depth * (1.0 - (-range * (x - center)).exp()).powi(2),
            Term::Gauss {
                center,
                height,
                width,
            } => height * (-(x - center).powi(2) / (2.0 * width * width)).exp(),
            Term::Linear {
                slope,
                origin,
                window,
            } => {
                if inside(*window, x) {
                    slope * (x - origin)
                } else {
                    0.0
                }
            }
            Term::Table {
                table,
                length_unit,
                energy_unit,
            } => table.eval(x / length_unit) * energy_unit,
            Term::Formula {
                formula,
                length_unit,
                energy_unit,
            } => formula.eval(x / length_unit) * energy_unit,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn shapes_follow_the_contract_formulas() {
        let step = Term::Step {
            from: 1.0,
            to: 2.0,
            height: -0.5,
        };
        assert_eq!(step.eval(1.0), -0.5);
        assert_eq!(step.eval(2.0), 0.0);
        let ripple = Term::Ripple {
            amplitude: 0.3,
            period: 2.8,
            phase: 0.7,
            window: None,
        };
        assert_relative_eq!(ripple.eval(0.7), 0.3);
        assert_relative_eq!(ripple.eval(0.7 + 1.4), -0.3);
        let morse = Term::Morse {
            center: 1.0,
            depth: 4.0,
            range: 2.0,
        };
        assert_eq!(morse.eval(1.0), 0.0);
        assert_relative_eq!(morse.eval(1e6), 4.0);
        let g = Term::Gauss {
            center: 0.0,
            height: 2.0,
            width: 0.5,
        };
        assert_relative_eq!(g.eval(0.5), 2.0 * (-0.5f64).exp());
        let lin = Term::Linear {
            slope: 0.1,
            origin: 2.0,
            window: Some((0.0, 5.0)),
        };
        assert_relative_eq!(lin.eval(4.0), 0.2);
        assert_eq!(lin.eval(5.0), 0.0);
        let h = Term::Harmonic {
            center: 1.0,
            stiffness: 4.0,
        };
        assert_relative_eq!(h.eval(2.0), 2.0);
    }
}
