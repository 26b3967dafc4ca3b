package hartree

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"lamina/bands"
	"lamina/lattice"
)

// lindStack parses a stacking or fails the test.
func lindStack(t *testing.T, s string) lattice.Stack {
	t.Helper()
	st, err := lattice.ParseStack(s)
	require.NoError(t, err)
	return st
}

func lindFtoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func lindItoa(i int) string { return strconv.Itoa(i) }

// lindDiracDOS is the density of states g|μ|/(2π(ħv)²) of the Dirac cone with g = 4 (spin and
// valley), in 1/(eV nm²).
func lindDiracDOS(mu, hv float64) float64 { return 4 * math.Abs(mu) / (2 * math.Pi * hv * hv) }

func TestLindhardMonolayerIntrinsic(t *testing.T) {
	// Undoped graphene at T = 0: Π(q) = g q/(16 ħv) = q/(4ħv) for g = 4, from the interband
	// transitions alone (Wunsch, Stauber, Sols & Guinea, New J. Phys. 8, 318 (2006); Hwang &
	// Das Sarma, PRB 75, 205418 (2007); from memory of both papers).
	st := lindStack(t, "A")
	p := lattice.Minimal()
	hv := p.HbarV()
	for _, q := range []float64{0.05, 0.1, 0.3, 0.6, 1} {
		t.Run("q="+lindFtoa(q), func(t *testing.T) {
			pi, err := Lindhard(context.Background(), st, p, nil, q, 0, LindhardOptions{})
			require.NoError(t, err)
			require.Len(t, pi, 1)
			want := q / (4 * hv)
			// Measured error with the defaults: -2.0e-4 at every q (Grid^-2 discretisation);
			// 1e-3 leaves a margin of 5 and is ten times tighter than the 1% asked for.
			assert.InEpsilon(t, want, pi[0], 1e-3)
		})
	}
	t.Run("in-ellipse part", func(t *testing.T) {
		// Without the tail Π is the integral over |k| + |k+q| <= 2Λ. In elliptic coordinates the
		// Dirac integrand is q sin²ν/(2ħv cosh μ) (derived in the doc of Lindhard), so the
		// in-ellipse part is q/(4ħv) (4/π)(arctan(e^μmax) − π/4), cosh μmax = 2Λ/q. This checks
		// the cutoff geometry and the tail separately from check 1.
		q := 0.8
		opt := LindhardOptions{OmitTail: true}
		pi, err := Lindhard(context.Background(), st, p, nil, q, 0, opt)
		require.NoError(t, err)
		lambda := lindDefaultCutoff / hv
		muMax := math.Acosh(2 * lambda / q)
		want := q / (4 * hv) * 4 / math.Pi * (math.Atan(math.Exp(muMax)) - math.Pi/4)
		// Same discretisation error as above (measured -2.0e-4); the tail is 5.7% of Π here, so
		// a wrong cutoff geometry would show up 50 times above this tolerance.
		assert.InEpsilon(t, want, pi[0], 1e-3)
	})
}

func TestLindhardCutoff(t *testing.T) {
	// The Dirac tail beyond the cutoff makes the layer-summed response independent of Λ, while
	// the interlayer (layer-antisymmetric) response of a bilayer with γ1 only converges as 1/Λ
	// (doc of Lindhard, "Cutoff"; both derived there, no published value).
	ctx := context.Background()
	st := lindStack(t, "AB")
	p := lattice.Minimal()
	cuts := []float64{3, 6, 12}
	var sum, anti []float64
	for _, c := range cuts {
		pi, err := Lindhard(ctx, st, p, nil, 0.3, 0, LindhardOptions{Cutoff: c, Mu: 0.02, Grid: 96})
		require.NoError(t, err)
		require.Len(t, pi, 4)
		sum = append(sum, pi[0]+pi[3]+2*pi[1])
		anti = append(anti, pi[0]+pi[3]-2*pi[1])
	}
	t.Run("charge response", func(t *testing.T) {
		// Measured change 7e-5 from 3 to 12 eV (the tail alone is 1.1% of it at 3 eV).
		assert.InEpsilon(t, sum[2], sum[0], 5e-4)
	})
	t.Run("interlayer response converges as 1/Λ", func(t *testing.T) {
		// For A − B/Λ the step 3 → 6 eV is twice the step 6 → 12 eV (measured ratio 1.99).
		r := (anti[1] - anti[0]) / (anti[2] - anti[1])
		assert.InDelta(t, 2, r, 0.1)
	})
}

