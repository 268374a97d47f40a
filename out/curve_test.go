package out

import (
	"bytes"
	"encoding/xml"
	"image"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// testChart is an invented scenario: three scheme × method lines over six
// acceleration factors of a 2D scan.
func testChart() CurveChart {
	names := []string{"uniform + calibration, CG-SENSE", "variable-density random, wavelet-L1 & <FISTA>", "Poisson-disc, TV"}
	c := CurveChart{
		Title:          "Test scenario: SSIM versus scan time",
		Metric:         "SSIM",
		Threshold:      0.9,
		HigherIsBetter: true,
		Pick:           &PointRef{Curve: 2, Point: 3},
		Caution:        "invented numbers for a test.",
	}
	for k, n := range names {
		cu := Curve{Name: n}
		for i, R := range []float64{8, 6, 5, 4, 3, 2} {
			m := 0.96 + 0.01*float64(k) - 0.02*R
			cu.Points = append(cu.Points, CurvePoint{
				Label: "R=" + string(rune('0'+int(R))), ScanTime: 845 / R,
				Mean: m, Std: 0.004 * R, Lower: m - 0.006*R, N: 8 + i,
			})
		}
		c.Curves = append(c.Curves, cu)
	}
	return c
}

func TestPlotCurvePNGAndSVG(t *testing.T) {
	dir := t.TempDir()
	pngPath, svgPath := filepath.Join(dir, "curve.png"), filepath.Join(dir, "curve.svg")
	c := testChart()
	if err := PlotCurve(pngPath, svgPath, c); err != nil {
		t.Fatal(err)
	}

	// PNG: decodable by Go's image/png, 9 × 5.4 in at 150 dpi, and every
	// curve's colour is painted (lines are wider than a pixel, so their
	// cores carry the exact palette colour).
	m := decodePNG(t, pngPath)
	if b := m.Bounds(); b.Dx() != 1350 || b.Dy() != 810 {
		t.Fatalf("PNG size %v, want 1350×810", b)
	}
	counts := colourCounts(m)
	for i := range c.Curves {
		col := CurveColor(i)
		if n := counts[[3]uint8{col.R, col.G, col.B}]; n < 200 {
			t.Errorf("curve %d colour %v: only %d pixels", i, col, n)
		}
	}
	if n := counts[[3]uint8{failShade.R, failShade.G, failShade.B}]; n < 10000 {
		t.Errorf("failing-side shade covers only %d pixels", n)
	}

	// SVG: well-formed XML (encoding/xml reads every token), root <svg>,
	// and the texts are there with markup characters escaped.
	raw, err := os.ReadFile(svgPath)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(raw))
	root := ""
	var texts strings.Builder
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = v.Name.Local
			}
		case xml.CharData:
			texts.Write(v)
		}
	}
	if root != "svg" {
		t.Errorf("SVG root element %q, want svg", root)
	}
	if !bytes.Contains(raw, []byte("sans-serif")) {
		t.Error("SVG text styles name no generic sans-serif fallback")
	}
	all := texts.String()
	for _, want := range []string{c.Title, "wavelet-L1 &", "<FISTA>", "acceptance bar: SSIM ≥ 0.9", "scan time (m:ss)", "2:00", "Caution:"} {
		if !strings.Contains(all, want) {
			t.Errorf("SVG text lacks %q", want)
		}
	}
}

func colourCounts(m image.Image) map[[3]uint8]int {
	counts := map[[3]uint8]int{}
	b := m.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := m.At(x, y).RGBA()
			counts[[3]uint8{uint8(r >> 8), uint8(g >> 8), uint8(bl >> 8)}]++
		}
	}
	return counts
}

func TestPlotCurveMarksThePick(t *testing.T) {
	// The recommended point is drawn in near-black; removing the pick must
	// remove those pixels (and its legend entry).
	c := testChart()
	with, err := renderCurve(c, "png")
	if err != nil {
		t.Fatal(err)
	}
	c.Pick = nil
	without, err := renderCurve(c, "png")
	if err != nil {
		t.Fatal(err)
	}
	dark := func(b []byte) int {
		m, err := decodeBytes(b)
		if err != nil {
			t.Fatal(err)
		}
		return colourCounts(m)[[3]uint8{pickColor.R, pickColor.G, pickColor.B}]
	}
	if dw, dwo := dark(with), dark(without); dw < dwo+150 {
		t.Errorf("pick adds %d marker pixels (with %d, without %d), want ≥ 150", dw-dwo, dw, dwo)
	}
}

