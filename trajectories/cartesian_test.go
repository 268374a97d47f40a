package trajectories

import (
	"math"
	"math/cmplx"
	"slices"
	"strings"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
)

func TestLinesForR(t *testing.T) {
	// round(ny/r): worked by hand.
	cases := []struct {
		ny      int
		r       float64
		want    int
		wantErr string
	}{
		{256, 1, 256, ""},
		{256, 4, 64, ""},
		{256, 3, 85, ""},    // 85.33 → 85
		{256, 2.5, 102, ""}, // 102.4 → 102
		{7, 7, 1, ""},
		{256, 0.5, 0, "must be in [1, 256]"},
		{256, 300, 0, "must be in [1, 256]"},
		{256, math.NaN(), 0, "must be in"},
		{0, 2, 0, "ny = 0"},
	}
	for _, c := range cases {
		got, err := LinesForR(c.ny, c.r)
		if c.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), c.wantErr) {
				t.Errorf("LinesForR(%d, %g) error = %v, want containing %q", c.ny, c.r, err, c.wantErr)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("LinesForR(%d, %g) = %d, %v; want %d", c.ny, c.r, got, err, c.want)
		}
	}
}

func TestCartesianUniformCounts(t *testing.T) {
	// Counts worked by hand. ny = 256, step 4: ky = -128..127, multiples of 4
	// give 64 lines. A 24-line band covers ky = -12..11, of which -12, -8, -4,
	// 0, 4, 8 are already on the lattice: 64 + 24 - 6 = 82 lines.
	// ny = 255, step 4: ky = -127..127, multiples of 4 from -124 to 124: 63.
	cases := []struct {
		ny, nx, step, calib int
		wantShots           int
	}{
		{256, 8, 1, 0, 256},
		{256, 8, 4, 0, 64},
		{256, 8, 4, 24, 82},
		{255, 3, 4, 0, 63},
		{256, 2, 256, 0, 1},
		{256, 2, 256, 256, 256},
		{10, 4, 3, 1, 3}, // ky = -5..4: -3, 0, 3; the 1-line band is DC, already on the lattice
		{10, 4, 3, 4, 6}, // band ky = -2..1 adds -2, -1, 1 to -3, 0, 3 → 6
	}
	for _, c := range cases {
		s, err := CartesianUniform(c.ny, c.nx, c.step, c.calib)
		if err != nil {
			t.Fatalf("CartesianUniform(%d,%d,%d,%d): %v", c.ny, c.nx, c.step, c.calib, err)
		}
		if s.Shots != c.wantShots || len(s.Lines) != c.wantShots {
			t.Errorf("CartesianUniform(%d,%d,%d,%d): shots %d, lines %d, want %d", c.ny, c.nx, c.step, c.calib, s.Shots, len(s.Lines), c.wantShots)
		}
		if wantR := float64(c.ny) / float64(c.wantShots); s.R != wantR || s.FullShots != c.ny {
			t.Errorf("R = %g (full %d), want %g", s.R, s.FullShots, wantR)
		}
		if err := s.Validate(); err != nil {
			t.Errorf("Validate: %v", err)
		}
		if !slices.Contains(s.Lines, c.ny/2) {
			t.Errorf("DC row %d not acquired", c.ny/2)
		}
		checkBand(t, s, c.calib)
		// Every acquired line is on the lattice or in the band.
		lo, hi := c.ny/2-c.calib/2, c.ny/2-c.calib/2+c.calib
		for _, m := range s.Lines {
			ky := m - c.ny/2
			if ky%c.step != 0 && (m < lo || m >= hi) {
				t.Errorf("line %d (ky %d) neither on the step-%d lattice nor in the band", m, ky, c.step)
			}
		}
	}
}

// checkBand asserts that the calib central rows (ky = -calib/2 .. ) are all
// acquired, along their whole readout.
func checkBand(t *testing.T, s Sampling, calib int) {
	t.Helper()
	for d := range calib {
		m := s.Ny/2 - calib/2 + d
		for n := range s.Nx {
			if !s.Mask[m*s.Nx+n] {
				t.Fatalf("calibration row %d column %d not sampled", m, n)
			}
		}
	}
}

