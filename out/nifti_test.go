package out

import (
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"accelplan/simulate/nifti"
)

// nibabelView is what testdata/make_nifti_fixture.py reports nibabel 5.0
// (Debian python3-nibabel) reads from a NIfTI-1 file.
type nibabelView struct {
	Nibabel    string        `json:"nibabel"`
	Shape      []int         `json:"shape"`
	Data       []float64     `json:"data"`
	Affine     [3][4]float64 `json:"affine"`
	Qform      [3][4]float64 `json:"qform"`
	Sform      [3][4]float64 `json:"sform"`
	QformCode  int           `json:"qform_code"`
	SformCode  int           `json:"sform_code"`
	Pixdim     []float64     `json:"pixdim"`
	Qfac       float64       `json:"qfac"`
	Datatype   int           `json:"datatype"`
	Bitpix     int           `json:"bitpix"`
	VoxOffset  int           `json:"vox_offset"`
	SclSlope   float64       `json:"scl_slope"`
	SclInter   float64       `json:"scl_inter"`
	Endianness string        `json:"endianness"`
	Magic      string        `json:"magic"`
	Descrip    string        `json:"descrip"`
	Units      []string      `json:"units"`
	CalMin     float64       `json:"cal_min"`
	CalMax     float64       `json:"cal_max"`
}

func loadView(t *testing.T, path string) nibabelView {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var v nibabelView
	if err := json.Unmarshal(b, &v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return v
}

func readHeader(t *testing.T, path string) *nifti.Image {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	im, err := nifti.Read(f)
	if err != nil {
		t.Fatal(err)
	}
	return im
}

func affineClose(a, b [3][4]float64, tol float64) bool {
	for i := range 3 {
		for j := range 4 {
			if math.Abs(a[i][j]-b[i][j]) > tol {
				return false
			}
		}
	}
	return true
}

// Files written by nibabel 5.0.0 (testdata/make_nifti_fixture.py: int16,
// int32, uint8, float32, float64; both byte orders; plain and gzipped; sform
// with qform, or qform alone with a rotation; scl_slope/scl_inter) read by
// our reader give exactly the voxels, shape, spacing and affine that nibabel
// itself reads from them.
func TestReadNIfTIMatchesNibabelFixtures(t *testing.T) {
	cases := []struct {
		file  string
		order binary.ByteOrder
	}{
		{"nifti_int16_le.nii", binary.LittleEndian},
		{"nifti_int16_be.nii.gz", binary.BigEndian},
		{"nifti_float32_le.nii.gz", binary.LittleEndian},
		{"nifti_float32_be.nii", binary.BigEndian},
		{"nifti_uint8.nii", binary.LittleEndian},
		{"nifti_int32_be.nii", binary.BigEndian},
		{"nifti_float64.nii", binary.LittleEndian},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			path := filepath.Join("testdata", c.file)
			want := loadView(t, filepath.Join("testdata", strings.SplitN(c.file, ".", 2)[0]+".json"))
			img, dims, pixdim, err := ReadNIfTI(path)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(dims, want.Shape) {
				t.Errorf("dims %v, nibabel shape %v", dims, want.Shape)
			}
			// nibabel applies the scaling in float64 as we do: exact.
			if !slices.Equal(img, want.Data) {
				t.Errorf("voxels differ from nibabel's get_fdata:\n got %v\nwant %v", img, want.Data)
			}
			// pixdim is float32 in the file; both widen it exactly.
			if !slices.Equal(pixdim, want.Pixdim) {
				t.Errorf("pixdim %v, nibabel %v", pixdim, want.Pixdim)
			}
			h := readHeader(t, path)
			if h.Order != c.order {
				t.Errorf("byte order %v, want %v (nibabel %q)", h.Order, c.order, want.Endianness)
			}
			if int(h.Datatype) != want.Datatype || h.VoxOffset != int64(want.VoxOffset) {
				t.Errorf("datatype %d offset %d, nibabel %d %d", h.Datatype, h.VoxOffset, want.Datatype, want.VoxOffset)
			}
			if h.Slope != want.SclSlope || h.Inter != want.SclInter {
				t.Errorf("slope/inter %g/%g, nibabel %g/%g", h.Slope, h.Inter, want.SclSlope, want.SclInter)
			}
			if h.Qfac != want.Qfac {
				t.Errorf("qfac %g, nibabel %g", h.Qfac, want.Qfac)
			}
			// nibabel's img.affine is the sform when its code is set, else
			// the qform.
			wantCode := want.SformCode
			if wantCode == 0 {
				wantCode = want.QformCode
			}
			aff, code, ok := h.Affine()
			if !ok || int(code) != wantCode {
				t.Errorf("affine code %d ok %v, nibabel sform %d qform %d", code, ok, want.SformCode, want.QformCode)
			}
			// nibabel builds the qform in float64 from the same float32
			// fields: agreement to rounding.
			if !affineClose(aff, want.Affine, 1e-12) {
				t.Errorf("affine\n%v\nnibabel\n%v", aff, want.Affine)
			}
			if !affineClose(h.QformMatrix(), want.Qform, 1e-12) {
				t.Errorf("qform\n%v\nnibabel\n%v", h.QformMatrix(), want.Qform)
			}
			if h.Descrip != want.Descrip {
				t.Errorf("descrip %q, nibabel %q", h.Descrip, want.Descrip)
			}
		})
	}
}

