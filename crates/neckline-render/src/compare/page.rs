//! `compare.html`: the review page. Built with `maud` in the shared layout and stylesheet of
//! [`crate::page`] (every inserted text escaped): one self-contained, printable file,
//! inline CSS and SVG only, no script, nothing fetched. Each section starts on a new printed
//! page, with the running header and "page N of M"; the paper size is the printer's.

use super::fld::{change_colour, fld_svg, LABELLED, LABELS_AT_SCALE};
use super::map::map_svg;
use super::record;
use crate::page::{self, Badges};
use crate::plot::hex;
use maud::{html, Markup};
use neckline_core::assess::Zone;
use neckline_core::compare::record::Record;
use neckline_core::compare::{count, Change, Comparison, Matching, Status, Track};
use neckline_core::output::fmt_opt;
use std::io;

/// Rows in the tables of losses and gains.
pub const TABLE_ROWS: usize = 15;

fn text(v: &Option<String>) -> String {
    v.clone().unwrap_or_else(|| "—".into())
}

fn header(c: &Comparison) -> Markup {
    let last = c
        .tryouts
        .last()
        .and_then(|t| t.summary.clone())
        .unwrap_or_default();
    let curves: Vec<String> = c
        .tryouts
        .iter()
        .map(|t| {
            t.summary
                .as_ref()
                .and_then(|s| s.curve.clone())
                .unwrap_or_else(|| "not recorded".into())
        })
        .collect();
    let mut distinct = curves.clone();
    distinct.dedup();
    let band = last.band.map_or_else(
        || "not recorded".into(),
        |b| format!("{b:.1} percentage points"),
    );
    let how = match c.matching {
        Matching::Id => "by location id".to_string(),
        Matching::Xy { within } => format!(
            "by position: nearest x, y within {within} {}, one to one, closest first",
            last.unit.clone().unwrap_or_default()
        ),
    };
    html! {
        h1 { "Tryout comparison: " (last.part.clone().unwrap_or_else(|| "(part not named)".into())) }
        table.job {
            tr { th { "Part" } td { (text(&last.part)) } }
            tr { th { "Die" } td { (text(&last.die)) } }
            tr { th { "Material" } td { (text(&last.material)) } }
            @for (k, t) in c.tryouts.iter().enumerate() {
                @let sm = t.summary.clone().unwrap_or_default();
                tr {
                    th { "Tryout " (k + 1) }
                    td {
                        b { (t.label) }
                        @if let Some(d) = &sm.date { ", measured " (d) }
                        @if let (Some(p), Some(l)) = (&sm.part, &last.part) { @if p != l { ", part " (p) } }
                        " — " code { (t.path.display().to_string()) }
                    }
                }
            }
            tr { th { "Limit curve" } td { (distinct.join(" / ")) } }
            tr { th { "Safety band" } td { (band) } }
            tr { th { "Locations paired" } td { (how) } }
            tr { th { "Tolerance" } td {
                "±" (c.tolerance) " percentage points of margin (of major strain where a margin is missing): a smaller change counts as unchanged"
            } }
        }
    }
}

fn verdicts(c: &Comparison) -> Markup {
    let (b, a) = c.labels();
    html! {
        h2 { "Verdict" }
        div.verdicts {
            @for (k, t) in c.tryouts.iter().enumerate() {
                @if k > 0 { span { "→" } }
                @let v = c.verdict(k);
                span class=(format!("verdict v-{v}")) { (t.label) ": " (v.to_uppercase()) }
            }
        }
        p {
            (count(c.status_count(Status::Both), "location")) " in both " (b) " and " (a) "; "
            (c.status_count(Status::OnlyBefore)) " only in " (b) ", "
            (c.status_count(Status::OnlyAfter)) " only in " (a) "."
        }
        p {
            "Margin: "
            span.chg style=(format!("color:{}", hex(change_colour(Some(Change::Improved))))) { (c.change_count(Change::Improved)) " improved" }
            ", "
            span.chg style=(format!("color:{}", hex(change_colour(Some(Change::Worsened))))) { (c.change_count(Change::Worsened)) " worsened" }
            ", " (c.change_count(Change::Unchanged)) " unchanged. "
            (count(c.counts.newly_at_risk, "location")) " newly failed or marginal, "
            (c.counts.fixed) " no longer failed or marginal."
        }
    }
}

