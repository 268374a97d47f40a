package out

import (
	"bytes"
	"encoding/base64"
	"encoding/xml"
	"errors"
	"fmt"
	"html/template"
	"image"
	"image/png"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Report is everything the self-contained HTML report shows, as plain data:
// the caller (the command) fills it from a finished run and WriteReport turns
// it into one HTML file. Text fields are plain text, never HTML: the writer
// escapes all of it. Images are PNG bytes (an SVG is also accepted for
// charts); they are embedded in the page as base64 data URIs, so the file
// opens offline from any folder.
type Report struct {
	Title       string // headline; "accelplan report" when empty
	Caution     string // the run's caution, shown with the recommendation; may be empty
	Version     string // tool version, printed in the header and footer
	PlanName    string // name of the plan file or built-in plan
	GeneratedAt string // when the run finished, already formatted by the caller
	// Facts are extra name–value lines about the run (phantom, matrix,
	// noise draws, seeds, ...), shown under the recommendation.
	Facts []ReportFact

	Metric         string  // acceptance metric name, e.g. "SSIM"
	Threshold      float64 // acceptance bar on Metric
	HigherIsBetter bool    // which side of Threshold passes
	// ReferenceTime is the scan time of the reference (fully sampled)
	// protocol in seconds; time saved is measured against it.
	ReferenceTime float64
	// ReferenceLabel describes the reference protocol, e.g. "fully
	// sampled, 256 lines"; may be empty.
	ReferenceLabel string

	// Recommendation is the overall pick: the shortest protocol whose
	// confidence bound meets the bar. Found is false when none does.
	Recommendation ReportPick
	// PerCurve holds the shortest passing protocol of each scheme × method
	// (Found false where that curve never meets the bar).
	PerCurve []ReportPick

	Charts []ReportChart // e.g. one quality-versus-scan-time chart per metric
	Table  ReportTable   // the summary table

	// ErrorLimit is the one colour scale shared by every error map: the
	// diverging map spans [−ErrorLimit, +ErrorLimit] (see DivergingImage).
	// It must be positive when any candidate has an error map.
	ErrorLimit float64
	// ErrorNote says what the error maps show, e.g. "reconstruction −
	// truth, magnitude"; may be empty.
	ErrorNote string
	// GrayLo and GrayHi are the grey window of reconstructions and truth
	// (see GrayImage); a grey scale bar is shown when GrayLo < GrayHi.
	GrayLo, GrayHi float64
	// Truth is the PNG of the true object, shown beside every candidate
	// whose own Truth is nil.
	Truth []byte
	// Candidates are the protocols studied, one per scheme × acceleration ×
	// method. WriteReport lists them in order of scan time (stable for equal
	// times), whatever order they come in.
	Candidates []ReportCandidate
}

// ReportFact is one name–value line of the run facts.
type ReportFact struct {
	Name, Value string
}

// ReportPick is a recommended protocol.
type ReportPick struct {
	Found    bool    // false: no candidate meets the bar (the other fields are ignored)
	Protocol string  // the protocol in words, e.g. "variable-density random lines, R = 4"
	Scheme   string  // sampling scheme
	Method   string  // reconstruction method
	R        float64 // achieved acceleration factor (0: not shown)
	Lines    int     // acquired lines or shots (0: not shown)
	ScanTime float64 // seconds
	Mean     float64 // mean of the acceptance metric over the scored noise draws
	Bound    float64 // its one-sided 95% confidence bound on the conservative side
	// Lambda says how the regularisation weight was chosen, e.g. "λ = 0.012,
	// tuned by golden-section search on a separate calibration draw".
	Lambda string
}

// ReportChart is one figure of the curves section.
type ReportChart struct {
	Name    string // heading of the figure, e.g. "SSIM"
	Caption string // text under the figure; may be empty
	PNG     []byte // the chart as PNG; used when present
	SVG     []byte // the chart as SVG; used when PNG is nil
}

// ReportTable is the summary table: a header and rows of text.
type ReportTable struct {
	Header []string
	Rows   []ReportRow
}

// ReportRow is one row of the summary table. Meets and Pick are shown by the
// writer in a status column of its own (text and symbol, not colour alone).
type ReportRow struct {
	Cells []string // as many as the header
	Meets bool     // this row meets the bar
	Pick  bool     // this row is the overall recommendation
}

// ReportCandidate is one protocol reconstructed by one method.
type ReportCandidate struct {
	Label    string  // short name, e.g. "R = 4, 64 lines"; built from the fields when empty
	Scheme   string  // sampling scheme
	Method   string  // reconstruction method
	R        float64 // achieved acceleration factor
	Lines    int     // acquired lines or shots
	ScanTime float64 // seconds
	Lambda   string  // how λ was chosen for this candidate; may be empty
	Note     string  // any other remark; may be empty
	Values   []ReportValue
	Meets    bool // the acceptance metric's confidence bound meets the bar
	Pick     bool // the overall recommendation
	// Images as PNG bytes; any may be nil and is then marked as not
	// available. Truth nil falls back to Report.Truth.
	Recon, Truth, Error, Mask, PSF []byte
	// MaskCaption names the sampling picture: "sampling mask" when empty;
	// "trajectory" suits non-Cartesian schemes.
	MaskCaption string
	// Extra figures shown after the five standard ones, e.g. noise maps.
	Extra []ReportFigure
}

// ReportFigure is one additional picture of a candidate.
type ReportFigure struct {
	Caption string
	Note    string // e.g. the scale; may be empty
	PNG     []byte
}

// ReportValue is the statistics of one quality metric of a candidate over
// its scored noise draws.
type ReportValue struct {
	Metric string
	Mean   float64
	Std    float64
	Bound  float64 // one-sided 95% bound on the conservative side
	N      int     // number of noise draws
}

// EncodeReportPNG encodes m as PNG bytes for a Report field (Go's
// image/png, ISO/IEC 15948).
func EncodeReportPNG(m image.Image) ([]byte, error) {
	if m == nil {
		return nil, errors.New("out: no image to encode")
	}
	var buf bytes.Buffer
	enc := png.Encoder{CompressionLevel: png.DefaultCompression}
	if err := enc.Encode(&buf, m); err != nil {
		return nil, fmt.Errorf("out: encoding PNG: %w", err)
	}
	return buf.Bytes(), nil
}

// ReportChartFrom draws c as PNG (the same drawing PlotCurve writes) and
// wraps it as a report figure called name with the given caption.
func ReportChartFrom(name, caption string, c CurveChart) (ReportChart, error) {
	if err := c.Validate(); err != nil {
		return ReportChart{}, err
	}
	b, err := renderCurve(c, "png")
	if err != nil {
		return ReportChart{}, err
	}
	return ReportChart{Name: name, Caption: caption, PNG: b}, nil
}

// WriteReport writes r as one self-contained HTML file to path, atomically
// (see WriteFileAtomic). The page is built with html/template, so every piece
// of text in r is escaped; it loads nothing from the network (images are
// data URIs, style and script are inline) and reads well without script: a
// small inline script adds the stepper that walks the candidates in order of
// scan time. The markup is also well-formed XML, so that XML tools can read
// it. r is checked first; bad input (a missing metric, a non-finite number,
// image bytes that are not a PNG, a table row of the wrong width) is an error
// and nothing is written.
func WriteReport(path string, r Report) error {
	v, err := buildReportView(r)
	if err != nil {
		return fmt.Errorf("%w (writing %s)", err, path)
	}
	var buf bytes.Buffer
	if err := reportTemplate.Execute(&buf, v); err != nil {
		return fmt.Errorf("out: filling the report template for %s: %w", path, err)
	}
	return WriteFileAtomic(path, func(w io.Writer) error {
		_, err := w.Write(buf.Bytes())
		return err
	})
}

// reportTemplate is parsed once; a parse failure is a programming error
// caught by every test.
var reportTemplate = template.Must(template.New("report").Funcs(template.FuncMap{
	"numericCell": numericCell,
}).Parse(reportHTML))

// numericCell reports whether a table cell reads as a number, a clock time
// or a number with a unit of seconds or percent, so that it is right-aligned.
func numericCell(s string) bool {
	s = strings.TrimSpace(s)
	s = strings.TrimSuffix(strings.TrimSuffix(s, "%"), " s")
	digit := false
	for _, c := range s {
		switch {
		case c >= '0' && c <= '9':
			digit = true
		case strings.ContainsRune(".:-+−±eE ()", c):
		default:
			return false
		}
	}
	return digit
}

// The view types hold the report as display strings, so that the template
// only places text.
type reportView struct {
	Title, Caution, Version, PlanName, GeneratedAt string
	Facts                                          []ReportFact
	Metric, BarShort, BarLong                      string
	Reference, ReferenceLabel                      string
	Pick                                           pickView
	PerCurve                                       []pickView
	Charts                                         []chartView
	Table                                          tableView
	ErrorLimit, ErrorNote                          string
	ErrorBar, GrayBar                              template.HTMLAttr
	GrayLo, GrayHi                                 string
	Candidates                                     []candView
	Passing                                        int
	Pareto                                         []candView // candidates on the Pareto front, by scan time
	StartID                                        string     // candidate the stepper opens on
	StartGroup                                     string
	Groups                                         []string
	Script                                         template.JS
}

type pickView struct {
	Found                         bool
	Protocol, Scheme, Method, R   string
	Lines                         string
	Time, Seconds                 string
	Saved, SavedSeconds, SavedPct string
	Longer                        bool
	Mean, Bound                   string
	Lambda                        string
	Target                        string // id of the candidate section, if found among them
}

type chartView struct {
	Name, Caption string
	Src           template.HTMLAttr
	Alt           string
}

type tableView struct {
	Header []string
	Rows   []rowView
}

type rowView struct {
	Cells       []string
	Meets, Pick bool
}

type candView struct {
	ID, Number                   string
	Label, Scheme, Method, Group string
	R, Lines, Time, Seconds      string
	Lambda, Note                 string
	Meets, Pick, Pareto          bool
	AcceptMean, AcceptBound      string // the acceptance metric, "" if absent
	Values                       []valueView
	Figures                      []figView
}

type valueView struct {
	Metric, Mean, Std, Bound, N string
	Accept                      bool
}

type figView struct {
	Kind, Caption, Note, Alt string
	Src                      template.HTMLAttr
}

// formatSeconds prints seconds with one decimal ("128.0 s").
func formatSeconds(s float64) string {
	if math.Abs(s) < 1 {
		return strconv.FormatFloat(s*1000, 'f', 1, 64) + " ms"
	}
	if math.Abs(s) < 10 {
		return strconv.FormatFloat(s, 'f', 2, 64) + " s"
	}
	return strconv.FormatFloat(s, 'f', 1, 64) + " s"
}

// reportTime is a scan time as the report's headings and tables show it:
// clock time (FormatMinSec) from ten seconds on, seconds with two decimals
// below and milliseconds below a second (formatSeconds), where whole-second
// clock time would read 0:00 for the acquisitions of optical tomography.
func reportTime(s float64) string {
	if math.Abs(s) < 10 {
		return formatSeconds(s)
	}
	return FormatMinSec(s)
}

// secondsIfClock is formatSeconds(s) where reportTime shows clock time, and
// "" where it shows the seconds already.
func secondsIfClock(s float64) string {
	if sec := formatSeconds(s); sec != reportTime(s) {
		return sec
	}
	return ""
}

// timeAndSeconds is reportTime(s) followed by the seconds in parentheses
// when reportTime shows clock time: "1:48 (108.0 s)", "275.0 ms".
func timeAndSeconds(s float64) string {
	if sec := secondsIfClock(s); sec != "" {
		return reportTime(s) + " (" + sec + ")"
	}
	return reportTime(s)
}

// formatR prints an acceleration factor with at most two decimals.
func formatR(r float64) string {
	s := strconv.FormatFloat(r, 'f', 2, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	return s
}

func finiteReport(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// srcAttr is the attribute src="data:<mime>;base64,..." for b. It is
// written as a trusted attribute because base64 text holds only
// [A-Za-z0-9+/=], none of which needs escaping inside a quoted attribute;
// left to html/template, every "+" would grow into "&#43;".
func srcAttr(mime string, b []byte) template.HTMLAttr {
	return template.HTMLAttr(`src="data:` + mime + ";base64," + base64.StdEncoding.EncodeToString(b) + `"`)
}

// pngDataURI checks that b is a decodable PNG and returns it as a data URI.
func pngDataURI(what string, b []byte) (template.HTMLAttr, error) {
	if _, err := png.Decode(bytes.NewReader(b)); err != nil {
		return "", fmt.Errorf("out: report %s is not a readable PNG: %v", what, err)
	}
	return srcAttr("image/png", b), nil
}

// svgDataURI checks that b is well-formed XML with an <svg> root element and
// returns it as a data URI (shown through <img>, where an SVG runs no script).
func svgDataURI(what string, b []byte) (template.HTMLAttr, error) {
	d := xml.NewDecoder(bytes.NewReader(b))
	root := ""
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return "", fmt.Errorf("out: report %s is not well-formed SVG: %v", what, err)
		}
		if se, ok := tok.(xml.StartElement); ok && root == "" {
			root = se.Name.Local
		}
	}
	if root != "svg" {
		return "", fmt.Errorf("out: report %s is not SVG: its root element is %q", what, root)
	}
	return srcAttr("image/svg+xml", b), nil
}

// scaleBar renders a horizontal ramp with n steps as a PNG data URI.
func scaleBar(img image.Image) template.HTMLAttr {
	b, err := EncodeReportPNG(img)
	if err != nil {
		return ""
	}
	return srcAttr("image/png", b)
}

func buildReportView(r Report) (*reportView, error) {
	metric := strings.TrimSpace(r.Metric)
	if metric == "" {
		return nil, errors.New("out: report has no acceptance metric name")
	}
	if !finiteReport(r.Threshold) {
		return nil, fmt.Errorf("out: report threshold %g is not a finite number", r.Threshold)
	}
	if !finiteReport(r.ReferenceTime) || r.ReferenceTime <= 0 {
		return nil, fmt.Errorf("out: report reference scan time %g s must be a positive finite number", r.ReferenceTime)
	}
	if !finiteReport(r.ErrorLimit) || r.ErrorLimit < 0 {
		return nil, fmt.Errorf("out: report error-map scale %g must be a finite non-negative number", r.ErrorLimit)
	}
	if !finiteReport(r.GrayLo) || !finiteReport(r.GrayHi) {
		return nil, fmt.Errorf("out: report grey window [%g, %g] is not finite", r.GrayLo, r.GrayHi)
	}
	op := "≥"
	if !r.HigherIsBetter {
		op = "≤"
	}
	v := &reportView{
		Title:          strings.TrimSpace(r.Title),
		Caution:        strings.TrimSpace(r.Caution),
		Version:        r.Version,
		PlanName:       r.PlanName,
		GeneratedAt:    r.GeneratedAt,
		Facts:          r.Facts,
		Metric:         metric,
		BarShort:       fmt.Sprintf("%s %s %s", metric, op, formatValue(r.Threshold)),
		Reference:      timeAndSeconds(r.ReferenceTime),
		ReferenceLabel: r.ReferenceLabel,
		ErrorNote:      r.ErrorNote,
		Script:         template.JS(reportScript),
	}
	if v.Title == "" {
		v.Title = "accelplan report"
	}
	v.BarLong = v.BarShort + " at the one-sided 95% confidence bound"

	var err error
	if v.Pick, err = buildPick("recommendation", r.Recommendation, r.ReferenceTime); err != nil {
		return nil, err
	}
	for i, p := range r.PerCurve {
		pv, err := buildPick(fmt.Sprintf("per-curve pick %d", i+1), p, r.ReferenceTime)
		if err != nil {
			return nil, err
		}
		v.PerCurve = append(v.PerCurve, pv)
	}

	for i, c := range r.Charts {
		what := fmt.Sprintf("chart %d (%q)", i+1, c.Name)
		cv := chartView{Name: c.Name, Caption: c.Caption, Alt: "chart: " + c.Name}
		switch {
		case c.PNG != nil:
			cv.Src, err = pngDataURI(what, c.PNG)
		case c.SVG != nil:
			cv.Src, err = svgDataURI(what, c.SVG)
		default:
			err = fmt.Errorf("out: report %s has neither PNG nor SVG", what)
		}
		if err != nil {
			return nil, err
		}
		v.Charts = append(v.Charts, cv)
	}

	v.Table.Header = r.Table.Header
	for i, row := range r.Table.Rows {
		if len(row.Cells) != len(r.Table.Header) {
			return nil, fmt.Errorf("out: report table row %d has %d cells, the header has %d", i+1, len(row.Cells), len(r.Table.Header))
		}
		v.Table.Rows = append(v.Table.Rows, rowView{Cells: row.Cells, Meets: row.Meets, Pick: row.Pick})
	}

	if r.ErrorLimit > 0 {
		v.ErrorLimit = formatValue(r.ErrorLimit)
		const n = 257
		ramp := make([]float64, n)
		for i := range ramp {
			ramp[i] = r.ErrorLimit * (2*float64(i)/(n-1) - 1)
		}
		m, err := DivergingImage(ramp, 1, n, r.ErrorLimit)
		if err != nil {
			return nil, err
		}
		v.ErrorBar = scaleBar(m)
	}
	if r.GrayLo < r.GrayHi {
		v.GrayLo, v.GrayHi = formatValue(r.GrayLo), formatValue(r.GrayHi)
		ramp := make([]float64, 256)
		for i := range ramp {
			ramp[i] = r.GrayLo + (r.GrayHi-r.GrayLo)*float64(i)/255
		}
		m, err := GrayImage(ramp, 1, len(ramp), r.GrayLo, r.GrayHi)
		if err != nil {
			return nil, err
		}
		v.GrayBar = scaleBar(m)
	}

	var sharedTruth template.HTMLAttr
	if r.Truth != nil {
		if sharedTruth, err = pngDataURI("truth image", r.Truth); err != nil {
			return nil, err
		}
	}

	order := make([]int, len(r.Candidates))
	for i := range order {
		order[i] = i
	}
	for i, c := range r.Candidates {
		if !finiteReport(c.ScanTime) || c.ScanTime < 0 {
			return nil, fmt.Errorf("out: report candidate %d (%q): scan time %g s is not a finite non-negative number", i+1, c.Label, c.ScanTime)
		}
	}
	sort.SliceStable(order, func(a, b int) bool {
		return r.Candidates[order[a]].ScanTime < r.Candidates[order[b]].ScanTime
	})
	seenGroup := map[string]bool{}
	longest := ""
	for k, i := range order {
		c := r.Candidates[i]
		cv, err := buildCandidate(k, i, c, r, metric, sharedTruth)
		if err != nil {
			return nil, err
		}
		if cv.Meets {
			v.Passing++
		}
		if cv.Pick && v.StartID == "" {
			v.StartID, v.StartGroup = cv.ID, cv.Group
		}
		if !seenGroup[cv.Group] {
			seenGroup[cv.Group] = true
			v.Groups = append(v.Groups, cv.Group)
		}
		longest = cv.ID
		v.Candidates = append(v.Candidates, cv)
	}
	if v.StartID == "" {
		v.StartID = longest
	}
	times := make([]float64, len(order))
	means := make([]float64, len(order))
	for k, i := range order {
		times[k], means[k] = r.Candidates[i].ScanTime, math.NaN()
		for _, val := range r.Candidates[i].Values {
			if strings.EqualFold(strings.TrimSpace(val.Metric), metric) {
				means[k] = val.Mean
				break
			}
		}
	}
	for k, on := range ParetoFront(times, means, r.HigherIsBetter) {
		if on {
			v.Candidates[k].Pareto = true
			v.Pareto = append(v.Pareto, v.Candidates[k])
		}
	}
	if v.Pick.Found {
		for _, cv := range v.Candidates {
			if cv.Pick {
				v.Pick.Target = cv.ID
				break
			}
		}
	}
	return v, nil
}

// ParetoFront marks the candidates that no other candidate beats on both
// scan time and quality: candidate i is on the front unless some j has
// times[j] ≤ times[i] and a quality at least as good, with at least one of
// the two strictly better (Pareto dominance; e.g. Deb K, Multi-Objective
// Optimization Using Evolutionary Algorithms, Wiley 2001, ch. 2). quality
// is better when higher if higherIsBetter, else when lower. Candidates with
// a NaN time or quality take no part and are never on the front. The
// slices must have the same length; the result has that length too.
func ParetoFront(times, quality []float64, higherIsBetter bool) []bool {
	n := min(len(times), len(quality))
	on := make([]bool, len(times))
	better := func(a, b float64) bool { // a strictly better than b
		if higherIsBetter {
			return a > b
		}
		return a < b
	}
	for i := range n {
		if math.IsNaN(times[i]) || math.IsNaN(quality[i]) {
			continue
		}
		on[i] = true
		for j := range n {
			if j == i || math.IsNaN(times[j]) || math.IsNaN(quality[j]) {
				continue
			}
			noWorse := times[j] <= times[i] && !better(quality[i], quality[j])
			strictly := times[j] < times[i] || better(quality[j], quality[i])
			if noWorse && strictly {
				on[i] = false
				break
			}
		}
	}
	return on
}

func buildPick(what string, p ReportPick, ref float64) (pickView, error) {
	if !p.Found {
		return pickView{Protocol: p.Protocol, Scheme: p.Scheme, Method: p.Method}, nil
	}
	for _, f := range []struct {
		name string
		x    float64
	}{{"scan time", p.ScanTime}, {"mean", p.Mean}, {"confidence bound", p.Bound}, {"R", p.R}} {
		if !finiteReport(f.x) {
			return pickView{}, fmt.Errorf("out: report %s: %s %g is not finite", what, f.name, f.x)
		}
	}
	if p.ScanTime < 0 {
		return pickView{}, fmt.Errorf("out: report %s: scan time %g s is negative", what, p.ScanTime)
	}
	saved := ref - p.ScanTime
	pv := pickView{
		Found: true, Protocol: p.Protocol, Scheme: p.Scheme, Method: p.Method,
		Time: reportTime(p.ScanTime), Seconds: secondsIfClock(p.ScanTime),
		Saved: reportTime(math.Abs(saved)), SavedSeconds: formatSeconds(math.Abs(saved)),
		SavedPct: strconv.FormatFloat(100*math.Abs(saved)/ref, 'f', 1, 64) + "%",
		Longer:   saved < 0,
		Mean:     formatValue(p.Mean), Bound: formatValue(p.Bound),
		Lambda: p.Lambda,
	}
	if p.R > 0 {
		pv.R = formatR(p.R)
	}
	if p.Lines > 0 {
		pv.Lines = strconv.Itoa(p.Lines)
	}
	if pv.Protocol == "" {
		pv.Protocol = strings.TrimSpace(p.Scheme + ", " + p.Method)
	}
	return pv, nil
}

func buildCandidate(k, i int, c ReportCandidate, r Report, metric string, sharedTruth template.HTMLAttr) (candView, error) {
	label := c.Label
	if label == "" {
		label = "R = " + formatR(c.R)
		if c.Lines > 0 {
			label += fmt.Sprintf(", %d lines", c.Lines)
		}
	}
	what := fmt.Sprintf("candidate %d (%q)", i+1, label)
	group := c.Scheme
	if c.Method != "" {
		if group != "" {
			group += " · "
		}
		group += c.Method
	}
	if group == "" {
		group = "all"
	}
	cv := candView{
		ID: fmt.Sprintf("cand-%d", k+1), Number: strconv.Itoa(k + 1),
		Label: label, Scheme: c.Scheme, Method: c.Method, Group: group,
		Time: reportTime(c.ScanTime), Seconds: secondsIfClock(c.ScanTime),
		Lambda: c.Lambda, Note: c.Note, Meets: c.Meets, Pick: c.Pick,
	}
	if !finiteReport(c.R) || c.R < 0 {
		return candView{}, fmt.Errorf("out: report %s: R = %g is not a finite non-negative number", what, c.R)
	}
	if c.R > 0 {
		cv.R = formatR(c.R)
	}
	if c.Lines > 0 {
		cv.Lines = strconv.Itoa(c.Lines)
	}
	for _, val := range c.Values {
		if !finiteReport(val.Mean) {
			return candView{}, fmt.Errorf("out: report %s: %s mean %g is not finite", what, val.Metric, val.Mean)
		}
		vv := valueView{Metric: val.Metric, Mean: formatValue(val.Mean), Accept: strings.EqualFold(val.Metric, metric)}
		if finiteReport(val.Std) {
			vv.Std = formatValue(val.Std)
		}
		if finiteReport(val.Bound) {
			vv.Bound = formatValue(val.Bound)
		}
		if val.N > 0 {
			vv.N = strconv.Itoa(val.N)
		}
		if vv.Accept && cv.AcceptMean == "" {
			cv.AcceptMean, cv.AcceptBound = vv.Mean, vv.Bound
		}
		cv.Values = append(cv.Values, vv)
	}
	maskCaption := c.MaskCaption
	if maskCaption == "" {
		maskCaption = "sampling mask"
	}
	errNote := ""
	if r.ErrorLimit > 0 {
		errNote = "shared scale ±" + formatValue(r.ErrorLimit)
	}
	figs := []struct {
		kind, caption, note string
		b                   []byte
	}{
		{"recon", "reconstruction", "", c.Recon},
		{"truth", "truth", "", c.Truth},
		{"error", "error map", errNote, c.Error},
		{"mask", maskCaption, "", c.Mask},
		{"psf", "point-spread function", "", c.PSF},
	}
	for _, f := range figs {
		fv := figView{Kind: f.kind, Caption: f.caption, Note: f.note, Alt: f.caption + " of " + label}
		switch {
		case f.b != nil:
			src, err := pngDataURI(what+" "+f.caption, f.b)
			if err != nil {
				return candView{}, err
			}
			fv.Src = src
		case f.kind == "truth":
			fv.Src = sharedTruth
		}
		if f.kind == "error" && f.b != nil && r.ErrorLimit <= 0 {
			return candView{}, fmt.Errorf("out: report %s has an error map but the report's shared error scale (ErrorLimit) is not set", what)
		}
		cv.Figures = append(cv.Figures, fv)
	}
	for _, f := range c.Extra {
		if f.PNG == nil {
			return candView{}, fmt.Errorf("out: report %s: extra figure %q has no image", what, f.Caption)
		}
		src, err := pngDataURI(what+" "+f.Caption, f.PNG)
		if err != nil {
			return candView{}, err
		}
		cv.Figures = append(cv.Figures, figView{Kind: "extra", Caption: f.Caption, Note: f.Note, Alt: f.Caption + " of " + label, Src: src})
	}
	return cv, nil
}
