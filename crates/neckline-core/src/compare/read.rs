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
    /// Its locations, in file order, when read whole ([`read_tryout`]); a comparison takes
    /// them into its tracks and leaves this empty.
    pub rows: Vec<ResultRow>,
    /// The summary beside it, if any.
    pub summary: Option<RecordedSummary>,
    /// What the outputs need of all its rows.
    pub stats: TryoutStats,
}

/// What the outputs need of every row of one tryout, in bounded memory.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct TryoutStats {
    /// How many locations.
    pub locations: usize,
    /// Locations per zone, in [`Zone::ALL`] order.
    pub zones: [usize; 6],
    /// (minor, limit major) of its locations, engineering percent: every one while there are
    /// few, else thinned to one per [`LIMIT_STEP_PCT`] of minor strain. Sorted by minor strain
    /// once [`TryoutStats::finish`] ran.
    pub limit: Vec<(f64, f64)>,
    /// Smallest and largest minor strain, and major strain, percent.
    pub strains: Option<Extent>,
    /// Smallest and largest x, and y, of the locations that have both.
    pub places: Option<Extent>,
}

/// Smallest and largest of two quantities: `((x0, x1), (y0, y1))`.
pub type Extent = ((f64, f64), (f64, f64));

/// Minor-strain step of the limit samples kept beyond [`crate::summary::KEEP_ALL`] rows, pp.
pub const LIMIT_STEP_PCT: f64 = 0.05;

fn widen(e: &mut Option<Extent>, p: (f64, f64)) {
    let ((x0, x1), (y0, y1)) = e.get_or_insert(((p.0, p.0), (p.1, p.1)));
    *x0 = x0.min(p.0);
    *x1 = x1.max(p.0);
    *y0 = y0.min(p.1);
    *y1 = y1.max(p.1);
}

impl TryoutStats {
    /// Fold in one row.
    pub fn fold(&mut self, r: &ResultRow) {
        self.locations += 1;
        self.zones[Zone::ALL.iter().position(|&z| z == r.zone).unwrap_or(0)] += 1;
        if let Some(l) = r.limit_pct {
            self.limit.push((r.minor_pct, l));
            if self.limit.len() > 2 * crate::summary::KEEP_ALL {
                self.thin();
            }
        }
        widen(&mut self.strains, (r.minor_pct, r.major_pct));
        if let Some(xy) = r.xy() {
            widen(&mut self.places, xy);
        }
    }

    fn sort(&mut self) {
        self.limit.sort_by(|a, b| a.0.total_cmp(&b.0));
        self.limit.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-6);
    }

    fn thin(&mut self) {
        self.sort();
        if self.limit.len() > crate::summary::KEEP_ALL {
            let bin = |p: &(f64, f64)| (p.0 / LIMIT_STEP_PCT).floor() as i64;
            self.limit.dedup_by(|a, b| bin(a) == bin(b));
        }
    }

    /// Sort the limit samples (after the last row).
    pub fn finish(&mut self) {
        if self.limit.len() > crate::summary::KEEP_ALL {
            self.thin();
        } else {
            self.sort();
        }
    }

    /// The stats of rows read whole.
    pub fn of(rows: &[ResultRow]) -> Self {
        let mut s = TryoutStats::default();
        for r in rows {
            s.fold(r);
        }
        s.finish();
        s
    }
}

const NEEDED: [&str; 5] = ["id", "major_eng_pct", "minor_eng_pct", "margin_pct", "zone"];
const OPTIONAL: [&str; 3] = ["limit_major_eng_pct", "x", "y"];

/// Read a `points.csv` written by `check`, its summary and a label (`number` counts from 1).
pub fn read_tryout(path: &Path, number: usize) -> Result<Tryout> {
    let rows = read_results(path)?;
    let mut t = tryout_of(path, number);
    t.rows = rows;
    Ok(t)
}