fn warnings(c: &Comparison) -> Markup {
    html! { @for w in &c.warnings { p.warning { "Warning: " (w) } } }
}

fn transitions(c: &Comparison, bd: &Badges) -> Markup {
    let (b, a) = c.labels();
    html! {
        h3 { "Zone transitions" }
        p.note { "Rows: zone in " (b) "; columns: zone in " (a) ". Shaded: a change of zone." }
        table {
            thead { tr { th {} @for z in Zone::ALL { th.n { (bd.zone(z)) } } } }
            tbody {
                @for from in Zone::ALL {
                    tr {
                        th { (bd.zone(from)) }
                        @for to in Zone::ALL {
                            @let n = c.transitions(from, to);
                            td class=(if n > 0 && from != to { "n z" } else { "n" }) { (n) }
                        }
                    }
                }
            }
        }
    }
}

fn change_table(c: &Comparison, v: &[&Track], bd: &Badges, empty: &str) -> Markup {
    if v.is_empty() {
        return html! { p.note { (empty) } };
    }
    html! {
        table {
            thead { tr {
                th { "location" } th { "zone before" } th { "zone now" }
                th.n { "margin before, pp" } th.n { "margin now, pp" } th.n { "change, pp" }
                th.n { "major before, %" } th.n { "major now, %" }
            } }
            tbody {
                @for t in v {
                    @let (b, a) = (t.before(), t.after());
                    tr {
                        td { (t.name()) }
                        td { (bd.maybe(b.map(|r| r.zone))) }
                        td { (bd.maybe(a.map(|r| r.zone))) }
                        td.n { (fmt_opt(b.and_then(|r| r.margin_pct), 1)) }
                        td.n { (fmt_opt(a.and_then(|r| r.margin_pct), 1)) }
                        td class="n chg" style=(format!("color:{}", hex(change_colour(t.change(c.tolerance))))) {
                            (t.margin_change().map_or_else(String::new, |d| format!("{d:+.1}")))
                        }
                        td.n { (fmt_opt(b.map(|r| r.major_pct), 1)) }
                        td.n { (fmt_opt(a.map(|r| r.major_pct), 1)) }
                    }
                }
            }
        }
    }
}

fn losses_gains(c: &Comparison, bd: &Badges) -> Markup {
    let losses = c.losses();
    let gains = c.gains();
    let (nl, ng) = (c.counts.losses, c.counts.gains);
    let losses: Vec<&Track> = losses.into_iter().take(TABLE_ROWS).collect();
    let gains: Vec<&Track> = gains.into_iter().take(TABLE_ROWS).collect();
    html! {
        h2 { "Largest changes of margin" }
        h3 { "Largest losses (" (losses.len()) " of " (nl) ")" }
        (change_table(c, &losses, bd, "No margin fell by more than the tolerance."))
        h3 { "Largest gains (" (gains.len()) " of " (ng) ")" }
        (change_table(c, &gains, bd, "No margin grew by more than the tolerance."))
    }
}

fn one_sided_table(v: &[&Track], bd: &Badges) -> Markup {
    html! {
        table {
            thead { tr {
                th { "location" } th { "zone" } th.n { "margin, pp" } th.n { "major, %" }
                th.n { "x" } th.n { "y" }
            } }
            tbody {
                @for t in v {
                    @let r = neckline_core::compare::csv_out::latest(t);
                    tr {
                        td { (t.name()) }
                        td { (bd.zone(r.zone)) }
                        td.n { (fmt_opt(r.margin_pct, 1)) }
                        td.n { (format!("{:.1}", r.major_pct)) }
                        td.n { (fmt_opt(r.x, 1)) }
                        td.n { (fmt_opt(r.y, 1)) }
                    }
                }
            }
        }
    }
}

