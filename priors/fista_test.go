package priors

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"accelplan/priors/wavelet"
	"accelplan/simulate"
)

func fullMask(n int) []bool {
	m := make([]bool, n)
	for i := range m {
		m[i] = true
	}
	return m
}

// With λ = 0 and a fully sampled orthonormal DFT, ½‖E x − y‖² is minimised by
// x = E^H y (E is unitary; linear algebra, common practice). From a zero
// warm start FISTA must get there; from its default start it is there.
func TestFISTALambdaZeroFullySampledIsAdjoint(t *testing.T) {
	const ny, nx = 16, 16
	n := ny * nx
	ops := []struct {
		name string
		op   simulate.Operator
	}{
		{"gonum-based DFT", newMaskedDFT(ny, nx, fullMask(n))},
	}
	if c, err := simulate.NewCartesian(ny, nx, fullMask(n)); err == nil {
		ops = append(ops, struct {
			name string
			op   simulate.Operator
		}{"simulate.Cartesian", c})
	} else {
		t.Fatalf("simulate.NewCartesian: %v", err)
	}
	for _, o := range ops {
		y := randVec(n, 21)
		want := ZeroFilled(o.op, y)
		x, info, err := FISTA(o.op, y, nil, 0, FISTAOptions{X0: make([]complex128, n), MaxIter: 60})
		if err != nil {
			t.Fatal(err)
		}
		if d := maxDiff(x, want); d > 1e-10 {
			t.Errorf("%s, zero start: FISTA λ=0 differs from E^H y by %.3g after %d iterations", o.name, d, info.Iterations)
		}
		if math.Abs(info.Step*1.01-1) > 1e-6 {
			t.Errorf("%s: step %.9f, want 1/(1.01·‖E‖²) with ‖E‖² = 1", o.name, info.Step)
		}
		if info.Objective > 1e-18 {
			t.Errorf("%s: final objective %.3g, want 0", o.name, info.Objective)
		}
		x, _, err = FISTA(o.op, y, nil, 0, FISTAOptions{Step: 1, MaxIter: 3})
		if err != nil {
			t.Fatal(err)
		}
		if d := maxDiff(x, want); d > 1e-12 {
			t.Errorf("%s, default start: differs from E^H y by %.3g", o.name, d)
		}
	}
}

// objectiveTrace runs FISTA and records F(x_k) for k = 1 … iters.
func objectiveTrace(t *testing.T, op simulate.Operator, y []complex128, prior Prior, lambda float64, opt FISTAOptions) ([]float64, []complex128) {
	t.Helper()
	var trace []float64
	opt.Monitor = func(k int, x []complex128) bool {
		trace = append(trace, Objective(op, y, prior, lambda, x))
		return true
	}
	x, info, err := FISTA(op, y, prior, lambda, opt)
	if err != nil {
		t.Fatal(err)
	}
	if info.Iterations != len(trace) {
		t.Fatalf("monitor saw %d iterations, info says %d", len(trace), info.Iterations)
	}
	return trace, x
}

// checkRate asserts Beck & Teboulle (SIAM J Imaging Sci 2009), Theorem 4.4:
// F(x_k) − F(x*) ≤ 2L‖x_0 − x*‖²/(k+1)² for every k.
func checkRate(t *testing.T, what string, trace []float64, fStar, L, dist2 float64) {
	t.Helper()
	for i, f := range trace {
		k := float64(i + 1)
		bound := 2 * L * dist2 / ((k + 1) * (k + 1))
		if gap := f - fStar; gap > bound*(1+1e-9)+1e-12 {
			t.Errorf("%s: k=%d gap %.6g exceeds the O(1/k²) bound %.6g", what, i+1, gap, bound)
			return
		}
	}
}