func TestLindhardGridConvergence(t *testing.T) {
	// The triangle method is second order: the error of the intrinsic monolayer
	// (against q/(4ħv), Wunsch et al. 2006, from memory) falls by 4 per doubling of Grid.
	// Measured at q = 0.3/nm: Grid 32, 64, 128, 256 give -3.08e-3, -7.71e-4, -1.93e-4, -4.88e-5.
	st := lindStack(t, "A")
	p := lattice.Minimal()
	want := 0.3 / (4 * p.HbarV())
	grids := []int{32, 64, 128}
	if testing.Short() {
		grids = []int{32, 64}
	}
	var errs []float64
	for _, g := range grids {
		pi, err := Lindhard(context.Background(), st, p, nil, 0.3, 0, LindhardOptions{Grid: g})
		require.NoError(t, err)
		errs = append(errs, math.Abs(pi[0]/want-1))
	}
	for i := 1; i < len(errs); i++ {
		t.Run("grid="+lindItoa(grids[i]), func(t *testing.T) {
			// Second order gives a ratio of 4 (measured 3.99); 3 to 5 allows for higher orders.
			r := errs[i-1] / errs[i]
			assert.Truef(t, r > 3 && r < 5, "error ratio %.3f between Grid %d and %d is not about 4", r, grids[i-1], grids[i])
		})
	}
}

func TestLindhardDopedMonolayer(t *testing.T) {
	// Doped graphene: Π(q → 0) is the density of states at the Fermi level, g|μ|/(2π(ħv)²)
	// (Thomas-Fermi screening), and the static Π stays exactly at that value for all q <= 2k_F
	// (Wunsch et al., New J. Phys. 8, 318 (2006): "the static susceptibility saturates to a
	// constant value for low momenta" (abstract, read); the constant and its range q <= 2k_F
	// from memory of Hwang & Das Sarma, PRB 75, 205418 (2007)). For q > 2k_F the same papers give
	// (from memory) Π = D_F [1 + πq/8k_F − ½√(1 − 4k_F²/q²) − (q/4k_F) arcsin(2k_F/q)], which
	// tends to q/(4ħv) at large q.
	st := lindStack(t, "A")
	p := lattice.Minimal()
	hv := p.HbarV()
	for _, mu := range []float64{0.1, -0.1} {
		kf := math.Abs(mu) / hv
		dos := lindDiracDOS(mu, hv)
		for _, x := range []float64{0, 1e-3, 0.05, 0.5, 1.5, 1.95, 2.5, 4} {
			t.Run("mu="+lindFtoa(mu)+"/q/kF="+lindFtoa(x), func(t *testing.T) {
				q := x * kf
				pi, err := Lindhard(context.Background(), st, p, nil, q, 0, LindhardOptions{Mu: mu})
				require.NoError(t, err)
				want := dos
				if x > 2 {
					y := 2 / x
					want = dos * (1 + math.Pi*x/8 - 0.5*math.Sqrt(1-y*y) - x/4*math.Asin(y))
				}
				// Measured errors with the defaults are below 5.5e-4 (largest at q = k_F, Grid^-2
				// discretisation of the Fermi lines); 1.5e-3 leaves a margin of about 3.
				assert.InEpsilon(t, want, pi[0], 1.5e-3)
			})
		}
	}
}

