package out

import (
	"bytes"
	"encoding/base64"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"html"
	"image"
	"image/png"
	"io"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// The sample report below is an invented scenario with made-up numbers: a
// small ellipse-and-disc test object, two sampling schemes, two methods,
// five acceleration factors. Nothing in it is a measurement.

const (
	sampleN       = 48    // image side in pixels
	sampleTR      = 0.6   // s, invented
	sampleLines   = 128   // phase-encode lines of the reference protocol
	sampleAvg     = 2     // averages
	sampleRefTime = 153.6 // s = TR × lines × averages (common practice for 2D Cartesian, echo train 1)
	sampleBar     = 0.90  // SSIM bar
	sampleErrLim  = 0.15  // shared error scale
	sampleTitle   = "Demo: 2D Cartesian protocol study (invented numbers)"
	sampleCaution = "Invented demo data: the numbers on this page were made up to show the layout."
)

// sampleTruth draws the invented object: a bright ellipse with two darker
// discs and a small bright dot, values in [0, 1].
func sampleTruth(n int) []float64 {
	img := make([]float64, n*n)
	for i := range n {
		for j := range n {
			x := (float64(j) + 0.5 - float64(n)/2) / (float64(n) / 2)
			y := (float64(i) + 0.5 - float64(n)/2) / (float64(n) / 2)
			v := 0.0
			if x*x/0.72+y*y/0.9 < 1 {
				v = 0.75
			}
			if (x+0.3)*(x+0.3)+y*y < 0.05 {
				v = 0.35
			}
			if (x-0.35)*(x-0.35)+(y+0.2)*(y+0.2) < 0.02 {
				v = 0.5
			}
			if (x-0.1)*(x-0.1)+(y-0.5)*(y-0.5) < 0.006 {
				v = 1
			}
			img[i*n+j] = v
		}
	}
	return img
}

type sampleCand struct {
	scheme, method string
	r              float64
	uniform        bool
	sparse         bool
}

// sampleCandidate makes invented pictures for one candidate: the mask, a
// reconstruction that blurs, ghosts and gets noisier as R grows, the error
// map and a PSF of the mask's line pattern (|DFT| of the sampled rows).
func sampleCandidate(t testing.TB, c sampleCand, truth []float64, seed uint64) (ReportCandidate, map[string][]byte) {
	n := sampleN
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	mask := make([]bool, n*n)
	rows := make([]bool, n)
	calib := 6
	// Variable density: exactly round(n/r) rows, the calibration block plus
	// rows drawn without replacement with weight 1 − 0.7·|distance from
	// the centre| (keys u^(1/w), largest first).
	type keyed struct {
		row int
		key float64
	}
	var pool []keyed
	for i := range n {
		switch {
		case i >= n/2-calib/2 && i < n/2+calib/2:
			rows[i] = true
		case c.uniform:
			rows[i] = math.Mod(float64(i), c.r) < 1
		default:
			d := math.Abs(float64(i)-float64(n)/2) / (float64(n) / 2)
			pool = append(pool, keyed{i, math.Pow(rng.Float64(), 1/(1-0.7*d))})
		}
	}
	if !c.uniform {
		sort.Slice(pool, func(a, b int) bool { return pool[a].key > pool[b].key })
		for _, p := range pool[:max(0, int(math.Round(float64(n)/c.r))-calib)] {
			rows[p.row] = true
		}
	}
	lines := 0
	for i, on := range rows {
		if on {
			lines++
		}
		for j := range n {
			mask[i*n+j] = on
		}
	}
	recon := make([]float64, n*n)
	ghost := int(float64(n) / c.r)
	blur := 0.15 * (c.r - 1)
	if c.sparse {
		blur *= 0.5
	}
	noise := 0.01 * math.Sqrt(c.r)
	if c.sparse {
		noise *= 0.4
	}
	for i := range n {
		for j := range n {
			v := truth[i*n+j]
			if j > 0 && j < n-1 {
				v = (1-2*blur/3)*v + blur/3*(truth[i*n+j-1]+truth[i*n+j+1])
			}
			if c.uniform {
				a := math.Min(0.3, 0.05*(c.r-1))
				v = (1-a)*v + a*truth[((i+ghost)%n)*n+j]
			}
			recon[i*n+j] = math.Max(0, v+noise*rng.NormFloat64())
		}
	}
	errMap := make([]float64, n*n)
	for k := range errMap {
		errMap[k] = recon[k] - truth[k]
	}
	psf := make([]float64, n*n)
	col := make([]float64, n)
	peak := 0.0
	for k := range n {
		var s complex128
		for i, on := range rows {
			if on {
				s += cmplx.Exp(complex(0, -2*math.Pi*float64(i*k)/float64(n)))
			}
		}
		col[(k+n/2)%n] = cmplx.Abs(s)
		peak = math.Max(peak, cmplx.Abs(s))
	}
	for i := range n {
		psf[i*n+n/2] = col[i] / peak
	}

	enc := func(m image.Image, err error) []byte {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		b, err := EncodeReportPNG(m)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	imgs := map[string][]byte{
		"recon": enc(GrayImage(recon, n, n, 0, 1)),
		"error": enc(DivergingImage(errMap, n, n, sampleErrLim)),
		"mask":  enc(MaskImage(mask, n, n)),
		"psf":   enc(GrayImage(psf, n, n, 0, 1)),
	}
	// Invented quality figures: SSIM falls with the achieved R, faster for
	// the uniform scheme and for zero filling.
	ra := float64(n) / float64(lines)
	loss := 0.03 * math.Pow(ra-1, 1.25)
	if c.uniform {
		loss *= 1.35
	}
	if c.sparse {
		loss *= 0.55
	}
	ssim := 0.985 - loss
	sd := 0.004 + 0.002*ra
	bound := ssim - 1.895*sd/math.Sqrt(8) // Student t(0.95, 7) = 1.895 (statistics tables; value from memory, only shapes invented data)
	scan := sampleRefTime * float64(lines) / float64(n)
	lambda := "none (zero-filled)"
	if c.sparse {
		lambda = fmt.Sprintf("λ = %.3g, golden-section search on a separate calibration draw", 0.004*ra)
	}
	rc := ReportCandidate{
		Label:  fmt.Sprintf("R = %s, %d lines", formatR(float64(n)/float64(lines)), lines),
		Scheme: c.scheme, Method: c.method, R: float64(n) / float64(lines), Lines: lines,
		ScanTime: scan, Lambda: lambda,
		Values: []ReportValue{
			{Metric: "SSIM", Mean: ssim, Std: sd, Bound: bound, N: 8},
			{Metric: "PSNR", Mean: 38 - 9*math.Log10(ra), Std: 0.3, Bound: 37.8 - 9*math.Log10(ra), N: 8},
			{Metric: "NRMSE", Mean: 0.03 * ra, Std: 0.004, Bound: 0.03*ra + 0.003, N: 8},
		},
		Meets: bound >= sampleBar,
		Recon: imgs["recon"], Error: imgs["error"], Mask: imgs["mask"], PSF: imgs["psf"],
	}
	return rc, imgs
}

// sampleReport builds the invented demo report and returns the images that
// went into it, keyed "cand-index/kind" in input order.
func sampleReport(t testing.TB) (Report, map[string][]byte) {
	truth := sampleTruth(sampleN)
	g, err := GrayImage(truth, sampleN, sampleN, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	truthPNG, err := EncodeReportPNG(g)
	if err != nil {
		t.Fatal(err)
	}
	all := map[string][]byte{"truth": truthPNG}
	r := Report{
		Title: sampleTitle, Caution: sampleCaution, Version: "0.0.0-test", PlanName: "demo-invented.toml",
		GeneratedAt: "2031-04-05 10:20", Metric: "SSIM", Threshold: sampleBar, HigherIsBetter: true,
		ReferenceTime: sampleRefTime, ReferenceLabel: "fully sampled, 48 lines, 2 averages",
		ErrorLimit: sampleErrLim, ErrorNote: "reconstruction − truth", GrayLo: 0, GrayHi: 1, Truth: truthPNG,
		Facts: []ReportFact{
			{"object", "invented ellipse-and-disc test object, 48 × 48"},
			{"noise draws", "1 calibration + 8 scored per candidate"},
			{"plan seed", "20310405"},
		},
	}
	schemes := []struct {
		name    string
		uniform bool
	}{{"uniform + 6 calibration lines", true}, {"variable-density random", false}}
	methods := []struct {
		name   string
		sparse bool
	}{{"zero-filled", false}, {"wavelet-L1 (FISTA)", true}}
	// Input order is deliberately not by scan time: high R first.
	rs := []float64{6, 1.5, 4, 2, 3}
	seed := uint64(1)
	for _, s := range schemes {
		for _, m := range methods {
			for _, rr := range rs {
				c, imgs := sampleCandidate(t, sampleCand{s.name, m.name, rr, s.uniform, m.sparse}, truth, seed)
				seed++
				for k, b := range imgs {
					all[fmt.Sprintf("%d/%s", len(r.Candidates), k)] = b
				}
				r.Candidates = append(r.Candidates, c)
			}
		}
	}
	// The overall pick: shortest passing; per curve: shortest passing.
	best := -1
	type key struct{ s, m string }
	perCurve := map[key]int{}
	var curveOrder []key
	for i, c := range r.Candidates {
		k := key{c.Scheme, c.Method}
		if _, ok := perCurve[k]; !ok {
			perCurve[k] = -1
			curveOrder = append(curveOrder, k)
		}
		if !c.Meets {
			continue
		}
		// Shortest time first; equal times go to the better mean.
		earlier := func(j int) bool {
			o := r.Candidates[j]
			return c.ScanTime < o.ScanTime || (c.ScanTime == o.ScanTime && c.Values[0].Mean > o.Values[0].Mean)
		}
		if best < 0 || earlier(best) {
			best = i
		}
		if j := perCurve[k]; j < 0 || earlier(j) {
			perCurve[k] = i
		}
	}
	pickOf := func(i int) ReportPick {
		c := r.Candidates[i]
		return ReportPick{Found: true, Protocol: c.Scheme + ", " + c.Label, Scheme: c.Scheme, Method: c.Method,
			R: c.R, Lines: c.Lines, ScanTime: c.ScanTime, Mean: c.Values[0].Mean, Bound: c.Values[0].Bound, Lambda: c.Lambda}
	}
	if best >= 0 {
		r.Candidates[best].Pick = true
		r.Recommendation = pickOf(best)
	}
	for _, k := range curveOrder {
		if i := perCurve[k]; i >= 0 {
			r.PerCurve = append(r.PerCurve, pickOf(i))
		} else {
			r.PerCurve = append(r.PerCurve, ReportPick{Scheme: k.s, Method: k.m})
		}
	}
	r.Table.Header = []string{"sampling", "reconstruction", "R", "lines", "scan time", "SSIM mean", "SSIM 95% bound"}
	for _, c := range r.Candidates {
		r.Table.Rows = append(r.Table.Rows, ReportRow{
			Cells: []string{c.Scheme, c.Method, formatR(c.R), fmt.Sprint(c.Lines), FormatMinSec(c.ScanTime),
				fmt.Sprintf("%.4f", c.Values[0].Mean), fmt.Sprintf("%.4f", c.Values[0].Bound)},
			Meets: c.Meets, Pick: c.Pick,
		})
	}
	return r, all
}

// sampleChart is the invented SSIM chart of the sample report.
func sampleChart(r Report) CurveChart {
	ch := CurveChart{Metric: "SSIM", Threshold: r.Threshold, HigherIsBetter: true, Bars: BarsBound}
	idx := map[string]int{}
	for _, c := range r.Candidates {
		name := c.Scheme + " · " + c.Method
		i, ok := idx[name]
		if !ok {
			i = len(ch.Curves)
			idx[name] = i
			ch.Curves = append(ch.Curves, Curve{Name: name})
		}
		if c.Pick {
			ch.Pick = &PointRef{Curve: i, Point: len(ch.Curves[i].Points)}
		}
		ch.Curves[i].Points = append(ch.Curves[i].Points, CurvePoint{Label: c.Label, ScanTime: c.ScanTime,
			Mean: c.Values[0].Mean, Std: c.Values[0].Std, Lower: c.Values[0].Bound, N: 8})
	}
	return ch
}

// writeSample writes the sample report (with its chart) to a temporary
// folder, or to $ACCELPLAN_REPORT_SAMPLE when that is set (for looking at
// it in a browser), and returns the path, the report and the images.
func writeSample(t *testing.T, withChart bool) (string, Report, map[string][]byte) {
	t.Helper()
	r, imgs := sampleReport(t)
	if withChart {
		ch, err := ReportChartFrom("SSIM", " against scan time; bars run from the mean to the one-sided 95% bound.", sampleChart(r))
		if err != nil {
			t.Fatal(err)
		}
		r.Charts = append(r.Charts, ch)
		imgs["chart"] = ch.PNG
	}
	path := filepath.Join(t.TempDir(), "report.html")
	if p := os.Getenv("ACCELPLAN_REPORT_SAMPLE"); p != "" && withChart {
		path = p
	}
	if err := WriteReport(path, r); err != nil {
		t.Fatal(err)
	}
	return path, r, imgs
}

func readReport(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestReportIsWellFormedXML(t *testing.T) {
	// Reference: Go's encoding/xml in strict mode (XML 1.0, W3C): every
	// element closed and properly nested, attributes quoted, only the
	// predefined or numeric character references.
	path, _, _ := writeSample(t, false)
	d := xml.NewDecoder(strings.NewReader(readReport(t, path)))
	d.Strict = true
	var stack []string
	counts := map[string]int{}
	root := ""
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			line, col := d.InputPos()
			t.Fatalf("not well-formed at line %d, column %d: %v", line, col, err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = e.Name.Local
			}
			stack = append(stack, e.Name.Local)
			counts[e.Name.Local]++
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		}
	}
	if root != "html" || len(stack) != 0 {
		t.Fatalf("root %q, %d elements left open", root, len(stack))
	}
	for _, el := range []string{"head", "body", "main", "title", "style", "script"} {
		if counts[el] != 1 {
			t.Errorf("%d <%s> elements, want 1", counts[el], el)
		}
	}
	if counts["section"] != 4 || counts["article"] != 20 {
		t.Errorf("%d sections and %d articles, want 4 and 20", counts["section"], counts["article"])
	}
}

// html5Result is what testdata/report_html5check.py prints.
type html5Result struct {
	Errors         [][]any `json:"errors"`
	Title          string  `json:"title"`
	H1             string  `json:"h1"`
	Sections       []string
	Recommendation string
	Caution        *string
	Candidates     []struct {
		ID      string
		Classes []string
		Label   string
		Time    string
		Figures int
		Imgs    int
		Hidden  bool
	}
	Refs          []string
	DataURIs      int  `json:"data_uris"`
	StepperHidden bool `json:"stepper_hidden"`
	Scripts       []int
}

// parseHTML5 parses the report with html5lib (see the script's header).
// Where /usr/bin/python3 or html5lib is missing the test is skipped, except
// under CI (CI set), where that is a failure.
func parseHTML5(t *testing.T, path string) html5Result {
	t.Helper()
	py := "/usr/bin/python3"
	need := func(msg string) {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s (install Debian python3-html5lib)", msg)
		}
		t.Skip(msg)
	}
	if _, err := os.Stat(py); err != nil {
		need("no /usr/bin/python3")
	}
	if err := exec.Command(py, "-c", "import html5lib").Run(); err != nil {
		need("html5lib is not installed")
	}
	var stderr bytes.Buffer
	cmd := exec.Command(py, "testdata/report_html5check.py", path)
	cmd.Stderr = &stderr
	b, err := cmd.Output()
	if err != nil {
		t.Fatalf("html5lib check failed: %v\n%s", err, stderr.String())
	}
	var res html5Result
	if err := json.Unmarshal(b, &res); err != nil {
		t.Fatalf("html5lib check printed %q: %v", b, err)
	}
	return res
}

func TestReportParsesAsHTML5(t *testing.T) {
	// Reference: html5lib 1.1, the WHATWG parsing algorithm; it reports
	// every parse error.
	path, r, _ := writeSample(t, true)
	res := parseHTML5(t, path)
	if len(res.Errors) != 0 {
		t.Errorf("html5lib reports parse errors: %v", res.Errors)
	}
	if res.Title != sampleTitle || res.H1 != sampleTitle {
		t.Errorf("title %q, h1 %q, want %q", res.Title, res.H1, sampleTitle)
	}
	wantSections := []string{"recommendation", "curves", "table", "candidates"}
	if fmt.Sprint(res.Sections) != fmt.Sprint(wantSections) {
		t.Errorf("sections %v, want %v (recommendation first)", res.Sections, wantSections)
	}
	if res.Caution == nil || !strings.Contains(*res.Caution, sampleCaution) {
		t.Errorf("caution inside the recommendation = %v, want it to contain %q", res.Caution, sampleCaution)
	}
	if !strings.Contains(res.Recommendation, r.Recommendation.Protocol) {
		t.Errorf("recommendation text lacks the protocol %q:\n%s", r.Recommendation.Protocol, res.Recommendation)
	}
	if len(res.Candidates) != len(r.Candidates) {
		t.Fatalf("%d candidate sections, want %d", len(res.Candidates), len(r.Candidates))
	}
	for i, c := range res.Candidates {
		if c.Figures != 5 || c.Imgs != 5 {
			t.Errorf("candidate %s: %d figures with %d images, want 5 and 5", c.ID, c.Figures, c.Imgs)
		}
		if c.Hidden {
			t.Errorf("candidate %s is hidden in the markup; without script every candidate must show", c.ID)
		}
		if c.ID != fmt.Sprintf("cand-%d", i+1) {
			t.Errorf("candidate %d has id %q", i+1, c.ID)
		}
	}
	if !res.StepperHidden {
		t.Error("the stepper panel is not hidden in the markup; it must appear only when the script runs")
	}
	if len(res.Scripts) != 2 || res.Scripts[0] != 1 || res.Scripts[1] != 0 {
		t.Errorf("scripts %v, want exactly one inline script", res.Scripts)
	}
	// 20 candidates × 5 images + chart + grey bar + error bar.
	if want := 20*5 + 3; res.DataURIs != want {
		t.Errorf("%d data: URIs, want %d", res.DataURIs, want)
	}
	for _, ref := range res.Refs {
		if !strings.HasPrefix(ref, "data:image/") && !strings.HasPrefix(ref, "#") {
			t.Errorf("reference %q leaves the file", ref)
		}
	}
}

func TestReportOrderAndRecommendation(t *testing.T) {
	path, r, _ := writeSample(t, false)
	page := readReport(t, path)
	// Candidates come in input order with R = 6 first; the page must list
	// them by scan time.
	re := regexp.MustCompile(`<article class="cand[^"]*" id="cand-(\d+)"[^>]*data-time="([0-9:]+)"`)
	ms := re.FindAllStringSubmatch(page, -1)
	if len(ms) != len(r.Candidates) {
		t.Fatalf("%d candidate articles, want %d", len(ms), len(r.Candidates))
	}
	secs := func(mss string) int {
		var m, s int
		fmt.Sscanf(mss, "%d:%d", &m, &s)
		return 60*m + s
	}
	for i := 1; i < len(ms); i++ {
		if secs(ms[i][2]) < secs(ms[i-1][2]) {
			t.Errorf("candidate %s at %s comes after %s at %s", ms[i][1], ms[i][2], ms[i-1][1], ms[i-1][2])
		}
	}
	// Worked example of the time saved: the pick of the invented data is
	// the variable-density wavelet candidate with the fewest lines that
	// passes; saved = reference − scan time, in m:ss and as a percentage
	// of the reference, both worked out here by hand from the sample's
	// own numbers.
	p := r.Recommendation
	if !p.Found {
		t.Fatal("the sample has no pick")
	}
	saved := sampleRefTime - p.ScanTime
	want := fmt.Sprintf("saves %s (%.1f%%)", FormatMinSec(saved), 100*saved/sampleRefTime)
	if !strings.Contains(page, want) {
		t.Errorf("page lacks %q", want)
	}
	for _, s := range []string{
		"2:34 (153.6 s)", // the reference: 153.6 s is 2:33.6, rounded to 2:34
		"SSIM ≥ 0.9 at the one-sided 95% confidence bound",
		escText(p.Lambda),
		"★ recommended",
	} {
		if !strings.Contains(page, s) {
			t.Errorf("page lacks %q", s)
		}
	}
	// Pass and fail are told apart by words and symbols, not colour only.
	pass, fail := 0, 0
	for _, c := range r.Candidates {
		if c.Meets {
			pass++
		} else {
			fail++
		}
	}
	if pass == 0 || fail == 0 {
		t.Fatalf("the sample should have both passing (%d) and failing (%d) candidates", pass, fail)
	}
	if n := strings.Count(page, `<span class="badge pass">✓ meets the bar</span>`); n != pass {
		t.Errorf("%d pass badges, want %d", n, pass)
	}
	if n := strings.Count(page, `<span class="badge fail">✗ misses the bar</span>`); n != fail {
		t.Errorf("%d fail badges, want %d", n, fail)
	}
}

// escText returns s as html/template escapes it in text (only the
// characters the sample's λ text can hold).
func escText(s string) string {
	return strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&#34;", "'", "&#39;", "+", "&#43;").Replace(s)
}

func TestReportEscapesUserText(t *testing.T) {
	r, _ := sampleReport(t)
	const evilTitle = `<script>alert("title")</script>`
	const evilLabel = `"><img src=x onerror=alert(1)>`
	r.Title = evilTitle
	r.Caution = "check <b>this</b> & that"
	r.Candidates[0].Label = evilLabel
	r.Table.Header[0] = "<i>sampling</i>"
	r.Facts = append(r.Facts, ReportFact{Name: "<u>", Value: `javascript:alert(1)`})
	path := filepath.Join(t.TempDir(), "evil.html")
	if err := WriteReport(path, r); err != nil {
		t.Fatal(err)
	}
	page := readReport(t, path)
	for _, raw := range []string{evilTitle, `<img src=x`, "<b>this</b>", "<i>sampling</i>", "<u>"} {
		if strings.Contains(page, raw) {
			t.Errorf("raw user text %q reached the page unescaped", raw)
		}
	}
	if !strings.Contains(page, "&lt;script&gt;alert(&#34;title&#34;)&lt;/script&gt;") {
		t.Error("escaped title not found")
	}
	if n := strings.Count(page, "<script"); n != 1 {
		t.Errorf("%d <script elements, want only the stepper", n)
	}
	// A reference parser must read the text back exactly as given.
	res := parseHTML5(t, path)
	if res.Title != evilTitle || res.H1 != evilTitle {
		t.Errorf("html5lib reads title %q and h1 %q, want %q", res.Title, res.H1, evilTitle)
	}
	if res.Caution == nil || !strings.Contains(*res.Caution, "check <b>this</b> & that") {
		t.Errorf("html5lib reads caution %v", res.Caution)
	}
	found := false
	for _, c := range res.Candidates {
		found = found || c.Label == evilLabel
	}
	if !found {
		t.Error("html5lib does not find the candidate label as text")
	}
	if len(res.Errors) != 0 {
		t.Errorf("parse errors: %v", res.Errors)
	}
}

func TestReportNeedsNoNetwork(t *testing.T) {
	path, _, _ := writeSample(t, true)
	page := readReport(t, path)
	low := strings.ToLower(page)
	for _, s := range []string{"http://", "https://", "url(", "@import", "src=\"//", "href=\"//", "<link", "<iframe", "<object", "<embed"} {
		if strings.Contains(low, s) {
			t.Errorf("page contains %q", s)
		}
	}
	for _, m := range regexp.MustCompile(`(?:src|href)="([^"]*)"`).FindAllStringSubmatch(page, -1) {
		if !strings.HasPrefix(m[1], "data:image/png;base64,") && !strings.HasPrefix(m[1], "#") {
			t.Errorf("reference %.50q leaves the file", m[1])
		}
	}
}

func TestReportImagesDecodeFromDataURIs(t *testing.T) {
	// Reference: Go's encoding/base64 (RFC 4648) and image/png (ISO/IEC
	// 15948) read the embedded images back; each must be the very PNG that
	// went in, and the pixels must match.
	path, r, imgs := writeSample(t, true)
	page := readReport(t, path)
	re := regexp.MustCompile(`src="data:image/png;base64,([A-Za-z0-9+/=]+)"`)
	found := map[string]bool{}
	for _, m := range re.FindAllStringSubmatch(page, -1) {
		b, err := base64.StdEncoding.DecodeString(m[1])
		if err != nil {
			t.Fatalf("bad base64: %v", err)
		}
		if _, err := png.Decode(bytes.NewReader(b)); err != nil {
			t.Fatalf("embedded image does not decode: %v", err)
		}
		found[string(b)] = true
	}
	for k, b := range imgs {
		if !found[string(b)] {
			t.Errorf("image %s is not embedded byte for byte", k)
		}
	}
	// Pixel check of one reconstruction against its source.
	want, _ := png.Decode(bytes.NewReader(r.Candidates[0].Recon))
	m := re.FindAllStringSubmatch(page, -1)
	ok := false
	for _, mm := range m {
		b, _ := base64.StdEncoding.DecodeString(mm[1])
		got, _ := png.Decode(bytes.NewReader(b))
		if samePixels(got, want) {
			ok = true
			break
		}
	}
	if !ok {
		t.Error("no embedded image has the pixels of the first reconstruction")
	}
	// The error scale bar spans the diverging map: its ends are the
	// colours DivergingColor gives to ±ErrorLimit and its middle the
	// neutral.
	bar := regexp.MustCompile(`<img src="data:image/png;base64,([A-Za-z0-9+/=]+)" alt="colour scale of the error maps"/>`).FindStringSubmatch(page)
	if bar == nil {
		t.Fatal("error colour bar not found")
	}
	b, _ := base64.StdEncoding.DecodeString(bar[1])
	bm, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	w := bm.Bounds().Dx()
	for _, c := range []struct {
		x int
		v float64
	}{{0, -sampleErrLim}, {w / 2, 0}, {w - 1, sampleErrLim}} {
		r1, g1, b1, _ := bm.At(c.x, 0).RGBA()
		want := DivergingColor(c.v, sampleErrLim)
		if uint8(r1>>8) != want.R || uint8(g1>>8) != want.G || uint8(b1>>8) != want.B {
			t.Errorf("colour bar at x=%d is %d,%d,%d, want %v", c.x, r1>>8, g1>>8, b1>>8, want)
		}
	}
}

func samePixels(a, b image.Image) bool {
	if a == nil || b == nil || a.Bounds() != b.Bounds() {
		return false
	}
	for y := a.Bounds().Min.Y; y < a.Bounds().Max.Y; y++ {
		for x := a.Bounds().Min.X; x < a.Bounds().Max.X; x++ {
			r1, g1, b1, a1 := a.At(x, y).RGBA()
			r2, g2, b2, a2 := b.At(x, y).RGBA()
			if r1 != r2 || g1 != g2 || b1 != b2 || a1 != a2 {
				return false
			}
		}
	}
	return true
}

func TestReportWithoutRecommendation(t *testing.T) {
	r, _ := sampleReport(t)
	r.Recommendation = ReportPick{}
	for i := range r.Candidates {
		r.Candidates[i].Meets, r.Candidates[i].Pick = false, false
	}
	r.Threshold = 0.999
	path := filepath.Join(t.TempDir(), "none.html")
	if err := WriteReport(path, r); err != nil {
		t.Fatal(err)
	}
	page := readReport(t, path)
	for _, s := range []string{"No candidate meets the bar", "None of the 20 candidates reached SSIM ≥ 0.999", sampleCaution} {
		if !strings.Contains(page, s) {
			t.Errorf("page lacks %q", s)
		}
	}
	if strings.Contains(page, "★ recommended") || strings.Contains(page, "saves ") {
		t.Error("a page without a pick shows a recommendation")
	}
}

func TestWriteReportRejectsBadInput(t *testing.T) {
	notPNG := []byte("GIF89a not a png")
	cases := []struct {
		name   string
		change func(*Report)
		want   string
	}{
		{"no metric", func(r *Report) { r.Metric = " " }, "no acceptance metric"},
		{"NaN threshold", func(r *Report) { r.Threshold = math.NaN() }, "threshold"},
		{"zero reference", func(r *Report) { r.ReferenceTime = 0 }, "reference scan time"},
		{"infinite scan time", func(r *Report) { r.Candidates[3].ScanTime = math.Inf(1) }, "candidate 4"},
		{"bad recon PNG", func(r *Report) { r.Candidates[2].Recon = notPNG }, "not a readable PNG"},
		{"bad shared truth", func(r *Report) { r.Truth = notPNG[:4] }, "truth image"},
		{"error map without scale", func(r *Report) { r.ErrorLimit = 0 }, "ErrorLimit"},
		{"negative error scale", func(r *Report) { r.ErrorLimit = -1 }, "error-map scale"},
		{"short table row", func(r *Report) { r.Table.Rows[1].Cells = r.Table.Rows[1].Cells[:2] }, "row 2 has 2 cells"},
		{"chart without image", func(r *Report) { r.Charts = []ReportChart{{Name: "SSIM"}} }, "neither PNG nor SVG"},
		{"chart SVG not XML", func(r *Report) { r.Charts = []ReportChart{{Name: "SSIM", SVG: []byte("<svg><g></svg>")}} }, "not well-formed SVG"},
		{"chart SVG wrong root", func(r *Report) { r.Charts = []ReportChart{{Name: "SSIM", SVG: []byte("<html/>")}} }, "root element"},
		{"NaN pick time", func(r *Report) { r.Recommendation.ScanTime = math.NaN() }, "recommendation: scan time"},
		{"NaN metric", func(r *Report) { r.Candidates[0].Values[0].Mean = math.NaN() }, "SSIM mean"},
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "report.html")
	if err := os.WriteFile(path, []byte("earlier report"), 0o644); err != nil {
		t.Fatal(err)
	}
	base, _ := sampleReport(t)
	if err := WriteReport(filepath.Join(t.TempDir(), "ok.html"), base); err != nil {
		t.Fatalf("the unchanged sample is refused: %v", err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := cloneReport(base)
			c.change(&r)
			err := WriteReport(path, r)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one containing %q", err, c.want)
			}
			if b, _ := os.ReadFile(path); string(b) != "earlier report" {
				t.Error("a refused report touched the earlier file")
			}
		})
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("folder holds %d entries after refused writes, want 1", len(ents))
	}
	if err := WriteReport("", Report{}); err == nil {
		t.Error("empty path accepted")
	}
}

