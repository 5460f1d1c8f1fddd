//! Reading the inputs of a comparison: the columns of a `points.csv` that `check` wrote, and the
//! `summary.json` beside it (part, tryout, curve, safety band), when there is one.

use super::Matching;
use crate::assess::Zone;
use crate::error::{Error, Location, Result};
use crate::measure::{csv_error, open_input, parse_number, read_header_line, Dialect};
use std::collections::HashSet;
use std::io::{BufRead, Cursor, Read};
use std::path::{Path, PathBuf};

/// The values of one location that a comparison uses.
#[derive(Debug, Clone, PartialEq)]
pub struct ResultRow {
    /// Location id.
    pub id: String,
    /// Engineering major strain, percent.
    pub major_pct: f64,
    /// Engineering minor strain, percent.
    pub minor_pct: f64,
    /// Vertical margin to the curve, percentage points (`None` when uncovered).
    pub margin_pct: Option<f64>,
    /// The curve's engineering major strain at this minor strain, percent (when recorded).
    pub limit_pct: Option<f64>,
    /// The zone.
    pub zone: Zone,
    /// Position across the part, in the file's length unit (when recorded).
    pub x: Option<f64>,
    /// Position along the part.
    pub y: Option<f64>,
}

impl ResultRow {
    /// The position, when both coordinates are there.
    pub fn xy(&self) -> Option<(f64, f64)> {
        Some((self.x?, self.y?))
    }
}

/// What the `summary.json` beside a result says about how it was made.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RecordedSummary {
    /// Part name.
    pub part: Option<String>,
    /// Die.
    pub die: Option<String>,
    /// Tryout label.
    pub tryout: Option<String>,
    /// Date of measurement.
    pub date: Option<String>,
    /// Material.
    pub material: Option<String>,
    /// Name of the limit curve.
    pub curve: Option<String>,
    /// Safety band, percentage points.
    pub band: Option<f64>,
    /// Verdict of `check`.
    pub verdict: Option<String>,
    /// Length unit of x, y.
    pub unit: Option<String>,
    /// Rows `check` rejected.
    pub rejected: Option<u64>,
}

/// One input of a comparison.
#[derive(Debug, Clone, PartialEq)]
pub struct Tryout {
    /// The points.csv.
    pub path: PathBuf,
    /// Short name: the job's tryout, else the folder's name, else the input number.
    pub label: String,
    /// Its locations, in file order.
    pub rows: Vec<ResultRow>,
    /// The summary beside it, if any.
    pub summary: Option<RecordedSummary>,
}

const NEEDED: [&str; 5] = ["id", "major_eng_pct", "minor_eng_pct", "margin_pct", "zone"];
const OPTIONAL: [&str; 3] = ["limit_major_eng_pct", "x", "y"];

/// Read a `points.csv` written by `check`, its summary and a label (`number` counts from 1).
pub fn read_tryout(path: &Path, number: usize) -> Result<Tryout> {
    let rows = read_results(path)?;
    let summary = read_summary(path);
    let label = summary
        .as_ref()
        .and_then(|s| s.tryout.clone())
        .or_else(|| file_label(path))
        .unwrap_or_else(|| format!("tryout {number}"));
    Ok(Tryout {
        path: path.to_path_buf(),
        label,
        rows,
        summary,
    })
}

/// A label from the path: the folder of a `points.csv` (as `check --out` names it), else the
/// file's stem.
fn file_label(path: &Path) -> Option<String> {
    let name = |p: &Path| p.file_name().map(|n| n.to_string_lossy().into_owned());
    if path.file_name().is_some_and(|n| n == "points.csv") {
        if let Some(folder) = path.parent().and_then(name) {
            return Some(folder);
        }
    }
    path.file_stem().map(|n| n.to_string_lossy().into_owned())
}

/// Make labels unique: a label met before gets ` #k` (its input number) appended.
pub fn unique_labels(tryouts: &mut [Tryout]) {
    let mut seen = HashSet::new();
    for (k, t) in tryouts.iter_mut().enumerate() {
        if !seen.insert(t.label.clone()) {
            t.label = format!("{} #{}", t.label, k + 1);
        }
    }
}

/// Read the columns a comparison needs from a `points.csv` written by `check`. `#` comment
/// lines and a `sep=` line before the header are skipped, as `check` does with its input.
pub fn read_results(path: &Path) -> Result<Vec<ResultRow>> {
    read_results_from(open_input(path)?, path)
}

