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

use crate::condition::Condition;
use crate::error::{Error, Location, Result};
use crate::kinematics::Principal;
use crate::strain::{EngStrain, TrueStrain};
use std::collections::HashSet;
use std::fs::File;
use std::io::{self, BufRead, BufReader, Read};
use std::path::{Path, PathBuf};

/// Field separator and decimal mark of a measurement file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dialect {
    /// `,` between fields, `.` as decimal mark.
    Comma,
    /// `;` between fields, `,` (or `.`) as decimal mark.
    Semicolon,
    /// Tab between fields (pasted from a spreadsheet), `,` or `.` as decimal mark.
    Tab,
}

impl Dialect {
    /// Detect from the header line: a tab in it means the tab dialect, else a `;` the
    /// semicolon dialect, else commas.
    pub fn detect(header: &str) -> Self {
        if header.contains('\t') {
            Dialect::Tab
        } else if header.contains(';') {
            Dialect::Semicolon
        } else {
            Dialect::Comma
        }
    }
    pub(crate) fn delimiter(self) -> u8 {
        match self {
            Dialect::Comma => b',',
            Dialect::Semicolon => b';',
            Dialect::Tab => b'\t',
        }
    }
}

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
}

/// neckline's names for the columns it reads.
pub const NAMES: [&str; 17] = [
    "id",
    "major",
    "minor",
    "d0",
    "x",
    "y",
    "z",
    "stage",
    "thickness",
    "thinning_pct",
    "note",
    "major_eng_pct",
    "minor_eng_pct",
    "major_true_pct",
    "minor_true_pct",
    "condition",
    "angle_deg",
];

/// Columns of a points.csv written by `check` that are results, not readings: left aside
/// without a warning when such a file is judged again.
const OWN_RESULT_COLUMNS: &[&str] = &[
    "thickness_true_pct",
    "thickness",
    "thinning_pct",
    "major_green_pct",
    "minor_green_pct",
    "major_almansi_pct",
    "minor_almansi_pct",
    "beta",
    "effective_true_pct",
    "limit_major_eng_pct",
    "margin_pct",
    "limit_use_pct",
    "zone",
    "d0",
    "thickness_diff_pct",
    "thinning_diff_pp",
    "margin_uncertainty_pct",
    "borderline",
    "thinning_measured_pct",
    "reason",
    "",
];

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

    fn name_of(&self, header: &str) -> Option<&str> {
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

/// How a row gives its strains.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    Axes {
        major: usize,
        minor: usize,
    },
    Eng {
        major: usize,
        minor: usize,
    },
    True {
        major: usize,
        minor: usize,
    },
    /// Both pairs: true strain is used, engineering is checked against it.
    Both {
        eng: (usize, usize),
        tru: (usize, usize),
    },
}

/// The recognised columns of a header.
#[derive(Debug, Clone)]
pub struct Columns {
    /// The header as written, for messages.
    names: Vec<String>,
    id: Option<usize>,
    kind: Kind,
    d0: Option<usize>,
    x: Option<usize>,
    y: Option<usize>,
    z: Option<usize>,
    stage: Option<usize>,
    thickness: Option<usize>,
    thinning: Option<usize>,
    note: Option<usize>,
    condition: Option<usize>,
    angle: Option<usize>,
}

fn canonical(name: &str) -> String {
    let n = name
        .trim()
        .trim_start_matches('\u{feff}')
        .trim()
        .to_ascii_lowercase();
    match n.as_str() {
        "d1" => "major".into(),
        "d2" => "minor".into(),
        _ => n,
    }
}

