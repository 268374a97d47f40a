package wavelet

import (
	"math"
	"math/cmplx"
	"testing"

	"accelplan/internal/benchcpu"
)

// Shrink against PyWavelets: wavedec2 of the real and imaginary parts,
// pywt.threshold(c, thr, mode='soft') on the complex detail coefficients,
// waverec2 (fixture by PyWavelets 1.1.1, testdata/make_wavelet_fixture.py);
// the cases cover the pipelined db4 kernel, the step-by-step kernel (db2,
// db5) and the direct filters (db8).
func TestShrinkAgainstPyWavelets(t *testing.T) {
	f := loadFixture(t)
	if len(f.Shrinks) == 0 {
		t.Fatal("fixture has no shrinkage cases")
	}
	for _, c := range f.Shrinks {
		tr, err := New(c.Ny, c.Nx, c.Levels, c.Name)
		if err != nil {
			t.Fatal(err)
		}
		x := lcgImage(c.Ny, c.Nx)
		got := make([]complex128, len(x))
		tr.Shrink(got, x, c.Threshold)
		var worst, changed float64
		for i := range got {
			worst = math.Max(worst, cmplx.Abs(got[i]-complex(c.Re[i], c.Im[i])))
			changed = math.Max(changed, cmplx.Abs(x[i]-complex(c.Re[i], c.Im[i])))
		}
		if worst > 1e-12 {
			t.Errorf("%s %d×%d L=%d thr=%g: max |Shrink − pywt| = %.3g", c.Name, c.Ny, c.Nx, c.Levels, c.Threshold, worst)
		}
		if changed < 1e-2 {
			t.Errorf("%s: the threshold %g barely changes the image (%.3g): a weak case", c.Name, c.Threshold, changed)
		}
	}
}

// Shrink is Forward, the soft threshold on every detail band, then Inverse,
// on every kernel path, and may work in place.
func TestShrinkIsComposition(t *testing.T) {
	for i, c := range roundTripCases {
		tr, err := New(c.ny, c.nx, c.levels, c.name)
		if err != nil {
			t.Fatal(err)
		}
		x := randImage(tr.Len(), uint64(300+i))
		want := make([]complex128, len(x))
		tr.Forward(want, x)
		for _, b := range tr.Subbands() {
			if b.Kind == Approx {
				continue
			}
			for r := b.Row0; r < b.Row0+b.Rows; r++ {
				SoftThreshold(want[r*c.nx+b.Col0:r*c.nx+b.Col0+b.Cols], 0.8)
			}
		}
		tr.Inverse(want, want)
		got := append([]complex128(nil), x...)
		tr.Shrink(got, got, 0.8)
		if d := maxAbsDiff(got, want); d > 1e-12 {
			t.Errorf("%+v: Shrink differs from the composition by %.3g", c, d)
		}
		// A zero threshold is the identity.
		tr.Shrink(got, x, 0)
		if d := maxAbsDiff(got, x); d > 1e-12 {
			t.Errorf("%+v: Shrink at 0 changes the image by %.3g", c, d)
		}
	}
}

// The complex soft threshold c·max(0, 1 − t/|c|) (Donoho 1995): moduli
// above t shrink by t with the phase kept, the others become 0.
func TestSoftThreshold(t *testing.T) {
	cases := []struct{ in, want complex128 }{
		{3 + 4i, 2.4 + 3.2i}, // |c| = 5 → 4
		{-1, 0},              // |c| = 1 = t
		{0.6i, 0},            // below t
		{0, 0},               // zero stays zero
		{-10i, -9i},          // on an axis
		{complex(1, -1), 0},  // √2 > 1 ... but see below
		{complex(2, -2), complex(2-1/math.Sqrt2, -2+1/math.Sqrt2)},
	}
	cases[5].want = complex(1-1/math.Sqrt2, -1+1/math.Sqrt2)
	x := make([]complex128, len(cases))
	for i, c := range cases {
		x[i] = c.in
	}
	SoftThreshold(x, 1)
	for i, c := range cases {
		if cmplx.Abs(x[i]-c.want) > 1e-15 {
			t.Errorf("soft(%v, 1) = %v, want %v", c.in, x[i], c.want)
		}
	}
}

func TestShrinkNoAllocations(t *testing.T) {
	for _, name := range []string{"db4", "db2", "db8"} {
		tr, err := New(128, 128, 3, name)
		if err != nil {
			t.Fatal(err)
		}
		x := randImage(tr.Len(), 1)
		y := make([]complex128, len(x))
		if a := testing.AllocsPerRun(10, func() { tr.Shrink(y, x, 0.5) }); a != 0 {
			t.Errorf("%s: Shrink allocates %.1f times per call", name, a)
		}
	}
}

func BenchmarkShrink256Db4L4(b *testing.B) {
	tr, err := New(256, 256, 4, "db4")
	if err != nil {
		b.Fatal(err)
	}
	x := randImage(tr.Len(), 1)
	y := make([]complex128, len(x))
	b.ReportAllocs()
	done := benchcpu.Timer(b)
	for b.Loop() {
		tr.Shrink(y, x, 0.5)
	}
	done()
}

// The direct filter bank on the same work, for the ratio.
func BenchmarkForwardInverse256Db4L4Direct(b *testing.B) {
	tr, err := New(256, 256, 4, "db4")
	if err != nil {
		b.Fatal(err)
	}
	tr.lift, tr.kern = nil, nil
	tr.alloc()
	x := randImage(tr.Len(), 1)
	w := make([]complex128, len(x))
	b.ReportAllocs()
	done := benchcpu.Timer(b)
	for b.Loop() {
		tr.Forward(w, x)
		tr.Inverse(x, w)
	}
	done()
}
