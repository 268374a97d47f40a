package main

import (
	"crypto/sha256"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"time"

	"accelplan/out"
	"accelplan/plans"
)

func ff(x float64) string { return strconv.FormatFloat(x, 'g', 8, 64) }

// slug makes a label safe for a file name.
func slug(s string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(s) {
		if (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9') || r == '.' {
			b.WriteRune(r)
			dash = false
		} else if !dash && b.Len() > 0 {
			b.WriteByte('-')
			dash = true
		}
	}
	return strings.TrimRight(b.String(), "-")
}

// imageName is the file stem of one candidate × method.
func imageName(o *plans.Outcome, ci, ri int) string {
	c := o.Candidates[ci]
	return fmt.Sprintf("%s_R%s_%s", slug(o.Plan.Schemes[c.Scheme].Label), ff(c.AskedR), slug(o.Plan.Recons[ri].Label))
}

// writeFolder writes every output of a run into dir.
func writeFolder(dir string, o *plans.Outcome, a *plans.Analysis, version, caution string) error {
	p := o.Plan
	ny, nx := p.ImageSize()
	pr, pc := p.PlaneSize()
	if err := os.WriteFile(filepath.Join(dir, "plan.toml"), p.Text, 0o644); err != nil {
		return err
	}
	// results.csv: one row per candidate, method and scored noise draw.
	header := []string{"scheme", "pattern", "asked_R", "achieved_R", "lines", "scan_time_s", "scan_time", "method",
		"lambda_rel", "lambda_rule", "repeat", "noise_seed", "nrmse", "psnr_db", "ssim", "iterations", "recon_seconds"}
	task := isTask(p.Accept.Metric)
	if task {
		header = append(header, taskColumn(p.Accept.Metric))
	}
	var rows [][]string
	for _, r := range o.Results {
		c := o.Candidates[r.Candidate]
		s := p.Schemes[c.Scheme]
		rows = append(rows, []string{s.Label, s.Pattern, ff(c.AskedR), ff(c.Sampling.R), strconv.Itoa(c.Sampling.Shots),
			ff(c.ScanTime), out.FormatMinSec(c.ScanTime), p.Recons[r.Recon].Label, ff(r.Lambda), r.LambdaRule,
			strconv.Itoa(r.Repeat), strconv.FormatUint(r.NoiseSeed, 10), ff(r.NRMSE), ff(r.PSNR), ff(r.SSIM),
			strconv.Itoa(r.Iterations), strconv.FormatFloat(r.Seconds, 'f', 4, 64)})
		if task {
			rows[len(rows)-1] = append(rows[len(rows)-1], ff(r.Task))
		}
	}
	if err := out.WriteCSV(filepath.Join(dir, "results.csv"), header, rows); err != nil {
		return err
	}
	// summary.csv: one row per candidate and method.
	header = []string{"scheme", "method", "asked_R", "achieved_R", "lines", "psf_sidelobe_to_peak", "scan_time_s", "scan_time", "draws"}
	names := []string{"ssim", "psnr_db", "nrmse"}
	if task {
		names = append(names, taskColumn(p.Accept.Metric))
	}
	for _, m := range names {
		header = append(header, m+"_mean", m+"_sd", m+"_lower95", m+"_upper95")
	}
	header = append(header, "imaging_s", "dummy_s", "calibration_s", "time_formula", "lambda_rel", "lambda_rule", "meets_bar", "recommended")
	rows = rows[:0]
	for i, r := range a.Rows {
		row := []string{r.Scheme, r.Method, ff(r.AskedR), ff(r.R), strconv.Itoa(r.Shots), ff(o.Candidates[r.Candidate].SideLobe), ff(r.ScanTime), out.FormatMinSec(r.ScanTime), strconv.Itoa(r.SSIM.N)}
		sums := []plans.Summary{r.SSIM, r.PSNR, r.NRMSE}
		if task {
			sums = append(sums, r.Task)
		}
		for _, s := range sums {
			row = append(row, ff(s.Mean), ff(s.Std), ff(s.Lower), ff(s.Upper))
		}
		rec := "no"
		if i == a.Best {
			rec = "overall"
		} else {
			for _, cv := range a.Curves {
				if cv.Pick == i {
					rec = "for its scheme and method"
				}
			}
		}
		b := o.Candidates[r.Candidate].Budget
		row = append(row, ff(b.Imaging), ff(b.Dummy), ff(b.Calibration), b.Formula, ff(r.Lambda), r.LambdaRule, strconv.FormatBool(r.Meets), rec)
		rows = append(rows, row)
	}
	if err := out.WriteCSV(filepath.Join(dir, "summary.csv"), header, rows); err != nil {
		return err
	}
	if err := writeJSON(dir, o, a, version); err != nil {
		return err
	}
	if err := writeCurve(dir, o, a, caution); err != nil {
		return err
	}
	// Images: truth, then per candidate the mask, and per method the first
	// scored reconstruction and its error map on one shared scale.
	img := filepath.Join(dir, "images")
	if err := os.MkdirAll(img, 0o755); err != nil {
		return err
	}
	lo, hi := grayWindow(o.Truth)
	if err := out.WriteGrayPNG(filepath.Join(img, "truth.png"), o.Truth, ny, nx, lo, hi); err != nil {
		return err
	}
	errLimit := 0.0
	for ci := range o.Candidates {
		for ri := range p.Recons {
			for i, v := range o.Images[ci][ri] {
				if d := abs(v - o.Truth[i]); d > errLimit {
					errLimit = d
				}
			}
		}
	}
	if errLimit == 0 {
		errLimit = 1
	}
	for ci, c := range o.Candidates {
		maskName := fmt.Sprintf("mask_%s_R%s.png", slug(p.Schemes[c.Scheme].Label), ff(c.AskedR))
		pic, rows, cols, err := c.Sampling.Picture()
		if err != nil {
			return err
		}
		if err := out.WriteGrayPNG(filepath.Join(img, maskName), pic, rows, cols, 0, 1); err != nil {
			return err
		}
		psfName := fmt.Sprintf("psf_%s_R%s.png", slug(p.Schemes[c.Scheme].Label), ff(c.AskedR))
		if err := out.WriteGrayPNG(filepath.Join(img, psfName), psfDecibels(c.PSF), pr, pc, -40, 0); err != nil {
			return err
		}
		for ri := range p.Recons {
			stem := imageName(o, ci, ri)
			m := o.Images[ci][ri]
			if err := out.WriteGrayPNG(filepath.Join(img, stem+".png"), m, ny, nx, lo, hi); err != nil {
				return err
			}
			diff := make([]float64, len(m))
			for i := range m {
				diff[i] = m[i] - o.Truth[i]
			}
			if err := out.WriteDivergingPNG(filepath.Join(img, stem+"_error.png"), diff, ny, nx, errLimit); err != nil {
				return err
			}
		}
	}
	if err := writeReport(dir, o, a, version, caution); err != nil {
		return err
	}
	if err := writeNoiseMaps(dir, o); err != nil {
		return err
	}
	if err := writeNIfTI(dir, o, errLimit); err != nil {
		return err
	}
	var b strings.Builder
	printRecommendation(&b, o, a, p.Output)
	fmt.Fprintf(&b, "\nError maps share one colour scale: ±%.3g (reconstruction − truth).\n", errLimit)
	for _, n := range p.ImageNotices {
		fmt.Fprintf(&b, "Object image: %s\n", n)
	}
	fmt.Fprintf(&b, "accelplan %s; plan %s; seed %d; noise σ per sample %.4g.\n\n%s\n", version, planName(p), p.Seed, o.Sigma, caution)
	return os.WriteFile(filepath.Join(dir, "recommendation.txt"), []byte(b.String()), 0o644)
}

