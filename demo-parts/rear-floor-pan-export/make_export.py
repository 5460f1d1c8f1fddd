#!/usr/bin/env python3
"""Write an invented optical-system export of the rear floor pan's first tryout.

INVENTED DEMO DATA. The strains are those of ../rear-floor-pan/tryout-1.csv (true strain,
ln(d / d0) with d0 = 2.5 mm, in percent), written as a measuring system's export on a Windows
PC would hand them over: Windows line ends (CRLF), Windows-1252 text, a preamble of metadata
lines before the header, a row of units under it, a validity column with some points flagged
not valid, and some points with empty strain cells (the camera lost the pattern there).
Semicolons between fields and decimal commas, as a Western-European spreadsheet writes them.

Run from this folder: python3 make_export.py
"""

import csv
import math
import os

HERE = os.path.dirname(os.path.abspath(__file__))
SOURCE = os.path.join(HERE, "..", "rear-floor-pan", "tryout-1.csv")
D0 = 2.5
# Rows (by position in the tryout) the invented export marks not valid, and rows it left empty.
NOT_VALID = {5, 17, 29}
EMPTY = {11, 23}


def comma(v, decimals):
    return f"{v:.{decimals}f}".replace(".", ",")


def main():
    with open(SOURCE, newline="", encoding="utf-8") as f:
        rows = [r for r in csv.reader(line for line in f if not line.startswith("#"))]
    header, body = rows[0], rows[1:]
    col = {name: i for i, name in enumerate(header)}
    lines = [
        "Project: RFP-2207 rear floor pan, LH (invented)",
        "Tryout: T1",
        "Date: 2026-11-24",
        "Operator: Tryout metrology team (invented)",
        "System: optical grid analysis (invented export)",
        "",
        "Point;X;Y;Major strain;Minor strain;Valid;Remark",
        ";mm;mm;%;%;-;",
    ]
    for k, r in enumerate(body):
        major = float(r[col["major"]])
        minor = float(r[col["minor"]])
        e1 = 100 * math.log(major / D0)
        e2 = 100 * math.log(minor / D0)
        x, y = float(r[col["x"]]), float(r[col["y"]])
        note = r[col["note"]]
        valid = "0" if k in NOT_VALID else "1"
        if k in NOT_VALID:
            note = "Glanzstelle, Muster unscharf"  # glare, pattern blurred
        s1, s2 = comma(e1, 2), comma(e2, 2)
        if k in EMPTY:
            s1 = s2 = ""
            note = "Muster verloren (Öl)"  # pattern lost (oil): a non-ASCII character
        lines.append(";".join([r[col["id"]], comma(x, 1), comma(y, 1), s1, s2, valid, note]))
    text = "\r\n".join(lines) + "\r\n"
    with open(os.path.join(HERE, "tryout-1-export.csv"), "wb") as f:
        f.write(text.encode("cp1252"))


if __name__ == "__main__":
    main()
