package nufft

import (
	"fmt"
	"math"
	"syscall"
	"testing"
	"time"
)

// cpuTime returns the CPU time (user + system) this process has used. The
// machine is shared, so benchmarks report throughput per CPU-second next to
// the wall-clock figures.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// radialPoints returns a radial trajectory of full-diameter spokes with
// samples per spoke points each, spokes spread uniformly over 180°, for an
// n×n image (kr from −n/2 to n/2 − 1 in steps of one cycle per FOV). 402
// spokes of 256 points give the ~100k samples of a Nyquist-sampled 256²
// radial scan (π/2·N spokes, common practice).
func radialPoints(n, spokes int) (kx, ky []float64) {
	for s := range spokes {
		sin, cos := math.Sincos(math.Pi * float64(s) / float64(spokes))
		for r := range n {
			kr := float64(r - n/2)
			kx = append(kx, kr*cos)
			ky = append(ky, kr*sin)
		}
	}
	return kx, ky
}

func benchPlan(b *testing.B, opts Options) (*Plan, []complex128, []complex128) {
	b.Helper()
	kx, ky := radialPoints(256, 402)
	p, err := New(256, 256, kx, ky, opts)
	if err != nil {
		b.Fatal(err)
	}
	return p, randomComplex(p.ImageLen(), 1), randomComplex(p.DataLen(), 2)
}

// reportSamples reports n samples per iteration as millions of samples per
// wall-clock second and per CPU-second (per core) since cpu0.
func reportSamples(b *testing.B, n int, cpu0 time.Duration) {
	total := float64(n) * float64(b.N)
	b.ReportMetric(total/b.Elapsed().Seconds()/1e6, "Msamples/s")
	b.ReportMetric(total/(cpuTime()-cpu0).Seconds()/1e6, "Msamples/cpu-s")
}

// BenchmarkPair times Forward followed by Adjoint at 256² on a
// 102,912-sample radial trajectory: W = 4, α = 2 on one and two workers, and
// on one worker W = 4, α = 1.25 and W = 6, α = 1.25 (which is more accurate
// than W = 4, α = 2: 4e-4 against 6e-4).
func BenchmarkPair(b *testing.B) {
	for _, o := range []Options{{Workers: 1}, {Workers: 2}, {Workers: 1, Oversampling: 1.25}, {Workers: 1, Oversampling: 1.25, Width: 6}} {
		d := o.withDefaults()
		b.Run(fmt.Sprintf("workers=%d/alpha=%g/W=%d", d.Workers, d.Oversampling, d.Width), func(b *testing.B) {
			p, x, y := benchPlan(b, o)
			b.ReportAllocs()
			cpu0 := cpuTime()
			for b.Loop() {
				p.Forward(y, x)
				p.Adjoint(x, y)
			}
			reportSamples(b, p.DataLen(), cpu0)
		})
	}
}

// BenchmarkSteps times the steps of the pair separately: spreading (the
// adjoint's gridding) and interpolation on one and two workers, and one FFT
// of the 512² oversampled grid.
func BenchmarkSteps(b *testing.B) {
	for _, workers := range []int{1, 2} {
		p, x, y := benchPlan(b, Options{Workers: workers})
		p.Forward(y, x)
		b.Run(fmt.Sprintf("spread/workers=%d", workers), func(b *testing.B) {
			p.in = y
			cpu0 := cpuTime()
			for b.Loop() {
				clear(p.grid)
				p.next.Store(0)
				p.team.run(p.spreadJob)
			}
			reportSamples(b, p.DataLen(), cpu0)
		})
		b.Run(fmt.Sprintf("interp/workers=%d", workers), func(b *testing.B) {
			p.out = y
			cpu0 := cpuTime()
			for b.Loop() {
				p.team.run(p.interpJob)
			}
			reportSamples(b, p.DataLen(), cpu0)
		})
		if workers == 1 {
			b.Run("fft", func(b *testing.B) {
				cpu0 := cpuTime()
				for b.Loop() {
					p.fft.Forward(p.grid, p.grid)
				}
				b.ReportMetric((cpuTime()-cpu0).Seconds()/float64(b.N)*1e3, "cpu-ms/op")
			})
		}
	}
}

// BenchmarkWidth times the pair per kernel width (one worker).
func BenchmarkWidth(b *testing.B) {
	for _, w := range []int{2, 4, 6, 8} {
		b.Run(fmt.Sprintf("W=%d", w), func(b *testing.B) {
			p, x, y := benchPlan(b, Options{Width: w})
			cpu0 := cpuTime()
			for b.Loop() {
				p.Forward(y, x)
				p.Adjoint(x, y)
			}
			reportSamples(b, p.DataLen(), cpu0)
		})
	}
}

