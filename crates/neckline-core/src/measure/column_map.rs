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
    /// The header's line in the file (1-based), when given (`--header-row`, `header_row` in
    /// the job file); else the header is the first line that holds the required columns.
    pub header_row: Option<u64>,
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

#[cfg(test)]
mod tests {
    //! Expectations from the doc comments of [`ColumnMap`] (`NAME=HEADER`, headers matched
    //! ignoring case and surrounding spaces, the command line winning over the job file).
    use super::*;

    #[test]
    fn an_argument_is_a_name_and_a_header() {
        assert_eq!(
            ColumnMap::parse_arg(" Major_True_Pct = Major strain (%) "),
            Ok(("major_true_pct".to_string(), "Major strain (%)".to_string()))
        );
        let e = ColumnMap::parse_arg("major_true_pct").unwrap_err();
        assert!(e.starts_with("expected NAME=HEADER"), "{e}");
        let e = ColumnMap::parse_arg("epsilon1=Major").unwrap_err();
        assert!(
            e.starts_with("`epsilon1` is not a column neckline reads"),
            "{e}"
        );
        assert!(e.contains("major_true_pct"), "{e}");
        assert!(check_name("angle_deg").is_ok());
    }

    #[test]
    fn a_later_entry_wins_and_headers_match_ignoring_case_and_spaces() {
        let mut map = ColumnMap::default();
        map.extend([("major".into(), "Dmax".into())], "job.toml [columns]");
        map.extend(Vec::new(), "nothing");
        map.extend(
            [
                ("major".into(), "D1 (mm)".into()),
                ("minor".into(), "Dmax".into()),
            ],
            "--column",
        );
        assert_eq!(map.origin, "job.toml [columns] and --column");
        assert_eq!(map.entries.len(), 2);
        assert_eq!(map.name_of("  d1 (MM) "), Some("major"));
        assert_eq!(map.name_of("dmax"), Some("minor"));
        assert_eq!(map.name_of("d2"), None);
    }
}
