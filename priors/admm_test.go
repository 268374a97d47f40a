package priors

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"accelplan/simulate"
)

// TestADMMTikhonovClosedForm: with fully sampled Cartesian data (E unitary)
// and the prior ½‖x‖², the minimiser of ½‖E x − y‖² + λ·½‖x‖² is
// Eᴴy/(1+λ) (normal equations; textbook).
func TestADMMTikhonovClosedForm(t *testing.T) {
	const ny, nx = 16, 20
	op, _ := simulate.NewCartesian(ny, nx, allTrue(ny*nx))
	reg, _ := NewTikhonov(TikhonovIdentity, ny, nx, BoundaryNeumann)
	a, err := NewADMM(op, reg)
	if err != nil {
		t.Fatal(err)
	}
	y := seededComplex(ny*nx, 61)
	want := make([]complex128, ny*nx)
	op.Adjoint(want, y)
	const lambda = 0.8
	linScale(want, 1/(1+lambda))
	for _, adaptive := range []bool{false, true} {
		x := make([]complex128, ny*nx)
		opt := DefaultADMMOptions()
		opt.Adaptive, opt.AbsTol, opt.RelTol, opt.MaxIter = adaptive, 1e-12, 1e-10, 500
		opt.CG.Tol = 1e-13
		rep, err := a.Solve(x, y, lambda, opt)
		if err != nil {
			t.Fatal(err)
		}
		if d := relDist(x, want); !rep.Converged || d > 1e-8 {
			t.Errorf("adaptive=%v: %+v, relative distance to Eᴴy/(1+λ) %.2e", adaptive, rep, d)
		}
	}
}

// TestADMMTVMatchesSkimage: ADMM with the TV prior (its prox by FGP) on fully
// sampled data is ROF denoising, compared with scikit-image 0.19.3
// denoise_tv_chambolle (weight = λ; mapping in TestTVProxNoWorseThanSkimage).
func TestADMMTVMatchesSkimage(t *testing.T) {
	f := loadTVFixture(t)
	op, _ := simulate.NewCartesian(f.Ny, f.Nx, allTrue(f.Ny*f.Nx))
	noisy := realToComplex(f.Noisy)
	y := make([]complex128, op.DataLen())
	op.Forward(y, noisy)
	tv, _ := NewTV(f.Ny, f.Nx, BoundaryNeumann)
	tv.Tol = 1e-6
	a, _ := NewADMM(op, tv)
	for _, c := range f.Cases {
		tv.Reset()
		x := make([]complex128, len(noisy))
		op.Adjoint(x, y)
		opt := DefaultADMMOptions()
		opt.Rho = 1 // EᴴE = I here: ρ of the order of the data term's curvature
		rep, err := a.Solve(x, y, c.Weight, opt)
		if err != nil {
			t.Fatal(err)
		}
		ours := rofObjective(tv, x, noisy, c.Weight)
		def := rofObjective(tv, realToComplex(c.Default), noisy, c.Weight)
		tight := rofObjective(tv, realToComplex(c.Tight), noisy, c.Weight)
		t.Logf("w=%.2f: ADMM %.10f (%+v), skimage default %.10f, tight %.10f", c.Weight, ours, rep, def, tight)
		if !rep.Converged || ours > def || ours > tight*(1+1e-6) {
			t.Errorf("w=%.2f: ADMM objective %.12g against skimage %.12g (default), %.12g (tight); %+v", c.Weight, ours, def, tight, rep)
		}
	}
}

// TestADMMAgreesWithOtherSolvers: on an undersampled problem, ADMM must reach
// the minimum that other published methods reach on the same convex
// objective: CG on the normal equations for the gradient Tikhonov prior, and
// the primal-dual method (whose certified gap bounds its own excess) for TV.
func TestADMMAgreesWithOtherSolvers(t *testing.T) {
	const n = 32
	op, y, _ := tvProblem(t, n, 0.35, 0.02, 1)

	reg, _ := NewTikhonov(TikhonovGradient, n, n, BoundaryNeumann)
	cg, _ := NewTikhonovSolver(op, reg, 0.3)
	want := make([]complex128, n*n)
	if _, err := cg.Solve(want, y, CGOptions{MaxIter: 1000, Tol: 1e-12}); err != nil {
		t.Fatal(err)
	}
	a, _ := NewADMM(op, reg)
	x := make([]complex128, n*n)
	opt := DefaultADMMOptions()
	opt.AbsTol, opt.RelTol, opt.MaxIter = 1e-10, 1e-8, 1000
	opt.CG.Tol = 1e-12
	rep, err := a.Solve(x, y, 0.3, opt)
	if err != nil {
		t.Fatal(err)
	}
	if d := relDist(x, want); !rep.Converged || d > 1e-6 {
		t.Errorf("gradient Tikhonov: ADMM %+v, relative distance to CG %.2e", rep, d)
	}

	const lambda = 0.01
	pd, _ := NewTVSolver(op, n, n, BoundaryNeumann)
	xp := make([]complex128, n*n)
	prep, _ := pd.Solve(xp, y, lambda, PDHGOptions{MaxIter: 5000, Tol: 1e-9, GapEvery: 10})
	tv, _ := NewTV(n, n, BoundaryNeumann)
	tv.Tol = 1e-6
	at, _ := NewADMM(op, tv)
	xa := make([]complex128, n*n)
	arep, err := at.Solve(xa, y, lambda, DefaultADMMOptions())
	if err != nil {
		t.Fatal(err)
	}
	fp := cgObjectiveTV(op, tv, xp, y, lambda)
	fa := cgObjectiveTV(op, tv, xa, y, lambda)
	t.Logf("TV: primal-dual %.12f (gap %.1e, %d iterations), ADMM %.12f (%+v)", fp, prep.Gap, prep.Iterations, fa, arep)
	// The inner prox is solved to a relative gap of 1e-6, which limits how
	// close ADMM can come: allow 1e-6 of the objective.
	if !arep.Converged || fa > fp+prep.Gap+1e-6*fp {
		t.Errorf("TV: ADMM objective %.12g exceeds the certified primal-dual value %.12g + gap %.1e by more than 1e-6", fa, fp, prep.Gap)
	}
	if d := relDist(xa, xp); d > 1e-3 {
		t.Errorf("TV: images differ by %.2e relative", d)
	}
}

