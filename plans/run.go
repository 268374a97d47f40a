package plans

import (
	"context"
	"fmt"
	"hash/fnv"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"sync"
	"time"

	"accelplan/priors"
	"accelplan/simulate"
	"accelplan/simulate/nufft"
	"accelplan/simulate/odt"
	"accelplan/simulate/quality"
	"accelplan/trajectories"
)

// Candidate is one protocol under study: a scheme at one acceleration, with
// its sampling and scan time.
type Candidate struct {
	Scheme   int     // index into Plan.Schemes
	Accel    int     // index into the scheme's Accelerations
	AskedR   float64 // R as written in the plan
	Sampling trajectories.Sampling
	ScanTime float64 // seconds
	MaskSeed uint64
	key      string // journal identity, see candidateKeys
	seedKey  string // root of the seeds, see candidateKeys
	// PF describes the partial-Fourier cut of the sampling, if any.
	PF trajectories.PFInfo
	// Budget breaks ScanTime down.
	Budget TimeBudget
	// PSF is the point-spread function on the image grid, peak 1 at the
	// centre pixel: the inverse FFT of a Cartesian mask, or the
	// density-compensated NUFFT adjoint EᴴW1 of a non-Cartesian trajectory.
	PSF []complex128
	// SideLobe is the PSF side-lobe-to-peak ratio of the sampling (Lustig,
	// Donoho, Pauly 2007): 1 for regular undersampling without calibration.
	// For non-Cartesian samplings the main lobe (radius 2 pixels) is left out.
	SideLobe float64
}

// Key identifies the candidate by content and by the binary that computes it
// (see candidateKeys): the root of its journal entries.
func (c Candidate) Key() string { return c.key }

// SeedKey identifies the candidate by the plan's content alone (see
// candidateKeys): the root of its mask and noise seeds, which therefore do
// not change when the program is rebuilt.
func (c Candidate) SeedKey() string { return c.seedKey }

// Result is the outcome of one reconstruction of one noise draw.
type Result struct {
	Candidate  int    // index into Outcome.Candidates
	Recon      int    // index into Plan.Recons
	Repeat     int    // scored draw number, from 0
	NoiseSeed  uint64 // seed of the noise draw
	Lambda     float64
	LambdaRule string
	Iterations int
	NRMSE      float64
	PSNR       float64
	SSIM       float64
	// Task is the task-based metric of the plan (smallest-disc, mtf50),
	// 0 when the plan has none.
	Task    float64
	Seconds float64 // wall time of the reconstruction
}

