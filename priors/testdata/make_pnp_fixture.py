#!/usr/bin/python3
"""Regenerates pnp_fixture.json for the plug-in denoiser tests of package priors
(nlm_test.go, denoise_test.go).

Made with Debian's python3-skimage 0.19 (scikit-image 0.19.3), python3-pywt 1.1
(PyWavelets 1.1.1) and python3-numpy 1.24. Run as /usr/bin/python3 from this
folder:

    /usr/bin/python3 make_pnp_fixture.py

The image is scikit-image's modified Shepp-Logan phantom
(skimage.data.shepp_logan_phantom, 400x400, grey levels 0 ... 1) resized to
64 rows by 80 columns with anti-aliasing, so that a transposition would show.
Seeded white Gaussian noise of standard deviation SIGMA is added: once to the
real image, and once per channel to a complex version with a smooth phase.

What the Go tests compare against:

* skimage.restoration.denoise_nl_means(noisy, patch_size=P, patch_distance=D,
  h=H, sigma=SIGMA, fast_mode=True, preserve_range=True[, channel_axis=-1]).
  P is the patch width (2f+1), D the search radius s (window 2s+1). scikit-image
  subtracts 2*sigma^2 from the mean squared patch distance (averaged over the
  channels) and weighs by exp(-max(d2 - 2 sigma^2, 0) / h^2) -- the same
  formula as ours with h = HFactor * SIGMA. The complex image is given to it as
  two channels (real, imaginary), which is our complex mode.
* skimage.restoration.denoise_tv_chambolle(noisy, weight=W), with its default
  stopping rule and with eps=1e-10, max_num_iter=20000 ("tight"): the same ROF
  objective as priors.TV.Prox with t = W.
* skimage.restoration.denoise_wavelet(noisy, sigma=SIGMA, wavelet='db4',
  mode='soft', wavelet_levels=3, method='VisuShrink'): the universal threshold
  SIGMA*sqrt(2 ln n) of Donoho & Johnstone 1994 on every detail band (its
  transform extends the image symmetrically, ours periodically).
* skimage.restoration.cycle_spin(noisy, func=soft_periodized, max_shifts=3)
  with soft_periodized a PyWavelets soft threshold of the detail coefficients
  of wavedec2(..., 'db4', mode='periodization', level=3): the average over the
  16 circular shifts (0..3, 0..3), which our cycle-spun wavelet denoiser must
  reproduce to rounding (the noisy real image is stored at full precision for
  this; the other inputs are rounded to 12 significant digits and the outputs
  to 10).

NRMSE values are skimage.metrics.normalized_root_mse(truth, x) (euclidean
normalisation, ||x - truth|| / ||truth||).
"""
import json

import numpy as np
import pywt
import skimage
from skimage import data, transform
from skimage.metrics import normalized_root_mse
from skimage.restoration import (cycle_spin, denoise_nl_means,
                                 denoise_tv_chambolle, denoise_wavelet)

NY, NX = 64, 80
SIGMA = 0.05
SEED = 20250105
H_GRID = [0.6, 0.8, 1.0, 1.2, 1.4, 1.7, 2.0]


def soft_periodized(x, wavelet="db4", level=3, thr=2 * SIGMA):
    coeffs = pywt.wavedec2(x, wavelet, mode="periodization", level=level)
    out = [coeffs[0]]
    for bands in coeffs[1:]:
        out.append(tuple(pywt.threshold(b, thr, mode="soft") for b in bands))
    return pywt.waverec2(out, wavelet, mode="periodization")


def nl_means(kind, noisy, cnoisy2, p, d, hf):
    kw = dict(patch_size=p, patch_distance=d, h=hf * SIGMA, sigma=SIGMA,
              fast_mode=True, preserve_range=True)
    if kind == "real":
        return denoise_nl_means(noisy, **kw)
    return denoise_nl_means(cnoisy2, channel_axis=-1, **kw)


def call(kind, p, d, hf):
    return ("denoise_nl_means(%s, patch_size=%d, patch_distance=%d, h=%g*sigma, "
            "sigma=sigma, fast_mode=True, preserve_range=True%s)"
            % ("noisy" if kind == "real" else "stack(re, im)", p, d, hf,
               "" if kind == "real" else ", channel_axis=-1"))


def r10(a):
    """Round to 10 significant digits (enough for NRMSE comparisons)."""
    return [float("%.10g" % v) for v in np.asarray(a).ravel()]


def full(a):
    return [float(v) for v in np.asarray(a).ravel()]


def r12(a):
    """Round to 12 significant digits."""
    return [float("%.12g" % v) for v in np.asarray(a).ravel()]


