package fft

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// withSIMD runs f with useSIMD set to on and restores the default after.
func withSIMD(on bool, f func()) {
	defer func() { useSIMD = haveSIMD }()
	useSIMD = on
	f()
}

// simdShapes2D hit the radix-4 column kernels with even runs (256², 64²,
// 128×256, 192², 240², 512²), odd column-block widths that fall back to the
// pure-Go kernels (16×65, 12×66's width-2 block), and the modulated centring
// of 6×10.
var simdShapes2D = [][2]int{{256, 256}, {64, 64}, {128, 256}, {256, 128}, {192, 192}, {240, 240}, {512, 512}, {16, 65}, {12, 66}, {6, 10}, {48, 20}}

// TestSIMDMatches2D checks every 2D entry point on the AVX2 path against the
// project's pure-Go kernels (verified against go-dsp, gonum and numpy by the
// other tests), to 1e-13 relative, out of place and in place.
func TestSIMDMatches2D(t *testing.T) {
	if !haveSIMD {
		t.Skip("CPU without AVX2+FMA: only the pure-Go kernels exist")
	}
	const simdTol = 1e-13
	for _, sh := range simdShapes2D {
		ny, nx := sh[0], sh[1]
		p, err := NewPlan2D(ny, nx)
		if err != nil {
			t.Fatal(err)
		}
		x := randVec(ny*nx, uint64(31*ny+nx))
		for _, tr := range []struct {
			name string
			f    func(dst, src []complex128)
		}{{"Forward", p.Forward}, {"Inverse", p.Inverse}, {"CentredForward", p.CentredForward}, {"CentredInverse", p.CentredInverse}} {
			want := make([]complex128, len(x))
			withSIMD(false, func() { tr.f(want, x) })
			got := make([]complex128, len(x))
			withSIMD(true, func() { tr.f(got, x) })
			if e := relErr(got, want); e > simdTol {
				t.Errorf("%dx%d %s: AVX2 path differs from pure Go by %.3g", ny, nx, tr.name, e)
			}
			copy(got, x)
			withSIMD(true, func() { tr.f(got, got) })
			if e := relErr(got, want); e > simdTol {
				t.Errorf("%dx%d %s in place: AVX2 path differs from pure Go by %.3g", ny, nx, tr.name, e)
			}
		}
	}
}

// TestSIMDMatches1D does the same for 1D lengths whose radix-4 passes have
// even runs (16 = 4·4; 256 and 4096 end with a radix-4 pass of run 64 and
// 1024; 48 and 240 mix radix 3 and 5 in).
func TestSIMDMatches1D(t *testing.T) {
	if !haveSIMD {
		t.Skip("CPU without AVX2+FMA: only the pure-Go kernels exist")
	}
	for _, n := range []int{4, 16, 48, 64, 240, 256, 4096} {
		p, err := NewPlan(n)
		if err != nil {
			t.Fatal(err)
		}
		x := randVec(n, uint64(n))
		for _, inv := range []bool{false, true} {
			f := p.Forward
			if inv {
				f = p.Inverse
			}
			want := make([]complex128, n)
			withSIMD(false, func() { f(want, x) })
			got := make([]complex128, n)
			withSIMD(true, func() { f(got, x) })
			if e := relErr(got, want); e > 1e-13 {
				t.Errorf("n=%d inverse=%v: AVX2 path differs from pure Go by %.3g", n, inv, e)
			}
		}
	}
}

// kernelSet is one radix's pure-Go kernels and their AVX2 counterparts.
type kernelSet struct {
	r        int
	notw     func(y, x []complex128, g *geom, groups int)
	tw       func(y, x []complex128, tw []float64, g *geom)
	last     func(y, x []complex128, g *geom, scale float64)
	passSIMD func(y, x []complex128, tw []float64, g *geom)
	lastSIMD func(y, x []complex128, g *geom, scale float64)
}