// goFixtureImage is the deterministic image behind testdata/nifti_go_written.nii.
func goFixtureImage() (img []float64, ny, nx int, pix [2]float64) {
	ny, nx = 6, 5
	img = make([]float64, ny*nx)
	for i := range ny {
		for j := range nx {
			img[i*nx+j] = float64(i*10+j) + 0.1 // row i, column j
		}
	}
	img[0] = -3.75
	img[len(img)-1] = 1e6 / 3
	return img, ny, nx, [2]float64{0.8, 1.2}
}

// expectedAffine is the orientation WriteNIfTI documents: x = dx·(j − nx/2),
// y = −dy·(i − ny/2), z = dz·(k − nz/2).
func expectedAffine(nx, ny, nz int, dx, dy, dz float64) [3][4]float64 {
	return [3][4]float64{
		{dx, 0, 0, -dx * float64(nx/2)},
		{0, -dy, 0, dy * float64(ny/2)},
		{0, 0, dz, -dz * float64(nz/2)},
	}
}

// checkNibabelView checks what nibabel read from a file WriteNIfTI or
// WriteNIfTI3D wrote: shape (nx, ny[, nz]), voxels as float32, storage order
// (column fastest, then row, then slice), affine of the documented
// orientation in both qform and sform, pixdim, magic, offset, scaling, units.
func checkNibabelView(t *testing.T, v nibabelView, img []float64, nz, ny, nx int, pix [3]float64, descrip string) {
	t.Helper()
	shape := []int{nx, ny}
	if nz > 1 {
		shape = append(shape, nz)
	}
	if !slices.Equal(v.Shape, shape) {
		t.Errorf("nibabel shape %v, want %v", v.Shape, shape)
	}
	if len(v.Data) != len(img) {
		t.Fatalf("nibabel read %d voxels, want %d", len(v.Data), len(img))
	}
	for p, x := range img {
		if w := float64(float32(x)); v.Data[p] != w {
			t.Fatalf("voxel %d (slice %d, row %d, column %d): nibabel %g, want float32 %g", p, p/(ny*nx), p/nx%ny, p%nx, v.Data[p], w)
		}
	}
	f32 := func(x float64) float64 { return float64(float32(x)) }
	// The file holds float32 fields: the affine as computed in float64,
	// rounded.
	want := expectedAffine(nx, ny, nz, pix[0], pix[1], pix[2])
	for i := range 3 {
		for j := range 4 {
			want[i][j] = f32(want[i][j])
		}
	}
	for name, a := range map[string][3][4]float64{"affine": v.Affine, "qform": v.Qform, "sform": v.Sform} {
		if !affineClose(a, want, 1e-12) {
			t.Errorf("nibabel %s\n%v\nwant\n%v", name, a, want)
		}
	}
	if v.QformCode != 1 || v.SformCode != 1 {
		t.Errorf("qform/sform codes %d/%d, want 1/1 (scanner)", v.QformCode, v.SformCode)
	}
	wantPix := []float64{f32(pix[0]), f32(pix[1])}
	if nz > 1 {
		wantPix = append(wantPix, f32(pix[2]))
	}
	if !slices.Equal(v.Pixdim, wantPix) {
		t.Errorf("nibabel pixdim %v, want %v", v.Pixdim, wantPix)
	}
	if v.Magic != "n+1" || v.VoxOffset != 352 || v.Datatype != 16 || v.Bitpix != 32 {
		t.Errorf("magic %q offset %d datatype %d bitpix %d, want n+1, 352, 16 (float32), 32", v.Magic, v.VoxOffset, v.Datatype, v.Bitpix)
	}
	if v.SclSlope != 1 || v.SclInter != 0 {
		t.Errorf("scaling %g, %g; want slope 1, intercept 0", v.SclSlope, v.SclInter)
	}
	if v.Units[0] != "mm" {
		t.Errorf("spatial units %q, want mm", v.Units[0])
	}
	if v.Descrip != "accelplan: "+descrip {
		t.Errorf("descrip %q", v.Descrip)
	}
	lo, hi := slices.Min(img), slices.Max(img)
	if v.CalMin != f32(lo) || v.CalMax != f32(hi) {
		t.Errorf("cal_min/max %g/%g, want %g/%g", v.CalMin, v.CalMax, f32(lo), f32(hi))
	}
}

