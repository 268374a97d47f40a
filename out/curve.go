package out

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"
	"sort"
	"strings"
	"unicode/utf8"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// CurvePoint is one candidate protocol on a quality-versus-scan-time curve:
// the statistics of one quality metric over N noise realisations.
type CurvePoint struct {
	Label    string  // short name of the candidate, e.g. "R=4, 24 calibration lines"
	ScanTime float64 // scan time in seconds
	Mean     float64 // mean of the metric over the noise draws
	Std      float64 // standard deviation of the metric over the noise draws
	// Lower is the one-sided 95% confidence bound of the metric on its
	// conservative side: below Mean when higher values are better, above
	// Mean when lower values are better (the name follows the first case).
	Lower float64
	N     int // number of noise draws behind Mean, Std and Lower
}

// Curve is one line of the chart: one sampling scheme with one
// reconstruction method, at several scan times.
type Curve struct {
	Name   string
	Points []CurvePoint
}

// PointRef names one point of a chart: Points[Point] of Curves[Curve].
type PointRef struct{ Curve, Point int }

// ErrorBars says what the vertical bars on a chart's points show.
type ErrorBars int

const (
	// BarsStd draws Mean ± Std (one standard deviation over the noise draws).
	BarsStd ErrorBars = iota
	// BarsBound draws from Mean to the one-sided 95% bound Lower.
	BarsBound
	// BarsNone draws no bars.
	BarsNone
)

// CurveChart is everything the quality-versus-scan-time chart shows.
type CurveChart struct {
	Title  string // chart title; may be empty
	Metric string // quality metric name, e.g. "SSIM"; labels the vertical axis
	// Threshold is the acceptance bar drawn as a dashed horizontal line;
	// NaN omits it.
	Threshold float64
	// HigherIsBetter tells which side of the bar passes (the failing side is
	// shaded).
	HigherIsBetter bool
	Curves         []Curve
	// Pick is the recommended point, marked distinctly; nil if none.
	Pick *PointRef
	// Caution is printed under the chart when it is not empty.
	Caution string
	// Bars chooses what the error bars show; the legend says which.
	Bars ErrorBars
	// Front draws the Pareto front across all curves: the points that no
	// other point beats in both scan time and mean quality (ParetoFront).
	Front bool
}

// Chart geometry and type sizes. The PNG is 1350×810 pixels.
const (
	chartWidth  = 9 * vg.Inch
	chartHeight = 5.4 * vg.Inch
	chartDPI    = 150
)

var (
	inkColor     = color.RGBA{0x22, 0x22, 0x22, 0xFF}
	mutedInk     = color.RGBA{0x55, 0x55, 0x55, 0xFF}
	gridColor    = color.RGBA{0xE3, 0xE3, 0xE3, 0xFF}
	failShade    = color.RGBA{0xF4, 0xF0, 0xEA, 0xFF}
	barColor     = color.RGBA{0x33, 0x33, 0x33, 0xFF}
	pickColor    = color.RGBA{0x11, 0x11, 0x11, 0xFF}
	cautionColor = color.RGBA{0x9A, 0x3A, 0x00, 0xFF}
)

// glyphShapes is the marker cycle; together with the palette it keeps
// curves apart without relying on colour alone.
var glyphShapes = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, draw.RingGlyph{},
	draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{},
}

func textStyle(size vg.Length, bold bool, c color.Color) text.Style {
	f := font.Font{Typeface: "Liberation", Variant: "Sans"}
	if bold {
		f.Weight = xfont.WeightBold
	}
	return text.Style{
		Color:   c,
		Font:    font.From(f, size),
		Handler: plot.DefaultTextHandler,
	}
}

