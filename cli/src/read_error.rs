//! The one error of reading a boreflux file back: a run's result file (`report`) or a sweep
//! table (`merge`, `report`). Every variant names the object concerned; the caller adds
//! the file's path. Each maps to an exit code of docs/formats.md ("Exit codes") through
//! [`ReadError::exit_code`].

/// What kind of file was expected.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileKind {
    /// An HDF5 file written by `boreflux run`.
    Run,
    /// A sweep table written by `boreflux sweep` or `merge`.
    SweepTable,
}

impl std::fmt::Display for FileKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            FileKind::Run => "result file",
            FileKind::SweepTable => "sweep table",
        })
    }
}

/// Why a file could not be read.
#[derive(Debug, thiserror::Error)]
pub enum ReadError {
    /// The path names no file.
    #[error("no such file")]
    Missing,
    /// The file is not HDF5 at all.
    #[error("not a boreflux {kind} (cannot open it as HDF5: {source})")]
    NotHdf5 {
        /// What was expected.
        kind: FileKind,
        /// The HDF5 library's reason.
        #[source]
        source: hdf5::Error,
    },
    /// HDF5, but not one boreflux wrote: it lacks the object every such file has.
    #[error("not a boreflux {kind} ({lacks})")]
    NotOurs {
        /// What was expected.
        kind: FileKind,
        /// What is missing or wrong (`no /series/time`).
        lacks: String,
    },
    /// A dataset the layout requires is missing.
    #[error("missing dataset {object}")]
    MissingDataset {
        /// Its path (`/series/face_flux`).
        object: String,
    },
    /// A group the layout requires is missing.
    #[error("missing group {object}{hint}")]
    MissingGroup {
        /// Its path.
        object: String,
        /// Why it may be missing, with a leading space, or empty.
        hint: &'static str,
    },
    /// A dataset has another unit than the layout says.
    #[error("{object} has units \"{found}\", the report expects \"{expected}\"")]
    WrongUnits {
        /// The dataset.
        object: String,
        /// Its `units` attribute.
        found: String,
        /// The schema's unit.
        expected: String,
    },
    /// A dataset's length disagrees with the one it goes with.
    #[error("{object} has {found} values but {reference} has {expected}")]
    Length {
        /// The dataset.
        object: String,
        /// Its length.
        found: usize,
        /// The dataset it must match.
        reference: String,
        /// That one's length.
        expected: usize,
    },
    /// A dataset or attribute that exists but is not what the layout says (shape, type,
    /// content).
    #[error("{object}: {problem}")]
    Invalid {
        /// The object.
        object: String,
        /// What is wrong.
        problem: String,
    },
    /// A dataset declares more values than a reader takes.
    #[error(
        "{object}: declares {values} values, more than a {kind} holds ({max}); not a boreflux \
         file, or one too large to read"
    )]
    TooLarge {
        /// The dataset.
        object: String,
        /// Values it declares.
        values: usize,
        /// The reader's limit.
        max: usize,
        /// What was expected.
        kind: FileKind,
    },
    /// The HDF5 library failed on an object.
    #[error("{object}: {source}")]
    Hdf5 {
        /// The object.
        object: String,
        /// The library's error.
        #[source]
        source: hdf5::Error,
    },
}

impl ReadError {
    /// The exit code (docs/formats.md, "Exit codes"): a file that is missing, is not what
    /// the command reads or is damaged is bad input, 2; the HDF5 library failing on an
    /// object of a file that opened is counted the same way, since a damaged file is the
    /// usual cause.
    pub fn exit_code(&self) -> u8 {
        match self {
            ReadError::Missing
            | ReadError::NotHdf5 { .. }
            | ReadError::NotOurs { .. }
            | ReadError::MissingDataset { .. }
            | ReadError::MissingGroup { .. }
            | ReadError::WrongUnits { .. }
            | ReadError::Length { .. }
            | ReadError::Invalid { .. }
            | ReadError::TooLarge { .. }
            | ReadError::Hdf5 { .. } => 2,
        }
    }

