package fft

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// evenKernel is a random real kernel on the difference grid |di| < l1, |dj| < l2 with
// K(di, dj) = K(−di, −dj) exactly.
type evenKernel struct {
	l1, l2 int
	v      []float64
}

func newEvenKernel(rng *rand.Rand, l1, l2 int) *evenKernel {
	k := &evenKernel{l1: l1, l2: l2, v: make([]float64, (2*l1-1)*(2*l2-1))}
	for di := -(l1 - 1); di < l1; di++ {
		for dj := -(l2 - 1); dj < l2; dj++ {
			if di > 0 || (di == 0 && dj >= 0) {
				x := rng.NormFloat64()
				k.v[k.idx(di, dj)], k.v[k.idx(-di, -dj)] = x, x
			}
		}
	}
	return k
}

func (k *evenKernel) idx(di, dj int) int { return (di+k.l1-1)*(2*k.l2-1) + dj + k.l2 - 1 }

func (k *evenKernel) at(di, dj int) float64 { return k.v[k.idx(di, dj)] }

// sumAbs is Σ_d |K(d)|, so that (sumAbs·max|in|) bounds every output of the convolution.
func (k *evenKernel) sumAbs() float64 {
	s := 0.0
	for _, x := range k.v {
		s += math.Abs(x)
	}
	return s
}

// directConv is the reference: the defining O((l1·l2)²) double sum
// out[i][j] = Σ_{i',j'} K(i−i', j−j')·in[i'][j'].
func directConv(k func(di, dj int) float64, in []complex128, l1, l2 int) []complex128 {
	out := make([]complex128, l1*l2)
	for i := range l1 {
		for j := range l2 {
			var s complex128
			for i2 := range l1 {
				for j2 := range l2 {
					s += complex(k(i-i2, j-j2), 0) * in[i2*l2+j2]
				}
			}
			out[i*l2+j] = s
		}
	}
	return out
}

// convTol is the allowed max|got − want| / (Σ|K|·max|in|). The denominator bounds every output;
// the padded-FFT convolution has relative rounding O(ε·log₂(p1·p2)) ≈ 2e-15 for the grids here
// and the direct sum O(ε·√(l1·l2)); 1e-13 leaves more than 50 times headroom, while any
// indexing or wrap-around error gives O(1).
const convTol = 1e-13

func convErr(t *testing.T, got, want []complex128, k *evenKernel, in []complex128) float64 {
	t.Helper()
	require.Len(t, got, len(want))
	d := 0.0
	for i := range got {
		d = math.Max(d, cmplx.Abs(got[i]-want[i]))
	}
	return d / (k.sumAbs() * maxAbs(in))
}

var convShapes = [][2]int{{1, 1}, {1, 5}, {5, 1}, {2, 3}, {5, 7}, {8, 8}, {12, 9}, {16, 3}, {13, 10}, {3, 24}, {32, 24}, {48, 40}}

func TestPaddedSize(t *testing.T) {
	for l, want := range map[int]int{1: 1, 2: 3, 3: 6, 4: 8, 5: 9, 7: 16, 8: 16, 12: 24, 13: 27, 24: 48,
		48: 96, 49: 108, 96: 192, 100: 216, 192: 384, 193: 384 + 48} {
		assert.Equal(t, want, PaddedSize(l), "l=%d", l)
		p := PaddedSize(l)
		assert.True(t, p >= 2*l-1 && smooth(p), "l=%d p=%d", l, p)
		assert.True(t, smooth23(p), "l=%d p=%d has a factor other than 2 and 3", l, p)
	}
	for _, l := range []int{0, -1, maxLen/4 + 1, math.MaxInt} {
		assert.Zero(t, PaddedSize(l), "l=%d is not a valid axis length", l)
	}
	// Minimality, against a linear search.
	for l := 1; l <= 300; l++ {
		p := 2*l - 1
		for !smooth23(p) {
			p++
		}
		assert.Equal(t, p, PaddedSize(l), "l=%d", l)
	}
}

func smooth23(n int) bool {
	for n%2 == 0 {
		n /= 2
	}
	for n%3 == 0 {
		n /= 3
	}
	return n == 1
}

func TestConvolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 1))
	for _, sh := range convShapes {
		l1, l2 := sh[0], sh[1]
		t.Run(fmt.Sprintf("%dx%d", l1, l2), func(t *testing.T) {
			c, err := NewConvolver(l1, l2)
			require.NoError(t, err)
			g1, g2 := c.Size()
			require.Equal(t, [2]int{l1, l2}, [2]int{g1, g2})
			p1, p2 := c.PaddedSize()
			require.Equal(t, [2]int{PaddedSize(l1), PaddedSize(l2)}, [2]int{p1, p2})

			k := newEvenKernel(rng, l1, l2)
			require.NoError(t, c.SetKernel(k.at))
			in := randComplex(rng, l1*l2)
			want := directConv(k.at, in, l1, l2)

			got := make([]complex128, l1*l2)
			require.NoError(t, c.Convolve(got, in))
			assert.Less(t, convErr(t, got, want, k, in), convTol, "Convolve vs direct sum")

			t.Run("dst aliases src", func(t *testing.T) {
				x := append([]complex128(nil), in...)
				require.NoError(t, c.Convolve(x, x))
				assert.Less(t, convErr(t, x, want, k, in), convTol)
			})
			t.Run("repeat gives the same result", func(t *testing.T) {
				again := make([]complex128, l1*l2)
				require.NoError(t, c.Convolve(again, in))
				assert.Equal(t, got, again, "no state may leak between calls")
			})
			t.Run("ConvolveReal2 vs Convolve", func(t *testing.T) {
				a, b := make([]float64, l1*l2), make([]float64, l1*l2)
				ca, cb := make([]complex128, l1*l2), make([]complex128, l1*l2)
				for i := range a {
					a[i], b[i] = rng.NormFloat64(), rng.NormFloat64()
					ca[i], cb[i] = complex(a[i], 0), complex(b[i], 0)
				}
				wa, wb := make([]complex128, l1*l2), make([]complex128, l1*l2)
				require.NoError(t, c.Convolve(wa, ca))
				require.NoError(t, c.Convolve(wb, cb))
				// Both sides are padded-FFT convolutions of the same size, so they agree to
				// rounding; the scale Σ|K|·max|a| bounds every output. See convTol.
				scale := k.sumAbs() * math.Max(maxAbs(ca), maxAbs(cb))
				da, db := make([]float64, l1*l2), make([]float64, l1*l2)
				require.NoError(t, c.ConvolveReal2(da, db, a, b))
				for i := range da {
					require.InDelta(t, real(wa[i]), da[i], convTol*scale, "A[%d]", i)
					require.InDelta(t, real(wb[i]), db[i], convTol*scale, "B[%d]", i)
					// The convolution of a real field with a real kernel is real.
					require.InDelta(t, 0, imag(wa[i]), convTol*scale, "imag A[%d]", i)
				}
				// In place: dstA = a, dstB = b.
				require.NoError(t, c.ConvolveReal2(a, b, a, b))
				assert.Equal(t, da, a)
				assert.Equal(t, db, b)
			})
		})
	}
}

func TestConvolveMulti(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 1))
	for _, sh := range [][2]int{{5, 7}, {12, 9}, {24, 24}} {
		l1, l2 := sh[0], sh[1]
		t.Run(fmt.Sprintf("%dx%d", l1, l2), func(t *testing.T) {
			c, err := NewConvolver(l1, l2)
			require.NoError(t, err)
			var eks []*evenKernel
			var ks []*Kernel
			for range 4 {
				ek := newEvenKernel(rng, l1, l2)
				k, err := c.NewKernel(ek.at)
				require.NoError(t, err)
				gl1, gl2 := k.Size()
				require.Equal(t, [2]int{l1, l2}, [2]int{gl1, gl2})
				eks, ks = append(eks, ek), append(ks, k)
			}
			in := randComplex(rng, l1*l2)
			for _, nk := range []int{1, 3, 4, 2, 0} { // growing, then shrinking the kernel count
				t.Run(fmt.Sprintf("kernels=%d", nk), func(t *testing.T) {
					dsts := make([][]complex128, nk)
					for i := range dsts {
						dsts[i] = make([]complex128, l1*l2)
					}
					require.NoError(t, c.ConvolveMulti(dsts, in, ks[:nk]))
					for i := range nk {
						want := directConv(eks[i].at, in, l1, l2)
						assert.Less(t, convErr(t, dsts[i], want, eks[i], in), convTol, "kernel %d vs direct sum", i)
						one := make([]complex128, l1*l2)
						require.NoError(t, c.ConvolveWith(ks[i], one, in))
						// The shared forward transform is bitwise the one ConvolveWith computes
						// and the per-kernel steps are identical, so the results are identical.
						assert.Equal(t, one, dsts[i], "kernel %d vs ConvolveWith", i)
					}
				})
			}
			t.Run("first dst aliases src", func(t *testing.T) {
				x := append([]complex128(nil), in...)
				other := make([]complex128, l1*l2)
				require.NoError(t, c.ConvolveMulti([][]complex128{x, other}, x, ks[:2]))
				for i, d := range [][]complex128{x, other} {
					want := directConv(eks[i].at, in, l1, l2)
					assert.Less(t, convErr(t, d, want, eks[i], in), convTol, "kernel %d", i)
				}
			})
		})
	}
}