func TestLegendNeverCoversData(t *testing.T) {
	many := CurveChart{Metric: "NRMSE", Threshold: 0.08, Bars: BarsBound, Pick: &PointRef{9, 0},
		Caution: strings.Repeat("a long caution that wraps over several lines ", 6)}
	for k := range 14 {
		cu := Curve{Name: strings.Repeat("scheme with a rather long descriptive name ", 1+k%2)}
		for i := range 5 {
			m := 0.2/(1+float64(i)) + 0.004*float64(k)
			cu.Points = append(cu.Points, CurvePoint{ScanTime: 2 + 3*float64(i), Mean: m, Lower: m + 0.01, N: 4})
		}
		many.Curves = append(many.Curves, cu)
	}
	forty := many
	forty.Curves = nil
	for k := range 40 {
		cu := many.Curves[k%len(many.Curves)]
		forty.Curves = append(forty.Curves, cu)
	}
	wordy := testChart()
	wordy.Title = strings.Repeat("a title far too long for one line ", 12)
	wordy.Caution = strings.Repeat("a caution far too long for a chart ", 60)
	wordy.Curves[0].Name = strings.Repeat("x", 300)
	charts := map[string]CurveChart{
		"three curves":           testChart(),
		"fourteen long names":    many,
		"forty curves":           forty,
		"long title, caution":    wordy,
		"unbroken 300-char name": wordy,
	}
	for name, c := range charts {
		rec := &recorder.Canvas{}
		dc := draw.NewCanvas(rec, chartWidth, chartHeight)
		lay := layoutChart(dc, c)
		if lay.legend.Min.X <= lay.data.Max.X {
			t.Errorf("%s: legend starts at x=%v, inside the data area ending at %v", name, lay.legend.Min.X, lay.data.Max.X)
		}
		if lay.legend.Max.X > chartWidth || lay.legend.Min.Y < 0 {
			t.Errorf("%s: legend %v runs off the %v×%v canvas", name, lay.legend, chartWidth, chartHeight)
		}
		if w, h := lay.data.Max.X-lay.data.Min.X, lay.data.Max.Y-lay.data.Min.Y; w < chartWidth/2 || h < chartHeight/3 {
			t.Errorf("%s: data area only %v×%v", name, w, h)
		}
	}
}

func TestWrapTextFitsWidth(t *testing.T) {
	sty := textStyle(legendFontSize, false, inkColor)
	const width = 120
	for _, txt := range []string{
		strings.Repeat("word ", 40),
		strings.Repeat("x", 300),
		"short",
		"two\nparagraphs with some words",
	} {
		lines := wrapText(sty, txt, width)
		if strings.Join(strings.Fields(strings.Join(lines, "")), "") != strings.Join(strings.Fields(txt), "") {
			t.Errorf("wrapping %q lost text: %q", txt, lines)
		}
		for _, l := range lines {
			if sty.Width(l) > width {
				t.Errorf("line %q is %v wide, over %v", l, sty.Width(l), width)
			}
		}
	}
	capped := capLines(sty, wrapText(sty, strings.Repeat("word ", 200), width), 3, width)
	if len(capped) != 3 || !strings.HasSuffix(capped[2], "…") || sty.Width(capped[2]) > width {
		t.Errorf("capLines gave %q", capped)
	}
}

func TestLegendListsFewerCurvesWhenCrowded(t *testing.T) {
	c := testChart()
	for len(c.Curves) < 60 {
		c.Curves = append(c.Curves, c.Curves[len(c.Curves)%3])
	}
	rec := &recorder.Canvas{}
	layoutChart(draw.NewCanvas(rec, chartWidth, chartHeight), c)
	found := false
	for _, a := range rec.Actions {
		if ft, ok := a.(*recorder.FillString); ok && strings.Contains(ft.String, "more curves (see the table)") {
			found = true
		}
	}
	if !found {
		t.Error("60 curves: legend does not say that curves are left out")
	}
}

