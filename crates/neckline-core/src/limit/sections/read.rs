//! Reading a sections file: one row per point along a section line, through the measurement
//! reader (so workbooks, encodings, preambles, unit rows and the column map work as for
//! `check`), plus four columns of its own: `geometry`, `specimen`, `section` and `position_mm`.
//! A row whose strains are empty is a point where the crack opened (its position is kept).

use super::{SectionKey, SectionProfile};
use crate::error::{Error, Location, Result};
use crate::measure::{csv_reader, parse_number, ColumnMap, Header, Reading, RejectedRow};
use std::collections::BTreeMap;
use std::io::BufRead;
use std::path::Path;

/// The section file's own columns, in the order of [`SectionData`]'s key.
pub const SECTION_COLUMNS: [&str; 4] = ["geometry", "specimen", "section", "position_mm"];

/// One section's rows as gathered: its key, `(position, [minor, major] or missing)` and the
/// line of its first row.
type Gathered = (SectionKey, Vec<(f64, Option<[f64; 2]>)>, u64);

/// What a sections file gave.
#[derive(Debug, Clone)]
pub struct SectionData {
    /// The sections, in the order first met, each sorted by position.
    pub profiles: Vec<SectionProfile>,
    /// Rows rejected, with where and why.
    pub rejected: Vec<RejectedRow>,
    /// Notes on the header.
    pub notes: Vec<String>,
    /// Rows read with strains.
    pub points: usize,
    /// Rows without strains (crack gaps).
    pub missing: usize,
}

/// Read sections from `input` (UTF-8 text with LF, as [`crate::text::open`] gives); `name` is
/// used in messages. The file must give strains (true or engineering percent); the column map
/// may name the four section columns as it names the others.
pub fn read_sections(mut input: impl BufRead, name: &Path, map: &ColumnMap) -> Result<SectionData> {
    let header = Header::read(&mut input, name, map)?;
    let at_header = || Location::file(name).at_line(header.lines.max(1));
    if !header.columns.gives_strains() {
        return Err(Error::input(
            at_header(),
            "a sections file gives strains (major_true_pct and minor_true_pct, or \
             major_eng_pct and minor_eng_pct), not ellipse axes",
        ));
    }
    let mut idx = [0usize; 4];
    for (k, col) in SECTION_COLUMNS.iter().enumerate() {
        idx[k] = header.columns.index(col).ok_or_else(|| {
            Error::input(
                at_header(),
                format!(
                    "missing column `{col}`: a sections file needs geometry, specimen, section \
                     and position_mm (or --column {col}=HEADER)"
                ),
            )
        })?;
    }
    let mut reader = csv_reader(header.dialect, input);
    let mut record = csv::StringRecord::new();
    let mut by_key: BTreeMap<usize, Gathered> = BTreeMap::new();
    let mut keys: Vec<SectionKey> = Vec::new();
    let mut data = SectionData {
        profiles: Vec::new(),
        rejected: Vec::new(),
        notes: header.notes.clone(),
        points: 0,
        missing: 0,
    };
    loop {
        match reader.read_record(&mut record) {
            Ok(false) => break,
            Err(e) => {
                return Err(
                    crate::measure::csv_error(&Location::file(name), e).shift_line(header.lines)
                )
            }
            Ok(true) if record.iter().all(|f| f.trim().is_empty()) => continue,
            Ok(true) => {}
        }
        let line = header.lines + record.position().map_or(0, |p| p.line());
        let reject = |c: usize, reason: String| RejectedRow {
            location: Location::file(name).at_line(line).at_column(
                c as u64 + 1,
                SECTION_COLUMNS[idx.iter().position(|&i| i == c).unwrap_or(0)],
            ),
            id: None,
            reason,
        };
        let field = |k: usize| record.get(idx[k]).unwrap_or("").trim().to_string();
        let mut bad = None;
        for k in 0..3 {
            if field(k).is_empty() && bad.is_none() {
                bad = Some(reject(idx[k], format!("empty `{}`", SECTION_COLUMNS[k])));
            }
        }
        let position = match parse_number(&field(3), header.dialect) {
            Ok(v) if v.abs() <= crate::measure::MAX_LENGTH => Some(v),
            Ok(v) => {
                bad = bad.or(Some(reject(
                    idx[3],
                    format!("position {v} mm is implausible"),
                )));
                None
            }
            Err(m) => {
                bad = bad.or(Some(reject(idx[3], m)));
                None
            }
        };
        if let Some(r) = bad {
            data.rejected.push(r);
            continue;
        }
        let Some(position) = position else { continue };
        let strains = if header.not_measured(&record) {
            data.missing += 1;
            None
        } else {
            match header.row(&record, line) {
                Ok((m, _)) => match m.reading {
                    Reading::Strains(p) => {
                        data.points += 1;
                        Some([p.minor.value(), p.major.value()])
                    }
                    Reading::Axes { .. } => None,
                },
                Err(r) => {
                    data.rejected.push(r);
                    continue;
                }
            }
        };
        let key = SectionKey {
            geometry: field(0),
            specimen: field(1),
            section: field(2),
        };
        let k = match keys.iter().position(|x| *x == key) {
            Some(k) => k,
            None => {
                keys.push(key.clone());
                keys.len() - 1
            }
        };
        by_key
            .entry(k)
            .or_insert_with(|| (key, Vec::new(), line))
            .1
            .push((position, strains));
    }
    if data.points == 0 && data.rejected.is_empty() {
        return Err(crate::measure::no_rows(name));
    }
    for (_, (key, mut pts, line)) in by_key {
        pts.sort_by(|a, b| a.0.total_cmp(&b.0));
        let mut p = SectionProfile {
            key,
            x: Vec::new(),
            major: Vec::new(),
            minor: Vec::new(),
            gaps: Vec::new(),
            line,
        };
        let mut last: Option<f64> = None;
        for (x, s) in pts {
            if last.is_some_and(|l| (x - l).abs() < 1e-9) {
                data.rejected.push(RejectedRow {
                    location: Location::file(name).at_line(line),
                    id: None,
                    reason: format!(
                        "{}: two points at position {x} mm; the second left out",
                        p.key
                    ),
                });
                continue;
            }
            last = Some(x);
            match s {
                Some([e2, e1]) => {
                    p.x.push(x);
                    p.major.push(e1);
                    p.minor.push(e2);
                }
                None => p.gaps.push(x),
            }
        }
        data.profiles.push(p);
    }
    Ok(data)
}

