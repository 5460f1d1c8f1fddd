//! Reading measurements from CSV: measured ellipse axes, or strains given directly.
//!
//! Columns (header row, names case-insensitive, any order):
//! - `id` (location label), then **either** the measured ellipse axes `major`, `minor` (aliases
//!   `d1`, `d2`) with an optional per-row `d0`, **or** strains in percent: `major_eng_pct`,
//!   `minor_eng_pct` (engineering, as a strain-reading tape gives them) and/or `major_true_pct`,
//!   `minor_true_pct` (true, as optical systems export them; these win when both pairs are
//!   there). A file with strains may leave out `id`: each location is then named by its line.
//! - optional `x`, `y`, `z` (position on the part), `stage`, `thickness` (measured thickness),
//!   `thinning_pct` (measured thickness reduction, percent), `note`.
//!
//! A points.csv written by `check` is itself a strain file: its own computed columns
//! (`thickness`, `thinning_pct`, margins, zones) are recognised and left aside, and its
//! `thickness_measured` is read as the measured thickness.
//!
//! Other headers are mapped onto these names by a [`ColumnMap`] (`[columns]` in the job file,
//! `--column NAME=HEADER`).
//!
//! Three dialects are recognised from the header line: comma-separated with a decimal point,
//! semicolon-separated and tab-separated (decimal comma or point).
//!
//! What rejects the **whole file**: it cannot be read, it is empty or has no data row, the header
//! lacks a required column, names one twice, or mixes axes with strains. What rejects **one row**
//! (listed, never dropped in silence): a wrong number of fields, an empty or duplicate id, a value
//! that is not a finite number, an axis or d0 that is zero or negative, `major < minor`, an
//! implausible strain.
//!
//! The code is cut by concern, every public item re-exported here: `dialect.rs` (separator,
//! numbers, the header line, CSV errors); `columns.rs` (the column names and which field holds
//! what), `column_map.rs` (a file's own headers mapped onto the names) and `recognise.rs` (a
//! header's columns found, kind by kind); `header.rs` (a parsed header); `rules.rs` (the per-row
//! rules: size caps, plausible strains, near-equal axes) and `row.rs` (one row into a
//! measurement); `screen.rs` (the plausibility screen of the first rows); `reader.rs` (opening a
//! file and iterating its rows).

mod column_map;
mod columns;
mod dialect;
mod header;
mod preamble;
mod reader;
mod recognise;
mod row;
mod rules;
mod screen;

pub use column_map::{check_name, ColumnMap};
pub use columns::{Columns, GRID_COLUMNS, NAMES, PATH_COLUMNS, PATH_READING_COLUMNS};
pub(crate) use dialect::{csv_error, read_header_line, trim_cell};
pub use dialect::{csv_reader, parse_number, Dialect};
pub use header::Header;
pub use preamble::{parse_valid, UnitRow, PREAMBLE_LINES};
pub use reader::{
    duplicate, duplicate_key, no_rows, open_input, read_measurements, read_measurements_from,
    MeasurementReader, Row,
};
pub use rules::{
    RowRules, SwapLog, MAX_FIELDS, MAX_FIELD_BYTES, MAX_LENGTH, MAX_ROW_BYTES, STRETCH_RANGE,
    SWAP_TOLERANCE_OF_D0, SWAP_TOLERANCE_PP,
};
pub use screen::{screen, SCREEN_BYTES, SCREEN_ROWS, SCREEN_STRETCH};

use crate::condition::Condition;
use crate::error::Location;
use crate::kinematics::Principal;
use crate::strain::TrueStrain;
use std::path::PathBuf;

/// What was read at one location: ellipse axes, or strains.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Reading {
    /// Measured ellipse axes `major ≥ minor` (file unit), with the row's own d0 if it has one.
    Axes {
        /// Major axis d1.
        major: f64,
        /// Minor axis d2.
        minor: f64,
        /// Initial circle diameter of this row (overrides the job's and the flag's).
        d0: Option<f64>,
    },
    /// Principal strains given directly (converted to true strain on reading), `major ≥ minor`.
    Strains(Principal<TrueStrain>),
}