// Validate reports the first problem that would make the chart meaningless
// or impossible to draw.
func (c CurveChart) Validate() error {
	if len(c.Curves) == 0 {
		return errors.New("out: chart has no curves")
	}
	total := 0
	for ci, cu := range c.Curves {
		for pi, p := range cu.Points {
			where := fmt.Sprintf("curve %d (%q) point %d (%q)", ci+1, cu.Name, pi+1, p.Label)
			switch {
			case math.IsNaN(p.ScanTime) || math.IsInf(p.ScanTime, 0) || p.ScanTime < 0:
				return fmt.Errorf("out: chart %s: scan time %g s is not a finite non-negative number", where, p.ScanTime)
			case math.IsNaN(p.Mean) || math.IsInf(p.Mean, 0):
				return fmt.Errorf("out: chart %s: mean %g is not finite", where, p.Mean)
			case c.Bars == BarsStd && (math.IsNaN(p.Std) || math.IsInf(p.Std, 0) || p.Std < 0):
				return fmt.Errorf("out: chart %s: standard deviation %g is not a finite non-negative number", where, p.Std)
			case c.Bars == BarsBound && (math.IsNaN(p.Lower) || math.IsInf(p.Lower, 0)):
				return fmt.Errorf("out: chart %s: 95%% bound %g is not finite", where, p.Lower)
			case p.N < 0:
				return fmt.Errorf("out: chart %s: negative draw count %d", where, p.N)
			}
		}
		total += len(cu.Points)
	}
	if total == 0 {
		return errors.New("out: chart curves have no points")
	}
	if math.IsInf(c.Threshold, 0) {
		return fmt.Errorf("out: chart threshold %g is infinite; use NaN to omit it", c.Threshold)
	}
	if c.Bars < BarsStd || c.Bars > BarsNone {
		return fmt.Errorf("out: chart error-bar kind %d is unknown", c.Bars)
	}
	if p := c.Pick; p != nil {
		if p.Curve < 0 || p.Curve >= len(c.Curves) {
			return fmt.Errorf("out: chart recommended point names curve %d of %d", p.Curve+1, len(c.Curves))
		}
		if n := len(c.Curves[p.Curve].Points); p.Point < 0 || p.Point >= n {
			return fmt.Errorf("out: chart recommended point names point %d of %d on curve %q", p.Point+1, n, c.Curves[p.Curve].Name)
		}
	}
	return nil
}

// PlotCurve draws the quality-versus-scan-time chart with gonum.org/v1/plot
// and writes it as PNG to pngPath and as SVG to svgPath (either may be
// empty to skip that format; not both). Scan time runs along the horizontal
// axis, labelled m:ss (h:mm:ss past an hour, plain seconds for short
// acquisitions); each curve is a line in its own colour and marker with
// error bars; the acceptance bar is a dashed horizontal line with the
// failing side shaded; the recommended point is circled and guided to the
// time axis by a dotted line. The legend sits beside the plot, never over
// the data. Both files are rendered before either is written, and each is
// written atomically.
func PlotCurve(pngPath, svgPath string, c CurveChart) error {
	if pngPath == "" && svgPath == "" {
		return errors.New("out: PlotCurve needs a PNG or an SVG path")
	}
	if err := c.Validate(); err != nil {
		return err
	}
	var pngBytes, svgBytes []byte
	var err error
	if pngPath != "" {
		if pngBytes, err = renderCurve(c, "png"); err != nil {
			return fmt.Errorf("%w (drawing %s)", err, pngPath)
		}
	}
	if svgPath != "" {
		if svgBytes, err = renderCurve(c, "svg"); err != nil {
			return fmt.Errorf("%w (drawing %s)", err, svgPath)
		}
	}
	if pngPath != "" {
		if err := writeBytesAtomic(pngPath, pngBytes); err != nil {
			return err
		}
	}
	if svgPath != "" {
		if err := writeBytesAtomic(svgPath, svgBytes); err != nil {
			return err
		}
	}
	return nil
}

