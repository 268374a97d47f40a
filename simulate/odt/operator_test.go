package odt

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"accelplan/simulate/nufft"
)

func smallArcs(t testing.TB, grid int) *Arcs {
	t.Helper()
	s := Setup{Wavelength: 0.6, Medium: 1.333, NAIllumination: 0.5, NADetection: 0.6, FOV: 8, Grid: grid}
	ill, err := Illuminations(s, "fan-golden", 5)
	if err != nil {
		t.Fatal(err)
	}
	a, err := NewArcs(s, ill)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

func randomVec(rng *rand.Rand, n int) []complex128 {
	v := make([]complex128, n)
	for i := range v {
		v[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	return v
}

func dot(a, b []complex128) complex128 {
	var s complex128
	for i := range a {
		s += a[i] * cmplx.Conj(b[i])
	}
	return s
}

// ⟨E x, y⟩ = ⟨x, Eᴴ y⟩ (definition of the adjoint).
func TestOperatorAdjoint(t *testing.T) {
	a := smallArcs(t, 32)
	op, err := NewOperator(a, nufft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(4, 6))
	x, y := randomVec(rng, op.ImageLen()), randomVec(rng, op.DataLen())
	ex, ehy := make([]complex128, op.DataLen()), make([]complex128, op.ImageLen())
	op.Forward(ex, x)
	op.Adjoint(ehy, y)
	l, r := dot(ex, y), dot(x, ehy)
	if d := cmplx.Abs(l-r) / cmplx.Abs(l); d > 1e-10 {
		t.Errorf("adjoint mismatch %.3g", d)
	}
}

// Forward equals the direct sum Factor_k·N⁻¹·Σ_{i,l} x[i,l]·exp(−2πi(KX_k·x_l
// + KZ_k·z_i)) with x_l = (l − N/2)/N along the columns and z_i = (i −
// N/2)/N along the rows: the orthonormal NDFT that defines the NUFFT (package
// nufft doc), evaluated here without it.
func TestOperatorMatchesDirectSum(t *testing.T) {
	const n = 32
	a := smallArcs(t, n)
	op, err := NewOperator(a, nufft.Options{Width: 8})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	x := randomVec(rng, n*n)
	got := make([]complex128, op.DataLen())
	op.Forward(got, x)
	want := make([]complex128, len(got))
	for k := range want {
		var s complex128
		for i := range n {
			for l := range n {
				ph := -2 * math.Pi * (a.KX[k]*float64(l-n/2) + a.KZ[k]*float64(i-n/2)) / n
				s += x[i*n+l] * cmplx.Exp(complex(0, ph))
			}
		}
		want[k] = a.Factor[k] * s / n
	}
	if e := relErr(got, want); e > 1e-6 {
		t.Errorf("Forward differs from the direct sum by %.3g", e)
	}
}

// The operator applied to the exact pixel averages of the cell's Born index
// contrast approaches the data drawn from the exact spectrum (the gap is the
// discretisation that data without inverse crime must show; Guerquin-Kern M
// et al., IEEE TMI 2012;31:626-636).
func TestOperatorOnRasterApproachesExactData(t *testing.T) {
	prev := math.Inf(1)
	for _, n := range []int{80, 160} {
		s := Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.5, NADetection: 0.7, FOV: 16, Grid: n}
		ill, err := Illuminations(s, "fan", 7)
		if err != nil {
			t.Fatal(err)
		}
		a, err := NewArcs(s, ill)
		if err != nil {
			t.Fatal(err)
		}
		op, err := NewOperator(a, nufft.Options{Width: 6})
		if err != nil {
			t.Fatal(err)
		}
		pot, _ := DemoCell().Potential(s.FOV)
		r := pot.Rasterize(n, n)
		img := make([]complex128, len(r))
		for i, v := range r {
			img[i] = complex(v, 0)
		}
		y := make([]complex128, op.DataLen())
		op.Forward(y, img)
		exact, err := BornData(a, DemoCell())
		if err != nil {
			t.Fatal(err)
		}
		e := relErr(y, exact)
		t.Logf("grid %d: ‖E·raster − exact data‖/‖exact‖ = %.3g", n, e)
		if e > 0.01 || e >= prev {
			t.Errorf("grid %d: gap %.3g (previous grid %.3g), want ≤ 0.01 and falling", n, e, prev)
		}
		prev = e
	}
}

func TestOperatorAllocatesNothing(t *testing.T) {
	a := smallArcs(t, 32)
	op, err := NewOperator(a, nufft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	x, y := make([]complex128, op.ImageLen()), make([]complex128, op.DataLen())
	if n := testing.AllocsPerRun(5, func() { op.Forward(y, x); op.Adjoint(x, y) }); n != 0 {
		t.Errorf("%g allocations per Forward+Adjoint", n)
	}
	c := op.Clone()
	y2 := make([]complex128, op.DataLen())
	x[5] = 1
	op.Forward(y, x)
	c.Forward(y2, x)
	if relErr(y2, y) != 0 {
		t.Error("clone differs")
	}
}

func TestNoiseSigma(t *testing.T) {
	if s, err := NoiseSigma(200); err != nil || s != 0.005 {
		t.Errorf("NoiseSigma(200) = %g, %v", s, err)
	}
	for _, bad := range []float64{0, -1, math.Inf(1), math.NaN()} {
		if _, err := NoiseSigma(bad); err == nil {
			t.Errorf("NoiseSigma(%g) accepted", bad)
		}
	}
}
