package quality_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"accelplan/simulate/quality"
)

// testImage is a seeded, structured ny×nx image in [0, 1]: a bright disc on a
// gentle ramp plus uniform texture. Invented data for property checks only.
func testImage(ny, nx int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	v := make([]float64, ny*nx)
	for i := range ny {
		for j := range nx {
			y := float64(i)/float64(ny) - 0.5
			x := float64(j)/float64(nx) - 0.5
			s := 0.2 + 0.2*x
			if x*x+y*y < 0.09 {
				s += 0.5
			}
			v[i*nx+j] = s + 0.1*rng.Float64()
		}
	}
	return v
}

func addConst(v []float64, d float64) []float64 {
	out := make([]float64, len(v))
	for i := range v {
		out[i] = v[i] + d
	}
	return out
}

func scaled(v []float64, s float64) []float64 {
	out := make([]float64, len(v))
	for i := range v {
		out[i] = v[i] * s
	}
	return out
}

func filled(n int, c float64) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = c
	}
	return v
}

// TestIdentical: identical images score SSIM 1, NRMSE 0, PSNR +Inf and HFEN 0
// (definitions: Wang et al. 2004 "unique maximum" property of SSIM; textbook
// for the others).
func TestIdentical(t *testing.T) {
	for _, sz := range []struct{ ny, nx int }{{64, 64}, {40, 23}, {11, 11}} {
		ref := testImage(sz.ny, sz.nx, 7)
		x := append([]float64(nil), ref...)
		if got := quality.SSIM(x, ref, sz.ny, sz.nx, nil, 1); got != 1 {
			t.Errorf("%d×%d SSIM = %.17g, want 1", sz.ny, sz.nx, got)
		}
		if got := quality.NRMSE(x, ref, nil); got != 0 {
			t.Errorf("%d×%d NRMSE = %g, want 0", sz.ny, sz.nx, got)
		}
		if got := quality.PSNR(x, ref, nil, 1); !math.IsInf(got, 1) {
			t.Errorf("%d×%d PSNR = %g, want +Inf", sz.ny, sz.nx, got)
		}
		if got := quality.HFEN(x, ref, sz.ny, sz.nx, nil); got != 0 {
			t.Errorf("%d×%d HFEN = %g, want 0", sz.ny, sz.nx, got)
		}
	}
}

// TestPSNRConstantOffset: an offset d everywhere gives MSE = d², so
// PSNR = 20·log10(L/d) (textbook definition 10·log10(L²/MSE)).
func TestPSNRConstantOffset(t *testing.T) {
	ref := testImage(32, 48, 3)
	cases := []struct {
		name      string
		L, d, dB  float64
		roiStride int
	}{
		{"L=1 d=0.1", 1, 0.1, 20, 0},
		{"L=1 d=-0.01", 1, -0.01, 40, 0},
		// 20·log10(255) = 48.1308036086791 dB, the 8-bit peak with unit error (common practice).
		{"L=255 d=1", 255, 1, 48.1308036086791, 0},
		{"L=2 d=0.2 roi", 2, 0.2, 20, 3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var roi []bool
			if c.roiStride > 0 {
				roi = make([]bool, len(ref))
				for i := range roi {
					roi[i] = i%c.roiStride == 0
				}
			}
			got := quality.PSNR(addConst(ref, c.d), ref, roi, c.L)
			if math.Abs(got-c.dB) > 1e-9 {
				t.Errorf("PSNR = %.12f dB, want %.12f", got, c.dB)
			}
		})
	}
}

// TestNRMSEScaled: x = (1+ε)·ref gives ‖ε·ref‖/‖ref‖ = |ε|; x = 0 gives 1
// (definition ‖x−ref‖/‖ref‖).
func TestNRMSEScaled(t *testing.T) {
	ref := testImage(30, 20, 11)
	cases := []struct {
		name string
		x    []float64
		want float64
	}{
		{"+5%", scaled(ref, 1.05), 0.05},
		{"-30%", scaled(ref, 0.7), 0.3},
		{"zero image", make([]float64, len(ref)), 1},
		{"sign flip", scaled(ref, -1), 2},
	}
	for _, c := range cases {
		if got := quality.NRMSE(c.x, ref, nil); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s: NRMSE = %.15g, want %g", c.name, got, c.want)
		}
	}
}

