package fft

import (
	"errors"
	"fmt"
	"math"
)

// maxDirectPrime is the largest prime factor transformed by a direct
// butterfly; a length with a larger prime factor goes through Bluestein.
const maxDirectPrime = 37

// maxLen bounds the length of one transform (and of the inner transform of
// Bluestein's algorithm), so that twiddle tables stay below about 1 GiB.
const maxLen = 1 << 25

// stage is one pass of the self-sorting mixed-radix algorithm. Before the
// pass the data hold span-long sub-sequences interleaved with stride
// stride·s0 (s0 is the batch interleave of the call); the pass splits each into
// radix sub-sequences of length m = span/radix.
type stage struct {
	radix  int
	m      int // span / radix
	stride int // product of the radices of the earlier stages
	// tw holds the forward twiddles w^(i·p), w = exp(-2πi/span), for p < m and
	// 0 < i < radix, as float64 pairs at 2·(p·(radix-1)+i-1); twInv holds the
	// inverse ones, w^(-i·p), in the same order.
	tw, twInv []float64
	gen       *direct // tables of a direct butterfly (radix not in 2, 3, 4, 5, 8)
}

// direct holds the cosines and sines of a direct butterfly of odd prime
// radix p: cos[k] = cos(2πk/p), sin[k] = sin(2πk/p).
type direct struct {
	cos, sin []float64
}

// tables are the read-only parts of a plan of length n, shared by clones.
type tables struct {
	n      int
	stages []stage
	blue   *bluestein // non-nil when n has a prime factor > maxDirectPrime
	genMax int        // largest direct radix (scratch for its butterfly)
	// rotatable: the first and last radices are even, so that exec can
	// centre the transform by rotating butterfly slots (see exec).
	rotatable bool
	// single holds the pass geometries of one contiguous sequence
	// (layout contiguous(1)), indexed [inverse][centred][stage], so that the
	// row pass of a 2D transform does not recompute them for every row.
	single [2][2][]geom
}

var errLen = errors.New("fft: transform length must be at least 1")

// newTables makes the tables for length n. batched selects the radices that
// run fastest when many sequences are interleaved (the column pass of a 2D
// transform): radix 4, whose butterfly keeps all its pointers in registers
// over the long inner loops. Otherwise radix 8 is used, which needs fewer
// passes.
func newTables(n int, batched bool) (*tables, error) {
	if n < 1 {
		return nil, errLen
	}
	if n > maxLen {
		return nil, fmt.Errorf("fft: transform length %d exceeds the supported maximum %d", n, maxLen)
	}
	radices, ok := factor(n, !batched)
	if !ok {
		b, err := newBluestein(n)
		if err != nil {
			return nil, err
		}
		return &tables{n: n, blue: b}, nil
	}
	t := &tables{n: n}
	span, stride := n, 1
	for _, r := range radices {
		st := stage{radix: r, m: span / r, stride: stride}
		if st.m > 1 {
			st.tw = make([]float64, 2*st.m*(r-1))
			st.twInv = make([]float64, 2*st.m*(r-1))
			for p := 0; p < st.m; p++ {
				for i := 1; i < r; i++ {
					k := 2 * (p*(r-1) + i - 1)
					w := unitRoot(-(i * p), span)
					st.tw[k], st.tw[k+1] = real(w), imag(w)
					w = unitRoot(i*p, span)
					st.twInv[k], st.twInv[k+1] = real(w), imag(w)
				}
			}
		}
		if r != 2 && r != 3 && r != 4 && r != 5 && r != 8 {
			d := &direct{cos: make([]float64, r), sin: make([]float64, r)}
			for k := range r {
				w := unitRoot(k, r)
				d.cos[k], d.sin[k] = real(w), imag(w)
			}
			st.gen = d
			t.genMax = max(t.genMax, r)
		}
		t.stages = append(t.stages, st)
		span /= r
		stride *= r
	}
	if len(t.stages) > 0 {
		t.rotatable = t.stages[0].radix%2 == 0 && t.stages[len(t.stages)-1].radix%2 == 0
	}
	for i, inv := range []bool{false, true} {
		for c, centred := range []bool{false, true} {
			if centred && !t.rotatable {
				continue
			}
			gs := make([]geom, len(t.stages))
			for k := range t.stages {
				t.stages[k].geometry(&gs[k], k == 0, k == len(t.stages)-1, contiguous(1), inv, centred)
			}
			t.single[i][c] = gs
		}
	}
	return t, nil
}

