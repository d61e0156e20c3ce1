//! Writing output files: each run's output is one transaction, inputs are never overwritten,
//! and nothing but a regular file (or a folder of a previous run) is ever replaced.
//!
//! - A **file target** (`evidence --out ledger.csv`, `fit --out model.yaml`, `simulate`,
//!   `plan`) is written to a temporary file created exclusively (random name, `O_EXCL`, so a
//!   planted symlink cannot redirect it) in the target's own folder, synced, then renamed over
//!   the target. An existing target that is not a regular file (a device, a folder, a symlink)
//!   is refused.
//! - A **folder target** (`analyse`, `validate`, `agreement`) is built whole in a fresh
//!   private folder beside it, then swapped in: renamed into place when the target is new or
//!   empty, exchanged atomically with the previous run's folder otherwise (Linux
//!   `renameat2(RENAME_EXCHANGE)`; elsewhere two renames), and the previous run is then removed.
//!   A folder holding anything that is not listed in the manifest of a previous run
//!   ([`MANIFEST`]) is refused, so no file of the user's is ever removed. After any run the
//!   folder holds exactly one run's files, or its previous state untouched.
//! - On an interrupt ([`finish_interrupted`]) every temporary file and folder is removed, and
//!   the message says truthfully whether the run's outputs had already been put in place.

pub mod set;

pub use set::{OutputFile, OutputSet};

/// Where a renderer hands each file as soon as it is made (name, bytes): an [`OutputSet`] in
/// memory, or a [`FolderWriter`]'s staging folder.
///
/// A long table may come in pieces: consecutive calls with the same name continue the file
/// (each sink joins them: [`FolderWriter::add_piece`], [`OutputSet::push_piece`]).
pub type FileSink<'a> = dyn FnMut(&str, Vec<u8>) -> Result<(), Error> + 'a;

use crate::Error;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// The manifest written into every output folder: what wrote it and the files of that run,
/// one relative path a line. A later run may replace a folder only when it holds nothing else.
pub const MANIFEST: &str = ".tessera-output";

/// Temporary files and folders being written right now, and the targets already put in
/// place. One lock: an interrupt waits while outputs are being renamed into place.
struct State {
    partial: Vec<PathBuf>,
    committed: Vec<PathBuf>,
}

static STATE: Mutex<State> = Mutex::new(State {
    partial: Vec::new(),
    committed: Vec::new(),
});

fn state() -> std::sync::MutexGuard<'static, State> {
    STATE
        .lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner)
}

/// Remove every temporary file or folder still being written (called when the run is
/// interrupted) and say what was left: the message is `None` when the run had written
/// nothing, or names the outputs that were already complete and in place.
pub fn finish_interrupted() -> Option<String> {
    let mut s = state();
    for p in s.partial.drain(..) {
        if p.is_dir() {
            let _ = std::fs::remove_dir_all(&p);
        } else {
            let _ = std::fs::remove_file(&p);
        }
    }
    if s.committed.is_empty() {
        None
    } else {
        Some(
            s.committed
                .iter()
                .map(|p| p.display().to_string())
                .collect::<Vec<_>>()
                .join(", "),
        )
    }
}

fn io_error(path: &Path, kind: std::io::ErrorKind, message: String) -> Error {
    Error::Io {
        path: path.to_path_buf(),
        source: std::io::Error::new(kind, message),
    }
}

fn io(path: &Path) -> impl Fn(std::io::Error) -> Error + '_ {
    move |source| Error::Io {
        path: path.to_path_buf(),
        source,
    }
}

/// What an existing path is, in words, when it is not a regular file.
fn not_regular(meta: &std::fs::Metadata) -> Option<&'static str> {
    let t = meta.file_type();
    if t.is_file() {
        None
    } else if t.is_dir() {
        Some("a folder")
    } else if t.is_symlink() {
        Some("a symbolic link")
    } else {
        Some("a device, pipe or socket")
    }
}

fn refuse_inputs(targets: &[&Path], protected: &[&Path]) -> Result<(), Error> {
    for path in targets {
        let target = absolute(path);
        for p in protected {
            if absolute(p) == target {
                return Err(io_error(
                    path,
                    std::io::ErrorKind::AlreadyExists,
                    "this is an input of the run; choose another output name (inputs are never overwritten)".into(),
                ));
            }
        }
    }
    Ok(())
}