func TestLindhardBilayerIntrinsic(t *testing.T) {
	// Undoped bilayer, two-band chiral model H = −(ħ²/2m)[[0, π†²], [π², 0]]: the static Π tends
	// to a constant C g m/(2πħ²) as q → 0, with C = ln 4 (Hwang & Das Sarma, PRL 101, 156802
	// (2008); the value ln 4 from memory). We verify C first: in elliptic coordinates with foci
	// 0 and −q the two-band integral is
	//   C = (2/π) ∫_0^∞ dμ ∫_0^2π dν 2 sin²ν sinh²μ / (cosh⁴μ − cos⁴ν)
	// (the chirality-2 overlap is sin²Δθ = 4 sin²ν sinh²μ/(cosh²μ − cos²ν)² and
	// ε_k + ε_k+q = (ħ²q²/8m)(cosh²μ + cos²ν)), evaluated here by a midpoint rule independent of
	// the library.
	t.Run("two-band constant", func(t *testing.T) {
		const n = 400
		dm, dn := 20.0/n, 2*math.Pi/n
		sum := 0.0
		for i := range n {
			m := (float64(i) + 0.5) * dm
			sh, ch := math.Sinh(m), math.Cosh(m)
			for j := range n {
				s, c := math.Sincos((float64(j) + 0.5) * dn)
				sum += 2 * s * s * sh * sh / (ch*ch*ch*ch - c*c*c*c)
			}
		}
		c := 2 / math.Pi * sum * dm * dn
		// The midpoint rule converges spectrally in ν and as (Δμ)² in μ: measured error 1.8e-7
		// at n = 400 (2.9e-6 at n = 200).
		assert.InDelta(t, math.Log(4), c, 1e-6)
	})
	// The four-band minimal model (γ0, γ1 only) has the two-band model as its q → 0 limit, with
	// m = γ1/(2v²). Its layer-summed response Σ_ll' Π_ll' (the response to a uniform potential)
	// must approach ln 4 · g m/(2πħ²) = ln 4 · g γ1/(4π(ħv)²) once q ≪ γ1/ħv = 0.58/nm.
	st := lindStack(t, "AB")
	p := lattice.Minimal()
	hv := p.HbarV()
	ref := math.Log(4) * 4 * p.Gamma1 / (4 * math.Pi * hv * hv)
	for _, tc := range []struct {
		q, tol float64
	}{
		// Measured Σ Π/ref: 0.99912 at q = 0.003/nm and 0.99906 at q = 0.01/nm (the γ1
		// corrections grow as q: 0.9857 at 0.1/nm, so the small-q values are 1e-3 off at most).
		// 3e-3 allows for that and for the Grid^-2 error of the large, cancelling layer elements.
		{0.003, 3e-3},
		{0.01, 3e-3},
	} {
		t.Run("four-band/q="+lindFtoa(tc.q), func(t *testing.T) {
			pi, err := Lindhard(context.Background(), st, p, nil, tc.q, 0, LindhardOptions{})
			require.NoError(t, err)
			require.Len(t, pi, 4)
			assert.InEpsilon(t, ref, pi[0]+pi[1]+pi[2]+pi[3], tc.tol)
		})
	}
}

func TestLindhardThermal(t *testing.T) {
	// Intrinsic graphene at T > 0, q → 0: Π = −∫ DOS(E) f'(E) dE with DOS = g|E|/(2π(ħv)²), so
	// Π = g (2 k_B T ln 2)/(2π(ħv)²) (derived: ∫|E|(−f') dE = 2 k_B T ln 2). At q = 0 the
	// interband term of a single layer vanishes exactly.
	st := lindStack(t, "A")
	p := lattice.Minimal()
	hv := p.HbarV()
	for _, temp := range []float64{10, 100, 300} {
		t.Run("T="+lindFtoa(temp), func(t *testing.T) {
			pi, err := Lindhard(context.Background(), st, p, nil, 0, 0, LindhardOptions{T: temp})
			require.NoError(t, err)
			want := 4 * 2 * lattice.BoltzmannEV * temp * math.Ln2 / (2 * math.Pi * hv * hv)
			// Measured -5.1e-4, -3.5e-4, -3.7e-4 (the 24-node Gauss-Legendre rule per half of the
			// Maldague integral meets the logarithmic ends of atanh; 48 nodes give 2e-4).
			assert.InEpsilon(t, want, pi[0], 1.5e-3)
		})
	}
	t.Run("T to 0", func(t *testing.T) {
		// The Maldague integral reduces to the T = 0 result as T → 0 (same bands): at 0.1 K
		// the doped monolayer must give the Thomas-Fermi DOS (Hwang & Das Sarma 2007, from
		// memory) like T = 0 does.
		pi, err := Lindhard(context.Background(), st, p, nil, 0.02, 0, LindhardOptions{T: 0.1, Mu: 0.1})
		require.NoError(t, err)
		// Same discretisation error as the T = 0 doped check (measured 5.4e-4).
		assert.InEpsilon(t, lindDiracDOS(0.1, hv), pi[0], 1.5e-3)
	})
}

