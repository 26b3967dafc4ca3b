package hartree

import (
	"context"
	"fmt"
	"math"

	"lamina/lattice"
	"lamina/scf"
)

// HFOptions controls the Hartree-Fock iteration. The zero value is ready to use.
type HFOptions struct {
	// SCF holds the iteration settings. Zero Tol means 1e-6 eV on the largest change of any
	// potential or self-energy element; zero MaxIter means 400; a nil Mixer means Anderson
	// mixing of depth 8 with β = 0.5 after 4 damped linear steps (mean-field equations have
	// several solutions, and acceleration from a poor start can jump between their basins),
	// solved through its normal equations (the vectors are long).
	SCF scf.Settings
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results do not depend on it.
	Workers int
	// MixDensity iterates on the density matrices δρ_f(k) instead of the mean-field potentials
	// (U, Σ_f(k)); both are fixed points of the same equations (see the issue notes for the
	// iteration counts that made potential mixing the default).
	MixDensity bool
}

func (o HFOptions) settings() scf.Settings {
	s := o.SCF
	if s.Tol == 0 {
		s.Tol = 1e-6
	}
	if s.MaxIter == 0 {
		s.MaxIter = 400
	}
	if s.Mixer == nil {
		s.Mixer = scf.Anderson{Depth: 8, Beta: 0.5, Warmup: 4, Normal: true}
	}
	return s
}

// HFState is a point of the mean-field iteration: layer potentials and per-flavour
// self-energies on the grid of a [HFSolver]. It can seed another solve on the same grid
// (continuation). Treat it as read-only.
type HFState struct {
	U     []float64
	Sigma []complex128 // [flavour][node][dim×dim]
	// Tag is free for the caller (scans store the index of the point); it is saved with the state.
	Tag  int64
	grid *hfGrid
}

// Polarization holds the order parameters of one flavour, all densities in 1/nm²: its total
// density (relative to the neutral stack; flavours differ in a flavour-polarized metal),
// Dipole = Σ_l z_l n_l with z_l running linearly from −1 (layer 1) to +1 (layer N),
// Staggered = Σ_l (−1)^(l+1) n_l (N >= 3 only; zero otherwise), Sublattice = Σ_l (n_{A_l} − n_{B_l}).
type Polarization struct {
	Density                       float64 // the flavour's total density Σ_l n_l
	Dipole, Staggered, Sublattice float64
}

// HFResult is one self-consistent (or, with Converged false, last-iterate) mean-field state.
type HFResult struct {
	Seed  string
	State *HFState
	// Converged reports whether the iteration met its tolerance; Iterations and Residual (eV)
	// describe it.
	Converged  bool
	Iterations int
	Residual   float64
	SCF        *scf.Result
	// Energy is the energy per area relative to the reference (non-interacting neutral) state,
	// E = Tr[H0 δρ] + E_Hartree + ½ Tr[Σ_F δρ] in eV/nm² (at T > 0 the free energy E − TS).
	Energy float64
	Mu     float64 // chemical potential (eV); midgap for an insulator at T = 0
	// Gap is the four-flavour gap on the grid: the lowest empty-band minimum minus the highest
	// filled-band maximum over all flavours (eV); negative when bands overlap.
	Gap float64
	// FilledBands is the number of filled bands of each flavour.
	FilledBands [Flavors]int
	// FlavorGap is each flavour's own gap on the grid (eV).
	FlavorGap [Flavors]float64
	U         []float64          // layer potentials (eV, mean zero)
	Density   []float64          // layer densities n_l (1/nm²)
	Flavor    [Flavors][]float64 // per-flavour layer densities (1/nm²)
	Order     [Flavors]Polarization
	// Class and Pattern name the state (see [Classify]).
	Class, Pattern string
	// For a converged state in which every flavour is gapped: Chern is each flavour's Berry flux
	// of its filled bands through the grid's square (near ±N/2 for a layer-polarized flavour of a
	// chiral N-layer, exactly an integer only on a closed surface), SigmaXY their sum (the Hall
	// conductivity in e²/h), GapRefined the four-flavour gap with band edges searched between
	// grid points. NaN otherwise.
	Chern      [Flavors]float64
	SigmaXY    float64
	GapRefined float64
}

// HFSolver holds the grid, kernels and reference of one [MeanField] problem, so that several
// seeds and continuation steps reuse them. Not safe for concurrent use.
type HFSolver struct {
	g   *hfGrid
	opt HFOptions
}

// NewHFSolver prepares the k-grid, the non-interacting reference and the exchange kernels.
func NewHFSolver(mf MeanField, opt HFOptions) (*HFSolver, error) {
	if opt.Workers < 0 {
		return nil, fmt.Errorf("hartree: %d workers", opt.Workers)
	}
	g, err := newHFGrid(mf, opt.Workers)
	if err != nil {
		return nil, err
	}
	return &HFSolver{g: g, opt: opt}, nil
}

