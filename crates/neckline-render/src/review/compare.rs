//! The review page of a comparison of tryouts (`compare`): each location's arrow from the
//! second-to-last tryout to the last on the diagram (and on the map where its position moved),
//! its zone now by shape, its change by colour, filters for improved, worsened and new.

use super::{
    change_colours_json, f32_column, i32_column, ids_column, json_num, json_str, line_json, page,
    strokes_json, u8_column, zones_json,
};
use crate::compare::fld::{limit_samples, title_lines};
use neckline_core::compare::{Change, Comparison, Status, Track};

/// Locations drawn at most; beyond, those at risk now, new or worsened come first.
pub const TRACKS_DRAWN: usize = 20_000;

/// The change category of a track: 0 improved, 1 worsened, 2 unchanged, 3 new (only in the
/// last tryout), 4 gone (only in the one before).
fn category(t: &Track, tolerance: f64) -> Option<u8> {
    match t.status() {
        Status::Both => Some(match t.change(tolerance) {
            Some(Change::Improved) => 0,
            Some(Change::Worsened) => 1,
            _ => 2,
        }),
        Status::OnlyAfter => Some(3),
        Status::OnlyBefore => Some(4),
        Status::OnlyEarlier => None,
    }
}

/// The review page of `c`.
pub fn compare_review_html(c: &Comparison) -> String {
    let (title, second, third) = title_lines(c, "Review of tryouts");
    page(&title, &data(c, &title, [&second, &third]))
}

