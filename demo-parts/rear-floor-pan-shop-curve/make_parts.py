#!/usr/bin/env python3
"""Writes the invented circles read on split tryout parts of the rear floor pan (run from this
folder): parts.csv and job.toml.

Everything here is invented for the demo: the company, the part, the die, the material lot and
every reading. Five split tryout parts of RFP-2207 in coil K-4417 (invented) were, in this made-up
story, gridded with 2.5 mm circles; at every neck the circles across and beside it were read and
marked safe, necked or split by eye and finger.

How the readings are made: the coil's "true" limit is the invented lab curve of the demo
(../../limits/demo-tabulated-invented.toml, engineering strain, linear between its points). Each
neck site has a straight strain path (a strain ratio beta = eps2/eps1 in true strain); its
circles lie along that path at r = 0.72 to 1.18 times the distance from the origin to the
curve. A circle is marked necked when r times a part-to-part and eye-and-finger scatter
(normal, 5 %) exceeds 1, split beyond 1.07; a circle beside a neck has its path ratio
scattered by 0.04. The axes are d0 * exp(eps) with a reading noise of 0.005 mm, rounded to the
0.01 mm a measuring microscope shows. A few circles were read but not marked (empty condition).
Standard library only; a fixed seed makes the same file every time.
"""
import math
import random

D0 = 2.5  # mm
SEED = 4417

# The invented lab curve of coil K-4417: [minor, major] engineering percent.
LAB = [(-35.0, 72.0), (-25.0, 55.0), (-15.0, 43.0), (-5.0, 35.5), (0.0, 33.0),
       (5.0, 34.5), (10.0, 37.0), (20.0, 42.0), (30.0, 46.0)]

# Neck sites: (part, code, site, strain ratio beta of the path, circles read there).
SITES = [
    (1, "LC", "LH front corner", -0.42, 14),
    (1, "RC", "RH front corner", -0.35, 12),
    (2, "FW", "front wall", -0.22, 12),
    (2, "SW", "side wall", -0.12, 12),
    (3, "TF", "tunnel flank", -0.04, 12),
    (3, "TT", "tunnel top", 0.02, 12),
    (4, "WR", "spare-wheel well rim", 0.12, 12),
    (4, "WF", "spare-wheel well floor", 0.25, 12),
    (5, "DO", "dome", 0.42, 12),
]


def lab_major_eng(minor_eng):
    """The lab curve's engineering major strain at an engineering minor strain (fractions);
    beyond its ends the end pieces go on straight (only the bisection below looks there)."""
    m = 100.0 * minor_eng
    pieces = list(zip(LAB, LAB[1:]))
    for (x0, y0), (x1, y1) in pieces:
        if m <= x1 or (x1, y1) == LAB[-1]:
            if m >= x0 or (x0, y0) == LAB[0]:
                return (y0 + (y1 - y0) * (m - x0) / (x1 - x0)) / 100.0
    raise AssertionError("unreachable")


def limit_on_path(beta):
    """True major strain where the path eps2 = beta * eps1 meets the lab curve (bisection)."""
    lo, hi = 0.01, 1.5
    for _ in range(80):
        e1 = 0.5 * (lo + hi)
        above = math.exp(e1) - 1 > lab_major_eng(math.exp(beta * e1) - 1)
        lo, hi = (lo, e1) if above else (e1, hi)
    return 0.5 * (lo + hi)


def main():
    rng = random.Random(SEED)
    rows = []
    for part, code, site, beta, n in SITES:
        for k in range(n):
            r = 0.72 + 0.46 * k / (n - 1)
            b = beta + rng.gauss(0, 0.04)
            e1 = r * limit_on_path(b)
            e2 = b * e1
            seen = r * (1 + rng.gauss(0, 0.05))
            condition = "split" if seen > 1.07 else "necked" if seen > 1.0 else "safe"
            if rng.random() < 0.05:
                condition = ""  # read, not marked
            d1 = round(D0 * math.exp(e1) + rng.gauss(0, 0.005), 2)
            d2 = round(D0 * math.exp(e2) + rng.gauss(0, 0.005), 2)
            major, minor = max(d1, d2), min(d1, d2)
            rows.append((f"P{part}-{code}{k + 1:02d}", major, minor, condition,
                         f"part {part}: {site}"))
    with open("parts.csv", "w") as f:
        f.write("# INVENTED DEMO DATA: circles read on split tryout parts of RFP-2207 (invented),\n")
        f.write("# coil K-4417 (invented), Kestrel Ridge Stampings (invented). Made by make_parts.py.\n")
        f.write("id,major,minor,condition,note\n")
        for pid, major, minor, condition, note in rows:
            f.write(f"{pid},{major:.2f},{minor:.2f},{condition},{note}\n")


if __name__ == "__main__":
    main()
