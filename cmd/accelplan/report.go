package main

import (
	"crypto/sha256"
	"fmt"
	"math"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"accelplan/out"
	"accelplan/plans"
)

// reportMetrics are the quality figures the report charts and tabulates, in
// the order they are shown after the acceptance metric.
var reportMetrics = []string{plans.MetricSSIM, plans.MetricPSNR, plans.MetricNRMSE}

// metricsOf lists the metrics of a plan's outputs: the image metrics, and
// the task-based acceptance metric when the plan has one.
func metricsOf(p *plans.Plan) []string {
	m := append([]string(nil), reportMetrics...)
	if !slices.Contains(m, p.Accept.Metric) {
		m = append(m, p.Accept.Metric)
	}
	return m
}

// metricTitle is the display name of a metric in the report. It must match
// the acceptance metric's name (case-insensitively) so that the writer can
// find the acceptance value of each candidate.
func metricTitle(m string) string { return strings.ToUpper(m) }

// metricAxis labels a chart's vertical axis, with the unit where there is one.
func metricAxis(m string) string {
	switch m {
	case plans.MetricPSNR:
		return "PSNR (dB)"
	case plans.MetricSmallestDisc:
		return "smallest disc detected (mm)"
	case plans.MetricMTF50:
		return "MTF50 (cycles/mm)"
	case plans.MetricROIRMSE:
		return "worst ROI RMSE"
	}
	return metricTitle(m)
}

// boundName says which one-sided 95% bound of a metric is the conservative
// one: the lower bound when higher is better, the upper bound otherwise.
func boundName(m string) string {
	if plans.HigherIsBetter(m) {
		return "lower 95% bound"
	}
	return "upper 95% bound"
}

// fmtNum prints a quality figure or λ with four significant digits.
func fmtNum(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "n/a"
	}
	return strconv.FormatFloat(x, 'g', 4, 64)
}

// fmtSD prints a standard deviation with two significant digits.
func fmtSD(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "n/a"
	}
	return strconv.FormatFloat(x, 'g', 2, 64)
}

// groupHex writes a hex digest in groups of eight digits, so that it wraps
// in a narrow column and is easy to compare by eye.
func groupHex(h string) string {
	var b strings.Builder
	for i := 0; i < len(h); i += 8 {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(h[i:min(i+8, len(h))])
	}
	return b.String()
}

// patternName describes a sampling pattern in textbook words.
func patternName(s plans.Scheme) string {
	switch s.Pattern {
	case plans.PatternUniform:
		return fmt.Sprintf("Cartesian, regular undersampling with %d calibration lines", s.CalibrationLines)
	case plans.PatternRandom:
		return fmt.Sprintf("Cartesian, variable-density random lines (Lustig, Donoho, Pauly, MRM 2007) with %d calibration lines", s.CalibrationLines)
	case plans.PatternRadial:
		order := map[string]string{
			"uniform":         "equally spaced spokes",
			"golden":          "golden-angle spokes (Winkelmann et al., IEEE TMI 2007)",
			"tiny-golden":     fmt.Sprintf("tiny golden-angle spokes, N = %d (Wundrak et al., MRM 2016)", s.TinyGoldenN),
			"rational-golden": "rational approximation of golden-angle spokes (Scholand et al., arXiv 2024)",
		}[s.SpokeOrder]
		if order == "" {
			order = "spokes"
		}
		return "radial, " + order
	case plans.PatternSpiral:
		return "spiral interleaves"
	case "fan":
		return "illumination angles, evenly spaced fan"
	case "fan-golden":
		return "illumination angles in golden-ratio order"
	}
	return s.Pattern
}

// gridded reports whether scheme si of o samples off the Cartesian grid
// (its samplings carry sample positions rather than a mask), so that the
// zero-filled adjoint is a gridding rather than an inverse FFT.
func gridded(o *plans.Outcome, si int) bool {
	for _, c := range o.Candidates {
		if c.Scheme == si {
			return c.Sampling.Mask == nil
		}
	}
	return o.Plan.Schemes[si].NonCartesian()
}

