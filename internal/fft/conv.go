package fft

import (
	"errors"
	"fmt"
	"math"
)

// kernelEvenTol is the relative tolerance of the evenness check in SetKernel and NewKernel:
// |K(d) − K(−d)| may not exceed kernelEvenTol·max|K|. It allows for rounding differences when a
// kernel is computed from a formula that is even only mathematically (for example through
// trigonometric functions of ±d), and still rejects kernels that are not even.
const kernelEvenTol = 1e-10

// PaddedSize returns the transform length used by a Convolver for a grid axis of length l: the
// smallest product of powers of 2 and 3 that is at least 2·l−1. It returns 0 for l outside
// 1 … 2²², the axis lengths NewConvolver accepts.
func PaddedSize(l int) int {
	if l < 1 || l > maxLen/4 {
		return 0
	}
	want := 2*l - 1
	best := -1
	for p2 := 1; ; p2 *= 2 {
		for p := p2; ; p *= 3 {
			if p >= want {
				if best < 0 || p < best {
					best = p
				}
				break
			}
		}
		if p2 >= want {
			return best
		}
	}
}

// Kernel is the precomputed transform of a real, even convolution kernel for one grid size
// l1×l2. Create it with Convolver.NewKernel. A Kernel is read-only after creation and may be
// shared by any number of Convolvers of the same grid size, also concurrently.
type Kernel struct {
	l1, l2 int
	p1, p2 int
	// hat is the transform of the zero-padded kernel, p1×p2 row-major, times 1/(p1·p2) (the
	// normalisation of the inverse transform). It is real because the kernel is real and even.
	hat []float64
}

// Size returns the grid size l1×l2 the kernel was made for.
func (k *Kernel) Size() (l1, l2 int) {
	if k == nil {
		return 0, 0
	}
	return k.l1, k.l2
}

// Convolver computes linear (not circular) 2D convolutions of fields on an l1×l2 grid,
//
//	out[i][j] = Σ_{i',j'} K(i−i', j−j') · in[i'][j'],   0 ≤ i,i' < l1, 0 ≤ j,j' < l2,
//
// with a real, even kernel K(di, dj) = K(−di, −dj) given on the difference grid |di| < l1,
// |dj| < l2. Fields are stored row-major (in[i*l2+j]). The transforms are zero padded to
// p1×p2 = PaddedSize(l1)×PaddedSize(l2), so that no wrap-around occurs.
//
// Kernels: SetKernel installs a default kernel used by Convolve and ConvolveReal2. Further
// kernels are made with NewKernel and used with ConvolveWith, ConvolveReal2With and
// ConvolveMulti; the latter convolves one source with several kernels and shares the forward
// transform of the source among them.
//
// Cost: the transforms are pruned. The forward row transforms are done only for the l1 rows of
// the source, the forward column transforms skip the zero padding rows, the product with the
// kernel transform is done inside the column pass while a block of columns is in cache, and the
// inverse transforms only produce the l1×l2 output window.
//
// A Convolver holds scratch space and is not safe for concurrent use; use one per goroutine
// (they can share Kernels). No method allocates, except NewKernel, the first SetKernel, and
// ConvolveMulti when it is given more kernels than in any earlier call.
type Convolver struct {
	l1, l2     int
	p1, p2     int
	cols, rows *plan1 // lengths p1, p2
	// buf holds l1 rows of length p2: the row transforms of the source, then the output of
	// the inverse column transforms (for the last kernel of ConvolveMulti).
	buf []complex128
	// extra[t] plays the role of buf for kernel t < len(kernels)−1 in ConvolveMulti.
	extra [][]complex128
	// rowPruned: the first forward row pass reads only the l2 source entries of a row.
	// rowOutLen: number of outputs produced by the inverse row transforms (l2 or p2).
	rowPruned bool
	rowOutLen int
	// w1, w2: pass scratch; w3: the spectrum of one block of columns.
	w1, w2, w3 []complex128
	zero, sink []complex128
	kern       *Kernel      // default kernel, nil until SetKernel
	kplan      *Plan2D      // p1×p2 plan used to transform kernels (created lazily)
	kbuf       []complex128 // p1×p2 work array for kernel transforms
	multiOne   [1][]complex128
	multiOneK  [1]*Kernel
}

