//! The short summary for people, fitted to 80 columns. Colour (plain ANSI SGR codes) only when
//! the stream is a terminal and `NO_COLOR` is unset or empty (no-color.org convention).

use crate::analysis::{Analysis, Verdict, CAUTION};
use crate::assess::Zone;
use crate::output::fmt_opt;
use std::fmt::Write as _;

/// Width the summary fits in, columns.
pub const WIDTH: usize = 80;

/// Whether to colour a stream: it is a terminal and `NO_COLOR` is unset or empty.
pub fn use_colour(is_terminal: bool) -> bool {
    is_terminal && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

/// ANSI SGR code of a zone: red, yellow, magenta, blue, cyan, green.
fn zone_sgr(z: Zone) -> &'static str {
    match z {
        Zone::Failed => "1;31",
        Zone::Marginal => "1;33",
        Zone::Uncovered => "35",
        Zone::Thickening => "34",
        Zone::LowStretch => "36",
        Zone::Safe => "32",
    }
}

fn verdict_sgr(v: Verdict) -> &'static str {
    match v {
        Verdict::Fail => "1;37;41",
        Verdict::Marginal => "1;30;43",
        Verdict::Incomplete => "1;37;45",
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
            // A zone name at the end of a worst-table row or at the start of a count row.
            for z in Zone::ALL {
                let name = z.name();
                if let Some(head) = l.strip_suffix(name).filter(|h| h.ends_with("  ")) {
                    return format!("{head}{}", paint(name, zone_sgr(z), true));
                }
                if let Some(tail) = l.strip_prefix(&format!("  {name} ")) {
                    return format!("  {} {tail}", paint(name, zone_sgr(z), true));
                }
            }
            l.to_string()
        })
        .map(|l| l + "\n")
        .collect()
}

/// `n` and the noun, singular for one: "1 location", "3 locations".
pub fn count_of(n: usize, noun: &str) -> String {
    if n == 1 {
        format!("1 {noun}")
    } else {
        format!("{n} {noun}s")
    }
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

fn clip(s: &str, n: usize) -> String {
    if s.chars().count() <= n {
        s.to_string()
    } else {
        let mut c: String = s.chars().take(n.saturating_sub(1)).collect();
        c.push('~');
        c
    }
}

/// The summary text (no colour).
pub fn summary_text(a: &Analysis) -> String {
    let mut s = String::new();
    let job = &a.job;
    let field = |v: &Option<String>| v.clone().unwrap_or_else(|| "-".into());
    let version = format!("neckline {} | ", env!("CARGO_PKG_VERSION"));
    let input = clip(&a.input.display().to_string(), WIDTH - version.len());
    let _ = writeln!(s, "{version}{input}");
    let _ = writeln!(
        s,
        "Part: {}   Tryout: {}",
        clip(&field(&job.part), 45),
        clip(&field(&job.tryout), 14)
    );
    if job.material.is_some() || job.lot.is_some() {
        let _ = writeln!(
            s,
            "Material: {}   Lot: {}",
            clip(&field(&job.material), 40),
            clip(&field(&job.lot), 22)
        );
    }
    let _ = writeln!(
        s,
        "Limit curve: {} ({} strain)",
        clip(&a.curve.name, 45),
        a.curve.measure
    );
    s.push_str(&wrap(&format!("Source: {}", a.curve.source), 80, "  "));
    let st = &a.settings;
    let _ = writeln!(
        s,
        "Settings: safety band {:.1} pp, low stretch < {:.1} %, max thinning {}",
        st.margin_pct,
        st.low_stretch_pct,
        st.max_thinning_pct
            .map_or("not checked".into(), |t| format!("{t:.1} %"))
    );
    let len = |v: Option<f64>| {
        v.map_or_else(
            || "-".to_string(),
            |x| {
                let t = format!("{x:.4}");
                t.trim_end_matches('0').trim_end_matches('.').to_string()
            },
        )
    };
    let l = &a.lengths;
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
    if a.strain_input {
        let _ = writeln!(s, "Strains read from the file (no circle axes, no d0)");
    }
    for (zone, n) in a.counts() {
        let _ = writeln!(s, "  {:<12}{n:>6}", zone.name());
    }
    let worst = a.worst(WORST_SHOWN);
    if !worst.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "Worst locations (margin = curve minus major strain, eng. %):"
        );
        let _ = writeln!(
            s,
            "  {:<14}{:>9}{:>9}{:>10}{:>9}{:>9}  zone",
            "id", "major %", "minor %", "margin pp", "use %", "thin %"
        );
        for p in worst {
            let _ = writeln!(
                s,
                "  {:<14}{:>9.1}{:>9.1}{:>10}{:>9}{:>9.1}  {}",
                clip(&p.input.id, 13),
                p.strain.eng.major.percent(),
                p.strain.eng.minor.percent(),
                fmt_opt(p.judgement.margin_pct, 1),
                fmt_opt(p.judgement.limit_use_pct, 0),
                p.strain.thinning * 100.0,
                p.zone()
            );
        }
    }
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
    for note in crate::output::notes(a) {
        s.push_str(&wrap(&note, 80, ""));
    }
    for w in &a.warnings {
        s.push_str(&wrap(&format!("warning: {w}"), 80, ""));
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Verdict: {}", a.verdict().name().to_uppercase());
    if let Some(w) = crate::output::curve_warning(a) {
        s.push_str(&wrap(&w, 80, ""));
    }
    s.push_str(&wrap(CAUTION, 80, ""));
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::output::fixture;

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
        for line in summary_text(&a).lines() {
            assert!(
                line.chars().count() <= WIDTH,
                "{} columns: {line}",
                line.chars().count()
            );
        }
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