// A file written by WriteNIfTI, as nibabel 5.0.0 read it when the fixture
// was made (testdata/nifti_go_written_nibabel.json): the writer still makes
// the very same bytes, and nibabel's reading of them matches what we meant.
// Regenerate with ACCELPLAN_NIFTI_FIXTURE=1 and the script (see its header).
func TestNIfTIGoWrittenFixture(t *testing.T) {
	img, ny, nx, pix := goFixtureImage()
	const descrip = "fixture for nibabel"
	fixture := filepath.Join("testdata", "nifti_go_written.nii")
	if os.Getenv("ACCELPLAN_NIFTI_FIXTURE") != "" {
		if err := WriteNIfTI(fixture, img, ny, nx, pix, descrip); err != nil {
			t.Fatal(err)
		}
	}
	path := filepath.Join(t.TempDir(), "a.nii")
	if err := WriteNIfTI(path, img, ny, nx, pix, descrip); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	committed, err := os.ReadFile(fixture)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, committed) {
		t.Fatalf("WriteNIfTI no longer writes the bytes nibabel checked (%d vs %d bytes); regenerate the fixture", len(got), len(committed))
	}
	v := loadView(t, filepath.Join("testdata", "nifti_go_written_nibabel.json"))
	if v.Nibabel != "5.0.0" {
		t.Errorf("fixture made with nibabel %s", v.Nibabel)
	}
	checkNibabelView(t, v, img, 1, ny, nx, [3]float64{pix[0], pix[1], 1}, descrip)
}

// needNibabel returns the interpreter with nibabel, skipping the test when
// there is none, except under CI (CI set), where that is a failure.
func needNibabel(t *testing.T) string {
	t.Helper()
	py := "/usr/bin/python3"
	need := func(msg string) {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s (install Debian python3-nibabel)", msg)
		}
		t.Skip(msg)
	}
	if _, err := os.Stat(py); err != nil {
		need("no /usr/bin/python3")
	}
	if err := exec.Command(py, "-c", "import nibabel").Run(); err != nil {
		need("nibabel is not installed for /usr/bin/python3")
	}
	return py
}

