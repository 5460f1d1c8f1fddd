//! The short summary for people, fitted to 80 columns.

use crate::analysis::{Analysis, CAUTION};
use crate::output::fmt_opt;
use std::fmt::Write as _;

/// How many worst locations the summary lists.
pub const WORST_SHOWN: usize = 8;

fn wrap(text: &str, width: usize, indent: &str) -> String {
    let mut out = String::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.len() + 1 + word.len() > width - indent.len() {
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
    let _ = writeln!(
        s,
        "neckline {} | {}",
        env!("CARGO_PKG_VERSION"),
        a.input.display()
    );
    let _ = writeln!(
        s,
        "Part: {}   Tryout: {}",
        clip(&field(&job.part), 40),
        field(&job.tryout)
    );
    if job.material.is_some() || job.lot.is_some() {
        let _ = writeln!(
            s,
            "Material: {}   Lot: {}",
            field(&job.material),
            field(&job.lot)
        );
    }
    let _ = writeln!(
        s,
        "Limit curve: {} ({} strain)",
        a.curve.name, a.curve.measure
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
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{} locations judged, {} rows rejected",
        a.points.len(),
        a.rejected.len()
    );
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
    if !a.rejected.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(s, "Rejected rows (not judged):");
        for r in a.rejected.iter().take(20) {
            // One line each, unwrapped, so that `file:line:col` can be grepped and clicked.
            let _ = writeln!(s, "  {r}");
        }
        if a.rejected.len() > 20 {
            let _ = writeln!(
                s,
                "  ... and {} more (see summary.json)",
                a.rejected.len() - 20
            );
        }
    }
    for w in &a.warnings {
        s.push_str(&wrap(&format!("warning: {w}"), 80, ""));
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Verdict: {}", a.verdict().name().to_uppercase());
    s.push_str(&wrap(CAUTION, 80, ""));
    s
}
