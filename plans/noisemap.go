package plans

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"accelplan/priors"
	"accelplan/simulate"
)

// NoiseMapSpec asks for the noise maps of one point of the sweep.
type NoiseMapSpec struct {
	Scheme   string  `toml:"scheme"` // scheme label
	R        float64 `toml:"R"`      // acceleration as written in the scheme (or the shot count)
	Recon    string  `toml:"recon"`  // recon label
	Replicas int     `toml:"replicas"`
}

// NoiseMap is the noise behaviour of one candidate and method, by
// pseudo-replicas (Robson PM et al., MRM 2008;60:895-907): the same data
// reconstructed under many independent noise draws.
type NoiseMap struct {
	Candidate, Recon int
	Replicas         int
	Std              []float64 // per-pixel standard deviation of the scored image
	SNR              []float64 // |mean| / std inside the support, 0 outside
	MeanSNR          float64   // over the support
	// For uniform Cartesian undersampling with a receive array: the
	// g-factor by the analytic SENSE formula (Pruessmann et al. 1999) and,
	// for cg-sense, by pseudo-replicas against full sampling; nil otherwise.
	GAnalytic, GReplica []float64
	MeanG, MeanGReplica float64 // over the support
}

// noiseMaps validates the [[noise_map]] tables against the schemes and
// methods of the plan.
func (v *validator) noiseMaps(p *Plan) {
	for i := range p.NoiseMaps {
		m := &p.NoiseMaps[i]
		si := -1
		for j, s := range p.Schemes {
			if s.Label == m.Scheme {
				si = j
			}
		}
		if si < 0 {
			v.fail("noise_map", i, "scheme", fmt.Sprintf("no scheme is labelled %q", m.Scheme), "use the label of one of the [[scheme]] tables")
			continue
		}
		found := false
		for _, r := range p.Schemes[si].Accelerations {
			found = found || r == m.R
		}
		if !found {
			v.fail("noise_map", i, "R", fmt.Sprintf("scheme %q does not list %v", m.Scheme, m.R), fmt.Sprintf("choose one of %v", p.Schemes[si].Accelerations))
		}
		ok := false
		for _, r := range p.Recons {
			ok = ok || r.Label == m.Recon
		}
		if !ok {
			v.fail("noise_map", i, "recon", fmt.Sprintf("no recon is labelled %q", m.Recon), "use the label (or method name) of one of the [[recon]] tables")
		}
		if m.Replicas == 0 {
			m.Replicas = 32
		}
		if m.Replicas < 8 || m.Replicas > 2000 {
			v.fail("noise_map", i, "replicas", fmt.Sprintf("must be between 8 and 2000, got %d", m.Replicas), "the relative error of a standard deviation from M replicas is about 1/√(4(M−1))")
		}
	}
}

// NoiseMaps computes the noise maps the plan asks for, after a complete run
// (it needs the λ each method used). Replica draws are seeded from the plan
// and the candidate, so the maps do not depend on the worker count.
func NoiseMaps(ctx context.Context, o *Outcome) ([]NoiseMap, error) {
	p := o.Plan
	if len(p.NoiseMaps) == 0 {
		return nil, nil
	}
	w, err := soloWorker(o)
	if err != nil {
		return nil, err
	}
	var maps []NoiseMap
	for _, spec := range p.NoiseMaps {
		ci, ri := -1, -1
		for i, c := range o.Candidates {
			if p.Schemes[c.Scheme].Label == spec.Scheme && c.AskedR == spec.R {
				ci = i
			}
		}
		for i, r := range p.Recons {
			if r.Label == spec.Recon {
				ri = i
			}
		}
		if ci < 0 || ri < 0 {
			return nil, fmt.Errorf("noise map %s R = %v %s: no such point", spec.Scheme, spec.R, spec.Recon)
		}
		m, err := w.noiseMap(ctx, ci, ri, spec.Replicas)
		if err != nil {
			return nil, fmt.Errorf("noise map %s R = %v %s: %w", spec.Scheme, spec.R, spec.Recon, err)
		}
		maps = append(maps, m)
	}
	return maps, nil
}

