// Package nifti owns the byte layout of NIfTI-1 single-file images (.nii,
// magic "n+1", optionally gzip-compressed): decoding a header and its voxels
// from any supported byte order and datatype into float64 values, and
// encoding float32 images with an axis-aligned orientation. It is the one
// place that knows the format; package out writes files with it and package
// simulate loads the user's own object with it, so it imports nothing of
// accelplan.
//
// Source: NIfTI-1 data format, NIfTI Data Format Working Group, 2004 (the
// annotated header nifti1.h): a 348-byte header, four extension-flag bytes and
// the voxels from vox_offset on, the first index (x) varying fastest.
//
// Orientation written by Encode: the first NIfTI index i is our image column
// (it grows to the right on screen), the second index j our image row (it
// grows downwards on screen), the third k the slice. The affine maps them to
// RAS+ millimetres (x to the subject's right, y anterior, z superior) as
//
//	x = +dx·(i − nx/2),  y = −dy·(j − ny/2),  z = +dz·(k − nz/2),
//
// so row 0 is the most anterior row, a viewer that shows axial slices in the
// neurological convention (subject's right on the right, anterior at the top)
// shows the picture exactly as our PNG files do, and the centre pixel of the
// FFT-centred grid (ny/2, nx/2) sits at the world origin.
package nifti

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
)

// Layout constants of the NIfTI-1 single file.
const (
	// HeaderSize is sizeof_hdr, the size of the NIfTI-1 header in bytes.
	HeaderSize = 348
	// DataOffset is the vox_offset Encode writes: the header plus the four
	// extension-flag bytes (all zero: no extension).
	DataOffset = 352
)

// Limits that keep a header that lies from causing a huge allocation.
const (
	// MaxVoxels is the largest number of voxels Decode accepts (2²⁷, a
	// 512³ volume, 1 GiB as float64).
	MaxVoxels = 1 << 27
	// MaxExtension is the largest gap Decode accepts between the header and
	// the voxels (extensions it skips), 16 MiB.
	MaxExtension = 16 << 20
)

// Datatype codes of the NIfTI-1 header that Decode reads.
const (
	Uint8   = 2
	Int16   = 4
	Int32   = 8
	Float32 = 16
	Float64 = 64
	Int8    = 256
	Uint16  = 512
	Uint32  = 768
)

// datatypes maps a supported code to its name and size in bytes.
var datatypes = map[int16]struct {
	name  string
	bytes int
}{
	Uint8: {"uint8", 1}, Int16: {"int16", 2}, Int32: {"int32", 4},
	Float32: {"float32", 4}, Float64: {"float64", 8},
	Int8: {"int8", 1}, Uint16: {"uint16", 2}, Uint32: {"uint32", 4},
}

// unsupported names the datatype codes of the standard that Decode refuses.
var unsupported = map[int16]string{
	1: "binary (1 bit)", 32: "complex64", 128: "rgb24", 1024: "int64",
	1280: "uint64", 1536: "float128", 1792: "complex128", 2048: "complex256",
	2304: "rgba32",
}

// Header holds the fields of a NIfTI-1 header that accelplan uses.
type Header struct {
	// Order is the byte order the header and voxels are stored in.
	Order binary.ByteOrder
	// Dims holds dim[1] … dim[dim[0]]: the size along each axis, the first
	// (x, our column index) varying fastest in storage.
	Dims []int
	// Pixdim holds pixdim[1] … pixdim[dim[0]], the voxel spacing along each
	// axis (mm for spatial axes when the units say so).
	Pixdim []float64
	// Qfac is pixdim[0], the sign of the third axis in the qform (±1; a
	// stored 0 reads as 1, as the standard asks).
	Qfac float64
	// Datatype is the NIfTI datatype code (Uint8 … Float64).
	Datatype int16
	// VoxOffset is the byte offset of the first voxel.
	VoxOffset int64
	// Slope and Inter are scl_slope and scl_inter as stored; the decoded
	// values are Slope·v + Inter unless Slope is 0 or not finite.
	Slope, Inter float64
	// XYZTUnits is the xyzt_units byte (2 means millimetres).
	XYZTUnits uint8
	// Descrip is the description text, up to its first NUL.
	Descrip string
	// QformCode and SformCode say what the two stored orientations mean (0:
	// not set, 1: scanner coordinates, 2: aligned to an anatomy, …).
	QformCode, SformCode int16
	// Quatern holds quatern_b, quatern_c, quatern_d; QOffset the qform
	// offsets in mm.
	Quatern, QOffset [3]float64
	// Srow holds the three rows of the sform affine (mm).
	Srow [3][4]float64
	// CalMin and CalMax are the display range.
	CalMin, CalMax float64

	// qpix holds pixdim[1…3] whatever dim[0] says: the qform uses all three.
	qpix [3]float64
}

