#!/usr/bin/python3
"""Regenerates fista_fixture.json, the reference run for TestFISTAAgainstNumpy
in package accelplan/priors.

Made with NumPy 1.24.2 and PyWavelets 1.1.1 (Debian bookworm packages
python3-numpy and python3-pywt), run as /usr/bin/python3:

    cd priors/testdata && /usr/bin/python3 make_fista_fixture.py

The reference is FISTA with constant step 1 (Beck & Teboulle, SIAM J Imaging
Sci 2009) for 1/2||M F x - y||^2 + lam * sum |detail coefficients of W x|,
F = numpy.fft.fft2(norm="ortho") (uncentred), M a random row mask, W the
periodized db2 wavelet transform of PyWavelets with 2 levels, written the way
a practitioner would with numpy and pywt. The image is invented: two
rectangles and a disc with a smooth phase.
"""
import json
import numpy as np
import pywt

ny, nx, name, level, lam, iters = 32, 48, "db2", 2, 0.05, 30
rng = np.random.default_rng(20240611)

r, c = np.mgrid[0:ny, 0:nx]
img = np.zeros((ny, nx))
img[6:20, 8:30] = 1.0
img[14:28, 24:40] = 0.6
img[((r - 10) ** 2 + (c - 36) ** 2) < 25] = 0.8
x_true = img * np.exp(1j * 0.4 * np.sin(2 * np.pi * c / nx))

rows = rng.random(ny) < 0.4
rows[:3] = True
rows[-3:] = True
mask = np.zeros((ny, nx), bool)
mask[rows, :] = True

F = lambda x: np.fft.fft2(x, norm="ortho")
Fh = lambda k: np.fft.ifft2(k, norm="ortho")
sigma = 0.02
noise = sigma * (rng.standard_normal((ny, nx)) + 1j * rng.standard_normal((ny, nx)))
y_full = mask * (F(x_true) + noise)
y = y_full[mask]  # compact, row-major order of the acquired samples

def W(x):
    ar, _ = pywt.coeffs_to_array(pywt.wavedec2(x.real, name, mode="periodization", level=level))
    ai, sl = pywt.coeffs_to_array(pywt.wavedec2(x.imag, name, mode="periodization", level=level))
    return ar + 1j * ai, sl

def Wh(a, sl):
    cr = pywt.array_to_coeffs(a.real, sl, output_format="wavedec2")
    ci = pywt.array_to_coeffs(a.imag, sl, output_format="wavedec2")
    return pywt.waverec2(cr, name, mode="periodization") + 1j * pywt.waverec2(ci, name, mode="periodization")

approx = np.zeros((ny, nx), bool)
approx[: ny >> level, : nx >> level] = True

def prox(v, t):
    a, sl = W(v)
    mag = np.abs(a)
    s = np.where(approx, 1.0, np.maximum(1 - t / np.maximum(mag, 1e-300), 0))
    return Wh(a * s, sl)

def objective(x):
    a, _ = W(x)
    res = (F(x) - y_full)[mask]
    return 0.5 * np.sum(np.abs(res) ** 2) + lam * np.sum(np.abs(a[~approx]))

x = Fh(y_full)
z = x.copy()
t = 1.0
objs = []
for k in range(iters):
    g = z - Fh(mask * F(z) - y_full)
    xn = prox(g, lam)
    tn = (1 + np.sqrt(1 + 4 * t * t)) / 2
    z = xn + (t - 1) / tn * (xn - x)
    x, t = xn, tn
    objs.append(float(objective(x)))

out = {
    "generator": "NumPy %s, PyWavelets %s" % (np.__version__, pywt.__version__),
    "ny": ny, "nx": nx, "wavelet": name, "levels": level, "lambda": lam, "iterations": iters,
    "mask": [int(v) for v in mask.ravel()],
    "y_re": [float(v) for v in y.real], "y_im": [float(v) for v in y.imag],
    "x_re": [float(v) for v in x.real.ravel()], "x_im": [float(v) for v in x.imag.ravel()],
    "objective": objs,
}
with open("fista_fixture.json", "w") as f:
    json.dump(out, f)
print("objective first/last", objs[0], objs[-1])
