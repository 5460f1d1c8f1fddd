//! `neckline compare`: one tryout against the next, location by location.

use super::Outcome;
use crate::analysis::CAUTION;
use crate::assess::Zone;
use crate::compare::{compare, read_results, Comparison};
use crate::error::Result;
use crate::output::terminal::wrap;
use crate::output::{fmt_opt, write_atomic};
use clap::Args;
use std::fmt::Write as _;
use std::io::{self, Write};
use std::path::PathBuf;

/// Arguments of `compare`.
#[derive(Debug, Clone, Args)]
pub struct CompareArgs {
    /// points.csv of the earlier tryout (written by `check`).
    #[arg(value_name = "BEFORE.csv")]
    pub before: PathBuf,
    /// points.csv of the later tryout (written by `check`).
    #[arg(value_name = "AFTER.csv")]
    pub after: PathBuf,
    /// Write the change of every location to this CSV file (atomically).
    #[arg(long, value_name = "FILE.csv")]
    pub out: Option<PathBuf>,
    /// How many locations to list under each heading (newly at risk, largest margin losses).
    #[arg(long, value_name = "N", default_value_t = 8)]
    pub show: usize,
}

/// Run `compare`.
pub fn run(args: &CompareArgs) -> Result<Outcome> {
    let c = compare(read_results(&args.before)?, read_results(&args.after)?);
    for w in basis_differences(&args.before, &args.after) {
        eprintln!("warning: {w}");
    }
    if c.changes.is_empty() {
        eprintln!(
            "warning: the two files share no location id: nothing could be compared \
             (different grids, or ids renamed?)"
        );
    }
    if let Some(out) = &args.out {
        let inputs = [args.before.clone(), args.after.clone()];
        write_atomic(out, &inputs, |w| write_changes(&c, w))?;
    }
    print!("{}", summary_text(&c, args));
    if let Some(out) = &args.out {
        println!("Wrote {}", out.display());
    }
    Ok(Outcome::Done)
}

/// The curve and settings each result was judged with, from the `summary.json` that `check`
/// wrote beside its `points.csv` (when there is one).
fn basis(points: &std::path::Path) -> Option<serde_json::Value> {
    let summary = points.with_file_name("summary.json");
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(summary).ok()?).ok()?;
    Some(serde_json::json!({ "curve": v["limit"]["name"], "margin": v["settings"]["margin_pct"] }))
}

/// Differences between the curves or safety bands of two results: a change of margin would
/// then mix a change of judgement with a change of the part.
fn basis_differences(before: &std::path::Path, after: &std::path::Path) -> Vec<String> {
    let (Some(b), Some(a)) = (basis(before), basis(after)) else {
        return vec![
            "no summary.json beside both files: cannot confirm that both were judged \
                     with the same curve and safety band"
                .into(),
        ];
    };
    let mut out = Vec::new();
    if b["curve"] != a["curve"] {
        out.push(format!(
            "the curves differ: {} before, {} after",
            b["curve"], a["curve"]
        ));
    }
    if b["margin"] != a["margin"] {
        out.push(format!(
            "the safety bands differ: {} pp before, {} pp after",
            b["margin"], a["margin"]
        ));
    }
    out
}

fn summary_text(c: &Comparison, args: &CompareArgs) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "Before: {}", args.before.display());
    let _ = writeln!(s, "After:  {}", args.after.display());
    let _ = writeln!(
        s,
        "{} locations in both; {} only before, {} only after",
        c.changes.len(),
        c.only_before.len(),
        c.only_after.len()
    );
    let _ = writeln!(s, "\nZones (rows: before, columns: after):");
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
    let risk = c.newly_at_risk();
    let _ = writeln!(s, "\n{} locations newly failed or marginal", risk.len());
    for ch in risk.iter().take(args.show) {
        let _ = writeln!(
            s,
            "  {:<14}{} -> {}",
            ch.after.id, ch.before.zone, ch.after.zone
        );
    }
    if risk.len() > args.show {
        let _ = writeln!(
            s,
            "  ... and {} more (all are in --out)",
            risk.len() - args.show
        );
    }
    let losses = c.largest_losses(args.show);
    if !losses.is_empty() {
        let _ = writeln!(s, "Largest margin losses (percentage points):");
        let _ = writeln!(
            s,
            "  {:<14}{:>10}{:>10}{:>9}  zone",
            "id", "before", "after", "change"
        );
        for ch in losses {
            let _ = writeln!(
                s,
                "  {:<14}{:>10}{:>10}{:>9}  {} -> {}",
                ch.after.id,
                fmt_opt(ch.before.margin_pct, 1),
                fmt_opt(ch.after.margin_pct, 1),
                fmt_opt(ch.margin_change(), 1),
                ch.before.zone,
                ch.after.zone
            );
        }
    }
    let _ = writeln!(s);
    s.push_str(&wrap(CAUTION, 80, ""));
    s
}

fn write_changes(c: &Comparison, out: &mut dyn Write) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record([
        "id",
        "zone_before",
        "zone_after",
        "major_eng_pct_before",
        "major_eng_pct_after",
        "major_change_pct",
        "margin_pct_before",
        "margin_pct_after",
        "margin_change_pct",
    ])?;
    for ch in &c.changes {
        w.write_record([
            ch.after.id.clone(),
            ch.before.zone.to_string(),
            ch.after.zone.to_string(),
            format!("{:.3}", ch.before.major_pct),
            format!("{:.3}", ch.after.major_pct),
            format!("{:.3}", ch.major_change()),
            fmt_opt(ch.before.margin_pct, 3),
            fmt_opt(ch.after.margin_pct, 3),
            fmt_opt(ch.margin_change(), 3),
        ])?;
    }
    w.flush()
}
