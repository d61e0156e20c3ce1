//! What one input may ask of the machine, and the bounded readers that enforce it.
//!
//! Every limit is far above what an osteological file needs and far below what would exhaust a
//! workstation; each refusal names the limit. The values are our own choices (no standard sets
//! them); README's reliability section lists them.

use std::io::Read;
use std::path::Path;

/// Largest input table read (512 MiB): the whole table is held in memory while it is checked.
pub const MAX_TABLE_BYTES: u64 = 512 << 20;
/// Largest model, prior, scale-map or fitting-specification file (4 MiB; the shipped ones
/// are a few KB).
pub const MAX_SETTINGS_BYTES: u64 = 4 << 20;
/// Deepest nesting of collections in a YAML settings file.
pub const MAX_YAML_DEPTH: usize = 64;
/// Most nodes a YAML settings file may hold once its aliases are expanded.
pub const MAX_YAML_NODES: u64 = 1_000_000;
/// Longest column name, in characters.
pub const MAX_COLUMN_NAME_CHARS: usize = 256;
/// Most cells (rows × columns of the used extent) read from one sheet of a workbook.
pub const MAX_SHEET_CELLS: u64 = 10_000_000;
/// Most bytes a workbook's compressed parts may unpack to, all parts together.
pub const MAX_UNPACKED_BYTES: u64 = 1 << 30;
/// Most reads one individual may report: no sequencing run produces 10¹² reads for one
/// library (common practice: a whole high-throughput flow cell gives ~10¹⁰).
pub const MAX_READS: u64 = 1_000_000_000_000;

/// Why a bounded read failed.
#[derive(Debug)]
pub enum BoundedReadError {
    /// The file could not be read.
    Io(std::io::Error),
    /// The file (or stream: pipes and devices have no length) holds more than the limit.
    TooLarge {
        /// The limit in bytes.
        limit: u64,
    },
}

impl std::fmt::Display for BoundedReadError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            BoundedReadError::Io(e) => write!(f, "cannot read the file: {e}"),
            BoundedReadError::TooLarge { limit } => write!(
                f,
                "the file holds more than {} (the limit for this kind of file)",
                human_bytes(*limit)
            ),
        }
    }
}

/// "512 MiB", "4 MiB", "1 GiB".
pub fn human_bytes(n: u64) -> String {
    if n >= 1 << 30 && n % (1 << 30) == 0 {
        format!("{} GiB", n >> 30)
    } else if n >= 1 << 20 {
        format!("{} MiB", n >> 20)
    } else {
        format!("{n} bytes")
    }
}

/// Read at most `limit` bytes of a file, pipe or device: the bound holds whatever the file's
/// metadata says (a pipe or `/dev/zero` reports length 0 and never ends).
///
/// # Errors
/// [`BoundedReadError::TooLarge`] when more than `limit` bytes are there;
/// [`BoundedReadError::Io`] when it cannot be opened or read.
pub fn read_bounded(path: &Path, limit: u64) -> Result<Vec<u8>, BoundedReadError> {
    let f = std::fs::File::open(path).map_err(BoundedReadError::Io)?;
    if let Ok(meta) = f.metadata() {
        if meta.is_file() && meta.len() > limit {
            return Err(BoundedReadError::TooLarge { limit });
        }
    }
    let mut bytes = Vec::new();
    f.take(limit + 1)
        .read_to_end(&mut bytes)
        .map_err(BoundedReadError::Io)?;
    if bytes.len() as u64 > limit {
        return Err(BoundedReadError::TooLarge { limit });
    }
    Ok(bytes)
}

/// Read a settings file (model, prior, scale map, specification) as UTF-8 text, bounded by
/// [`MAX_SETTINGS_BYTES`].
///
/// # Errors
/// [`BoundedReadError::Io`] when it cannot be read; otherwise a message ready for the user
/// (too large, not UTF-8) as [`BoundedReadError::TooLarge`] or the text error.
pub fn read_settings_text(path: &Path) -> Result<String, SettingsReadError> {
    let bytes = read_bounded(path, MAX_SETTINGS_BYTES).map_err(|e| match e {
        BoundedReadError::Io(e) => SettingsReadError::Io(e),
        e => SettingsReadError::Invalid(e.to_string()),
    })?;
    String::from_utf8(bytes).map_err(|e| {
        SettingsReadError::Invalid(format!(
            "the file is not UTF-8 text (byte {} is not): save it with UTF-8 encoding",
            e.utf8_error().valid_up_to()
        ))
    })
}

