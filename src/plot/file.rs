//! Atomic figure output: a figure file is either the complete new picture
//! or the old file untouched (see [`crate::output::write_atomic`]).

use super::PlotError;
#[cfg(test)]
use std::fs;
use std::path::Path;
#[cfg(test)]
use std::path::PathBuf;
#[cfg(test)]
use std::sync::atomic::{AtomicU64, Ordering};

#[cfg(test)]
static COUNTER: AtomicU64 = AtomicU64::new(0);

/// Writes `bytes` to `path` atomically; errors become [`PlotError::Io`].
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), PlotError> {
    crate::output::write_atomic(path, bytes).map_err(|e| PlotError::Io {
        path: path.to_path_buf(),
        message: e.to_string(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!(
            "plot-file-{tag}-{}-{}",
            std::process::id(),
            COUNTER.fetch_add(1, Ordering::Relaxed)
        ));
        fs::create_dir_all(&d).unwrap();
        d
    }

    fn leftovers(dir: &Path) -> usize {
        fs::read_dir(dir)
            .unwrap()
            .filter(|e| {
                e.as_ref()
                    .map(|e| e.file_name().to_string_lossy().contains(".tmp-"))
                    .unwrap_or(false)
            })
            .count()
    }

    #[test]
    fn replaces_existing_file() {
        let d = scratch("replace");
        let p = d.join("a.svg");
        fs::write(&p, b"old").unwrap();
        write_atomic(&p, b"new contents").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"new contents");
        assert_eq!(leftovers(&d), 0);
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn failed_rename_leaves_target_and_no_temp() {
        // Renaming a file over a non-empty directory fails (POSIX rename()).
        let d = scratch("fail");
        let target = d.join("fig.png");
        fs::create_dir(&target).unwrap();
        fs::write(target.join("keep"), b"kept").unwrap();
        let err = write_atomic(&target, b"bytes").unwrap_err();
        assert!(matches!(err, PlotError::Io { .. }));
        assert_eq!(fs::read(target.join("keep")).unwrap(), b"kept");
        assert_eq!(leftovers(&d), 0);
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn missing_directory_is_an_error() {
        let d = scratch("missing");
        let p = d.join("no-such-dir").join("x.svg");
        assert!(matches!(write_atomic(&p, b"x"), Err(PlotError::Io { .. })));
        fs::remove_dir_all(&d).unwrap();
    }
}
