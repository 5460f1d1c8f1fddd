//! Measurement files through `check`'s streaming pass: header, plausibility screen, chunks
//! judged in parallel, points.csv text and the summary.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::point::Context;
use neckline_core::units::Lengths;
use neckline_core::assess::Settings;
use neckline_core::limit::LimitCurve;
use neckline_core::measure::{screen, ColumnMap, Header, RowRules};
use neckline_core::output::points_csv::Layout;
use neckline_core::stream::Pass;
use std::path::Path;

const CURVE: &str = "name = \"c\"\nsource = \"fuzz only\"\nstrain = \"engineering\"\npoints = [[-40, 60], [0, 30], [30, 45]]\n";

fuzz_target!(|data: &[u8]| {
    let file = Path::new("m.csv");
    let mut input = data;
    let Ok(header) = Header::read(&mut input, file, &ColumnMap::default()) else {
        return;
    };
    let lengths = Lengths {
        unit: Default::default(),
        d0: Some(2.5),
        t0: Some(1.0),
    };
    let settings = Settings {
        reading_error: Some(0.02),
        ..Settings::default()
    };
    let header = header.with_rules(RowRules::new(&lengths, settings.reading_error));
    let Ok(body) = screen(Box::new(input), &header) else {
        return;
    };
    let ctx = Context {
        curve: LimitCurve::parse(CURVE, Path::new("c.toml")).unwrap(),
        settings,
        lengths,
        strain_input: header.columns.gives_strains(),
        true_input: header.columns.gives_true_strains(),
    };
    let layout = Layout {
        z: header.columns.has("z"),
        thinning: header.columns.has("thinning_pct"),
        reading: true,
        unit: lengths.unit,
        ..Layout::default()
    };
    let pass = Pass {
        header: &header,
        ctx: &ctx,
        layout: &layout,
        view: Default::default(),
        write: true,
        size_hint: Some(data.len() as u64),
    };
    let mut out: Vec<u8> = Vec::new();
    let _ = pass.run(body, Some(&mut out), &mut |_| {});
});
