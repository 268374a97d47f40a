#!/usr/bin/python3
# Regenerates testdata/mie_fixture.json: exact scattering coefficients of a
# homogeneous dielectric circular cylinder under a scalar plane wave, the
# outside reference that mie_test.go checks the Born data and the
# beam-propagation fields against.
#
# Library: SciPy 1.10.1 (Debian package python3-scipy), scipy.special.jv,
#   jvp, hankel1 and h1vp, with NumPy 1.24.2 on Debian 12. Run from the
#   simulate/odt folder:  /usr/bin/python3 testdata/make_mie_fixture.py
#
# Physics (Bohren CF, Huffman DR, Absorption and Scattering of Light by Small
# Particles, Wiley 1983, ch. 8: infinite cylinder, electric field along the
# axis, whose single component obeys the scalar Helmholtz equation with u and
# du/dr continuous at r = a). With k_m = 2 pi n_m / lambda outside and
# k_c = 2 pi n_c / lambda inside, and x = k_m a, y = k_c a:
#   u_in = sum_n i^n J_n(k_m r) e^{i n psi}
#   u_s  = sum_n i^n b_n H_n^(1)(k_m r) e^{i n psi}
#   b_n  = [k_c J_n'(y) J_n(x) - k_m J_n'(x) J_n(y)]
#        / [k_m H_n'(x) J_n(y) - k_c J_n'(y) H_n(x)]
# (b_{-n} = b_n), where psi is the angle from the incident direction. Far from
# the cylinder u_s ~ sqrt(2 / (pi k_m r)) exp(i (k_m r - pi/4)) F(psi) with
# F(psi) = b_0 + 2 sum_{n>=1} b_n cos(n psi).
#
# Self-check: for a lossless cylinder energy conservation gives
# Re b_n = -|b_n|^2 for every n; the script stops if that fails.
import json
import os
import sys

import numpy as np
import scipy
from scipy.special import h1vp, hankel1, jv, jvp

here = os.path.dirname(os.path.abspath(__file__))

cases = [
    # name, wavelength µm, medium index, cylinder index, radius µm
    ("weak", 0.532, 1.333, 1.333 + 5e-4, 2.0),
    ("weaker", 0.532, 1.333, 1.333 + 2.5e-4, 2.0),
    ("strong", 0.532, 1.333, 1.333 + 0.02, 3.0),
]

out = {
    "source": "SciPy %s scipy.special (jv, jvp, hankel1, h1vp), NumPy %s" % (scipy.__version__, np.__version__),
    "cases": [],
}
for name, lam, nm, nc, a in cases:
    km = 2 * np.pi * nm / lam
    kc = 2 * np.pi * nc / lam
    x, y = km * a, kc * a
    nmax = int(np.ceil(y + 4 * y ** (1 / 3) + 10))
    ns = np.arange(nmax + 1)
    num = kc * jvp(ns, y) * jv(ns, x) - km * jvp(ns, x) * jv(ns, y)
    den = km * h1vp(ns, x) * jv(ns, y) - kc * jvp(ns, y) * hankel1(ns, x)
    b = num / den
    err = np.max(np.abs(b.real + np.abs(b) ** 2))
    if err > 1e-12:
        sys.exit("energy check failed for %s: %g" % (name, err))
    out["cases"].append({
        "name": name,
        "wavelength_um": lam,
        "medium_index": nm,
        "cylinder_index": nc,
        "radius_um": a,
        "b_re": b.real.tolist(),
        "b_im": b.imag.tolist(),
    })
path = os.path.join(here, "mie_fixture.json")
with open(path, "w") as f:
    json.dump(out, f)
print("wrote %s with SciPy %s, NumPy %s" % (path, scipy.__version__, np.__version__))