impl Columns {
    /// Recognise the columns of `header`, through `map`. Returns the columns and notes for the
    /// user (ignored columns, strain columns in use).
    pub fn from_header(
        header: &csv::StringRecord,
        map: &ColumnMap,
        loc: &Location,
    ) -> Result<(Self, Vec<String>)> {
        let at = |i: usize, n: &str| loc.clone().at_line(1).at_column(i as u64 + 1, n);
        for (name, h) in &map.entries {
            if !header
                .iter()
                .any(|f| f.trim().eq_ignore_ascii_case(h.trim()))
            {
                return Err(Error::input(
                    loc.clone().at_line(1),
                    format!(
                        "column map ({}): `{name} = \"{h}\"`, but the header has no column \
                         `{h}` (found: {})",
                        map.origin,
                        header.iter().collect::<Vec<_>>().join(", ")
                    ),
                ));
            }
        }
        let names: Vec<String> = header
            .iter()
            .map(|h| map.name_of(h).map_or_else(|| canonical(h), str::to_string))
            .collect();
        let own =
            names.iter().any(|n| n == "thickness_true_pct") && names.iter().any(|n| n == "zone");
        let mut seen = HashSet::new();
        for (i, n) in names.iter().enumerate() {
            if !n.is_empty() && !seen.insert(n.clone()) {
                return Err(Error::input(
                    at(i, n),
                    format!("column `{n}` appears twice in the header"),
                ));
            }
        }
        let find = |n: &str| names.iter().position(|c| c == n);
        let pair = |a: &str, b: &str| -> Result<Option<(usize, usize)>> {
            match (find(a), find(b)) {
                (Some(i), Some(j)) => Ok(Some((i, j))),
                (None, None) => Ok(None),
                (Some(i), None) | (None, Some(i)) => {
                    let missing = if names[i] == a { b } else { a };
                    Err(Error::input(
                        loc.clone().at_line(1),
                        format!(
                            "missing column `{missing}`: `{a}` and `{b}` come as a pair, the \
                             header has only `{}` (found: {})",
                            names[i],
                            header.iter().collect::<Vec<_>>().join(", ")
                        ),
                    ))
                }
            }
        };
        let axes = pair("major", "minor")?;
        let eng = pair("major_eng_pct", "minor_eng_pct")?;
        let tru = pair("major_true_pct", "minor_true_pct")?;
        let mut notes = Vec::new();
        let kind = match (axes, eng, tru) {
            (Some(_), None, None) => {
                let (major, minor) = axes.unwrap_or_default();
                Kind::Axes { major, minor }
            }
            (Some((a, _)), e, t) => {
                let s = e.or(t).map_or(0, |p| p.0);
                return Err(Error::input(
                    loc.clone().at_line(1),
                    format!(
                        "the header has both ellipse axes (`{}`) and strains (`{}`): give one \
                         or the other (remove or rename the columns you do not mean)",
                        header.get(a).unwrap_or(""),
                        header.get(s).unwrap_or("")
                    ),
                ));
            }
            (None, Some((major, minor)), None) => Kind::Eng { major, minor },
            (None, None, Some((major, minor))) => Kind::True { major, minor },
            (None, Some(e), Some(t)) => {
                if !own {
                    notes.push(
                        "both engineering and true strain columns: true strain is used, \
                         engineering is checked against it"
                            .to_string(),
                    );
                }
                Kind::Both { eng: e, tru: t }
            }
            (None, None, None) => {
                let mut msg = format!(
                    "missing columns: the header must name id, major and minor (ellipse axes), \
                     or major_eng_pct/minor_eng_pct or major_true_pct/minor_true_pct (strains, \
                     percent) (found: {})",
                    header.iter().collect::<Vec<_>>().join(", ")
                );
                if !map.entries.is_empty() {
                    msg.push_str(&format!(
                        "; the column map ({}) maps {}",
                        map.origin,
                        map.entries
                            .iter()
                            .map(|(n, h)| format!("`{h}` to {n}"))
                            .collect::<Vec<_>>()
                            .join(", ")
                    ));
                } else {
                    msg.push_str("; map other headers with --column NAME=HEADER or [columns] in the job file");
                }
                return Err(Error::input(loc.clone().at_line(1), msg));
            }
        };
        let id = find("id");
        if id.is_none() {
            if matches!(kind, Kind::Axes { .. }) {
                return Err(Error::input(
                    loc.clone().at_line(1),
                    format!(
                        "missing column `id`: the header must name id, major and minor (found: {}){}",
                        header.iter().collect::<Vec<_>>().join(", "),
                        if map.entries.is_empty() { String::new() } else { format!("; column map ({})", map.origin) }
                    ),
                ));
            }
            notes.push("no id column: each location is named by its line in the file".into());
        }
        let strains = !matches!(kind, Kind::Axes { .. });
        if strains && find("d0").is_some() && !own {
            notes.push("the d0 column is not used: the file gives strains, not axes".into());
        }
        // In a points.csv written by `check`, `thickness` and `thinning_pct` are computed: the
        // measured thickness is `thickness_measured`.
        let (thickness, thinning) = if own {
            (find("thickness_measured"), find("thinning_measured_pct"))
        } else {
            (find("thickness"), find("thinning_pct"))
        };
        let used: Vec<&str> = if own {
            let mut v = NAMES.to_vec();
            v.extend(OWN_RESULT_COLUMNS);
            v.extend(crate::output::points_csv::PATH_COLUMNS);
            v.extend(["thickness_measured", "thinning_measured_pct"]);
            v.extend(crate::output::points_csv::GRID_COLUMNS);
            v
        } else {
            let mut v = NAMES.to_vec();
            v.push("");
            v
        };
        let ignored: Vec<String> = names
            .iter()
            .filter(|n| !used.contains(&n.as_str()))
            .cloned()
            .collect();
        if !ignored.is_empty() {
            notes.push(format!("ignored columns: {}", ignored.join(", ")));
        }
        let cols = Columns {
            id,
            kind,
            d0: if strains { None } else { find("d0") },
            x: find("x"),
            y: find("y"),
            z: find("z"),
            stage: find("stage"),
            thickness,
            thinning,
            note: find("note"),
            condition: find("condition"),
            angle: find("angle_deg"),
            names,
        };
        Ok((cols, notes))
    }