// renderCurve draws a validated chart to "png" or "svg" bytes.
func renderCurve(c CurveChart, format string) (b []byte, err error) {
	defer func() {
		if r := recover(); r != nil {
			b, err = nil, fmt.Errorf("out: the plotting library failed: %v", r)
		}
	}()
	var cw vg.CanvasWriterTo
	switch format {
	case "png":
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(chartWidth, chartHeight), vgimg.UseDPI(chartDPI))}
	case "svg":
		cw = vgsvg.New(chartWidth, chartHeight)
	default:
		return nil, fmt.Errorf("out: unknown chart format %q", format)
	}
	dc := draw.New(cw)
	layoutChart(dc, c)
	var buf bytes.Buffer
	if _, err := cw.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("out: encoding chart as %s: %w", format, err)
	}
	if format == "svg" {
		// Name a generic fallback, so viewers without the font still draw
		// sans-serif text of similar width.
		return bytes.ReplaceAll(buf.Bytes(), []byte("font-family:Liberation Sans;"),
			[]byte("font-family:'Liberation Sans',sans-serif;")), nil
	}
	return buf.Bytes(), nil
}

// chartLayout records where layoutChart put the data area and the legend.
type chartLayout struct {
	data, legend vg.Rectangle
}

// layoutChart splits the canvas into title, plot, legend column and caution
// and draws each.
func layoutChart(dc draw.Canvas, c CurveChart) chartLayout {
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())

	const margin = 3.5 * vg.Millimeter
	area := draw.Crop(dc, margin, -margin, margin, -margin)

	if c.Title != "" {
		sty := textStyle(15, true, inkColor)
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YTop
		lines := capLines(sty, wrapText(sty, c.Title, area.Max.X-area.Min.X), maxTitleLines, area.Max.X-area.Min.X)
		y := area.Max.Y
		for _, l := range lines {
			area.FillText(sty, vg.Point{X: area.Min.X, Y: y}, l)
			y -= sty.Height(l)
		}
		area.Max.Y = y - 6
	}

	if c.Caution != "" {
		sty := textStyle(10.5, false, cautionColor)
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YBottom
		lines := capLines(sty, wrapText(sty, "Caution: "+c.Caution, area.Max.X-area.Min.X), maxCautionLines, area.Max.X-area.Min.X)
		y := area.Min.Y
		for i := len(lines) - 1; i >= 0; i-- {
			area.FillText(sty, vg.Point{X: area.Min.X, Y: y}, lines[i])
			y += sty.Height(lines[i])
		}
		area.Min.Y = y + 6
	}

	// The legend column takes at most a third of the width; its type
	// shrinks until it fits the height beside the plot.
	entries := legendEntries(c)
	limit := (area.Max.X - area.Min.X) * 0.34
	size, legendW := legendSizes[0], vg.Length(0)
	fits := func() bool { return legendHeight(entries, legendW, size) <= area.Max.Y-area.Min.Y }
	for _, size = range legendSizes {
		legendW = legendWidth(entries, limit, size)
		if fits() {
			break
		}
	}
	// Still too tall at the smallest type: list fewer curves and say so.
	for hidden := 1; !fits() && hidden < len(c.Curves); hidden++ {
		entries = legendEntriesShowing(c, len(c.Curves)-hidden)
	}
	plotArea := draw.Crop(area, 0, -(legendW + 10), 0, 0)
	legendArea := draw.Crop(area, area.Max.X-area.Min.X-legendW, 0, 0, 0)

	p := buildPlot(c)
	p.Draw(plotArea)
	// Align the legend's top with the top of the data area.
	top := p.DataCanvas(plotArea).Max.Y
	if legendHeight(entries, legendW, size) > top-legendArea.Min.Y {
		top = legendArea.Max.Y
	}
	legendArea.Max.Y = top
	drawLegend(legendArea, entries, legendW, size)
	lr := legendArea.Rectangle
	lr.Min.Y = top - legendHeight(entries, legendW, size)
	return chartLayout{data: p.DataCanvas(plotArea).Rectangle, legend: lr}
}

// Most lines of title and caution text on a chart; the rest is cut with
// "…" (the full text belongs in the report and the tables).
const (
	maxTitleLines   = 2
	maxCautionLines = 5
)

// capLines keeps at most n lines, marking a cut with "…" on the last one.
func capLines(sty text.Style, lines []string, n int, width vg.Length) []string {
	if len(lines) <= n {
		return lines
	}
	lines = lines[:n]
	last := lines[n-1]
	for last != "" && sty.Width(last+" …") > width {
		_, k := utf8.DecodeLastRuneInString(last)
		last = last[:len(last)-k]
	}
	lines[n-1] = last + " …"
	return lines
}

