//! The files a run reads and writes: read with a size cap from regular
//! files only, and an output never one of the run's inputs.
//!
//! - [`read_capped`] reads a whole file of at most [`READ_LIMIT_BYTES`]
//!   bytes. It looks at what the path names before opening it: a folder,
//!   a FIFO, a device or a socket is refused, so that `/dev/zero` is not
//!   read until memory runs out and a FIFO with no writer does not block
//!   the run forever. The read itself goes through `take(limit + 1)`, so a
//!   file that grows while it is read is refused too.
//! - [`RunFiles`] collects a run's inputs (the input file, the tables it
//!   reads, `--data`, `--resume`, the parts of a merge) and outputs
//!   (`--save`, `--csv`, `--plot`, ...) and refuses an output that is one
//!   of the inputs, compared by device and inode after following symbolic
//!   links (so a link or a hard link to the input is caught as well), and
//!   two outputs that name the same file.
//! - [`check_output`] and [`check_output_dir`] find an output that cannot
//!   be written (a missing or read-only folder, a folder where a file is
//!   wanted) before anything is computed.

use std::fs;
use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

/// The largest file chainwell reads: 256 MiB. An input, a table or a
/// measured series is a few kilobytes; a sweep document of the largest
/// grid of cases (100 000) with ten levels each is about 100 MiB.
pub const READ_LIMIT_BYTES: u64 = 256 * 1024 * 1024;

/// Why a file could not be read. The messages leave the path out: the
/// caller names the file (and the flag or key that gave it).
#[derive(Debug, thiserror::Error)]
pub enum ReadError {
    /// Nothing is there.
    #[error("no such file")]
    NotFound,
    /// The path names something other than a regular file.
    #[error("{0}, not a regular file; chainwell reads its inputs from regular files only")]
    NotAFile(&'static str),
    /// The file is larger than [`READ_LIMIT_BYTES`].
    #[error("the file is larger than {} MiB, the most chainwell reads", .0 / (1024 * 1024))]
    TooLarge(u64),
    /// Any other failure of the system.
    #[error("{0}")]
    Io(std::io::Error),
}

impl ReadError {
    fn from_io(e: std::io::Error) -> Self {
        if e.kind() == std::io::ErrorKind::NotFound {
            ReadError::NotFound
        } else {
            ReadError::Io(e)
        }
    }
}

/// What a path names, in words, when it is not a regular file or a folder.
fn special_kind(file_type: &fs::FileType) -> Option<&'static str> {
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if file_type.is_fifo() {
            return Some("a FIFO (named pipe)");
        }
        if file_type.is_char_device() {
            return Some("a character device");
        }
        if file_type.is_block_device() {
            return Some("a block device");
        }
        if file_type.is_socket() {
            return Some("a socket");
        }
    }
    (!file_type.is_file() && !file_type.is_dir()).then_some("not a regular file")
}

/// Reads the regular file at `path` (symbolic links followed), refusing
/// anything else and anything larger than [`READ_LIMIT_BYTES`]; see the
/// [module docs](self).
pub fn read_capped(path: &Path) -> Result<Vec<u8>, ReadError> {
    read_capped_with(path, READ_LIMIT_BYTES)
}

/// [`read_capped`] with another limit, for tests.
pub fn read_capped_with(path: &Path, limit: u64) -> Result<Vec<u8>, ReadError> {
    let meta = fs::metadata(path).map_err(ReadError::from_io)?;
    let file_type = meta.file_type();
    if file_type.is_dir() {
        return Err(ReadError::NotAFile("a folder"));
    }
    if let Some(kind) = special_kind(&file_type) {
        return Err(ReadError::NotAFile(kind));
    }
    if meta.len() > limit {
        return Err(ReadError::TooLarge(limit));
    }
    let file = fs::File::open(path).map_err(ReadError::from_io)?;
    let mut bytes = Vec::with_capacity(meta.len() as usize);
    file.take(limit + 1)
        .read_to_end(&mut bytes)
        .map_err(ReadError::Io)?;
    if bytes.len() as u64 > limit {
        return Err(ReadError::TooLarge(limit));
    }
    Ok(bytes)
}

/// Whether `a` and `b` name the same existing file (symbolic links
/// followed; hard links are the same file).
pub fn same_file(a: &Path, b: &Path) -> bool {
    matches!((identity(a), identity(b)), (Some(x), Some(y)) if x == y)
}

/// Device and inode of an existing file (symbolic links followed).
fn identity(path: &Path) -> Option<(u64, u64)> {
    let meta = fs::metadata(path).ok()?;
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        Some((meta.dev(), meta.ino()))
    }
    #[cfg(not(unix))]
    {
        let _ = meta;
        fs::canonicalize(path)
            .ok()
            .map(|p| (0, fnv1a64(p.to_string_lossy().as_bytes())))
    }
}

/// Where an output lands: the identity of an existing file, or the
/// canonical folder and the name of one still to be made.
#[derive(Debug, PartialEq)]
enum Place {
    Existing((u64, u64)),
    New(PathBuf),
}