// Plan names of methods being added to plans; they are matched here by
// name so that the report labels them as soon as a plan can use them.
const (
	methodTikhonov    = "tikhonov-cg"
	methodTV          = "tv-pdhg"
	methodTGV         = "tgv-pdhg"
	methodADMMWavelet = "admm-wavelet"
)

// methodShort is the published name of a reconstruction method in a few
// words, for tables, headings and the stepper; the plan's own label is put
// in front when the plan gave one of its own.
func methodShort(rc plans.Recon, nonCartesian bool) string {
	var name string
	switch rc.Method {
	case plans.MethodZeroFilled:
		name = "zero-filled inverse FFT"
		if nonCartesian {
			name = "zero-filled gridding"
		}
	case plans.MethodFISTAWavelet:
		name = "FISTA, wavelet-ℓ1 (" + rc.Wavelet + ")"
	case plans.MethodFISTABox:
		name = "FISTA, box constraint"
	case methodTikhonov:
		name = "Tikhonov, conjugate gradients"
	case methodTV:
		name = "TV, primal-dual"
	case methodTGV:
		name = "TGV, primal-dual"
	case methodADMMWavelet:
		name = "ADMM, wavelet-ℓ1 (" + rc.Wavelet + ")"
	default:
		name = rc.Method
	}
	return withLabel(rc, name)
}

// methodName is the published name of a reconstruction method with its
// parameters and source, for the recommendation, the facts and each
// candidate's note.
func methodName(rc plans.Recon, nonCartesian bool) string {
	var name string
	switch rc.Method {
	case plans.MethodZeroFilled:
		name = "zero-filled inverse FFT"
		if nonCartesian {
			name = "zero-filled gridding with density compensation (Jackson et al., IEEE TMI 1991; Pipe, Menon, MRM 1999)"
		}
	case plans.MethodFISTAWavelet:
		name = fmt.Sprintf("FISTA (Beck, Teboulle, SIAM J Imaging Sci 2009) with a wavelet-ℓ1 prior, %s (Daubechies 1992), %d levels, %d iterations",
			rc.Wavelet, rc.Levels, rc.Iterations)
	case plans.MethodFISTABox:
		name = fmt.Sprintf("FISTA (Beck, Teboulle, SIAM J Imaging Sci 2009) with projection onto a box constraint, %d iterations", rc.Iterations)
	case methodTikhonov:
		name = "Tikhonov regularisation solved by conjugate gradients (Hestenes, Stiefel, J Res NBS 1952)"
	case methodTV:
		name = "total-variation regularisation (Rudin, Osher, Fatemi, Physica D 1992) by the primal-dual hybrid gradient (Chambolle, Pock, J Math Imaging Vis 2011)"
	case methodTGV:
		name = "second-order total generalised variation (Bredies, Kunisch, Pock, SIAM J Imaging Sci 2010) by the primal-dual hybrid gradient (Chambolle, Pock, J Math Imaging Vis 2011)"
	case methodADMMWavelet:
		name = fmt.Sprintf("ADMM (Boyd et al., Found Trends Mach Learn 2011) with a wavelet-ℓ1 prior, %s (Daubechies 1992), %d levels", rc.Wavelet, rc.Levels)
	default:
		name = rc.Method
	}
	return withLabel(rc, name)
}

// withLabel puts the plan's label in front of a method name when the plan
// chose a label of its own rather than the default one.
func withLabel(rc plans.Recon, name string) string {
	auto := rc.Method
	if (rc.Method == plans.MethodFISTAWavelet || rc.Method == methodADMMWavelet) && rc.Wavelet != "" {
		auto += " " + rc.Wavelet
	}
	if rc.Label != "" && rc.Label != auto && rc.Label != rc.Method {
		return rc.Label + ": " + name
	}
	return name
}

