package hartree_test

import (
	"context"
	"runtime"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/hartree"
	"lamina/lattice"
)

// Results are bitwise identical for GOMAXPROCS 1, 2 and 8 (with the default worker count, which
// follows GOMAXPROCS): every k-point writes its own slot and every sum runs in a fixed order.
func TestGOMAXPROCSIndependence(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	type out struct {
		hU, hN  []float64
		hfE     float64
		hfU     []float64
		hfSigma []complex128
		chern   [hartree.Flavors]float64
	}
	var results []out
	for _, procs := range []int{1, 2, 8} {
		runtime.GOMAXPROCS(procs)
		h, err := hartree.Solve(context.Background(), hartree.Device{Stack: stack(t, "ABC"), Params: lattice.Minimal()},
			hartree.Conditions{Field: hartree.Field{D: 0.4, N: 0.01}}, hartree.Options{})
		require.NoError(t, err)
		mf := hartree.MeanField{Device: hartree.Device{Stack: stack(t, "AB"), Params: lattice.Minimal()}, Grid: 20, Cutoff: 0.5,
			Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}, Field: hartree.Field{D: 0.05}}
		r := hfSolve(t, hfSolver(t, mf), hartree.PatternSeed(qah, hartree.Linear, 0))
		results = append(results, out{h.U, h.Density, r.Energy, r.U, r.State.Sigma, r.Chern})
	}
	for i := 1; i < len(results); i++ {
		assert.Equal(t, results[0], results[i], "GOMAXPROCS run %d differs", i)
	}
}
