package bands_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/bands"
	"lamina/lattice"
)

// Monolayer: v = √3 a γ0/(2ħ) = 1.0228e6 m/s for γ0 = 3.16 eV, a = 0.246 nm, and the
// nearest-neighbour bands at Γ sit at ±3γ0 (Castro Neto et al., Rev. Mod. Phys. 81, 109 (2009);
// shared/references.md 1.2 and 9.5).
func TestMonolayerLimits(t *testing.T) {
	p := lattice.Minimal()
	st := mustStack(t, "A")
	z, err := bands.NewFullZone(st, p, nil)
	require.NoError(t, err)
	e := values(t, z, 0, 0)
	assert.InEpsilon(t, -3*p.Gamma0, e[0], 1e-12)
	assert.InEpsilon(t, 3*p.Gamma0, e[1], 1e-12)

	// Slope at K: average the directions θ and θ+π to cancel the O(ka) trigonal-warping term,
	// leaving O((ka)²) ≈ 1e-7 at k = 1e-3/nm.
	kx0, ky0 := z.ValleyPoint(bands.K)
	const k = 1e-3
	for _, th := range []float64{0, 0.3, 1.1} {
		s, c := math.Sincos(th)
		e1 := values(t, z, kx0+k*c, ky0+k*s)
		e2 := values(t, z, kx0-k*c, ky0-k*s)
		hv := (e1[1] + e2[1]) / (2 * k)
		v := hv * 1e-9 / lattice.HbarEVs
		assert.InEpsilon(t, 1.0228e6, v, 1e-4, "θ=%g", th) // reference value rounded to 5 digits
		assert.InEpsilon(t, math.Sqrt(3)/2*p.A*p.Gamma0, hv, 1e-6, "θ=%g", th)
	}
}

// The continuum bilayer Hamiltonian in the basis (A1, B1, A2, B2) is
//
//	[[ε_A1, vπ†, −v4π†, v3π], [vπ, ε_B1, γ1, −v4π†], [−v4π, γ1, ε_A2, vπ†], [v3π†, −v4π, vπ, ε_B2]]
//
// with Δ' on the dimer sites B1, A2 (McCann & Koshino, Rep. Prog. Phys. 76, 056503 (2013),
// Eq. (30), from memory). This pins the library's sign convention for γ3 and γ4.
func TestContinuumBilayerEntries(t *testing.T) {
	p := lattice.BilayerIR()
	st := mustStack(t, "AB")
	u := []float64{-0.05, 0.05}
	for _, v := range []bands.Valley{bands.K, bands.KPrime} {
		h := mustCont(t, st, p, v, u)
		kx, ky := 0.13, -0.07
		got := make([]complex128, 16)
		h.At(got, kx, ky)
		xi := float64(v)
		pi := complex(xi*kx, ky)
		pd := cmplx.Conj(pi)
		hv := complex(p.HbarV(), 0)
		hv3 := complex(lattice.HbarV(p.Gamma3, p.A), 0)
		hv4 := complex(lattice.HbarV(p.Gamma4, p.A), 0)
		g1 := complex(p.Gamma1, 0)
		dp := complex(p.DeltaPrime, 0)
		u1, u2 := complex(u[0], 0), complex(u[1], 0)
		want := []complex128{
			u1, hv * pd, -hv4 * pd, hv3 * pi,
			hv * pi, u1 + dp, g1, -hv4 * pd,
			-hv4 * pi, g1, u2 + dp, hv * pd,
			hv3 * pd, -hv4 * pi, hv * pi, u2,
		}
		for i := range want {
			assert.InDelta(t, 0, cmplx.Abs(got[i]-want[i]), 1e-15, "valley %v entry (%d,%d)", v, i/4, i%4)
		}
	}
}

// Exact biased-bilayer spectrum (γ0, γ1, ∓U/2): see bilayerExact. Tolerance 1e-12 eV is a few
// hundred ulps of the ~1 eV matrix scale.
func TestBilayerExactSpectrum(t *testing.T) {
	p := lattice.Minimal()
	st := mustStack(t, "AB")
	for _, U := range []float64{0, 0.05, 0.3, -0.2} {
		for _, v := range []bands.Valley{bands.K, bands.KPrime} {
			h := mustCont(t, st, p, v, []float64{-U / 2, U / 2})
			for _, k := range []float64{0, 0.01, 0.1, 0.4, 1.3} {
				th := 0.7 * k
				got := values(t, h, k*math.Cos(th), k*math.Sin(th))
				want := bilayerExact(p.Gamma1, U, p.HbarV()*k)
				require.Len(t, got, 4)
				for i := range want {
					assert.InDelta(t, want[i], got[i], 1e-12, "U=%g k=%g band %d", U, k, i)
				}
			}
		}
	}
}

