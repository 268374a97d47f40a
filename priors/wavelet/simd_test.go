package wavelet

import (
	"math"
	"math/rand/v2"
	"testing"
)

// setSIMD switches the SIMD kernels on or off and returns the function that
// restores the previous setting.
func setSIMD(on bool) func() {
	old := useSIMD
	useSIMD = on && simdAvailable
	return func() { useSIMD = old }
}

// set512 switches the four-row AVX-512F kernels on or off (where the CPU
// has them) and returns the function that restores the previous setting.
func set512(on bool) func() {
	old := use512
	use512 = on && avx512Available
	return func() { use512 = old }
}

// widths lists the settings of use512 that this CPU can run.
func widths() []bool {
	if avx512Available {
		return []bool{false, true}
	}
	return []bool{false}
}

// needSIMD skips a test that compares the two paths on a CPU without the
// instructions of the SIMD kernels, where only the pure-Go path exists.
func needSIMD(t *testing.T) {
	t.Helper()
	if !simdAvailable {
		t.Skip("this CPU lacks the instructions of the SIMD kernels")
	}
}

// relDiff returns max|a−b| / max|b|.
func relDiff(a, b []complex128) float64 {
	var d, m float64
	for i := range a {
		d = math.Max(d, math.Abs(real(a[i])-real(b[i])))
		d = math.Max(d, math.Abs(imag(a[i])-imag(b[i])))
		m = math.Max(m, math.Max(math.Abs(real(b[i])), math.Abs(imag(b[i]))))
	}
	if m == 0 {
		return d
	}
	return d / m
}

// db4 plans whose passes see even and odd numbers of row pairs, the
// shortest rows the transform allows (14 = 2·7 samples at the coarsest
// level) and non-square images.
var simdCases = []struct{ ny, nx, levels int }{
	{16, 16, 1},
	{14, 14, 1},
	{64, 32, 2},
	{32, 64, 2},
	{28, 56, 2},
	{56, 112, 3},
	{256, 256, 4},
	{256, 128, 4},
	{112, 224, 4},
}

// Forward, Inverse and Shrink on the SIMD path equal the pure-Go path (the
// scalar pipelined kernel, itself checked against PyWavelets and the
// step-by-step lifting) to 1e-13 relative, on random complex images.
func TestSIMDMatchesPureGo(t *testing.T) {
	needSIMD(t)
	for i, c := range simdCases {
		tr, err := New(c.ny, c.nx, c.levels, "db4")
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		if _, ok := tr.kern.(*pipelined); !ok {
			t.Fatalf("%+v: db4 plan does not use the pipelined kernel", c)
		}
		x := randImage(tr.Len(), uint64(700+i))
		coef := randImage(tr.Len(), uint64(800+i))
		run := func(on bool) (fw, inv, shr []complex128) {
			defer setSIMD(on)()
			fw = make([]complex128, len(x))
			inv = make([]complex128, len(x))
			shr = make([]complex128, len(x))
			tr.Forward(fw, x)
			tr.Inverse(inv, coef)
			tr.Shrink(shr, x, 0.7)
			return
		}
		fg, ig, sg := run(false)
		for _, w512 := range widths() {
			restore := set512(w512)
			fs, is, ss := run(true)
			restore()
			if d := relDiff(fs, fg); d > 1e-13 {
				t.Errorf("%+v avx512=%v: Forward SIMD vs pure Go: %.3g relative", c, w512, d)
			}
			if d := relDiff(is, ig); d > 1e-13 {
				t.Errorf("%+v avx512=%v: Inverse SIMD vs pure Go: %.3g relative", c, w512, d)
			}
			if d := relDiff(ss, sg); d > 1e-13 {
				t.Errorf("%+v avx512=%v: Shrink SIMD vs pure Go: %.3g relative", c, w512, d)
			}
			if d := relDiff(ss, x); d < 1e-2 {
				t.Errorf("%+v: the threshold barely changes the image (%.3g): a weak case", c, d)
			}
		}
	}
}

// The multi-row passes on 1 … 9 rows (so groups of four, of two and a
// leftover row, in both widths),
// padded input strides and strided output equal the scalar kernel row by
// row (pipelined.forward / inverse, checked against the step-by-step
// lifting), and write nothing outside the output slots of their rows.
func TestRowPassesMatchScalarKernel(t *testing.T) {
	needSIMD(t)
	fb, err := Filters("db4")
	if err != nil {
		t.Fatal(err)
	}
	k := pipelinedFor(liftingFor(fb))
	rng := rand.New(rand.NewPCG(21, 22))
	for _, w512 := range widths() {
		restore := set512(w512)
		testRowPasses(t, k, rng, w512)
		restore()
	}
}

