//! The short summary for people, fitted to 80 columns. Colour (plain ANSI SGR codes) only when
//! the stream is a terminal and `NO_COLOR` is unset or empty (no-color.org convention).

use neckline_core::analysis::{Analysis, Verdict};
use neckline_core::assess::Zone;
use neckline_core::output::{count_of, fmt_length, fmt_setting, reason_text};
use neckline_core::CAUTION;
use std::fmt::Write as _;

/// Width the summary fits in, columns.
pub const WIDTH: usize = 80;

/// Whether to colour a stream: it is a terminal and `NO_COLOR` is unset or empty.
pub fn use_colour(is_terminal: bool) -> bool {
    is_terminal && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

/// ANSI SGR code of a zone, after neckline's zone code (README): red for failed, yellow for
/// marginal, green for safe (the meanings of ISO 3864-1's safety colours), grey for
/// uncovered, plain text for the neutral thickening and low-stretch.
fn zone_sgr(z: Zone) -> &'static str {
    match z {
        Zone::Failed => "1;31",
        Zone::Marginal => "1;33",
        Zone::Uncovered => "90",
        Zone::Thickening => "1",
        Zone::LowStretch => "1",
        Zone::Safe => "32",
    }
}

fn verdict_sgr(v: Verdict) -> &'static str {
    match v {
        Verdict::Fail => "1;37;41",
        Verdict::Marginal => "1;30;43",
        Verdict::Incomplete => "1;30;47",
        Verdict::Pass => "1;37;42",
    }
}

fn paint(s: &str, sgr: &str, colour: bool) -> String {
    if colour {
        format!("\x1b[{sgr}m{s}\x1b[0m")
    } else {
        s.to_string()
    }
}

/// The summary, coloured when `colour` is true; the visible text is [`summary_text`].
pub fn summary(a: &Analysis, colour: bool) -> String {
    if !colour {
        return summary_text(a);
    }
    let verdict = a.verdict();
    let verdict_line = format!("Verdict: {}", verdict.name().to_uppercase());
    summary_text(a)
        .lines()
        .map(|l| {
            if l == verdict_line {
                return paint(l, verdict_sgr(verdict), true);
            }
            // A zone name at the start of a count row, or between two-space gaps in a
            // worst-table row.
            for z in Zone::ALL {
                let name = z.name();
                if let Some(tail) = l.strip_prefix(&format!("  {name} ")) {
                    return format!("  {} {tail}", paint(name, zone_sgr(z), true));
                }
                if l.starts_with(WORST_ROW_MARK) {
                    if let Some(at) = l.find(&format!("  {name}  ")) {
                        let (head, tail) = l.split_at(at + 2);
                        let tail = &tail[name.len()..];
                        return format!("{head}{}{tail}", paint(name, zone_sgr(z), true));
                    }
                }
            }
            l.to_string()
        })
        .map(|l| l + "\n")
        .collect()
}

/// How many worst locations the summary lists.
pub const WORST_SHOWN: usize = 8;

