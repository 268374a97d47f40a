package trajectories

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// PoissonDiscRadius returns the exclusion radius, in phase-encode grid steps,
// that a variable-density Poisson-disc sampling with scale lambda and growth
// uses at normalised plane radius rho ∈ [0, 1] (0 at DC, 1 at the outermost
// allowed point): lambda·(1 + growth·rho). growth = 0 is uniform Poisson-disc
// sampling; growth > 0 thins the periphery.
func PoissonDiscRadius(lambda, growth, rho float64) float64 {
	return lambda * (1 + growth*rho)
}

// minDiscScale is the smallest Poisson-disc scale tried: half a grid step, at
// which every allowed point fits.
const minDiscScale = 0.5

// poissonTries is the number of candidates drawn around an active sample
// before it is retired; Bridson (2007) suggests 30.
const poissonTries = 30

// Cartesian3DPoissonDisc returns a variable-density Poisson-disc sampling of
// the phase-encode plane with exactly samples points:
// dart throwing with an active list in O(n) (Bridson R, "Fast Poisson disk
// sampling in arbitrary dimensions", SIGGRAPH sketches 2007), on the integer
// (ky, kz) grid, with an exclusion radius PoissonDiscRadius(λ, growth, ρ) that
// grows with |k|. Every pair of samples that are not both calibration points
// is at least max(r(a), r(b)) apart (Euclidean, in grid steps). The scale λ is
// found by a few draws with the same seed (the count scales as 1/λ²); a small
// surplus is then removed at random, which cannot break the distance rule.
// The ellipse of g.CornerCut and the calibration box apply as elsewhere.
//
// Errors: bad grid; samples out of range (see Cartesian3DRandom); growth
// negative, NaN or infinite.
func Cartesian3DPoissonDisc(g Grid3D, samples int, growth float64, seed uint64) (Sampling, error) {
	if err := g.check(); err != nil {
		return Sampling{}, err
	}
	if err := g.checkSamples(samples); err != nil {
		return Sampling{}, err
	}
	if math.IsNaN(growth) || math.IsInf(growth, 0) || growth < 0 {
		return Sampling{}, fmt.Errorf("trajectories: Poisson-disc radius growth = %g: must be finite and ≥ 0", growth)
	}
	allowed, calib := g.countAllowed()
	pd := newPoissonPlane(g, growth)
	if samples == allowed {
		mask := make([]bool, g.Ny*g.Nz)
		for p := range g.Nz {
			for m := range g.Ny {
				mask[p*g.Ny+m] = g.allowed(p, m)
			}
		}
		s := newCartesian3D(SchemeCartesian3DPoissonDisc, g, mask)
		s.DiscGrowth = growth
		return s, nil
	}
	// Area of the allowed region per wanted free sample gives a first λ:
	// a maximal Poisson-disc set of radius r has about 0.7/r² points per unit
	// area (random close packing of discs, roughly).
	free := float64(samples - calib)
	lambda := math.Sqrt(0.7 * float64(allowed-calib) / max(free, 1) / math.Pow(1+growth/2, 2))
	lambda = max(lambda, minDiscScale)
	// Bracket λ between a scale that gives at least the target (lo) and one
	// that gives fewer (hi), then bisect. The count jumps where the radius
	// crosses a grid distance (1, √2, 2, …), so it may not land within 1%;
	// the nearest denser draw is then thinned.
	var best []int32
	bestLambda := lambda
	lo, hi := 0.0, math.Inf(1)
search:
	for range 30 {
		pts := pd.draw(lambda, seed)
		n := len(pts)
		if n >= samples {
			if best == nil || n < len(best) {
				best, bestLambda = pts, lambda
			}
			if float64(n) <= 1.01*float64(samples) {
				break search
			}
			lo = lambda
		} else {
			hi = lambda
		}
		switch {
		case lo > 0 && !math.IsInf(hi, 1):
			if hi-lo < 1e-4*lo {
				break search
			}
			lambda = (lo + hi) / 2
		case lo > 0: // too many samples so far: grow the radius
			lambda *= math.Sqrt(float64(n-calib)/free) * 1.02
		default: // too few: shrink the radius
			if lambda == minDiscScale {
				break search
			}
			lambda = max(minDiscScale, lambda*math.Sqrt(float64(max(n-calib, 1))/free)*0.98)
		}
	}
	if best == nil {
		return Sampling{}, fmt.Errorf("trajectories: Poisson-disc sampling could not reach %d samples (growth %g); ask for fewer", samples, growth)
	}
	// Remove the surplus at random among the non-calibration points.
	rng := rand.New(rand.NewPCG(seed, seedStream^0x5eed))
	free32 := make([]int32, 0, len(best))
	mask := make([]bool, g.Ny*g.Nz)
	for _, i := range best {
		p, m := int(i)/g.Ny, int(i)%g.Ny
		if g.inCalib(p, m) {
			mask[i] = true
		} else {
			free32 = append(free32, i)
		}
	}
	rng.Shuffle(len(free32), func(a, b int) { free32[a], free32[b] = free32[b], free32[a] })
	keep := samples - calib
	for _, i := range free32[:keep] {
		mask[i] = true
	}
	s := newCartesian3D(SchemeCartesian3DPoissonDisc, g, mask)
	s.DiscScale, s.DiscGrowth = bestLambda, growth
	return s, nil
}