// Metric returns the named quality figure of r.
func (r Result) Metric(name string) float64 {
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

// HigherIsBetter reports whether larger values of metric mean better images.
func HigherIsBetter(metric string) bool {
	return metric != MetricNRMSE && metric != MetricSmallestDisc && metric != MetricROIRMSE
}

// Tuning records how λ was fixed for one candidate and method.
type Tuning struct {
	Lambda    float64 // relative to the largest zero-filled magnitude
	Rule      string
	Score     float64 // acceptance metric on the calibration draw
	NoiseSeed uint64
	Evals     int
}

// Outcome is everything a run produced, in plan order, independent of the
// number of workers.
type Outcome struct {
	Plan       *Plan
	Sigma      float64 // noise σ per k-space sample and channel
	Truth      []float64
	Support    []bool
	Candidates []Candidate
	Tunings    [][]Tuning // [candidate][recon]
	Results    []Result   // ordered by candidate, recon, repeat
	// Images holds the magnitude reconstruction of the first scored draw,
	// [candidate][recon].
	Images  [][][]float64
	Started time.Time
	Elapsed time.Duration
	Workers int // worker goroutines used; results do not depend on it
	// Complete is false for a shard or when jobs were left to other
	// shards; only a complete outcome is analysed and written.
	Complete bool
	// Computed and Restored count the jobs done now and taken from the
	// journal.
	Computed, Restored int
	// JobSeconds is the worker time spent on the computed jobs, and
	// ReconSeconds the part of it inside the solvers; the rest is the
	// sweep's overhead (simulation, noise, scoring, journaling).
	JobSeconds, ReconSeconds float64
	// CPUSeconds is the process CPU time of the run, filled by the caller
	// that can measure it.
	CPUSeconds float64
	// NoiseMaps holds the maps the plan asks for (see NoiseMaps), filled
	// by the caller after the run.
	NoiseMaps []NoiseMap
}

// Options tune a run without changing its results.
type Options struct {
	Workers  int                   // 0 means all cores
	Progress func(done, total int) // called after every finished job; may be nil
	// Journal, when not nil, supplies the jobs finished earlier and records
	// every job finished now.
	Journal *Journal
	// Shard and Shards split the sweep: with Shards > 1 only the jobs of
	// shard Shard (0-based) are computed. Shards ≤ 1 means the whole sweep.
	Shard, Shards int
	// Merge computes nothing: every job must come from the journal, or Run
	// fails with ErrIncomplete.
	Merge bool
}

// seedFor derives a reproducible seed from the plan seed and a key.
func seedFor(plan uint64, key string) uint64 {
	h := fnv.New64a()
	fmt.Fprintf(h, "%d|%s", plan, key)
	z := h.Sum64() + 0x9e3779b97f4a7c15
	// splitmix64 finaliser, so nearby keys give unrelated seeds.
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// Candidates builds the samplings of every scheme and acceleration of p.
func Candidates(p *Plan) ([]Candidate, error) {
	ny, nx := p.Object.PhaseLines, p.Object.ReadoutPoints
	pr, pc := p.PlaneSize()
	var out []Candidate
	for si, s := range p.Schemes {
		for ai, r := range s.Accelerations {
			c := Candidate{Scheme: si, Accel: ai, AskedR: r}
			c.key, c.seedKey = candidateKeys(p, s, r)
			c.MaskSeed = seedFor(p.Seed, "mask|"+c.seedKey)
			var err error
			switch s.Pattern {
			case PatternUniform:
				c.Sampling, err = trajectories.CartesianUniform(ny, nx, int(r), s.CalibrationLines)
			case PatternRandom:
				var lines int
				lines, err = trajectories.LinesForR(ny, r)
				if err == nil {
					c.Sampling, err = trajectories.CartesianRandom(ny, nx, lines, s.CalibrationLines, s.DensityPower, c.MaskSeed)
				}
			case PatternRadial:
				c.Sampling, err = radialSampling(p, s, r)
			case PatternSpiral:
				c.Sampling, err = spiralSampling(p, s, int(r))
			case PatternFan, PatternFanGolden:
				c.Sampling, err = odtCandidate(p, s, int(r))
			case Pattern3DUniform, Pattern3DShifted, Pattern3DRandom, Pattern3DPoissonDisc:
				c.Sampling, err = sampling3D(p, s, r, c.MaskSeed)
			default:
				err = fmt.Errorf("pattern %q has no sampling yet", s.Pattern)
			}
			if err != nil {
				key, what := "accelerations", fmt.Sprintf("R = %g", r)
				switch s.Pattern {
				case PatternSpiral:
					key, what = "interleaves", fmt.Sprintf("%d interleaves", int(r))
				case PatternFan, PatternFanGolden:
					key, what = "illuminations", fmt.Sprintf("%d illuminations", int(r))
				}
				return nil, &Error{File: p.Source, Line: findKeyIn(string(p.Text), "scheme", si, key),
					Key: fmt.Sprintf("scheme[%d].%s", si+1, key), Msg: fmt.Sprintf("%s: %v", what, err)}
			}
			if f := s.PartialFourier; f != 0 && f < 1 && err == nil {
				c.Sampling, c.PF, err = trajectories.PartialFourier(c.Sampling, f)
			}
			if err != nil {
				return nil, fmt.Errorf("scheme %q, R = %g: partial Fourier: %w", s.Label, r, err)
			}
			if err := c.psf(pr, pc); err != nil {
				return nil, fmt.Errorf("scheme %q, R = %g: PSF: %w", s.Label, r, err)
			}
			c.Budget = Budget(p, s, c.Sampling.Shots)
			c.ScanTime = c.Budget.Total
			out = append(out, c)
		}
	}
	return out, nil
}

// psf fills c.PSF and c.SideLobe.
func (c *Candidate) psf(ny, nx int) error {
	s := c.Sampling
	var err error
	if s.Mask != nil {
		if c.PSF, err = s.PSF(); err != nil {
			return err
		}
		c.SideLobe, err = trajectories.SideLobeToPeak(c.PSF, ny, nx)
		return err
	}
	kx, ky := splitK(s.K)
	op, err := nufft.New(ny, nx, kx, ky, nufft.Options{})
	if err != nil {
		return err
	}
	// Unit data of a point at the centre pixel are 1/√(nx·ny) at every k;
	// the gridded adjoint then peaks at Σw/(nx·ny).
	w := make([]complex128, len(s.Weights))
	for j, v := range s.Weights {
		w[j] = complex(v/math.Sqrt(float64(nx*ny)), 0)
	}
	c.PSF = make([]complex128, ny*nx)
	op.Adjoint(c.PSF, w)
	peak := c.PSF[ny/2*nx+nx/2]
	if peak == 0 {
		return fmt.Errorf("the PSF has no peak at the centre")
	}
	for i := range c.PSF {
		c.PSF[i] /= peak
	}
	c.SideLobe, err = trajectories.SideLobeToPeakOutside(c.PSF, ny, nx, 2)
	return err
}

// radialSampling builds the spokes for acceleration r relative to the π/2·N
// spokes of Nyquist sampling.
func radialSampling(p *Plan, s Scheme, r float64) (trajectories.Sampling, error) {
	n := p.Object.ReadoutPoints
	ref := trajectories.RadialReferenceSpokes(n, s.HalfSpokes)
	spokes := max(1, int(math.Round(float64(ref)/r)))
	spec := trajectories.RadialSpec{N: n, Spokes: spokes, Half: s.HalfSpokes, Oversampling: s.ReadoutOversampling}
	switch s.SpokeOrder {
	case "uniform":
		spec.Order = "uniform"
	case "golden":
		spec.Order, spec.TinyN = "golden", 1
	case "tiny-golden":
		spec.Order, spec.TinyN = "golden", s.TinyGoldenN
	case "rational-golden":
		spec.Order, spec.TinyN = "rational", max(1, s.TinyGoldenN)
	}
	return trajectories.Radial(spec)
}

// spiralSampling designs n interleaves under the plan's gradient limits.
func spiralSampling(p *Plan, s Scheme, n int) (trajectories.Sampling, error) {
	sc := p.Scanner
	spec := trajectories.SpiralSpec{N: p.Object.ReadoutPoints, FOV: p.Object.FOVmm / 1000, Interleaves: n,
		GMax: sc.MaxGradient / 1000, SMax: sc.MaxSlew, Dt: sc.DwellUs * 1e-6,
		EdgeUndersampling: s.EdgeUndersampling, DenseFraction: s.DenseFraction, MaxReadout: sc.MaxReadoutMs / 1000}
	smp, d, err := trajectories.Spiral(spec)
	if err != nil {
		return smp, err
	}
	if ms := d.Readout * 1000; ms >= sc.TRms {
		return smp, fmt.Errorf("the readout takes %.2f ms, which does not fit in tr_ms = %g; raise tr_ms, add interleaves or raise edge_undersampling", ms, sc.TRms)
	}
	return smp, nil
}

// job is one unit of work on the pool: a λ tuning (repeat < 0) or a scored
// reconstruction, with its content key.
type job struct {
	cand, recon, repeat int
	key                 string
}

// Run simulates, reconstructs and scores every point of p.
func Run(ctx context.Context, p *Plan, opt Options) (*Outcome, error) {
	start := time.Now()
	cands, err := Candidates(p)
	if err != nil {
		return nil, err
	}
	ny, nx := p.ImageSize()
	o := &Outcome{Plan: p, Candidates: cands, Started: start}
	env := &runEnv{plan: p, out: o, clean: newCleanData(len(cands)), ny: ny, nx: nx, journal: opt.Journal}
	if err := env.setScene(); err != nil {
		return nil, err
	}

	nr := len(p.Recons)
	o.Tunings = make([][]Tuning, len(cands))
	o.Images = make([][][]float64, len(cands))
	for i := range cands {
		o.Tunings[i] = make([]Tuning, nr)
		o.Images[i] = make([][]float64, nr)
	}
	o.Results = make([]Result, len(cands)*nr*p.Repeats)

	shards := max(opt.Shards, 1)
	if opt.Shard < 0 || opt.Shard >= shards {
		return nil, fmt.Errorf("shard %d is outside 1..%d", opt.Shard+1, shards)
	}
	// Jobs in plan order. A (candidate, method) group, its λ search and
	// all its draws, belongs to shard group % shards.
	var tune, score []job
	missing := 0
	for ci, c := range cands {
		for ri, rc := range p.Recons {
			g := ci*nr + ri
			mine := g%shards == opt.Shard
			rk := reconKey(rc)
			tkey := ""
			if needsTuning(rc) {
				tkey = contentKey("tune", c.key, rk, p.Accept.Metric, tuneEvals)
				if e, ok := opt.Journal.lookup(tkey); ok && e.Tuning != nil {
					o.Tunings[ci][ri] = *e.Tuning
					o.Restored++
				} else if mine && !opt.Merge {
					tune = append(tune, job{ci, ri, -1, tkey})
				} else {
					missing++
				}
			}
			for rep := 0; rep < p.Repeats; rep++ {
				j := job{ci, ri, rep, contentKey("score", c.key, rk, tkey, rep)}
				if restoreResult(o, opt.Journal, j, ny*nx) {
					o.Restored++
				} else if mine && !opt.Merge {
					score = append(score, j)
				} else {
					missing++
				}
			}
		}
	}
	if opt.Merge && missing > 0 {
		return nil, fmt.Errorf("%w: %d of %d jobs are missing; run the shards that have not finished", ErrIncomplete, missing, o.Restored+missing)
	}
	total := len(tune) + len(score)
	var mu sync.Mutex
	done := 0
	tick := func() {
		mu.Lock()
		done++
		d := done
		mu.Unlock()
		if opt.Progress != nil {
			opt.Progress(d, total)
		}
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	o.Workers = workers
	// One state per worker for the whole run, so operators and solvers
	// built in the λ searches serve the scored draws too.
	states := make([]*workerState, workers)
	for i := range states {
		if states[i], err = newWorkerState(env); err != nil {
			return nil, err
		}
	}
	// One queue: the λ searches first, then the scored draws; a draw whose
	// group is still being tuned on another worker waits for it, so no
	// worker idles at a stage boundary.
	tuned := make([]chan struct{}, len(cands)*nr)
	for g := range tuned {
		tuned[g] = make(chan struct{})
	}
	pending := map[int]bool{}
	for _, j := range tune {
		pending[j.cand*nr+j.recon] = true
	}
	for g, ch := range tuned {
		if !pending[g] {
			close(ch)
		}
	}
	env.tuned = tuned
	if err := pool(ctx, states, append(tune, score...), tick); err != nil {
		return nil, err
	}
	for _, ws := range states {
		o.JobSeconds += ws.jobSeconds
		o.ReconSeconds += ws.reconSeconds
	}
	o.Computed = total
	o.Complete = missing == 0
	o.Elapsed = time.Since(start)
	return o, nil
}

func needsTuning(r Recon) bool {
	switch r.Method {
	case MethodZeroFilled, MethodFISTABox, MethodHomodyne, MethodPOCS:
		return false
	}
	return r.Lambda == 0 && r.LambdaRule == RuleCalibration
}

// pool runs jobs on workers goroutines, each with its own scratch. Results
// land in slots fixed by the job, so the order of completion does not matter.
func pool(ctx context.Context, states []*workerState, jobs []job, tick func()) error {
	if len(jobs) == 0 {
		return nil
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	next := make(chan job)
	errs := make(chan error, len(states))
	var wg sync.WaitGroup
	for _, ws := range states {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range next {
				if j.repeat >= 0 && ws.env.tuned != nil {
					select {
					case <-ws.env.tuned[j.cand*len(ws.env.plan.Recons)+j.recon]:
					case <-ctx.Done():
						return
					}
				}
				t0 := time.Now()
				err := ws.do(j)
				ws.jobSeconds += time.Since(t0).Seconds()
				if err != nil {
					errs <- err
					cancel()
					return
				}
				tick()
			}
		}()
	}
	var err error
feed:
	for _, j := range jobs {
		select {
		case next <- j:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	select {
	case err = <-errs:
	default:
		err = ctx.Err()
	}
	return err
}

// runEnv is what every worker reads; only the slots a job owns are written.
type runEnv struct {
	plan    *Plan
	out     *Outcome
	clean   *cleanData
	ny, nx  int
	journal *Journal
	// tuned[g] is closed once group g = cand·len(Recons) + recon has its λ.
	tuned []chan struct{}
	// The scene: what is imaged and how quality is measured.
	dataRange float64 // L of PSNR and SSIM: max − min of the truth
	// task scores the plan's task-based metric, nil when it has none.
	task     taskScorer
	realPart bool // score the real part (an index contrast) instead of the magnitude
	// MRI: the analytic phantom and its spectrum on the centred grid.
	phantom  supportedPhantom
	spectrum []complex128
	// MRI with a receive array: the coils, their maps on the scored image
	// (in 3D stacked over the readout planes) and the coil noise covariance
	// (nil coils: one uniform coil).
	coils     *simulate.CoilArray
	maps      [][]complex128
	coilNoise *simulate.NoiseCovariance
	combine   []float64 // 1/(SᴴΨ⁻¹S) per pixel (1/Σ|S_c|² for white noise): the adjoint's coil combination made unbiased, see setCombine
	// 3D: the phantom's cuts at the readout positions and their spectra on
	// the plane grid; with coils, the maps on one plane (the ring surrounds
	// the readout axis, so every plane sees the same sensitivities).
	cuts       []simulate.Ellipses
	cutSpectra [][]complex128
	planeMaps  [][]complex128
	// ODT: the instrument and the specimen.
	setup    odt.Setup
	specimen odt.Specimen
}

// supportedPhantom is a phantom that also knows the region it occupies,
// where quality is scored.
type supportedPhantom interface {
	simulate.Phantom
	Support(nx, ny int) []bool
}

// setScene fills the truth, support and noise level of the run and what the
// encodings need, for the plan's modality.
func (env *runEnv) setScene() error {
	p, o := env.plan, env.out
	ny, nx := env.ny, env.nx
	switch {
	case p.Is3D():
		if err := env.scene3D(); err != nil {
			return err
		}
		if n := p.Scanner.Coils; n > 1 {
			nz, ny := p.PlaneSize()
			if err := env.receiveArray(n, nz, ny); err != nil {
				return err
			}
			env.planeMaps = env.maps
			// The scored image stacks the planes: so do the maps the
			// coil combination and CG-SENSE's preconditioner use.
			planes := len(env.cuts)
			stacked := make([][]complex128, n)
			for c, m := range env.planeMaps {
				stacked[c] = make([]complex128, 0, planes*len(m))
				for range planes {
					stacked[c] = append(stacked[c], m...)
				}
			}
			env.maps = stacked
			if err := env.setCombine(); err != nil {
				return err
			}
		}
	case p.Modality == ModalityODT:
		env.setup, env.specimen = odtSetup(p), odtSpecimen(p.Object.Phantom)
		contrast, err := env.specimen.Contrast(p.Object.FOVum)
		if err != nil {
			return err
		}
		// The truth is the index step δn; the data are drawn from the Born
		// contrast (n² − n_m²)/(2n_m), so the score includes the
		// linearisation error, as it would for a real specimen.
		o.Truth = contrast.Rasterize(nx, ny)
		o.Support = contrast.Support(nx, ny)
		if o.Sigma, err = odt.NoiseSigma(p.Micro.FieldSNR); err != nil {
			return err
		}
		env.realPart = true
	default:
		ph, task, err := taskPhantom(p)
		if err != nil {
			return err
		}
		env.phantom, env.task = ph, task
		o.Truth = ph.Rasterize(nx, ny)
		o.Support = ph.Support(nx, ny)
		// The separable fast path of shape phantoms, where there is one.
		type gridSpectrum interface {
			CartesianSpectrum(nx, ny int) []complex128
		}
		if o.Sigma, err = simulate.NoiseSigma(o.Truth, o.Support, p.Scanner.ReferenceSNR); err != nil {
			return err
		}
		// The noiseless spectrum on the whole centred grid, drawn from the
		// analytic phantom once and shared read-only by every worker.
		if g, ok := ph.(gridSpectrum); ok {
			env.spectrum = g.CartesianSpectrum(nx, ny)
		} else {
			env.spectrum = simulate.CartesianSpectrum(ph, nx, ny)
		}
		if n := p.Scanner.Coils; n > 1 {
			if err := env.receiveArray(n, ny, nx); err != nil {
				return err
			}
			if err := env.setCombine(); err != nil {
				return err
			}
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range o.Truth {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	env.dataRange = hi - lo
	if !(env.dataRange > 0) {
		return fmt.Errorf("the truth image is flat; nothing to measure")
	}
	return nil
}

// receiveArray builds the plan's ring of n coils, its maps on an ny×nx grid
// and the coil noise covariance.
func (env *runEnv) receiveArray(n, ny, nx int) error {
	var err error
	if env.coils, err = simulate.DefaultCoilRing(n).Build(); err != nil {
		return err
	}
	if env.maps, err = env.coils.Maps(ny, nx); err != nil {
		return err
	}
	var psi []complex128
	if rho := env.plan.Scanner.CoilCorrelation; rho > 0 {
		psi = simulate.RingNoiseCovariance(n, rho)
	}
	env.coilNoise, err = simulate.NewNoiseCovariance(n, psi)
	return err
}

// setCombine sets the per-pixel weight of the coil combination of the
// adjoint image: 1/(Sᴴ·Ψ⁻¹·S), the diagonal of EᴴE at full sampling for the
// prewhitened operator, so that full sampling returns the object itself
// (1/Σ|S_c|² for white coil noise). The adjoint of the whitened operator is
// then the SNR-optimal combination of Roemer PB et al., MRM 1990;16:192-225.
func (env *runEnv) setCombine() error {
	maps := env.maps
	n := len(maps)
	var inv []complex128
	if nc := env.coilNoise; nc != nil && !nc.IsIdentity() {
		inv = nc.Inverse()
	}
	env.combine = make([]float64, len(maps[0]))
	for i := range env.combine {
		var v float64
		if inv == nil {
			for _, m := range maps {
				v += real(m[i])*real(m[i]) + imag(m[i])*imag(m[i])
			}
		} else {
			for c := range n {
				var s complex128
				for d := range n {
					s += inv[c*n+d] * maps[d][i]
				}
				v += real(cmplx.Conj(maps[c][i]) * s)
			}
		}
		if v > 0 && !math.IsInf(v, 0) {
			env.combine[i] = 1 / v
		} else {
			env.combine[i] = 1
		}
	}
	return nil
}

// workerState holds one worker's operators and buffers, built once per
// candidate and reused across its jobs.
type workerState struct {
	env          *runEnv
	task         taskScorer // the worker's own task scorer
	jobSeconds   float64    // time in jobs
	reconSeconds float64    // time in reconstructions
	encs         map[int]*encoding
	mag          []float64
	ssim         *quality.SSIMPlan
	solvers      map[int]*solver // per recon index
}

func newWorkerState(env *runEnv) (*workerState, error) {
	ssim, err := quality.NewSSIMPlan(env.ny, env.nx, env.dataRange)
	if err != nil {
		return nil, err
	}
	var task taskScorer
	if env.task != nil {
		// Each worker gets its own scorer: some build masks on first use.
		if _, t, err := taskPhantom(env.plan); err == nil && t != nil {
			task = t
		}
	}
	return &workerState{env: env, encs: map[int]*encoding{}, task: task,
		mag: make([]float64, env.ny*env.nx), ssim: ssim, solvers: map[int]*solver{}}, nil
}

// draw returns the candidate's encoding and noisy data for the given draw key.
// soloWorker sets up the scene of outcome o and one worker outside a sweep
// (pre-flight estimates, noise maps, tests).
func soloWorker(o *Outcome) (*workerState, error) {
	p := o.Plan
	ny, nx := p.ImageSize()
	env := &runEnv{plan: p, out: o, clean: newCleanData(len(o.Candidates)), ny: ny, nx: nx}
	if err := env.setScene(); err != nil {
		return nil, err
	}
	return newWorkerState(env)
}

// addNoise adds the run's measurement noise to data y: white Gaussian noise
// of σ per channel, or with a receive array coil noise of covariance 2σ²Ψ
// after which the data (signal and noise alike) are whitened as the
// operator is.
func (w *workerState) addNoise(y []complex128, rng *rand.Rand) error {
	nc := w.env.coilNoise
	if nc == nil {
		simulate.AddNoise(y, w.env.out.Sigma, rng)
		return nil
	}
	// Coil-major data, in 3D once per readout plane (see encoding3D).
	blocks := 1
	if w.env.plan.Is3D() {
		blocks = len(w.env.cuts)
	}
	m := len(y) / blocks
	for b := range blocks {
		yb := y[b*m : (b+1)*m]
		if err := nc.AddNoise(yb, w.env.out.Sigma, rng); err != nil {
			return err
		}
		if err := nc.Whiten(yb); err != nil {
			return err
		}
	}
	return nil
}

// splitK returns the kx and ky coordinates of k-space points.
func splitK(k [][2]float64) (kx, ky []float64) {
	kx, ky = make([]float64, len(k)), make([]float64, len(k))
	for j, p := range k {
		kx[j], ky[j] = p[0], p[1]
	}
	return kx, ky
}

func (w *workerState) draw(ci int, key string) (*encoding, []complex128, uint64, error) {
	e, err := w.encodingFor(ci)
	if err != nil {
		return nil, nil, 0, err
	}
	seed := seedFor(w.env.plan.Seed, "noise|"+w.env.out.Candidates[ci].SeedKey()+"|"+key)
	rng := rand.New(rand.NewPCG(seed, seed^0x5851f42d4c957f2d))
	y := make([]complex128, len(e.clean))
	copy(y, e.clean)
	if err := w.addNoise(y, rng); err != nil {
		return nil, nil, 0, err
	}
	return e, y, seed, nil
}

func (w *workerState) do(j job) error {
	p := w.env.plan
	rc := p.Recons[j.recon]
	if j.repeat < 0 {
		return w.tune(j, rc)
	}
	// The same noise draw serves every method of a candidate, so methods are
	// compared on paired data.
	enc, y, seed, err := w.draw(j.cand, fmt.Sprintf("scored-%d", j.repeat))
	if err != nil {
		return err
	}
	lambda, rule := rc.Lambda, "fixed in the plan"
	if needsTuning(rc) {
		t := w.env.out.Tunings[j.cand][j.recon]
		lambda, rule = t.Lambda, t.Rule
	}
	switch rc.Method {
	case MethodZeroFilled:
		lambda, rule = 0, "none"
	case MethodFISTABox:
		lambda, rule = 0, "none (a hard box constraint)"
	case MethodHomodyne, MethodPOCS:
		lambda, rule = 0, "none (phase-constrained partial Fourier)"
	}
	t0 := time.Now()
	switch rc.LambdaRule {
	case RuleDiscrepancy:
		if lambda, err = w.discrepancy(j.recon, enc, y); err != nil {
			return err
		}
		rule = "discrepancy principle: residual = noise level (this draw, no truth used)"
	case RuleUniversal:
		// Donoho & Johnstone 1994: σ√(2 ln n) for n coefficients, as an
		// absolute threshold; expressed relative to the adjoint's peak.
		lambda = w.universal(j.recon, enc, y)
		rule = "universal threshold σ√(2 ln n)"
	case RuleOracle:
		if lambda, _, err = w.search(j.recon, enc, y); err != nil {
			return err
		}
		rule = "ORACLE: tuned on this scored draw against the truth (an upper bound, not a protocol result)"
	}
	img, iters, err := w.reconstruct(j.recon, enc, y, lambda)
	if err != nil {
		return err
	}
	sec := time.Since(t0).Seconds()
	w.project(img)
	r := Result{Candidate: j.cand, Recon: j.recon, Repeat: j.repeat, NoiseSeed: seed,
		Lambda: lambda, LambdaRule: rule, Iterations: iters, Seconds: sec}
	if r.NRMSE, r.PSNR, r.SSIM, r.Task, err = w.score(w.mag); err != nil {
		return err
	}
	idx := (j.cand*len(p.Recons)+j.recon)*p.Repeats + j.repeat
	w.env.out.Results[idx] = r
	var kept []float64
	if j.repeat == 0 {
		kept = append([]float64(nil), w.mag...)
		w.env.out.Images[j.cand][j.recon] = kept
	}
	return w.env.journal.record(journalEntry{Key: j.key, Result: &r}, kept)
}

// restoreResult fills the slot of job j from the journal, with its image
// for the first draw; it reports whether it could.
func restoreResult(o *Outcome, jr *Journal, j job, n int) bool {
	e, ok := jr.lookup(j.key)
	if !ok || e.Result == nil {
		return false
	}
	var img []float64
	if j.repeat == 0 {
		var err error
		if img, err = jr.readImage(e, n); err != nil {
			return false // recompute rather than trust a damaged entry
		}
	}
	r := *e.Result
	r.Candidate, r.Recon, r.Repeat = j.cand, j.recon, j.repeat
	nr := len(o.Plan.Recons)
	o.Results[(j.cand*nr+j.recon)*o.Plan.Repeats+j.repeat] = r
	if img != nil {
		o.Images[j.cand][j.recon] = img
	}
	return true
}

// score returns NRMSE, PSNR and SSIM of a magnitude image inside the support.
// project writes the real image that is scored into w.mag: the magnitude,
// or the real part for an index contrast.
func (w *workerState) project(img []complex128) {
	if w.env.realPart {
		for i, v := range img {
			w.mag[i] = real(v)
		}
		return
	}
	simulate.Magnitude(w.mag, img)
}

// score returns NRMSE, PSNR and SSIM of an image inside the support (SSIM
// averaged over the support pixels, AverageAll), and the plan's task metric.
func (w *workerState) score(mag []float64) (nrmse, psnr, ssim, task float64, err error) {
	o := w.env.out
	nrmse = quality.NRMSE(mag, o.Truth, o.Support)
	psnr = quality.PSNR(mag, o.Truth, o.Support, w.env.dataRange)
	if ssim, err = w.ssim.Mean(mag, o.Truth, o.Support, quality.AverageAll); err != nil {
		return
	}
	if w.env.task != nil {
		task, err = w.task(mag, o.Truth, w.env.ny, w.env.nx)
	}
	return
}

// tuneEvals is the number of reconstructions of the golden-section search:
// the bracket shrinks by 0.618^11 ≈ 0.5% of its width in log λ.
const tuneEvals = 12

// tune fixes λ for one candidate and method on a calibration noise draw that
// is never scored, by a golden-section search over log λ that optimises the
// plan's acceptance metric.
func (w *workerState) tune(j job, rc Recon) error {
	enc, y, seed, err := w.draw(j.cand, "calibration")
	if err != nil {
		return err
	}
	best, score, err := w.search(j.recon, enc, y)
	if err != nil {
		return err
	}
	t := Tuning{Lambda: best, Rule: "tuned on a calibration noise draw (" + w.env.plan.Accept.Metric + ")",
		Score: score, NoiseSeed: seed, Evals: tuneEvals}
	w.env.out.Tunings[j.cand][j.recon] = t
	if err := w.env.journal.record(journalEntry{Key: j.key, Tuning: &t}, nil); err != nil {
		return err
	}
	if w.env.tuned != nil {
		close(w.env.tuned[j.cand*len(w.env.plan.Recons)+j.recon])
	}
	return nil
}

// search returns the λ in the method's search range that gives the best
// acceptance metric against the truth on data y (golden-section search over
// log λ), and that metric.
func (w *workerState) search(ri int, enc *encoding, y []complex128) (best, score float64, err error) {
	rc := w.env.plan.Recons[ri]
	metric := w.env.plan.Accept.Metric
	sign := -1.0
	if !HigherIsBetter(metric) {
		sign = 1
	}
	var firstErr error
	cost := func(lambda float64) float64 {
		img, _, err := w.reconstruct(ri, enc, y, lambda)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			return math.Inf(1)
		}
		w.project(img)
		n, ps, ss, task, err := w.score(w.mag)
		if err != nil && firstErr == nil {
			firstErr = err
		}
		v := Result{NRMSE: n, PSNR: ps, SSIM: ss, Task: task}.Metric(metric)
		if math.IsInf(v, 0) {
			// No disc detected: worse than any detection, but ordered
			// so the search can still move.
			v = 1e6
		}
		return sign * v
	}
	best, trace, err := priors.TuneLambda(cost, rc.LambdaLook[0], rc.LambdaLook[1], tuneEvals)
	if firstErr != nil {
		return 0, 0, firstErr
	}
	if err != nil {
		return 0, 0, err
	}
	bestCost := math.Inf(1)
	for _, e := range trace {
		bestCost = math.Min(bestCost, e.Score)
	}
	return best, sign * bestCost, nil
}

// discrepancy returns the λ whose reconstruction leaves a residual
// ‖Ex − y‖² equal to the expected noise energy 2σ²·m of m complex samples
// (Morozov's discrepancy principle; e.g. Engl, Hanke, Neubauer, Regularization
// of Inverse Problems, 1996), found by bisection over log λ in the method's
// search range; the residual grows with λ. It uses the data and the noise
// level only, never the truth.
func (w *workerState) discrepancy(ri int, enc *encoding, y []complex128) (float64, error) {
	rc := w.env.plan.Recons[ri]
	target := 2 * w.env.out.Sigma * w.env.out.Sigma * float64(len(y))
	r := make([]complex128, len(y))
	resid := func(lambda float64) (float64, error) {
		img, _, err := w.reconstruct(ri, enc, y, lambda)
		if err != nil {
			return 0, err
		}
		enc.op.Forward(r, img)
		var s float64
		for i, v := range r {
			d := v - y[i]
			s += real(d)*real(d) + imag(d)*imag(d)
		}
		return s, nil
	}
	lo, hi := math.Log(rc.LambdaLook[0]), math.Log(rc.LambdaLook[1])
	for k := 0; k < tuneEvals; k++ {
		mid := (lo + hi) / 2
		v, err := resid(math.Exp(mid))
		if err != nil {
			return 0, err
		}
		if v < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return math.Exp((lo + hi) / 2), nil
}

// universal returns the universal threshold σ√(2 ln n) of Donoho and
// Johnstone (Biometrika 1994;81:425-455) for the n wavelet coefficients of
// the image, as a λ relative to the adjoint image's peak (the scale
// reconstruct expects).
func (w *workerState) universal(ri int, enc *encoding, y []complex128) float64 {
	s, err := w.solverFor(ri)
	if err != nil {
		return 0
	}
	w.adjoint(s, enc, y)
	peak := priors.MaxAbs(s.zf)
	if peak == 0 {
		return 0
	}
	n := float64(w.env.ny * w.env.nx)
	return w.env.out.Sigma * math.Sqrt(2*math.Log(n)) / peak
}