// replicaStd reconstructs n noise draws of encoding enc with method ri at
// λ and returns the per-pixel mean and standard deviation of the scored
// image (Welford's update).
func (w *workerState) replicaStd(ctx context.Context, enc *encoding, key string, ri int, lambda float64, n int) (mean, std []float64, err error) {
	np := w.env.ny * w.env.nx
	mean = make([]float64, np)
	m2 := make([]float64, np)
	y := make([]complex128, len(enc.clean))
	for r := 0; r < n; r++ {
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		seed := seedFor(w.env.plan.Seed, fmt.Sprintf("replica|%s|%d", key, r))
		rng := rand.New(rand.NewPCG(seed, seed^0x5851f42d4c957f2d))
		copy(y, enc.clean)
		if err := w.addNoise(y, rng); err != nil {
			return nil, nil, err
		}
		img, _, err := w.reconstruct(ri, enc, y, lambda)
		if err != nil {
			return nil, nil, err
		}
		w.project(img)
		for i, v := range w.mag {
			d := v - mean[i]
			mean[i] += d / float64(r+1)
			m2[i] += d * (v - mean[i])
		}
	}
	std = make([]float64, np)
	for i, v := range m2 {
		std[i] = math.Sqrt(v / float64(n-1))
	}
	return mean, std, nil
}

func (w *workerState) noiseMap(ctx context.Context, ci, ri, n int) (NoiseMap, error) {
	o := w.env.out
	p := o.Plan
	m := NoiseMap{Candidate: ci, Recon: ri, Replicas: n}
	enc, err := w.encodingFor(ci)
	if err != nil {
		return m, err
	}
	// The λ of the first scored draw, as the sweep used it.
	lambda := o.Results[(ci*len(p.Recons)+ri)*p.Repeats].Lambda
	mean, std, err := w.replicaStd(ctx, enc, o.Candidates[ci].SeedKey(), ri, lambda, n)
	if err != nil {
		return m, err
	}
	m.Std = std
	m.SNR = make([]float64, len(std))
	var sum float64
	var cnt int
	for i, in := range o.Support {
		if in && std[i] > 0 {
			m.SNR[i] = math.Abs(mean[i]) / std[i]
			sum += m.SNR[i]
			cnt++
		}
	}
	if cnt > 0 {
		m.MeanSNR = sum / float64(cnt)
	}
	c := o.Candidates[ci]
	s := p.Schemes[c.Scheme]
	if w.env.maps == nil || s.Pattern != PatternUniform || c.Sampling.Calib > 0 || c.AskedR <= 1 {
		return m, nil
	}
	r := int(c.AskedR)
	if w.env.ny%r != 0 {
		return m, nil
	}
	if m.GAnalytic, err = priors.SENSEGFactor(w.env.maps, w.env.ny, w.env.nx, r, 1, w.env.coilNoise); err != nil {
		return m, err
	}
	m.MeanG = supportMean(m.GAnalytic, o.Support)
	if p.Recons[ri].Method != MethodCGSENSE {
		return m, nil
	}
	// Pseudo-replica g: the same method on a fully sampled acquisition.
	full := make([]bool, w.env.ny*w.env.nx)
	for i := range full {
		full[i] = true
	}
	op, err := simulate.NewCartesianSENSE(w.env.ny, w.env.nx, full, w.env.maps, w.env.coilNoise)
	if err != nil {
		return m, err
	}
	clean, err := w.env.coils.CartesianData(w.env.phantom, w.env.ny, w.env.nx, full)
	if err != nil {
		return m, err
	}
	fenc := &encoding{op: op, clean: clean, step: 0}
	_, stdFull, err := w.replicaStd(ctx, fenc, c.SeedKey()+"|full", ri, lambda, n)
	if err != nil {
		return m, err
	}
	if m.GReplica, err = priors.ReplicaGFactor(std, stdFull, float64(r)); err != nil {
		return m, err
	}
	m.MeanGReplica = supportMean(m.GReplica, o.Support)
	return m, nil
}

func supportMean(x []float64, support []bool) float64 {
	var s float64
	var n int
	for i, in := range support {
		if in && !math.IsNaN(x[i]) && !math.IsInf(x[i], 0) {
			s += x[i]
			n++
		}
	}
	if n == 0 {
		return math.NaN()
	}
	return s / float64(n)
}
