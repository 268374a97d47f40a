package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/base64"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"html"
	"image"
	"image/png"
	"io"
	"math"
	"math/cmplx"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"accelplan/out"
	"accelplan/plans"
)

// reportPlan is a small invented study that covers every kind of report
// section: a regular and a variable-density Cartesian scheme, a golden-angle
// radial scheme, the zero-filled adjoint and FISTA with a tuned λ. On a
// 32 × 32 grid it runs in about a second.
func reportPlan(res string, threshold float64) string {
	return `title = "report check"
seed = 5
repeats = 2
output = "` + res + `"

[object]
phase_lines = 32
readout_points = 32
fov_mm = 200

[scanner]
tr_ms = 300
reference_snr = 40

[[scheme]]
label = "regular"
pattern = "cartesian-uniform"
accelerations = [1, 2, 4]
calibration_lines = 8

[[scheme]]
label = "vd-random"
pattern = "cartesian-random"
accelerations = [2, 3]
calibration_lines = 6

[[scheme]]
label = "golden radial"
pattern = "radial"
accelerations = [2, 4]

[[recon]]
method = "zero-filled"

[[recon]]
method = "fista-wavelet"
levels = 2
iterations = 15

[accept]
metric = "ssim"
threshold = ` + strconv.FormatFloat(threshold, 'g', -1, 64) + "\n"
}

// reportCandidates of reportPlan: (3 + 2 + 2) accelerations × 2 methods.
const reportSections = 14

// runReportPlan runs reportPlan through the command line and returns the
// plan path, the results folder and report.html as written.
func runReportPlan(t *testing.T, threshold float64) (planPath, res, page string) {
	t.Helper()
	dir := t.TempDir()
	res = filepath.Join(dir, "res")
	planPath = filepath.Join(dir, "study.toml")
	write(t, planPath, reportPlan(res, threshold))
	if code, _, stderr := runCmd("run", "-quiet", planPath); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(filepath.Join(res, "report.html"))
	if err != nil {
		t.Fatalf("the results folder has no report: %v", err)
	}
	return planPath, res, string(b)
}

// readSummary reads summary.csv of a results folder with encoding/csv
// (RFC 4180) as maps from column name to cell.
func readSummary(t *testing.T, res string) []map[string]string {
	t.Helper()
	f, err := os.Open(filepath.Join(res, "summary.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []map[string]string
	for _, rec := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = rec[i]
		}
		rows = append(rows, m)
	}
	return rows
}

func atof(t *testing.T, s string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return x
}

// minSec formats seconds as the report shows them: m:ss, rounded to the
// nearest second, from ten seconds on, seconds with two decimals below and
// milliseconds below a second (so that optical acquisitions do not read 0:00). Written here from that
// rule rather than taken from the out package.
func minSec(s float64) string {
	if s < 1 {
		return fmt.Sprintf("%.1f ms", s*1000)
	}
	if s < 10 {
		return fmt.Sprintf("%.2f s", s)
	}
	n := int(math.Round(s))
	return fmt.Sprintf("%d:%02d", n/60, n%60)
}

