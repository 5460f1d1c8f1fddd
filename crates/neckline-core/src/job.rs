//! The job file: who measured what, on which part and tryout, and the settings of the judgement.
//!
//! A flat TOML file; every key is optional. Paths (`limit`) are relative to the job file.
//! ```toml
//! part = "Rear floor pan, LH"      # shown on every output
//! die = "D-2207"
//! tryout = "T2"
//! material = "DC04 class, 0.80 mm"
//! lot = "Coil 4417-B"
//! date = "2026-11-20"
//! measured_by = "Night shift metrology"
//! company = "Example Pressworks (invented)"
//! report_id = "QR-0042"          # the report's own number; with `revision`, on every page
//! revision = "B"
//! prepared_by = "A. Example"     # names for the sign-off block (blank lines where left out)
//! checked_by = "B. Example"
//! approved_by = "C. Example"
//! limit = "../limits/steel-0.8mm-kb.toml"
//! outline = "outline.csv"  # the part's outline for the map: x, y (and ring) [default: traced]
//! unit = "mm"         # or "in"
//! d0 = 2.5            # initial circle diameter, in `unit`
//! t0 = 0.8            # initial sheet thickness, in `unit`
//! margin = 10         # safety band, percentage points of engineering major strain
//! low_stretch = 2     # under-stretch threshold, percent engineering major strain
//! max_thinning = 25   # percent; leave out to not check
//! thickening = 2      # percent thicker than t0 that counts as thickening
//! fail_on = "failed"  # or "marginal": exit status 1 when reached
//! reading_error = 0.02 # one axis, in `unit` (pp of strain for strain files); flags borderline
//! encoding = "windows-1252" # the input's text encoding [default: detected]
//! sheet = "Readings"  # a workbook's sheet, by name or number [default: the first]
//! header_row = 5     # the header's line, after an export's preamble (else found)
//! [columns]           # the file's own headers, mapped onto neckline's names
//! major_true_pct = "Major strain (%)"
//! [measurement]       # how the circles were read, for the report's record
//! method = "optical"  # hand, tape, optical, ...
//! equipment = "camera cell 2"
//! operator = "Night shift metrology"
//! uncertainty = "±0.02 mm per axis"
//! grid = "2.5 mm circles, electrochemically etched"
//! ```

use crate::error::{line_col, Error, Location, Result};
use crate::units::LengthUnit;
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};
use toml::Spanned;

/// Contents of a job file.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Job {
    /// Part name and number.
    pub part: Option<String>,
    /// Die or tool identification.
    pub die: Option<String>,
    /// Tryout label (T1, T2, ...).
    pub tryout: Option<String>,
    /// Material grade and thickness.
    pub material: Option<String>,
    /// Material lot or coil.
    pub lot: Option<String>,
    /// Date of measurement, `YYYY-MM-DD` (checked to be a real date).
    pub date: Option<String>,
    /// Who measured.
    pub measured_by: Option<String>,
    /// Company or plant.
    pub company: Option<String>,
    /// The report's own number.
    pub report_id: Option<String>,
    /// The report's revision.
    pub revision: Option<String>,
    /// Who prepared the report.
    pub prepared_by: Option<String>,
    /// Who checked it.
    pub checked_by: Option<String>,
    /// Who approved it.
    pub approved_by: Option<String>,
    /// Limit curve file, relative to the job file.
    pub limit: Option<PathBuf>,
    /// The part's outline for the map: a CSV of `x, y` (and optionally `ring`) in part
    /// coordinates, relative to the job file (see [`crate::part_outline`]); without it the
    /// outline is traced from the measured locations.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub outline: Option<PathBuf>,
    /// Length unit of d0, t0 and the measurement file.
    pub unit: Option<LengthUnit>,
    /// Initial circle diameter.
    pub d0: Option<f64>,
    /// Initial sheet thickness.
    pub t0: Option<f64>,
    /// Safety band, percentage points.
    pub margin: Option<f64>,
    /// Under-stretch threshold, percent.
    pub low_stretch: Option<f64>,
    /// Maximum thinning, percent.
    pub max_thinning: Option<f64>,
    /// Thickening threshold, percent of t0.
    pub thickening: Option<f64>,
    /// Reading error of one axis, in `unit` (percentage points of strain for a file that
    /// gives strains).
    pub reading_error: Option<f64>,
    /// The order of the forming stages of a multi-stage file (`stages = ["draw", "restrike"]`);
    /// without it, the order in which stages first appear in the file.
    pub stages: Option<Vec<String>>,
    /// The zone at which `check` exits with status 1: `failed` or `marginal`.
    pub fail_on: Option<crate::assess::Zone>,
    /// The text encoding of the input files (`utf-8`, `utf-16le`, `utf-16be`,
    /// `windows-1252`) [default: from a byte-order mark, else UTF-8 when the file is valid
    /// UTF-8, else Windows-1252].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub encoding: Option<String>,
    /// The sheet of a workbook input: a name, or a number from 1 [default: the first].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sheet: Option<SheetKey>,
    /// The file's own headers mapped onto neckline's column names (`[columns]` table:
    /// `major_true_pct = "Major strain (%)"`).
    #[serde(default, skip_serializing_if = "std::collections::BTreeMap::is_empty")]
    pub columns: std::collections::BTreeMap<String, String>,
    /// The header's line in a measurement file (1-based), for an export whose preamble would
    /// otherwise be searched; without it the header is the first line with the needed columns.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub header_row: Option<std::num::NonZeroU64>,
    /// How the circles were read (`[measurement]` table), for the report's record.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub measurement: Option<Measurement>,
}

