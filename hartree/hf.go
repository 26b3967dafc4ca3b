package hartree

import (
	"context"
	"fmt"
	"math"
	"slices"

	"lamina/bands"
	"lamina/internal/eigh"
	"lamina/internal/fft"
	"lamina/internal/par"
	"lamina/lattice"
)

// Flavors is the number of spin-valley flavours, ordered (up,K), (up,K'), (down,K), (down,K').
const Flavors = 4

// FlavorValley returns the valley of flavour f.
func FlavorValley(f int) bands.Valley {
	if f%2 == 0 {
		return bands.K
	}
	return bands.KPrime
}

// FlavorName returns "up,K", "up,K'", "down,K" or "down,K'".
func FlavorName(f int) string {
	s := "up"
	if f >= 2 {
		s = "down"
	}
	return s + "," + FlavorValley(f).String()
}

// MeanField is one Hartree-Fock problem: a device in an electrostatic environment, with the
// Coulomb interaction, on a momentum grid around each valley.
//
// Per flavour f (spin × valley) the mean-field Hamiltonian is
//
//	H_f(k) = H0_ξ(k) + diag(U_l) + Σ_f(k),
//	Σ_f(k)_ab = −(1/A) Σ_k' V_{l(a) l(b)}(k − k') [ρ_f(k') − ρ_ref(k')]_ab,   ρ_ab = <c†_b c_a>,
//
// with U_l the Hartree (layer capacitor) potentials of the layer densities under the field, and
// ρ_ref the density matrix of the non-interacting, neutral, unbiased stack on the same grid (so
// the symmetric state has no exchange correction and the band parameters, fitted to experiment,
// are not double counted). The k-sum runs over a uniform square grid of Grid × Grid cell-centred
// points restricted to the disk |k| <= Λ, ħvΛ = Cutoff; (1/A)Σ_k → (Δk)²/(2π)² Σ_k. The exchange
// sum is a convolution, done with zero-padded FFTs, and the q = 0 singularity of V is
// integrated over its cell.
type MeanField struct {
	// Device gives the stack and bands. Its EpsZ (the Hartree capacitor's dielectric constant)
	// defaults to the interaction's Eps, so that the capacitor is the q → 0 limit of V.
	Device      Device
	Interaction Interaction
	Field       Field
	// T is the temperature in K (0 allowed).
	T float64
	// Cutoff is ħvΛ in eV (0 means 1 eV); Grid the number of grid points across the disk's
	// diameter (0 means 64).
	Cutoff float64
	Grid   int
	// NoExchange drops the Fock term (Hartree only).
	NoExchange bool
}

func (mf MeanField) withDefaults() MeanField {
	if mf.Cutoff == 0 {
		mf.Cutoff = 1
	}
	if mf.Grid == 0 {
		mf.Grid = 64
	}
	if mf.Device.EpsZ == 0 {
		mf.Device.EpsZ = mf.Interaction.eps()
	}
	return mf
}

// Validate reports whether mf can be solved: the device, interaction, field, temperature, cutoff
// and grid are checked (zero values meaning defaults are accepted).
func (mf MeanField) Validate() error { return mf.withDefaults().validate() }

func (mf MeanField) validate() error {
	if err := mf.Device.validate(); err != nil {
		return err
	}
	if err := mf.Interaction.validate(); err != nil {
		return err
	}
	if err := mf.Field.validate(); err != nil {
		return err
	}
	if !finite(mf.T) || mf.T < 0 {
		return fmt.Errorf("hartree: temperature %g K must be zero or positive", mf.T)
	}
	if !finite(mf.Cutoff) || mf.Cutoff < 0 {
		return fmt.Errorf("hartree: cutoff %g eV must be positive", mf.Cutoff)
	}
	if mf.Grid < 0 || (mf.Grid > 0 && mf.Grid < 4) || mf.Grid > 1024 {
		return fmt.Errorf("hartree: grid of %d points across is not between 4 and 1024", mf.Grid)
	}
	return nil
}