// Image is a decoded NIfTI-1 file: its header and its voxels, scaled by the
// header's slope and intercept, in storage order (x fastest, then y, then z).
type Image struct {
	Header
	Data []float64
}

// DatatypeName returns the name of a NIfTI datatype code, or "code N" when
// the standard defines no such code.
func DatatypeName(code int16) string {
	if d, ok := datatypes[code]; ok {
		return d.name
	}
	if s, ok := unsupported[code]; ok {
		return s
	}
	return fmt.Sprintf("code %d", code)
}

// Voxels returns the number of voxels the dims describe.
func (h *Header) Voxels() int {
	n := 1
	for _, d := range h.Dims {
		n *= d
	}
	return n
}

// Affine returns the voxel-to-world matrix (mm, RAS+) the header stores and
// the code it carries: the sform when sform_code > 0, otherwise the qform
// when qform_code > 0 (built from the quaternion, the offsets, pixdim and
// qfac by the standard's method 2), otherwise ok is false. A voxel (i, j, k)
// maps to world = A·(i, j, k, 1).
func (h *Header) Affine() (a [3][4]float64, code int16, ok bool) {
	if h.SformCode > 0 {
		return h.Srow, h.SformCode, true
	}
	if h.QformCode > 0 {
		return h.QformMatrix(), h.QformCode, true
	}
	return a, 0, false
}

// QformMatrix returns the affine of the qform fields (the standard's method
// 2): rotation from the unit quaternion (a, b, c, d) with
// a = √(1 − b² − c² − d²), its columns scaled by pixdim[1], pixdim[2] and
// qfac·pixdim[3], and the offsets as the last column.
func (h *Header) QformMatrix() [3][4]float64 {
	b, c, d := h.Quatern[0], h.Quatern[1], h.Quatern[2]
	a := 1 - (b*b + c*c + d*d)
	if a < 1e-7 {
		// The standard: a is then 0 and (b, c, d) is renormalised.
		s := 1 / math.Sqrt(b*b+c*c+d*d)
		b, c, d, a = b*s, c*s, d*s, 0
	} else {
		a = math.Sqrt(a)
	}
	r := [3][3]float64{
		{a*a + b*b - c*c - d*d, 2 * (b*c - a*d), 2 * (b*d + a*c)},
		{2 * (b*c + a*d), a*a + c*c - b*b - d*d, 2 * (c*d - a*b)},
		{2 * (b*d - a*c), 2 * (c*d + a*b), a*a + d*d - c*c - b*b},
	}
	sp := h.qpix
	qfac := h.Qfac
	if qfac == 0 {
		qfac = 1
	}
	sp[2] *= qfac
	var m [3][4]float64
	for i := range 3 {
		for j := range 3 {
			m[i][j] = r[i][j] * sp[j]
		}
		m[i][3] = h.QOffset[i]
	}
	return m
}

// Read decodes a NIfTI-1 single file from r, gunzipping it first when it
// starts with the gzip magic bytes. It reads at most what the header
// announces plus one byte, and the memory it allocates grows with the bytes
// actually present, so a header that lies cannot force a large allocation.
// Every problem is returned as an error; Read never panics on bad bytes.
func Read(r io.Reader) (*Image, error) {
	br := bufio.NewReader(r)
	magic, err := br.Peek(2)
	if err == nil && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, fmt.Errorf("nifti: gzip stream: %w", err)
		}
		defer zr.Close()
		img, err := decode(zr, "decompressed data")
		if err != nil {
			return nil, err
		}
		return img, nil
	}
	return decode(br, "file")
}

// Decode decodes an uncompressed NIfTI-1 single file held in b.
func Decode(b []byte) (*Image, error) {
	return decode(bytes.NewReader(b), "file")
}