// A smooth, ill-conditioned least-squares problem with known minimiser:
// E = diag(d), d ∈ [0.03, 1], y = E x*, so F* = 0.
func TestFISTARateQuadratic(t *testing.T) {
	const n = 400
	r := rand.New(rand.NewPCG(1, 2))
	d := make([]float64, n)
	for i := range d {
		d[i] = 0.03 + 0.97*r.Float64()
	}
	d[0] = 1 // L = 1 exactly
	op := diagOp{d}
	xStar := randVec(n, 3)
	y := make([]complex128, n)
	op.Forward(y, xStar)
	x0 := make([]complex128, n)
	trace, x := objectiveTrace(t, op, y, nil, 0, FISTAOptions{X0: x0, Step: 1, MaxIter: 400})
	dist2 := math.Pow(norm2(xStar), 2)
	checkRate(t, "diag quadratic", trace, 0, 1, dist2)
	// Acceleration: the plain gradient iteration (ISTA) from x0 = 0 with step
	// 1 has x_k = (1 − (1 − d²)^k)·x* in closed form, hence the gap
	// Σ ½d²(1 − d²)^{2k}|x*|²; FISTA must beat it by far.
	for _, k := range []int{50, 100, 200, 400} {
		var ista float64
		for i := range d {
			a := d[i] * d[i]
			ista += 0.5 * a * math.Pow(1-a, 2*float64(k)) * math.Pow(cmplx.Abs(xStar[i]), 2)
		}
		if trace[k-1] > ista/10 {
			t.Errorf("k=%d: FISTA gap %.3g not below a tenth of the gradient method's %.3g", k, trace[k-1], ista)
		}
	}
	if trace[len(trace)-1] > 1e-6*trace[0] {
		t.Errorf("objective only fell from %.3g to %.3g", trace[0], trace[len(trace)-1])
	}
	// Components with d ≥ 0.5 converge fast (contraction of the gradient
	// step); the slow ones are what the objective bound is about.
	var worst float64
	for i := range x {
		if d[i] >= 0.5 {
			worst = math.Max(worst, math.Hypot(real(x[i]-xStar[i]), imag(x[i]-xStar[i])))
		}
	}
	if worst > 1e-8 {
		t.Errorf("well-conditioned components off x* by %.3g after 400 iterations", worst)
	}
}

// A nonsmooth problem with a closed-form minimiser: E = diag(d)·W with W an
// orthonormal wavelet transform and R the wavelet L1 prior. In coefficients
// c = W x the objective separates into ½d²|c − y/d|² + λ|c| on the details,
// whose minimiser is soft(y/d, λ/d²), and ½d²|c − y/d|² on the
// approximation (minimiser y/d).
func TestFISTARateWaveletL1ClosedForm(t *testing.T) {
	const ny, nx, levels = 32, 32, 2
	prior, err := NewWaveletL1(ny, nx, levels, "db3")
	if err != nil {
		t.Fatal(err)
	}
	w, err := wavelet.New(ny, nx, levels, "db3")
	if err != nil {
		t.Fatal(err)
	}
	n := ny * nx
	r := rand.New(rand.NewPCG(5, 6))
	d := make([]float64, n)
	for i := range d {
		d[i] = 0.2 + 0.8*r.Float64()
	}
	d[7] = 1
	op := &diagWaveletOp{w: w, d: d, buf: make([]complex128, n)}
	y := randVec(n, 8)
	const lambda = 0.4
	cStar := make([]complex128, n)
	zeros := 0
	for i := range cStar {
		v := y[i] / complex(d[i], 0)
		if w.IsApprox(i) {
			cStar[i] = v
		} else {
			cStar[i] = closedFormSoft(v, lambda/(d[i]*d[i]))
			if cStar[i] == 0 {
				zeros++
			}
		}
	}
	if zeros < n/10 {
		t.Fatalf("only %d coefficients are zero at the minimiser; the problem is too smooth to test the prox", zeros)
	}
	xStar := make([]complex128, n)
	w.Inverse(xStar, cStar)
	fStar := Objective(op, y, prior, lambda, xStar)
	x0 := make([]complex128, n)
	trace, x := objectiveTrace(t, op, y, prior, lambda, FISTAOptions{X0: x0, Step: 1, MaxIter: 400})
	checkRate(t, "diag·W with wavelet L1", trace, fStar, 1, math.Pow(norm2(xStar), 2))
	for i, f := range trace {
		if f < fStar-1e-9 {
			t.Fatalf("k=%d objective %.12g below the closed-form minimum %.12g", i+1, f, fStar)
		}
	}
	if e := maxDiff(x, xStar); e > 1e-6 {
		t.Errorf("x after 400 iterations off the closed-form minimiser by %.3g", e)
	}
}

