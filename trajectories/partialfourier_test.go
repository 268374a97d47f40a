package trajectories

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
)

func mustUniform(t *testing.T, ny, nx, step, calib int) Sampling {
	t.Helper()
	s, err := CartesianUniform(ny, nx, step, calib)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestPartialFourierCounts checks the line counts of the usual acquired
// fractions 5/8, 6/8 and 7/8 (common practice) and of the limits ½ and 1
// against fraction·ny, the number of phase-encode lines a partial-Fourier
// scan acquires (Bernstein, King & Zhou, Handbook of MRI Pulse Sequences,
// 2004, from memory: scan time scales with the acquired fraction). The band
// half-widths are worked by hand: B = (fraction − ½)·ny, clipped to ny/2 − 1
// on an even grid and (ny − 1)/2 on an odd one.
func TestPartialFourierCounts(t *testing.T) {
	cases := []struct {
		name             string
		ny, nx           int
		fraction         float64
		shots, kyMin, b  int
		achieved         float64
		firstRow, lastRw int
	}{
		{"half", 256, 4, 0.5, 128, 0, 0, 0.5, 128, 255},
		{"5/8", 256, 4, 5.0 / 8, 160, -32, 32, 0.625, 96, 255},
		{"6/8", 256, 4, 6.0 / 8, 192, -64, 64, 0.75, 64, 255},
		{"7/8", 256, 4, 7.0 / 8, 224, -96, 96, 0.875, 32, 255},
		{"full", 256, 4, 1, 256, -128, 127, 1, 0, 255},
		// ny = 100, 5/8: (0.125·100) = 12.5 rounds away from zero to 13;
		// kept ky = −13 … 49: 63 lines.
		{"5/8 of 100", 100, 3, 5.0 / 8, 63, -13, 13, 0.63, 37, 99},
		// ny = 101 (odd, ky = −50 … 50), 6/8: 0.25·101 = 25.25 → 25; kept
		// ky = −25 … 50: 76 lines, 76/101 of the positions.
		{"6/8 of 101", 101, 3, 6.0 / 8, 76, -25, 25, 76.0 / 101, 25, 100},
		{"full of 101", 101, 3, 1, 101, -50, 50, 1, 0, 100},
		{"single line", 1, 8, 0.75, 1, 0, 0, 1, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := mustUniform(t, c.ny, c.nx, 1, 0)
			got, info, err := PartialFourier(s, c.fraction)
			if err != nil {
				t.Fatal(err)
			}
			if err := got.Validate(); err != nil {
				t.Fatalf("result does not validate: %v", err)
			}
			if got.Shots != c.shots || got.FullShots != c.ny || got.R != float64(c.ny)/float64(c.shots) {
				t.Errorf("shots %d of %d, R %g; want %d of %d, R %g", got.Shots, got.FullShots, got.R, c.shots, c.ny, float64(c.ny)/float64(c.shots))
			}
			if info.KyMin != c.kyMin || info.Band != c.b || info.Fraction != c.fraction {
				t.Errorf("info %+v; want KyMin %d, Band %d, Fraction %g", info, c.kyMin, c.b, c.fraction)
			}
			if math.Abs(info.Achieved-c.achieved) > 1e-15 || math.Abs(info.Achieved-float64(got.Shots)/float64(c.ny)) > 1e-15 {
				t.Errorf("achieved %g; want %g = shots/ny", info.Achieved, c.achieved)
			}
			if got.Lines[0] != c.firstRow || got.Lines[len(got.Lines)-1] != c.lastRw {
				t.Errorf("rows %d…%d; want %d…%d", got.Lines[0], got.Lines[len(got.Lines)-1], c.firstRow, c.lastRw)
			}
			lo, hi := info.BandRows(c.ny)
			for m := lo; m < hi; m++ {
				if !slices.Contains(got.Lines, m) {
					t.Errorf("band row %d not acquired", m)
				}
			}
			if hi-lo != 2*c.b+1 || lo != c.ny/2-c.b {
				t.Errorf("band rows [%d, %d); want %d rows from %d", lo, hi, 2*c.b+1, c.ny/2-c.b)
			}
			if info.Added != 0 {
				t.Errorf("fully sampled input: %d lines added", info.Added)
			}
			if got.Scheme != s.Scheme {
				t.Errorf("scheme %q, want %q kept", got.Scheme, s.Scheme)
			}
		})
	}
}