// cloneReport copies the parts of r that the bad-input cases change.
func cloneReport(r Report) Report {
	r.Candidates = append([]ReportCandidate(nil), r.Candidates...)
	for i := range r.Candidates {
		r.Candidates[i].Values = append([]ReportValue(nil), r.Candidates[i].Values...)
	}
	r.Table.Rows = append([]ReportRow(nil), r.Table.Rows...)
	r.Charts = append([]ReportChart(nil), r.Charts...)
	return r
}

func TestReportAcceptsSVGChart(t *testing.T) {
	r, _ := sampleReport(t)
	svg := []byte(`<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><rect width="10" height="10"/></svg>`)
	r.Charts = []ReportChart{{Name: "SSIM", SVG: svg}}
	path := filepath.Join(t.TempDir(), "svg.html")
	if err := WriteReport(path, r); err != nil {
		t.Fatal(err)
	}
	page := readReport(t, path)
	m := regexp.MustCompile(`src="data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)"`).FindStringSubmatch(page)
	if m == nil {
		t.Fatal("SVG chart not embedded as a data URI")
	}
	if b, _ := base64.StdEncoding.DecodeString(m[1]); !bytes.Equal(b, svg) {
		t.Error("embedded SVG differs from the input")
	}
}

func TestNumericCell(t *testing.T) {
	for _, c := range []struct {
		in   string
		want bool
	}{
		{"0.9512", true}, {"2:08", true}, {"128.0 s", true}, {"50.0%", true}, {"-3e-4", true},
		{"R = 4", false}, {"wavelet-L1", false}, {"", false}, {"—", false},
	} {
		if got := numericCell(c.in); got != c.want {
			t.Errorf("numericCell(%q) = %v, want %v", c.in, got, c.want)
		}
	}
}

