//! The review page of one judged file (`check`): its data from the [`Analysis`].

use super::{
    change_colours_json, f32_column, i32_column, ids_column, json_num, json_str, line_json, page,
    strokes_json, u8_column, zones_json, FINE_CELLS, RAMP_STEPS,
};
use crate::chart::title::job_lines;
use crate::fld::{self, band_label, band_line, curve_line, reference_paths, thinning_line};
use crate::map::MarginScale;
use crate::plot::{hex, measure_word};
use neckline_core::analysis::Analysis;
use neckline_core::assess::ROUND_OFF_PP;
use neckline_core::output::{fmt_setting, reason_text};
use neckline_core::point::PointResult;
use neckline_core::strain::StrainMeasure;
use neckline_core::summary::{map_margin, point_xy};
use std::collections::HashMap;

/// Steps of the map's failed-zone ramp (deeper past the curve, darker): 0.05 of the scale's
/// lowest margin a step.
pub const FAILED_STEPS: usize = 21;

/// The index of a margin's colour in [`palette`]: the failed ramp first (0 the deepest past
/// the curve, `FAILED_STEPS - 1` on the curve), then the band, then the green ramp beyond the
/// band; 255 for no margin (grey). Ordered from the worst margin to the best, so the worst of
/// several is the smallest index.
pub fn colour_index(m: Option<f64>, s: &MarginScale) -> u8 {
    let Some(m) = m else { return 255 };
    let last = (FAILED_STEPS - 1) as f64;
    if m <= ROUND_OFF_PP {
        let t = if s.lo < 0.0 {
            (m / s.lo).clamp(0.0, 1.0)
        } else {
            0.0
        };
        return (last - (t * last).round()) as u8;
    }
    if m < s.band - ROUND_OFF_PP {
        return FAILED_STEPS as u8;
    }
    let t = if s.hi > s.band {
        ((m.clamp(s.band, s.hi) - s.band) / (s.hi - s.band)).clamp(0.0, 1.0)
    } else {
        1.0
    };
    (FAILED_STEPS + 1) as u8 + (t * (RAMP_STEPS - 1) as f64).round() as u8
}

/// The colours of [`colour_index`]: those of the static map's [`MarginScale`].
pub fn palette(s: &MarginScale) -> Vec<String> {
    let last = (FAILED_STEPS - 1) as f64;
    let deepest = s.lo.min(0.0);
    let mut v: Vec<String> = (0..FAILED_STEPS)
        .map(|k| hex(s.colour(deepest * (1.0 - k as f64 / last))))
        .collect();
    v.push(hex(s.colour(s.band / 2.0)));
    for k in 0..RAMP_STEPS {
        let m = s.band + (s.hi - s.band) * k as f64 / (RAMP_STEPS - 1) as f64;
        v.push(hex(s.colour(m)));
    }
    v
}

/// The locations drawn as points: every kept one, and the worst that are not kept.
fn drawn(a: &Analysis) -> (Vec<&PointResult>, Vec<usize>) {
    let mut pts: Vec<&PointResult> = a.points().iter().collect();
    let mut first: HashMap<&str, usize> = HashMap::new();
    for (k, p) in pts.iter().enumerate() {
        first.entry(p.input.id.as_str()).or_insert(k);
    }
    let mut worst = Vec::new();
    for p in &a.summary.worst {
        let k = match first.get(p.input.id.as_str()) {
            Some(k) => *k,
            None => {
                pts.push(p);
                first.insert(p.input.id.as_str(), pts.len() - 1);
                pts.len() - 1
            }
        };
        worst.push(k);
    }
    (pts, worst)
}

/// The review page of `a`, the diagram in `measure`.
pub fn review_html(a: &Analysis, measure: StrainMeasure) -> String {
    let (part, second, third) = job_lines(a);
    let title = format!("Review: {part}");
    page(&title, &data(a, measure, &title, [&second, &third]))
}