// nibabelRead has nibabel read the files (one interpreter start for all).
func nibabelRead(t *testing.T, py string, paths ...string) []nibabelView {
	t.Helper()
	var stderr bytes.Buffer
	args := append([]string{filepath.Join("testdata", "make_nifti_fixture.py"), "--read"}, paths...)
	cmd := exec.Command(py, args...)
	cmd.Stderr = &stderr
	outb, err := cmd.Output()
	if err != nil {
		t.Fatalf("nibabel could not read %v: %v\n%s", paths, err, stderr.String())
	}
	var v []nibabelView
	if err := json.Unmarshal(outb, &v); err != nil {
		t.Fatal(err)
	}
	if len(v) != len(paths) {
		t.Fatalf("nibabel described %d files, want %d", len(v), len(paths))
	}
	return v
}

// Files written now, read by nibabel (Debian python3-nibabel, via
// /usr/bin/python3) live: 2D and 3D, plain and gzipped, odd and even sizes.
func TestNIfTILiveNibabel(t *testing.T) {
	py := needNibabel(t)
	dir := t.TempDir()
	cases := []struct {
		name       string
		nz, ny, nx int
		pix        [3]float64
	}{
		{"even.nii", 1, 8, 6, [3]float64{0.5, 0.75, 1}},
		{"odd.nii.gz", 1, 7, 5, [3]float64{1.1, 0.9, 1}},
		{"vol.nii", 3, 4, 6, [3]float64{0.6, 0.6, 2.5}},
		{"vol.nii.gz", 2, 5, 3, [3]float64{1, 2, 3}},
	}
	imgs := make([][]float64, len(cases))
	paths := make([]string, len(cases))
	for k, c := range cases {
		img := make([]float64, c.nz*c.ny*c.nx)
		for p := range img {
			img[p] = math.Sin(float64(p)*0.7) * float64(p+1)
		}
		paths[k] = filepath.Join(dir, c.name)
		var err error
		if c.nz == 1 {
			err = WriteNIfTI(paths[k], img, c.ny, c.nx, [2]float64{c.pix[0], c.pix[1]}, c.name)
		} else {
			err = WriteNIfTI3D(paths[k], img, c.nz, c.ny, c.nx, c.pix, c.name)
		}
		if err != nil {
			t.Fatal(err)
		}
		imgs[k] = img
	}
	views := nibabelRead(t, py, paths...)
	for k, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			checkNibabelView(t, views[k], imgs[k], c.nz, c.ny, c.nx, c.pix, c.name)
		})
	}
}

// Our own reader gets back what our writer wrote, gzipped or not, NaN kept.
func TestNIfTIRoundTrip(t *testing.T) {
	dir := t.TempDir()
	img := []float64{0, 1.5, -2.25, math.NaN(), 1e-3, math.Inf(1)}
	for _, name := range []string{"r.nii", "r.nii.gz"} {
		path := filepath.Join(dir, name)
		if err := WriteNIfTI(path, img, 2, 3, [2]float64{1, 2}, "round trip"); err != nil {
			t.Fatal(err)
		}
		got, dims, pix, err := ReadNIfTI(path)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(dims, []int{3, 2}) || !slices.Equal(pix, []float64{1, 2}) {
			t.Errorf("%s: dims %v pixdim %v", name, dims, pix)
		}
		for i, v := range img {
			w := float64(float32(v))
			if !(got[i] == w || math.IsNaN(w) && math.IsNaN(got[i])) {
				t.Errorf("%s: voxel %d = %g, want %g", name, i, got[i], w)
			}
		}
		h := readHeader(t, path)
		if !affineClose(h.QformMatrix(), h.Srow, 0) {
			t.Errorf("%s: qform %v differs from sform %v", name, h.QformMatrix(), h.Srow)
		}
		if !strings.HasPrefix(h.Descrip, "accelplan") {
			t.Errorf("%s: descrip %q lacks the tool name", name, h.Descrip)
		}
	}
	raw, _ := os.ReadFile(filepath.Join(dir, "r.nii.gz"))
	if len(raw) < 2 || raw[0] != 0x1f || raw[1] != 0x8b {
		t.Error(".nii.gz was not written gzip-compressed")
	}
}

