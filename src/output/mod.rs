//! Writing output files: each file whole or not at all, inputs never overwritten.

use crate::Error;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// Temporary files being written right now, so that an interrupted run can remove them.
static PARTIAL: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// Remove every temporary file still being written (called when the run is interrupted):
/// an interrupted run leaves no partial output.
pub fn remove_partial_files() {
    if let Ok(mut v) = PARTIAL.lock() {
        for p in v.drain(..) {
            let _ = std::fs::remove_file(p);
        }
    }
}

/// Write `bytes` to `path` atomically: a temporary file in the same folder, flushed and
/// synced, then renamed over the target. A run that stops half-way leaves no partial file.
///
/// `protected` lists files that must never be overwritten (the run's inputs).
///
/// # Errors
/// [`Error::Io`] when the folder or file cannot be written, or `path` is an input.
pub fn write_atomic(path: &Path, bytes: &[u8], protected: &[&Path]) -> Result<(), Error> {
    let io = |source| Error::Io {
        path: path.to_path_buf(),
        source,
    };
    let target = absolute(path);
    for p in protected {
        if absolute(p) == target {
            return Err(io(std::io::Error::new(
                std::io::ErrorKind::AlreadyExists,
                "this is an input of the run; choose another output name (inputs are never overwritten)",
            )));
        }
    }
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let tmp = dir.join(format!(".{name}.{}.partial", std::process::id()));
    if let Ok(mut v) = PARTIAL.lock() {
        v.push(tmp.clone());
    }
    let result = (|| {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if let Ok(mut v) = PARTIAL.lock() {
        v.retain(|p| p != &tmp);
    }
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(io(e));
    }
    Ok(())
}

fn absolute(p: &Path) -> PathBuf {
    std::fs::canonicalize(p).unwrap_or_else(|_| {
        // The target may not exist yet: canonicalise its folder.
        match (p.parent(), p.file_name()) {
            (Some(d), Some(n)) if !d.as_os_str().is_empty() => std::fs::canonicalize(d)
                .map(|d| d.join(n))
                .unwrap_or_else(|_| p.to_path_buf()),
            _ => std::env::current_dir()
                .map(|d| d.join(p))
                .unwrap_or_else(|_| p.to_path_buf()),
        }
    })
}

#[cfg(test)]
#[path = "tests/output.rs"]
mod tests;
