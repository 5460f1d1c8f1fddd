//! The condition a part showed at a circle (safe, necked, split): an input value, read from a
//! measurement file's optional `condition` column and from the parts evidence of a press-shop
//! curve. What it says about a curve is tallied by `observed::ObservedTally`, a layer up.
//!
//! The marks are what the eye and the finger find (common practice; ISO 12004-1 describes
//! press-shop forming-limit diagrams from such parts, from memory).

use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// The condition observed on the part at a circle.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Condition {
    /// No neck.
    Safe,
    /// A visible or felt neck through the circle.
    Necked,
    /// A crack through the circle.
    Split,
}

impl Condition {
    /// All conditions, from no failure to the worst.
    pub const ALL: [Condition; 3] = [Condition::Safe, Condition::Necked, Condition::Split];

    /// Name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            Condition::Safe => "safe",
            Condition::Necked => "necked",
            Condition::Split => "split",
        }
    }

    /// Whether the circle is at or above the limit (necked or split).
    pub fn failed(self) -> bool {
        self != Condition::Safe
    }

    /// Read an optional field: empty (or blanks) means not observed (`Ok(None)`); otherwise one
    /// of `safe`, `necked`, `split` in any letter case.
    pub fn parse_optional(text: &str) -> Result<Option<Condition>, String> {
        let t = text.trim();
        if t.is_empty() {
            Ok(None)
        } else {
            t.parse().map(Some)
        }
    }

    /// Its place in [`Condition::ALL`].
    pub fn index(self) -> usize {
        self as usize
    }
}

impl fmt::Display for Condition {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Condition {
    type Err = String;
    /// One of `safe`, `necked`, `split`, in any letter case, surrounding blanks ignored.
    fn from_str(s: &str) -> Result<Self, String> {
        let t = s.trim();
        Condition::ALL
            .into_iter()
            .find(|c| c.name().eq_ignore_ascii_case(t))
            .ok_or_else(|| {
                format!(
                    "expected a condition `safe`, `necked` or `split` (or an empty field: not \
                     observed), found `{t}`"
                )
            })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn conditions_parse_in_any_case_and_empty_is_not_observed() {
        assert_eq!("Necked".parse::<Condition>(), Ok(Condition::Necked));
        assert_eq!(" SPLIT ".parse::<Condition>(), Ok(Condition::Split));
        assert_eq!(Condition::parse_optional("safe"), Ok(Some(Condition::Safe)));
        assert_eq!(Condition::parse_optional("  "), Ok(None));
        let e = Condition::parse_optional("cracked").unwrap_err();
        assert!(e.contains("`cracked`") && e.contains("necked"), "{e}");
    }
}

#[cfg(test)]
mod reading_tests {
    use super::Condition;
    use crate::measure::read_measurements_from;
    use std::path::Path;

    // The optional `condition` column of a measurement file: any case, empty = not observed,
    // and an unknown word rejects the row naming its line and column.
    #[test]
    fn condition_column_is_read_and_bad_words_reject_the_row() {
        let text = "id,major,minor,Condition\nA,3.4,2.5,Necked\nB,3.0,2.5,\nC,3.1,2.5,cracked\nD,3.5,2.5,SPLIT\n";
        let s = read_measurements_from(
            text.as_bytes(),
            Path::new("parts.csv"),
            &crate::measure::ColumnMap::default(),
        )
        .unwrap();
        let got: Vec<_> = s
            .points
            .iter()
            .map(|m| (m.id.as_str(), m.condition))
            .collect();
        assert_eq!(
            got,
            vec![
                ("A", Some(Condition::Necked)),
                ("B", None),
                ("D", Some(Condition::Split))
            ]
        );
        assert!(s.notes.is_empty(), "{:?}", s.notes);
        let r = s.rejected[0].to_string();
        assert!(
            r.starts_with("parts.csv:4:4 (column `condition`)") && r.contains("`cracked`"),
            "{r}"
        );
    }
}
