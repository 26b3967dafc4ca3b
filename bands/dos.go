package bands

import (
	"context"
	"fmt"
	"math"

	"lamina/internal/par"
)

// DOSOptions controls [DensityOfStates] and [CarrierDensity]. The zero value integrates the disk
// |k| <= 1.5/nm on a 241 x 241 grid with the linear triangle method.
type DOSOptions struct {
	// KMax is the radius of the k-space disk around each valley (1/nm); 0 means 1.5. States
	// outside the disk are taken as filled below and empty above the neutral Fermi level, so n(μ)
	// is exact as long as no band with E between 0 and μ reaches the disk edge.
	KMax float64
	// Grid is the number of grid points across the disk (odd, so k = 0 is a node); 0 means 241.
	Grid int
	// Broadening selects the method. 0 (default): linear triangle method, exact for bands
	// interpolated linearly on the triangles of the grid (the 2D analogue of the tetrahedron
	// method; Lehmann & Taut, Phys. Status Solidi B 54, 469 (1972)). > 0: Gaussian
	// broadening of each grid state with this standard deviation (eV).
	Broadening float64
	// Degeneracy multiplies every Hamiltonian's contribution; 0 means 2 (spin).
	Degeneracy float64
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results do not depend on it.
	Workers int
}

type kgrid struct {
	n     int
	h     float64 // spacing (1/nm)
	kmax  float64
	nodes []KPoint
}

func (o *DOSOptions) grid() (kgrid, error) {
	kmax, n := o.KMax, o.Grid
	if kmax == 0 {
		kmax = 1.5
	}
	if n == 0 {
		n = 241
	}
	if err := finitePositive("KMax", kmax); err != nil {
		return kgrid{}, err
	}
	if n < 3 {
		return kgrid{}, fmt.Errorf("bands: DOS grid of %d points is too small", n)
	}
	if math.IsNaN(o.Broadening) || o.Broadening < 0 || math.IsInf(o.Broadening, 0) {
		return kgrid{}, fmt.Errorf("bands: broadening %g eV must be zero or positive", o.Broadening)
	}
	if math.IsNaN(o.Degeneracy) || o.Degeneracy < 0 || math.IsInf(o.Degeneracy, 0) {
		return kgrid{}, fmt.Errorf("bands: degeneracy %g must be zero (default 2) or positive", o.Degeneracy)
	}
	g := kgrid{n: n, kmax: kmax, h: 2 * kmax / float64(n-1)}
	g.nodes = make([]KPoint, n*n)
	for i := range n {
		for j := range n {
			g.nodes[i*n+j] = KPoint{-kmax + float64(i)*g.h, -kmax + float64(j)*g.h}
		}
	}
	return g, nil
}

// bandsOnGrid diagonalises every Hamiltonian at every node: e[h][node*dim+b].
func bandsOnGrid(ctx context.Context, hs []Hamiltonian, g kgrid, workers int) ([][]float64, error) {
	if len(hs) == 0 {
		return nil, fmt.Errorf("bands: no Hamiltonians given")
	}
	dim := hs[0].Dim()
	for _, h := range hs {
		if h.Dim() != dim {
			return nil, fmt.Errorf("bands: Hamiltonians of orders %d and %d mixed", dim, h.Dim())
		}
	}
	out := make([][]float64, len(hs))
	for i := range out {
		out[i] = make([]float64, len(g.nodes)*dim)
	}
	total := len(hs) * len(g.nodes)
	workers = par.Workers(workers, total)
	solvers := make([]*Solver, workers)
	for i := range solvers {
		var err error
		if solvers[i], err = NewSolver(dim); err != nil {
			return nil, err
		}
	}
	err := par.For(ctx, workers, total, func(w, idx int) error {
		hi, ni := idx/len(g.nodes), idx%len(g.nodes)
		k := g.nodes[ni]
		e, err := solvers[w].Values(hs[hi], k.X, k.Y)
		if err != nil {
			return err
		}
		copy(out[hi][ni*dim:], e)
		return nil
	})
	return out, err
}

// forTriangles calls f for each triangle of the grid whose centroid lies inside the disk, with
// the node indices of its corners. Each grid square is split along its diagonal.
func (g kgrid) forTriangles(f func(a, b, c int)) {
	n := g.n
	for i := 0; i+1 < n; i++ {
		for j := 0; j+1 < n; j++ {
			p00, p10, p01, p11 := i*n+j, (i+1)*n+j, i*n+j+1, (i+1)*n+j+1
			for _, tri := range [2][3]int{{p00, p10, p11}, {p00, p11, p01}} {
				cx := (g.nodes[tri[0]].X + g.nodes[tri[1]].X + g.nodes[tri[2]].X) / 3
				cy := (g.nodes[tri[0]].Y + g.nodes[tri[1]].Y + g.nodes[tri[2]].Y) / 3
				if cx*cx+cy*cy <= g.kmax*g.kmax {
					f(tri[0], tri[1], tri[2])
				}
			}
		}
	}
}

