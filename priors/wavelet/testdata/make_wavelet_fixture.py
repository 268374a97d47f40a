#!/usr/bin/python3
"""Regenerates wavelet_fixture.json, the reference values for the tests of
package accelplan/priors/wavelet.

Made with PyWavelets 1.1.1 and NumPy 1.24.2 (Debian bookworm packages
python3-pywt and python3-numpy), run as /usr/bin/python3:

    cd priors/wavelet/testdata && /usr/bin/python3 make_wavelet_fixture.py

Contents:
  filters      pywt.Wavelet(name).dec_lo/dec_hi/rec_lo/rec_hi for db1..db10
  max_level    pywt.dwt_max_level(n, filter_len) for a few sizes
  transforms   pywt.coeffs_to_array(pywt.wavedec2(x, name,
               mode='periodization', level=L)) of the real and imaginary
               parts of a test image x (the Mallat layout, same size as x)
  shrinks      wavelet shrinkage of the test image: the detail
               coefficients of wavedec2 (real and imaginary parts combined
               into complex values) soft-thresholded by
               pywt.threshold(c, thr, mode='soft'), which shrinks the
               modulus of complex data, the approximation kept, and
               pywt.waverec2 of the real and imaginary parts

The test image is made from an integer linear congruential sequence so that
the Go test rebuilds it bit for bit:
  v(i) = ((i*1103515245 + 12345) mod 2**31) / 2**31 - 0.5
  x[r, c] = v(r*nx + c) + 1j * v(r*nx + c + 7919)
"""
import json
import numpy as np
import pywt

def lcg_image(ny, nx):
    idx = np.arange(ny * nx, dtype=np.int64)
    def v(i):
        return ((i * 1103515245 + 12345) % 2**31) / 2.0**31 - 0.5
    re = np.array([v(int(i)) for i in idx]).reshape(ny, nx)
    im = np.array([v(int(i) + 7919) for i in idx]).reshape(ny, nx)
    return re, im

def mallat(a, name, level):
    coeffs = pywt.wavedec2(a, name, mode="periodization", level=level)
    arr, _ = pywt.coeffs_to_array(coeffs)
    assert arr.shape == a.shape
    return arr

names = ["db%d" % n for n in range(1, 11)]
out = {
    "generator": "PyWavelets %s, NumPy %s" % (pywt.__version__, np.__version__),
    "filters": {},
    "max_level": [],
    "transforms": [],
}
for n in names:
    w = pywt.Wavelet(n)
    out["filters"][n] = {
        "dec_lo": list(w.dec_lo), "dec_hi": list(w.dec_hi),
        "rec_lo": list(w.rec_lo), "rec_hi": list(w.rec_hi),
    }
for size in [1, 2, 7, 8, 16, 48, 64, 100, 256, 512]:
    for flen in [2, 4, 8, 12, 16, 20]:
        out["max_level"].append([size, flen, pywt.dwt_max_level(size, flen)])

cases = [
    (16, 16, 4, "db1"),
    (32, 32, 2, "db4"),
    (64, 64, 3, "db4"),
    (16, 64, 2, "db2"),
    (64, 32, 2, "db3"),
    (32, 48, 4, "db1"),
    (48, 48, 2, "db5"),
    (32, 32, 1, "db6"),
    (32, 32, 1, "db7"),
    (64, 64, 2, "db8"),
    (40, 40, 1, "db10"),
    # at the deepest level the size allows: the wrap-around paths dominate
    (56, 112, 3, "db4"),
    (38, 38, 1, "db10"),
    (36, 24, 2, "db3"),
]
for ny, nx, level, name in cases:
    re, im = lcg_image(ny, nx)
    out["transforms"].append({
        "ny": ny, "nx": nx, "levels": level, "name": name,
        "re": [float(v) for v in mallat(re, name, level).ravel()],
        "im": [float(v) for v in mallat(im, name, level).ravel()],
    })

out["shrinks"] = []
for ny, nx, level, name, thr in [
    (64, 64, 3, "db4", 0.15),
    (56, 112, 3, "db4", 0.3),
    (32, 48, 2, "db2", 0.1),
    (48, 48, 2, "db5", 0.2),
    (64, 64, 2, "db8", 0.15),
]:
    re, im = lcg_image(ny, nx)
    cr = pywt.wavedec2(re, name, mode="periodization", level=level)
    ci = pywt.wavedec2(im, name, mode="periodization", level=level)
    sr, si = [cr[0]], [ci[0]]
    for dr, di in zip(cr[1:], ci[1:]):
        tr, ti = [], []
        for a, b in zip(dr, di):
            c = pywt.threshold(a + 1j * b, thr, mode="soft")
            tr.append(c.real)
            ti.append(c.imag)
        sr.append(tuple(tr))
        si.append(tuple(ti))
    yr = pywt.waverec2(sr, name, mode="periodization")
    yi = pywt.waverec2(si, name, mode="periodization")
    out["shrinks"].append({
        "ny": ny, "nx": nx, "levels": level, "name": name, "threshold": thr,
        "re": [float(v) for v in yr.ravel()],
        "im": [float(v) for v in yi.ravel()],
    })

with open("wavelet_fixture.json", "w") as f:
    json.dump(out, f)