fn one_sided(c: &Comparison, bd: &Badges) -> Markup {
    let (b, a) = c.labels();
    let groups: Vec<(String, Vec<&Track>, usize)> = [
        (Status::OnlyBefore, format!("Only in {b}")),
        (Status::OnlyAfter, format!("Only in {a}")),
        (Status::OnlyEarlier, "Only in earlier tryouts".to_string()),
    ]
    .into_iter()
    .map(|(st, what)| (what, c.with_status(st), c.status_count(st)))
    .filter(|(_, v, _)| !v.is_empty())
    .collect();
    html! {
        h2 { "Measured in one tryout only" }
        @for (what, v, n) in &groups {
            h3 { (what) " (" (count(*n, "location")) ")" }
            (one_sided_table(v, bd))
            (super::record::rest_note(v.len(), *n))
        }
        @if groups.is_empty() {
            p { "Every location of " (b) " was measured in " (a) " and the other way round." }
        }
    }
}

fn pictures(c: &Comparison) -> io::Result<(Markup, Markup)> {
    let (b, a) = c.labels();
    let fld = fld_svg(c)?;
    let fld = html! {
        h2 { "Forming-limit diagram: " (b) " → " (a) }
        figure { (page::inline_svg(&fld)) }
        p.note {
            "Each arrow runs from a location's earlier strains to its strains in " (a)
            "; colour: change of margin; marker at the head: zone in " (a) "; labelled: the "
            (LABELLED) " largest losses and gains, every location newly failed or marginal and every one that left the failed zone (change in percentage points)."
        }
        @if c.density.is_some() {
            p.note {
                (count(c.counts.tracks, "location")) ": each cell is shaded in the colour of most of its locations' changes, deeper for more; arrows and labels for the first "
                (LABELS_AT_SCALE) " labelled only. The lists below name the rest."
            }
        }
    };
    let map = match map_svg(c)? {
        Some(svg) => html! {
            h2 { "Margin change on the part" }
            figure { (page::inline_svg(&svg)) }
            p.note { "Colour: change of margin from " (b) " to " (a) "; shape: zone in " (a) "; labelled as on the diagram." }
        },
        None => html! {
            h2 { "Margin change on the part" }
            p.note { "No map: no location carries x, y coordinates." }
        },
    };
    Ok((fld, map))
}

/// The whole page, without a record block (tests of the layout).
pub fn page_html(c: &Comparison) -> io::Result<String> {
    page_html_with(c, None)
}

/// The whole page; with `rec`, as a record: number, revision, generation time, inputs' SHA-256
/// and the sign-off block.
pub fn page_html_with(c: &Comparison, rec: Option<&Record>) -> io::Result<String> {
    let bd = Badges::new()?;
    let last = c
        .tryouts
        .last()
        .and_then(|t| t.summary.clone())
        .unwrap_or_default();
    let part = last.part.unwrap_or_else(|| "(part not named)".into());
    let title = format!("Tryout comparison: {part}");
    let labels: Vec<&str> = c.tryouts.iter().map(|t| t.label.as_str()).collect();
    let (fld, map) = pictures(c)?;
    let body = html! {
        (page::section("summary", html! {
            (header(c))
            @if let Some(r) = rec { (record::record_block(r)) }
            (warnings(c)) (verdicts(c)) (transitions(c, &bd))
            @if let Some(line) = record::one_sided_empty(c) { (line) }
            // With a record the sign-off takes the caution's place on the first page; the
            // caution is on the last page and, short, in every page's footer.
            @match rec {
                Some(r) => (record::signoff(r)),
                None => (page::caution()),
            }
        }))
        (page::section("at-risk", record::at_risk_section(c, &bd)))
        (page::section("changes", losses_gains(c, &bd)))
        @if record::one_sided_empty(c).is_none() { (page::section("one-sided", one_sided(c, &bd))) }
        (page::section("diagram", fld))
        (page::section("map", map))
        (page::section("caution", html! {
            h2 { "Caution" }
            (page::caution())
            p.note {
                "Margin: limit curve minus major strain, percentage points of engineering major strain, as judged by "
                code { "check" }
                " for each tryout; a change of curve or safety band between tryouts changes every margin (a warning above says so when the summaries show it). Written by neckline "
                (env!("CARGO_PKG_VERSION")) "."
            }
        }))
    };
    let (running, corner) = match rec {
        Some(r) => (
            format!(
                "{title} · tryouts {} · generated {}",
                labels.join(" → "),
                r.generated.text()
            ),
            format!("report {}, revision {}", r.report_id, r.revision),
        ),
        None => (
            format!("{title} · tryouts {}", labels.join(" → ")),
            String::new(),
        ),
    };
    Ok(page::layout(&title, &running, &corner, body))
}
