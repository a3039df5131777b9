//! Interrupted work is not lost: Ctrl-C, the scheduler's stop, and progress
//! files.
//!
//! [`interrupt_flag`] installs one handler, once per process, for Ctrl-C
//! (SIGINT), SIGTERM (how batch schedulers such as Slurm stop a job, some
//! seconds before they kill it) and SIGHUP (a closed terminal), that only
//! sets a flag; running studies poll it, start no new case, and finish with
//! the cases already done. A [`Saver`] writes the document of
//! the cases finished so far to a file with `"complete": false`, atomically
//! ([`crate::output::write_atomic`]), at most every few seconds while the
//! study runs, so the file is always a whole, valid document that a rerun
//! with `--resume` continues from.

use std::path::{Path, PathBuf};
use std::sync::atomic::AtomicBool;
use std::sync::{Mutex, OnceLock};
use std::time::{Duration, Instant};

static INTERRUPTED: AtomicBool = AtomicBool::new(false);
static HANDLER: OnceLock<bool> = OnceLock::new();

/// The flag Ctrl-C, SIGTERM and SIGHUP set. The handler is installed on
/// the first call; when it cannot be (another handler is already there),
/// the flag is still returned and simply never set by a signal.
pub fn interrupt_flag() -> &'static AtomicBool {
    HANDLER.get_or_init(|| {
        ctrlc::set_handler(|| {
            INTERRUPTED.store(true, std::sync::atomic::Ordering::SeqCst);
        })
        .is_ok()
    });
    &INTERRUPTED
}

/// Writes progress documents to one file, at most once per `every`.
#[derive(Debug)]
pub struct Saver {
    path: PathBuf,
    every: Duration,
    last: Mutex<Option<Instant>>,
}

impl Saver {
    /// A saver for `path` that writes at most once per `every` (the final
    /// write, with `force`, always happens).
    pub fn new(path: &Path, every: Duration) -> Self {
        Self {
            path: path.to_path_buf(),
            every,
            last: Mutex::new(None),
        }
    }

    /// The file written.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Writes `text` (made by `make` only when a write is due) unless the
    /// last write is more recent than `every` and `force` is false.
    pub fn save(&self, force: bool, make: impl FnOnce() -> String) -> std::io::Result<()> {
        let mut last = self.last.lock().unwrap_or_else(|p| p.into_inner());
        if !force && last.is_some_and(|t| t.elapsed() < self.every) {
            return Ok(());
        }
        crate::output::write_atomic(&self.path, make().as_bytes())?;
        *last = Some(Instant::now());
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn saver_writes_when_due_or_forced() {
        let dir = std::env::temp_dir().join(format!("chainwell-saver-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("s.json");
        let s = Saver::new(&p, Duration::from_secs(3600));
        s.save(false, || "one".into()).unwrap();
        s.save(false, || "two".into()).unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "one");
        s.save(true, || "three".into()).unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "three");
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
