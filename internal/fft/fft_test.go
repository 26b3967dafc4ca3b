package fft

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/dsp/fourier"
)

// ---------------------------------------------------------------- reference implementations

// naiveDFT is the O(n²) textbook DFT, y_k = Σ_j x_j exp(sign·2πi·jk/n). Its twiddles come from
// math.Sincos of the angle reduced modulo 2π with integer arithmetic (jk mod n), independent of
// the package's own twiddle code.
func naiveDFT(x []complex128, sign float64) []complex128 {
	n := len(x)
	w := make([]complex128, n)
	for j := range w {
		sn, cs := math.Sincos(2 * math.Pi * float64(j) / float64(n))
		w[j] = complex(cs, sign*sn)
	}
	y := make([]complex128, n)
	for k := range n {
		var s complex128
		for j, xj := range x {
			s += xj * w[j*k%n]
		}
		y[k] = s
	}
	return y
}

// naiveDFT2 is the separable 2D DFT of the row-major nx×ny array x built from naiveDFT: naive
// DFTs of all rows, then of all columns (O(nx·ny·(nx+ny)), no FFT involved).
func naiveDFT2(x []complex128, nx, ny int, sign float64) []complex128 {
	y := make([]complex128, nx*ny)
	for i := range nx {
		copy(y[i*ny:(i+1)*ny], naiveDFT(x[i*ny:(i+1)*ny], sign))
	}
	col := make([]complex128, nx)
	for j := range ny {
		for i := range nx {
			col[i] = y[i*ny+j]
		}
		c := naiveDFT(col, sign)
		for i := range nx {
			y[i*ny+j] = c[i]
		}
	}
	return y
}

// directDFT2 is the 2D DFT written as one O((nx·ny)²) double sum, used to validate naiveDFT2.
func directDFT2(x []complex128, nx, ny int, sign float64) []complex128 {
	y := make([]complex128, nx*ny)
	for k := range nx {
		for l := range ny {
			var s complex128
			for i := range nx {
				for j := range ny {
					ph := float64(i*k%nx)/float64(nx) + float64(j*l%ny)/float64(ny)
					sn, cs := math.Sincos(2 * math.Pi * ph)
					s += x[i*ny+j] * complex(cs, sign*sn)
				}
			}
			y[k*ny+l] = s
		}
	}
	return y
}

// gonumFFT2 is the forward 2D transform made of gonum's dsp/fourier CmplxFFT applied to every
// row and then to every column.
func gonumFFT2(x []complex128, nx, ny int) []complex128 {
	y := append([]complex128(nil), x...)
	fr := fourier.NewCmplxFFT(ny)
	for i := range nx {
		fr.Coefficients(y[i*ny:(i+1)*ny], y[i*ny:(i+1)*ny])
	}
	fc := fourier.NewCmplxFFT(nx)
	col := make([]complex128, nx)
	for j := range ny {
		for i := range nx {
			col[i] = y[i*ny+j]
		}
		fc.Coefficients(col, col)
		for i := range nx {
			y[i*ny+j] = col[i]
		}
	}
	return y
}

func randComplex(rng *rand.Rand, n int) []complex128 {
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	return x
}

func maxAbs(x []complex128) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, cmplx.Abs(v))
	}
	return m
}

// relErr is max_i |got_i − want_i| / max_i |want_i|.
func relErr(t *testing.T, got, want []complex128) float64 {
	t.Helper()
	require.Len(t, got, len(want))
	d := 0.0
	for i := range got {
		d = math.Max(d, cmplx.Abs(got[i]-want[i]))
	}
	if m := maxAbs(want); m > 0 {
		return d / m
	}
	return d
}

// dftTol bounds relErr between this package's transforms and the naive DFT. The naive sum
// accumulates at worst O(n·ε) ≈ 1e-13 relative error for n ≤ 1000 (ε = 1.1e-16), the FFT
// O(ε·log n); 1e-12 leaves ten times that headroom, while a wrong twiddle factor or index gives
// errors of order one.
const dftTol = 1e-12

// fftTol bounds relErr between two O(n log n) transforms (round trips, gonum comparison,
// linearity): both are accurate to O(ε·log n) ≈ 1e-15 relative, so 1e-13 has ample headroom.
const fftTol = 1e-13

var smoothSizes = []int{1, 2, 3, 4, 5, 6, 8, 9, 10, 12, 15, 16, 18, 20, 24, 25, 27, 30, 32, 36, 45,
	48, 60, 64, 80, 81, 96, 100, 125, 128, 144, 192, 243, 250, 256, 375, 384, 512, 625, 768, 1000}