fn data(a: &Analysis, m: StrainMeasure, title: &str, sub: [&str; 2]) -> String {
    let (pts, worst) = drawn(a);
    let plane = a.summary.view.plane;
    let scale = MarginScale::of(a);
    let word = measure_word(m);
    let unit = a.lengths.unit.name();
    let (u, v) = plane.axes();
    let ((x0, x1), (y0, y1)) = fld::ranges(a, m);

    // Reasons: the distinct texts once, an index per location.
    let mut texts: Vec<String> = Vec::new();
    let mut index: HashMap<String, i64> = HashMap::new();
    let reason_ix: Vec<i64> = pts
        .iter()
        .map(|p| {
            let t = reason_text(p, &a.settings);
            let n = index.len() as i64;
            *index.entry(t.clone()).or_insert_with(|| {
                texts.push(t);
                n
            })
        })
        .collect();
    let reasons: Vec<String> = texts.iter().map(|t| json_str(t)).collect();

    let xy: Vec<(f64, f64)> = pts.iter().map(|p| point_xy(p, m)).collect();
    let at: Vec<Option<(f64, f64)>> = pts.iter().map(|p| plane.coords(p)).collect();
    let mut lines = vec![];
    for pct in fld::THINNING_LINES {
        let name = format!("{pct:.0} % thinning");
        lines.push(line_json(&name, "thinning", &thinning_line(pct, m)));
    }
    for (name, line) in reference_paths(m) {
        lines.push(line_json(name, "reference", &line));
    }
    if let Some(max) = a.settings.max_thinning_pct {
        let name = format!("max thinning {} %", fmt_setting(max));
        lines.push(line_json(&name, "maxThinning", &thinning_line(max, m)));
    }
    lines.push(line_json(&band_label(a, m), "band", &band_line(a, m)));
    lines.push(line_json("limit curve", "curve", &curve_line(a, m)));

    let map = match a.summary.map_extent.filter(|_| a.summary.placed > 0) {
        Some(e) => format!(
            "{{\"extent\":[{},{},{},{}],\"xLabel\":{},\"yLabel\":{}}}",
            json_num(e[0], 4),
            json_num(e[1], 4),
            json_num(e[2], 4),
            json_num(e[3], 4),
            json_str(&format!("{u}, {unit}")),
            json_str(&format!("{v}, {unit}")),
        ),
        None => "null".into(),
    };
    let cells = cells_json(a, m, (x1 - x0).max(y1 - y0), &scale);
    let counts: Vec<String> = a.counts().iter().map(|(_, n)| n.to_string()).collect();
    format!(
        concat!(
            "{{\"kind\":\"check\",\"title\":{title},\"sub\":[{s0},{s1}],\"caution\":{caution},",
            "\"zones\":{zones},\"strokes\":{strokes},\"changeColours\":{cc},",
            "\"fld\":{{\"x\":[{x0},{x1}],\"y\":[{y0},{y1}],\"xLabel\":{xl},\"yLabel\":{yl}}},",
            "\"lines\":[{lines}],\"map\":{map},",
            "\"scale\":{{\"lo\":{lo},\"band\":{band},\"hi\":{hi},\"palette\":[{pal}],\"grey\":\"{grey}\"}},",
            "\"total\":{total},\"complete\":{complete},\"placed\":{placed},\"counts\":[{counts}],",
            "\"unit\":{unit},\"bandPp\":{bandpp},",
            "\"pts\":{{\"n\":{n},\"ids\":{ids},\"zone\":{zone},\"border\":{border},",
            "\"reason\":{reason},\"reasons\":[{reasons}],",
            "\"dx\":{dx},\"dy\":{dy},\"mx\":{mx},\"my\":{my},",
            "\"major\":{major},\"minor\":{minor},\"thin\":{thin},\"margin\":{margin},",
            "\"use\":{use_},\"mc\":{mc}}},",
            "\"worst\":[{worst}],{cells}}}"
        ),
        title = json_str(title),
        s0 = json_str(sub[0]),
        s1 = json_str(sub[1]),
        caution = json_str(neckline_core::CAUTION),
        zones = zones_json(),
        strokes = strokes_json(),
        cc = change_colours_json(),
        x0 = json_num(x0, 3),
        x1 = json_num(x1, 3),
        y0 = json_num(y0, 3),
        y1 = json_num(y1, 3),
        xl = json_str(&format!("minor strain ε2, {word} %")),
        yl = json_str(&format!("major strain ε1, {word} %")),
        lines = lines.join(","),
        map = map,
        lo = json_num(scale.lo, 3),
        band = json_num(scale.band, 3),
        hi = json_num(scale.hi, 3),
        pal = palette(&scale)
            .iter()
            .map(|c| format!("\"{c}\""))
            .collect::<Vec<_>>()
            .join(","),
        grey = hex(crate::plot::palette::GREY),
        total = a.total(),
        complete = a.summary.complete,
        placed = a.summary.placed,
        counts = counts.join(","),
        unit = json_str(unit),
        bandpp = json_num(a.settings.margin_pct, 3),
        n = pts.len(),
        ids = ids_column(pts.iter().map(|p| p.input.id.as_str())),
        zone = u8_column(pts.iter().map(|p| p.zone() as u8)),
        border = u8_column(pts.iter().map(|p| u8::from(p.judgement.borderline))),
        reason = i32_column(reason_ix),
        reasons = reasons.join(","),
        dx = f32_column(xy.iter().map(|p| Some(p.0))),
        dy = f32_column(xy.iter().map(|p| Some(p.1))),
        mx = f32_column(at.iter().map(|p| p.map(|q| q.0))),
        my = f32_column(at.iter().map(|p| p.map(|q| q.1))),
        major = f32_column(pts.iter().map(|p| Some(p.strain.eng.major.percent()))),
        minor = f32_column(pts.iter().map(|p| Some(p.strain.eng.minor.percent()))),
        thin = f32_column(pts.iter().map(|p| Some(p.strain.thinning * 100.0))),
        margin = f32_column(pts.iter().map(|p| p.judgement.margin_pct)),
        use_ = f32_column(pts.iter().map(|p| p.judgement.limit_use_pct)),
        mc = u8_column(pts.iter().map(|p| colour_index(map_margin(p), &scale))),
        worst = worst
            .iter()
            .map(|k| k.to_string())
            .collect::<Vec<_>>()
            .join(","),
        cells = cells,
    )
}

