//! Writing files so that they are whole or absent.
//!
//! Every regular file chainwell writes goes to a temporary file in the
//! target's directory, is flushed to disk (`fsync`), and the temporary file
//! is renamed over the target; rename within one file system is atomic on
//! POSIX systems (IEEE Std 1003.1, `rename()`). A reader never sees half a
//! file, and a run that fails leaves an existing file untouched. On any
//! error the temporary file is removed.
//!
//! - A symbolic link is followed to the file it names, and that file is
//!   replaced (in the link target's folder); the link stays a link.
//! - An existing file keeps its permission bits (and, where the system
//!   allows it, its owner and group).
//! - A device or a FIFO (`/dev/null`, `/dev/stdout`, a shell's
//!   `>(gzip > x)`) is not replaced: it is opened and written directly.
//! - [`write_set`] writes several files into one folder as a set: all of
//!   them are written to a temporary folder first, and only when every one
//!   is complete are they moved into place, so a full disk leaves the old
//!   set, not a mixture of old and new.
//! - [`Lock`] keeps two runs from saving to one file at once.

use std::fs::{self, File, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use crate::files::resolve_links;

static COUNTER: AtomicU64 = AtomicU64::new(0);

fn io_err(path: &Path, e: std::io::Error) -> std::io::Error {
    std::io::Error::new(e.kind(), format!("{}: {e}", path.display()))
}

/// The folder of `path` (`.` for a bare name).
fn folder_of(path: &Path) -> PathBuf {
    match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    }
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

/// Writes `bytes` to `path` so that it is whole or absent; see the
/// [module docs](self) for links, devices and permissions. On error an
/// existing target is left as it was and no temporary file remains.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    match fs::metadata(path) {
        Ok(m) if m.is_dir() => Err(std::io::Error::new(
            std::io::ErrorKind::IsADirectory,
            format!("{}: this is a folder", path.display()),
        )),
        Ok(m) if !m.is_file() => write_direct(path, bytes),
        Ok(m) => replace(&resolve_links(path)?, bytes, Some(&m)),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            replace(&resolve_links(path)?, bytes, None)
        }
        Err(e) => Err(io_err(path, e)),
    }
}

/// Writes into a device or FIFO as it is: opened for writing, never
/// created, truncated or replaced.
fn write_direct(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let mut f = OpenOptions::new()
        .write(true)
        .open(path)
        .map_err(|e| io_err(path, e))?;
    f.write_all(bytes).map_err(|e| io_err(path, e))?;
    f.flush().map_err(|e| io_err(path, e))
}

/// Gives the temporary file the permissions (and owner, when allowed) of
/// the file it replaces.
fn keep_metadata(tmp: &Path, old: &fs::Metadata) -> std::io::Result<()> {
    fs::set_permissions(tmp, old.permissions()).map_err(|e| io_err(tmp, e))?;
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        if let Ok(now) = fs::metadata(tmp) {
            if now.uid() != old.uid() || now.gid() != old.gid() {
                // Only the superuser may give a file away; others keep
                // their own ownership, as any editor's save does.
                let _ = std::os::unix::fs::chown(tmp, Some(old.uid()), Some(old.gid()));
            }
        }
    }
    Ok(())
}

/// Writes `bytes` to a temporary file beside `target` with `old`'s
/// permissions and syncs it; returns its name. Removes it on error.
fn write_temp(target: &Path, bytes: &[u8], old: Option<&fs::Metadata>) -> std::io::Result<PathBuf> {
    let tmp = temp_beside(target)?;
    let mut file = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&tmp)
        .map_err(|e| {
            std::io::Error::new(
                e.kind(),
                format!(
                    "{}: cannot make a file in the folder {}: {e}",
                    target.display(),
                    folder_of(target).display()
                ),
            )
        })?;
    let result = (|| {
        file.write_all(bytes).map_err(|e| io_err(&tmp, e))?;
        if let Some(m) = old {
            keep_metadata(&tmp, m)?;
        }
        file.sync_all().map_err(|e| io_err(&tmp, e))
    })();
    drop(file);
    match result {
        Ok(()) => Ok(tmp),
        Err(e) => {
            let _ = fs::remove_file(&tmp);
            Err(e)
        }
    }
}

/// Makes a rename in `dir` durable; a folder that cannot be opened or
/// synced (some file systems) does not undo the write.
fn sync_folder(dir: &Path) {
    if let Ok(d) = File::open(dir) {
        let _ = d.sync_all();
    }
}

/// Replaces the regular file (or the new name) `target` with `bytes`.
fn replace(target: &Path, bytes: &[u8], old: Option<&fs::Metadata>) -> std::io::Result<()> {
    let tmp = write_temp(target, bytes, old)?;
    if let Err(e) = fs::rename(&tmp, target) {
        let _ = fs::remove_file(&tmp);
        return Err(io_err(target, e));
    }
    sync_folder(&folder_of(target));
    Ok(())
}