// fistaFixture mirrors testdata/fista_fixture.json (NumPy 1.24 + PyWavelets
// 1.1, see testdata/make_fista_fixture.py).
type fistaFixture struct {
	Generator      string
	Ny, Nx, Levels int
	Wavelet        string
	Lambda         float64
	Iterations     int
	Mask           []int
	YRe            []float64 `json:"y_re"`
	YIm            []float64 `json:"y_im"`
	XRe            []float64 `json:"x_re"`
	XIm            []float64 `json:"x_im"`
	Objective      []float64
}

// The same FISTA run written independently with numpy.fft and PyWavelets
// (step 1, start at the zero-filled image) gives the same iterates.
func TestFISTAAgainstNumpyPyWavelets(t *testing.T) {
	b, err := os.ReadFile("testdata/fista_fixture.json")
	if err != nil {
		t.Fatal(err)
	}
	var f fistaFixture
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(f.Generator, "PyWavelets") {
		t.Fatalf("fixture generator %q", f.Generator)
	}
	mask := make([]bool, len(f.Mask))
	for i, v := range f.Mask {
		mask[i] = v != 0
	}
	op := newMaskedDFT(f.Ny, f.Nx, mask)
	y := make([]complex128, len(f.YRe))
	for i := range y {
		y[i] = complex(f.YRe[i], f.YIm[i])
	}
	prior, err := NewWaveletL1(f.Ny, f.Nx, f.Levels, f.Wavelet)
	if err != nil {
		t.Fatal(err)
	}
	trace, x := objectiveTrace(t, op, y, prior, f.Lambda, FISTAOptions{Step: 1, MaxIter: f.Iterations})
	if len(trace) != len(f.Objective) {
		t.Fatalf("%d iterations, fixture %d", len(trace), len(f.Objective))
	}
	for k := range trace {
		if d := math.Abs(trace[k] - f.Objective[k]); d > 1e-10*f.Objective[k] {
			t.Errorf("iteration %d: objective %.15g, numpy/pywt %.15g", k+1, trace[k], f.Objective[k])
		}
	}
	var worst float64
	for i := range x {
		worst = math.Max(worst, math.Hypot(real(x[i])-f.XRe[i], imag(x[i])-f.XIm[i]))
	}
	if worst > 1e-10 {
		t.Errorf("final image differs from numpy/pywt by %.3g", worst)
	}
	// The run is not trivial: the prior moved the image away from zero filling.
	if d := maxDiff(x, ZeroFilled(op, y)); d < 1e-2 {
		t.Errorf("result equals the zero-filled image (%.3g); the fixture tests nothing", d)
	}
}

func TestEstimateNormSq(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	d := make([]float64, 300)
	for i := range d {
		d[i] = r.Float64()
	}
	d[17] = 1.7
	got := EstimateNormSq(diagOp{d}, 500, 1e-12)
	if math.Abs(got-1.7*1.7) > 1e-6 {
		t.Errorf("diag: ‖E‖² estimate %.9f, want 2.89 (max d²)", got)
	}
	if got > 1.7*1.7*(1+1e-12) {
		t.Errorf("diag: Rayleigh quotient %.15g above λ_max", got)
	}
	// A masked orthonormal DFT is a partial isometry: ‖E‖ = 1.
	op := newMaskedDFT(16, 24, randMask(16*24, 0.3, 5))
	if got := EstimateNormSq(op, 50, 1e-10); math.Abs(got-1) > 1e-9 {
		t.Errorf("masked DFT: ‖E‖² estimate %.12f, want 1", got)
	}
}