// TestPartialFourierPairsCoverGrid checks the property that makes partial
// Fourier work: the spectrum of a real image is Hermitian,
// F(−k) = conj F(k) (Bracewell RN, The Fourier Transform and Its
// Applications, 3rd ed., 2000, ch. 2), so the dropped rows can be filled from
// the conjugates of the kept ones. With go-dsp's FFT (an outside reference)
// the test builds the centred k-space of a random real image, keeps only the
// rows of the partial-Fourier mask, fills every missing sample whose
// conjugate partner was kept, and transforms back: the image must return
// exactly, save for the part carried by the one row an even grid cannot pair
// (ky = −ny/2), which is removed from the reference too.
func TestPartialFourierPairsCoverGrid(t *testing.T) {
	for _, c := range []struct {
		ny, nx   int
		fraction float64
	}{{32, 16, 5.0 / 8}, {32, 16, 0.5}, {31, 12, 6.0 / 8}, {24, 9, 7.0 / 8}} {
		s := mustUniform(t, c.ny, c.nx, 1, 0)
		pf, _, err := PartialFourier(s, c.fraction)
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(11, uint64(c.ny)))
		img := make([][]complex128, c.ny)
		for i := range img {
			img[i] = make([]complex128, c.nx)
			for j := range img[i] {
				img[i][j] = complex(rng.Float64(), 0)
			}
		}
		// The centred grid of package simulate puts DC at (ny/2, nx/2): the
		// spectrum index of centred row m is (m − ny/2) mod ny.
		spec := dspfft.FFT2(img)
		wrap := func(v, n int) int { return ((v % n) + n) % n }
		at := func(m, n int) complex128 { return spec[wrap(m-c.ny/2, c.ny)][wrap(n-c.nx/2, c.nx)] }
		filled := make([][]complex128, c.ny)
		ref := make([][]complex128, c.ny)
		for i := range filled {
			filled[i] = make([]complex128, c.nx)
			ref[i] = slices.Clone(spec[i])
		}
		if c.ny%2 == 0 {
			clear(ref[wrap(-c.ny/2, c.ny)]) // the unpaired row
		}
		for m := range c.ny {
			for n := range c.nx {
				ky, kx := m-c.ny/2, n-c.nx/2
				var v complex128
				switch {
				case pf.Mask[m*c.nx+n]:
					v = at(m, n)
				default:
					// The partner −k in centred indexing, −ky taken mod ny
					// (and −kx mod nx) as the DFT is periodic.
					pm, pn := wrap(-ky+c.ny/2, c.ny), wrap(-kx+c.nx/2, c.nx)
					if pf.Mask[pm*c.nx+pn] {
						v = cmplx.Conj(at(pm, pn))
					}
				}
				filled[wrap(ky, c.ny)][wrap(kx, c.nx)] = v
			}
		}
		back := dspfft.IFFT2(filled)
		want := dspfft.IFFT2(ref)
		var e, nrm float64
		for i := range back {
			for j := range back[i] {
				e += cmplx.Abs(back[i][j] - want[i][j])
				nrm += cmplx.Abs(want[i][j])
			}
		}
		if e/nrm > 1e-12 {
			t.Errorf("%d×%d at %g: Hermitian fill leaves relative error %.3g", c.ny, c.nx, c.fraction, e/nrm)
		}
	}
}

