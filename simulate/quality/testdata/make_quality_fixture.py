#!/usr/bin/python3
"""Regenerate the quality-metric fixtures of accelplan/simulate/quality.

Made with Debian's scikit-image 0.19.3 (python3-skimage), SciPy 1.10.1
(python3-scipy) and NumPy 1.24.2 (python3-numpy); run as
    cd simulate/quality/testdata && /usr/bin/python3 make_quality_fixture.py
The versions actually used are written into quality_fixture.json.

Reference values:
  ssim      skimage.metrics.structural_similarity(x, ref, gaussian_weights=True,
            sigma=1.5, use_sample_covariance=False, data_range=L)  (its own
            interior-cropped mean), full=True gives the map
  ssim_all  mean of that map over every pixel
  ssim_roi  mean of that map over the roi pixels
  psnr      skimage.metrics.peak_signal_noise_ratio(ref, x, data_range=L)
  nrmse     skimage.metrics.normalized_root_mse(ref, x, normalization='euclidean')
  *_roi     the same functions applied to ref[roi], x[roi]
  hfen      ||LoG(x-ref)|| / ||LoG(ref)|| with a 15x15, sigma=1.5 LoG kernel
            built here directly in 2D and applied by
            scipy.ndimage.correlate(mode='constant', cval=0)
  hfen_kernel  that 15x15 kernel, row-major

Images are little-endian float64 (.f64), row-major; rois are uint8 (.u8).
Every random draw is seeded.
"""
import json

import numpy as np
import scipy
import scipy.ndimage as ndi
import skimage
from skimage.data import shepp_logan_phantom
from skimage.filters import gaussian
from skimage.metrics import (normalized_root_mse, peak_signal_noise_ratio,
                             structural_similarity)
from skimage.transform import resize


def log_kernel(radius=7, sigma=1.5):
    t = np.arange(-radius, radius + 1, dtype=np.float64)
    xx, yy = np.meshgrid(t, t)
    r2 = xx ** 2 + yy ** 2
    g = np.exp(-r2 / (2 * sigma ** 2))
    h = g / g.sum() * (r2 - 2 * sigma ** 2) / sigma ** 4
    return h - h.mean()


def hfen(x, ref, roi=None):
    k = log_kernel()
    e = ndi.correlate(x - ref, k, mode='constant', cval=0.0)
    f = ndi.correlate(ref, k, mode='constant', cval=0.0)
    if roi is not None:
        e, f = e[roi], f[roi]
    return float(np.linalg.norm(e) / np.linalg.norm(f))


def save(name, a):
    a = np.ascontiguousarray(a)
    if a.dtype == bool:
        a.astype('u1').tofile(name + '.u8')
        return name + '.u8'
    a.astype('<f8').tofile(name + '.f64')
    return name + '.f64'


def main():
    phantom = shepp_logan_phantom()
    ref64 = resize(phantom, (64, 64), anti_aliasing=True)
    ref100 = resize(phantom, (100, 80), anti_aliasing=True)
    files = {'ref64': save('ref64', ref64), 'ref100x80': save('ref100x80', ref100)}

    cases = []

    def add(name, x, ref, ref_file, L, roi, keep_map):
        ssim, smap = structural_similarity(
            x, ref, gaussian_weights=True, sigma=1.5,
            use_sample_covariance=False, data_range=L, full=True)
        c = {
            'name': name, 'ny': ref.shape[0], 'nx': ref.shape[1],
            'data_range': float(L),
            'x': save(name + '_x', x), 'ref': ref_file,
            'roi': save(name + '_roi', roi),
            'ssim': float(ssim),
            'ssim_all': float(smap.mean(dtype=np.float64)),
            'ssim_roi': float(smap[roi].mean(dtype=np.float64)),
            'psnr': float(peak_signal_noise_ratio(ref, x, data_range=L)),
            'psnr_roi': float(peak_signal_noise_ratio(ref[roi], x[roi], data_range=L)),
            'nrmse': float(normalized_root_mse(ref, x, normalization='euclidean')),
            'nrmse_roi': float(normalized_root_mse(ref[roi], x[roi], normalization='euclidean')),
            'hfen': hfen(x, ref),
            'hfen_roi': hfen(x, ref, roi),
        }
        if keep_map:
            c['map'] = save(name + '_map', smap)
        cases.append(c)

    rng = np.random.default_rng(20240601)
    head64 = ref64 > 0.02
    head100 = ref100 > 0.02

    add('phantom64_noise', ref64 + 0.05 * rng.standard_normal(ref64.shape),
        ref64, files['ref64'], 1.0, head64, True)
    blurred = gaussian(ref64, sigma=1.0, mode='nearest', preserve_range=True)
    add('phantom64_blur', blurred + 0.01 * rng.standard_normal(ref64.shape),
        ref64, files['ref64'], 1.0, head64, False)
    add('phantom100x80_offset',
        ref100 + 0.02 + 0.03 * rng.standard_normal(ref100.shape),
        ref100, files['ref100x80'], 1.0, head100, False)
    rician = np.abs(ref100 + 0.04 * rng.standard_normal(ref100.shape)
                    + 0.04j * rng.standard_normal(ref100.shape))
    add('phantom100x80_rician', rician, ref100, files['ref100x80'],
        float(ref100.max() - ref100.min()), head100, True)

    tex = rng.uniform(-1.0, 1.0, (37, 23))
    add('texture37x23', tex + 0.3 * rng.standard_normal(tex.shape), tex,
        save('texture37x23_ref', tex), 2.0, rng.random(tex.shape) < 0.5, True)
    small = rng.random((11, 13))
    add('small11x13', small + 0.1 * rng.standard_normal(small.shape), small,
        save('small11x13_ref', small), 1.0, rng.random(small.shape) < 0.5, True)

    out = {
        'made_by': 'make_quality_fixture.py',
        'versions': {'skimage': skimage.__version__, 'scipy': scipy.__version__,
                     'numpy': np.__version__},
        'hfen_kernel': [float(v) for v in log_kernel().ravel()],
        'cases': cases,
    }
    with open('quality_fixture.json', 'w') as f:
        json.dump(out, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
