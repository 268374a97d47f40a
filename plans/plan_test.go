package plans

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

const minimal = `title = "t"
seed = 7
repeats = 3

[object]
phantom = "modified-shepp-logan"
phase_lines = 64
readout_points = 64
fov_mm = 200

[scanner]
tr_ms = 500
echo_train = 1
averages = 1
reference_snr = 30

[[scheme]]
pattern = "cartesian-uniform"
accelerations = [1, 2]
calibration_lines = 8

[[recon]]
method = "zero-filled"

[accept]
metric = "ssim"
threshold = 0.8
`

func TestBuiltinPlanIsValid(t *testing.T) {
	p, err := Parse("builtin", Builtin())
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Schemes) < 2 || len(p.Recons) < 2 {
		t.Errorf("built-in plan should compare at least two schemes and two methods, has %d and %d", len(p.Schemes), len(p.Recons))
	}
}

func TestParseDefaults(t *testing.T) {
	p, err := Parse("m.toml", []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	if p.Output != "accelplan-out" || p.Schemes[0].Label == "" || p.Recons[0].Label != "zero-filled" {
		t.Errorf("defaults not filled: output %q, scheme label %q, recon label %q", p.Output, p.Schemes[0].Label, p.Recons[0].Label)
	}
}

// TestParseRejects checks that each mistake is refused with the key, the
// line it is on and a hint.
func TestParseRejects(t *testing.T) {
	cases := []struct {
		name    string
		from    string // substring of minimal to replace
		to      string
		key     string
		line    int
		message string
	}{
		{"malformed TOML", `title = "t"`, `title = "t`, "title", 1, "malformed TOML"},
		{"unknown key", "averages = 1", "avrages = 1", "scanner.avrages", 14, "unknown key"},
		{"wrong type", "tr_ms = 500", `tr_ms = "500"`, "scanner.tr_ms", 12, "wrong type"},
		{"R below 1", "accelerations = [1, 2]", "accelerations = [0.5, 2]", "scheme[1].accelerations", 19, "below 1"},
		{"R above line count", "accelerations = [1, 2]", "accelerations = [1, 65]", "scheme[1].accelerations", 19, "above the 64"},
		{"non-integer uniform R", "accelerations = [1, 2]", "accelerations = [1, 2.5]", "scheme[1].accelerations", 19, "whole number"},
		{"threshold out of range", "threshold = 0.8", "threshold = 1.3", "accept.threshold", 27, "strictly between"},
		{"unknown metric", `metric = "ssim"`, `metric = "ssmi"`, "accept.metric", 26, "unknown metric"},
		{"unknown pattern", `pattern = "cartesian-uniform"`, `pattern = "spiralx"`, "scheme[1].pattern", 18, "unknown sampling pattern"},
		{"unknown method", `method = "zero-filled"`, `method = "magic"`, "recon[1].method", 23, "unknown method"},
		{"negative TR", "tr_ms = 500", "tr_ms = -5", "scanner.tr_ms", 12, "between 0 and"},
		{"NaN SNR", "reference_snr = 30", "reference_snr = nan", "scanner.reference_snr", 15, "positive number"},
		{"calibration larger than matrix", "calibration_lines = 8", "calibration_lines = 80", "scheme[1].calibration_lines", 20, "between 0 and"},
		{"one repeat", "repeats = 3", "repeats = 1", "repeats", 3, "between 2 and"},
		{"negative lambda", `method = "zero-filled"`, "method = \"fista-wavelet\"\nlambda = -1", "recon[1].lambda", 24, "finite number"},
		{"zero iterations", `method = "zero-filled"`, "method = \"fista-wavelet\"\niterations = 0", "recon[1].iterations", 24, "must not be 0"},
		{"negative iterations", `method = "zero-filled"`, "method = \"fista-wavelet\"\niterations = -3", "recon[1].iterations", 24, "between 1 and"},
		{"huge matrix", "phase_lines = 64", "phase_lines = 1000000000", "object.phase_lines", 7, "between 16 and 1024"},
		{"unknown method lists choices", `method = "zero-filled"`, `method = "sparse-magic"`, "recon[1].method", 23, "unknown method"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !strings.Contains(minimal, c.from) {
				t.Fatalf("test case does not apply: %q not in plan", c.from)
			}
			_, err := Parse("m.toml", []byte(strings.Replace(minimal, c.from, c.to, 1)))
			var pe *Error
			if !errors.As(err, &pe) {
				t.Fatalf("want a plan error, got %v", err)
			}
			if pe.Key != c.key || pe.Line != c.line || !strings.Contains(pe.Msg, c.message) {
				t.Errorf("got key %q line %d msg %q; want key %q line %d msg containing %q", pe.Key, pe.Line, pe.Msg, c.key, c.line, c.message)
			}
			if pe.File != "m.toml" || !strings.HasPrefix(err.Error(), "m.toml:") {
				t.Errorf("message does not name the file: %v", err)
			}
		})
	}
}