// stepperProbe is appended to a copy of the report for the browser test:
// it drives the stepper like a person would (keys, buttons, slider, group
// choice, list-all toggle) and records after each action which candidate is
// current, how many candidates are visible and the start of the visible
// reconstruction's data URI.
const stepperProbe = `<script>
(function () {
  var log = [];
  var list = document.getElementById("cand-list");
  function snap(what) {
    var vis = Array.prototype.filter.call(document.querySelectorAll("article.cand"), function (a) {
      return getComputedStyle(a).display !== "none";
    });
    var img = vis.length ? vis[0].querySelector("figure.fig-recon img") : null;
    log.push({what: what, current: list.getAttribute("data-current"), visible: vis.length,
      time: vis.length ? vis[0].getAttribute("data-time") : "",
      img: img ? img.getAttribute("src").slice(22, 400) : "",
      max: document.getElementById("step-range").max});
  }
  function key(k) { document.body.dispatchEvent(new KeyboardEvent("keydown", {key: k, bubbles: true})); snap(k); }
  snap("start");
  key("ArrowLeft");
  key("End");
  key("Home");
  key("ArrowRight");
  document.getElementById("step-next").click(); snap("next");
  var r = document.getElementById("step-range"); r.value = "0"; r.dispatchEvent(new Event("input")); snap("range0");
  var g = document.getElementById("step-group"); g.value = ""; g.dispatchEvent(new Event("change")); snap("all");
  document.getElementById("step-toggle").click(); snap("listall");
  document.getElementById("step-toggle").click(); snap("stepagain");
  document.body.setAttribute("data-probe", JSON.stringify(log));
})();
</script>`