// poissonPlane holds what every draw on one plane shares.
type poissonPlane struct {
	g      Grid3D
	growth float64
	rho    []float64 // normalised radius, 0 at DC, 1 at the outermost allowed point
	ok     []bool    // allowed
	calib  []bool
}

func newPoissonPlane(g Grid3D, growth float64) *poissonPlane {
	n := g.Ny * g.Nz
	pp := &poissonPlane{g: g, growth: growth, rho: make([]float64, n), ok: make([]bool, n), calib: make([]bool, n)}
	rmax := 0.0
	for p := range g.Nz {
		for m := range g.Ny {
			i := p*g.Ny + m
			pp.ok[i] = g.allowed(p, m)
			pp.calib[i] = g.inCalib(p, m)
			pp.rho[i] = g.ellipseRadius(p, m)
			if pp.ok[i] {
				rmax = max(rmax, pp.rho[i])
			}
		}
	}
	if rmax > 0 {
		for i := range pp.rho {
			pp.rho[i] = min(pp.rho[i]/rmax, 1)
		}
	}
	return pp
}

// draw runs one dart-throwing pass with scale lambda and returns the sample
// indices (calibration points first).
func (pp *poissonPlane) draw(lambda float64, seed uint64) []int32 {
	g := pp.g
	ny, nz := g.Ny, g.Nz
	rng := rand.New(rand.NewPCG(seed, seedStream))
	radius := func(i int) float64 { return PoissonDiscRadius(lambda, pp.growth, pp.rho[i]) }
	rmax := PoissonDiscRadius(lambda, pp.growth, 1)
	reach := int(math.Ceil(rmax))
	occ := make([]bool, ny*nz)
	var pts, active []int32
	add := func(i int) {
		occ[i] = true
		pts = append(pts, int32(i))
		active = append(active, int32(i))
	}
	for i, c := range pp.calib {
		if c {
			add(i)
		}
	}
	// fits reports whether candidate i keeps max(r(i), r(s)) from every
	// sample s (calibration points included).
	fits := func(i int) bool {
		ri := radius(i)
		p0, m0 := i/ny, i%ny
		for dp := -reach; dp <= reach; dp++ {
			p := p0 + dp
			if p < 0 || p >= nz {
				continue
			}
			for dm := -reach; dm <= reach; dm++ {
				m := m0 + dm
				if m < 0 || m >= ny {
					continue
				}
				j := p*ny + m
				if !occ[j] {
					continue
				}
				d2 := float64(dp*dp + dm*dm)
				r := max(ri, radius(j))
				if d2 < r*r {
					return false
				}
			}
		}
		return true
	}
	if len(pts) == 0 {
		// Start from DC when allowed, else from a random allowed point.
		start := (nz/2)*ny + ny/2
		if !pp.ok[start] {
			for {
				start = rng.IntN(ny * nz)
				if pp.ok[start] {
					break
				}
			}
		}
		add(start)
	}
	for len(active) > 0 {
		a := rng.IntN(len(active))
		i := int(active[a])
		r := radius(i)
		p0, m0 := float64(i/ny), float64(i%ny)
		placed := false
		for range poissonTries {
			// Uniform over the annulus [r, 2r] by area.
			d := math.Sqrt(r*r + rng.Float64()*3*r*r)
			th := 2 * math.Pi * rng.Float64()
			p := int(math.Round(p0 + d*math.Sin(th)))
			m := int(math.Round(m0 + d*math.Cos(th)))
			if p < 0 || p >= nz || m < 0 || m >= ny {
				continue
			}
			j := p*ny + m
			if occ[j] || !pp.ok[j] || !fits(j) {
				continue
			}
			add(j)
			placed = true
			break
		}
		if !placed {
			active[a] = active[len(active)-1]
			active = active[:len(active)-1]
		}
	}
	return pts
}