// hfGrid is the k-grid of a MeanField and everything that does not change during iterations.
type hfGrid struct {
	mf      MeanField
	n, dim  int     // layers, orbitals
	L       int     // points across
	h       float64 // spacing (1/nm)
	w       float64 // weight per k-point: h²/(2π)² (1/nm²)
	kmax    float64
	nodes   []bands.KPoint
	index   []int               // grid position i*L+j of each in-disk node
	h0      [2]*bands.Continuum // per valley: the non-interacting Hamiltonian (no potentials)
	ref     [2][]complex128     // per valley: M × dim² reference density matrix
	kernels []*fft.Kernel       // by layer pair l*N+l'
	rpa     *rpaTable
	layerOf []int
	uExt    []float64 // potentials of the external field alone (eV, mean zero)
	workers int
	convs   []*fft.Convolver
	eig     []*eigh.Workspace
	fields  [][]complex128 // per worker L×L scratch
	fieldsB [][]complex128
	rfA     [][]float64
	rfB     [][]float64
	rfC     [][]float64
	rfD     [][]float64
	wbuf    [][]float64
	zbuf    [][]complex128
	hbuf    [][]complex128
	its     [1]*hfIterate // the evaluation buffer, reused

	uBuf   []float64
	sigBuf []complex128
	// skipFock makes evaluate leave out the Fock term of its output (density mixing computes
	// it from the input instead).
	skipFock bool
}

func newHFGrid(mf MeanField, workers int) (*hfGrid, error) {
	mf = mf.withDefaults()
	if err := mf.validate(); err != nil {
		return nil, err
	}
	st, p := mf.Device.Stack, mf.Device.Params
	g := &hfGrid{mf: mf, n: st.Layers(), dim: st.Orbitals(), L: mf.Grid}
	g.kmax = mf.Cutoff / p.HbarV()
	g.h = 2 * g.kmax / float64(g.L)
	g.w = g.h * g.h / (4 * math.Pi * math.Pi)
	for i := range g.L {
		for j := range g.L {
			k := bands.KPoint{X: (float64(i) + 0.5 - float64(g.L)/2) * g.h, Y: (float64(j) + 0.5 - float64(g.L)/2) * g.h}
			if math.Hypot(k.X, k.Y) <= g.kmax {
				g.nodes = append(g.nodes, k)
				g.index = append(g.index, i*g.L+j)
			}
		}
	}
	g.layerOf = make([]int, g.dim)
	for a := range g.layerOf {
		g.layerOf[a] = lattice.SiteLayer(a) - 1
	}
	m, dim := len(g.nodes), g.dim
	g.workers = par.Workers(workers, m*Flavors)
	ctx := context.Background()
	for v, valley := range []bands.Valley{bands.K, bands.KPrime} {
		h, err := bands.NewContinuum(st, p, valley, nil)
		if err != nil {
			return nil, err
		}
		g.h0[v] = h
	}
	g.eig = make([]*eigh.Workspace, g.workers)
	g.wbuf = make([][]float64, g.workers)
	g.zbuf = make([][]complex128, g.workers)
	g.hbuf = make([][]complex128, g.workers)
	for i := range g.eig {
		var err error
		if g.eig[i], err = eigh.NewWorkspace(dim); err != nil {
			return nil, err
		}
		g.wbuf[i] = make([]float64, dim)
		g.zbuf[i] = make([]complex128, dim*dim)
		g.hbuf[i] = make([]complex128, dim*dim)
	}
	if err := g.buildReference(ctx); err != nil {
		return nil, err
	}
	// External potentials: the field alone (no induced charge, the doping charge spread evenly
	// so that it does not itself polarise the stack).
	even := make([]float64, g.n)
	for l := range even {
		even[l] = mf.Field.N / float64(g.n)
	}
	g.uExt = LayerPotentials(nil, even, mf.Field.Below(), p.D, mf.Device.EpsZ)
	if !mf.NoExchange && !mf.Interaction.Off {
		if err := g.buildKernels(); err != nil {
			return nil, err
		}
	}
	return g, nil
}