fn place(path: &Path) -> Option<Place> {
    if let Some(id) = identity(path) {
        return Some(Place::Existing(id));
    }
    let name = path.file_name()?;
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    Some(Place::New(fs::canonicalize(dir).ok()?.join(name)))
}

/// Whether `path` names a regular file or nothing yet (an output that is
/// replaced as a whole), rather than a device or a FIFO (written directly,
/// where two outputs may well share one, such as `/dev/null`).
fn replaceable(path: &Path) -> bool {
    fs::metadata(path).map_or(true, |m| m.is_file())
}

/// A run's inputs and outputs, each with the flag (or role) that gave it;
/// see the [module docs](self).
#[derive(Debug, Default, Clone)]
pub struct RunFiles {
    inputs: Vec<(String, PathBuf)>,
    outputs: Vec<(String, PathBuf)>,
}

impl RunFiles {
    /// No files yet.
    pub fn new() -> Self {
        Self::default()
    }

    /// Adds an input, named in messages as `role` (`"the input file"`,
    /// `"--data"`, ...).
    pub fn input(&mut self, role: impl Into<String>, path: &Path) -> &mut Self {
        self.inputs.push((role.into(), path.to_path_buf()));
        self
    }

    /// Adds an output, named in messages as `role` (`"--csv"`, ...).
    pub fn output(&mut self, role: impl Into<String>, path: &Path) -> &mut Self {
        self.outputs.push((role.into(), path.to_path_buf()));
        self
    }

    /// Refuses an output that is one of the inputs, and two outputs that
    /// are one file; the message names both flags and the paths as given.
    pub fn check(&self) -> Result<(), String> {
        for (i, (role, out)) in self.outputs.iter().enumerate() {
            for (in_role, input) in &self.inputs {
                if same_file(out, input) {
                    return Err(format!(
                        "{role} {}: this file is {in_role} ({}); an output never replaces an input of its run, choose another name",
                        out.display(),
                        input.display()
                    ));
                }
            }
            if !replaceable(out) {
                continue;
            }
            let Some(here) = place(out) else { continue };
            for (other_role, other) in &self.outputs[..i] {
                if replaceable(other) && place(other).as_ref() == Some(&here) {
                    return Err(format!(
                        "{role} {}: {other_role} {} writes the same file; give each output its own name",
                        out.display(),
                        other.display()
                    ));
                }
            }
        }
        Ok(())
    }
}

static PROBES: AtomicU64 = AtomicU64::new(0);

/// Whether a file can be made in the folder `dir`: a probe file is made
/// there (never replacing anything) and removed at once. This asks the
/// file system itself, so read-only mounts and access rules are seen as
/// the real write will see them.
fn probe_folder(dir: &Path) -> Result<(), String> {
    let k = PROBES.fetch_add(1, Ordering::Relaxed);
    let probe = dir.join(format!(".chainwell-probe-{}-{k}", std::process::id()));
    match fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&probe)
    {
        Ok(f) => {
            drop(f);
            let _ = fs::remove_file(&probe);
            Ok(())
        }
        Err(e) => Err(format!("cannot write into the folder {}: {e}", shown(dir))),
    }
}

fn shown(dir: &Path) -> String {
    if dir.as_os_str().is_empty() {
        ".".into()
    } else {
        dir.display().to_string()
    }
}

/// Checks, before any work, that the file `path` can be written: an
/// existing regular file (or a link to one) in a folder where files can be
/// made, a device or FIFO (written directly), or a new name in an existing
/// folder where files can be made. The error names `role` and the path as
/// given.
pub fn check_output(role: &str, path: &Path) -> Result<(), String> {
    let fail = |m: String| Err(format!("{role} {}: {m}", path.display()));
    if path.as_os_str().is_empty() || path.file_name().is_none() {
        return fail("the path names no file".into());
    }
    match fs::metadata(path) {
        Ok(m) if m.is_dir() => return fail("this is a folder; give a file name".into()),
        Ok(m) if !m.is_file() => return Ok(()),
        _ => {}
    }
    let target = resolve_links(path).unwrap_or_else(|_| path.to_path_buf());
    let dir = match target.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    match fs::metadata(&dir) {
        Ok(m) if m.is_dir() => {}
        Ok(_) => return fail(format!("{} is not a folder", shown(&dir))),
        Err(_) => return fail(format!("the folder {} does not exist", shown(&dir))),
    }
    probe_folder(&dir).or_else(fail)
}

/// Checks, before any work, that a set of files can be written into the
/// folder `dir`: an existing folder where files can be made, or a new one
/// whose nearest existing ancestor is such a folder.
pub fn check_output_dir(role: &str, dir: &Path) -> Result<(), String> {
    let fail = |m: String| Err(format!("{role} {}: {m}", dir.display()));
    match fs::metadata(dir) {
        Ok(m) if m.is_dir() => return probe_folder(dir).or_else(fail),
        Ok(_) => return fail("this is a file, not a folder".into()),
        Err(_) => {}
    }
    let mut up = dir.parent();
    while let Some(d) = up {
        let d = if d.as_os_str().is_empty() {
            Path::new(".")
        } else {
            d
        };
        match fs::metadata(d) {
            Ok(m) if m.is_dir() => return probe_folder(d).or_else(fail),
            Ok(_) => return fail(format!("{} is a file, not a folder", d.display())),
            Err(_) => up = d.parent(),
        }
    }
    Ok(())
}