// triDOS returns the density of states (per unit energy, per unit area of the triangle) at E of a
// band linear on a triangle with corner energies e1, e2, e3.
func triDOS(E, e1, e2, e3 float64) float64 {
	e1, e2, e3 = sort3(e1, e2, e3)
	switch {
	case E <= e1 || E >= e3 || e3 == e1:
		return 0
	case E < e2:
		return 2 * (E - e1) / ((e2 - e1) * (e3 - e1))
	default:
		return 2 * (e3 - E) / ((e3 - e1) * (e3 - e2))
	}
}

// TriangleFilling returns the fraction of a triangle's area where a band that is linear on it,
// with corner energies e1, e2, e3, lies below mu (linear triangle method).
func TriangleFilling(mu, e1, e2, e3 float64) float64 {
	e1, e2, e3 = sort3(e1, e2, e3)
	switch {
	case mu <= e1:
		return 0
	case mu >= e3:
		return 1
	case mu < e2:
		return (mu - e1) * (mu - e1) / ((e2 - e1) * (e3 - e1))
	default:
		return 1 - (e3-mu)*(e3-mu)/((e3-e1)*(e3-e2))
	}
}

func sort3(a, b, c float64) (float64, float64, float64) {
	if a > b {
		a, b = b, a
	}
	if b > c {
		b, c = c, b
	}
	if a > b {
		a, b = b, a
	}
	return a, b, c
}

// DensityOfStates returns the density of states of the Hamiltonians hs (typically the two
// valleys of one stack), each counted Degeneracy times, at the given energies (eV), in states
// per eV per nm².
func DensityOfStates(ctx context.Context, hs []Hamiltonian, energies []float64, opt DOSOptions) ([]float64, error) {
	s := opt.Broadening
	c := 1 / (s * math.Sqrt(2*math.Pi))
	node := func(E, eb float64, _ bool) float64 {
		// Gaussian of each grid state.
		x := (E - eb) / s
		if x*x >= 80 {
			return 0
		}
		return c * math.Exp(-x*x/2)
	}
	tri := func(E, e1, e2, e3 float64, _ bool) float64 { return triDOS(E, e1, e2, e3) }
	return integrateBands(ctx, hs, energies, opt, node, tri)
}

// CarrierDensity returns n(μ) at temperature 0 for each chemical potential mu (eV): the electron
// density relative to the state with the lowest Dim/2 bands of every Hamiltonian filled (charge
// neutrality), in 1/nm², counting each Hamiltonian Degeneracy times. Uses the triangle method
// (or Gaussian broadening, see [DOSOptions]).
func CarrierDensity(ctx context.Context, hs []Hamiltonian, mu []float64, opt DOSOptions) ([]float64, error) {
	s := opt.Broadening
	node := func(m, eb float64, valence bool) float64 {
		occ := 0.5 * math.Erfc((eb-m)/(s*math.Sqrt2))
		if valence {
			occ--
		}
		return occ
	}
	tri := func(m, e1, e2, e3 float64, valence bool) float64 {
		f := TriangleFilling(m, e1, e2, e3)
		if valence {
			f--
		}
		return f
	}
	return integrateBands(ctx, hs, mu, opt, node, tri)
}

// integrateBands sums, for every argument x in xs, a band quantity over the disk of opt, both
// valleys' (all Hamiltonians') bands, weighted by Degeneracy/(2π)²: with Broadening > 0 as
// node(x, E_b(k), valence) times the node's area h², otherwise (triangle method) as
// tri(x, E_b at the three corners, valence) times the triangle's area. valence is true for the
// lowest Dim/2 bands.
func integrateBands(ctx context.Context, hs []Hamiltonian, xs []float64, opt DOSOptions,
	node func(x, eb float64, valence bool) float64, tri func(x, e1, e2, e3 float64, valence bool) float64) ([]float64, error) {
	g, err := opt.grid()
	if err != nil {
		return nil, err
	}
	deg := opt.Degeneracy
	if deg == 0 {
		deg = 2
	}
	e, err := bandsOnGrid(ctx, hs, g, opt.Workers)
	if err != nil {
		return nil, err
	}
	dim := hs[0].Dim()
	out := make([]float64, len(xs))
	norm := deg / (4 * math.Pi * math.Pi)
	for hi := range hs {
		eh := e[hi]
		if opt.Broadening > 0 {
			w := norm * g.h * g.h // each node carries the area h², restricted to the disk
			for ni, k := range g.nodes {
				if k.X*k.X+k.Y*k.Y > g.kmax*g.kmax {
					continue
				}
				for b := range dim {
					eb := eh[ni*dim+b]
					for ix, x := range xs {
						out[ix] += w * node(x, eb, b < dim/2)
					}
				}
			}
			continue
		}
		w := norm * g.h * g.h / 2
		g.forTriangles(func(a, b, c int) {
			for bd := range dim {
				e1, e2, e3 := eh[a*dim+bd], eh[b*dim+bd], eh[c*dim+bd]
				for ix, x := range xs {
					out[ix] += w * tri(x, e1, e2, e3, bd < dim/2)
				}
			}
		})
	}
	return out, nil
}
