#!/usr/bin/python3
"""Regenerates voronoi.json, exact Voronoi-area density compensation for the
Pipe-Menon test of dcf_test.go.

Made with Debian python3-scipy 1.10.1 (scipy.spatial.Voronoi, Qhull) and
python3-numpy 1.24.2, run as
    /usr/bin/python3 make_voronoi_fixture.py > voronoi.json
from this directory.

Two small trajectories for a 32x32 image (k in cycles per FOV), both inside
the disc |k| <= 12 so that no kernel reaches the band edge at |k| = 16:

  spiral     6 interleaves of a variable-density Archimedean spiral whose gap
             between neighbouring arms grows from 1 cycle/FOV at the centre to
             1.6 at the edge, sampled every 0.4 cycle/FOV of arc length;
  sunflower  M = 700 points of a variable-density phyllotaxis pattern,
             r_n = 12 ((n + 1/2)/M)^0.7, turned by the golden angle
             360 (1 - 1/phi) degrees per point (denser towards the centre).

Each point's weight is the area of its Voronoi cell. To bound the cells of
the outermost points, a guard ring of points at radius 12 + 1 (0.5 apart) is
added; it closes the outer cells between the outermost points and the
ring. The guard points are not written, and the test compares only points
well inside (|k| <= 10). Cells are convex, so each is ordered by angle around its centroid
and measured with the shoelace formula.
"""
import json
import math
import sys

import numpy as np
from scipy.spatial import Voronoi

RMAX = 12.0
GUARD = 1.0


def spiral():
    pts = [(0.0, 0.0)]  # the centre once, shared by the interleaves
    nint = 6
    ds = 0.4
    for arm in range(nint):
        rot = 2 * math.pi * arm / nint
        r, th = 0.0, 0.0
        while True:
            u = 1 + 0.6 * (r / RMAX) ** 2
            drdth = nint * u / (2 * math.pi)
            dth = ds / math.hypot(drdth, r)
            r += drdth * dth
            th += dth
            if r > RMAX:
                break
            pts.append((r * math.cos(th + rot), r * math.sin(th + rot)))
    return np.array(pts)


def sunflower():
    m = 700
    golden = 2 * math.pi * (1 - 1 / ((1 + math.sqrt(5)) / 2))
    n = np.arange(m) + 0.5
    r = RMAX * (n / m) ** 0.7
    th = n * golden
    return np.stack([r * np.cos(th), r * np.sin(th)], axis=1)


def areas(p):
    rg = RMAX + GUARD
    ng = int(math.ceil(2 * math.pi * rg / 0.5))
    a = 2 * math.pi * np.arange(ng) / ng
    guard = np.stack([rg * np.cos(a), rg * np.sin(a)], axis=1)
    vor = Voronoi(np.concatenate([p, guard]))
    out = []
    for i in range(len(p)):
        reg = vor.regions[vor.point_region[i]]
        if -1 in reg or len(reg) < 3:
            raise SystemExit("unbounded cell for point %d" % i)
        v = vor.vertices[reg]
        c = v.mean(axis=0)
        v = v[np.argsort(np.arctan2(v[:, 1] - c[1], v[:, 0] - c[0]))]
        x, y = v[:, 0], v[:, 1]
        out.append(0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))))
    return out


sets = []
for name, p in (("spiral", spiral()), ("sunflower", sunflower())):
    sets.append({
        "name": name,
        "kx": [float(v) for v in p[:, 0]],
        "ky": [float(v) for v in p[:, 1]],
        "area": [float(v) for v in areas(p)],
    })
json.dump({"n": 32, "rmax": RMAX, "guard": GUARD, "sets": sets}, sys.stdout, indent=0)
print()