func TestConvolveSpecialKernels(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 1))
	const l1, l2 = 9, 16
	c, err := NewConvolver(l1, l2)
	require.NoError(t, err)
	in := randComplex(rng, l1*l2)
	out := make([]complex128, l1*l2)

	t.Run("delta kernel is the identity", func(t *testing.T) {
		require.NoError(t, c.SetKernel(func(di, dj int) float64 {
			if di == 0 && dj == 0 {
				return 1
			}
			return 0
		}))
		require.NoError(t, c.Convolve(out, in))
		// Forward and inverse transform round trip only: see fftTol.
		assert.Less(t, relErr(t, out, in), fftTol)
	})
	t.Run("constant kernel sums the field", func(t *testing.T) {
		require.NoError(t, c.SetKernel(func(di, dj int) float64 { return 2.5 }))
		require.NoError(t, c.Convolve(out, in))
		var sum complex128
		for _, v := range in {
			sum += v
		}
		for i, v := range out {
			// Every output is 2.5·Σin; rounding O(ε·log N) relative to Σ|K|·max|in| = 2.5·N·max|in|.
			assert.InDelta(t, 0, cmplx.Abs(v-2.5*sum), 1e-13*2.5*float64(l1*l2)*maxAbs(in), "out[%d]", i)
		}
	})
	t.Run("shift kernel moves the field by one row", func(t *testing.T) {
		// K(di, dj) = 1 for (di, dj) = ±(1, 0): out[i] = in[i−1] + in[i+1] (missing rows are zero).
		require.NoError(t, c.SetKernel(func(di, dj int) float64 {
			if (di == 1 || di == -1) && dj == 0 {
				return 1
			}
			return 0
		}))
		require.NoError(t, c.Convolve(out, in))
		for i := range l1 {
			for j := range l2 {
				var want complex128
				if i > 0 {
					want += in[(i-1)*l2+j]
				}
				if i < l1-1 {
					want += in[(i+1)*l2+j]
				}
				// Two-term sums after a round trip: see fftTol, on a scale of 2·max|in|.
				assert.InDelta(t, 0, cmplx.Abs(out[i*l2+j]-want), fftTol*2*maxAbs(in), "(%d,%d)", i, j)
			}
		}
	})
	t.Run("kernel is evaluated once per offset, only inside the difference grid", func(t *testing.T) {
		seen := map[[2]int]int{}
		require.NoError(t, c.SetKernel(func(di, dj int) float64 {
			seen[[2]int{di, dj}]++
			return 1 / (1 + math.Hypot(float64(di), float64(dj)))
		}))
		assert.Len(t, seen, (2*l1-1)*(2*l2-1))
		for d, n := range seen {
			assert.Equal(t, 1, n, "offset %v", d)
			assert.True(t, d[0] > -l1 && d[0] < l1 && d[1] > -l2 && d[1] < l2, "offset %v", d)
		}
	})
	t.Run("rounding-level asymmetry is accepted and averaged", func(t *testing.T) {
		k := newEvenKernel(rng, l1, l2)
		require.NoError(t, c.SetKernel(func(di, dj int) float64 {
			v := k.at(di, dj)
			if di > 0 {
				v *= 1 + 1e-14 // well inside kernelEvenTol
			}
			return v
		}))
		require.NoError(t, c.Convolve(out, in))
		// The kernel differs from k by ≤ 1e-14 relative, within convTol.
		assert.Less(t, convErr(t, out, directConv(k.at, in, l1, l2), k, in), convTol)
	})
}

