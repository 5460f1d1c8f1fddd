//! Recognising a header's columns: its fields named through the column map, each kind of
//! column found (axes, engineering strains, true strains, id, d0, positions, measured
//! thickness), and the notes and refusals that come with them.

use super::columns::{Columns, Kind, GRID_COLUMNS, NAMES, OWN_RESULT_COLUMNS, PATH_COLUMNS};
use super::ColumnMap;
use crate::error::{Error, Location, Result};
use std::collections::HashSet;

/// A header field under neckline's name: trimmed (with a byte-order mark), lower case, `d1` and
/// `d2` read as `major` and `minor`.
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

/// The header's location: `loc` at its line (line 1 when `loc` names none).
fn at_header(loc: &Location) -> Location {
    let line = loc.line.unwrap_or(1);
    loc.clone().at_line(line)
}

/// Every entry of the column map names a header the file has.
fn check_map(header: &csv::StringRecord, map: &ColumnMap, loc: &Location) -> Result<()> {
    for (name, h) in &map.entries {
        if !header
            .iter()
            .any(|f| f.trim().eq_ignore_ascii_case(h.trim()))
        {
            return Err(Error::input(
                at_header(loc),
                format!(
                    "column map ({}): `{name} = \"{h}\"`, but the header has no column \
                     `{h}` (found: {})",
                    map.origin,
                    listed(header)
                ),
            ));
        }
    }
    Ok(())
}

/// No two names of the column map name the same header: the map's own error, named by where
/// the map came from (the job file's `[columns]`, `--column`).
fn check_one_header_each(map: &ColumnMap) -> Result<()> {
    for (i, (a, h)) in map.entries.iter().enumerate() {
        if let Some((b, _)) = map.entries[i + 1..]
            .iter()
            .find(|(_, g)| g.trim().eq_ignore_ascii_case(h.trim()))
        {
            return Err(Error::Usage(format!(
                "{}: `{a}` and `{b}` both name the header `{}`: each header is one column",
                map.origin,
                h.trim()
            )));
        }
    }
    Ok(())
}

/// No name (but the empty one) appears twice.
fn check_twice(names: &[String], loc: &Location) -> Result<()> {
    let mut seen = HashSet::new();
    for (i, n) in names.iter().enumerate() {
        if !n.is_empty() && !seen.insert(n.as_str()) {
            return Err(Error::input(
                at_header(loc).at_column(i as u64 + 1, n),
                format!("column `{n}` appears twice in the header"),
            ));
        }
    }
    Ok(())
}

/// The header's fields as written, for messages.
fn listed(header: &csv::StringRecord) -> String {
    header.iter().collect::<Vec<_>>().join(", ")
}

/// A header's fields under neckline's names, while its columns are being recognised.
pub(super) struct Fields<'a> {
    header: &'a csv::StringRecord,
    map: &'a ColumnMap,
    loc: &'a Location,
    /// neckline's name of each field.
    names: Vec<String>,
    /// The file is a points.csv written by `check` (it has `thickness_true_pct` and `zone`).
    own: bool,
}

impl<'a> Fields<'a> {
    /// Name the fields through the map; refuse a map entry the header lacks, or a name twice.
    pub(super) fn new(
        header: &'a csv::StringRecord,
        map: &'a ColumnMap,
        loc: &'a Location,
    ) -> Result<Self> {
        check_one_header_each(map)?;
        check_map(header, map, loc)?;
        let names: Vec<String> = header
            .iter()
            .map(|h| map.name_of(h).map_or_else(|| canonical(h), str::to_string))
            .collect();
        let own =
            names.iter().any(|n| n == "thickness_true_pct") && names.iter().any(|n| n == "zone");
        check_twice(&names, loc)?;
        Ok(Fields {
            header,
            map,
            loc,
            names,
            own,
        })
    }

    fn find(&self, name: &str) -> Option<usize> {
        self.names.iter().position(|c| c == name)
    }

