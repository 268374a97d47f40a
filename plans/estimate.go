package plans

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"strconv"
	"strings"
	"time"
)

// Estimate is the pre-flight figure of a plan: how many jobs it runs, how
// much memory and time it needs.
type Estimate struct {
	Candidates int
	Jobs       int     // λ searches count once per candidate and method
	Recons     int     // reconstructions, λ-search evaluations included
	Bytes      int64   // peak memory, estimated
	Seconds    float64 // wall time on the given workers, estimated
	Workers    int
	// PerRecon is the measured time of one reconstruction of each method
	// on the first candidate of each scheme, [scheme][recon], seconds.
	PerRecon [][]float64
}

// EstimatePlan measures one reconstruction of every method on the first
// candidate of every scheme (a short calibration run, on one core) and
// extrapolates the time of the whole sweep on workers cores; memory is
// counted from the sizes the run allocates.
func EstimatePlan(ctx context.Context, p *Plan, workers int) (*Estimate, error) {
	cands, err := Candidates(p)
	if err != nil {
		return nil, err
	}
	if workers < 1 {
		workers = 1
	}
	w, err := soloWorker(&Outcome{Plan: p, Candidates: cands})
	if err != nil {
		return nil, err
	}
	e := &Estimate{Candidates: len(cands), Workers: workers}
	nr := len(p.Recons)
	// Each scheme's candidates with the fewest and the most samples are
	// timed; the others are interpolated linearly in their sample count.
	lo, hi := map[int]int{}, map[int]int{}
	for ci, c := range cands {
		if i, ok := lo[c.Scheme]; !ok || dataLen(c) < dataLen(cands[i]) {
			lo[c.Scheme] = ci
		}
		if i, ok := hi[c.Scheme]; !ok || dataLen(c) > dataLen(cands[i]) {
			hi[c.Scheme] = ci
		}
	}
	timeOne := func(ci, ri int) (float64, error) {
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		rc := p.Recons[ri]
		enc, y, _, err := w.draw(ci, "estimate")
		if err != nil {
			return 0, err
		}
		lambda := rc.Lambda
		if needsTuning(rc) {
			lambda = rc.LambdaLook[0]
		}
		t0 := time.Now()
		if _, _, err := w.reconstruct(ri, enc, y, lambda); err != nil {
			return 0, err
		}
		return time.Since(t0).Seconds(), nil
	}
	e.PerRecon = make([][]float64, len(p.Schemes))
	var total float64
	for si := range p.Schemes {
		e.PerRecon[si] = make([]float64, nr)
		for ri, rc := range p.Recons {
			t0, err := timeOne(lo[si], ri)
			if err != nil {
				return nil, err
			}
			t1 := t0
			if hi[si] != lo[si] {
				if t1, err = timeOne(hi[si], ri); err != nil {
					return nil, err
				}
			}
			e.PerRecon[si][ri] = t0
			n0, n1 := float64(dataLen(cands[lo[si]])), float64(dataLen(cands[hi[si]]))
			for _, c := range cands {
				if c.Scheme != si {
					continue
				}
				per := t0
				if n1 > n0 {
					per = t0 + (t1-t0)*(float64(dataLen(c))-n0)/(n1-n0)
				}
				n := p.Repeats
				e.Jobs += p.Repeats
				if needsTuning(rc) {
					n += tuneEvals
					e.Jobs++
				}
				e.Recons += n
				total += per * float64(n)
			}
		}
	}
	e.Seconds = total / float64(workers)
	e.Bytes = estimateBytes(p, cands, workers)
	return e, nil
}

func dataLen(c Candidate) int {
	if c.Sampling.Mask != nil {
		n := 0
		for _, m := range c.Sampling.Mask {
			if m {
				n++
			}
		}
		return n
	}
	return len(c.Sampling.K)
}

// estimateBytes counts the large allocations of a run: what every candidate
// keeps (sampling, PSF, kept images, noiseless data of every coil), what the
// run shares (spectrum; with a receive array its maps, in 3D also one
// plane's, and the maps mixed by Ψ⁻¹), and what every worker holds per
// candidate it has met (operators with their grids and kernel tables, data
// draw and residual of every coil) and per method (solver buffers).
func estimateBytes(p *Plan, cands []Candidate, workers int) int64 {
	r, c := p.ImageSize()
	ny, nx := int64(r), int64(c)
	img := ny * nx
	nr := int64(len(p.Recons))
	var shared, perWorker int64
	shared += img * 16 // spectrum on the Cartesian grid
	coils := int64(max(p.Scanner.Coils, 1))
	if coils > 1 {
		shared += 3 * coils * img * 16 // maps (stacked in 3D, and one plane's), mixed maps
	}
	for _, c := range cands {
		n := int64(dataLen(c)) * coils
		shared += img*16 + img*8*nr + n*16 // PSF, kept images, noiseless data
		shared += int64(len(c.Sampling.Mask)) + int64(len(c.Sampling.K))*24
		op := img * 16 // Cartesian scratch grid
		if c.Sampling.Mask == nil {
			op = 4*img*16 + n*(16+2*4*8) // oversampled grid and kernel tables (α = 2, W = 4)
		}
		if coils > 1 {
			op += 2 * img * 16 // the SENSE operator's two scratch images
		}
		perWorker += op + 2*n*16 // operator, data draw and residual
	}
	perWorker += nr * 8 * img * 16 // solver buffers: a few images per method
	const overhead = 64 << 20      // runtime, binary, plotting
	return shared + int64(workers)*perWorker + overhead
}

// MemoryNeeded returns the estimated peak memory of running p on workers
// cores, without the calibration run of EstimatePlan.
func MemoryNeeded(p *Plan, workers int) (int64, error) {
	cands, err := Candidates(p)
	if err != nil {
		return 0, err
	}
	return estimateBytes(p, cands, max(workers, 1)), nil
}

// AvailableMemory returns the memory the system reports available, in
// bytes, or 0 when it cannot tell (MemAvailable in /proc/meminfo on Linux).
func AvailableMemory() int64 {
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if len(fields) >= 2 && fields[0] == "MemAvailable:" {
			kb, err := strconv.ParseInt(fields[1], 10, 64)
			if err == nil {
				return kb << 10
			}
		}
	}
	return 0
}

// CheckMemory refuses an estimate that does not fit in avail bytes (with a
// quarter kept free), naming the figure and the keys that change it.
func CheckMemory(p *Plan, need, avail int64) error {
	if avail <= 0 || need <= avail*3/4 {
		return nil
	}
	return &Error{File: p.Source, Key: "object.phase_lines",
		Msg:  fmt.Sprintf("the sweep needs about %s of memory but %s is available", gib(need), gib(avail)),
		Hint: "lower object.phase_lines and object.readout_points (memory grows with their product), list fewer accelerations, or run with fewer -workers"}
}

func gib(b int64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.0f MiB", float64(b)/(1<<20))
	}
	return fmt.Sprintf("%d kB", b>>10)
}

// FormatBytes formats a byte count for people.
func FormatBytes(b int64) string { return gib(b) }