// buildReference fills ρ_ref: the non-interacting neutral stack on this grid, occupied by energy
// at the chemical potential that makes it neutral (ties at that level shared equally).
func (g *hfGrid) buildReference(ctx context.Context) error {
	m, dim := len(g.nodes), g.dim
	e := make([][]float64, 2)
	z := make([][]complex128, 2)
	for v := range 2 {
		e[v] = make([]float64, m*dim)
		z[v] = make([]complex128, m*dim*dim)
		err := par.For(ctx, g.workers, m, func(wi, i int) error {
			k := g.nodes[i]
			g.h0[v].At(g.hbuf[wi], k.X, k.Y)
			return g.eig[wi].Eigen(e[v][i*dim:(i+1)*dim], z[v][i*dim*dim:(i+1)*dim*dim], g.hbuf[wi])
		})
		if err != nil {
			return fmt.Errorf("hartree: reference bands: %w", err)
		}
	}
	occ, _, err := fillT0(append(append([]float64(nil), e[0]...), e[1]...), float64(m*(dim/2)*2))
	if err != nil {
		return err
	}
	for v := range 2 {
		g.ref[v] = make([]complex128, m*dim*dim)
		for i := range m {
			densityMatrix(g.ref[v][i*dim*dim:(i+1)*dim*dim], z[v][i*dim*dim:(i+1)*dim*dim], occ[v*m*dim+i*dim:v*m*dim+(i+1)*dim], dim)
		}
	}
	return nil
}

// densityMatrix sets rho_ab = Σ_n occ_n z_n(a) z_n(b)*.
func densityMatrix(rho, z []complex128, occ []float64, dim int) {
	clear(rho)
	for n, o := range occ {
		if o == 0 {
			continue
		}
		v := z[n*dim : (n+1)*dim]
		for a := range dim {
			va := complex(o, 0) * v[a]
			row := rho[a*dim : (a+1)*dim]
			for b := range dim {
				row[b] += va * complex(real(v[b]), -imag(v[b]))
			}
		}
	}
}

func (g *hfGrid) buildKernels() error {
	c, err := fft.NewConvolver(g.L, g.L)
	if err != nil {
		return fmt.Errorf("hartree: %w", err)
	}
	if g.mf.Interaction.Screening == RPA {
		qmax := g.h * float64(g.L) * math.Sqrt2
		if g.rpa, err = rpaTableFor(context.Background(), g.mf.Device.Stack, g.mf.Device.Params, g.mf.T, qmax, g.workers); err != nil {
			return err
		}
	}
	g.kernels = make([]*fft.Kernel, g.n*g.n)
	byDist := map[int]*fft.Kernel{}
	for l := range g.n {
		for lp := l; lp < g.n; lp++ {
			var k *fft.Kernel
			if g.mf.Interaction.Screening != RPA {
				k = byDist[lp-l] // depends on the layer distance only
			}
			if k == nil {
				if k, err = c.NewKernel(gridKernel(g.screenedPair(l, lp), g.h)); err != nil {
					return fmt.Errorf("hartree: exchange kernel for layers %d, %d: %w", l+1, lp+1, err)
				}
				byDist[lp-l] = k
			}
			g.kernels[l*g.n+lp], g.kernels[lp*g.n+l] = k, k
		}
	}
	g.convs = make([]*fft.Convolver, g.workers)
	g.fields = make([][]complex128, g.workers)
	g.fieldsB = make([][]complex128, g.workers)
	g.rfA, g.rfB, g.rfC, g.rfD = make([][]float64, g.workers), make([][]float64, g.workers), make([][]float64, g.workers), make([][]float64, g.workers)
	g.convs[0] = c
	for i := range g.workers {
		if i > 0 {
			if g.convs[i], err = fft.NewConvolver(g.L, g.L); err != nil {
				return fmt.Errorf("hartree: %w", err)
			}
		}
		g.fields[i] = make([]complex128, g.L*g.L)
		g.fieldsB[i] = make([]complex128, g.L*g.L)
		g.rfA[i], g.rfB[i] = make([]float64, g.L*g.L), make([]float64, g.L*g.L)
		g.rfC[i], g.rfD[i] = make([]float64, g.L*g.L), make([]float64, g.L*g.L)
	}
	return nil
}