// grayWindow returns the display window of every image of a run: from the
// smaller of 0 and the truth's minimum to the truth's maximum, so that
// reconstructions are shown on the truth's scale.
func grayWindow(truth []float64) (lo, hi float64) {
	lo, hi = 0, 0
	for _, v := range truth {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if hi <= lo {
		hi = lo + 1
	}
	return lo, hi
}

// psfDecibels returns 20·log10(|psf|/peak), floored at −120 dB, for display
// on a −40 … 0 dB grey scale.
func psfDecibels(psf []complex128) []float64 {
	peak := 0.0
	for _, v := range psf {
		peak = math.Max(peak, cmplx.Abs(v))
	}
	db := make([]float64, len(psf))
	for i, v := range psf {
		db[i] = math.Max(20*math.Log10(cmplx.Abs(v)/peak), -120)
	}
	return db
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func writeCurve(dir string, o *plans.Outcome, a *plans.Analysis, caution string) error {
	p := o.Plan
	chart := out.CurveChart{Title: p.Title, Metric: strings.ToUpper(a.Metric), Threshold: a.Threshold,
		HigherIsBetter: plans.HigherIsBetter(a.Metric), Caution: strings.TrimPrefix(caution, "CAUTION: "), Bars: out.BarsBound, Front: true}
	for ci, cv := range a.Curves {
		c := out.Curve{Name: p.Schemes[cv.Scheme].Label + " · " + p.Recons[cv.Recon].Label}
		for pi, ri := range cv.Rows {
			r := a.Rows[ri]
			s := r.Metric(a.Metric)
			c.Points = append(c.Points, out.CurvePoint{Label: fmt.Sprintf("R=%.2g", r.R), ScanTime: r.ScanTime,
				Mean: s.Mean, Std: s.Std, Lower: r.Bound(a.Metric), N: s.N})
			if ri == a.Best {
				chart.Pick = &out.PointRef{Curve: ci, Point: pi}
			}
		}
		chart.Curves = append(chart.Curves, c)
	}
	return out.PlotCurve(filepath.Join(dir, "curve.png"), filepath.Join(dir, "curve.svg"), chart)
}

// manifest records what made a results folder, for whoever reruns it.
type manifest struct {
	Tool       string  `json:"tool"`
	Version    string  `json:"version"`
	GoVersion  string  `json:"go_version"`
	Plan       string  `json:"plan"`
	PlanSHA256 string  `json:"plan_sha256"`
	Seed       uint64  `json:"seed"`
	NoiseSigma float64 `json:"noise_sigma_per_sample"`
	Started    string  `json:"started"`
	Seconds    float64 `json:"seconds"`
	Workers    int     `json:"workers"`
	CPUSeconds float64 `json:"cpu_seconds"`
	// Overhead is the share of worker time outside the solvers.
	Overhead   float64 `json:"overhead_outside_reconstruction"`
	Candidates []struct {
		Scheme   string  `json:"scheme"`
		AskedR   float64 `json:"asked_R"`
		R        float64 `json:"achieved_R"`
		Lines    int     `json:"lines"`
		MaskSeed uint64  `json:"mask_seed"`
		Lambda   []struct {
			Method string  `json:"method"`
			Lambda float64 `json:"lambda_rel"`
			Rule   string  `json:"rule"`
			Seed   uint64  `json:"calibration_noise_seed"`
			Score  float64 `json:"calibration_score"`
		} `json:"lambda,omitempty"`
	} `json:"candidates"`
}

// resultRow is one line of results.json.
type resultRow struct {
	Scheme     string  `json:"scheme"`
	Method     string  `json:"method"`
	AskedR     float64 `json:"asked_R"`
	R          float64 `json:"achieved_R"`
	Lines      int     `json:"lines"`
	ScanTime   float64 `json:"scan_time_s"`
	Repeat     int     `json:"repeat"`
	NoiseSeed  uint64  `json:"noise_seed"`
	Lambda     float64 `json:"lambda_rel"`
	LambdaRule string  `json:"lambda_rule"`
	NRMSE      float64 `json:"nrmse"`
	PSNR       float64 `json:"psnr_db"`
	SSIM       float64 `json:"ssim"`
}

func writeJSON(dir string, o *plans.Outcome, a *plans.Analysis, version string) error {
	p := o.Plan
	m := manifest{Tool: "accelplan", Version: version, GoVersion: runtime.Version(), Plan: planName(p),
		PlanSHA256: fmt.Sprintf("%x", sha256.Sum256(p.Text)), Seed: p.Seed, NoiseSigma: o.Sigma,
		Started: o.Started.UTC().Format(time.RFC3339), Seconds: o.Elapsed.Seconds(), Workers: o.Workers,
		CPUSeconds: o.CPUSeconds}
	if o.JobSeconds > 0 {
		m.Overhead = (o.JobSeconds - o.ReconSeconds) / o.JobSeconds
	}
	m.Candidates = make([]struct {
		Scheme   string  `json:"scheme"`
		AskedR   float64 `json:"asked_R"`
		R        float64 `json:"achieved_R"`
		Lines    int     `json:"lines"`
		MaskSeed uint64  `json:"mask_seed"`
		Lambda   []struct {
			Method string  `json:"method"`
			Lambda float64 `json:"lambda_rel"`
			Rule   string  `json:"rule"`
			Seed   uint64  `json:"calibration_noise_seed"`
			Score  float64 `json:"calibration_score"`
		} `json:"lambda,omitempty"`
	}, len(o.Candidates))
	for ci, c := range o.Candidates {
		mc := &m.Candidates[ci]
		mc.Scheme, mc.AskedR, mc.R, mc.Lines, mc.MaskSeed = p.Schemes[c.Scheme].Label, c.AskedR, c.Sampling.R, c.Sampling.Shots, c.MaskSeed
		for ri, t := range o.Tunings[ci] {
			if t.Rule == "" {
				continue
			}
			mc.Lambda = append(mc.Lambda, struct {
				Method string  `json:"method"`
				Lambda float64 `json:"lambda_rel"`
				Rule   string  `json:"rule"`
				Seed   uint64  `json:"calibration_noise_seed"`
				Score  float64 `json:"calibration_score"`
			}{p.Recons[ri].Label, t.Lambda, t.Rule, t.NoiseSeed, t.Score})
		}
	}
	if err := out.WriteJSON(filepath.Join(dir, "manifest.json"), m); err != nil {
		return err
	}
	rows := make([]resultRow, 0, len(o.Results))
	for _, r := range o.Results {
		c := o.Candidates[r.Candidate]
		rows = append(rows, resultRow{p.Schemes[c.Scheme].Label, p.Recons[r.Recon].Label, c.AskedR, c.Sampling.R,
			c.Sampling.Shots, c.ScanTime, r.Repeat, r.NoiseSeed, r.Lambda, r.LambdaRule, r.NRMSE, r.PSNR, r.SSIM})
	}
	return out.WriteJSON(filepath.Join(dir, "results.json"), rows)
}

// planName is how a results folder names its plan: the file's base name (or
// the built-in plan's name), so that the folder does not depend on the path
// the plan was given by; plan.toml in the folder and the manifest's SHA-256
// identify its content.
func planName(p *plans.Plan) string { return filepath.Base(p.Source) }

// noiseImage is one picture of a noise map with its display window.
type noiseImage struct {
	name, caption, note string
	img                 []float64
	lo, hi              float64
}

// noiseImages lists the pictures of a noise map: the SNR map on 0 … its 99th
// percentile inside the object, the g-factor maps on 1 … their maximum.
func noiseImages(nm plans.NoiseMap) []noiseImage {
	hi := percentile(nm.SNR, 0.99)
	ims := []noiseImage{{"snr", "SNR map (pseudo-replicas)", fmt.Sprintf("%d replicas, 0 … %.3g, mean %.3g", nm.Replicas, hi, nm.MeanSNR), nm.SNR, 0, hi}}
	for _, g := range []struct {
		name, caption string
		m             []float64
		mean          float64
	}{{"g_analytic", "g-factor (SENSE formula)", nm.GAnalytic, nm.MeanG}, {"g_replica", "g-factor (pseudo-replicas)", nm.GReplica, nm.MeanGReplica}} {
		if g.m == nil {
			continue
		}
		ghi := 1.0
		for _, v := range g.m {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				ghi = math.Max(ghi, v)
			}
		}
		clean := make([]float64, len(g.m))
		for i, v := range g.m {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				v = ghi
			}
			clean[i] = v
		}
		ims = append(ims, noiseImage{g.name, g.caption, fmt.Sprintf("1 … %.3g, mean %.3g in the object", ghi, g.mean), clean, 1, math.Max(ghi, 1+1e-9)})
	}
	return ims
}