// lambdaText says how λ was chosen for candidate ci and method ri.
func lambdaText(o *plans.Outcome, a *plans.Analysis, ci, ri int, row plans.Row) string {
	rc := o.Plan.Recons[ri]
	t := o.Tunings[ci][ri]
	switch {
	case t.Rule != "" && len(rc.LambdaLook) == 2:
		return fmt.Sprintf("λ = %s (relative to the largest zero-filled magnitude), tuned by golden-section search over log λ in [%g, %g] "+
			"with %d reconstructions of a separate calibration noise draw (seed %d) that is never scored, maximising %s "+
			"(%s %s on the calibration draw)",
			fmtNum(t.Lambda), rc.LambdaLook[0], rc.LambdaLook[1], t.Evals, t.NoiseSeed,
			metricTitle(a.Metric), metricTitle(a.Metric), fmtNum(t.Score))
	case t.Rule != "":
		return fmt.Sprintf("λ = %s (relative to the largest zero-filled magnitude), %s", fmtNum(t.Lambda), t.Rule)
	case rc.Method == plans.MethodZeroFilled:
		return "no λ: the zero-filled reconstruction has no regularisation weight"
	case rc.Method == plans.MethodFISTABox:
		return "no λ: the box constraint has no regularisation weight"
	default:
		return fmt.Sprintf("λ = %s (relative to the largest zero-filled magnitude), fixed in the plan", fmtNum(row.Lambda))
	}
}

// lambdaBrief is λ and its rule in a few words, for the per-curve table.
func lambdaBrief(o *plans.Outcome, ci, ri int, row plans.Row) string {
	switch rule := lambdaShort(o, ci, ri); rule {
	case "none":
		return "no λ"
	default:
		return "λ = " + fmtNum(row.Lambda) + ", " + rule
	}
}

// lambdaShort is the table's short form of the λ rule.
func lambdaShort(o *plans.Outcome, ci, ri int) string {
	switch {
	case o.Tunings[ci][ri].Rule != "":
		return "tuned on a calibration draw"
	case o.Plan.Recons[ri].Method == plans.MethodZeroFilled, o.Plan.Recons[ri].Method == plans.MethodFISTABox:
		return "none"
	}
	return "fixed in the plan"
}

// protocolText names a row's protocol in words.
func protocolText(r plans.Row) string {
	return fmt.Sprintf("%s, R = %s (%d of %d %s)", r.Scheme, fmtR(r.R), r.Shots, r.FullShots, r.ShotKind)
}

// asksR reports whether a plan's value for the row's scheme is an
// acceleration factor (lines, spokes) rather than a count of shots
// (spiral interleaves, illuminations).
func asksR(r plans.Row) bool { return r.ShotKind == "lines" || r.ShotKind == "spokes" }

// askedR is the table's "asked R" cell: the R the plan asked for, or a
// dash where the plan asked for a shot count.
func askedR(r plans.Row) string {
	if asksR(r) {
		return fmtR(r.AskedR)
	}
	return "—"
}

// candidateLabel names one candidate section: achieved R, what the plan
// asked for where that differs, and the shots acquired.
func candidateLabel(r plans.Row) string {
	asked := ""
	if asksR(r) && fmtR(r.AskedR) != fmtR(r.R) {
		asked = " (asked " + fmtR(r.AskedR) + ")"
	}
	return fmt.Sprintf("R = %s%s · %d of %d %s", fmtR(r.R), asked, r.Shots, r.FullShots, r.ShotKind)
}

// scanTimeText prints a scan time for the table: milliseconds below a
// second (optical acquisitions), seconds with one decimal below a minute,
// m:ss above.
func scanTimeText(s float64) string {
	switch {
	case s < 1:
		return strconv.FormatFloat(s*1000, 'f', 1, 64) + " ms"
	case s < 59.95:
		return strconv.FormatFloat(s, 'f', 1, 64) + " s"
	}
	return out.FormatMinSec(s)
}

