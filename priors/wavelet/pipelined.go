package wavelet

import "unsafe"

// pipelined is the 1D kernel for factorisations of the shape that the
// search of lifting.go finds for db4: five steps updating channels 1, 0, 1,
// 0, 1 with 1, 2, 2, 2 and 1 taps at offsets 1, −1, 0, −1, 0. Instead of one
// sweep over the row per step it runs all five in one sweep, each step
// lagging behind the one before it by as many samples as its taps reach
// ahead, so that the intermediate channels live in registers and every
// sample is read once and every output written once. With the channels
// named e (0) and o (1):
//
//	o1[k] = o[k]  + c1·e[k+1]
//	e2[k] = e[k]  + a2·o1[k−1] + b2·o1[k]
//	o3[k] = o1[k] + a3·e2[k]   + b3·e2[k+1]
//	e4[k] = e2[k] + a4·o3[k−1] + b4·o3[k]
//	o5[k] = o3[k] + c5·e4[k]
//
// Sweep i of the analysis reads e[i], o[i] and produces o1[i−1], e2[i−1],
// o3[i−2], e4[i−2], o5[i−2]; sweep i of the synthesis reads e4[i], o5[i]
// and produces o3[i], e2[i], o1[i−1], e[i−1], o[i−2]. Indices are
// periodic: the sweep starts a few samples before 0 (reading wrapped
// samples) and its first few outputs, which use state that is not yet valid,
// go to wrapped positions that the last sweeps overwrite with valid values.
//
// The kernel needs the plain selection e[k] = x[2k], o[k] = x[2k+1]
// (p = 0, a = 0), which is what db4 gets. A row is swept in four runs:
// one sweep on the wrapped pair (x[n−2], x[n−1]), two on the first pairs
// (these three only prime the state), the bulk, and two more on the first
// pairs again, whose outputs are the last ones of the row.
type pipelined struct {
	c1, a2, b2, a3, b3 float64
	a4, b4, c5         float64
}

// sweepState is the state a sweep hands to the next: up to five complex
// values.
type sweepState [10]float64

// pipelinedFor returns the kernel for lf, or nil when lf has another shape.
func pipelinedFor(lf *lifting) *pipelined {
	want := [5]struct{ target, off, taps int }{{1, 1, 1}, {0, -1, 2}, {1, 0, 2}, {0, -1, 2}, {1, 0, 1}}
	if len(lf.steps) != len(want) {
		return nil
	}
	for i, w := range want {
		s := lf.steps[i]
		if s.target != w.target || s.off != w.off || len(s.c) != w.taps {
			return nil
		}
	}
	if lf.p != 0 || lf.a != [2]int{} {
		return nil // the sweeps below pair x[2i] with x[2i+1]
	}
	s := lf.steps
	return &pipelined{
		c1: s[0].c[0], a2: s[1].c[0], b2: s[1].c[1], a3: s[2].c[0], b3: s[2].c[1],
		a4: s[3].c[0], b4: s[3].c[1], c5: s[4].c[0]}
}

func (k *pipelined) clone() kernel1D { return k }

func (k *pipelined) forward(out []float64, os int, x []float64, n int) {
	n2 := n / 2
	x = x[:2*n]
	// State before sweep −1: e[−2], o[−2] = x[n−4], x[n−3].
	var s sweepState
	var junk [4]float64 // receives the outputs of the priming sweeps
	copy(s[0:4], x[2*n-8:2*n-4])
	k.forwardRun(&s, x[2*n-4:], 1, junk[:], 0, 2)
	k.forwardRun(&s, x, 2, junk[:], 0, 2)
	hi := n2 * os
	k.forwardRun(&s, x[8:], n2-2, out, os, hi)
	k.forwardRun(&s, x, 2, out[(n2-2)*os:], os, hi)
}