func TestLindhardValleys(t *testing.T) {
	// Symmetries used to replace the valley sum by 2 × valley K (doc of Lindhard).
	st := lindStack(t, "ABC")
	p := lattice.Graphite()
	u := []float64{-0.02, 0, 0.03}
	hk, err := bands.NewContinuum(st, p, bands.K, u)
	require.NoError(t, err)
	hkp, err := bands.NewContinuum(st, p, bands.KPrime, u)
	require.NoError(t, err)
	d := hk.Dim()
	t.Run("H_K'(kx,ky) = H_K(-kx,ky)", func(t *testing.T) {
		a, b := make([]complex128, d*d), make([]complex128, d*d)
		for _, k := range [][2]float64{{0.3, 0.1}, {-0.7, 0.45}, {0.02, -1.1}} {
			hkp.At(a, k[0], k[1])
			hk.At(b, -k[0], k[1])
			// Exact algebra on the same couplings: bitwise equal.
			assert.Equal(t, b, a)
		}
	})
	t.Run("H_K(kx,-ky) = H_K(kx,ky)*", func(t *testing.T) {
		a, b := make([]complex128, d*d), make([]complex128, d*d)
		for _, k := range [][2]float64{{0.3, 0.1}, {-0.7, 0.45}} {
			hk.At(a, k[0], -k[1])
			hk.At(b, k[0], k[1])
			for i := range b {
				b[i] = cmplx.Conj(b[i])
			}
			assert.Equal(t, b, a)
		}
	})
	opt := LindhardOptions{Mu: 0.05, Grid: 64}
	lk, err := newLindSetup(st, p, u, opt, bands.K)
	require.NoError(t, err)
	lkp, err := newLindSetup(st, p, u, opt, bands.KPrime)
	require.NoError(t, err)
	const q, phi = 0.25, 0.4
	ctx := context.Background()
	piK, err := lk.flavor(ctx, q, phi, false)
	require.NoError(t, err)
	t.Run("Pi_K'(q) = Pi_K(q)", func(t *testing.T) {
		piKp, err := lkp.flavor(ctx, q, phi, false)
		require.NoError(t, err)
		require.Len(t, piKp, len(piK))
		// Equal as integrals, and here even on the grid: the elliptic grid is symmetric under
		// k → −k − q (ν → π − ν), which maps the K' sum onto the K sum term by term, so only
		// rounding differs (measured 4.6e-16 of Π_33).
		for i := range piK {
			assert.InDelta(t, 0, cmplx.Abs(piKp[i]-piK[i]), 1e-12*cmplx.Abs(piK[8]), "element %d", i)
		}
	})
	t.Run("C3", func(t *testing.T) {
		piR, err := lk.flavor(ctx, q, phi+2*math.Pi/3, false)
		require.NoError(t, err)
		// The grid rotates with q and H_K(Rk) = D H_K(k) D† exactly, so only rounding differs
		// (measured 5.8e-16 of Π_33).
		for i := range piK {
			assert.InDelta(t, 0, cmplx.Abs(piR[i]-piK[i]), 1e-12*cmplx.Abs(piK[8]), "element %d", i)
		}
	})
	t.Run("Hermitian with odd imaginary part", func(t *testing.T) {
		a, err := LindhardHermitian(ctx, st, p, u, q*math.Cos(phi), q*math.Sin(phi), opt)
		require.NoError(t, err)
		b, err := LindhardHermitian(ctx, st, p, u, q*math.Cos(phi), -q*math.Sin(phi), opt)
		require.NoError(t, err)
		re, err := Lindhard(ctx, st, p, u, q*math.Cos(phi), q*math.Sin(phi), opt)
		require.NoError(t, err)
		require.Len(t, a, 9)
		require.Len(t, b, 9)
		require.Len(t, re, 9)
		for l := range 3 {
			for m := range 3 {
				// Hermitian by construction (exact); Π(qx,−qy) = Π(qx,qy)* up to the
				// discretisation: the mirror image of the grid has its cell diagonals the other
				// way (measured 2.1e-4 of Π_33 at Grid 64).
				assert.Equal(t, cmplx.Conj(a[m*3+l]), a[l*3+m])
				assert.InDelta(t, 0, cmplx.Abs(b[l*3+m]-cmplx.Conj(a[l*3+m])), 1e-3*real(a[8]))
				assert.Equal(t, real(a[l*3+m]), re[l*3+m])
			}
		}
		// The imaginary part is real physics of the warped model, not noise: measured
		// Im Π_13 = 0.13 |Re Π_13| = 5.8e-3 Π_33 here.
		assert.Greater(t, math.Abs(imag(a[2])), 1e-3*real(a[8]))
	})
}