func TestConvolverErrors(t *testing.T) {
	hasPrefix := func(t *testing.T, err error) {
		t.Helper()
		require.Error(t, err)
		assert.True(t, strings.HasPrefix(err.Error(), "fft: "), err.Error())
	}
	t.Run("sizes", func(t *testing.T) {
		for _, sh := range [][2]int{{0, 3}, {3, 0}, {-1, 2}, {2, -5}, {maxLen, 2}, {1 << 16, 1 << 16}} {
			c, err := NewConvolver(sh[0], sh[1])
			hasPrefix(t, err)
			assert.Nil(t, c)
			assert.True(t, errors.Is(err, ErrSize))
		}
	})
	const l1, l2 = 4, 5
	c, err := NewConvolver(l1, l2)
	require.NoError(t, err)
	x := make([]complex128, l1*l2)
	r := make([]float64, l1*l2)
	t.Run("no kernel yet", func(t *testing.T) {
		hasPrefix(t, c.Convolve(x, x))
		hasPrefix(t, c.ConvolveReal2(r, r, r, r))
		hasPrefix(t, c.ConvolveWith(nil, x, x))
		hasPrefix(t, c.ConvolveMulti([][]complex128{x}, x, []*Kernel{nil}))
	})
	good := func(di, dj int) float64 { return float64(di*di + dj*dj) }
	require.NoError(t, c.SetKernel(good))
	t.Run("bad kernels keep the previous one", func(t *testing.T) {
		in := make([]complex128, l1*l2)
		in[7] = 1
		before := make([]complex128, l1*l2)
		require.NoError(t, c.Convolve(before, in))
		bad := map[string]func(di, dj int) float64{
			"NaN":  func(di, dj int) float64 { return math.NaN() },
			"+Inf": func(di, dj int) float64 { return math.Inf(1) },
			"-Inf at one offset": func(di, dj int) float64 {
				if di == 3 && dj == -4 {
					return math.Inf(-1)
				}
				return 1
			},
			"odd":        func(di, dj int) float64 { return float64(di) },
			"not even":   func(di, dj int) float64 { return float64(di*di + dj) },
			"asymmetric": func(di, dj int) float64 { return 1 + 1e-6*float64(max(di, 0)) },
			"nil":        nil,
		}
		for name, k := range bad {
			t.Run(name, func(t *testing.T) {
				hasPrefix(t, c.SetKernel(k))
				kn, err := c.NewKernel(k)
				hasPrefix(t, err)
				assert.Nil(t, kn)
				after := make([]complex128, l1*l2)
				require.NoError(t, c.Convolve(after, in))
				assert.Equal(t, before, after)
			})
		}
	})
	t.Run("lengths", func(t *testing.T) {
		short, long := make([]complex128, l1*l2-1), make([]complex128, l1*l2+1)
		for _, pair := range [][2][]complex128{{short, x}, {x, short}, {long, x}, {x, long}, {nil, x}} {
			hasPrefix(t, c.Convolve(pair[0], pair[1]))
		}
		rs := make([]float64, l1*l2-1)
		hasPrefix(t, c.ConvolveReal2(rs, r, r, r))
		hasPrefix(t, c.ConvolveReal2(r, rs, r, r))
		hasPrefix(t, c.ConvolveReal2(r, r, rs, r))
		hasPrefix(t, c.ConvolveReal2(r, r, r, rs))
		k, err := c.NewKernel(good)
		require.NoError(t, err)
		hasPrefix(t, c.ConvolveMulti([][]complex128{x, x}, x, []*Kernel{k}))
		hasPrefix(t, c.ConvolveMulti([][]complex128{x, short}, x, []*Kernel{k, k}))
		hasPrefix(t, c.ConvolveMulti([][]complex128{x}, short, []*Kernel{k}))
		hasPrefix(t, c.ConvolveMulti([][]complex128{x, x}, x, []*Kernel{k, nil}))
	})
	t.Run("kernel of another grid", func(t *testing.T) {
		c2, err := NewConvolver(l2, l1)
		require.NoError(t, err)
		k2, err := c2.NewKernel(good)
		require.NoError(t, err)
		hasPrefix(t, c.ConvolveWith(k2, x, x))
		hasPrefix(t, c.ConvolveReal2With(k2, r, r, r, r))
	})
}