// ---------------------------------------------------------------- helpers

func TestSmoothAndRadices(t *testing.T) {
	t.Run("smooth", func(t *testing.T) {
		for n := -3; n <= 200; n++ {
			m := n
			for _, p := range []int{2, 3, 5} {
				for m > 0 && m%p == 0 {
					m /= p
				}
			}
			assert.Equal(t, n > 0 && m == 1, smooth(n), "n=%d", n)
		}
	})
	t.Run("radices multiply to n", func(t *testing.T) {
		for n := 1; n <= 5000; n++ {
			if !smooth(n) {
				continue
			}
			prod := 1
			for _, r := range radices(n) {
				assert.Contains(t, []int{2, 3, 4, 5}, r)
				prod *= r
			}
			assert.Equal(t, n, prod, "n=%d", n)
		}
	})
	t.Run("first radix is 4 when 4 divides n", func(t *testing.T) {
		// The pruned first pass of the Convolver relies on a leading radix-4 pass for even
		// padded sizes that are multiples of 4.
		for _, n := range []int{4, 12, 96, 192, 384, 768} {
			assert.Equal(t, 4, radices(n)[0], "n=%d", n)
		}
	})
}

func TestCossin(t *testing.T) {
	t.Run("exact at multiples of a quarter turn", func(t *testing.T) {
		for _, n := range []int{4, 8, 12, 384, 1000} {
			for q := -4; q <= 8; q++ {
				c, s := cossin(q*n/4, n)
				want := [][2]float64{{1, 0}, {0, 1}, {-1, 0}, {0, -1}}[((q%4)+4)%4]
				assert.Equal(t, want[0], c, "n=%d q=%d", n, q)
				assert.Equal(t, want[1], s, "n=%d q=%d", n, q)
			}
		}
	})
	t.Run("agrees with math.Sincos", func(t *testing.T) {
		// Reference: math.Sincos(2πj/n) directly. Both are within about one ulp of the true
		// values; the unreduced argument 2πj/n ≤ 2π carries a rounding error of up to
		// 2π·2⁻⁵³ ≈ 7e-16, so the two may differ by about 1e-15.
		const tol = 2e-15
		for _, n := range []int{3, 5, 7, 96, 384, 1000, 4096} {
			for j := range n {
				c, s := cossin(j, n)
				ws, wc := math.Sincos(2 * math.Pi * float64(j) / float64(n))
				assert.InDelta(t, wc, c, tol, "n=%d j=%d", n, j)
				assert.InDelta(t, ws, s, tol, "n=%d j=%d", n, j)
			}
		}
	})
}

// ---------------------------------------------------------------- 1D

func TestPlan1D(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for _, n := range smoothSizes {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			p, err := NewPlan(n)
			require.NoError(t, err)
			require.Equal(t, n, p.Len())
			x := randComplex(rng, n)

			// Forward against the naive O(n²) DFT.
			y := append([]complex128(nil), x...)
			require.NoError(t, p.Forward(y))
			assert.Less(t, relErr(t, y, naiveDFT(x, -1)), dftTol, "forward vs naive DFT")

			// Inverse against the naive O(n²) DFT with the + sign, divided by n.
			z := append([]complex128(nil), x...)
			require.NoError(t, p.Inverse(z))
			want := naiveDFT(x, +1)
			for i := range want {
				want[i] /= complex(float64(n), 0)
			}
			assert.Less(t, relErr(t, z, want), dftTol, "inverse vs naive DFT")

			// Round trip.
			require.NoError(t, p.Inverse(y))
			assert.Less(t, relErr(t, y, x), fftTol, "Inverse(Forward(x))")
		})
	}
}

func TestPlan1DAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 1))
	for _, n := range []int{1024, 1536, 2048, 3000, 4096, 6561, 15625, 16384} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			p, err := NewPlan(n)
			require.NoError(t, err)
			x := randComplex(rng, n)
			y := append([]complex128(nil), x...)
			require.NoError(t, p.Forward(y))
			// Reference: gonum's dsp/fourier CmplxFFT (FFTPACK), same sign and no scaling.
			want := fourier.NewCmplxFFT(n).Coefficients(nil, x)
			assert.Less(t, relErr(t, y, want), fftTol, "forward vs gonum CmplxFFT")
		})
	}
}

