#!/usr/bin/python3
"""Regenerates reference.json, the outside reference values of the nufft tests.

Made with Debian python3-scipy 1.10.1 and python3-numpy 1.24.2, run as
    /usr/bin/python3 gen_reference.py > reference.json
from this directory.

Contents:
  i0        scipy.special.i0 (modified Bessel function I0) at several arguments.
  kbft      the Fourier transform  int phi(t) exp(2 pi i t xi) dt  of the
            Kaiser-Bessel kernel phi(t) = I0(beta sqrt(1-(2t/W)^2)) / I0(beta),
            |t| <= W/2, by adaptive quadrature (scipy.integrate.quad), with
            beta = pi sqrt((W/alpha)^2 (alpha-1/2)^2 - 0.8).
  centred   seeded complex images and their orthonormal centred 2D DFT,
            numpy.fft.fftshift(numpy.fft.fft2(numpy.fft.ifftshift(x), norm="ortho")).
"""
import json
import math

import numpy as np
from scipy import integrate, special

out = {}

out["i0"] = [[z, float(special.i0(z))] for z in (0.0, 0.5, 1.0, 2.5, 5.0, 9.0, 12.0, 18.6, 21.0)]

kbft = []
for w, alpha in ((2, 2.0), (4, 2.0), (8, 2.0), (4, 1.25), (7, 1.25)):
    beta = math.pi * math.sqrt((w / alpha) ** 2 * (alpha - 0.5) ** 2 - 0.8)
    i0b = special.i0(beta)

    def phi(t):
        r = 1 - (2 * t / w) ** 2
        return special.i0(beta * math.sqrt(max(r, 0.0))) / i0b

    for xi in (0.0, 0.1, 0.25, 0.4, 0.5, 0.75, 1.0, 1.5):
        # phi is even, so the transform is real: 2 * int_0^{W/2} phi(t) cos(2 pi t xi) dt
        v, _ = integrate.quad(lambda t: phi(t) * math.cos(2 * math.pi * t * xi),
                              0, w / 2, epsabs=1e-14, epsrel=1e-12, limit=400)
        kbft.append({"w": w, "alpha": alpha, "beta": beta, "xi": xi, "value": 2 * v})
out["kbft"] = kbft

rng = np.random.default_rng(20240607)
centred = []
for ny, nx in ((16, 12), (7, 5)):
    x = rng.standard_normal((ny, nx)) + 1j * rng.standard_normal((ny, nx))
    s = np.fft.fftshift(np.fft.fft2(np.fft.ifftshift(x), norm="ortho"))
    centred.append({
        "ny": ny, "nx": nx,
        "re": x.real.ravel().tolist(), "im": x.imag.ravel().tolist(),
        "spec_re": s.real.ravel().tolist(), "spec_im": s.imag.ravel().tolist(),
    })
out["centred"] = centred

print(json.dumps(out, indent=1))