/// Write `bytes` to `path` atomically (see [`write_all_atomic`]).
///
/// # Errors
/// As [`write_all_atomic`].
pub fn write_atomic(path: &Path, bytes: &[u8], protected: &[&Path]) -> Result<(), Error> {
    write_all_atomic(&[(path.to_path_buf(), bytes)], protected)
}

/// Write several files all or nothing: every file goes to a temporary file created
/// exclusively beside its target (written and synced); only when all of them are written are
/// they renamed into place, under the lock an interrupt waits for. If any cannot be written (a
/// full disk, a missing folder, an input named as output), every temporary file is removed and
/// no target is touched.
///
/// `protected` lists files that must never be overwritten (the run's inputs).
///
/// # Errors
/// [`Error::Io`] naming the first file that could not be written, an input named as an output,
/// or an existing target that is not a regular file.
pub fn write_all_atomic(files: &[(PathBuf, &[u8])], protected: &[&Path]) -> Result<(), Error> {
    let targets: Vec<&Path> = files.iter().map(|(p, _)| p.as_path()).collect();
    refuse_inputs(&targets, protected)?;
    for path in &targets {
        if let Ok(meta) = std::fs::symlink_metadata(path) {
            if let Some(what) = not_regular(&meta) {
                return Err(io_error(
                    path,
                    std::io::ErrorKind::AlreadyExists,
                    format!("this is {what}, not a regular file: tessera replaces only regular files; choose another output name"),
                ));
            }
        }
    }
    let mut temps: Vec<tempfile::NamedTempFile> = Vec::with_capacity(files.len());
    let forget = |temps: &[tempfile::NamedTempFile]| {
        let mut s = state();
        s.partial.retain(|p| !temps.iter().any(|t| t.path() == p));
    };
    for (path, bytes) in files {
        let dir = parent_of(path);
        let name = path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        let written = (|| {
            let mut f = temp_file_in(dir, &name)?;
            state().partial.push(f.path().to_path_buf());
            f.write_all(bytes)?;
            f.as_file().sync_all()?;
            Ok::<_, std::io::Error>(f)
        })();
        match written {
            Ok(f) => temps.push(f),
            Err(e) => {
                forget(&temps);
                return Err(io(path)(e));
            }
        }
    }
    let mut s = state();
    let mut placed = Vec::new();
    for ((path, _), tmp) in files.iter().zip(temps) {
        let tmp_path = tmp.path().to_path_buf();
        s.partial.retain(|p| p != &tmp_path);
        // A dropped temporary file removes itself.
        tmp.persist(path).map_err(|e| io(path)(e.error))?;
        placed.push(path.clone());
    }
    s.committed.extend(placed);
    Ok(())
}

fn parent_of(path: &Path) -> &Path {
    path.parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."))
}

/// A temporary file created exclusively (random name) in `dir`, named after the target.
fn temp_file_in(dir: &Path, name: &str) -> std::io::Result<tempfile::NamedTempFile> {
    let prefix = format!(".{name}.");
    let mut b = tempfile::Builder::new();
    b.prefix(&prefix).suffix(".partial");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        // Ordinary permissions (the user's umask applies), not the owner-only default.
        b.permissions(std::fs::Permissions::from_mode(0o666));
    }
    b.tempfile_in(dir)
}

/// A folder of outputs being built as one transaction (see the module docs): files are added
/// one at a time into a private staging folder beside the target, so a long table need not be
/// held in memory with every other file, and [`FolderWriter::commit`] puts them in place.
/// Dropped without a commit, the staging folder is removed and the target is as it was.
pub struct FolderWriter {
    dir: PathBuf,
    target: PathBuf,
    previous: Previous,
    staging: Option<tempfile::TempDir>,
    manifest: String,
    /// The files written so far, in order (the last may still be continued).
    written: Vec<String>,
}