func TestLindhardStructure(t *testing.T) {
	// Π is real symmetric and positive semidefinite (a stable non-interacting system lowers its
	// energy by −½ δU Π δU under any static perturbation), and at q = 0 its layer sums give the
	// compressibility: Σ_ll' Π_ll'(0) = dn/dμ (charge conservation).
	ctx := context.Background()
	cases := []struct {
		name, stack string
		p           lattice.Params
		u           []float64
		mu, temp    float64
	}{
		{"AB minimal biased doped", "AB", lattice.Minimal(), []float64{-0.02, 0.02}, 0.06, 0},
		{"ABA graphite doped", "ABA", lattice.Graphite(), nil, -0.04, 0},
		// μ well above the gap edge of the biased trilayer (about 15 meV), whose 1/√ density of
		// states would otherwise sit inside the thermal window (see LindhardOptions.ThermalNodes).
		{"ABC graphite warm", "ABC", lattice.Graphite(), []float64{0.01, 0, -0.01}, 0.08, 40},
	}
	for _, tc := range cases {
		st := lindStack(t, tc.stack)
		nl := st.Layers()
		opt := LindhardOptions{Mu: tc.mu, T: tc.temp, Grid: 96}
		for _, q := range []float64{0, 0.4} {
			t.Run(tc.name+"/q="+lindFtoa(q), func(t *testing.T) {
				pi, err := Lindhard(ctx, st, tc.p, tc.u, q, 0, opt)
				require.NoError(t, err)
				require.Len(t, pi, nl*nl)
				sym := mat.NewSymDense(nl, nil)
				for l := range nl {
					for m := range nl {
						// Symmetric exactly: the code fills the lower triangle from the upper one.
						assert.Equal(t, pi[m*nl+l], pi[l*nl+m])
						sym.SetSym(l, m, pi[l*nl+m])
					}
				}
				var es mat.EigenSym
				require.True(t, es.Factorize(sym, false))
				// Positive semidefinite: the smallest eigenvalue may only be negative by
				// discretisation noise (measured smallest eigenvalues 0.15-0.25 /(eV nm²)).
				assert.Greater(t, es.Values(nil)[0], -1e-6)
			})
		}
		t.Run(tc.name+"/charge conservation", func(t *testing.T) {
			opt := opt
			opt.Grid = 0 // the default 128: the finite difference below needs it (see tolerance)
			pi, err := Lindhard(ctx, st, tc.p, tc.u, 0, 0, opt)
			require.NoError(t, err)
			sum := 0.0
			for _, v := range pi {
				sum += v
			}
			// dn/dμ by a central difference of the density on the same cutoff disk. The step
			// of 3 meV averages the O(Δ) pointwise error of the triangle-method DOS but keeps
			// the O(h²) difference error small.
			const h = 3e-3
			np, err := NonInteractingDensity(ctx, st, tc.p, tc.u, tc.mu+h, opt)
			require.NoError(t, err)
			nm, err := NonInteractingDensity(ctx, st, tc.p, tc.u, tc.mu-h, opt)
			require.NoError(t, err)
			// Measured relative differences -3.8e-4, 1.4e-4 and -2.9e-5 at Grid 128. The
			// limit is the finite difference: the triangle-method density has an O(Δ)
			// pointwise slope error that the 3 meV step only partly averages (for the first
			// case 2.1e-3 at Grid 96 and 6.6e-3 at Grid 64, while Σ Π(0) itself changes by
			// 1e-4); 2e-3 keeps a margin of 5.
			assert.InEpsilon(t, (np-nm)/(2*h), sum, 2e-3)
		})
	}
	t.Run("continuity at q = 0", func(t *testing.T) {
		// The q = 0 value (δ-function limit of the intraband terms) is the limit of small q.
		st := lindStack(t, "AB")
		opt := LindhardOptions{Mu: 0.05}
		a, err := Lindhard(ctx, st, lattice.Minimal(), nil, 0, 0, opt)
		require.NoError(t, err)
		b, err := Lindhard(ctx, st, lattice.Minimal(), nil, 1e-3, 0, opt)
		require.NoError(t, err)
		require.Len(t, b, len(a))
		for i := range a {
			// Π varies as q² on the scale k_F ≈ 0.3/nm here (1e-5 at q = 1e-3/nm); grids
			// differ slightly (measured 1.7e-5).
			assert.InEpsilon(t, a[i], b[i], 3e-4)
		}
	})
}