// fmtR prints an acceleration factor with at most two decimals.
func fmtR(r float64) string {
	s := strconv.FormatFloat(r, 'f', 2, 64)
	return strings.TrimRight(strings.TrimRight(s, "0"), ".")
}

// linesOf returns the shot count when shots are phase-encode lines, else 0:
// the report prints a non-zero count with the word "lines".
func linesOf(r plans.Row) int {
	if r.ShotKind == "lines" {
		return r.Shots
	}
	return 0
}

// reportPick turns row i of a into a report pick; i < 0 is "not found".
// brief picks (the per-curve table) say how λ was chosen in a few words.
func reportPick(o *plans.Outcome, a *plans.Analysis, i int, scheme, method string, brief bool) out.ReportPick {
	if i < 0 {
		return out.ReportPick{Scheme: scheme, Method: method}
	}
	r := a.Rows[i]
	lam := lambdaText(o, a, r.Candidate, r.Recon, r)
	if brief {
		lam = lambdaBrief(o, r.Candidate, r.Recon, r)
	}
	return out.ReportPick{Found: true, Protocol: protocolText(r), Scheme: scheme, Method: method,
		R: r.R, Lines: linesOf(r), ScanTime: r.ScanTime,
		Mean: r.Metric(a.Metric).Mean, Bound: r.Bound(a.Metric), Lambda: lam}
}

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// reportCharts draws one quality-versus-scan-time chart per metric, the
// acceptance metric first; only that one carries the bar and the pick.
// Points whose mean or bound is not finite (a PSNR of +Inf for an exact
// reconstruction) are left out of that metric's chart and said so.
func reportCharts(o *plans.Outcome, a *plans.Analysis, caution string) ([]out.ReportChart, error) {
	p := o.Plan
	order := []string{a.Metric}
	for _, m := range metricsOf(p) {
		if m != a.Metric {
			order = append(order, m)
		}
	}
	var charts []out.ReportChart
	for _, m := range order {
		accept := m == a.Metric
		chart := out.CurveChart{Title: p.Title, Metric: metricAxis(m), Threshold: math.NaN(),
			HigherIsBetter: plans.HigherIsBetter(m), Bars: out.BarsBound, Front: true}
		if accept {
			chart.Threshold = a.Threshold
			chart.Caution = strings.TrimPrefix(caution, "CAUTION: ")
		}
		dropped := 0
		for ci, cv := range a.Curves {
			c := out.Curve{Name: p.Schemes[cv.Scheme].Label + " · " + p.Recons[cv.Recon].Label}
			for _, ri := range cv.Rows {
				r := a.Rows[ri]
				s := r.Metric(m)
				if !finite(s.Mean) || !finite(r.Bound(m)) {
					dropped++
					continue
				}
				if accept && ri == a.Best {
					chart.Pick = &out.PointRef{Curve: ci, Point: len(c.Points)}
				}
				c.Points = append(c.Points, out.CurvePoint{Label: fmt.Sprintf("R=%.2g", r.R), ScanTime: r.ScanTime,
					Mean: s.Mean, Std: s.Std, Lower: r.Bound(m), N: s.N})
			}
			chart.Curves = append(chart.Curves, c)
		}
		caption := fmt.Sprintf(" — mean over the scored noise draws; bars reach from the mean to the %s.", boundName(m))
		name := metricAxis(m)
		if accept {
			name += ", the acceptance metric"
			cmp := "≥"
			if !plans.HigherIsBetter(m) {
				cmp = "≤"
			}
			caption += fmt.Sprintf(" Dashed line: the bar %s %s %g; the shaded side fails it.", metricTitle(m), cmp, a.Threshold)
			if chart.Pick != nil {
				caption += " The circled point is the recommendation."
			}
		} else {
			caption += " Shown for comparison; the recommendation is made on " + metricTitle(a.Metric) + " alone."
		}
		if dropped > 0 {
			caption += fmt.Sprintf(" %d point(s) with a non-finite value are left out.", dropped)
		}
		if dropped == len(a.Rows) {
			continue // nothing to draw for this metric
		}
		rc, err := out.ReportChartFrom(name, caption, chart)
		if err != nil {
			return nil, fmt.Errorf("report chart of %s: %w", metricTitle(m), err)
		}
		charts = append(charts, rc)
	}
	return charts, nil
}