// breakWord splits a word wider than width into pieces that fit.
func breakWord(sty text.Style, w string, width vg.Length) []string {
	var parts []string
	for w != "" {
		n := len(w)
		for n > 0 && sty.Width(w[:n]) > width {
			_, k := utf8.DecodeLastRuneInString(w[:n])
			n -= k
		}
		if n == 0 { // not even one character fits: keep one anyway
			_, n = utf8.DecodeRuneInString(w)
		}
		parts = append(parts, w[:n])
		w = w[n:]
	}
	return parts
}

// wrapText breaks txt into lines no wider than width, at spaces, and
// inside words only where one word alone is too wide.
func wrapText(sty text.Style, txt string, width vg.Length) []string {
	var lines []string
	for _, para := range strings.Split(txt, "\n") {
		var words []string
		for _, w := range strings.Fields(para) {
			if sty.Width(w) > width {
				words = append(words, breakWord(sty, w, width)...)
			} else {
				words = append(words, w)
			}
		}
		if len(words) == 0 {
			lines = append(lines, "")
			continue
		}
		line := words[0]
		for _, w := range words[1:] {
			if sty.Width(line+" "+w) <= width {
				line += " " + w
				continue
			}
			lines = append(lines, line)
			line = w
		}
		lines = append(lines, line)
	}
	return lines
}

// formatValue prints a metric value compactly.
func formatValue(v float64) string {
	return fmt.Sprintf("%.4g", v)
}

// useClock reports whether the time axis is labelled as clock time (m:ss):
// from 90 s on; below that plain seconds read better.
func useClock(maxTime float64) bool { return maxTime >= 90 }

// clockTicks places time-axis ticks at whole, readable steps (1, 2, 5, 10,
// 15, 20, 30 s, 1, 2, 3, 5, 10, 15, 20, 30 min, 1, 2, 3, 6, 12 h, days)
// labelled with FormatMinSec.
type clockTicks struct {
	hours bool // label every tick h:mm:ss, also those below one hour
}

var clockSteps = []struct {
	step  float64
	minor int // minor subdivisions per major step
}{
	{1, 1}, {2, 2}, {5, 5}, {10, 2}, {15, 3}, {20, 2}, {30, 3},
	{60, 2}, {120, 2}, {180, 3}, {300, 5}, {600, 2}, {900, 3}, {1200, 2}, {1800, 3},
	{3600, 2}, {7200, 2}, {10800, 3}, {21600, 2}, {43200, 2}, {86400, 2},
}

// Ticks implements plot.Ticker.
func (ct clockTicks) Ticks(min, max float64) []plot.Tick {
	span := max - min
	step, minor := clockSteps[len(clockSteps)-1].step, 2
	found := false
	for _, s := range clockSteps {
		if span/s.step <= 7 {
			step, minor, found = s.step, s.minor, true
			break
		}
	}
	if !found {
		for span/step > 7 {
			step *= 2
		}
	}
	var ticks []plot.Tick
	sub := step / float64(minor)
	for v := math.Ceil(min/sub) * sub; v <= max+1e-9*step; v += sub {
		k := math.Round(v / sub)
		if int64(k)%int64(minor) == 0 {
			label := FormatMinSec(v)
			if ct.hours && math.Abs(v) < 3599.5 {
				label = formatHMS(v)
			}
			ticks = append(ticks, plot.Tick{Value: v, Label: label})
		} else {
			ticks = append(ticks, plot.Tick{Value: v})
		}
	}
	return ticks
}

// niceTicks places value-axis ticks at 1, 2, 2.5 or 5 × 10^k steps (about
// five to eight major ticks) with labels of one consistent precision.
type niceTicks struct{}