func TestBadInput(t *testing.T) {
	cases := []struct {
		name    string
		run     func() error
		wantErr string
	}{
		{"uniform step 0", func() error { _, e := CartesianUniform(64, 64, 0, 0); return e }, "line step = 0"},
		{"uniform step > ny", func() error { _, e := CartesianUniform(64, 64, 65, 0); return e }, "[1, 64]"},
		{"uniform calib > ny", func() error { _, e := CartesianUniform(64, 64, 2, 65); return e }, "calibration lines = 65"},
		{"uniform calib < 0", func() error { _, e := CartesianUniform(64, 64, 2, -1); return e }, "calibration lines = -1"},
		{"uniform nx 0", func() error { _, e := CartesianUniform(64, 0, 2, 0); return e }, "nx = 0"},
		{"random lines 0", func() error { _, e := CartesianRandom(64, 64, 0, 0, 2, 1); return e }, "lines = 0"},
		{"random lines > ny", func() error { _, e := CartesianRandom(64, 64, 65, 0, 2, 1); return e }, "lines = 65"},
		{"random calib > lines", func() error { _, e := CartesianRandom(64, 64, 10, 12, 2, 1); return e }, "exceed the 10 lines"},
		{"random calib > ny", func() error { _, e := CartesianRandom(64, 64, 64, 70, 2, 1); return e }, "calibration lines = 70"},
		{"random power < 0", func() error { _, e := CartesianRandom(64, 64, 16, 4, -1, 1); return e }, "density power"},
		{"random power NaN", func() error { _, e := CartesianRandom(64, 64, 16, 4, math.NaN(), 1); return e }, "density power"},
		{"random power Inf", func() error { _, e := CartesianRandom(64, 64, 16, 4, math.Inf(1), 1); return e }, "density power"},
		{"random ny 0", func() error { _, e := CartesianRandom(0, 64, 1, 0, 1, 1); return e }, "ny = 0"},
		{"random nx 0", func() error { _, e := CartesianRandom(64, 0, 1, 0, 1, 1); return e }, "nx = 0"},
		{"psf wrong length", func() error { _, e := MaskPSF(make([]bool, 5), 2, 2); return e }, "mask length"},
	}
	for _, c := range cases {
		err := c.run()
		if err == nil || !strings.Contains(err.Error(), c.wantErr) {
			t.Errorf("%s: error = %v, want containing %q", c.name, err, c.wantErr)
		}
	}
}

func TestCartesianRandomExactCount(t *testing.T) {
	cases := []struct {
		ny, lines, calib int
		power            float64
	}{
		{256, 64, 24, 2}, {256, 64, 0, 2}, {256, 85, 16, 3}, {256, 256, 10, 2},
		{256, 255, 0, 8}, {255, 51, 11, 1}, {64, 20, 20, 2}, {64, 1, 0, 0},
		{64, 1, 1, 5}, {128, 40, 8, 0}, {128, 120, 8, 12}, {7, 3, 2, 1},
	}
	for _, c := range cases {
		for seed := range uint64(20) {
			s, err := CartesianRandom(c.ny, 4, c.lines, c.calib, c.power, seed)
			if err != nil {
				t.Fatalf("%+v seed %d: %v", c, seed, err)
			}
			if s.Shots != c.lines {
				t.Fatalf("%+v seed %d: %d shots, want exactly %d", c, seed, s.Shots, c.lines)
			}
			if want := float64(c.ny) / float64(c.lines); s.R != want {
				t.Fatalf("R = %g, want %g", s.R, want)
			}
			if err := s.Validate(); err != nil {
				t.Fatalf("Validate: %v", err)
			}
			checkBand(t, s, c.calib)
		}
	}
}

func TestCartesianRandomDeterministic(t *testing.T) {
	a, _ := CartesianRandom(256, 16, 64, 16, 2, 42)
	b, _ := CartesianRandom(256, 16, 64, 16, 2, 42)
	c, _ := CartesianRandom(256, 16, 64, 16, 2, 43)
	if !slices.Equal(a.Lines, b.Lines) || !slices.Equal(a.Mask, b.Mask) {
		t.Fatal("same seed gave different samplings")
	}
	if slices.Equal(a.Lines, c.Lines) {
		t.Fatal("seeds 42 and 43 gave identical line sets (48 random lines of 240)")
	}
}