// factor splits n into the radices of the stages, in the order they run. The
// power of two becomes radix-8 stages (if use8) followed by radix-4 stages
// (or a single radix 2 for n = 2·odd); the odd part becomes 3s, 5s and other
// primes up to maxDirectPrime, run between the last power-of-two stage and
// the others so that a multiple of 4 always starts and ends with an even
// radix (needed by the centred shortcut of exec). factor reports false when n
// has a prime factor above maxDirectPrime.
func factor(n int, use8 bool) ([]int, bool) {
	e := 0
	for n%2 == 0 {
		e++
		n /= 2
	}
	var pow2 []int
	for ; use8 && e >= 3 && e != 4; e -= 3 {
		pow2 = append(pow2, 8)
	}
	if !use8 && e >= 3 && e%2 == 1 {
		// Column passes stay on radix 4, but an odd power of two takes one
		// radix-8 pass rather than a radix-2 one: one pass fewer, and
		// radix 8 has SIMD kernels where radix 2 has none.
		pow2 = append(pow2, 8)
		e -= 3
	}
	for ; e >= 2; e -= 2 {
		pow2 = append(pow2, 4)
	}
	if e == 1 {
		pow2 = append(pow2, 2)
	}
	var odd []int
	for p := 3; n > 1; p += 2 {
		if p > maxDirectPrime {
			return nil, false
		}
		for n%p == 0 {
			odd = append(odd, p)
			n /= p
		}
	}
	if len(odd) > 0 && len(pow2) == 1 && pow2[0] > 2 {
		pow2 = []int{pow2[0] / 2, 2}
	}
	if len(pow2) == 0 {
		return odd, true
	}
	r := append([]int(nil), pow2[:len(pow2)-1]...)
	r = append(r, odd...)
	return append(r, pow2[len(pow2)-1]), true
}

// unitRoot returns exp(2πi·k/n), reducing k modulo n and the angle to the
// first octant before calling Sincos, so that the tables are accurate to
// about one unit in the last place and exactly symmetric.
func unitRoot(k, n int) complex128 {
	k %= n
	if k < 0 {
		k += n
	}
	// θ = 2πk/n = (π/4)·(8k/n): octant o = ⌊8k/n⌋, remainder r = 8k - o·n.
	o, r := 8*k/n, 8*k%n
	var phi float64 // reduced angle in [0, π/4]
	if o%2 == 0 {
		phi = math.Pi / 4 * float64(r) / float64(n) // θ = o·π/4 + φ
	} else {
		phi = math.Pi / 4 * float64(n-r) / float64(n) // θ = (o+1)·π/4 - φ
	}
	s, c := math.Sincos(phi)
	switch o {
	case 0: // θ = φ
		return complex(c, s)
	case 1: // θ = π/2 - φ
		return complex(s, c)
	case 2: // θ = π/2 + φ
		return complex(-s, c)
	case 3: // θ = π - φ
		return complex(-c, s)
	case 4: // θ = π + φ
		return complex(-c, -s)
	case 5: // θ = 3π/2 - φ
		return complex(-s, -c)
	case 6: // θ = 3π/2 + φ
		return complex(s, -c)
	default: // θ = 2π - φ
		return complex(c, -s)
	}
}

// work is the mutable scratch that belongs to one plan (not shared by clones).
type work struct {
	gen  []complex128 // direct butterfly temporaries, 3·genMax+1
	blue []complex128 // Bluestein buffers, 3·M
}

func (t *tables) newWork() work {
	w := work{}
	if t.genMax > 0 {
		w.gen = make([]complex128, 3*t.genMax+1)
	}
	if t.blue != nil {
		w.blue = make([]complex128, 3*t.blue.m)
		w.gen = make([]complex128, 3*t.blue.inner.genMax+1)
	}
	return w
}

// layout says where exec finds its s0 interleaved sequences: element j of
// sequence c is read from in[j·ldIn+c] and written to out[j·ldOut+c].
// Contiguous data have ldIn = ldOut = s0.
type layout struct {
	s0, ldIn, ldOut int
}

func contiguous(s0 int) layout { return layout{s0, s0, s0} }

// maxRadix bounds the radices, so that a geometry fits in fixed arrays.
const maxRadix = maxDirectPrime

// geom is the geometry of one pass: for each group p < m, butterfly input k
// is the run x[p·xstep+xo[k] : ...+s] and butterfly output i goes to the run
// y[p·ystep+yo[i] : ...+s]; the twiddles of group p are those of row p of
// the stage table.
type geom struct {
	m, s         int
	xstep, ystep int
	xo, yo       [maxRadix]int
}