// niceStep returns the smallest 1, 2, 2.5 or 5 × 10^k step that cuts span
// into at most maxIntervals intervals, and its number of minor subdivisions.
func niceStep(span float64, maxIntervals int) (float64, int) {
	mag := math.Pow(10, math.Floor(math.Log10(span/float64(maxIntervals))))
	for {
		for _, m := range []struct {
			f     float64
			minor int
		}{{1, 2}, {2, 2}, {2.5, 5}, {5, 5}} {
			if span/(m.f*mag) <= float64(maxIntervals)*1.0000001 {
				return m.f * mag, m.minor
			}
		}
		mag *= 10
	}
}

// Ticks implements plot.Ticker.
func (niceTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) {
		return []plot.Tick{{Value: min, Label: formatValue(min)}}
	}
	step, minor := niceStep(max-min, 7)
	decimals := max0(int(-math.Floor(math.Log10(step) + 1e-9)))
	if math.Abs(step/math.Pow(10, math.Floor(math.Log10(step)+1e-9))-2.5) < 1e-6 {
		decimals++
	}
	sub := step / float64(minor)
	var ticks []plot.Tick
	for k := math.Ceil(min/sub - 1e-9); k*sub <= max+1e-9*step; k++ {
		v := k * sub
		t := plot.Tick{Value: v}
		if int64(math.Round(k))%int64(minor) == 0 {
			if math.Abs(v) < 1e-12*step {
				v = 0
			}
			t.Label = fmt.Sprintf("%.*f", decimals, v)
		}
		ticks = append(ticks, t)
	}
	return ticks
}

func max0(n int) int { return max(n, 0) }

// pointXY is a plotted position with its bar ends.
type pointXY struct{ x, y, lo, hi float64 }

// curveData converts a curve to plotted positions, sorted by scan time.
func curveData(cu Curve, bars ErrorBars) []pointXY {
	pts := make([]pointXY, len(cu.Points))
	for i, p := range cu.Points {
		q := pointXY{x: p.ScanTime, y: p.Mean, lo: p.Mean, hi: p.Mean}
		switch bars {
		case BarsStd:
			q.lo, q.hi = p.Mean-p.Std, p.Mean+p.Std
		case BarsBound:
			q.lo, q.hi = math.Min(p.Mean, p.Lower), math.Max(p.Mean, p.Lower)
		}
		pts[i] = q
	}
	sort.SliceStable(pts, func(a, b int) bool { return pts[a].x < pts[b].x })
	return pts
}

// chartRanges returns padded axis ranges covering data, bars and threshold.
func chartRanges(c CurveChart) (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for _, cu := range c.Curves {
		for _, q := range curveData(cu, c.Bars) {
			xmin, xmax = math.Min(xmin, q.x), math.Max(xmax, q.x)
			ymin, ymax = math.Min(ymin, q.lo), math.Max(ymax, q.hi)
		}
	}
	if !math.IsNaN(c.Threshold) {
		ymin, ymax = math.Min(ymin, c.Threshold), math.Max(ymax, c.Threshold)
	}
	pad := func(lo, hi, frac, least float64) (float64, float64) {
		d := (hi - lo) * frac
		if d == 0 {
			d = math.Max(least, math.Abs(lo)*0.05)
		}
		return lo - d, hi + d
	}
	dataMin := xmin
	xmin, xmax = pad(xmin, xmax, 0.05, 1)
	if dataMin >= 0 {
		xmin = math.Max(xmin, 0) // no negative scan times on the axis
	}
	ymin, ymax = pad(ymin, ymax, 0.07, 0.01)
	return xmin, xmax, ymin, ymax
}