fn data(c: &Comparison, title: &str, sub: [&str; 2]) -> String {
    let mut tracks: Vec<(&Track, u8)> = c
        .tracks
        .iter()
        .filter_map(|t| Some((t, category(t, c.tolerance)?)))
        .collect();
    // Beyond the tracks kept, the page holds those of the capped lists.
    let total = if c.complete {
        tracks.len()
    } else {
        c.counts.tracks - c.status_count(Status::OnlyEarlier)
    };
    if tracks.len() > TRACKS_DRAWN {
        let rank = |(t, k): &(&Track, u8)| {
            let risky = t
                .after()
                .is_some_and(|r| neckline_core::compare::at_risk(r.zone));
            (!risky, !matches!(k, 1 | 3))
        };
        tracks.sort_by_key(rank);
        tracks.truncate(TRACKS_DRAWN);
    }
    let row = |t: &Track| t.after().or(t.before()).cloned();
    let before_both = |t: &Track| match t.status() {
        Status::Both => t.before().cloned(),
        _ => None,
    };
    let limit = limit_samples(c);
    let band = c
        .tryouts
        .last()
        .and_then(|t| t.summary.as_ref())
        .and_then(|s| s.band);
    let mut pts: Vec<(f64, f64)> = limit.clone();
    for (t, _) in &tracks {
        for r in [t.before(), t.after()].into_iter().flatten() {
            pts.push((r.minor_pct, r.major_pct));
        }
    }
    let fold = |f: fn(&(f64, f64)) -> f64, init: f64, pick: fn(f64, f64) -> f64| {
        pts.iter().map(f).filter(|v| v.is_finite()).fold(init, pick)
    };
    let round = |lo: f64, hi: f64| ((lo / 5.0).floor() * 5.0, (hi / 5.0).ceil() * 5.0);
    let (x0, x1) = round(
        fold(|p| p.0, 0.0, f64::min) - 4.0,
        fold(|p| p.0, 0.0, f64::max) + 4.0,
    );
    let (y0, y1) = round(
        fold(|p| p.1, 0.0, f64::min) - 4.0,
        fold(|p| p.1, 0.0, f64::max) * 1.08 + 4.0,
    );
    let mut lines = Vec::new();
    if let Some(b) = band {
        let shifted: Vec<(f64, f64)> = limit.iter().map(|p| (p.0, p.1 - b)).collect();
        let name = format!("safety band −{} pp", neckline_core::output::fmt_setting(b));
        lines.push(line_json(&name, "band", &shifted));
    }
    if !limit.is_empty() {
        lines.push(line_json(
            "limit curve (recorded at the locations)",
            "curve",
            &limit,
        ));
    }
    let rows: Vec<_> = tracks.iter().map(|(t, _)| row(t)).collect();
    let befores: Vec<_> = tracks.iter().map(|(t, _)| before_both(t)).collect();
    let xy: Vec<Option<(f64, f64)>> = rows.iter().map(|r| r.as_ref()?.xy()).collect();
    let placed: Vec<(f64, f64)> = xy.iter().flatten().copied().collect();
    let map = if placed.is_empty() {
        "null".to_string()
    } else {
        let e = placed.iter().fold(
            [
                f64::INFINITY,
                f64::INFINITY,
                f64::NEG_INFINITY,
                f64::NEG_INFINITY,
            ],
            |e, p| [e[0].min(p.0), e[1].min(p.1), e[2].max(p.0), e[3].max(p.1)],
        );
        let unit = c
            .tryouts
            .last()
            .and_then(|t| t.summary.as_ref())
            .and_then(|s| s.unit.clone())
            .unwrap_or_default();
        format!(
            "{{\"extent\":[{},{},{},{}],\"xLabel\":{},\"yLabel\":{}}}",
            json_num(e[0], 4),
            json_num(e[1], 4),
            json_num(e[2], 4),
            json_num(e[3], 4),
            json_str(&format!("x, {unit}")),
            json_str(&format!("y, {unit}"))
        )
    };
    // The largest losses first: the page's worst list.
    let index: std::collections::HashMap<*const Track, usize> = tracks
        .iter()
        .enumerate()
        .map(|(k, (t, _))| (*t as *const Track, k))
        .collect();
    let worst: Vec<String> = c
        .losses()
        .into_iter()
        .filter_map(|t| index.get(&(t as *const Track)))
        .take(neckline_core::summary::WORST_KEPT)
        .map(|k| k.to_string())
        .collect();
    let mut counts = [0usize; 6];
    for r in rows.iter().flatten() {
        counts[r.zone as usize] += 1;
    }
    let (lb, la) = c.labels();
    format!(
        concat!(
            "{{\"kind\":\"compare\",\"title\":{title},\"sub\":[{s0},{s1}],\"caution\":{caution},",
            "\"labels\":[{lb},{la}],\"tolerance\":{tol},",
            "\"zones\":{zones},\"strokes\":{strokes},\"changeColours\":{cc},",
            "\"fld\":{{\"x\":[{x0},{x1}],\"y\":[{y0},{y1}],",
            "\"xLabel\":\"minor strain ε2, engineering %\",\"yLabel\":\"major strain ε1, engineering %\"}},",
            "\"lines\":[{lines}],\"map\":{map},\"scale\":null,",
            "\"total\":{total},\"complete\":{complete},\"placed\":{placed},\"counts\":[{counts}],",
            "\"pts\":{{\"n\":{n},\"ids\":{ids},\"zone\":{zone},\"zoneBefore\":{zb},\"change\":{cat},",
            "\"dx\":{dx},\"dy\":{dy},\"fx\":{fx},\"fy\":{fy},\"mx\":{mx},\"my\":{my},",
            "\"mfx\":{mfx},\"mfy\":{mfy},\"major\":{major},\"minor\":{minor},",
            "\"margin\":{margin},\"marginBefore\":{mb},\"dmargin\":{dm},\"reason\":{reason},\"reasons\":[]}},",
            "\"worst\":[{worst}],\"density\":null,\"cells\":null}}"
        ),
        title = json_str(title),
        s0 = json_str(sub[0]),
        s1 = json_str(sub[1]),
        caution = json_str(neckline_core::CAUTION),
        lb = json_str(lb),
        la = json_str(la),
        tol = json_num(c.tolerance, 3),
        zones = zones_json(),
        strokes = strokes_json(),
        cc = change_colours_json(),
        x0 = json_num(x0, 3),
        x1 = json_num(x1, 3),
        y0 = json_num(y0, 3),
        y1 = json_num(y1, 3),
        lines = lines.join(","),
        map = map,
        total = total,
        complete = total == tracks.len(),
        placed = placed.len(),
        counts = counts.map(|n| n.to_string()).join(","),
        n = tracks.len(),
        ids = ids_column(
            tracks
                .iter()
                .map(|(t, _)| t.name())
                .collect::<Vec<_>>()
                .iter()
                .map(String::as_str)
        ),
        zone = u8_column(rows.iter().map(|r| r.as_ref().map_or(0, |r| r.zone as u8))),
        zb = u8_column(befores.iter().map(|r| r.as_ref().map_or(255, |r| r.zone as u8))),
        cat = u8_column(tracks.iter().map(|(_, k)| *k)),
        dx = f32_column(rows.iter().map(|r| r.as_ref().map(|r| r.minor_pct))),
        dy = f32_column(rows.iter().map(|r| r.as_ref().map(|r| r.major_pct))),
        fx = f32_column(befores.iter().map(|r| r.as_ref().map(|r| r.minor_pct))),
        fy = f32_column(befores.iter().map(|r| r.as_ref().map(|r| r.major_pct))),
        mx = f32_column(xy.iter().map(|p| p.map(|q| q.0))),
        my = f32_column(xy.iter().map(|p| p.map(|q| q.1))),
        mfx = f32_column(befores.iter().map(|r| r.as_ref().and_then(|r| r.x))),
        mfy = f32_column(befores.iter().map(|r| r.as_ref().and_then(|r| r.y))),
        major = f32_column(rows.iter().map(|r| r.as_ref().map(|r| r.major_pct))),
        minor = f32_column(rows.iter().map(|r| r.as_ref().map(|r| r.minor_pct))),
        margin = f32_column(rows.iter().map(|r| r.as_ref().and_then(|r| r.margin_pct))),
        mb = f32_column(befores.iter().map(|r| r.as_ref().and_then(|r| r.margin_pct))),
        dm = f32_column(tracks.iter().map(|(t, _)| t.margin_change())),
        reason = i32_column(tracks.iter().map(|_| -1)),
        worst = worst.join(","),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use neckline_core::assess::Zone;
    use neckline_core::compare::{ResultRow, Tryout};

    fn row(id: &str, major: f64, margin: f64, zone: Zone) -> ResultRow {
        ResultRow {
            id: id.into(),
            major_pct: major,
            minor_pct: 2.0,
            margin_pct: Some(margin),
            limit_pct: Some(major + margin),
            zone,
            x: Some(0.0),
            y: Some(0.0),
        }
    }

    #[test]
    fn categories_follow_the_comparison() {
        let t = |label: &str, rows: Vec<ResultRow>| Tryout {
            path: format!("{label}/points.csv").into(),
            label: label.into(),
            rows,
            summary: None,
            stats: Default::default(),
        };
        let a = t(
            "T1",
            vec![
                row("A", 30.0, 5.0, Zone::Marginal),
                row("B", 20.0, 15.0, Zone::Safe),
                row("C", 20.0, 15.0, Zone::Safe),
                row("D", 20.0, 15.0, Zone::Safe),
            ],
        );
        let b = t(
            "T2",
            vec![
                row("A", 25.0, 10.5, Zone::Safe),
                row("B", 28.0, 7.0, Zone::Marginal),
                row("C", 20.2, 14.8, Zone::Safe),
                row("E", 20.0, 15.0, Zone::Safe),
            ],
        );
        let c =
            neckline_core::compare::compare(vec![a, b], neckline_core::compare::Matching::Id, 1.0)
                .unwrap();
        let cats: Vec<(String, Option<u8>)> = c
            .tracks
            .iter()
            .map(|t| (t.name(), category(t, 1.0)))
            .collect();
        // A gained 5.5 pp, B lost 8 pp, C moved 0.2 pp (inside the 1 pp tolerance), D is
        // gone, E is new.
        for (id, k) in [("A", 0), ("B", 1), ("C", 2), ("D", 4), ("E", 3)] {
            assert!(cats.contains(&(id.to_string(), Some(k))), "{id}: {cats:?}");
        }
        let html = compare_review_html(&c);
        assert!(html.contains("\"kind\":\"compare\""));
        assert!(html.contains("\"n\":5"));
    }
}
