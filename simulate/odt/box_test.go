package odt_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"accelplan/priors"
	"accelplan/simulate"
	"accelplan/simulate/nufft"
	"accelplan/simulate/odt"
)

func TestBoxProjection(t *testing.T) {
	b, err := odt.BoxProjection(0, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	src := []complex128{-0.01 + 0.2i, 0.02 - 1i, 0.07, 0.05}
	dst := make([]complex128, len(src))
	b.Prox(dst, src, 3)
	want := []complex128{0, 0.02, 0.05, 0.05}
	for i := range want {
		if dst[i] != want[i] {
			t.Errorf("Prox[%d] = %v, want %v", i, dst[i], want[i])
		}
	}
	if v := b.Value(dst); v != 0 {
		t.Errorf("Value inside = %g, want 0", v)
	}
	if v := b.Value(src); !math.IsInf(v, 1) {
		t.Errorf("Value outside = %g, want +Inf", v)
	}
	b.Prox(src, src, 1) // in place
	for i := range want {
		if src[i] != want[i] {
			t.Errorf("in-place Prox[%d] = %v, want %v", i, src[i], want[i])
		}
	}
	for _, c := range [][2]float64{{1, 0}, {math.NaN(), 1}, {math.Inf(1), math.Inf(1)}} {
		if _, err := odt.BoxProjection(c[0], c[1]); err == nil {
			t.Errorf("box %v accepted", c)
		}
	}
	var _ priors.Prior = b
}

// nrmse is ‖Re x − truth‖/‖truth‖.
func nrmse(x []complex128, truth []float64) float64 {
	var n, d float64
	for i, v := range truth {
		e := real(x[i]) - v
		n += e * e
		d += v * v
	}
	return math.Sqrt(n / d)
}

// A limited illumination cone leaves a missing cone along the optical axis;
// a non-negativity (box) constraint fills part of it, so the constrained
// reconstruction beats the unconstrained least-squares one (common practice;
// Lim J et al., Opt Express 2015;23:16933, from memory). Both runs use the
// same noisy data and the same FISTA iteration count (Beck & Teboulle 2009).
func TestBoxConstraintFillsMissingCone(t *testing.T) {
	s := odt.Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.4, NADetection: 0.5, FOV: 16, Grid: 64}
	ill, err := odt.Illuminations(s, "fan", 9)
	if err != nil {
		t.Fatal(err)
	}
	a, err := odt.NewArcs(s, ill)
	if err != nil {
		t.Fatal(err)
	}
	op, err := odt.NewOperator(a, nufft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	cell := odt.DemoCell()
	y, err := odt.BornData(a, cell)
	if err != nil {
		t.Fatal(err)
	}
	sigma, _ := odt.NoiseSigma(500)
	simulate.AddNoise(y, sigma, rand.New(rand.NewPCG(7, 8)))
	dn, _ := cell.Potential(s.FOV)
	truth := dn.Rasterize(s.Grid, s.Grid)

	opt := priors.FISTAOptions{MaxIter: 150}
	free, _, err := priors.FISTA(op, y, nil, 0, opt)
	if err != nil {
		t.Fatal(err)
	}
	box, _ := odt.BoxProjection(0, 0.1)
	boxed, _, err := priors.FISTA(op, y, box, 1, opt)
	if err != nil {
		t.Fatal(err)
	}
	ef, eb := nrmse(free, truth), nrmse(boxed, truth)
	t.Logf("NRMSE against the Born index contrast: unconstrained %.3f, box [0, 0.1] %.3f", ef, eb)
	if eb >= 0.9*ef {
		t.Errorf("box-constrained NRMSE %.3f is not 10%% below the unconstrained %.3f", eb, ef)
	}
}
