#!/usr/bin/python3
"""Regenerates partialfourier_fixture.json, the reference for
TestPartialFourierAgainstNumpy in package accelplan/priors.

Made with NumPy 1.24.2 (Debian bookworm package python3-numpy), run as
/usr/bin/python3:

    cd priors/testdata && /usr/bin/python3 make_partialfourier_fixture.py

The reference is written from the published methods with numpy.fft alone,
independently of the Go code:

* homodyne reconstruction (Noll DC, Nishimura DG, Macovski A, IEEE Trans Med
  Imaging 1991;10:154-163): weights 0 on the missing rows, a ramp from 0 to 2
  across the symmetric band |ky| <= B, 2 beyond it; phase from the band image
  with a Hann taper cos^2(pi ky / (2 (B + 1))); real part after removing the
  phase, returned as rho * exp(i phi);
* POCS (Haacke EM, Lindskog ED, Lin W, J Magn Reson 1991;92:126-145): start
  from the zero-filled image, ITERS times project onto the estimated phase
  (x <- Re(x e^{-i phi}) e^{i phi}) and restore the measured samples.

The centred k-space is fftshift(fft2(ifftshift(image), norm="ortho")), so row
r holds ky = r - ny//2 and column c kx = c - nx//2. The object is invented:
two rectangles and a disc with a smooth phase, on an ny = 24 by nx = 20 grid
(different sizes, so that a transposition would show). The columns left and
right of the object are empty in every row, so the band image is zero there
up to rounding and its phase arbitrary; band_abs lets the test skip them. Partial Fourier keeps
the rows ky >= -K with K = round((5/8 - 1/2) * ny) = 3.
"""
import json
import numpy as np

ny, nx, ITERS = 24, 20, 5
K = round((5 / 8 - 0.5) * ny)
B = K

r, c = np.mgrid[0:ny, 0:nx]
mag = np.zeros((ny, nx))
mag[4:14, 3:12] = 1.0
mag[10:20, 9:17] = 0.6
mag[((r - 17) ** 2 + (c - 6) ** 2) < 12] = 0.8
phase = 0.7 * np.sin(2 * np.pi * c / nx) + 0.4 * np.cos(2 * np.pi * r / ny) + 0.2
img = mag * np.exp(1j * phase)


def fft2c(x):
    return np.fft.fftshift(np.fft.fft2(np.fft.ifftshift(x), norm="ortho"))


def ifft2c(k):
    return np.fft.fftshift(np.fft.ifft2(np.fft.ifftshift(k), norm="ortho"))


ky = (np.arange(ny) - ny // 2)[:, None] * np.ones((1, nx))
mask = ky >= -K
kspace = fft2c(img)
data = kspace[mask]  # row-major order of the acquired samples

w = np.where(ky < -B, 0.0, np.where(ky > B, 2.0, 1.0 + ky / (B + 1)))
hann = np.where(np.abs(ky) <= B, np.cos(np.pi * ky / (2 * (B + 1))) ** 2, 0.0)

zero_filled = np.where(mask, kspace, 0)
low = ifft2c(hann * zero_filled)
phasor = np.where(np.abs(low) > 0, low / np.where(np.abs(low) > 0, np.abs(low), 1), 1)

xw = ifft2c(w * zero_filled)
homodyne = np.real(xw * np.conj(phasor)) * phasor

x = ifft2c(zero_filled)
for _ in range(ITERS):
    x = np.real(x * np.conj(phasor)) * phasor
    X = fft2c(x)
    X[mask] = kspace[mask]
    x = ifft2c(X)
pocs = x


def pack(z):
    z = np.asarray(z).ravel()
    return {"re": z.real.tolist(), "im": z.imag.tolist()}


out = {
    "ny": ny, "nx": nx, "k": K, "iters": ITERS,
    "mask": mask.ravel().tolist(),
    "data": pack(data),
    "weights": w[mask].tolist(),
    "phasor": pack(phasor),
    "band_abs": np.abs(low).ravel().tolist(),
    "homodyne": pack(homodyne),
    "pocs": pack(pocs),
    "numpy": np.__version__,
}
with open("partialfourier_fixture.json", "w") as f:
    json.dump(out, f)
