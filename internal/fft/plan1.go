package fft

import (
	"errors"
	"fmt"
	"math"
)

// maxLen bounds the length of one transform axis and maxElems the number of elements of a 2D
// array (4 GiB of complex128). Larger requests are rejected with ErrSize instead of failing in
// the allocator, and index arithmetic can never overflow.
const (
	maxLen   = 1 << 24
	maxElems = 1 << 28
)

// ErrSize is wrapped by every error about an unsupported transform or grid size, so that callers
// can test for it with errors.Is.
var ErrSize = errors.New("fft: unsupported size")

// smooth reports whether n > 0 has no prime factor other than 2, 3 and 5.
func smooth(n int) bool {
	if n <= 0 {
		return false
	}
	for _, p := range [...]int{2, 3, 5} {
		for n%p == 0 {
			n /= p
		}
	}
	return n == 1
}

// cossin returns cos(2πj/n) and sin(2πj/n) for any integer j and n > 0. The angle is reduced to
// [0, π/4] with exact integer arithmetic before calling math.Sincos, so the results are correctly
// signed and accurate to about one ulp, and exact at multiples of π/2.
func cossin(j, n int) (c, s float64) {
	j %= n
	if j < 0 {
		j += n
	}
	// θ = 2π·a/N with N = 8n, so that π, π/2 and π/4 correspond to the integers 4n, 2n and n.
	N, a := 8*n, 8*j
	sgnS, sgnC, swap := 1.0, 1.0, false
	if a > N/2 { // θ → 2π − θ
		a, sgnS = N-a, -1
	}
	if a > N/4 { // θ → π − θ
		a, sgnC = N/2-a, -1
	}
	if a > N/8 { // θ → π/2 − θ
		a, swap = N/4-a, true
	}
	s, c = math.Sincos(2 * math.Pi * float64(a) / float64(N))
	if swap {
		c, s = s, c
	}
	return sgnC * c, sgnS * s
}

// omega returns exp(−2πi·j/n), the forward-transform twiddle factor.
func omega(j, n int) complex128 {
	c, s := cossin(j, n)
	return complex(c, -s)
}

// stage is one Stockham autosort pass of a mixed-radix transform of length n. It combines the
// r elements q + s·(p + k·m), k < r, of its input into the r elements q + s·(r·p + k) of its
// output, for p < m and q < s, where n = r·m·s. Outputs k > 0 are multiplied by ω_{r·m}^{p·k}.
type stage struct {
	r, m, s int
	// tw[(r−1)·p + k − 1] = ω_{r·m}^{p·k} for p < m, 1 ≤ k < r; twInv holds the conjugates.
	tw, twInv []complex128
}

// plan1 is a precomputed mixed-radix decomposition of one transform axis.
type plan1 struct {
	n      int
	stages []stage
}

// radices returns the pass radices used for length n: radix 4 as often as possible, then
// radix 2 if the power of two is odd, then radix 3 and radix 5. Larger radices (8, or 6 for a
// 2·3 pair) were measured to be slower: without SIMD the passes are bound by instruction count
// rather than memory traffic, and their butterflies need more values than amd64 has registers,
// so the compiler spills.
func radices(n int) []int {
	var twos, threes, fives int
	for n%2 == 0 {
		n, twos = n/2, twos+1
	}
	for n%3 == 0 {
		n, threes = n/3, threes+1
	}
	for n%5 == 0 {
		n, fives = n/5, fives+1
	}
	var rs []int
	for ; twos >= 2; twos -= 2 {
		rs = append(rs, 4)
	}
	if twos == 1 {
		rs = append(rs, 2)
	}
	for ; threes > 0; threes-- {
		rs = append(rs, 3)
	}
	for ; fives > 0; fives-- {
		rs = append(rs, 5)
	}
	return rs
}

// prunedRadices is the radix order for transforms with a zero upper half of the input (forward)
// or a discarded upper half of the output (inverse), as in zero-padded convolutions: a radix-4
// pass first, whose butterflies then see only two non-zero inputs, and a radix-4 (else radix-2)
// pass last, whose butterflies then need to produce only the lower outputs.
func prunedRadices(n int) []int {
	rs := radices(n)
	last := -1
	for i := len(rs) - 1; i >= 1; i-- {
		if rs[i] == 4 {
			last = i
			break
		}
		if rs[i] == 2 && last < 0 {
			last = i
		}
	}
	if last >= 1 {
		r := rs[last]
		rs = append(rs[:last], rs[last+1:]...)
		rs = append(rs, r)
	}
	return rs
}

