package fft

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/dsp/fourier"
)

// sizes1D covers powers of two, mixed radix 2·3·5, a direct odd prime (7, 11)
// and a Bluestein length (97, prime above the direct-butterfly limit).
var sizes1D = []int{1, 2, 3, 4, 5, 7, 8, 11, 12, 15, 16, 30, 60, 64, 97, 100, 128, 192, 240, 256, 1000, 1024}

func randVec(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return x
}

// relErr returns ‖a-b‖₂ / ‖b‖₂.
func relErr(a, b []complex128) float64 {
	var num, den float64
	for i := range a {
		d := a[i] - b[i]
		num += real(d)*real(d) + imag(d)*imag(d)
		den += real(b[i])*real(b[i]) + imag(b[i])*imag(b[i])
	}
	return math.Sqrt(num / den)
}

func scaled(x []complex128, s float64) []complex128 {
	y := make([]complex128, len(x))
	for i, v := range x {
		y[i] = v * complex(s, 0)
	}
	return y
}

const tol = 1e-12

// TestForwardAgainstGoDSP checks Forward against go-dsp's fft.FFT (reference
// library, unnormalised forward DFT with exp(-2πi jk/n)), scaled by n^(-1/2).
func TestForwardAgainstGoDSP(t *testing.T) {
	for _, n := range sizes1D {
		x := randVec(n, uint64(n))
		want := scaled(dspfft.FFT(x), 1/math.Sqrt(float64(n)))
		p, err := NewPlan(n)
		if err != nil {
			t.Fatalf("NewPlan(%d): %v", n, err)
		}
		got := make([]complex128, n)
		p.Forward(got, x)
		if e := relErr(got, want); e > tol {
			t.Errorf("n=%d: relative error %.3g against go-dsp FFT", n, e)
		}
	}
}

// TestInverseAgainstGoDSP checks Inverse against go-dsp's fft.IFFT (which
// includes the 1/n factor), scaled by n^(1/2).
func TestInverseAgainstGoDSP(t *testing.T) {
	for _, n := range sizes1D {
		x := randVec(n, uint64(n)+1000)
		want := scaled(dspfft.IFFT(x), math.Sqrt(float64(n)))
		p, err := NewPlan(n)
		if err != nil {
			t.Fatalf("NewPlan(%d): %v", n, err)
		}
		got := make([]complex128, n)
		p.Inverse(got, x)
		if e := relErr(got, want); e > tol {
			t.Errorf("n=%d: relative error %.3g against go-dsp IFFT", n, e)
		}
	}
}

// TestAgainstGonum checks both directions against gonum's
// dsp/fourier.CmplxFFT (reference library; Coefficients is the unnormalised
// forward DFT, Sequence the unnormalised inverse).
func TestAgainstGonum(t *testing.T) {
	for _, n := range sizes1D {
		x := randVec(n, uint64(n)+2000)
		g := fourier.NewCmplxFFT(n)
		wantF := scaled(g.Coefficients(nil, x), 1/math.Sqrt(float64(n)))
		wantI := scaled(g.Sequence(nil, x), 1/math.Sqrt(float64(n)))
		p, err := NewPlan(n)
		if err != nil {
			t.Fatalf("NewPlan(%d): %v", n, err)
		}
		got := make([]complex128, n)
		p.Forward(got, x)
		if e := relErr(got, wantF); e > tol {
			t.Errorf("n=%d: forward relative error %.3g against gonum", n, e)
		}
		p.Inverse(got, x)
		if e := relErr(got, wantI); e > tol {
			t.Errorf("n=%d: inverse relative error %.3g against gonum", n, e)
		}
	}
}

// naiveDFT is the defining sum, evaluated with exactly reduced angles; it
// checks lengths that exercise every direct prime radix, with no library in
// between (textbook definition of the DFT).
func naiveDFT(x []complex128, sign float64) []complex128 {
	n := len(x)
	y := make([]complex128, n)
	for k := range n {
		var s complex128
		for j := range n {
			s += x[j] * cmplx.Rect(1, sign*2*math.Pi*float64(j*k%n)/float64(n))
		}
		y[k] = s / complex(math.Sqrt(float64(n)), 0)
	}
	return y
}

func TestAgainstDefinitionAllRadices(t *testing.T) {
	for _, n := range []int{6, 9, 13, 14, 17, 19, 21, 23, 25, 29, 31, 37, 41, 74, 77, 125, 143, 210, 2 * 3 * 5 * 7 * 11} {
		x := randVec(n, uint64(n)+3000)
		p, err := NewPlan(n)
		if err != nil {
			t.Fatalf("NewPlan(%d): %v", n, err)
		}
		got := make([]complex128, n)
		p.Forward(got, x)
		if e := relErr(got, naiveDFT(x, -1)); e > tol {
			t.Errorf("n=%d: forward relative error %.3g against the defining sum", n, e)
		}
		p.Inverse(got, x)
		if e := relErr(got, naiveDFT(x, +1)); e > tol {
			t.Errorf("n=%d: inverse relative error %.3g against the defining sum", n, e)
		}
	}
}

// TestRandomLengths checks 80 seeded random lengths up to 2000 in both
// directions against gonum's CmplxFFT (reference library).
func TestRandomLengths(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 2024))
	for range 80 {
		n := 1 + r.IntN(2000)
		x := randVec(n, uint64(n)+5000)
		g := fourier.NewCmplxFFT(n)
		p, err := NewPlan(n)
		if err != nil {
			t.Fatal(err)
		}
		got := make([]complex128, n)
		p.Forward(got, x)
		if e := relErr(got, scaled(g.Coefficients(nil, x), 1/math.Sqrt(float64(n)))); e > tol {
			t.Errorf("n=%d: forward relative error %.3g against gonum", n, e)
		}
		p.Inverse(got, x)
		if e := relErr(got, scaled(g.Sequence(nil, x), 1/math.Sqrt(float64(n)))); e > tol {
			t.Errorf("n=%d: inverse relative error %.3g against gonum", n, e)
		}
	}
}
