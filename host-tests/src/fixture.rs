//! Reading the committed fixtures: small CSV tables with `#` comment lines and a header.

use std::path::PathBuf;

/// Absolute path of a file under the repository's `fixtures/` folder.
pub fn path(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("..")
        .join("fixtures")
        .join(rel)
}

/// One data row: its line number (1-based) and its fields.
#[derive(Clone, Debug)]
pub struct Row {
    /// Line number in the file, for error messages.
    pub line: usize,
    /// The comma-separated fields, trimmed.
    pub fields: Vec<String>,
}

impl Row {
    /// Field `k` parsed as `T`, or a message naming file, line and column.
    pub fn get<T: std::str::FromStr>(&self, file: &str, k: usize) -> T {
        let raw = self.fields.get(k).map(String::as_str).unwrap_or("");
        raw.parse().unwrap_or_else(|_| {
            panic!(
                "{file}:{}: column {}: cannot parse {raw:?}",
                self.line,
                k + 1
            )
        })
    }
}

/// The data rows of a fixture CSV (comment lines and the header skipped).
pub fn rows(rel: &str) -> Vec<Row> {
    let p = path(rel);
    let text = std::fs::read_to_string(&p).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
    text.lines()
        .enumerate()
        .filter(|(_, l)| !l.starts_with('#') && !l.trim().is_empty())
        .skip(1)
        .map(|(i, l)| Row {
            line: i + 1,
            fields: l.split(',').map(|f| f.trim().to_string()).collect(),
        })
        .collect()
}
