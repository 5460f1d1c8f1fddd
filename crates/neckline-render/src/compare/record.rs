//! What makes compare.html a record a tooling review signs: the report's number, revision,
//! generation time and the SHA-256 of every input, the sign-off block, and the "still at risk"
//! list of every location failed or marginal in the later tryout. Also the labels the two
//! pictures share (largest gains and losses, every newly failed or marginal location).

use super::fld::change_colour;
use crate::page::Badges;
use crate::plot::hex;
use maud::{html, Markup};
use neckline_core::compare::record::Record;
use neckline_core::compare::{Change, Comparison, Status, Track};
use neckline_core::output::fmt_opt;
use neckline_core::output::record::normalise;
use plotters::style::RGBColor;

/// A picture's label of a location: its id and margin change ("L10 (+15.9)"), or "(new)" for
/// one measured only in the last tryout; with the colour of its change.
pub fn label(t: &Track, tolerance: f64) -> (String, RGBColor) {
    let text = match (t.status(), t.margin_change()) {
        (Status::OnlyAfter, _) => format!("{} (new)", t.name()),
        (_, Some(d)) => format!("{} ({d:+.1})", t.name()),
        (_, None) => t.name(),
    };
    let colour = match t.change(tolerance) {
        Some(Change::Unchanged) | None => RGBColor(60, 60, 60),
        c => change_colour(c),
    };
    (text, colour)
}

/// The record block: number, revision, generation time, inputs with their SHA-256.
pub fn record_block(r: &Record) -> Markup {
    html! {
        table.job {
            tr { th { "Report" } td { (r.report_id) ", revision " (r.revision) } }
            tr { th { "Generated" } td { (r.generated.text()) } }
        }
        table.digests {
            thead { tr { th { "input" } th { "file" } th { "SHA-256" } } }
            tbody {
                @for d in &r.inputs {
                    tr {
                        td { (d.role) }
                        td { code { (normalise(&d.path).display().to_string()) } }
                        td { code { (d.sha256) } }
                    }
                }
            }
        }
    }
}

/// The sign-off block.
pub fn signoff(r: &Record) -> Markup {
    html! {
        div.keep {
            h3 { "Sign-off" }
            table.signoff {
                thead { tr { th { "" } th { "Name" } th { "Signature" } th { "Date" } } }
                tbody {
                    @for (role, name) in [("Prepared", &r.prepared_by), ("Checked", &r.checked_by), ("Approved", &r.approved_by)] {
                        tr { th { (role) } td { (name.as_deref().unwrap_or("")) } td {} td {} }
                    }
                }
            }
        }
    }
}

/// How a location still at risk got there: new, worse, unchanged, better, only now.
fn how(c: &Comparison, t: &Track) -> &'static str {
    match (t.status(), t.zones()) {
        (Status::OnlyAfter, _) => "measured only now",
        (_, Some((b, a))) if a < b => "newly at risk",
        (_, Some((b, a))) if a > b => "better zone",
        _ => match t.change(c.tolerance) {
            Some(Change::Improved) => "same zone, margin up",
            Some(Change::Worsened) => "same zone, margin down",
            _ => "unchanged",
        },
    }
}

fn risk_table(c: &Comparison, v: &[&Track], bd: &Badges) -> Markup {
    html! {
        table {
            thead { tr {
                th { "location" } th { "zone before" } th { "zone now" } th { "how" }
                th.n { "margin before, pp" } th.n { "margin now, pp" } th.n { "change, pp" }
                th.n { "x" } th.n { "y" }
            } }
            tbody {
                @for t in v {
                    @let (b, a) = (t.before(), t.after());
                    tr {
                        td { (t.name()) }
                        td { (bd.maybe(b.map(|r| r.zone))) }
                        td { (bd.maybe(a.map(|r| r.zone))) }
                        td { (how(c, t)) }
                        td.n { (fmt_opt(b.and_then(|r| r.margin_pct), 1)) }
                        td.n { (fmt_opt(a.and_then(|r| r.margin_pct), 1)) }
                        td class="n chg" style=(format!("color:{}", hex(change_colour(t.change(c.tolerance))))) {
                            (t.margin_change().map_or_else(String::new, |d| format!("{d:+.1}")))
                        }
                        td.n { (fmt_opt(a.and_then(|r| r.x), 1)) }
                        td.n { (fmt_opt(a.and_then(|r| r.y), 1)) }
                    }
                }
            }
        }
    }
}

/// "Still at risk": every location failed or marginal in the later tryout (new, unchanged and
/// improved alike), then the fixed ones; an empty list is one line.
pub fn at_risk_section(c: &Comparison, bd: &Badges) -> Markup {
    let (b, a) = c.labels();
    let still = c.still_at_risk();
    let fixed = c.fixed();
    html! {
        h2 { "Still at risk" }
        h3 { "Failed or marginal in " (a) " (" (c.counts.still_at_risk) ")" }
        @if still.is_empty() {
            p.note { "No location is failed or marginal in " (a) "." }
        } @else {
            p.note { "Every location failed or marginal in " (a) ", whatever it was in " (b) ": failed first, then by margin." }
            (risk_table(c, &still, bd))
            (rest_note(still.len(), c.counts.still_at_risk))
        }
        h3 { "Fixed: failed or marginal in " (b) ", neither in " (a) " (" (c.counts.fixed) ")" }
        @if fixed.is_empty() {
            p.note { "No location left the failed and marginal zones." }
        } @else {
            (risk_table(c, &fixed, bd))
            (rest_note(fixed.len(), c.counts.fixed))
        }
    }
}

/// Under a list that holds the first `shown` of `total`: how many more there are and where
/// every one is (nothing when the list is whole).
pub fn rest_note(shown: usize, total: usize) -> Markup {
    html! {
        @if total > shown {
            p.note { "The first " (shown) " are listed; " (total - shown) " more are in compare.csv (one row for every location)." }
        }
    }
}

/// The one-tryout-only lists as one line when there are none (a page otherwise).
pub fn one_sided_empty(c: &Comparison) -> Option<Markup> {
    let (b, a) = c.labels();
    let none = [Status::OnlyBefore, Status::OnlyAfter, Status::OnlyEarlier]
        .iter()
        .all(|s| c.status_count(*s) == 0);
    none.then(|| {
        html! {
            p.note { "Every location of " (b) " was measured in " (a) " and the other way round." }
        }
    })
}