// TestSSIMConstantImages: with no structure both variances and the covariance
// vanish, so SSIM = (2ab + C1)/(a² + b² + C1) · C2/C2 (Wang et al. 2004,
// eqs. 6-13 with σx = σy = σxy = 0), on every pixel including the borders.
func TestSSIMConstantImages(t *testing.T) {
	const ny, nx = 16, 21
	cases := []struct{ a, b, L float64 }{
		{0.5, 0.5, 1},
		{0.2, 0.6, 1},
		{10, 30, 255},
		{0, 1, 1},
	}
	for _, c := range cases {
		c1 := (0.01 * c.L) * (0.01 * c.L)
		want := (2*c.a*c.b + c1) / (c.a*c.a + c.b*c.b + c1)
		x, ref := filled(ny*nx, c.a), filled(ny*nx, c.b)
		p, err := quality.NewSSIMPlan(ny, nx, c.L)
		if err != nil {
			t.Fatal(err)
		}
		for _, avg := range []quality.Average{quality.AverageInterior, quality.AverageAll} {
			got, err := p.Mean(x, ref, nil, avg)
			if err != nil {
				t.Fatal(err)
			}
			// E[x²]−E[x]² cancels only to ~1e-16·a², divided by C2 ~ 1e-4·L²:
			// agreement to ~1e-13, tested at 1e-11.
			if math.Abs(got-want) > 1e-11 {
				t.Errorf("a=%g b=%g L=%g avg=%d: SSIM = %.16g, want %.16g", c.a, c.b, c.L, avg, got, want)
			}
		}
	}
}

// TestSSIMProperties: symmetry S(x,y) = S(y,x) and boundedness |S| ≤ 1 (Wang
// et al. 2004, section III-B), and a map that is 1 wherever the images agree
// over the whole window.
func TestSSIMProperties(t *testing.T) {
	const ny, nx = 48, 37
	ref := testImage(ny, nx, 1)
	rng := rand.New(rand.NewPCG(2, 3))
	x := make([]float64, len(ref))
	for i := range x {
		x[i] = ref[i] + 0.1*rng.NormFloat64()
	}
	neg := scaled(ref, -1)
	for _, c := range []struct {
		name string
		a    []float64
	}{{"noisy", x}, {"negated", neg}} {
		m1 := quality.SSIMMap(c.a, ref, ny, nx, 1)
		m2 := quality.SSIMMap(ref, c.a, ny, nx, 1)
		for i := range m1 {
			if math.Abs(m1[i]-m2[i]) > 1e-15 {
				t.Fatalf("%s: map not symmetric at %d: %g vs %g", c.name, i, m1[i], m2[i])
			}
			if math.Abs(m1[i]) > 1+1e-15 {
				t.Fatalf("%s: |SSIM| = %g > 1 at %d", c.name, m1[i], i)
			}
		}
	}
	// A change confined to one corner leaves the map 1 outside its reach
	// (window radius 5).
	y := append([]float64(nil), ref...)
	y[0] += 0.3
	m := quality.SSIMMap(y, ref, ny, nx, 1)
	for i := range ny {
		for j := range nx {
			far := i > 2*quality.SSIMRadius || j > 2*quality.SSIMRadius
			if far && math.Abs(m[i*nx+j]-1) > 1e-12 {
				t.Fatalf("map at (%d,%d) = %g, want 1 outside the window of the change", i, j, m[i*nx+j])
			}
		}
	}
	if m[0] >= 0.999 {
		t.Errorf("map at the changed pixel = %g, want < 0.999", m[0])
	}
}

// TestSSIMROIMatchesMap: the roi mean equals the mean of SSIMMap over the roi
// (the documented choice), and an all-true roi equals AverageAll.
func TestSSIMROIMatchesMap(t *testing.T) {
	const ny, nx = 40, 30
	ref := testImage(ny, nx, 5)
	x := testImage(ny, nx, 6)
	m := quality.SSIMMap(x, ref, ny, nx, 1)
	roi := make([]bool, ny*nx)
	sum, n := 0.0, 0
	for i := range roi {
		roi[i] = ref[i] > 0.5 || i < nx // includes the whole first row
		if roi[i] {
			sum += m[i]
			n++
		}
	}
	if got, want := quality.SSIM(x, ref, ny, nx, roi, 1), sum/float64(n); math.Abs(got-want) > 1e-13 {
		t.Errorf("roi SSIM = %.15g, map mean over roi = %.15g", got, want)
	}
	all := make([]bool, ny*nx)
	for i := range all {
		all[i] = true
	}
	p, _ := quality.NewSSIMPlan(ny, nx, 1)
	wantAll, _ := p.Mean(x, ref, nil, quality.AverageAll)
	if got := quality.SSIM(x, ref, ny, nx, all, 1); math.Abs(got-wantAll) > 1e-13 {
		t.Errorf("all-true roi SSIM = %.15g, AverageAll = %.15g", got, wantAll)
	}
}

