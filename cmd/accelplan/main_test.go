package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"accelplan/plans"
	"accelplan/simulate"
)

// quickPlan is the built-in plan cut down to run in a second.
func quickPlan(out string) string {
	return `title = "quick"
seed = 5
repeats = 2
output = "` + out + `"

[object]
phase_lines = 32
readout_points = 32
fov_mm = 200

[scanner]
tr_ms = 300
reference_snr = 40

[[scheme]]
pattern = "cartesian-uniform"
accelerations = [1, 2]
calibration_lines = 8

[[recon]]
method = "zero-filled"

[accept]
metric = "ssim"
threshold = 0.5
`
}

func runCmd(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = run(args, &o, &e)
	return code, o.String(), e.String()
}

func write(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestRunWritesFolder(t *testing.T) {
	dir := t.TempDir()
	res := filepath.Join(dir, "res")
	plan := filepath.Join(dir, "p.toml")
	write(t, plan, quickPlan(res))
	code, stdout, stderr := runCmd("run", "-quiet", plan)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, f := range []string{"results.csv", "summary.csv", "curve.png", "curve.svg", "recommendation.txt", "plan.toml", "images/truth.png"} {
		if _, err := os.Stat(filepath.Join(res, f)); err != nil {
			t.Errorf("missing %s: %v", f, err)
		}
	}
	if !strings.Contains(stdout, "Recommended:") || !strings.Contains(stdout, "CAUTION") {
		t.Errorf("stdout lacks the recommendation or the caution:\n%s", stdout)
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".res.partial-*"))
	if len(left) != 0 {
		t.Errorf("staging folders left behind: %v", left)
	}
}

// Bad input must give a clear message and a non-zero exit, and must leave
// the results of an earlier run exactly as they were.
func TestBadInputLeavesEarlierResults(t *testing.T) {
	dir := t.TempDir()
	res := filepath.Join(dir, "res")
	good := filepath.Join(dir, "good.toml")
	write(t, good, quickPlan(res))
	if code, _, stderr := runCmd("run", "-quiet", good); code != 0 {
		t.Fatalf("first run failed: %s", stderr)
	}
	before, err := os.ReadFile(filepath.Join(res, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	blocker := filepath.Join(dir, "file")
	write(t, blocker, "not a folder")

	base := quickPlan(res)
	cases := []struct {
		name string
		args []string
		plan string // written to bad.toml when not empty
		want string // in stderr
	}{
		{"missing file", []string{"run", "-quiet", filepath.Join(dir, "absent.toml")}, "", "does not exist"},
		{"malformed TOML", nil, strings.Replace(base, `title = "quick"`, `title = "quick`, 1), "bad.toml:1"},
		{"R below 1", nil, strings.Replace(base, "[1, 2]", "[0, 2]", 1), "scheme[1].accelerations"},
		{"R above line count", nil, strings.Replace(base, "[1, 2]", "[1, 40]", 1), "above the 32 phase-encode lines"},
		{"threshold out of range", nil, strings.Replace(base, "threshold = 0.5", "threshold = 2", 1), "accept.threshold"},
		{"unknown key", nil, strings.Replace(base, "tr_ms", "trms", 1), "unknown key"},
		{"unwritable output", nil, strings.Replace(base, `output = "`+res+`"`, `output = "`+filepath.Join(blocker, "res")+`"`, 1), "cannot create the folder"},
		{"too many arguments", []string{"run", "a.toml", "b.toml"}, "", "usage"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := c.args
			if c.plan != "" {
				bad := filepath.Join(dir, "bad.toml")
				write(t, bad, c.plan)
				args = []string{"run", "-quiet", bad}
			}
			code, _, stderr := runCmd(args...)
			if code == 0 {
				t.Fatalf("exit 0 for bad input")
			}
			if !strings.Contains(stderr, c.want) {
				t.Errorf("stderr %q does not contain %q", stderr, c.want)
			}
			after, err := os.ReadFile(filepath.Join(res, "results.csv"))
			if err != nil || !bytes.Equal(before, after) {
				t.Errorf("earlier results changed or lost (%v)", err)
			}
		})
	}
}

func TestNewWritesBuiltinAndRefusesOverwrite(t *testing.T) {
	path := filepath.Join(t.TempDir(), "plan.toml")
	if code, _, stderr := runCmd("new", path); code != 0 {
		t.Fatalf("new failed: %s", stderr)
	}
	got, _ := os.ReadFile(path)
	if !bytes.Equal(got, plans.Builtin()) {
		t.Error("starter plan differs from the built-in plan")
	}
	if _, err := plans.Load(path); err != nil {
		t.Errorf("starter plan does not load: %v", err)
	}
	if code, _, stderr := runCmd("new", path); code == 0 || !strings.Contains(stderr, "already exists") {
		t.Errorf("overwrote an existing file (exit %d, %q)", code, stderr)
	}
}

func TestCheckListsCandidates(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "p.toml")
	write(t, plan, quickPlan(filepath.Join(dir, "res")))
	code, stdout, stderr := runCmd("check", plan)
	if code != 0 {
		t.Fatalf("check failed: %s", stderr)
	}
	if !strings.Contains(stdout, "valid plan") || !strings.Contains(stdout, "2 candidates") {
		t.Errorf("unexpected check output:\n%s", stdout)
	}
	if _, err := os.Stat(filepath.Join(dir, "res")); err == nil {
		t.Error("check wrote a results folder")
	}
}