func newPlan1(n int) (*plan1, error) { return newPlan1Order(n, radices) }

// newPlan1Order builds the plan for length n with the pass radices order(n).
func newPlan1Order(n int, order func(int) []int) (*plan1, error) {
	if n <= 0 || n > maxLen || !smooth(n) {
		return nil, fmt.Errorf("%w: length %d is not a positive product of powers of 2, 3 and 5 up to %d", ErrSize, n, maxLen)
	}
	pl := &plan1{n: n}
	s := 1
	for _, r := range order(n) {
		nn := n / s // length of the sub-transforms at this stage
		m := nn / r
		st := stage{r: r, m: m, s: s}
		if m > 1 {
			st.tw = make([]complex128, (r-1)*m)
			st.twInv = make([]complex128, (r-1)*m)
			for p := 0; p < m; p++ {
				for k := 1; k < r; k++ {
					w := omega(p*k, nn)
					st.tw[(r-1)*p+k-1] = w
					st.twInv[(r-1)*p+k-1] = complex(real(w), -imag(w))
				}
			}
		}
		pl.stages = append(pl.stages, st)
		s *= r
	}
	return pl, nil
}

// blockArgs describes a batch of v independent transforms of length n = pl.n, laid out as n
// "elements" that are each v contiguous complex numbers: element e of the input is
// src[e·ss : e·ss+v] and element e of the output is dst[e·ds : e·ds+v]. Transform number j runs
// over entry j of every element. With v = 1 and unit strides this is a single 1D transform; with
// src a row-major matrix offset to column j0 and ss = ncols it is a block of v columns.
type blockArgs struct {
	dst, src []complex128
	ds, ss   int
	v        int
	// inLen: input elements e >= inLen are zero and are never read (pruned, zero-padded input).
	// outLen: only output elements e < outLen are stored (pruned output).
	inLen, outLen int
	// w1, w2: scratch, at least n·v long each. zero: at least v zeros; sink: at least v long
	// (both longer lets pruned contiguous passes be collapsed, see passArgs.run).
	w1, w2, zero, sink []complex128
	inv                bool
	// scale, if not nil, multiplies the input first: element e is multiplied entry by entry by
	// scale[e·sstride : e·sstride+v] (all n elements must be present).
	scale   []float64
	sstride int
}

// transform runs the whole multi-pass transform described by a. It never allocates. src and dst
// may be the same memory (an in-place transform) as long as they use the same layout.
func (pl *plan1) transform(a *blockArgs) {
	n, v := pl.n, a.v
	T := len(pl.stages)
	if T == 0 { // n == 1: identity
		if a.outLen > 0 {
			d := a.dst[:v]
			switch {
			case a.inLen <= 0:
				clear(d)
			case a.scale != nil:
				x, h := a.src[:v], a.scale[:v]
				for j := range d {
					d[j] = scaleC(h[j], x[j])
				}
			default:
				copy(d, a.src[:v])
			}
		}
		return
	}
	pa := passArgs{v: v, zero: a.zero, sink: a.sink, inv: a.inv}
	for t := range pl.stages {
		st := &pl.stages[t]
		pa.m, pa.s, pa.v = st.m, st.s, v
		pa.tw = st.tw
		if a.inv {
			pa.tw = st.twInv
		}
		// Input side.
		pa.scale = nil
		if t == 0 {
			pa.src, pa.ss, pa.inLen = a.src, a.ss, a.inLen
			if a.scale != nil {
				if st.r == 4 && T > 1 {
					pa.scale, pa.sstride = a.scale, a.sstride
				} else {
					// No fused kernel: scale into w2, which stage 0 does not otherwise use.
					for e := range n {
						d := a.w2[e*v : (e+1)*v]
						if e >= a.inLen {
							clear(d)
							continue
						}
						x, h := a.src[e*a.ss:e*a.ss+v], a.scale[e*a.sstride:e*a.sstride+v]
						for j := range d {
							d[j] = scaleC(h[j], x[j])
						}
					}
					pa.src, pa.ss, pa.inLen = a.w2, v, n
				}
			}
		} else {
			if t%2 == 1 {
				pa.src = a.w1
			} else {
				pa.src = a.w2
			}
			pa.ss, pa.inLen = v, n
		}
		// Output side. A single-pass transform goes through w1 too, because the kernels may
		// not run in place (src and dst may be the same memory).
		if t == T-1 && T > 1 {
			pa.dst, pa.ds, pa.outLen = a.dst, a.ds, a.outLen
		} else {
			if t%2 == 0 {
				pa.dst = a.w1
			} else {
				pa.dst = a.w2
			}
			pa.ds, pa.outLen = v, n
		}
		pa.run(st.r)
	}
	if T == 1 {
		for e := range min(a.outLen, n) {
			copy(a.dst[e*a.ds:e*a.ds+v], a.w1[e*v:(e+1)*v])
		}
	}
}