// reportTable is the summary table, one row per candidate and method,
// grouped by curve (scheme · method) and in order of scan time within it.
func reportTable(o *plans.Outcome, a *plans.Analysis) out.ReportTable {
	t := out.ReportTable{Header: []string{"sampling", "reconstruction", "asked R", "achieved R", "acquired", "scan time", "PSF side lobe / peak"}}
	for _, m := range metricsOf(o.Plan) {
		t.Header = append(t.Header, metricAxis(m)+" mean ± SD", metricTitle(m)+" "+strings.TrimSuffix(boundName(m), " bound"))
	}
	t.Header = append(t.Header, "λ (relative)", "λ chosen")
	for _, cv := range a.Curves {
		for _, i := range cv.Rows {
			r := a.Rows[i]
			cells := []string{r.Scheme, methodShort(o.Plan.Recons[r.Recon], gridded(o, o.Candidates[r.Candidate].Scheme)), askedR(r), fmtR(r.R),
				fmt.Sprintf("%d of %d %s", r.Shots, r.FullShots, r.ShotKind),
				scanTimeText(r.ScanTime), fmtNum(o.Candidates[r.Candidate].SideLobe)}
			for _, m := range metricsOf(o.Plan) {
				s := r.Metric(m)
				cells = append(cells, fmtNum(s.Mean)+" ± "+fmtSD(s.Std), fmtNum(r.Bound(m)))
			}
			lam := "—"
			if lambdaShort(o, r.Candidate, r.Recon) != "none" {
				lam = fmtNum(r.Lambda)
			}
			cells = append(cells, lam, lambdaShort(o, r.Candidate, r.Recon))
			t.Rows = append(t.Rows, out.ReportRow{Cells: cells, Meets: r.Meets, Pick: i == a.Best})
		}
	}
	return t
}

// grayPNG renders a row-major image on a grey window as PNG bytes.
func grayPNG(img []float64, ny, nx int, lo, hi float64) ([]byte, error) {
	g, err := out.GrayImage(img, ny, nx, lo, hi)
	if err != nil {
		return nil, err
	}
	return out.EncodeReportPNG(g)
}

// errorLimit is the one colour scale of every error map: the largest
// |reconstruction − truth| over all candidates and methods (1 if there is
// no error at all), as the PNG error maps of the results folder use.
func errorLimit(o *plans.Outcome) float64 {
	lim := 0.0
	for ci := range o.Images {
		for ri := range o.Images[ci] {
			for i, v := range o.Images[ci][ri] {
				lim = math.Max(lim, math.Abs(v-o.Truth[i]))
			}
		}
	}
	if lim == 0 {
		lim = 1
	}
	return lim
}

// candidatePictures holds the PNGs shared by every method of one candidate.
type candidatePictures struct {
	mask, psf []byte
	caption   string
}

func pictures(c plans.Candidate, ny, nx int) candidatePictures {
	var cp candidatePictures
	cp.caption = "sampling mask"
	if c.Sampling.Mask == nil {
		cp.caption = "trajectory (samples at the nearest grid point)"
	}
	// A sampling that cannot be drawn leaves its picture "not available"
	// rather than failing the run whose results are already computed.
	if pic, rows, cols, err := c.Sampling.Picture(); err == nil {
		cp.mask, _ = grayPNG(pic, rows, cols, 0, 1)
	}
	if len(c.PSF) == ny*nx {
		cp.psf, _ = grayPNG(psfDecibels(c.PSF), ny, nx, -40, 0)
	}
	return cp
}