func TestPlotCurveErrors(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "c.png")
	mod := func(f func(*CurveChart)) CurveChart {
		c := testChart()
		f(&c)
		return c
	}
	tests := []struct {
		name string
		c    CurveChart
		want string
	}{
		{"no curves", CurveChart{}, "no curves"},
		{"no points", CurveChart{Curves: []Curve{{Name: "a"}}}, "no points"},
		{"NaN time", mod(func(c *CurveChart) { c.Curves[1].Points[2].ScanTime = math.NaN() }), `curve 2 ("variable-density`},
		{"negative time", mod(func(c *CurveChart) { c.Curves[0].Points[0].ScanTime = -1 }), "scan time -1 s"},
		{"Inf mean", mod(func(c *CurveChart) { c.Curves[0].Points[0].Mean = math.Inf(1) }), "mean +Inf"},
		{"negative std", mod(func(c *CurveChart) { c.Curves[0].Points[0].Std = -0.1 }), "standard deviation"},
		{"NaN bound", mod(func(c *CurveChart) { c.Bars = BarsBound; c.Curves[0].Points[1].Lower = math.NaN() }), "95% bound"},
		{"pick curve", mod(func(c *CurveChart) { c.Pick = &PointRef{Curve: 3} }), "names curve 4 of 3"},
		{"pick point", mod(func(c *CurveChart) { c.Pick = &PointRef{Curve: 0, Point: 6} }), "names point 7 of 6"},
		{"Inf threshold", mod(func(c *CurveChart) { c.Threshold = math.Inf(-1) }), "use NaN"},
		{"bar kind", mod(func(c *CurveChart) { c.Bars = 7 }), "error-bar kind 7"},
	}
	for _, tc := range tests {
		err := PlotCurve(p, "", tc.c)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one mentioning %q", tc.name, err, tc.want)
		}
	}
	if err := PlotCurve("", "", testChart()); err == nil {
		t.Error("no paths: no error")
	}
	if _, err := os.Stat(p); !os.IsNotExist(err) {
		t.Errorf("a rejected chart left a file (stat: %v)", err)
	}
	// Optional parts may be absent: no threshold, no bars, one point, SVG only.
	c := CurveChart{Threshold: math.NaN(), Bars: BarsNone, Curves: []Curve{{Points: []CurvePoint{{ScanTime: 30, Mean: 1}}}}}
	if err := PlotCurve("", filepath.Join(dir, "one.svg"), c); err != nil {
		t.Errorf("minimal chart: %v", err)
	}
}

func TestTimeAxisTicks(t *testing.T) {
	// Ticks must be evenly spaced whole steps inside the range, each major
	// label must be FormatMinSec (or h:mm:ss) of its value, and there must be
	// 2 to 8 major ticks; the clock step list is common practice.
	ranges := [][2]float64{{0, 95}, {40, 500}, {100, 1000}, {1500, 9000}, {3000, 5e5}, {88, 92}}
	for _, r := range ranges {
		for _, hours := range []bool{false, true} {
			ticks := clockTicks{hours: hours}.Ticks(r[0], r[1])
			var major []plot.Tick
			for _, tk := range ticks {
				if tk.Value < r[0]-1e-9 || tk.Value > r[1]+1e-9 {
					t.Errorf("range %v: tick %v outside", r, tk.Value)
				}
				if tk.Label != "" {
					major = append(major, tk)
					want := FormatMinSec(tk.Value)
					if hours {
						want = formatHMS(tk.Value)
					}
					if tk.Label != want {
						t.Errorf("range %v: label %q for %v, want %q", r, tk.Label, tk.Value, want)
					}
				}
			}
			if len(major) < 2 || len(major) > 8 {
				t.Errorf("range %v: %d major ticks", r, len(major))
				continue
			}
			step := major[1].Value - major[0].Value
			for i := 2; i < len(major); i++ {
				if d := major[i].Value - major[i-1].Value; math.Abs(d-step) > 1e-6 {
					t.Errorf("range %v: uneven steps %v and %v", r, step, d)
				}
			}
			if math.Mod(major[0].Value, step) != 0 {
				t.Errorf("range %v: first major tick %v is not a multiple of %v", r, major[0].Value, step)
			}
		}
	}
	// Value axis: 1, 2, 2.5 or 5 × 10^k steps with uniform decimals.
	for _, r := range [][2]float64{{0.76, 0.98}, {0.031, 0.23}, {12, 47}, {-0.2, 0.2}} {
		var labels []string
		for _, tk := range (niceTicks{}).Ticks(r[0], r[1]) {
			if tk.Label != "" {
				labels = append(labels, tk.Label)
			}
		}
		if len(labels) < 3 || len(labels) > 9 {
			t.Errorf("value range %v: labels %q", r, labels)
			continue
		}
		d := len(labels[0]) - strings.IndexByte(labels[0]+".", '.')
		for _, l := range labels {
			if len(l)-strings.IndexByte(l+".", '.') != d {
				t.Errorf("value range %v: mixed precision in %q", r, labels)
				break
			}
		}
	}
}