// passArgs is one Stockham pass over a batch of v-vectors; see stage and blockArgs.
type passArgs struct {
	dst, src      []complex128
	ds, ss        int
	m, s, v       int
	inLen, outLen int
	zero, sink    []complex128
	tw            []complex128
	inv           bool
	scale         []float64 // see blockArgs; only ever set for a radix-4 first pass
	sstride       int
}

// run dispatches to the radix-specific kernel. Contiguous passes are collapsed: the s
// sub-sequences of v-vectors are then one sub-sequence of (s·v)-vectors, which gives the inner
// loops the longest possible contiguous run and a constant twiddle factor. A pruned pass can be
// collapsed when its limits fall on whole collapsed elements and zero and sink are long enough.
func (a *passArgs) run(r int) {
	n := r * a.m * a.s
	if s := a.s; s > 1 && a.ss == a.v && a.ds == a.v && a.scale == nil {
		aligned := func(l int) bool { return l >= n || l%s == 0 }
		full := a.inLen >= n && a.outLen >= n
		if aligned(a.inLen) && aligned(a.outLen) && (full || min(len(a.zero), len(a.sink)) >= s*a.v) {
			a.v *= s
			a.ss, a.ds = a.v, a.v
			a.inLen, a.outLen = min(a.inLen, n)/s, min(a.outLen, n)/s
			a.s = 1
			n /= s
		}
	}
	if a.v == 1 && a.s == 1 && a.ss == 1 && a.ds == 1 && a.outLen >= n && a.scale == nil {
		if a.inLen < n {
			if r == 4 && !a.inv && a.inLen <= 2*a.m {
				scalar4Pruned(a.dst[:n], a.src[:max(a.inLen, 0)], a.m, a.tw)
				return
			}
			goto vector
		}
		switch r {
		case 2:
			scalar2(a.dst[:n], a.src[:n], a.tw, a.inv)
		case 3:
			scalar3(a.dst[:n], a.src[:n], a.tw, a.inv)
		case 4:
			scalar4(a.dst[:n], a.src[:n], a.tw, a.inv)
		case 5:
			scalar5(a.dst[:n], a.src[:n], a.tw, a.inv)
		default:
			panic("fft: internal error: unsupported radix")
		}
		return
	}
vector:
	switch r {
	case 2:
		vector2(a)
	case 3:
		vector3(a)
	case 4:
		vector4(a)
	case 5:
		vector5(a)
	default:
		panic("fft: internal error: unsupported radix")
	}
}

// in returns input element e, or zeros if it lies in the pruned (zero) part of the input.
func (a *passArgs) in(e int) []complex128 {
	if e >= a.inLen {
		return a.zero[:a.v:a.v]
	}
	o := e * a.ss
	return a.src[o : o+a.v : o+a.v]
}

// scaleOf returns the scale factors of input element e (any valid slice for a pruned element,
// whose input is zero).
func (a *passArgs) scaleOf(e int) []float64 {
	if e >= a.inLen {
		e = 0
	}
	o := e * a.sstride
	return a.scale[o : o+a.v : o+a.v]
}

// out returns output element e, or a scratch sink if it lies in the pruned part of the output.
func (a *passArgs) out(e int) []complex128 {
	if e >= a.outLen {
		return a.sink[:a.v:a.v]
	}
	o := e * a.ds
	return a.dst[o : o+a.v : o+a.v]
}