type probeStep struct {
	What, Current, Time, Img, Max string
	Visible                       int
}

func TestReportStepperInChromium(t *testing.T) {
	// Reference: the Chromium browser (Debian chromium) runs the page's
	// script; --dump-dom prints the document afterwards. The stepper must
	// start on the recommended candidate, show one candidate at a time,
	// change the shown reconstruction as it steps through scan times, and
	// list all candidates again on request. Skipped where chromium is not
	// installed, or with -short.
	if testing.Short() {
		t.Skip("starts a browser")
	}
	bin, err := exec.LookPath("chromium")
	if err != nil {
		t.Skip("chromium is not installed (Debian package chromium)")
	}
	path, r, _ := writeSample(t, false)
	page := readReport(t, path)
	probe := strings.Replace(page, "</body>", stepperProbe+"</body>", 1)
	probePath := filepath.Join(filepath.Dir(path), "probe.html")
	if err := os.WriteFile(probePath, []byte(probe), 0o644); err != nil {
		t.Fatal(err)
	}
	abs, _ := filepath.Abs(probePath)
	cmd := exec.Command(bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+t.TempDir(), "--dump-dom", "file://"+abs)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	dom, err := cmd.Output()
	if err != nil {
		t.Fatalf("chromium: %v\n%s", err, stderr.String())
	}
	if !strings.Contains(string(dom), `data-stepper="ready"`) {
		t.Fatal("the stepper script did not finish")
	}
	m := regexp.MustCompile(`data-probe="([^"]*)"`).FindSubmatch(dom)
	if m == nil {
		t.Fatal("the probe recorded nothing (script error?)")
	}
	var steps []probeStep
	if err := json.Unmarshal([]byte(html.UnescapeString(string(m[1]))), &steps); err != nil {
		t.Fatalf("probe output: %v", err)
	}
	at := map[string]probeStep{}
	for _, s := range steps {
		at[s.What] = s
	}
	// The sample's pick and its group (variable-density, wavelet-L1).
	pickID, group := "", []int{}
	byTime := make([]int, len(r.Candidates))
	for i := range byTime {
		byTime[i] = i
	}
	sort.SliceStable(byTime, func(a, b int) bool { return r.Candidates[byTime[a]].ScanTime < r.Candidates[byTime[b]].ScanTime })
	var pickGroup string
	for k, i := range byTime {
		if r.Candidates[i].Pick {
			pickID, pickGroup = fmt.Sprintf("cand-%d", k+1), r.Candidates[i].Scheme+r.Candidates[i].Method
		}
	}
	for k, i := range byTime {
		if r.Candidates[i].Scheme+r.Candidates[i].Method == pickGroup {
			group = append(group, k+1)
		}
	}
	first, last := fmt.Sprintf("cand-%d", group[0]), fmt.Sprintf("cand-%d", group[len(group)-1])
	checks := []struct {
		what, current string
		visible       int
	}{
		{"start", pickID, 1},
		{"End", last, 1},
		{"Home", first, 1},
		{"ArrowRight", fmt.Sprintf("cand-%d", group[1]), 1},
		{"next", fmt.Sprintf("cand-%d", group[2]), 1},
		{"range0", first, 1},
		{"all", first, 1},
		{"listall", "", len(r.Candidates)},
		{"stepagain", first, 1},
	}
	for _, c := range checks {
		s, ok := at[c.what]
		if !ok {
			t.Errorf("%s: not recorded", c.what)
			continue
		}
		if c.current != "" && s.Current != c.current {
			t.Errorf("%s: current %s, want %s", c.what, s.Current, c.current)
		}
		if s.Visible != c.visible {
			t.Errorf("%s: %d candidates visible, want %d", c.what, s.Visible, c.visible)
		}
	}
	if at["start"].Img == "" || at["start"].Img == at["Home"].Img {
		t.Error("the shown reconstruction does not change between the pick and the shortest scan")
	}
	if at["Home"].Time > at["End"].Time && len(at["Home"].Time) == len(at["End"].Time) {
		t.Errorf("Home shows %s, End %s: not in order of scan time", at["Home"].Time, at["End"].Time)
	}
	if want := fmt.Sprint(len(group) - 1); at["start"].Max != want {
		t.Errorf("slider max %s in the pick's group, want %s", at["start"].Max, want)
	}
	if want := fmt.Sprint(len(r.Candidates) - 1); at["all"].Max != want {
		t.Errorf("slider max %s with all candidates, want %s", at["all"].Max, want)
	}
}

