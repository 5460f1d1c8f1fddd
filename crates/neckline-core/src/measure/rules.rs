//! The rules a row is read by beyond its own fields: the size caps of a mangled file, the
//! plausible strain range, and near-equal axes (or strains) swapped within a tolerance.

use super::row::RowReader;
use super::{Reading, RejectedRow};
use crate::error::Location;
use crate::kinematics::Principal;
use crate::strain::{EngStrain, TrueStrain};

/// Plausible engineering strain of a reading, as a fraction: −80 % to +400 % (stretch 0.2 to
/// 5). Outside it the reading, d0, the unit or the column is wrong, not the sheet.
pub const STRETCH_RANGE: (f64, f64) = (0.2, 5.0);

/// Whether a difference is within a tolerance, allowing for the round-off of decimal
/// readings (2.28 − 2.26 is 0.020000000000000018 in binary).
fn within(diff: f64, tol: f64) -> bool {
    diff <= tol * (1.0 + 1e-9) + 1e-12
}

/// Most fields a row may have: a measurement row has up to 17, so a thousand is not one of
/// them but a mangled file (trailing empty fields count).
pub const MAX_FIELDS: usize = 1000;
/// Longest field, bytes: a number, an id or a note is far shorter; longer is an unclosed
/// quote or a pasted document, not a value.
pub const MAX_FIELD_BYTES: usize = 4096;
/// Largest position or thickness read (in the file's unit): 1e9 (a thousand km in mm), so
/// that sums and squares of positions stay finite.
pub const MAX_LENGTH: f64 = 1e9;
/// Longest row, bytes of its fields: 64 KiB (16 fields of [`MAX_FIELD_BYTES`]). A longer row is
/// rejected alone, with its line, and the rows after it are read. This is a rule for one row,
/// read in memory and in the streaming pass alike; the pass's own cap,
/// [`crate::stream::MAX_RECORD_BYTES`] (1024 times this), only bounds how much it holds while it
/// looks for a record's end.
pub const MAX_ROW_BYTES: usize = 64 << 10;

/// Near-equal axes: the default tolerance when no reading error is given, a fraction of d0
/// (1 %: 0.025 mm on a 2.5 mm circle, the reading error of a measuring microscope or a
/// strain-reading tape, common practice).
pub const SWAP_TOLERANCE_OF_D0: f64 = 0.01;
/// Near-equal strains: the default tolerance when no reading error is given, percentage
/// points (0.1 pp: the last digit an optical system or a tape reports, common practice).
pub const SWAP_TOLERANCE_PP: f64 = 0.1;

/// What a file's rows are read with beyond their own fields, in the file's unit: the d0 and
/// the reading error in force (the near-equal axes rule) and the unit (the plausibility
/// screen's advice). The default knows neither d0 nor a reading error.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct RowRules {
    /// d0 in force for rows without their own.
    pub d0: Option<f64>,
    /// Reading error of one axis (file unit), or of a strain (percentage points) for a file
    /// that gives strains.
    pub reading_error: Option<f64>,
    /// The unit in use.
    pub unit: crate::units::LengthUnit,
}

impl RowRules {
    /// The rules of a run: its lengths and its reading error.
    pub fn new(lengths: &crate::units::Lengths, reading_error: Option<f64>) -> Self {
        RowRules {
            d0: lengths.d0,
            reading_error,
            unit: lengths.unit,
        }
    }
}

/// The rows whose near-equal axes (or strains) were swapped: a count and the first line, shared
/// by every thread reading the file.
#[derive(Debug)]
pub struct SwapLog {
    count: std::sync::atomic::AtomicU64,
    first: std::sync::atomic::AtomicU64,
}

impl Default for SwapLog {
    fn default() -> Self {
        SwapLog {
            count: 0.into(),
            first: u64::MAX.into(),
        }
    }
}

impl SwapLog {
    pub(super) fn add(&self, line: u64) {
        use std::sync::atomic::Ordering::Relaxed;
        self.count.fetch_add(1, Relaxed);
        self.first.fetch_min(line, Relaxed);
    }
    /// How many rows were swapped, and the first line.
    pub fn get(&self) -> (u64, u64) {
        use std::sync::atomic::Ordering::Relaxed;
        (self.count.load(Relaxed), self.first.load(Relaxed))
    }
}

