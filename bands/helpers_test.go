package bands_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/require"

	"lamina/bands"
	"lamina/lattice"
)

func mustStack(t testing.TB, s string) lattice.Stack {
	t.Helper()
	st, err := lattice.ParseStack(s)
	require.NoError(t, err)
	return st
}

func mustCont(t testing.TB, st lattice.Stack, p lattice.Params, v bands.Valley, u []float64) *bands.Continuum {
	t.Helper()
	h, err := bands.NewContinuum(st, p, v, u)
	require.NoError(t, err)
	return h
}

func values(t testing.TB, h bands.Hamiltonian, kx, ky float64) []float64 {
	t.Helper()
	s, err := bands.NewSolver(h.Dim())
	require.NoError(t, err)
	e, err := s.Values(h, kx, ky)
	require.NoError(t, err)
	return append([]float64(nil), e...)
}

// linearU returns layer potentials rising linearly from -du/2 on layer 1 to +du/2 on layer n.
func linearU(n int, du float64) []float64 {
	u := make([]float64, n)
	for l := range u {
		if n > 1 {
			u[l] = -du/2 + du*float64(l)/float64(n-1)
		}
	}
	return u
}

// bilayerExact is the spectrum of the biased bilayer with γ0, γ1 and ∓U/2 only:
// E² = γ1²/2 + U²/4 + (ħvk)² ± sqrt(γ1⁴/4 + (ħvk)²(γ1² + U²)) (McCann, PRB 74, 161403(R)
// (2006); McCann & Koshino, Rep. Prog. Phys. 76, 056503 (2013); from memory, and checked
// numerically in shared/references.md 2.2).
func bilayerExact(g1, u, hvk float64) []float64 {
	a := g1*g1/2 + u*u/4 + hvk*hvk
	b := math.Sqrt(g1*g1*g1*g1/4 + hvk*hvk*(g1*g1+u*u))
	lo, hi := math.Sqrt(a-b), math.Sqrt(a+b)
	return []float64{-hi, -lo, lo, hi}
}
