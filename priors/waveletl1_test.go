package priors

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// The closed-form soft threshold, written out from its definition as the
// proximal map of t·|c| on the complex plane (Donoho DL, IEEE Trans Inf
// Theory 1995;41:613-627; Parikh N, Boyd S, Found Trends Optim 2014;1:127-239;
// section numbers here and below from memory): c·max(0, 1 − t/|c|).
func closedFormSoft(c complex128, t float64) complex128 {
	m := cmplx.Abs(c)
	if m <= t {
		return 0
	}
	return c * complex(1-t/m, 0)
}

// Prox in the coefficient domain equals the closed-form soft threshold on
// the detail coefficients and leaves the approximation alone.
func TestWaveletL1ProxIsSoftThreshold(t *testing.T) {
	cases := []struct {
		ny, nx, levels int
		name           string
		thr            float64
	}{
		{32, 32, 3, "haar", 0.5},
		{32, 64, 2, "db4", 1.2},
		{64, 48, 2, "db3", 0.05},
		{16, 16, 1, "db2", 0},
	}
	for i, c := range cases {
		p, err := NewWaveletL1(c.ny, c.nx, c.levels, c.name)
		if err != nil {
			t.Fatal(err)
		}
		w := p.Transform()
		x := randVec(w.Len(), uint64(i))
		coef := make([]complex128, len(x))
		w.Forward(coef, x)
		want := make([]complex128, len(x))
		zeroed := 0
		for k, v := range coef {
			if w.IsApprox(k) {
				want[k] = v
			} else {
				want[k] = closedFormSoft(v, c.thr)
				if want[k] == 0 {
					zeroed++
				}
			}
		}
		out := make([]complex128, len(x))
		p.Prox(out, x, c.thr)
		got := make([]complex128, len(x))
		w.Forward(got, out)
		if d := maxDiff(got, want); d > 1e-12 {
			t.Errorf("%+v: W·prox(x) differs from soft(W x) by %.3g", c, d)
		}
		if c.thr >= 0.5 && zeroed == 0 {
			t.Errorf("%+v: threshold zeroed nothing; the test would not see a wrong kink", c)
		}
		// Aliasing dst and src gives the same result.
		alias := append([]complex128(nil), x...)
		p.Prox(alias, alias, c.thr)
		if d := maxDiff(alias, out); d > 1e-15 {
			t.Errorf("%+v: aliased Prox differs by %.3g", c, d)
		}
	}
}

// The prox is the minimiser of ½‖u − v‖² + t·R(u): no perturbation of it
// scores lower (definition of the proximal map: Moreau JJ, Bull Soc Math
// France 1965;93:273-299).
func TestWaveletL1ProxMinimises(t *testing.T) {
	p, err := NewWaveletL1(16, 32, 2, "db2")
	if err != nil {
		t.Fatal(err)
	}
	const thr = 0.7
	v := randVec(p.Transform().Len(), 9)
	u := make([]complex128, len(v))
	p.Prox(u, v, thr)
	f := func(x []complex128) float64 {
		var s float64
		for i := range x {
			d := x[i] - v[i]
			s += real(d)*real(d) + imag(d)*imag(d)
		}
		return s/2 + thr*p.Value(x)
	}
	best := f(u)
	r := rand.New(rand.NewPCG(4, 5))
	trial := make([]complex128, len(u))
	for k := range 200 {
		scale := []float64{1e-1, 1e-3, 1e-5}[k%3]
		for i := range u {
			trial[i] = u[i] + complex(scale*r.NormFloat64(), scale*r.NormFloat64())
		}
		if ft := f(trial); ft < best-1e-12 {
			t.Fatalf("perturbation %d (scale %g) scores %.15g < prox %.15g", k, scale, ft, best)
		}
	}
}

// Value is Σ|c| over the detail coefficients: build an image from chosen
// coefficients and read the sum back.
func TestWaveletL1Value(t *testing.T) {
	p, err := NewWaveletL1(64, 32, 2, "db4")
	if err != nil {
		t.Fatal(err)
	}
	w := p.Transform()
	coef := make([]complex128, w.Len())
	var want float64
	for k := range coef {
		coef[k] = complex(float64(k%7)-3, float64(k%5)-2)
		if w.IsApprox(k) {
			coef[k] *= 100 // must not count
		} else {
			want += cmplx.Abs(coef[k])
		}
	}
	x := make([]complex128, len(coef))
	w.Inverse(x, coef)
	if got := p.Value(x); math.Abs(got-want) > 1e-10*want {
		t.Errorf("Value = %.12g, want Σ|detail| = %.12g", got, want)
	}
	// A constant image is pure approximation: R = 0 (Σ g_n = 0).
	for i := range x {
		x[i] = 3 - 2i
	}
	if got := p.Value(x); got > 1e-12 {
		t.Errorf("Value(constant) = %.3g, want 0", got)
	}
}

func TestWaveletL1NoAllocations(t *testing.T) {
	p, err := NewWaveletL1(64, 64, 3, "db4")
	if err != nil {
		t.Fatal(err)
	}
	x := randVec(64*64, 2)
	if a := testing.AllocsPerRun(10, func() { p.Prox(x, x, 0.1); _ = p.Value(x) }); a != 0 {
		t.Errorf("Prox+Value allocate %.1f times", a)
	}
}

func TestWaveletL1Errors(t *testing.T) {
	if _, err := NewWaveletL1(30, 32, 2, "db2"); err == nil {
		t.Error("size not divisible by 2^levels accepted")
	}
	if _, err := NewWaveletL1(32, 32, 2, "bior2.2"); err == nil {
		t.Error("unknown wavelet accepted")
	}
	p, _ := NewWaveletL1(8, 8, 1, "haar")
	defer func() {
		if recover() == nil {
			t.Error("negative threshold did not panic")
		}
	}()
	x := make([]complex128, 64)
	p.Prox(x, x, -1)
}

func TestWaveletL1CloneIndependent(t *testing.T) {
	p, _ := NewWaveletL1(16, 16, 2, "db2")
	q := p.Clone()
	x := randVec(256, 11)
	a := make([]complex128, 256)
	b := make([]complex128, 256)
	p.Prox(a, x, 0.3)
	q.Prox(b, x, 0.3)
	if d := maxDiff(a, b); d != 0 {
		t.Errorf("clone differs by %.3g", d)
	}
	if p.Transform() == q.Transform() {
		t.Error("clone shares its transform")
	}
	var _ Prior = p
}
