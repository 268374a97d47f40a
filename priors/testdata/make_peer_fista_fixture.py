#!/usr/bin/python3
"""Regenerates peer_fista_128.{json,f64} and peer_fista_256.{json,f64}: the
exact problem of the shared numpy baseline for one FISTA-wavelet
reconstruction, for the tests and benchmarks in bench_fista_test.go of
package accelplan/priors.

Made with NumPy 1.24.2, SciPy 1.10.1, PyWavelets 1.1.1 and scikit-image
0.19.3 (Debian bookworm packages python3-numpy, python3-scipy, python3-pywt,
python3-skimage), run as /usr/bin/python3:

    cd priors/testdata && /usr/bin/python3 make_peer_fista_fixture.py

The problem and the solver below are the lines of the baseline
(shared/bench/peer_fista_numpy.py) unchanged, for N = 128 and N = 256: phantom
skimage.data.shepp_logan_phantom() resized to N x N with anti-aliasing, a 1D
variable-density row mask p = clip((1 - |linspace(-1, 1, N)|)^4 * 0.9 + 0.05,
0, 1) drawn with numpy.random.default_rng(0) plus 16 calibration rows, data
y = M F x0 + M sigma (n1 + i n2) with sigma = 0.01/sqrt(2), F = scipy.fft.fft2
(norm="ortho", uncentred), and 100 FISTA iterations with step 1 and
lambda = 0.002 on the db4 detail coefficients (4 levels, periodization).

The Go side works on the centred grid (simulate.Cartesian). For even N the
centred transform is fftshift . fft2 . ifftshift, so the baseline's problem
is the same problem in our frame with the image circularly shifted by
(N/2, N/2); a shift by N/2 = 64 or 128 is a multiple of 2^4, under which the
4-level periodic wavelet transform is shift-equivariant, so the wavelet
penalty, every iterate and the NRMSE carry over exactly. The files therefore
hold the shifted arrays.

Files:
  peer_fista_N.json  metadata: sizes, sigma, lambda, iterations, the mask
                     rows (centred order, 1 = acquired), the baseline's
                     NRMSE of its result and of the zero-filled image, versions
  peer_fista_N.f64   little-endian float64, in this order:
                     phantom    N*N values, fftshift(x0) (real)
                     data       for each acquired row m (ascending, centred
                                order) the N samples fftshift(y)[m, :] as
                                (re, im) pairs
                     result     (N = 128 only) fftshift(x) after 100
                                iterations, N*N (re, im) pairs
"""
import json
import sys
import numpy as np, scipy, scipy.fft as sfft, pywt, skimage
from skimage.data import shepp_logan_phantom
from skimage.transform import resize


def run(N, iters=100, keep_result=False):
    # --- baseline lines, unchanged ---
    rng = np.random.default_rng(0)
    x0 = resize(shepp_logan_phantom(), (N, N), anti_aliasing=True).astype(np.complex128)
    p = np.clip((1 - np.abs(np.linspace(-1, 1, N))) ** 4 * 0.9 + 0.05, 0, 1)
    lines = rng.random(N) < p
    lines[N // 2 - 8:N // 2 + 8] = True
    centred_lines = lines.copy()
    lines = np.fft.ifftshift(lines)
    mask = np.zeros((N, N), bool); mask[lines, :] = True
    F = lambda x: sfft.fft2(x, norm="ortho", workers=1)
    Fh = lambda k: sfft.ifft2(k, norm="ortho", workers=1)
    y = mask * F(x0)
    sigma = 0.01 / np.sqrt(2)
    y = y + mask * sigma * (rng.standard_normal((N, N)) + 1j * rng.standard_normal((N, N)))
    lam = 0.002

    def W(x):
        cr = pywt.wavedec2(x.real, "db4", mode="periodization", level=4)
        ci = pywt.wavedec2(x.imag, "db4", mode="periodization", level=4)
        return cr, ci

    def Wh(c):
        return pywt.waverec2(c[0], "db4", mode="periodization") + 1j * pywt.waverec2(c[1], "db4", mode="periodization")

    def soft_complex(cr, ci, t):
        out_r, out_i = [cr[0]], [ci[0]]
        for (hr, hi) in zip(cr[1:], ci[1:]):
            nr, ni = [], []
            for a, b in zip(hr, hi):
                mag = np.sqrt(a * a + b * b)
                s = np.maximum(1 - t / np.maximum(mag, 1e-12), 0)
                nr.append(a * s); ni.append(b * s)
            out_r.append(tuple(nr)); out_i.append(tuple(ni))
        return out_r, out_i

    x = Fh(y); z = x.copy(); t = 1.0
    for k in range(iters):
        g = z - Fh(mask * F(z) - y)
        cr, ci = W(g)
        xn = Wh(soft_complex(cr, ci, lam))
        tn = (1 + np.sqrt(1 + 4 * t * t)) / 2
        z = xn + (t - 1) / tn * (xn - x)
        x, t = xn, tn
    nrmse = np.linalg.norm(np.abs(x) - np.abs(x0)) / np.linalg.norm(np.abs(x0))
    zf = np.linalg.norm(np.abs(Fh(y)) - np.abs(x0)) / np.linalg.norm(np.abs(x0))
    # --- end of baseline lines ---

    sh = np.fft.fftshift
    ys = sh(y)
    rows = np.nonzero(centred_lines)[0]
    parts = [sh(x0).real.ravel(), ys[rows, :].view(np.float64).ravel()]
    if keep_result:
        parts.append(np.ascontiguousarray(sh(x)).view(np.float64).ravel())
    blob = np.concatenate(parts).astype("<f8")
    blob.tofile("peer_fista_%d.f64" % N)
    meta = {
        "generator": "shared numpy baseline, NumPy %s, SciPy %s, PyWavelets %s, scikit-image %s"
        % (np.__version__, scipy.__version__, pywt.__version__, skimage.__version__),
        "n": N, "iterations": iters, "sigma": sigma, "lambda": lam, "wavelet": "db4", "levels": 4,
        "rows": [int(v) for v in centred_lines],
        "acceleration": N / lines.sum(),
        "nrmse": nrmse, "zero_filled_nrmse": zf,
        "has_result": bool(keep_result),
    }
    with open("peer_fista_%d.json" % N, "w") as f:
        json.dump(meta, f, indent=1)
        f.write("\n")
    print("N=%d R=%.2f nrmse=%.6f zero_filled=%.6f" % (N, N / lines.sum(), nrmse, zf))


run(128, keep_result=True)
run(256)