// exec transforms the sequences of in (laid out as l says) into out and
// multiplies them by scale. a and b are scratch of length n·s0 for the
// intermediate passes; they must not overlap in, out or each other, except
// that b may be in when in and out differ (in is consumed by the first pass).
// in and out may be the same slice: only the last pass writes out, and when
// it is also the first pass its butterflies read all their inputs before
// they store.
//
// With centred set (only when t.rotatable), exec computes
// fftshift(DFT(ifftshift(x))) at no extra cost: for even n, ifftshift moves
// input row j to j+n/2, which in the first pass is the slot rotation
// k → (k+r/2) mod r of the butterfly inputs, and fftshift of the output is
// the same rotation of the output slots of the last pass.
func (t *tables) exec(out, in, a, b []complex128, l layout, inv, centred bool, scale float64, wk *work) {
	if t.blue != nil {
		t.blue.exec(out, in, l, inv, scale, wk)
		return
	}
	if len(t.stages) == 0 { // n == 1: a single row
		for c := range l.s0 {
			out[c] = in[c] * complex(scale, 0)
		}
		return
	}
	var pre []geom
	if l == contiguous(1) {
		pre = t.single[b2i(inv)][b2i(centred)]
	}
	var g geom
	src := in
	last := len(t.stages) - 1
	for k := range t.stages {
		st := &t.stages[k]
		dst := a
		switch {
		case k == last:
			dst = out
		case k%2 == 1:
			dst = b
		}
		gk := &g
		if pre != nil {
			gk = &pre[k]
		} else {
			st.geometry(gk, k == 0, k == last, l, inv, centred)
		}
		if k == last {
			runLast(st, dst, src, gk, scale, wk)
		} else {
			tw := st.tw
			if inv {
				tw = st.twInv
			}
			run(st, dst, src, tw, gk, wk)
		}
		src = dst
	}
}

// geometry fills g for this stage (see geom and exec).
func (st *stage) geometry(g *geom, first, last bool, l layout, inv, centred bool) {
	r, m := st.radix, st.m
	s := st.stride * l.s0
	irot, orot := 0, 0
	if centred {
		if first {
			irot = r / 2
		}
		if last {
			orot = r / 2
		}
	}
	// The inverse butterfly is the forward one on inputs in the order
	// k → (r-k) mod r, since exp(+2πi·jk/r) = exp(-2πi·j(r-k)/r).
	for i := range r {
		j := i + orot
		if j >= r {
			j -= r
		}
		g.yo[i] = j // output slot, scaled below
	}
	g.m, g.s = m, s
	g.xstep = s
	if first {
		g.xstep = l.ldIn
	}
	for k := range r {
		kk := k
		if inv && k != 0 {
			kk = r - k
		}
		kk += irot
		if kk >= r {
			kk -= r
		}
		g.xo[k] = kk * m * g.xstep
	}
	if !last {
		g.ystep = r * s
		for i := range r {
			g.yo[i] *= s
		}
		return
	}
	// Last pass: m == 1.
	if l.ldOut == l.s0 {
		g.ystep = 0
		for i := range r {
			g.yo[i] *= s
		}
		return
	}
	// Pitched output: one group per sub-sequence row t < stride, each of s0
	// values; output row of slot j is t + stride·j.
	g.m, g.s = st.stride, l.s0
	g.ystep = l.ldOut
	for i := range r {
		g.yo[i] *= st.stride * l.ldOut
	}
	if !first {
		// The input is a scratch block: slot k starts at (its row)·s, as
		// already set, and the groups t are s0 apart.
		g.xstep = l.s0
	}
}

// run executes a pass that is not the last one; its output slots are never
// rotated (only the last pass rotates them), so the stride-1 kernels may
// write their outputs in natural order. Those kernels also need adjacent
// groups (xstep 1): a one-column block of a 2D image has s = 1 but reads
// rows a whole image row apart.
func run(st *stage, y, x []complex128, tw []float64, g *geom, wk *work) {
	switch st.radix {
	case 8:
		if g.s == 1 && g.xstep == 1 {
			r8notw(y, x, g, 1)
			r8s1(y, x, tw, g)
		} else {
			r8Pass(y, x, tw, g)
		}
	case 4:
		if g.s == 1 && g.xstep == 1 {
			r4notw(y, x, g, 1)
			r4s1(y, x, tw, g)
		} else {
			r4Pass(y, x, tw, g)
		}
	case 2:
		r2notw(y, x, g, 1)
		r2(y, x, tw, g)
	case 3:
		r3notw(y, x, g, 1)
		r3(y, x, tw, g)
	case 5:
		r5notw(y, x, g, 1)
		r5(y, x, tw, g)
	default:
		rgen(y, x, tw, g, st.radix, st.gen, wk.gen)
	}
}

// runLast executes the last pass (no twiddles), scaling unless scale is 1.
func runLast(st *stage, y, x []complex128, g *geom, scale float64, wk *work) {
	if scale == 1 {
		switch st.radix {
		case 8:
			r8LastPass(y, x, g, 1)
			return
		case 4:
			r4LastPass(y, x, g, 1)
			return
		case 2:
			r2notw(y, x, g, g.m)
			return
		case 3:
			r3notw(y, x, g, g.m)
			return
		case 5:
			r5notw(y, x, g, g.m)
			return
		}
	}
	switch st.radix {
	case 8:
		r8LastPass(y, x, g, scale)
	case 4:
		r4LastPass(y, x, g, scale)
	case 2:
		r2last(y, x, g, scale)
	case 3:
		r3last(y, x, g, scale)
	case 5:
		r5last(y, x, g, scale)
	default:
		rgenlast(y, x, g, st.radix, st.gen, scale, wk.gen)
	}
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}
