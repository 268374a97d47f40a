package fft

import (
	"fmt"
	"math"
)

// colBlock is the number of adjacent columns transformed together in the
// column pass: ny·colBlock values are gathered into a contiguous block whose
// inner loops then run over colBlock·stride consecutive values.
const colBlock = 8

// maxLen2D bounds ny·nx.
const maxLen2D = 1 << 30

// Plan2D transforms row-major images of ny rows by nx columns (element (i, j)
// at index i·nx+j). Make it once with NewPlan2D and reuse it; its methods
// allocate nothing. A Plan2D owns scratch space and is not safe for concurrent
// use: give each goroutine its own Clone.
type Plan2D struct {
	ny, nx     int
	rows, cols *tables
	rowBuf     []complex128 // row ping-pong scratch, nx
	blkA, blkB []complex128 // column blocks, ny·colBlock each
	rowWk      work
	colWk      work
	shiftBuf   []complex128 // ny·nx, only when a side is odd (centred transforms)
	scaleY     float64
	scaleX     float64
}

// NewPlan2D returns a plan for ny-by-nx transforms, ny, nx ≥ 1.
func NewPlan2D(ny, nx int) (*Plan2D, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("fft: 2D transform needs at least one row and one column, got %d×%d", ny, nx)
	}
	if ny > maxLen2D/nx {
		return nil, fmt.Errorf("fft: 2D transform of %d×%d values exceeds the supported maximum %d", ny, nx, maxLen2D)
	}
	rows, err := newTables(nx)
	if err != nil {
		return nil, err
	}
	cols := rows
	if ny != nx {
		if cols, err = newTables(ny); err != nil {
			return nil, err
		}
	}
	return newPlan2DFrom(ny, nx, rows, cols), nil
}

func newPlan2DFrom(ny, nx int, rows, cols *tables) *Plan2D {
	b := min(colBlock, nx)
	p := &Plan2D{
		ny: ny, nx: nx, rows: rows, cols: cols,
		rowBuf: make([]complex128, nx),
		blkA:   make([]complex128, ny*b),
		blkB:   make([]complex128, ny*b),
		rowWk:  rows.newWork(),
		colWk:  cols.newWork(),
		scaleY: 1 / math.Sqrt(float64(ny)),
		scaleX: 1 / math.Sqrt(float64(nx)),
	}
	if ny%2 == 1 || nx%2 == 1 {
		p.shiftBuf = make([]complex128, ny*nx)
	}
	return p
}

// Clone returns a plan of the same shape that shares the read-only tables of
// p and owns new scratch, for use in another goroutine.
func (p *Plan2D) Clone() *Plan2D { return newPlan2DFrom(p.ny, p.nx, p.rows, p.cols) }

// Rows returns ny, the number of rows.
func (p *Plan2D) Rows() int { return p.ny }

// Cols returns nx, the number of columns.
func (p *Plan2D) Cols() int { return p.nx }

// Len returns ny·nx, the length of the slices the transforms take.
func (p *Plan2D) Len() int { return p.ny * p.nx }

// Forward writes the orthonormal 2D DFT of src into dst:
// dst[k, l] = (ny·nx)^(-1/2) Σ_{i,j} src[i, j] exp(-2πi (ik/ny + jl/nx)).
// dst may be src itself but must not overlap it otherwise. Both must have
// length ny·nx; Forward panics if they do not, as that is a programming error.
func (p *Plan2D) Forward(dst, src []complex128) {
	p.check(dst, src)
	p.transform(dst, src, false, false)
}

// Inverse writes the orthonormal inverse 2D DFT of src into dst. The aliasing
// and length rules of Forward apply.
func (p *Plan2D) Inverse(dst, src []complex128) {
	p.check(dst, src)
	p.transform(dst, src, true, false)
}

// CentredForward transforms an image on the FFT-centred grid (centre pixel
// at (ny/2, nx/2), see package simulate) to k-space with DC at (ny/2, nx/2):
// it equals Shift ∘ Forward ∘ IShift. For even ny and nx it is done without
// moving data, by modulating with (-1)^(i+j) before and after the transform.
// The aliasing and length rules of Forward apply.
func (p *Plan2D) CentredForward(dst, src []complex128) {
	p.check(dst, src)
	p.centred(dst, src, false)
}

