package simulate

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

func randomMask(ny, nx int, frac float64, rng *rand.Rand) []bool {
	m := make([]bool, ny*nx)
	for i := range m {
		m[i] = rng.Float64() < frac
	}
	m[ny/2*nx+nx/2] = true
	return m
}

func randomVec(n int, rng *rand.Rand) []complex128 {
	v := make([]complex128, n)
	for i := range v {
		v[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	return v
}

func dot(a, b []complex128) complex128 {
	var s complex128
	for i := range a {
		s += a[i] * cmplx.Conj(b[i])
	}
	return s
}

// The adjoint identity ⟨Ex, y⟩ = ⟨x, Eᴴy⟩ defines Eᴴ (any linear-algebra
// text); it must hold to rounding for masks of every shape.
func TestCartesianAdjointIdentity(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, sz := range [][2]int{{16, 16}, {24, 20}, {15, 9}, {64, 48}} {
		ny, nx := sz[0], sz[1]
		op, err := NewCartesian(ny, nx, randomMask(ny, nx, 0.4, rng))
		if err != nil {
			t.Fatal(err)
		}
		x := randomVec(op.ImageLen(), rng)
		y := randomVec(op.DataLen(), rng)
		ex := make([]complex128, op.DataLen())
		ehy := make([]complex128, op.ImageLen())
		op.Forward(ex, x)
		op.Adjoint(ehy, y)
		l, r := dot(ex, y), dot(x, ehy)
		if d := cmplx.Abs(l-r) / cmplx.Abs(l); d > 1e-12 {
			t.Errorf("%d×%d: ⟨Ex,y⟩ = %v, ⟨x,Eᴴy⟩ = %v, relative difference %g", ny, nx, l, r, d)
		}
	}
}

// With every sample acquired E is the unitary centred DFT, so EᴴE = I.
func TestCartesianFullSamplingIsUnitary(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	ny, nx := 32, 40
	mask := make([]bool, ny*nx)
	for i := range mask {
		mask[i] = true
	}
	op, err := NewCartesian(ny, nx, mask)
	if err != nil {
		t.Fatal(err)
	}
	x := randomVec(ny*nx, rng)
	k := make([]complex128, ny*nx)
	back := make([]complex128, ny*nx)
	op.Forward(k, x)
	op.Adjoint(back, k)
	var num, den, nk float64
	for i := range x {
		num += cmplx.Abs(back[i]-x[i]) * cmplx.Abs(back[i]-x[i])
		den += cmplx.Abs(x[i]) * cmplx.Abs(x[i])
		nk += cmplx.Abs(k[i]) * cmplx.Abs(k[i])
	}
	if math.Sqrt(num/den) > 1e-12 {
		t.Errorf("EᴴEx differs from x by %g relative", math.Sqrt(num/den))
	}
	if math.Abs(nk/den-1) > 1e-12 {
		t.Errorf("‖Ex‖²/‖x‖² = %v, want 1 (Parseval)", nk/den)
	}
}

// Fully sampled data with noise of σ per k-space sample must give image
// noise of the same σ in each channel (orthonormal DFT; common practice).
// With n = 2·ny·nx Gaussian values the sample standard deviation has
// relative standard error 1/√(2(n−1)); we allow four of them.
func TestNoiseSigmaCarriesToImage(t *testing.T) {
	ny, nx := 128, 96
	ph := ModifiedSheppLogan()
	truth := ph.Rasterize(nx, ny)
	support := ph.Support(nx, ny)
	sigma, err := NoiseSigma(truth, support, 25)
	if err != nil {
		t.Fatal(err)
	}
	mask := make([]bool, ny*nx)
	for i := range mask {
		mask[i] = true
	}
	op, err := NewCartesian(ny, nx, mask)
	if err != nil {
		t.Fatal(err)
	}
	clean := make([]complex128, op.DataLen())
	op.Gather(clean, CartesianSpectrum(ph, nx, ny))
	noisy := append([]complex128(nil), clean...)
	AddNoise(noisy, sigma, rand.New(rand.NewPCG(11, 12)))
	a := make([]complex128, ny*nx)
	b := make([]complex128, ny*nx)
	op.Adjoint(a, noisy)
	op.Adjoint(b, clean)
	var sr, si, sri float64
	for i := range a {
		d := a[i] - b[i]
		sr += real(d) * real(d)
		si += imag(d) * imag(d)
		sri += real(d) * imag(d)
	}
	n := float64(len(a))
	stdR, stdI := math.Sqrt(sr/n), math.Sqrt(si/n)
	tol := 4 / math.Sqrt(2*(n-1))
	for _, c := range []struct {
		name string
		got  float64
	}{{"real", stdR}, {"imaginary", stdI}} {
		if math.Abs(c.got/sigma-1) > tol {
			t.Errorf("%s-channel image noise σ = %.5g, set %.5g: off by %.2f%%, allowed %.2f%%", c.name, c.got, sigma, 100*math.Abs(c.got/sigma-1), 100*tol)
		}
	}
	// The channels are independent: their correlation is within 4/√n of 0.
	if r := sri / n / (stdR * stdI); math.Abs(r) > 4/math.Sqrt(n) {
		t.Errorf("real/imaginary noise correlation %.4f, want |r| < %.4f", r, 4/math.Sqrt(n))
	}
	// And the reference SNR comes back: mean signal over σ.
	var sum float64
	var cnt int
	for i, in := range support {
		if in {
			sum += truth[i]
			cnt++
		}
	}
	if snr := sum / float64(cnt) / sigma; math.Abs(snr-25) > 1e-9 {
		t.Errorf("SNR from σ = %v, want 25", snr)
	}
}

func TestNewCartesianRejects(t *testing.T) {
	cases := []struct {
		name   string
		ny, nx int
		mask   []bool
	}{
		{"empty matrix", 0, 4, nil},
		{"mask size", 4, 4, make([]bool, 15)},
		{"no sample", 4, 4, make([]bool, 16)},
	}
	for _, c := range cases {
		if _, err := NewCartesian(c.ny, c.nx, c.mask); err == nil {
			t.Errorf("%s: accepted", c.name)
		}
	}
	if _, err := NoiseSigma([]float64{1, 2}, nil, math.NaN()); err == nil {
		t.Error("NaN SNR accepted")
	}
}

func TestCartesianForwardAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	op, err := NewCartesian(64, 64, randomMask(64, 64, 0.3, rng))
	if err != nil {
		t.Fatal(err)
	}
	x := randomVec(op.ImageLen(), rng)
	y := make([]complex128, op.DataLen())
	if a := testing.AllocsPerRun(10, func() { op.Forward(y, x); op.Adjoint(x, y) }); a != 0 {
		t.Errorf("Forward+Adjoint allocate %v times per call", a)
	}
}