// cgObjectiveTV returns ½‖E x − y‖² + λ·TV(x).
func cgObjectiveTV(op simulate.Operator, tv *TV, x, y []complex128, lambda float64) float64 {
	d := make([]complex128, op.DataLen())
	op.Forward(d, x)
	return 0.5*linSqDist(d, y) + lambda*tv.Value(x)
}

func TestADMMRejects(t *testing.T) {
	op, _ := simulate.NewCartesian(4, 4, allTrue(16))
	reg, _ := NewTikhonov(TikhonovIdentity, 4, 4, BoundaryNeumann)
	if _, err := NewADMM(nil, reg); err == nil {
		t.Error("nil operator accepted")
	}
	if _, err := NewADMM(op, nil); err == nil {
		t.Error("nil prior accepted")
	}
	a, _ := NewADMM(op, reg)
	x, y := make([]complex128, 16), make([]complex128, 16)
	bad := func(f func(*ADMMOptions)) ADMMOptions { o := DefaultADMMOptions(); f(&o); return o }
	cases := []struct {
		name   string
		lambda float64
		opt    ADMMOptions
		want   string
	}{
		{"negative λ", -1, DefaultADMMOptions(), "λ"},
		{"infinite λ", math.Inf(1), DefaultADMMOptions(), "λ"},
		{"zero iterations", 1, bad(func(o *ADMMOptions) { o.MaxIter = 0 }), "iterations"},
		{"zero ρ", 1, bad(func(o *ADMMOptions) { o.Rho = 0 }), "ρ"},
		{"negative tolerance", 1, bad(func(o *ADMMOptions) { o.RelTol = -1 }), "tolerances"},
		{"inner CG without iterations", 1, bad(func(o *ADMMOptions) { o.CG.MaxIter = 0 }), "conjugate gradients"},
	}
	for _, c := range cases {
		if _, err := a.Solve(x, y, c.lambda, c.opt); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
	if _, err := a.Solve(x, y[1:], 1, DefaultADMMOptions()); err == nil {
		t.Error("short data accepted")
	}
}

func TestADMMAllocatesNothing(t *testing.T) {
	const n = 32
	op, y, _ := tvProblem(t, n, 0.3, 0.01, 7)
	tv, _ := NewTV(n, n, BoundaryNeumann)
	tv.MaxIter = 20
	a, _ := NewADMM(op, tv)
	x := make([]complex128, n*n)
	opt := DefaultADMMOptions()
	opt.MaxIter = 5
	if al := testing.AllocsPerRun(3, func() { _, _ = a.Solve(x, y, 0.01, opt) }); al != 0 {
		t.Errorf("Solve allocates %v times", al)
	}
}

// ADMM with the TV prior (its proximal map inside) on undersampled data.
func ExampleADMM() {
	const n = 32
	op, y, truth := tvProblem(nil, n, 0.45, 0.01, 9)
	tv, _ := NewTV(n, n, BoundaryNeumann)
	a, _ := NewADMM(op, tv)
	x := make([]complex128, n*n)
	op.Adjoint(x, y)
	fmt.Printf("zero-filled NRMSE %.2f\n", nrmseTo(x, truth))
	rep, _ := a.Solve(x, y, 0.003, DefaultADMMOptions())
	fmt.Printf("ADMM-TV NRMSE %.2f, converged %v\n", nrmseTo(x, truth), rep.Converged)
	// Output:
	// zero-filled NRMSE 0.43
	// ADMM-TV NRMSE 0.18, converged true
}
