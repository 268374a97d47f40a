package priors

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// tvFixture is testdata/tv_fixture.json, made by testdata/make_tv_fixture.py
// with scikit-image 0.19.3 (denoise_tv_chambolle) and numpy 1.24.2.
type tvFixture struct {
	MadeBy  string    `json:"made_by"`
	Ny      int       `json:"ny"`
	Nx      int       `json:"nx"`
	Noisy   []float64 `json:"noisy"`
	NoisyTV float64   `json:"noisy_tv"`
	Cases   []struct {
		Weight           float64   `json:"weight"`
		Default          []float64 `json:"default"`
		DefaultObjective float64   `json:"default_objective"`
		Tight            []float64 `json:"tight"`
		TightObjective   float64   `json:"tight_objective"`
		TightTV          float64   `json:"tight_tv"`
	} `json:"cases"`
}

func loadTVFixture(t *testing.T) tvFixture {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("testdata", "tv_fixture.json"))
	if err != nil {
		t.Fatalf("reading the fixture (regenerate with /usr/bin/python3 testdata/make_tv_fixture.py): %v", err)
	}
	var f tvFixture
	if err := json.Unmarshal(raw, &f); err != nil {
		t.Fatal(err)
	}
	if f.Ny*f.Nx != len(f.Noisy) || len(f.Cases) == 0 {
		t.Fatalf("fixture malformed: %d×%d, %d values, %d cases", f.Ny, f.Nx, len(f.Noisy), len(f.Cases))
	}
	return f
}

func realToComplex(x []float64) []complex128 {
	out := make([]complex128, len(x))
	for i, v := range x {
		out[i] = complex(v, 0)
	}
	return out
}

// rofObjective is ½‖u − f‖² + w·TV(u).
func rofObjective(tv *TV, u, f []complex128, w float64) float64 {
	return 0.5*linSqDist(u, f) + w*tv.Value(u)
}

