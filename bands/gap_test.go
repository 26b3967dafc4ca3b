package bands_test

import (
	"context"
	"math"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/bands"
	"lamina/lattice"
)

// Biased bilayer, minimal model: the K-point gap is |U| and the true gap is
// |U| γ1 / sqrt(γ1² + U²) at ħvk* = (|U|/2) sqrt((U² + 2γ1²)/(U² + γ1²)) (McCann, PRB 74,
// 161403(R) (2006); formulas from memory, checked numerically in shared/references.md 2.2,
// which lists E_g = 96.707 meV for U = 0.1 eV, γ1 = 0.38 eV and 307.52 meV for U = 0.5 eV,
// γ1 = 0.39 eV). The global search must find it to 1e-8 relative.
func TestBilayerGap(t *testing.T) {
	cases := []struct{ g1, U, ref float64 }{
		{0.38, 0.1, 0.096707},
		{0.38, 0.3, 0.23546},
		{0.39, 0.5, 0.30752},
		{0.39, -0.02, math.NaN()},
	}
	for _, tc := range cases {
		p := lattice.Minimal()
		p.Gamma1 = tc.g1
		st := mustStack(t, "AB")
		h := mustCont(t, st, p, bands.K, []float64{-tc.U / 2, tc.U / 2})
		e0 := values(t, h, 0, 0)
		assert.InDelta(t, math.Abs(tc.U), e0[2]-e0[1], 1e-14, "K-point gap U=%g", tc.U)

		g, err := bands.FindGap(context.Background(), h, bands.GapOptions{})
		require.NoError(t, err)
		want := math.Abs(tc.U) * tc.g1 / math.Hypot(tc.g1, tc.U)
		assert.InEpsilon(t, want, g.Gap, 1e-8, "U=%g", tc.U)
		assert.InEpsilon(t, want, g.Direct, 1e-8, "U=%g (direct = indirect by symmetry)", tc.U)
		if !math.IsNaN(tc.ref) {
			assert.InEpsilon(t, tc.ref, g.Gap, 1e-4, "published value U=%g", tc.U) // 5 digits quoted
		}
		kstar := math.Abs(tc.U) / 2 * math.Sqrt((tc.U*tc.U+2*tc.g1*tc.g1)/(tc.U*tc.U+tc.g1*tc.g1)) / p.HbarV()
		// The band edge is quadratic in k, so an energy accurate to 1e-8 locates k* to ~1e-4.
		assert.InEpsilon(t, kstar, math.Hypot(g.KV.X, g.KV.Y), 1e-3, "valence edge on the ring k*")
		assert.InEpsilon(t, kstar, math.Hypot(g.KC.X, g.KC.Y), 1e-3, "conduction edge on the ring k*")
		assert.False(t, g.Semimetal())
	}
}

// With the full graphite set an ABA trilayer is a semimetal (its bands overlap) while an ABC
// trilayer in a perpendicular field has a gap (Koshino & McCann, PRB 79, 125443 (2009);
// Koshino, PRB 81, 125304 (2010); experiment: Bao et al., Nature Phys. 7, 948 (2011), Lui et al.,
// Nature Phys. 7, 944 (2011)). Partoens & Peeters, PRB 74, 075404 (2006) find N >= 3 Bernal
// stacks clearly semimetallic.
func TestTrilayerSemimetalVersusGap(t *testing.T) {
	ctx := context.Background()
	p := lattice.Graphite()
	aba := mustCont(t, mustStack(t, "ABA"), p, bands.K, nil)
	g, err := bands.FindGap(ctx, aba, bands.GapOptions{})
	require.NoError(t, err)
	assert.True(t, g.Semimetal(), "ABA trilayer overlap %g eV", g.Overlap())
	// The band-index overlap is small (0.4 meV with this set: the monolayer-like valence top,
	// at -γ2/2 = +10 meV at K, hybridises with the bilayer-like conduction band), but far above
	// the ~1e-12 eV accuracy of the refined band edges.
	assert.Greater(t, g.Overlap(), 1e-4)
	assert.Less(t, g.Overlap(), 0.1)
	abc := mustCont(t, mustStack(t, "ABC"), p, bands.K, linearU(3, 0.1))
	g, err = bands.FindGap(ctx, abc, bands.GapOptions{})
	require.NoError(t, err)
	assert.False(t, g.Semimetal())
	assert.Greater(t, g.Gap, 0.01)
	assert.Less(t, g.Gap, 0.1)

	// In the minimal model the unbiased ABA trilayer is gapless: the bands touch at K.
	min := mustCont(t, mustStack(t, "ABA"), lattice.Minimal(), bands.K, nil)
	g0, err := bands.FindGap(ctx, min, bands.GapOptions{})
	require.NoError(t, err)
	assert.InDelta(t, 0, g0.Indirect, 1e-12)
}