// BenchmarkNDFT times the direct sum (forward and adjoint) on a 64² image with
// 2,000 random points and reports the cost per sample·pixel, from which the
// cost of the 256², 102,912-sample case is extrapolated (it scales as
// samples × pixels).
func BenchmarkNDFT(b *testing.B) {
	const n, m = 64, 2000
	kx, ky := randomPoints(n, n, m, 1)
	x := randomComplex(n*n, 2)
	y := randomComplex(m, 3)
	for b.Loop() {
		ndft(n, n, kx, ky, x)
		ndftAdjoint(n, n, kx, ky, y)
	}
	perOp := b.Elapsed().Seconds() / float64(b.N) / float64(n*n*m)
	b.ReportMetric(perOp*1e9, "ns/(sample·pixel)")
	b.ReportMetric(perOp*256*256*102912, "s-extrapolated-256²")
}

// BenchmarkKernelEval compares three ways of producing the 2W kernel weights
// of one sample (W = 4, α = 2): the piecewise polynomials the plan uses, the
// direct evaluation of I₀(β√(1−s²)) by its series, and a lookup table with
// linear interpolation (1024 entries per grid cell). Each reports its largest
// deviation from the exact kernel. Plans evaluate the weights once, when they
// are built, so this cost is paid per plan, not per call.
func BenchmarkKernelEval(b *testing.B) {
	const w = 4
	k := newKernel(w, 2, KaiserBesselBeta(w, 2))
	const per = 1024
	table := make([]float64, w*per+2)
	for i := range table {
		table[i] = k.phi(-float64(w)/2 + float64(i)/per)
	}
	evalPoly := func(f float64, out *[MaxWidth]float64) { k.weights(f, out) }
	evalDirect := func(f float64, out *[MaxWidth]float64) {
		for q := range w {
			out[q] = k.phi(-float64(w)/2 + float64(q) + f)
		}
	}
	evalTable := func(f float64, out *[MaxWidth]float64) {
		u := f * per
		i := int(u)
		r := u - float64(i)
		for q := range w {
			j := q*per + i
			out[q] = table[j] + r*(table[j+1]-table[j])
		}
	}
	for _, c := range []struct {
		name string
		eval func(float64, *[MaxWidth]float64)
	}{{"poly", evalPoly}, {"direct", evalDirect}, {"table", evalTable}} {
		b.Run(c.name, func(b *testing.B) {
			var out [MaxWidth]float64
			worst := 0.0
			for i := range 1000 {
				f := (float64(i) + 0.37) / 1000
				c.eval(f, &out)
				for q := range w {
					worst = max(worst, math.Abs(out[q]-k.phi(-float64(w)/2+float64(q)+f)))
				}
			}
			f := 0.0
			sink := 0.0
			for b.Loop() {
				f += 0.618034
				if f >= 1 {
					f--
				}
				c.eval(f, &out)   // the x weights
				c.eval(1-f, &out) // the y weights
				sink += out[1]
			}
			b.ReportMetric(worst, "max-error")
			if sink == 0 {
				b.Fatal("no work")
			}
		})
	}
}

// BenchmarkToeplitz compares one Toeplitz Apply with the NUFFT pair it
// replaces (256², W = 4, α = 2, 102,912 radial samples) and times building
// the embedding.
func BenchmarkToeplitz(b *testing.B) {
	kx, ky := radialPoints(256, 402)
	b.Run("apply", func(b *testing.B) {
		tp, err := NewToeplitz(256, 256, kx, ky, nil, Options{})
		if err != nil {
			b.Fatal(err)
		}
		x := randomComplex(tp.ImageLen(), 1)
		b.ReportAllocs()
		cpu0 := cpuTime()
		for b.Loop() {
			tp.Apply(x, x)
		}
		b.ReportMetric((cpuTime()-cpu0).Seconds()/float64(b.N)*1e3, "cpu-ms/op")
	})
	b.Run("pair", func(b *testing.B) {
		p, x, y := benchPlan(b, Options{})
		cpu0 := cpuTime()
		for b.Loop() {
			p.Forward(y, x)
			p.Adjoint(x, y)
		}
		b.ReportMetric((cpuTime()-cpu0).Seconds()/float64(b.N)*1e3, "cpu-ms/op")
	})
	b.Run("build", func(b *testing.B) {
		cpu0 := cpuTime()
		for b.Loop() {
			if _, err := NewToeplitz(256, 256, kx, ky, nil, Options{}); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric((cpuTime()-cpu0).Seconds()/float64(b.N)*1e3, "cpu-ms/op")
	})
}

// BenchmarkNew times building a plan for the 256² radial case.
func BenchmarkNew(b *testing.B) {
	kx, ky := radialPoints(256, 402)
	for _, w := range []int{4, 8} {
		b.Run(fmt.Sprintf("W=%d", w), func(b *testing.B) {
			cpu0 := cpuTime()
			for b.Loop() {
				if _, err := New(256, 256, kx, ky, Options{Width: w}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((cpuTime()-cpu0).Seconds()/float64(b.N)*1e3, "cpu-ms/op")
		})
	}
}
