#!/usr/bin/python3
"""NIfTI-1 fixtures for out/nifti_test.go, made with nibabel 5.0.0
(Debian python3-nibabel, numpy 1.24.2), run as /usr/bin/python3.

  /usr/bin/python3 make_nifti_fixture.py
      writes the nibabel-made files nifti_*.nii / nifti_*.nii.gz in this
      folder and, for each, nifti_<name>.json with what nibabel reads from it
      (shape, voxels after scaling in storage order, affine, pixdim, header
      fields); then reads the Go-written nifti_go_written.nii (made by
      `ACCELPLAN_NIFTI_FIXTURE=1 go test ./out -run TestNIfTIGoWrittenFixture`)
      into nifti_go_written_nibabel.json.
  /usr/bin/python3 make_nifti_fixture.py --read FILE...
      prints a JSON list of the same for each FILE (used by the live test).

The voxel values are small invented test patterns; nothing here is real data.
"""
import json
import os
import sys

import nibabel as nib
import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))


def describe(path):
    img = nib.load(path)
    hdr = img.header
    data = np.asarray(img.get_fdata(dtype=np.float64))
    # nibabel moves the stored scaling to the array proxy when loading
    slope, inter = float(img.dataobj.slope), float(img.dataobj.inter)
    return {
        "nibabel": nib.__version__,
        "shape": list(data.shape),
        # storage order: the first axis varies fastest
        "data": [float(v) for v in data.ravel(order="F")],
        "affine": [[float(v) for v in row] for row in img.affine[:3]],
        "qform": [[float(v) for v in row] for row in hdr.get_qform()[:3]],
        "sform": [[float(v) for v in row] for row in hdr.get_sform()[:3]],
        "qform_code": int(hdr["qform_code"]),
        "sform_code": int(hdr["sform_code"]),
        "pixdim": [float(v) for v in hdr["pixdim"][1:data.ndim + 1]],
        "qfac": float(hdr["pixdim"][0]),
        "datatype": int(hdr["datatype"]),
        "bitpix": int(hdr["bitpix"]),
        "vox_offset": int(img.dataobj.offset),
        "scl_slope": slope,
        "scl_inter": inter,
        "endianness": hdr.endianness,
        "magic": hdr["magic"].item().decode(),
        "descrip": hdr["descrip"].item().decode(),
        "units": list(hdr.get_xyzt_units()),
        "cal_min": float(hdr["cal_min"]),
        "cal_max": float(hdr["cal_max"]),
    }


def pattern(shape, dtype):
    n = int(np.prod(shape))
    v = (np.arange(n) * 37 % 101).astype(np.float64) - 20.0
    if np.dtype(dtype).kind == "u":
        v = np.abs(v)
    if np.dtype(dtype).kind == "f":
        v = v / 8.0 + 0.03125
    return v.reshape(shape, order="F").astype(dtype)


def rotation_affine(spacing, offset, deg):
    t = np.deg2rad(deg)
    r = np.array([[np.cos(t), -np.sin(t), 0], [np.sin(t), np.cos(t), 0], [0, 0, 1]])
    a = np.eye(4)
    a[:3, :3] = r @ np.diag(spacing)
    a[:3, 3] = offset
    return a


def save(name, data, affine, endianness="<", slope_inter=None, qform_only=False):
    hdr = nib.Nifti1Header(endianness=endianness)
    hdr.set_data_dtype(data.dtype)
    img = nib.Nifti1Image(data, None, header=hdr)
    if qform_only:
        img.set_qform(affine, code=1)
        img.set_sform(None, code=0)
    else:
        img.set_sform(affine, code=2)
        img.set_qform(affine, code=1)
    if slope_inter is not None:
        img.header.set_slope_inter(*slope_inter)
    img.header.set_xyzt_units("mm")
    img.header["descrip"] = b"fixture " + name.encode()
    path = os.path.join(HERE, name)
    img.to_filename(path)
    return path


def make():
    cases = [
        # name, dtype, shape, endianness, affine, slope/inter, qform only
        ("nifti_int16_le.nii", "<i2", (5, 4), "<",
         np.diag([0.9, 1.1, 3.0, 1.0]), None, False),
        ("nifti_int16_be.nii.gz", ">i2", (4, 3, 2), ">",
         rotation_affine([1.5, 1.5, 4.0], [-3.0, 2.0, 7.5], 30.0), (0.5, -2.0), False),
        ("nifti_float32_le.nii.gz", "<f4", (6, 5), "<",
         rotation_affine([0.75, 0.8, 2.0], [10.0, -4.0, 1.0], -15.0), None, True),
        ("nifti_float32_be.nii", ">f4", (3, 4, 2), ">",
         np.diag([-1.25, 1.25, 2.5, 1.0]), None, True),
        ("nifti_uint8.nii", "u1", (4, 3), "<", np.eye(4), (2.0, 1.0), False),
        ("nifti_int32_be.nii", ">i4", (3, 3), ">", np.eye(4), None, False),
        ("nifti_float64.nii", "<f8", (2, 3), "<", np.eye(4), None, False),
    ]
    for name, dtype, shape, end, aff, si, qonly in cases:
        data = pattern(shape, np.dtype(dtype).newbyteorder("="))
        path = save(name, data, aff, end, si, qonly)
        with open(os.path.join(HERE, name.split(".")[0] + ".json"), "w") as f:
            json.dump(describe(path), f, indent=1)
            f.write("\n")
    go = os.path.join(HERE, "nifti_go_written.nii")
    if os.path.exists(go):
        with open(os.path.join(HERE, "nifti_go_written_nibabel.json"), "w") as f:
            json.dump(describe(go), f, indent=1)
            f.write("\n")


if __name__ == "__main__":
    if len(sys.argv) >= 3 and sys.argv[1] == "--read":
        json.dump([describe(p) for p in sys.argv[2:]], sys.stdout)
        sys.stdout.write("\n")
    else:
        make()
