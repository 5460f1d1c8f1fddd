//! A small fixed analysis for the output tests: an invented part, a tabulated curve written in the
//! test, and 24 locations chosen to land in every zone. Deterministic: no dates from the clock,
//! no absolute paths.

use crate::analysis::Analysis;
use crate::assess::Settings;
use crate::job::Job;
use crate::limit::LimitCurve;
use crate::measure::{read_measurements_from, ColumnMap};
use crate::point::{state_of, Context};
use crate::units::LengthUnit;
use crate::units::Lengths;
use std::path::Path;

/// The curve file of the fixture (engineering percent).
pub const CURVE_TOML: &str = "name = \"test curve (invented)\"\n\
source = \"tabulated for the tests, invented\"\n\
material = \"test steel (invented)\"\n\
thickness_mm = 0.8\n\
strain = \"engineering\"\n\
points = [[-40, 70], [-20, 48], [0, 33], [20, 45], [40, 52]]\n";

/// `(id, engineering major %, engineering minor %, x, y)`.
pub const ROWS: [(&str, f64, f64, f64, f64); 24] = [
    ("F1", 38.0, -5.0, 10.0, 10.0),
    ("F2", 52.0, -18.0, 60.0, 10.0),
    ("M1", 30.0, 0.0, 110.0, 10.0),
    ("M2", 38.0, -12.0, 160.0, 10.0),
    ("M3", 33.0, 10.0, 210.0, 10.0),
    ("U1", 20.0, -45.0, 260.0, 10.0),
    ("T1", 10.0, -12.0, 10.0, 60.0),
    ("T2", 6.0, -9.0, 60.0, 60.0),
    ("L1", 1.5, 0.5, 110.0, 60.0),
    ("L2", 1.0, 1.0, 160.0, 60.0),
    ("S01", 20.0, 5.0, 210.0, 60.0),
    ("S02", 15.0, 2.0, 260.0, 60.0),
    ("S03", 22.0, -8.0, 10.0, 110.0),
    ("S04", 18.0, -4.0, 60.0, 110.0),
    ("S05", 12.0, 8.0, 110.0, 110.0),
    ("S06", 9.0, 6.0, 160.0, 110.0),
    ("S07", 25.0, -10.0, 210.0, 110.0),
    ("S08", 14.0, 12.0, 260.0, 110.0),
    ("S09", 8.0, 3.0, 10.0, 160.0),
    ("S10", 16.0, -2.0, 60.0, 160.0),
    ("S11", 21.0, 1.0, 110.0, 160.0),
    ("S12", 11.0, 4.0, 160.0, 160.0),
    ("S13", 19.0, 7.0, 210.0, 160.0),
    ("S14", 13.0, -6.0, 260.0, 160.0),
];

/// The measurement CSV of the fixture (d0 = 2.5 mm), with or without positions.
pub fn csv(with_xy: bool) -> String {
    let mut s = String::from(if with_xy {
        "id,major,minor,x,y\n"
    } else {
        "id,major,minor\n"
    });
    for (id, e1, e2, x, y) in ROWS {
        let (d1, d2) = (2.5 * (1.0 + e1 / 100.0), 2.5 * (1.0 + e2 / 100.0));
        if with_xy {
            s.push_str(&format!("{id},{d1:.4},{d2:.4},{x},{y}\n"));
        } else {
            s.push_str(&format!("{id},{d1:.4},{d2:.4}\n"));
        }
    }
    s
}

/// The job of the fixture.
pub fn job() -> Job {
    Job {
        part: Some("TP-1 test panel <LH> & co (invented)".into()),
        die: Some("TD-1 (invented)".into()),
        tryout: Some("T1".into()),
        material: Some("test steel, 0.80 mm (invented)".into()),
        lot: Some("lot 7 (invented)".into()),
        date: Some("2026-01-15".into()),
        measured_by: Some("test bench (invented)".into()),
        company: Some("Test Works (invented)".into()),
        ..Job::default()
    }
}

/// The fixed analysis.
pub fn analysis(with_xy: bool) -> Analysis {
    let curve = LimitCurve::parse(CURVE_TOML, Path::new("test-curve.toml")).unwrap();
    let text = csv(with_xy);
    let file = Path::new("tryout-fixture.csv");
    let set = read_measurements_from(text.as_bytes(), file, &ColumnMap::default()).unwrap();
    let lengths = Lengths {
        unit: LengthUnit::Mm,
        d0: Some(2.5),
        t0: Some(0.8),
    };
    let settings = Settings {
        max_thinning_pct: Some(25.0),
        ..Settings::default()
    };
    let ctx = Context {
        curve,
        settings,
        lengths,
        strain_input: false,
        true_input: false,
    };
    let states = set
        .points
        .into_iter()
        .map(|m| state_of(m, file, &lengths).unwrap());
    let (a, _) = Analysis::of_states(
        file.to_path_buf(),
        job(),
        ctx,
        Default::default(),
        states,
        set.rejected,
        &set.notes,
    );
    a
}