/// One measured location, as read (lengths in the file's unit).
#[derive(Debug, Clone, PartialEq)]
pub struct Measurement {
    /// Location label, unique in the file.
    pub id: String,
    /// 1-based line in the file, for messages.
    pub line: u64,
    /// The axes or strains read.
    pub reading: Reading,
    /// Position on the part.
    pub x: Option<f64>,
    /// Position on the part.
    pub y: Option<f64>,
    /// Position on the part (height).
    pub z: Option<f64>,
    /// Forming stage or operation label.
    pub stage: Option<String>,
    /// Measured sheet thickness, for a cross-check with the computed one.
    pub thickness: Option<f64>,
    /// Measured thinning (thickness reduction), a fraction, for the same cross-check.
    pub thinning: Option<f64>,
    /// Free text.
    pub note: Option<String>,
    /// Condition observed on the part at this location (`safe`, `necked`, `split`), if marked.
    pub condition: Option<Condition>,
    /// Direction of the major axis, degrees (for a location measured after several stages).
    pub angle_deg: Option<f64>,
}

impl Measurement {
    /// A location read as axes, with nothing else.
    pub fn axes(id: &str, line: u64, major: f64, minor: f64, d0: Option<f64>) -> Self {
        Measurement {
            id: id.to_string(),
            line,
            reading: Reading::Axes { major, minor, d0 },
            x: None,
            y: None,
            z: None,
            stage: None,
            thickness: None,
            thinning: None,
            note: None,
            condition: None,
            angle_deg: None,
        }
    }
}

/// A data row that was not accepted, with the reason.
#[derive(Debug, Clone, PartialEq)]
pub struct RejectedRow {
    /// Where: file, line and column.
    pub location: Location,
    /// The row's id, if it could be read.
    pub id: Option<String>,
    /// What was found and what was expected.
    pub reason: String,
}

impl std::fmt::Display for RejectedRow {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.location, self.reason)
    }
}

/// The accepted and rejected rows of one measurement file.
#[derive(Debug, Clone)]
pub struct MeasurementSet {
    /// The file as named by the user (`-` for standard input).
    pub source: PathBuf,
    /// The detected dialect.
    pub dialect: Dialect,
    /// Accepted rows, in file order.
    pub points: Vec<Measurement>,
    /// Rejected rows, in file order.
    pub rejected: Vec<RejectedRow>,
    /// Notes on the header (ignored columns, how the columns were read).
    pub notes: Vec<String>,
    /// Lines of the rows not measured (empty readings, or flagged not valid).
    pub not_measured: crate::capped::Capped<u64>,
}

#[cfg(test)]
mod tests {
    //! Expectations from the doc comments of [`Measurement::axes`] and [`RejectedRow`] (where:
    //! file, line and column).
    use super::*;
    use std::path::Path;

    #[test]
    fn a_rejected_row_names_file_line_and_column() {
        let row = RejectedRow {
            location: Location::file(Path::new("parts/m.csv"))
                .at_line(12)
                .at_column(3, "minor"),
            id: Some("A1".into()),
            reason: "expected a finite number, found `n/a`".into(),
        };
        assert_eq!(
            row.to_string(),
            "parts/m.csv:12:3 (column `minor`): expected a finite number, found `n/a`"
        );
    }

    #[test]
    fn a_location_read_as_axes_carries_nothing_else() {
        let m = Measurement::axes("A1", 4, 2.9, 2.6, Some(2.5));
        assert_eq!((m.id.as_str(), m.line), ("A1", 4));
        assert!(
            matches!(m.reading, Reading::Axes { d0: Some(d0), .. } if (d0 - 2.5).abs() < 1e-12)
        );
        assert!(m.x.is_none() && m.stage.is_none() && m.condition.is_none() && m.note.is_none());
    }
}