// validFile returns the bytes of a small valid file, 4×3 float32.
func validFile(t testing.TB) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := nifti.Encode(&b, make([]float64, 12), []int{4, 3}, []float64{1, 1}, "x"); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// Headers that lie about the file, and files that are not NIfTI-1, give a
// clear error and never a panic. Field offsets from the NIfTI-1 header layout
// (nifti1.h, NIfTI DFWG 2004).
func TestReadNIfTIRejects(t *testing.T) {
	le := binary.LittleEndian
	set16 := func(off int, v int16) func([]byte) []byte {
		return func(b []byte) []byte { le.PutUint16(b[off:], uint16(v)); return b }
	}
	setF := func(off int, v float32) func([]byte) []byte {
		return func(b []byte) []byte { le.PutUint32(b[off:], math.Float32bits(v)); return b }
	}
	gz := func(b []byte) []byte {
		var z bytes.Buffer
		w := gzip.NewWriter(&z)
		w.Write(b)
		w.Close()
		return z.Bytes()
	}
	cases := []struct {
		name string
		edit func([]byte) []byte
		want string
	}{
		{"empty", func([]byte) []byte { return nil }, "shorter than the 348-byte header"},
		{"short", func(b []byte) []byte { return b[:200] }, "holds 200 bytes, shorter than the 348-byte header"},
		{"png", func([]byte) []byte { return append([]byte("\x89PNG\r\n\x1a\n"), make([]byte, 400)...) }, "not a NIfTI-1 file: sizeof_hdr"},
		{"sizeof", func(b []byte) []byte { le.PutUint32(b, 349); return b }, "sizeof_hdr is 349, want 348"},
		{"nifti2", func(b []byte) []byte { le.PutUint32(b, 540); return b }, "NIfTI-2"},
		{"analyze", func(b []byte) []byte { copy(b[344:], "\x00\x00\x00\x00"); return b }, `magic "", want "n+1"`},
		{"pair", func(b []byte) []byte { copy(b[344:], "ni1\x00"); return b }, "separate .img"},
		{"dim0 zero", set16(40, 0), "dim[0] is 0"},
		{"dim0 eight", set16(40, 8), "dim[0] is 8"},
		{"dim zero", set16(42, 0), "dim[1] is 0"},
		{"dim negative", set16(44, -3), "dim[2] is -3"},
		{"huge", func(b []byte) []byte {
			le.PutUint16(b[40:], 3)
			for k := 1; k <= 3; k++ {
				le.PutUint16(b[40+2*k:], 32767)
			}
			return b
		}, "more than 134217728 voxels"},
		{"complex", func(b []byte) []byte { set16(70, 32)(b); return set16(72, 64)(b) }, "complex64 (code 32) is not supported"},
		{"rgb", func(b []byte) []byte { set16(70, 128)(b); return set16(72, 24)(b) }, "rgb24 (code 128) is not supported"},
		{"unknown type", set16(70, 3), "datatype code 3 is not a NIfTI-1 datatype"},
		{"bitpix", set16(72, 16), "bitpix is 16 but datatype float32 has 32 bits"},
		{"offset small", setF(108, 100), "vox_offset is 100"},
		{"offset fraction", setF(108, 352.5), "vox_offset is 352.5"},
		{"offset NaN", setF(108, float32(math.NaN())), "vox_offset is NaN"},
		{"inter NaN", setF(116, float32(math.NaN())), "scl_inter is NaN"},
		{"truncated", func(b []byte) []byte { return b[:len(b)-5] }, "header says 4×3 float32 = 48 bytes after offset 352, but the file holds 395 bytes in all"},
		{"trailing", func(b []byte) []byte { return append(b, 0, 0) }, "but the file holds more than 400 bytes"},
		{"offset past end", setF(108, 1024), "after offset 1024, but the file holds 400 bytes in all"},
		{"more dims than data", func(b []byte) []byte { set16(40, 3)(b); return set16(46, 2)(b) }, "header says 4×3×2 float32 = 96 bytes"},
		{"gz truncated data", func(b []byte) []byte { return gz(b[:380]) }, "the decompressed data holds 380 bytes in all"},
		{"gz cut", func(b []byte) []byte { z := gz(b); return z[:len(z)-12] }, "nifti"},
		{"gz bad header", func(b []byte) []byte { return []byte{0x1f, 0x8b, 1, 2, 3} }, "gzip"},
	}
	dir := t.TempDir()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(dir, strings.ReplaceAll(c.name, " ", "_")+".nii")
			if err := os.WriteFile(path, c.edit(validFile(t)), 0o644); err != nil {
				t.Fatal(err)
			}
			_, _, _, err := ReadNIfTI(path)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), path) {
				t.Errorf("error %q does not name the file and say %q", err, c.want)
			}
		})
	}
	if _, _, _, err := ReadNIfTI(filepath.Join(dir, "missing.nii")); err == nil {
		t.Error("a missing file gave no error")
	}
}

