//! One data row read into a [`Measurement`], or rejected with the file, line and column.

use super::columns::{Columns, Kind};
use super::rules::{RowRules, SwapLog, MAX_LENGTH};
use super::{parse_number, trim_cell, Condition, Dialect, Measurement, Reading, RejectedRow};
use crate::error::Location;
use crate::strain::TrueStrain;
use std::path::Path;

/// Reads one row into a [`Measurement`], or says why it is rejected.
pub(super) struct RowReader<'a> {
    pub(super) cols: &'a Columns,
    pub(super) dialect: Dialect,
    pub(super) file: &'a Path,
    pub(super) line: u64,
    pub(super) record: &'a csv::StringRecord,
    pub(super) rules: &'a RowRules,
    pub(super) swaps: &'a SwapLog,
}

impl RowReader<'_> {
    pub(super) fn reject(&self, col: usize, reason: String) -> RejectedRow {
        RejectedRow {
            location: Location::file(self.file)
                .at_line(self.line)
                .at_column(col as u64 + 1, &self.cols.names[col]),
            id: self.id(),
            reason,
        }
    }

    fn id(&self) -> Option<String> {
        match self.cols.id {
            Some(c) => self.text(c),
            None => Some(self.line.to_string()),
        }
    }

    pub(super) fn text(&self, col: usize) -> Option<String> {
        let v = trim_cell(self.record.get(col)?);
        (!v.is_empty()).then(|| v.to_string())
    }

    pub(super) fn number(&self, col: usize) -> std::result::Result<f64, RejectedRow> {
        let raw = self.record.get(col).unwrap_or("");
        if trim_cell(raw).is_empty() {
            return Err(self.reject(col, "expected a number, found an empty field".into()));
        }
        parse_number(raw, self.dialect).map_err(|e| self.reject(col, e))
    }

    fn optional(&self, col: Option<usize>) -> std::result::Result<Option<f64>, RejectedRow> {
        match col {
            Some(c) if !trim_cell(self.record.get(c).unwrap_or("")).is_empty() => {
                let v = self.number(c)?;
                if v.abs() > MAX_LENGTH {
                    return Err(self.reject(
                        c,
                        format!("{v:e} is beyond ±{MAX_LENGTH:e}: not a position or length"),
                    ));
                }
                Ok(Some(v))
            }
            _ => Ok(None),
        }
    }

    pub(super) fn positive(&self, col: usize, what: &str) -> std::result::Result<f64, RejectedRow> {
        let v = self.number(col)?;
        if v <= 0.0 {
            let hint = if what.ends_with("axis") && v < 0.0 {
                " (an axis is a length; a negative value looks like a strain in percent: \
                 strains go in columns major_eng_pct and minor_eng_pct)"
            } else {
                ""
            };
            return Err(self.reject(
                col,
                format!("{what} must be greater than zero, found {v}{hint}"),
            ));
        }
        Ok(v)
    }

    /// The reading, a note when it was swapped, and whether engineering and true strains
    /// disagree.
    fn reading(&self) -> std::result::Result<(Reading, Option<String>, bool), RejectedRow> {
        let c = self.cols;
        Ok(match c.kind {
            Kind::Axes { major, minor } => {
                let (r, note) = self.axes(major, minor)?;
                (r, note, false)
            }
            Kind::Eng { major, minor } => {
                let (p, note) = self.pair((major, minor), true)?;
                (Reading::Strains(p), note, false)
            }
            Kind::True { major, minor } => {
                let (p, note) = self.pair((major, minor), false)?;
                (Reading::Strains(p), note, false)
            }
            Kind::Both { eng, tru } => {
                let (t, note) = self.pair(tru, false)?;
                let (e, _) = self.pair(eng, true)?;
                // Rounding to 0.01 pp in each column keeps the two within 0.01 pp.
                let off =
                    |a: TrueStrain, b: TrueStrain| (a.percent() - b.percent()).abs() > 0.01 + 1e-9;
                (
                    Reading::Strains(t),
                    note,
                    off(t.major, e.major) || off(t.minor, e.minor),
                )
            }
        })
    }

    /// The measurement, and whether its engineering and true strains disagree.
    pub(super) fn read(&self) -> std::result::Result<(Measurement, bool), RejectedRow> {
        let c = self.cols;
        self.check_size()?;
        // Spreadsheets often end rows with empty fields: they are not fields of the header.
        let mut len = self.record.len();
        while len > c.names.len()
            && self
                .record
                .get(len - 1)
                .is_some_and(|f| trim_cell(f).is_empty())
        {
            len -= 1;
        }
        if len != c.names.len() {
            return Err(RejectedRow {
                location: Location::file(self.file).at_line(self.line),
                id: None,
                reason: format!(
                    "expected {} fields as in the header, found {}",
                    c.names.len(),
                    self.record.len()
                ),
            });
        }
        let id = match c.id {
            Some(col) => self
                .text(col)
                .ok_or_else(|| self.reject(col, "empty id".into()))?,
            None => self.line.to_string(),
        };
        if let Some(col) = c.valid {
            super::parse_valid(self.record.get(col).unwrap_or(""))
                .map_err(|e| self.reject(col, e))?;
        }
        let (reading, swapped, disagree) = self.reading()?;
        let thickness = match c.thickness {
            Some(col) if self.text(col).is_some() => {
                self.optional(Some(col))?;
                Some(self.positive(col, "thickness")?)
            }
            _ => None,
        };
        let thinning = match self.optional(c.thinning)? {
            Some(t) if t >= 100.0 => {
                return Err(self.reject(
                    c.thinning.unwrap_or(0),
                    format!("thinning {t} % is not below 100 %"),
                ))
            }
            t => t.map(|t| t / 100.0),
        };
        let mut note = c.note.and_then(|s| self.text(s));
        if let Some(swap) = swapped {
            self.swaps.add(self.line);
            note = Some(match note {
                Some(n) => format!("{n}; {swap}"),
                None => swap,
            });
        }
        Ok((
            Measurement {
                id,
                line: self.line,
                reading,
                x: self.optional(c.x)?,
                y: self.optional(c.y)?,
                z: self.optional(c.z)?,
                stage: c.stage.and_then(|s| self.text(s)),
                thickness,
                thinning,
                note,
                angle_deg: self.optional(c.angle)?,
                condition: match c.condition {
                    Some(col) => Condition::parse_optional(self.record.get(col).unwrap_or(""))
                        .map_err(|e| self.reject(col, e))?,
                    None => None,
                },
            },
            disagree,
        ))
    }
}

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation of `measure` ("What rejects one row") and
    //! README.md, "What input is refused, and why" (trailing empty fields are read as the row).
    use super::super::{ColumnMap, Header, RowRules};
    use super::*;

    fn row(header: &str, fields: &[&str]) -> std::result::Result<Measurement, RejectedRow> {
        let header = Header::read(
            &mut header.as_bytes(),
            Path::new("m.csv"),
            &ColumnMap::default(),
        )
        .unwrap()
        .with_rules(RowRules {
            d0: Some(2.5),
            ..RowRules::default()
        });
        let record = csv::StringRecord::from(fields.to_vec());
        header.row(&record, 2).map(|(m, _)| m)
    }

    fn refused(header: &str, fields: &[&str]) -> String {
        row(header, fields).unwrap_err().to_string()
    }

    #[test]
    fn a_missing_or_empty_cell_rejects_the_row_where_it_is() {
        let h = "id,major,minor\n";
        assert_eq!(
            refused(h, &["A1", "2.6"]),
            "m.csv:2: expected 3 fields as in the header, found 2"
        );
        assert_eq!(
            refused(h, &["A1", "", "2.5"]),
            "m.csv:2:2 (column `major`): expected a number, found an empty field"
        );
        assert_eq!(
            refused(h, &[" ", "2.6", "2.5"]),
            "m.csv:2:1 (column `id`): empty id"
        );
        let e = row(h, &["A1", "2.6"]).unwrap_err();
        assert_eq!((e.location.line, e.location.column), (Some(2), None));
        // Empty fields after the last column, as spreadsheets write them, are not fields.
        assert!(row(h, &["A1", "2.6", "2.5", "", " "]).is_ok());
        assert!(row(h, &["A1", "2.6", "2.5", "", "x"]).is_err());
    }

    #[test]
    fn axes_and_lengths_must_be_positive_and_finite() {
        let h = "id,major,minor,d0,thickness\n";
        let e = refused(h, &["A1", "-12", "-20", "", ""]);
        assert!(
            e.starts_with(
                "m.csv:2:2 (column `major`): the major axis must be greater than zero, found -12"
            ),
            "{e}"
        );
        assert!(e.contains("looks like a strain in percent"), "{e}");
        let e = refused(h, &["A1", "2.6", "2.5", "0", ""]);
        assert!(e.ends_with("d0 must be greater than zero, found 0"), "{e}");
        let e = refused(h, &["A1", "2.6", "2.5", "", "nan"]);
        assert!(
            e.ends_with("(column `thickness`): expected a finite number, found `nan`"),
            "{e}"
        );
        let e = refused("id,major,minor,x\n", &["A1", "2.6", "2.5", "-2e9"]);
        assert!(
            e.contains("is beyond ±1e9: not a position or length"),
            "{e}"
        );
    }

    #[test]
    fn every_optional_column_is_read() {
        let h = "id;major;minor;x;y;z;stage;thickness;thinning_pct;note;condition;angle_deg\n";
        let fields = [
            "A1", "2,6", "2,5", "1", "-2", "3,5", "op20", "0,71", "11", " wall ", "necked", "45",
        ];
        let m = row(h, &fields).unwrap();
        let close = |a: Option<f64>, b: f64| a.is_some_and(|a| (a - b).abs() < 1e-12);
        assert!(close(m.x, 1.0) && close(m.y, -2.0) && close(m.z, 3.5));
        assert!(close(m.thickness, 0.71) && close(m.thinning, 0.11) && close(m.angle_deg, 45.0));
        assert_eq!(m.stage.as_deref(), Some("op20"));
        assert_eq!(m.note.as_deref(), Some("wall"));
        assert_eq!(m.condition, Some(Condition::Necked));
        let e = refused(
            h,
            &["A1", "2,6", "2,5", "", "", "", "", "", "100", "", "", ""],
        );
        assert!(
            e.ends_with("(column `thinning_pct`): thinning 100 % is not below 100 %"),
            "{e}"
        );
    }
}
