package bands_test

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/bands"
	"lamina/lattice"
)

func valleys(t *testing.T, st lattice.Stack, p lattice.Params, u []float64) []bands.Hamiltonian {
	return []bands.Hamiltonian{mustCont(t, st, p, bands.K, u), mustCont(t, st, p, bands.KPrime, u)}
}

// Monolayer: DOS = g|E|/(2π(ħv)²) and n(μ) = g μ|μ|/(4π(ħv)²) with g = 4 (spin, valley)
// (Castro Neto et al., Rev. Mod. Phys. 81, 109 (2009), Eq. (14) and the text after it; from
// memory). The triangle method is exact for bands linear on each triangle; the cone's curvature
// makes the chord overestimate E by about ħv h²/(8k) on a triangle of size h at distance k, a
// relative error of about (h/k)²/4 in n and DOS, which sets the tolerance.
func TestMonolayerDOS(t *testing.T) {
	p := lattice.Minimal()
	hs := valleys(t, mustStack(t, "A"), p, nil)
	hv := p.HbarV()
	ctx := context.Background()
	es := []float64{-0.3, -0.1, 0.05, 0.2, 0.4}
	dos, err := bands.DensityOfStates(ctx, hs, es, bands.DOSOptions{})
	require.NoError(t, err)
	n, err := bands.CarrierDensity(ctx, hs, es, bands.DOSOptions{})
	require.NoError(t, err)
	h := 2 * 1.5 / 240 // default grid spacing
	for i, e := range es {
		k := math.Abs(e) / hv
		tol := (h/k)*(h/k)/4 + 1e-4
		assert.InEpsilon(t, 4*math.Abs(e)/(2*math.Pi*hv*hv), dos[i], tol, "DOS E=%g", e)
		assert.InEpsilon(t, 4*e*math.Abs(e)/(4*math.Pi*hv*hv), n[i], tol, "n E=%g", e)
	}
	// Charge neutrality at μ = 0 exactly (particle-hole symmetric grid).
	n0, err := bands.CarrierDensity(ctx, hs, []float64{0}, bands.DOSOptions{})
	require.NoError(t, err)
	assert.InDelta(t, 0, n0[0], 1e-12)
}

// Bilayer, two-band regime: DOS = g m/(2πħ²) = γ1/(π(ħv)²) with m = γ1/(2v²) (McCann &
// Fal'ko, PRL 96, 086805 (2006); Hwang & Das Sarma, PRL 101, 156802 (2008); from memory). The
// four-band DOS exceeds the two-band value by a relative O(E/γ1): within 3% at E = 5 meV.
// Also dn/dμ = DOS (Gaussian broadening and triangle method agree on a smooth band).
func TestBilayerDOS(t *testing.T) {
	p := lattice.Minimal()
	hs := valleys(t, mustStack(t, "AB"), p, nil)
	ctx := context.Background()
	opt := bands.DOSOptions{KMax: 0.4, Grid: 401}
	dos, err := bands.DensityOfStates(ctx, hs, []float64{0.005, 0.02}, opt)
	require.NoError(t, err)
	want := p.Gamma1 / (math.Pi * p.HbarV() * p.HbarV())
	assert.InEpsilon(t, want, dos[0], 0.03)

	const de = 1e-3
	n, err := bands.CarrierDensity(ctx, hs, []float64{0.02 - de, 0.02 + de}, opt)
	require.NoError(t, err)
	assert.InEpsilon(t, dos[1], (n[1]-n[0])/(2*de), 2e-3, "dn/dμ = DOS")

	opt.Broadening = 2e-3
	dosG, err := bands.DensityOfStates(ctx, hs, []float64{0.02}, opt)
	require.NoError(t, err)
	assert.InEpsilon(t, dos[1], dosG[0], 1e-2, "Gaussian vs triangle")
}

func TestDOSErrors(t *testing.T) {
	hs := valleys(t, mustStack(t, "AB"), lattice.Minimal(), nil)
	ctx := context.Background()
	_, err := bands.DensityOfStates(ctx, hs, []float64{0}, bands.DOSOptions{Broadening: -1})
	assert.Error(t, err)
	_, err = bands.DensityOfStates(ctx, hs, []float64{0}, bands.DOSOptions{Grid: 2})
	assert.Error(t, err)
	_, err = bands.CarrierDensity(ctx, nil, []float64{0}, bands.DOSOptions{})
	assert.Error(t, err)
	mixed := []bands.Hamiltonian{hs[0], valleys(t, mustStack(t, "ABA"), lattice.Minimal(), nil)[0]}
	_, err = bands.CarrierDensity(ctx, mixed, []float64{0}, bands.DOSOptions{})
	assert.ErrorContains(t, err, "mixed")
}

// TriangleFilling is the occupied fraction of a linear band on a triangle: check against
// Monte Carlo free reasoning: symmetric cases and continuity.
func TestTriangleFilling(t *testing.T) {
	assert.Equal(t, 0.0, bands.TriangleFilling(-1, 0, 1, 2))
	assert.Equal(t, 1.0, bands.TriangleFilling(3, 0, 1, 2))
	// Corner energies 0, 1, 2: the level E = 1 passes through the middle vertex and splits the
	// triangle into halves of equal area (the median from that vertex).
	assert.InDelta(t, 0.5, bands.TriangleFilling(1, 0, 1, 2), 1e-15)
	assert.InDelta(t, 0.5, bands.TriangleFilling(1, 2, 0, 1), 1e-15)
	// Degenerate corners.
	assert.InDelta(t, 0.25, bands.TriangleFilling(0.5, 0, 1, 1), 1e-15)
	assert.InDelta(t, 0.75, bands.TriangleFilling(0.5, 0, 0, 1), 1e-15)
}
