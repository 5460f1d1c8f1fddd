//! Which field of a row holds what: neckline's column names, the columns a points.csv written by
//! `check` adds, and [`Columns`], recognised from a header through a [`ColumnMap`].

use super::recognise::Fields;
use super::ColumnMap;
use crate::error::{Location, Result};

/// neckline's names for the columns it reads.
pub const NAMES: [&str; 18] = [
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
    "valid",
];

/// Columns of a points.csv written by `check` that are results, not readings: left aside
/// without a warning when such a file is judged again.
pub(super) const OWN_RESULT_COLUMNS: &[&str] = &[
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
    "peps_use_uncertainty_pct",
    "reason",
    "",
];

/// Columns added for a multi-stage file: the stage count, the path criterion's accumulated
/// effective strain, the direction of the last increment (degrees: 90 plane strain, 45
/// equibiaxial), its limit and the use of it, the bend of the path (degrees between the first
/// and the last increment), the zone by the strain curve alone and by the path criterion, and
/// `yes` where the major axis turned between stages (with `angle_deg` the increments are taken
/// in the part's fixed frame), and the path's notes (unloading beyond the noise, axes that may
/// have turned, a straight path judged by the strain curve alone).
pub const PATH_COLUMNS: [&str; 10] = [
    "stages",
    "peps_effective_pct",
    "peps_angle_deg",
    "peps_limit_pct",
    "peps_use_pct",
    "path_bend_deg",
    "strain_zone",
    "peps_zone",
    "path_turned",
    "path_note",
];

/// The path column added when a reading error is set: the uncertainty of `peps_use_pct`,
/// percentage points.
pub const PATH_READING_COLUMNS: [&str; 1] = ["peps_use_uncertainty_pct"];

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
    /// neckline's name of each field (the header through the map), for messages.
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
    /// The validity flag (`1`/`0`, `true`/`false`, `yes`/`no`): a row flagged not valid is not
    /// measured.
    pub(super) valid: Option<usize>,
}

/// What a numeric column holds, for the unit row under the header.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Quantity {
    /// A length in the file's unit (axes, d0, positions, thickness).
    Length,
    /// A strain or thinning in percent.
    Percent,
    /// An angle in degrees.
    Angle,
}

impl Columns {
    /// Recognise the columns of `header`, through `map`. Returns the columns and notes for the
    /// user (ignored columns, strain columns in use).
    pub fn from_header(
        header: &csv::StringRecord,
        map: &ColumnMap,
        loc: &Location,
    ) -> Result<(Self, Vec<String>)> {
        let fields = Fields::new(header, map, loc)?;
        let mut notes = Vec::new();
        let kind = fields.kind(&mut notes)?;
        let id = fields.id(kind, &mut notes)?;
        let d0 = fields.d0(kind, &mut notes);
        notes.extend(fields.ignored());
        Ok((fields.into_columns(kind, id, d0), notes))
    }

    /// The fields that hold the reading itself (the axes, or the strain pairs).
    pub(super) fn reading_fields(&self) -> Vec<usize> {
        match self.kind {
            Kind::Axes { major, minor }
            | Kind::Eng { major, minor }
            | Kind::True { major, minor } => {
                vec![major, minor]
            }
            Kind::Both { eng, tru } => vec![eng.0, eng.1, tru.0, tru.1],
        }
    }

    /// The numeric fields and what each holds.
    pub(super) fn quantities(&self) -> Vec<(usize, Quantity)> {
        let reading = if self.gives_strains() {
            Quantity::Percent
        } else {
            Quantity::Length
        };
        let mut v: Vec<(usize, Quantity)> = self
            .reading_fields()
            .into_iter()
            .map(|c| (c, reading))
            .collect();
        for c in [self.d0, self.x, self.y, self.z, self.thickness]
            .into_iter()
            .flatten()
        {
            v.push((c, Quantity::Length));
        }
        v.extend(self.thinning.map(|c| (c, Quantity::Percent)));
        v.extend(self.angle.map(|c| (c, Quantity::Angle)));
        v.sort_unstable_by_key(|(c, _)| *c);
        v
    }

    /// Whether rows give strains rather than axes.
    pub fn gives_strains(&self) -> bool {
        !matches!(self.kind, Kind::Axes { .. })
    }

    /// Whether rows give true strains (alone or beside engineering ones, which they win over).
    pub fn gives_true_strains(&self) -> bool {
        matches!(self.kind, Kind::True { .. } | Kind::Both { .. })
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
            "valid" => self.valid.is_some(),
            "y" => self.y.is_some(),
            _ => self.names.iter().any(|n| n == name),
        }
    }
}

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation of `measure` (the columns it reads) and the
    //! doc comments of [`Columns::has`] and [`Columns::index`].
    use super::*;
    use std::path::Path;

    #[test]
    fn every_name_is_accepted_once_and_nothing_else() {
        for (i, n) in NAMES.iter().enumerate() {
            assert!(super::super::check_name(n).is_ok(), "{n}");
            assert!(!NAMES[..i].contains(n), "{n} twice");
        }
        assert!(super::super::check_name("major_pct").is_err());
    }

    #[test]
    fn a_column_is_found_by_neckline_name() {
        let header = csv::StringRecord::from(vec![
            "Stage",
            "major_true_pct",
            "minor_true_pct",
            "thinning_pct",
        ]);
        let loc = Location::file(Path::new("m.csv"));
        let (cols, _) = Columns::from_header(&header, &ColumnMap::default(), &loc).unwrap();
        assert_eq!(cols.index("stage"), Some(0));
        assert_eq!(cols.index("minor_true_pct"), Some(2));
        assert_eq!(cols.index("x"), None);
        assert!(cols.has("stage") && cols.has("thinning_pct") && cols.has("major_true_pct"));
        assert!(!cols.has("z") && !cols.has("note") && !cols.has("angle_deg"));
    }
}
