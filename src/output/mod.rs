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
    write_all_atomic(&[(path.to_path_buf(), bytes)], protected)
}

/// Write several files all or nothing: every file goes to a temporary file beside its target
/// first (written and synced); only when all of them are written are they renamed into place.
/// If any cannot be written (a full disk, a missing folder, an input named as output), every
/// temporary file is removed and no target is touched.
///
/// # Errors
/// [`Error::Io`] naming the first file that could not be written.
pub fn write_all_atomic(files: &[(PathBuf, &[u8])], protected: &[&Path]) -> Result<(), Error> {
    let io = |path: &Path, source| Error::Io {
        path: path.to_path_buf(),
        source,
    };
    for (path, _) in files {
        let target = absolute(path);
        for p in protected {
            if absolute(p) == target {
                return Err(io(
                    path,
                    std::io::Error::new(
                        std::io::ErrorKind::AlreadyExists,
                        "this is an input of the run; choose another output name (inputs are never overwritten)",
                    ),
                ));
            }
        }
    }
    let mut temps: Vec<PathBuf> = Vec::with_capacity(files.len());
    let cleanup = |temps: &[PathBuf]| {
        for t in temps {
            let _ = std::fs::remove_file(t);
        }
        if let Ok(mut v) = PARTIAL.lock() {
            v.retain(|p| !temps.contains(p));
        }
    };
    for (path, bytes) in files {
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
        temps.push(tmp.clone());
        let written = (|| {
            let mut f = std::fs::File::create(&tmp)?;
            f.write_all(bytes)?;
            f.sync_all()
        })();
        if let Err(e) = written {
            cleanup(&temps);
            return Err(io(path, e));
        }
    }
    for (k, ((path, _), tmp)) in files.iter().zip(&temps).enumerate() {
        if let Err(e) = std::fs::rename(tmp, path) {
            cleanup(&temps[k..]);
            return Err(io(path, e));
        }
    }
    if let Ok(mut v) = PARTIAL.lock() {
        v.retain(|p| !temps.contains(p));
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