impl RowReader<'_> {
    /// Refuse a row with too many fields, a field or the row too long, or a NUL byte: a
    /// mangled or binary file, never a reading. The id of such a row is not kept.
    pub(super) fn check_size(&self) -> std::result::Result<(), RejectedRow> {
        let at = |col: Option<usize>, reason: String| {
            let mut location = Location::file(self.file).at_line(self.line);
            location.column = col.map(|c| c as u64 + 1);
            location.column_name = col.and_then(|c| self.cols.names.get(c).cloned());
            RejectedRow {
                location,
                id: None,
                reason,
            }
        };
        let n = self.record.len();
        if n > MAX_FIELDS {
            return Err(at(
                None,
                format!("{n} fields on one row, more than {MAX_FIELDS}: not a measurement row"),
            ));
        }
        let bytes = self.record.as_byte_record().as_slice();
        if bytes.len() > MAX_FIELD_BYTES {
            if let Some((i, f)) = self
                .record
                .iter()
                .enumerate()
                .find(|(_, f)| f.len() > MAX_FIELD_BYTES)
            {
                return Err(at(
                    Some(i),
                    format!(
                        "a field of {} bytes, more than {MAX_FIELD_BYTES}: an unclosed quote or \
                         pasted text?",
                        f.len()
                    ),
                ));
            }
        }
        if bytes.len() > MAX_ROW_BYTES {
            return Err(at(
                None,
                format!(
                    "a row of {} bytes, more than {} KiB: an unclosed quote or pasted text?",
                    bytes.len(),
                    MAX_ROW_BYTES >> 10
                ),
            ));
        }
        if memchr::memchr(0, bytes).is_some() {
            let col = self.record.iter().position(|f| f.contains('\0'));
            return Err(at(
                col,
                "a NUL byte: binary data, or UTF-16 text read as UTF-8 (save the file as CSV \
                 UTF-8)"
                    .into(),
            ));
        }
        Ok(())
    }

    /// The tolerance within which a minor axis above the major one is taken as near-equal:
    /// the reading error, else 1 % of d0, else none.
    fn axis_tolerance(&self, d0: Option<f64>) -> Option<(f64, String)> {
        if let Some(r) = self.rules.reading_error {
            return Some((r, format!("the reading error {r}")));
        }
        let d0 = d0.or(self.rules.d0)?;
        Some((SWAP_TOLERANCE_OF_D0 * d0, format!("1 % of d0 {d0}")))
    }

    /// The tolerance for strains given directly, percentage points.
    fn strain_tolerance(&self) -> (f64, String) {
        match self.rules.reading_error {
            Some(r) => (r, format!("the reading error {r} pp")),
            None => (SWAP_TOLERANCE_PP, format!("{SWAP_TOLERANCE_PP} pp")),
        }
    }

    /// A strain in percent as a true strain; `eng` says which measure the column holds.
    fn strain(&self, col: usize, eng: bool) -> std::result::Result<TrueStrain, RejectedRow> {
        let v = self.number(col)?;
        let t = if eng {
            EngStrain::from_percent(v).to_true()
        } else {
            Some(TrueStrain::from_percent(v))
        };
        let plausible = t.filter(|t| {
            let l = t.value().exp();
            (STRETCH_RANGE.0..=STRETCH_RANGE.1).contains(&l)
        });
        plausible.ok_or_else(|| {
            self.reject(
                col,
                format!(
                    "{v} % is not a plausible strain: expected {} % to {} % engineering \
                     (percent, not a fraction or an axis length?)",
                    -80, 400
                ),
            )
        })
    }

    /// The two strains of a pair; a minor strain above the major one by no more than the
    /// tolerance is near-equal, and the two are swapped (the note says so).
    pub(super) fn pair(
        &self,
        (major, minor): (usize, usize),
        eng: bool,
    ) -> std::result::Result<(Principal<TrueStrain>, Option<String>), RejectedRow> {
        let (a, b) = (self.strain(major, eng)?, self.strain(minor, eng)?);
        if a.value() >= b.value() {
            return Ok((Principal { major: a, minor: b }, None));
        }
        let (va, vb) = (self.number(major)?, self.number(minor)?);
        let (tol, what) = self.strain_tolerance();
        if within(vb - va, tol) {
            let note = format!(
                "near-equal strains swapped: minor {vb} % read {:.3} pp above major {va} %, \
                 within {what}",
                vb - va
            );
            return Ok((Principal { major: b, minor: a }, Some(note)));
        }
        Err(self.reject(
            minor,
            format!(
                "major strain {va} is smaller than minor strain {vb} by {:.3} pp, more than \
                 {what}: columns swapped?",
                vb - va
            ),
        ))
    }

    /// The axes; a minor axis above the major one by no more than the tolerance is
    /// near-equal (a dome top read a hair apart), and the two are swapped with a note.
    pub(super) fn axes(
        &self,
        major: usize,
        minor: usize,
    ) -> std::result::Result<(Reading, Option<String>), RejectedRow> {
        let d1 = self.positive(major, "the major axis")?;
        let d2 = self.positive(minor, "the minor axis")?;
        let d0 = match self.cols.d0 {
            Some(col) if self.text(col).is_some() => Some(self.positive(col, "d0")?),
            _ => None,
        };
        let axes = |major, minor| Reading::Axes { major, minor, d0 };
        if d1 >= d2 {
            return Ok((axes(d1, d2), None));
        }
        match self.axis_tolerance(d0) {
            Some((tol, what)) if within(d2 - d1, tol) => {
                let note = format!(
                    "near-equal axes swapped: minor {d2} read {:.4} above major {d1}, within \
                     {what}",
                    d2 - d1
                );
                Ok((axes(d2, d1), Some(note)))
            }
            tol => {
                let within = tol.map_or_else(
                    || "no reading error or d0 to judge it by".to_string(),
                    |(_, what)| format!("more than {what}"),
                );
                Err(self.reject(
                    minor,
                    format!(
                        "major axis {d1} is smaller than minor axis {d2} by {:.4}, {within}: \
                         columns swapped?",
                        d2 - d1
                    ),
                ))
            }
        }
    }
}