// reportCandidates builds one report section per candidate × method.
func reportCandidates(o *plans.Outcome, a *plans.Analysis, limit, lo, hi float64) ([]out.ReportCandidate, error) {
	p := o.Plan
	ny, nx := p.ImageSize()
	pr, pc := p.PlaneSize()
	pics := make([]candidatePictures, len(o.Candidates))
	for ci, c := range o.Candidates {
		pics[ci] = pictures(c, pr, pc)
	}
	var cands []out.ReportCandidate
	diff := make([]float64, ny*nx)
	for i, r := range a.Rows {
		c := o.Candidates[r.Candidate]
		s := p.Schemes[c.Scheme]
		rc := out.ReportCandidate{
			Label:  candidateLabel(r),
			Scheme: s.Label, Method: methodShort(p.Recons[r.Recon], gridded(o, c.Scheme)),
			R: r.R, Lines: linesOf(r), ScanTime: r.ScanTime,
			Lambda: lambdaText(o, a, r.Candidate, r.Recon, r),
			Meets:  r.Meets, Pick: i == a.Best,
			Mask: pics[r.Candidate].mask, PSF: pics[r.Candidate].psf, MaskCaption: pics[r.Candidate].caption,
		}
		for _, nm := range o.NoiseMaps {
			if nm.Candidate != r.Candidate || nm.Recon != r.Recon {
				continue
			}
			figs, err := noiseFigures(nm, ny, nx)
			if err != nil {
				return nil, err
			}
			rc.Extra = append(rc.Extra, figs...)
		}
		for _, m := range metricsOf(p) {
			sm := r.Metric(m)
			if !finite(sm.Mean) {
				continue
			}
			rc.Values = append(rc.Values, out.ReportValue{Metric: metricTitle(m), Mean: sm.Mean, Std: sm.Std, Bound: r.Bound(m), N: sm.N})
		}
		note := fmt.Sprintf("Reconstruction: %s. Sampling: %s. PSF shown as 20·log10(|PSF|/peak) on a −40 … 0 dB grey scale; side-lobe-to-peak ratio %s (Lustig, Donoho, Pauly, MRM 2007). %s",
			methodName(p.Recons[r.Recon], gridded(o, c.Scheme)), patternName(s), fmtNum(c.SideLobe), budgetText(c.Budget))
		if img := o.Images[r.Candidate][r.Recon]; len(img) == ny*nx {
			var err error
			if rc.Recon, err = grayPNG(img, ny, nx, lo, hi); err != nil {
				return nil, fmt.Errorf("report reconstruction of %s: %w", rc.Label, err)
			}
			for k := range img {
				diff[k] = img[k] - o.Truth[k]
			}
			e, err := out.DivergingImage(diff, ny, nx, limit)
			if err != nil {
				return nil, fmt.Errorf("report error map of %s: %w", rc.Label, err)
			}
			if rc.Error, err = out.EncodeReportPNG(e); err != nil {
				return nil, err
			}
			first := (r.Candidate*len(p.Recons)+r.Recon)*p.Repeats + 0
			note += fmt.Sprintf(" Images are from the first scored noise draw (seed %d).", o.Results[first].NoiseSeed)
		}
		rc.Note = note
		cands = append(cands, rc)
	}
	return cands, nil
}