/// The file a chain of symbolic links ends at (the path itself when it is
/// not a link); the end need not exist. Relative links are read from the
/// link's own folder. Refuses more than 40 links (the Linux limit).
pub fn resolve_links(path: &Path) -> std::io::Result<PathBuf> {
    let mut p = path.to_path_buf();
    for _ in 0..40 {
        match fs::symlink_metadata(&p) {
            Ok(m) if m.file_type().is_symlink() => {
                let target = fs::read_link(&p)?;
                p = if target.is_absolute() {
                    target
                } else {
                    match p.parent() {
                        Some(d) => d.join(target),
                        None => target,
                    }
                };
            }
            _ => return Ok(p),
        }
    }
    Err(std::io::Error::other(format!(
        "{}: too many levels of symbolic links",
        path.display()
    )))
}

/// The 64-bit FNV-1a hash of `bytes` (G. Fowler, L. C. Noll, K.-P. Vo;
/// the parameters of IETF draft-eastlake-fnv): an identity for texts, not a
/// protection against forgery.
pub fn fnv1a64(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("chainwell-files-{tag}-{}", std::process::id()));
        let _ = fs::remove_dir_all(&d);
        fs::create_dir_all(&d).unwrap();
        d
    }

    #[test]
    fn fnv1a64_matches_the_published_test_vectors() {
        // The empty text gives the offset basis (draft-eastlake-fnv, sec. 2);
        // "a" and "foobar" are test vectors of the same draft, from memory.
        assert_eq!(fnv1a64(b""), 0xcbf2_9ce4_8422_2325);
        assert_eq!(fnv1a64(b"a"), 0xaf63_dc4c_8601_ec8c);
        assert_eq!(fnv1a64(b"foobar"), 0x8594_4171_f739_67e8);
    }

    #[test]
    fn reads_are_capped_and_only_from_regular_files() {
        let d = scratch("read");
        let p = d.join("a.txt");
        fs::write(&p, b"0123456789").unwrap();
        assert_eq!(read_capped_with(&p, 10).unwrap(), b"0123456789");
        assert!(matches!(
            read_capped_with(&p, 9),
            Err(ReadError::TooLarge(9))
        ));
        assert!(matches!(
            read_capped(&d),
            Err(ReadError::NotAFile("a folder"))
        ));
        assert!(matches!(
            read_capped(&d.join("none")),
            Err(ReadError::NotFound)
        ));
        #[cfg(unix)]
        {
            let e = read_capped(Path::new("/dev/zero")).unwrap_err();
            assert!(e.to_string().contains("character device"), "{e}");
        }
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn an_output_that_is_an_input_is_refused_through_links() {
        let d = scratch("same");
        let input = d.join("in.toml");
        fs::write(&input, b"x").unwrap();
        let mut files = RunFiles::new();
        files
            .input("the input file", &input)
            .output("--csv", &d.join("out.csv"));
        assert!(files.check().is_ok());
        files.output("--save", &d.join(".").join("in.toml"));
        let e = files.check().unwrap_err();
        assert!(
            e.starts_with("--save ") && e.contains("the input file"),
            "{e}"
        );
        #[cfg(unix)]
        {
            let link = d.join("link.toml");
            std::os::unix::fs::symlink(&input, &link).unwrap();
            let mut files = RunFiles::new();
            files
                .input("the input file", &input)
                .output("--plot", &link);
            assert!(files.check().is_err());
        }
        // Two outputs naming one new file.
        let mut files = RunFiles::new();
        files
            .output("--csv", &d.join("new.csv"))
            .output("--save", &d.join("new.csv"));
        let e = files.check().unwrap_err();
        assert!(e.contains("--csv") && e.contains("--save"), "{e}");
        // Devices may be shared.
        let mut files = RunFiles::new();
        files
            .output("--csv", Path::new("/dev/null"))
            .output("--save", Path::new("/dev/null"));
        assert!(files.check().is_ok());
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn outputs_in_missing_folders_are_found_before_work() {
        let d = scratch("out");
        let e = check_output("--plot", &d.join("nodir/x.png")).unwrap_err();
        assert!(
            e.starts_with("--plot ") && e.contains("does not exist"),
            "{e}"
        );
        assert!(check_output("--csv", &d.join("x.csv")).is_ok());
        assert!(check_output("--csv", &d).unwrap_err().contains("folder"));
        assert!(check_output_dir("--csv", &d.join("a/b")).is_ok());
        fs::write(d.join("f"), b"").unwrap();
        assert!(check_output_dir("--csv", &d.join("f")).is_err());
        // No probe is left behind.
        let names: Vec<_> = fs::read_dir(&d)
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names.len(), 1, "{names:?}");
        fs::remove_dir_all(&d).unwrap();
    }
}
