"""Baseline for `cargo bench --bench check`: the same job as `neckline check --format csv` done
with polars (and numpy for the curve look-ups), so the two can be timed on the same file in the
same run. Reads a measurement CSV (id, major, minor, d0, x, y), computes every strain column,
interpolates the limit curve at each minor strain, the vertical margin, the limit use along the
point's straight path, the zone, and writes a CSV.

Usage: python3 polars_check.py IN.csv CURVE_OWN.csv CURVE_TRUE.csv OUT.csv
CURVE_OWN.csv: minor,major of the curve in engineering strain (fractions);
CURVE_TRUE.csv: the same curve as a true-strain polyline (fractions).
"""
import sys

import numpy as np
import polars as pl

BAND = 10.0  # pp
LOW = 2.0  # %


def main(inp, own_path, true_path, out):
    own = np.loadtxt(own_path, delimiter=",", ndmin=2)
    tru = np.loadtxt(true_path, delimiter=",", ndmin=2)
    df = pl.read_csv(inp)
    l1 = df["major"] / df["d0"]
    l2 = df["minor"] / df["d0"]
    e1, e2 = l1 - 1.0, l2 - 1.0
    t1, t2 = l1.log(), l2.log()
    t3 = -(t1 + t2)
    out_df = pl.DataFrame(
        {
            "id": df["id"],
            "major_eng_pct": e1 * 100,
            "minor_eng_pct": e2 * 100,
            "major_true_pct": t1 * 100,
            "minor_true_pct": t2 * 100,
            "thickness_true_pct": t3 * 100,
            "thinning_pct": (1.0 - t3.exp()) * 100,
            "major_green_pct": (l1 * l1 - 1.0) / 2 * 100,
            "minor_green_pct": (l2 * l2 - 1.0) / 2 * 100,
            "major_almansi_pct": (1.0 - 1.0 / (l1 * l1)) / 2 * 100,
            "minor_almansi_pct": (1.0 - 1.0 / (l2 * l2)) / 2 * 100,
            "beta": t2 / t1,
            "effective_true_pct": 2.0 / np.sqrt(3.0) * (t1 * t1 + t1 * t2 + t2 * t2).sqrt() * 100,
        }
    )
    # Limit at the point's minor strain, in the curve's own (engineering) measure.
    e2n = e2.to_numpy()
    inside = (e2n >= own[0, 0]) & (e2n <= own[-1, 0])
    lim = np.where(inside, np.interp(e2n, own[:, 0], own[:, 1]), np.nan)
    margin = (lim - e1.to_numpy()) * 100
    # Limit use: the ray from the origin through the point meets the star-shaped true-strain
    # polyline in the segment whose end angles bracket the point's angle.
    px, py = t2.to_numpy(), t1.to_numpy()
    ang = np.arctan2(py, px)
    vang = np.arctan2(tru[:, 1], tru[:, 0])
    order = np.argsort(-vang)
    i = np.clip(np.searchsorted(-vang[order], -ang), 1, len(tru) - 1)
    p, q = tru[order][i - 1], tru[order][i]
    ex, ey = q[:, 0] - p[:, 0], q[:, 1] - p[:, 1]
    den = px * ey - py * ex
    with np.errstate(divide="ignore", invalid="ignore"):
        s = (p[:, 0] * ey - p[:, 1] * ex) / den
    use = np.where(inside, 100.0 / s, np.nan)
    out_df = out_df.with_columns(
        pl.Series("limit_major_eng_pct", lim * 100),
        pl.Series("margin_pct", margin),
        pl.Series("limit_use_pct", use),
    )
    zone = (
        pl.when(pl.col("margin_pct").is_nan())
        .then(pl.lit("uncovered"))
        .when(pl.col("margin_pct") <= 0)
        .then(pl.lit("failed"))
        .when(pl.col("margin_pct") < BAND)
        .then(pl.lit("marginal"))
        .when(pl.col("major_true_pct") + pl.col("minor_true_pct") < 0)
        .then(pl.lit("thickening"))
        .when(pl.col("major_eng_pct") < LOW)
        .then(pl.lit("low-stretch"))
        .otherwise(pl.lit("safe"))
    )
    out_df = out_df.with_columns(zone.alias("zone"), df["d0"], df["x"], df["y"])
    out_df.write_csv(out, float_precision=3)
    print(out_df["zone"].value_counts().sort("zone"))


if __name__ == "__main__":
    main(*sys.argv[1:5])
