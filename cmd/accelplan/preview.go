package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"accelplan/out"
	"accelplan/plans"
	"accelplan/trajectories"
)

// cmdPreview shows one sampling scheme without a sweep: its acceleration,
// shots, scan time and PSF side-lobe-to-peak, with pictures of the mask or
// trajectory and of the PSF. The scheme comes from a plan (-plan, -scheme,
// -R) or from flags that read like the plan's keys.
func cmdPreview(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("preview", stderr)
	planPath := fs.String("plan", "", "take the scheme from this plan (with -scheme and -R)")
	scheme := fs.Int("scheme", 1, "which [[scheme]] of the plan, from 1")
	r := fs.Float64("R", 0, "acceleration (radial, Cartesian), or interleave / illumination count (spiral, ODT); default: the scheme's first")
	pattern := fs.String("pattern", "cartesian-random", "without -plan: cartesian-uniform, cartesian-random, radial or spiral")
	matrix := fs.Int("matrix", 256, "without -plan: square matrix (phase lines = readout points)")
	calib := fs.Int("calibration-lines", 16, "without -plan: calibration lines (Cartesian)")
	power := fs.Float64("density-power", 3, "without -plan: density power (cartesian-random)")
	order := fs.String("spoke-order", "golden", "without -plan: golden, tiny-golden, uniform, rational-golden (radial)")
	tr := fs.Float64("tr-ms", 5, "without -plan: TR in ms")
	etl := fs.Int("echo-train", 1, "without -plan: echo train length")
	tpsf := fs.Bool("wavelet-psf", false, "also the transform-domain PSF in a Haar wavelet domain (Cartesian; Lustig et al. 2007)")
	outDir := fs.String("out", "accelplan-preview", "folder for the pictures")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: accelplan preview [-plan PLAN.toml -scheme N] [-R R] [-pattern P -matrix N ...] [-wavelet-psf] [-out DIR]")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		return errUsage
	}
	if fs.NArg() != 0 {
		fs.Usage()
		return errUsage
	}
	var p *plans.Plan
	var err error
	if *planPath != "" {
		if p, err = plans.Load(*planPath); err != nil {
			return err
		}
		if *scheme < 1 || *scheme > len(p.Schemes) {
			return fmt.Errorf("-scheme %d: the plan has schemes 1 to %d", *scheme, len(p.Schemes))
		}
		s := p.Schemes[*scheme-1]
		p.Schemes = []plans.Scheme{s}
	} else {
		if p, err = plans.Parse("preview flags", []byte(previewPlan(*pattern, *matrix, *calib, *power, *order, *tr, *etl, *r))); err != nil {
			return err
		}
	}
	if *r != 0 {
		p.Schemes[0].Accelerations = []float64{*r}
	}
	p.Schemes[0].Accelerations = p.Schemes[0].Accelerations[:1]
	cands, err := plans.Candidates(p)
	if err != nil {
		return err
	}
	c := cands[0]
	s := p.Schemes[0]
	smp := c.Sampling
	ny, nx := p.PlaneSize()
	fmt.Fprintf(stdout, "%s (%s), %d×%d\n", s.Label, s.Pattern, ny, nx)
	fmt.Fprintf(stdout, "acceleration R = %.3f (%d of %d %s acquired)\n", smp.R, smp.Shots, smp.FullShots, plans.ShotName(s))
	fmt.Fprintf(stdout, "scan time %s (reference %s)\n", duration(c.ScanTime), duration(plans.ScanTime(p, s, smp.FullShots)))
	fmt.Fprintf(stdout, "PSF side-lobe-to-peak %.4f\n", c.SideLobe)
	if err := os.MkdirAll(*outDir, 0o755); err != nil {
		return fmt.Errorf("cannot create %s: %w", *outDir, err)
	}
	stem := slug(s.Label)
	pic, rows, cols, err := smp.Picture()
	if err != nil {
		return err
	}
	files := []string{filepath.Join(*outDir, stem+"_sampling.png"), filepath.Join(*outDir, stem+"_psf.png")}
	if err := out.WriteGrayPNG(files[0], pic, rows, cols, 0, 1); err != nil {
		return err
	}
	if err := out.WriteGrayPNG(files[1], psfDecibels(c.PSF), ny, nx, -40, 0); err != nil {
		return err
	}
	if *tpsf {
		if smp.Mask == nil {
			return fmt.Errorf("-wavelet-psf needs a Cartesian mask; %s samples off the grid", s.Pattern)
		}
		levels := 3
		// The coefficient at the centre of the finest diagonal band.
		coeff := (ny/2+ny/4)*nx + nx/2 + nx/4
		t, slr, err := trajectories.WaveletPSF(smp.Mask, ny, nx, levels, coeff)
		if err != nil {
			return err
		}
		fmt.Fprintf(stdout, "transform-domain PSF side-lobe-to-peak (Haar, %d levels, a finest-scale coefficient) %.4f\n", levels, slr)
		db := make([]float64, len(t))
		for i, v := range t {
			db[i] = 20 * log10Floor(v)
		}
		name := filepath.Join(*outDir, stem+"_wavelet_psf.png")
		if err := out.WriteGrayPNG(name, db, ny, nx, -40, 0); err != nil {
			return err
		}
		files = append(files, name)
	}
	fmt.Fprintf(stdout, "pictures: %s\n", strings.Join(files, ", "))
	return nil
}

func log10Floor(v float64) float64 {
	if v < 1e-6 {
		return -6
	}
	return log10(v)
}

// previewPlan writes a one-scheme plan from preview flags, so that flags are
// validated exactly like plan keys.
func previewPlan(pattern string, n, calib int, power float64, order string, tr float64, etl int, r float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "title = \"preview\"\n[object]\nphase_lines = %d\nreadout_points = %d\nfov_mm = 220\n", n, n)
	fmt.Fprintf(&b, "[scanner]\ntr_ms = %g\nreference_snr = 30\n", tr)
	if pattern == plans.PatternUniform || pattern == plans.PatternRandom {
		fmt.Fprintf(&b, "echo_train = %d\n", etl)
	}
	fmt.Fprintf(&b, "[[scheme]]\nlabel = %q\npattern = %q\n", pattern, pattern)
	if r == 0 {
		r = 4
	}
	switch pattern {
	case plans.PatternSpiral:
		fmt.Fprintf(&b, "interleaves = [%d]\n", int(r))
	case plans.PatternRadial:
		fmt.Fprintf(&b, "accelerations = [%g]\nspoke_order = %q\n", r, order)
	case plans.PatternRandom:
		fmt.Fprintf(&b, "accelerations = [%g]\ncalibration_lines = %d\ndensity_power = %g\n", r, calib, power)
	default:
		fmt.Fprintf(&b, "accelerations = [%g]\ncalibration_lines = %d\n", r, calib)
	}
	b.WriteString("[[recon]]\nmethod = \"zero-filled\"\n[accept]\nthreshold = 0.5\n")
	return b.String()
}

func log10(v float64) float64 { return math.Log10(v) }
