package odt

import (
	"math"
	"strings"
	"testing"
)

func TestDemoCell(t *testing.T) {
	cell := DemoCell()
	if err := cell.Validate(); err != nil {
		t.Fatal(err)
	}
	// Documented steps: the first nucleolus sits in the nucleus in the
	// cytoplasm, 0.015 + 0.012 + 0.015 = 0.042 above the medium.
	if n := cell.Index(-1.3, 0.5); math.Abs(n-(1.333+0.042)) > 1e-12 {
		t.Errorf("index in the first nucleolus %g, want 1.375", n)
	}
	if n := cell.Index(2.8, -1.9); math.Abs(n-(1.333+0.015-0.008)) > 1e-12 {
		t.Errorf("index in the vacuole %g, want 1.340", n)
	}
	if n := cell.Index(9, 9); n != 1.333 {
		t.Errorf("index outside %g, want the medium's 1.333", n)
	}
	if _, err := cell.Contrast(16); err != nil {
		t.Errorf("a 16 µm FOV: %v", err)
	}
	if _, err := cell.Contrast(12); err == nil || !strings.Contains(err.Error(), "outside the FOV") {
		t.Errorf("a 12 µm FOV: error %v, want one about the FOV", err)
	}
}

// The exact ellipse decomposition of the Born index contrast agrees with a
// direct evaluation of c = (n² − n_m²)/(2n_m) (the definition in the package
// doc) from the point index, averaged over 8×8 points per pixel: exactly in
// pixels that no boundary crosses, and to the subsampling error elsewhere.
// Its spectrum at k = 0 is the integral of c, the raster's sum over N².
func TestPotentialMatchesPointwiseDefinition(t *testing.T) {
	cell := DemoCell()
	const n, sub, fov = 64, 8, 20.0
	pot, err := cell.Potential(fov)
	if err != nil {
		t.Fatal(err)
	}
	exact := pot.Rasterize(n, n)
	h := fov / n
	avg := make([]float64, n*n)
	uniform := make([]bool, n*n) // every subsample has the same value
	for i := range n {
		for j := range n {
			var sum float64
			lo, hi := math.Inf(1), math.Inf(-1)
			for a := range sub {
				for b := range sub {
					x := (float64(j-n/2) + (float64(b)+0.5)/sub - 0.5) * h
					z := (float64(i-n/2) + (float64(a)+0.5)/sub - 0.5) * h
					idx := cell.Index(x, z)
					c := (idx*idx - cell.Medium*cell.Medium) / (2 * cell.Medium)
					sum += c
					lo, hi = min(lo, c), max(hi, c)
				}
			}
			avg[i*n+j] = sum / (sub * sub)
			uniform[i*n+j] = lo == hi && lo != 0
		}
	}
	var num, den float64
	interior := 0
	for i := 1; i < n-1; i++ {
		for j := 1; j < n-1; j++ {
			k := i*n + j
			e := exact[k]
			num += (e - avg[k]) * (e - avg[k])
			den += e * e
			// A pixel counts as interior when it and its eight neighbours
			// are uniform with one value: no boundary can then cross it.
			in := true
			for di := -1; di <= 1; di++ {
				for dj := -1; dj <= 1; dj++ {
					kk := k + di*n + dj
					in = in && uniform[kk] && avg[kk] == avg[k]
				}
			}
			if in {
				interior++
				if math.Abs(e-avg[k]) > 1e-12 {
					t.Fatalf("pixel (%d, %d) inside one region: exact %g, pointwise %g", i, j, e, avg[k])
				}
			}
		}
	}
	rel := math.Sqrt(num / den)
	t.Logf("%d interior pixels equal; overall ‖exact − pointwise‖/‖exact‖ = %.3g", interior, rel)
	if interior < 300 || rel > 0.01 {
		t.Errorf("%d interior pixels, relative difference %.3g; want ≥ 300 and ≤ 0.01", interior, rel)
	}
	var total float64
	for _, v := range exact {
		total += v
	}
	if dc := real(pot.Spectrum(0, 0)); math.Abs(dc-total/(n*n)) > 1e-12 {
		t.Errorf("spectrum at 0 = %.15g, raster integral %.15g", dc, total/(n*n))
	}
}

func TestSpecimenRejects(t *testing.T) {
	cases := []struct {
		name string
		sp   Specimen
		want string
	}{
		{"no bodies", Specimen{Medium: 1.33}, "no bodies"},
		{"medium", Specimen{Medium: 0.5, Bodies: []Body{{DeltaN: 0.1, A: 1, B: 1}}}, "medium index"},
		{"axis", Specimen{Medium: 1.33, Bodies: []Body{{DeltaN: 0.1, A: 0, B: 1}}}, "semi-axes"},
		{"NaN", Specimen{Medium: 1.33, Bodies: []Body{{DeltaN: math.NaN(), A: 1, B: 1}}}, "non-finite"},
		{"partial overlap", Specimen{Medium: 1.33, Bodies: []Body{{DeltaN: 0.01, A: 2, B: 1}, {DeltaN: 0.01, X: 1.5, A: 1, B: 1}}}, "overlap partially"},
		{"cross", Specimen{Medium: 1.33, Bodies: []Body{{DeltaN: 0.01, A: 3, B: 0.5}, {DeltaN: 0.01, A: 0.5, B: 3}}}, "overlap partially"},
		{"index below 1", Specimen{Medium: 1.0, Bodies: []Body{{DeltaN: -0.1, A: 1, B: 1}}}, "below 1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.sp.Validate()
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
	nested := Specimen{Medium: 1.33, Bodies: []Body{{DeltaN: 0.01, A: 3, B: 2}, {DeltaN: 0.01, X: 0.5, A: 1, B: 1}, {DeltaN: 0.01, X: 0.5, A: 0.4, B: 0.3, ThetaDeg: 45}}}
	if err := nested.Validate(); err != nil {
		t.Errorf("nested bodies rejected: %v", err)
	}
	if v, _ := nested.regionSteps(); math.Abs(v[2]-0.03) > 1e-15 {
		t.Errorf("innermost step %g, want 0.03", v[2])
	}
}

// MaxPhase of a disc is 2π/λ·δn·2a along its diameter (the thickness of a
// disc through its centre; handbook geometry).
func TestMaxPhase(t *testing.T) {
	sp := Specimen{Medium: 1.33, Bodies: []Body{{DeltaN: 0.02, A: 2, B: 2}}}
	want := 2 * math.Pi / 0.5 * 0.02 * 4
	got := sp.MaxPhase(0.5, 0.002)
	if math.Abs(got-want) > 0.005*want {
		t.Errorf("MaxPhase = %g, want %g", got, want)
	}
}
