//! `neckline limit from-sections`: a laboratory curve from test-section strain profiles, by the
//! position-dependent method after ISO 12004-2 ([`neckline_core::limit::sections`]). The file is
//! read once through the measurement reader (workbooks, encodings, the column map as for
//! `check`) and hashed as read, so that the curve's `source` records the SHA-256 of the very
//! bytes it came from.

use crate::args::InputArgs;
use crate::commands::{paragraph, Outcome};
use crate::output_set::OutputSet;
use clap::Args;
use neckline_core::error::{Error, Result};
use neckline_core::job::Job;
use neckline_core::limit::sections::read::{read_sections, SectionData, SECTION_COLUMNS};
use neckline_core::limit::sections::{
    self, GeometryStats, LabWords, SectionResult, LAB_CURVE_WORDS, LAB_HEADER,
};
use neckline_core::limit::LimitCurve;
use neckline_core::measure::ColumnMap;
use neckline_core::output::input_name;
use neckline_core::strain::TrueStrain;
use neckline_core::CAUTION;
use neckline_render::sections as pictures;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Arguments of `limit from-sections`.
#[derive(Debug, Clone, Args)]
pub struct FromSectionsArgs {
    /// Section profiles: one row per point along a section line, with columns geometry,
    /// specimen, section, position_mm and the strains in percent (major_true_pct,
    /// minor_true_pct, or major_eng_pct, minor_eng_pct); empty strains where the crack opened;
    /// a workbook's sheet is read as for `check`; `-` = stdin.
    #[arg(value_name = "SECTIONS.csv")]
    pub sections: PathBuf,
    /// Write the curve to this file (atomically) and print the per-geometry table, the warnings
    /// and the plane-strain limit [default: the curve to standard output, the summary to
    /// standard error].
    #[arg(long, value_name = "FILE.toml")]
    pub out: Option<PathBuf>,
    /// Curve name shown on outputs [default: "Laboratory curve, " and the file's name].
    #[arg(long, value_name = "NAME")]
    pub name: Option<String>,
    /// The laboratory, recorded in the curve's source.
    #[arg(long, value_name = "TEXT")]
    pub lab: Option<String>,
    /// Material grade, recorded in the file.
    #[arg(long, value_name = "TEXT")]
    pub material: Option<String>,
    /// Material lot, recorded in the file.
    #[arg(long, value_name = "TEXT")]
    pub lot: Option<String>,
    /// Also draw into this folder (made if missing): curve.svg (the curve with each geometry's
    /// points and scatter bars), sections-GEOMETRY.svg (each section's profile, windows and
    /// fits) and the printable sections.html with a sign-off block.
    #[arg(long, value_name = "DIR")]
    pub plot: Option<PathBuf>,
    /// Read the file's column HEADER as neckline's column NAME (repeatable), e.g. --column
    /// "geometry=Width". Names: geometry, specimen, section, position_mm, major_true_pct,
    /// minor_true_pct, major_eng_pct, minor_eng_pct, and the other measurement columns.
    #[arg(long = "column", value_name = "NAME=HEADER", value_parser = parse_column)]
    pub columns: Vec<(String, String)>,
    /// The header's line in the file (1-based), every line before it left aside [default: the
    /// first line that holds the needed columns].
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub header_row: Option<u64>,
    /// How the input file is read (encoding, workbook sheet).
    #[command(flatten)]
    pub input: InputArgs,
}

/// One `NAME=HEADER`: a section column or any measurement column.
fn parse_column(s: &str) -> std::result::Result<(String, String), String> {
    if let Some((name, header)) = s.split_once('=') {
        let n = name.trim().to_ascii_lowercase();
        if SECTION_COLUMNS.contains(&n.as_str()) {
            return Ok((n, header.trim().to_string()));
        }
    }
    ColumnMap::parse_arg(s).map_err(|e| {
        if e.contains("is not a column") {
            format!("{e}, or one of {}", SECTION_COLUMNS.join(", "))
        } else {
            e
        }
    })
}

/// Run `limit from-sections`.
pub fn run(a: &FromSectionsArgs) -> Result<Outcome> {
    crate::commands::set_input_options(&a.input, &Job::default());
    let mut map = ColumnMap::default();
    map.extend(a.columns.clone(), "--column");
    map.header_row = a.header_row;
    let (input, digest) = neckline_core::text::open(&a.sections)?;
    let data = read_sections(input, &a.sections, &map)?;
    let words = LabWords {
        file: input_name(&a.sections),
        sha256: digest.hex(),
        lab: a.lab.clone(),
        material: a.material.clone(),
        lot: a.lot.clone(),
    };
    report_rejected(&data);
    let results: Vec<SectionResult> = data
        .profiles
        .iter()
        .cloned()
        .map(sections::evaluate)
        .collect();
    let name = input_name(&a.sections);
    for r in results.iter().filter(|r| !r.problems.is_empty()) {
        for p in &r.problems {
            eprintln!(
                "warning: {name}:{}: {}: left out: {p}",
                r.profile.line, r.profile.key
            );
        }
    }
    let stats = sections::geometry_stats(&results);
    let warnings = sections::series_warnings(&stats);
    for w in &warnings {
        eprintln!("warning: {name}: {w}");
    }
    let file = a.sections.file_name().map_or_else(
        || "standard input".into(),
        |n| n.to_string_lossy().into_owned(),
    );
    let curve_name = a
        .name
        .clone()
        .unwrap_or_else(|| format!("Laboratory curve, {file}"));
    let curve = sections::lab_curve(&curve_name, &stats, &words)
        .map_err(|m| Error::Usage(format!("{name}: {m}")))?;
    let inputs = vec![a.sections.clone()];
    // The curve as it will be read back, then every file of the run staged in one set and
    // moved in together (the pictures' names depend on the geometries read).
    let shown = a.out.clone().unwrap_or_else(|| PathBuf::from("<stdout>"));
    let (text, parsed) = curve.render_checked_with(&shown, LAB_HEADER)?;
    let mut files: Vec<(PathBuf, Vec<u8>)> = Vec::new();
    if let Some(dir) = &a.plot {
        let rejected: Vec<String> = data.rejected.iter().map(|r| r.to_string()).collect();
        files = draw(dir, &parsed, &stats, &results, &words, &warnings, &rejected)?;
    }
    if let Some(p) = &a.out {
        files.push((p.clone(), text.clone().into_bytes()));
    }
    let targets: Vec<&Path> = files.iter().map(|(p, _)| p.as_path()).collect();
    let mut set = OutputSet::begin(&targets, None, &inputs)?;
    for (p, bytes) in &files {
        set.write(p, bytes)?;
    }
    set.commit()?;
    if let Some(dir) = &a.plot {
        eprintln!("Drew {}", dir.display());
    }
    match &a.out {
        None => {
            std::io::stdout()
                .lock()
                .write_all(text.as_bytes())
                .map_err(|e| Error::io(Path::new("<stdout>"), e))?;
            eprint!(
                "{}",
                summary(&parsed, None, &stats, &warnings, &results, &data)
            );
        }
        Some(p) => print!(
            "{}",
            summary(&parsed, Some(p), &stats, &warnings, &results, &data)
        ),
    }
    Ok(Outcome::Done)
}