func percentile(x []float64, q float64) float64 {
	var v []float64
	for _, a := range x {
		if a > 0 && !math.IsInf(a, 0) && !math.IsNaN(a) {
			v = append(v, a)
		}
	}
	if len(v) == 0 {
		return 1
	}
	sort.Float64s(v)
	return v[int(q*float64(len(v)-1))]
}

// writeNoiseMaps writes the noise-map pictures and their summary.
func writeNoiseMaps(dir string, o *plans.Outcome) error {
	if len(o.NoiseMaps) == 0 {
		return nil
	}
	p := o.Plan
	ny, nx := p.ImageSize()
	header := []string{"scheme", "asked_R", "method", "replicas", "mean_snr", "mean_g_analytic", "mean_g_replica"}
	var rows [][]string
	for _, nm := range o.NoiseMaps {
		stem := imageName(o, nm.Candidate, nm.Recon)
		for _, im := range noiseImages(nm) {
			if err := out.WriteGrayPNG(filepath.Join(dir, "images", stem+"_"+im.name+".png"), im.img, ny, nx, im.lo, im.hi); err != nil {
				return err
			}
		}
		opt := func(x float64, ok bool) string {
			if !ok {
				return ""
			}
			return ff(x)
		}
		c := o.Candidates[nm.Candidate]
		rows = append(rows, []string{p.Schemes[c.Scheme].Label, ff(c.AskedR), p.Recons[nm.Recon].Label, strconv.Itoa(nm.Replicas),
			ff(nm.MeanSNR), opt(nm.MeanG, nm.GAnalytic != nil), opt(nm.MeanGReplica, nm.GReplica != nil)})
	}
	return out.WriteCSV(filepath.Join(dir, "noise_maps.csv"), header, rows)
}