    /// Whether rows give strains rather than axes.
    pub fn gives_strains(&self) -> bool {
        !matches!(self.kind, Kind::Axes { .. })
    }

    /// The field number of neckline's column `name`, when the file has it.
    pub fn index(&self, name: &str) -> Option<usize> {
        self.names.iter().position(|n| n == name)
    }

    /// Whether the file has the column `name` (neckline's name).
    pub fn has(&self, name: &str) -> bool {
        match name {
            "z" => self.z.is_some(),
            "thinning_pct" => self.thinning.is_some(),
            "stage" => self.stage.is_some(),
            "x" => self.x.is_some(),
            "condition" => self.condition.is_some(),
            "angle_deg" => self.angle.is_some(),
            "y" => self.y.is_some(),
            _ => self.names.iter().any(|n| n == name),
        }
    }
}

/// Parse one number in the file's dialect; `Err` holds what was expected.
pub fn parse_number(text: &str, dialect: Dialect) -> std::result::Result<f64, String> {
    let t = text.trim();
    let owned;
    let t = if dialect != Dialect::Comma && t.contains(',') {
        owned = t.replace(',', ".");
        owned.as_str()
    } else {
        t
    };
    match t.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(format!(
            "expected a finite number, found `{}`",
            crate::error::clip(text.trim())
        )),
    }
}

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
/// Longest row, bytes of its fields: 64 KiB.
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
    fn add(&self, line: u64) {
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

/// Reads one row into a [`Measurement`], or says why it is rejected.
struct RowReader<'a> {
    cols: &'a Columns,
    dialect: Dialect,
    file: &'a Path,
    line: u64,
    record: &'a csv::StringRecord,
    rules: &'a RowRules,
    swaps: &'a SwapLog,
}

