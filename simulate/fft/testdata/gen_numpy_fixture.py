#!/usr/bin/python3
"""Regenerates numpy_fft2.json, the outside reference for package fft.

Made with Debian python3-numpy 1.24.2 (numpy.fft, a pocketfft port), run as
    /usr/bin/python3 gen_numpy_fixture.py > numpy_fft2.json
For each shape it stores a seeded random complex input and numpy's
    fft2(x, norm="ortho"), ifft2(x, norm="ortho"),
    fftshift(fft2(ifftshift(x), norm="ortho"))   (centred forward),
    fftshift(ifft2(ifftshift(x), norm="ortho"))  (centred inverse),
and the index permutations fftshift / ifftshift apply to arange(ny*nx).
"""
import json
import sys
import numpy as np

SHAPES = [(1, 4), (3, 3), (4, 6), (5, 7), (6, 5), (8, 8), (12, 10), (3, 41), (7, 2)]


def flat(a):
    a = np.asarray(a).ravel()
    return [float(v) for v in a.real], [float(v) for v in a.imag]


rng = np.random.default_rng(20240611)
cases = []
for ny, nx in SHAPES:
    x = rng.standard_normal((ny, nx)) + 1j * rng.standard_normal((ny, nx))
    idx = np.arange(ny * nx).reshape(ny, nx)
    c = {"ny": ny, "nx": nx}
    c["in_re"], c["in_im"] = flat(x)
    c["fwd_re"], c["fwd_im"] = flat(np.fft.fft2(x, norm="ortho"))
    c["inv_re"], c["inv_im"] = flat(np.fft.ifft2(x, norm="ortho"))
    c["cfwd_re"], c["cfwd_im"] = flat(np.fft.fftshift(np.fft.fft2(np.fft.ifftshift(x), norm="ortho")))
    c["cinv_re"], c["cinv_im"] = flat(np.fft.fftshift(np.fft.ifft2(np.fft.ifftshift(x), norm="ortho")))
    c["fftshift"] = [int(v) for v in np.fft.fftshift(idx).ravel()]
    c["ifftshift"] = [int(v) for v in np.fft.ifftshift(idx).ravel()]
    cases.append(c)
json.dump({"library": "numpy " + np.__version__, "cases": cases}, sys.stdout)
print()