    /// An HDF5 failure on `object`.
    pub fn hdf5(object: impl Into<String>) -> impl FnOnce(hdf5::Error) -> ReadError {
        let object = object.into();
        move |source| ReadError::Hdf5 { object, source }
    }

    /// An object that is not what the layout says.
    pub fn invalid(object: impl Into<String>, problem: impl Into<String>) -> ReadError {
        ReadError::Invalid {
            object: object.into(),
            problem: problem.into(),
        }
    }
}

/// Why a text input (a case file, a table drive's CSV) could not be read: the file itself,
/// before any of its content is parsed. The message never quotes the content.
#[derive(Debug, thiserror::Error)]
pub enum TextReadError {
    /// The operating system refused or failed (missing, no permission, I/O error).
    #[error("cannot read {what} {path}: {source}")]
    Io {
        /// What the file is (`case file`).
        what: &'static str,
        /// The path as given.
        path: String,
        /// The error.
        #[source]
        source: std::io::Error,
    },
    /// A folder, device or pipe (which could block or never end).
    #[error("cannot read {what} {path}: not a regular file (a folder, device or pipe)")]
    NotRegular {
        /// What the file is.
        what: &'static str,
        /// The path as given.
        path: String,
    },
    /// Larger than the reader takes.
    #[error("{what} {path} is {size} bytes, more than the {max} bytes read")]
    TooLarge {
        /// What the file is.
        what: &'static str,
        /// The path as given.
        path: String,
        /// Its size.
        size: u64,
        /// The limit.
        max: u64,
    },
    /// It grew past the limit while being read.
    #[error("{what} {path} grew beyond {max} bytes while read")]
    Grew {
        /// What the file is.
        what: &'static str,
        /// The path as given.
        path: String,
        /// The limit.
        max: u64,
    },
    /// Not UTF-8.
    #[error("cannot read {what} {path}: not UTF-8 text (invalid byte at offset {offset})")]
    NotUtf8 {
        /// What the file is.
        what: &'static str,
        /// The path as given.
        path: String,
        /// Offset of the first invalid byte.
        offset: usize,
    },
}

impl TextReadError {
    /// The exit code (docs/formats.md, "Exit codes"): bad input, 2, except an I/O failure
    /// other than a missing file or a refused permission, which is a runtime failure, 1.
    pub fn exit_code(&self) -> u8 {
        match self {
            TextReadError::Io { source, .. } => match source.kind() {
                std::io::ErrorKind::NotFound | std::io::ErrorKind::PermissionDenied => 2,
                _ => 1,
            },
            TextReadError::NotRegular { .. }
            | TextReadError::TooLarge { .. }
            | TextReadError::Grew { .. }
            | TextReadError::NotUtf8 { .. } => 2,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_reading_error_is_bad_input_and_names_its_object() {
        // Exit code 2 for a file that is not what the command reads: docs/formats.md,
        // "Exit codes" (the project's own contract).
        let errors = [
            ReadError::Missing,
            ReadError::NotOurs {
                kind: FileKind::Run,
                lacks: "no /series/time".into(),
            },
            ReadError::MissingDataset {
                object: "/series/face_flux".into(),
            },
            ReadError::Length {
                object: "/series/skin".into(),
                found: 1999,
                reference: "/series/time".into(),
                expected: 2000,
            },
            ReadError::TooLarge {
                object: "/table/status".into(),
                values: 20_000_000,
                max: 10_000_000,
                kind: FileKind::SweepTable,
            },
        ];
        let texts: Vec<String> = errors.iter().map(ToString::to_string).collect();
        assert!(errors.iter().all(|e| e.exit_code() == 2));
        assert_eq!(texts[0], "no such file");
        assert_eq!(texts[1], "not a boreflux result file (no /series/time)");
        assert_eq!(texts[2], "missing dataset /series/face_flux");
        assert_eq!(
            texts[3],
            "/series/skin has 1999 values but /series/time has 2000"
        );
        assert!(texts[4].starts_with(
            "/table/status: declares 20000000 values, more than a sweep table holds (10000000)"
        ));
    }
}
