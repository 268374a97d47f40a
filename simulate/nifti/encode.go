package nifti

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"
)

// MaxDim is the largest size along one axis that Encode writes: dim is a
// signed 16-bit field.
const MaxDim = math.MaxInt16

// Encode writes data as an uncompressed NIfTI-1 single file to w:
// little-endian float32 voxels after a 348-byte header and four zero
// extension bytes (vox_offset 352). dims lists the sizes in NIfTI order, the
// first varying fastest: (nx, ny) for a row-major ny×nx image, (nx, ny, nz)
// for nz such images one after another. pixdimMM holds the voxel spacing in
// mm in the same order (for a 2D image a third value, the slice thickness,
// may follow; it is 1 mm otherwise). The header carries scl_slope 1,
// scl_inter 0, units of mm, the display range cal_min/cal_max of the finite
// values, descrip (cut to 79 bytes) and the same axis-aligned orientation as
// both qform and sform, code 1 (scanner coordinates), as the package doc
// describes. A value that float32 cannot hold (finite but beyond ±3.4e38) is
// an error; NaN and ±Inf are written as they are.
func Encode(w io.Writer, data []float64, dims []int, pixdimMM []float64, descrip string) error {
	if len(dims) != 2 && len(dims) != 3 {
		return fmt.Errorf("nifti: %d dimensions; Encode writes 2D or 3D images", len(dims))
	}
	n := 1
	for k, d := range dims {
		if d < 1 || d > MaxDim {
			return fmt.Errorf("nifti: size %d along axis %d; each size must be 1 to %d", d, k+1, MaxDim)
		}
		n *= d
		if n > MaxVoxels {
			return fmt.Errorf("nifti: %s is more than %d voxels", dimsText(dims), MaxVoxels)
		}
	}
	if len(data) != n {
		return fmt.Errorf("nifti: %d values for a %s image of %d voxels", len(data), dimsText(dims), n)
	}
	if len(pixdimMM) != len(dims) && !(len(dims) == 2 && len(pixdimMM) == 3) {
		return fmt.Errorf("nifti: %d voxel spacings for %d dimensions", len(pixdimMM), len(dims))
	}
	sp := [3]float64{1, 1, 1}
	for k, v := range pixdimMM {
		if !(v > 0) || math.IsInf(v, 0) || v > math.MaxFloat32 {
			return fmt.Errorf("nifti: voxel spacing %g mm along axis %d; it must be positive and finite", v, k+1)
		}
		sp[k] = v
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, v := range data {
		if math.Abs(v) > math.MaxFloat32 && !math.IsInf(v, 0) {
			return fmt.Errorf("nifti: value %g at voxel %d does not fit in float32", v, i)
		}
		if f := float64(float32(v)); !math.IsNaN(f) && !math.IsInf(f, 0) {
			lo, hi = min(lo, f), max(hi, f)
		}
	}
	if lo > hi {
		lo, hi = 0, 0
	}

	var b [DataOffset]byte
	o := binary.LittleEndian
	put16 := func(off int, v int) { o.PutUint16(b[off:], uint16(int16(v))) }
	putF := func(off int, v float64) { o.PutUint32(b[off:], math.Float32bits(float32(v))) }
	o.PutUint32(b[0:], HeaderSize)
	b[38] = 'r' // "regular", kept from Analyze 7.5
	put16(40, len(dims))
	for k := 1; k <= 7; k++ {
		d := 1
		if k <= len(dims) {
			d = dims[k-1]
		}
		put16(40+2*k, d)
	}
	put16(70, Float32)
	put16(72, 32)
	// pixdim[0] = qfac = −1: the rotation diag(1, −1, −1) of quaternion
	// (0, 1, 0, 0) times diag(1, 1, qfac) gives diag(1, −1, 1), rows down.
	putF(76, -1)
	for k := range 3 {
		putF(80+4*k, sp[k])
	}
	for k := 3; k < 7; k++ {
		putF(80+4*k, 1)
	}
	putF(108, DataOffset)
	putF(112, 1)
	putF(116, 0)
	b[123] = 2 // NIFTI_UNITS_MM
	putF(124, hi)
	putF(128, lo)
	copy(b[148:228], cleanDescrip(descrip))
	put16(252, 1)
	put16(254, 1)
	nx, ny, nz := dims[0], dims[1], 1
	if len(dims) == 3 {
		nz = dims[2]
	}
	aff := [3][4]float64{
		{sp[0], 0, 0, -sp[0] * float64(nx/2)},
		{0, -sp[1], 0, sp[1] * float64(ny/2)},
		{0, 0, sp[2], -sp[2] * float64(nz/2)},
	}
	putF(256, 1) // quatern_b
	putF(260, 0)
	putF(264, 0)
	for k := range 3 {
		putF(268+4*k, aff[k][3])
		for c := range 4 {
			putF(280+16*k+4*c, aff[k][c])
		}
	}
	copy(b[344:], "n+1\x00")
	if _, err := w.Write(b[:]); err != nil {
		return err
	}
	var buf [4096]byte
	for i := 0; i < n; {
		m := min(n-i, len(buf)/4)
		for t := range m {
			o.PutUint32(buf[4*t:], math.Float32bits(float32(data[i+t])))
		}
		if _, err := w.Write(buf[:4*m]); err != nil {
			return err
		}
		i += m
	}
	return nil
}

// cleanDescrip returns s without NULs, cut to at most 79 bytes at a rune
// boundary so the 80-byte field always ends in a NUL.
func cleanDescrip(s string) string {
	s = strings.ReplaceAll(s, "\x00", " ")
	for len(s) > 79 {
		_, size := utf8.DecodeLastRuneInString(s)
		s = s[:len(s)-size]
	}
	return s
}
