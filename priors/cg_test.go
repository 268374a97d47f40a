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

// denseHermitian is A = BᴴB + shift·I for a dense complex B, applied
// directly; embed gives the real symmetric 2n×2n matrix [[Re A, −Im A],
// [Im A, Re A]] with which gonum solves the same system in real arithmetic.
type denseHermitian struct {
	n int
	a []complex128 // row-major n×n
}

func newDenseHermitian(n, rows int, shift float64, rng *rand.Rand) *denseHermitian {
	b := make([]complex128, rows*n)
	for i := range b {
		b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	h := &denseHermitian{n: n, a: make([]complex128, n*n)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			var s complex128
			for k := 0; k < rows; k++ {
				s += conjC(b[k*n+i]) * b[k*n+j]
			}
			if i == j {
				s += complex(shift, 0)
			}
			h.a[i*n+j] = s
		}
	}
	return h
}

func (h *denseHermitian) Len() int { return h.n }
func (h *denseHermitian) Apply(dst, src []complex128) {
	for i := 0; i < h.n; i++ {
		var s complex128
		for j, v := range src {
			s += h.a[i*h.n+j] * v
		}
		dst[i] = s
	}
}

func (h *denseHermitian) embed() *mat.SymDense {
	n := h.n
	m := mat.NewSymDense(2*n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			v := h.a[i*n+j]
			m.SetSym(i, j, real(v))
			m.SetSym(n+i, n+j, real(v))
		}
		for j := 0; j < n; j++ {
			m.SetSym(i, n+j, -imag(h.a[i*n+j]))
		}
	}
	return m
}

// TestCGMatchesGonumCholesky solves a complex Hermitian positive definite
// system by CG and compares with gonum's Cholesky solve of its real
// embedding (gonum.org/v1/gonum/mat, Cholesky.SolveVecTo).
func TestCGMatchesGonumCholesky(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	cases := []struct {
		name      string
		n, rows   int
		shift     float64
		tolResult float64
	}{
		{"well conditioned", 30, 60, 1, 1e-9},
		{"square, small shift", 25, 25, 1e-2, 1e-7},
	}
	for _, c := range cases {
		h := newDenseHermitian(c.n, c.rows, c.shift, rng)
		b := make([]complex128, c.n)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		var chol mat.Cholesky
		if !chol.Factorize(h.embed()) {
			t.Fatalf("%s: gonum says the matrix is not positive definite", c.name)
		}
		rb := mat.NewVecDense(2*c.n, nil)
		for i, v := range b {
			rb.SetVec(i, real(v))
			rb.SetVec(c.n+i, imag(v))
		}
		var ref mat.VecDense
		if err := chol.SolveVecTo(&ref, rb); err != nil {
			t.Fatal(err)
		}
		cg, _ := NewCG(c.n)
		x := make([]complex128, c.n)
		rep, err := cg.Solve(h, x, b, CGOptions{MaxIter: 10 * c.n, Tol: 1e-13})
		if err != nil {
			t.Fatal(err)
		}
		var d2, r2 float64
		for i, v := range x {
			w := complex(ref.AtVec(i), ref.AtVec(c.n+i))
			e := v - w
			d2 += real(e)*real(e) + imag(e)*imag(e)
			r2 += real(w)*real(w) + imag(w)*imag(w)
		}
		t.Logf("%s: %d iterations, residual %.1e, distance to gonum %.1e", c.name, rep.Iterations, rep.Residual, math.Sqrt(d2/r2))
		if !rep.Converged || math.Sqrt(d2/r2) > c.tolResult {
			t.Errorf("%s: CG %+v, relative distance to gonum's solution %.2e", c.name, rep, math.Sqrt(d2/r2))
		}
	}
}

// TestCGWarmStartAndZeroRHS: a start at the solution needs no iteration, and
// b = 0 gives x = 0 (the unique solution of a definite system).
func TestCGWarmStartAndZeroRHS(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	h := newDenseHermitian(12, 20, 0.5, rng)
	b := make([]complex128, 12)
	for i := range b {
		b[i] = complex(rng.NormFloat64(), 0)
	}
	cg, _ := NewCG(12)
	x := make([]complex128, 12)
	if _, err := cg.Solve(h, x, b, CGOptions{MaxIter: 200, Tol: 1e-14}); err != nil {
		t.Fatal(err)
	}
	rep, _ := cg.Solve(h, x, b, CGOptions{MaxIter: 200, Tol: 1e-10})
	if rep.Iterations != 0 || !rep.Converged {
		t.Errorf("warm start at the solution ran %d iterations (%+v)", rep.Iterations, rep)
	}
	rep, _ = cg.Solve(h, x, make([]complex128, 12), DefaultCGOptions())
	if !rep.Converged || linNorm(x) != 0 {
		t.Errorf("b = 0 left ‖x‖ = %g", linNorm(x))
	}
}

