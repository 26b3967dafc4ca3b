package hartree

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
)

// CheckFock compares the FFT exchange self-energy with the direct double sum on the solver's
// grid for a random Hermitian δρ, and returns the largest difference (eV) and the largest
// deviation of Σ from Hermiticity.
func CheckFock(s *HFSolver, seed uint64) (diff, herm float64, err error) {
	g := s.g
	m, dim := len(g.nodes), g.dim
	d2 := dim * dim
	r := rand.New(rand.NewPCG(seed, 3))
	drho := make([]complex128, Flavors*m*d2)
	for idx := 0; idx < Flavors*m; idx++ {
		p := drho[idx*d2 : (idx+1)*d2]
		for a := range dim {
			p[a*dim+a] = complex(r.NormFloat64(), 0)
			for b := a + 1; b < dim; b++ {
				v := complex(r.NormFloat64(), r.NormFloat64())
				p[a*dim+b], p[b*dim+a] = v, cmplx.Conj(v)
			}
		}
	}
	sigma := make([]complex128, len(drho))
	if err := g.fock(context.Background(), sigma, drho); err != nil {
		return 0, 0, err
	}
	kern := make([]func(di, dj int) float64, g.n*g.n)
	for l := range g.n {
		for lp := range g.n {
			kern[l*g.n+lp] = gridKernel(g.screenedPair(l, lp), g.h)
		}
	}
	for f := range Flavors {
		for i := range m {
			ii, ji := g.index[i]/g.L, g.index[i]%g.L
			for a := range dim {
				for b := range dim {
					var want complex128
					k := kern[g.layerOf[a]*g.n+g.layerOf[b]]
					for j := range m {
						ij, jj := g.index[j]/g.L, g.index[j]%g.L
						want += complex(k(ii-ij, ji-jj), 0) * drho[(f*m+j)*d2+a*dim+b]
					}
					got := sigma[(f*m+i)*d2+a*dim+b]
					diff = math.Max(diff, cmplx.Abs(got-want))
					herm = math.Max(herm, cmplx.Abs(got-cmplx.Conj(sigma[(f*m+i)*d2+b*dim+a])))
				}
			}
		}
	}
	return diff, herm, nil
}

// ExchangeKernelSample returns the exchange kernel of layer pair (0, 0) at the given grid offsets.
func ExchangeKernelSample(mf MeanField, offsets [][2]int) ([]float64, error) {
	g, err := newHFGrid(mf, 1)
	if err != nil {
		return nil, err
	}
	k := gridKernel(g.screenedPair(0, 0), g.h)
	out := make([]float64, len(offsets))
	for i, o := range offsets {
		out[i] = k(o[0], o[1])
	}
	return out, nil
}

// EvaluateOnce runs one evaluation of the mean-field map from the symmetric state plus a small
// layer-antiferromagnetic self-energy.
func EvaluateOnce(ctx context.Context, s *HFSolver) error {
	u, sigma, err := PatternSeed([Flavors]float64{1, 1, -1, -1}, Linear, 0.01).initial(s.g)
	if err != nil {
		return err
	}
	if s.g.kernels == nil {
		sigma = nil
	}
	_, err = s.g.evaluate(ctx, u, sigma)
	return err
}