impl RowReader<'_> {
    fn reject(&self, col: usize, reason: String) -> RejectedRow {
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

    fn text(&self, col: usize) -> Option<String> {
        let v = self.record.get(col)?.trim();
        (!v.is_empty()).then(|| v.to_string())
    }

    fn number(&self, col: usize) -> std::result::Result<f64, RejectedRow> {
        let raw = self.record.get(col).unwrap_or("");
        if raw.trim().is_empty() {
            return Err(self.reject(col, "expected a number, found an empty field".into()));
        }
        parse_number(raw, self.dialect).map_err(|e| self.reject(col, e))
    }

    fn optional(&self, col: Option<usize>) -> std::result::Result<Option<f64>, RejectedRow> {
        match col {
            Some(c) if !self.record.get(c).unwrap_or("").trim().is_empty() => {
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

    fn positive(&self, col: usize, what: &str) -> std::result::Result<f64, RejectedRow> {
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

    /// Refuse a row with too many fields, a field or the row too long, or a NUL byte: a
    /// mangled or binary file, never a reading. The id of such a row is not kept.
    fn check_size(&self) -> std::result::Result<(), RejectedRow> {
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
    fn pair(
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
    fn axes(
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
    fn read(&self) -> std::result::Result<(Measurement, bool), RejectedRow> {
        let c = self.cols;
        self.check_size()?;
        // Spreadsheets often end rows with empty fields: they are not fields of the header.
        let mut len = self.record.len();
        while len > c.names.len()
            && self
                .record
                .get(len - 1)
                .is_some_and(|f| f.trim().is_empty())
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

/// Open `path` for reading; `-` is standard input.
pub fn open_input(path: &Path) -> Result<Box<dyn BufRead + Send>> {
    if path.as_os_str() == "-" {
        return Ok(Box::new(BufReader::new(io::stdin())));
    }
    let f = File::open(path).map_err(|e| Error::io(path, e))?;
    Ok(Box::new(BufReader::with_capacity(1 << 16, f)))
}

/// Read a measurement file from `path` (`-` for standard input) into memory: for small files
/// (outlines, parts evidence); `check` streams through [`crate::stream`].
pub fn read_measurements(path: &Path) -> Result<MeasurementSet> {
    let input = open_input(path)?;
    read_measurements_from(input, path, &ColumnMap::default())
}

/// Read measurements from any reader; `name` is used in messages.
pub fn read_measurements_from(
    input: impl BufRead,
    name: &Path,
    map: &ColumnMap,
) -> Result<MeasurementSet> {
    let mut rows = MeasurementReader::new(input, name, map)?;
    let mut points = Vec::new();
    let mut rejected = Vec::new();
    for row in &mut rows {
        match row? {
            Ok(m) => points.push(m),
            Err(r) => rejected.push(r),
        }
    }
    if points.is_empty() && rejected.is_empty() {
        return Err(no_rows(name));
    }
    Ok(MeasurementSet {
        source: name.to_path_buf(),
        dialect: rows.header.dialect,
        points,
        rejected,
        notes: rows.header.notes.clone(),
    })
}

/// The error for a file with a header and no data row.
pub fn no_rows(name: &Path) -> Error {
    Error::input(
        Location::file(name),
        "the file has a header but no measurement rows",
    )
}

/// The parsed header of a measurement file: everything needed to read its rows, in any order
/// and on any thread.
#[derive(Debug, Clone)]
pub struct Header {
    /// The file as named by the user.
    pub file: PathBuf,
    /// The detected dialect.
    pub dialect: Dialect,
    /// The recognised columns.
    pub columns: Columns,
    /// Notes for the user about the header.
    pub notes: Vec<String>,
    /// Lines taken by comments and the header: the first data line is `lines + 1`.
    pub lines: u64,
    /// The d0, reading error and unit the rows are read with (see [`Header::with_rules`]).
    pub rules: RowRules,
    /// The rows whose near-equal axes were swapped.
    pub swaps: std::sync::Arc<SwapLog>,
}

impl Header {
    /// Read comment lines and the header line from `input`, which is left at the first data
    /// line.
    pub fn read(input: &mut impl BufRead, name: &Path, map: &ColumnMap) -> Result<Self> {
        let loc = Location::file(name);
        let head = input.fill_buf().map_err(|e| Error::io(name, e))?;
        crate::error::check_text(name, head, false)?;
        let (prefix, header) = read_header_line(input, name)?;
        if header.is_empty() {
            return Err(Error::input(
                loc,
                "the file is empty: expected a header row naming id, major, minor (or strain columns)",
            ));
        }
        let dialect = Dialect::detect(&header);
        let lines = prefix.bytes().filter(|&b| b == b'\n').count().max(1) as u64;
        let mut reader = csv_reader(dialect, header.as_bytes());
        let mut record = csv::StringRecord::new();
        reader
            .read_record(&mut record)
            .map_err(|e| csv_error(&loc, e))?;
        if record.len() > MAX_FIELDS {
            return Err(Error::input(
                loc.at_line(lines),
                format!(
                    "the header has {} fields, more than {MAX_FIELDS}: not a measurement file",
                    record.len()
                ),
            ));
        }
        let (columns, notes) = Columns::from_header(&record, map, &loc)?;
        Ok(Header {
            file: name.to_path_buf(),
            dialect,
            columns,
            notes,
            lines,
            rules: RowRules::default(),
            swaps: Default::default(),
        })
    }

    /// The same header, its rows read with `rules` (the run's d0, reading error and unit).
    pub fn with_rules(mut self, rules: RowRules) -> Self {
        self.rules = rules;
        self
    }

    /// A note for the user when near-equal axes or strains were swapped.
    pub fn swap_note(&self) -> Option<String> {
        let (n, first) = self.swaps.get();
        let tol = match (self.rules.reading_error, self.columns.gives_strains()) {
            (Some(r), true) => format!("the reading error {r} pp"),
            (Some(r), false) => format!("the reading error {r}"),
            (None, true) => format!("{SWAP_TOLERANCE_PP} pp"),
            (None, false) => "1 % of d0".into(),
        };
        (n > 0).then(|| {
            format!(
                "{n} row{} read minor a hair above major (within {tol}): taken as \
                 near-equal and swapped, first at line {first}; each is noted in points.csv",
                if n == 1 { "" } else { "s" }
            )
        })
    }

    /// Read one record at `line` into a measurement or a rejection, and whether its
    /// engineering and true strains disagree.
    pub fn row(
        &self,
        record: &csv::StringRecord,
        line: u64,
    ) -> std::result::Result<(Measurement, bool), RejectedRow> {
        RowReader {
            cols: &self.columns,
            dialect: self.dialect,
            file: &self.file,
            line,
            record,
            rules: &self.rules,
            swaps: &self.swaps,
        }
        .read()
    }
}

/// The plausibility screen reads at most this many bytes of the body (256 KiB) ...
pub const SCREEN_BYTES: u64 = 256 << 10;
/// ... and at most this many data rows.
pub const SCREEN_ROWS: usize = 1000;
/// The stretches (axis / d0) a measured circle's axes lie between in practice: 0.5 to 2.5,
/// i.e. −50 % to +150 % engineering strain (sheet-metal forming limits reach about 100 %
/// major strain at most, and minor strains below −50 % are beyond any drawing; common
/// practice). A row outside it is not refused for that alone (see [`STRETCH_RANGE`]); a file
/// with most of its first rows outside it is.
pub const SCREEN_STRETCH: (f64, f64) = (0.5, 2.5);

/// One sampled row of the screen: its line, axes and d0.
struct Sample {
    line: u64,
    major: f64,
    minor: f64,
    d0: Option<f64>,
}

impl Sample {
    fn implausible(&self) -> bool {
        let out = |v: f64, d0: f64| !(SCREEN_STRETCH.0..=SCREEN_STRETCH.1).contains(&(v / d0));
        self.major <= 0.0
            || self.minor <= 0.0
            || self
                .d0
                .is_some_and(|d0| out(self.major, d0) || out(self.minor, d0))
    }
}

/// Refuse a file of axes that, as a whole, cannot be axes: most of its first rows (up to
/// [`SCREEN_ROWS`] rows in [`SCREEN_BYTES`]) have an axis that is not positive or lies outside
/// [`SCREEN_STRETCH`] times d0. The message names the likely cause and its fix: the wrong
/// length unit (the axes are about 25.4 times too large or too small: `--unit`), strains in
/// percent pasted as axes (use the strain columns), or a wrong d0. Returns `input` with the
/// bytes read put back in front, so the pass reads the whole body; nothing has been written
/// when it refuses. Files that give strains are not screened (each strain row is checked
/// against −80 % to 400 %).
pub fn screen<R: BufRead>(
    mut input: R,
    header: &Header,
) -> Result<io::Chain<io::Cursor<Vec<u8>>, R>> {
    let mut head = Vec::new();
    (&mut input)
        .take(SCREEN_BYTES)
        .read_to_end(&mut head)
        .map_err(|e| Error::io(&header.file, e))?;
    if let Kind::Axes { major, minor } = header.columns.kind {
        let whole = (head.len() as u64) < SCREEN_BYTES;
        let end = if whole {
            head.len()
        } else {
            memchr::memrchr(b'\n', &head).map_or(0, |i| i + 1)
        };
        let rows = sample(&head[..end], header, major, minor);
        judge_sample(&rows, header)?;
    }
    Ok(io::Cursor::new(head).chain(input))
}

/// The axes of the first rows of `body` whose two axes are numbers.
fn sample(body: &[u8], header: &Header, major: usize, minor: usize) -> Vec<Sample> {
    let mut reader = csv_reader(header.dialect, body);
    let mut record = csv::StringRecord::new();
    let mut rows = Vec::new();
    let number = |r: &csv::StringRecord, c: usize| {
        r.get(c)
            .filter(|f| f.len() <= 64)
            .and_then(|f| parse_number(f, header.dialect).ok())
    };
    // A record the reader cannot read ends the sample: the pass reports it.
    while rows.len() < SCREEN_ROWS && matches!(reader.read_record(&mut record), Ok(true)) {
        let (Some(a), Some(b)) = (number(&record, major), number(&record, minor)) else {
            continue;
        };
        let row_d0 = header.columns.d0.and_then(|c| number(&record, c));
        rows.push(Sample {
            line: header.lines + record.position().map_or(1, |p| p.line()),
            major: a,
            minor: b,
            d0: row_d0.filter(|d| *d > 0.0).or(header.rules.d0),
        });
    }
    rows
}

/// Refuse the sample when more than half of its rows are implausible and a likely cause is
/// found (the unit, strains in percent), or when nine in ten are (a wrong d0); otherwise the
/// rows are judged, or rejected, one by one.
fn judge_sample(rows: &[Sample], header: &Header) -> Result<()> {
    let bad: Vec<&Sample> = rows.iter().filter(|r| r.implausible()).collect();
    if rows.is_empty() || 2 * bad.len() <= rows.len() {
        return Ok(());
    }
    let first = bad[0];
    let mut ratios: Vec<f64> = rows
        .iter()
        .filter(|r| r.major > 0.0)
        .filter_map(|r| Some(r.major / r.d0?))
        .collect();
    ratios.sort_by(f64::total_cmp);
    let median = ratios.get(ratios.len() / 2).copied();
    let fits = |r: f64| (SCREEN_STRETCH.0..=SCREEN_STRETCH.1).contains(&r);
    let mm = crate::units::MM_PER_INCH;
    let shown = |r: &Sample| {
        let (a, b) = (short(r.major), short(r.minor));
        match r.d0 {
            Some(d0) => format!(
                "line {}: major {a}, minor {b} with d0 {} would be {} % and {} % strain",
                r.line,
                round4(d0),
                short((100.0 * (r.major / d0 - 1.0)).round()),
                short((100.0 * (r.minor / d0 - 1.0)).round())
            ),
            None => format!("line {}: major {a}, minor {b}", r.line),
        }
    };
    use crate::units::LengthUnit::{In, Mm};
    let cause = match (median, header.rules.unit) {
        (Some(m), Mm) if fits(m * mm) => format!(
            "the axes are about {mm} times smaller than d0: the file looks like inches read \
             as millimetres. Give --unit in (a job file's d0 is converted; --d0 is read in \
             --unit)"
        ),
        (Some(m), In) if fits(m / mm) => format!(
            "the axes are about {mm} times larger than d0: the file looks like millimetres \
             read as inches. Give --unit mm (a job file's d0 is converted; --d0 is read in \
             --unit)"
        ),
        (m, _) if looks_like_percent(rows, m) => {
            "the file looks like strains in percent pasted as \
             axes. Name its columns major_eng_pct and minor_eng_pct (or major_true_pct and \
             minor_true_pct for true strain), or map them with --column \
             major_eng_pct=HEADER --column minor_eng_pct=HEADER"
                .to_string()
        }
        _ if 10 * bad.len() >= 9 * rows.len() => "the axes are far from d0: is d0 the \
             initial circle diameter, in the file's unit (--d0, a d0 column or the job file)?"
            .to_string(),
        _ => return Ok(()),
    };
    let d0_word = match header.rules.d0 {
        Some(d) => format!("d0 {}", round4(d)),
        None => "d0".into(),
    };
    Err(Error::input(
        Location::file(&header.file).at_line(first.line),
        format!(
            "{} of the first {} rows cannot be the axes of a stretched circle (not positive, or \
             not {} to {} times {d0_word}), e.g. {}: {cause}; the whole file is refused, nothing \
             was written",
            bad.len(),
            rows.len(),
            SCREEN_STRETCH.0,
            SCREEN_STRETCH.1,
            shown(first),
        ),
    ))
}

/// A length for a message, to 4 decimals.
fn round4(v: f64) -> f64 {
    (v * 1e4).round() / 1e4
}

/// A number for a message: in exponent form when very large or very small.
fn short(v: f64) -> String {
    if v.abs() > 0.0 && !(1e-3..1e6).contains(&v.abs()) {
        format!("{v:e}")
    } else {
        format!("{v}")
    }
}

/// Whether sampled axes read better as strains in percent: some are negative, or the axes
/// are larger than d0 allows (median stretch above [`SCREEN_STRETCH`]) while every value lies
/// within the plausible strain range (−80 % to 400 %) with the major above the minor.
fn looks_like_percent(rows: &[Sample], median: Option<f64>) -> bool {
    let range = |v: f64| (-80.0..=400.0).contains(&v);
    rows.iter().any(|r| r.major < 0.0 || r.minor < 0.0)
        || (median.is_some_and(|m| m > SCREEN_STRETCH.1)
            && rows
                .iter()
                .all(|r| range(r.major) && range(r.minor) && r.major >= r.minor))
}

/// A CSV reader over `input` for `dialect`, without a header row.
pub fn csv_reader<R: Read>(dialect: Dialect, input: R) -> csv::Reader<R> {
    csv::ReaderBuilder::new()
        .delimiter(dialect.delimiter())
        .has_headers(false)
        .flexible(true)
        .from_reader(input)
}

/// The rows of a measurement file, one at a time, each accepted or rejected. Memory stays
/// bounded by one row plus the set of ids seen (needed to find duplicates). A file-level
/// problem met part way (a broken UTF-8 sequence, an I/O error) ends the iteration with
/// `Some(Err(..))`.
pub struct MeasurementReader<B: BufRead> {
    reader: csv::Reader<B>,
    /// The header.
    pub header: Header,
    ids: HashSet<(String, Option<String>)>,
    record: csv::StringRecord,
    failed: bool,
}

/// One data row: the measurement, or why it was rejected.
pub type Row = std::result::Result<Measurement, RejectedRow>;

impl<B: BufRead> MeasurementReader<B> {
    /// Read and check the header; `name` is used in messages.
    pub fn new(mut input: B, name: &Path, map: &ColumnMap) -> Result<Self> {
        let header = Header::read(&mut input, name, map)?;
        Ok(Self::after(input, header))
    }

    /// The rows of `input`, whose header was read already.
    pub fn after(input: B, header: Header) -> Self {
        MeasurementReader {
            reader: csv_reader(header.dialect, input),
            header,
            ids: HashSet::new(),
            record: csv::StringRecord::new(),
            failed: false,
        }
    }
}

impl<B: BufRead> Iterator for MeasurementReader<B> {
    type Item = Result<Row>;

    fn next(&mut self) -> Option<Result<Row>> {
        if self.failed {
            return None;
        }
        loop {
            match self.reader.read_record(&mut self.record) {
                Ok(false) => return None,
                Err(e) => {
                    self.failed = true;
                    return Some(Err(csv_error(&Location::file(&self.header.file), e)
                        .shift_line(self.header.lines)));
                }
                Ok(true) if self.record.iter().all(|f| f.trim().is_empty()) => continue,
                Ok(true) => {
                    let line = self.header.lines + self.record.position().map_or(0, |p| p.line());
                    let row = self.header.row(&self.record, line).map(|(m, _)| m);
                    return Some(Ok(row.and_then(|m| {
                        if self.ids.insert((m.id.clone(), m.stage.clone())) {
                            Ok(m)
                        } else {
                            Err(duplicate(&self.header, &m))
                        }
                    })));
                }
            }
        }
    }
}

/// The rejection of a row whose id (and stage) came before.
pub fn duplicate(header: &Header, m: &Measurement) -> RejectedRow {
    let mut location = Location::file(&header.file).at_line(m.line);
    if let Some(c) = header.columns.id {
        location = location.at_column(c as u64 + 1, &header.columns.names[c]);
    }
    let reason = match &m.stage {
        Some(s) => format!(
            "duplicate id `{}` in stage `{s}`: each location is measured once per stage",
            m.id
        ),
        None => format!("duplicate id `{}`: ids must be unique within a file", m.id),
    };
    RejectedRow {
        location,
        id: Some(m.id.clone()),
        reason,
    }
}

/// Read up to and including the first line that is neither blank nor a `#` comment.
/// Returns what was read before the header (comment lines as empty lines, so that line
/// numbers stay right) followed by the header line, and the header line.
/// After the header `#` has no special meaning: a row is a row.
pub(crate) fn read_header_line(input: &mut impl BufRead, name: &Path) -> Result<(String, String)> {
    let mut prefix = String::new();
    let mut line = String::new();
    loop {
        line.clear();
        let n = read_line_capped(input, &mut line, name)?;
        if n == 0 {
            return Ok((prefix, String::new()));
        }
        let text = line.trim().trim_start_matches('\u{feff}').trim();
        // `sep=;` is the separator hint some spreadsheets write first: the header tells anyway.
        let hint = text.to_ascii_lowercase().starts_with("sep=");
        if !text.is_empty() && !text.starts_with('#') && !hint {
            let header = text.to_string();
            prefix.push_str(line.trim_start_matches('\u{feff}'));
            return Ok((prefix, header));
        }
        prefix.push('\n');
    }
}

/// The longest header or comment line read (1 MiB): a longer one is not a measurement file.
const MAX_HEADER_LINE: u64 = 1 << 20;

fn read_line_capped(input: &mut impl BufRead, line: &mut String, name: &Path) -> Result<usize> {
    let mut bytes = Vec::new();
    let n = input
        .take(MAX_HEADER_LINE)
        .read_until(b'\n', &mut bytes)
        .map_err(|e| Error::io(name, e))?;
    if n as u64 >= MAX_HEADER_LINE && !bytes.ends_with(b"\n") {
        return Err(Error::input(
            Location::file(name),
            "the first line is longer than 1 MiB: not a measurement CSV with a header row",
        ));
    }
    *line = String::from_utf8(bytes).map_err(|_| {
        Error::input(
            Location::file(name).at_line(1),
            "the header is not valid UTF-8 text: save the file as UTF-8 CSV (spreadsheets call it \"CSV UTF-8\")",
        )
    })?;
    Ok(n)
}

pub(crate) fn csv_error(loc: &Location, e: csv::Error) -> Error {
    let line = e.position().map(|p| p.line());
    let message = match e.kind() {
        csv::ErrorKind::Utf8 { .. } => "the file is not valid UTF-8 text: save it as UTF-8 CSV (spreadsheets call it \"CSV UTF-8\")".to_string(),
        _ => e.to_string(),
    };
    let loc = match line {
        Some(l) => loc.clone().at_line(l),
        None => loc.clone(),
    };
    Error::input(loc, message)
}
