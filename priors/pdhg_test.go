package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"accelplan/simulate"
)

// tvProblem is a small undersampled single-coil Cartesian problem: the
// modified Shepp-Logan phantom of package simulate on an n×n grid, a seeded
// random mask keeping frac of k-space plus the 6×6 centre, and complex noise.
// t may be nil (in examples).
func tvProblem(t testing.TB, n int, frac, sigma float64, seed uint64) (*simulate.Cartesian, []complex128, []float64) {
	if t != nil {
		t.Helper()
	}
	truth := simulate.ModifiedSheppLogan().Rasterize(n, n)
	rng := rand.New(rand.NewPCG(seed, seed^0x5bd1e995))
	mask := make([]bool, n*n)
	for i := range mask {
		r, c := i/n-n/2, i%n-n/2
		mask[i] = rng.Float64() < frac || (r >= -3 && r < 3 && c >= -3 && c < 3)
	}
	op, err := simulate.NewCartesian(n, n, mask)
	if err != nil {
		panic(err) // the mask always acquires the centre
	}
	y := make([]complex128, op.DataLen())
	op.Forward(y, realToComplex(truth))
	simulate.AddNoise(y, sigma, rng)
	return op, y, truth
}

// TestTVSolverFullySampledMatchesSkimage: with every k-space sample acquired
// E is unitary, so ½‖E x − y‖² = ½‖x − Eᴴy‖² and the problem is ROF
// denoising of Eᴴy, which scikit-image 0.19.3 denoise_tv_chambolle solves with
// weight = λ (same Neumann, isotropic TV; see TestTVProxNoWorseThanSkimage for
// the mapping). With the data term dualised the method converges at the
// ergodic O(1/k) rate (Chambolle & Pock 2011, Theorem 1), slowly on pure
// denoising: after the same 200 iterations as skimage's default run it must
// already be better, and with more iterations it must approach skimage's
// near-optimal run, within its own gap.
func TestTVSolverFullySampledMatchesSkimage(t *testing.T) {
	f := loadTVFixture(t)
	op, err := simulate.NewCartesian(f.Ny, f.Nx, allTrue(f.Ny*f.Nx))
	if err != nil {
		t.Fatal(err)
	}
	noisy := realToComplex(f.Noisy)
	y := make([]complex128, op.DataLen())
	op.Forward(y, noisy)
	s, err := NewTVSolver(op, f.Ny, f.Nx, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	tv, _ := NewTV(f.Ny, f.Nx, BoundaryNeumann)
	for _, c := range f.Cases {
		def := rofObjective(tv, realToComplex(c.Default), noisy, c.Weight)
		tight := rofObjective(tv, realToComplex(c.Tight), noisy, c.Weight)
		prevExcess := math.Inf(1)
		for _, it := range []int{200, 600, 1800} {
			x := make([]complex128, len(noisy))
			op.Adjoint(x, y)
			rep, err := s.Solve(x, y, c.Weight, PDHGOptions{MaxIter: it, GapEvery: it})
			if err != nil {
				t.Fatal(err)
			}
			ours := rofObjective(tv, x, noisy, c.Weight)
			excess := (ours - tight) / tight
			t.Logf("w=%.2f, %4d iterations: %.10f (gap %.1e), relative excess over skimage tight %.2e; skimage default %.10f",
				c.Weight, it, ours, rep.Gap, excess, def)
			if math.Abs(rep.Objective-ours) > 1e-9*ours {
				t.Errorf("reported objective %.12g, recomputed %.12g", rep.Objective, ours)
			}
			if ours > def {
				t.Errorf("w=%.2f, %d iterations: objective %.12g worse than skimage's default run %.12g", c.Weight, it, ours, def)
			}
			if ours-tight > rep.Gap {
				t.Errorf("w=%.2f, %d iterations: excess %.3e over skimage's near-optimum exceeds the gap %.3e", c.Weight, it, ours-tight, rep.Gap)
			}
			if !(excess < prevExcess/2) {
				t.Errorf("w=%.2f, %d iterations: excess %.2e did not halve from %.2e", c.Weight, it, excess, prevExcess)
			}
			prevExcess = excess
		}
		if prevExcess > 5e-4 {
			t.Errorf("w=%.2f: relative excess after 1800 iterations %.2e, want below 5e-4", c.Weight, prevExcess)
		}
	}
}

// TestTVSolverGapTendsToZero runs the solver on an undersampled problem with
// growing iteration budgets: the partial primal-dual gap must fall towards
// zero (Chambolle & Pock 2011, Theorem 1: the iterates converge to a saddle
// point, where every term of the gap vanishes), and it must bound the excess
// of the objective over the best value found.
func TestTVSolverGapTendsToZero(t *testing.T) {
	const n = 32
	op, y, _ := tvProblem(t, n, 0.35, 0.02, 1)
	s, err := NewTVSolver(op, n, n, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	const lambda = 0.01
	budgets := []int{50, 200, 800, 3200}
	gaps, objs := make([]float64, len(budgets)), make([]float64, len(budgets))
	for k, it := range budgets {
		x := make([]complex128, n*n)
		rep, err := s.Solve(x, y, lambda, PDHGOptions{MaxIter: it, GapEvery: it})
		if err != nil {
			t.Fatal(err)
		}
		gaps[k], objs[k] = rep.Gap, rep.Objective
		t.Logf("%5d iterations: objective %.12f, gap %.3e", it, rep.Objective, rep.Gap)
	}
	for k := 1; k < len(gaps); k++ {
		if !(gaps[k] < gaps[k-1]/4) {
			t.Errorf("gap after %d iterations %.3e did not fall fourfold from %.3e", budgets[k], gaps[k], gaps[k-1])
		}
	}
	best := objs[len(objs)-1]
	if rel := gaps[len(gaps)-1] / best; rel > 1e-6 {
		t.Errorf("relative gap after %d iterations %.2e, want below 1e-6", budgets[len(budgets)-1], rel)
	}
	for k := range budgets[:len(budgets)-1] {
		if excess := objs[k] - best; excess > gaps[k] {
			t.Errorf("%d iterations: objective excess %.3e over the best value exceeds the gap %.3e", budgets[k], excess, gaps[k])
		}
	}
}

// TestTVSolverWarmStart: restarting from a converged solution and its duals
// stops at the first gap evaluation, and the change rule stops a solve once
// the image no longer moves.
func TestTVSolverWarmStart(t *testing.T) {
	const n = 24
	op, y, _ := tvProblem(t, n, 0.4, 0.02, 2)
	s, _ := NewTVSolver(op, n, n, BoundaryPeriodic)
	x := make([]complex128, n*n)
	opt := DefaultPDHGOptions()
	opt.MaxIter, opt.Tol = 5000, 1e-6
	first, err := s.Solve(x, y, 0.02, opt)
	if err != nil || !first.Converged {
		t.Fatalf("first solve: %+v, %v", first, err)
	}
	opt.WarmDual = true
	again, _ := s.Solve(x, y, 0.02, opt)
	if !again.Converged || again.Iterations != opt.GapEvery {
		t.Errorf("warm restart ran %d iterations (first solve %d): %+v", again.Iterations, first.Iterations, again)
	}
	cold := make([]complex128, n*n)
	rep, _ := s.Solve(cold, y, 0.02, PDHGOptions{MaxIter: 5000, ChangeTol: 1e-7})
	if !rep.Converged || rep.Change > 1e-7 {
		t.Errorf("change rule: %+v", rep)
	}
	if d := relDist(cold, x); d > 1e-4 {
		t.Errorf("change-rule solution differs from the gap-rule one by %.2e", d)
	}
}

func TestTVSolverSteps(t *testing.T) {
	const n = 16
	op, _, _ := tvProblem(t, n, 0.3, 0.01, 3)
	s, _ := NewTVSolver(op, n, n, BoundaryNeumann)
	// A masked orthonormal FFT has ‖E‖² = 1 (partial unitary).
	if e := s.OperatorNormSq(); math.Abs(e-1) > 1e-9 {
		t.Errorf("‖E‖² estimate %.12g, want 1", e)
	}
	tau, sigma := s.Steps()
	// Chambolle & Pock 2011, Theorem 1 needs τσ‖K‖² < 1; ‖K‖² ≤ ‖E‖² + 8.
	if k := tau * sigma * (1 + GradNormSqBound); !(k < 1) || k < 0.98 {
		t.Errorf("τσ(‖E‖²+8) = %.6f, want just below 1", k)
	}
}

func TestTVSolverRejects(t *testing.T) {
	const n = 8
	op, y, _ := tvProblem(t, n, 0.5, 0.01, 4)
	if _, err := NewTVSolver(op, n, n+1, BoundaryNeumann); err == nil || !strings.Contains(err.Error(), "72 values") {
		t.Errorf("grid mismatch: %v", err)
	}
	if _, err := NewTVSolver(nil, n, n, BoundaryNeumann); err == nil {
		t.Error("nil operator accepted")
	}
	s, _ := NewTVSolver(op, n, n, BoundaryNeumann)
	x := make([]complex128, n*n)
	cases := []struct {
		name   string
		x, y   []complex128
		lambda float64
		opt    PDHGOptions
		want   string
	}{
		{"negative λ", x, y, -0.1, DefaultPDHGOptions(), "λ"},
		{"NaN λ", x, y, math.NaN(), DefaultPDHGOptions(), "λ"},
		{"zero iterations", x, y, 0.1, PDHGOptions{Tol: 1e-4}, "iterations"},
		{"negative tolerance", x, y, 0.1, PDHGOptions{MaxIter: 5, Tol: -1}, "tolerance"},
		{"short data", x, y[1:], 0.1, DefaultPDHGOptions(), "samples"},
		{"short image", x[1:], y, 0.1, DefaultPDHGOptions(), "image"},
	}
	for _, c := range cases {
		if _, err := s.Solve(c.x, c.y, c.lambda, c.opt); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
}

func TestTVSolverAllocatesNothing(t *testing.T) {
	const n = 32
	op, y, _ := tvProblem(t, n, 0.3, 0.01, 5)
	s, _ := NewTVSolver(op, n, n, BoundaryNeumann)
	x := make([]complex128, n*n)
	opt := PDHGOptions{MaxIter: 20, Tol: 1e-9, GapEvery: 5}
	if a := testing.AllocsPerRun(3, func() { _, _ = s.Solve(x, y, 0.01, opt) }); a != 0 {
		t.Errorf("Solve allocates %v times", a)
	}
}

// BenchmarkTVSolverIteration256 measures one primal-dual iteration (one
// forward and one adjoint FFT, gradient, divergence, projection) on
// single-coil 256² Cartesian data, with the gap evaluated every 10
// iterations as by default and never.
func BenchmarkTVSolverIteration256(b *testing.B) {
	const n = 256
	op, y, _ := tvProblem(b, n, 0.25, 0.01, 6)
	s, err := NewTVSolver(op, n, n, BoundaryNeumann)
	if err != nil {
		b.Fatal(err)
	}
	for _, every := range []int{10, 0} {
		name := "gap-every-10"
		if every == 0 {
			name = "no-gap"
		}
		b.Run(name, func(b *testing.B) {
			x := make([]complex128, n*n)
			op.Adjoint(x, y)
			b.ResetTimer()
			if _, err := s.Solve(x, y, 0.005, PDHGOptions{MaxIter: b.N, GapEvery: every}); err != nil {
				b.Fatal(err)
			}
		})
	}
}

// nrmseTo returns ‖|x| − truth‖/‖truth‖.
func nrmseTo(x []complex128, truth []float64) float64 {
	var e2, t2 float64
	for i, v := range truth {
		d := math.Hypot(real(x[i]), imag(x[i])) - v
		e2 += d * d
		t2 += v * v
	}
	return math.Sqrt(e2 / t2)
}

// Reconstruct an undersampled 64² phantom scan with TV by primal-dual.
func ExampleTVSolver() {
	const n = 64
	truth := simulate.ModifiedSheppLogan().Rasterize(n, n)
	rng := rand.New(rand.NewPCG(1, 2))
	mask := make([]bool, n*n)
	for i := range mask {
		r, c := i/n-n/2, i%n-n/2
		mask[i] = rng.Float64() < 0.45 || (r*r+c*c < 36)
	}
	op, _ := simulate.NewCartesian(n, n, mask)
	y := make([]complex128, op.DataLen())
	x := make([]complex128, n*n)
	for i, v := range truth {
		x[i] = complex(v, 0)
	}
	op.Forward(y, x)
	simulate.AddNoise(y, 0.01, rng)

	op.Adjoint(x, y) // zero-filled start
	fmt.Printf("zero-filled NRMSE %.2f\n", nrmseTo(x, truth))
	s, _ := NewTVSolver(op, n, n, BoundaryNeumann)
	opt := DefaultPDHGOptions()
	opt.MaxIter = 3000
	rep, _ := s.Solve(x, y, 0.003, opt)
	fmt.Printf("TV NRMSE %.2f, converged %v\n", nrmseTo(x, truth), rep.Converged)
	// Output:
	// zero-filled NRMSE 0.42
	// TV NRMSE 0.06, converged true
}

// TestSymGradAdjoint checks ⟨ε(w), r⟩ = ⟨w, εᵀr⟩ in the inner product that
// counts the off-diagonal entry twice (definition of the adjoint), and that
// the backward differences are the negative adjoints of the forward ones.
func TestSymGradAdjoint(t *testing.T) {
	for _, sz := range [][2]int{{1, 4}, {5, 1}, {2, 3}, {7, 9}} {
		for _, b := range []Boundary{BoundaryNeumann, BoundaryPeriodic} {
			ny, nx := sz[0], sz[1]
			n := ny * nx
			op, _ := simulate.NewCartesian(ny, nx, allTrue(n))
			s, err := NewTGVSolver(op, ny, nx, b)
			if err != nil {
				t.Fatal(err)
			}
			w1, w2 := seededComplex(n, 1), seededComplex(n, 2)
			r11, r22, r12 := seededComplex(n, 3), seededComplex(n, 4), seededComplex(n, 5)
			s.sym(w1, w2)
			lhs := linRealDot(s.e11, r11) + linRealDot(s.e22, r22) + 2*linRealDot(s.e12, r12)
			o1, o2 := make([]complex128, n), make([]complex128, n)
			s.symAdj(o1, o2, r11, r22, r12)
			rhs := linRealDot(w1, o1) + linRealDot(w2, o2)
			if math.Abs(lhs-rhs) > 1e-12*float64(n) {
				t.Errorf("%v %v: ⟨εw, r⟩ = %.15g, ⟨w, εᵀr⟩ = %.15g", sz, b, lhs, rhs)
			}
			a, bx, f := seededComplex(n, 6), make([]complex128, n), make([]complex128, n)
			s.d.dxB(bx, w1)
			s.d.dxF(f, a)
			if d := linRealDot(bx, a) + linRealDot(w1, f); math.Abs(d) > 1e-12*float64(n) {
				t.Errorf("%v %v: ⟨∂x⁻w, a⟩ + ⟨w, ∂x⁺a⟩ = %.3g, want 0", sz, b, d)
			}
			s.d.dyB(bx, w1)
			s.d.dyF(f, a)
			if d := linRealDot(bx, a) + linRealDot(w1, f); math.Abs(d) > 1e-12*float64(n) {
				t.Errorf("%v %v: ⟨∂y⁻w, a⟩ + ⟨w, ∂y⁺a⟩ = %.3g, want 0", sz, b, d)
			}
		}
	}
}

// TestTGVOperatorNorm compares the power-iteration estimate of ‖K‖² with the
// largest singular value of K assembled densely on a small grid and
// factorised by gonum's SVD (real embedding, off-diagonal rows scaled by √2
// for the weighted norm).
func TestTGVOperatorNorm(t *testing.T) {
	const ny, nx = 4, 5
	const n = ny * nx
	mask := allTrue(n)
	mask[3], mask[11] = false, false
	op, _ := simulate.NewCartesian(ny, nx, mask)
	s, err := NewTGVSolver(op, ny, nx, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	m := op.DataLen()
	rows := m + 5*n
	k := mat.NewDense(2*rows, 6*n, nil)
	col := make([]complex128, rows)
	for j := 0; j < 3*n; j++ {
		for _, unit := range []complex128{1, 1i} {
			v := make([]complex128, 3*n)
			v[j] = unit
			x, w1, w2 := v[:n], v[n:2*n], v[2*n:]
			op.Forward(col[:m], x)
			s.d.grad(s.gx, s.gy, x)
			for i := 0; i < n; i++ {
				col[m+i] = s.gx[i] - w1[i]
				col[m+n+i] = s.gy[i] - w2[i]
			}
			s.sym(w1, w2)
			for i := 0; i < n; i++ {
				col[m+2*n+i] = s.e11[i]
				col[m+3*n+i] = s.e22[i]
				col[m+4*n+i] = complex(math.Sqrt2, 0) * s.e12[i]
			}
			c := j
			if unit == 1i {
				c = 3*n + j
			}
			for i, z := range col {
				k.Set(i, c, real(z))
				k.Set(rows+i, c, imag(z))
			}
		}
	}
	var svd mat.SVD
	if !svd.Factorize(k, mat.SVDNone) {
		t.Fatal("gonum SVD failed")
	}
	want := svd.Values(nil)[0]
	want *= want
	if got := s.OperatorNormSq(); math.Abs(got-want) > 1e-4*want || got > want*(1+1e-9) {
		t.Errorf("‖K‖² estimate %.10g, gonum SVD %.10g", got, want)
	}
}

// TestTGVSolver checks the TGV solver against what its definition implies
// and against TV: with α₀ = 0 the vector field w can follow ∇x at no cost, so
// on fully sampled data the solution is Eᴴy; the partial gap falls towards
// zero on an undersampled problem and bounds the objective's excess; and on
// a smoothly shaded object TGV, unlike TV, does not staircase, so its best
// error over a λ grid is lower (Bredies, Kunisch & Pock 2010, §5; Knoll et
// al. 2011).
func TestTGVSolver(t *testing.T) {
	const n = 32
	full, _ := simulate.NewCartesian(n, n, allTrue(n*n))
	y := seededComplex(n*n, 71)
	s, err := NewTGVSolver(full, n, n, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]complex128, n*n)
	if _, err := s.Solve(x, y, 0.1, 0, PDHGOptions{MaxIter: 2000}); err != nil {
		t.Fatal(err)
	}
	ehy := make([]complex128, n*n)
	full.Adjoint(ehy, y)
	if d := relDist(x, ehy); d > 1e-8 {
		t.Errorf("α₀ = 0: distance to Eᴴy %.2e after 2000 iterations", d)
	}

	op, yu, _ := tvProblem(t, n, 0.35, 0.02, 1)
	su, _ := NewTGVSolver(op, n, n, BoundaryNeumann)
	budgets := []int{100, 400, 1600}
	gaps, objs := make([]float64, 3), make([]float64, 3)
	for k, it := range budgets {
		x := make([]complex128, n*n)
		rep, err := su.Solve(x, yu, 0.01, 0.02, PDHGOptions{MaxIter: it, GapEvery: it})
		if err != nil {
			t.Fatal(err)
		}
		gaps[k], objs[k] = rep.Gap, rep.Objective
		t.Logf("%4d iterations: objective %.10f, gap %.2e", it, rep.Objective, rep.Gap)
	}
	for k := 1; k < 3; k++ {
		if !(gaps[k] < gaps[k-1]/4) {
			t.Errorf("gap %.2e after %d iterations did not fall fourfold from %.2e", gaps[k], budgets[k], gaps[k-1])
		}
	}
	if excess := objs[0] - objs[2]; excess > gaps[0] {
		t.Errorf("objective excess %.2e at %d iterations exceeds its gap %.2e", excess, budgets[0], gaps[0])
	}

	// Shaded object: a disc whose intensity ramps across it, plus noise.
	truth := make([]float64, n*n)
	noisy := make([]complex128, n*n)
	rng := rand.New(rand.NewPCG(81, 82))
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if math.Hypot(float64(i)-15.5, float64(j)-15.5) < 12 {
				truth[i*n+j] = 0.2 + 0.6*float64(j)/n
			}
			noisy[i*n+j] = complex(truth[i*n+j]+0.05*rng.NormFloat64(), 0)
		}
	}
	yd := make([]complex128, n*n)
	full.Forward(yd, noisy)
	tvs, _ := NewTVSolver(full, n, n, BoundaryNeumann)
	bestTV, bestTGV := math.Inf(1), math.Inf(1)
	opt := PDHGOptions{MaxIter: 1500, Tol: 1e-5, GapEvery: 20}
	for _, l := range []float64{0.02, 0.04, 0.08} {
		x := make([]complex128, n*n)
		full.Adjoint(x, yd)
		if _, err := tvs.Solve(x, yd, l, opt); err != nil {
			t.Fatal(err)
		}
		bestTV = math.Min(bestTV, nrmseTo(x, truth))
		full.Adjoint(x, yd)
		if _, err := s.Solve(x, yd, l, 2*l, opt); err != nil {
			t.Fatal(err)
		}
		bestTGV = math.Min(bestTGV, nrmseTo(x, truth))
	}
	t.Logf("shaded disc: best NRMSE TV %.4f, TGV (α₀ = 2α₁) %.4f", bestTV, bestTGV)
	if !(bestTGV < bestTV) {
		t.Errorf("TGV (%.4f) did not beat TV (%.4f) on a shaded object", bestTGV, bestTV)
	}
}

func TestTGVSolverRejectsAndAllocatesNothing(t *testing.T) {
	const n = 16
	op, y, _ := tvProblem(t, n, 0.4, 0.01, 8)
	if _, err := NewTGVSolver(op, n, n-1, BoundaryNeumann); err == nil {
		t.Error("grid mismatch accepted")
	}
	s, _ := NewTGVSolver(op, n, n, BoundaryPeriodic)
	x := make([]complex128, n*n)
	for _, a := range [][2]float64{{-1, 1}, {1, math.NaN()}, {math.Inf(1), 1}} {
		if _, err := s.Solve(x, y, a[0], a[1], DefaultPDHGOptions()); err == nil || !strings.Contains(err.Error(), "α") {
			t.Errorf("α = %v: %v", a, err)
		}
	}
	if _, err := s.Solve(x, y, 1, 1, PDHGOptions{}); err == nil {
		t.Error("zero iterations accepted")
	}
	opt := PDHGOptions{MaxIter: 10, Tol: 1e-12, GapEvery: 5}
	if a := testing.AllocsPerRun(3, func() { _, _ = s.Solve(x, y, 0.01, 0.02, opt) }); a != 0 {
		t.Errorf("Solve allocates %v times", a)
	}
}

// BenchmarkTGVSolverIteration256 measures one TGV primal-dual iteration on
// single-coil 256² Cartesian data (gap never evaluated).
func BenchmarkTGVSolverIteration256(b *testing.B) {
	const n = 256
	op, y, _ := tvProblem(b, n, 0.25, 0.01, 6)
	s, err := NewTGVSolver(op, n, n, BoundaryNeumann)
	if err != nil {
		b.Fatal(err)
	}
	x := make([]complex128, n*n)
	op.Adjoint(x, y)
	b.ResetTimer()
	if _, err := s.Solve(x, y, 0.005, 0.01, PDHGOptions{MaxIter: b.N}); err != nil {
		b.Fatal(err)
	}
}

// plainOperator hides every method of an operator beyond simulate.Operator,
// so that solvers take their general path (Forward and Adjoint only).
type plainOperator struct{ simulate.Operator }

// With a Cartesian operator (orthonormal rows, E·Eᴴ = I) the TV solver keeps
// its data dual as the image Eᴴq; the iterates, the gap and the objective
// must be those of the data-space iteration of Chambolle & Pock on the same
// operator seen as a plain Operator, to rounding, cold and warm.
func TestTVSolverImageDualMatchesDataDual(t *testing.T) {
	const n = 48
	op, y, _ := tvProblem(t, n, 0.35, 0.01, 11)
	fast, err := NewTVSolver(op, n, n, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	if fast.normal == nil {
		t.Fatal("the Cartesian operator did not take the image-dual path")
	}
	slow, err := NewTVSolver(plainOperator{op}, n, n, BoundaryNeumann)
	if err != nil {
		t.Fatal(err)
	}
	if slow.normal != nil {
		t.Fatal("a plain operator took the image-dual path")
	}
	xf, xs := ZeroFilled(op, y), ZeroFilled(op, y)
	for _, warm := range []bool{false, true} {
		opt := PDHGOptions{MaxIter: 60, GapEvery: 20, WarmDual: warm}
		rf, err := fast.Solve(xf, y, 0.01, opt)
		if err != nil {
			t.Fatal(err)
		}
		rs, err := slow.Solve(xs, y, 0.01, opt)
		if err != nil {
			t.Fatal(err)
		}
		var d2, x2 float64
		for i := range xf {
			d := xf[i] - xs[i]
			d2 += real(d)*real(d) + imag(d)*imag(d)
			x2 += real(xs[i])*real(xs[i]) + imag(xs[i])*imag(xs[i])
		}
		if e := math.Sqrt(d2 / x2); e > 1e-11 {
			t.Errorf("warm %v: iterates differ by %.3g (relative)", warm, e)
		}
		if math.Abs(rf.Gap-rs.Gap) > 1e-9*rs.Objective || math.Abs(rf.Objective-rs.Objective) > 1e-11*rs.Objective {
			t.Errorf("warm %v: gap %.12g / objective %.12g, data-space iteration %.12g / %.12g", warm, rf.Gap, rf.Objective, rs.Gap, rs.Objective)
		}
	}
}
