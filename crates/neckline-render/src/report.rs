//! `report.html`: one self-contained, printable document a reviewer can sign. Built with
//! `maud` in the shared layout of [`crate::page`] (every inserted text escaped); inline CSS and
//! SVG only. Page 1 holds the verdict and why, the curve, the settings, the zone counts, the
//! worst locations and the sign-off block; in print every page carries a running header (part,
//! tryout, revision) and "page N of M". Every text comes from the same [`Analysis`] as the CSV.

use crate::fld::{self, FldOptions};
use crate::map;
use crate::page::{self, Badges};
use maud::{html, Markup};
use neckline_core::analysis::{Analysis, Verdict};
use neckline_core::assess::Zone;
use neckline_core::job::Measurement;
use neckline_core::output::record::{self, CurveKind};
use neckline_core::output::{fmt_length, fmt_margin_opt, fmt_opt, fmt_setting, reason_text};
use neckline_core::point::PointResult;
use std::io::{self, Write};

/// Rows in the worst-locations table.
pub const WORST_ROWS: usize = 15;
/// Rows of the short worst list on the first page.
pub const WORST_BRIEF: usize = 5;
/// Rows of the all-locations table at most: a longer table is for points.csv, not for paper.
pub const TABLE_ROWS: usize = 500;
/// Rejected rows listed at most.
pub const REJECTED_ROWS: usize = 50;

fn or_dash(v: &Option<String>) -> String {
    v.clone().unwrap_or_else(|| "—".into())
}

fn length(v: Option<f64>, a: &Analysis) -> String {
    v.map_or_else(
        || "—".into(),
        |x| {
            format!(
                "{} {}",
                fmt_length(x, a.lengths.unit),
                a.lengths.unit.name()
            )
        },
    )
}