// ParseHeader decodes and checks the 348-byte header in b (at least
// HeaderSize bytes). It checks sizeof_hdr, the magic, dim, the datatype,
// bitpix, vox_offset, the scaling fields and the limits; it does not know the
// file's length.
func ParseHeader(b []byte) (*Header, error) {
	if len(b) < HeaderSize {
		return nil, fmt.Errorf("nifti: not a NIfTI-1 file: %d bytes, shorter than the %d-byte header", len(b), HeaderSize)
	}
	var order binary.ByteOrder
	switch {
	case binary.LittleEndian.Uint32(b) == HeaderSize:
		order = binary.LittleEndian
	case binary.BigEndian.Uint32(b) == HeaderSize:
		order = binary.BigEndian
	case binary.LittleEndian.Uint32(b) == 540 || binary.BigEndian.Uint32(b) == 540:
		return nil, errors.New("nifti: a NIfTI-2 header (sizeof_hdr 540); only NIfTI-1 is read")
	default:
		return nil, fmt.Errorf("nifti: not a NIfTI-1 file: sizeof_hdr is %d, want %d", int32(binary.LittleEndian.Uint32(b)), HeaderSize)
	}
	switch m := string(b[344:348]); m {
	case "n+1\x00":
	case "ni1\x00":
		return nil, errors.New("nifti: a NIfTI-1 header for a separate .img file (magic \"ni1\"); only single .nii files are read")
	default:
		return nil, fmt.Errorf("nifti: not a NIfTI-1 file: magic %q, want \"n+1\" (an Analyze 7.5 header has none)", strings.TrimRight(m, "\x00"))
	}
	i16 := func(off int) int16 { return int16(order.Uint16(b[off:])) }
	f32 := func(off int) float64 { return float64(math.Float32frombits(order.Uint32(b[off:]))) }

	h := &Header{Order: order}
	nd := int(i16(40))
	if nd < 1 || nd > 7 {
		return nil, fmt.Errorf("nifti: dim[0] is %d; it must be 1 to 7", nd)
	}
	total := 1
	for k := 1; k <= nd; k++ {
		d := int(i16(40 + 2*k))
		if d < 1 {
			return nil, fmt.Errorf("nifti: dim[%d] is %d; every used dimension must be at least 1", k, d)
		}
		total *= d
		if total > MaxVoxels {
			return nil, fmt.Errorf("nifti: dims %v describe more than %d voxels, the most accepted", dimsOf(b, order, nd), MaxVoxels)
		}
		h.Dims = append(h.Dims, d)
		h.Pixdim = append(h.Pixdim, f32(76+4*k))
	}
	for k := range 3 {
		h.qpix[k] = f32(80 + 4*k)
	}
	h.Qfac = f32(76)
	if h.Qfac != -1 {
		h.Qfac = 1 // the standard: any value other than −1 means 1
	}
	h.Datatype = i16(70)
	dt, ok := datatypes[h.Datatype]
	if !ok {
		if name, known := unsupported[h.Datatype]; known {
			return nil, fmt.Errorf("nifti: datatype %s (code %d) is not supported; use uint8, int8, int16, uint16, int32, uint32, float32 or float64", name, h.Datatype)
		}
		return nil, fmt.Errorf("nifti: datatype code %d is not a NIfTI-1 datatype", h.Datatype)
	}
	if bp := int(i16(72)); bp != 8*dt.bytes {
		return nil, fmt.Errorf("nifti: bitpix is %d but datatype %s has %d bits", bp, dt.name, 8*dt.bytes)
	}
	off := f32(108)
	if math.IsNaN(off) || off != math.Trunc(off) || off < DataOffset || off > DataOffset+MaxExtension {
		return nil, fmt.Errorf("nifti: vox_offset is %g; a single .nii file needs a whole number from %d to %d", off, DataOffset, DataOffset+MaxExtension)
	}
	h.VoxOffset = int64(off)
	h.Slope, h.Inter = f32(112), f32(116)
	if h.Slope != 0 && !math.IsNaN(h.Slope) && !math.IsInf(h.Slope, 0) && (math.IsNaN(h.Inter) || math.IsInf(h.Inter, 0)) {
		return nil, fmt.Errorf("nifti: scl_slope is %g but scl_inter is %g, not a number", h.Slope, h.Inter)
	}
	h.XYZTUnits = b[123]
	h.CalMax, h.CalMin = f32(124), f32(128)
	h.Descrip = cString(b[148:228])
	h.QformCode, h.SformCode = i16(252), i16(254)
	for k := range 3 {
		h.Quatern[k] = f32(256 + 4*k)
		h.QOffset[k] = f32(268 + 4*k)
		for c := range 4 {
			h.Srow[k][c] = f32(280 + 16*k + 4*c)
		}
	}
	return h, nil
}