// fillT0 returns occupations (0..1) at T = 0 of the energies e with nFill electrons (nFill may
// be fractional): states below the Fermi level are full, states within a small tolerance of it
// share the remainder equally. It also returns the Fermi level (the energy of the last filled
// state).
func fillT0(e []float64, nFill float64) ([]float64, float64, error) {
	occ := make([]float64, len(e))
	ef, err := fillT0To(occ, e, nFill, nil)
	return occ, ef, err
}

// fillT0To is fillT0 writing into occ, with scratch space for the sorted energies.
func fillT0To(occ, e []float64, nFill float64, scratch []float64) (float64, error) {
	n := len(e)
	if nFill < -1e-9 || nFill > float64(n)+1e-9 || math.IsNaN(nFill) {
		return 0, fmt.Errorf("hartree: %g electrons do not fit into %d states (density outside the grid's bands)", nFill, n)
	}
	nFill = math.Min(math.Max(nFill, 0), float64(n))
	sorted := append(scratch[:0], e...)
	slices.Sort(sorted)
	if nFill < 1e-9 {
		clear(occ)
		return sorted[0], nil
	}
	// The Fermi level is the energy of state number nFill (counting from 1, rounded up).
	top := min(int(math.Ceil(nFill-1e-9))-1, n-1)
	ef := sorted[top]
	const tol = 1e-10
	scale := math.Max(1, math.Abs(ef))
	below, tied := 0, 0
	for _, x := range e {
		switch {
		case x < ef-tol*scale:
			below++
		case x <= ef+tol*scale:
			tied++
		}
	}
	share := (nFill - float64(below)) / float64(tied)
	for i, x := range e {
		switch {
		case x < ef-tol*scale:
			occ[i] = 1
		case x <= ef+tol*scale:
			occ[i] = share
		default:
			occ[i] = 0
		}
	}
	return ef, nil
}

// fillT returns Fermi-Dirac occupations at k_B T = kT (eV) holding nFill electrons, and μ.
func fillT(e []float64, nFill, kT float64) ([]float64, float64, error) {
	if kT == 0 {
		return fillT0(e, nFill)
	}
	lo, hi := slices.Min(e)-40*kT, slices.Max(e)+40*kT
	count := func(mu float64) float64 {
		s := 0.0
		for _, x := range e {
			s += fermi(x-mu, kT)
		}
		return s
	}
	if nFill < 0 || nFill > float64(len(e)) {
		return nil, 0, fmt.Errorf("hartree: %g electrons do not fit into %d states", nFill, len(e))
	}
	for range 200 {
		mid := (lo + hi) / 2
		if hi-lo < 1e-15*math.Max(1, math.Abs(mid)) {
			break
		}
		if count(mid) < nFill {
			lo = mid
		} else {
			hi = mid
		}
	}
	mu := (lo + hi) / 2
	occ := make([]float64, len(e))
	for i, x := range e {
		occ[i] = fermi(x-mu, kT)
	}
	return occ, mu, nil
}

