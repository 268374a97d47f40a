package plans

import (
	"fmt"
	"math"
)

// Row summarises one candidate reconstructed by one method over its scored
// noise draws.
type Row struct {
	Candidate  int
	Recon      int
	Scheme     string
	Method     string
	AskedR     float64
	R          float64 // achieved
	Shots      int     // acquired shots
	FullShots  int     // shots of the fully sampled reference of the family
	ShotKind   string  // "lines", "spokes" or "interleaves"
	ScanTime   float64 // seconds
	NRMSE      Summary
	PSNR       Summary
	SSIM       Summary
	Task       Summary // the task-based metric, when the plan has one
	Lambda     float64
	LambdaRule string
	Meets      bool // the confidence bound of the acceptance metric meets the threshold
}

// Metric returns the summary of the named metric.
func (r Row) Metric(name string) Summary {
	switch name {
	case MetricPSNR:
		return r.PSNR
	case MetricNRMSE:
		return r.NRMSE
	case MetricSmallestDisc, MetricMTF50, MetricROIRMSE:
		return r.Task
	}
	return r.SSIM
}

// Bound returns the one-sided 95% confidence bound of the named metric on
// the side that matters: the lower bound when higher is better, the upper
// bound otherwise.
func (r Row) Bound(metric string) float64 {
	s := r.Metric(metric)
	if HigherIsBetter(metric) {
		return s.Lower
	}
	return s.Upper
}

// Curve is one line of the quality-versus-scan-time chart: one scheme
// reconstructed by one method, its rows in order of scan time.
type Curve struct {
	Scheme, Recon int
	Rows          []int // indices into Analysis.Rows, ascending scan time
	Pick          int   // recommended row of this curve, or -1
}

// Analysis is the statistics of a run and its recommendation.
type Analysis struct {
	Metric         string
	Threshold      float64
	Rows           []Row
	Curves         []Curve
	Best           int     // the overall recommendation (index into Rows), or -1
	ReferenceTime  float64 // scan time of the fully sampled protocol, seconds
	ReferenceLabel string  // what the reference protocol is
}

// Analyse summarises the results of o and picks, per curve and overall, the
// shortest scan time whose one-sided 95% confidence bound meets the plan's
// threshold. Ties in scan time go to the better mean.
func Analyse(o *Outcome) *Analysis {
	p := o.Plan
	a := &Analysis{Metric: p.Accept.Metric, Threshold: p.Accept.Threshold, Best: -1}
	// The reference protocol is the fully sampled scan of the first
	// scheme's family: all phase-encode lines, or π/2·N spokes, or the
	// Nyquist interleaves of the spiral.
	if len(o.Candidates) > 0 {
		c := o.Candidates[0]
		s := p.Schemes[c.Scheme]
		a.ReferenceTime = ScanTime(p, s, c.Sampling.FullShots)
		a.ReferenceLabel = fmt.Sprintf("%s, fully sampled (%d %s)", s.Pattern, c.Sampling.FullShots, ShotName(s))
	}
	nr := len(p.Recons)
	for ci, c := range o.Candidates {
		for ri := range p.Recons {
			base := (ci*nr + ri) * p.Repeats
			res := o.Results[base : base+p.Repeats]
			var n, ps, ss, tk []float64
			for _, r := range res {
				n = append(n, r.NRMSE)
				ps = append(ps, r.PSNR)
				ss = append(ss, r.SSIM)
				tk = append(tk, r.Task)
			}
			row := Row{Candidate: ci, Recon: ri, Scheme: p.Schemes[c.Scheme].Label, Method: p.Recons[ri].Label,
				AskedR: c.AskedR, R: c.Sampling.R, Shots: c.Sampling.Shots, FullShots: c.Sampling.FullShots,
				ShotKind: ShotName(p.Schemes[c.Scheme]), ScanTime: c.ScanTime,
				NRMSE: Summarize(n), PSNR: Summarize(ps), SSIM: Summarize(ss), Task: Summarize(tk),
				Lambda: res[0].Lambda, LambdaRule: res[0].LambdaRule}
			row.Meets = meets(row.Bound(a.Metric), a.Threshold, a.Metric)
			a.Rows = append(a.Rows, row)
		}
	}
	for si := range p.Schemes {
		for ri := range p.Recons {
			cv := Curve{Scheme: si, Recon: ri, Pick: -1}
			for i, r := range a.Rows {
				if o.Candidates[r.Candidate].Scheme == si && r.Recon == ri {
					cv.Rows = append(cv.Rows, i)
				}
			}
			sortByTime(cv.Rows, a.Rows)
			cv.Pick = a.pick(cv.Rows)
			a.Curves = append(a.Curves, cv)
		}
	}
	all := make([]int, len(a.Rows))
	for i := range all {
		all[i] = i
	}
	sortByTime(all, a.Rows)
	a.Best = a.pick(all)
	return a
}

func meets(bound, threshold float64, metric string) bool {
	if math.IsNaN(bound) {
		return false
	}
	if HigherIsBetter(metric) {
		return bound >= threshold
	}
	return bound <= threshold
}

// pick returns the first row of idx (sorted by scan time) that meets the
// bar, preferring the better mean among rows of equal scan time.
func (a *Analysis) pick(idx []int) int {
	best := -1
	for _, i := range idx {
		r := a.Rows[i]
		if !r.Meets {
			continue
		}
		if best < 0 {
			best = i
			continue
		}
		if r.ScanTime > a.Rows[best].ScanTime {
			break
		}
		m, mb := r.Metric(a.Metric).Mean, a.Rows[best].Metric(a.Metric).Mean
		if (HigherIsBetter(a.Metric) && m > mb) || (!HigherIsBetter(a.Metric) && m < mb) {
			best = i
		}
	}
	return best
}

// sortByTime orders idx by scan time, keeping plan order among equal times.
func sortByTime(idx []int, rows []Row) {
	for i := 1; i < len(idx); i++ {
		for j := i; j > 0 && rows[idx[j]].ScanTime < rows[idx[j-1]].ScanTime; j-- {
			idx[j], idx[j-1] = idx[j-1], idx[j]
		}
	}
}