func TestCGRejects(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	h := newDenseHermitian(4, 4, 1, rng)
	cg, _ := NewCG(4)
	x, b := make([]complex128, 4), make([]complex128, 4)
	cases := []struct {
		name string
		x, b []complex128
		opt  CGOptions
		want string
	}{
		{"short x", x[:3], b, DefaultCGOptions(), "x 3"},
		{"zero iterations", x, b, CGOptions{MaxIter: 0, Tol: 1e-6}, "iterations"},
		{"negative tolerance", x, b, CGOptions{MaxIter: 5, Tol: -1}, "tolerance"},
		{"NaN tolerance", x, b, CGOptions{MaxIter: 5, Tol: math.NaN()}, "tolerance"},
	}
	for _, c := range cases {
		if _, err := cg.Solve(h, c.x, c.b, c.opt); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
	if _, err := NewCG(0); err == nil {
		t.Error("NewCG(0) accepted")
	}
}

// scaleOp is E = c·I, with ‖EᴴE‖ = c².
type scaleOp struct {
	n int
	c float64
}

func (o scaleOp) ImageLen() int { return o.n }
func (o scaleOp) DataLen() int  { return o.n }
func (o scaleOp) Forward(dst, src []complex128) {
	for i, v := range src {
		dst[i] = complex(o.c, 0) * v
	}
}
func (o scaleOp) Adjoint(dst, src []complex128) { o.Forward(dst, src) }

// denseOp is a dense complex m×n matrix operator.
type denseOp struct {
	m, n int
	a    []complex128
}

func (o *denseOp) ImageLen() int { return o.n }
func (o *denseOp) DataLen() int  { return o.m }
func (o *denseOp) Forward(dst, src []complex128) {
	for i := 0; i < o.m; i++ {
		var s complex128
		for j, v := range src {
			s += o.a[i*o.n+j] * v
		}
		dst[i] = s
	}
}
func (o *denseOp) Adjoint(dst, src []complex128) {
	clear(dst)
	for i, v := range src {
		for j := range dst {
			dst[j] += conjC(o.a[i*o.n+j]) * v
		}
	}
}

// TestNormalNorm checks the power iteration on operators of known norm: a
// masked orthonormal FFT (‖E‖² = 1, a partial unitary; its rows are
// orthonormal), a scaled identity (c²), and a dense complex matrix whose
// largest singular value gonum's SVD computes (of the real embedding
// [[Re, −Im], [Im, Re]], which has the same singular values, each twice).
func TestNormalNorm(t *testing.T) {
	const ny, nx = 24, 20
	rng := rand.New(rand.NewPCG(21, 22))
	mask := make([]bool, ny*nx)
	for i := range mask {
		mask[i] = rng.Float64() < 0.3
	}
	cart, err := simulate.NewCartesian(ny, nx, mask)
	if err != nil {
		t.Fatal(err)
	}
	const m, n = 30, 18
	d := &denseOp{m: m, n: n, a: make([]complex128, m*n)}
	emb := mat.NewDense(2*m, 2*n, nil)
	for i := 0; i < m; i++ {
		for j := 0; j < n; j++ {
			v := complex(rng.NormFloat64(), rng.NormFloat64())
			d.a[i*n+j] = v
			emb.Set(i, j, real(v))
			emb.Set(i, n+j, -imag(v))
			emb.Set(m+i, j, imag(v))
			emb.Set(m+i, n+j, real(v))
		}
	}
	var svd mat.SVD
	if !svd.Factorize(emb, mat.SVDNone) {
		t.Fatal("gonum SVD failed")
	}
	smax := svd.Values(nil)[0]
	cases := []struct {
		name string
		op   simulate.Operator
		want float64
		tol  float64
	}{
		{"masked orthonormal FFT", cart, 1, 1e-12},
		{"2.5·I", scaleOp{n: 50, c: 2.5}, 6.25, 1e-12},
		{"dense complex 30×18 (gonum SVD)", d, smax * smax, 1e-8},
	}
	for _, c := range cases {
		got, err := NormalNorm(c.op, 2000, 1e-14, 3)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-c.want) > c.tol*c.want || got > c.want*(1+1e-12) {
			t.Errorf("%s: ‖EᴴE‖ = %.15g, want %.15g", c.name, got, c.want)
		}
	}
	if _, err := NormalNorm(nil, 10, 0, 1); err == nil {
		t.Error("nil operator accepted")
	}
	if _, err := NormalNorm(cart, 0, 0, 1); err == nil {
		t.Error("0 iterations accepted")
	}
	if _, err := NormalNorm(cart, 5, -1, 1); err == nil {
		t.Error("negative tolerance accepted")
	}
}

func TestCGAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	h := newDenseHermitian(16, 20, 1, rng)
	cg, _ := NewCG(16)
	x, b := make([]complex128, 16), make([]complex128, 16)
	for i := range b {
		b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	opt := CGOptions{MaxIter: 8, Tol: 0}
	if a := testing.AllocsPerRun(5, func() { clear(x); _, _ = cg.Solve(h, x, b, opt) }); a != 0 {
		t.Errorf("CG.Solve allocates %v times", a)
	}
}

// The power iteration finds ‖EᴴE‖ = 1 for a masked orthonormal FFT.
func ExampleNormalNorm() {
	const n = 32
	mask := make([]bool, n*n)
	for i := range mask {
		mask[i] = i%3 == 0
	}
	op, _ := simulate.NewCartesian(n, n, mask)
	l, _ := NormalNorm(op, 50, 1e-9, 1)
	fmt.Printf("‖EᴴE‖ ≈ %.6f\n", l)
	// Output:
	// ‖EᴴE‖ ≈ 1.000000
}

// CG on a small Hermitian positive definite system.
func ExampleCG() {
	a := &denseHermitian{n: 2, a: []complex128{4, 1i, -1i, 3}} // [[4, i], [−i, 3]]
	b := []complex128{1, 2}
	cg, _ := NewCG(2)
	x := make([]complex128, 2)
	rep, _ := cg.Solve(a, x, b, CGOptions{MaxIter: 10, Tol: 1e-12})
	fmt.Printf("x = (%.4f, %.4f) in %d iterations\n", x[0], x[1], rep.Iterations)
	// By hand: A⁻¹ = [[3, −i], [i, 4]]/11, so x = (3−2i, 8+i)/11.
	// Output:
	// x = ((0.2727-0.1818i), (0.7273+0.0909i)) in 2 iterations
}
