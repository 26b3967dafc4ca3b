package fft

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/dsp/fourier"
)

// cpuClock measures process CPU time across a benchmark loop; see processCPU.
type cpuClock struct {
	t0 time.Duration
	ok bool
}

func startCPU() cpuClock {
	t, ok := processCPU()
	return cpuClock{t, ok}
}

// report adds the metric cpu-ns/op: process CPU time per iteration, comparable with numpy's
// process_time figures on a loaded machine, where ns/op (wall clock) also counts waiting.
func (c cpuClock) report(b *testing.B) {
	t, ok := processCPU()
	if c.ok && ok && b.N > 0 {
		b.ReportMetric(float64((t-c.t0).Nanoseconds())/float64(b.N), "cpu-ns/op")
	}
}

// fftMFlops is the conventional 5·N·log₂N flop count of a complex transform of N points,
// per second, in millions.
func fftMFlops(b *testing.B, n int) {
	N := float64(n)
	b.ReportMetric(5*N*math.Log2(N)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MFLOP/s")
}

// BenchmarkFFT2 is Plan2D.Forward on an n×n grid.
func BenchmarkFFT2(b *testing.B) {
	for _, n := range []int{64, 128, 192, 256} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			p, err := NewPlan2D(n, n)
			if err != nil {
				b.Fatal(err)
			}
			x := randComplex(rand.New(rand.NewPCG(1, uint64(n))), n*n)
			b.ReportAllocs()
			cpu := startCPU()
			for b.Loop() {
				if err := p.Forward(x); err != nil {
					b.Fatal(err)
				}
			}
			cpu.report(b)
			fftMFlops(b, n*n)
		})
	}
}

// BenchmarkFFT2Gonum is the same transform done with gonum's dsp/fourier CmplxFFT row by row
// and column by column (column copied out and back), for comparison.
func BenchmarkFFT2Gonum(b *testing.B) {
	for _, n := range []int{64, 128, 192, 256} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			f := fourier.NewCmplxFFT(n)
			x := randComplex(rand.New(rand.NewPCG(1, uint64(n))), n*n)
			col := make([]complex128, n)
			b.ReportAllocs()
			cpu := startCPU()
			for b.Loop() {
				for i := range n {
					f.Coefficients(x[i*n:(i+1)*n], x[i*n:(i+1)*n])
				}
				for j := range n {
					for i := range n {
						col[i] = x[i*n+j]
					}
					f.Coefficients(col, col)
					for i := range n {
						x[i*n+j] = col[i]
					}
				}
			}
			cpu.report(b)
			fftMFlops(b, n*n)
		})
	}
}

func benchConvolver(b *testing.B, l int) (*Convolver, []complex128) {
	c, err := NewConvolver(l, l)
	if err != nil {
		b.Fatal(err)
	}
	// A screened-Coulomb-like kernel; its values do not affect the timing.
	if err := c.SetKernel(func(di, dj int) float64 { return 1 / (1 + math.Hypot(float64(di), float64(dj))) }); err != nil {
		b.Fatal(err)
	}
	return c, randComplex(rand.New(rand.NewPCG(2, uint64(l))), l*l)
}

// BenchmarkConvolve is one complex-field convolution on an L×L grid (padded to PaddedSize(L)).
func BenchmarkConvolve(b *testing.B) {
	for _, l := range []int{48, 96, 192} {
		b.Run(fmt.Sprintf("L=%d", l), func(b *testing.B) {
			c, x := benchConvolver(b, l)
			y := make([]complex128, l*l)
			b.ReportAllocs()
			cpu := startCPU()
			for b.Loop() {
				if err := c.Convolve(y, x); err != nil {
					b.Fatal(err)
				}
			}
			cpu.report(b)
		})
	}
}

// BenchmarkConvolveReal2 is one call convolving two real fields.
func BenchmarkConvolveReal2(b *testing.B) {
	for _, l := range []int{96, 192} {
		b.Run(fmt.Sprintf("L=%d", l), func(b *testing.B) {
			c, x := benchConvolver(b, l)
			a, bb := make([]float64, l*l), make([]float64, l*l)
			for i, v := range x {
				a[i], bb[i] = real(v), imag(v)
			}
			b.ReportAllocs()
			cpu := startCPU()
			for b.Loop() {
				if err := c.ConvolveReal2(a, bb, a, bb); err != nil {
					b.Fatal(err)
				}
			}
			cpu.report(b)
		})
	}
}

// BenchmarkConvolveMulti is one source convolved with 4 kernels (compare with 4 × Convolve).
func BenchmarkConvolveMulti(b *testing.B) {
	for _, l := range []int{96, 192} {
		b.Run(fmt.Sprintf("L=%d/kernels=4", l), func(b *testing.B) {
			c, x := benchConvolver(b, l)
			ks := make([]*Kernel, 4)
			dsts := make([][]complex128, 4)
			for i := range ks {
				k, err := c.NewKernel(func(di, dj int) float64 {
					return math.Exp(-float64(i+1) * math.Hypot(float64(di), float64(dj)) / float64(l))
				})
				if err != nil {
					b.Fatal(err)
				}
				ks[i], dsts[i] = k, make([]complex128, l*l)
			}
			// The first call sizes the per-kernel buffers; later calls do not allocate.
			if err := c.ConvolveMulti(dsts, x, ks); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			cpu := startCPU()
			for b.Loop() {
				if err := c.ConvolveMulti(dsts, x, ks); err != nil {
					b.Fatal(err)
				}
			}
			cpu.report(b)
		})
	}
}
