#!/usr/bin/env python3
"""Writes the invented two-stage demo (run from this folder): a bracket drawn, then restruck.

Everything here is invented for the demo: the company, the part, the dies and every reading.
The same 48 circles (d0 2.5 mm) are read after the draw and again after the restrike. The draw
stretches the bracket's crown nearly equibiaxially; the restrike then pulls its corners in plane
strain. Each stage's axes are totals from the original circle, rounded to the 0.01 mm a
measuring microscope shows. Corner C1 follows the textbook bent path (equibiaxial to true
strains 0.10/0.10, then plane strain to 0.25/0.10): safe on the strain curve, past its limit
along the path.
"""
import math
import random

D0 = 2.5
ROWS, COLS = 6, 8
PITCH = 25.0  # mm between read circles


def field(u, v):
    """Draw and restrike true strains (minor, major) at normalised position u, v in [0, 1]."""
    crown = math.exp(-((u - 0.5) ** 2 + (v - 0.5) ** 2) / 0.08)
    corner = max(0.0, 1 - 4 * min(u, 1 - u)) * max(0.0, 1 - 4 * min(v, 1 - v))
    draw = (0.02 + 0.07 * crown + 0.08 * corner, 0.03 + 0.07 * crown + 0.08 * corner)
    restrike = (draw[0], draw[1] + 0.02 + 0.13 * corner + 0.03 * crown)
    return draw, restrike


def axes(minor, major):
    return D0 * math.exp(major), D0 * math.exp(minor)


def main():
    rng = random.Random(2026)
    rows = {"draw": [], "restrike": []}
    for r in range(ROWS):
        for c in range(COLS):
            cid = f"{'ABCDEF'[r]}{c + 1}"
            u, v = c / (COLS - 1), r / (ROWS - 1)
            draw, restrike = field(u, v)
            note = ""
            if cid == "A1":
                # The bent path of the worked example, at the corner nearest the restrike flange.
                draw, restrike = (0.10, 0.10), (0.10, 0.25)
                note = "corner by the restrike flange"
            for stage, (e2, e1) in (("draw", draw), ("restrike", restrike)):
                noise = (rng.gauss(0, 0.003), rng.gauss(0, 0.003)) if note == "" else (0, 0)
                d1, d2 = axes(e2 + noise[0], e1 + noise[1])
                d1, d2 = max(d1, d2), min(d1, d2)
                rows[stage].append(f"{cid},{stage},{d1:.2f},{d2:.2f},{c * PITCH:.1f},{r * PITCH:.1f},{note}")
    with open("bracket.csv", "w") as f:
        f.write("# INVENTED DEMO DATA: Kestrel Ridge Stampings (invented), bracket TB-40 (invented), draw then restrike\n")
        f.write("id,stage,major,minor,x,y,note\n")
        # Read in the order the parts came back: restrike rows first.
        for stage in ("restrike", "draw"):
            f.write("\n".join(rows[stage]) + "\n")
    print("wrote bracket.csv")


if __name__ == "__main__":
    main()