func TestLoadMissingFile(t *testing.T) {
	_, err := Load("/nonexistent/plan.toml")
	if err == nil || !strings.Contains(err.Error(), "does not exist") {
		t.Fatalf("want a does-not-exist error, got %v", err)
	}
}

// Scan-time model: handbook formula TR × lines × averages / echo train length
// (Bernstein et al. 2004), with echo trains rounded up.
func TestCartesian2DTime(t *testing.T) {
	cases := []struct {
		tr              float64
		lines, etl, avg int
		want            float64
	}{
		{500, 256, 1, 1, 128},   // 0.5 s × 256
		{4000, 256, 16, 2, 128}, // 4 s × 16 trains × 2
		{4000, 250, 16, 1, 64},  // 250/16 → 16 trains
		{2.5, 192, 1, 4, 1.92},
	}
	for _, c := range cases {
		if got := Cartesian2DTime(c.tr, c.lines, c.etl, c.avg); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Cartesian2DTime(%v, %d, %d, %d) = %v, want %v", c.tr, c.lines, c.etl, c.avg, got, c.want)
		}
	}
}

// Student-t bound: for x = 1, 2, 3, 4, 5 the mean is 3, s = √2.5 and
// t(0.95, 4) = 2.131847 (any statistics table), so the one-sided lower bound
// is 3 − 2.131847·√2.5/√5 = 1.49256.
func TestSummarize(t *testing.T) {
	s := Summarize([]float64{1, 2, 3, 4, 5})
	if s.N != 5 || math.Abs(s.Mean-3) > 1e-12 || math.Abs(s.Std-math.Sqrt(2.5)) > 1e-12 {
		t.Fatalf("mean/std wrong: %+v", s)
	}
	if want := 3 - 2.131847*math.Sqrt(2.5)/math.Sqrt(5); math.Abs(s.Lower-want) > 1e-5 {
		t.Errorf("lower bound %v, want %v", s.Lower, want)
	}
	if math.Abs((s.Upper-3)-(3-s.Lower)) > 1e-12 {
		t.Errorf("bounds not symmetric: %+v", s)
	}
	if one := Summarize([]float64{2}); !math.IsNaN(one.Lower) {
		t.Errorf("one value must give no bound, got %v", one.Lower)
	}
}

// Uniform undersampling by R can be unfolded by SENSE only with at least R
// coils (Pruessmann et al. 1999); a plan asking more is refused.
func TestCoilsMustSupportR(t *testing.T) {
	text := strings.NewReplacer("reference_snr = 30", "reference_snr = 30\ncoils = 2",
		"accelerations = [1, 2]", "accelerations = [1, 4]",
		`method = "zero-filled"`, `method = "cg-sense"`).Replace(minimal)
	_, err := Parse("m.toml", []byte(text))
	var pe *Error
	if !errors.As(err, &pe) || pe.Key != "scheme[1].accelerations" || !strings.Contains(pe.Hint, "at least R receive coils") {
		t.Fatalf("want a refusal naming the coils, got %v", err)
	}
	single := strings.Replace(minimal, `method = "zero-filled"`, `method = "cg-sense"`, 1)
	if _, err := Parse("m.toml", []byte(single)); err == nil || !strings.Contains(err.Error(), "receive array") {
		t.Errorf("cg-sense with one coil accepted: %v", err)
	}
}

