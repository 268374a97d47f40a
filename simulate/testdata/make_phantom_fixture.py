#!/usr/bin/python3
# Regenerates testdata/shepp_logan_skimage.png, the reference image that
# phantom_test.go compares ModifiedSheppLogan against.
#
# Library: scikit-image 0.19.3 (Debian package python3-skimage), function
#   skimage.data.shepp_logan_phantom(), with NumPy 1.24.2 and imageio 2.4.1
#   (scikit-image's PNG writer) on Debian 12.
# Run from the simulate folder:  /usr/bin/python3 testdata/make_phantom_fixture.py
#
# What the image is: a 400x400 float64 image with grey levels 0, 0.1, 0.2,
# 0.3, 0.4 and 1.0, point-sampled (no anti-aliasing) and stored by
# scikit-image as 8-bit grey; it is written back here as 8-bit grey
# round(255*value), which reproduces the stored levels exactly. Row 0 is the
# top of the image.
import os
import sys

import numpy as np
import skimage
import skimage.data
import skimage.io

here = os.path.dirname(os.path.abspath(__file__))
img = skimage.data.shepp_logan_phantom()
if img.shape != (400, 400):
    sys.exit("unexpected shape %r" % (img.shape,))
u8 = np.round(np.clip(img, 0.0, 1.0) * 255.0).astype(np.uint8)
out = os.path.join(here, "shepp_logan_skimage.png")
skimage.io.imsave(out, u8, check_contrast=False)
print("wrote %s with scikit-image %s, NumPy %s; levels %s"
      % (out, skimage.__version__, np.__version__, np.unique(u8)))