#[cfg(test)]
mod tests {
    //! Expectations from the doc comments of the constants above and README.md, "What input is
    //! refused, and why" (near-equal axes; size; positions beyond ±1e9).
    use super::super::{ColumnMap, Header, Measurement, MeasurementReader, Row};
    use super::*;
    use crate::units::LengthUnit;
    use std::path::Path;

    /// The rows of `text` read with `rules`, and the header (with its swap log). The header is
    /// read on its own, so that the text check of a file's start does not see the rows.
    fn read(text: &str, rules: RowRules) -> (Vec<Row>, Header) {
        let (first, body) = text.split_at(text.find('\n').unwrap() + 1);
        let header = Header::read(
            &mut first.as_bytes(),
            Path::new("m.csv"),
            &ColumnMap::default(),
        )
        .unwrap()
        .with_rules(rules);
        let mut reader = MeasurementReader::after(body.as_bytes(), header);
        let rows = (&mut reader).map(|r| r.unwrap()).collect();
        (rows, reader.header)
    }

    fn with_d0(d0: f64) -> RowRules {
        RowRules {
            d0: Some(d0),
            reading_error: None,
            unit: LengthUnit::Mm,
        }
    }

    fn axes(row: &Row) -> (f64, f64) {
        match row {
            Ok(Measurement {
                reading: Reading::Axes { major, minor, .. },
                ..
            }) => (*major, *minor),
            other => panic!("expected axes, found {other:?}"),
        }
    }

    fn reason(row: &Row) -> String {
        row.as_ref().unwrap_err().to_string()
    }

    #[test]
    fn near_equal_axes_are_swapped_within_one_percent_of_d0() {
        // d0 2.5: 1 % is 0.025 (SWAP_TOLERANCE_OF_D0).
        let (rows, header) = read("id,major,minor\nA1,2.51,2.53\nA2,2.50,2.60\n", with_d0(2.5));
        let (major, minor) = axes(&rows[0]);
        assert!((major - 2.53).abs() < 1e-12 && (minor - 2.51).abs() < 1e-12);
        let note = rows[0].as_ref().unwrap().note.clone().unwrap();
        assert!(
            note.starts_with("near-equal axes swapped: minor 2.53"),
            "{note}"
        );
        assert!(note.ends_with("within 1 % of d0 2.5"), "{note}");
        let e = reason(&rows[1]);
        assert!(
            e.starts_with("m.csv:3:3 (column `minor`): major axis 2.5 is smaller"),
            "{e}"
        );
        assert!(
            e.contains("more than 1 % of d0 2.5: columns swapped?"),
            "{e}"
        );
        assert_eq!(header.swaps.get(), (1, 2));
    }

