package fft

import (
	"errors"
	"fmt"
	"math"
)

// maxDirectPrime is the largest prime factor transformed by a direct
// butterfly; a length with a larger prime factor goes through Bluestein.
const maxDirectPrime = 37

// maxLen bounds the length of one transform so that index arithmetic and
// table sizes stay well inside int on every platform.
const maxLen = 1 << 28

// stage is one pass of the self-sorting mixed-radix algorithm. Before the
// pass the data hold span-long sub-sequences interleaved with stride
// stride·s0 (s0 is the batch interleave of the call); the pass splits each into
// radix sub-sequences of length m = span/radix.
type stage struct {
	radix  int
	m      int          // span / radix
	stride int          // product of the radices of the earlier stages
	tw     []complex128 // forward twiddles, tw[p*(radix-1)+i-1] = w^(i·p), w = exp(-2πi/span)
	twInv  []complex128 // inverse twiddles in butterfly-output order: w^(-(radix-i)·p)
	gen    *direct      // tables of a direct butterfly (radix not in 2, 3, 4, 5)
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
}

var errLen = errors.New("fft: transform length must be at least 1")

func newTables(n int) (*tables, error) {
	if n < 1 {
		return nil, errLen
	}
	if n > maxLen {
		return nil, fmt.Errorf("fft: transform length %d exceeds the supported maximum %d", n, maxLen)
	}
	radices, ok := factor(n)
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
			st.tw = make([]complex128, st.m*(r-1))
			st.twInv = make([]complex128, st.m*(r-1))
			for p := 0; p < st.m; p++ {
				for i := 1; i < r; i++ {
					st.tw[p*(r-1)+i-1] = unitRoot(-(i * p), span)
					st.twInv[p*(r-1)+i-1] = unitRoot((r-i)*p, span)
				}
			}
		}
		if r != 2 && r != 3 && r != 4 && r != 5 {
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
	return t, nil
}

// factor splits n into the radices of the stages, in the order they run: as
// many 4s as possible, then a 2, 3s, 5s and other primes up to
// maxDirectPrime. It reports false when n has a larger prime factor.
func factor(n int) ([]int, bool) {
	var r []int
	for n%4 == 0 {
		r = append(r, 4)
		n /= 4
	}
	if n%2 == 0 {
		r = append(r, 2)
		n /= 2
	}
	for p := 3; n > 1; p += 2 {
		if p > maxDirectPrime {
			return nil, false
		}
		for n%p == 0 {
			r = append(r, p)
			n /= p
		}
	}
	return r, true
}

// unitRoot returns exp(2πi·k/n), reducing k modulo n and folding the angle
// into the first octant so that the table is accurate to the last bit or so.
func unitRoot(k, n int) complex128 {
	k %= n
	if k < 0 {
		k += n
	}
	// exp(2πi k/n) by octant symmetry: work with 8k against 8n.
	k8, n8 := 8*k, n // angle = 2π k/n = (π/4)·(8k/n)
	oct := k8 / n8   // 0..7
	rem := k8 - oct*n8
	// remainder angle within the octant, in [0, π/4)
	var s, c float64
	if oct%2 == 0 {
		s, c = math.Sincos(math.Pi / 4 * float64(rem) / float64(n8))
	} else {
		// reflect: angle = (oct+1)·π/4 - θ'
		s, c = math.Sincos(math.Pi / 4 * float64(n8-rem) / float64(n8))
	}
	// (c, s) is cos/sin of the reduced angle φ in [0, π/4]; map back.
	switch oct {
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

// scratchLen is the length of ping-pong scratch needed by exec with batch
// interleave s0, and genLen that of the direct-butterfly scratch.
func (t *tables) scratchLen(s0 int) int {
	if t.blue != nil {
		return 0
	}
	return t.n * s0
}

// work is the mutable scratch that belongs to one plan (not shared by clones).
type work struct {
	gen  []complex128 // direct butterfly temporaries, 3·genMax+1
	blue []complex128 // Bluestein buffers, 2·M
}

func (t *tables) newWork() work {
	w := work{}
	if t.genMax > 0 {
		w.gen = make([]complex128, 3*t.genMax+1)
	}
	if t.blue != nil {
		w.blue = make([]complex128, 2*t.blue.m)
	}
	return w
}

// exec transforms s0 interleaved sequences of length n (element j of sequence
// c at index j·s0+c) read from in, multiplying the result by scale. Stage 0
// reads in and writes x, stage 1 reads x and writes y, and so on; exec returns
// whichever of x and y holds the result. in must not overlap x; in may be y.
// All three have length n·s0 (y may be nil when the length needs no second
// buffer, see passes).
func (t *tables) exec(in, x, y []complex128, s0 int, inv bool, scale float64, wk *work) []complex128 {
	if t.blue != nil {
		t.blue.exec(x, in, s0, inv, scale, wk.blue)
		return x
	}
	if len(t.stages) == 0 { // n == 1
		for i, v := range in[:s0] {
			x[i] = v * complex(scale, 0)
		}
		return x
	}
	src, dst := in, x
	last := len(t.stages) - 1
	for k := range t.stages {
		st := &t.stages[k]
		s := st.stride * s0
		tw := st.tw
		if inv {
			tw = st.twInv
		}
		if k == last {
			runLast(st, dst, src, s, inv, scale, wk)
		} else {
			run(st, dst, src, tw, s, inv, wk)
		}
		if k == 0 {
			src, dst = x, y
		} else {
			src, dst = dst, src
		}
	}
	return src
}

// passes is the number of ping-pong passes exec makes (the stages, or one for
// the direct copy of length 1 or for Bluestein).
func (t *tables) passes() int {
	if t.blue != nil || len(t.stages) == 0 {
		return 1
	}
	return len(t.stages)
}

func run(st *stage, y, x, tw []complex128, s int, inv bool, wk *work) {
	switch st.radix {
	case 4:
		if s == 1 {
			r4s1(y, x, tw, st.m, inv)
		} else {
			r4(y, x, tw, st.m, s, inv)
		}
	case 2:
		r2(y, x, tw, st.m, s)
	case 3:
		r3(y, x, tw, st.m, s, inv)
	case 5:
		r5(y, x, tw, st.m, s, inv)
	default:
		rgen(y, x, tw, st.m, s, st.radix, st.gen, inv, wk.gen)
	}
}

func runLast(st *stage, y, x []complex128, s int, inv bool, scale float64, wk *work) {
	switch st.radix {
	case 4:
		r4last(y, x, s, inv, scale)
	case 2:
		r2last(y, x, s, scale)
	case 3:
		r3last(y, x, s, inv, scale)
	case 5:
		r5last(y, x, s, inv, scale)
	default:
		rgenlast(y, x, s, st.radix, st.gen, inv, scale, wk.gen)
	}
}