// TestSIMDKernels calls the AVX2 pass kernels directly on random radix-4
// and radix-8 geometries (so that the check cannot pass by falling back to
// Go) and compares them with the generated Go kernels rRnotw, rR and rRlast,
// for run lengths 2 to 40, rotated output slots, and output runs that
// coincide with the input runs.
func TestSIMDKernels(t *testing.T) {
	if !haveSIMD {
		t.Skip("CPU without AVX2+FMA: only the pure-Go kernels exist")
	}
	sets := []kernelSet{
		{r: 4, notw: r4notw, tw: r4, last: r4last, passSIMD: r4PassSIMD, lastSIMD: r4LastSIMD},
		{r: 8, notw: r8notw, tw: r8, last: r8last, passSIMD: r8PassSIMD, lastSIMD: r8LastSIMD},
	}
	rnd := rand.New(rand.NewPCG(4, 4))
	for _, ks := range sets {
		r := ks.r
		for s := 2; s <= 40; s += 2 {
			m := 1 + rnd.IntN(5)
			n := r * m * s
			rot := rnd.IntN(r)
			g := geom{m: m, s: s, xstep: s, ystep: r * s}
			for k := range r {
				g.xo[k] = ((k*3 + rot) % r) * m * s // a permutation of the input slots
				g.yo[k] = ((k + rot) % r) * s       // rotated output slots
			}
			x := randVec(n, uint64(s))
			tw := make([]float64, 2*(r-1)*m)
			for i := range tw {
				tw[i] = rnd.NormFloat64()
			}
			for _, mode := range []string{"pass", "last1", "last"} {
				want := make([]complex128, n)
				got := make([]complex128, n)
				switch mode {
				case "pass":
					ks.notw(want, x, &g, 1)
					ks.tw(want, x, tw, &g)
					ks.passSIMD(got, x, tw, &g)
				case "last1":
					ks.notw(want, x, &g, g.m)
					ks.lastSIMD(got, x, &g, 1)
				default:
					ks.last(want, x, &g, 0.37)
					ks.lastSIMD(got, x, &g, 0.37)
				}
				if e := relErr(got, want); e > 1e-15 {
					t.Errorf("radix %d s=%d m=%d %s: AVX2 kernel differs from Go kernel by %.3g", r, s, m, mode, e)
				}
			}
			// In place: one group whose outputs overwrite its inputs.
			g1 := geom{m: 1, s: s}
			for k := range r {
				g1.xo[k] = k * s
				g1.yo[k] = ((k + r/2) % r) * s
			}
			want := make([]complex128, r*s)
			ks.last(want, x[:r*s], &g1, 0.5)
			got := append([]complex128(nil), x[:r*s]...)
			ks.lastSIMD(got, got, &g1, 0.5)
			if e := relErr(got, want); e > 1e-15 {
				t.Errorf("radix %d s=%d in place: AVX2 last kernel differs from Go kernel by %.3g", r, s, e)
			}
		}
	}
}

// TestReferencesOnPureGo runs the reference tests (go-dsp, gonum, numpy,
// the DFT definition, properties) again with the AVX2 kernels switched off,
// so that on an AVX2 machine both paths are checked against the outside
// references. Without AVX2 the ordinary run already covers the Go path.
func TestReferencesOnPureGo(t *testing.T) {
	if !haveSIMD {
		t.Skip("CPU without AVX2+FMA: the other tests already ran on the pure-Go kernels")
	}
	tests := []struct {
		name string
		f    func(*testing.T)
	}{
		{"ForwardAgainstGoDSP", TestForwardAgainstGoDSP},
		{"InverseAgainstGoDSP", TestInverseAgainstGoDSP},
		{"AgainstGonum", TestAgainstGonum},
		{"AgainstDefinitionAllRadices", TestAgainstDefinitionAllRadices},
		{"RandomLengths", TestRandomLengths},
		{"Plan2DAgainstReferences", TestPlan2DAgainstReferences},
		{"AgainstNumpy", TestAgainstNumpy},
		{"CentredAgainstExplicitShifts", TestCentredAgainstExplicitShifts},
		{"RandomShapes", TestRandomShapes},
		{"RoundTripParsevalAlias2D", TestRoundTripParsevalAlias2D},
		{"LargeAgainstGonum", TestLargeAgainstGonum},
		{"NoAllocations", TestNoAllocations},
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("purego/%s", tc.name), func(t *testing.T) {
			withSIMD(false, func() { tc.f(t) })
		})
	}
}