func testRowPasses(t *testing.T, k *pipelined, rng *rand.Rand, w512 bool) {
	for _, n := range []int{14, 16, 18, 34, 100, 256} {
		for _, rows := range []int{1, 2, 3, 4, 5, 6, 7, 9} {
			xs := 2*n + 6 // padded row stride of the input (floats)
			os := 2*rows + 8
			x := make([]float64, rows*xs)
			for i := range x {
				x[i] = rng.NormFloat64()
			}
			want := make([]float64, n*os)
			got := make([]float64, n*os)
			for i := range want {
				want[i], got[i] = -7, -7 // sentinel in the slots no row owns
			}
			for r := range rows {
				k.forward(want[2*r:], os, x[r*xs:r*xs+2*n], n)
			}
			func() {
				defer setSIMD(true)()
				k.forwardRows(got, os, x, xs, rows, n)
			}()
			if d := maxDiff(got, want); d > 1e-13 {
				t.Errorf("avx512=%v n=%d rows=%d: forwardRows vs forward: %.3g", w512, n, rows, d)
			}
			// Synthesis: the output of the analysis, one row per input row.
			src := make([]float64, rows*xs)
			for r := range rows {
				for j := range n {
					copy(src[r*xs+2*j:r*xs+2*j+2], want[2*r+j*os:2*r+j*os+2])
				}
			}
			for i := range want {
				want[i], got[i] = -7, -7
			}
			for r := range rows {
				row := src[r*xs : r*xs+2*n]
				k.inverse(want[2*r:], os, row[:n], row[n:], n)
			}
			func() {
				defer setSIMD(true)()
				k.inverseRows(got, os, src, xs, rows, n)
			}()
			if d := maxDiff(got, want); d > 1e-13 {
				t.Errorf("avx512=%v n=%d rows=%d: inverseRows vs inverse: %.3g", w512, n, rows, d)
			}
			// And the synthesis of the analysis is the input.
			var back float64
			for r := range rows {
				for j := range n {
					back = math.Max(back, math.Abs(got[2*r+j*os]-x[r*xs+2*j]))
					back = math.Max(back, math.Abs(got[2*r+j*os+1]-x[r*xs+2*j+1]))
				}
			}
			if back > 1e-12 {
				t.Errorf("avx512=%v n=%d rows=%d: SIMD synthesis of the analysis off by %.3g", w512, n, rows, back)
			}
		}
	}
}

// The SIMD soft threshold equals SoftThreshold (Donoho 1995; checked
// against hand values in TestSoftThreshold) to 1e-15·|c|, on
// every length, including the scalar tail, zeros, values at the threshold,
// infinities, subnormal and huge moduli, NaN and a zero threshold.
func TestSoftThresholdSIMDMatchesScalar(t *testing.T) {
	needSIMD(t)
	rng := rand.New(rand.NewPCG(31, 32))
	special := []complex128{0, 1, -1i, complex(0.6, 0.8), complex(math.Inf(1), 0), complex(3, math.Inf(-1)),
		complex(-2, 5), complex(3e-310, -1e-310), complex(1e200, -3e199), complex(math.NaN(), 1), 5e-160}
	defer setSIMD(true)()
	for _, thr := range []float64{0, 1e-300, 0.5, 1, 3, math.Inf(1)} {
		for n := range 23 {
			x := make([]complex128, n)
			for i := range x {
				if i < len(special) && n%2 == 1 {
					x[i] = special[(i+n)%len(special)]
				} else {
					x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
				}
			}
			want := append([]complex128(nil), x...)
			SoftThreshold(want, thr)
			got := append([]complex128(nil), x...)
			softThreshold(got, thr)
			for i := range got {
				tol := 1e-15 * math.Hypot(real(x[i]), imag(x[i]))
				if !closeOrSame(real(got[i]), real(want[i]), tol) || !closeOrSame(imag(got[i]), imag(want[i]), tol) {
					t.Errorf("thr=%g n=%d: soft(%v) = %v on the SIMD path, %v in pure Go", thr, n, x[i], got[i], want[i])
				}
			}
		}
	}
}

