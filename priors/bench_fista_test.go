package priors

import (
	"encoding/binary"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"accelplan/internal/benchcpu"
	"accelplan/simulate"
)

// The shared numpy baseline for one FISTA-wavelet reconstruction
// (shared/bench/peer_fista_numpy.py): single coil, 256² Cartesian, a 1D
// variable-density random row mask p = clip((1 − |linspace(−1, 1, N)|)⁴·0.9
// + 0.05, 0, 1) with 16 calibration rows, complex noise σ = 0.01/√2 per
// channel on the acquired samples, λ = 0.002 on the db4 detail coefficients
// (4 levels, periodization), 100 FISTA iterations with step 1 from the
// zero-filled image. This file builds the same problem in Go twice:
//
//   - from our own parts (BenchmarkFISTAIteration256/modified-shepp-logan):
//     the mask rule drawn with math/rand/v2 PCG instead of NumPy's generator,
//     Go noise of the same σ, and as image our ModifiedSheppLogan rasterised
//     at 256² by exact pixel-area averaging. The baseline instead resizes
//     scikit-image's 400² Shepp-Logan raster to 256² with anti-aliasing
//     (a Gaussian pre-filter, then bilinear interpolation), so its image is
//     smoother and its NRMSE is not the same number;
//   - from the baseline's own arrays (…/peer-inputs and
//     TestFISTAMatchesNumpyPeer128): phantom, mask and noisy data written by
//     testdata/make_peer_fista_fixture.py with NumPy, SciPy, PyWavelets and
//     scikit-image, so that the final NRMSE can be compared number for
//     number.
//
// Like the baseline, both build the data from the FFT of the very grid that
// is reconstructed (the inverse crime), which the planner itself never does
// (see simulate.Phantom); here it is what makes the comparison like for like.

// peerFixture mirrors testdata/peer_fista_N.json.
type peerFixture struct {
	Generator  string  `json:"generator"`
	N          int     `json:"n"`
	Iterations int     `json:"iterations"`
	Sigma      float64 `json:"sigma"`
	Lambda     float64 `json:"lambda"`
	Wavelet    string  `json:"wavelet"`
	Levels     int     `json:"levels"`
	Rows       []int   `json:"rows"`
	NRMSE      float64 `json:"nrmse"`
	ZeroFilled float64 `json:"zero_filled_nrmse"`
	HasResult  bool    `json:"has_result"`

	phantom []float64    // N², centred frame
	data    []complex128 // acquired samples in simulate.Cartesian order
	result  []complex128 // the baseline's final iterate (when HasResult)
	mask    []bool
}

func loadPeerFixture(tb testing.TB, n int) *peerFixture {
	tb.Helper()
	base := "testdata/peer_fista_" + strconv.Itoa(n)
	js, err := os.ReadFile(base + ".json")
	if err != nil {
		tb.Fatal(err)
	}
	var f peerFixture
	if err := json.Unmarshal(js, &f); err != nil {
		tb.Fatal(err)
	}
	if !strings.HasPrefix(f.Generator, "shared numpy baseline") || f.N != n || len(f.Rows) != n {
		tb.Fatalf("%s.json: unexpected header %q, n = %d, %d rows", base, f.Generator, f.N, len(f.Rows))
	}
	raw, err := os.ReadFile(base + ".f64")
	if err != nil {
		tb.Fatal(err)
	}
	vals := make([]float64, len(raw)/8)
	for i := range vals {
		vals[i] = math.Float64frombits(binary.LittleEndian.Uint64(raw[8*i:]))
	}
	acquired := 0
	f.mask = make([]bool, n*n)
	for m, r := range f.Rows {
		if r != 0 {
			acquired++
			for j := range n {
				f.mask[m*n+j] = true
			}
		}
	}
	want := n*n + 2*acquired*n
	if f.HasResult {
		want += 2 * n * n
	}
	if len(vals) != want {
		tb.Fatalf("%s.f64 holds %d values, want %d", base, len(vals), want)
	}
	f.phantom = vals[:n*n]
	f.data = pairs(vals[n*n : n*n+2*acquired*n])
	if f.HasResult {
		f.result = pairs(vals[n*n+2*acquired*n:])
	}
	return &f
}

