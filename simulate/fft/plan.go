package fft

import (
	"fmt"
	"math"
)

// Plan transforms sequences of one fixed length. Make it once with NewPlan
// and reuse it; Forward and Inverse allocate nothing. A Plan owns scratch
// space and is not safe for concurrent use: give each goroutine its own
// Clone.
type Plan struct {
	t     *tables
	buf   []complex128 // ping-pong scratch, length n
	wk    work
	scale float64
}

// NewPlan returns a plan for transforms of length n ≥ 1.
func NewPlan(n int) (*Plan, error) {
	t, err := newTables(n)
	if err != nil {
		return nil, err
	}
	return newPlanFrom(t), nil
}

func newPlanFrom(t *tables) *Plan {
	return &Plan{
		t:     t,
		buf:   make([]complex128, t.n+4)[4:],
		wk:    t.newWork(),
		scale: 1 / math.Sqrt(float64(t.n)),
	}
}

// Len returns the transform length.
func (p *Plan) Len() int { return p.t.n }

// Clone returns a plan of the same length that shares the read-only tables of
// p and owns new scratch, for use in another goroutine.
func (p *Plan) Clone() *Plan { return newPlanFrom(p.t) }

// Forward writes the orthonormal DFT of src into dst:
// dst[k] = n^(-1/2) Σ_j src[j] exp(-2πi jk/n). dst may be src itself but must
// not overlap it otherwise. Both must have length Len(); Forward panics if
// they do not, as that is a programming error.
func (p *Plan) Forward(dst, src []complex128) { p.transform(dst, src, false) }

// Inverse writes the orthonormal inverse DFT of src into dst:
// dst[j] = n^(-1/2) Σ_k src[k] exp(+2πi jk/n). The aliasing and length rules
// of Forward apply.
func (p *Plan) Inverse(dst, src []complex128) { p.transform(dst, src, true) }

func (p *Plan) transform(dst, src []complex128, inv bool) {
	n := p.t.n
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("fft: Plan of length %d given dst of length %d and src of length %d", n, len(dst), len(src)))
	}
	transform1(p.t, dst, src, p.buf, 1, inv, p.scale, &p.wk)
}

// transform1 runs t on s0 interleaved sequences from src into dst, with buf as
// ping-pong scratch of the same length; dst may be src.
func transform1(t *tables, dst, src, buf []complex128, s0 int, inv bool, scale float64, wk *work) {
	alias := &dst[0] == &src[0]
	if t.passes()%2 == 1 {
		// An odd number of passes ends in the first output buffer: make
		// that dst, reading from buf when src is dst.
		if alias {
			copy(buf, src)
			src = buf
		}
		t.exec(src, dst, buf, s0, inv, scale, wk)
		return
	}
	// Even: the first pass writes buf, the last one dst (src may be dst).
	t.exec(src, buf, dst, s0, inv, scale, wk)
}