/// Wrap `text` at word boundaries to `width` columns, each line starting with `indent`.
pub fn wrap(text: &str, width: usize, indent: &str) -> String {
    let mut out = String::new();
    let mut line = String::new();
    let room = width - indent.len();
    // A word longer than a line is cut into line-long pieces.
    let pieces = text.split_whitespace().flat_map(|w| {
        let chars: Vec<char> = w.chars().collect();
        chars
            .chunks(room)
            .map(|c| c.iter().collect::<String>())
            .collect::<Vec<_>>()
    });
    for word in pieces {
        let word = word.as_str();
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > room {
            let _ = writeln!(out, "{indent}{line}");
            line.clear();
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        let _ = writeln!(out, "{indent}{line}");
    }
    out
}

/// Wrap `text` to `width` columns: the first line as it is, the next ones indented by
/// `hang` (a long name is wrapped, never cut short).
pub fn wrap_hanging(text: &str, width: usize, hang: &str) -> String {
    if text.chars().count() <= width && !text.contains('\n') {
        return format!("{text}\n");
    }
    let first = wrap(text, width, "");
    let mut lines = first.lines();
    let Some(head) = lines.next() else {
        return String::new();
    };
    let rest: Vec<&str> = lines.collect();
    let mut out = format!("{head}\n");
    if !rest.is_empty() {
        out.push_str(&wrap(&rest.join(" "), width, hang));
    }
    out
}

/// Rows of the worst table start with this (so that colour finds them).
const WORST_ROW_MARK: &str = "  ";

/// The summary text (no colour).
pub fn summary_text(a: &Analysis) -> String {
    let mut s = String::new();
    let job = &a.job;
    let field = |v: &Option<String>| v.clone().unwrap_or_else(|| "-".into());
    let hang = |t: String| wrap_hanging(&t, WIDTH, "    ");
    s.push_str(&hang(format!(
        "neckline {} | {}",
        env!("CARGO_PKG_VERSION"),
        a.input.display()
    )));
    s.push_str(&hang(format!(
        "Part: {}   Tryout: {}",
        field(&job.part),
        field(&job.tryout)
    )));
    if job.material.is_some() || job.lot.is_some() {
        s.push_str(&hang(format!(
            "Material: {}   Lot: {}",
            field(&job.material),
            field(&job.lot)
        )));
    }
    if job.report_id.is_some() || job.revision.is_some() {
        s.push_str(&hang(format!(
            "Report: {}   Revision: {}",
            field(&job.report_id),
            field(&job.revision)
        )));
    }
    s.push_str(&hang(format!(
        "Limit curve: {} ({} strain)",
        a.curve.name, a.curve.measure
    )));
    s.push_str(&wrap(&format!("Source: {}", a.curve.source), WIDTH, "  "));
    s.push_str(&hang(settings_line(a)));
    let l = &a.lengths;
    let len = |v: Option<f64>| v.map_or_else(|| "-".to_string(), |x| fmt_length(x, l.unit));
    let _ = writeln!(
        s,
        "Lengths in {}: d0 {}{}, t0 {}",
        l.unit.plural(),
        len(l.d0),
        match a.summary.d0_range {
            Some((lo, hi)) if Some(lo) != l.d0 || Some(hi) != l.d0 => " (or per row)",
            _ => "",
        },
        len(l.t0)
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{} judged, {} rejected",
        count_of(a.total(), "location"),
        count_of(a.rejected_total(), "row")
    );
    if let Some(line) = neckline_core::output::not_measured_line(a) {
        let _ = writeln!(s, "{line}");
    }
    if a.strain_input {
        let _ = writeln!(s, "Strains read from the file (no circle axes, no d0)");
    }
    for (zone, n) in a.counts() {
        let _ = writeln!(s, "  {:<12}{n:>6}", zone.name());
    }
    worst_table(&mut s, a);
    hot_spot_lines(&mut s, a);
    if a.rejected_total() > 0 {
        let _ = writeln!(s);
        let _ = writeln!(s, "Rejected rows (not judged):");
        for r in a.rejected().iter().take(20) {
            // One line each, unwrapped, so that `file:line:col` can be grepped and clicked.
            let _ = writeln!(s, "  {r}");
        }
        if a.rejected_total() > 20 {
            let _ = writeln!(
                s,
                "  ... and {} more (see summary.json)",
                a.rejected_total() - 20
            );
        }
    }
    for note in neckline_core::output::notes(a) {
        s.push_str(&wrap(&note.text, WIDTH, ""));
        if !note.ids.is_empty() {
            let more = if note.more { ", ..." } else { "" };
            s.push_str(&wrap(
                &format!("{}{more}", note.ids.join(", ")),
                WIDTH,
                "  ",
            ));
        }
    }
    for w in &a.warnings {
        s.push_str(&wrap(&format!("warning: {w}"), WIDTH, ""));
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Verdict: {}", a.verdict().name().to_uppercase());
    if let Some(w) = neckline_core::output::curve_warning(a) {
        s.push_str(&wrap(&w, WIDTH, ""));
    }
    s.push_str(&wrap(CAUTION, WIDTH, ""));
    s
}

/// Hot spots listed at most, in the terminal and the report.
pub const HOT_SPOTS_LISTED: usize = 8;

/// The hot spots as the map draws them, and the area unit's name ("mm²").
pub fn hot_spots(a: &Analysis) -> (Vec<neckline_core::hotspot::HotSpot>, String) {
    let spots = if a.summary.placed > 0 {
        neckline_core::hotspot::hot_spots(a, crate::map::RASTER_CELLS)
    } else {
        Vec::new()
    };
    let unit = match a.lengths.unit {
        neckline_core::units::LengthUnit::Mm => "mm²",
        neckline_core::units::LengthUnit::In => "in²",
    };
    (spots, unit.to_string())
}

/// The count of hot spots by zone in words: "4 failed, 3 marginal".
pub fn hot_spot_counts(spots: &[neckline_core::hotspot::HotSpot]) -> String {
    let n = |z: Zone| spots.iter().filter(|s| s.zone == z).count();
    format!("{} failed, {} marginal", n(Zone::Failed), n(Zone::Marginal))
}

fn hot_spot_lines(s: &mut String, a: &Analysis) {
    let (spots, unit) = hot_spots(a);
    if spots.is_empty() {
        return;
    }
    let _ = writeln!(s);
    s.push_str(&wrap(
        &format!(
            "Hot spots (connected failed or marginal locations, largest first): {}",
            hot_spot_counts(&spots)
        ),
        WIDTH,
        "",
    ));
    let _ = writeln!(
        s,
        "  {:>2}  {:<10} {:<12} {:>9} {:>10}",
        "#",
        "zone",
        "worst",
        "locations",
        format!("area {unit}")
    );
    for (k, h) in spots.iter().take(HOT_SPOTS_LISTED).enumerate() {
        let worst = h
            .worst
            .as_ref()
            .map_or_else(|| "-".to_string(), |w| w.input.id.clone());
        let _ = writeln!(
            s,
            "  {:>2}  {:<10} {:<12} {:>9} {:>10.0}",
            k + 1,
            h.zone.name(),
            worst,
            h.locations,
            h.area
        );
    }
    if spots.len() > HOT_SPOTS_LISTED {
        let _ = writeln!(s, "  ... and {} more", spots.len() - HOT_SPOTS_LISTED);
    }
}

/// The settings in one sentence.
pub fn settings_line(a: &Analysis) -> String {
    let st = &a.settings;
    format!(
        "Settings: safety band {} pp, low stretch < {} %, thickening from {} %, max thinning {}",
        fmt_setting(st.margin_pct),
        fmt_setting(st.low_stretch_pct),
        fmt_setting(st.thickening_pct),
        st.max_thinning_pct
            .map_or("not checked".into(), |t| format!("{} %", fmt_setting(t)))
    )
}

/// Width of the id column of the worst table; a longer id takes a line of its own.
const ID_WIDTH: usize = 12;

fn worst_table(s: &mut String, a: &Analysis) {
    let worst = a.worst(WORST_SHOWN);
    if worst.is_empty() {
        return;
    }
    let _ = writeln!(s);
    s.push_str(&wrap(
        "Worst locations, failed first, then by margin (margin = curve minus major strain, \
         pp of engineering strain):",
        WIDTH,
        "",
    ));
    let _ = writeln!(
        s,
        "  {:<ID_WIDTH$}{:>8}{:>8}{:>8}  {:<11}  why",
        "id", "major %", "minor %", "thin %", "zone"
    );
    for p in worst {
        let id = &p.input.id;
        let shown_id = if id.chars().count() > ID_WIDTH - 1 {
            s.push_str(&wrap(id, WIDTH, "  "));
            ""
        } else {
            id.as_str()
        };
        let _ = writeln!(
            s,
            "{WORST_ROW_MARK}{:<ID_WIDTH$}{:>8.1}{:>8.1}{:>8.1}  {:<11}  {}",
            shown_id,
            p.strain.eng.major.percent(),
            p.strain.eng.minor.percent(),
            p.strain.thinning * 100.0,
            p.zone().name(),
            reason_text(p, &a.settings)
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use neckline_core::output::fixture;

    #[test]
    fn summary_snapshot() {
        let a = fixture::analysis(true);
        let text = summary_text(&a).replace(env!("CARGO_PKG_VERSION"), "VERSION");
        insta::assert_snapshot!(text);
    }

    #[test]
    fn fits_80_columns_with_long_names() {
        let mut a = fixture::analysis(true);
        let long = "x".repeat(200);
        a.input = std::path::PathBuf::from(format!("/very/{long}/tryout.csv"));
        a.job.part = Some(long.clone());
        a.job.tryout = Some(long.clone());
        a.job.material = Some(long.clone());
        a.job.lot = Some(long.clone());
        a.curve.name = long.clone();
        a.curve.source = format!("{long} {long}");
        a.warnings
            .push(format!("a warning with a long word {long}"));
        let text = summary_text(&a);
        for line in text.lines() {
            assert!(
                line.chars().count() <= WIDTH,
                "{} columns: {line}",
                line.chars().count()
            );
        }
        // Wrapped, never cut short: every character of the long name is there.
        let joined: String = text.chars().filter(|c| !c.is_whitespace()).collect();
        assert!(joined.contains(&format!("Part:{long}")), "{text}");
        assert!(!text.contains('~'));
    }

    #[test]
    fn plurals_and_indented_borderline_ids() {
        let mut a = fixture::analysis(true);
        a.settings.reading_error = Some(0.05);
        a.summary.borderline.push("M1".into());
        let text = summary_text(&a);
        assert!(text.contains("1 location:"), "{text}");
        assert!(text.contains("\n  M1\n"), "borderline ids indented: {text}");
        assert!(text.contains("0 rows rejected"));
    }

    #[test]
    fn colour_only_adds_escape_codes() {
        let a = fixture::analysis(true);
        let plain = summary(&a, false);
        let coloured = summary(&a, true);
        assert!(!plain.contains('\x1b'));
        assert!(coloured.contains("\x1b[1;37;41mVerdict: FAIL\x1b[0m"));
        let stripped = coloured
            .split('\x1b')
            .enumerate()
            .map(|(i, s)| {
                if i == 0 {
                    s
                } else {
                    &s[s.find('m').unwrap() + 1..]
                }
            })
            .collect::<String>();
        assert_eq!(stripped, plain);
    }

    #[test]
    fn no_colour_off_a_terminal() {
        assert!(!use_colour(false));
    }
}