/// How the circles were measured: the `[measurement]` table of a job file. Every key is
/// optional; the report prints "not stated" for one left out.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Measurement {
    /// Method: hand (loupe and scale), tape (transparent strain tape), optical, ...
    pub method: Option<String>,
    /// Equipment and its identification.
    pub equipment: Option<String>,
    /// Who read the circles.
    pub operator: Option<String>,
    /// The reading uncertainty, in words with its unit (`±0.02 mm per axis`).
    pub uncertainty: Option<String>,
    /// The grid: kind, circle size, how it was applied.
    pub grid: Option<String>,
}

impl Measurement {
    /// The rows of the report's measurement block: label and value ("not stated" when left
    /// out).
    pub fn rows(m: Option<&Measurement>) -> Vec<(&'static str, String)> {
        let m = m.cloned().unwrap_or_default();
        let v = |s: Option<String>| s.unwrap_or_else(|| "not stated".into());
        vec![
            ("Method", v(m.method)),
            ("Equipment", v(m.equipment)),
            ("Operator", v(m.operator)),
            ("Reading uncertainty", v(m.uncertainty)),
            ("Grid", v(m.grid)),
        ]
    }
}

/// A workbook's sheet named in the job file: `sheet = "Readings"` or `sheet = 2`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum SheetKey {
    /// The sheet's number, from 1.
    Number(u32),
    /// The sheet's name.
    Name(String),
}

impl std::fmt::Display for SheetKey {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SheetKey::Number(n) => write!(f, "{n}"),
            SheetKey::Name(s) => write!(f, "{s}"),
        }
    }
}

impl Job {
    /// Load a job file; a relative `limit` path is resolved against the job file's folder.
    pub fn load(path: &Path) -> Result<Self> {
        let text = crate::text::read_text(path)?;
        Self::parse(&text, path)
    }

    /// Parse and check job TOML read from `path` (used in messages, and as the base of a
    /// relative `limit`).
    pub fn parse(text: &str, path: &Path) -> Result<Self> {
        let text = text.to_string();
        let mut job: Job =
            toml::from_str(&text).map_err(|e| crate::error::toml_error(path, &text, &e))?;
        for name in job.columns.keys() {
            crate::measure::check_name(name).map_err(|e| {
                Error::input(
                    crate::error::Location::file(path),
                    format!("[columns]: {e}"),
                )
            })?;
        }
        if let Some(e) = &job.encoding {
            crate::text::TextEncoding::parse(e)
                .map_err(|m| Error::input(Location::file(path), format!("encoding: {m}")))?;
        }
        check_ranges(path, &text)?;
        check_words(path, &text)?;
        if let Some(limit) = job.limit.take() {
            let base = path.parent().unwrap_or(Path::new(""));
            let limit = if limit.is_absolute() {
                limit
            } else {
                base.join(limit)
            };
            check_limit_path(path, &text, &limit)?;
            job.limit = Some(limit);
        }
        if let Some(outline) = job.outline.take() {
            let base = path.parent().unwrap_or(Path::new(""));
            job.outline = Some(if outline.is_absolute() {
                outline
            } else {
                base.join(outline)
            });
        }

        Ok(job)
    }
}

/// Refuse a `limit` that is the job file itself or a folder, at the key's line.
fn check_limit_path(path: &Path, text: &str, limit: &Path) -> Result<()> {
    let same = match (std::fs::canonicalize(path), std::fs::canonicalize(limit)) {
        (Ok(a), Ok(b)) => a == b,
        _ => false,
    };
    let why = if same {
        "names this job file itself: it must name a limit curve file (TOML with name, source, \
         points)"
    } else if limit.is_dir() {
        "names a folder: it must name a limit curve file"
    } else {
        return Ok(());
    };
    #[derive(Deserialize)]
    struct LimitSpan {
        limit: Spanned<String>,
    }
    let mut loc = Location::file(path);
    if let Ok(s) = toml::from_str::<LimitSpan>(text) {
        let (l, c) = line_col(text, s.limit.span().start);
        loc = loc.at_line(l);
        loc.column = Some(c);
    }
    Err(Error::input(
        loc,
        format!("`limit` = \"{}\" {why}", limit.display()),
    ))
}