#[cfg(test)]
mod tests {
    use super::*;

    // A small file in the semicolon dialect with a decimal comma (as the measurement reader
    // reads it): rows grouped by section, sorted by position, empty strains kept as gaps.
    #[test]
    fn rows_group_into_sections_with_gaps() {
        let text = "geometry;specimen;section;position_mm;major_true_pct;minor_true_pct\n\
                    20;A;1;1,0;30,0;-10,0\n20;A;1;0,0;29,0;-9,5\n20;A;1;2,0;;\n\
                    20;A;2;0,0;28,0;-9,0\n50;B;1;0,0;x;1\n";
        let d = read_sections(text.as_bytes(), Path::new("s.csv"), &ColumnMap::default()).unwrap();
        assert_eq!(d.profiles.len(), 2);
        let p = &d.profiles[0];
        assert_eq!(p.x, vec![0.0, 1.0]);
        assert_eq!(p.gaps.len(), 1);
        assert!((p.major[1] - 0.30).abs() < 1e-12 && (p.minor[0] + 0.095).abs() < 1e-12);
        assert_eq!((d.points, d.missing, d.rejected.len()), (3, 1, 1));
        assert!(
            d.rejected[0].to_string().starts_with("s.csv:6:5"),
            "{}",
            d.rejected[0]
        );
    }

    // The section columns are required, named at the header's line; a column map names them.
    #[test]
    fn section_columns_are_required_or_mapped() {
        let text = "geometry,specimen,position_mm,major_true_pct,minor_true_pct\n20,A,0,30,-10\n";
        let e = read_sections(text.as_bytes(), Path::new("s.csv"), &ColumnMap::default())
            .unwrap_err()
            .to_string();
        assert!(e.starts_with("s.csv:1: missing column `section`"), "{e}");
        let text =
            "Width,specimen,Cut,position_mm,major_true_pct,minor_true_pct\n20,A,1,0,30,-10\n";
        let mut map = ColumnMap::default();
        map.extend(
            [
                ("geometry".into(), "Width".into()),
                ("section".into(), "Cut".into()),
            ],
            "--column",
        );
        let d = read_sections(text.as_bytes(), Path::new("s.csv"), &map).unwrap();
        assert_eq!(d.profiles[0].key.geometry, "20");
        assert_eq!(d.profiles[0].key.section, "1");
    }
}
