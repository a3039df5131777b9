//! `--plot` and the flags that shape a figure, shared by every command, and
//! their check before any work.

use std::path::PathBuf;

use chainwell::plot::{self, Figure, MeasuredSpectrum, Size, SpectrumAxis, Style};

use super::CommandError;

/// Figure options, shared by every command.
#[derive(clap::Args, Debug, Clone, Default)]
pub struct FigureArgs {
    /// Draw a figure into FILE (.svg, .png or .pdf).
    #[arg(long, value_name = "FILE")]
    pub plot: Option<PathBuf>,
    /// Which figure, where the command draws more than one.
    #[arg(long, value_name = "KIND")]
    pub figure: Option<String>,
    /// Figure size: WxH in pixels (1200x800) or WxHcm (16x10cm).
    #[arg(long, value_name = "SIZE")]
    pub size: Option<String>,
    /// Dots per inch for sizes in cm (default 300).
    #[arg(long)]
    pub dpi: Option<f64>,
    /// Type size in points (default 12).
    #[arg(long, value_name = "PT")]
    pub font_pt: Option<f64>,
    /// Line width in points (default 1.2).
    #[arg(long, value_name = "PT")]
    pub line_pt: Option<f64>,
    /// Energy window LO:HI, input energy units.
    #[arg(long, value_name = "LO:HI", allow_hyphen_values = true)]
    pub energy_window: Option<String>,
    /// Horizontal window LO:HI, in the figure's x unit.
    #[arg(long, value_name = "LO:HI", allow_hyphen_values = true)]
    pub x_window: Option<String>,
    /// Levels to show, e.g. 1,2,5.
    #[arg(long, value_name = "N,N,...")]
    pub levels: Option<String>,
    /// Wavefunction height in the states figure, as a fraction of the
    /// smallest level spacing, in (0, 5] (default 0.4).
    #[arg(long, value_name = "F")]
    pub amplitude: Option<f64>,
    /// Horizontal axis of the spectrum figure: wavelength (nm), energy
    /// (eV) or wavenumber (cm⁻¹).
    #[arg(long, value_name = "AXIS")]
    pub spectrum_axis: Option<String>,
    /// A measured spectrum to draw over the spectrum figure: a two-column
    /// CSV, wavelength (nm) or energy (eV), then absorbance or epsilon.
    #[arg(long, value_name = "FILE")]
    pub measured_spectrum: Option<PathBuf>,
}

/// A checked figure request: what to draw, how, and where.
#[derive(Debug, Clone)]
pub struct FigurePlan {
    /// The file to write (its format checked).
    pub path: PathBuf,
    /// The figure kind, one of the command's.
    pub kind: &'static str,
    /// The style the flags ask for (checked).
    pub style: Style,
    /// The spectrum figure's horizontal axis.
    pub spectrum_axis: SpectrumAxis,
    /// The measured spectrum to draw over the computed one (read and
    /// checked up front).
    pub measured: Option<MeasuredSpectrum>,
}

impl FigurePlan {
    /// Draws `figure` into the planned file.
    pub fn render(&self, figure: &Figure) -> Result<(), CommandError> {
        plot::render(figure, &self.style, &self.path).map_err(|e| plot_error(&self.path, e))
    }
}

fn plot_error(path: &std::path::Path, e: plot::PlotError) -> CommandError {
    match e {
        plot::PlotError::UnknownFormat(_)
        | plot::PlotError::BadSize(_)
        | plot::PlotError::BadStyle(_) => usage(format!("--plot {}: {e}", path.display())),
        other => CommandError::Compute(format!("cannot draw {}: {other}", path.display())),
    }
}

fn usage(msg: String) -> CommandError {
    CommandError::Usage(msg)
}

fn window(flag: &str, text: &Option<String>) -> Result<Option<(f64, f64)>, CommandError> {
    let Some(t) = text else { return Ok(None) };
    let bad = || usage(format!("{flag} {t}: expected LO:HI with LO < HI"));
    let (a, b) = t.split_once(':').ok_or_else(bad)?;
    let (a, b): (f64, f64) = (
        a.trim().parse().map_err(|_| bad())?,
        b.trim().parse().map_err(|_| bad())?,
    );
    if !(a.is_finite() && b.is_finite() && a < b) {
        return Err(bad());
    }
    Ok(Some((a, b)))
}

