#!/usr/bin/python3
"""Regenerates tv_fixture.json for the TV tests of package priors.

Made with Debian's python3-skimage 0.19 (skimage.restoration.denoise_tv_chambolle,
the dual projection algorithm of Chambolle, J Math Imaging Vis 2004;20:89-97) and
python3-numpy 1.24. Run as /usr/bin/python3 from this folder:

    /usr/bin/python3 make_tv_fixture.py

scikit-image minimises, for a 2D grey image f and weight w,

    1/2 * sum (u - f)^2  +  w * sum sqrt((d_row u)^2 + (d_col u)^2)

with forward differences that are zero across the last row and column (Neumann
boundary) and the isotropic gradient norm; see _denoise_tv_chambolle_nd in
skimage/restoration/_denoise.py. The objective of each output is evaluated here
with numpy as well, so that the Go tests can check their own TV value against
an independent computation.

The test image is an invented scene (a bright rectangle and a grey disc on a
dim background) with seeded Gaussian noise; it has 40 rows and 52 columns so
that a transposition would show.
"""
import json

import numpy as np
import skimage
from skimage.restoration import denoise_tv_chambolle

NY, NX = 40, 52
SIGMA = 0.1
SEED = 20240611
WEIGHTS = [0.08, 0.25]


def scene():
    i, j = np.mgrid[0:NY, 0:NX]
    f = np.full((NY, NX), 0.2)
    f[8:22, 6:24] = 0.8
    f[(i - 26.3) ** 2 + (j - 36.7) ** 2 < 9.5 ** 2] = 0.5
    return f


def tv(u):
    gr = np.zeros_like(u)
    gc = np.zeros_like(u)
    gr[:-1, :] = np.diff(u, axis=0)
    gc[:, :-1] = np.diff(u, axis=1)
    return float(np.sqrt(gr ** 2 + gc ** 2).sum())


def objective(u, f, w):
    return float(0.5 * ((u - f) ** 2).sum() + w * tv(u))


def main():
    rng = np.random.default_rng(SEED)
    clean = scene()
    noisy = clean + SIGMA * rng.standard_normal((NY, NX))
    cases = []
    for w in WEIGHTS:
        default = denoise_tv_chambolle(noisy, weight=w)
        tight = denoise_tv_chambolle(noisy, weight=w, eps=1e-12, max_num_iter=20000)
        cases.append({
            "weight": w,
            "default": default.ravel().tolist(),
            "default_objective": objective(default, noisy, w),
            "tight": tight.ravel().tolist(),
            "tight_objective": objective(tight, noisy, w),
            "tight_tv": tv(tight),
        })
    out = {
        "made_by": "make_tv_fixture.py with scikit-image %s, numpy %s" % (skimage.__version__, np.__version__),
        "ny": NY, "nx": NX, "sigma": SIGMA, "seed": SEED,
        "default_call": "denoise_tv_chambolle(noisy, weight=w)  (eps=2e-4, max_num_iter=200)",
        "tight_call": "denoise_tv_chambolle(noisy, weight=w, eps=1e-12, max_num_iter=20000)",
        "noisy": noisy.ravel().tolist(),
        "noisy_tv": tv(noisy),
        "clean": clean.ravel().tolist(),
        "cases": cases,
    }
    with open("tv_fixture.json", "w") as fh:
        json.dump(out, fh, indent=0)
        fh.write("\n")


if __name__ == "__main__":
    main()
