package out

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// legendEntry is one item of the chart's legend column: a small symbol and
// its text.
type legendEntry struct {
	text  string
	thumb func(c draw.Canvas, mid vg.Point, k float64) // draws the symbol centred at mid, sizes × k; nil for none
	gap   bool                                         // leave extra space before this entry
}

const (
	legendFontSize = 10.5
	legendThumbW   = vg.Length(24)
	legendGap      = vg.Length(6)
)

// legendEntries lists what the legend says for chart c.
func legendEntries(c CurveChart) []legendEntry {
	return legendEntriesShowing(c, len(c.Curves))
}

// legendEntriesShowing is legendEntries naming only the first shown curves,
// followed by a note on how many more are drawn.
func legendEntriesShowing(c CurveChart, shown int) []legendEntry {
	var es []legendEntry
	for i, cu := range c.Curves[:shown] {
		st := curveStyle(i)
		name := cu.Name
		if name == "" {
			name = fmt.Sprintf("curve %d", i+1)
		}
		es = append(es, legendEntry{text: name, thumb: func(dc draw.Canvas, mid vg.Point, k float64) {
			g := st.glyph
			g.Radius *= vg.Length(min(k, 1))
			dc.StrokeLine2(st.line, mid.X-legendThumbW/2, mid.Y, mid.X+legendThumbW/2, mid.Y)
			dc.DrawGlyphNoClip(g, mid)
		}})
	}
	if more := len(c.Curves) - shown; more > 0 {
		es = append(es, legendEntry{text: fmt.Sprintf("… and %d more curves (see the table)", more)})
	}
	metric := c.Metric
	if metric == "" {
		metric = "quality"
	}
	first := true
	add := func(e legendEntry) {
		e.gap = first
		first = false
		es = append(es, e)
	}
	if c.Front {
		add(legendEntry{
			text: "Pareto front: no candidate is both faster and better",
			thumb: func(dc draw.Canvas, mid vg.Point, k float64) {
				st := frontStyle
				st.Width = vg.Length(float64(st.Width) * min(k, 1))
				dc.StrokeLine2(st, mid.X-legendThumbW/2, mid.Y, mid.X+legendThumbW/2, mid.Y)
			},
		})
	}
	if !math.IsNaN(c.Threshold) {
		op := "≥"
		side := "below"
		if !c.HigherIsBetter {
			op, side = "≤", "above"
		}
		add(legendEntry{
			text: fmt.Sprintf("acceptance bar: %s %s %s", metric, op, formatValue(c.Threshold)),
			thumb: func(dc draw.Canvas, mid vg.Point, k float64) {
				dc.StrokeLine2(thresholdStyle, mid.X-legendThumbW/2, mid.Y, mid.X+legendThumbW/2, mid.Y)
			},
		})
		add(legendEntry{
			text: fmt.Sprintf("shaded: fails the bar (%s the line)", side),
			thumb: func(dc draw.Canvas, mid vg.Point, k float64) {
				h := vg.Length(5 * k)
				dc.FillPolygon(failShade, []vg.Point{
					{X: mid.X - legendThumbW/2, Y: mid.Y - h}, {X: mid.X + legendThumbW/2, Y: mid.Y - h},
					{X: mid.X + legendThumbW/2, Y: mid.Y + h}, {X: mid.X - legendThumbW/2, Y: mid.Y + h},
				})
				dc.StrokeLines(draw.LineStyle{Color: gridColor, Width: 0.6}, []vg.Point{
					{X: mid.X - legendThumbW/2, Y: mid.Y - h}, {X: mid.X + legendThumbW/2, Y: mid.Y - h},
					{X: mid.X + legendThumbW/2, Y: mid.Y + h}, {X: mid.X - legendThumbW/2, Y: mid.Y + h},
					{X: mid.X - legendThumbW/2, Y: mid.Y - h},
				})
			},
		})
	}
	if c.Pick != nil {
		cu := c.Curves[c.Pick.Curve]
		pt := cu.Points[c.Pick.Point]
		name := cu.Name
		if name == "" {
			name = fmt.Sprintf("curve %d", c.Pick.Curve+1)
		}
		txt := "recommended: " + name
		if pt.Label != "" {
			txt += ", " + pt.Label
		}
		txt += fmt.Sprintf(", %s, mean %s %s", reportTime(pt.ScanTime), metric, formatValue(pt.Mean))
		add(legendEntry{text: txt, thumb: func(dc draw.Canvas, mid vg.Point, k float64) {
			r := pickRing
			r.Radius = vg.Points(6 * k)
			dc.DrawGlyphNoClip(r, mid)
		}})
	}
	if c.Bars != BarsNone {
		txt := "bars: ±1 SD"
		if c.Bars == BarsBound {
			txt = "bars: mean to one-sided 95% bound"
		}
		if n := drawCounts(c); n != "" {
			txt += " over " + n + " noise draws"
		}
		add(legendEntry{text: txt, thumb: func(dc draw.Canvas, mid vg.Point, k float64) {
			sty := draw.LineStyle{Color: barColor, Width: vg.Points(1.1)}
			h, cw := vg.Length(6*k), vg.Length(4.5)
			dc.StrokeLine2(sty, mid.X, mid.Y-h, mid.X, mid.Y+h)
			dc.StrokeLine2(sty, mid.X-cw/2, mid.Y-h, mid.X+cw/2, mid.Y-h)
			dc.StrokeLine2(sty, mid.X-cw/2, mid.Y+h, mid.X+cw/2, mid.Y+h)
		}})
	}
	return es
}