// ABA trilayer in a field. Minimal model: the field hybridises the linear and parabolic bands but
// leaves them gapless (Koshino & McCann, PRB 79, 125443 (2009); Koshino, PRB 81, 125304 (2010)).
// With the remote couplings the two bands anticross with a small hybridisation gap, "largely
// independent of the gate field", at a momentum that grows with the field (arXiv 0809.0983v1
// abstract, the preprint of the same paper).
func TestABATrilayerInField(t *testing.T) {
	ctx := context.Background()
	prevK := 0.0
	for _, du := range []float64{0.05, 0.1, 0.2, 0.4} {
		h := mustCont(t, mustStack(t, "ABA"), lattice.Minimal(), bands.K, linearU(3, du))
		g, err := bands.FindGap(ctx, h, bands.GapOptions{})
		require.NoError(t, err)
		// The touching is linear in k, so a simplex accurate to 1e-9 of the grid spacing leaves
		// a residual gap of order ħv·1e-9·Δk, far below 1e-8 eV.
		assert.InDelta(t, 0, g.Direct, 1e-8, "minimal du=%g", du)
		assert.LessOrEqual(t, g.Indirect, 1e-8, "minimal du=%g", du)

		h = mustCont(t, mustStack(t, "ABA"), lattice.Graphite(), bands.K, linearU(3, du))
		g, err = bands.FindGap(ctx, h, bands.GapOptions{})
		require.NoError(t, err)
		k := math.Hypot(g.KDirect.X, g.KDirect.Y)
		assert.Greater(t, g.Direct, 1e-3, "graphite du=%g: hybridisation gap", du)
		assert.Less(t, g.Direct, 0.01, "graphite du=%g: hybridisation gap stays small", du)
		assert.Greater(t, k, prevK, "graphite du=%g: anticrossing moves out", du)
		prevK = k
	}

}

// With γ3 the bilayer's low-energy bands touch at four points: one at K and three satellites at
// ħvk ≈ γ1 γ3/γ0 (= γ1 v3/v), 120° apart (Lifshitz transition; McCann & Fal'ko, PRL 96, 086805
// (2006); McCann & Koshino, Rep. Prog. Phys. 76, 056503 (2013); formula from memory, two-band
// model, so the four-band positions may differ by a few per cent).
func TestBilayerTrigonalWarping(t *testing.T) {
	p := lattice.Minimal()
	p.Gamma3 = 0.315
	h := mustCont(t, mustStack(t, "AB"), p, bands.K, nil)
	kL := p.Gamma1 * p.Gamma3 / p.Gamma0 / p.HbarV()
	s, err := bands.NewSolver(4)
	require.NoError(t, err)
	gapAt := func(x, y float64) float64 {
		e, err := s.Values(h, x, y)
		require.NoError(t, err)
		return e[2] - e[1]
	}
	// Scan a disk of radius 2 kL on a polar grid for local minima of the direct gap that are
	// (numerically) zero.
	type pt struct{ x, y, g float64 }
	const nr, na = 200, 360
	grid := make([][]float64, nr+1)
	for i := range grid {
		grid[i] = make([]float64, na)
		r := 2 * kL * float64(i) / nr
		for j := range na {
			th := 2 * math.Pi * float64(j) / na
			grid[i][j] = gapAt(r*math.Cos(th), r*math.Sin(th))
		}
	}
	var zeros []pt
	if grid[0][0] < 1e-12 {
		zeros = append(zeros, pt{0, 0, grid[0][0]})
	}
	for i := 1; i < nr; i++ {
		for j := range na {
			g := grid[i][j]
			if g > grid[i-1][j] || g > grid[i+1][j] || g > grid[i][(j+1)%na] || g > grid[i][(j+na-1)%na] {
				continue
			}
			r := 2 * kL * float64(i) / nr
			th := 2 * math.Pi * float64(j) / na
			zeros = append(zeros, pt{r * math.Cos(th), r * math.Sin(th), g})
		}
	}
	require.Len(t, zeros, 4, "four Dirac points")
	assert.InDelta(t, 0, zeros[0].g, 1e-12, "Dirac point at K")
	var angles []float64
	for _, z := range zeros[1:] {
		r := math.Hypot(z.x, z.y)
		assert.InEpsilon(t, kL, r, 0.05, "satellite radius")
		// On the grid the gap at a satellite is at most the slope times the grid spacing.
		assert.Less(t, z.g, 2*p.HbarV()*2*kL/nr)
		angles = append(angles, math.Atan2(z.y, z.x))
	}
	sort.Float64s(angles)
	assert.InDelta(t, 2*math.Pi/3, angles[1]-angles[0], 0.02)
	assert.InDelta(t, 2*math.Pi/3, angles[2]-angles[1], 0.02)
}

func TestFindGapErrors(t *testing.T) {
	h := mustCont(t, mustStack(t, "AB"), lattice.Minimal(), bands.K, nil)
	ctx := context.Background()
	_, err := bands.FindGap(ctx, h, bands.GapOptions{Occupied: 4})
	assert.ErrorContains(t, err, "occupied")
	_, err = bands.FindGap(ctx, h, bands.GapOptions{KMax: math.NaN()})
	assert.ErrorContains(t, err, "KMax")
	_, err = bands.FindGap(ctx, h, bands.GapOptions{Radial: 1})
	assert.Error(t, err)
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	_, err = bands.FindGap(cctx, h, bands.GapOptions{})
	assert.ErrorIs(t, err, context.Canceled)
}

// The full-zone model gives the same gap as the continuum model near K for a small bias, and
// the same at K and K' (time reversal).
func TestFindGapFullZone(t *testing.T) {
	p := lattice.Minimal()
	st := mustStack(t, "AB")
	u := []float64{-0.05, 0.05}
	z, err := bands.NewFullZone(st, p, u)
	require.NoError(t, err)
	kx, ky := z.ValleyPoint(bands.K)
	kx2, ky2 := z.ValleyPoint(bands.KPrime)
	g, err := bands.FindGap(context.Background(), z, bands.GapOptions{Centers: []bands.KPoint{{kx, ky}, {kx2, ky2}}, KMax: 0.5})
	require.NoError(t, err)
	want := 0.1 * p.Gamma1 / math.Hypot(p.Gamma1, 0.1) / 2 * 2
	want = 0.1 / 1 * p.Gamma1 / math.Hypot(p.Gamma1, 0.1)
	// Lattice corrections at ħvk* ≈ 0.05 eV are O((ka)²) ≈ 1e-3 relative.
	assert.InEpsilon(t, want, g.Gap, 3e-3)
}