// NewConvolver returns a Convolver for fields on an l1×l2 grid (l1, l2 ≥ 1).
func NewConvolver(l1, l2 int) (*Convolver, error) {
	if l1 <= 0 || l2 <= 0 || l1 > maxLen/4 || l2 > maxLen/4 {
		return nil, fmt.Errorf("%w: convolution grid %d×%d", ErrSize, l1, l2)
	}
	p1, p2 := PaddedSize(l1), PaddedSize(l2)
	if p1 > maxElems/p2 {
		return nil, fmt.Errorf("%w: convolution grid %d×%d is too large", ErrSize, l1, l2)
	}
	cols, err := newPlan1Order(p1, prunedRadices)
	if err != nil {
		return nil, err
	}
	rows, err := newPlan1Order(p2, prunedRadices)
	if err != nil {
		return nil, err
	}
	w := max(p1*colBlock, p2)
	// The inverse row transforms need only the first l2 outputs. Their last pass skips the rest
	// when l2 is a multiple of its stride (as when p2 = 2·l2), so that it stays collapsed.
	rowOutLen := p2
	if T := len(rows.stages); T > 1 && l2%rows.stages[T-1].s == 0 {
		rowOutLen = l2
	}
	return &Convolver{
		l1: l1, l2: l2, p1: p1, p2: p2, cols: cols, rows: rows,
		// The pruned first row pass reads only the l2 source entries of a row; otherwise
		// the row is zero filled up to p2.
		rowPruned: len(rows.stages) > 1 && rows.stages[0].r == 4 && l2 <= 2*rows.stages[0].m,
		buf:       make([]complex128, l1*p2),
		w1:        make([]complex128, w), w2: make([]complex128, w),
		w3: make([]complex128, p1*colBlock),
		// Long enough for the collapsed last pass of the inverse row transforms.
		zero: make([]complex128, max(colBlock, p2)), sink: make([]complex128, max(colBlock, p2)),
		rowOutLen: rowOutLen,
	}, nil
}

// Size returns the grid size l1×l2.
func (c *Convolver) Size() (l1, l2 int) {
	if c == nil {
		return 0, 0
	}
	return c.l1, c.l2
}

// PaddedSize returns the transform size p1×p2 used by c.
func (c *Convolver) PaddedSize() (p1, p2 int) {
	if c == nil {
		return 0, 0
	}
	return c.p1, c.p2
}

// ready reports an error for a nil or zero-value Convolver.
func (c *Convolver) ready() error {
	if c == nil || c.cols == nil {
		return errors.New("fft: Convolver not initialised (use NewConvolver)")
	}
	return nil
}

// NewKernel evaluates k(di, dj) once for all offsets |di| < l1, |dj| < l2 and returns its
// precomputed transform. k must be real, finite and even, k(di, dj) = k(−di, −dj), up to a
// relative rounding tolerance of 1e-10 (the two values are then averaged); otherwise NewKernel
// returns an error.
func (c *Convolver) NewKernel(k func(di, dj int) float64) (*Kernel, error) {
	if err := c.ready(); err != nil {
		return nil, err
	}
	kn := &Kernel{l1: c.l1, l2: c.l2, p1: c.p1, p2: c.p2}
	if err := c.fillKernel(kn, k); err != nil {
		return nil, err
	}
	return kn, nil
}

// SetKernel sets the default kernel used by Convolve and ConvolveReal2; see NewKernel for the
// requirements on k. On error the previous default kernel is kept. Only the first call
// allocates the kernel storage.
func (c *Convolver) SetKernel(k func(di, dj int) float64) error {
	if err := c.ready(); err != nil {
		return err
	}
	kn := c.kern
	if kn == nil {
		kn = &Kernel{l1: c.l1, l2: c.l2, p1: c.p1, p2: c.p2}
	}
	// fillKernel validates k completely before it writes kn.hat.
	if err := c.fillKernel(kn, k); err != nil {
		return err
	}
	c.kern = kn
	return nil
}

func (c *Convolver) fillKernel(kn *Kernel, k func(di, dj int) float64) error {
	if k == nil {
		return errors.New("fft: nil kernel function")
	}
	l1, l2, p1, p2 := c.l1, c.l2, c.p1, c.p2
	if c.kplan == nil {
		pl, err := NewPlan2D(p1, p2)
		if err != nil {
			return err
		}
		c.kplan = pl
		c.kbuf = make([]complex128, p1*p2)
	}
	kb := c.kbuf
	clear(kb)
	idx := func(di, dj int) int { return ((di+p1)%p1)*p2 + (dj+p2)%p2 }
	kmax := 0.0
	for di := -(l1 - 1); di < l1; di++ {
		for dj := -(l2 - 1); dj < l2; dj++ {
			v := k(di, dj)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("fft: kernel value K(%d, %d) = %v is not finite", di, dj, v)
			}
			kb[idx(di, dj)] = complex(v, 0)
			kmax = max(kmax, math.Abs(v))
		}
	}
	for di := -(l1 - 1); di < l1; di++ {
		for dj := -(l2 - 1); dj < l2; dj++ {
			a, b := real(kb[idx(di, dj)]), real(kb[idx(-di, -dj)])
			if math.Abs(a-b) > kernelEvenTol*kmax {
				return fmt.Errorf("fft: kernel is not even: K(%d, %d) = %v but K(%d, %d) = %v", di, dj, a, -di, -dj, b)
			}
		}
	}
	// Symmetrise exactly, so that the transform is real up to rounding.
	for di := -(l1 - 1); di < l1; di++ {
		for dj := -(l2 - 1); dj < l2; dj++ {
			i, j := idx(di, dj), idx(-di, -dj)
			if i < j {
				m := 0.5 * (real(kb[i]) + real(kb[j]))
				kb[i], kb[j] = complex(m, 0), complex(m, 0)
			}
		}
	}
	if err := c.kplan.Forward(kb); err != nil {
		return err
	}
	if kn.hat == nil || len(kn.hat) != p1*p2 {
		kn.hat = make([]float64, p1*p2)
	}
	s := 1 / (float64(p1) * float64(p2))
	for i, v := range kb {
		kn.hat[i] = s * real(v)
	}
	return nil
}

