package wavelet

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// The lifting factorisation must be the filter bank it factors: its
// analysis of a unit impulse at sample s gives, as output 0 of each channel,
// the PyWavelets taps dec_lo[L−1−(s−base)] and dec_hi[…] (fixture by
// PyWavelets 1.1.1, see testdata/make_wavelet_fixture.py), base = 1 − L/2 the
// offset of the periodization mode.
func TestLiftingEquivalentFiltersAgainstPyWavelets(t *testing.T) {
	f := loadFixture(t)
	for _, name := range Names() {
		fb, err := Filters(name)
		if err != nil {
			t.Fatal(err)
		}
		lf := liftingFor(fb)
		if lf == nil {
			if fb.Moments <= liftMaxMoments {
				t.Errorf("%s: no lifting factorisation found", name)
			}
			continue
		}
		ref := f.Filters[name]
		L := fb.Len()
		n := 4 * L
		base := 1 - L/2
		x := make([]float64, n)
		var worst float64
		for s := range n {
			clear(x)
			x[s] = 1
			lo, hi := lf.analysis1D(x)
			var wantLo, wantHi float64
			if m := wrap(s-base, n); m < L {
				wantLo, wantHi = ref.DecLo[L-1-m], ref.DecHi[L-1-m]
			}
			worst = math.Max(worst, math.Max(math.Abs(lo[0]-wantLo), math.Abs(hi[0]-wantHi)))
		}
		if worst > 1e-15 {
			t.Errorf("%s: lifting taps differ from PyWavelets' by %.3g", name, worst)
		}
	}
}

// The high-pass of an orthonormal Daubechies bank annihilates constants
// (Σ g_n = 0, a textbook property), so the detail bands of a constant image
// hold rounding only. After refinement the lifting form stays within a few
// times the rounding of the direct filters (which the fixture tests tie to
// PyWavelets).
func TestLiftingConstantImageHasNoDetail(t *testing.T) {
	leak := func(tr *Transform) float64 {
		x := make([]complex128, tr.Len())
		for i := range x {
			x[i] = 3 - 2i
		}
		c := make([]complex128, len(x))
		tr.Forward(c, x)
		var s float64
		for i, v := range c {
			if !tr.IsApprox(i) {
				s += cmplx.Abs(v)
			}
		}
		return s
	}
	for _, name := range []string{"db2", "db3", "db4", "db5", "db6"} {
		tr, err := New(128, 64, 2, name)
		if err != nil {
			t.Fatal(err)
		}
		if tr.lift == nil {
			t.Fatalf("%s: not on the lifting path", name)
		}
		direct := tr.Clone()
		direct.lift, direct.kern = nil, nil
		direct.alloc()
		got, ref := leak(tr), leak(direct)
		t.Logf("%s: Σ|detail| lifting %.3g, direct %.3g", name, got, ref)
		if got > 4*ref+1e-13 {
			t.Errorf("%s: Σ|detail| of a constant image %.3g, direct filters %.3g", name, got, ref)
		}
	}
}

// Design properties the speed rests on: db4 factors into five steps with
// 8 taps in all (the direct filters need 16 multiplications per output
// pair), reaching one sample to either side, and gets the pipelined kernel;
// the orders up to liftMaxMoments use lifting, the others the direct
// filters.
func TestLiftingShapes(t *testing.T) {
	fb, err := Filters("db4")
	if err != nil {
		t.Fatal(err)
	}
	lf := liftingFor(fb)
	if lf == nil || len(lf.steps) != 5 || lf.taps() != 8 || lf.margin != [2]int{1, 1} {
		t.Fatalf("db4 factorisation %+v, want 5 steps, 8 taps, margins 1", lf)
	}
	tr, err := New(256, 256, 4, "db4")
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := tr.kern.(*pipelined); !ok {
		t.Errorf("db4 uses kernel %T, want the pipelined one", tr.kern)
	}
	for _, c := range roundTripCases {
		tr, err := New(c.ny, c.nx, c.levels, c.name)
		if err != nil {
			t.Fatal(err)
		}
		if want := tr.fb.Moments <= liftMaxMoments; (tr.lift != nil) != want {
			t.Errorf("%s: lifting path %v, want %v", c.name, tr.lift != nil, want)
		}
	}
}

// The pipelined kernel and the step-by-step kernel compute the same
// analysis and synthesis, for row lengths from the shortest allowed up,
// with contiguous and strided output.
func TestPipelinedKernelMatchesSteps(t *testing.T) {
	fb, err := Filters("db4")
	if err != nil {
		t.Fatal(err)
	}
	lf := liftingFor(fb)
	pk := pipelinedFor(lf)
	sk := newStepKernel(lf, 256)
	rng := rand.New(rand.NewPCG(11, 12))
	for _, n := range []int{14, 16, 18, 32, 34, 100, 256} {
		for _, os := range []int{2, 6} {
			x := make([]float64, 2*n)
			for i := range x {
				x[i] = rng.NormFloat64()
			}
			a := make([]float64, n*os)
			b := make([]float64, n*os)
			pk.forward(a, os, x, n)
			sk.forward(b, os, x, n)
			if d := maxDiff(a, b); d > 1e-14 {
				t.Errorf("n=%d os=%d: forward kernels differ by %.3g", n, os, d)
			}
			// Synthesis of the contiguous channels lo, hi.
			lo, hi := make([]float64, n), make([]float64, n)
			for k := range n / 2 {
				copy(lo[2*k:2*k+2], a[k*os:k*os+2])
				copy(hi[2*k:2*k+2], a[(n/2+k)*os:(n/2+k)*os+2])
			}
			pk.inverse(a, os, lo, hi, n)
			sk.inverse(b, os, lo, hi, n)
			if d := maxDiff(a, b); d > 1e-14 {
				t.Errorf("n=%d os=%d: inverse kernels differ by %.3g", n, os, d)
			}
			var back float64
			for j := range n {
				back = math.Max(back, math.Abs(a[j*os]-x[2*j])+math.Abs(a[j*os+1]-x[2*j+1]))
			}
			if back > 1e-13 {
				t.Errorf("n=%d os=%d: synthesis of the analysis off by %.3g", n, os, back)
			}
		}
	}
}

func maxDiff(a, b []float64) float64 {
	var m float64
	for i := range a {
		m = math.Max(m, math.Abs(a[i]-b[i]))
	}
	return m
}

// The Laurent-polynomial division leaves the remainder it promises.
func TestLaurentDivide(t *testing.T) {
	a := laurent{lo: -1, c: []float64{2, -3, 5, 7}}
	b := laurent{lo: 2, c: []float64{1, 4}}
	for nLow := range 4 {
		q, r := divide(a, b, nLow)
		if q.terms() != 3 || r.terms() != 1 {
			t.Fatalf("nLow=%d: quotient %d terms, remainder %d", nLow, q.terms(), r.terms())
		}
		back := r.axpy(1, q.mul(b)).trimmed(1e-12)
		if back.lo != a.lo || len(back.c) != len(a.c) {
			t.Fatalf("nLow=%d: q·b + r = %+v, want %+v", nLow, back, a)
		}
		for i := range a.c {
			if math.Abs(back.c[i]-a.c[i]) > 1e-12 {
				t.Errorf("nLow=%d: q·b + r = %v, want %v", nLow, back.c, a.c)
			}
		}
	}
}