fn file_name(a: &Analysis) -> String {
    a.input.file_name().map_or_else(
        || a.input.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

fn rows(pairs: &[(&str, String)]) -> Markup {
    html! {
        table.job { @for (k, v) in pairs { tr { th { (k) } td { (v) } } } }
    }
}

/// Label-value pairs two to a row (page 1 must hold all its parts).
fn rows2(pairs: &[(&str, String)]) -> Markup {
    html! {
        table.job2 { @for pair in pairs.chunks(2) { tr {
            @for (k, v) in pair { th { (k) } td { (v) } }
        } } }
    }
}

fn header(a: &Analysis) -> Markup {
    let j = &a.job;
    html! {
        h1 { "Forming-limit check: " (j.part.as_deref().unwrap_or("(part not named)")) }
        @if let Some(c) = &j.company { p.note { (c) } }
        (rows2(&[
            ("Part", or_dash(&j.part)),
            ("Die", or_dash(&j.die)),
            ("Tryout", or_dash(&j.tryout)),
            ("Material", or_dash(&j.material)),
            ("Lot", or_dash(&j.lot)),
            ("Initial thickness t0", length(a.lengths.t0, a)),
            ("Circle diameter d0", length(a.lengths.d0, a)),
            ("Date measured", or_dash(&j.date)),
            ("Measured by", or_dash(&j.measured_by)),
            ("Measurement file", file_name(a)),
            ("Report", format!("{}, revision {}", or_dash(&j.report_id), or_dash(&j.revision))),
            ("Generated", a.generated.text()),
        ]))
        (curve_kind(a))
        (measurement(a))
    }
}

/// Where the curve came from: its file as given (relative to the job file), normalised.
fn curve_file(a: &Analysis) -> Option<String> {
    a.files
        .iter()
        .find(|f| f.role == "curve")
        .map(|f| record::normalise(&f.path).display().to_string())
}

/// The curve's kind and provenance in one line, and the warning an estimated curve carries.
fn curve_kind(a: &Analysis) -> Markup {
    let kind = CurveKind::of(&a.curve);
    html! {
        p.curvekind {
            b { "Limit curve: " (kind.words()) } " — " (a.curve.name) " (" (a.curve.measure.name()) " strain)"
            @if let Some(f) = curve_file(a) { ", file " code { (f) } }
            "; its source: see the limit-curve page."
        }
        @if let Some(w) = kind.warning() { p.warning { "Warning: " (w) "." } }
    }
}

/// How the circles were read, from the job's `[measurement]` table ("not stated" where left
/// out); the reading error the judgement used, when one was set.
fn measurement(a: &Analysis) -> Markup {
    let mut rows = Measurement::rows(a.job.measurement.as_ref());
    if let Some(e) = a.settings.reading_error {
        let unit = if a.strain_input {
            "pp of strain".to_string()
        } else {
            a.lengths.unit.name().to_string()
        };
        rows.push((
            "Reading error judged with",
            format!("{} {unit} per axis", fmt_setting(e)),
        ));
    }
    html! {
        p.measurement {
            b { "Measurement: " }
            @for (k, (label, value)) in rows.iter().enumerate() {
                @if k > 0 { "; " }
                span.k { (label.to_lowercase()) } " " (value)
            }
            "."
        }
    }
}

/// The verdict's reason in one sentence.
pub fn verdict_sentence(a: &Analysis) -> String {
    let count = neckline_core::output::count_of;
    let worst = a.worst(1);
    let why = worst
        .first()
        .map(|p| {
            format!(
                " The worst is {}: {}.",
                p.input.id,
                reason_text(p, &a.settings)
            )
        })
        .unwrap_or_default();
    match a.verdict() {
        Verdict::Fail => format!(
            "{} failed: on or above the limit curve{}{}.{why}",
            count(a.count(Zone::Failed), "location"),
            a.settings
                .max_thinning_pct
                .map_or(String::new(), |t| format!(
                    ", or thinned to {} % or more",
                    fmt_setting(t)
                )),
            if a.summary.paths > 0 {
                ", or past the limit along the strain path"
            } else {
                ""
            }
        ),
        Verdict::Marginal => format!(
            "No location failed; {} inside the safety band of {} pp below the curve.{why}",
            count(a.count(Zone::Marginal), "location"),
            fmt_setting(a.settings.margin_pct)
        ),
        Verdict::Incomplete => format!(
            "No location failed or is marginal, but {} lie outside the curve's range and {} \
             were rejected: those could not be judged.",
            count(a.count(Zone::Uncovered), "location"),
            count(a.rejected_total(), "row")
        ),
        Verdict::Pass => format!(
            "Every one of the {} was judged; none failed or is inside the safety band.",
            count(a.total(), "location")
        ),
    }
}

fn zone_meaning(z: Zone, a: &Analysis) -> String {
    let st = &a.settings;
    let along = if a.summary.paths > 0 {
        " (on the strain curve or along the path)"
    } else {
        ""
    };
    let text = zone_rule(z, st);
    match z {
        Zone::Failed | Zone::Marginal => format!("{text}{along}"),
        _ => text,
    }
}

fn zone_rule(z: Zone, st: &neckline_core::assess::Settings) -> String {
    match z {
        Zone::Failed => match st.max_thinning_pct {
            Some(t) => format!(
                "on or above the curve, or thinning ≥ {} % (whatever the curve's range)",
                fmt_setting(t)
            ),
            None => "on or above the curve".into(),
        },
        Zone::Marginal => format!("within {} pp below the curve", fmt_setting(st.margin_pct)),
        Zone::Uncovered => "minor strain outside the curve's range: no verdict".into(),
        Zone::Thickening => format!(
            "thicker than t0 by {} % or more: wrinkle tendency",
            fmt_setting(st.thickening_pct)
        ),
        Zone::LowStretch => format!("major strain below {} %", fmt_setting(st.low_stretch_pct)),
        Zone::Safe => "none of the above".into(),
    }
}

fn signoff(a: &Analysis) -> Markup {
    let j = &a.job;
    signoff_block([
        j.prepared_by.as_deref(),
        j.checked_by.as_deref(),
        j.approved_by.as_deref(),
    ])
}

/// The sign-off block: prepared, checked and approved, each with its name (when known), an empty
/// signature and an empty date (shared by every printable page).
pub fn signoff_block(names: [Option<&str>; 3]) -> Markup {
    html! {
        div.keep {
        h3 { "Sign-off" }
        table.signoff {
            thead { tr { th { "" } th { "Name" } th { "Signature" } th { "Date" } } }
            tbody {
                @for (role, name) in ["Prepared", "Checked", "Approved"].into_iter().zip(names) {
                    tr { th { (role) } td { (name.unwrap_or("")) } td {} td {} }
                }
            }
        }
        }
    }
}

fn summary_page(a: &Analysis, bd: &Badges) -> Markup {
    let v = a.verdict();
    let count = neckline_core::output::count_of;
    html! {
        (header(a))
        div class=(format!("verdict v-{}", v.name())) { "Verdict: " (v.name().to_uppercase()) }
        p { (verdict_sentence(a)) }
        p { (crate::terminal::settings_line(a)) ". " (count(a.total(), "location")) " judged, " (count(a.rejected_total(), "row")) " rejected." }
        @if let Some(line) = neckline_core::output::not_measured_line(a) {
            p { (line) "." }
        }
        table.zones {
            thead { tr { th { "zone" } th.n { "locations" } th { "meaning" } } }
            tbody {
                @for (z, n) in a.counts() {
                    tr { td { (bd.zone(z)) } td.n { (n) } td { (zone_meaning(z, a)) } }
                }
            }
        }
        (worst_brief(a, bd))
        (signoff(a))
        (page::caution())
        @if a.rejected_total() > 0 || !a.warnings.is_empty() || !neckline_core::output::notes(a).is_empty() {
            p.note { "Findings, warnings and rejected rows: see the worst-locations page." }
        }
    }
}

fn notes(a: &Analysis) -> Markup {
    html! {
        @for n in neckline_core::output::notes(a) {
            p.note { (n.text) }
            @if !n.ids.is_empty() {
                div.ids { (n.ids.join(", ")) @if n.more { ", ..." } }
            }
        }
    }
}

fn rejected(a: &Analysis) -> Markup {
    if a.rejected_total() == 0 {
        return html! {};
    }
    html! {
        h3 { "Rejected rows (not judged)" }
        ul {
            @for r in a.rejected().iter().take(REJECTED_ROWS) {
                li { "line " (r.location.line.map_or_else(|| "?".into(), |l| l.to_string())) ": " (r.reason) }
            }
            @if a.rejected_total() > REJECTED_ROWS {
                li { "... and " (a.rejected_total() - REJECTED_ROWS) " more: see summary.json" }
            }
        }
    }
}

fn id_cell(p: &PointResult) -> Markup {
    html! {
        (p.input.id)
        @if p.judgement.borderline { " ≈" }
    }
}

/// How the worst lists are ordered.
const ORDER: &str = "failed first, then marginal; by path use where the path judged, \
                     else by margin";

/// The legend of the reason codes used by `shown`: every reason that applies is listed, not
/// only the one that decided the zone.
fn code_legend(a: &Analysis, shown: &[&PointResult], ordered: bool) -> Markup {
    let used: Vec<&str> = shown
        .iter()
        .flat_map(|p| record::reasons(p, &a.settings))
        .map(record::code)
        .collect();
    let legend: Vec<(&str, String)> = record::legend(&a.settings)
        .into_iter()
        .filter(|(c, _)| used.contains(c))
        .collect();
    html! {
        p.legend {
            @if ordered { "Order: " (ORDER) ". " }
            "Why (every reason that applies): "
            @for (k, (c, words)) in legend.into_iter().enumerate() {
                @if k > 0 { "; " }
                b { (c) } " " (words)
            }
            "."
        }
    }
}

fn worst_brief(a: &Analysis, bd: &Badges) -> Markup {
    let worst = a.worst(WORST_BRIEF);
    if worst.is_empty() {
        return html! {};
    }
    let band = a.settings.margin_pct;
    html! {
        h3 { "Worst locations" }
        table.brief {
            thead { tr {
                th { "id" } th.n { "margin pp" } th.n { "major %" } th.n { "minor %" }
                th.n { "thinning %" } th { "zone" } th { "why" }
            } }
            tbody {
                @for p in &worst {
                    tr {
                        td { (id_cell(p)) }
                        td.n { (fmt_margin_opt(p.judgement.margin_pct, band)) }
                        td.n { (format!("{:.1}", p.strain.eng.major.percent())) }
                        td.n { (format!("{:.1}", p.strain.eng.minor.percent())) }
                        td.n { (format!("{:.1}", p.strain.thinning * 100.0)) }
                        td { (bd.zone(p.zone())) }
                        td.codes { (record::codes(p, &a.settings)) }
                    }
                }
            }
        }
        (code_legend(a, &worst, true))
        @if a.settings.reading_error.is_some() { p.note { "≈: borderline, the zone could change within the reading error." } }
    }
}

fn points_table(a: &Analysis, points: &[&PointResult], class: &str, bd: &Badges) -> Markup {
    let band = a.settings.margin_pct;
    let n1 = |v: f64| format!("{v:.1}");
    html! {
        table class=(class) {
            thead { tr {
                th { "id" } th.n { "major %" } th.n { "minor %" } th.n { "ε1 true %" }
                th.n { "ε2 true %" } th.n { "thinning %" } th.n { "β" } th.n { "limit %" }
                th.n { "margin pp" } th.n { "limit use %" } th.n { "x" } th.n { "y" }
                th { "zone" } th { "why" } th { "stage" } th { "note" }
            } }
            tbody {
                @for p in points {
                    tr {
                        td { (id_cell(p)) }
                        td.n { (n1(p.strain.eng.major.percent())) }
                        td.n { (n1(p.strain.eng.minor.percent())) }
                        td.n { (n1(p.strain.true_strain.major.percent())) }
                        td.n { (n1(p.strain.true_strain.minor.percent())) }
                        td.n { (n1(p.strain.thinning * 100.0)) }
                        td.n { (fmt_opt(p.strain.beta, 2)) }
                        td.n { (fmt_opt(p.judgement.limit_major.map(|l| l.percent()), 1)) }
                        td.n { (fmt_margin_opt(p.judgement.margin_pct, band)) }
                        td.n { (fmt_opt(p.judgement.limit_use_pct, 0)) }
                        td.n { (fmt_opt(p.input.x, 1)) }
                        td.n { (fmt_opt(p.input.y, 1)) }
                        td { (bd.zone(p.zone())) }
                        td.codes { (record::codes(p, &a.settings)) }
                        td { (p.input.stage.as_deref().unwrap_or("")) }
                        td { (p.input.note.as_deref().unwrap_or("")) }
                    }
                }
            }
        }
    }
}

/// The multi-stage section: the path criterion, its diagram, the locations it finds at risk
/// where the strain curve does not, and its assumptions.
fn paths_section(a: &Analysis, bd: &Badges) -> io::Result<Markup> {
    let svg = crate::peps::peps_svg(a)?.unwrap_or_default();
    let hidden: Vec<&PointResult> = a
        .points()
        .iter()
        .filter(|p| p.path.as_ref().is_some_and(|j| j.hidden()))
        .collect();
    let sm = &a.summary;
    Ok(html! {
        h2 { "Strain paths (multi-stage)" }
        p {
            (neckline_core::output::count_of(sm.paths, "location")) " were measured after each stage ("
            (a.stages.join(" → ")) ") and judged along their paths by the polar effective plastic "
            "strain criterion (Stoughton & Yoon 2012) as well as by the strain curve at the last "
            "stage; each location's zone is the worse of the two. "
            (neckline_core::output::count_of(sm.hidden.total, "location"))
            " are at risk along the path while the strain curve calls them safe or marginal."
        }
        figure { (page::inline_svg(&svg)) }
        @if !hidden.is_empty() {
            h3 { "Hidden by the strain curve" }
            table.brief {
                thead { tr {
                    th { "id" } th.n { "stages" } th.n { "path use %" } th.n { "last direction °" }
                    th.n { "bend °" } th { "strain curve" } th { "path" } th { "note" }
                } }
                tbody {
                    @for p in &hidden {
                        @if let Some(j) = &p.path {
                            tr {
                                td { (id_cell(p)) }
                                td.n { (j.stages.len()) }
                                td.n { (fmt_opt(j.use_pct, 1)) }
                                td.n { (fmt_opt(j.angle_deg, 0)) }
                                td.n { (fmt_opt(j.bend_deg, 0)) }
                                td { (bd.zone(j.strain_zone)) }
                                td { (bd.zone(j.zone)) }
                                td { (p.input.note.as_deref().unwrap_or("")) }
                            }
                        }
                    }
                }
            }
        }
        @if sm.turned.total > 0 {
            p.note { "The major axis turned by more than 20° between stages at " (sm.turned.total)
                " locations (" (sm.turned.items.join(", ")) "): the criterion's fixed-axes assumption fails there." }
        }
        p.note {
            "Assumptions: von Mises effective strain; each stage straight in true strain; principal "
            "axes fixed between stages; the criterion is a path-independent approximation. Where a "
            "tested limit for the part's non-linear path exists, it governs."
        }
    })
}

fn curve_section(a: &Analysis) -> Markup {
    let c = &a.curve;
    let st = &a.settings;
    html! {
        h2 { "Limit curve" }
        (rows(&[
            ("Name", c.name.clone()),
            ("Source", c.source.clone()),
            ("Material", or_dash(&c.material)),
            ("Thickness", c.thickness_mm.map_or_else(|| "—".into(), |t| format!("{t} mm"))),
            ("Strain measure of the points", c.measure.name().to_string()),
        ]))
        table {
            thead { tr { th.n { "minor %" } th.n { "major %" } } }
            tbody { @for p in &c.points { tr {
                td.n { (format!("{:.2}", p[0] * 100.0)) } td.n { (format!("{:.2}", p[1] * 100.0)) }
            } } }
        }
        h2 { "Settings" }
        (rows(&[
            ("Safety band", format!("{} percentage points of engineering major strain", fmt_setting(st.margin_pct))),
            ("Low stretch below", format!("{} % engineering major strain", fmt_setting(st.low_stretch_pct))),
            ("Thickening from", format!("{} % thicker than t0", fmt_setting(st.thickening_pct))),
            ("Maximum thinning", st.max_thinning_pct.map_or_else(|| "not checked".into(), |t| format!("{} %", fmt_setting(t)))),
            ("Length unit", a.lengths.unit.name().to_string()),
        ]))
    }
}

const METHOD: &str = r#"<h2>Method</h2>
<p>Each etched circle of initial diameter d0 was measured as an ellipse with axes d1 ≥ d2.</p>
<table>
<tr><td>stretches</td><td class="formula">λ1 = d1/d0, λ2 = d2/d0</td></tr>
<tr><td>engineering strain</td><td class="formula">e = λ − 1</td></tr>
<tr><td>true strain</td><td class="formula">ε = ln λ</td></tr>
<tr><td>thickness strain (constant volume)</td><td class="formula">ε3 = −(ε1 + ε2)</td></tr>
<tr><td>thinning</td><td class="formula">1 − t/t0 = 1 − exp(ε3)</td></tr>
<tr><td>strain ratio</td><td class="formula">β = ε2/ε1</td></tr>
<tr><td>margin (vertical)</td><td class="formula">e1,limit(ε2) − e1, percentage points</td></tr>
<tr><td>limit use (along the strain path)</td><td class="formula">100 · |(ε2, ε1)| / |curve point on the same ray|</td></tr>
</table>
<p>Strain formulas: any continuum mechanics text (for example Marciniak, Duncan &amp; Hu,
<i>Mechanics of Sheet Metal Forming</i>, 2002). Zone rules in order, the first that applies
wins, each with its reason: failed (curve: margin ≤ 0; thinning: at or past the maximum,
whatever the curve's range), uncovered (no-curve), marginal (band), thickening, low-stretch,
safe (none). The safety band and the low-stretch threshold are common press-shop practice; the
thickening threshold is a judgement of ours (beyond the thickness-strain error of a 1 % reading
error per axis); the user's own values govern. Printed margins keep their side of 0 and of the
band edge: more decimals are shown near an edge.</p>
<p>Colours and shapes: failed a red disc with a bar, marginal a yellow triangle, safe a green
square (the meanings of the ISO 3864-1 safety colours and sign shapes), uncovered a grey
diamond, thickening a hollow triangle pointing down, low-stretch a hollow circle.</p>
<p>Diagram lines: strain paths uniaxial tension β = −½, plane strain β = 0, equibiaxial β = 1,
constant thickness ε1 = −ε2; thinning iso-lines ε1 + ε2 = −ln(1 − s) for s = 10, 20, 30 % and the
maximum thinning when set. A strain-based limit curve holds for straight (proportional) strain
paths only.</p>
"#;

fn provenance(a: &Analysis) -> Markup {
    html! {
        p.note { "Written by neckline " (env!("CARGO_PKG_VERSION")) " from " (file_name(a)) "." }
        @if !a.files.is_empty() {
            table.job {
                @for f in &a.files {
                    tr { th { (f.role) } td { code { (record::normalise(&f.path).display().to_string()) } br; "SHA-256 " code { (f.sha256) } } }
                }
            }
        }
    }
}

fn all_locations(a: &Analysis, bd: &Badges) -> Markup {
    let kept: Vec<&PointResult> = a.points().iter().take(TABLE_ROWS).collect();
    let what = if a.summary.complete {
        "locations in file order"
    } else {
        "failed or marginal locations in file order"
    };
    html! {
        h2 { "All locations" }
        p {
            (kept.len()) " " (what) ". Strains in percent; margin in percentage points of engineering major strain."
            @if kept.len() < a.total() { " The table stops here: all " (a.total()) " locations are in points.csv." }
        }
        (points_table(a, &kept, "points", bd))
        (code_legend(a, &kept, false))
    }
}

/// The hot spots: connected regions of failed (then marginal) locations, largest first.
fn hot_spots(a: &Analysis) -> Markup {
    let (spots, unit) = crate::terminal::hot_spots(a);
    if spots.is_empty() {
        return html! { p.note { "Hot spots: none (no failed or marginal location on the map)." } };
    }
    let n = crate::terminal::HOT_SPOTS_LISTED;
    html! {
        h3 { "Hot spots: " (crate::terminal::hot_spot_counts(&spots)) }
        p.note { "Connected regions of failed, then of marginal, locations (neighbours within 1.5 grid spacings), largest first." }
        table.brief {
            thead { tr { th.n { "#" } th { "zone" } th { "worst" } th.n { "margin pp" } th.n { "locations" } th.n { "area " (unit) } } }
            tbody {
                @for (k, h) in spots.iter().take(n).enumerate() {
                    tr {
                        td.n { (k + 1) }
                        td { (h.zone.name()) }
                        td { (h.worst.as_ref().map_or_else(|| "—".to_string(), |w| w.input.id.clone())) }
                        td.n { (fmt_margin_opt(h.worst.as_ref().and_then(|w| w.judgement.margin_pct), a.settings.margin_pct)) }
                        td.n { (h.locations) }
                        td.n { (format!("{:.0}", h.area)) }
                    }
                }
            }
        }
        @if spots.len() > n { p.note { "... and " (spots.len() - n) " more." } }
    }
}

/// The running header of the printed pages: part, tryout, revision.
fn running(a: &Analysis) -> (String, String) {
    let j = &a.job;
    let mut head = vec![format!(
        "Forming-limit check: {}",
        j.part.as_deref().unwrap_or("(part not named)")
    )];
    if let Some(t) = &j.tryout {
        head.push(format!("tryout {t}"));
    }
    head.push(format!("revision {}", j.revision.as_deref().unwrap_or("—")));
    let corner = j.report_id.as_ref().map_or_else(
        || format!("verdict {}", a.verdict().name()),
        |r| format!("report {r}"),
    );
    let corner = format!("{corner} · generated {}", a.generated.text());
    (head.join(" · "), corner)
}

/// The whole report as a string.
pub fn report_html(a: &Analysis, opts: &FldOptions, value: map::MapValue) -> io::Result<String> {
    let bd = Badges::new()?;
    let title = format!(
        "Forming-limit check: {}",
        a.job.part.as_deref().unwrap_or("(part not named)")
    );
    let fld_svg = fld::fld_svg(a, opts)?;
    let map_svg = map::map_svg(a, value)?;
    let worst = a.worst(WORST_ROWS);
    let body = html! {
        (page::section("summary", summary_page(a, &bd)))
        (page::section("diagram", html! {
            h2 { "Forming-limit diagram" }
            figure { (page::inline_svg(&fld_svg)) }
            p.note { "Labelled: the " (opts.labelled) " worst locations (failed first, then by margin) with why they are in their zone; a dashed ring marks a borderline location." }
        }))
        (page::section("map", html! {
            h2 { "Part map" }
            @match &map_svg {
                Some(svg) => {
                    figure { (page::inline_svg(svg)) }
                    p.note { "Colour: margin to the limit curve (failed: a red ramp, darker deeper past the curve; marginal yellow; a green ramp beyond the band); shape: zone; labelled: the worst location of each hot spot, then the worst locations." }
                    (hot_spots(a))
                }
                None => p.note { "No map: no location carries x, y coordinates." },
            }
        }))
        @if a.summary.paths > 0 { (page::section("paths", paths_section(a, &bd)?)) }
        (page::section("worst", html! {
            h2 { "Worst locations" }
            p { "The " (worst.len()) " worst locations: " (ORDER) "." }
            (points_table(a, &worst, "worst", &bd))
            (code_legend(a, &worst, false))
            (notes(a))
            @for w in &a.warnings { p.note { "Warning: " (w) } }
            (rejected(a))
        }))
        (page::follow("points", all_locations(a, &bd)))
        (page::section("curve", curve_section(a)))
        (page::section("method", html! {
            (maud::PreEscaped(METHOD))
            h2 { "Caution" }
            (page::caution())
            (provenance(a))
        }))
    };
    let (head, corner) = running(a);
    Ok(page::layout(&title, &head, &corner, body))
}

/// Write the report with the diagram's default axes.
pub fn write_report(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    out.write_all(report_html(a, &FldOptions::default(), map::MapValue::Margin)?.as_bytes())
}

/// The readable text of a report (tags, style and pictures removed, entities decoded, blank
/// lines dropped): what a reader sees, for review and snapshot tests.
pub fn visible_text(html: &str) -> String {
    let mut s = html.to_string();
    for tag in [
        "tr", "p", "h1", "h2", "h3", "li", "div", "table", "section", "title", "ul",
    ] {
        let close = format!("</{tag}>");
        s = s.replace(&close, &format!("{close}\n"));
    }
    for tag in ["style", "svg"] {
        while let Some(start) = s.find(&format!("<{tag}")) {
            let close = format!("</{tag}>");
            let Some(end) = s[start..].find(&close) else {
                break;
            };
            s.replace_range(start..start + end + close.len(), " ");
        }
    }
    let mut out = String::new();
    let mut in_tag = false;
    for c in s.chars() {
        match c {
            '<' => in_tag = true,
            '>' => {
                in_tag = false;
                out.push(' ');
            }
            c if !in_tag => out.push(c),
            _ => {}
        }
    }
    let decoded = out
        .replace("&lt;", "<")
        .replace("&gt;", ">")
        .replace("&quot;", "\"")
        .replace("&#39;", "'")
        .replace("&amp;", "&");
    decoded
        .lines()
        .map(|l| l.split_whitespace().collect::<Vec<_>>().join(" "))
        .filter(|l| !l.is_empty())
        .collect::<Vec<_>>()
        .join("\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn visible_text_drops_tags_style_and_svg() {
        let t = visible_text("<style>p{}</style><p>a &amp; b</p><svg><text>x</text></svg><p>c</p>");
        assert_eq!(t, "a & b\nc");
    }
}

#[cfg(test)]
mod render_tests {
    use super::*;
    use neckline_core::output::{fixture, points_csv};

    fn report() -> (Analysis, String) {
        let a = fixture::analysis(true);
        let html = report_html(&a, &FldOptions::default(), map::MapValue::Margin).unwrap();
        (a, html)
    }

    #[test]
    fn text_content_snapshot() {
        let (a, html) = report();
        let text = visible_text(&html)
            .replace(env!("CARGO_PKG_VERSION"), "VERSION")
            .replace(&a.generated.text(), "TIME");
        insta::assert_snapshot!(text);
    }

    #[test]
    fn self_contained_and_escaped() {
        let (_, html) = report();
        for bad in [
            "http://", "https://", "src=", "href=", "@import", "url(", "<script", "<link",
        ] {
            assert!(!html.contains(bad), "report contains `{bad}`");
        }
        assert!(!html.contains("<LH>"));
        assert!(html.contains("TP-1 test panel &lt;LH&gt; &amp; co (invented)"));
        assert_eq!(html.matches("<section class=\"page\"").count(), 6);
        assert_eq!(html.matches("<section class=\"follow\"").count(), 1);
        assert_eq!(
            html.matches("<svg width=\"1200\"").count(),
            2,
            "diagram and map inline"
        );
        assert!(html.contains(neckline_core::CAUTION));
    }

    #[test]
    fn tables_agree_with_points_csv() {
        let (a, html) = report();
        let layout = points_csv::Layout::default();
        let csv = points_csv::table(&layout, a.points());
        let mut r = csv::Reader::from_reader(csv.as_bytes());
        let head = r.headers().unwrap().clone();
        let col = |name: &str| head.iter().position(|h| h == name).unwrap();
        let (id, margin, zone, reason) = (col("id"), col("margin_pct"), col("zone"), col("reason"));
        let text = visible_text(&html);
        for rec in r.records() {
            let rec = rec.unwrap();
            // The points-table line of this id (the last one: after the worst table).
            let line = text
                .lines()
                .rfind(|l| l.starts_with(&format!("{} ", &rec[id])))
                .unwrap_or_else(|| panic!("{} not in the report", &rec[id]));
            let cells: Vec<&str> = line.split(' ').collect();
            assert!(cells.contains(&&rec[zone]), "{line}");
            match rec[margin].parse::<f64>() {
                // id, 5 strains, beta, limit, margin, use, x, y, zone, why: margin is the 9th
                // cell; the CSV has 3 decimals and the report 1 (more near an edge), so they
                // agree to 0.05 pp.
                Ok(m) => {
                    let shown: f64 = cells[8].parse().unwrap();
                    assert!((shown - m).abs() <= 0.05 + 1e-9, "{line} vs {m}");
                }
                // No margin: limit, margin and use are empty, and the code says why (O off the
                // curve, X crossed).
                Err(_) => assert!(cells.contains(&"O") || cells.contains(&"X"), "{line}"),
            }
            // The reason points.csv gives (the one that decided the zone) is among the codes.
            let r = neckline_core::assess::Reason::ALL
                .into_iter()
                .find(|r| r.name() == &rec[reason])
                .unwrap();
            assert!(cells.contains(&record::code(r)), "{line}: {}", &rec[reason]);
        }
    }

    #[test]
    fn no_map_note_without_positions() {
        let a = fixture::analysis(false);
        let html = report_html(&a, &FldOptions::default(), map::MapValue::Margin).unwrap();
        assert!(html.contains("No map: no location carries x, y coordinates."));
        assert_eq!(html.matches("<svg width=\"1200\"").count(), 1);
    }
}