func buildPlot(c CurveChart) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil
	xmin, xmax, ymin, ymax := chartRanges(c)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax

	tick := textStyle(10.5, false, inkColor)
	label := textStyle(12, false, inkColor)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Tick.Label.Font = tick.Font
		ax.Tick.Label.Color = inkColor
		ax.Label.TextStyle.Font = label.Font
		ax.Label.TextStyle.Color = inkColor
		ax.Label.Padding = 4
		ax.LineStyle.Color = mutedInk
		ax.Tick.LineStyle.Color = mutedInk
		ax.Padding = 0
	}
	maxTime := 0.0
	for _, cu := range c.Curves {
		for _, q := range cu.Points {
			maxTime = math.Max(maxTime, q.ScanTime)
		}
	}
	p.Y.Tick.Marker = niceTicks{}
	switch {
	case !useClock(maxTime):
		p.X.Label.Text = "scan time (s)"
		p.X.Tick.Marker = niceTicks{}
	case maxTime+0.05*(p.X.Max-p.X.Min) >= 3600:
		p.X.Label.Text = "scan time (h:mm:ss)"
		p.X.Tick.Marker = clockTicks{hours: true}
	default:
		p.X.Label.Text = "scan time (m:ss)"
		p.X.Tick.Marker = clockTicks{}
	}
	metric := c.Metric
	if metric == "" {
		metric = "quality"
	}
	if c.HigherIsBetter {
		p.Y.Label.Text = metric + " (higher is better)"
	} else {
		p.Y.Label.Text = metric + " (lower is better)"
	}

	if !math.IsNaN(c.Threshold) {
		p.Add(failRegion{threshold: c.Threshold, higherIsBetter: c.HigherIsBetter})
	}
	grid := plotter.NewGrid()
	grid.Vertical.Color, grid.Horizontal.Color = gridColor, gridColor
	grid.Vertical.Width, grid.Horizontal.Width = 0.6, 0.6
	p.Add(grid)
	if !math.IsNaN(c.Threshold) {
		p.Add(thresholdLine{y: c.Threshold})
	}
	if c.Pick != nil {
		pt := c.Curves[c.Pick.Curve].Points[c.Pick.Point]
		p.Add(pickGuide{x: pt.ScanTime, y: pt.Mean})
	}
	if c.Front {
		p.Add(frontLine{pts: frontPoints(c)})
	}
	for i, cu := range c.Curves {
		pts := curveData(cu, c.Bars)
		if c.Bars != BarsNone {
			p.Add(errorBars{pts: pts, color: CurveColor(i)})
		}
		p.Add(curveLine{pts: pts, style: curveStyle(i)})
	}
	if c.Pick != nil {
		pt := c.Curves[c.Pick.Curve].Points[c.Pick.Point]
		p.Add(pickMarker{x: pt.ScanTime, y: pt.Mean})
	}
	// p.Add widened the ranges to whatever the plotters reported; restore
	// ours (which already cover everything drawn).
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax
	return p
}

// lineStyles of curve i: colour from the palette, marker from the cycle.
type lineStyles struct {
	line  draw.LineStyle
	glyph draw.GlyphStyle
}

func curveStyle(i int) lineStyles {
	col := CurveColor(i)
	var dashes []vg.Length
	if (i/len(palette))%2 == 1 { // second time round the palette: dashed
		dashes = []vg.Length{vg.Points(5), vg.Points(2.5)}
	}
	return lineStyles{
		line:  draw.LineStyle{Color: col, Width: vg.Points(1.7), Dashes: dashes},
		glyph: draw.GlyphStyle{Color: col, Radius: vg.Points(3.4), Shape: glyphShapes[i%len(glyphShapes)]},
	}
}

// curveLine draws one curve's polyline and markers.
type curveLine struct {
	pts   []pointXY
	style lineStyles
}

func (l curveLine) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	line := make([]vg.Point, len(l.pts))
	for i, q := range l.pts {
		line[i] = vg.Point{X: trX(q.x), Y: trY(q.y)}
	}
	if len(line) > 1 {
		c.StrokeLines(l.style.line, c.ClipLinesXY(line)...)
	}
	for _, pt := range line {
		c.DrawGlyph(l.style.glyph, pt)
	}
}

// errorBars draws thin vertical bars with caps at the ends that differ
// from the mean.
type errorBars struct {
	pts   []pointXY
	color color.Color
}

func (e errorBars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := draw.LineStyle{Color: e.color, Width: vg.Points(1.1)}
	const capW = 4.5
	for _, q := range e.pts {
		if q.lo == q.hi {
			continue
		}
		x := trX(q.x)
		lo, hi := trY(q.lo), trY(q.hi)
		c.StrokeLines(sty, c.ClipLinesY([]vg.Point{{X: x, Y: lo}, {X: x, Y: hi}})...)
		if q.lo != q.y && c.ContainsY(lo) {
			c.StrokeLine2(sty, x-capW/2, lo, x+capW/2, lo)
		}
		if q.hi != q.y && c.ContainsY(hi) {
			c.StrokeLine2(sty, x-capW/2, hi, x+capW/2, hi)
		}
	}
}

