package plans

import (
	"context"
	"math"
	"math/rand/v2"

	"accelplan/priors"
	"accelplan/simulate/nufft"
	"reflect"
	"strings"
	"testing"
)

// smallPlan is a fast plan with both schemes and both methods.
const smallPlan = `title = "small"
seed = 99
repeats = 2

[object]
phase_lines = 64
readout_points = 64
fov_mm = 200

[scanner]
tr_ms = 500
reference_snr = 40

[[scheme]]
pattern = "cartesian-uniform"
accelerations = [1, 2]
calibration_lines = 8

[[scheme]]
pattern = "cartesian-random"
accelerations = [2, 3]
calibration_lines = 8

[[recon]]
method = "zero-filled"

[[recon]]
method = "fista-wavelet"
wavelet = "db2"
levels = 3
iterations = 15

[accept]
metric = "ssim"
threshold = 0.5
`

func runSmall(t *testing.T, workers int) *Outcome {
	t.Helper()
	p, err := Parse("small.toml", []byte(smallPlan))
	if err != nil {
		t.Fatal(err)
	}
	o, err := Run(context.Background(), p, Options{Workers: workers})
	if err != nil {
		t.Fatal(err)
	}
	return o
}

// Every draw is seeded from the plan and the point, and results land in
// fixed slots, so the worker count cannot change any number.
func TestRunIndependentOfWorkers(t *testing.T) {
	a := runSmall(t, 1)
	b := runSmall(t, 3)
	strip := func(o *Outcome) []Result {
		r := append([]Result(nil), o.Results...)
		for i := range r {
			r[i].Seconds = 0
		}
		return r
	}
	if !reflect.DeepEqual(strip(a), strip(b)) {
		t.Fatal("results differ between 1 and 3 workers")
	}
	if !reflect.DeepEqual(a.Tunings, b.Tunings) || !reflect.DeepEqual(a.Images, b.Images) {
		t.Fatal("tunings or images differ between 1 and 3 workers")
	}
}

func TestRunProducesSensibleQuality(t *testing.T) {
	o := runSmall(t, 2)
	an := Analyse(o)
	if len(an.Rows) != 4*2 {
		t.Fatalf("%d rows, want 8", len(an.Rows))
	}
	for _, r := range an.Rows {
		if !(r.SSIM.Mean > 0 && r.SSIM.Mean <= 1) || !(r.NRMSE.Mean > 0) || r.SSIM.N != 2 {
			t.Errorf("implausible row %+v", r)
		}
		if strings.Contains(r.Method, "fista") && r.LambdaRule == "" {
			t.Errorf("row %s/%s does not say how λ was chosen", r.Scheme, r.Method)
		}
	}
	// Fully sampled zero-filled is the unitary inverse: its NRMSE is set
	// by noise alone and must beat every undersampled zero-filled point.
	var full float64
	for _, r := range an.Rows {
		if r.R == 1 && r.Method == "zero-filled" {
			full = r.NRMSE.Mean
		}
	}
	for _, r := range an.Rows {
		if r.R > 1 && r.Method == "zero-filled" && r.NRMSE.Mean <= full {
			t.Errorf("R = %.2f zero-filled NRMSE %.4f not worse than fully sampled %.4f", r.R, r.NRMSE.Mean, full)
		}
	}
}

func TestRecommendationPicksShortestPassing(t *testing.T) {
	mk := func(time, lower float64) Row {
		return Row{ScanTime: time, SSIM: Summary{N: 3, Mean: lower + 0.01, Lower: lower}}
	}
	a := &Analysis{Metric: MetricSSIM, Threshold: 0.9}
	a.Rows = []Row{mk(60, 0.95), mk(30, 0.91), mk(20, 0.89), mk(40, 0.97)}
	for i := range a.Rows {
		a.Rows[i].Meets = meets(a.Rows[i].Bound(MetricSSIM), 0.9, MetricSSIM)
	}
	idx := []int{0, 1, 2, 3}
	sortByTime(idx, a.Rows)
	if got := a.pick(idx); got != 1 {
		t.Errorf("picked row %d, want 1 (30 s, bound 0.91)", got)
	}
	a.Threshold = 0.99
	for i := range a.Rows {
		a.Rows[i].Meets = meets(a.Rows[i].Bound(MetricSSIM), 0.99, MetricSSIM)
	}
	if got := a.pick(idx); got != -1 {
		t.Errorf("picked row %d though none meets 0.99", got)
	}
}

