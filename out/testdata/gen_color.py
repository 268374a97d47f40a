#!/usr/bin/python3
"""Regenerate diverging_skimage.csv and lab_skimage.csv.

Made with scikit-image 0.19.3 (Debian python3-skimage) and NumPy 1.24
(Debian python3-numpy), run as /usr/bin/python3 from this folder:

    /usr/bin/python3 gen_color.py

diverging_skimage.csv: the project's diverging colour map, defined as a
straight line in CIELAB (D65) from the neutral (97, 0, 0) to the ends
(33, 10, -42) at t = -1 and (33, 28, 40) at t = +1, sampled at the 257
entries t = 2*i/256 - 1, converted to sRGB in [0, 1] by
skimage.color.lab2rgb. The Lab definition is copied from out/color.go;
what the fixture checks is the Lab -> sRGB conversion.

lab_skimage.csv: skimage.color.rgb2lab of a few 8-bit sRGB colours (the
chart palette and greys), to check the sRGB -> Lab direction.
"""
import csv

import numpy as np
import skimage
from skimage.color import lab2rgb, rgb2lab

assert skimage.__version__ == "0.19.3", skimage.__version__

neutral = np.array([97.0, 0.0, 0.0])
neg = np.array([33.0, 10.0, -42.0])
pos = np.array([33.0, 28.0, 40.0])

rows = []
for i in range(257):
    t = 2.0 * i / 256 - 1.0
    end = pos if t >= 0 else neg
    lab = neutral + abs(t) * (end - neutral)
    rgb = lab2rgb(lab[None, None, :])[0, 0]
    rows.append([i, "%.6f" % t] + ["%.6f" % v for v in rgb])

with open("diverging_skimage.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["index", "t", "r", "g", "b"])
    w.writerows(rows)

colours = ["2D5AB4", "E17800", "784B4B", "A596A5", "5A96FF", "B43C00",
           "786987", "699669", "000000", "808080", "FFFFFF"]
with open("lab_skimage.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["hex", "L", "a", "b"])
    for h in colours:
        rgb = np.array([int(h[k:k + 2], 16) for k in (0, 2, 4)], float) / 255
        lab = rgb2lab(rgb[None, None, :])[0, 0]
        w.writerow([h] + ["%.6f" % v for v in lab])
