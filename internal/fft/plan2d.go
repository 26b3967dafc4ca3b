package fft

import (
	"errors"
	"fmt"
)

// colBlock is the number of adjacent columns transformed together in a column pass. The block
// (nx·colBlock numbers) and its two scratch copies stay in the L1/L2 caches during all passes,
// and each butterfly works on colBlock contiguous numbers with one twiddle factor.
const colBlock = 8

// Plan is a precomputed 1D transform of one length. It is not safe for concurrent use.
type Plan struct {
	pl     *plan1
	w1, w2 []complex128
	scale  float64
}

// NewPlan returns a plan for 1D transforms of length n, which must be a positive product of
// powers of 2, 3 and 5.
func NewPlan(n int) (*Plan, error) {
	pl, err := newPlan1(n)
	if err != nil {
		return nil, err
	}
	return &Plan{pl: pl, w1: make([]complex128, n), w2: make([]complex128, n), scale: 1 / float64(n)}, nil
}

// Len returns the transform length.
func (p *Plan) Len() int {
	if p == nil || p.pl == nil {
		return 0
	}
	return p.pl.n
}

// Forward replaces x by X_k = Σ_j x_j exp(−2πi·jk/n) (unnormalised).
func (p *Plan) Forward(x []complex128) error { return p.do(x, false) }

// Inverse replaces x by x_j = (1/n) Σ_k X_k exp(+2πi·jk/n), so that Inverse undoes Forward.
func (p *Plan) Inverse(x []complex128) error {
	if err := p.do(x, true); err != nil {
		return err
	}
	for i := range x {
		x[i] = complex(p.scale*real(x[i]), p.scale*imag(x[i]))
	}
	return nil
}

func (p *Plan) do(x []complex128, inv bool) error {
	if p == nil || p.pl == nil {
		return errors.New("fft: Plan not initialised (use NewPlan)")
	}
	n := p.pl.n
	if len(x) != n {
		return fmt.Errorf("fft: Plan of length %d given a slice of length %d", n, len(x))
	}
	a := blockArgs{dst: x, src: x, ds: 1, ss: 1, v: 1, inLen: n, outLen: n, w1: p.w1, w2: p.w2, inv: inv}
	p.pl.transform(&a)
	return nil
}

// Plan2D transforms nx×ny complex arrays stored row-major (x[i*ny+j], i < nx, j < ny). nx and
// ny must be positive products of powers of 2, 3 and 5. A Plan2D holds scratch space and is not
// safe for concurrent use; use one Plan2D per goroutine.
type Plan2D struct {
	nx, ny     int
	cols, rows *plan1 // lengths nx and ny
	w1, w2     []complex128
	zero, sink []complex128
	scale      float64
}

// NewPlan2D returns a plan for nx×ny 2D transforms.
func NewPlan2D(nx, ny int) (*Plan2D, error) {
	if nx <= 0 || ny <= 0 {
		return nil, fmt.Errorf("%w: %d×%d grid", ErrSize, nx, ny)
	}
	if nx > maxElems/ny {
		return nil, fmt.Errorf("%w: %d×%d grid has more than %d elements", ErrSize, nx, ny, maxElems)
	}
	cols, err := newPlan1(nx)
	if err != nil {
		return nil, err
	}
	rows, err := newPlan1(ny)
	if err != nil {
		return nil, err
	}
	w := max(nx*colBlock, ny)
	return &Plan2D{
		nx: nx, ny: ny, cols: cols, rows: rows,
		w1: make([]complex128, w), w2: make([]complex128, w),
		zero: make([]complex128, colBlock), sink: make([]complex128, colBlock),
		scale: 1 / (float64(nx) * float64(ny)),
	}, nil
}

// Size returns the grid dimensions nx, ny.
func (p *Plan2D) Size() (nx, ny int) {
	if p == nil {
		return 0, 0
	}
	return p.nx, p.ny
}

// Forward replaces x by X_kl = Σ_ij x_ij exp(−2πi(ik/nx + jl/ny)) (unnormalised), in place.
func (p *Plan2D) Forward(x []complex128) error { return p.do(x, false) }

// Inverse replaces X by x_ij = 1/(nx·ny) Σ_kl X_kl exp(+2πi(ik/nx + jl/ny)), in place, so that
// Inverse undoes Forward.
func (p *Plan2D) Inverse(x []complex128) error {
	if err := p.do(x, true); err != nil {
		return err
	}
	s := p.scale
	for i := range x {
		x[i] = complex(s*real(x[i]), s*imag(x[i]))
	}
	return nil
}

func (p *Plan2D) do(x []complex128, inv bool) error {
	if p == nil || p.cols == nil {
		return errors.New("fft: Plan2D not initialised (use NewPlan2D)")
	}
	nx, ny := p.nx, p.ny
	if len(x) != nx*ny {
		return fmt.Errorf("fft: Plan2D of size %d×%d given a slice of length %d", nx, ny, len(x))
	}
	p.rowPass(x, nx, inv)
	p.colPass(x, inv)
	return nil
}

// rowPass transforms the first nr rows of x in place.
func (p *Plan2D) rowPass(x []complex128, nr int, inv bool) {
	ny := p.ny
	a := blockArgs{ds: 1, ss: 1, v: 1, inLen: ny, outLen: ny, w1: p.w1, w2: p.w2, inv: inv}
	for i := 0; i < nr; i++ {
		row := x[i*ny : (i+1)*ny]
		a.dst, a.src = row, row
		p.rows.transform(&a)
	}
}

// colPass transforms all columns of x in place, colBlock columns at a time.
func (p *Plan2D) colPass(x []complex128, inv bool) {
	nx, ny := p.nx, p.ny
	a := blockArgs{ds: ny, ss: ny, inLen: nx, outLen: nx, w1: p.w1, w2: p.w2, zero: p.zero, sink: p.sink, inv: inv}
	for j0 := 0; j0 < ny; j0 += colBlock {
		a.v = min(colBlock, ny-j0)
		a.dst, a.src = x[j0:], x[j0:]
		p.cols.transform(&a)
	}
}