    fn error(&self, message: String) -> Error {
        Error::input(at_header(self.loc), message)
    }

    /// The two columns of a pair, both or neither (one alone refuses the file).
    fn pair(&self, a: &str, b: &str) -> Result<Option<(usize, usize)>> {
        match (self.find(a), self.find(b)) {
            (Some(i), Some(j)) => Ok(Some((i, j))),
            (None, None) => Ok(None),
            (Some(i), None) | (None, Some(i)) => {
                let missing = if self.names[i] == a { b } else { a };
                Err(self.error(format!(
                    "missing column `{missing}`: `{a}` and `{b}` come as a pair, the header has \
                     only `{}` (found: {})",
                    self.names[i],
                    listed(self.header)
                )))
            }
        }
    }

    /// The ellipse axes `major`, `minor` (`d1`, `d2`).
    fn axes(&self) -> Result<Option<(usize, usize)>> {
        self.pair("major", "minor")
    }

    /// The engineering strains in percent.
    fn eng_strains(&self) -> Result<Option<(usize, usize)>> {
        self.pair("major_eng_pct", "minor_eng_pct")
    }

    /// The true strains in percent.
    fn true_strains(&self) -> Result<Option<(usize, usize)>> {
        self.pair("major_true_pct", "minor_true_pct")
    }

    /// How rows give their strains: axes, or one or both strain pairs, never axes and strains.
    pub(super) fn kind(&self, notes: &mut Vec<String>) -> Result<Kind> {
        let (axes, eng, tru) = (self.axes()?, self.eng_strains()?, self.true_strains()?);
        Ok(match (axes, eng, tru) {
            (Some((major, minor)), None, None) => Kind::Axes { major, minor },
            (Some((a, _)), e, t) => return Err(self.mixed(a, e.or(t).map_or(0, |p| p.0))),
            (None, Some((major, minor)), None) => Kind::Eng { major, minor },
            (None, None, Some((major, minor))) => Kind::True { major, minor },
            (None, Some(eng), Some(tru)) => {
                if !self.own {
                    notes.push(
                        "both engineering and true strain columns: true strain is used, \
                         engineering is checked against it"
                            .to_string(),
                    );
                }
                Kind::Both { eng, tru }
            }
            (None, None, None) => return Err(self.no_strains()),
        })
    }

    /// The refusal of a header with both axes (field `axis`) and strains (field `strain`).
    fn mixed(&self, axis: usize, strain: usize) -> Error {
        self.error(format!(
            "the header has both ellipse axes (`{}`) and strains (`{}`): give one or the other \
             (remove or rename the columns you do not mean)",
            self.header.get(axis).unwrap_or(""),
            self.header.get(strain).unwrap_or("")
        ))
    }

    /// The refusal of a header with neither axes nor strains, with what the map did.
    fn no_strains(&self) -> Error {
        let mut msg = format!(
            "missing columns: the header must name id, major and minor (ellipse axes), or \
             major_eng_pct/minor_eng_pct or major_true_pct/minor_true_pct (strains, percent) \
             (found: {})",
            listed(self.header)
        );
        if self.map.entries.is_empty() {
            msg.push_str(
                "; map other headers with --column NAME=HEADER or [columns] in the job file",
            );
        } else {
            let mapped: Vec<String> = self
                .map
                .entries
                .iter()
                .map(|(n, h)| format!("`{h}` to {n}"))
                .collect();
            msg.push_str(&format!(
                "; the column map ({}) maps {}",
                self.map.origin,
                mapped.join(", ")
            ));
        }
        self.error(msg)
    }

    /// The id column: required with axes; a file of strains may name locations by line.
    pub(super) fn id(&self, kind: Kind, notes: &mut Vec<String>) -> Result<Option<usize>> {
        let id = self.find("id");
        if id.is_some() {
            return Ok(id);
        }
        if matches!(kind, Kind::Axes { .. }) {
            let map = if self.map.entries.is_empty() {
                String::new()
            } else {
                format!("; column map ({})", self.map.origin)
            };
            return Err(self.error(format!(
                "missing column `id`: the header must name id, major and minor (found: {}){map}",
                listed(self.header)
            )));
        }
        notes.push("no id column: each location is named by its line in the file".into());
        Ok(None)
    }

