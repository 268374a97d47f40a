package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/mat"

	"accelplan/simulate"
)

func seededComplex(n int, seed uint64) []complex128 {
	rng := rand.New(rand.NewPCG(seed, seed+1))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	return x
}

func relDist(a, b []complex128) float64 { return math.Sqrt(linSqDist(a, b) / linSqNorm(b)) }

func allTrue(n int) []bool {
	m := make([]bool, n)
	for i := range m {
		m[i] = true
	}
	return m
}

// periodicGradientFilter returns (I + λ∇ᵀ∇)⁻¹b for the periodic forward-
// difference gradient, computed in the Fourier domain with go-dsp's FFT2: the
// operator is a circular convolution whose DFT at frequency (u, v) is
// μ = 4sin²(πu/ny) + 4sin²(πv/nx), the squared modulus of the DFT of the
// stencil (−1, 1) along each axis (convolution theorem; common practice, see
// Hansen PC, Nagy JG, O'Leary DP, Deblurring Images, SIAM 2006, ch. 4).
func periodicGradientFilter(b []complex128, ny, nx int, lambda float64) []complex128 {
	rows := make([][]complex128, ny)
	for i := range rows {
		rows[i] = append([]complex128(nil), b[i*nx:(i+1)*nx]...)
	}
	spec := fft.FFT2(rows)
	for u := 0; u < ny; u++ {
		su := math.Sin(math.Pi * float64(u) / float64(ny))
		for v := 0; v < nx; v++ {
			sv := math.Sin(math.Pi * float64(v) / float64(nx))
			spec[u][v] /= complex(1+lambda*(4*su*su+4*sv*sv), 0)
		}
	}
	back := fft.IFFT2(spec)
	out := make([]complex128, ny*nx)
	for i := range back {
		copy(out[i*nx:], back[i])
	}
	return out
}

// dct2Matrix is the orthonormal DCT-II matrix of order n.
func dct2Matrix(n int) []float64 {
	c := make([]float64, n*n)
	for k := 0; k < n; k++ {
		s := math.Sqrt(2 / float64(n))
		if k == 0 {
			s = math.Sqrt(1 / float64(n))
		}
		for j := 0; j < n; j++ {
			c[k*n+j] = s * math.Cos(math.Pi*float64(k)*(float64(j)+0.5)/float64(n))
		}
	}
	return c
}

// neumannGradientFilter returns (I + λ∇ᵀ∇)⁻¹b for the forward-difference
// gradient with zero differences across the border. The DCT-II diagonalises
// that second-difference matrix with eigenvalues 4sin²(πk/(2n)) (Strang G,
// SIAM Rev 1999;41:135-147; from memory), so the inverse is a filter on the
// separable DCT-II coefficients, computed here by direct matrix products.
func neumannGradientFilter(b []complex128, ny, nx int, lambda float64) []complex128 {
	cy, cx := dct2Matrix(ny), dct2Matrix(nx)
	// X = Cy·B·Cxᵀ
	tmp := make([]complex128, ny*nx)
	for k := 0; k < ny; k++ {
		for j := 0; j < nx; j++ {
			var s complex128
			for i := 0; i < ny; i++ {
				s += complex(cy[k*ny+i], 0) * b[i*nx+j]
			}
			tmp[k*nx+j] = s
		}
	}
	spec := make([]complex128, ny*nx)
	for k := 0; k < ny; k++ {
		sk := math.Sin(math.Pi * float64(k) / float64(2*ny))
		for l := 0; l < nx; l++ {
			sl := math.Sin(math.Pi * float64(l) / float64(2*nx))
			var s complex128
			for j := 0; j < nx; j++ {
				s += tmp[k*nx+j] * complex(cx[l*nx+j], 0)
			}
			spec[k*nx+l] = s / complex(1+lambda*(4*sk*sk+4*sl*sl), 0)
		}
	}
	// B = Cyᵀ·X·Cx
	for i := 0; i < ny; i++ {
		for l := 0; l < nx; l++ {
			var s complex128
			for k := 0; k < ny; k++ {
				s += complex(cy[k*ny+i], 0) * spec[k*nx+l]
			}
			tmp[i*nx+l] = s
		}
	}
	out := make([]complex128, ny*nx)
	for i := 0; i < ny; i++ {
		for j := 0; j < nx; j++ {
			var s complex128
			for l := 0; l < nx; l++ {
				s += tmp[i*nx+l] * complex(cx[l*nx+j], 0)
			}
			out[i*nx+j] = s
		}
	}
	return out
}

