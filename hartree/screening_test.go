package hartree_test

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/hartree"
	"lamina/lattice"
)

// Exchange with the bare Coulomb interaction overestimates the spontaneous bilayer gap; static
// RPA screening by the neutral stack (whose band touching has a finite density of states,
// Π(q→0) = ln4 · g m/(2πħ²), Hwang & Das Sarma, PRL 101, 156802 (2008)) suppresses it by far more
// than an order of magnitude, for a suspended (ε = 1) and an encapsulated (ε = 4) bilayer alike.
// Measured on this grid (ħvΛ = 0.15 eV, 48 points): bare 95 / 58 meV, RPA 0.017 / 0.001 meV. The
// measured suspended-bilayer gap is about 2 meV (Velasco et al., Nature Nanotech. 7, 156 (2012)):
// static RPA of the symmetric state over-screens, bare exchange under-screens.
func TestRPAScreeningSuppressesGap(t *testing.T) {
	st := stack(t, "AB")
	gap := func(in hartree.Interaction) float64 {
		mf := hartree.MeanField{Device: hartree.Device{Stack: st, Params: lattice.Minimal()}, Grid: 48, Cutoff: 0.15, Interaction: in}
		r := hfSolve(t, hfSolver(t, mf), hartree.PatternSeed(laf, hartree.Linear, 0.01))
		return r.GapRefined
	}
	for _, eps := range []float64{1, 4} {
		bare := gap(hartree.Interaction{Eps: eps, Screening: hartree.Unscreened})
		rpa := gap(hartree.Interaction{Eps: eps})
		t.Logf("ε = %g: bare %.3f meV, RPA %.5f meV", eps, 1e3*bare, 1e3*rpa)
		require.Greater(t, bare, 0.005)
		assert.Less(t, rpa, bare/10, "ε = %g", eps)
	}
}

// Thomas-Fermi screening is monotonic: a larger screening wave vector never raises the gap.
func TestThomasFermiMonotonic(t *testing.T) {
	st := stack(t, "AB")
	prev := math.Inf(1)
	for _, q := range []float64{0.01, 0.1, 0.3} {
		mf := hartree.MeanField{Device: hartree.Device{Stack: st, Params: lattice.Minimal()}, Grid: 32, Cutoff: 0.5,
			Interaction: hartree.Interaction{Eps: 4, Screening: hartree.ThomasFermi, QTF: q}}
		r := hfSolve(t, hfSolver(t, mf), hartree.PatternSeed(laf, hartree.Linear, 0))
		assert.Less(t, r.GapRefined, prev, "q_TF = %g /nm", q)
		prev = r.GapRefined
	}
}

// The RPA kernel is built from Π of the stack: for a monolayer at neutrality Π = q/(4ħv)
// (Wunsch et al., New J. Phys. 8, 318 (2006)), so W = V/(1 + π α/2) with α = e²/(4πε0 ε ħv): the
// RPA exchange kernel equals the bare one divided by 1 + πα/2 (checked on the grid kernels,
// to the 0.1% accuracy of the tabulated Lindhard function).
func TestRPAKernelMonolayer(t *testing.T) {
	p := lattice.Minimal()
	st := stack(t, "A")
	kern := func(s hartree.Screening) []float64 {
		mf := hartree.MeanField{Device: hartree.Device{Stack: st, Params: p}, Grid: 16, Cutoff: 0.3, Interaction: hartree.Interaction{Eps: 2, Screening: s}}
		k, err := hartree.ExchangeKernelSample(mf, [][2]int{{1, 0}, {3, 2}, {7, 7}})
		require.NoError(t, err)
		return k
	}
	bare, rpa := kern(hartree.Unscreened), kern(hartree.RPA)
	alpha := lattice.CoulombEVnm / (2 * p.HbarV())
	for i := range bare {
		assert.InEpsilon(t, bare[i]/(1+math.Pi*alpha/2), rpa[i], 2e-3, "offset %d", i)
	}
}

// Mean-field transition temperatures: the order vanishes continuously with T and the bracket
// holds Tc; Tc grows with the number of Bernal layers from N = 2 to N = 4 (the trend measured by
// Nam et al., Science 362, 324 (2018)); for the bilayer, whose sector has a constant density of
// states, 2Δ(0)/(k_B Tc) is within 15% of the weak-coupling mean-field value 3.53 (common
// practice; measured 4.0 here, above it because the order parameter depends on k). For the
// tetralayer the ratio is lower (about 2): its gap is the smaller of two bilayer-like sectors'
// while Tc follows the larger.
func TestCriticalTemperature(t *testing.T) {
	tcOf := func(s string) *hartree.TcResult {
		mf := hartree.MeanField{Device: hartree.Device{Stack: stack(t, s), Params: lattice.Minimal()}, Grid: 32, Cutoff: 0.5,
			Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}}
		sv := hfSolver(t, mf)
		prof := hartree.Linear
		if len(s) > 2 {
			prof = hartree.Staggered
		}
		r := hfSolve(t, sv, hartree.PatternSeed(laf, prof, 0))
		res, err := sv.CriticalTemperature(context.Background(), r, hartree.TcOptions{})
		require.NoError(t, err)
		for _, p := range res.Curve {
			if p.T < res.Tc-res.Tol/2 {
				assert.Greater(t, p.Order, 0.01, "ordered below Tc (T = %g)", p.T)
			}
			if p.T > res.Tc+res.Tol/2 {
				assert.Less(t, p.Order, 0.01, "disordered above Tc (T = %g)", p.T)
			}
		}
		return res
	}
	bl := tcOf("AB")
	t.Logf("bilayer Tc = %.2f K, ratio %.3f", bl.Tc, bl.Ratio)
	assert.InEpsilon(t, 3.53, bl.Ratio, 0.15)
	if testing.Short() {
		return
	}
	tl := tcOf("ABAB")
	t.Logf("tetralayer Tc = %.2f K, ratio %.3f", tl.Tc, tl.Ratio)
	assert.Greater(t, tl.Tc, bl.Tc)
}

// Following the bilayer's ordered state in temperature: the gap and the order parameter fall
// monotonically and vanish above the Tc found by bisection (mean-field theory: a continuous
// transition).
func TestTemperatureSweep(t *testing.T) {
	mf := hartree.MeanField{Device: hartree.Device{Stack: stack(t, "AB"), Params: lattice.Minimal()}, Grid: 24, Cutoff: 0.5,
		Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}}
	sv := hfSolver(t, mf)
	r := hfSolve(t, sv, hartree.PatternSeed(laf, hartree.Linear, 0))
	res, err := sv.TemperatureSweep(context.Background(), r, []float64{10, 40, 70, 100, 130})
	require.NoError(t, err)
	require.Len(t, res, 5)
	prevGap := r.Gap
	for _, x := range res {
		require.True(t, x.Converged)
		assert.LessOrEqual(t, x.Gap, prevGap*(1+1e-9), "gap falls with T")
		prevGap = x.Gap
	}
	assert.Equal(t, "layer-antiferromagnet", res[0].Class)
	mag := func(r *hartree.HFResult) float64 {
		m := 0.0
		for _, p := range r.Order {
			m = math.Max(m, math.Abs(p.Dipole))
		}
		return m
	}
	assert.Less(t, mag(res[4]), 0.01*mag(r), "order gone at 130 K (Tc ≈ 100 K here)")
}
