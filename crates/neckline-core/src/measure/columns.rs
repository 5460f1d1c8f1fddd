//! Which field of a row holds what: neckline's column names, the columns a points.csv written by
//! `check` adds, and [`Columns`], recognised from a header through a [`ColumnMap`].

use super::ColumnMap;
use crate::error::{Error, Location, Result};
use std::collections::HashSet;

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

/// Columns added for a multi-stage file: the stage count, the path criterion's accumulated
/// effective strain, the direction of the last increment (degrees: 90 plane strain, 45
/// equibiaxial), its limit and the use of it, the bend of the path (degrees between the first
/// and the last increment), the zone by the strain curve alone and by the path criterion, and
/// `yes` where the major axis turned between stages (the criterion's fixed-axes assumption fails).
pub const PATH_COLUMNS: [&str; 9] = [
    "stages",
    "peps_effective_pct",
    "peps_angle_deg",
    "peps_limit_pct",
    "peps_use_pct",
    "path_bend_deg",
    "strain_zone",
    "peps_zone",
    "path_turned",
];

/// Columns added at the end when the locations were computed from grid nodes: major direction
/// in the blank (degrees from +X), in-plane rotation (2-D), formed-surface normal and centre
/// height (3-D), element centre in the blank, node count.
pub const GRID_COLUMNS: [&str; 9] = [
    "major_dir_deg",
    "rotation_deg",
    "normal_x",
    "normal_y",
    "normal_z",
    "z",
    "ref_x",
    "ref_y",
    "nodes",
];

/// How a row gives its strains.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Kind {
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
    pub(super) names: Vec<String>,
    pub(super) id: Option<usize>,
    pub(super) kind: Kind,
    pub(super) d0: Option<usize>,
    pub(super) x: Option<usize>,
    pub(super) y: Option<usize>,
    pub(super) z: Option<usize>,
    pub(super) stage: Option<usize>,
    pub(super) thickness: Option<usize>,
    pub(super) thinning: Option<usize>,
    pub(super) note: Option<usize>,
    pub(super) condition: Option<usize>,
    pub(super) angle: Option<usize>,
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
            v.extend(PATH_COLUMNS);
            v.extend(["thickness_measured", "thinning_measured_pct"]);
            v.extend(GRID_COLUMNS);
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
