package wavelet

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"accelplan/internal/benchcpu"
)

// fixture mirrors testdata/wavelet_fixture.json, written by
// testdata/make_wavelet_fixture.py with PyWavelets 1.1.1 (Debian python3-pywt).
type fixture struct {
	Generator string `json:"generator"`
	Filters   map[string]struct {
		DecLo []float64 `json:"dec_lo"`
		DecHi []float64 `json:"dec_hi"`
		RecLo []float64 `json:"rec_lo"`
		RecHi []float64 `json:"rec_hi"`
	} `json:"filters"`
	MaxLevel   [][3]int `json:"max_level"`
	Transforms []struct {
		Ny, Nx, Levels int
		Name           string
		Re, Im         []float64
	} `json:"transforms"`
	Shrinks []struct {
		Ny, Nx, Levels int
		Name           string
		Threshold      float64
		Re, Im         []float64
	} `json:"shrinks"`
}

func loadFixture(t *testing.T) fixture {
	t.Helper()
	b, err := os.ReadFile("testdata/wavelet_fixture.json")
	if err != nil {
		t.Fatal(err)
	}
	var f fixture
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(f.Generator, "PyWavelets") {
		t.Fatalf("fixture generator %q, want PyWavelets", f.Generator)
	}
	return f
}

// lcgImage rebuilds the test image of make_wavelet_fixture.py bit for bit.
func lcgImage(ny, nx int) []complex128 {
	v := func(i int64) float64 {
		return float64((i*1103515245+12345)%(1<<31))/float64(1<<31) - 0.5
	}
	x := make([]complex128, ny*nx)
	for i := range x {
		x[i] = complex(v(int64(i)), v(int64(i)+7919))
	}
	return x
}

func randImage(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return x
}

