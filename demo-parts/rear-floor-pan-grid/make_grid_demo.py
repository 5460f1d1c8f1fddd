#!/usr/bin/env python3
"""Make the invented grid demo: node positions of a square grid on the flat blank and on the
formed spare-wheel well of an invented rear floor pan, and outline points of etched circles.

Everything here is INVENTED: a smooth, deterministic deformation chosen to look like a shallow
drawn well (a dome-shaped depression with drawing-in from the flange and a tighter corner at the
upper right). It is not a forming simulation. Run: python3 make_grid_demo.py (no packages needed).
"""
import math

PITCH = 5.0            # grid pitch on the blank, mm
ROWS, COLS = 17, 25    # 425 nodes: 16 x 24 = 384 cells
XC, YC = 60.0, 40.0    # centre of the well on the blank, mm
DEPTH = 18.0           # depth of the well, mm


def bump(x, y, cx, cy, sx, sy):
    return math.exp(-((x - cx) ** 2 / (2 * sx * sx) + (y - cy) ** 2 / (2 * sy * sy)))


def formed(X, Y):
    """Blank point (X, Y) -> formed point (x, y, z), mm."""
    g = bump(X, Y, XC, YC, 30.0, 22.0)
    hot = bump(X, Y, 92.0, 62.0, 9.0, 7.0)   # the tight corner of the well
    # drawing-in towards the well: material moves inwards, more where the wall is steep
    u = -0.05 * (X - XC) * g + 1.9 * hot
    v = -0.04 * (Y - YC) * g + 1.2 * hot
    z = -DEPTH * g - 9.0 * hot
    return X + u, Y + v, z


def gradient(X, Y, h=1e-4):
    """3x2 deformation gradient by central differences: columns d(x)/dX, d(x)/dY."""
    a, b = formed(X + h, Y), formed(X - h, Y)
    c, d = formed(X, Y + h), formed(X, Y - h)
    return [[(a[i] - b[i]) / (2 * h), (c[i] - d[i]) / (2 * h)] for i in range(3)]


def in_plane(F):
    """2x2 gradient in the tangent frame t1 = F e1/|F e1|, t2 = n x t1 (as neckline does)."""
    f1 = [F[i][0] for i in range(3)]
    f2 = [F[i][1] for i in range(3)]
    n1 = math.sqrt(sum(v * v for v in f1))
    t1 = [v / n1 for v in f1]
    n = [f1[1] * f2[2] - f1[2] * f2[1], f1[2] * f2[0] - f1[0] * f2[2], f1[0] * f2[1] - f1[1] * f2[0]]
    nn = math.sqrt(sum(v * v for v in n))
    n = [v / nn for v in n]
    t2 = [n[1] * t1[2] - n[2] * t1[1], n[2] * t1[0] - n[0] * t1[2], n[0] * t1[1] - n[1] * t1[0]]
    dot = lambda a, b: sum(p * q for p, q in zip(a, b))
    return [[dot(t1, f1), dot(t1, f2)], [dot(t2, f1), dot(t2, f2)]]


def noise(k, amp):
    """Small deterministic 'reading noise' (no random numbers: the files are reproducible)."""
    return amp * math.sin(12.9898 * k + 78.233 * math.sin(k))


def write_nodes(path):
    with open(path, "w") as f:
        f.write("# INVENTED demo: square grid, 5 mm pitch, blank (X, Y) and formed part (x, y, z), mm\n")
        f.write("row,col,X,Y,x,y,z\n")
        k = 0
        for r in range(ROWS):
            for c in range(COLS):
                X, Y = c * PITCH, r * PITCH
                x, y, z = formed(X, Y)
                k += 1
                # optical reading noise on the formed positions, +-0.003 mm
                x += noise(k, 0.003)
                y += noise(k + 0.5, 0.003)
                z += noise(k + 0.25, 0.003)
                f.write(f"{r},{c},{X:.3f},{Y:.3f},{x:.4f},{y:.4f},{z:.4f}\n")


def singular_values(F):
    """Singular values of a 2x2 matrix: square roots of the eigenvalues of F^T F."""
    a = F[0][0] ** 2 + F[1][0] ** 2
    b = F[0][0] * F[0][1] + F[1][0] * F[1][1]
    c = F[0][1] ** 2 + F[1][1] ** 2
    m, d = (a + c) / 2, math.sqrt(((a - c) / 2) ** 2 + b * b)
    return math.sqrt(m + d), math.sqrt(max(m - d, 0.0))


def write_outlines(path, exact_path, d0=2.5, n_points=16):
    """Outline points of etched circles (d0 = 2.5 mm) at 36 places, photographed square to the
    surface: the circle mapped by the in-plane gradient, placed at the formed plan position."""
    with open(path, "w") as f, open(exact_path, "w") as g:
        f.write("# INVENTED demo: points digitised along etched 2.5 mm circles, mm\n")
        f.write("id,x,y\n")
        g.write("# the axes each outline would have without reading noise: d0 x singular values of F\n")
        g.write("id,major,minor\n")
        k = 0
        for i in range(6):
            for j in range(6):
                X, Y = 12.5 + 19.0 * j, 7.5 + 13.0 * i
                if i == 4 and j == 4:
                    X, Y = 92.0, 62.0   # the middle of the tight corner (E55)
                Fh = in_plane(gradient(X, Y))
                x0, y0, _ = formed(X, Y)
                cid = f"E{i + 1}{j + 1}"
                s1, s2 = singular_values(Fh)
                g.write(f"{cid},{d0 * s1:.6f},{d0 * s2:.6f}\n")
                for p in range(n_points):
                    t = 2 * math.pi * p / n_points
                    cx, cy = 0.5 * d0 * math.cos(t), 0.5 * d0 * math.sin(t)
                    k += 1
                    px = x0 + Fh[0][0] * cx + Fh[0][1] * cy + noise(k, 0.004)
                    py = y0 + Fh[1][0] * cx + Fh[1][1] * cy + noise(k + 0.5, 0.004)
                    f.write(f"{cid},{px:.4f},{py:.4f}\n")


if __name__ == "__main__":
    write_nodes("nodes.csv")
    write_outlines("outlines.csv", "outlines-exact.csv")