// reportFacts lists what made the run, for whoever reads or reruns it.
func reportFacts(o *plans.Outcome, version, generated string) []out.ReportFact {
	p := o.Plan
	tuned := 0
	for ci := range o.Tunings {
		for _, t := range o.Tunings[ci] {
			if t.Rule != "" {
				tuned++
			}
		}
	}
	draws := fmt.Sprintf("%d scored noise draws per candidate and method", p.Repeats)
	if tuned > 0 {
		draws += fmt.Sprintf(", plus one calibration draw (never scored) for each of the %d λ searches", tuned)
	}
	// Name each method as it runs on the plan's schemes: the zero-filled
	// adjoint is an inverse FFT on Cartesian schemes and gridding on the
	// others.
	var cart, nonCart bool
	for si := range p.Schemes {
		g := gridded(o, si)
		cart, nonCart = cart || !g, nonCart || g
	}
	var methods []string
	for _, rc := range p.Recons {
		c, n := methodName(rc, false), methodName(rc, true)
		switch {
		case cart && nonCart && c != n:
			methods = append(methods, rc.Label+" = "+c+" on Cartesian schemes, "+n+" on non-Cartesian ones")
		case cart:
			methods = append(methods, rc.Label+" = "+c)
		default:
			methods = append(methods, rc.Label+" = "+n)
		}
	}
	sc := p.Scanner
	sigma := fmtNum(o.Sigma)
	if sc.ReferenceSNR > 0 {
		sigma += fmt.Sprintf(" (reference SNR %g of the fully sampled scan)", sc.ReferenceSNR)
	}
	object := fmt.Sprintf("%s phantom, analytic spectrum, %d × %d grid", p.Object.Phantom, p.Object.PhaseLines, p.Object.ReadoutPoints)
	switch {
	case p.Object.FOVmm > 0:
		object += fmt.Sprintf(", FOV %g mm", p.Object.FOVmm)
	case p.Object.FOVum > 0:
		object += fmt.Sprintf(", FOV %g µm", p.Object.FOVum)
	}
	if m := p.Micro; p.Modality == plans.ModalityODT && m.FieldSNR > 0 {
		sigma = fmtNum(o.Sigma) + fmt.Sprintf(" (incident field amplitude / σ = %g per camera pixel)", m.FieldSNR)
	}
	facts := []out.ReportFact{
		{Name: "plan file", Value: planName(p)},
		{Name: "plan SHA-256", Value: groupHex(fmt.Sprintf("%x", sha256.Sum256(p.Text)))},
		{Name: "plan title", Value: p.Title},
		{Name: "seed", Value: strconv.FormatUint(p.Seed, 10)},
		{Name: "noise σ per sample", Value: sigma},
		{Name: "noise draws", Value: draws},
		{Name: "object", Value: object},
	}
	if sc.TRms > 0 {
		facts = append(facts, out.ReportFact{Name: "timing",
			Value: fmt.Sprintf("TR %g ms, echo train length %d, averages %d", sc.TRms, max(sc.EchoTrain, 1), max(sc.Averages, 1))})
	}
	if m := p.Micro; p.Modality == plans.ModalityODT {
		facts = append(facts,
			out.ReportFact{Name: "microscope", Value: fmt.Sprintf("wavelength %g µm, medium index %g, NA %g illumination, %g detection",
				m.WavelengthUm, m.MediumIndex, m.NAIllumination, m.NADetection)},
			out.ReportFact{Name: "timing", Value: fmt.Sprintf("exposure %g ms and settling %g ms per illumination", m.ExposureMs, m.SettlingMs)})
	}
	return append(facts,
		out.ReportFact{Name: "methods", Value: strings.Join(methods, "; ")},
		out.ReportFact{Name: "quality metrics", Value: "SSIM (Wang et al., IEEE TIP 2004), PSNR and NRMSE, inside the object support; confidence bounds by Student's t"},
		out.ReportFact{Name: "workers", Value: strconv.Itoa(o.Workers) + " (results do not depend on it)"},
		out.ReportFact{Name: "run time", Value: fmt.Sprintf("%.1f s", o.Elapsed.Seconds())},
		out.ReportFact{Name: "tool version", Value: "accelplan " + version + ", " + runtime.Version()},
		out.ReportFact{Name: "generated", Value: generated},
	)
}