// forwardRun runs count analysis sweeps on the pairs of x, writing the
// outputs of sweep j at out[j·os] (low-pass) and out[hi + j·os] (high).
// The ranges are checked once; the sweeps then use unchecked accesses.
func (k *pipelined) forwardRun(s *sweepState, x []float64, count int, out []float64, os, hi int) {
	if count <= 0 {
		return
	}
	_ = x[4*count-1]
	_ = out[(count-1)*os+1]
	_ = out[hi+(count-1)*os+1]
	px := unsafe.Pointer(unsafe.SliceData(x))
	po := unsafe.Pointer(unsafe.SliceData(out))
	// e[i−1], o[i−1], o1[i−2], e2[i−2], o3[i−3]
	epr, epi, opr, opi, o1r, o1i, e2r, e2i, o3r, o3i := s[0], s[1], s[2], s[3], s[4], s[5], s[6], s[7], s[8], s[9]
	ko := 0
	for j := range count {
		v := (*[4]float64)(unsafe.Add(px, 32*j))
		er, ei, nor, noi := v[0], v[1], v[2], v[3]
		// o1[i−1]
		p1r := opr + k.c1*er
		p1i := opi + k.c1*ei
		// e2[i−1]
		q2r := epr + (k.a2*o1r + k.b2*p1r)
		q2i := epi + (k.a2*o1i + k.b2*p1i)
		// o3[i−2]
		p3r := o1r + (k.a3*e2r + k.b3*q2r)
		p3i := o1i + (k.a3*e2i + k.b3*q2i)
		// e4[i−2]
		q4r := e2r + (k.a4*o3r + k.b4*p3r)
		q4i := e2i + (k.a4*o3i + k.b4*p3i)
		// e4 and o5[i−2]
		lo := (*[2]float64)(unsafe.Add(po, 8*ko))
		lo[0], lo[1] = q4r, q4i
		hv := (*[2]float64)(unsafe.Add(po, 8*(hi+ko)))
		hv[0], hv[1] = p3r+k.c5*q4r, p3i+k.c5*q4i
		ko += os

		epr, epi, opr, opi = er, ei, nor, noi
		o1r, o1i, e2r, e2i, o3r, o3i = p1r, p1i, q2r, q2i, p3r, p3i
	}
	*s = sweepState{epr, epi, opr, opi, o1r, o1i, e2r, e2i, o3r, o3i}
}

func (k *pipelined) inverse(out []float64, os int, lo, hi []float64, n int) {
	n2 := n / 2
	lo = lo[:2*n2]
	hi = hi[:2*n2]
	var s sweepState
	var junk [4]float64
	k.inverseRun(&s, lo[2*n2-4:], hi[2*n2-4:], 2, junk[:], 0)
	k.inverseRun(&s, lo, hi, 2, junk[:], 0)
	k.inverseRun(&s, lo[4:], hi[4:], n2-2, out, os)
	k.inverseRun(&s, lo, hi, 2, out[2*(n2-2)*os:], os)
}

// inverseRun runs count synthesis sweeps on lo[j], hi[j], writing samples
// 2j and 2j+1 of sweep j (the outputs e[i−2], o[i−2]) at out[2j·os] and
// out[(2j+1)·os]. The ranges are checked once; the sweeps then use
// unchecked accesses.
func (k *pipelined) inverseRun(s *sweepState, lo, hi []float64, count int, out []float64, os int) {
	if count <= 0 {
		return
	}
	_ = lo[2*count-1]
	_ = hi[2*count-1]
	_ = out[(2*count-1)*os+1]
	pl := unsafe.Pointer(unsafe.SliceData(lo))
	ph := unsafe.Pointer(unsafe.SliceData(hi))
	po := unsafe.Pointer(unsafe.SliceData(out))
	// o3[i−1], e2[i−1], o1[i−2], e[i−2]
	o3r, o3i, e2r, e2i, o1r, o1i, epr, epi := s[0], s[1], s[2], s[3], s[4], s[5], s[6], s[7]
	ko := 0
	for j := range count {
		l := (*[2]float64)(unsafe.Add(pl, 16*j))
		h := (*[2]float64)(unsafe.Add(ph, 16*j))
		e4r, e4i := l[0], l[1]
		// o3[i]
		p3r := h[0] - k.c5*e4r
		p3i := h[1] - k.c5*e4i
		// e2[i]
		q2r := e4r - (k.a4*o3r + k.b4*p3r)
		q2i := e4i - (k.a4*o3i + k.b4*p3i)
		// o1[i−1]
		p1r := o3r - (k.a3*e2r + k.b3*q2r)
		p1i := o3i - (k.a3*e2i + k.b3*q2i)
		// e[i−1]
		q0r := e2r - (k.a2*o1r + k.b2*p1r)
		q0i := e2i - (k.a2*o1i + k.b2*p1i)
		// e[i−2] and o[i−2]
		xe := (*[2]float64)(unsafe.Add(po, 8*ko))
		xe[0], xe[1] = epr, epi
		xo := (*[2]float64)(unsafe.Add(po, 8*(ko+os)))
		xo[0], xo[1] = o1r-k.c1*q0r, o1i-k.c1*q0i
		ko += 2 * os

		o3r, o3i, e2r, e2i = p3r, p3i, q2r, q2i
		o1r, o1i, epr, epi = p1r, p1i, q0r, q0i
	}
	*s = sweepState{o3r, o3i, e2r, e2i, o1r, o1i, epr, epi}
}
