#!/usr/bin/env python3
"""Writes the invented demo tryouts of the rear floor pan (run from this folder).

Everything here is invented for the demo: the company, the part, the die, the material lot and
every reading. The strain field is a made-up smooth function of position on the pan (low stretch
on the bottom, plane strain on the walls, drawing in the corners, thickening in the flange) with
reading noise, rounded to the 0.01 mm a measuring microscope shows. Tryout 2 follows an invented
die rework (larger corner radii, changed lubrication) that lowers the corner strains.
"""
import math
import random

D0 = 2.5  # mm, circle diameter of the etched grid
COLS = "ABCDEFGHIJKL"  # 12 columns across the pan's length
ROWS = 10  # rows across its width
LENGTH, WIDTH = 620.0, 420.0  # mm, flat-blank extent of the gridded area


def strains(u, v, corner_relief):
    """(major, minor) engineering strain at normalised position u, v in [-1, 1]."""
    w = max(abs(u), abs(v))  # 0 at the centre of the bottom, 1 at the flange edge
    c = (abs(u) * abs(v)) ** 1.5  # near 1 only in the corners
    if w < 0.4:  # bottom of the pan: little stretch
        e1 = 0.006 + 0.05 * w
        e2 = 0.003 + 0.03 * w
    elif w < 0.9:  # walls: near plane strain, drawing toward the corners
        s = (w - 0.4) / 0.5
        e1 = 0.08 + 0.16 * s + (0.30 - corner_relief) * c
        e2 = 0.015 - 0.025 * s - (0.14 - 0.5 * corner_relief) * c
    else:  # flange: drawn in, thickening away from the corners
        e1 = 0.05 + 0.03 * (1 - c) + (0.54 - 1.4 * corner_relief) * c
        e2 = -0.09 - 0.06 * (1 - c) - 0.04 * c
    return e1, e2


def write(path, corner_relief, seed, note_rows):
    rng = random.Random(seed)
    with open(path, "w") as f:
        f.write("# INVENTED DEMO DATA: Kestrel Ridge Stampings (invented), part RFP-2207 (invented)\n")
        f.write("id,major,minor,x,y,stage,note\n")
        for i, col in enumerate(COLS):
            for j in range(ROWS):
                u = -1 + 2 * i / (len(COLS) - 1)
                v = -1 + 2 * j / (ROWS - 1)
                e1, e2 = strains(u, v, corner_relief)
                e1 += rng.gauss(0, 0.008)
                e2 += rng.gauss(0, 0.006)
                d1, d2 = D0 * (1 + e1), D0 * (1 + e2)
                major, minor = max(d1, d2), min(d1, d2)
                x = (u + 1) / 2 * LENGTH
                y = (v + 1) / 2 * WIDTH
                pid = f"{col}{j + 1:02d}"
                note = note_rows.get(pid, "")
                f.write(f"{pid},{major:.2f},{minor:.2f},{x:.1f},{y:.1f},draw,{note}\n")


write("tryout-1.csv", 0.0, 2207, {"A01": "neck visible at corner radius", "L10": "split on 2 of 5 parts"})
write("tryout-2.csv", 0.09, 2208, {"A01": "after corner radius rework", "L10": "after corner radius rework"})