/// The keys of a job file whose text has a form, with their places.
#[derive(Debug, Default, Deserialize)]
struct WordSpans {
    date: Option<Spanned<String>>,
    fail_on: Option<Spanned<String>>,
}

/// Whether `s` is a real calendar date written `YYYY-MM-DD` (proleptic Gregorian calendar,
/// ISO 8601: leap years every 4th year but centuries not divisible by 400).
pub fn is_date(s: &str) -> bool {
    let b = s.as_bytes();
    if b.len() != 10 || b[4] != b'-' || b[7] != b'-' {
        return false;
    }
    let num = |r: std::ops::Range<usize>| -> Option<u32> {
        let t = &s[r];
        t.bytes()
            .all(|c| c.is_ascii_digit())
            .then(|| t.parse().ok())?
    };
    let (Some(y), Some(m), Some(d)) = (num(0..4), num(5..7), num(8..10)) else {
        return false;
    };
    let leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
    let days = match m {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        2 if leap => 29,
        2 => 28,
        _ => return false,
    };
    (1..=days).contains(&d)
}

/// `date` must be a real date and `fail_on` one of the zones that stop a qualification; an
/// error names the job file, the key's line and column, the value and what was expected.
fn check_words(path: &Path, text: &str) -> Result<()> {
    let spans: WordSpans =
        toml::from_str(text).map_err(|e| crate::error::toml_error(path, text, &e))?;
    let at = |start: usize| {
        let (line, col) = line_col(text, start);
        let mut loc = Location::file(path).at_line(line);
        loc.column = Some(col);
        loc
    };
    if let Some(d) = &spans.date {
        if !is_date(d.get_ref()) {
            return Err(Error::input(
                at(d.span().start),
                format!(
                    "`date` = \"{}\" is not a real date: expected YYYY-MM-DD, e.g. \"2026-11-30\"",
                    d.get_ref()
                ),
            ));
        }
    }
    if let Some(f) = &spans.fail_on {
        if !matches!(f.get_ref().as_str(), "failed" | "marginal") {
            return Err(Error::input(
                at(f.span().start),
                format!(
                    "`fail_on` = \"{}\": expected \"failed\" or \"marginal\"",
                    f.get_ref()
                ),
            ));
        }
    }
    Ok(())
}

/// The numeric keys of a job file with their places in the text, for range messages.
#[derive(Debug, Default, Deserialize)]
struct NumberSpans {
    d0: Option<Spanned<f64>>,
    t0: Option<Spanned<f64>>,
    margin: Option<Spanned<f64>>,
    low_stretch: Option<Spanned<f64>>,
    max_thinning: Option<Spanned<f64>>,
    thickening: Option<Spanned<f64>>,
    reading_error: Option<Spanned<f64>>,
}

/// Largest d0, t0 or reading error a job file may give, in its unit: no grid circle, sheet or
/// reading error is a metre (or 1000 inches); a larger value is a typo or a wrong unit.
const MAX_LENGTH: f64 = 1000.0;

/// A key, its value and place, its test and the range in words.
type RangeCheck<'a> = (&'a str, &'a Option<Spanned<f64>>, fn(f64) -> bool, &'a str);

