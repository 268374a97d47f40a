package nufft

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// TestBesselI0 checks the series for I₀ against scipy.special.i0
// (testdata/reference.json, Debian python3-scipy 1.10.1).
func TestBesselI0(t *testing.T) {
	ref := loadReference(t)
	if len(ref.I0) == 0 {
		t.Fatal("no I0 reference values")
	}
	for _, c := range ref.I0 {
		got := besselI0(c[0])
		if e := math.Abs(got-c[1]) / c[1]; e > 1e-14 {
			t.Errorf("I0(%g) = %.17g, scipy %.17g (relative error %.1e)", c[0], got, c[1], e)
		}
	}
}

// TestKernelTransform checks the closed-form Fourier transform of the
// Kaiser-Bessel kernel (written from memory of Jackson 1991) against adaptive
// quadrature by scipy.integrate.quad (testdata/reference.json, Debian
// python3-scipy 1.10.1) and against Gauss-Legendre quadrature by gonum's
// integrate/quad, on both sides of the sinh → sin transition.
func TestKernelTransform(t *testing.T) {
	ref := loadReference(t)
	if len(ref.KBFT) == 0 {
		t.Fatal("no kernel transform reference values")
	}
	for _, c := range ref.KBFT {
		if b := KaiserBesselBeta(c.W, c.Alpha); math.Abs(b-c.Beta) > 1e-12 {
			t.Errorf("β(W=%d, α=%g) = %.15g, script %.15g", c.W, c.Alpha, b, c.Beta)
		}
		k := newKernel(c.W, c.Alpha, c.Beta)
		got := k.phiHat(c.Xi)
		// absolute tolerance on the scale of the peak φ̂(0)
		if e := math.Abs(got-c.Value) / k.phiHat(0); e > 1e-10 {
			t.Errorf("W=%d α=%g: φ̂(%g) = %.15g, scipy quad %.15g (error %.1e of the peak)", c.W, c.Alpha, c.Xi, got, c.Value, e)
		}
	}
	for _, w := range []int{2, 3, 5, 8} {
		k := newKernel(w, 2, KaiserBesselBeta(w, 2))
		for _, xi := range []float64{0, 0.13, 0.25, 0.37, 0.5, 0.9, 2.2} {
			f := func(t float64) float64 { return k.phi(t) * math.Cos(2*math.Pi*t*xi) }
			// φ has square-root-type edges only in its argument; the
			// integrand is smooth (entire) inside, so Legendre converges.
			want := 2 * quad.Fixed(f, 0, float64(w)/2, 60, quad.Legendre{}, 0)
			if e := math.Abs(k.phiHat(xi)-want) / k.phiHat(0); e > 1e-12 {
				t.Errorf("W=%d: φ̂(%g) = %.15g, gonum Gauss-Legendre %.15g (error %.1e)", w, xi, k.phiHat(xi), want, e)
			}
		}
	}
}

// TestKernelPolynomials checks that the piecewise polynomials reproduce the
// kernel well below the transform's own error, at points other than the fit
// nodes, for every admissible width and both oversampling ratios.
func TestKernelPolynomials(t *testing.T) {
	for _, alpha := range []float64{1.25, 2} {
		for w := MinWidth; w <= MaxWidth; w++ {
			k := newKernel(w, alpha, KaiserBesselBeta(w, alpha))
			var buf [MaxWidth]float64
			worst := 0.0
			for i := range 997 {
				f := (float64(i) + 0.31) / 997
				k.weights(f, &buf)
				for q := range w {
					worst = max(worst, math.Abs(buf[q]-k.phi(-float64(w)/2+float64(q)+f)))
				}
			}
			if worst > 1e-2*k.alias {
				t.Errorf("W=%d α=%g: polynomial error %.1e, not below 1%% of the aliasing level %.1e", w, alpha, worst, k.alias)
			}
			t.Logf("W=%d α=%g: β=%.4f degree %d, polynomial error %.1e, aliasing level %.1e", w, alpha, k.beta, k.deg, worst, k.alias)
		}
	}
}