impl FolderWriter {
    /// Check the target and make the staging folder; `command` names what writes the files,
    /// in the manifest.
    ///
    /// # Errors
    /// [`Error::Io`] when `dir` exists and is not a folder, holds files that are not one
    /// earlier run's (listed by name), contains an input of the run, or cannot be written.
    pub fn begin(dir: &Path, command: &str, protected: &[&Path]) -> Result<FolderWriter, Error> {
        let target = absolute(dir);
        for p in protected {
            if absolute(p).starts_with(&target) {
                return Err(io_error(
                    dir,
                    std::io::ErrorKind::AlreadyExists,
                    format!(
                        "the input {} lies inside this output folder, whose contents a run replaces: choose another output folder",
                        p.display()
                    ),
                ));
            }
        }
        let previous = existing_run(dir)?;
        // The absolute path: `--out .` or `--out sub/..` still has a parent to build beside.
        let parent = parent_of(&target);
        let name = target
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| "output".into());
        let mut b = tempfile::Builder::new();
        let prefix = format!(".{name}.");
        b.prefix(&prefix).suffix(".partial");
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            b.permissions(std::fs::Permissions::from_mode(0o777));
        }
        // Missing parent folders are made (an empty folder loses nothing).
        std::fs::create_dir_all(parent).map_err(io(dir))?;
        let staging = b.tempdir_in(parent).map_err(io(dir))?;
        state().partial.push(staging.path().to_path_buf());
        Ok(FolderWriter {
            dir: dir.to_path_buf(),
            target,
            previous,
            staging: Some(staging),
            manifest: format!("# written by tessera {command}; one run's files\n"),
            written: Vec::new(),
        })
    }

    /// Write one file of the run (`rel`: a relative path inside the folder; sub-folders such
    /// as `figures/` are made). A name already written is refused, as the file exists.
    ///
    /// # Errors
    /// [`Error::Io`] when the file cannot be written.
    pub fn add(&mut self, rel: &str, bytes: &[u8]) -> Result<(), Error> {
        self.write(rel, bytes, false)
    }

    /// Take one piece handed on by a [`FileSink`]: with the name of the file written last it
    /// continues that file (a long table in pieces), otherwise it is [`add`](Self::add).
    ///
    /// # Errors
    /// [`Error::Io`] when the file cannot be written.
    pub fn add_piece(&mut self, rel: &str, bytes: &[u8]) -> Result<(), Error> {
        let continued = self.written.last().is_some_and(|last| last == rel);
        self.write(rel, bytes, continued)
    }

    fn write(&mut self, rel: &str, bytes: &[u8], continued: bool) -> Result<(), Error> {
        let Some(staging) = &self.staging else {
            return Err(io_error(
                &self.dir,
                std::io::ErrorKind::Other,
                "the output folder was already put in place".into(),
            ));
        };
        let path = staging.path().join(rel);
        let written = (|| {
            let mut f = if continued {
                std::fs::OpenOptions::new().append(true).open(&path)?
            } else {
                if let Some(d) = path.parent() {
                    std::fs::create_dir_all(d)?;
                }
                std::fs::File::create_new(&path)?
            };
            f.write_all(bytes)?;
            f.sync_all()
        })();
        written.map_err(io(&self.dir))?;
        if !continued {
            self.manifest.push_str(rel);
            self.manifest.push('\n');
            self.written.push(rel.to_string());
        }
        Ok(())
    }

    /// The files written so far, in order.
    pub fn written(&self) -> &[String] {
        &self.written
    }

    /// Write the manifest and put the folder in place: renamed into place when the target is
    /// new or empty, exchanged with the previous run's folder otherwise.
    ///
    /// # Errors
    /// [`Error::Io`] when the manifest cannot be written or the folder cannot be put in place
    /// (the target is then as it was).
    pub fn commit(mut self) -> Result<(), Error> {
        let Some(staging) = self.staging.take() else {
            return Ok(());
        };
        let forget = |p: &Path| state().partial.retain(|q| q != p);
        let manifest = (|| {
            let mut f = std::fs::File::create_new(staging.path().join(MANIFEST))?;
            f.write_all(self.manifest.as_bytes())?;
            f.sync_all()
        })();
        if let Err(e) = manifest {
            forget(staging.path());
            return Err(io(&self.dir)(e));
        }
        let mut s = state();
        let staged = staging.path().to_path_buf();
        let swapped = match self.previous {
            Previous::None => std::fs::rename(&staged, &self.target).map(|()| false),
            Previous::Run => exchange(&staged, &self.target).map(|()| true),
        };
        match swapped {
            Ok(swapped) => {
                // The staging folder now holds the previous run (or nothing): remove it.
                if swapped {
                    let _ = std::fs::remove_dir_all(&staged);
                }
                s.partial.retain(|q| q != &staged);
                s.committed.push(self.dir.clone());
                // Already removed (or renamed away): do not let the guard try again.
                let _ = staging.keep();
                Ok(())
            }
            Err(e) => {
                s.partial.retain(|q| q != &staged);
                Err(io(&self.dir)(e))
            }
        }
    }
}

impl Drop for FolderWriter {
    fn drop(&mut self) {
        // Not committed: forget the staging folder; its guard removes it.
        if let Some(staging) = self.staging.take() {
            state().partial.retain(|q| q != staging.path());
        }
    }
}