/// The density cells of a file too large to draw every location: per diagram cell the
/// locations of each zone, per map cell the count, the worst zone and the colour of the worst
/// margin. `"density":null,"cells":null` while every location is a point.
fn cells_json(a: &Analysis, m: StrainMeasure, span: f64, scale: &MarginScale) -> String {
    if a.summary.complete || a.summary.view.measure != m {
        return "\"density\":null,\"cells\":null".into();
    }
    let mut d = a.summary.density.clone();
    d.coarsen_to(span, FINE_CELLS);
    let mut dk: Vec<(&(i64, i64), _)> = d.cells().iter().collect();
    dk.sort_by_key(|(k, _)| **k);
    let density = format!(
        "{{\"size\":{},\"i\":{},\"j\":{},\"c\":{}}}",
        json_num(d.size(), 6),
        i32_column(dk.iter().map(|(k, _)| k.0)),
        i32_column(dk.iter().map(|(k, _)| k.1)),
        i32_column(dk.iter().flat_map(|(_, c)| c.0.map(i64::from))),
    );
    let cells = match a.summary.map_extent.filter(|_| a.summary.placed > 0) {
        Some(e) => {
            let mut b = a.summary.map.clone();
            b.coarsen_to((e[2] - e[0]).max(e[3] - e[1]), FINE_CELLS);
            let mut mk: Vec<(&(i64, i64), _)> = b.cells().iter().collect();
            mk.sort_by_key(|(k, _)| **k);
            format!(
                "{{\"size\":{},\"i\":{},\"j\":{},\"n\":{},\"zone\":{},\"mc\":{}}}",
                json_num(b.size(), 6),
                i32_column(mk.iter().map(|(k, _)| k.0)),
                i32_column(mk.iter().map(|(k, _)| k.1)),
                i32_column(mk.iter().map(|(_, c)| i64::from(c.n))),
                u8_column(mk.iter().map(|(_, c)| c.zone as u8)),
                u8_column(
                    mk.iter()
                        .map(|(_, c)| colour_index(c.margin.map(f64::from), scale))
                ),
            )
        }
        None => "null".into(),
    };
    format!("\"density\":{density},\"cells\":{cells}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use neckline_core::assess::Zone;
    use neckline_core::output::fixture;

    #[test]
    fn colour_index_follows_the_static_scale() {
        let s = MarginScale {
            lo: -5.0,
            band: 10.0,
            hi: 30.0,
        };
        let pal = palette(&s);
        // The same colour as the static map for a margin past the curve (on a step of the
        // failed ramp), on the curve, in the band, at the band's edge and far beyond it.
        for m in [-6.0, -5.0, -3.0, -0.25, 0.0, 4.0, 10.0, 30.0, 45.0] {
            let k = colour_index(Some(m), &s) as usize;
            assert_eq!(pal[k], hex(s.colour(m)), "margin {m}");
        }
        assert_eq!(colour_index(None, &s), 255);
        // Ordered: a smaller margin never has a larger index.
        let ks: Vec<u8> = (-10..40)
            .map(|m| colour_index(Some(m as f64), &s))
            .collect();
        assert!(ks.windows(2).all(|w| w[0] <= w[1]));
    }

    #[test]
    fn page_holds_every_location_and_the_zone_code() {
        let a = fixture::analysis(true);
        let html = review_html(&a, StrainMeasure::Engineering);
        assert!(html.contains(&format!("\"n\":{}", a.points().len())));
        for p in a.points() {
            assert!(html.contains(&p.input.id), "{}", p.input.id);
        }
        for z in Zone::ALL {
            assert!(html.contains(&hex(crate::plot::zone_colour(z))));
        }
        assert!(html.contains("\"density\":null"));
        assert!(html.contains("Content-Security-Policy"));
        assert!(!html.contains("http://") && !html.contains("https://"));
    }
}