func norm(x []complex128) float64 {
	var s float64
	for _, v := range x {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return math.Sqrt(s)
}

func maxAbsDiff(a, b []complex128) float64 {
	var m float64
	for i := range a {
		m = math.Max(m, cmplx.Abs(a[i]-b[i]))
	}
	return m
}

// Daubechies I, Ten Lectures on Wavelets, SIAM 1992, Table 6.1 (N = 4), as
// written in REFERENCES.md (12 decimals), in PyWavelets' dec_lo order.
func TestDb4TapsPublished(t *testing.T) {
	want := []float64{-0.010597401785, 0.032883011667, 0.030841381836, -0.187034811719,
		-0.027983769417, 0.630880767930, 0.714846570553, 0.230377813309}
	fb, err := Filters("db4")
	if err != nil {
		t.Fatal(err)
	}
	if fb.Len() != 8 {
		t.Fatalf("db4 has %d taps, want 8", fb.Len())
	}
	for i, w := range want {
		if d := math.Abs(fb.DecLo[i] - w); d > 6e-13 {
			t.Errorf("db4 dec_lo[%d] = %.15f, published %.12f (diff %.2g)", i, fb.DecLo[i], w, d)
		}
	}
}

// All four filters of every name against PyWavelets' Wavelet(name) taps.
func TestFiltersAgainstPyWavelets(t *testing.T) {
	f := loadFixture(t)
	for _, name := range Names() {
		ref, ok := f.Filters[name]
		if !ok {
			t.Fatalf("fixture lacks %s", name)
		}
		fb, err := Filters(name)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []struct {
			what      string
			got, want []float64
		}{
			{"dec_lo", fb.DecLo, ref.DecLo}, {"dec_hi", fb.DecHi, ref.DecHi},
			{"rec_lo", fb.RecLo, ref.RecLo}, {"rec_hi", fb.RecHi, ref.RecHi},
		} {
			if len(c.got) != len(c.want) {
				t.Fatalf("%s %s: %d taps, PyWavelets %d", name, c.what, len(c.got), len(c.want))
			}
			for i := range c.got {
				if d := math.Abs(c.got[i] - c.want[i]); d > 1e-12 {
					t.Errorf("%s %s[%d] = %.17g, PyWavelets %.17g", name, c.what, i, c.got[i], c.want[i])
				}
			}
		}
	}
}

// The defining conditions of an orthonormal Daubechies scaling filter with N
// vanishing moments (Daubechies 1992, ch. 5 and §6.1; chapter numbers from memory, the
// conditions themselves are the textbook ones): Σ h_n = √2,
// Σ h_n h_{n+2k} = δ_k, and Σ (−1)^n n^p h_n = 0 for p = 0 … N−1.
func TestFilterDefiningConditions(t *testing.T) {
	for _, name := range Names() {
		fb, err := Filters(name)
		if err != nil {
			t.Fatal(err)
		}
		h := fb.RecLo
		L := len(h)
		var sum float64
		for _, v := range h {
			sum += v
		}
		if math.Abs(sum-math.Sqrt2) > 1e-13 {
			t.Errorf("%s: Σh = %.16f, want √2", name, sum)
		}
		for k := 0; 2*k < L; k++ {
			var s float64
			for n := 0; n+2*k < L; n++ {
				s += h[n] * h[n+2*k]
			}
			want := 0.0
			if k == 0 {
				want = 1
			}
			if math.Abs(s-want) > 1e-13 {
				t.Errorf("%s: Σ h_n h_{n+%d} = %.3g, want %g", name, 2*k, s, want)
			}
		}
		for p := range fb.Moments {
			var s, scale float64
			for n, v := range h {
				term := math.Pow(float64(n), float64(p)) * v
				if n%2 == 1 {
					term = -term
				}
				s += term
				scale += math.Abs(term)
			}
			if math.Abs(s) > 1e-11*scale {
				t.Errorf("%s: moment %d of the high-pass = %.3g, want 0", name, p, s)
			}
		}
	}
}

func TestFilterNames(t *testing.T) {
	haar, err := Filters("HAAR")
	if err != nil {
		t.Fatal(err)
	}
	if haar.Name != "db1" || haar.Len() != 2 || math.Abs(haar.DecLo[0]-1/math.Sqrt2) > 1e-15 {
		t.Errorf("haar = %+v, want db1 with taps 1/√2 (common practice)", haar)
	}
	for _, bad := range []string{"", "db0", "db11", "sym4", "db", "dbx", "coif2"} {
		if _, err := Filters(bad); err == nil {
			t.Errorf("Filters(%q) gave no error", bad)
		}
	}
}

// MaxLevels follows PyWavelets' dwt_max_level.
func TestMaxLevelsAgainstPyWavelets(t *testing.T) {
	f := loadFixture(t)
	for _, c := range f.MaxLevel {
		if got := MaxLevels(c[0], c[1]); got != c[2] {
			t.Errorf("MaxLevels(%d, %d) = %d, pywt.dwt_max_level %d", c[0], c[1], got, c[2])
		}
	}
}

// Coefficients against pywt.coeffs_to_array(pywt.wavedec2(x, name,
// mode='periodization', level=L)) of the real and imaginary parts.
func TestForwardAgainstPyWavelets(t *testing.T) {
	f := loadFixture(t)
	for _, c := range f.Transforms {
		tr, err := New(c.Ny, c.Nx, c.Levels, c.Name)
		if err != nil {
			t.Fatalf("%s %d×%d L=%d: %v", c.Name, c.Ny, c.Nx, c.Levels, err)
		}
		x := lcgImage(c.Ny, c.Nx)
		got := make([]complex128, len(x))
		tr.Forward(got, x)
		var worst float64
		for i := range got {
			worst = math.Max(worst, math.Abs(real(got[i])-c.Re[i]))
			worst = math.Max(worst, math.Abs(imag(got[i])-c.Im[i]))
		}
		if worst > 1e-12 {
			t.Errorf("%s %d×%d L=%d: max |W x − pywt| = %.3g", c.Name, c.Ny, c.Nx, c.Levels, worst)
		}
		// And back: the inverse of PyWavelets' coefficients is the image.
		coef := make([]complex128, len(x))
		for i := range coef {
			coef[i] = complex(c.Re[i], c.Im[i])
		}
		back := make([]complex128, len(x))
		tr.Inverse(back, coef)
		if d := maxAbsDiff(back, x); d > 1e-12 {
			t.Errorf("%s %d×%d L=%d: inverse of pywt coefficients off by %.3g", c.Name, c.Ny, c.Nx, c.Levels, d)
		}
	}
}

var roundTripCases = []struct {
	ny, nx, levels int
	name           string
}{
	{8, 8, 3, "haar"},
	{16, 32, 2, "db2"},
	{64, 64, 3, "db3"},
	{256, 128, 4, "db4"},
	{96, 160, 3, "db5"},
	{64, 64, 2, "db6"},
	{64, 128, 2, "db7"},
	{128, 128, 3, "db8"},
	{80, 80, 2, "db9"},
	{160, 80, 2, "db10"},
}

func TestPerfectReconstruction(t *testing.T) {
	for i, c := range roundTripCases {
		tr, err := New(c.ny, c.nx, c.levels, c.name)
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		x := randImage(c.ny*c.nx, uint64(i))
		w := make([]complex128, len(x))
		back := make([]complex128, len(x))
		tr.Forward(w, x)
		tr.Inverse(back, w)
		if d := maxAbsDiff(back, x); d > 1e-12 {
			t.Errorf("%+v: max |W⁻¹Wx − x| = %.3g", c, d)
		}
	}
}

// An orthonormal transform is an isometry, and its inverse is its adjoint:
// ‖Wx‖ = ‖x‖ and ⟨Wx, y⟩ = ⟨x, W⁻¹y⟩ (linear algebra, common practice).
func TestIsometryAndAdjoint(t *testing.T) {
	for i, c := range roundTripCases {
		tr, err := New(c.ny, c.nx, c.levels, c.name)
		if err != nil {
			t.Fatal(err)
		}
		n := c.ny * c.nx
		x := randImage(n, uint64(100+i))
		y := randImage(n, uint64(200+i))
		wx := make([]complex128, n)
		wiy := make([]complex128, n)
		tr.Forward(wx, x)
		tr.Inverse(wiy, y)
		if r := math.Abs(norm(wx)-norm(x)) / norm(x); r > 1e-13 {
			t.Errorf("%+v: ‖Wx‖/‖x‖ − 1 = %.3g", c, r)
		}
		var lhs, rhs complex128
		for k := range n {
			lhs += wx[k] * cmplx.Conj(y[k])
			rhs += x[k] * cmplx.Conj(wiy[k])
		}
		if d := cmplx.Abs(lhs-rhs) / (norm(x) * norm(y)); d > 1e-13 {
			t.Errorf("%+v: ⟨Wx,y⟩ − ⟨x,W⁻¹y⟩ = %.3g relative", c, d)
		}
	}
}

// An image that varies only along x has no high-pass content along y, so its
// DetailY and DetailXY bands vanish (Σ g_n = 0 for a high-pass filter, a
// textbook property); likewise with x and y exchanged. This pins the band
// labels returned by Subbands.
func TestBandOrientation(t *testing.T) {
	const ny, nx = 32, 64
	tr, err := New(ny, nx, 2, "db3")
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(7, 8))
	alongX := make([]complex128, ny*nx)
	alongY := make([]complex128, ny*nx)
	colVal := make([]complex128, nx)
	rowVal := make([]complex128, ny)
	for j := range colVal {
		colVal[j] = complex(r.NormFloat64(), r.NormFloat64())
	}
	for i := range rowVal {
		rowVal[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	for i := range ny {
		for j := range nx {
			alongX[i*nx+j] = colVal[j]
			alongY[i*nx+j] = rowVal[i]
		}
	}
	energy := func(c []complex128, b Subband) float64 {
		var s float64
		for i := b.Row0; i < b.Row0+b.Rows; i++ {
			for j := b.Col0; j < b.Col0+b.Cols; j++ {
				v := c[i*nx+j]
				s += real(v)*real(v) + imag(v)*imag(v)
			}
		}
		return s
	}
	cx := make([]complex128, ny*nx)
	cy := make([]complex128, ny*nx)
	tr.Forward(cx, alongX)
	tr.Forward(cy, alongY)
	for _, b := range tr.Subbands() {
		ex, ey := energy(cx, b), energy(cy, b)
		switch b.Kind {
		case DetailY, DetailXY:
			if ex > 1e-24 {
				t.Errorf("x-only image: %v band at level %d has energy %.3g", b.Kind, b.Level, ex)
			}
		case DetailX:
			if ex < 1e-6 {
				t.Errorf("x-only image: %v band at level %d is empty", b.Kind, b.Level)
			}
		}
		switch b.Kind {
		case DetailX, DetailXY:
			if ey > 1e-24 {
				t.Errorf("y-only image: %v band at level %d has energy %.3g", b.Kind, b.Level, ey)
			}
		case DetailY:
			if ey < 1e-6 {
				t.Errorf("y-only image: %v band at level %d is empty", b.Kind, b.Level)
			}
		}
	}
}

// The subbands tile the array exactly once and IsApprox marks the
// approximation band.
func TestSubbandsTile(t *testing.T) {
	tr, err := New(48, 32, 3, "db2")
	if err != nil {
		t.Fatal(err)
	}
	count := make([]int, tr.Len())
	approx := 0
	for _, b := range tr.Subbands() {
		for i := b.Row0; i < b.Row0+b.Rows; i++ {
			for j := b.Col0; j < b.Col0+b.Cols; j++ {
				count[i*tr.Nx()+j]++
				if b.Kind == Approx != tr.IsApprox(i*tr.Nx()+j) {
					t.Fatalf("IsApprox(%d,%d) disagrees with band %v", i, j, b.Kind)
				}
			}
		}
		if b.Kind == Approx {
			approx = b.Rows * b.Cols
		}
	}
	for i, c := range count {
		if c != 1 {
			t.Fatalf("coefficient %d covered %d times", i, c)
		}
	}
	if r, c := tr.ApproxSize(); r != 6 || c != 4 || approx != 24 {
		t.Errorf("approximation %d×%d (%d), want 6×4", r, c, approx)
	}
	if got := len(tr.Subbands()); got != 1+3*3 {
		t.Errorf("%d subbands, want 10", got)
	}
}

func TestInPlace(t *testing.T) {
	tr, err := New(32, 64, 2, "db4")
	if err != nil {
		t.Fatal(err)
	}
	x := randImage(tr.Len(), 42)
	want := make([]complex128, len(x))
	tr.Forward(want, x)
	buf := append([]complex128(nil), x...)
	tr.Forward(buf, buf)
	if d := maxAbsDiff(buf, want); d != 0 {
		t.Errorf("in-place forward differs by %.3g", d)
	}
	tr.Inverse(buf, buf)
	if d := maxAbsDiff(buf, x); d > 1e-12 {
		t.Errorf("in-place round trip off by %.3g", d)
	}
}

func TestCloneIndependent(t *testing.T) {
	for _, name := range []string{"db4", "db3", "db8"} { // pipelined, step-by-step and direct kernels
		testCloneIndependent(t, name)
	}
}

func testCloneIndependent(t *testing.T, name string) {
	tr, err := New(128, 128, 3, name)
	if err != nil {
		t.Fatal(err)
	}
	c := tr.Clone()
	shared := func(a, b []complex128) bool { return len(a) > 0 && &a[0] == &b[0] }
	if shared(c.scratch, tr.scratch) || shared(c.tb, tr.tb) || shared(c.ub, tr.ub) {
		t.Fatalf("%s: clone shares scratch space", name)
	}
	if sk, ok := tr.kern.(*stepKernel); ok && &sk.u[0][0] == &c.kern.(*stepKernel).u[0][0] {
		t.Fatalf("%s: clone shares the kernel's row buffers", name)
	}
	x := randImage(tr.Len(), 3)
	a := make([]complex128, len(x))
	b := make([]complex128, len(x))
	tr.Forward(a, x)
	c.Forward(b, x)
	if d := maxAbsDiff(a, b); d != 0 {
		t.Errorf("clone differs by %.3g", d)
	}
}

func TestNewErrors(t *testing.T) {
	cases := []struct {
		ny, nx, levels int
		name, want     string
	}{
		{64, 64, 2, "sym4", "unknown wavelet"},
		{64, 64, 0, "db2", "at least 1"},
		{0, 64, 1, "db2", "positive"},
		{64, 60, 3, "db2", "not divisible"},
		{30, 64, 2, "db1", "not divisible"},
		{64, 64, 4, "db4", "too deep"}, // 64 < 2^4·7
		{32, 32, 2, "db8", "too deep"}, // 32 < 2^2·15
		{16, 16, 5, "haar", "not divisible"},
	}
	for _, c := range cases {
		_, err := New(c.ny, c.nx, c.levels, c.name)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("New(%d, %d, %d, %q) error %v, want one containing %q", c.ny, c.nx, c.levels, c.name, err, c.want)
		}
	}
	// The deepest accepted levels work.
	if _, err := New(64, 64, 3, "db4"); err != nil {
		t.Errorf("64×64 db4 3 levels: %v", err)
	}
	if _, err := New(16, 16, 4, "haar"); err != nil {
		t.Errorf("16×16 haar 4 levels: %v", err)
	}
}

func TestNoAllocations(t *testing.T) {
	tr, err := New(64, 64, 3, "db4")
	if err != nil {
		t.Fatal(err)
	}
	x := randImage(tr.Len(), 1)
	w := make([]complex128, len(x))
	allocs := testing.AllocsPerRun(20, func() {
		tr.Forward(w, x)
		tr.Inverse(x, w)
	})
	if allocs != 0 {
		t.Errorf("Forward+Inverse allocate %.1f times per call", allocs)
	}
}

func TestLengthMismatchPanics(t *testing.T) {
	tr, err := New(16, 16, 2, "db2")
	if err != nil {
		t.Fatal(err)
	}
	defer func() {
		if recover() == nil {
			t.Error("Forward with a short buffer did not panic")
		}
	}()
	tr.Forward(make([]complex128, 10), make([]complex128, 256))
}

func BenchmarkForwardInverse256Db4L4(b *testing.B) {
	tr, err := New(256, 256, 4, "db4")
	if err != nil {
		b.Fatal(err)
	}
	x := randImage(tr.Len(), 1)
	w := make([]complex128, len(x))
	b.ReportAllocs()
	done := benchcpu.Timer(b)
	for b.Loop() {
		tr.Forward(w, x)
		tr.Inverse(x, w)
	}
	done()
}
