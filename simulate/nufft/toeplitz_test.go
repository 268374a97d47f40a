package nufft

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"
)

// normalNDFT returns Aᴴ(W(A x)) with A the exact direct-sum NDFT.
func normalNDFT(ny, nx int, kx, ky, w []float64, x []complex128) []complex128 {
	y := ndft(ny, nx, kx, ky, x)
	for j := range y {
		y[j] *= complex(w[j], 0)
	}
	return ndftAdjoint(ny, nx, kx, ky, y)
}

func randomWeights(n int, seed uint64) []float64 {
	r := rand.New(rand.NewPCG(seed, 1))
	w := make([]float64, n)
	for i := range w {
		w[i] = 0.2 + r.Float64()
	}
	return w
}

// TestToeplitzAgainstNDFT checks Apply against Aᴴ(W(Ax)) computed with the
// exact direct sum, to 1e-6 relative (issue 4), with and without weights and
// on an odd size.
func TestToeplitzAgainstNDFT(t *testing.T) {
	cases := []struct {
		name     string
		ny, nx   int
		radial   bool
		weighted bool
	}{
		{"32×32 random, unweighted", 32, 32, false, false},
		{"24×20 random, weighted", 24, 20, false, true},
		{"32×32 radial, weighted", 32, 32, true, true},
		{"15×17 random, weighted", 15, 17, false, true},
	}
	for i, c := range cases {
		var kx, ky []float64
		if c.radial {
			kx, ky = radialPoints(c.ny, 40)
		} else {
			kx, ky = randomPoints(c.ny, c.nx, 900, uint64(60+i))
		}
		var w []float64
		ones := make([]float64, len(kx))
		for j := range ones {
			ones[j] = 1
		}
		wref := ones
		if c.weighted {
			w = randomWeights(len(kx), uint64(70+i))
			wref = w
		}
		tp, err := NewToeplitz(c.ny, c.nx, kx, ky, w, Options{})
		if err != nil {
			t.Fatal(err)
		}
		x := randomComplex(c.ny*c.nx, uint64(80+i))
		want := normalNDFT(c.ny, c.nx, kx, ky, wref, x)
		got := make([]complex128, len(x))
		tp.Apply(got, x)
		e := relErr(got, want)
		t.Logf("%s: Toeplitz against the direct sum %.2e", c.name, e)
		if e > 1e-6 {
			t.Errorf("%s: relative error %.2e > 1e-6", c.name, e)
		}
		// dst may alias src
		tp.Apply(x, x)
		for j := range x {
			if x[j] != got[j] {
				t.Fatalf("%s: in-place Apply differs at pixel %d", c.name, j)
			}
		}
	}
}