// The message for a header that claims more than the file holds is the one
// the issue spells out.
func TestReadNIfTISizeMessage(t *testing.T) {
	var b bytes.Buffer
	if err := nifti.Encode(&b, make([]float64, 256*256), []int{256, 256, 1}, []float64{1, 1, 1}, ""); err != nil {
		t.Fatal(err)
	}
	_, err := nifti.Decode(b.Bytes()[:1000])
	want := "nifti: header says 256×256×1 float32 = 262144 bytes after offset 352, but the file holds 1000 bytes in all"
	if err == nil || err.Error() != want {
		t.Errorf("error %v\nwant  %s", err, want)
	}
}

// Bad input to the writers is refused before anything is written.
func TestWriteNIfTIRejects(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "x.nii")
	cases := []struct {
		name  string
		write func() error
		want  string
	}{
		{"zero rows", func() error { return WriteNIfTI(p, nil, 0, 3, [2]float64{1, 1}, "") }, "both sizes must be ≥ 1"},
		{"length", func() error { return WriteNIfTI(p, make([]float64, 5), 2, 3, [2]float64{1, 1}, "") }, "has 5 values, want 2×3 = 6"},
		{"spacing zero", func() error { return WriteNIfTI(p, make([]float64, 6), 2, 3, [2]float64{0, 1}, "") }, "voxel spacing 0 mm along axis 1"},
		{"spacing NaN", func() error { return WriteNIfTI(p, make([]float64, 6), 2, 3, [2]float64{1, math.NaN()}, "") }, "voxel spacing NaN mm along axis 2"},
		{"too wide", func() error { return WriteNIfTI(p, make([]float64, 40000), 1, 40000, [2]float64{1, 1}, "") }, "size 40000 along axis 1"},
		{"float32 overflow", func() error {
			return WriteNIfTI(p, []float64{0, 1e39, 0, 0, 0, 0}, 2, 3, [2]float64{1, 1}, "")
		}, "value 1e+39 at voxel 1 does not fit in float32"},
		{"volume length", func() error { return WriteNIfTI3D(p, make([]float64, 7), 2, 2, 2, [3]float64{1, 1, 1}, "") }, "has 7 values, want 2×2×2 = 8"},
		{"volume zero", func() error { return WriteNIfTI3D(p, nil, 0, 2, 2, [3]float64{1, 1, 1}, "") }, "every size must be ≥ 1"},
		{"folder", func() error { return WriteNIfTI(dir+"/", make([]float64, 6), 2, 3, [2]float64{1, 1}, "") }, "names a folder"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.write()
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one saying %q", err, c.want)
			}
			if extra := leftovers(t, dir); len(extra) > 0 {
				t.Errorf("files left behind: %v", extra)
			}
		})
	}
}

