package nifti

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"testing"
)

// The qform Encode writes (quaternion (0, 1, 0, 0), qfac −1, by the NIfTI-1
// standard's method 2) describes the same affine as the sform it writes,
// which is the documented orientation. (nibabel's reading of both is checked
// in package out.)
func TestEncodeQformEqualsSform(t *testing.T) {
	cases := []struct {
		dims []int
		pix  []float64
	}{
		{[]int{4, 3}, []float64{0.5, 2}},
		{[]int{5, 7}, []float64{1, 1, 3}},
		{[]int{6, 4, 3}, []float64{0.7, 0.9, 2.5}},
	}
	for _, c := range cases {
		var b bytes.Buffer
		data := make([]float64, 1)
		for _, d := range c.dims {
			data = make([]float64, len(data)*d)
		}
		if err := Encode(&b, data, c.dims, c.pix, "t"); err != nil {
			t.Fatal(err)
		}
		im, err := Decode(b.Bytes())
		if err != nil {
			t.Fatal(err)
		}
		q := im.QformMatrix()
		nz := 1
		if len(c.dims) == 3 {
			nz = c.dims[2]
		}
		dz := 1.0
		if len(c.pix) == 3 {
			dz = c.pix[2]
		}
		f := func(x float64) float64 { return float64(float32(x)) }
		want := [3][4]float64{
			{f(c.pix[0]), 0, 0, f(-c.pix[0] * float64(c.dims[0]/2))},
			{0, -f(c.pix[1]), 0, f(c.pix[1] * float64(c.dims[1]/2))},
			{0, 0, f(dz), f(-dz * float64(nz/2))},
		}
		if q != want || im.Srow != want {
			t.Errorf("dims %v: qform %v sform %v, want %v", c.dims, q, im.Srow, want)
		}
		if a, code, ok := im.Affine(); !ok || code != 1 || a != want {
			t.Errorf("dims %v: Affine %v code %d", c.dims, a, code)
		}
	}
}

// Extensions between the header and vox_offset (NIfTI-1: a non-zero first
// extension byte, then blocks of esize bytes) are skipped.
func TestReadSkipsExtensions(t *testing.T) {
	var b bytes.Buffer
	if err := Encode(&b, []float64{1, 2, 3, 4, 5, 6}, []int{3, 2}, []float64{1, 1}, ""); err != nil {
		t.Fatal(err)
	}
	raw := b.Bytes()
	ext := make([]byte, 16) // esize 16, ecode 6 (a comment), 8 bytes of text
	binary.LittleEndian.PutUint32(ext[0:], 16)
	binary.LittleEndian.PutUint32(ext[4:], 6)
	copy(ext[8:], "comment!")
	file := append(append(append([]byte{}, raw[:DataOffset]...), ext...), raw[DataOffset:]...)
	file[348] = 1
	binary.LittleEndian.PutUint32(file[108:], math.Float32bits(DataOffset+16))
	im, err := Read(bytes.NewReader(file))
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(im.Data) != "[1 2 3 4 5 6]" || im.VoxOffset != 368 {
		t.Errorf("data %v offset %d", im.Data, im.VoxOffset)
	}
}

func TestDatatypeName(t *testing.T) {
	for code, want := range map[int16]string{Int16: "int16", Float32: "float32", 32: "complex64", 9: "code 9"} {
		if got := DatatypeName(code); got != want {
			t.Errorf("DatatypeName(%d) = %q, want %q", code, got, want)
		}
	}
}

// ExampleEncode writes a 3-column, 2-row image and reads it back with the
// orientation it carries.
func ExampleEncode() {
	var b bytes.Buffer
	img := []float64{1, 2, 3, 4, 5, 6} // row-major: 2 rows of 3 columns
	if err := Encode(&b, img, []int{3, 2}, []float64{0.5, 0.5}, "example"); err != nil {
		fmt.Println(err)
		return
	}
	im, err := Read(&b)
	if err != nil {
		fmt.Println(err)
		return
	}
	a, code, _ := im.Affine()
	fmt.Println(im.Dims, im.Data, im.Descrip)
	fmt.Println("code", code, "row 0 at y =", a[1][3], "mm, x of column 0 =", a[0][3], "mm")
	// Output:
	// [3 2] [1 2 3 4 5 6] example
	// code 1 row 0 at y = 0.5 mm, x of column 0 = -0.5 mm
}