func TestLindhardWorkers(t *testing.T) {
	// Results must not depend on the number of goroutines: every row and strip is computed
	// independently and the reductions run in a fixed order.
	ctx := context.Background()
	st := lindStack(t, "AB")
	p := lattice.Graphite()
	var first []float64
	var firstTab [][]float64
	var firstN float64
	for _, w := range []int{1, 2, 3} {
		t.Run("workers="+lindItoa(w), func(t *testing.T) {
			opt := LindhardOptions{Mu: 0.02, T: 20, Grid: 48, Workers: w}
			pi, err := Lindhard(ctx, st, p, nil, 0.2, 0.1, opt)
			require.NoError(t, err)
			tab, err := LindhardTable(ctx, st, lattice.Minimal(), nil, []float64{0, 0.3}, opt)
			require.NoError(t, err)
			n, err := NonInteractingDensity(ctx, st, p, nil, 0.02, opt)
			require.NoError(t, err)
			if first == nil {
				first, firstTab, firstN = pi, tab, n
				return
			}
			// Bitwise equality.
			assert.Equal(t, first, pi)
			assert.Equal(t, firstTab, tab)
			assert.Equal(t, firstN, n)
		})
	}
}

func TestLindhardTable(t *testing.T) {
	ctx := context.Background()
	t.Run("isotropic equals Lindhard in any direction", func(t *testing.T) {
		st := lindStack(t, "ABC")
		p := lattice.Minimal()
		opt := LindhardOptions{Mu: 0.03, Grid: 64}
		qs := []float64{0, 0.1, 0.5}
		tab, err := LindhardTable(ctx, st, p, nil, qs, opt)
		require.NoError(t, err)
		require.Len(t, tab, len(qs))
		for i, q := range qs {
			a, err := Lindhard(ctx, st, p, nil, q*math.Cos(1), q*math.Sin(1), opt)
			require.NoError(t, err)
			require.Len(t, a, len(tab[i]))
			// Without trigonal warping Π depends on |q| only and Lindhard puts q along k_x on
			// the same grid, so the two differ only by the rounding of |q| = hypot(qx, qy).
			for j := range a {
				assert.InEpsilon(t, tab[i][j], a[j], 1e-12)
			}
		}
	})
	t.Run("anisotropic average", func(t *testing.T) {
		st := lindStack(t, "AB")
		p := lattice.Graphite()
		opt := LindhardOptions{Mu: 0.04, Grid: 48}
		const n = 12 // reference directions around the full circle (harmonics up to cos 11φ exact)
		const q = 0.3
		tab, err := LindhardTable(ctx, st, p, nil, []float64{q}, opt)
		require.NoError(t, err)
		require.Len(t, tab, 1)
		// Reference: average over n directions around the full circle.
		avg := make([]float64, 4)
		for j := range n {
			phi := 2 * math.Pi * (float64(j) + 0.25) / n
			a, err := Lindhard(ctx, st, p, nil, q*math.Cos(phi), q*math.Sin(phi), opt)
			require.NoError(t, err)
			for i := range avg {
				avg[i] += a[i] / n
			}
		}
		for i := range avg {
			// Both are midpoint rules for a smooth periodic function of the angle whose
			// anisotropy (Π(0°) vs Π(30°)) is 6e-3 here; measured agreement 5.4e-6. Fewer
			// reference directions would alias the cos 6φ term (6 give 1.6e-3).
			assert.InEpsilon(t, avg[i], tab[0][i], 1e-4)
		}
	})
}

