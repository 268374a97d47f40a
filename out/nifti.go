package out

import (
	"compress/gzip"
	"fmt"
	"io"
	"os"
	"strings"

	"accelplan/simulate/nifti"
)

// nameOfTool opens every NIfTI description this package writes.
const nameOfTool = "accelplan"

// WriteNIfTI writes a row-major ny×nx image as a NIfTI-1 single file
// (magic "n+1", 348-byte header, vox_offset 352, float32 voxels,
// scl_slope 1), atomically. pixdimMM is the pixel spacing in mm in NIfTI
// order: pixdimMM[0] along a row (x, between columns), pixdimMM[1] down a
// column (y, between rows). descrip goes into the header after the tool's
// name, cut to the field's 79 bytes. A path ending in ".gz" is written
// gzip-compressed (.nii.gz).
//
// Orientation (qform and sform, code 1, see package accelplan/simulate/nifti):
// column j maps to x = dx·(j − nx/2) mm, row i to y = −dy·(i − ny/2) mm, so
// the rows run from anterior (row 0, top of our PNG pictures) to posterior
// and a viewer in the neurological convention shows the same picture as our
// PNG files.
func WriteNIfTI(path string, img []float64, ny, nx int, pixdimMM [2]float64, descrip string) error {
	if ny < 1 || nx < 1 {
		return fmt.Errorf("out: NIfTI image of %d×%d pixels; both sizes must be ≥ 1", ny, nx)
	}
	if len(img) != ny*nx {
		return fmt.Errorf("out: NIfTI image has %d values, want %d×%d = %d", len(img), ny, nx, ny*nx)
	}
	return writeNIfTI(path, img, []int{nx, ny}, pixdimMM[:], descrip)
}

// WriteNIfTI3D writes nz row-major ny×nx slices, one after another in vol,
// as a 3D NIfTI-1 single file; pixdimMM holds the spacing along x (columns),
// y (rows) and z (slices) in mm. Slice k sits at z = dz·(k − nz/2) mm; the
// in-plane orientation and the rest are as for WriteNIfTI.
func WriteNIfTI3D(path string, vol []float64, nz, ny, nx int, pixdimMM [3]float64, descrip string) error {
	if nz < 1 || ny < 1 || nx < 1 {
		return fmt.Errorf("out: NIfTI volume of %d×%d×%d voxels; every size must be ≥ 1", nz, ny, nx)
	}
	if len(vol) != nz*ny*nx {
		return fmt.Errorf("out: NIfTI volume has %d values, want %d×%d×%d = %d", len(vol), nz, ny, nx, nz*ny*nx)
	}
	return writeNIfTI(path, vol, []int{nx, ny, nz}, pixdimMM[:], descrip)
}

func writeNIfTI(path string, data []float64, dims []int, pix []float64, descrip string) error {
	d := nameOfTool
	if descrip != "" {
		d += ": " + descrip
	}
	// Check the input before touching the file system, so bad input leaves
	// no temporary file and a clear message.
	if err := nifti.Encode(io.Discard, data, dims, pix, d); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	return WriteFileAtomic(path, func(w io.Writer) error {
		if !strings.HasSuffix(path, ".gz") {
			return nifti.Encode(w, data, dims, pix, d)
		}
		zw := gzip.NewWriter(w)
		if err := nifti.Encode(zw, data, dims, pix, d); err != nil {
			return err
		}
		return zw.Close()
	})
}

// ReadNIfTI reads a NIfTI-1 single file (.nii, or gzip-compressed .nii.gz,
// recognised by its first bytes) of either byte order and of datatype uint8,
// int8, int16, uint16, int32, uint32, float32 or float64. It returns the
// voxels in storage order (x fastest: for a 2D file exactly our row-major
// ny×nx image), scaled by scl_slope and scl_inter when the slope is non-zero
// and finite; dims in NIfTI order (dims[0] = nx, dims[1] = ny, …) and the
// matching voxel spacings pixdim[1…] as stored. A file that is not NIfTI-1,
// whose header disagrees with its length, or whose datatype is not supported
// gives an error naming the file and the problem.
func ReadNIfTI(path string) (img []float64, dims []int, pixdim []float64, err error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("out: %w", err)
	}
	defer f.Close()
	im, err := nifti.Read(f)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("out: reading %s: %w", path, err)
	}
	return im.Data, im.Dims, im.Pixdim, nil
}