// TestTVValueMatchesNumpy checks Value against numpy's evaluation of the same
// definition (Neumann forward differences, isotropic norm) in the fixture
// script, on the noisy image and on scikit-image's outputs.
func TestTVValueMatchesNumpy(t *testing.T) {
	f := loadTVFixture(t)
	tv, err := NewTV(f.Ny, f.Nx, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	check := func(name string, x []float64, want float64) {
		got := tv.Value(realToComplex(x))
		if math.Abs(got-want) > 1e-12*want {
			t.Errorf("%s: TV = %.15g, numpy %.15g", name, got, want)
		}
	}
	check("noisy", f.Noisy, f.NoisyTV)
	for _, c := range f.Cases {
		check("skimage tight output", c.Tight, c.TightTV)
	}
}

// TestTVProxNoWorseThanSkimage solves the ROF denoising problem with Prox and
// compares with scikit-image 0.19.3 denoise_tv_chambolle on the same image.
// Mapping: skimage's `weight` w minimises ½Σ(u−f)² + w·Σ|∇u| with Neumann
// forward differences and the isotropic norm (read from
// _denoise_tv_chambolle_nd in skimage/restoration/_denoise.py), which is
// Prox(f, t = w) of NewTV(ny, nx, BoundaryNeumann).
func TestTVProxNoWorseThanSkimage(t *testing.T) {
	f := loadTVFixture(t)
	noisy := realToComplex(f.Noisy)
	for _, c := range f.Cases {
		tv, err := NewTV(f.Ny, f.Nx, BoundaryNeumann)
		if err != nil {
			t.Fatal(err)
		}
		// With its default settings (relative gap 1e-4, 500 iterations) the
		// prox must already beat scikit-image's default run.
		u := make([]complex128, len(noisy))
		tv.Prox(u, noisy, c.Weight)
		quick := tv.LastProx()
		if def := rofObjective(tv, realToComplex(c.Default), noisy, c.Weight); !(quick.Objective <= def) {
			t.Errorf("w=%.2f: default settings reach %.12g, skimage default %.12g", c.Weight, quick.Objective, def)
		}
		t.Logf("w=%.2f: default settings: %d iterations, objective %.10f, gap %.2e", c.Weight, quick.Iterations, quick.Objective, quick.Gap)
		tv.Reset()
		tv.Tol, tv.MaxIter = 1e-7, 20000
		tv.Prox(u, noisy, c.Weight)
		rep := tv.LastProx()
		ours := rofObjective(tv, u, noisy, c.Weight)
		def := rofObjective(tv, realToComplex(c.Default), noisy, c.Weight)
		tight := rofObjective(tv, realToComplex(c.Tight), noisy, c.Weight)
		t.Logf("w=%.2f: ours %.10f (%d iterations, gap %.2e), skimage default %.10f, skimage tight %.10f",
			c.Weight, ours, rep.Iterations, rep.Gap, def, tight)
		if math.Abs(def-c.DefaultObjective) > 1e-10*def || math.Abs(tight-c.TightObjective) > 1e-10*tight {
			t.Errorf("objective of skimage's outputs: Go %.12g / %.12g, numpy %.12g / %.12g", def, tight, c.DefaultObjective, c.TightObjective)
		}
		if !rep.Converged {
			t.Errorf("w=%.2f: prox did not reach its tolerance: %+v", c.Weight, rep)
		}
		if math.Abs(rep.Objective-ours) > 1e-12*ours {
			t.Errorf("reported objective %.15g, recomputed %.15g", rep.Objective, ours)
		}
		if ours > def {
			t.Errorf("w=%.2f: our objective %.12g is worse than skimage's default run %.12g", c.Weight, ours, def)
		}
		// scikit-image's tight run is near its optimum; ours must be within our
		// own certified gap of it or below.
		if ours > tight+rep.Gap {
			t.Errorf("w=%.2f: our objective %.12g exceeds skimage's tight run %.12g by more than our gap %.2e", c.Weight, ours, tight, rep.Gap)
		}
		// Weak duality: the dual value ours − gap is a lower bound on every
		// primal value, so it must not exceed skimage's objectives.
		if lower := ours - rep.Gap; lower > tight*(1+1e-13) || lower > def {
			t.Errorf("w=%.2f: dual bound %.12g exceeds a primal value of skimage (%.12g, %.12g)", c.Weight, lower, tight, def)
		}
		// The minimiser is unique (strongly convex objective), so the images
		// must agree where both are near optimal.
		var d2, n2 float64
		for i, v := range c.Tight {
			e := real(u[i]) - v
			d2 += e * e
			n2 += v * v
			if imag(u[i]) != 0 {
				t.Fatalf("real input gave a complex output at %d: %v", i, u[i])
			}
		}
		if rel := math.Sqrt(d2 / n2); rel > 1e-3 {
			t.Errorf("w=%.2f: relative distance to skimage's tight output %.2e", c.Weight, rel)
		}
	}
}

// TestTVProxGapFalls checks that the FGP duality gap decreases towards zero as
// the iteration budget grows (Beck & Teboulle 2009 prove an O(1/k²) rate for
// the dual objective).
func TestTVProxGapFalls(t *testing.T) {
	f := loadTVFixture(t)
	noisy := realToComplex(f.Noisy)
	u := make([]complex128, len(noisy))
	prev, obj := math.Inf(1), 0.0
	for _, iters := range []int{10, 40, 160, 640} {
		tv, _ := NewTV(f.Ny, f.Nx, BoundaryNeumann)
		tv.Tol, tv.MaxIter = 0, iters
		tv.Prox(u, noisy, 0.25)
		var g float64
		g, obj = tv.LastProx().Gap, tv.LastProx().Objective
		t.Logf("%4d iterations: gap %.3e", iters, g)
		if !(g < prev) {
			t.Errorf("gap %.3e after %d iterations did not fall below %.3e", g, iters, prev)
		}
		prev = g
	}
	if prev > 1e-4*obj {
		t.Errorf("gap after 640 iterations %.3e, want below 1e-4 of the objective %.4g", prev, obj)
	}
}

// TestTVOfKnownImages checks Value against values known in closed form.
func TestTVOfKnownImages(t *testing.T) {
	const ny, nx = 24, 30
	step := func(h complex128, col int) []complex128 { // vertical edge before column col
		x := make([]complex128, ny*nx)
		for i := 0; i < ny; i++ {
			for j := col; j < nx; j++ {
				x[i*nx+j] = h
			}
		}
		return x
	}
	square := func(h float64, r0, c0, a int) []complex128 {
		x := make([]complex128, ny*nx)
		for i := r0; i < r0+a; i++ {
			for j := c0; j < c0+a; j++ {
				x[i*nx+j] = complex(h, 0)
			}
		}
		return x
	}
	ramp := make([]complex128, ny*nx)
	for i := 0; i < ny; i++ {
		for j := 0; j < nx; j++ {
			ramp[i*nx+j] = complex(0.3*float64(j), -0.4*float64(i))
		}
	}
	cases := []struct {
		name string
		b    Boundary
		x    []complex128
		want float64
	}{
		// A step of height h along a straight edge of length L has TV h·L
		// (coarea formula; Evans LC, Gariepy RF, Measure Theory and Fine
		// Properties of Functions, CRC 1992, §5.5). Grid-aligned, the
		// discrete value is exact.
		{"step neumann", BoundaryNeumann, step(1.5, 11), 1.5 * ny},
		// Periodically the image also jumps back at the wrap-around.
		{"step periodic", BoundaryPeriodic, step(1.5, 11), 2 * 1.5 * ny},
		{"step of complex height 3+4i", BoundaryNeumann, step(3+4i, 11), 5 * ny},
		// Worked by hand from the definition: an a×a square of height h has
		// 4a−2 boundary pixels with one unit difference and one corner pixel
		// (bottom right) where both differences are −h, which counts √2·h.
		{"square", BoundaryNeumann, square(2, 5, 7, 9), 2 * (4*9 - 2 + math.Sqrt2)},
		{"square periodic", BoundaryPeriodic, square(2, 5, 7, 9), 2 * (4*9 - 2 + math.Sqrt2)},
		// An affine image a·j + b·i (complex coefficients 0.3 and −0.4i here)
		// has |∇| = √(|a|²+|b|²) = 0.5 wherever both forward differences exist;
		// the last column has only |b| = 0.4, the last row only |a| = 0.3.
		{"ramp neumann", BoundaryNeumann, ramp, 0.5*(ny-1)*(nx-1) + 0.4*(ny-1) + 0.3*(nx-1)},
	}
	for _, c := range cases {
		tv, err := NewTV(ny, nx, c.b)
		if err != nil {
			t.Fatal(err)
		}
		if got := tv.Value(c.x); math.Abs(got-c.want) > 1e-12*math.Max(1, c.want) {
			t.Errorf("%s: TV = %.15g, want %.15g", c.name, got, c.want)
		}
	}
	// Complex scaling: TV(c·x) = |c|·TV(x) (the norm is absolutely homogeneous).
	tv, _ := NewTV(ny, nx, BoundaryNeumann)
	x := square(1, 3, 4, 10)
	y := make([]complex128, len(x))
	for i, v := range x {
		y[i] = complex(0.6, -0.8) * v // |c| = 1
	}
	if a, b := tv.Value(x), tv.Value(y); math.Abs(a-b) > 1e-12*a {
		t.Errorf("TV not invariant under a unit complex factor: %g vs %g", a, b)
	}
}

// TestTVOfSmoothDisc checks the discrete TV of a smooth disc against the
// perimeter: for f = g(r) with g falling from 1 to 0 symmetrically about R,
// the coarea formula (Evans & Gariepy 1992, §5.5) gives
// ∫|∇f| = 2π∫ r|g'(r)| dr = 2πR (up to a tail of order e^(−2R/s)). The
// forward-difference sum approximates the integral with an error that falls
// with the square of the edge width s (a consistency property of the
// discretisation; the rate was seen here, not taken from a source). For sharp
// edges at oblique angles the discrete isotropic TV is known to overestimate
// the length (Condat L, SIAM J Imaging Sci 2017;10:1258-1290); measured here,
// an area-averaged sharp disc reads about 7% high.
func TestTVOfSmoothDisc(t *testing.T) {
	const n = 128
	R := 0.3 * n
	tv, _ := NewTV(n, n, BoundaryNeumann)
	var errs []float64
	for _, s := range []float64{1, 2, 4} {
		x := make([]complex128, n*n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				r := math.Hypot(float64(i)-n/2-0.3, float64(j)-n/2+0.17)
				x[i*n+j] = complex(0.5*(1-math.Tanh((r-R)/s)), 0)
			}
		}
		rel := tv.Value(x)/(2*math.Pi*R) - 1
		t.Logf("edge width %.0f: relative error %.2e", s, rel)
		errs = append(errs, math.Abs(rel))
	}
	if errs[2] > 2e-3 {
		t.Errorf("smooth disc, s = 4: relative error %.2e, want below 2e-3", errs[2])
	}
	if errs[1] > errs[0]/2.5 {
		t.Errorf("error did not fall with the edge width: %v", errs)
	}
}

