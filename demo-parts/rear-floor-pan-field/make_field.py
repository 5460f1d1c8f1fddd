#!/usr/bin/env python3
"""Writes an invented full-field strain export of the demo rear floor pan (run from this folder).

Everything here is invented for the demo: the company, the part, the measuring set-up and every
value. It stands for what an optical measuring system exports after a tryout: one row per
measured point with its position on the formed part (x, y, z) and the major and minor strain in
true percent, plus the thickness reduction, under headers of the export's own (mapped onto
neckline's column names by [columns] in job.toml). The strain field is the same made-up smooth
function of position as the hand-read tryout 1 of ../rear-floor-pan (low stretch on the bottom,
plane strain on the walls, drawing in the corners, thickening in the flange), sampled on a
3 mm point grid, with measuring noise of about 0.4 % strain and a few holes where the pattern
was lost, as real exports have. It also writes outline.csv, the part's trim line (named by
`outline` in job.toml, drawn on the map).
"""
import math
import random

LENGTH, WIDTH, DEPTH = 620.0, 420.0, 85.0  # mm, pan extent and draw depth
STEP = 3.0  # mm between points
SEED = 2207


def strains(u, v):
    """(major, minor) engineering strain at normalised position u, v in [-1, 1]."""
    w = max(abs(u), abs(v))
    c = (abs(u) * abs(v)) ** 1.5
    if w < 0.4:
        return 0.006 + 0.05 * w, 0.003 + 0.03 * w
    if w < 0.9:
        s = (w - 0.4) / 0.5
        return 0.08 + 0.16 * s + 0.30 * c, 0.015 - 0.025 * s - 0.14 * c
    return 0.05 + 0.03 * (1 - c) + 0.54 * c, -0.09 - 0.06 * (1 - c) - 0.04 * c


def depth(u, v):
    """Height of the formed surface: the bottom at -DEPTH, walls rising to the flange at 0."""
    w = max(abs(u), abs(v))
    if w < 0.4:
        return -DEPTH
    if w < 0.9:
        return -DEPTH * (1 - (w - 0.4) / 0.5)
    return 0.0


def main():
    rng = random.Random(SEED)
    rows = 0
    with open("field-t1.csv", "w") as f:
        f.write("# INVENTED DEMO DATA: full-field export of part RFP-2207 (invented), tryout T1\n")
        f.write("Point;X [mm];Y [mm];Z [mm];Major strain [%];Minor strain [%];Thickness reduction [%]\n")
        nx, ny = int(LENGTH / STEP), int(WIDTH / STEP)
        for j in range(ny + 1):
            for i in range(nx + 1):
                x, y = i * STEP - LENGTH / 2, j * STEP - WIDTH / 2
                u, v = 2 * x / LENGTH, 2 * y / WIDTH
                # Pattern lost in a few spots (glare on the corner radii).
                if rng.random() < 0.01:
                    continue
                e1, e2 = strains(u, v)
                t1 = math.log1p(e1) + rng.gauss(0, 0.004)
                t2 = math.log1p(e2) + rng.gauss(0, 0.004)
                t1, t2 = max(t1, t2), min(t1, t2)
                thinning = (1 - math.exp(-(t1 + t2))) + rng.gauss(0, 0.005)
                rows += 1
                # A semicolon export with decimal commas, as some European set-ups write.
                vals = [f"{x:.2f}", f"{y:.2f}", f"{depth(u, v):.2f}", f"{100 * t1:.2f}",
                        f"{100 * t2:.2f}", f"{100 * thinning:.2f}"]
                f.write(f"{rows};" + ";".join(s.replace(".", ",") for s in vals) + "\n")
    print(f"wrote field-t1.csv: {rows} points")
    write_outline()


TRIM = (318.0, 218.0, 25.0)  # mm: half length and half width of the trimmed flange, corner radius


def write_outline():
    """The part's trim line (the flange's outer edge) as one closed ring, for the map: a
    rectangle with rounded corners 8 mm outside the outermost measured points."""
    hx, hy, r = TRIM
    corners = [(hx - r, hy - r, 0), (-hx + r, hy - r, 90), (-hx + r, -hy + r, 180),
               (hx - r, -hy + r, 270)]
    with open("outline.csv", "w") as f:
        f.write("ring,x,y\n")
        for cx, cy, start in corners:
            for k in range(7):
                a = math.radians(start + 15 * k)
                f.write(f"trim,{cx + r * math.cos(a):.2f},{cy + r * math.sin(a):.2f}\n")
    print("wrote outline.csv: the trim line")


if __name__ == "__main__":
    main()