func (c *Convolver) checkKernel(k *Kernel) error {
	if k == nil || k.hat == nil {
		return errors.New("fft: no kernel (call SetKernel or NewKernel first)")
	}
	if k.l1 != c.l1 || k.l2 != c.l2 {
		return fmt.Errorf("fft: kernel for a %d×%d grid used with a %d×%d Convolver", k.l1, k.l2, c.l1, c.l2)
	}
	return nil
}

func (c *Convolver) checkLen(name string, n int) error {
	if n != c.l1*c.l2 {
		return fmt.Errorf("fft: %s has length %d, want %d·%d = %d", name, n, c.l1, c.l2, c.l1*c.l2)
	}
	return nil
}

// Convolve sets dst to the convolution of src with the default kernel. dst and src have length
// l1·l2 and may be the same slice.
func (c *Convolver) Convolve(dst, src []complex128) error {
	if err := c.ready(); err != nil {
		return err
	}
	return c.ConvolveWith(c.kern, dst, src)
}

// ConvolveWith sets dst to the convolution of src with kernel k. dst and src have length l1·l2
// and may be the same slice.
func (c *Convolver) ConvolveWith(k *Kernel, dst, src []complex128) error {
	if err := c.ready(); err != nil {
		return err
	}
	c.multiOne[0], c.multiOneK[0] = dst, k
	err := c.ConvolveMulti(c.multiOne[:], src, c.multiOneK[:])
	c.multiOne[0], c.multiOneK[0] = nil, nil
	return err
}

// ConvolveMulti sets dsts[t] to the convolution of src with kernels[t], for all t, sharing the
// forward transform of src: each additional kernel costs about 60–70% of a single Convolve. All
// slices have length l1·l2; a dsts[t] may be the same slice as src, but the dsts must not
// overlap each other.
func (c *Convolver) ConvolveMulti(dsts [][]complex128, src []complex128, kernels []*Kernel) error {
	if err := c.ready(); err != nil {
		return err
	}
	if len(dsts) != len(kernels) {
		return fmt.Errorf("fft: ConvolveMulti given %d destinations but %d kernels", len(dsts), len(kernels))
	}
	if err := c.checkLen("src", len(src)); err != nil {
		return err
	}
	for t := range dsts {
		if err := c.checkKernel(kernels[t]); err != nil {
			return err
		}
		if n := len(dsts[t]); n != c.l1*c.l2 {
			return fmt.Errorf("fft: dsts[%d] has length %d, want %d·%d = %d", t, n, c.l1, c.l2, c.l1*c.l2)
		}
	}
	if len(kernels) == 0 {
		return nil
	}
	l1, l2, p2 := c.l1, c.l2, c.p2
	for i := 0; i < l1; i++ {
		row := c.buf[i*p2 : (i+1)*p2]
		copy(row, src[i*l2:(i+1)*l2])
		if !c.rowPruned {
			clear(row[l2:])
		}
	}
	c.forwardRows()
	c.columns(kernels)
	for t := range kernels {
		out := c.outBuf(t, len(kernels))
		c.inverseRows(out)
		d := dsts[t]
		for i := 0; i < l1; i++ {
			copy(d[i*l2:(i+1)*l2], out[i*p2:i*p2+l2])
		}
	}
	return nil
}

// ConvolveReal2 convolves two real fields with the default kernel at once, packing them into
// one complex transform a + i·b (the kernel is real, so the real and imaginary parts of the
// result are the two convolutions); it costs the same as one Convolve. All slices have length
// l1·l2; dstA and dstB must not overlap, but either may be the same slice as a or b.
func (c *Convolver) ConvolveReal2(dstA, dstB, a, b []float64) error {
	if err := c.ready(); err != nil {
		return err
	}
	return c.ConvolveReal2With(c.kern, dstA, dstB, a, b)
}