// TestPartialFourierUndersampled checks undersampled inputs: the lattice
// lines below −K are dropped, the symmetric band is filled in, and the
// calibration band shrinks to what is still fully acquired. Counts worked by
// hand for ny = 64, step 4 and 5/8 (K = 8):
//   - no calibration band: the band |ky| ≤ 8 holds the lattice rows −8, −4,
//     0, 4, 8 and gains the other 12; above it the lattice rows 12, 16, …, 28
//     remain: 17 + 5 = 22 lines.
//   - a 24-line calibration band (ky = −12 … 11): rows −12 … −9 go, rows −8
//     … 11 stay (20), the band is already complete (nothing added), the
//     lattice adds 12, …, 28 (5): 25 lines. The largest centred band still
//     complete is 17 lines (ky = −8 … 8); 18 would need ky = −9.
func TestPartialFourierUndersampled(t *testing.T) {
	cases := []struct {
		calib, added, wantCalib int
		keep                    func(ky int) bool
	}{
		{0, 12, 0, func(ky int) bool { return ky <= 8 || ky%4 == 0 }},
		{24, 0, 17, func(ky int) bool { return ky <= 11 || ky%4 == 0 }},
	}
	for _, c := range cases {
		s := mustUniform(t, 64, 4, 4, c.calib)
		pf, info, err := PartialFourier(s, 5.0/8)
		if err != nil {
			t.Fatal(err)
		}
		if err := pf.Validate(); err != nil {
			t.Fatal(err)
		}
		var want []int
		for ky := -8; ky <= 31; ky++ {
			if c.keep(ky) {
				want = append(want, ky+32)
			}
		}
		if !slices.Equal(pf.Lines, want) {
			t.Errorf("calib %d: lines %v\nwant  %v", c.calib, pf.Lines, want)
		}
		if info.Band != 8 || info.Added != c.added || pf.Calib != c.wantCalib {
			t.Errorf("calib %d: band %d, added %d, calib %d; want 8, %d, %d", c.calib, info.Band, info.Added, pf.Calib, c.added, c.wantCalib)
		}
		if pf.R != 64/float64(len(want)) {
			t.Errorf("calib %d: R = %g, want %g", c.calib, pf.R, 64/float64(len(want)))
		}
		// The input is untouched and shares nothing with the result.
		again := mustUniform(t, 64, 4, 4, c.calib)
		for i := range pf.Mask {
			pf.Mask[i] = !pf.Mask[i]
		}
		pf.Lines[0] = -1
		if !slices.Equal(s.Mask, again.Mask) || !slices.Equal(s.Lines, again.Lines) {
			t.Errorf("calib %d: the result shares slices with the input", c.calib)
		}
	}
}

func TestPartialFourierBadInput(t *testing.T) {
	good := mustUniform(t, 32, 8, 1, 0)
	radial, err := Radial(RadialSpec{N: 32, Spokes: 8, Order: "uniform"})
	if err != nil {
		t.Fatal(err)
	}
	broken := good
	broken.Lines = slices.Clone(good.Lines[1:])
	cases := []struct {
		name     string
		s        Sampling
		fraction float64
		want     string
	}{
		{"below half", good, 0.49, "must be in [0.5, 1]"},
		{"above one", good, 1.01, "must be in [0.5, 1]"},
		{"NaN", good, math.NaN(), "must be in [0.5, 1]"},
		{"infinite", good, math.Inf(1), "must be in [0.5, 1]"},
		{"radial", radial, 0.75, "needs a cartesian-2d sampling"},
		{"empty", Sampling{}, 0.75, "needs a cartesian-2d sampling"},
		{"inconsistent", broken, 0.75, "invalid sampling"},
	}
	for _, c := range cases {
		_, _, err := PartialFourier(c.s, c.fraction)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// A fully sampled 256-line scan cut to 5/8 of k-space along phase encode.
func ExamplePartialFourier() {
	full, err := CartesianUniform(256, 256, 1, 0)
	if err != nil {
		panic(err)
	}
	pf, info, err := PartialFourier(full, 0.625)
	if err != nil {
		panic(err)
	}
	lo, hi := info.BandRows(pf.Ny)
	fmt.Printf("%d lines, R = %.2f, ky from %d, symmetric band rows %d…%d\n", pf.Shots, pf.R, info.KyMin, lo, hi-1)
	// Output: 160 lines, R = 1.60, ky from -32, symmetric band rows 96…160
}