// With 8 coils, CG-SENSE at R = 2 must beat the single-coil zero-filled
// reconstruction of the same mask by a wide margin (the unfolding works).
func TestSENSEUnfolds(t *testing.T) {
	text := strings.NewReplacer("reference_snr = 30", "reference_snr = 60\ncoils = 8",
		"accelerations = [1, 2]", "accelerations = [2]",
		"calibration_lines = 8", "calibration_lines = 0",
		"[[recon]]\nmethod = \"zero-filled\"", "[[recon]]\nmethod = \"zero-filled\"\n[[recon]]\nmethod = \"cg-sense\"\nlambda = 0.001\niterations = 40").Replace(minimal)
	p, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	o, err := Run(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	a := Analyse(o)
	zf, cg := a.Rows[0].NRMSE.Mean, a.Rows[1].NRMSE.Mean
	if !(cg < zf/2) {
		t.Errorf("CG-SENSE NRMSE %.3f not below half the zero-filled %.3f", cg, zf)
	}
}

// Noise maps by pseudo-replicas (Robson et al. 2008): the analytic SENSE
// g-factor is at least 1 everywhere (Pruessmann et al. 1999), the SNR map is
// positive inside the object, and unknown points are refused.
func TestNoiseMaps(t *testing.T) {
	text := strings.NewReplacer("reference_snr = 30", "reference_snr = 40\ncoils = 8",
		"accelerations = [1, 2]", "accelerations = [2]",
		"calibration_lines = 8", "calibration_lines = 0",
		"[[recon]]\nmethod = \"zero-filled\"", "[[recon]]\nmethod = \"cg-sense\"\nlambda = 0.001\niterations = 30").Replace(minimal) +
		"\n[[noise_map]]\nscheme = \"cartesian-uniform 1\"\nR = 2\nrecon = \"cg-sense\"\nreplicas = 12\n"
	p, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	o, err := Run(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	maps, err := NoiseMaps(context.Background(), o)
	if err != nil {
		t.Fatal(err)
	}
	if len(maps) != 1 || maps[0].GAnalytic == nil || maps[0].GReplica == nil || !(maps[0].MeanSNR > 0) {
		t.Fatalf("incomplete noise map %+v", maps)
	}
	for i, in := range o.Support {
		if in && maps[0].GAnalytic[i] < 1-1e-9 {
			t.Fatalf("analytic g = %v < 1 at pixel %d", maps[0].GAnalytic[i], i)
		}
	}
	again, _ := NoiseMaps(context.Background(), o)
	if again[0].MeanSNR != maps[0].MeanSNR {
		t.Error("noise maps are not reproducible")
	}
	bad := strings.Replace(text, "R = 2\nrecon", "R = 3\nrecon", 1)
	if _, err := Parse("m.toml", []byte(bad)); err == nil || !strings.Contains(err.Error(), "noise_map[1].R") {
		t.Errorf("a noise map at an R the scheme lacks was accepted: %v", err)
	}
}

// The time budget follows the handbook model (Bernstein et al. 2004): TR ×
// ⌈lines·(1 + phase oversampling)/echo train⌉ × averages × concatenations,
// plus dummy TRs per concatenation and a calibration scan. Worked example:
// 128 lines × 1.2 → 154 lines, /8 → 20 trains, × 3 s × 2 concatenations =
// 120 s; dummies 2 × 3 s × 2 = 12 s; calibration 6 s; total 138 s.
func TestTimeBudgetWorkedExample(t *testing.T) {
	text := strings.NewReplacer("phase_lines = 64", "phase_lines = 128", "readout_points = 64", "readout_points = 128",
		"tr_ms = 500\necho_train = 1", "tr_ms = 3000\necho_train = 8\nslices = 24\nslice_time_ms = 150\nconcatenations = 2\nphase_oversampling = 0.2\ndummy_scans = 2\ncalibration_scan_s = 6",
		"accelerations = [1, 2]", "accelerations = [1]").Replace(minimal)
	p, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	b := Budget(p, p.Schemes[0], 128)
	if b.Imaging != 120 || b.Dummy != 12 || b.Calibration != 6 || b.Total != 138 || b.Shots != 154 {
		t.Errorf("budget %+v, want imaging 120, dummy 12, calibration 6, total 138, 154 lines", b)
	}
	// 24 slices of 150 ms need 3.6 s: one concatenation does not fit in 3 s.
	bad := strings.Replace(text, "concatenations = 2", "concatenations = 1", 1)
	if _, err := Parse("m.toml", []byte(bad)); err == nil || !strings.Contains(err.Error(), "raise concatenations to at least 2") {
		t.Errorf("slices that do not fit in TR were accepted: %v", err)
	}
}

// Partial Fourier at 5/8 acquires round(5/8·ny) lines (common practice), and
// POCS reconstructs it better than zero-filling the missing lines.
func TestPartialFourierInSweep(t *testing.T) {
	text := strings.NewReplacer("accelerations = [1, 2]", "accelerations = [1]\npartial_fourier = 0.625",
		"calibration_lines = 8", "calibration_lines = 0",
		"reference_snr = 30", "reference_snr = 80",
		"[[recon]]\nmethod = \"zero-filled\"", "[[recon]]\nmethod = \"zero-filled\"\n[[recon]]\nmethod = \"pocs\"").Replace(minimal)
	p, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	o, err := Run(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if got := o.Candidates[0].Sampling.Shots; got != 40 {
		t.Errorf("5/8 of 64 lines: %d acquired, want 40", got)
	}
	a := Analyse(o)
	if zf, pocs := a.Rows[0].NRMSE.Mean, a.Rows[1].NRMSE.Mean; !(pocs < zf) {
		t.Errorf("POCS NRMSE %.4f not below zero-filled %.4f", pocs, zf)
	}
}

// Every built-in plan parses, builds its candidates, and compares at least
// two schemes or methods.
func TestAllBuiltinPlans(t *testing.T) {
	names := BuiltinNames()
	if len(names) < 5 || names[0] != DefaultBuiltin {
		t.Fatalf("built-in plans %v", names)
	}
	for _, n := range names {
		p, err := LoadBuiltinNamed(n)
		if err != nil {
			t.Errorf("%s: %v", n, err)
			continue
		}
		if _, err := Candidates(p); err != nil {
			t.Errorf("%s: candidates: %v", n, err)
		}
		if len(p.Schemes)+len(p.Recons) < 3 {
			t.Errorf("%s compares too little", n)
		}
	}
	if _, err := LoadBuiltinNamed("no-such-plan"); err == nil || !strings.Contains(err.Error(), DefaultBuiltin) {
		t.Errorf("an unknown built-in name should list the choices, got %v", err)
	}
}