func TestUnknownCommand(t *testing.T) {
	if code, _, stderr := runCmd("frobnicate"); code != exitUsage || !strings.Contains(stderr, "unknown command") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	if code, stdout, _ := runCmd("help"); code != 0 || !strings.Contains(stdout, "CAUTION") {
		t.Errorf("help must carry the caution (exit %d)", code)
	}
}

// A full disk (simulated with /dev/full, which fails every write with
// ENOSPC) must stop the run with a clear message and leave earlier results.
func TestFullDiskKeepsEarlierResults(t *testing.T) {
	if _, err := os.Stat("/dev/full"); err != nil {
		t.Skip("no /dev/full on this system")
	}
	dir := t.TempDir()
	res := filepath.Join(dir, "res")
	plan := filepath.Join(dir, "p.toml")
	write(t, plan, quickPlan(res))
	if code, _, stderr := runCmd("run", "-quiet", plan); code != 0 {
		t.Fatalf("first run: %s", stderr)
	}
	before, _ := os.ReadFile(filepath.Join(res, "summary.csv"))
	// Fresh journal whose file is the full device.
	jdir := filepath.Join(dir, ".res.journal")
	if err := os.RemoveAll(jdir); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(jdir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("/dev/full", filepath.Join(jdir, "local.jsonl")); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runCmd("run", "-quiet", plan)
	if code == 0 || !strings.Contains(stderr, "disk full") {
		t.Fatalf("exit %d, stderr %q; want a failure that names the full disk", code, stderr)
	}
	after, err := os.ReadFile(filepath.Join(res, "summary.csv"))
	if err != nil || !bytes.Equal(before, after) {
		t.Errorf("earlier results changed or lost (%v)", err)
	}
}

// Regular undersampling by R without calibration lines folds the image into
// replicas as tall as the peak (any MRI textbook), so the preview must report
// a side-lobe-to-peak of 1 and write its pictures.
func TestPreview(t *testing.T) {
	dir := t.TempDir()
	code, stdout, stderr := runCmd("preview", "-pattern", "cartesian-uniform", "-R", "4", "-calibration-lines", "0", "-matrix", "64", "-wavelet-psf", "-out", dir)
	if code != 0 {
		t.Fatalf("preview failed: %s", stderr)
	}
	for _, want := range []string{"R = 4.000 (16 of 64 lines", "side-lobe-to-peak 1.0000", "transform-domain PSF"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("preview output lacks %q:\n%s", want, stdout)
		}
	}
	for _, f := range []string{"cartesian-uniform_sampling.png", "cartesian-uniform_psf.png", "cartesian-uniform_wavelet_psf.png"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("missing %s", f)
		}
	}
	if code, _, stderr := runCmd("preview", "-pattern", "radial", "-R", "0.5", "-out", dir); code == 0 || !strings.Contains(stderr, "accelerations") {
		t.Errorf("R = 0.5 accepted or unclear: %q", stderr)
	}
}

// The NIfTI-1 exports are read back by nibabel (Debian python3-nibabel), a
// reference reader outside the project: shape, voxels and pixel size.
func TestNIfTIExportsReadByNibabel(t *testing.T) {
	py := "/usr/bin/python3"
	if err := exec.Command(py, "-c", "import nibabel").Run(); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("nibabel is missing under CI: %v", err)
		}
		t.Skip("nibabel not installed")
	}
	dir := t.TempDir()
	res := filepath.Join(dir, "res")
	plan := filepath.Join(dir, "p.toml")
	write(t, plan, quickPlan(res))
	if code, _, stderr := runCmd("run", "-quiet", plan); code != 0 {
		t.Fatalf("run: %s", stderr)
	}
	script := `import sys, json, nibabel, numpy
img = nibabel.load(sys.argv[1])
d = numpy.asarray(img.dataobj, dtype=float)
print(json.dumps({"shape": list(d.shape), "sum": float(d.sum()), "pixdim": [float(v) for v in img.header.get_zooms()]}))`
	outp, err := exec.Command(py, "-c", script, filepath.Join(res, "nifti", "truth.nii")).Output()
	if err != nil {
		t.Fatalf("nibabel could not read truth.nii: %v", err)
	}
	var got struct {
		Shape  []int
		Sum    float64
		Pixdim []float64
	}
	if err := json.Unmarshal(outp, &got); err != nil {
		t.Fatalf("%v: %s", err, outp)
	}
	// The quick plan: 32 × 32 over 200 mm; nibabel's shape is (x, y).
	if len(got.Shape) < 2 || got.Shape[0] != 32 || got.Shape[1] != 32 || math.Abs(got.Pixdim[0]-200.0/32) > 1e-4 {
		t.Errorf("nibabel sees shape %v, pixdim %v", got.Shape, got.Pixdim)
	}
	ph := simulate.ModifiedSheppLogan()
	var want float64
	for _, v := range ph.Rasterize(32, 32) {
		want += v
	}
	if math.Abs(got.Sum-want) > 1e-4*want {
		t.Errorf("voxel sum %v, truth %v (float32 rounding allowed)", got.Sum, want)
	}
	if _, err := os.Stat(filepath.Join(res, "nifti", "cartesian-uniform-1_R2_zero-filled_error.nii")); err != nil {
		t.Error("no error-map export")
	}
}