    #[test]
    fn the_reading_error_or_the_row_d0_sets_the_tolerance_and_without_either_none() {
        let text = "id,major,minor\nA1,2.50,2.54\n";
        let (rows, _) = read(text, RowRules::default());
        assert!(reason(&rows[0]).contains("no reading error or d0 to judge it by"));
        let rules = RowRules {
            reading_error: Some(0.05),
            ..RowRules::default()
        };
        let (rows, _) = read(text, rules);
        let (major, _) = axes(&rows[0]);
        assert!((major - 2.54).abs() < 1e-12);
        // A row's own d0 (5: 1 % is 0.05) serves as well.
        let (rows, _) = read("id,major,minor,d0\nA1,2.50,2.54,5\n", RowRules::default());
        assert!(rows[0].is_ok());
    }

    #[test]
    fn near_equal_strains_are_swapped_within_a_tenth_of_a_point() {
        let text = "major_eng_pct,minor_eng_pct\n10.0,10.08\n10.0,10.2\n";
        let (rows, header) = read(text, RowRules::default());
        let m = rows[0].as_ref().unwrap();
        let Reading::Strains(p) = m.reading else {
            panic!("expected strains")
        };
        // True strain ln(1 + e) (Marciniak, Duncan and Hu, Mechanics of Sheet Metal Forming,
        // 2002, section 1.2): the major is now the larger, 10.08 %.
        assert!((p.major.value() - 1.1008f64.ln()).abs() < 1e-12);
        assert!((p.minor.value() - 1.1f64.ln()).abs() < 1e-12);
        assert!(m.note.as_deref().unwrap().contains("within 0.1 pp"));
        assert!(reason(&rows[1]).contains("by 0.200 pp, more than 0.1 pp: columns swapped?"));
        assert!(header.swap_note().unwrap().contains("(within 0.1 pp)"));
    }

    #[test]
    fn strains_outside_minus_80_to_400_percent_are_rejected() {
        let text = "major_eng_pct,minor_eng_pct\n399,-79\n401,0\n10,-81\n";
        let (rows, _) = read(text, RowRules::default());
        assert!(rows[0].is_ok());
        for (row, col) in [(&rows[1], "major_eng_pct"), (&rows[2], "minor_eng_pct")] {
            let e = reason(row);
            assert!(e.contains(&format!("(column `{col}`)")), "{e}");
            assert!(
                e.contains("is not a plausible strain: expected -80 % to 400 %"),
                "{e}"
            );
        }
        // True strain: ln 5 = 160.9 % is the top of the range.
        let (rows, _) = read(
            "major_true_pct,minor_true_pct\n160,0\n162,0\n",
            RowRules::default(),
        );
        assert!(rows[0].is_ok() && rows[1].is_err());
    }

    #[test]
    fn an_oversized_row_is_rejected_alone_and_the_next_is_read() {
        let field = "x".repeat(MAX_FIELD_BYTES + 1);
        let long = vec!["y".repeat(4000); 17].join(",");
        let many = ",".repeat(MAX_FIELDS);
        let text = format!(
            "id,major,minor,note\nA1,2.6,2.5,{field}\nA2,{long}\nA3{many}\nA4,2.6,2\u{0}.5,\nA5,2.6,2.5,\n"
        );
        let (rows, _) = read(&text, with_d0(2.5));
        let e = reason(&rows[0]);
        assert!(
            e.starts_with("m.csv:2:4 (column `note`): a field of 4097 bytes"),
            "{e}"
        );
        assert!(reason(&rows[1]).starts_with("m.csv:3: a row of 68002 bytes, more than 64 KiB"));
        assert!(reason(&rows[2]).starts_with("m.csv:4: 1001 fields on one row, more than 1000"));
        assert!(reason(&rows[3]).starts_with("m.csv:5:3 (column `minor`): a NUL byte"));
        assert!(rows[..4]
            .iter()
            .all(|r| r.as_ref().unwrap_err().id.is_none()));
        assert_eq!(rows[4].as_ref().unwrap().id, "A5");
    }
}