/// Writes the files `(name, bytes)` into the folder `dir` (made, with its
/// parents, when missing) as a set: all are written and synced in a
/// temporary folder first, then moved into place, so that on any failure
/// while writing, `dir` is left exactly as it was. A missing `dir` appears
/// whole, by one rename of the temporary folder. A name in `dir` that is a
/// link, a device or a FIFO is written through [`write_atomic`] after the
/// others.
pub fn write_set(dir: &Path, files: &[(&str, &[u8])]) -> std::io::Result<()> {
    let k = COUNTER.fetch_add(1, Ordering::Relaxed);
    let exists = match fs::metadata(dir) {
        Ok(m) if m.is_dir() => true,
        Ok(_) => {
            return Err(std::io::Error::new(
                std::io::ErrorKind::NotADirectory,
                format!("{}: this is a file, not a folder", dir.display()),
            ))
        }
        Err(_) => false,
    };
    if exists {
        for (name, _) in files {
            if fs::metadata(dir.join(name)).is_ok_and(|m| m.is_dir()) {
                return Err(std::io::Error::new(
                    std::io::ErrorKind::IsADirectory,
                    format!("{}: this is a folder", dir.join(name).display()),
                ));
            }
        }
    }
    let stage = if exists {
        dir.join(format!(".chainwell-set-{}-{k}", std::process::id()))
    } else {
        let parent = folder_of(dir);
        fs::create_dir_all(&parent).map_err(|e| io_err(&parent, e))?;
        let name = dir
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| "set".into());
        parent.join(format!(".{name}.tmp-{}-{k}", std::process::id()))
    };
    fs::create_dir(&stage).map_err(|e| io_err(&stage, e))?;
    let cleanup = |e: std::io::Error| {
        let _ = fs::remove_dir_all(&stage);
        e
    };
    // Names that are links or special files are not replaced by a rename.
    let direct = |name: &str| {
        exists
            && fs::symlink_metadata(dir.join(name))
                .is_ok_and(|m| m.file_type().is_symlink() || !(m.is_file() || m.is_dir()))
    };
    for (name, bytes) in files {
        if direct(name) {
            continue;
        }
        let target = stage.join(name);
        let old = fs::metadata(dir.join(name)).ok().filter(|m| m.is_file());
        let tmp = write_temp(&target, bytes, old.as_ref()).map_err(cleanup)?;
        fs::rename(&tmp, &target)
            .map_err(|e| io_err(&target, e))
            .map_err(cleanup)?;
    }
    if !exists {
        sync_folder(&stage);
        fs::rename(&stage, dir)
            .map_err(|e| io_err(dir, e))
            .map_err(cleanup)?;
        sync_folder(&folder_of(dir));
        return Ok(());
    }
    for (name, _) in files {
        if direct(name) {
            continue;
        }
        fs::rename(stage.join(name), dir.join(name))
            .map_err(|e| io_err(&dir.join(name), e))
            .map_err(cleanup)?;
    }
    let _ = fs::remove_dir(&stage);
    sync_folder(dir);
    for (name, bytes) in files {
        if direct(name) {
            write_atomic(&dir.join(name), bytes)?;
        }
    }
    Ok(())
}

/// A lock on a file that a run keeps saving to: the file `FILE.lock`
/// beside it, made with `create_new` (so exactly one run can make it) and
/// holding the process id; removed when the lock is dropped.
#[derive(Debug)]
pub struct Lock {
    path: Option<PathBuf>,
}

impl Lock {
    /// Takes the lock of `target` (links followed, so that two names of one
    /// file share one lock). Errors: another run holds it (the message
    /// names the lock file and says how to clear a stale one), or the lock
    /// file cannot be made.
    pub fn acquire(target: &Path) -> Result<Self, String> {
        // A device or FIFO is written directly, and its folder (`/dev`) is
        // no place for a lock file.
        if fs::metadata(target).is_ok_and(|m| !m.is_file()) {
            return Ok(Self { path: None });
        }
        let real = resolve_links(target).unwrap_or_else(|_| target.to_path_buf());
        let mut name = real
            .file_name()
            .map(|n| n.to_os_string())
            .unwrap_or_default();
        name.push(".lock");
        let path = real.with_file_name(name);
        match OpenOptions::new().write(true).create_new(true).open(&path) {
            Ok(mut f) => {
                let _ = writeln!(f, "{}", std::process::id());
                Ok(Self { path: Some(path) })
            }
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
                let holder = fs::read_to_string(&path)
                    .ok()
                    .and_then(|t| t.trim().parse::<u32>().ok())
                    .map(|p| format!(" (process {p})"))
                    .unwrap_or_default();
                Err(format!(
                    "{}: another run{holder} is saving to this file (its lock {} exists); wait for it, or save elsewhere; if no run is left, remove the lock file",
                    target.display(),
                    path.display()
                ))
            }
            Err(e) => Err(format!(
                "{}: cannot make the lock file {}: {e}",
                target.display(),
                path.display()
            )),
        }
    }

    /// The lock file (none for a device or FIFO).
    pub fn path(&self) -> Option<&Path> {
        self.path.as_deref()
    }
}