// closeOrSame reports whether a and b are within tol, or both the same
// infinity, or both NaN.
func closeOrSame(a, b, tol float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && math.IsNaN(b)
	}
	return a == b || math.Abs(a-b) <= tol
}

// Shrink on images whose coefficients have subnormal squared moduli (|c| ≈
// 1e-160, the threshold below them), infinite ones and NaN, where the
// fused four-row kernel declines its outputs and the pass is redone on the
// exact path: the same result as the pure-Go path (to 1e-13 relative, or
// the same infinities and NaN).
func TestShrinkSIMDExtremeValues(t *testing.T) {
	needSIMD(t)
	tr, err := New(64, 64, 3, "db4")
	if err != nil {
		t.Fatal(err)
	}
	tiny := randImage(tr.Len(), 901)
	for i := range tiny {
		tiny[i] *= 1e-160
	}
	inf := randImage(tr.Len(), 902)
	inf[1000] = complex(math.Inf(1), 0)
	nan := randImage(tr.Len(), 903)
	nan[77] = complex(0, math.NaN())
	for _, c := range []struct {
		name string
		x    []complex128
		thr  float64
	}{{"subnormal", tiny, 3e-161}, {"infinity", inf, 0.5}, {"NaN", nan, 0.5}} {
		want := make([]complex128, len(c.x))
		func() {
			defer setSIMD(false)()
			tr.Shrink(want, c.x, c.thr)
		}()
		for _, w512 := range widths() {
			restore := set512(w512)
			got := make([]complex128, len(c.x))
			tr.Shrink(got, c.x, c.thr)
			restore()
			var m float64
			for i := range want {
				m = math.Max(m, math.Max(math.Abs(real(want[i])), math.Abs(imag(want[i]))))
			}
			if m == 0 {
				t.Fatalf("%s: the pure-Go Shrink is zero: a weak case", c.name)
			}
			bad := 0
			for i := range got {
				if !closeOrSame(real(got[i]), real(want[i]), 1e-13*m) || !closeOrSame(imag(got[i]), imag(want[i]), 1e-13*m) {
					bad++
				}
			}
			if bad > 0 {
				t.Errorf("%s avx512=%v: %d values differ from the pure-Go Shrink", c.name, w512, bad)
			}
		}
	}
}

// The pure-Go path on its own against the PyWavelets fixtures, on a CPU
// where the other tests take the SIMD path.
func TestPureGoPathAgainstPyWavelets(t *testing.T) {
	defer setSIMD(false)()
	t.Run("forward", TestForwardAgainstPyWavelets)
	t.Run("shrink", TestShrinkAgainstPyWavelets)
}

// The SIMD path allocates nothing either.
func TestSIMDNoAllocations(t *testing.T) {
	needSIMD(t)
	defer setSIMD(true)()
	tr, err := New(64, 64, 3, "db4")
	if err != nil {
		t.Fatal(err)
	}
	x := randImage(tr.Len(), 1)
	w := make([]complex128, len(x))
	if a := testing.AllocsPerRun(20, func() {
		tr.Forward(w, x)
		tr.Shrink(w, w, 0.3)
		tr.Inverse(x, w)
	}); a != 0 {
		t.Errorf("SIMD path allocates %.1f times per Forward+Shrink+Inverse", a)
	}
}

// The two-row AVX2 kernels alone, for the ratio to the four-row ones.
func BenchmarkShrink256Db4L4AVX2(b *testing.B) {
	defer set512(false)()
	BenchmarkShrink256Db4L4(b)
}

// The two-row AVX2 kernels alone in BenchmarkForwardInverse256Db4L4.
func BenchmarkForwardInverse256Db4L4AVX2(b *testing.B) {
	defer set512(false)()
	BenchmarkForwardInverse256Db4L4(b)
}

// The pure-Go path of the benchmarks, for the before/after ratio.
func BenchmarkShrink256Db4L4PureGo(b *testing.B) {
	defer setSIMD(false)()
	BenchmarkShrink256Db4L4(b)
}

// The pure-Go path of BenchmarkForwardInverse256Db4L4.
func BenchmarkForwardInverse256Db4L4PureGo(b *testing.B) {
	defer setSIMD(false)()
	BenchmarkForwardInverse256Db4L4(b)
}