// drawCounts summarises the N of all points: "n = 8", "n = 4–8", or "".
func drawCounts(c CurveChart) string {
	lo, hi := math.MaxInt, 0
	for _, cu := range c.Curves {
		for _, p := range cu.Points {
			lo, hi = min(lo, p.N), max(hi, p.N)
		}
	}
	switch {
	case hi == 0:
		return ""
	case lo == hi:
		return fmt.Sprintf("n = %d", hi)
	default:
		return fmt.Sprintf("n = %d–%d", lo, hi)
	}
}

// legendSizes are the type sizes tried, largest first, until the legend
// fits the height of the plot.
var legendSizes = []vg.Length{legendFontSize, 9.5, 8.5, 7.5, 6.5}

// legendWidth is the width the legend column needs at type size size, at
// most limit.
func legendWidth(es []legendEntry, limit, size vg.Length) vg.Length {
	sty := textStyle(size, false, inkColor)
	w := vg.Length(0)
	for _, e := range es {
		w = max(w, legendThumbW+legendGap+sty.Width(e.text))
	}
	return min(w, limit)
}

// legendHeight is the height drawLegend needs at type size size.
func legendHeight(es []legendEntry, width, size vg.Length) vg.Length {
	return layoutLegend(nil, es, width, size, 0)
}

// drawLegend draws the entries top-down from the top of area, wrapping text
// to the column width.
func drawLegend(area draw.Canvas, es []legendEntry, width, size vg.Length) {
	layoutLegend(&area, es, width, size, area.Max.Y)
}

// layoutLegend lays the entries out from top downwards, drawing them on
// area unless it is nil, and returns the height used.
func layoutLegend(area *draw.Canvas, es []legendEntry, width, size, top vg.Length) vg.Length {
	sty := textStyle(size, false, inkColor)
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YTop
	var left vg.Length
	if area != nil {
		left = area.Min.X
	}
	lineH := sty.Height("Mg") * 1.08
	textX := left + legendThumbW + legendGap
	y := top
	for _, e := range es {
		if e.gap {
			y -= lineH * 0.8
		}
		lines := wrapText(sty, e.text, width-legendThumbW-legendGap)
		if area != nil && e.thumb != nil {
			mid := vg.Point{X: left + legendThumbW/2, Y: y - lineH/2}
			e.thumb(*area, mid, float64(size/legendFontSize))
		}
		for _, l := range lines {
			if area != nil {
				area.FillText(sty, vg.Point{X: textX, Y: y}, l)
			}
			y -= lineH
		}
		y -= lineH * 0.3
	}
	return top - y
}