func TestPlan1DProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 1))
	for _, n := range []int{1, 6, 64, 96, 125, 384} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			p, err := NewPlan(n)
			require.NoError(t, err)
			t.Run("impulse gives a constant", func(t *testing.T) {
				x := make([]complex128, n)
				x[0] = 2 - 3i
				require.NoError(t, p.Forward(x))
				for k := range x {
					// Exact: every butterfly only adds zeros or multiplies by twiddles of a
					// zero, except the path of x[0], which is multiplied by exact ones.
					assert.Equal(t, complex(2, -3), x[k], "k=%d", k)
				}
			})
			t.Run("shifted impulse gives a twiddle", func(t *testing.T) {
				x := make([]complex128, n)
				x[1%n] = 1
				require.NoError(t, p.Forward(x))
				for k := range x {
					sn, cs := math.Sincos(2 * math.Pi * float64(k%n) / float64(n))
					// A few roundings of the twiddle products: 1e-14 absolute on |X_k| = 1.
					assert.InDelta(t, 0, cmplx.Abs(x[k]-complex(cs, -sn)), 1e-14, "k=%d", k)
				}
			})
			t.Run("Parseval", func(t *testing.T) {
				x := randComplex(rng, n)
				e := 0.0
				for _, v := range x {
					e += real(v)*real(v) + imag(v)*imag(v)
				}
				require.NoError(t, p.Forward(x))
				eh := 0.0
				for _, v := range x {
					eh += real(v)*real(v) + imag(v)*imag(v)
				}
				// Sums of n squares, relative rounding O(ε·log n); 1e-13 relative.
				assert.InEpsilon(t, float64(n)*e, eh, 1e-13)
			})
		})
	}
}

// TestPrunedBatch drives the internal batched transform directly, for every radix and both radix
// orders, with strided (v = 3 interleaved transforms, elements 5 numbers apart) and contiguous
// (v = 1) layouts, zero (never read) input tails, discarded output tails, and an input scale
// array, against the naive DFT.
func TestPrunedBatch(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 1))
	orders := map[string]func(int) []int{"radices": radices, "pruned": prunedRadices}
	for _, n := range []int{1, 2, 3, 4, 5, 6, 8, 9, 12, 16, 24, 40, 96, 384} {
		for oname, order := range orders {
			pl, err := newPlan1Order(n, order)
			require.NoError(t, err)
			for _, lay := range [][2]int{{3, 5}, {1, 1}} {
				v, stride := lay[0], lay[1]
				for _, cut := range [][2]int{{n, n}, {(n + 1) / 2, n}, {n, (n + 1) / 2}, {1, 1}, {(n + 2) / 3, (2*n + 2) / 3}, {0, n}} {
					inLen, outLen := cut[0], cut[1]
					for _, inv := range []bool{false, true} {
						for _, scaled := range []bool{false, true} {
							name := fmt.Sprintf("n=%d/%s/v=%d/in=%d/out=%d/inv=%v/scaled=%v", n, oname, v, inLen, outLen, inv, scaled)
							t.Run(name, func(t *testing.T) {
								src := randComplex(rng, n*stride)
								// Poison the pruned part of the input: it must never be read.
								for e := inLen; e < n; e++ {
									for j := range v {
										src[e*stride+j] = cmplx.NaN()
									}
								}
								var scale []float64
								if scaled {
									scale = make([]float64, n*stride)
									for i := range scale {
										scale[i] = rng.NormFloat64()
									}
								}
								dst := make([]complex128, n*stride)
								for i := range dst {
									dst[i] = 7
								}
								a := blockArgs{dst: dst, src: src, ds: stride, ss: stride, v: v, inLen: inLen, outLen: outLen,
									w1: make([]complex128, n*v), w2: make([]complex128, n*v),
									zero: make([]complex128, n*v), sink: make([]complex128, n*v), inv: inv,
									scale: scale, sstride: stride}
								pl.transform(&a)
								sign := -1.0
								if inv {
									sign = 1
								}
								for j := range v {
									x := make([]complex128, n)
									for e := range inLen {
										x[e] = src[e*stride+j]
										if scaled {
											x[e] *= complex(scale[e*stride+j], 0)
										}
									}
									want := naiveDFT(x, sign)
									got := make([]complex128, outLen)
									for e := range outLen {
										got[e] = dst[e*stride+j]
									}
									// See dftTol.
									assert.Less(t, relErr(t, got, want[:outLen]), dftTol, "transform %d vs naive DFT", j)
								}
								// Everything outside the requested output elements is untouched.
								for i, d := range dst {
									if e, j := i/stride, i%stride; e < outLen && j < v {
										continue
									}
									require.Equal(t, complex(7, 0), d, "dst[%d] overwritten", i)
								}
							})
						}
					}
				}
			}
		}
	}
}