impl FigureArgs {
    /// Checks every figure flag against the command's figure `kinds` (the
    /// first is the default), before any input is read: the kind, the size,
    /// the windows, the levels and the file format. `None` without `--plot`.
    pub fn check(&self, kinds: &[&'static str]) -> Result<Option<FigurePlan>, CommandError> {
        let kind = match &self.figure {
            None => kinds[0],
            Some(k) => kinds.iter().copied().find(|c| c == k).ok_or_else(|| {
                usage(format!(
                    "--figure {k}: this command draws {}",
                    kinds.join(", ")
                ))
            })?,
        };
        let style = self.style()?;
        let spectrum_axis = match self.spectrum_axis.as_deref() {
            None => SpectrumAxis::Wavelength,
            Some(a) => SpectrumAxis::parse(a).ok_or_else(|| {
                usage(format!(
                    "--spectrum-axis {a}: expected wavelength, energy or wavenumber"
                ))
            })?,
        };
        let measured = self.measured(kind)?;
        let Some(path) = &self.plot else {
            if self.measured_spectrum.is_some() {
                return Err(usage(
                    "--measured-spectrum draws on the spectrum figure; add --plot FILE".into(),
                ));
            }
            return Ok(None);
        };
        plot::check(&style, path).map_err(|e| plot_error(path, e))?;
        Ok(Some(FigurePlan {
            path: path.clone(),
            kind,
            style,
            spectrum_axis,
            measured,
        }))
    }

    /// Reads `--measured-spectrum`, which only the spectrum figure takes.
    fn measured(&self, kind: &str) -> Result<Option<MeasuredSpectrum>, CommandError> {
        let Some(path) = &self.measured_spectrum else {
            return Ok(None);
        };
        if kind != "spectrum" {
            return Err(usage(format!(
                "--measured-spectrum {}: only the spectrum figure (--figure spectrum) draws it",
                path.display()
            )));
        }
        let text = std::fs::read_to_string(path).map_err(|e| {
            usage(format!(
                "--measured-spectrum {}: cannot read: {e}",
                path.display()
            ))
        })?;
        MeasuredSpectrum::parse_csv(&text)
            .map(Some)
            .map_err(|(line, msg)| {
                let at = if line > 0 {
                    format!("{}:{line}", path.display())
                } else {
                    path.display().to_string()
                };
                usage(format!("{at}: {msg}"))
            })
    }

    /// The plot style these flags ask for.
    fn style(&self) -> Result<Style, CommandError> {
        let mut style = Style::default();
        if let Some(s) = &self.size {
            let bad = || {
                usage(format!(
                    "--size {s}: expected WxH (pixels) or WxHcm, e.g. 1200x800 or 16x10cm"
                ))
            };
            let (body, cm) = match s.strip_suffix("cm") {
                Some(b) => (b, true),
                None => (s.as_str(), false),
            };
            let (w, h) = body.split_once('x').ok_or_else(bad)?;
            style.size = if cm {
                Size::Centimetres {
                    w: w.trim().parse().map_err(|_| bad())?,
                    h: h.trim().parse().map_err(|_| bad())?,
                    dpi: self.dpi.unwrap_or(300.0),
                }
            } else {
                Size::Pixels {
                    w: w.trim().parse().map_err(|_| bad())?,
                    h: h.trim().parse().map_err(|_| bad())?,
                }
            };
        }
        if let Some(f) = self.font_pt {
            style.font_pt = f;
        }
        if let Some(l) = self.line_pt {
            style.line_pt = l;
        }
        if let Some(a) = self.amplitude {
            if !(a > 0.0 && a <= 5.0) {
                return Err(usage(format!(
                    "--amplitude {a}: expected a fraction of the level spacing in (0, 5]"
                )));
            }
            style.amplitude = a;
        }
        style.energy_window = window("--energy-window", &self.energy_window)?;
        style.x_window = window("--x-window", &self.x_window)?;
        if let Some(l) = &self.levels {
            let list: Result<Vec<usize>, _> =
                l.split(',').map(|x| x.trim().parse::<usize>()).collect();
            style.levels = Some(list.map_err(|_| {
                usage(format!(
                    "--levels {l}: expected level numbers such as 1,2,5"
                ))
            })?);
        }
        Ok(style)
    }
}
