package priors

import (
	"fmt"
	"math/rand/v2"
)

// CycleSpin wraps a shift-variant prior — typically WaveletL1 — so that every
// proximal step is taken in a randomly shifted frame: Prox(dst, src, t)
// draws a circular shift (a, b), uniform on [0, P)², and writes
//
//	S₋ₐ,₋ᵦ · prox_{tR}(Sₐ,ᵦ · src),
//
// the exact proximal map of the shifted prior R∘Sₐ,ᵦ, with no averaging.
// Used in FISTA or ADMM, the shift changes from one iteration to the next, so
// the block edges of the wavelet tiling never stay at the same pixels and
// the blocky artefacts of a fixed decimated transform do not build up. This
// is the per-iteration randomisation of cycle spinning (Coifman RR, Donoho
// DL, "Translation-invariant de-noising", in Antoniadis A, Oppenheim G
// (eds), Wavelets and Statistics, Springer 1995, pp. 125-150; drawing one
// shift per iteration of an iterative reconstruction is common practice in
// compressed-sensing MRI). P = 2^L for an L-level periodic wavelet
// transform, which commutes with shifts by multiples of 2^L.
//
// The shifts come from a PCG stream seeded at construction; Reset restarts
// it (and resets the wrapped prior if that keeps state), so a reconstruction
// started after Reset is reproducible. FISTARestart calls Reset at the start
// of every solve; FISTA (fista.go) and ADMM (admm.go) do not, so call Reset
// before each of their runs.
//
// Value returns R(x) in the unshifted frame, the objective that FISTA
// reports; the randomised iteration does not minimise one fixed objective,
// and ShiftInvariantValue gives the penalty averaged over all P² shifts.
//
// A CycleSpin holds scratch space and a random stream: make one per
// goroutine. Prox allocates nothing beyond what the wrapped prior does.
type CycleSpin struct {
	prior        Prior
	ny, nx       int
	period       int
	seed1, seed2 uint64
	pcg          *rand.PCG
	rng          *rand.Rand
	buf          []complex128
	a, b         int
}

// NewCycleSpin wraps prior, defined on ny×nx images, with random shifts in
// [0, period)² drawn from the PCG stream (seed1, seed2).
func NewCycleSpin(prior Prior, ny, nx, period int, seed1, seed2 uint64) (*CycleSpin, error) {
	switch {
	case prior == nil:
		return nil, fmt.Errorf("priors: cycle spinning needs a prior")
	case ny < 1 || nx < 1:
		return nil, fmt.Errorf("priors: cycle spinning on a %d×%d grid: want at least 1×1", ny, nx)
	case period < 1 || period > min(ny, nx):
		return nil, fmt.Errorf("priors: cycle-spinning period %d, want 1 … %d (the shorter image side)", period, min(ny, nx))
	}
	pcg := rand.NewPCG(seed1, seed2)
	return &CycleSpin{prior: prior, ny: ny, nx: nx, period: period, seed1: seed1, seed2: seed2,
		pcg: pcg, rng: rand.New(pcg), buf: make([]complex128, ny*nx)}, nil
}

// NewWaveletCycleSpin wraps a WaveletL1 prior with shifts in [0, 2^L)², L its
// number of levels: every distinct shift of the periodic transform.
func NewWaveletCycleSpin(w *WaveletL1, seed1, seed2 uint64) (*CycleSpin, error) {
	if w == nil {
		return nil, fmt.Errorf("priors: cycle spinning needs a wavelet prior")
	}
	t := w.Transform()
	return NewCycleSpin(w, t.Ny(), t.Nx(), 1<<t.Levels(), seed1, seed2)
}

// Prior returns the wrapped prior.
func (c *CycleSpin) Prior() Prior { return c.prior }

// Period returns P: shifts are drawn from [0, P)².
func (c *CycleSpin) Period() int { return c.period }

// LastShift returns the shift (rows, columns) of the last Prox call, (0, 0)
// before the first.
func (c *CycleSpin) LastShift() (a, b int) { return c.a, c.b }

// Reset restarts the random stream from its seed and resets the wrapped
// prior if it keeps state.
func (c *CycleSpin) Reset() {
	c.pcg.Seed(c.seed1, c.seed2)
	c.a, c.b = 0, 0
	resetIfStateful(c.prior)
}

// Prox draws a new shift (a, b) and writes S₋ₐ,₋ᵦ prox_{tR}(Sₐ,ᵦ src) into
// dst. dst and src may alias.
func (c *CycleSpin) Prox(dst, src []complex128, t float64) {
	c.a, c.b = c.rng.IntN(c.period), c.rng.IntN(c.period)
	c.ProxShift(dst, src, t, c.a, c.b)
}

// ProxShift writes S₋ₐ,₋ᵦ prox_{tR}(Sₐ,ᵦ src) into dst for the given shift,
// without drawing one. dst and src may alias.
func (c *CycleSpin) ProxShift(dst, src []complex128, t float64, a, b int) {
	c.check(dst)
	c.check(src)
	circShift(c.buf, src, c.ny, c.nx, a, b)
	c.prior.Prox(c.buf, c.buf, t)
	circShift(dst, c.buf, c.ny, c.nx, -a, -b)
}

// Value returns R(x) of the wrapped prior in the unshifted frame.
func (c *CycleSpin) Value(x []complex128) float64 {
	c.check(x)
	return c.prior.Value(x)
}

// ShiftInvariantValue returns the mean of R(Sₐ,ᵦ x) over all (a, b) in
// [0, P)²: P² evaluations of the wrapped prior.
func (c *CycleSpin) ShiftInvariantValue(x []complex128) float64 {
	c.check(x)
	var s float64
	for a := range c.period {
		for b := range c.period {
			circShift(c.buf, x, c.ny, c.nx, a, b)
			s += c.prior.Value(c.buf)
		}
	}
	return s / float64(c.period*c.period)
}

func (c *CycleSpin) check(x []complex128) {
	if len(x) != c.ny*c.nx {
		panic(fmt.Sprintf("priors: cycle spinning on a %d×%d grid got %d values", c.ny, c.nx, len(x)))
	}
}