// TestGradAdjoint checks ⟨∇x, p⟩ = ⟨x, ∇ᵀp⟩ (definition of the adjoint) and
// the norm bound ‖∇‖² ≤ 8, which the periodic gradient of an even grid attains
// at the highest frequency, where the DFT of the difference stencil has
// |e^{iπ} − 1|² = 4 along each axis (common practice; any signal-processing
// text).
func TestGradAdjoint(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, sz := range [][2]int{{1, 1}, {1, 5}, {6, 1}, {2, 2}, {7, 10}, {16, 16}} {
		for _, b := range []Boundary{BoundaryNeumann, BoundaryPeriodic} {
			d, err := newDiff2(sz[0], sz[1], b)
			if err != nil {
				t.Fatal(err)
			}
			n := sz[0] * sz[1]
			x, px, py := make([]complex128, n), make([]complex128, n), make([]complex128, n)
			for i := range x {
				x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
				px[i] = complex(rng.NormFloat64(), rng.NormFloat64())
				py[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			gx, gy, a := make([]complex128, n), make([]complex128, n), make([]complex128, n)
			d.grad(gx, gy, x)
			d.adj(a, px, py)
			var lhs, rhs complex128
			for i := range x {
				lhs += gx[i]*conjC(px[i]) + gy[i]*conjC(py[i])
				rhs += x[i] * conjC(a[i])
			}
			if e := lhs - rhs; math.Hypot(real(e), imag(e)) > 1e-12*float64(n) {
				t.Errorf("%v %v: <∇x,p> = %v, <x,∇ᵀp> = %v", sz, b, lhs, rhs)
			}
		}
	}
	// Highest frequency (−1)^(i+j) on a 16×16 periodic grid: ∇ᵀ∇x = 8x.
	d, _ := newDiff2(16, 16, BoundaryPeriodic)
	x := make([]complex128, 256)
	for i := range x {
		x[i] = complex(float64(1-2*((i/16+i%16)%2)), 0)
	}
	gx, gy, a := make([]complex128, 256), make([]complex128, 256), make([]complex128, 256)
	d.grad(gx, gy, x)
	d.adj(a, gx, gy)
	for i := range a {
		if a[i] != 8*x[i] {
			t.Fatalf("∇ᵀ∇ of the checkerboard at %d: %v, want %v", i, a[i], 8*x[i])
		}
	}
}

func conjC(v complex128) complex128 { return complex(real(v), -imag(v)) }

// TestTVProxProperties checks properties every proximal map of a semi-norm
// has (Combettes PL, Wajs VR, Multiscale Model Simul 2005;4:1168-1200):
// t = 0 is the identity, constants are fixed points (TV(const) = 0 and the
// prox keeps the mean), and aliasing dst with src gives the same result.
func TestTVProxProperties(t *testing.T) {
	const ny, nx = 12, 17
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]complex128, ny*nx)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	for _, b := range []Boundary{BoundaryNeumann, BoundaryPeriodic} {
		tv, _ := NewTV(ny, nx, b)
		tv.Tol = 1e-10
		u := make([]complex128, len(x))
		tv.Prox(u, x, 0)
		for i := range u {
			if u[i] != x[i] {
				t.Fatalf("%v: t=0 changed value %d", b, i)
			}
		}
		c := make([]complex128, len(x))
		for i := range c {
			c[i] = complex(0.7, -0.2)
		}
		tv.Reset()
		tv.Prox(u, c, 3)
		for i := range u {
			if d := u[i] - c[i]; math.Hypot(real(d), imag(d)) > 1e-12 {
				t.Fatalf("%v: constant image moved at %d: %v", b, i, u[i])
			}
		}
		tv.Reset()
		tv.Prox(u, x, 0.4)
		var mx, mu complex128
		for i := range x {
			mx += x[i]
			mu += u[i]
		}
		if d := (mx - mu) / complex(float64(len(x)), 0); math.Hypot(real(d), imag(d)) > 1e-9 {
			t.Errorf("%v: prox changed the mean by %v", b, d)
		}
		if tv.Value(u) >= tv.Value(x) {
			t.Errorf("%v: prox did not lower TV", b)
		}
		tv.Reset()
		alias := append([]complex128(nil), x...)
		tv.Prox(alias, alias, 0.4)
		for i := range u {
			if d := alias[i] - u[i]; math.Hypot(real(d), imag(d)) > 1e-12 {
				t.Fatalf("%v: aliased prox differs at %d", b, i)
			}
		}
	}
}