func pairs(v []float64) []complex128 {
	out := make([]complex128, len(v)/2)
	for i := range out {
		out[i] = complex(v[2*i], v[2*i+1])
	}
	return out
}

// magNRMSE is the baseline's figure of merit ‖|x| − |x0|‖ / ‖|x0|‖.
func magNRMSE(x []complex128, truth []float64) float64 {
	var e, t float64
	for i, v := range truth {
		d := math.Hypot(real(x[i]), imag(x[i])) - math.Abs(v)
		e += d * d
		t += v * v
	}
	return math.Sqrt(e / t)
}

// peerRowMask draws the baseline's mask rule with a Go generator: row m of
// the centred grid (ky = m − n/2) is acquired with probability
// p_m = clip((1 − |−1 + 2m/(n−1)|)⁴·0.9 + 0.05, 0, 1), and the 16 rows
// around the centre always.
func peerRowMask(n int, rng *rand.Rand) []bool {
	mask := make([]bool, n*n)
	for m := range n {
		p := math.Min(math.Max(math.Pow(1-math.Abs(-1+2*float64(m)/float64(n-1)), 4)*0.9+0.05, 0), 1)
		if rng.Float64() < p || (m >= n/2-8 && m < n/2+8) {
			for j := range n {
				mask[m*n+j] = true
			}
		}
	}
	return mask
}

// The baseline's reconstruction, run here on its own phantom, mask and noisy
// data (fixture by NumPy 1.24 / SciPy 1.10 / PyWavelets 1.1 / scikit-image
// 0.19, see testdata/make_peer_fista_fixture.py) at 128², the smallest size
// at which 4 levels of db4 are allowed: our FISTA with the lifting db4
// transform must land on the baseline's final iterate, and so on its NRMSE.
func TestFISTAMatchesNumpyPeer128(t *testing.T) {
	f := loadPeerFixture(t, 128)
	op, err := simulate.NewCartesian(f.N, f.N, f.mask)
	if err != nil {
		t.Fatal(err)
	}
	prior, err := NewWaveletL1(f.N, f.N, f.Levels, f.Wavelet)
	if err != nil {
		t.Fatal(err)
	}
	x, info, err := FISTA(op, f.data, prior, f.Lambda, FISTAOptions{Step: 1, MaxIter: f.Iterations})
	if err != nil {
		t.Fatal(err)
	}
	if info.Iterations != f.Iterations {
		t.Fatalf("%d iterations, want %d", info.Iterations, f.Iterations)
	}
	var worst, peak float64
	for i, v := range f.result {
		worst = math.Max(worst, math.Hypot(real(x[i])-real(v), imag(x[i])-imag(v)))
		peak = math.Max(peak, math.Hypot(real(v), imag(v)))
	}
	t.Logf("max |x − x_numpy| = %.3g (peak %.3g), NRMSE %.6f (numpy %.6f)", worst, peak, magNRMSE(x, f.phantom), f.NRMSE)
	if worst > 1e-10*peak {
		t.Errorf("final iterate differs from the numpy baseline's by %.3g (peak %.3g)", worst, peak)
	}
	if got := magNRMSE(x, f.phantom); math.Abs(got-f.NRMSE) > 1e-9 {
		t.Errorf("NRMSE %.10f, numpy baseline %.10f", got, f.NRMSE)
	}
	if zf := magNRMSE(ZeroFilled(op, f.data), f.phantom); math.Abs(zf-f.ZeroFilled) > 1e-12 {
		t.Errorf("zero-filled NRMSE %.12f, numpy baseline %.12f", zf, f.ZeroFilled)
	}
}

// fistaBench is one configuration of BenchmarkFISTAIteration256.
type fistaBench struct {
	op    *simulate.Cartesian
	data  []complex128
	truth []float64
	peer  float64 // the baseline's NRMSE on the same inputs, 0 when not known
}

