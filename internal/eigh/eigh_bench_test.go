package eigh

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// benchSizes are the orders benchmarked; numpy_baseline.py measures the same ones.
var benchSizes = []int{2, 4, 8, 12, 16, 24}

// benchPool returns a seeded pool of 64 random Hermitian n×n matrices with entries as in
// numpy_baseline.py (real and imaginary parts uniform in [-1, 1)).
func benchPool(n int) [][]complex128 {
	rng := rand.New(rand.NewPCG(2024, uint64(n)))
	pool := make([][]complex128, 64)
	for i := range pool {
		pool[i] = randHermitian(rng, n)
	}
	return pool
}

// BenchmarkEigen measures one op = eigenvalues and eigenvectors of one n×n matrix.
func BenchmarkEigen(b *testing.B) {
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			pool := benchPool(n)
			ws, err := NewWorkspace(n)
			if err != nil {
				b.Fatal(err)
			}
			w := make([]float64, n)
			z := make([]complex128, n*n)
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				if err := ws.Eigen(w, z, pool[i&63]); err != nil {
					b.Fatal(err)
				}
				i++
			}
		})
	}
}

// BenchmarkValues measures one op = eigenvalues only of one n×n matrix.
func BenchmarkValues(b *testing.B) {
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			pool := benchPool(n)
			ws, err := NewWorkspace(n)
			if err != nil {
				b.Fatal(err)
			}
			w := make([]float64, n)
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				if err := ws.Values(w, pool[i&63]); err != nil {
					b.Fatal(err)
				}
				i++
			}
		})
	}
}
