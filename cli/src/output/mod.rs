//! Output files: HDF5 ([`h5`]) and CSV ([`csv`]) writers that know nothing of the solver.
//!
//! Both writers follow one rule: nothing partial is left behind. They write to a hidden
//! temporary file in the destination folder (`.<name>.tmp-<pid>`) and rename it over the
//! destination only in `finish()`; a writer dropped without `finish()` (an error, a panic,
//! Ctrl-C handled as an early return) deletes its temporary file. Renaming within one
//! folder is atomic on POSIX file systems, so a reader sees either the old file or the
//! complete new one.

pub mod csv;
pub mod envelope;
pub mod events;
pub mod h5;
pub mod relay;
pub mod schema;
pub mod sink;

use std::path::{Path, PathBuf};

/// A failure while writing an output file. The caller adds which file and why it was
/// being written.
#[derive(Debug, thiserror::Error)]
pub enum OutputError {
    /// A file-system operation failed.
    #[error("{}: {source}", path.display())]
    Io {
        /// The file or folder concerned.
        path: PathBuf,
        /// The underlying error.
        #[source]
        source: std::io::Error,
    },
    /// The HDF5 library could not create the file.
    #[error("{}: {source}", path.display())]
    Hdf5File {
        /// The (temporary) file path.
        path: PathBuf,
        /// The underlying error.
        #[source]
        source: hdf5::Error,
    },
    /// The HDF5 library refused an operation on an object.
    #[error("HDF5 object {object}: {source}")]
    Hdf5 {
        /// Path of the object inside the file (`/series/time`).
        object: String,
        /// The underlying error.
        #[source]
        source: hdf5::Error,
    },
    /// A row had the wrong number of values.
    #[error("{object}: a row needs {expected} values, got {got}")]
    RowLength {
        /// Dataset path or file name.
        object: String,
        /// Number of columns.
        expected: usize,
        /// Number of values given.
        got: usize,
    },
    /// A write after `finish()`.
    #[error("{object}: the output file was already finished")]
    Finished {
        /// Dataset path or file name.
        object: String,
    },
    /// An argument that cannot be written (empty path, zero chunk, NUL in a string).
    #[error("{object}: {message}")]
    Invalid {
        /// Dataset path or file name.
        object: String,
        /// What is wrong.
        message: String,
    },
}

/// The hidden temporary file behind a destination path. Deleted on drop unless committed.
#[derive(Debug)]
pub(crate) struct TempTarget {
    tmp: PathBuf,
    dest: PathBuf,
    committed: bool,
}

impl TempTarget {
    /// Names the temporary file `.<name>.tmp-<pid>` beside `dest`. Creates nothing.
    pub(crate) fn new(dest: &Path) -> Result<Self, OutputError> {
        let name = dest.file_name().ok_or_else(|| OutputError::Invalid {
            object: dest.display().to_string(),
            message: "output path has no file name".to_owned(),
        })?;
        let mut tmp_name = std::ffi::OsString::from(".");
        tmp_name.push(name);
        tmp_name.push(format!(".tmp-{}", std::process::id()));
        let tmp = dest.with_file_name(tmp_name);
        remove_stale(dest);
        Ok(Self {
            tmp,
            dest: dest.to_path_buf(),
            committed: false,
        })
    }

    /// The temporary path to write to.
    pub(crate) fn tmp(&self) -> &Path {
        &self.tmp
    }

    /// The final path.
    pub(crate) fn dest(&self) -> &Path {
        &self.dest
    }

    /// Syncs the finished temporary file to disk and renames it over the destination.
    pub(crate) fn commit(&mut self) -> Result<(), OutputError> {
        let io = |path: &Path| {
            let path = path.to_path_buf();
            move |source| OutputError::Io { path, source }
        };
        std::fs::File::open(&self.tmp)
            .and_then(|f| f.sync_all())
            .map_err(io(&self.tmp))?;
        std::fs::rename(&self.tmp, &self.dest).map_err(io(&self.dest))?;
        self.committed = true;
        Ok(())
    }
}