func TestUninitialised(t *testing.T) {
	// Zero values and nil pointers report errors instead of panicking.
	x := make([]complex128, 4)
	r := make([]float64, 4)
	var np *Plan
	var np2 *Plan2D
	var nc *Convolver
	var nk *Kernel
	for name, err := range map[string]error{
		"nil Plan":            np.Forward(x),
		"zero Plan":           (&Plan{}).Inverse(x),
		"nil Plan2D":          np2.Forward(x),
		"zero Plan2D":         (&Plan2D{}).Inverse(x),
		"nil Convolver":       nc.Convolve(x, x),
		"zero Convolver":      (&Convolver{}).Convolve(x, x),
		"zero ConvolveWith":   (&Convolver{}).ConvolveWith(nil, x, x),
		"zero ConvolveMulti":  (&Convolver{}).ConvolveMulti(nil, x, nil),
		"zero ConvolveReal2":  (&Convolver{}).ConvolveReal2(r, r, r, r),
		"zero ConvolveReal2W": (&Convolver{}).ConvolveReal2With(nil, r, r, r, r),
		"zero SetKernel":      (&Convolver{}).SetKernel(func(int, int) float64 { return 0 }),
		"zero Kernel in use":  func() error { c, _ := NewConvolver(2, 2); return c.ConvolveWith(&Kernel{}, x, x) }(),
		"zero NewKernel":      func() error { _, err := (&Convolver{}).NewKernel(func(int, int) float64 { return 0 }); return err }(),
	} {
		require.Error(t, err, name)
		assert.True(t, strings.HasPrefix(err.Error(), "fft: "), err.Error())
	}
	assert.Zero(t, np.Len())
	gx, gy := np2.Size()
	assert.Zero(t, gx+gy)
	gx, gy = nc.Size()
	assert.Zero(t, gx+gy)
	gx, gy = nc.PaddedSize()
	assert.Zero(t, gx+gy)
	gx, gy = nk.Size()
	assert.Zero(t, gx+gy)
}

func TestKernelSharedAcrossGoroutines(t *testing.T) {
	// A Kernel is read-only: Convolvers in different goroutines may use it at the same time.
	rng := rand.New(rand.NewPCG(14, 1))
	const l1, l2, workers = 20, 16, 4
	c0, err := NewConvolver(l1, l2)
	require.NoError(t, err)
	ek := newEvenKernel(rng, l1, l2)
	k, err := c0.NewKernel(ek.at)
	require.NoError(t, err)
	ins := make([][]complex128, workers)
	outs := make([][]complex128, workers)
	for w := range ins {
		ins[w] = randComplex(rng, l1*l2)
		outs[w] = make([]complex128, l1*l2)
	}
	var wg sync.WaitGroup
	errs := make([]error, workers)
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			c, err := NewConvolver(l1, l2)
			if err != nil {
				errs[w] = err
				return
			}
			for range 20 {
				if errs[w] = c.ConvolveWith(k, outs[w], ins[w]); errs[w] != nil {
					return
				}
			}
		}()
	}
	wg.Wait()
	for w := range workers {
		require.NoError(t, errs[w])
		want := make([]complex128, l1*l2)
		require.NoError(t, c0.ConvolveWith(k, want, ins[w]))
		assert.Equal(t, want, outs[w], "worker %d", w)
	}
}

func TestConvolverNoAllocations(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 1))
	for _, sh := range [][2]int{{12, 9}, {48, 48}} {
		l1, l2 := sh[0], sh[1]
		t.Run(fmt.Sprintf("%dx%d", l1, l2), func(t *testing.T) {
			c, err := NewConvolver(l1, l2)
			require.NoError(t, err)
			ek := newEvenKernel(rng, l1, l2)
			require.NoError(t, c.SetKernel(ek.at))
			k, err := c.NewKernel(ek.at)
			require.NoError(t, err)
			x := randComplex(rng, l1*l2)
			y := make([]complex128, l1*l2)
			a, b := make([]float64, l1*l2), make([]float64, l1*l2)
			dsts := [][]complex128{make([]complex128, l1*l2), make([]complex128, l1*l2), y}
			ks := []*Kernel{k, k, k}
			require.NoError(t, c.ConvolveMulti(dsts, x, ks)) // sizes the per-kernel buffers once
			assert.Zero(t, testing.AllocsPerRun(10, func() { _ = c.Convolve(y, x) }), "Convolve")
			assert.Zero(t, testing.AllocsPerRun(10, func() { _ = c.ConvolveWith(k, y, x) }), "ConvolveWith")
			assert.Zero(t, testing.AllocsPerRun(10, func() { _ = c.ConvolveReal2(a, b, a, b) }), "ConvolveReal2")
			assert.Zero(t, testing.AllocsPerRun(10, func() { _ = c.ConvolveMulti(dsts, x, ks) }), "ConvolveMulti")
			assert.Zero(t, testing.AllocsPerRun(5, func() { _ = c.SetKernel(ek.at) }), "SetKernel again")
		})
	}
}