func TestRunWritesReport(t *testing.T) {
	planPath, res, raw := runReportPlan(t, 0.6)
	text := html.UnescapeString(raw)
	rows := readSummary(t, res)
	if len(rows) != reportSections {
		t.Fatalf("summary.csv has %d rows, the plan makes %d", len(rows), reportSections)
	}

	// The recommendation comes first, with the caution beside it.
	iRec, iCurves := strings.Index(raw, `id="recommendation"`), strings.Index(raw, `id="curves"`)
	iTable, iCands := strings.Index(raw, `id="table"`), strings.Index(raw, `id="candidates"`)
	if iRec < 0 || !(iRec < iCurves && iCurves < iTable && iTable < iCands) {
		t.Errorf("sections out of order: recommendation %d, curves %d, table %d, candidates %d", iRec, iCurves, iTable, iCands)
	}
	wantCaution := strings.TrimPrefix(strings.Join(strings.Fields(caution), " "), "CAUTION: ")
	if i := strings.Index(text, wantCaution); i < 0 || i > strings.Index(text, `id="curves"`) {
		t.Errorf("the caution is missing from the recommendation section")
	}

	// The recommended row, as summary.csv has it. Scan time of a 2D
	// Cartesian scan is TR × phase-encode lines × averages / echo train
	// length (common practice; any MRI physics textbook): here TR = 0.3 s,
	// one average, echo train 1, and the reference is all 32 lines.
	var best map[string]string
	for _, r := range rows {
		if r["recommended"] == "overall" {
			best = r
		}
	}
	if best == nil {
		t.Fatal("summary.csv names no recommendation; the bar of this plan is meant to be met")
	}
	lines := atof(t, best["lines"])
	if best["scheme"] == "golden radial" {
		t.Fatalf("the test expects a Cartesian pick, got %v", best)
	}
	scan, ref := 0.3*lines, 0.3*32
	if got := atof(t, best["scan_time_s"]); math.Abs(got-scan) > 1e-9 {
		t.Errorf("scan time %g s, want TR × lines = %g s", got, scan)
	}
	saved := fmt.Sprintf("saves %s (%.1f%%)", minSec(ref-scan), 100*(ref-scan)/ref)
	protocol := fmt.Sprintf("%s, R = %s (%d of 32 lines)", best["scheme"], fmtR(atof(t, best["achieved_R"])), int(lines))
	recSection := text[strings.Index(text, `id="recommendation"`):strings.Index(text, `id="curves"`)]
	for _, want := range []string{"shortest protocol meeting the bar", protocol, saved, minSec(scan),
		"one-sided 95% bound", "how λ was chosen"} {
		if !strings.Contains(recSection, want) {
			t.Errorf("recommendation lacks %q", want)
		}
	}
	if best["method"] == "fista-wavelet" && !strings.Contains(recSection, "golden-section search") {
		t.Error("the recommendation does not say how λ was tuned")
	}

	// One chart per metric, the acceptance metric first.
	charts := regexp.MustCompile(`<figure class="chart"><img src="data:image/png;base64,[^"]+" alt="chart: ([^"]+)"`).FindAllStringSubmatch(text, -1)
	if len(charts) != 3 {
		t.Fatalf("%d charts, want one each for SSIM, PSNR and NRMSE", len(charts))
	}
	for i, want := range []string{"SSIM, the acceptance metric", "PSNR (dB)", "NRMSE"} {
		if charts[i][1] != want {
			t.Errorf("chart %d is %q, want %q", i+1, charts[i][1], want)
		}
	}

	// The summary table has a row per candidate and method.
	table := text[strings.Index(text, `id="table"`):strings.Index(text, `id="candidates"`)]
	if n := strings.Count(table, "<tr class="); n != reportSections {
		t.Errorf("summary table has %d rows, want %d", n, reportSections)
	}

	// One section per candidate × method, each with all five pictures.
	arts := strings.Split(raw, `<article class="cand`)[1:]
	if len(arts) != reportSections {
		t.Fatalf("%d candidate sections, want %d", len(arts), reportSections)
	}
	spokes := 0
	for i, a := range arts {
		for _, kind := range []string{"recon", "truth", "error", "mask", "psf"} {
			if !regexp.MustCompile(`<figure class="fig fig-` + kind + `"><img src="data:image/png;base64,`).MatchString(a) {
				t.Errorf("section %d has no %s picture", i+1, kind)
			}
		}
		if strings.Contains(a, "spokes") {
			spokes++
			if !strings.Contains(a, "trajectory") || !strings.Contains(a, "zero-filled gridding") && !strings.Contains(a, "FISTA") {
				t.Errorf("radial section %d lacks its trajectory caption or method name", i+1)
			}
		}
	}
	if spokes != 4 {
		t.Errorf("%d radial sections, want 4", spokes)
	}
	if n := strings.Count(raw, `<div class="noimg">`); n != 0 {
		t.Errorf("%d pictures are missing", n)
	}

	// Methods by their published names, and how λ was chosen for each.
	for _, want := range []string{"zero-filled inverse FFT", "FISTA", "Beck, Teboulle", "no λ", "tuned by golden-section search"} {
		if !strings.Contains(text, want) {
			t.Errorf("report lacks %q", want)
		}
	}

	// Facts. The plan hash is SHA-256 (FIPS 180-4, Go's crypto/sha256) of
	// the plan file's bytes; the report groups its digits with spaces.
	planBytes, err := os.ReadFile(planPath)
	if err != nil {
		t.Fatal(err)
	}
	sum := fmt.Sprintf("%x", sha256.Sum256(planBytes))
	if !strings.Contains(strings.ReplaceAll(text, " ", ""), sum) {
		t.Errorf("report lacks the plan's SHA-256 %s", sum)
	}
	for _, want := range []string{"<dt>seed</dt><dd>5</dd>", "<dt>plan file</dt><dd>" + filepath.Base(planPath) + "</dd>",
		"accelplan " + version, "2 scored noise draws", "<dt>workers</dt>", "<dt>generated</dt><dd>20"} {
		if !strings.Contains(text, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	// σ as the manifest records it.
	var man struct {
		Sigma float64 `json:"noise_sigma_per_sample"`
	}
	mb, err := os.ReadFile(filepath.Join(res, "manifest.json"))
	if err != nil || json.Unmarshal(mb, &man) != nil {
		t.Fatalf("manifest: %v", err)
	}
	if !strings.Contains(text, "<dd>"+fmtNum(man.Sigma)+" (reference SNR 40") {
		t.Errorf("report lacks σ = %s", fmtNum(man.Sigma))
	}

	// Every embedded picture decodes as PNG (RFC 4648 base64, ISO/IEC 15948
	// PNG, read back with Go's encoding/base64 and image/png): 3 charts, 2
	// scale bars and 5 pictures per candidate section.
	uris := regexp.MustCompile(`src="data:image/png;base64,([^"]+)"`).FindAllStringSubmatch(raw, -1)
	if want := 3 + 2 + 5*reportSections; len(uris) != want {
		t.Errorf("%d embedded PNGs, want %d", len(uris), want)
	}
	for i, u := range uris {
		b, err := base64.StdEncoding.DecodeString(u[1])
		if err != nil {
			t.Fatalf("data URI %d: %v", i+1, err)
		}
		decodePNG(t, fmt.Sprintf("data URI %d", i+1), b)
	}

	// Nothing leaves the file.
	low := strings.ToLower(raw)
	for _, s := range []string{"http://", "https://"} {
		if strings.Contains(low, s) {
			t.Errorf("report contains %q", s)
		}
	}
}

func TestReportWithoutRecommendation(t *testing.T) {
	// An SSIM bar that not even the fully sampled, noisy scan of the quick
	// plan reaches.
	dir := t.TempDir()
	res := filepath.Join(dir, "res")
	plan := filepath.Join(dir, "p.toml")
	write(t, plan, strings.Replace(quickPlan(res), "threshold = 0.5", "threshold = 0.9999", 1))
	if code, _, stderr := runCmd("run", "-quiet", plan); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(filepath.Join(res, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	raw := string(b)
	text := html.UnescapeString(raw)
	if !strings.Contains(text, "No candidate meets the bar") {
		t.Error("the report does not say that no candidate meets the bar")
	}
	if strings.Contains(raw, `<span class="badge pick">`) {
		t.Error("a candidate is marked recommended")
	}
	if n := strings.Count(raw, `<article class="cand fail"`); n != 2 {
		t.Errorf("%d failing candidate sections, want 2", n)
	}
	if !strings.Contains(text, "no protocol of this curve meets the bar") {
		t.Error("the per-curve table does not say the curves fail")
	}
}

func decodePNG(t *testing.T, what string, b []byte) image.Image {
	t.Helper()
	m, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("%s: %v", what, err)
	}
	return m
}

// TestReportPictures checks the pictures of each candidate against their
// definitions: the error maps use one colour scale, the largest
// |reconstruction − truth| of the whole run; reconstructions share the
// truth's grey window; the PSF is shown in decibels of
// amplitude, 20·log10(|psf|/peak) (common practice), on a −40 … 0 dB grey
// window; a Cartesian mask has one white row per acquired line.
func TestReportPictures(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "study.toml")
	write(t, path, reportPlan(filepath.Join(dir, "res"), 0.6))
	p, err := plans.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	o, err := plans.Run(context.Background(), p, plans.Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	a := plans.Analyse(o)
	r, err := buildReport(o, a, version, caution)
	if err != nil {
		t.Fatal(err)
	}
	ny, nx := p.Object.PhaseLines, p.Object.ReadoutPoints
	// Grey window: from the smaller of 0 and the truth's minimum to the
	// truth's maximum, the window of the results folder's PNGs.
	lo, hi := 0.0, 0.0
	for _, v := range o.Truth {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if r.GrayLo != lo || r.GrayHi != hi {
		t.Errorf("grey window [%g, %g], want the truth's [%g, %g]", r.GrayLo, r.GrayHi, lo, hi)
	}
	limit := 0.0
	for ci := range o.Images {
		for ri := range o.Images[ci] {
			for i, v := range o.Images[ci][ri] {
				limit = math.Max(limit, math.Abs(v-o.Truth[i]))
			}
		}
	}
	if limit == 0 || r.ErrorLimit != limit {
		t.Fatalf("error scale %g, want the largest error of the run %g", r.ErrorLimit, limit)
	}
	if len(r.Candidates) != len(a.Rows) || len(r.Candidates) != reportSections {
		t.Fatalf("%d candidates in the report, %d rows", len(r.Candidates), len(a.Rows))
	}
	for k, row := range a.Rows {
		rc := r.Candidates[k]
		c := o.Candidates[row.Candidate]
		img := o.Images[row.Candidate][row.Recon]
		name := fmt.Sprintf("candidate %d (%s)", k+1, rc.Label)
		em := decodePNG(t, name+" error map", rc.Error)
		gm := decodePNG(t, name+" reconstruction", rc.Recon)
		pm := decodePNG(t, name+" PSF", rc.PSF)
		peak := 0.0
		for _, v := range c.PSF {
			peak = math.Max(peak, cmplx.Abs(v))
		}
		for i := range ny {
			for j := range nx {
				v := img[i*nx+j]
				if got, want := em.At(j, i), out.DivergingColor(v-o.Truth[i*nx+j], limit); got != want {
					t.Fatalf("%s error map at (%d,%d) is %v, want %v on the shared scale", name, i, j, got, want)
				}
				g := uint8(math.Round(255 * math.Min(1, math.Max(0, (v-lo)/(hi-lo)))))
				if y := gm.(*image.Gray).GrayAt(j, i).Y; y != g {
					t.Fatalf("%s reconstruction at (%d,%d) is %d, want %d", name, i, j, y, g)
				}
				db := 20 * math.Log10(cmplx.Abs(c.PSF[i*nx+j])/peak)
				want := 255 * math.Min(1, math.Max(0, (db+40)/40))
				if y := float64(pm.(*image.Gray).GrayAt(j, i).Y); math.Abs(y-want) > 0.5+1e-9 {
					t.Fatalf("%s PSF at (%d,%d) is %g, want %g (%.1f dB)", name, i, j, y, want, db)
				}
			}
		}
		if c.Sampling.Mask != nil {
			mm := decodePNG(t, name+" mask", rc.Mask)
			white := 0
			for i := range ny {
				full := true
				for j := range nx {
					full = full && mm.(*image.Gray).GrayAt(j, i).Y == 255
				}
				if full {
					white++
				}
			}
			if white != row.Shots {
				t.Errorf("%s mask has %d white rows, %d lines were acquired", name, white, row.Shots)
			}
		} else if rc.MaskCaption == "" || !strings.HasPrefix(rc.MaskCaption, "trajectory") {
			t.Errorf("%s: non-Cartesian sampling captioned %q", name, rc.MaskCaption)
		}
	}
}

// reportProbe is appended to a copy of a run's report for the browser test.
// It drives the stepper with keys, the group choice and the list toggle,
// and records after each step which candidate is current, how many are
// visible and the start of the shown reconstruction's data URI.
const reportProbe = `<script>
(function () {
  var log = [];
  var list = document.getElementById("cand-list");
  function snap(what) {
    var vis = Array.prototype.filter.call(document.querySelectorAll("article.cand"), function (a) {
      return getComputedStyle(a).display !== "none";
    });
    var img = vis.length ? vis[0].querySelector("figure.fig-recon img") : null;
    log.push({what: what, current: list.getAttribute("data-current") || "", visible: vis.length,
      img: img ? img.getAttribute("src").slice(22, 600) : ""});
  }
  function key(k) { document.body.dispatchEvent(new KeyboardEvent("keydown", {key: k, bubbles: true})); snap(k); }
  snap("start");
  key("End");
  key("Home");
  key("ArrowRight");
  var g = document.getElementById("step-group"); g.value = ""; g.dispatchEvent(new Event("change")); snap("all");
  key("End");
  document.getElementById("step-toggle").click(); snap("listall");
  document.body.setAttribute("data-probe", JSON.stringify(log));
})();
</script>`

// controlError throws on purpose after the probe, with controlMessage.
const (
	controlMessage = "accelplan-control-error"
	controlError   = `<script>throw new Error("` + controlMessage + `");</script>`
)

// chromium runs headless Chromium on a local file with console messages on
// stderr; extra adds the action (--dump-dom or --screenshot=...).
func chromium(t *testing.T, bin, page string, extra ...string) (stdout []byte, stderr string) {
	t.Helper()
	abs, err := filepath.Abs(page)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	args := []string{"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir=" + t.TempDir(), "--enable-logging=stderr", "--v=0"}
	args = append(append(args, extra...), "file://"+abs)
	cmd := exec.CommandContext(ctx, bin, args...)
	// Should a helper process of the browser outlive a killed main process
	// and hold the pipes open, give up on them rather than hang.
	cmd.WaitDelay = 5 * time.Second
	var eb bytes.Buffer
	cmd.Stderr = &eb
	stdout, err = cmd.Output()
	if err != nil {
		t.Fatalf("chromium %v: %v\n%s", extra, err, eb.String())
	}
	return stdout, eb.String()
}

// TestReportInChromium opens the report of a real run in headless Chromium
// (Debian package chromium), the reference browser: the page's script must
// finish (it marks the document data-stepper="ready"), the console must show
// no uncaught error, the stepper must change the shown reconstruction, and
// a screenshot is saved (and copied to $ACCELPLAN_SCREENSHOT_DIR when set).
// Without chromium the test is skipped, except under CI, where it fails.
func TestReportInChromium(t *testing.T) {
	bin, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("chromium is not installed; CI must install the Debian package chromium")
		}
		t.Skip("chromium is not installed (Debian package chromium)")
	}
	if testing.Short() && os.Getenv("CI") == "" {
		t.Skip("starts a browser")
	}
	_, res, raw := runReportPlan(t, 0.6)
	dir := t.TempDir()

	// The probe runs after the page's own script; a last script throws on
	// purpose, so that the console check is seen to work: that error, and
	// no other, must show up as "Uncaught" on stderr.
	probe := filepath.Join(dir, "probe.html")
	write(t, probe, strings.Replace(raw, "</body>", reportProbe+controlError+"</body>", 1))
	dom, stderr := chromium(t, bin, probe, "--dump-dom")
	if !strings.Contains(stderr, "Uncaught Error: "+controlMessage) {
		t.Fatalf("chromium's console log does not reach stderr, so script errors cannot be seen:\n%s", stderr)
	}
	for _, line := range strings.Split(stderr, "\n") {
		if strings.Contains(line, "Uncaught") && !strings.Contains(line, controlMessage) {
			t.Errorf("script error in the report: %s", line)
		}
	}
	if !strings.Contains(string(dom), `data-stepper="ready"`) {
		t.Fatal("the report's script did not finish initialising")
	}
	m := regexp.MustCompile(`data-probe="([^"]*)"`).FindSubmatch(dom)
	if m == nil {
		t.Fatal("the probe recorded nothing")
	}
	var steps []struct {
		What, Current, Img string
		Visible            int
	}
	if err := json.Unmarshal([]byte(html.UnescapeString(string(m[1]))), &steps); err != nil {
		t.Fatalf("probe output: %v", err)
	}
	at := map[string]int{}
	for i, s := range steps {
		at[s.What] = i // the last of a name wins ("End" comes twice)
	}
	pick := regexp.MustCompile(`<article class="cand pass pick" id="(cand-\d+)"`).FindStringSubmatch(raw)
	if pick == nil {
		t.Fatal("the report marks no recommended candidate")
	}
	start, home, end := steps[0], steps[at["Home"]], steps[1]
	if start.Current != pick[1] {
		t.Errorf("the stepper opens on %s, the recommendation is %s", start.Current, pick[1])
	}
	for _, s := range steps[:at["listall"]] {
		if s.Visible != 1 {
			t.Errorf("%s: %d candidates shown, the stepper shows one", s.What, s.Visible)
		}
	}
	if start.Img == "" || home.Img == end.Img || (start.Current != home.Current && start.Img == home.Img) {
		t.Errorf("stepping does not change the shown reconstruction (start %s, Home %s, End %s)", start.Current, home.Current, end.Current)
	}
	if home.Current == end.Current {
		t.Errorf("Home and End show the same candidate %s", home.Current)
	}
	if last := fmt.Sprintf("cand-%d", reportSections); steps[at["End"]].Current != last {
		t.Errorf("End over all candidates shows %s, want the longest scan %s", steps[at["End"]].Current, last)
	}
	if n := steps[at["listall"]].Visible; n != reportSections {
		t.Errorf("list-all shows %d candidates, want %d", n, reportSections)
	}

	// Screenshot of the page as it opens.
	shot := filepath.Join(dir, "report.png")
	chromium(t, bin, filepath.Join(res, "report.html"), "--hide-scrollbars", "--window-size=1280,2400", "--screenshot="+shot)
	b, err := os.ReadFile(shot)
	if err != nil {
		t.Fatalf("no screenshot: %v", err)
	}
	img := decodePNG(t, "screenshot", b)
	if sz := img.Bounds().Size(); sz.X != 1280 || sz.Y != 2400 {
		t.Errorf("screenshot is %v, want 1280×2400", sz)
	}
	colours := map[[3]uint32]bool{}
	for y := 0; y < img.Bounds().Dy(); y += 7 {
		for x := 0; x < img.Bounds().Dx(); x += 7 {
			r, g, bl, _ := img.At(x, y).RGBA()
			colours[[3]uint32{r >> 8, g >> 8, bl >> 8}] = true
		}
	}
	if len(colours) < 16 {
		t.Errorf("the screenshot has %d colours: the page looks blank", len(colours))
	}
	if d := os.Getenv("ACCELPLAN_SCREENSHOT_DIR"); d != "" {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := copyFile(filepath.Join(d, "report-screenshot.png"), shot); err != nil {
			t.Fatal(err)
		}
	}
	t.Logf("screenshot: %s", shot)
}

func copyFile(dst, src string) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	o, err := os.Create(dst)
	if err != nil {
		return err
	}
	if _, err := io.Copy(o, in); err != nil {
		o.Close()
		return err
	}
	return o.Close()
}

func BenchmarkWriteReportRun(b *testing.B) {
	dir := b.TempDir()
	path := filepath.Join(dir, "study.toml")
	if err := os.WriteFile(path, []byte(reportPlan(filepath.Join(dir, "res"), 0.6)), 0o644); err != nil {
		b.Fatal(err)
	}
	p, err := plans.Load(path)
	if err != nil {
		b.Fatal(err)
	}
	o, err := plans.Run(context.Background(), p, plans.Options{Workers: 2})
	if err != nil {
		b.Fatal(err)
	}
	a := plans.Analyse(o)
	b.ResetTimer()
	for b.Loop() {
		if err := writeReport(dir, o, a, version, caution); err != nil {
			b.Fatal(err)
		}
	}
}

func TestReportTextHelpers(t *testing.T) {
	// Worked examples of the unit conversions (1 s = 1000 ms; 125 s =
	// 2 min 5 s) and of the candidate labels.
	times := []struct {
		s    float64
		want string
	}{{0.03, "30.0 ms"}, {0.9994, "999.4 ms"}, {3.3, "3.3 s"}, {59.9, "59.9 s"}, {125, "2:05"}}
	for _, c := range times {
		if got := scanTimeText(c.s); got != c.want {
			t.Errorf("scanTimeText(%g) = %q, want %q", c.s, got, c.want)
		}
	}
	labels := []struct {
		row  plans.Row
		want string
	}{
		{plans.Row{AskedR: 4, R: 2.2857, Shots: 14, FullShots: 32, ShotKind: "lines"}, "R = 2.29 (asked 4) · 14 of 32 lines"},
		{plans.Row{AskedR: 2, R: 2, Shots: 16, FullShots: 32, ShotKind: "lines"}, "R = 2 · 16 of 32 lines"},
		{plans.Row{AskedR: 6, R: 9.1667, Shots: 6, FullShots: 55, ShotKind: "illuminations"}, "R = 9.17 · 6 of 55 illuminations"},
	}
	for _, c := range labels {
		if got := candidateLabel(c.row); got != c.want {
			t.Errorf("candidateLabel = %q, want %q", got, c.want)
		}
		if got := askedR(c.row); (c.row.ShotKind == "lines") != (got != "—") {
			t.Errorf("askedR(%s) = %q", c.row.ShotKind, got)
		}
	}
	// FIPS 180-4 test vector: SHA-256("abc").
	const abc = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	if got := groupHex(fmt.Sprintf("%x", sha256.Sum256([]byte("abc")))); got != "ba7816bf 8f01cfea 414140de 5dae2223 b00361a3 96177a9c b410ff61 f20015ad" || strings.ReplaceAll(got, " ", "") != abc {
		t.Errorf("groupHex of SHA-256(abc) = %q", got)
	}
}
