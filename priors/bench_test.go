package priors

import (
	"math"
	"math/rand/v2"
	"testing"

	"accelplan/internal/benchcpu"
	"accelplan/simulate"
)

// benchProblem is the workload of /work/shared/bench/peer_fista_numpy.py at
// 256²: single coil, 1D variable-density random phase-encode rows (R ≈ 4,
// 16 calibration rows), db4 wavelet L1 with 4 levels, on the project's
// Cartesian operator.
func benchProblem(b *testing.B) (*simulate.Cartesian, []complex128, *WaveletL1) {
	const n = 256
	r := rand.New(rand.NewPCG(0, 1))
	mask := make([]bool, n*n)
	for i := range n {
		p := math.Min(math.Max(math.Pow(1-math.Abs(-1+2*float64(i)/float64(n-1)), 4)*0.9+0.05, 0), 1)
		if r.Float64() < p || (i >= n/2-8 && i < n/2+8) {
			for j := range n {
				mask[i*n+j] = true
			}
		}
	}
	op, err := simulate.NewCartesian(n, n, mask)
	if err != nil {
		b.Fatal(err)
	}
	prior, err := NewWaveletL1(n, n, 4, "db4")
	if err != nil {
		b.Fatal(err)
	}
	return op, randVec(op.DataLen(), 2), prior
}

// One FISTA iteration at 256², db4, 4 levels: reported as ns/iter (wall)
// and cpu-ns/iter (thread CPU time, steadier on a shared machine).
func BenchmarkFISTAIteration256Db4(b *testing.B) {
	op, y, prior := benchProblem(b)
	const iters = 10
	opt := FISTAOptions{Step: 1, MaxIter: iters}
	b.ReportAllocs()
	done := benchcpu.Timer(b)
	for b.Loop() {
		if _, _, err := FISTA(op, y, prior, 0.002, opt); err != nil {
			b.Fatal(err)
		}
	}
	done()
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*iters), "ns/iter")
}

// The parts of one iteration: E then E^H on the Cartesian operator …
func BenchmarkCartesianForwardAdjoint256(b *testing.B) {
	op, y, _ := benchProblem(b)
	x := make([]complex128, op.ImageLen())
	done := benchcpu.Timer(b)
	for b.Loop() {
		op.Forward(y, x)
		op.Adjoint(x, y)
	}
	done()
}

// … or EᴴE at once, which for this mask of whole rows needs only the column
// transforms (simulate.Cartesian.Normal) …
func BenchmarkCartesianNormal256(b *testing.B) {
	op, _, _ := benchProblem(b)
	x := randVec(op.ImageLen(), 4)
	g := make([]complex128, op.ImageLen())
	done := benchcpu.Timer(b)
	for b.Loop() {
		op.Normal(g, x)
	}
	done()
}

// … and the wavelet prox (forward transform, threshold, inverse).
func BenchmarkWaveletL1Prox256Db4(b *testing.B) {
	_, _, prior := benchProblem(b)
	x := randVec(256*256, 3)
	done := benchcpu.Timer(b)
	for b.Loop() {
		prior.Prox(x, x, 1e-3)
	}
	done()
}