func dimsOf(b []byte, order binary.ByteOrder, nd int) []int {
	d := make([]int, nd)
	for k := range d {
		d[k] = int(int16(order.Uint16(b[42+2*k:])))
	}
	return d
}

func cString(b []byte) string {
	if i := bytes.IndexByte(b, 0); i >= 0 {
		b = b[:i]
	}
	return string(b)
}

// dimsText formats dims as "256×256×1".
func dimsText(d []int) string {
	var sb strings.Builder
	for i, v := range d {
		if i > 0 {
			sb.WriteString("×")
		}
		fmt.Fprint(&sb, v)
	}
	return sb.String()
}

// decode reads a header and its voxels from r; what names the stream in
// size errors ("file" or "decompressed data").
func decode(r io.Reader, what string) (*Image, error) {
	var hb [HeaderSize]byte
	n, err := io.ReadFull(r, hb[:])
	if err != nil {
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			return nil, fmt.Errorf("nifti: not a NIfTI-1 file: the %s holds %d bytes, shorter than the %d-byte header", what, n, HeaderSize)
		}
		return nil, fmt.Errorf("nifti: reading the header: %w", err)
	}
	h, err := ParseHeader(hb[:])
	if err != nil {
		return nil, err
	}
	dt := datatypes[h.Datatype]
	nvox := h.Voxels()
	want := int64(nvox) * int64(dt.bytes)
	// Skip the extension flag and any extensions, then read the voxels and
	// one byte more to notice trailing data.
	gap := h.VoxOffset - HeaderSize
	skipped, err := io.CopyN(io.Discard, r, gap)
	if err != nil && err != io.EOF {
		return nil, fmt.Errorf("nifti: reading: %w", err)
	}
	body, err := io.ReadAll(io.LimitReader(r, want+1))
	if err != nil {
		return nil, fmt.Errorf("nifti: reading the voxels: %w", err)
	}
	if skipped < gap || int64(len(body)) != want {
		held := HeaderSize + skipped + int64(len(body))
		claim := fmt.Sprintf("nifti: header says %s %s = %d bytes after offset %d", dimsText(h.Dims), dt.name, want, h.VoxOffset)
		if int64(len(body)) > want {
			return nil, fmt.Errorf("%s, but the %s holds more than %d bytes", claim, what, held-1)
		}
		return nil, fmt.Errorf("%s, but the %s holds %d bytes in all", claim, what, held)
	}
	img := &Image{Header: *h, Data: make([]float64, nvox)}
	convert(img.Data, body, h.Datatype, h.Order)
	if s := h.Slope; s != 0 && !math.IsNaN(s) && !math.IsInf(s, 0) {
		for i, v := range img.Data {
			img.Data[i] = v*s + h.Inter
		}
	}
	return img, nil
}

// convert turns raw voxels of one datatype into float64 values.
func convert(dst []float64, b []byte, code int16, o binary.ByteOrder) {
	switch code {
	case Uint8:
		for i := range dst {
			dst[i] = float64(b[i])
		}
	case Int8:
		for i := range dst {
			dst[i] = float64(int8(b[i]))
		}
	case Int16:
		for i := range dst {
			dst[i] = float64(int16(o.Uint16(b[2*i:])))
		}
	case Uint16:
		for i := range dst {
			dst[i] = float64(o.Uint16(b[2*i:]))
		}
	case Int32:
		for i := range dst {
			dst[i] = float64(int32(o.Uint32(b[4*i:])))
		}
	case Uint32:
		for i := range dst {
			dst[i] = float64(o.Uint32(b[4*i:]))
		}
	case Float32:
		for i := range dst {
			dst[i] = float64(math.Float32frombits(o.Uint32(b[4*i:])))
		}
	case Float64:
		for i := range dst {
			dst[i] = math.Float64frombits(o.Uint64(b[8*i:]))
		}
	}
}