// TestToeplitzMatchesPlanPair checks Apply against Adjoint(W·Forward(x)) of a
// W = 8 plan (which is itself within ~1e-7 of the NDFT) on a larger image.
func TestToeplitzMatchesPlanPair(t *testing.T) {
	const n = 96
	kx, ky := radialPoints(n, 150)
	w := randomWeights(len(kx), 3)
	p, err := New(n, n, kx, ky, Options{Width: 8})
	if err != nil {
		t.Fatal(err)
	}
	tp, err := NewToeplitz(n, n, kx, ky, w, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	x := randomComplex(n*n, 4)
	y := make([]complex128, p.DataLen())
	p.Forward(y, x)
	for j := range y {
		y[j] *= complex(w[j], 0)
	}
	want := make([]complex128, n*n)
	p.Adjoint(want, y)
	got := make([]complex128, n*n)
	tp.Apply(got, x)
	e := relErr(got, want)
	t.Logf("96×96 radial: Toeplitz against the W=8 NUFFT pair %.2e", e)
	if e > 1e-6 {
		t.Errorf("relative difference %.2e > 1e-6", e)
	}
}

// TestToeplitzFullCartesianIsIdentity: sampling every point of the centred
// Cartesian grid makes A the unitary DFT, so AᴴA = I (Parseval; common
// practice).
func TestToeplitzFullCartesianIsIdentity(t *testing.T) {
	const ny, nx = 20, 16
	var kx, ky []float64
	for m := range ny {
		for l := range nx {
			kx = append(kx, float64(l-nx/2))
			ky = append(ky, float64(m-ny/2))
		}
	}
	tp, err := NewToeplitz(ny, nx, kx, ky, nil, Options{})
	if err != nil {
		t.Fatal(err)
	}
	x := randomComplex(ny*nx, 5)
	got := make([]complex128, len(x))
	tp.Apply(got, x)
	e := relErr(got, x)
	t.Logf("full Cartesian 20×16: ‖AᴴAx − x‖/‖x‖ = %.2e", e)
	if e > 1e-6 {
		t.Errorf("AᴴA x differs from x by %.2e", e)
	}
}

// TestToeplitzHermitian checks ⟨Tx, y⟩ = ⟨x, Ty⟩ and ⟨Tx, x⟩ ≥ 0 for
// positive weights (AᴴWA is Hermitian positive semi-definite).
func TestToeplitzHermitian(t *testing.T) {
	kx, ky := randomPoints(30, 26, 600, 9)
	tp, err := NewToeplitz(30, 26, kx, ky, randomWeights(600, 10), Options{})
	if err != nil {
		t.Fatal(err)
	}
	x, y := randomComplex(30*26, 11), randomComplex(30*26, 12)
	tx, ty := make([]complex128, len(x)), make([]complex128, len(y))
	tp.Apply(tx, x)
	tp.Apply(ty, y)
	l, r := dot(y, tx), dot(ty, x)
	if e := cmplx.Abs(l-r) / cmplx.Abs(l); e > 1e-12 {
		t.Errorf("⟨Tx,y⟩ = %v, ⟨x,Ty⟩ = %v (relative mismatch %.1e)", l, r, e)
	}
	q := dot(x, tx)
	if real(q) <= 0 || math.Abs(imag(q)) > 1e-10*real(q) {
		t.Errorf("⟨x,Tx⟩ = %v, want real and positive", q)
	}
}

// TestToeplitzNoAllocations checks that Apply allocates nothing.
func TestToeplitzNoAllocations(t *testing.T) {
	kx, ky := randomPoints(16, 16, 200, 13)
	tp, err := NewToeplitz(16, 16, kx, ky, nil, Options{})
	if err != nil {
		t.Fatal(err)
	}
	x := randomComplex(tp.ImageLen(), 14)
	if a := testing.AllocsPerRun(20, func() { tp.Apply(x, x) }); a != 0 {
		t.Errorf("Apply allocates %v times per call", a)
	}
	c := tp.Clone()
	y := randomComplex(tp.ImageLen(), 14)
	z := make([]complex128, len(y))
	c.Apply(z, y)
	tp.Apply(y, y)
	for i := range y {
		if y[i] != z[i] {
			t.Fatalf("clone differs at pixel %d", i)
		}
	}
}

// TestToeplitzBadInput checks the messages for bad input.
func TestToeplitzBadInput(t *testing.T) {
	ok := []float64{0, 1}
	cases := []struct {
		name       string
		kx, ky, wt []float64
		want       string
	}{
		{"weights length", ok, ok, []float64{1}, "1 weights for 2 samples"},
		{"weight NaN", ok, ok, []float64{1, math.NaN()}, "weight 1 is NaN"},
		{"outside band", []float64{0, 4.5}, ok, nil, "kx = 4.5"},
		{"no samples", nil, nil, nil, "no samples"},
		{"mismatch", ok, []float64{1}, nil, "2 kx coordinates but 1 ky"},
	}
	for _, c := range cases {
		if _, err := NewToeplitz(8, 8, c.kx, c.ky, c.wt, Options{}); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}
