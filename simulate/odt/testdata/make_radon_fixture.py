#!/usr/bin/python3
# Regenerates testdata/radon_fixture.json, the reference projections that
# projection_test.go compares the short-wavelength limit of the ODT arcs with
# (projection-slice theorem: Kak AC, Slaney M, Principles of Computerized
# Tomographic Imaging, 1988, ch. 3).
#
# Library: scikit-image 0.19.3 (Debian package python3-skimage), function
#   skimage.transform.radon(image, theta, circle=True), with NumPy 1.24.2 on
#   Debian 12. Run from the simulate/odt folder:
#   /usr/bin/python3 testdata/make_radon_fixture.py
#
# What it does, independently of the Go code:
#  1. Builds the invented demo cell from its table of bodies (copied here by
#     hand from odt.DemoCell; the Go test checks that the copy matches), in a
#     medium of index n_m, on a 20 µm FOV.
#  2. Rasterises the Born index contrast c = (n^2 - n_m^2) / (2 n_m) on a
#     256x256 grid (rows z, columns x, pixel (i, j) centred at
#     x = (j - 128) h, z = (i - 128) h, h = 20/256 µm) by point-sampling the
#     index n at 6x6 points per pixel and averaging c over them. n is the
#     medium index plus the DeltaN of every body containing the point.
#  3. Projects the raster with radon at a few angles. scikit-image rotates
#     about pixel (N//2, N//2) and sums along rows, so that a point at (row r,
#     column c) lands at s = (c - N//2) cos(theta) - (r - N//2) sin(theta)
#     (this is checked below on a single pixel): the projection at angle
#     theta integrates along the direction (sin theta, cos theta) in (x, z),
#     the direction of an illumination tilted by theta from the optical axis.
#  4. Writes the table, the grid, the angles and the projections (row sums
#     in pixel units, length 256, index N//2 at s = 0).
import json
import os
import sys

import numpy as np
import skimage
from skimage.transform import radon

here = os.path.dirname(os.path.abspath(__file__))

medium = 1.333
fov = 20.0
n = 256
sub = 6
# DeltaN, X, Z, A, B, ThetaDeg (µm, degrees from +x towards +z)
bodies = [
    (0.015, 0.4, -0.3, 6.5, 4.5, 20),
    (0.012, -0.8, 0.2, 2.8, 2.2, -15),
    (0.015, -1.3, 0.5, 0.7, 0.55, 30),
    (0.010, 0.2, -0.5, 0.5, 0.45, 0),
    (0.030, 3.6, 1.4, 0.6, 0.6, 0),
    (-0.008, 2.8, -1.9, 0.9, 0.7, -40),
]
angles = [0.0, 25.0, -40.0, 55.0]

# Convention check on one pixel (step 3 above).
chk = np.zeros((64, 64))
chk[20, 40] = 1.0
for th in (0.0, 90.0):
    p = radon(chk, theta=[th], circle=False)[:, 0]
    got = int(np.argmax(p)) - p.shape[0] // 2
    t = np.deg2rad(th)
    want = (40 - 32) * np.cos(t) - (20 - 32) * np.sin(t)
    if abs(got - want) > 1e-9:
        sys.exit("scikit-image radon convention differs: theta %g lands at %d, expected %g" % (th, got, want))

h = fov / n
off = (np.arange(sub) + 0.5) / sub - 0.5
xs = ((np.arange(n) - n // 2)[:, None] + off[None, :]).reshape(-1) * h  # n*sub
X, Z = np.meshgrid(xs, xs)  # rows z, columns x
index = np.full(X.shape, medium)
for dn, x0, z0, a, b, th in bodies:
    t = np.deg2rad(th)
    dx, dz = X - x0, Z - z0
    u = (dx * np.cos(t) + dz * np.sin(t)) / a
    v = (-dx * np.sin(t) + dz * np.cos(t)) / b
    index[u * u + v * v <= 1] += dn
c = (index ** 2 - medium ** 2) / (2 * medium)
raster = c.reshape(n, sub, n, sub).mean(axis=(1, 3))
if raster[0, :].any() or raster[-1, :].any():
    sys.exit("the cell touches the edge of the FOV")

proj = radon(raster, theta=angles, circle=True)
out = {
    "source": "scikit-image %s skimage.transform.radon(circle=True), NumPy %s" % (skimage.__version__, np.__version__),
    "medium": medium,
    "fov_um": fov,
    "grid": n,
    "subsamples": sub,
    "bodies": [list(b) for b in bodies],
    "angles_deg": angles,
    "projections": [proj[:, k].tolist() for k in range(len(angles))],
    "raster_sum": float(raster.sum()),
}
path = os.path.join(here, "radon_fixture.json")
with open(path, "w") as f:
    json.dump(out, f)
print("wrote %s with scikit-image %s, NumPy %s" % (path, skimage.__version__, np.__version__))