// ourPeerProblem builds the baseline's problem from our own parts (see the
// top of this file).
func ourPeerProblem(tb testing.TB, n int) fistaBench {
	rng := rand.New(rand.NewPCG(2024, 5))
	mask := peerRowMask(n, rng)
	op, err := simulate.NewCartesian(n, n, mask)
	if err != nil {
		tb.Fatal(err)
	}
	truth := simulate.ModifiedSheppLogan().Rasterize(n, n)
	img := make([]complex128, n*n)
	for i, v := range truth {
		img[i] = complex(v, 0)
	}
	y := make([]complex128, op.DataLen())
	op.Forward(y, img)
	simulate.AddNoise(y, 0.01/math.Sqrt2, rng)
	return fistaBench{op: op, data: y, truth: truth}
}

// BenchmarkFISTAIteration256 times the baseline's reconstruction (100 FISTA
// iterations, db4, 4 levels, λ = 0.002, step 1) and reports wall ms per
// iteration, the final NRMSE, the zero-filled NRMSE and the acceleration R.
// cpu-ns/op is the thread CPU time of one whole 100-iteration solve. Compare
// with the baseline run in the same shell:
//
//	/usr/bin/python3 /work/shared/bench/peer_fista_numpy.py
func BenchmarkFISTAIteration256(b *testing.B) {
	const n = 256
	cases := []struct {
		name string
		make func(testing.TB) fistaBench
	}{
		{"modified-shepp-logan", func(tb testing.TB) fistaBench { return ourPeerProblem(tb, n) }},
		{"peer-inputs", func(tb testing.TB) fistaBench {
			f := loadPeerFixture(tb, n)
			op, err := simulate.NewCartesian(n, n, f.mask)
			if err != nil {
				tb.Fatal(err)
			}
			return fistaBench{op: op, data: f.data, truth: f.phantom, peer: f.NRMSE}
		}},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			p := c.make(b)
			prior, err := NewWaveletL1(n, n, 4, "db4")
			if err != nil {
				b.Fatal(err)
			}
			const iters = 100
			opt := FISTAOptions{Step: 1, MaxIter: iters}
			var x []complex128
			b.ReportAllocs()
			done := benchcpu.Timer(b)
			for b.Loop() {
				x, _, err = FISTA(p.op, p.data, prior, 0.002, opt)
				if err != nil {
					b.Fatal(err)
				}
			}
			done()
			b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N*iters), "ms/iter")
			got := magNRMSE(x, p.truth)
			b.ReportMetric(got, "nrmse")
			b.ReportMetric(magNRMSE(ZeroFilled(p.op, p.data), p.truth), "zf-nrmse")
			b.ReportMetric(float64(n)/float64(p.op.DataLen()/n), "R")
			if p.peer > 0 && got > p.peer+1e-9 {
				b.Errorf("NRMSE %.6f above the numpy baseline's %.6f on the same inputs", got, p.peer)
			}
		})
	}
}

// BenchmarkTVPDHGIteration256 times 100 iterations of the TV primal-dual
// solver (periodic differences, λ = 0.005, gap never evaluated, from the
// zero-filled image) on the baseline's own 256² inputs and reports wall ms
// per iteration and the final NRMSE. Compare with the numpy peer of the same
// iteration run in the same shell (testdata/peer_tv_pdhg_numpy.py, same
// steps τ = σ = 1/√(1.01‖E‖² + 8), same problem):
//
//	/usr/bin/python3 testdata/peer_tv_pdhg_numpy.py
func BenchmarkTVPDHGIteration256(b *testing.B) {
	const n, iters = 256, 100
	f := loadPeerFixture(b, n)
	op, err := simulate.NewCartesian(n, n, f.mask)
	if err != nil {
		b.Fatal(err)
	}
	s, err := NewTVSolver(op, n, n, BoundaryPeriodic)
	if err != nil {
		b.Fatal(err)
	}
	x := make([]complex128, n*n)
	b.ReportAllocs()
	done := benchcpu.Timer(b)
	for b.Loop() {
		op.Adjoint(x, f.data)
		if _, err := s.Solve(x, f.data, 0.005, PDHGOptions{MaxIter: iters}); err != nil {
			b.Fatal(err)
		}
	}
	done()
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N*iters), "ms/iter")
	b.ReportMetric(magNRMSE(x, f.phantom), "nrmse")
}