    /// The per-row d0 column, read with axes only (a note says when strains leave it aside).
    pub(super) fn d0(&self, kind: Kind, notes: &mut Vec<String>) -> Option<usize> {
        let d0 = self.find("d0");
        if matches!(kind, Kind::Axes { .. }) {
            return d0;
        }
        if d0.is_some() && !self.own {
            notes.push("the d0 column is not used: the file gives strains, not axes".into());
        }
        None
    }

    /// The position columns `x`, `y`, `z`.
    fn positions(&self) -> [Option<usize>; 3] {
        ["x", "y", "z"].map(|n| self.find(n))
    }

    /// The measured thickness and thinning columns. In a points.csv written by `check`,
    /// `thickness` and `thinning_pct` are computed: the measured ones are `thickness_measured`
    /// and `thinning_measured_pct`.
    fn measured_thickness(&self) -> (Option<usize>, Option<usize>) {
        if self.own {
            (
                self.find("thickness_measured"),
                self.find("thinning_measured_pct"),
            )
        } else {
            (self.find("thickness"), self.find("thinning_pct"))
        }
    }

    /// A note naming the columns that are not read, if any (a points.csv's own results are
    /// left aside without one).
    pub(super) fn ignored(&self) -> Option<String> {
        let mut used = NAMES.to_vec();
        if self.own {
            used.extend(OWN_RESULT_COLUMNS);
            used.extend(PATH_COLUMNS);
            used.extend(["thickness_measured", "thinning_measured_pct"]);
            used.extend(GRID_COLUMNS);
        } else {
            used.push("");
        }
        let ignored: Vec<&str> = self
            .names
            .iter()
            .map(String::as_str)
            .filter(|n| !used.contains(n))
            .collect();
        (!ignored.is_empty()).then(|| format!("ignored columns: {}", ignored.join(", ")))
    }