/// Read the columns a comparison needs from `input`; `path` names it in messages. The file is
/// refused whole at its first bad row (a comparison needs every location): a field longer than
/// [`crate::measure::MAX_FIELD_BYTES`], a row of more than [`crate::measure::MAX_FIELDS`]
/// fields, a number that is not finite, an empty or duplicate id, an unknown zone.
pub fn read_results_from(mut input: impl BufRead, path: &Path) -> Result<Vec<ResultRow>> {
    let loc = Location::file(path);
    let head = input.fill_buf().map_err(|e| Error::io(path, e))?;
    crate::error::check_text(path, head, false)?;
    let (prefix, header) = read_header_line(&mut input, path)?;
    if header.is_empty() {
        return Err(Error::input(
            loc,
            "the file is empty: expected a points.csv written by `check`",
        ));
    }
    let header_line = prefix.lines().count() as u64;
    let mut rdr = csv::ReaderBuilder::new()
        .delimiter(Dialect::detect(&header).delimiter())
        .trim(csv::Trim::All)
        .from_reader(Cursor::new(prefix.into_bytes()).chain(input));
    let head = rdr.headers().map_err(|e| csv_error(&loc, e))?.clone();
    let find = |name: &str| head.iter().position(|h| h == name);
    for (i, name) in head.iter().enumerate() {
        if NEEDED.contains(&name) || OPTIONAL.contains(&name) {
            if let Some(j) = head.iter().skip(i + 1).position(|h| h == name) {
                return Err(Error::input(
                    loc.clone()
                        .at_line(header_line)
                        .at_column((i + j + 2) as u64, name),
                    format!("column `{name}` appears twice in the header"),
                ));
            }
        }
    }
    let mut idx = [0usize; 5];
    for (k, name) in NEEDED.iter().enumerate() {
        idx[k] = find(name).ok_or_else(|| {
            Error::input(
                loc.clone().at_line(header_line),
                format!("missing column `{name}`: expected a points.csv written by `check`"),
            )
        })?;
    }
    let opt = OPTIONAL.map(find);
    let mut rows = Vec::new();
    let mut seen = HashSet::new();
    for rec in rdr.records() {
        let rec = rec.map_err(|e| csv_error(&loc, e))?;
        let line = rec.position().map_or(0, |p| p.line());
        check_size(&rec, &loc.clone().at_line(line))?;
        let at = |i: usize, name: &str| loc.clone().at_line(line).at_column(i as u64 + 1, name);
        let number = |i: usize, name: &str| -> Result<Option<f64>> {
            match rec.get(i).unwrap_or("") {
                "" => Ok(None),
                t => match parse_number(t, Dialect::Comma) {
                    Ok(v) if v.abs() > 1e9 => Err(Error::input(
                        at(i, name),
                        format!("{v:e} is beyond ±1e9: not a value `check` writes"),
                    )),
                    r => r.map(Some).map_err(|m| Error::input(at(i, name), m)),
                },
            }
        };
        let required = |k: usize| -> Result<f64> {
            number(idx[k], NEEDED[k])?.ok_or_else(|| {
                Error::input(at(idx[k], NEEDED[k]), "expected a number, found nothing")
            })
        };
        let optional = |k: usize| -> Result<Option<f64>> {
            opt[k].map_or(Ok(None), |i| number(i, OPTIONAL[k]))
        };
        let id = rec.get(idx[0]).unwrap_or("").to_string();
        if id.is_empty() {
            return Err(Error::input(
                at(idx[0], "id"),
                "empty id: every location needs one",
            ));
        }
        if !seen.insert(id.clone()) {
            return Err(Error::input(
                at(idx[0], "id"),
                format!("duplicate id `{id}`: a location can be compared only once"),
            ));
        }
        rows.push(ResultRow {
            id,
            major_pct: required(1)?,
            minor_pct: required(2)?,
            margin_pct: number(idx[3], NEEDED[3])?,
            limit_pct: optional(0)?,
            zone: rec
                .get(idx[4])
                .unwrap_or("")
                .parse()
                .map_err(|m: String| Error::input(at(idx[4], "zone"), m))?,
            x: optional(1)?,
            y: optional(2)?,
        });
    }
    if rows.is_empty() {
        return Err(Error::input(
            loc.at_line(header_line),
            "no location after the header: nothing to compare",
        ));
    }
    Ok(rows)
}

