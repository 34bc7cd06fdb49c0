//! The one overwrite policy of every command that writes files (`run`, `sweep`, `merge`,
//! `report`, `steptest`): checked before any work starts, so a refusal costs nothing and leaves
//! nothing on disk.
//!
//! - An output must not be one of the command's inputs (compared as canonical paths),
//!   even with `--force`.
//! - An output that is a folder is refused; so is one in a folder that does not exist.
//! - An output that exists as a file is refused unless `--force` is given; with it, the
//!   new file replaces the old one only once complete (temporary file and rename).

use anyhow::anyhow;
use std::path::{Path, PathBuf};

/// A path to compare files by: canonical where the file exists, else absolute as written.
pub(crate) fn same_file_key(p: &Path) -> PathBuf {
    std::fs::canonicalize(p).unwrap_or_else(|_| std::path::absolute(p).unwrap_or(p.to_path_buf()))
}

/// Refuses `output` (named by `flag` in messages) when it is a folder, lies in a folder
/// that does not exist, or exists and `force` is not set.
pub(crate) fn check_output(output: &Path, flag: &str, force: bool) -> Result<(), anyhow::Error> {
    if output.file_name().is_none() || output.as_os_str().to_string_lossy().ends_with('/') {
        return Err(anyhow!(
            "{flag} {}: needs a file name. Nothing was written",
            output.display()
        ));
    }
    if let Some(dir) = output
        .parent()
        .filter(|d| !d.as_os_str().is_empty() && !d.is_dir())
    {
        return Err(anyhow!(
            "{flag} {}: the output folder {} does not exist; create it or choose another \
             name. Nothing was written",
            output.display(),
            dir.display()
        ));
    }
    match std::fs::metadata(output) {
        Ok(m) if m.is_dir() => Err(anyhow!(
            "{flag} {} is a folder; give a file name. Nothing was written",
            output.display()
        )),
        Ok(_) if !force => Err(anyhow!(
            "{flag} {} already exists; pass --force to replace it, or choose another name. \
             Nothing was written",
            output.display()
        )),
        _ => Ok(()),
    }
}

/// Refuses any output that is one of `inputs`, naming both.
pub(crate) fn refuse_inputs(
    outputs: &[(&Path, &str)],
    inputs: &[PathBuf],
) -> Result<(), anyhow::Error> {
    for (out, flag) in outputs {
        let key = same_file_key(out);
        if let Some(i) = inputs.iter().find(|i| same_file_key(i) == key) {
            return Err(anyhow!(
                "{flag} {} is the input {}; a command never writes over its inputs. Choose \
                 another name. Nothing was written",
                out.display(),
                i.display()
            ));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn policy_refuses_folders_missing_folders_and_existing_files() {
        let dir = tempfile::tempdir().unwrap();
        let f = dir.path().join("a.h5");
        assert!(check_output(&f, "-o", false).is_ok());
        std::fs::write(&f, "x").unwrap();
        let e = check_output(&f, "-o", false).unwrap_err().to_string();
        assert!(e.contains("already exists") && e.contains("--force"), "{e}");
        assert!(check_output(&f, "-o", true).is_ok());
        let e = check_output(dir.path(), "-o", true)
            .unwrap_err()
            .to_string();
        assert!(e.contains("is a folder"), "{e}");
        let e = check_output(&dir.path().join("no/x.h5"), "-o", true)
            .unwrap_err()
            .to_string();
        assert!(e.contains("does not exist"), "{e}");
        let e = refuse_inputs(&[(&f, "-o")], &[dir.path().join("./a.h5")])
            .unwrap_err()
            .to_string();
        assert!(e.contains("never writes over its inputs"), "{e}");
    }
}
