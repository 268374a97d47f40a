#!/usr/bin/python3
"""Fixtures for simulate/imagephantom_test.go, made with Pillow 9.4.0 (Debian
python3-pil), nibabel 5.0.0 (Debian python3-nibabel) and numpy 1.24.2, run
as /usr/bin/python3 from this folder:

  /usr/bin/python3 imagephantom_make_fixture.py

imagephantom_gray16.png   16-bit greyscale PNG written by Pillow (mode I;16)
imagephantom_rgb.png      8-bit RGB PNG written by Pillow
imagephantom_png.json     the levels of both as Pillow reads them, and
                          Pillow's convert("L") of the RGB one (ITU-R 601-2
                          luma, rounded to 8 bits)
imagephantom_bicubic.json a float image (mode F) and Pillow's
                          resize(..., Image.BICUBIC) of it 3x larger (cubic
                          convolution, a = -0.5)
imagephantom_ras.nii      float32 2D image with the plain RAS affine
                          (rows = second index, growing anterior), by nibabel
imagephantom_vol.nii.gz   int16 volume of 3 slices, by nibabel
imagephantom_nan.nii      float32 2D image holding one NaN, by nibabel
imagephantom_nifti.json   voxels of the NIfTI files in storage order (first
                          index fastest), as nibabel reads them

The pixel values are small invented patterns, not data of any kind.
"""
import json

import nibabel as nib
import numpy as np
from PIL import Image

rng = np.random.default_rng(20240611)

g16 = (np.arange(35).reshape(7, 5) * 1927 + 11) % 65536
g16[0, 0], g16[6, 4] = 0, 65535
Image.fromarray(g16.astype(np.uint16)).save("imagephantom_gray16.png")
rgb = rng.integers(0, 256, size=(3, 4, 3), dtype=np.uint8)
Image.fromarray(rgb, mode="RGB").save("imagephantom_rgb.png")
back16 = np.asarray(Image.open("imagephantom_gray16.png"))
lum = np.asarray(Image.open("imagephantom_rgb.png").convert("L"))
with open("imagephantom_png.json", "w") as f:
    json.dump({
        "pillow": Image.__version__ if hasattr(Image, "__version__") else "",
        "gray16": {"rows": 7, "cols": 5, "levels": back16.ravel().tolist(),
                   "mode": Image.open("imagephantom_gray16.png").mode},
        "rgb": {"rows": 3, "cols": 4, "rgb": rgb.reshape(-1, 3).tolist(),
                "luma_L": lum.ravel().tolist()},
    }, f)
    f.write("\n")

src = rng.random((9, 7)).astype(np.float32)
up = np.asarray(Image.fromarray(src, mode="F").resize((7 * 3, 9 * 3), Image.BICUBIC))
with open("imagephantom_bicubic.json", "w") as f:
    json.dump({"rows": 9, "cols": 7, "factor": 3,
               "src": [float(v) for v in src.ravel()],
               "out": [float(v) for v in up.ravel()]}, f)
    f.write("\n")

nif = {"nibabel": nib.__version__}
ras = (np.arange(20, dtype=np.float32).reshape(5, 4, order="F") + 1) / 4
nib.save(nib.Nifti1Image(ras, np.diag([0.5, 0.7, 2.0, 1.0])), "imagephantom_ras.nii")
nif["ras"] = {"shape": list(ras.shape), "data": [float(v) for v in ras.ravel(order="F")]}
vol = (np.arange(36).reshape(4, 3, 3, order="F") * 7 % 50).astype(np.int16)
nib.save(nib.Nifti1Image(vol, np.eye(4)), "imagephantom_vol.nii.gz")
nif["vol"] = {"shape": list(vol.shape), "data": [float(v) for v in vol.ravel(order="F")]}
nan = np.ones((3, 2), dtype=np.float32)
nan[1, 1] = np.nan
nib.save(nib.Nifti1Image(nan, np.eye(4)), "imagephantom_nan.nii")
with open("imagephantom_nifti.json", "w") as f:
    json.dump(nif, f)
    f.write("\n")