func TestLineProbabilities(t *testing.T) {
	const ny, lines, calib = 256, 64, 16
	for _, power := range []float64{0, 1, 2, 4, 10} {
		p, err := LineProbabilities(ny, lines, calib, power)
		if err != nil {
			t.Fatal(err)
		}
		sum := 0.0
		for _, v := range p {
			if v < 0 || v > 1 {
				t.Fatalf("power %g: probability %g outside [0, 1]", power, v)
			}
			sum += v
		}
		if math.Abs(sum-lines) > 1e-9 {
			t.Errorf("power %g: probabilities sum to %.12g, want %d", power, sum, lines)
		}
		// Density falls (never rises) with |ky| (Lustig 2007 polynomial
		// density); strictly for power > 0 where not clipped at 1.
		for m := range ny {
			ky := m - ny/2
			for _, m2 := range []int{m - 1, m + 1} {
				if m2 < 0 || m2 >= ny {
					continue
				}
				ky2 := m2 - ny/2
				if abs(ky2) > abs(ky) && p[m2] > p[m]+1e-15 {
					t.Fatalf("power %g: p(ky=%d) = %g > p(ky=%d) = %g", power, ky2, p[m2], ky, p[m])
				}
			}
		}
		// The shape outside the band is the published polynomial, up to one
		// scale, wherever it is not clipped: check ratios.
		kmax := float64(ny/2) + 1
		ref := ny/2 + 60 // ky = 60, far from the band and low enough to be unclipped
		for _, ky := range []int{20, 40, 80, 120, -100} {
			m := ny/2 + ky
			if p[m] >= 1 || p[ref] >= 1 {
				continue
			}
			want := math.Pow((1-math.Abs(float64(ky))/kmax)/(1-60/kmax), power)
			if got := p[m] / p[ref]; math.Abs(got-want) > 1e-9*want {
				t.Errorf("power %g: p(%d)/p(60) = %g, want %g", power, ky, got, want)
			}
		}
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// TestCartesianRandomInclusionFrequencies checks, over many seeds, that each
// row is acquired with the probability LineProbabilities states: the
// empirical frequency stays within 5 binomial standard deviations.
func TestCartesianRandomInclusionFrequencies(t *testing.T) {
	const ny, lines, calib, power, draws = 64, 20, 4, 2.0, 3000
	p, err := LineProbabilities(ny, lines, calib, power)
	if err != nil {
		t.Fatal(err)
	}
	count := make([]int, ny)
	for seed := range uint64(draws) {
		s, err := CartesianRandom(ny, 1, lines, calib, power, seed)
		if err != nil {
			t.Fatal(err)
		}
		for _, m := range s.Lines {
			count[m]++
		}
	}
	for m := range ny {
		f := float64(count[m]) / draws
		sd := math.Sqrt(p[m]*(1-p[m])/draws) + 1e-12
		if math.Abs(f-p[m]) > 5*sd+1e-12 {
			t.Errorf("row %d (ky %d): frequency %.4f, probability %.4f (sd %.4f)", m, m-ny/2, f, p[m], sd)
		}
	}
	// Density falls with |k|: the central eighth outside the band is
	// sampled more often than the outer eighth.
	inner, outer := 0, 0
	for m := range ny {
		ky := abs(m - ny/2)
		if ky > calib/2 && ky <= calib/2+ny/16 {
			inner += count[m]
		}
		if ky > ny/2-ny/16 {
			outer += count[m]
		}
	}
	if inner <= 2*outer {
		t.Errorf("inner rows drawn %d times, outer %d: density does not fall with |k|", inner, outer)
	}
}

// directPSF is the definition of the PSF, written out as a direct sum:
// psf(y, x) = 1/(nx·ny) Σ mask(ky, kx) exp(+2πi(ky·y + kx·x)) with y = i − ny/2
// rows, ky = m − ny/2 (and likewise in x).
func directPSF(mask []bool, ny, nx int) []complex128 {
	out := make([]complex128, ny*nx)
	for i := range ny {
		for j := range nx {
			var acc complex128
			for m := range ny {
				for n := range nx {
					if !mask[m*nx+n] {
						continue
					}
					ph := 2 * math.Pi * (float64((m-ny/2)*(i-ny/2))/float64(ny) + float64((n-nx/2)*(j-nx/2))/float64(nx))
					acc += cmplx.Exp(complex(0, ph))
				}
			}
			out[i*nx+j] = acc / complex(float64(ny*nx), 0)
		}
	}
	return out
}

func TestMaskPSFMatchesDefinition(t *testing.T) {
	// Odd and even sizes, against the direct sum of the definition.
	for _, sz := range [][2]int{{9, 5}, {8, 6}, {7, 8}, {12, 12}} {
		ny, nx := sz[0], sz[1]
		s, err := CartesianRandom(ny, nx, ny/2+1, 1, 2, 7)
		if err != nil {
			t.Fatal(err)
		}
		got, err := s.PSF()
		if err != nil {
			t.Fatal(err)
		}
		want := directPSF(s.Mask, ny, nx)
		for i := range got {
			if cmplx.Abs(got[i]-want[i]) > 1e-12 {
				t.Fatalf("%d×%d: psf[%d] = %v, direct sum %v", ny, nx, i, got[i], want[i])
			}
		}
	}
}

func TestMaskPSFMatchesGoDSP(t *testing.T) {
	// Reference: github.com/mjibson/go-dsp/fft.IFFT2 (normalised by 1/N) on
	// the mask moved to FFT order, result moved back to the centred grid.
	const ny, nx = 64, 48
	s, err := CartesianRandom(ny, nx, 24, 8, 3, 11)
	if err != nil {
		t.Fatal(err)
	}
	x := make([][]complex128, ny)
	for r := range ny {
		x[r] = make([]complex128, nx)
	}
	for m := range ny {
		for n := range nx {
			if s.Mask[m*nx+n] {
				x[(m+ny/2)%ny][(n+nx/2)%nx] = 1 // even sizes: shift by half
			}
		}
	}
	y := dspfft.IFFT2(x)
	got, _ := s.PSF()
	for i := range ny {
		for j := range nx {
			ref := y[(i+ny/2)%ny][(j+nx/2)%nx]
			if cmplx.Abs(got[i*nx+j]-ref) > 1e-12 {
				t.Fatalf("psf(%d,%d) = %v, go-dsp %v", i, j, got[i*nx+j], ref)
			}
		}
	}
}

// TestUniformPSFReplicas: uniform undersampling by R without calibration
// folds the image R times, with replicas exactly FOV/R apart along the
// phase-encode direction, each of height 1/R relative to the fully sampled
// peak (common practice; any MRI textbook, REFERENCES.md "Sampling").
func TestUniformPSFReplicas(t *testing.T) {
	for _, c := range []struct{ ny, nx, r int }{{256, 8, 2}, {256, 8, 4}, {240, 6, 3}, {240, 6, 5}, {64, 4, 8}} {
		s, err := CartesianUniform(c.ny, c.nx, c.r, 0)
		if err != nil {
			t.Fatal(err)
		}
		if s.R != float64(c.r) {
			t.Fatalf("R = %g, want %d", s.R, c.r)
		}
		psf, err := s.PSF()
		if err != nil {
			t.Fatal(err)
		}
		spacing := c.ny / c.r // FOV/R in pixels
		replicas := 0
		for i := range c.ny {
			for j := range c.nx {
				v := cmplx.Abs(psf[i*c.nx+j])
				onReplica := j == c.nx/2 && (i-c.ny/2)%spacing == 0
				if onReplica {
					replicas++
					if math.Abs(v-1/float64(c.r)) > 1e-12 {
						t.Errorf("R=%d: replica at row %d has height %g, want 1/R = %g", c.r, i, v, 1/float64(c.r))
					}
				} else if v > 1e-12 {
					t.Errorf("R=%d: psf(%d,%d) = %g, want 0 between replicas", c.r, i, j, v)
				}
			}
		}
		if replicas != c.r {
			t.Errorf("R=%d: %d replicas, want R", c.r, replicas)
		}
		sl, err := SideLobeToPeak(psf, c.ny, c.nx)
		if err != nil || math.Abs(sl-1) > 1e-12 {
			t.Errorf("R=%d: side-lobe-to-peak %g (%v), want 1", c.r, sl, err)
		}
	}
}

func TestSideLobeToPeak(t *testing.T) {
	full, _ := CartesianUniform(64, 4, 1, 0)
	psf, _ := full.PSF()
	if sl, err := SideLobeToPeak(psf, 64, 4); err != nil || sl > 1e-12 {
		t.Errorf("full sampling: side-lobe-to-peak %g (%v), want 0", sl, err)
	}
	if math.Abs(cmplx.Abs(psf[32*4+2])-1) > 1e-12 {
		t.Errorf("full sampling: peak %g, want 1", cmplx.Abs(psf[32*4+2]))
	}
	// Random sampling turns the coherent replicas of uniform sampling (ratio
	// 1 at the same R) into incoherent side lobes (Lustig, Donoho & Pauly
	// 2007): averaged over seeds the ratio must be clearly below 1. In 1D the
	// largest off-peak value sits next to the peak, widened by the dense
	// centre, so it stays well above 1/√lines.
	mean := 0.0
	for seed := range uint64(10) {
		s, _ := CartesianRandom(256, 1, 64, 16, 2, seed)
		p, _ := s.PSF()
		sl, err := SideLobeToPeak(p, 256, 1)
		if err != nil {
			t.Fatal(err)
		}
		mean += sl / 10
	}
	if mean >= 0.9 {
		t.Errorf("random R=4 mean side-lobe-to-peak %g, want well below uniform's 1", mean)
	}
	t.Logf("random R=4 (16 calib, power 2) mean side-lobe-to-peak over 10 seeds: %.3f", mean)
}
