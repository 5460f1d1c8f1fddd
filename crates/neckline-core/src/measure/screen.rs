//! The plausibility screen: a file of axes whose first rows, as a whole, cannot be axes is
//! refused before anything is written, with the likely cause and its fix.

use super::columns::Kind;
use super::{csv_reader, parse_number, Header};
use crate::error::{Error, Location, Result};
use std::io::{self, BufRead, Read};

/// The plausibility screen reads at most this many bytes of the body (256 KiB) ...
pub const SCREEN_BYTES: u64 = 256 << 10;
/// ... and at most this many data rows.
pub const SCREEN_ROWS: usize = 1000;
/// The stretches (axis / d0) a measured circle's axes lie between in practice: 0.5 to 2.5,
/// i.e. −50 % to +150 % engineering strain (sheet-metal forming limits reach about 100 %
/// major strain at most, and minor strains below −50 % are beyond any drawing; common
/// practice). A row outside it is not refused for that alone (see
/// [`STRETCH_RANGE`](crate::measure::STRETCH_RANGE)); a file with most of its first rows
/// outside it is.
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

#[cfg(test)]
mod tests {
    //! Expectations from the doc comments of [`screen`] and [`SCREEN_STRETCH`] and README.md,
    //! "What input is refused, and why" ("Axes that cannot be axes").
    use super::super::{ColumnMap, RowRules};
    use super::*;
    use crate::units::LengthUnit;
    use std::path::Path;

    /// Screen `rows` (CSV lines of id, major, minor) under d0 `d0` in `unit`; the error text,
    /// or the body as the pass would read it.
    fn run(header: &str, rows: &[String], d0: Option<f64>, unit: LengthUnit) -> Result<String> {
        let header = Header::read(
            &mut header.as_bytes(),
            Path::new("m.csv"),
            &ColumnMap::default(),
        )
        .unwrap()
        .with_rules(RowRules {
            d0,
            reading_error: None,
            unit,
        });
        let body = rows.concat();
        let mut back = String::new();
        screen(body.as_bytes(), &header)?
            .read_to_string(&mut back)
            .unwrap();
        assert_eq!(back, body);
        Ok(back)
    }

    fn rows(n: usize, major: f64, minor: f64) -> Vec<String> {
        (0..n).map(|i| format!("P{i},{major},{minor}\n")).collect()
    }

    fn both(a: Vec<String>, b: Vec<String>) -> Vec<String> {
        a.into_iter().chain(b).collect()
    }

    const AXES: &str = "id,major,minor\n";

    #[test]
    fn inches_read_as_millimetres_are_refused_when_more_than_half_are_out() {
        // 2.8 mm and 2.6 mm written in inches, d0 2.5 mm.
        let inch = || rows(3, 0.110, 0.102);
        let e = run(
            AXES,
            &both(inch(), rows(2, 2.8, 2.6)),
            Some(2.5),
            LengthUnit::Mm,
        )
        .unwrap_err()
        .to_string();
        assert!(
            e.starts_with("m.csv:2: 3 of the first 5 rows cannot be the axes"),
            "{e}"
        );
        assert!(e.contains("not 0.5 to 2.5 times d0 2.5"), "{e}");
        assert!(e.contains("Give --unit in"), "{e}");
        // Half is not more than half: the rows are judged one by one.
        assert!(run(
            AXES,
            &both(rows(2, 0.110, 0.102), rows(2, 2.8, 2.6)),
            Some(2.5),
            LengthUnit::Mm
        )
        .is_ok());
    }

    #[test]
    fn millimetres_read_as_inches_are_refused() {
        // d0 0.1 in (2.54 mm), axes in mm.
        let e = run(AXES, &rows(4, 2.8, 2.6), Some(0.1), LengthUnit::In)
            .unwrap_err()
            .to_string();
        assert!(e.contains("Give --unit mm"), "{e}");
    }

    #[test]
    fn strains_in_percent_pasted_as_axes_are_refused() {
        let e = run(AXES, &rows(3, 25.0, -5.0), None, LengthUnit::Mm)
            .unwrap_err()
            .to_string();
        assert!(e.contains("strains in percent pasted as axes"), "{e}");
        // Larger than d0 allows but plausible percentages: 6.5 and 5.5 with d0 2 (README).
        let e = run(AXES, &rows(3, 6.5, 5.5), Some(2.0), LengthUnit::Mm)
            .unwrap_err()
            .to_string();
        assert!(e.contains("would be 225 % and 175 % strain"), "{e}");
        assert!(e.contains("--column major_eng_pct=HEADER"), "{e}");
    }

    #[test]
    fn a_wrong_d0_is_questioned_only_when_nine_rows_in_ten_are_out() {
        // 500 and 450 are neither a unit away from d0 2.5 nor percentages (above 400).
        let far = |n| rows(n, 500.0, 450.0);
        let e = run(
            AXES,
            &both(far(9), rows(1, 2.8, 2.6)),
            Some(2.5),
            LengthUnit::Mm,
        )
        .unwrap_err()
        .to_string();
        assert!(e.contains("9 of the first 10 rows"), "{e}");
        assert!(e.contains("is d0 the initial circle diameter"), "{e}");
        assert!(run(
            AXES,
            &both(far(8), rows(2, 2.8, 2.6)),
            Some(2.5),
            LengthUnit::Mm
        )
        .is_ok());
    }

    #[test]
    fn strain_files_and_unreadable_rows_are_not_screened() {
        let strains = "id,major_eng_pct,minor_eng_pct\n";
        assert!(run(strains, &rows(5, 500.0, 450.0), Some(2.5), LengthUnit::Mm).is_ok());
        let words: Vec<String> = (0..5).map(|i| format!("P{i},big,small\n")).collect();
        assert!(run(AXES, &words, Some(2.5), LengthUnit::Mm).is_ok());
    }
}