/// Write one run's files into the folder `dir` as one transaction (see the module docs and
/// [`FolderWriter`]). `command` names what wrote them, in the manifest.
///
/// # Errors
/// As [`FolderWriter::begin`], [`FolderWriter::add`] and [`FolderWriter::commit`].
pub fn write_folder(
    dir: &Path,
    files: &OutputSet,
    command: &str,
    protected: &[&Path],
) -> Result<(), Error> {
    let mut w = FolderWriter::begin(dir, command, protected)?;
    for OutputFile { name, bytes, .. } in &files.files {
        w.add(name, bytes)?;
    }
    w.commit()
}

enum Previous {
    /// No folder, or an empty one.
    None,
    /// One earlier run's files and nothing else.
    Run,
}

/// What the target folder holds now; refuses anything that a run may not replace.
fn existing_run(dir: &Path) -> Result<Previous, Error> {
    let meta = match std::fs::symlink_metadata(dir) {
        Ok(m) => m,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(Previous::None),
        Err(e) => return Err(io(dir)(e)),
    };
    if !meta.file_type().is_dir() {
        let what = not_regular(&meta).unwrap_or("a file");
        return Err(io_error(
            dir,
            std::io::ErrorKind::AlreadyExists,
            format!("this is {what}, not a folder: choose a new or empty folder for the outputs"),
        ));
    }
    let mut found = Vec::new();
    list_files(dir, Path::new(""), &mut found).map_err(io(dir))?;
    if found.is_empty() {
        return Ok(Previous::None);
    }
    let listed: Vec<String> = std::fs::read_to_string(dir.join(MANIFEST))
        .map(|t| {
            t.lines()
                .filter(|l| !l.starts_with('#') && !l.is_empty())
                .map(str::to_string)
                .collect()
        })
        .unwrap_or_default();
    let foreign: Vec<&String> = found
        .iter()
        .filter(|f| f.as_str() != MANIFEST && !listed.contains(f))
        .collect();
    if foreign.is_empty() && found.iter().any(|f| f == MANIFEST) {
        return Ok(Previous::Run);
    }
    let shown: Vec<&str> = foreign.iter().take(5).map(|s| s.as_str()).collect();
    let more = if foreign.len() > 5 {
        format!(" and {} more", foreign.len() - 5)
    } else {
        String::new()
    };
    Err(io_error(
        dir,
        std::io::ErrorKind::AlreadyExists,
        format!(
            "this folder holds files that are not one earlier tessera run's ({}{more}); a run replaces its whole output folder, so choose a new or empty folder (or move those files)",
            shown.join(", ")
        ),
    ))
}

/// Every entry under `dir` as a relative path ('/'-separated); folders that hold files are
/// implied by them, empty folders are listed themselves, symlinks and devices as entries.
fn list_files(dir: &Path, rel: &Path, out: &mut Vec<String>) -> std::io::Result<()> {
    let mut any = false;
    for e in std::fs::read_dir(dir.join(rel))? {
        let e = e?;
        any = true;
        let r = rel.join(e.file_name());
        if e.file_type()?.is_dir() {
            list_files(dir, &r, out)?;
        } else {
            out.push(r.to_string_lossy().replace('\\', "/"));
        }
    }
    if !any && !rel.as_os_str().is_empty() {
        out.push(format!("{}/", rel.to_string_lossy()));
    }
    Ok(())
}

/// Swap two folders: atomically where the system can (Linux `renameat2` with
/// `RENAME_EXCHANGE`), otherwise by moving the old one aside first.
fn exchange(new: &Path, old: &Path) -> std::io::Result<()> {
    #[cfg(target_os = "linux")]
    {
        use rustix::fs::{renameat_with, RenameFlags, CWD};
        match renameat_with(CWD, new, CWD, old, RenameFlags::EXCHANGE) {
            Ok(()) => return Ok(()),
            // Filesystems without the exchange fall back to two renames.
            Err(e) if e == rustix::io::Errno::INVAL || e == rustix::io::Errno::NOSYS => {}
            Err(e) => return Err(e.into()),
        }
    }
    let aside = new.with_extension("previous");
    std::fs::rename(old, &aside)?;
    if let Err(e) = std::fs::rename(new, old) {
        let _ = std::fs::rename(&aside, old);
        return Err(e);
    }
    // The caller removes `new`, which now must hold the previous run.
    std::fs::rename(&aside, new)
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
