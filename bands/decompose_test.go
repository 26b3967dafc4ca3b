package bands_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/bands"
	"lamina/lattice"
)

// Koshino & Ando, PRB 76, 085425 (2007) (arXiv 0712.2783, abstract verified): an N-layer ABA
// stack with γ0 and γ1 splits into ⌊N/2⌋ bilayers with couplings λ_m γ1,
// λ_m = 2cos(mπ/(N+1)), and one monolayer for odd N. Tables of |λ| for N = 2..8 are in
// shared/references.md 4.1 (computed). The test compares the set of couplings, not labels, and
// the union of sector spectra with the full spectrum at arbitrary k to 1e-10 eV.
func TestBernalDecomposition(t *testing.T) {
	p := lattice.Minimal()
	want := map[int][]float64{
		2: {1}, 3: {math.Sqrt2}, 4: {1.618034, 0.618034}, 5: {math.Sqrt(3), 1},
		6: {1.801938, 1.246980, 0.445042}, 7: {1.847759, math.Sqrt2, 0.765367},
		8: {1.879385, 1.532089, 1.0, 0.347296},
	}
	for n := 2; n <= 10; n++ {
		t.Run(fmt.Sprint("N=", n), func(t *testing.T) {
			st, err := lattice.NewBernal(n)
			require.NoError(t, err)
			secs, err := bands.BernalSectors(st)
			require.NoError(t, err)
			var lams []float64
			mono := 0
			for _, s := range secs {
				if s.Kind == bands.MonolayerLike {
					mono++
					continue
				}
				lams = append(lams, math.Abs(s.Lambda))
			}
			assert.Equal(t, n%2, mono, "monolayer-like sector only for odd N")
			require.Len(t, lams, n/2)
			if w, ok := want[n]; ok {
				for i := range w {
					assert.InDelta(t, w[i], lams[i], 1e-6)
				}
			}
			h := mustCont(t, st, p, bands.K, nil)
			for _, k := range []float64{0.03, 0.2, 0.9} {
				kx, ky := k*math.Cos(0.4), k*math.Sin(0.4)
				full := values(t, h, kx, ky)
				var union []float64
				for _, s := range secs {
					if s.Kind == bands.MonolayerLike {
						e := p.HbarV() * k
						union = append(union, -e, e)
						continue
					}
					bl := p
					bl.Gamma1 = s.Lambda * p.Gamma1
					if bl.Gamma1 < 0 {
						bl.Gamma1 = -bl.Gamma1 // the sign of an interlayer coupling does not change a spectrum
					}
					union = append(union, values(t, mustCont(t, mustStack(t, "AB"), bl, bands.K, nil), kx, ky)...)
				}
				slices.Sort(union)
				require.Len(t, union, len(full))
				for i := range full {
					assert.InDelta(t, full[i], union[i], 1e-10, "k=%g band %d", k, i)
				}
			}
		})
	}
}

// The sector basis is orthonormal and complete, the sectors are exactly invariant under the
// γ0, γ1, γ3, γ4, Δ' Hamiltonian (Koshino & McCann, PRB 83, 165443 (2011): only γ2, γ5 mix
// them), and Sector.Weight of each eigenstate is 0 or 1 there.
func TestBernalSectorsInvariant(t *testing.T) {
	p := lattice.Graphite()
	p.Gamma2, p.Gamma5 = 0, 0
	for _, n := range []int{1, 3, 4, 5} {
		st, err := lattice.NewBernal(n)
		require.NoError(t, err)
		secs, err := bands.BernalSectors(st)
		require.NoError(t, err)
		var basis [][]float64
		for _, s := range secs {
			basis = append(basis, s.Basis...)
		}
		require.Len(t, basis, 2*n)
		for i := range basis {
			for j := range basis {
				dot := 0.0
				for x := range basis[i] {
					dot += basis[i][x] * basis[j][x]
				}
				want := 0.0
				if i == j {
					want = 1
				}
				assert.InDelta(t, want, dot, 1e-14)
			}
		}
		h := mustCont(t, st, p, bands.K, nil)
		s, err := bands.NewSolver(h.Dim())
		require.NoError(t, err)
		_, z, err := s.Vectors(h, 0.05, 0.11)
		require.NoError(t, err)
		dim := h.Dim()
		for b := range dim {
			v := z[b*dim : (b+1)*dim]
			tot := 0.0
			for _, sec := range secs {
				w := sec.Weight(v)
				tot += w
				// Degenerate states of different sectors could mix; none occur at this k.
				assert.True(t, w < 1e-12 || w > 1-1e-12, "N=%d band %d weight %g", n, b, w)
			}
			assert.InDelta(t, 1, tot, 1e-12)
		}
		// A projected sector Hamiltonian reproduces part of the full spectrum exactly.
		for _, sec := range secs {
			sh, err := bands.NewSectorHamiltonian(h, sec)
			require.NoError(t, err)
			es := values(t, sh, 0.05, 0.11)
			full := values(t, h, 0.05, 0.11)
			for _, e := range es {
				found := false
				for _, f := range full {
					if math.Abs(e-f) < 1e-12 {
						found = true
					}
				}
				assert.True(t, found, "N=%d sector %v energy %g", n, sec.Kind, e)
			}
		}
	}
	_, err := bands.BernalSectors(mustStack(t, "ABC"))
	assert.ErrorContains(t, err, "not Bernal")
}

// The projected bilayer-like block of ABAB... has the bilayer form with coupling λγ1 in the
// order (A1, B1, A2, B2).
func TestSectorBilayerForm(t *testing.T) {
	p := lattice.Minimal()
	st, _ := lattice.NewBernal(4)
	secs, err := bands.BernalSectors(st)
	require.NoError(t, err)
	h := mustCont(t, st, p, bands.K, nil)
	for _, sec := range secs {
		sh, err := bands.NewSectorHamiltonian(h, sec)
		require.NoError(t, err)
		m := make([]complex128, 16)
		kx, ky := 0.2, 0.1
		sh.At(m, kx, ky)
		pd := complex(p.HbarV()*kx, -p.HbarV()*ky)
		assert.InDelta(t, 0, cmplx.Abs(m[0*4+1]-pd), 1e-14)
		assert.InDelta(t, 0, cmplx.Abs(m[2*4+3]-pd), 1e-14)
		assert.InDelta(t, sec.Lambda*p.Gamma1, math.Abs(real(m[1*4+2])), 1e-14)
		for _, ij := range [][2]int{{0, 2}, {0, 3}, {1, 3}, {0, 0}, {1, 1}} {
			assert.InDelta(t, 0, cmplx.Abs(m[ij[0]*4+ij[1]]), 1e-14)
		}
	}
}