func TestTVRejects(t *testing.T) {
	if _, err := NewTV(0, 4, BoundaryNeumann); err == nil {
		t.Error("0 rows accepted")
	}
	if _, err := NewTV(4, 4, Boundary(9)); err == nil {
		t.Error("unknown boundary accepted")
	}
	for _, b := range []Boundary{BoundaryNeumann, BoundaryPeriodic} {
		if got, err := ParseBoundary(b.String()); err != nil || got != b {
			t.Errorf("ParseBoundary(%q) = %v, %v", b.String(), got, err)
		}
	}
	if _, err := ParseBoundary("mirror"); err == nil || !strings.Contains(err.Error(), "valid: neumann, periodic") {
		t.Errorf("unknown boundary name: %v", err)
	}
}

func TestTVProxAllocatesNothing(t *testing.T) {
	const n = 32
	tv, _ := NewTV(n, n, BoundaryPeriodic)
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]complex128, n*n)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), 0)
	}
	u := make([]complex128, n*n)
	tv.MaxIter = 30
	if a := testing.AllocsPerRun(5, func() { tv.Prox(u, x, 0.3); _ = tv.Value(u) }); a != 0 {
		t.Errorf("Prox and Value allocate %v times per call", a)
	}
}

// Total variation of a step and its denoising by the TV proximal map.
func ExampleTV() {
	const ny, nx = 8, 10
	tv, _ := NewTV(ny, nx, BoundaryNeumann)
	x := make([]complex128, ny*nx)
	for i := range x {
		if i%nx >= 5 {
			x[i] = 2 // a step of height 2 along 8 rows
		}
	}
	fmt.Printf("TV of the step: %.1f\n", tv.Value(x))

	rng := rand.New(rand.NewPCG(1, 2))
	noisy := make([]complex128, len(x))
	for i, v := range x {
		noisy[i] = v + complex(0.1*rng.NormFloat64(), 0)
	}
	u := make([]complex128, len(x))
	tv.Prox(u, noisy, 0.5)
	fmt.Printf("noisy TV %.1f, denoised TV %.1f, converged %v\n", tv.Value(noisy), tv.Value(u), tv.LastProx().Converged)
	// Output:
	// TV of the step: 16.0
	// noisy TV 27.0, denoised TV 14.4, converged true
}

// BenchmarkTVProxIteration256 measures one FGP iteration of the TV proximal
// map on a 256² image (one gradient, one divergence, projection, momentum).
func BenchmarkTVProxIteration256(b *testing.B) {
	const n = 256
	tv, _ := NewTV(n, n, BoundaryNeumann)
	x := seededComplex(n*n, 77)
	u := make([]complex128, n*n)
	tv.Tol, tv.MaxIter = 0, b.N
	b.ResetTimer()
	tv.Prox(u, x, 0.1)
}