// A long or odd description is cut to the 80-byte field at a rune boundary,
// NUL-terminated.
func TestNIfTIDescripField(t *testing.T) {
	dir := t.TempDir()
	long := strings.Repeat("é", 60) // 120 bytes
	path := filepath.Join(dir, "d.nii")
	if err := WriteNIfTI(path, []float64{1}, 1, 1, [2]float64{1, 1}, long+"\x00tail"); err != nil {
		t.Fatal(err)
	}
	raw, _ := os.ReadFile(path)
	field := raw[148:228]
	if field[79] != 0 {
		t.Error("descrip field not NUL-terminated")
	}
	h := readHeader(t, path)
	if !strings.HasPrefix(h.Descrip, "accelplan: éé") || len(h.Descrip) > 79 || !utf8Valid(h.Descrip) {
		t.Errorf("descrip %q (%d bytes)", h.Descrip, len(h.Descrip))
	}
}

func utf8Valid(s string) bool { return strings.ToValidUTF8(s, "\uFFFD") == s }

// FuzzReadNIfTI feeds arbitrary bytes, seeded with the nibabel-made and
// Go-made fixtures (plain and gzipped), to the decoder ReadNIfTI runs on an
// opened file (nifti.Read; going through a file per input made the fuzzer
// crawl): it must return an error or a consistent image, never panic, and a
// 2D or 3D image it reads must come back unchanged through Encode (up to
// float32 rounding).
func FuzzReadNIfTI(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "nifti_*.nii*"))
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add(validFile(f))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return
		}
		im, err := nifti.Read(bytes.NewReader(b))
		if err != nil {
			if im != nil {
				t.Fatal("image returned with an error")
			}
			return
		}
		n := 1
		for _, d := range im.Dims {
			if d < 1 {
				t.Fatalf("dims %v", im.Dims)
			}
			n *= d
		}
		if n != len(im.Data) || len(im.Pixdim) != len(im.Dims) {
			t.Fatalf("dims %v, pixdim %v, %d voxels", im.Dims, im.Pixdim, len(im.Data))
		}
		if len(im.Dims) > 3 || len(im.Dims) < 2 {
			return
		}
		var buf bytes.Buffer
		if nifti.Encode(&buf, im.Data, im.Dims, []float64{1, 1, 1}[:len(im.Dims)], "") != nil {
			return // values beyond float32
		}
		back, err := nifti.Decode(buf.Bytes())
		if err != nil {
			t.Fatalf("re-encoded image unreadable: %v", err)
		}
		for i, v := range im.Data {
			w := float64(float32(v))
			if back.Data[i] != w && !(math.IsNaN(w) && math.IsNaN(back.Data[i])) {
				t.Fatalf("voxel %d: %g became %g", i, v, back.Data[i])
			}
		}
	})
}

// ExampleWriteNIfTI writes a 2×3 truth image with 0.9 mm × 1.2 mm pixels and
// reads it back.
func ExampleWriteNIfTI() {
	dir, _ := os.MkdirTemp("", "nifti")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "truth.nii.gz")
	img := []float64{0, 0.25, 0.5, 0.75, 1, 1.25} // row-major, 2 rows × 3 columns
	if err := WriteNIfTI(path, img, 2, 3, [2]float64{0.9, 1.2}, "truth"); err != nil {
		fmt.Println(err)
		return
	}
	back, dims, pixdim, err := ReadNIfTI(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(dims, pixdim[0] == float64(float32(0.9)), back)
	// Output: [3 2] true [0 0.25 0.5 0.75 1 1.25]
}

func BenchmarkWriteNIfTI256(b *testing.B) {
	img := benchImage(256)
	path := filepath.Join(b.TempDir(), "b.nii")
	for b.Loop() {
		if err := WriteNIfTI(path, img, 256, 256, [2]float64{1, 1}, "bench"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkReadNIfTI256(b *testing.B) {
	path := filepath.Join(b.TempDir(), "b.nii")
	if err := WriteNIfTI(path, benchImage(256), 256, 256, [2]float64{1, 1}, "bench"); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, _, _, err := ReadNIfTI(path); err != nil {
			b.Fatal(err)
		}
	}
}