/// A tryout without its rows: its path, label and summary.
pub fn tryout_of(path: &Path, number: usize) -> Tryout {
    let summary = read_summary(path);
    let label = summary
        .as_ref()
        .and_then(|s| s.tryout.clone())
        .or_else(|| file_label(path))
        .unwrap_or_else(|| format!("tryout {number}"));
    Tryout {
        path: path.to_path_buf(),
        label,
        rows: Vec::new(),
        summary,
        stats: TryoutStats::default(),
    }
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
pub fn read_results_from(input: impl BufRead, path: &Path) -> Result<Vec<ResultRow>> {
    let loc = Location::file(path);
    let mut rows = Vec::new();
    let mut seen = HashSet::new();
    for_each_row(input, path, |line, row| {
        if !seen.insert(row.id.clone()) {
            return Err(duplicate(&loc, line, row.id_column, &row.row.id));
        }
        rows.push(row.row);
        Ok(())
    })?;
    Ok(rows)
}

/// One row as read, with the column of its id (for messages).
#[derive(Debug, Clone, PartialEq)]
pub struct ReadRow {
    /// The values.
    pub row: ResultRow,
    /// Column of the id, counted from 1.
    pub id_column: u64,
}

impl std::ops::Deref for ReadRow {
    type Target = ResultRow;
    fn deref(&self) -> &ResultRow {
        &self.row
    }
}

/// The error of an id met twice in one file.
pub fn duplicate(loc: &Location, line: u64, column: u64, id: &str) -> Error {
    Error::input(
        loc.clone().at_line(line).at_column(column, "id"),
        format!("duplicate id `{id}`: a location can be compared only once"),
    )
}

/// Read `input` row by row, handing each to `each` with its line: the rows are never held
/// together. Every check of [`read_results_from`] but the duplicate id (which needs every id).
/// Gives the number of rows.
pub fn for_each_row(
    mut input: impl BufRead,
    path: &Path,
    mut each: impl FnMut(u64, ReadRow) -> Result<()>,
) -> Result<usize> {
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
        .trim(csv::Trim::Headers)
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
    let mut n = 0;
    let mut rec = csv::StringRecord::new();
    while rdr.read_record(&mut rec).map_err(|e| csv_error(&loc, e))? {
        let line = rec.position().map_or(0, |p| p.line());
        let row = one_row(&rec, &loc, line, &idx, &opt)?;
        each(line, row)?;
        n += 1;
    }
    if n == 0 {
        return Err(Error::input(
            loc.at_line(header_line),
            "no location after the header: nothing to compare",
        ));
    }
    Ok(n)
}

fn one_row(
    rec: &csv::StringRecord,
    loc: &Location,
    line: u64,
    idx: &[usize; 5],
    opt: &[Option<usize>; 3],
) -> Result<ReadRow> {
    check_size(rec, &loc.clone().at_line(line))?;
    let at = |i: usize, name: &str| loc.clone().at_line(line).at_column(i as u64 + 1, name);
    let number = |i: usize, name: &str| -> Result<Option<f64>> {
        match rec.get(i).unwrap_or("").trim() {
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
        number(idx[k], NEEDED[k])?
            .ok_or_else(|| Error::input(at(idx[k], NEEDED[k]), "expected a number, found nothing"))
    };
    let optional =
        |k: usize| -> Result<Option<f64>> { opt[k].map_or(Ok(None), |i| number(i, OPTIONAL[k])) };
    // Fields are trimmed here, one by one (the reader trims the header only).
    let id = rec.get(idx[0]).unwrap_or("").trim().to_string();
    if id.is_empty() {
        return Err(Error::input(
            at(idx[0], "id"),
            "empty id: every location needs one",
        ));
    }
    let row = ResultRow {
        id,
        major_pct: required(1)?,
        minor_pct: required(2)?,
        margin_pct: number(idx[3], NEEDED[3])?,
        limit_pct: optional(0)?,
        zone: rec
            .get(idx[4])
            .unwrap_or("")
            .trim()
            .parse()
            .map_err(|m: String| Error::input(at(idx[4], "zone"), m))?,
        x: optional(1)?,
        y: optional(2)?,
    };
    Ok(ReadRow {
        row,
        id_column: idx[0] as u64 + 1,
    })
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

/// Whether two files hold the same bytes, read a block at a time.
fn same_bytes(a: &Path, b: &Path) -> bool {
    let open = |p: &Path| std::fs::File::open(p).ok();
    let (Some(fa), Some(fb)) = (open(a), open(b)) else {
        return false;
    };
    let len = |f: &std::fs::File| f.metadata().map(|m| m.len()).ok();
    if len(&fa).is_none() || len(&fa) != len(&fb) {
        return false;
    }
    let (mut ra, mut rb) = (
        std::io::BufReader::with_capacity(1 << 16, fa),
        std::io::BufReader::with_capacity(1 << 16, fb),
    );
    let (mut x, mut y) = (vec![0u8; 1 << 16], vec![0u8; 1 << 16]);
    loop {
        let n = match ra.read(&mut x) {
            Ok(n) => n,
            Err(_) => return false,
        };
        if n == 0 {
            return true;
        }
        if rb.read_exact(&mut y[..n]).is_err() || x[..n] != y[..n] {
            return false;
        }
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