// ConvolveReal2With is ConvolveReal2 with kernel k.
func (c *Convolver) ConvolveReal2With(k *Kernel, dstA, dstB, a, b []float64) error {
	if err := c.ready(); err != nil {
		return err
	}
	if err := c.checkKernel(k); err != nil {
		return err
	}
	for _, s := range [...]struct {
		name string
		n    int
	}{{"dstA", len(dstA)}, {"dstB", len(dstB)}, {"a", len(a)}, {"b", len(b)}} {
		if err := c.checkLen(s.name, s.n); err != nil {
			return err
		}
	}
	l1, l2, p2 := c.l1, c.l2, c.p2
	for i := 0; i < l1; i++ {
		row := c.buf[i*p2 : (i+1)*p2]
		ra, rb := a[i*l2:(i+1)*l2], b[i*l2:(i+1)*l2]
		rb = rb[:len(ra)]
		for j, x := range ra {
			row[j] = complex(x, rb[j])
		}
		if !c.rowPruned {
			clear(row[l2:])
		}
	}
	c.forwardRows()
	c.multiOneK[0] = k
	c.columns(c.multiOneK[:])
	c.multiOneK[0] = nil
	c.inverseRows(c.buf)
	for i := 0; i < l1; i++ {
		row := c.buf[i*p2 : i*p2+l2]
		da, db := dstA[i*l2:(i+1)*l2], dstB[i*l2:(i+1)*l2]
		da, db = da[:len(row)], db[:len(row)]
		for j, z := range row {
			da[j], db[j] = real(z), imag(z)
		}
	}
	return nil
}

// outBuf returns the l1×p2 array that receives the column-pass output for kernel t of nk.
func (c *Convolver) outBuf(t, nk int) []complex128 {
	if t == nk-1 {
		return c.buf
	}
	return c.extra[t]
}

// forwardRows transforms the l1 rows of buf in place. Entries l2…p2−1 of each row are zero
// (and are not read if rowPruned).
func (c *Convolver) forwardRows() {
	p2 := c.p2
	a := blockArgs{ds: 1, ss: 1, v: 1, inLen: p2, outLen: p2, w1: c.w1, w2: c.w2}
	if c.rowPruned {
		a.inLen = c.l2
	}
	for i := 0; i < c.l1; i++ {
		row := c.buf[i*p2 : (i+1)*p2]
		a.dst, a.src = row, row
		c.rows.transform(&a)
	}
}

// inverseRows inverse-transforms the l1 rows of out in place; only entries < l2 of each row are
// guaranteed to be written.
func (c *Convolver) inverseRows(out []complex128) {
	p2 := c.p2
	a := blockArgs{ds: 1, ss: 1, v: 1, inLen: p2, outLen: c.rowOutLen, w1: c.w1, w2: c.w2, zero: c.zero, sink: c.sink, inv: true}
	for i := 0; i < c.l1; i++ {
		row := out[i*p2 : (i+1)*p2]
		a.dst, a.src = row, row
		c.rows.transform(&a)
	}
}

// columns runs, block by block, the forward column transforms of buf (whose rows l1…p1−1 are
// zero and not stored), and for each kernel the product with the kernel transform (fused into
// the first inverse pass) and the inverse column transforms, keeping only output rows < l1.
func (c *Convolver) columns(kernels []*Kernel) {
	nk := len(kernels)
	for len(c.extra) < nk-1 {
		c.extra = append(c.extra, make([]complex128, c.l1*c.p2))
	}
	p1, p2, l1 := c.p1, c.p2, c.l1
	fwd := blockArgs{ss: p2, inLen: l1, outLen: p1, w1: c.w1, w2: c.w2, zero: c.zero, sink: c.sink}
	inv := blockArgs{ds: p2, inLen: p1, outLen: l1, w1: c.w1, w2: c.w2, zero: c.zero, sink: c.sink, inv: true, sstride: p2}
	for j0 := 0; j0 < p2; j0 += colBlock {
		v := min(colBlock, p2-j0)
		spec := c.w3[:p1*v]
		fwd.v, fwd.src, fwd.dst, fwd.ds = v, c.buf[j0:], spec, v
		c.cols.transform(&fwd)
		inv.v, inv.ss, inv.src = v, v, spec
		for t, k := range kernels {
			inv.scale, inv.dst = k.hat[j0:], c.outBuf(t, nk)[j0:]
			c.cols.transform(&inv)
		}
	}
}