func TestNonInteractingDensity(t *testing.T) {
	ctx := context.Background()
	st := lindStack(t, "A")
	p := lattice.Minimal()
	hv := p.HbarV()
	for _, mu := range []float64{0.05, -0.2} {
		t.Run("Dirac/mu="+lindFtoa(mu), func(t *testing.T) {
			// n = sign(μ) g μ²/(4π(ħv)²): g πk_F²/(2π)² with k_F = |μ|/ħv (Castro Neto et al.,
			// Rev. Mod. Phys. 81, 109 (2009), from memory).
			n, err := NonInteractingDensity(ctx, st, p, nil, mu, LindhardOptions{})
			require.NoError(t, err)
			want := math.Copysign(4*mu*mu/(4*math.Pi*hv*hv), mu)
			// Measured relative error 5.0e-4 at the default Grid 128 (1.7e-3 at 64, 1.1e-4 at
			// 256: second order, mostly the linear interpolation of the Jacobian ∝ sinh²μ).
			assert.InEpsilon(t, want, n, 1.5e-3)
		})
	}
	t.Run("intrinsic stays neutral at T > 0", func(t *testing.T) {
		// Electron-hole symmetry of the Dirac cone: n(μ = 0, T) = 0.
		n, err := NonInteractingDensity(ctx, st, p, nil, 0, LindhardOptions{T: 300})
		require.NoError(t, err)
		// Cancellation of electrons and holes, each about 1e-3 /nm² at 300 K.
		assert.InDelta(t, 0, n, 1e-12)
	})
	for _, tc := range []struct {
		stack string
		n     float64
		temp  float64
	}{
		{"AB", 0.02, 0}, {"ABA", -0.015, 30}, {"ABC", 0.005, 100},
	} {
		t.Run("round trip/"+tc.stack, func(t *testing.T) {
			st := lindStack(t, tc.stack)
			opt := LindhardOptions{T: tc.temp, Grid: 64}
			mu, err := NonInteractingMu(ctx, st, lattice.Graphite(), nil, tc.n, opt)
			require.NoError(t, err)
			n, err := NonInteractingDensity(ctx, st, lattice.Graphite(), nil, mu, opt)
			require.NoError(t, err)
			// Brent stops at 1e-9 eV; n changes by at most 1e-9 eV × DOS (< 1 /(eV nm²)).
			assert.InDelta(t, tc.n, n, 1e-8)
		})
	}
}

func TestLindhardErrors(t *testing.T) {
	ctx := context.Background()
	st := lindStack(t, "AB")
	p := lattice.Minimal()
	bad := []struct {
		name string
		run  func() error
	}{
		{"NaN q", func() error {
			_, err := Lindhard(ctx, st, p, nil, math.NaN(), 0, LindhardOptions{})
			return err
		}},
		{"q beyond cutoff", func() error {
			_, err := Lindhard(ctx, st, p, nil, 10, 0, LindhardOptions{})
			return err
		}},
		{"negative T", func() error {
			_, err := Lindhard(ctx, st, p, nil, 0.1, 0, LindhardOptions{T: -1})
			return err
		}},
		{"small grid", func() error {
			_, err := Lindhard(ctx, st, p, nil, 0.1, 0, LindhardOptions{Grid: 8})
			return err
		}},
		{"mu near cutoff", func() error {
			_, err := Lindhard(ctx, st, p, nil, 0.1, 0, LindhardOptions{Mu: 2})
			return err
		}},
		{"negative cutoff", func() error {
			_, err := Lindhard(ctx, st, p, nil, 0.1, 0, LindhardOptions{Cutoff: -1})
			return err
		}},
		{"wrong potentials", func() error {
			_, err := Lindhard(ctx, st, p, []float64{0.1}, 0.1, 0, LindhardOptions{})
			return err
		}},
		{"empty stack", func() error {
			_, err := Lindhard(ctx, lattice.Stack{}, p, nil, 0.1, 0, LindhardOptions{})
			return err
		}},
		{"negative table q", func() error {
			_, err := LindhardTable(ctx, st, p, nil, []float64{0.1, -0.1}, LindhardOptions{})
			return err
		}},
		{"table q beyond cutoff", func() error {
			_, err := LindhardTable(ctx, st, p, nil, []float64{20}, LindhardOptions{})
			return err
		}},
		{"negative angles", func() error {
			_, err := LindhardTable(ctx, st, p, nil, []float64{0.1}, LindhardOptions{Angles: -1})
			return err
		}},
		{"NaN density", func() error {
			_, err := NonInteractingMu(ctx, st, p, nil, math.NaN(), LindhardOptions{})
			return err
		}},
		{"unreachable density", func() error {
			_, err := NonInteractingMu(ctx, st, p, nil, 50, LindhardOptions{})
			return err
		}},
	}
	for _, tc := range bad {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.run()
			require.Error(t, err)
			assert.True(t, strings.HasPrefix(err.Error(), "hartree: "), err.Error())
		})
	}
	t.Run("cancelled", func(t *testing.T) {
		cctx, cancel := context.WithCancel(ctx)
		cancel()
		_, err := Lindhard(cctx, st, p, nil, 0.1, 0, LindhardOptions{})
		require.Error(t, err)
		assert.True(t, errors.Is(err, context.Canceled))
		assert.True(t, strings.HasPrefix(err.Error(), "hartree: "), err.Error())
	})
}
