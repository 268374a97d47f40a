package fft

import (
	"fmt"
	"math"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

func norm2(x []complex128) float64 {
	var s float64
	for _, v := range x {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return s
}

// TestRoundTripParsevalAlias checks, for every 1D size, that Inverse undoes
// Forward, that the orthonormal transform keeps the energy (Parseval's
// identity, textbook property of the unitary DFT) and that dst == src gives
// the same result as separate slices.
func TestRoundTripParsevalAlias(t *testing.T) {
	for _, n := range append(sizes1D, 6, 9, 14, 41, 77, 512, 2048) {
		p, err := NewPlan(n)
		if err != nil {
			t.Fatal(err)
		}
		x := randVec(n, uint64(n)+4000)
		y := make([]complex128, n)
		p.Forward(y, x)
		if e := math.Abs(norm2(y)/norm2(x) - 1); e > tol {
			t.Errorf("n=%d: ‖Fx‖²/‖x‖² - 1 = %.3g", n, e)
		}
		z := make([]complex128, n)
		p.Inverse(z, y)
		if e := relErr(z, x); e > tol {
			t.Errorf("n=%d: round trip error %.3g", n, e)
		}
		a := append([]complex128(nil), x...)
		p.Forward(a, a)
		if e := relErr(a, y); e != 0 {
			t.Errorf("n=%d: in-place Forward differs from out-of-place by %.3g", n, e)
		}
		p.Inverse(a, a)
		if e := relErr(a, z); e != 0 {
			t.Errorf("n=%d: in-place Inverse differs from out-of-place by %.3g", n, e)
		}
		if e := relErr(x, randVec(n, uint64(n)+4000)); e != 0 {
			t.Errorf("n=%d: Forward modified its source", n)
		}
	}
}

func TestRoundTripParsevalAlias2D(t *testing.T) {
	for _, sh := range shapes2D {
		ny, nx := sh[0], sh[1]
		p, err := NewPlan2D(ny, nx)
		if err != nil {
			t.Fatal(err)
		}
		x := randVec(ny*nx, uint64(ny*31+nx))
		for _, pair := range []struct {
			name     string
			fwd, inv func(dst, src []complex128)
		}{
			{"plain", p.Forward, p.Inverse},
			{"centred", p.CentredForward, p.CentredInverse},
		} {
			y := make([]complex128, ny*nx)
			pair.fwd(y, x)
			if e := math.Abs(norm2(y)/norm2(x) - 1); e > tol {
				t.Errorf("%dx%d %s: ‖Fx‖²/‖x‖² - 1 = %.3g", ny, nx, pair.name, e)
			}
			z := make([]complex128, ny*nx)
			pair.inv(z, y)
			if e := relErr(z, x); e > tol {
				t.Errorf("%dx%d %s: round trip error %.3g", ny, nx, pair.name, e)
			}
			a := append([]complex128(nil), x...)
			pair.fwd(a, a)
			if e := relErr(a, y); e != 0 {
				t.Errorf("%dx%d %s: in-place forward differs by %.3g", ny, nx, pair.name, e)
			}
		}
	}
}

// TestCentredDelta: a unit impulse at the image centre (ny/2, nx/2) has a flat
// spectrum of value (ny·nx)^(-1/2), and a constant image puts all its energy
// at DC, (ny/2, nx/2) of the centred k-space (textbook DFT pairs).
func TestCentredDelta(t *testing.T) {
	for _, sh := range [][2]int{{8, 8}, {6, 10}, {5, 7}, {4, 9}, {1, 1}, {3, 2}} {
		ny, nx := sh[0], sh[1]
		p, err := NewPlan2D(ny, nx)
		if err != nil {
			t.Fatal(err)
		}
		n := ny * nx
		x := make([]complex128, n)
		x[(ny/2)*nx+nx/2] = 1
		y := make([]complex128, n)
		p.CentredForward(y, x)
		flat := 1 / math.Sqrt(float64(n))
		for i, v := range y {
			if math.Abs(real(v)-flat) > 1e-15 || math.Abs(imag(v)) > 1e-15 {
				t.Fatalf("%dx%d: k-space sample %d of a centred impulse is %v, want %g", ny, nx, i, v, flat)
			}
		}
		for i := range x {
			x[i] = 1
		}
		p.CentredForward(y, x)
		for i, v := range y {
			want := 0.0
			if i == (ny/2)*nx+nx/2 {
				want = math.Sqrt(float64(n))
			}
			if math.Abs(real(v)-want) > 1e-13 || math.Abs(imag(v)) > 1e-13 {
				t.Fatalf("%dx%d: k-space sample %d of a constant image is %v, want %g", ny, nx, i, v, want)
			}
		}
	}
}

// TestLargeAgainstGonum checks sizes beyond the small tables: a long 1D
// transform and a 2D shape whose column blocks are narrower than the default,
// against gonum's dsp/fourier.CmplxFFT (reference library).
func TestLargeAgainstGonum(t *testing.T) {
	for _, n := range []int{1 << 15, 3 * 5 * 7 * 64, 4099} {
		x := randVec(n, uint64(n))
		want := scaled(fourier.NewCmplxFFT(n).Coefficients(nil, x), 1/math.Sqrt(float64(n)))
		p, err := NewPlan(n)
		if err != nil {
			t.Fatal(err)
		}
		got := make([]complex128, n)
		p.Forward(got, x)
		if e := relErr(got, want); e > tol {
			t.Errorf("n=%d: relative error %.3g against gonum", n, e)
		}
	}
	ny, nx := 1024, 40
	x := randVec(ny*nx, 77)
	p, err := NewPlan2D(ny, nx)
	if err != nil {
		t.Fatal(err)
	}
	got := make([]complex128, ny*nx)
	p.Forward(got, x)
	if e := relErr(got, ref2DGonum(x, ny, nx, false)); e > tol {
		t.Errorf("%dx%d: relative error %.3g against gonum", ny, nx, e)
	}
}

// TestNoAllocations verifies that planned transforms allocate nothing.
func TestNoAllocations(t *testing.T) {
	for _, n := range []int{1, 7, 97, 240, 256} {
		p, _ := NewPlan(n)
		x := randVec(n, 1)
		y := make([]complex128, n)
		if a := testing.AllocsPerRun(20, func() { p.Forward(y, x); p.Inverse(x, x) }); a != 0 {
			t.Errorf("1D n=%d: %v allocations per call", n, a)
		}
	}
	for _, sh := range [][2]int{{256, 256}, {192, 240}, {7, 97}, {5, 8}, {6, 10}, {82, 6}} {
		p, _ := NewPlan2D(sh[0], sh[1])
		x := randVec(sh[0]*sh[1], 2)
		y := make([]complex128, len(x))
		f := func() {
			p.Forward(y, x)
			p.Inverse(y, y)
			p.CentredForward(y, x)
			p.CentredInverse(x, x)
			Shift(y, x, sh[0], sh[1])
			IShift(x, x, sh[0], sh[1])
		}
		if a := testing.AllocsPerRun(5, f); a != 0 {
			t.Errorf("2D %v: %v allocations per call", sh, a)
		}
	}
}

// TestCloneConcurrent runs clones in parallel (meaningful under -race) and
// checks each against the result of the original plan.
func TestCloneConcurrent(t *testing.T) {
	p, _ := NewPlan2D(60, 64)
	x := randVec(60*64, 9)
	want := make([]complex128, len(x))
	p.CentredForward(want, x)
	p1, _ := NewPlan(97)
	x1 := randVec(97, 10)
	want1 := make([]complex128, 97)
	p1.Forward(want1, x1)
	var wg sync.WaitGroup
	errs := make([]float64, 8)
	for g := range errs {
		q, q1 := p.Clone(), p1.Clone()
		wg.Go(func() {
			y := make([]complex128, len(x))
			y1 := make([]complex128, 97)
			for range 20 {
				q.CentredForward(y, x)
				q1.Forward(y1, x1)
			}
			errs[g] = relErr(y, want) + relErr(y1, want1)
		})
	}
	wg.Wait()
	for g, e := range errs {
		if e != 0 {
			t.Errorf("clone %d differs from the original plan by %.3g", g, e)
		}
	}
	if q := p.Clone(); q.Rows() != 60 || q.Cols() != 64 || q.Len() != 60*64 {
		t.Errorf("clone has shape %d×%d (len %d)", q.Rows(), q.Cols(), q.Len())
	}
	if p1.Clone().Len() != 97 {
		t.Error("1D clone has the wrong length")
	}
}

func TestBadInput(t *testing.T) {
	for _, n := range []int{0, -3, maxLen + 1, 1<<24 + 1} { // 2^24+1 = 97·257·673 needs a chirp-z length 2^26
		if _, err := NewPlan(n); err == nil {
			t.Errorf("NewPlan(%d) gave no error", n)
		} else if !strings.HasPrefix(err.Error(), "fft: ") {
			t.Errorf("NewPlan(%d) error %q lacks the package prefix", n, err)
		}
	}
	for _, sh := range [][2]int{{0, 4}, {4, 0}, {-1, -1}, {1 << 16, 1 << 16}} {
		if _, err := NewPlan2D(sh[0], sh[1]); err == nil {
			t.Errorf("NewPlan2D(%d, %d) gave no error", sh[0], sh[1])
		}
	}
	p, _ := NewPlan(8)
	p2, _ := NewPlan2D(4, 4)
	for name, f := range map[string]func(){
		"Plan.Forward short":   func() { p.Forward(make([]complex128, 8), make([]complex128, 7)) },
		"Plan.Inverse long":    func() { p.Inverse(make([]complex128, 9), make([]complex128, 8)) },
		"Plan2D.Forward short": func() { p2.Forward(make([]complex128, 16), make([]complex128, 15)) },
		"Shift mismatch":       func() { Shift(make([]complex128, 16), make([]complex128, 16), 4, 5) },
	} {
		func() {
			defer func() {
				r := recover()
				if r == nil {
					t.Errorf("%s: no panic", name)
				} else if !strings.HasPrefix(fmt.Sprint(r), "fft: ") {
					t.Errorf("%s: panic %q lacks the package prefix", name, r)
				}
			}()
			f()
		}()
	}
}
