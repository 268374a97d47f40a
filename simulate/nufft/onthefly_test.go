package nufft

import (
	"math"
	"testing"
)

// kernelTable is a lookup table of the kernel with linear interpolation,
// per entries per grid cell; used only to measure the on-the-fly
// alternative to the plan's precomputed weights.
type kernelTable struct {
	w, per int
	v      []float64
}

func newKernelTable(k *kernel, per int) *kernelTable {
	t := &kernelTable{w: k.w, per: per, v: make([]float64, k.w*per+2)}
	for i := range t.v {
		t.v[i] = k.phi(-float64(k.w)/2 + float64(i)/float64(per))
	}
	return t
}

func (t *kernelTable) weights(f float64, out *[MaxWidth]float64) {
	u := f * float64(t.per)
	i := int(u)
	r := u - float64(i)
	for q := range t.w {
		j := q*t.per + i
		out[q] = t.v[j] + r*(t.v[j+1]-t.v[j])
	}
}

// spreadOnTheFly is the one-strip spreading loop with the weights computed
// per call from the sample's coordinates, by eval.
func (p *Plan) spreadOnTheFly(src []complex128, ux, uy []float64, eval func(float64, *[MaxWidth]float64)) {
	w := p.kern.w
	mx := p.mx
	g := p.grid
	var wx, wy [MaxWidth]float64
	for i := range p.samples {
		s := &p.samples[i]
		eval(float64(s.ox)-ux[s.idx], &wx)
		eval(float64(s.oy)-uy[s.idx], &wy)
		v := src[s.idx]
		if s.wrap {
			p.spreadWrap(s, v, 0, p.my, wx[:w], wy[:w])
			continue
		}
		vr, vi := real(v), imag(v)
		base := int(s.oy)*mx + int(s.ox)
		for q := range w {
			ar, ai := vr*wy[q], vi*wy[q]
			row := g[base+q*mx : base+q*mx+w]
			for c, x := range wx[:w] {
				row[c] += complex(ar*x, ai*x)
			}
		}
	}
}

// BenchmarkSpreadWeights compares spreading with the plan's precomputed
// weights against computing them on the fly (piecewise polynomials, or a
// 1024-entry-per-cell linear table), at 256², W = 4, α = 2, 102,912 radial
// samples, one worker.
func BenchmarkSpreadWeights(b *testing.B) {
	p, _, y := benchPlan(b, Options{})
	kx, ky := radialPoints(256, 402)
	half := float64(p.kern.w) / 2
	ux, uy := make([]float64, len(kx)), make([]float64, len(kx))
	for j := range kx {
		ux[j] = kx[j]*float64(p.mx)/float64(p.nx) + float64(p.mx/2) - half
		uy[j] = ky[j]*float64(p.my)/float64(p.ny) + float64(p.my/2) - half
	}
	tab := newKernelTable(p.kern, 1024)
	b.Run("precomputed", func(b *testing.B) {
		p.in = y
		cpu0 := cpuTime()
		for b.Loop() {
			p.next.Store(0)
			p.spreadWorker(0)
		}
		reportSamples(b, p.DataLen(), cpu0)
	})
	for _, c := range []struct {
		name string
		eval func(float64, *[MaxWidth]float64)
	}{{"poly", p.kern.weights}, {"table", tab.weights}} {
		b.Run(c.name, func(b *testing.B) {
			cpu0 := cpuTime()
			for b.Loop() {
				p.spreadOnTheFly(y, ux, uy, c.eval)
			}
			reportSamples(b, p.DataLen(), cpu0)
		})
	}
}

// TestOnTheFlyMatches keeps the benchmark's alternative honest: it spreads
// the same grid as the plan, to the table's accuracy.
func TestOnTheFlyMatches(t *testing.T) {
	kx, ky := radialPoints(64, 80)
	p, err := New(64, 64, kx, ky, Options{})
	if err != nil {
		t.Fatal(err)
	}
	half := float64(p.kern.w) / 2
	ux, uy := make([]float64, len(kx)), make([]float64, len(kx))
	for j := range kx {
		ux[j] = kx[j]*float64(p.mx)/float64(p.nx) + float64(p.mx/2) - half
		uy[j] = ky[j]*float64(p.my)/float64(p.ny) + float64(p.my/2) - half
	}
	y := randomComplex(len(kx), 3)
	p.in = y
	p.next.Store(0)
	p.spreadWorker(0)
	want := append([]complex128(nil), p.grid...)
	clear(p.grid)
	p.spreadOnTheFly(y, ux, uy, newKernelTable(p.kern, 1024).weights)
	var num, den float64
	for i := range want {
		d := p.grid[i] - want[i]
		num += real(d)*real(d) + imag(d)*imag(d)
		den += real(want[i])*real(want[i]) + imag(want[i])*imag(want[i])
	}
	if e := math.Sqrt(num / den); e > 1e-5 {
		t.Errorf("on-the-fly grid differs by %.1e", e)
	}
}
