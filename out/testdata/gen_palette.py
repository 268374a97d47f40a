#!/usr/bin/python3
"""Regenerate palette_colorspacious.csv.

Made with colorspacious 1.1.2 (Debian python3-colorspacious) and NumPy 1.24
(Debian python3-numpy), run as /usr/bin/python3 from this folder:

    /usr/bin/python3 gen_palette.py

For the chart palette of out/color.go (copied below) and for pairs of the
diverging map at +t and -t, it reports the CAM02-UCS distance
(colorspacious.deltaE, uniform space "CAM02-UCS") under normal vision and
under simulated colour-vision deficiency at severity 100 (colorspacious
"sRGB1+CVD", which implements Machado, Oliveira & Fernandes, IEEE TVCG
2009;15:1291-1298). Rows:

    palette_min,<condition>,<smallest pairwise distance among the palette>
    lightness,<hex>,<CAM02-UCS J'>
    diverging,<condition>,<t>,<distance between map(+t) and map(-t)>

The diverging colours are the 8-bit values of diverging_skimage.csv.
"""
import csv
import itertools

import colorspacious as cs
import numpy as np

palette = ["2D5AB4", "E17800", "784B4B", "A596A5", "5A96FF", "B43C00",
           "786987", "699669"]
conditions = {
    "normal": None,
    "deuteranomaly": {"name": "sRGB1+CVD", "cvd_type": "deuteranomaly", "severity": 100},
    "protanomaly": {"name": "sRGB1+CVD", "cvd_type": "protanomaly", "severity": 100},
    "tritanomaly": {"name": "sRGB1+CVD", "cvd_type": "tritanomaly", "severity": 100},
}


def to_rgb1(hexes):
    return np.array([[int(h[k:k + 2], 16) for k in (0, 2, 4)] for h in hexes], float) / 255


def seen(rgb1, cond):
    if cond is None:
        return rgb1
    return np.clip(cs.cspace_convert(rgb1, cond, "sRGB1"), 0, 1)


rgb = to_rgb1(palette)
out = []
for name, cond in conditions.items():
    s = seen(rgb, cond)
    d = min(cs.deltaE(s[i], s[j], input_space="sRGB1")
            for i, j in itertools.combinations(range(len(palette)), 2))
    out.append(["palette_min", name, "%.4f" % d])
jp = cs.cspace_convert(rgb, "sRGB1", "CAM02-UCS")[:, 0]
for h, j in zip(palette, jp):
    out.append(["lightness", h, "%.4f" % j])

div = {}
with open("diverging_skimage.csv") as f:
    for row in csv.DictReader(f):
        div[int(row["index"])] = [round(float(row[c]) * 255) / 255 for c in "rgb"]
for name, cond in conditions.items():
    for k in (32, 64, 96, 128):  # t = k/128
        pair = np.array([div[128 + k], div[128 - k]])
        s = seen(pair, cond)
        out.append(["diverging", name, "%.4f" % (k / 128),
                    "%.4f" % cs.deltaE(s[0], s[1], input_space="sRGB1")])

with open("palette_colorspacious.csv", "w", newline="") as f:
    csv.writer(f, lineterminator="\n").writerows(out)
