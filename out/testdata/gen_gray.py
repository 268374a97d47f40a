#!/usr/bin/python3
"""Regenerate gray_skimage.csv.

Made with scikit-image 0.19.3 (Debian python3-skimage) and NumPy 1.24
(Debian python3-numpy), run as /usr/bin/python3 from this folder:

    /usr/bin/python3 gen_gray.py

A 12x17 image of values drawn by numpy.random.default_rng(20240607) from a
normal distribution (mean 0.5, sd 0.45), so that some fall outside the
window [lo, hi] = [0.05, 0.95]; the expected 8-bit grey levels are
skimage.exposure.rescale_intensity(img, in_range=(lo, hi),
out_range=(0, 255)) rounded to the nearest integer (the window clamps).
Rows: i, j, value (repr, exact), expected level.
"""
import csv

import numpy as np
import skimage
from skimage.exposure import rescale_intensity

assert skimage.__version__ == "0.19.3", skimage.__version__

ny, nx, lo, hi = 12, 17, 0.05, 0.95
img = np.random.default_rng(20240607).normal(0.5, 0.45, size=(ny, nx))
lev = np.rint(rescale_intensity(img, in_range=(lo, hi), out_range=(0, 255))).astype(np.uint8)
with open("gray_skimage.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["i", "j", "value", "level"])
    for i in range(ny):
        for j in range(nx):
            w.writerow([i, j, repr(float(img[i, j])), int(lev[i, j])])
