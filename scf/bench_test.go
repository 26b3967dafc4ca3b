package scf_test

import (
	"context"
	"math/rand/v2"
	"strconv"
	"testing"

	"lamina/scf"
)

// benchmarkMixer measures one mixing step (one call of Next) in steady
// state: the history is full and each step sees a fresh (x, G(x)) pair from
// a seeded pool of random pairs, so the least-squares problem is well
// conditioned and no restart shortens it.
func benchmarkMixer(b *testing.B, m scf.Mixer) {
	for _, n := range []int{16, 1024} {
		b.Run("n="+strconv.Itoa(n), func(b *testing.B) {
			const pool = 64
			rnd := rand.New(rand.NewPCG(1, 2))
			xs, gs := make([][]float64, pool), make([][]float64, pool)
			for k := range pool {
				xs[k], gs[k] = make([]float64, n), make([]float64, n)
				for i := range n {
					xs[k][i] = rnd.NormFloat64()
					gs[k][i] = xs[k][i] + rnd.NormFloat64()
				}
			}
			mix, err := m.Start(n)
			if err != nil {
				b.Fatal(err)
			}
			dst := make([]float64, n)
			for k := range 16 { // fill the history
				if _, err := mix.Next(dst, xs[k], gs[k]); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportAllocs()
			k := 0
			for b.Loop() {
				if _, err := mix.Next(dst, xs[k%pool], gs[k%pool]); err != nil {
					b.Fatal(err)
				}
				k++
			}
		})
	}
}

// BenchmarkAnderson: one op is one Anderson step with the default depth 8.
func BenchmarkAnderson(b *testing.B) { benchmarkMixer(b, scf.Anderson{}) }

// BenchmarkLinear: one op is one linear-mixing step, for comparison.
func BenchmarkLinear(b *testing.B) { benchmarkMixer(b, scf.Linear{}) }

// BenchmarkSolve: one op is a whole Solve of the 30-dimensional tanh
// problem of TestSolveNonlinear with default settings (evaluations of G
// included).
func BenchmarkSolve(b *testing.B) {
	tm := newTanhMap(b, 30, -6, 0.5, 42)
	p := tm.problem()
	x0 := make([]float64, 30)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := scf.Solve(context.Background(), p, x0, scf.Settings{Tol: 1e-10}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkAndersonNormal: the normal-equations mode, depth 8.
func BenchmarkAndersonNormal(b *testing.B) { benchmarkMixer(b, scf.Anderson{Normal: true}) }