// TestTikhonovFullySampledClosedForm checks the CG solution of the normal
// equations on fully sampled Cartesian data (E unitary, so EᴴE = I) against
// the closed forms: x = Eᴴy/(1+λ) for the identity, and the Fourier- or
// DCT-domain filter of Eᴴy for the gradient (see the helpers for sources).
func TestTikhonovFullySampledClosedForm(t *testing.T) {
	const ny, nx = 18, 26
	op, err := simulate.NewCartesian(ny, nx, allTrue(ny*nx))
	if err != nil {
		t.Fatal(err)
	}
	y := seededComplex(ny*nx, 31)
	ehy := make([]complex128, ny*nx)
	op.Adjoint(ehy, y)
	cases := []struct {
		name   string
		kind   TikhonovKind
		b      Boundary
		lambda float64
		want   func() []complex128
	}{
		{"identity λ=0.3", TikhonovIdentity, BoundaryNeumann, 0.3, func() []complex128 {
			w := make([]complex128, len(ehy))
			for i, v := range ehy {
				w[i] = v / 1.3
			}
			return w
		}},
		{"gradient periodic λ=0.7 (go-dsp FFT)", TikhonovGradient, BoundaryPeriodic, 0.7,
			func() []complex128 { return periodicGradientFilter(ehy, ny, nx, 0.7) }},
		{"gradient periodic λ=5", TikhonovGradient, BoundaryPeriodic, 5,
			func() []complex128 { return periodicGradientFilter(ehy, ny, nx, 5) }},
		{"gradient neumann λ=2 (DCT-II)", TikhonovGradient, BoundaryNeumann, 2,
			func() []complex128 { return neumannGradientFilter(ehy, ny, nx, 2) }},
	}
	for _, c := range cases {
		reg, err := NewTikhonov(c.kind, ny, nx, c.b)
		if err != nil {
			t.Fatal(err)
		}
		s, err := NewTikhonovSolver(op, reg, c.lambda)
		if err != nil {
			t.Fatal(err)
		}
		x := make([]complex128, ny*nx)
		rep, err := s.Solve(x, y, CGOptions{MaxIter: 500, Tol: 1e-12})
		if err != nil {
			t.Fatal(err)
		}
		want := c.want()
		if d := relDist(x, want); !rep.Converged || d > 1e-10 {
			t.Errorf("%s: %+v, relative distance to the closed form %.2e", c.name, rep, d)
		}
		// The proximal map of λR is the same filter applied with E = I.
		p := make([]complex128, ny*nx)
		reg.Prox(p, ehy, c.lambda)
		if d := relDist(p, want); d > 1e-9 {
			t.Errorf("%s: Prox differs from the closed form by %.2e", c.name, d)
		}
	}
}

// TestTikhonovUndersampledMatchesGonum checks an undersampled, regularised
// solve against gonum: the normal matrix is assembled column by column from
// the operator and solved by Cholesky in its real embedding.
func TestTikhonovUndersampledMatchesGonum(t *testing.T) {
	const ny, nx = 8, 10
	const n = ny * nx
	rng := rand.New(rand.NewPCG(41, 42))
	mask := make([]bool, n)
	for i := range mask {
		mask[i] = rng.Float64() < 0.4
	}
	// With DC acquired, only x = 0 lies in the null spaces of both E and ∇,
	// so the gradient-regularised normal matrix is definite.
	mask[ny/2*nx+nx/2] = true
	op, err := simulate.NewCartesian(ny, nx, mask)
	if err != nil {
		t.Fatal(err)
	}
	y := seededComplex(op.DataLen(), 43)
	for _, kind := range []TikhonovKind{TikhonovIdentity, TikhonovGradient} {
		reg, _ := NewTikhonov(kind, ny, nx, BoundaryNeumann)
		s, _ := NewTikhonovSolver(op, reg, 0.05)
		// A = EᴴE + λDᴴD, column by column.
		a := mat.NewDense(2*n, 2*n, nil)
		e := make([]complex128, n)
		col := make([]complex128, n)
		for j := 0; j < n; j++ {
			clear(e)
			e[j] = 1
			s.Apply(col, e)
			for i, v := range col {
				a.Set(i, j, real(v))
				a.Set(n+i, n+j, real(v))
				a.Set(n+i, j, imag(v))
				a.Set(i, n+j, -imag(v))
			}
		}
		rhs := make([]complex128, n)
		op.Adjoint(rhs, y)
		rb := mat.NewVecDense(2*n, nil)
		for i, v := range rhs {
			rb.SetVec(i, real(v))
			rb.SetVec(n+i, imag(v))
		}
		var ref mat.VecDense
		if err := ref.SolveVec(a, rb); err != nil {
			t.Fatal(err)
		}
		want := make([]complex128, n)
		for i := range want {
			want[i] = complex(ref.AtVec(i), ref.AtVec(n+i))
		}
		x := make([]complex128, n)
		rep, err := s.Solve(x, y, CGOptions{MaxIter: 1000, Tol: 1e-13})
		if err != nil {
			t.Fatal(err)
		}
		if d := relDist(x, want); d > 1e-9 {
			t.Errorf("%v: %+v, relative distance to gonum's solution %.2e", kind, rep, d)
		}
		// The solution minimises the objective: small moves raise it.
		f0 := s.Objective(x, y)
		for k := 0; k < 5; k++ {
			d := seededComplex(n, uint64(50+k))
			linScale(d, 1e-3)
			for i := range d {
				d[i] += x[i]
			}
			if f := s.Objective(d, y); f < f0 {
				t.Errorf("%v: objective fell from %.15g to %.15g off the solution", kind, f0, f)
			}
		}
	}
}

