#!/usr/bin/python3
"""A numpy peer for the TV primal-dual iteration, for
BenchmarkTVPDHGIteration256 of package accelplan/priors.

The problem is that of the shared FISTA baseline (shared/bench/peer_fista_numpy.py,
whose setup lines are repeated here unchanged): single coil, 256² Cartesian,
a 1D variable-density row mask with 16 calibration rows drawn with
numpy.random.default_rng(0), complex noise sigma = 0.01/sqrt(2) per channel.
The regulariser is isotropic total variation with periodic forward
differences (periodic, so that the problem is the same in the project's frame,
which is the baseline's image shifted by N/2: see make_peer_fista_fixture.py),
lambda = 0.005, solved by the primal-dual hybrid gradient method of
Chambolle A, Pock T, J Math Imaging Vis 2011;40:120-145 with the data term
dualised, tau = sigma = 1/sqrt(1.01*|E|^2 + 8), |E|^2 = 1, from the
zero-filled image, written the way a practitioner writes it in numpy.

Run in the same shell as the Go benchmark and compare ms per iteration:

    /usr/bin/python3 priors/testdata/peer_tv_pdhg_numpy.py
    go test -run XXX -bench TVPDHGIteration256 ./priors/

Debian bookworm: python3-numpy 1.24.2, python3-scipy 1.10.1, python3-skimage 0.19.3.
"""
import sys, time
import numpy as np, scipy.fft as sfft
from skimage.data import shepp_logan_phantom
from skimage.transform import resize

N = int(sys.argv[1]) if len(sys.argv) > 1 else 256
iters = int(sys.argv[2]) if len(sys.argv) > 2 else 100
rng = np.random.default_rng(0)
x0 = resize(shepp_logan_phantom(), (N, N), anti_aliasing=True).astype(np.complex128)
p = np.clip((1 - np.abs(np.linspace(-1, 1, N))) ** 4 * 0.9 + 0.05, 0, 1)
lines = rng.random(N) < p
lines[N // 2 - 8:N // 2 + 8] = True
lines = np.fft.ifftshift(lines)
mask = np.zeros((N, N), bool); mask[lines, :] = True
F = lambda x: sfft.fft2(x, norm="ortho", workers=1)
Fh = lambda k: sfft.ifft2(k, norm="ortho", workers=1)
y = mask * F(x0)
sigma = 0.01 / np.sqrt(2)
y = y + mask * sigma * (rng.standard_normal((N, N)) + 1j * rng.standard_normal((N, N)))
lam = 0.005

def grad(x):
    return np.roll(x, -1, axis=1) - x, np.roll(x, -1, axis=0) - x

def grad_t(px, py):
    return (np.roll(px, 1, axis=1) - px) + (np.roll(py, 1, axis=0) - py)

step = 1 / np.sqrt(1.01 * 1.0 + 8.0)
x = Fh(y); xbar = x.copy()
q = np.zeros_like(y); px = np.zeros_like(x); py = np.zeros_like(x)
start = time.perf_counter()
for k in range(iters):
    q = (q + step * (mask * F(xbar) - y)) / (1 + step)
    gx, gy = grad(xbar)
    ax, ay = px + step * gx, py + step * gy
    m = np.sqrt(np.abs(ax) ** 2 + np.abs(ay) ** 2)
    f = np.minimum(1, lam / np.maximum(m, 1e-300))
    px, py = ax * f, ay * f
    xn = x - step * (Fh(mask * q) + grad_t(px, py))
    xbar = 2 * xn - x
    x = xn
el = time.perf_counter() - start
nrmse = np.linalg.norm(np.abs(x) - np.abs(x0)) / np.linalg.norm(np.abs(x0))
print(f"N={N} iters={iters} ms_per_iter={el/iters*1e3:.3f} nrmse={nrmse:.4f}")