impl Drop for Lock {
    fn drop(&mut self) {
        if let Some(p) = &self.path {
            let _ = fs::remove_file(p);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("chainwell-out-{tag}-{}", std::process::id()));
        let _ = fs::remove_dir_all(&d);
        fs::create_dir_all(&d).unwrap();
        d
    }

    fn names(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    #[test]
    fn replaces_whole_file_and_leaves_no_temporary() {
        let dir = scratch("whole");
        let p = dir.join("a.txt");
        write_atomic(&p, b"first").unwrap();
        write_atomic(&p, b"second").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"second");
        assert_eq!(names(&dir), vec!["a.txt"]);
        // A target in a folder that does not exist fails and creates nothing.
        assert!(write_atomic(&dir.join("missing/b.txt"), b"x").is_err());
        fs::remove_dir_all(&dir).unwrap();
    }

    #[cfg(unix)]
    #[test]
    fn links_are_followed_and_permissions_kept() {
        use std::os::unix::fs::PermissionsExt;
        let dir = scratch("links");
        fs::create_dir(dir.join("real")).unwrap();
        let target = dir.join("real/fig.svg");
        fs::write(&target, b"old").unwrap();
        fs::set_permissions(&target, fs::Permissions::from_mode(0o600)).unwrap();
        let link = dir.join("link.svg");
        std::os::unix::fs::symlink("real/fig.svg", &link).unwrap();
        write_atomic(&link, b"new").unwrap();
        assert!(fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink());
        assert_eq!(fs::read(&target).unwrap(), b"new");
        let mode = fs::metadata(&target).unwrap().permissions().mode() & 0o777;
        assert_eq!(mode, 0o600);
        assert_eq!(names(&dir.join("real")), vec!["fig.svg"]);
        // A dangling link makes its target.
        std::os::unix::fs::symlink("real/new.csv", dir.join("dangling.csv")).unwrap();
        write_atomic(&dir.join("dangling.csv"), b"made").unwrap();
        assert_eq!(fs::read(dir.join("real/new.csv")).unwrap(), b"made");
        // A device is written, not replaced.
        write_atomic(Path::new("/dev/null"), b"gone").unwrap();
        assert!(!fs::metadata("/dev/null").unwrap().is_file());
        fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn a_set_is_written_whole_into_new_and_existing_folders() {
        let root = scratch("set");
        let dir = root.join("out");
        write_set(&dir, &[("a.csv", b"1"), ("b.csv", b"2")]).unwrap();
        assert_eq!(names(&dir), vec!["a.csv", "b.csv"]);
        assert_eq!(names(&root), vec!["out"]);
        fs::write(dir.join("keep.txt"), b"mine").unwrap();
        write_set(&dir, &[("a.csv", b"3"), ("b.csv", b"4")]).unwrap();
        assert_eq!(fs::read(dir.join("a.csv")).unwrap(), b"3");
        assert_eq!(fs::read(dir.join("b.csv")).unwrap(), b"4");
        assert_eq!(names(&dir), vec!["a.csv", "b.csv", "keep.txt"]);
        // A name that cannot be written (a folder is in the way) fails
        // before any file of the set is replaced.
        fs::create_dir(dir.join("c.csv")).unwrap();
        fs::write(dir.join("c.csv/x"), b"").unwrap();
        assert!(write_set(&dir, &[("a.csv", b"5"), ("c.csv", b"6")]).is_err());
        assert_eq!(fs::read(dir.join("a.csv")).unwrap(), b"3");
        assert_eq!(names(&dir), vec!["a.csv", "b.csv", "c.csv", "keep.txt"]);
        fs::remove_dir_all(&root).unwrap();
    }

    #[test]
    fn a_lock_is_held_once_and_removed_on_drop() {
        let dir = scratch("lock");
        let file = dir.join("s.json");
        let lock = Lock::acquire(&file).unwrap();
        assert!(lock.path().unwrap().exists());
        assert!(Lock::acquire(Path::new("/dev/null"))
            .unwrap()
            .path()
            .is_none());
        let e = Lock::acquire(&file).unwrap_err();
        assert!(
            e.contains("another run") && e.contains("s.json.lock"),
            "{e}"
        );
        drop(lock);
        assert!(names(&dir).is_empty());
        assert!(Lock::acquire(&file).is_ok());
        fs::remove_dir_all(&dir).unwrap();
    }
}
