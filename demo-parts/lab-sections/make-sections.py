#!/usr/bin/env python3
"""Write sections.csv: an INVENTED laboratory test series for `neckline limit from-sections`.

Five specimen geometries (Nakajima widths 20, 50, 90, 125 and 200 mm, invented), three
specimens each, three section lines across the crack on each specimen: 45 strain profiles along
60 mm lines at 0.5 mm spacing, true strain in percent, as an optical system might export them.
No real material, laboratory or measurement is behind these numbers.

Each profile is the shape the position-dependent method of ISO 12004-2 assumes beside the neck:
an inverse parabola  e1(u) = 1 / (a u^2 + 1/E1)  falling to 70 % of its apex 10 mm from the
crack, the minor strain  e2(u) = (E2/E1) e1(u),  plus a sharp neck (a tent 10 points high and
1.5 mm wide each side, major strain only) and a gap of missing points within 0.6 mm of the crack
(where it opened). Noise: Gaussian, 0.15 points standard deviation. The specimens of a geometry
lie 0.4 points below, at and above its limit, so each geometry's true mean limit is exactly
TRUE_LIMITS below. Standard library only; a fixed seed makes the file reproducible.

    python3 make-sections.py            # writes sections.csv beside this script
"""

import math
import os
import random

# geometry (invented Nakajima width, mm) -> true limit strains (minor, major), true %.
TRUE_LIMITS = {
    "20": (-18.0, 42.0),
    "50": (-9.0, 33.0),
    "90": (0.8, 27.5),
    "125": (10.0, 30.0),
    "200": (24.0, 33.0),
}
SPECIMEN_OFFSETS = {"1": -0.4, "2": 0.0, "3": 0.4}
SECTIONS = ["a", "b", "c"]
NOISE_PCT = 0.15
NECK_PCT = 10.0
NECK_HALF_MM = 1.5
GAP_MM = 0.6
SPACING_MM = 0.5
LENGTH_MM = 60.0


def main():
    rng = random.Random(12004)
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "sections.csv")
    lines = [
        "# INVENTED test series for neckline limit from-sections: no real material, lab or "
        "measurement. Made by make-sections.py.",
        "geometry,specimen,section,position_mm,major_true_pct,minor_true_pct",
    ]
    for geometry, (e2_true, e1_true) in TRUE_LIMITS.items():
        for specimen, offset in SPECIMEN_OFFSETS.items():
            e1 = e1_true + offset
            e2 = e2_true + offset * e2_true / e1_true
            beta = e2 / e1
            a = (1.0 / (0.7 * e1) - 1.0 / e1) / 100.0
            for section in SECTIONS:
                crack = 30.0 + rng.uniform(-1.0, 1.0)
                n = int(round(LENGTH_MM / SPACING_MM))
                for i in range(n + 1):
                    x = i * SPACING_MM
                    u = x - crack
                    row = f"{geometry},{specimen},{section},{x:.1f}"
                    if abs(u) < GAP_MM:
                        lines.append(row + ",,")
                        continue
                    base = 1.0 / (a * u * u + 1.0 / e1)
                    neck = NECK_PCT * max(0.0, 1.0 - abs(u) / NECK_HALF_MM)
                    major = base + neck + rng.gauss(0.0, NOISE_PCT)
                    minor = beta * base + rng.gauss(0.0, NOISE_PCT)
                    if minor > major:
                        minor, major = major, minor
                    lines.append(f"{row},{major:.3f},{minor:.3f}")
    with open(out, "w", newline="\n") as f:
        f.write("\n".join(lines) + "\n")
    print(f"wrote {out}: {len(lines) - 2} rows")


if __name__ == "__main__":
    main()