// newTestWorker builds a worker for plan text, as the runner does.
func newTestWorker(t *testing.T, text string) (*workerState, *Plan) {
	t.Helper()
	p, err := Parse("t.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	cands, err := Candidates(p)
	if err != nil {
		t.Fatal(err)
	}
	w, err := soloWorker(&Outcome{Plan: p, Candidates: cands})
	if err != nil {
		t.Fatal(err)
	}
	return w, p
}

// The discrepancy principle (Morozov; Engl, Hanke & Neubauer 1996) picks the
// λ whose residual ‖Ex − y‖² equals the expected noise energy 2σ²m.
func TestDiscrepancyRuleMeetsNoiseLevel(t *testing.T) {
	text := strings.Replace(smallPlan, "iterations = 15", "iterations = 40\nlambda_rule = \"discrepancy\"", 1)
	w, _ := newTestWorker(t, text)
	enc, y, _, err := w.draw(2, "test")
	if err != nil {
		t.Fatal(err)
	}
	lambda, err := w.discrepancy(1, enc, y)
	if err != nil {
		t.Fatal(err)
	}
	img, _, err := w.reconstruct(1, enc, y, lambda)
	if err != nil {
		t.Fatal(err)
	}
	r := make([]complex128, len(y))
	enc.op.Forward(r, img)
	var res float64
	for i := range r {
		d := r[i] - y[i]
		res += real(d)*real(d) + imag(d)*imag(d)
	}
	target := 2 * w.env.out.Sigma * w.env.out.Sigma * float64(len(y))
	if math.Abs(res/target-1) > 0.05 {
		t.Errorf("residual %.4g against the noise energy %.4g (λ = %.3g)", res, target, lambda)
	}
}

// The universal threshold is σ√(2 ln n) (Donoho & Johnstone 1994), here
// expressed relative to the adjoint image's peak.
func TestUniversalRule(t *testing.T) {
	text := strings.Replace(smallPlan, "iterations = 15", "iterations = 15\nlambda_rule = \"universal\"", 1)
	w, p := newTestWorker(t, text)
	enc, y, _, err := w.draw(0, "test")
	if err != nil {
		t.Fatal(err)
	}
	rel := w.universal(1, enc, y)
	zf := make([]complex128, enc.op.ImageLen())
	enc.op.Adjoint(zf, y)
	n := float64(p.Object.PhaseLines * p.Object.ReadoutPoints)
	want := w.env.out.Sigma * math.Sqrt(2*math.Log(n))
	if got := rel * priors.MaxAbs(zf); math.Abs(got/want-1) > 1e-12 {
		t.Errorf("absolute threshold %v, want σ√(2 ln n) = %v", got, want)
	}
}

func TestOracleIsLabelled(t *testing.T) {
	text := strings.Replace(smallPlan, "iterations = 15", "iterations = 15\nlambda_rule = \"oracle\"", 1)
	p, err := Parse("t.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(p.Recons[1].Label, "oracle") {
		t.Errorf("an oracle method is labelled %q", p.Recons[1].Label)
	}
	bad := strings.Replace(smallPlan, `method = "zero-filled"`, "method = \"zero-filled\"\nlambda_rule = \"universal\"", 1)
	if _, err := Parse("t.toml", []byte(bad)); err == nil || !strings.Contains(err.Error(), "lambda") {
		t.Errorf("universal threshold on zero-filled accepted: %v", err)
	}
}

// Off the grid, Tikhonov by CG runs on the Toeplitz embedding of EᴴE
// (Fessler et al. 2005). Its normal operator must equal Eᴴ(E·) of a NUFFT pair
// as accurate as the Toeplitz kernel (width 8: 8e-8 against the exact sum in
// the nufft tests), and the reconstruction it gives must score like the one
// solved with the pair (the CG stopping rule, 1e-6 relative residual, leaves
// differences of the order of the system's condition number × 1e-6).
func TestTikhonovToeplitz(t *testing.T) {
	text := `title = "t"
seed = 3
[object]
phase_lines = 48
readout_points = 48
fov_mm = 200
[scanner]
tr_ms = 5
reference_snr = 30
[[scheme]]
pattern = "radial"
accelerations = [2]
[[recon]]
method = "tikhonov-cg"
lambda = 0.05
iterations = 200
[accept]
threshold = 0.5
`
	w, _ := newTestWorker(t, text)
	enc, y, _, err := w.draw(0, "test")
	if err != nil {
		t.Fatal(err)
	}
	if enc.toeplitz == nil {
		t.Fatal("no Toeplitz operator for a non-Cartesian Tikhonov plan")
	}
	smp := w.env.out.Candidates[0].Sampling
	kx, ky := splitK(smp.K)
	exact, err := nufft.New(48, 48, kx, ky, nufft.Options{Width: 8})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(7, 7))
	x := make([]complex128, 48*48)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	tx := make([]complex128, len(x))
	enc.toeplitz.Apply(tx, x)
	ex := make([]complex128, exact.DataLen())
	exact.Forward(ex, x)
	ehex := make([]complex128, len(x))
	exact.Adjoint(ehex, ex)
	if r := relDiff(tx, ehex); r > 1e-6 {
		t.Errorf("Toeplitz EᴴE differs from the width-8 NUFFT pair by %.2e relative", r)
	}
	img, _, err := w.reconstruct(0, enc, y, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	w.project(img)
	n1, _, _, _, _ := w.score(w.mag)
	pair := &encoding{op: exact, weights: enc.weights, step: enc.step}
	img, _, err = w.reconstruct(0, pair, y, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	w.project(img)
	n2, _, _, _, _ := w.score(w.mag)
	if math.Abs(n1/n2-1) > 0.01 {
		t.Errorf("NRMSE with Toeplitz %.4f, with the NUFFT pair %.4f", n1, n2)
	}
}

func relDiff(a, b []complex128) float64 {
	var num, den float64
	for i := range a {
		d := a[i] - b[i]
		num += real(d)*real(d) + imag(d)*imag(d)
		den += real(b[i])*real(b[i]) + imag(b[i])*imag(b[i])
	}
	return math.Sqrt(num / den)
}