func isTask(metric string) bool {
	return metric == plans.MetricSmallestDisc || metric == plans.MetricMTF50 || metric == plans.MetricROIRMSE
}

// taskColumn names a task metric's column, with its unit.
func taskColumn(metric string) string {
	switch metric {
	case plans.MetricMTF50:
		return "mtf50_per_mm"
	case plans.MetricROIRMSE:
		return "roi_rmse_worst"
	}
	return "smallest_disc_mm"
}

// writeNIfTI exports the truth, the first scored reconstruction of every
// point and its error map as NIfTI-1 (float32, pixel size FOV/N in mm), for
// other tools.
func writeNIfTI(dir string, o *plans.Outcome, errLimit float64) error {
	p := o.Plan
	ny, nx := p.ImageSize()
	nd := filepath.Join(dir, "nifti")
	if err := os.MkdirAll(nd, 0o755); err != nil {
		return err
	}
	fov := p.Object.FOVmm
	if p.Modality == plans.ModalityODT {
		fov = p.Object.FOVum / 1000
	}
	pr, pc := p.PlaneSize()
	pix := [2]float64{fov / float64(pc), fov / float64(pr)}
	desc := func(what string) string { return "accelplan " + version + " " + what }
	if err := out.WriteNIfTI(filepath.Join(nd, "truth.nii"), o.Truth, ny, nx, pix, desc("truth")); err != nil {
		return err
	}
	diff := make([]float64, ny*nx)
	for ci := range o.Candidates {
		for ri := range p.Recons {
			m := o.Images[ci][ri]
			if len(m) != ny*nx {
				continue
			}
			stem := imageName(o, ci, ri)
			if err := out.WriteNIfTI(filepath.Join(nd, stem+".nii"), m, ny, nx, pix, desc("reconstruction")); err != nil {
				return err
			}
			for i := range m {
				diff[i] = m[i] - o.Truth[i]
			}
			if err := out.WriteNIfTI(filepath.Join(nd, stem+"_error.nii"), diff, ny, nx, pix, desc("error")); err != nil {
				return err
			}
		}
	}
	return nil
}