    /// The recognised columns, with the optional ones the header has.
    pub(super) fn into_columns(self, kind: Kind, id: Option<usize>, d0: Option<usize>) -> Columns {
        let [x, y, z] = self.positions();
        let (thickness, thinning) = self.measured_thickness();
        Columns {
            id,
            kind,
            d0,
            x,
            y,
            z,
            stage: self.find("stage"),
            thickness,
            thinning,
            note: self.find("note"),
            condition: self.find("condition"),
            angle: self.find("angle_deg"),
            valid: self.find("valid"),
            names: self.names,
        }
    }
}

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation of `measure` (the columns, any order, names
    //! case-insensitive, `d1`/`d2` aliases, axes or strains) and README.md, "What input is
    //! refused, and why".
    use super::*;
    use std::path::Path;

    fn record(fields: &[&str]) -> csv::StringRecord {
        csv::StringRecord::from(fields.to_vec())
    }

    fn recognise(fields: &[&str], map: &ColumnMap) -> Result<(Columns, Vec<String>)> {
        Columns::from_header(&record(fields), map, &Location::file(Path::new("m.csv")))
    }

    fn refused(fields: &[&str], map: &ColumnMap) -> String {
        recognise(fields, map).unwrap_err().to_string()
    }

    #[test]
    fn axes_are_recognised_in_any_order_and_case_with_their_aliases() {
        let (cols, notes) = recognise(
            &["\u{feff}X", " D2 ", "ID", "d1", "Note"],
            &ColumnMap::default(),
        )
        .unwrap();
        assert_eq!(cols.kind, Kind::Axes { major: 3, minor: 1 });
        assert!(!cols.gives_strains());
        assert_eq!((cols.id, cols.x, cols.note), (Some(2), Some(0), Some(4)));
        assert_eq!(cols.index("major"), Some(3));
        assert!(cols.has("x") && !cols.has("y") && !cols.has("z"));
        assert!(notes.is_empty(), "{notes:?}");
    }

    #[test]
    fn strains_need_no_id_and_true_strain_wins_over_engineering() {
        let fields = [
            "major_eng_pct",
            "minor_eng_pct",
            "major_true_pct",
            "minor_true_pct",
            "d0",
        ];
        let (cols, notes) = recognise(&fields, &ColumnMap::default()).unwrap();
        assert_eq!(
            cols.kind,
            Kind::Both {
                eng: (0, 1),
                tru: (2, 3)
            }
        );
        assert!(cols.gives_strains());
        assert_eq!((cols.id, cols.d0), (None, None));
        assert_eq!(notes.len(), 3, "{notes:?}");
        assert!(notes[0].contains("true strain is used"));
        assert!(notes[1].contains("named by its line"));
        assert!(notes[2].contains("d0 column is not used"));
    }

    #[test]
    fn other_headers_are_read_through_the_column_map() {
        let mut map = ColumnMap::default();
        map.extend(
            [
                ("major_true_pct".into(), "Major strain (%)".into()),
                ("minor_true_pct".into(), "minor STRAIN (%)".into()),
                ("id".into(), "Point".into()),
            ],
            "--column",
        );
        let fields = ["point", "Major strain (%)", "Minor strain (%) ", "Section"];
        let (cols, notes) = recognise(&fields, &map).unwrap();
        assert_eq!(cols.kind, Kind::True { major: 1, minor: 2 });
        assert_eq!(cols.id, Some(0));
        assert_eq!(notes, ["ignored columns: section"]);
        // Without the map the same header has neither axes nor strains, and the refusal says
        // how to map them.
        let e = refused(&fields, &ColumnMap::default());
        assert!(e.starts_with("m.csv:1: missing columns:"), "{e}");
        assert!(e.contains("--column NAME=HEADER"), "{e}");
        // A map entry for a header the file lacks refuses the file, naming the map's origin.
        map.extend([("x".into(), "Position X".into())], "job.toml [columns]");
        let e = refused(&fields, &map);
        assert!(
            e.contains("column map (--column and job.toml [columns]): `x = \"Position X\"`"),
            "{e}"
        );
    }

    #[test]
    fn a_bad_header_is_refused_at_line_one_naming_the_column() {
        let none = ColumnMap::default();
        let e = refused(&["id", "major", "d0", "MAJOR"], &none);
        assert_eq!(
            e,
            "m.csv:1:4 (column `major`): column `major` appears twice in the header"
        );
        let e = refused(&["id", "major", "d0"], &none);
        assert!(e.starts_with("m.csv:1: missing column `minor`"), "{e}");
        let e = refused(
            &["id", "major", "minor", "major_eng_pct", "minor_eng_pct"],
            &none,
        );
        assert!(
            e.contains("both ellipse axes (`major`) and strains (`major_eng_pct`)"),
            "{e}"
        );
        let e = refused(&["major", "minor"], &none);
        assert!(e.starts_with("m.csv:1: missing column `id`"), "{e}");
    }

    #[test]
    fn a_points_csv_is_read_by_its_measured_columns_without_notes() {
        let fields = [
            "id",
            "major_eng_pct",
            "minor_eng_pct",
            "major_true_pct",
            "minor_true_pct",
            "thickness_true_pct",
            "thickness",
            "thinning_pct",
            "zone",
            "d0",
            "thickness_measured",
            "thinning_measured_pct",
            PATH_COLUMNS[0],
            GRID_COLUMNS[0],
        ];
        let (cols, notes) = recognise(&fields, &ColumnMap::default()).unwrap();
        assert_eq!((cols.thickness, cols.thinning), (Some(10), Some(11)));
        assert!(notes.is_empty(), "{notes:?}");
    }
}