// thresholdLine is the dashed acceptance line across the whole data area.
type thresholdLine struct{ y float64 }

var thresholdStyle = draw.LineStyle{
	Color:  inkColor,
	Width:  vg.Points(1.3),
	Dashes: []vg.Length{vg.Points(6), vg.Points(3.5)},
}

func (t thresholdLine) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	y := trY(t.y)
	c.StrokeLine2(thresholdStyle, c.Min.X, y, c.Max.X, y)
}

// failRegion shades the side of the acceptance line that fails the bar.
type failRegion struct {
	threshold      float64
	higherIsBetter bool
}

func (f failRegion) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	y := trY(f.threshold)
	lo, hi := c.Min.Y, y
	if !f.higherIsBetter {
		lo, hi = y, c.Max.Y
	}
	c.FillPolygon(failShade, []vg.Point{
		{X: c.Min.X, Y: lo}, {X: c.Max.X, Y: lo}, {X: c.Max.X, Y: hi}, {X: c.Min.X, Y: hi},
	})
}

// pickGuide is a dotted line from the time axis up to the recommended point.
type pickGuide struct{ x, y float64 }

var pickGuideStyle = draw.LineStyle{
	Color:  pickColor,
	Width:  vg.Points(0.9),
	Dashes: []vg.Length{vg.Points(1.5), vg.Points(2.5)},
}

func (g pickGuide) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	x := trX(g.x)
	c.StrokeLine2(pickGuideStyle, x, c.Min.Y, x, trY(g.y))
}

// pickMarker circles the recommended point.
type pickMarker struct{ x, y float64 }

var pickRing = draw.GlyphStyle{Color: pickColor, Radius: vg.Points(8.5), Shape: thickRing{width: vg.Points(2.2)}}

func (m pickMarker) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	c.DrawGlyphNoClip(pickRing, vg.Point{X: trX(m.x), Y: trY(m.y)})
}

// thickRing is a ring glyph with a chosen stroke width.
type thickRing struct{ width vg.Length }

func (r thickRing) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: r.width})
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.Stroke(p)
}

// frontPoints returns the Pareto-front points of a chart in order of scan
// time.
func frontPoints(c CurveChart) []pointXY {
	var times, means []float64
	for _, cu := range c.Curves {
		for _, q := range cu.Points {
			times = append(times, q.ScanTime)
			means = append(means, q.Mean)
		}
	}
	on := ParetoFront(times, means, c.HigherIsBetter)
	var pts []pointXY
	for i, ok := range on {
		if ok && !math.IsNaN(means[i]) && !math.IsInf(means[i], 0) {
			pts = append(pts, pointXY{x: times[i], y: means[i]})
		}
	}
	sort.Slice(pts, func(i, j int) bool { return pts[i].x < pts[j].x })
	return pts
}

// frontStyle is the wide, pale band of the Pareto front, drawn under the
// curves.
var frontStyle = draw.LineStyle{Color: color.RGBA{R: 0xb8, G: 0xd4, B: 0xc0, A: 0xff}, Width: vg.Points(7)}

// frontLine draws the Pareto front as a staircase: between two front points
// the best quality available at that scan time is the earlier point's.
type frontLine struct{ pts []pointXY }

func (f frontLine) Plot(c draw.Canvas, p *plot.Plot) {
	if len(f.pts) == 0 {
		return
	}
	trX, trY := p.Transforms(&c)
	var line []vg.Point
	for i, q := range f.pts {
		if i > 0 {
			line = append(line, vg.Point{X: trX(q.x), Y: trY(f.pts[i-1].y)})
		}
		line = append(line, vg.Point{X: trX(q.x), Y: trY(q.y)})
	}
	c.StrokeLines(frontStyle, c.ClipLinesXY(line)...)
}