func TestFISTAToleranceAndMonitor(t *testing.T) {
	const ny, nx = 16, 16
	op := newMaskedDFT(ny, nx, randMask(ny*nx, 0.5, 7))
	prior, err := NewWaveletL1(ny, nx, 2, "db2")
	if err != nil {
		t.Fatal(err)
	}
	y := randVec(op.DataLen(), 8)
	_, info, err := FISTA(op, y, prior, 0.05, FISTAOptions{Tol: 1e-4, MaxIter: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if !info.Converged || info.Iterations >= 1000 || info.RelChange > 1e-4 {
		t.Errorf("tolerance did not stop the run: %+v", info)
	}
	calls := 0
	_, info, err = FISTA(op, y, prior, 0.05, FISTAOptions{MaxIter: 50, Monitor: func(k int, x []complex128) bool {
		calls++
		return k < 7
	}})
	if err != nil {
		t.Fatal(err)
	}
	if !info.Stopped || info.Iterations != 7 || calls != 7 {
		t.Errorf("monitor stop: %+v after %d calls, want 7 iterations", info, calls)
	}
	// The objective reported equals the one computed from the result.
	x, info, err := FISTA(op, y, prior, 0.05, FISTAOptions{MaxIter: 20})
	if err != nil {
		t.Fatal(err)
	}
	if want := Objective(op, y, prior, 0.05, x); math.Abs(info.Objective-want) > 1e-12*want {
		t.Errorf("info.Objective %.15g, recomputed %.15g", info.Objective, want)
	}
}

// No allocation inside the loop: the allocation count of a run does not
// depend on the number of iterations.
func TestFISTANoAllocationPerIteration(t *testing.T) {
	const ny, nx = 32, 32
	op, err := simulate.NewCartesian(ny, nx, randMask(ny*nx, 0.4, 1))
	if err != nil {
		t.Fatal(err)
	}
	prior, err := NewWaveletL1(ny, nx, 2, "db4")
	if err != nil {
		t.Fatal(err)
	}
	y := randVec(op.DataLen(), 2)
	run := func(iters int) float64 {
		return testing.AllocsPerRun(3, func() {
			if _, _, err := FISTA(op, y, prior, 0.01, FISTAOptions{Step: 1, MaxIter: iters}); err != nil {
				t.Fatal(err)
			}
		})
	}
	a2, a40 := run(2), run(40)
	if a40 != a2 {
		t.Errorf("FISTA allocates %.0f times for 2 iterations and %.0f for 40", a2, a40)
	}
}

func TestFISTAErrors(t *testing.T) {
	op := newMaskedDFT(8, 8, fullMask(64))
	prior, _ := NewWaveletL1(8, 8, 1, "haar")
	y := make([]complex128, 64)
	cases := []struct {
		name   string
		op     simulate.Operator
		y      []complex128
		prior  Prior
		lambda float64
		opt    FISTAOptions
		want   string
	}{
		{"nil operator", nil, y, prior, 0.1, FISTAOptions{}, "operator"},
		{"short data", op, y[:10], prior, 0.1, FISTAOptions{}, "samples"},
		{"negative λ", op, y, prior, -1, FISTAOptions{}, "λ"},
		{"NaN λ", op, y, prior, math.NaN(), FISTAOptions{}, "λ"},
		{"λ without prior", op, y, nil, 0.1, FISTAOptions{}, "needs a prior"},
		{"negative iterations", op, y, prior, 0.1, FISTAOptions{MaxIter: -1}, "negative"},
		{"negative tolerance", op, y, prior, 0.1, FISTAOptions{Tol: -1}, "tolerance"},
		{"negative step", op, y, prior, 0.1, FISTAOptions{Step: -1}, "step"},
		{"infinite step", op, y, prior, 0.1, FISTAOptions{Step: math.Inf(1)}, "step"},
		{"short warm start", op, y, prior, 0.1, FISTAOptions{X0: make([]complex128, 3)}, "warm start"},
		{"zero operator", diagOp{make([]float64, 64)}, y, prior, 0.1, FISTAOptions{}, "estimate"},
	}
	for _, c := range cases {
		_, _, err := FISTA(c.op, c.y, c.prior, c.lambda, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

func TestRelativeLambda(t *testing.T) {
	zf := []complex128{1, -3 + 4i, 0.5i}
	if got := RelativeLambda(0.01, zf); math.Abs(got-0.05) > 1e-15 {
		t.Errorf("RelativeLambda = %g, want 0.01·|−3+4i| = 0.05", got)
	}
	if MaxAbs(nil) != 0 {
		t.Error("MaxAbs(nil) ≠ 0")
	}
}
