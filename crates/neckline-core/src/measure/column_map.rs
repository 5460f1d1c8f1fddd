//! A map from a file's own headers onto neckline's column names.

use super::NAMES;

/// A map from a file's own headers onto neckline's column names: `[columns]` in the job file
/// (`major_true_pct = "Major strain (%)"`) and `--column NAME=HEADER` on the command line (which
/// wins). Headers are matched ignoring case and surrounding spaces.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ColumnMap {
    /// (neckline name, the file's header), in the order given.
    pub entries: Vec<(String, String)>,
    /// Where the map came from, for messages (`--column`, `job.toml [columns]`).
    pub origin: String,
}

impl ColumnMap {
    /// Parse one `NAME=HEADER` argument.
    pub fn parse_arg(s: &str) -> std::result::Result<(String, String), String> {
        let (name, header) = s
            .split_once('=')
            .ok_or_else(|| format!("expected NAME=HEADER, found `{s}`"))?;
        let name = name.trim().to_ascii_lowercase();
        check_name(&name)?;
        Ok((name, header.trim().to_string()))
    }

    /// Add `entries` over the present ones (a later entry for the same name wins).
    pub fn extend(&mut self, entries: impl IntoIterator<Item = (String, String)>, origin: &str) {
        let mut any = false;
        for (n, h) in entries {
            self.entries.retain(|(m, _)| *m != n);
            self.entries.push((n, h));
            any = true;
        }
        if any {
            if !self.origin.is_empty() {
                self.origin.push_str(" and ");
            }
            self.origin.push_str(origin);
        }
    }

    pub(super) fn name_of(&self, header: &str) -> Option<&str> {
        let h = header.trim();
        self.entries
            .iter()
            .rev()
            .find(|(_, fh)| fh.trim().eq_ignore_ascii_case(h))
            .map(|(n, _)| n.as_str())
    }
}

/// Check that `name` is one of neckline's column names.
pub fn check_name(name: &str) -> std::result::Result<(), String> {
    if NAMES.contains(&name) {
        Ok(())
    } else {
        Err(format!(
            "`{name}` is not a column neckline reads: expected one of {}",
            NAMES.join(", ")
        ))
    }
}
