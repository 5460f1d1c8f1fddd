//! The comparison for people, in the terminal: what got better, what got worse, what is at
//! risk now, which locations were measured in one tryout only.

use crate::terminal::{wrap, WIDTH};
use neckline_core::assess::Zone;
use neckline_core::compare::{count, Change, Comparison, Matching, Status, Track};
use neckline_core::output::fmt_opt;
use neckline_core::CAUTION;
use std::fmt::Write as _;

/// The whole text; lists hold at most `show` entries.
pub fn summary(c: &Comparison, show: usize) -> String {
    let mut s = String::new();
    let (b, a) = c.labels();
    let n = c.tryouts.len();
    for (k, t) in c.tryouts.iter().enumerate() {
        let _ = writeln!(
            s,
            "{:<8}{}  ({}, verdict {})",
            format!("{}:", ordinal(k, n)),
            t.label,
            t.path.display(),
            c.verdict(k)
        );
    }
    if n > 2 {
        let _ = writeln!(s, "The lists compare the last two: {b} with {a}.");
    }
    let how = match c.matching {
        Matching::Id => "Paired by id".to_string(),
        Matching::Xy { within } => format!("Paired by position (within {within})"),
    };
    let line = format!(
        "{how}: {} in both; {} only in {b}, {} only in {a}{}",
        count(c.status_count(Status::Both), "location"),
        c.status_count(Status::OnlyBefore),
        c.status_count(Status::OnlyAfter),
        match c.status_count(Status::OnlyEarlier) {
            0 => String::new(),
            e => format!(", {e} only in earlier tryouts"),
        }
    );
    s.push_str(&wrap(&line, WIDTH, ""));
    let _ = writeln!(
        s,
        "Margin change beyond ±{} pp: {} improved, {} worsened, {} unchanged",
        c.tolerance,
        c.change_count(Change::Improved),
        c.change_count(Change::Worsened),
        c.change_count(Change::Unchanged)
    );
    transition_table(&mut s, c);
    let risk = c.newly_at_risk();
    let n = &c.counts;
    heading(&mut s, n.newly_at_risk, "newly failed or marginal");
    zone_list(&mut s, &risk, n.newly_at_risk, show);
    let fixed = c.fixed();
    heading(&mut s, n.fixed, "no longer failed or marginal");
    zone_list(&mut s, &fixed, n.fixed, show);
    let losses = c.losses();
    change_table(&mut s, "Largest margin losses", &losses, n.losses, show);
    change_table(&mut s, "Largest margin gains", &c.gains(), n.gains, show);
    for (status, label) in [
        (Status::OnlyBefore, b),
        (Status::OnlyAfter, a),
        (Status::OnlyEarlier, "earlier tryouts"),
    ] {
        one_sided(&mut s, c, status, label, show);
    }
    let _ = writeln!(s);
    s.push_str(&wrap(CAUTION, WIDTH, ""));
    s
}

fn ordinal(k: usize, n: usize) -> String {
    match (n, k) {
        (2, 0) => "Before".into(),
        (2, _) => "After".into(),
        _ => format!("#{}", k + 1),
    }
}

fn transition_table(s: &mut String, c: &Comparison) {
    let (b, a) = c.labels();
    let _ = writeln!(s, "\nZones (rows: {b}, columns: {a}):");
    let _ = write!(s, "  {:<12}", "");
    for short in [
        "failed", "marginal", "uncov.", "thicken.", "low-str.", "safe",
    ] {
        let _ = write!(s, "{short:>10}");
    }
    let _ = writeln!(s);
    for from in Zone::ALL {
        let _ = write!(s, "  {:<12}", from.name());
        for to in Zone::ALL {
            let _ = write!(s, "{:>10}", c.transitions(from, to));
        }
        let _ = writeln!(s);
    }
}

fn heading(s: &mut String, n: usize, what: &str) {
    let _ = writeln!(s, "\n{} {what}", count(n, "location"));
}

fn more(s: &mut String, total: usize, show: usize) {
    if total > show {
        let _ = writeln!(
            s,
            "  ... and {} more (raise --show, or see compare.csv)",
            total - show
        );
    }
}

fn zone_list(s: &mut String, v: &[&Track], total: usize, show: usize) {
    for t in v.iter().take(show) {
        let (zb, za) = t.zones().unwrap_or((Zone::Safe, Zone::Safe));
        let _ = writeln!(
            s,
            "  {:<14}{:>10} -> {:<10}  margin {} -> {} pp",
            t.name(),
            zb.name(),
            za.name(),
            fmt_opt(t.before().and_then(|r| r.margin_pct), 1),
            fmt_opt(t.after().and_then(|r| r.margin_pct), 1),
        );
    }
    more(s, total, show);
}

fn change_table(s: &mut String, title: &str, v: &[&Track], total: usize, show: usize) {
    if v.is_empty() {
        return;
    }
    let _ = writeln!(s, "\n{title} (percentage points):");
    let _ = writeln!(
        s,
        "  {:<14}{:>10}{:>10}{:>9}  zone",
        "id", "before", "after", "change"
    );
    for t in v.iter().take(show) {
        let (zb, za) = t.zones().unwrap_or((Zone::Safe, Zone::Safe));
        let _ = writeln!(
            s,
            "  {:<14}{:>10}{:>10}{:>9}  {} -> {}",
            t.name(),
            fmt_opt(t.before().and_then(|r| r.margin_pct), 1),
            fmt_opt(t.after().and_then(|r| r.margin_pct), 1),
            t.margin_change()
                .map_or_else(String::new, |d| format!("{d:+.1}")),
            zb,
            za
        );
    }
    more(s, total, show);
}

fn one_sided(s: &mut String, c: &Comparison, status: Status, label: &str, show: usize) {
    let v = c.with_status(status);
    let total = c.status_count(status);
    if v.is_empty() {
        return;
    }
    let names: Vec<String> = v
        .iter()
        .take(show)
        .map(|t| {
            let r = neckline_core::compare::csv_out::latest(t);
            format!("{} ({})", t.name(), r.zone)
        })
        .collect();
    let rest = if total > show {
        format!(", ... and {} more", total - show)
    } else {
        String::new()
    };
    let line = format!(
        "Only in {label} ({}): {}{rest}",
        count(total, "location"),
        names.join(", ")
    );
    s.push('\n');
    s.push_str(&wrap(&line, WIDTH, "  "));
}