// The two-band bilayer effective mass m = γ1/(2v²) (McCann & Fal'ko, PRL 96, 086805 (2006),
// formula from memory): 0.0328 m_e for γ1 = 0.39 eV, γ0 = 3.16 eV (shared/references.md 2.1,
// computed). At ħvk = 6.7e-4 eV the corrections are of order (ħvk/γ1)² ≈ 3e-6.
func TestBilayerMass(t *testing.T) {
	p := lattice.Minimal()
	h := mustCont(t, mustStack(t, "AB"), p, bands.K, nil)
	const k = 1e-3
	e := values(t, h, k, 0)
	// E = ħ²k²/2m  =>  m/m_e = (ħ²/m_e) k² / (2E).
	m := lattice.HbarSqOverMe * k * k / (2 * e[2])
	assert.InEpsilon(t, 0.0328, m, 2e-3) // reference value is rounded to 3 digits
	mExact := p.Gamma1 * lattice.HbarSqOverMe / (2 * p.HbarV() * p.HbarV())
	assert.InEpsilon(t, mExact, m, 1e-4)
}

// Rhombohedral N-layer in the minimal model: the low bands are ±(ħvk)^N/γ1^(N-1) as k → 0
// (Koshino & McCann, PRB 80, 165409 (2009); formula from memory, confirmed by Zhang et al.,
// PRB 82, 035409 (2010) "p^N dispersion"). The relative correction is of order (ħvk/γ1)²
// (shared/references.md 5.1, computed: 0.99737 at ħvk = 0.02 eV).
func TestRhombohedralPowerLaw(t *testing.T) {
	p := lattice.Minimal()
	for n := 2; n <= 7; n++ {
		st, err := lattice.NewRhombohedral(n)
		require.NoError(t, err)
		h := mustCont(t, st, p, bands.K, nil)
		for _, hvk := range []float64{0.02, 0.005} {
			k := hvk / p.HbarV()
			e := values(t, h, k*0.6, k*0.8)
			low := e[n] // lowest conduction band
			want := math.Pow(hvk, float64(n)) / math.Pow(p.Gamma1, float64(n-1))
			r := low / want
			// The leading correction is -(ħvk/γ1)² times a number of order one (1.00 for
			// N = 2..5, 1.01 for N = 6 here); allow a factor 1.5 on it.
			bound := (hvk / p.Gamma1) * (hvk / p.Gamma1)
			assert.Less(t, r, 1.0, "N=%d ħvk=%g", n, hvk)
			assert.InDelta(t, 1, r, 1.5*bound, "N=%d ħvk=%g", n, hvk)
			assert.InDelta(t, -low, e[n-1], 1e-15, "particle-hole symmetry N=%d", n)
		}
	}
}

// Rhombohedral N-layer: at K the outer sites A1 and BN decouple, so the K-point gap equals the
// outer-layer potential difference for any potential profile (shared/references.md 5.1 and 9.4,
// computed). Tolerance 1e-12 eV: exact algebra.
func TestRhombohedralKPointGap(t *testing.T) {
	p := lattice.Minimal()
	for n := 2; n <= 6; n++ {
		st, err := lattice.NewRhombohedral(n)
		require.NoError(t, err)
		profiles := map[string][]float64{"linear": linearU(n, 0.06)}
		arb := make([]float64, n)
		for l := range arb {
			arb[l] = 0.01 * math.Sin(float64(3*l+1))
		}
		profiles["arbitrary"] = arb
		for name, u := range profiles {
			h := mustCont(t, st, p, bands.K, u)
			e := values(t, h, 0, 0)
			want := math.Abs(u[n-1] - u[0])
			assert.InDelta(t, want, e[n]-e[n-1], 1e-12, "N=%d %s", n, name)
		}
	}
}