// Problem returns the solver's mean-field problem (with defaults filled in).
func (s *HFSolver) Problem() MeanField { return s.g.mf }

// Nodes returns the number of k-points in the disk per flavour.
func (s *HFSolver) Nodes() int { return len(s.g.nodes) }

// packLen is the length of the iteration vector: N potentials plus dim² reals per node and
// flavour (the Hermitian self-energy's upper triangle).
func (g *hfGrid) packLen() int { return g.n + Flavors*len(g.nodes)*g.dim*g.dim }

func (g *hfGrid) pack(dst []float64, u []float64, sigma []complex128) {
	copy(dst, u)
	x := dst[g.n:]
	dim := g.dim
	d2 := dim * dim
	for idx := 0; idx < Flavors*len(g.nodes); idx++ {
		s := sigma[idx*d2 : (idx+1)*d2]
		p := x[idx*d2 : (idx+1)*d2]
		q := 0
		for a := range dim {
			p[q] = real(s[a*dim+a])
			q++
			for b := a + 1; b < dim; b++ {
				p[q], p[q+1] = real(s[a*dim+b]), imag(s[a*dim+b])
				q += 2
			}
		}
	}
}

func (g *hfGrid) unpack(x []float64) ([]float64, []complex128) {
	u := make([]float64, g.n)
	dim := g.dim
	d2 := dim * dim
	sigma := make([]complex128, Flavors*len(g.nodes)*d2)
	return g.unpackTo(u, sigma, x)
}

// unpackTo is unpack into given buffers.
func (g *hfGrid) unpackTo(u []float64, sigma []complex128, x []float64) ([]float64, []complex128) {
	copy(u, x[:g.n])
	dim := g.dim
	d2 := dim * dim
	y := x[g.n:]
	for idx := 0; idx < Flavors*len(g.nodes); idx++ {
		s := sigma[idx*d2 : (idx+1)*d2]
		p := y[idx*d2 : (idx+1)*d2]
		q := 0
		for a := range dim {
			s[a*dim+a] = complex(p[q], 0)
			q++
			for b := a + 1; b < dim; b++ {
				s[a*dim+b] = complex(p[q], p[q+1])
				s[b*dim+a] = complex(p[q], -p[q+1])
				q += 2
			}
		}
	}
	return u, sigma
}

// Solve iterates from the seed to self-consistency. A run that does not converge returns its
// last iterate with Converged false and an error wrapping scf.ErrNotConverged.
func (s *HFSolver) Solve(ctx context.Context, seed Seed) (*HFResult, error) {
	g := s.g
	u0, sigma0, err := seed.initial(g)
	if err != nil {
		return nil, err
	}
	x0 := make([]float64, g.packLen())
	g.pack(x0, u0, sigma0)
	var last *hfIterate
	var lastX []float64
	var lastU []float64
	var lastSigma []complex128
	if g.uBuf == nil {
		g.uBuf = make([]float64, g.n)
		g.sigBuf = make([]complex128, Flavors*len(g.nodes)*g.dim*g.dim)
	}
	var zero []complex128
	if g.kernels == nil {
		zero = make([]complex128, len(g.sigBuf))
	}
	update := func(ctx context.Context, dst, x []float64) error {
		u, sigma := g.unpackTo(g.uBuf, g.sigBuf, x)
		if g.kernels == nil {
			sigma = nil
		}
		it, err := g.evaluate(ctx, u, sigma)
		if err != nil {
			return err
		}
		sg := it.sigma
		if sg == nil {
			sg = zero
		}
		g.pack(dst, it.u, sg)
		last, lastX = it, x
		return nil
	}
	if s.opt.MixDensity {
		// x holds δρ (the potential slots stay zero): G(δρ) = ρ[H(U[δρ], Σ[δρ])] − ρ_ref.
		it0, err := g.evaluate(ctx, u0, maybe(sigma0, g.kernels != nil))
		if err != nil {
			return nil, err
		}
		clear(x0)
		g.pack(x0, make([]float64, g.n), it0.drho)
		drho := make([]complex128, len(g.sigBuf))
		sig := make([]complex128, len(g.sigBuf))
		update = func(ctx context.Context, dst, x []float64) error {
			_, d := g.unpackTo(g.uBuf, drho, x)
			u := g.hartreeFrom(g.layerDensities(d))
			var sg []complex128
			if g.kernels != nil {
				if err := g.fock(ctx, sig, d); err != nil {
					return err
				}
				sg = sig
			}
			g.skipFock = true
			it, err := g.evaluate(ctx, u, sg)
			g.skipFock = false
			if err != nil {
				return err
			}
			g.pack(dst, make([]float64, g.n), it.drho)
			last, lastX = it, nil
			lastU, lastSigma = u, append(lastSigma[:0], sig...)
			return nil
		}
	}
	res, err := scf.Solve(ctx, scf.Problem{Update: update}, x0, s.opt.settings())
	if s.opt.MixDensity && last != nil {
		// The state is the mean field of the last input density; the observables need the Fock
		// term of the last output density, which the loop skipped.
		if g.kernels != nil {
			if err := g.fock(ctx, last.sigma, last.drho); err != nil {
				return nil, err
			}
		}
		lastX = make([]float64, g.packLen())
		if g.kernels == nil {
			lastSigma = make([]complex128, len(g.sigBuf))
		}
		g.pack(lastX, lastU, lastSigma)
	}
	out := &HFResult{Seed: seed.Name, SCF: res, Converged: res.Status == scf.Converged, Iterations: res.Iterations, Residual: res.Residual}
	if last != nil {
		u, sigma := g.unpack(lastX)
		out.State = &HFState{U: u, Sigma: sigma, grid: g}
		g.describe(out, last)
	}
	if err != nil {
		return out, fmt.Errorf("hartree: mean field from seed %q: %w", seed.Name, err)
	}
	if err := g.topology(ctx, out, s.opt.Workers); err != nil {
		return out, err
	}
	return out, nil
}