func BenchmarkWriteReport(b *testing.B) {
	r, _ := sampleReport(b)
	path := filepath.Join(b.TempDir(), "bench.html")
	b.ReportAllocs()
	for b.Loop() {
		if err := WriteReport(path, r); err != nil {
			b.Fatal(err)
		}
	}
}

func TestParetoFront(t *testing.T) {
	// Worked by hand from the definition of Pareto dominance (Deb 2001,
	// ch. 2): j dominates i when it is no longer and no worse, and
	// strictly better in one of the two.
	nan := math.NaN()
	cases := []struct {
		name   string
		times  []float64
		q      []float64
		higher bool
		want   []bool
	}{
		{"staircase", []float64{10, 20, 30, 40}, []float64{0.7, 0.8, 0.75, 0.9}, true, []bool{true, true, false, true}},
		{"lower is better", []float64{10, 20, 30}, []float64{0.3, 0.2, 0.25}, false, []bool{true, true, false}},
		{"equal time, better wins", []float64{10, 10, 20}, []float64{0.8, 0.9, 0.85}, true, []bool{false, true, false}},
		{"exact ties both stay", []float64{10, 10}, []float64{0.8, 0.8}, true, []bool{true, true}},
		{"NaN takes no part", []float64{10, nan, 30}, []float64{0.7, 0.99, nan}, true, []bool{true, false, false}},
		{"one point", []float64{5}, []float64{0.1}, true, []bool{true}},
		{"empty", nil, nil, true, []bool{}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := ParetoFront(c.times, c.q, c.higher)
			if fmt.Sprint(got) != fmt.Sprint(c.want) {
				t.Errorf("ParetoFront(%v, %v, %v) = %v, want %v", c.times, c.q, c.higher, got, c.want)
			}
		})
	}
}

func TestReportMarksParetoFront(t *testing.T) {
	path, r, _ := writeSample(t, false)
	page := readReport(t, path)
	times := make([]float64, len(r.Candidates))
	q := make([]float64, len(r.Candidates))
	for i, c := range r.Candidates {
		times[i], q[i] = c.ScanTime, c.Values[0].Mean
	}
	n := 0
	for _, on := range ParetoFront(times, q, true) {
		if on {
			n++
		}
	}
	if n < 2 || n == len(r.Candidates) {
		t.Fatalf("sample front has %d of %d candidates; the test needs a proper subset", n, len(r.Candidates))
	}
	if got := strings.Count(page, `<span class="badge front"`); got != n {
		t.Errorf("%d candidates marked on the Pareto front, want %d", got, n)
	}
	tbl := page[strings.Index(page, `<table class="pareto">`):]
	tbl = tbl[:strings.Index(tbl, "</table>")]
	if got := strings.Count(tbl, "<tr class="); got != n {
		t.Errorf("Pareto table has %d rows, want %d", got, n)
	}
}