// Near K the continuum model is the linearisation of the full-zone model: at K they agree
// exactly and the eigenvalue difference shrinks at least as k² (the next term of f(K+k) is
// O(a²k²); on the low bands of a bilayer-like spectrum it enters multiplied by ħvk/γ1, so
// there the difference falls as k³). A halving of k must therefore cut it by at least 4
// (3.5 allows for the next order at k = 0.02/nm).
func TestContinuumMatchesFullZone(t *testing.T) {
	cases := []struct {
		stack  string
		params lattice.Params
	}{
		{"AB", lattice.BilayerIR()},
		{"ABA", lattice.Graphite()},
		{"ABC", lattice.Graphite()},
		{"ABCB", lattice.TrilayerLL()},
	}
	for _, tc := range cases {
		for _, v := range []bands.Valley{bands.K, bands.KPrime} {
			t.Run(fmt.Sprintf("%s/%v", tc.stack, v), func(t *testing.T) {
				st := mustStack(t, tc.stack)
				u := linearU(st.Layers(), 0.04)
				c := mustCont(t, st, tc.params, v, u)
				z, err := bands.NewFullZone(st, tc.params, u)
				require.NoError(t, err)
				kx0, ky0 := z.ValleyPoint(v)
				diff := func(k float64) float64 {
					ec := values(t, c, k*0.6, k*0.8)
					ez := values(t, z, kx0+k*0.6, ky0+k*0.8)
					d := 0.0
					for i := range ec {
						d = math.Max(d, math.Abs(ec[i]-ez[i]))
					}
					return d
				}
				assert.InDelta(t, 0, diff(0), 1e-12)
				d1, d2, d3 := diff(0.02), diff(0.01), diff(0.005)
				require.Greater(t, d2, 0.0)
				assert.Greater(t, d1/d2, 3.5, "convergence d(0.02)/d(0.01)")
				assert.Greater(t, d2/d3, 3.5, "convergence d(0.01)/d(0.005)")
				assert.Less(t, d3, 1e-4)
			})
		}
	}
}

func TestHamiltonianErrors(t *testing.T) {
	st := mustStack(t, "ABC")
	p := lattice.Graphite()
	_, err := bands.NewContinuum(st, p, bands.K, []float64{0, 1})
	assert.ErrorContains(t, err, "2 layer potentials")
	_, err = bands.NewContinuum(st, p, bands.K, []float64{0, math.NaN(), 0})
	assert.ErrorContains(t, err, "not finite")
	_, err = bands.NewContinuum(st, p, 0, nil)
	assert.ErrorContains(t, err, "valley")
	_, err = bands.NewContinuum(lattice.Stack{}, p, bands.K, nil)
	assert.ErrorContains(t, err, "empty stack")
	bad := p.Clone()
	bad.Gamma0 = math.Inf(1)
	_, err = bands.NewFullZone(st, bad, nil)
	assert.ErrorIs(t, err, lattice.ErrInvalidParam)
	bad = p.Clone()
	bad.OnSite = []float64{0}
	_, err = bands.NewFullZone(st, bad, nil)
	assert.ErrorIs(t, err, lattice.ErrInvalidParam)
}

// H(k) is Hermitian for every stacking, valley and k.
func TestHermitian(t *testing.T) {
	for _, s := range []string{"A", "AB", "ABA", "ABCB", "ACBA"} {
		st := mustStack(t, s)
		hs := []bands.Hamiltonian{mustCont(t, st, lattice.Graphite(), bands.K, linearU(st.Layers(), 0.1))}
		z, err := bands.NewFullZone(st, lattice.Graphite(), nil)
		require.NoError(t, err)
		hs = append(hs, z)
		for _, h := range hs {
			n := h.Dim()
			m := make([]complex128, n*n)
			h.At(m, 0.3, -1.7)
			for i := range n {
				for j := range n {
					assert.Equal(t, m[i*n+j], cmplx.Conj(m[j*n+i]), "%s (%d,%d)", s, i, j)
				}
			}
		}
	}
}

// Isotropy: without γ3 the continuum bands depend on |k| only; γ3 warps them, and so does γ2 in
// rhombohedral stacks (see Continuum.Isotropic). Checked directly on the spectrum.
func TestIsotropic(t *testing.T) {
	g := lattice.Graphite()
	noWarp := g
	noWarp.Gamma3 = 0
	noG2 := noWarp
	noG2.Gamma2 = 0
	cases := []struct {
		stack string
		p     lattice.Params
		want  bool
	}{
		{"AB", lattice.Minimal(), true},
		{"AB", g, false},
		{"ABA", noWarp, true},
		{"ABC", noWarp, false},
		{"ABC", noG2, true},
		{"ABCB", noG2, true},
	}
	for _, tc := range cases {
		st := mustStack(t, tc.stack)
		h := mustCont(t, st, tc.p, bands.K, linearU(st.Layers(), 0.05))
		assert.Equal(t, tc.want, h.Isotropic(), "%s %s", tc.stack, tc.p.Name)
		e1 := values(t, h, 0.3, 0)
		e2 := values(t, h, 0.3*math.Cos(0.5), 0.3*math.Sin(0.5))
		same := true
		for i := range e1 {
			if math.Abs(e1[i]-e2[i]) > 1e-12 {
				same = false
			}
		}
		assert.Equal(t, tc.want, same, "spectrum isotropy %s", tc.stack)
	}
}