/// The rows left out, the first ten named.
fn report_rejected(data: &SectionData) {
    const SHOWN: usize = 10;
    for r in data.rejected.iter().take(SHOWN) {
        eprintln!("warning: row left out: {r}");
    }
    if data.rejected.len() > SHOWN {
        eprintln!(
            "warning: ... and {} more rows left out",
            data.rejected.len() - SHOWN
        );
    }
}

/// The pictures and the page for `dir`: (path, bytes) of each.
fn draw(
    dir: &Path,
    curve: &LimitCurve,
    stats: &[GeometryStats],
    results: &[SectionResult],
    words: &LabWords,
    warnings: &[String],
    rejected: &[String],
) -> Result<Vec<(PathBuf, Vec<u8>)>> {
    let io = |name: &str| {
        let path = dir.join(name);
        move |e: std::io::Error| Error::io(&path, e)
    };
    let mut files = vec![(
        dir.join("curve.svg"),
        pictures::curve_svg(curve, stats, results)
            .map_err(io("curve.svg"))?
            .into_bytes(),
    )];
    for g in stats {
        let file = format!("sections-{}.svg", safe_name(&g.geometry));
        let mine = pictures::of_geometry(results, &g.geometry);
        let svg = pictures::profiles_svg(&g.geometry, &mine).map_err(io(&file))?;
        files.push((dir.join(file), svg.into_bytes()));
    }
    let page = pictures::sections_page(&pictures::SectionsPage {
        curve,
        stats,
        results,
        words,
        warnings,
        rejected,
    })
    .map_err(io("sections.html"))?;
    files.push((dir.join("sections.html"), page.into_bytes()));
    Ok(files)
}

/// A geometry label as a file-name part: letters, digits, `.`, `-` and `_` kept, the rest `_`.
fn safe_name(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || "._-".contains(c) {
                c
            } else {
                '_'
            }
        })
        .collect()
}

/// What `from-sections` tells the user after writing the curve.
fn summary(
    c: &LimitCurve,
    path: Option<&Path>,
    stats: &[GeometryStats],
    warnings: &[String],
    results: &[SectionResult],
    data: &SectionData,
) -> String {
    let mut s = String::new();
    if let Some(path) = path {
        s.push_str(&format!(
            "Wrote {} ({} points, true strain): {}\n",
            path.display(),
            c.points.len(),
            c.name
        ));
    }
    let valid = results.iter().filter(|r| r.problems.is_empty()).count();
    s.push_str(&format!(
        "Sections: {} read ({} points, {} missing where the crack opened, {} rows rejected), \
         {valid} valid\n\n",
        results.len(),
        data.points,
        data.missing,
        data.rejected.len()
    ));
    s.push_str(&format!(
        "{:>10} {:>9} {:>8} {:>6} {:>6} {:>9} {:>6} {:>9} {:>6}\n",
        "geometry", "specimens", "sections", "valid", "used", "minor %", "s.d.", "major %", "s.d."
    ));
    for g in stats {
        if g.used > 0 {
            s.push_str(&format!(
                "{:>10} {:>9} {:>8} {:>6} {:>6} {:>9.2} {:>6.2} {:>9.2} {:>6.2}\n",
                g.geometry,
                g.specimens,
                g.sections,
                g.valid,
                g.used,
                100.0 * g.mean[0],
                100.0 * g.sd[0],
                100.0 * g.mean[1],
                100.0 * g.sd[1]
            ));
        } else {
            s.push_str(&format!(
                "{:>10} {:>9} {:>8} {:>6} {:>6} {:>9} {:>6} {:>9} {:>6}\n",
                g.geometry, g.specimens, g.sections, g.valid, 0, "-", "-", "-", "-"
            ));
        }
    }
    let plane = c.limit_major_eng(TrueStrain(0.0)).map_or_else(
        || "not covered (no geometry on each side of plane strain)".into(),
        |e| format!("{:.2} % engineering major strain", e.percent()),
    );
    s.push_str(&format!(
        "\nPlane-strain limit (FLC0), read on the curve: {plane}\nWarnings: {}\n\n",
        warnings.len()
    ));
    s.push_str(&paragraph(&format!("A {LAB_CURVE_WORDS}.")));
    s.push_str(&paragraph(CAUTION));
    s
}
