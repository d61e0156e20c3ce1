//! An output set: the files of one run in memory (name, media type, bytes), made by one
//! renderer and put on disk by one writer ([`super::write_folder`]); the web page serves or
//! zips the same set.

/// One file of an output set.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct OutputFile {
    /// Path inside the output folder, `/`-separated (`figures/p_female.svg`).
    pub name: String,
    /// IANA media type, from the name's extension.
    pub media_type: &'static str,
    /// The contents.
    pub bytes: Vec<u8>,
}

/// The files of one run, in writing order.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct OutputSet {
    /// The files.
    pub files: Vec<OutputFile>,
}

/// The media type of a file name: `text/csv` (RFC 7111), `text/markdown` (RFC 7763),
/// `application/json` (RFC 8259), `image/svg+xml`, `image/png`, `text/html`, `application/yaml` (RFC 9512),
/// `application/x-tex`, `text/plain` otherwise.
pub fn media_type(name: &str) -> &'static str {
    match name.rsplit('.').next().unwrap_or("") {
        "csv" => "text/csv",
        "md" => "text/markdown",
        "json" => "application/json",
        "svg" => "image/svg+xml",
        "png" => "image/png",
        "html" => "text/html",
        "yaml" | "yml" => "application/yaml",
        "tex" => "application/x-tex",
        _ => "text/plain",
    }
}

impl OutputSet {
    /// Append a file; its media type follows from its name.
    pub fn push(&mut self, name: impl Into<String>, bytes: impl Into<Vec<u8>>) {
        let name = name.into();
        self.files.push(OutputFile {
            media_type: media_type(&name),
            name,
            bytes: bytes.into(),
        });
    }

    /// Append a file, or, when the last file has the same name, continue it with these bytes
    /// (a long table handed on in pieces; see [`crate::output::FileSink`]).
    pub fn push_piece(&mut self, name: &str, bytes: Vec<u8>) {
        match self.files.last_mut() {
            Some(last) if last.name == name => last.bytes.extend_from_slice(&bytes),
            _ => self.push(name, bytes),
        }
    }

    /// Append every (name, bytes) pair.
    pub fn extend<N: Into<String>, B: Into<Vec<u8>>>(
        &mut self,
        files: impl IntoIterator<Item = (N, B)>,
    ) {
        for (n, b) in files {
            self.push(n, b);
        }
    }

    /// Append every file of another set, in its order.
    pub fn append(&mut self, other: OutputSet) {
        self.files.extend(other.files);
    }

    /// The names, in writing order.
    pub fn names(&self) -> Vec<&str> {
        self.files.iter().map(|f| f.name.as_str()).collect()
    }

    /// The file of that name.
    pub fn get(&self, name: &str) -> Option<&OutputFile> {
        self.files.iter().find(|f| f.name == name)
    }
}

impl<N: Into<String>, B: Into<Vec<u8>>> FromIterator<(N, B)> for OutputSet {
    fn from_iter<I: IntoIterator<Item = (N, B)>>(iter: I) -> Self {
        let mut s = OutputSet::default();
        s.extend(iter);
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn media_types_follow_the_extension() {
        let s: OutputSet = [
            ("individuals.csv", "a"),
            ("figures/p_female.svg", "<svg/>"),
            ("report.md", "#"),
            ("tables.tex", "%"),
            ("run.json", "{}"),
            ("notes", "x"),
        ]
        .into_iter()
        .collect();
        let types: Vec<&str> = s.files.iter().map(|f| f.media_type).collect();
        assert_eq!(
            types,
            [
                "text/csv",
                "image/svg+xml",
                "text/markdown",
                "application/x-tex",
                "application/json",
                "text/plain"
            ]
        );
        assert_eq!(s.names()[1], "figures/p_female.svg");
        assert_eq!(
            s.get("run.json").map(|f| f.bytes.as_slice()),
            Some(b"{}".as_slice())
        );
    }
}