// TestBadInput: bad input gives NaN from the plain functions and an error
// from the plans, never a panic.
func TestBadInput(t *testing.T) {
	a := testImage(12, 12, 1)
	b := testImage(12, 12, 2)
	short := a[:100]
	none := make([]bool, len(a))
	small := testImage(8, 8, 1)
	cases := []struct {
		name string
		v    float64
	}{
		{"NRMSE length mismatch", quality.NRMSE(short, b, nil)},
		{"NRMSE empty roi", quality.NRMSE(a, b, none)},
		{"NRMSE roi length", quality.NRMSE(a, b, make([]bool, 3))},
		{"NRMSE empty images", quality.NRMSE(nil, nil, nil)},
		{"PSNR zero range", quality.PSNR(a, b, nil, 0)},
		{"PSNR NaN range", quality.PSNR(a, b, nil, math.NaN())},
		{"PSNR empty roi", quality.PSNR(a, b, none, 1)},
		{"SSIM wrong size", quality.SSIM(a, b, 12, 13, nil, 1)},
		{"SSIM negative range", quality.SSIM(a, b, 12, 12, nil, -1)},
		{"SSIM empty roi", quality.SSIM(a, b, 12, 12, none, 1)},
		{"SSIM 8×8 interior", quality.SSIM(small, small, 8, 8, nil, 1)},
		{"HFEN wrong size", quality.HFEN(a, b, 0, 12, nil)},
		{"HFEN empty roi", quality.HFEN(a, b, 12, 12, none)},
	}
	for _, c := range cases {
		if !math.IsNaN(c.v) {
			t.Errorf("%s: got %g, want NaN", c.name, c.v)
		}
	}
	if m := quality.SSIMMap(short, b, 12, 12, 1); m != nil {
		t.Errorf("SSIMMap with a short image returned %d values, want nil", len(m))
	}
	if _, err := quality.NewSSIMPlan(0, 5, 1); err == nil {
		t.Error("NewSSIMPlan(0, 5, 1): no error")
	}
	if _, err := quality.NewSSIMPlan(5, 5, math.Inf(1)); err == nil {
		t.Error("NewSSIMPlan with infinite range: no error")
	}
	p, _ := quality.NewSSIMPlan(12, 12, 1)
	if _, err := p.Mean(a, b, nil, quality.Average(9)); err == nil {
		t.Error("unknown Average mode: no error")
	}
	if err := p.Map(make([]float64, 3), a, b); err == nil {
		t.Error("Map into a short dst: no error")
	}
	// An 8×8 image can still be scored over all pixels or a roi.
	all := make([]bool, 64)
	all[10] = true
	if v := quality.SSIM(small, small, 8, 8, all, 1); v != 1 {
		t.Errorf("8×8 SSIM over a roi = %g, want 1", v)
	}
	if _, err := quality.NewHFENPlan(-1, 3); err == nil {
		t.Error("NewHFENPlan(-1, 3): no error")
	}
}

// TestPlansAllocateNothing: repeated scoring with a plan allocates nothing
// (house rule for hot loops).
func TestPlansAllocateNothing(t *testing.T) {
	const ny, nx = 32, 32
	ref := testImage(ny, nx, 1)
	x := testImage(ny, nx, 2)
	roi := make([]bool, ny*nx)
	for i := range roi {
		roi[i] = i%2 == 0
	}
	sp, _ := quality.NewSSIMPlan(ny, nx, 1)
	hp, _ := quality.NewHFENPlan(ny, nx)
	dst := make([]float64, ny*nx)
	for name, f := range map[string]func(){
		"SSIMPlan.Mean":  func() { _, _ = sp.Mean(x, ref, roi, quality.AverageInterior) },
		"SSIMPlan.Map":   func() { _ = sp.Map(dst, x, ref) },
		"HFENPlan.Value": func() { _, _ = hp.Value(x, ref, nil) },
		"NRMSE":          func() { _ = quality.NRMSE(x, ref, roi) },
		"PSNR":           func() { _ = quality.PSNR(x, ref, roi, 1) },
	} {
		if a := testing.AllocsPerRun(20, f); a != 0 {
			t.Errorf("%s allocates %.0f times per call, want 0", name, a)
		}
	}
}