// ---------------------------------------------------------------- 2D

func TestPlan2D(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 1))
	var shapes [][2]int
	for _, n := range []int{1, 2, 3, 4, 6, 8, 9, 12, 16, 18, 24, 27, 32, 36, 48, 64, 96, 128, 192} {
		shapes = append(shapes, [2]int{n, n})
	}
	shapes = append(shapes, [][2]int{{1, 16}, {16, 1}, {3, 64}, {64, 3}, {5, 12}, {10, 25}, {24, 36},
		{128, 6}, {7 + 1, 9}, {9, 17 + 1}, {2, 384}, {45, 20}}...)
	for _, sh := range shapes {
		nx, ny := sh[0], sh[1]
		t.Run(fmt.Sprintf("%dx%d", nx, ny), func(t *testing.T) {
			p, err := NewPlan2D(nx, ny)
			require.NoError(t, err)
			gx, gy := p.Size()
			require.Equal(t, [2]int{nx, ny}, [2]int{gx, gy})
			x := randComplex(rng, nx*ny)

			y := append([]complex128(nil), x...)
			require.NoError(t, p.Forward(y))
			// Reference: separable naive DFT (row DFTs then column DFTs); see dftTol.
			assert.Less(t, relErr(t, y, naiveDFT2(x, nx, ny, -1)), dftTol, "forward vs naive DFT")

			z := append([]complex128(nil), x...)
			require.NoError(t, p.Inverse(z))
			want := naiveDFT2(x, nx, ny, +1)
			for i := range want {
				want[i] /= complex(float64(nx*ny), 0)
			}
			assert.Less(t, relErr(t, z, want), dftTol, "inverse vs naive DFT")

			require.NoError(t, p.Inverse(y))
			assert.Less(t, relErr(t, y, x), fftTol, "Inverse(Forward(x))")
		})
	}
}

func TestNaiveDFT2MatchesDirectSum(t *testing.T) {
	// Validates the separable reference itself against the 2D DFT written as one double sum.
	rng := rand.New(rand.NewPCG(6, 1))
	for _, sh := range [][2]int{{1, 1}, {4, 6}, {9, 8}, {5, 3}} {
		t.Run(fmt.Sprintf("%dx%d", sh[0], sh[1]), func(t *testing.T) {
			x := randComplex(rng, sh[0]*sh[1])
			// Two naive sums of at most 72 terms: both within 1e-14 relative.
			assert.Less(t, relErr(t, naiveDFT2(x, sh[0], sh[1], -1), directDFT2(x, sh[0], sh[1], -1)), 1e-13)
		})
	}
}

func TestPlan2DAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 1))
	for _, sh := range [][2]int{{256, 256}, {384, 192}, {128, 512}, {243, 100}, {384, 384}} {
		nx, ny := sh[0], sh[1]
		t.Run(fmt.Sprintf("%dx%d", nx, ny), func(t *testing.T) {
			p, err := NewPlan2D(nx, ny)
			require.NoError(t, err)
			x := randComplex(rng, nx*ny)
			y := append([]complex128(nil), x...)
			require.NoError(t, p.Forward(y))
			// Reference: gonum's dsp/fourier CmplxFFT applied row by row, then column by column.
			assert.Less(t, relErr(t, y, gonumFFT2(x, nx, ny)), fftTol, "forward vs gonum")
			require.NoError(t, p.Inverse(y))
			assert.Less(t, relErr(t, y, x), fftTol, "round trip")
		})
	}
}