// buildReport fills the report of a finished run.
func buildReport(o *plans.Outcome, a *plans.Analysis, version, caution string) (out.Report, error) {
	p := o.Plan
	ny, nx := p.ImageSize()
	generated := o.Started.Add(o.Elapsed).UTC().Format("2006-01-02 15:04:05 UTC")
	r := out.Report{
		Title: p.Title, Caution: strings.TrimPrefix(strings.Join(strings.Fields(caution), " "), "CAUTION: "),
		Version: version, PlanName: planName(p), GeneratedAt: generated,
		Facts:  reportFacts(o, version, generated),
		Metric: metricTitle(a.Metric), Threshold: a.Threshold, HigherIsBetter: plans.HigherIsBetter(a.Metric),
		ReferenceTime: a.ReferenceTime, ReferenceLabel: a.ReferenceLabel,
		ErrorNote: "reconstruction − truth, magnitude images of the first scored draw",
	}
	// Reconstructions and truth share the truth's grey window, as the
	// PNGs of the results folder do.
	r.GrayLo, r.GrayHi = grayWindow(o.Truth)
	scheme := func(i int) string { return p.Schemes[o.Candidates[a.Rows[i].Candidate].Scheme].Label }
	if a.Best >= 0 {
		si := o.Candidates[a.Rows[a.Best].Candidate].Scheme
		r.Recommendation = reportPick(o, a, a.Best, scheme(a.Best), methodName(p.Recons[a.Rows[a.Best].Recon], gridded(o, si)), false)
	}
	for _, cv := range a.Curves {
		s := p.Schemes[cv.Scheme]
		r.PerCurve = append(r.PerCurve, reportPick(o, a, cv.Pick, s.Label, methodShort(p.Recons[cv.Recon], gridded(o, cv.Scheme)), true))
	}
	var err error
	if r.Charts, err = reportCharts(o, a, caution); err != nil {
		return r, err
	}
	r.Table = reportTable(o, a)
	if r.Truth, err = grayPNG(o.Truth, ny, nx, r.GrayLo, r.GrayHi); err != nil {
		return r, fmt.Errorf("report truth image: %w", err)
	}
	r.ErrorLimit = errorLimit(o)
	if r.Candidates, err = reportCandidates(o, a, r.ErrorLimit, r.GrayLo, r.GrayHi); err != nil {
		return r, err
	}
	return r, nil
}

// writeReport writes the self-contained HTML report of a run, report.html,
// into dir: the recommendation with the caution, one quality-versus-scan-time
// chart per metric, the summary table and, for every candidate × method, the
// reconstruction, truth, error map (one colour scale for the whole report),
// sampling picture and PSF, with the facts of the run.
func writeReport(dir string, o *plans.Outcome, a *plans.Analysis, version, caution string) error {
	r, err := buildReport(o, a, version, caution)
	if err != nil {
		return err
	}
	return out.WriteReport(filepath.Join(dir, "report.html"), r)
}

// noiseFigures are the report pictures of a noise map: the pseudo-replica
// SNR map and, where defined, the g-factor maps.
func noiseFigures(nm plans.NoiseMap, ny, nx int) ([]out.ReportFigure, error) {
	var figs []out.ReportFigure
	for _, f := range noiseImages(nm) {
		b, err := grayPNG(f.img, ny, nx, f.lo, f.hi)
		if err != nil {
			return nil, err
		}
		figs = append(figs, out.ReportFigure{Caption: f.caption, Note: f.note, PNG: b})
	}
	return figs, nil
}

// budgetText spells out a protocol's time budget.
func budgetText(b plans.TimeBudget) string {
	t := fmt.Sprintf("Time budget: %s = %.1f s", b.Formula, b.Imaging)
	if b.Dummy > 0 {
		t += fmt.Sprintf("; dummy scans %.1f s", b.Dummy)
	}
	if b.Calibration > 0 {
		t += fmt.Sprintf("; calibration scan %.1f s", b.Calibration)
	}
	return t + fmt.Sprintf("; total %.1f s.", b.Total)
}