def main():
    rng = np.random.default_rng(SEED)
    clean = transform.resize(data.shepp_logan_phantom(), (NY, NX), anti_aliasing=True)
    noisy = clean + SIGMA * rng.standard_normal((NY, NX))
    i, j = np.mgrid[0:NY, 0:NX]
    phase = 0.9 * np.sin(2 * np.pi * j / NX) + 0.5 * (i / NY - 0.5)
    ctruth = clean * np.exp(1j * phase)
    cnoisy = ctruth + SIGMA * (rng.standard_normal((NY, NX)) + 1j * rng.standard_normal((NY, NX)))
    ctruth2 = np.stack([ctruth.real, ctruth.imag], axis=-1)
    cnoisy2 = np.stack([cnoisy.real, cnoisy.imag], axis=-1)

    nlm = []
    for kind, p, d, hf in [("real", 7, 5, 0.8), ("real", 5, 10, 0.8), ("complex", 7, 5, 0.8)]:
        out = nl_means(kind, noisy, cnoisy2, p, d, hf)
        if kind == "real":
            err = normalized_root_mse(clean, out)
            flat = r10(out)
        else:
            err = normalized_root_mse(ctruth2, out)
            flat = {"re": r10(out[..., 0]), "im": r10(out[..., 1])}
        nlm.append({"kind": kind, "patch_size": p, "patch_distance": d, "h_factor": hf,
                    "call": call(kind, p, d, hf), "nrmse": float(err), "output": flat})

    # NRMSE over a grid of h for the same patch and window (no images stored).
    nlm_scan = []
    for kind, p, d in [("real", 7, 5), ("real", 5, 10), ("complex", 7, 5)]:
        for hf in H_GRID:
            out = nl_means(kind, noisy, cnoisy2, p, d, hf)
            ref = clean if kind == "real" else ctruth2
            nlm_scan.append({"kind": kind, "patch_size": p, "patch_distance": d, "h_factor": hf,
                             "nrmse": float(normalized_root_mse(ref, out))})

    tv = []
    for g in [1.0, 2.0]:
        out = denoise_tv_chambolle(noisy, weight=g * SIGMA)
        tight = denoise_tv_chambolle(noisy, weight=g * SIGMA, eps=1e-10, max_num_iter=20000)
        tv.append({"weight": g * SIGMA, "nrmse": float(normalized_root_mse(clean, out)),
                   "nrmse_tight": float(normalized_root_mse(clean, tight))})

    wav = denoise_wavelet(noisy, sigma=SIGMA, wavelet="db4", mode="soft", wavelet_levels=3,
                          method="VisuShrink")
    spin = cycle_spin(noisy, func=soft_periodized, max_shifts=3)
    nospin = soft_periodized(noisy)

    out = {
        "made_by": "make_pnp_fixture.py with scikit-image %s, PyWavelets %s, numpy %s"
                   % (skimage.__version__, pywt.__version__, np.__version__),
        "ny": NY, "nx": NX, "sigma": SIGMA, "seed": SEED,
        "clean": r12(clean),
        "noisy": full(noisy),
        "phase": r12(phase),
        "cnoisy_re": r12(cnoisy.real),
        "cnoisy_im": r12(cnoisy.imag),
        "noisy_nrmse": float(normalized_root_mse(clean, noisy)),
        "cnoisy_nrmse": float(normalized_root_mse(ctruth2, cnoisy2)),
        "nlm": nlm,
        "nlm_h_grid": H_GRID,
        "nlm_scan": nlm_scan,
        "tv": tv,
        "wavelet_visushrink": {"call": "denoise_wavelet(noisy, sigma=sigma, wavelet='db4', mode='soft', "
                                       "wavelet_levels=3, method='VisuShrink')",
                               "threshold": float(SIGMA * np.sqrt(2 * np.log(NY * NX))),
                               "nrmse": float(normalized_root_mse(clean, wav))},
        "cycle_spin": {"call": "cycle_spin(noisy, func=soft_periodized, max_shifts=3); db4, "
                               "periodization, level 3, soft threshold 2*sigma on details",
                       "threshold": 2 * SIGMA, "levels": 3, "wavelet": "db4", "max_shifts": 3,
                       "output": full(spin),
                       "nrmse": float(normalized_root_mse(clean, spin)),
                       "no_spin_nrmse": float(normalized_root_mse(clean, nospin))},
    }
    with open("pnp_fixture.json", "w") as fh:
        json.dump(out, fh)
        fh.write("\n")


if __name__ == "__main__":
    main()