/// Each numeric key against its allowed range (the same ranges as the flags); an error names
/// the job file, the key's line and column, the value and the range.
fn check_ranges(path: &Path, text: &str) -> Result<()> {
    let spans: NumberSpans =
        toml::from_str(text).map_err(|e| crate::error::toml_error(path, text, &e))?;
    let positive: fn(f64) -> bool = |v| v.is_finite() && v > 0.0 && v <= MAX_LENGTH;
    let percent: fn(f64) -> bool = |v| v.is_finite() && (0.0..=50.0).contains(&v);
    let thinning: fn(f64) -> bool = |v| v.is_finite() && v > 0.0 && v < 100.0;
    let length = "a positive length in the job's `unit`, at most 1000";
    let checks: [RangeCheck; 7] = [
        ("d0", &spans.d0, positive, length),
        ("t0", &spans.t0, positive, length),
        ("reading_error", &spans.reading_error, positive, length),
        (
            "margin",
            &spans.margin,
            percent,
            "0 to 50 percentage points",
        ),
        ("low_stretch", &spans.low_stretch, percent, "0 to 50 %"),
        ("thickening", &spans.thickening, percent, "0 to 50 %"),
        (
            "max_thinning",
            &spans.max_thinning,
            thinning,
            "above 0 and below 100 %",
        ),
    ];
    for (key, value, ok, expected) in checks {
        let Some(v) = value else { continue };
        if !ok(*v.get_ref()) {
            let (line, col) = line_col(text, v.span().start);
            let mut loc = Location::file(path).at_line(line);
            loc.column = Some(col);
            return Err(Error::input(
                loc,
                format!(
                    "`{key}` = {} is out of range: expected {expected}",
                    v.get_ref()
                ),
            ));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unknown_key_names_line() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "part = \"x\"\nmargn = 5\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:2:1") && e.contains("margn"), "{e}");
    }

    #[test]
    fn type_errors_read_as_words() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "d0 = \"2.5\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(
            e.contains("job.toml:1:6") && e.contains("expected a number"),
            "{e}"
        );
        std::fs::write(&p, "date = 2026-11-24\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("expected text in quotes"), "{e}");
    }

    // A value out of range names the job file, the key and its place (a flag would name the
    // flag; in a job file the user needs the file and line to find it).
    #[test]
    fn out_of_range_value_names_file_and_key() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "part = \"x\"\nd0 = -2.5\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(
            e.contains("job.toml:2:6") && e.contains("`d0` = -2.5") && e.contains("positive"),
            "{e}"
        );
        for (text, key) in [
            ("margin = 80\n", "`margin`"),
            ("low_stretch = -1\n", "`low_stretch`"),
            ("max_thinning = 100\n", "`max_thinning`"),
            ("reading_error = 0\n", "`reading_error`"),
            ("t0 = nan\n", "`t0`"),
        ] {
            std::fs::write(&p, text).unwrap();
            let e = Job::load(&p).unwrap_err().to_string();
            assert!(e.contains("job.toml:1:") && e.contains(key), "{text}: {e}");
        }
        std::fs::write(&p, "d0 = 2.5\nt0 = 0.8\nmargin = 10\nmax_thinning = 25\n").unwrap();
        assert!(Job::load(&p).is_ok());
    }

    // A job that names itself as its curve (or a folder) is refused at the `limit` line.
    #[test]
    fn limit_naming_the_job_itself_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "part = \"x\"\nlimit = \"job.toml\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:2:9") && e.contains("itself"), "{e}");
        std::fs::write(&p, "limit = \".\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:1:9") && e.contains("folder"), "{e}");
    }

    // Calendar rules of ISO 8601 (proleptic Gregorian): 30 days in November, 29 in February of
    // a leap year (2024; 2000 is one, 1900 is not).
    #[test]
    fn dates_must_be_real() {
        for ok in ["2026-11-30", "2024-02-29", "2000-02-29", "2026-01-31"] {
            assert!(is_date(ok), "{ok}");
        }
        for bad in [
            "2026-11-31",
            "1900-02-29",
            "2026-13-01",
            "2026-00-10",
            "2026-1-5",
            "26-11-30",
            "2026/11/30",
            "2026-11-3x",
        ] {
            assert!(!is_date(bad), "{bad}");
        }
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "part = \"x\"\ndate = \"2026-11-31\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(
            e.contains("job.toml:2:8") && e.contains("`date`") && e.contains("YYYY-MM-DD"),
            "{e}"
        );
    }

    #[test]
    fn fail_on_and_sign_off_keys_are_read() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(
            &p,
            "fail_on = \"marginal\"\nprepared_by = \"A\"\nrevision = \"B\"\nthickening = 3\n",
        )
        .unwrap();
        let j = Job::load(&p).unwrap();
        assert_eq!(j.fail_on, Some(crate::assess::Zone::Marginal));
        assert_eq!(j.prepared_by.as_deref(), Some("A"));
        assert_eq!(j.thickening, Some(3.0));
        std::fs::write(&p, "fail_on = \"safe\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:1:") && e.contains("`fail_on`"), "{e}");
        std::fs::write(&p, "thickening = 80\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(
            e.contains("job.toml:1:") && e.contains("`thickening`"),
            "{e}"
        );
    }

    #[test]
    fn measurement_table_is_read_and_checked() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(
            &p,
            "part = \"x\"\n[measurement]\nmethod = \"tape\"\nuncertainty = \"±0.02 mm\"\n",
        )
        .unwrap();
        let j = Job::load(&p).unwrap();
        let rows = Measurement::rows(j.measurement.as_ref());
        assert_eq!(rows[0], ("Method", "tape".to_string()));
        assert_eq!(rows[1], ("Equipment", "not stated".to_string()));
        assert_eq!(rows[3].1, "±0.02 mm");
        assert!(Measurement::rows(None).iter().all(|r| r.1 == "not stated"));
        std::fs::write(&p, "[measurement]\nmethd = \"tape\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:2:1") && e.contains("methd"), "{e}");
    }

    #[test]
    fn unknown_unit_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "unit = \"cm\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:1") && e.contains("cm"), "{e}");
    }
}