func TestPlan2DProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 1))
	for _, sh := range [][2]int{{8, 8}, {12, 9}, {96, 64}, {192, 192}} {
		nx, ny := sh[0], sh[1]
		p, err := NewPlan2D(nx, ny)
		require.NoError(t, err)
		N := nx * ny
		t.Run(fmt.Sprintf("%dx%d/linearity", nx, ny), func(t *testing.T) {
			x, y := randComplex(rng, N), randComplex(rng, N)
			al, be := complex(0.3, -1.7), complex(-2.1, 0.4)
			z := make([]complex128, N)
			for i := range z {
				z[i] = al*x[i] + be*y[i]
			}
			require.NoError(t, p.Forward(x))
			require.NoError(t, p.Forward(y))
			require.NoError(t, p.Forward(z))
			want := make([]complex128, N)
			for i := range want {
				want[i] = al*x[i] + be*y[i]
			}
			// See fftTol.
			assert.Less(t, relErr(t, z, want), fftTol)
		})
		t.Run(fmt.Sprintf("%dx%d/Parseval", nx, ny), func(t *testing.T) {
			x := randComplex(rng, N)
			e := 0.0
			for _, v := range x {
				e += real(v)*real(v) + imag(v)*imag(v)
			}
			require.NoError(t, p.Forward(x))
			eh := 0.0
			for _, v := range x {
				eh += real(v)*real(v) + imag(v)*imag(v)
			}
			// Sums of N squares, relative rounding O(ε·log N); 1e-13 relative.
			assert.InEpsilon(t, float64(N)*e, eh, 1e-13)
		})
		t.Run(fmt.Sprintf("%dx%d/plane wave", nx, ny), func(t *testing.T) {
			k0, l0 := 1%nx, (ny/2+1)%ny
			x := make([]complex128, N)
			for i := range nx {
				for j := range ny {
					ph := float64(i*k0%nx)/float64(nx) + float64(j*l0%ny)/float64(ny)
					sn, cs := math.Sincos(2 * math.Pi * ph)
					x[i*ny+j] = complex(cs, sn)
				}
			}
			require.NoError(t, p.Forward(x))
			for i, v := range x {
				want := 0.0
				if i == k0*ny+l0 {
					want = float64(N)
				}
				// All energy in one bin; the rest cancels to rounding, O(ε·N) absolute at most.
				assert.InDelta(t, 0, cmplx.Abs(v-complex(want, 0)), 1e-10, "bin %d", i)
			}
		})
	}
}

// ---------------------------------------------------------------- errors and allocation

func TestPlanErrors(t *testing.T) {
	t.Run("NewPlan", func(t *testing.T) {
		for _, n := range []int{0, -1, -8, 7, 14, 11 * 64, 49, maxLen * 2, math.MaxInt} {
			p, err := NewPlan(n)
			require.Error(t, err, "n=%d", n)
			assert.Nil(t, p)
			assert.True(t, errors.Is(err, ErrSize))
			assert.True(t, strings.HasPrefix(err.Error(), "fft: "), err.Error())
		}
	})
	t.Run("NewPlan2D", func(t *testing.T) {
		for _, sh := range [][2]int{{0, 4}, {4, 0}, {-2, 4}, {4, 7}, {7, 4}, {maxLen, maxLen}, {math.MaxInt, 2}} {
			p, err := NewPlan2D(sh[0], sh[1])
			require.Error(t, err, "%v", sh)
			assert.Nil(t, p)
			assert.True(t, errors.Is(err, ErrSize))
			assert.True(t, strings.HasPrefix(err.Error(), "fft: "), err.Error())
		}
	})
	t.Run("wrong lengths", func(t *testing.T) {
		p, err := NewPlan(8)
		require.NoError(t, err)
		p2, err := NewPlan2D(4, 6)
		require.NoError(t, err)
		for _, n := range []int{0, 7, 9, 24} {
			x := make([]complex128, n)
			for _, e := range []error{p.Forward(x), p.Inverse(x)} {
				require.Error(t, e, "Plan(8) given length %d", n)
				assert.True(t, strings.HasPrefix(e.Error(), "fft: "), e.Error())
			}
		}
		for _, n := range []int{0, 6, 8, 23, 25} {
			x := make([]complex128, n)
			for _, e := range []error{p2.Forward(x), p2.Inverse(x)} {
				require.Error(t, e, "Plan2D(4, 6) given length %d", n)
				assert.True(t, strings.HasPrefix(e.Error(), "fft: "), e.Error())
			}
		}
		require.Error(t, p2.Forward(nil))
	})
}

func TestNoAllocations(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 1))
	for _, n := range []int{12, 128, 384} {
		t.Run(fmt.Sprintf("Plan/n=%d", n), func(t *testing.T) {
			p, err := NewPlan(n)
			require.NoError(t, err)
			x := randComplex(rng, n)
			assert.Zero(t, testing.AllocsPerRun(20, func() { _ = p.Forward(x) }))
			assert.Zero(t, testing.AllocsPerRun(20, func() { _ = p.Inverse(x) }))
		})
	}
	for _, sh := range [][2]int{{12, 9}, {128, 128}, {192, 96}} {
		t.Run(fmt.Sprintf("Plan2D/%dx%d", sh[0], sh[1]), func(t *testing.T) {
			p, err := NewPlan2D(sh[0], sh[1])
			require.NoError(t, err)
			x := randComplex(rng, sh[0]*sh[1])
			assert.Zero(t, testing.AllocsPerRun(10, func() { _ = p.Forward(x) }))
			assert.Zero(t, testing.AllocsPerRun(10, func() { _ = p.Inverse(x) }))
		})
	}
}