// CentredInverse is the inverse of CentredForward: Shift ∘ Inverse ∘ IShift.
// The aliasing and length rules of Forward apply.
func (p *Plan2D) CentredInverse(dst, src []complex128) {
	p.check(dst, src)
	p.centred(dst, src, true)
}

func (p *Plan2D) check(dst, src []complex128) {
	n := p.ny * p.nx
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("fft: Plan2D of %d×%d given dst of length %d and src of length %d", p.ny, p.nx, len(dst), len(src)))
	}
}

func (p *Plan2D) centred(dst, src []complex128, inv bool) {
	if p.shiftBuf == nil {
		p.transform(dst, src, inv, true)
		return
	}
	IShift(p.shiftBuf, src, p.ny, p.nx)
	p.transform(p.shiftBuf, p.shiftBuf, inv, false)
	Shift(dst, p.shiftBuf, p.ny, p.nx)
}

// transform runs the column pass from src into dst and then the row pass in
// place on dst. With mod (even sizes only) it computes the centred transform
// (-1)^((ny+nx)/2) (-1)^(k+l) F[(-1)^(i+j) x].
func (p *Plan2D) transform(dst, src []complex128, inv, mod bool) {
	ny, nx := p.ny, p.nx
	outSign := 1.0
	if mod && (ny/2+nx/2)%2 == 1 {
		outSign = -1
	}
	for c0 := 0; c0 < nx; c0 += colBlock {
		w := min(colBlock, nx-c0)
		a := p.blkA[:ny*w]
		b := p.blkB[:ny*w]
		if mod {
			gatherMod(a, src, ny, nx, c0, w)
		} else {
			gather(a, src, ny, nx, c0, w)
		}
		// a is free to be clobbered, so it serves as the second buffer.
		r := p.cols.exec(a, b, a, w, inv, p.scaleY, &p.colWk)
		if mod {
			scatterMod(dst, r, ny, nx, c0, w, outSign)
		} else {
			scatter(dst, r, ny, nx, c0, w)
		}
	}
	for i := range ny {
		row := dst[i*nx : (i+1)*nx]
		transform1(p.rows, row, row, p.rowBuf, 1, inv, p.scaleX, &p.rowWk)
		if mod {
			for l := 1; l < nx; l += 2 {
				row[l] = -row[l]
			}
		}
	}
}

// gather copies columns c0..c0+w of the ny×nx image src into blk, row by
// row (w values per row).
func gather(blk, src []complex128, ny, nx, c0, w int) {
	for i := range ny {
		copy(blk[i*w:(i+1)*w], src[i*nx+c0:i*nx+c0+w])
	}
}

// gatherMod is gather with each value multiplied by (-1)^(i+j).
func gatherMod(blk, src []complex128, ny, nx, c0, w int) {
	for i := range ny {
		d := blk[i*w : (i+1)*w]
		s := src[i*nx+c0 : i*nx+c0+w]
		s = s[:len(d)]
		sg := 1.0
		if (i+c0)%2 == 1 {
			sg = -1
		}
		for c := range d {
			d[c] = s[c] * complex(sg, 0)
			sg = -sg
		}
	}
}

// scatter is the inverse of gather.
func scatter(dst, blk []complex128, ny, nx, c0, w int) {
	for i := range ny {
		copy(dst[i*nx+c0:i*nx+c0+w], blk[i*w:(i+1)*w])
	}
}

// scatterMod is scatter with each value of row k multiplied by sign·(-1)^k.
func scatterMod(dst, blk []complex128, ny, nx, c0, w int, sign float64) {
	for k := range ny {
		s := blk[k*w : (k+1)*w]
		d := dst[k*nx+c0 : k*nx+c0+w]
		d = d[:len(s)]
		sg := complex(sign, 0)
		if k%2 == 1 {
			sg = -sg
		}
		for c := range s {
			d[c] = s[c] * sg
		}
	}
}