func TestTikhonovRejects(t *testing.T) {
	op, _ := simulate.NewCartesian(4, 4, allTrue(16))
	reg, _ := NewTikhonov(TikhonovIdentity, 4, 4, BoundaryNeumann)
	small, _ := NewTikhonov(TikhonovIdentity, 3, 4, BoundaryNeumann)
	if _, err := NewTikhonov(TikhonovKind(7), 4, 4, BoundaryNeumann); err == nil {
		t.Error("unknown kind accepted")
	}
	for _, k := range []TikhonovKind{TikhonovIdentity, TikhonovGradient} {
		if got, err := ParseTikhonovKind(k.String()); err != nil || got != k {
			t.Errorf("ParseTikhonovKind(%q) = %v, %v", k.String(), got, err)
		}
	}
	if _, err := ParseTikhonovKind("laplacian"); err == nil || !strings.Contains(err.Error(), "valid: identity, gradient") {
		t.Errorf("unknown kind name: %v", err)
	}
	if _, err := NewTikhonovSolver(op, small, 1); err == nil || !strings.Contains(err.Error(), "12 values") {
		t.Errorf("grid mismatch: %v", err)
	}
	for _, l := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := NewTikhonovSolver(op, reg, l); err == nil || !strings.Contains(err.Error(), "λ") {
			t.Errorf("λ = %v: %v", l, err)
		}
	}
	s, _ := NewTikhonovSolver(op, reg, 1)
	if _, err := s.Solve(make([]complex128, 16), make([]complex128, 15), DefaultCGOptions()); err == nil {
		t.Error("short data accepted")
	}
	if _, err := s.Solve(make([]complex128, 16), make([]complex128, 16), CGOptions{}); err == nil {
		t.Error("zero iterations accepted")
	}
}

func TestTikhonovSolveAllocatesNothing(t *testing.T) {
	const n = 32
	op, _ := simulate.NewCartesian(n, n, allTrue(n*n))
	reg, _ := NewTikhonov(TikhonovGradient, n, n, BoundaryPeriodic)
	s, _ := NewTikhonovSolver(op, reg, 0.5)
	y := seededComplex(n*n, 1)
	x := make([]complex128, n*n)
	opt := CGOptions{MaxIter: 5, Tol: 0}
	if a := testing.AllocsPerRun(3, func() { clear(x); _, _ = s.Solve(x, y, opt); reg.Prox(x, x, 0.2) }); a != 0 {
		t.Errorf("Solve and Prox allocate %v times", a)
	}
}

// Tikhonov reconstruction of fully sampled data matches x = Eᴴy/(1+λ).
func ExampleTikhonovSolver() {
	const n = 16
	mask := make([]bool, n*n)
	for i := range mask {
		mask[i] = true
	}
	op, _ := simulate.NewCartesian(n, n, mask)
	y := seededComplex(op.DataLen(), 3)
	reg, _ := NewTikhonov(TikhonovIdentity, n, n, BoundaryNeumann)
	s, _ := NewTikhonovSolver(op, reg, 0.5)
	x := make([]complex128, n*n)
	rep, _ := s.Solve(x, y, DefaultCGOptions())
	want := make([]complex128, n*n)
	op.Adjoint(want, y)
	linScale(want, 1/1.5)
	fmt.Printf("converged %v after %d iteration(s), matches Eᴴy/(1+λ): %v\n", rep.Converged, rep.Iterations, relDist(x, want) < 1e-9)
	// Output:
	// converged true after 1 iteration(s), matches Eᴴy/(1+λ): true
}

// BenchmarkTikhonovCGIteration256 measures one CG iteration of the gradient
// Tikhonov normal equations on single-coil 256² Cartesian data (one forward
// and one adjoint FFT, gradient and divergence).
func BenchmarkTikhonovCGIteration256(b *testing.B) {
	const n = 256
	op, y, _ := tvProblem(b, n, 0.25, 0.01, 6)
	reg, _ := NewTikhonov(TikhonovGradient, n, n, BoundaryNeumann)
	s, _ := NewTikhonovSolver(op, reg, 0.01)
	x := make([]complex128, n*n)
	b.ResetTimer()
	if _, err := s.Solve(x, y, CGOptions{MaxIter: b.N, Tol: 0}); err != nil {
		b.Fatal(err)
	}
}
