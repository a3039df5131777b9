//! The command layer of the `chainwell` binary (not library API): each
//! subcommand's flags (clap), checked into typed values before any input is
//! read, then the library call, then what to print; errors become exit
//! statuses (2 bad input or usage, 1 a computation that could not finish).

pub mod bands;
pub mod converge;
pub mod figure;
pub mod fit;
pub mod merge;
pub mod solve;
pub mod starter;
pub mod sweep;

use std::io::Write;
use std::path::Path;

use chainwell::files::RunFiles;
use chainwell::input::{Document, InputError, Override};
use chainwell::pipeline::Fault;

/// Why a command failed.
#[derive(Debug, thiserror::Error)]
pub enum CommandError {
    /// A fault in the input file or an override (exit status 2).
    #[error("{}", .0.render())]
    Input(#[from] InputError),
    /// A fault in the command line (exit status 2).
    #[error("error: {0}")]
    Usage(String),
    /// A computation that could not finish (exit status 1).
    #[error("error: {0}")]
    Compute(String),
}

impl CommandError {
    /// The exit status for this error.
    pub fn exit_code(&self) -> u8 {
        match self {
            CommandError::Input(_) | CommandError::Usage(_) => 2,
            CommandError::Compute(_) => 1,
        }
    }
}

impl From<Fault> for CommandError {
    fn from(f: Fault) -> Self {
        match f {
            Fault::Input(i) => CommandError::Input(i),
            Fault::Usage(m) => CommandError::Usage(m),
            Fault::Compute(m) => CommandError::Compute(m),
        }
    }
}

/// What a command prints, and how it ends.
#[derive(Debug, Default)]
pub struct Outcome {
    /// Text for stdout.
    pub stdout: String,
    /// Lines for stderr (each printed as `warning: ...`).
    pub warnings: Vec<String>,
    /// Set when the command stopped early (Ctrl-C): the output above is
    /// what was finished, and this is the error to exit with.
    pub failure: Option<CommandError>,
}

impl Outcome {
    /// An outcome that prints `stdout` and these warnings.
    pub fn printed(stdout: String, warnings: Vec<String>) -> Self {
        Self {
            stdout,
            warnings,
            failure: None,
        }
    }

    /// Prints the warnings and the text, and returns how the command ends.
    pub fn finish(self) -> Result<(), CommandError> {
        for w in &self.warnings {
            eprintln!("warning: {w}");
        }
        print_stdout(&self.stdout)?;
        match self.failure {
            Some(e) => Err(e),
            None => Ok(()),
        }
    }
}

/// Parses `--set KEY=VALUE` flags.
pub fn parse_overrides(sets: &[String]) -> Result<Vec<Override>, CommandError> {
    sets.iter()
        .map(|s| Override::parse(s).map_err(|m| CommandError::Usage(format!("--set {s}: {m}"))))
        .collect()
}

/// The files a run reads and writes, checked before any work: every
/// output can be written (its folder exists and takes files), and none is
/// one of the inputs or another output (see [`chainwell::files`]).
#[derive(Debug, Default)]
pub struct Plan {
    files: RunFiles,
    outputs: Vec<(String, std::path::PathBuf, bool)>,
}

impl Plan {
    /// An empty plan.
    pub fn new() -> Self {
        Self::default()
    }

    /// The input file and every table file its models read so far.
    pub fn document(&mut self, input: &Path, document: &Document) -> &mut Self {
        self.files.input("the input file", input);
        for t in document.tables().paths() {
            self.files.input("a table the input reads", &t);
        }
        self
    }

    /// Another input (`--data`, `--resume`, a merge part).
    pub fn input(&mut self, role: &str, path: &Path) -> &mut Self {
        self.files.input(role, path);
        self
    }

    /// An output file, when given.
    pub fn output(&mut self, role: &str, path: Option<&Path>) -> &mut Self {
        if let Some(p) = path {
            self.files.output(role, p);
            self.outputs
                .push((role.to_string(), p.to_path_buf(), false));
        }
        self
    }

    /// An output folder of several files (`solve --csv DIR`).
    pub fn output_dir(&mut self, role: &str, dir: Option<&Path>, names: &[&str]) -> &mut Self {
        if let Some(d) = dir {
            for n in names {
                self.files.output(role, &d.join(n));
            }
            self.outputs.push((role.to_string(), d.to_path_buf(), true));
        }
        self
    }

    /// Checks every output and the same-file rule (exit status 2).
    pub fn check(&self) -> Result<(), CommandError> {
        for (role, path, dir) in &self.outputs {
            let r = if *dir {
                chainwell::files::check_output_dir(role, path)
            } else {
                chainwell::files::check_output(role, path)
            };
            r.map_err(CommandError::Usage)?;
        }
        self.files.check().map_err(CommandError::Usage)
    }
}

/// Pretty JSON with a final newline.
pub fn json_text(doc: &serde_json::Value) -> Result<String, CommandError> {
    let mut s =
        serde_json::to_string_pretty(doc).map_err(|e| CommandError::Compute(e.to_string()))?;
    s.push('\n');
    Ok(s)
}

/// Writes to stdout; a closed pipe (`| head`) is not an error of ours.
pub fn print_stdout(text: &str) -> Result<(), CommandError> {
    let mut stdout = std::io::stdout().lock();
    match stdout
        .write_all(text.as_bytes())
        .and_then(|_| stdout.flush())
    {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(e) => Err(CommandError::Compute(format!(
            "cannot write to stdout: {e}"
        ))),
    }
}
