//! Writing files so that they are whole or absent.
//!
//! Every file chainwell writes goes to a temporary file in the target's
//! directory, is flushed to disk (`fsync`), and the temporary file is renamed
//! over the target; rename within one file system is atomic on POSIX systems
//! (IEEE Std 1003.1, `rename()`). A reader never sees half a file, and a run
//! that fails leaves an existing file untouched. On any error the temporary
//! file is removed.

use std::fs::{self, File, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

static COUNTER: AtomicU64 = AtomicU64::new(0);

fn io_err(path: &Path, e: std::io::Error) -> std::io::Error {
    std::io::Error::new(e.kind(), format!("{}: {e}", path.display()))
}

/// A fresh temporary name beside `path`: `.<name>.tmp-<pid>-<counter>`.
fn temp_beside(path: &Path) -> std::io::Result<PathBuf> {
    let name = path
        .file_name()
        .ok_or_else(|| {
            std::io::Error::new(
                std::io::ErrorKind::InvalidInput,
                format!("{}: the path names no file", path.display()),
            )
        })?
        .to_string_lossy();
    let k = COUNTER.fetch_add(1, Ordering::Relaxed);
    let tmp = format!(".{name}.tmp-{}-{k}", std::process::id());
    Ok(match path.parent() {
        Some(dir) if !dir.as_os_str().is_empty() => dir.join(tmp),
        _ => PathBuf::from(tmp),
    })
}

/// Writes `bytes` to `path` atomically: temporary file in the same
/// directory, `fsync`, rename over the target. On error the temporary file is
/// removed and an existing target is left as it was.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let tmp = temp_beside(path)?;
    let mut file = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&tmp)
        .map_err(|e| io_err(&tmp, e))?;
    let result = (|| {
        file.write_all(bytes).map_err(|e| io_err(&tmp, e))?;
        file.sync_all().map_err(|e| io_err(&tmp, e))?;
        fs::rename(&tmp, path).map_err(|e| io_err(path, e))
    })();
    drop(file);
    match result {
        Ok(()) => {
            // Make the rename itself durable; a directory that cannot be
            // opened or synced (some file systems) does not undo the write.
            if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
                if let Ok(d) = File::open(dir) {
                    let _ = d.sync_all();
                }
            }
            Ok(())
        }
        Err(e) => {
            let _ = fs::remove_file(&tmp);
            Err(e)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn replaces_whole_file_and_leaves_no_temporary() {
        let dir = std::env::temp_dir().join(format!("chainwell-out-{}", std::process::id()));
        fs::create_dir_all(&dir).unwrap();
        let p = dir.join("a.txt");
        write_atomic(&p, b"first").unwrap();
        write_atomic(&p, b"second").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"second");
        let names: Vec<_> = fs::read_dir(&dir)
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names.len(), 1, "{names:?}");
        // A target in a folder that does not exist fails and creates nothing.
        assert!(write_atomic(&dir.join("missing/b.txt"), b"x").is_err());
        fs::remove_dir_all(&dir).unwrap();
    }
}