func maybe(s []complex128, ok bool) []complex128 {
	if ok {
		return s
	}
	return nil
}

// describe fills the physical observables of r from the last evaluation.
func (g *hfGrid) describe(r *HFResult, it *hfIterate) {
	m, dim, d2 := len(g.nodes), g.dim, g.dim*g.dim
	r.Mu = it.mu
	r.U = it.u
	r.Density = it.nl
	for f := range Flavors {
		r.Flavor[f] = it.flavorNl[f]
	}
	// Energy.
	ekin, ex := 0.0, 0.0
	h0 := make([]complex128, d2)
	for idx := 0; idx < Flavors*m; idx++ {
		v, i := (idx/m)%2, idx%m
		k := g.nodes[i]
		g.h0[v].At(h0, k.X, k.Y)
		dr := it.drho[idx*d2 : (idx+1)*d2]
		for a := range dim {
			for b := range dim {
				ekin += real(h0[a*dim+b] * dr[b*dim+a])
				if it.sigma != nil {
					ex += real(it.sigma[idx*d2+a*dim+b] * dr[b*dim+a])
				}
			}
		}
	}
	eh := 0.0
	if !g.mf.Interaction.Off {
		for l := range it.nl {
			dn := it.nl[l] - g.mf.Field.N/float64(g.n)
			eh += (g.uExt[l] + 0.5*(it.u[l]-g.uExt[l])) * dn
		}
	} else {
		for l := range it.nl {
			eh += g.uExt[l] * (it.nl[l] - g.mf.Field.N/float64(g.n))
		}
	}
	r.Energy = g.w*ekin + eh + 0.5*g.w*ex
	if g.mf.T > 0 {
		kT := lattice.BoltzmannEV * g.mf.T
		ent := 0.0
		for _, f := range it.occ {
			if f > 0 && f < 1 {
				ent -= f*math.Log(f) + (1-f)*math.Log(1-f)
			}
		}
		r.Energy -= kT * g.w * ent
	}
	// Gaps: per flavour, the number of filled bands from its electron count.
	overallLo, overallHi := math.Inf(1), math.Inf(-1)
	for f := range Flavors {
		cnt := 0.0
		for i := range m {
			for b := range dim {
				cnt += it.occ[(f*m+i)*dim+b]
			}
		}
		nf := int(math.Round(cnt / float64(m)))
		nf = max(0, min(nf, dim))
		r.FilledBands[f] = nf
		lo, hi := math.Inf(1), math.Inf(-1)
		for i := range m {
			e := it.e[(f*m+i)*dim : (f*m+i+1)*dim]
			if nf < dim {
				lo = math.Min(lo, e[nf])
			}
			if nf > 0 {
				hi = math.Max(hi, e[nf-1])
			}
		}
		r.FlavorGap[f] = lo - hi
		overallLo, overallHi = math.Min(overallLo, lo), math.Max(overallHi, hi)
	}
	r.Gap = overallLo - overallHi
	if g.mf.T == 0 && r.Gap > 0 {
		r.Mu = (overallLo + overallHi) / 2 // midgap: any μ in the gap holds the same state
	}
	// Order parameters.
	n := g.n
	for f := range Flavors {
		var p Polarization
		for l, v := range it.flavorNl[f] {
			p.Density += v
			z := 0.0
			if n > 1 {
				z = -1 + 2*float64(l)/float64(n-1)
			}
			p.Dipole += z * v
			if n >= 3 { // for N <= 2 the staggered pattern is no separate order parameter
				if l%2 == 0 {
					p.Staggered += v
				} else {
					p.Staggered -= v
				}
			}
		}
		for i := range m {
			dr := it.drho[(f*m+i)*d2 : (f*m+i+1)*d2]
			for l := range n {
				p.Sublattice += g.w * (real(dr[(2*l)*dim+2*l]) - real(dr[(2*l+1)*dim+2*l+1]))
			}
		}
		r.Order[f] = p
	}
	r.Class, r.Pattern = Classify(r.Order, 0.1)
}
