//! What every long study shares: stopping when asked (Ctrl-C), reporting
//! progress, and keeping a checkpoint of the work done so far.
//!
//! A study polls [`Runner::stopped`] before each unit of work (a sweep case,
//! a fit evaluation) and starts no new one once it is set, finishing with
//! what is done; it calls [`Runner::progress`] after each unit; and it offers
//! its state to [`Runner::save`], which writes the checkpoint file through a
//! [`Saver`] (whole files only, at most every few seconds) with a rendering
//! the caller chose. A failed checkpoint write does not stop the study: the
//! first such failure is kept for the caller to report
//! ([`Runner::save_error`]).

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Mutex;

use super::checkpoint::Saver;

/// A progress callback: `(finished, total)` units of work.
pub type Progress<'a> = &'a (dyn Fn(usize, usize) + Sync);

/// Renders a study's state as the text of its checkpoint file.
pub type Render<'a, T> = &'a (dyn Fn(&T) -> String + Sync);

/// Stop flag, progress callback and checkpoint of one run of a study whose
/// state is a `T`.
pub struct Runner<'a, T> {
    stop: Option<&'a AtomicBool>,
    progress: Option<Progress<'a>>,
    checkpoint: Option<(&'a Saver, Render<'a, T>)>,
    save_error: Mutex<Option<String>>,
}

impl<T> Default for Runner<'_, T> {
    fn default() -> Self {
        Self {
            stop: None,
            progress: None,
            checkpoint: None,
            save_error: Mutex::new(None),
        }
    }
}

impl<'a, T> Runner<'a, T> {
    /// A runner that never stops, reports nothing and keeps no checkpoint.
    pub fn new() -> Self {
        Self::default()
    }

    /// Stops the study (no new unit of work) once `flag` is set.
    pub fn with_stop(mut self, flag: &'a AtomicBool) -> Self {
        self.stop = Some(flag);
        self
    }

    /// Calls `f(finished, total)` after each unit of work.
    pub fn with_progress(mut self, f: Progress<'a>) -> Self {
        self.progress = Some(f);
        self
    }

    /// Keeps a checkpoint: `render` turns the state into the file's text,
    /// `saver` writes it.
    pub fn with_checkpoint(mut self, saver: &'a Saver, render: Render<'a, T>) -> Self {
        self.checkpoint = Some((saver, render));
        self
    }

    /// Whether the study should start no new unit of work.
    pub fn stopped(&self) -> bool {
        self.stop.is_some_and(|s| s.load(Ordering::SeqCst))
    }

    /// The stop flag, for kernels that poll it themselves.
    pub fn stop_flag(&self) -> Option<&'a AtomicBool> {
        self.stop
    }

    /// Reports `finished` of `total` units done.
    pub fn progress(&self, finished: usize, total: usize) {
        if let Some(f) = self.progress {
            f(finished, total);
        }
    }

    /// Offers the state to the checkpoint: `state` is made (and written)
    /// only when a write is due, or always with `force`. A failed write is
    /// remembered, not returned.
    pub fn save(&self, force: bool, state: impl FnOnce() -> T) {
        let Some((saver, render)) = &self.checkpoint else {
            return;
        };
        if let Err(e) = saver.save(force, || render(&state())) {
            let mut slot = self.save_error.lock().unwrap_or_else(|p| p.into_inner());
            slot.get_or_insert_with(|| format!("cannot write {}: {e}", saver.path().display()));
        }
    }

    /// The first failed checkpoint write, if any.
    pub fn save_error(&self) -> Option<String> {
        self.save_error
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .clone()
    }

    /// The checkpoint file, if one is kept.
    pub fn checkpoint_path(&self) -> Option<&std::path::Path> {
        self.checkpoint.as_ref().map(|(s, _)| s.path())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::time::Duration;

    #[test]
    fn a_runner_stops_reports_and_saves_what_it_is_given() {
        let dir = std::env::temp_dir().join(format!("chainwell-runner-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("state.txt");
        let saver = Saver::new(&path, Duration::from_secs(3600));
        let render = |n: &usize| format!("{n} done");
        let flag = AtomicBool::new(false);
        let seen = Mutex::new(Vec::new());
        let progress = |a: usize, b: usize| seen.lock().unwrap().push((a, b));
        let runner = Runner::new()
            .with_stop(&flag)
            .with_progress(&progress)
            .with_checkpoint(&saver, &render);
        assert!(!runner.stopped());
        runner.progress(1, 3);
        runner.save(false, || 1);
        // Not due yet: the second state is not even made.
        runner.save(false, || unreachable!());
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "1 done");
        runner.save(true, || 3);
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "3 done");
        flag.store(true, Ordering::SeqCst);
        assert!(runner.stopped());
        assert_eq!(*seen.lock().unwrap(), vec![(1, 3)]);
        assert!(runner.save_error().is_none());
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn a_failed_checkpoint_write_is_kept_not_thrown() {
        let saver = Saver::new(
            std::path::Path::new("/nonexistent-folder-of-chainwell/x.json"),
            Duration::ZERO,
        );
        let render = |n: &usize| n.to_string();
        let runner = Runner::new().with_checkpoint(&saver, &render);
        runner.save(true, || 1);
        let e = runner.save_error().expect("the write fails");
        assert!(e.contains("nonexistent-folder-of-chainwell"), "{e}");
    }
}
