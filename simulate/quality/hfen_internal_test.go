package quality

import (
	"math"
	"testing"
)

// TestLoGKernelMatchesNumPy compares the 15×15 kernel with the one built in 2D
// by NumPy 1.24.2 in testdata/make_quality_fixture.py (field hfen_kernel), and
// checks that it sums to zero (a constant image has no high frequencies).
func TestLoGKernelMatchesNumPy(t *testing.T) {
	want := readKernelFixture(t)
	p, err := NewHFENPlan(20, 20)
	if err != nil {
		t.Fatal(err)
	}
	got := p.Kernel()
	if len(got) != len(want) {
		t.Fatalf("kernel has %d taps, fixture %d", len(got), len(want))
	}
	sum := 0.0
	for i := range got {
		sum += got[i]
		if math.Abs(got[i]-want[i]) > 1e-15 {
			t.Errorf("tap %d: %.17g, NumPy %.17g", i, got[i], want[i])
		}
	}
	if math.Abs(sum) > 1e-15 {
		t.Errorf("kernel sums to %g, want 0", sum)
	}
}

// TestLoGOfQuadratic: the Laplacian of f = x² + y² is 4 everywhere (calculus),
// and a Laplacian-of-Gaussian filter returns ∇²(G*f) = G*∇²f = 4 away from the
// borders. The sampled, truncated Gaussian reproduces its second and fourth
// moments (σ², 3σ⁴) only approximately, so 4 is met to about 1e-4 here.
func TestLoGOfQuadratic(t *testing.T) {
	const n = 40
	p, _ := NewHFENPlan(n, n)
	f := make([]float64, n*n)
	for i := range n {
		for j := range n {
			x, y := float64(j)-17.3, float64(i)-21.6
			f[i*n+j] = x*x + y*y
		}
	}
	out := make([]float64, n*n)
	if err := p.LoG(out, f); err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for i := HFENRadius; i < n-HFENRadius; i++ {
		for j := HFENRadius; j < n-HFENRadius; j++ {
			worst = max(worst, math.Abs(out[i*n+j]-4))
		}
	}
	if worst > 1e-3 {
		t.Errorf("LoG of x²+y² deviates from 4 by up to %g", worst)
	}
	t.Logf("LoG of x²+y²: max deviation from 4 = %.3g", worst)
}
