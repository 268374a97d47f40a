#!/usr/bin/python3
# Regenerates haar_fixture.json: a 2-level orthonormal Haar wavelet transform
# of a seeded random 16x12 image, made by PyWavelets 1.1.1 (Debian
# python3-pywt) with NumPy 1.24.2 (Debian python3-numpy):
#   pywt.wavedec2(x, 'haar', mode='periodization', level=2)
# laid out by pywt.coeffs_to_array (approximation at the top left).
# Run: /usr/bin/python3 make_haar_fixture.py > haar_fixture.json
import json

import numpy as np
import pywt

rng = np.random.default_rng(20240601)
x = rng.standard_normal((16, 12))
coeffs = pywt.wavedec2(x, 'haar', mode='periodization', level=2)
arr, _ = pywt.coeffs_to_array(coeffs)
print(json.dumps({
    "library": "PyWavelets %s, NumPy %s" % (pywt.__version__, np.__version__),
    "rows": 16, "cols": 12, "levels": 2,
    "image": x.ravel().tolist(),
    "coeffs": arr.ravel().tolist(),
}))