/// Removes temporary files of `dest` left by processes that no longer run (killed before
/// they could clean up), and one of this process's id (a leftover of an earlier process
/// that had the same id). Only regular files named exactly `.<name>.tmp-<number>` beside
/// `dest` are touched; whether a process runs is known on Linux only (`/proc`), elsewhere
/// only this process's own name is cleaned. Errors are ignored: a leftover is harmless.
fn remove_stale(dest: &Path) {
    let (Some(name), dir) = (dest.file_name(), dest.parent()) else {
        return;
    };
    let dir = dir
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let prefix = format!(".{}.tmp-", name.to_string_lossy());
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    let me = std::process::id();
    for e in entries.flatten() {
        let file_name = e.file_name();
        let Some(pid) = file_name
            .to_str()
            .and_then(|n| n.strip_prefix(&prefix))
            .and_then(|p| p.parse::<u32>().ok())
        else {
            continue;
        };
        let gone = pid == me
            || (cfg!(target_os = "linux")
                && Path::new("/proc/self").exists()
                && !Path::new(&format!("/proc/{pid}")).exists());
        if gone && e.file_type().is_ok_and(|t| t.is_file()) {
            let _ = std::fs::remove_file(e.path());
        }
    }
}

impl Drop for TempTarget {
    fn drop(&mut self) {
        if !self.committed {
            // Nothing to report to: the run is already failing or was abandoned.
            let _ = std::fs::remove_file(&self.tmp);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temp_target_names_hidden_file_beside_destination() {
        let t = TempTarget::new(Path::new("out/demo.h5")).unwrap();
        let expected = format!("out/.demo.h5.tmp-{}", std::process::id());
        assert_eq!(t.tmp(), Path::new(&expected));
        assert_eq!(t.dest(), Path::new("out/demo.h5"));
        let bare = TempTarget::new(Path::new("demo.csv")).unwrap();
        assert_eq!(
            bare.tmp(),
            Path::new(&format!(".demo.csv.tmp-{}", std::process::id()))
        );
    }

    #[test]
    fn stale_temporary_files_of_dead_processes_are_removed() {
        let dir = tempfile::tempdir().unwrap();
        let dest = dir.path().join("r.h5");
        // A process id above the Linux maximum (2^22) never runs.
        let dead = dir.path().join(".r.h5.tmp-4194305");
        let mine = dir.path().join(format!(".r.h5.tmp-{}", std::process::id()));
        let live = dir.path().join(".r.h5.tmp-1"); // init always runs
        let other = dir.path().join(".s.h5.tmp-4194305");
        for p in [&dead, &mine, &live, &other] {
            std::fs::write(p, "x").unwrap();
        }
        let _t = TempTarget::new(&dest).unwrap();
        assert!(!mine.exists());
        assert!(other.exists() && live.exists());
        if cfg!(target_os = "linux") {
            assert!(!dead.exists());
        }
    }

    #[test]
    fn temp_target_rejects_path_without_file_name() {
        assert!(matches!(
            TempTarget::new(Path::new("out/..")),
            Err(OutputError::Invalid { .. })
        ));
    }

    #[test]
    fn temp_target_commit_renames_and_drop_removes() {
        let dir = tempfile::tempdir().unwrap();
        let dest = dir.path().join("a.txt");
        let mut t = TempTarget::new(&dest).unwrap();
        std::fs::write(t.tmp(), "x").unwrap();
        t.commit().unwrap();
        drop(t);
        assert_eq!(std::fs::read_to_string(&dest).unwrap(), "x");

        let t = TempTarget::new(&dir.path().join("b.txt")).unwrap();
        std::fs::write(t.tmp(), "y").unwrap();
        drop(t);
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names, ["a.txt"]);
    }
}