// hfIterate holds one evaluation of the mean-field map.
type hfIterate struct {
	e        []float64    // [f][m][band]
	z        []complex128 // [f][m][dim²]
	occ      []float64
	drho     []complex128 // [f][m][dim²]
	mu       float64
	nl       []float64 // layer densities (1/nm²)
	flavorNl [][]float64
	u        []float64    // Hartree potentials from nl (eV)
	sigma    []complex128 // Fock self-energy from drho, [f][m][dim²]
	part     []float64
	sorted   []float64
}

// evaluate computes the mean-field map at potentials u and self-energies sigma (sigma may be nil
// for none).
func (g *hfGrid) evaluate(ctx context.Context, u []float64, sigma []complex128) (*hfIterate, error) {
	m, dim := len(g.nodes), g.dim
	d2 := dim * dim
	// One iterate buffer, reused: the solver only ever needs the latest evaluation.
	it := g.its[0]
	if it == nil {
		it = &hfIterate{e: make([]float64, Flavors*m*dim), z: make([]complex128, Flavors*m*d2),
			occ: make([]float64, Flavors*m*dim), drho: make([]complex128, Flavors*m*d2),
			part: make([]float64, Flavors*m*g.n), sorted: make([]float64, Flavors*m*dim)}
		if g.kernels != nil {
			it.sigma = make([]complex128, Flavors*m*d2)
		}
		g.its[0] = it
	}
	err := par.For(ctx, g.workers, Flavors*m, func(wi, idx int) error {
		f, i := idx/m, idx%m
		v := f % 2
		hm := g.hbuf[wi]
		k := g.nodes[i]
		g.h0[v].At(hm, k.X, k.Y)
		for a := range dim {
			hm[a*dim+a] += complex(u[g.layerOf[a]], 0)
		}
		if sigma != nil {
			s := sigma[idx*d2 : (idx+1)*d2]
			for x := range hm {
				hm[x] += s[x]
			}
		}
		if err := g.eig[wi].Eigen(it.e[idx*dim:(idx+1)*dim], it.z[idx*d2:(idx+1)*d2], hm); err != nil {
			return fmt.Errorf("hartree: flavour %s at k = (%g, %g) /nm: %w", FlavorName(f), k.X, k.Y, err)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	// Occupations at fixed total density: the reference holds N electrons per k-point and
	// flavour; n adds n/w states.
	nFill := float64(Flavors*m*(dim/2)) + g.mf.Field.N/g.w
	kT := lattice.BoltzmannEV * g.mf.T
	if kT == 0 {
		it.mu, err = fillT0To(it.occ, it.e, nFill, it.sorted)
	} else {
		var occ []float64
		occ, it.mu, err = fillT(it.e, nFill, kT)
		copy(it.occ, occ)
	}
	if err != nil {
		return nil, err
	}
	it.flavorNl = make([][]float64, Flavors)
	part := it.part
	clear(part)
	err = par.For(ctx, g.workers, Flavors*m, func(wi, idx int) error {
		f, i := idx/m, idx%m
		v := f % 2
		dr := it.drho[idx*d2 : (idx+1)*d2]
		densityMatrix(dr, it.z[idx*d2:(idx+1)*d2], it.occ[idx*dim:(idx+1)*dim], dim)
		ref := g.ref[v][i*d2 : (i+1)*d2]
		for x := range dr {
			dr[x] -= ref[x]
		}
		for a := range dim {
			part[idx*g.n+g.layerOf[a]] += real(dr[a*dim+a])
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	it.nl = make([]float64, g.n)
	for f := range Flavors {
		it.flavorNl[f] = make([]float64, g.n)
		for i := range m {
			for l := range g.n {
				it.flavorNl[f][l] += g.w * part[(f*m+i)*g.n+l]
			}
		}
		for l := range g.n {
			it.nl[l] += it.flavorNl[f][l]
		}
	}
	it.u = g.hartreeFrom(it.nl)
	if g.kernels != nil && !g.skipFock {
		if err = g.fock(ctx, it.sigma, it.drho); err != nil {
			return nil, err
		}
	}
	return it, nil
}

// hartreeFrom returns the layer potentials of layer densities nl under the field:
// U = U_ext + s (U[n_l] − U_ext), where the field and the evenly spread doping charge are
// external and the interaction scale s multiplies the response to the redistribution.
func (g *hfGrid) hartreeFrom(nl []float64) []float64 {
	u := append([]float64(nil), g.uExt...)
	if g.mf.Interaction.Off {
		return u
	}
	full := LayerPotentials(nil, nl, g.mf.Field.Below(), g.mf.Device.Params.D, g.mf.Device.EpsZ)
	sc := g.mf.Interaction.scale()
	for l := range u {
		u[l] += sc * (full[l] - g.uExt[l])
	}
	return u
}

// layerDensities returns n_l of a density-matrix field δρ (1/nm²).
func (g *hfGrid) layerDensities(drho []complex128) []float64 {
	m, dim := len(g.nodes), g.dim
	d2 := dim * dim
	nl := make([]float64, g.n)
	for f := range Flavors {
		part := make([]float64, g.n)
		for i := range m {
			for a := range dim {
				part[g.layerOf[a]] += real(drho[(f*m+i)*d2+a*dim+a])
			}
		}
		for l := range nl {
			nl[l] += g.w * part[l]
		}
	}
	return nl
}

// fock returns Σ_f(k) from δρ_f by convolution with the exchange kernels.
func (g *hfGrid) fock(ctx context.Context, sigma, drho []complex128) error {
	m, dim := len(g.nodes), g.dim
	d2 := dim * dim
	// Work items: per flavour, the off-diagonal pairs a < b (complex fields) and the diagonal
	// taken two at a time (real fields packed into one transform).
	type pair struct{ a, b int }
	var items []pair
	for a := range dim {
		for b := a + 1; b < dim; b++ {
			items = append(items, pair{a, b})
		}
	}
	for a := 0; a < dim; a += 2 {
		items = append(items, pair{a, -1}) // diagonal a and a+1
	}
	err := par.For(ctx, g.workers, Flavors*len(items), func(wi, idx int) error {
		f, it := idx/len(items), items[idx%len(items)]
		base := f * m * d2
		c := g.convs[wi]
		if it.b >= 0 {
			// The source buffer is zero outside the disk for good: only disk entries are written.
			fld, out := g.fields[wi], g.fieldsB[wi]
			for i, gi := range g.index {
				fld[gi] = drho[base+i*d2+it.a*dim+it.b]
			}
			k := g.kernels[g.layerOf[it.a]*g.n+g.layerOf[it.b]]
			if err := c.ConvolveWith(k, out, fld); err != nil {
				return err
			}
			for i, gi := range g.index {
				s := out[gi]
				sigma[base+i*d2+it.a*dim+it.b] = s
				sigma[base+i*d2+it.b*dim+it.a] = complex(real(s), -imag(s))
			}
			return nil
		}
		// Diagonal elements a and a+1 (same layer: kernel dl = 0).
		ra, rb := g.rfA[wi], g.rfB[wi] // zero outside the disk for good
		for i, gi := range g.index {
			ra[gi] = real(drho[base+i*d2+it.a*dim+it.a])
			if it.a+1 < dim {
				rb[gi] = real(drho[base+i*d2+(it.a+1)*dim+it.a+1])
			}
		}
		oa, ob := g.rfC[wi], g.rfD[wi]
		l := g.layerOf[it.a] // a and a+1 are the two sites of one layer
		if err := c.ConvolveReal2With(g.kernels[l*g.n+l], oa, ob, ra, rb); err != nil {
			return err
		}
		for i, gi := range g.index {
			sigma[base+i*d2+it.a*dim+it.a] = complex(oa[gi], 0)
			if it.a+1 < dim {
				sigma[base+i*d2+(it.a+1)*dim+it.a+1] = complex(ob[gi], 0)
			}
		}
		return nil
	})
	return err
}