/// Why a settings file could not be read.
#[derive(Debug)]
pub enum SettingsReadError {
    /// It could not be opened or read.
    Io(std::io::Error),
    /// It was read but is too large or not text (the message says which).
    Invalid(String),
}

impl std::fmt::Display for SettingsReadError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SettingsReadError::Io(e) => write!(f, "cannot read the file: {e}"),
            SettingsReadError::Invalid(m) => f.write_str(m),
        }
    }
}

impl SettingsReadError {
    /// As the library's error: [`crate::Error::Io`] when unreadable, else
    /// [`crate::Error::Settings`] naming the file.
    pub fn into_error(self, path: &Path) -> crate::Error {
        match self {
            SettingsReadError::Io(source) => crate::Error::Io {
                path: path.to_path_buf(),
                source,
            },
            SettingsReadError::Invalid(message) => crate::Error::Settings {
                file: path.display().to_string(),
                message,
            },
        }
    }
}

/// Check a YAML settings document before it is deserialised: size, nesting depth and the
/// number of nodes once aliases are expanded (a few KB of anchors and aliases can otherwise
/// expand without limit). Syntax errors are left to the deserialiser, which reports them with
/// their line.
///
/// # Errors
/// A message naming the limit that was passed and where.
pub fn check_yaml(text: &str) -> Result<(), String> {
    use saphyr_parser::{Event, Parser};
    if text.len() as u64 > MAX_SETTINGS_BYTES {
        return Err(format!(
            "the document is larger than {} (the limit for settings files)",
            human_bytes(MAX_SETTINGS_BYTES)
        ));
    }
    let mut sizes: std::collections::HashMap<usize, u64> = std::collections::HashMap::new();
    // Open collections: their anchor and the node count when they opened.
    let mut open: Vec<(usize, u64)> = Vec::new();
    let mut nodes: u64 = 0;
    for event in Parser::new_from_str(text) {
        let (event, span) = match event {
            Ok(e) => e,
            // The scanner's own bound on nesting (it looks ahead of the events).
            Err(e) if e.info().contains("recursion limit") => {
                return Err(format!(
                    "collections nested more than {MAX_YAML_DEPTH} deep (line {}): settings files need only a few levels",
                    e.marker().line()
                ));
            }
            // Other syntax errors are reported by the deserialiser, with its own wording.
            Err(_) => return Ok(()),
        };
        match event {
            Event::Scalar(_, _, anchor, _) => {
                nodes = nodes.saturating_add(1);
                if anchor > 0 {
                    sizes.insert(anchor, 1);
                }
            }
            Event::SequenceStart(anchor, _) | Event::MappingStart(anchor, _) => {
                open.push((anchor, nodes));
                nodes = nodes.saturating_add(1);
                if open.len() > MAX_YAML_DEPTH {
                    return Err(format!(
                        "collections nested more than {MAX_YAML_DEPTH} deep (line {}): settings files need only a few levels",
                        span.start.line()
                    ));
                }
            }
            Event::SequenceEnd | Event::MappingEnd => {
                if let Some((anchor, start)) = open.pop() {
                    if anchor > 0 {
                        sizes.insert(anchor, nodes - start);
                    }
                }
            }
            Event::Alias(id) => {
                nodes = nodes.saturating_add(sizes.get(&id).copied().unwrap_or(1));
            }
            _ => {}
        }
        if nodes > MAX_YAML_NODES {
            return Err(format!(
                "more than {MAX_YAML_NODES} values once its aliases (*name) are expanded (line {}): write the values out, or use fewer aliases",
                span.start.line()
            ));
        }
    }
    Ok(())
}

#[cfg(test)]
#[path = "tests/limits.rs"]
mod tests;