/// Refuse a row with a field too long or too many fields: a mangled file, not a result.
fn check_size(rec: &csv::StringRecord, at: &Location) -> Result<()> {
    use crate::measure::{MAX_FIELDS, MAX_FIELD_BYTES};
    if rec.len() > MAX_FIELDS {
        return Err(Error::input(
            at.clone(),
            format!("{} fields on one row, more than {MAX_FIELDS}", rec.len()),
        ));
    }
    if let Some((i, f)) = rec
        .iter()
        .enumerate()
        .find(|(_, f)| f.len() > MAX_FIELD_BYTES)
    {
        let mut at = at.clone();
        at.column = Some(i as u64 + 1);
        return Err(Error::input(
            at,
            format!(
                "a field of {} bytes, more than {MAX_FIELD_BYTES}: an unclosed quote or pasted \
                 text?",
                f.len()
            ),
        ));
    }
    Ok(())
}

/// The `summary.json` that `check` wrote beside `points` (when there is one and it parses).
pub fn read_summary(points: &Path) -> Option<RecordedSummary> {
    let path = points.with_file_name("summary.json");
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(path).ok()?).ok()?;
    let text = |x: &serde_json::Value| x.as_str().map(str::to_string);
    let job = &v["job"];
    Some(RecordedSummary {
        part: text(&job["part"]),
        die: text(&job["die"]),
        tryout: text(&job["tryout"]),
        date: text(&job["date"]),
        material: text(&job["material"]),
        curve: text(&v["limit"]["name"]),
        band: v["settings"]["margin_pct"].as_f64(),
        verdict: text(&v["verdict"]),
        unit: text(&v["lengths"]["unit"]),
        rejected: v["rejected_rows"].as_u64(),
    })
}

/// Differences between neighbouring inputs that make a change of margin more than the die's:
/// the same file twice, other part names, curves, safety bands, length units (for position
/// matching), or no summary to tell.
pub fn basis_warnings(tryouts: &[Tryout], matching: Matching) -> Vec<String> {
    let mut out = Vec::new();
    for w in tryouts.windows(2) {
        let (b, a) = (&w[0], &w[1]);
        let (pb, pa) = (b.path.display(), a.path.display());
        if same_file(&b.path, &a.path) {
            out.push(format!(
                "{pb} is given twice: every location compares with itself"
            ));
        } else if same_bytes(&b.path, &a.path) {
            out.push(format!(
                "{pb} and {pa} have the same content: every location compares with itself"
            ));
        }
        let (Some(sb), Some(sa)) = (&b.summary, &a.summary) else {
            let missing = if b.summary.is_none() { &pb } else { &pa };
            out.push(format!(
                "no summary.json beside {missing}: cannot confirm that both were judged with \
                 the same curve and safety band, or are of the same part"
            ));
            continue;
        };
        let mut differs = |what: &str, x: String, y: String| {
            if x != y {
                out.push(format!(
                    "the {what} differ: {x} ({}), {y} ({})",
                    b.label, a.label
                ));
            }
        };
        let name = |s: &Option<String>| s.clone().unwrap_or_else(|| "(not named)".into());
        differs("part names", name(&sb.part), name(&sa.part));
        differs("curves", name(&sb.curve), name(&sa.curve));
        let band = |v: Option<f64>| v.map_or_else(|| "?".into(), |v| format!("{v:.1} pp"));
        differs("safety bands", band(sb.band), band(sa.band));
        if matches!(matching, Matching::Xy { .. }) {
            differs("length units", name(&sb.unit), name(&sa.unit));
        }
    }
    out
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (std::fs::canonicalize(a), std::fs::canonicalize(b)) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

fn same_bytes(a: &Path, b: &Path) -> bool {
    match (std::fs::read(a), std::fs::read(b)) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Result<Vec<ResultRow>> {
        read_results_from(Cursor::new(text.as_bytes()), Path::new("p.csv"))
    }

    #[test]
    fn comment_lines_before_the_header_are_skipped() {
        let rows = read(
            "# tryout 2, re-measured\n#\nid,major_eng_pct,minor_eng_pct,margin_pct,zone,x,y\n\
             A1,30.5,-4.0,2.5,marginal,10,20\nA2,12.0,1.0,,uncovered,,\n",
        )
        .unwrap();
        assert_eq!(rows.len(), 2);
        assert_eq!(rows[0].xy(), Some((10.0, 20.0)));
        assert_eq!(rows[1].margin_pct, None);
        assert_eq!(rows[1].xy(), None);
    }

    #[test]
    fn errors_name_the_line_and_column() {
        let e = read("# c\nid,major_eng_pct,minor_eng_pct,margin_pct,zone\nA,x,1,1,safe\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("p.csv:3:2 (column `major_eng_pct`)"), "{e}");
        let e = read("# c\nid,major\nA,1\n").unwrap_err().to_string();
        assert!(e.contains("p.csv:2: missing column `major_eng_pct`"), "{e}");
        let e = read("id,major_eng_pct,minor_eng_pct,margin_pct,zone\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("no location"), "{e}");
    }
}
