#!/usr/bin/python3
# Regenerates testdata/coils_bessel.json, the reference values that
# coils_test.go compares the package's Bessel series (used to build the
# CoilRing sensitivities) against.
#
# Library: SciPy 1.10.1 (Debian package python3-scipy), functions
#   scipy.special.iv(n, z)  modified Bessel function of the first kind,
#                           complex argument z,
#   scipy.special.jv(n, x)  Bessel function of the first kind, real x,
# with NumPy 1.24.2 on Debian 12.
# Run from the simulate folder:  /usr/bin/python3 testdata/coils_make_bessel.py
import json
import os

import numpy as np
import scipy
import scipy.special as sp

here = os.path.dirname(os.path.abspath(__file__))

# Arguments spanning what CoilRing allows: z = falloff + i*radial phase with
# falloff in (0, 4] and radial phase in [-4, 4], and z/2; orders 0..24.
zs = [0.5 + 0.25j, 1.0 + 0.25j, 0.5 + 0.125j, 1.5 - 0.75j, 4.0 + 4.0j, 2.0 - 4.0j, 0.01 + 0.0j, 3.0j]
orders = list(range(0, 25))
iv = []
for z in zs:
    for n in orders:
        v = complex(sp.iv(n, z))
        iv.append({"n": n, "re_z": z.real, "im_z": z.imag, "re": v.real, "im": v.imag})

xs = [0.0, 0.3, -0.7071067811865476, 1.0, -2.5, 4.0]
jv = []
for x in xs:
    for n in range(-12, 13):
        jv.append({"n": n, "x": x, "v": float(sp.jv(n, x))})

out = os.path.join(here, "coils_bessel.json")
with open(out, "w") as f:
    json.dump({"library": "scipy %s, numpy %s" % (scipy.__version__, np.__version__), "iv": iv, "jv": jv}, f, indent=0)
print("wrote %s with scipy %s (%d iv, %d jv values)" % (out, scipy.__version__, len(iv), len(jv)))
