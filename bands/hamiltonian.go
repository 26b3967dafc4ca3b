package bands

import (
	"fmt"
	"math"
	"math/cmplx"

	"lamina/lattice"
)

// Valley selects the Dirac point: K (ξ = +1) or KPrime (ξ = -1).
type Valley int

const (
	K      Valley = 1  // valley K, ξ = +1
	KPrime Valley = -1 // valley K', ξ = -1
)

func (v Valley) String() string {
	switch v {
	case K:
		return "K"
	case KPrime:
		return "K'"
	}
	return fmt.Sprintf("Valley(%d)", int(v))
}

// Hamiltonian is a Bloch Hamiltonian H(k) of one flavour. Implementations are safe for
// concurrent use by several goroutines.
type Hamiltonian interface {
	// Dim returns the matrix order 2N (basis (A1, B1, ..., AN, BN)).
	Dim() int
	// At writes H(kx, ky) into dst, row-major (dst[i*Dim()+j] = H_ij), overwriting every entry.
	// kx, ky in 1/nm; len(dst) must be at least Dim()^2.
	At(dst []complex128, kx, ky float64)
}

// hop is one precomputed off-diagonal term of H.
type hop struct {
	i, j   int
	amp    float64 // real amplitude in eV (aligned terms), or ħv-like coefficient in eV nm (continuum)
	offset int     // 0 aligned, 1 f(k), 2 f(k)*
}

// onsite builds the diagonal: Delta' on dimer sites, the parameter set's per-layer energies and
// the layer potentials u (eV, one per layer; nil means zero).
func onsite(st lattice.Stack, p lattice.Params, u []float64) ([]float64, error) {
	n := st.Layers()
	if u != nil && len(u) != n {
		return nil, fmt.Errorf("bands: %d layer potentials given for the %d-layer stack %s", len(u), n, st)
	}
	for i, v := range u {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("bands: layer potential U[%d] = %g is not finite", i+1, v)
		}
	}
	d := make([]float64, 2*n)
	dimer := st.DimerSites()
	for i := range d {
		l := lattice.SiteLayer(i) - 1
		if dimer[i] {
			d[i] += p.DeltaPrime
		}
		if p.OnSite != nil {
			d[i] += p.OnSite[l]
		}
		if u != nil {
			d[i] += u[l]
		}
	}
	return d, nil
}

// hops lists the couplings of st with the amplitudes of the three in-plane-offset classes given
// (γ0, γ3, γ4 terms multiply π†/π or f/f*) and the aligned ones (+γ1, +γ2/2, +γ5/2): constant
// terms first, then the momentum-dependent ones. Zero amplitudes are left out.
func hops(st lattice.Stack, p lattice.Params, a0, a3, a4 float64) (consts, lin []hop) {
	for _, cp := range st.Couplings() {
		h := hop{i: cp.I, j: cp.J, offset: cp.Offset}
		switch cp.Class {
		case lattice.Gamma0:
			h.amp = a0
		case lattice.Gamma3:
			h.amp = a3
		case lattice.Gamma4:
			h.amp = a4
		case lattice.Gamma1:
			h.amp = p.Gamma1
		case lattice.Gamma2:
			h.amp = p.Gamma2 / 2
		case lattice.Gamma5:
			h.amp = p.Gamma5 / 2
		}
		if h.amp == 0 {
			continue
		}
		if cp.Offset == 0 {
			consts = append(consts, h)
		} else {
			lin = append(lin, h)
		}
	}
	return consts, lin
}

func check(st lattice.Stack, p lattice.Params) error {
	if st.Layers() == 0 {
		return fmt.Errorf("bands: empty stack (use lattice.ParseStack, NewBernal or NewRhombohedral)")
	}
	if err := p.ValidateFor(st); err != nil {
		return fmt.Errorf("bands: %w", err)
	}
	return nil
}

// Continuum is the k·p (continuum) Hamiltonian of a stack at one valley, linear in the momentum
// k measured from the valley point:
//
//	intralayer           [[U_l, ħv π†], [ħv π, U_l]]            π = ξ k_x + i k_y
//	gamma1 (dimer)       +γ1
//	gamma3               ħv3 π† or ħv3 π     (v3 = √3 a γ3 / 2ħ)
//	gamma4               -ħv4 π† or -ħv4 π   (v4 = √3 a γ4 / 2ħ)
//	gamma2, gamma5       +γ2/2, +γ5/2
//	Delta'               on dimer sites
//
// where π† or π is chosen by the in-plane offset of the pair (see [lattice.Coupling]). For a
// bilayer this is the Hamiltonian of McCann & Koshino, Rep. Prog. Phys. 76, 056503 (2013),
// Eq. (30) (from memory; pinned by TestContinuumBilayerEntries). It is the linearisation of
// [FullZone] at K_ξ, so the two agree as k → 0.
type Continuum struct {
	st     lattice.Stack
	iso    bool
	valley Valley
	dim    int
	diag   []float64
	consts []hop // aligned terms
	lin    []hop // terms linear in k: amp·π† (offset 1) or amp·π (offset 2)
}

// NewContinuum returns the continuum Hamiltonian of stack st with parameters p at valley v, with
// layer potentials u (electron potential energy in eV, bottom layer first; nil means zero).
func NewContinuum(st lattice.Stack, p lattice.Params, v Valley, u []float64) (*Continuum, error) {
	if err := check(st, p); err != nil {
		return nil, err
	}
	if v != K && v != KPrime {
		return nil, fmt.Errorf("bands: valley %d is not K (+1) or K' (-1)", int(v))
	}
	d, err := onsite(st, p, u)
	if err != nil {
		return nil, err
	}
	c := &Continuum{st: st, valley: v, dim: st.Orbitals(), diag: d}
	// Near K, -γ0 f → ħv π†, -γ3 f(*) → ħv3 π(†), +γ4 f(*) → -ħv4 π(†) (f ≈ -(√3a/2) π†).
	hv, hv3, hv4 := lattice.HbarV(p.Gamma0, p.A), lattice.HbarV(p.Gamma3, p.A), lattice.HbarV(p.Gamma4, p.A)
	c.consts, c.lin = hops(st, p, hv, hv3, -hv4)
	c.iso = c.isotropic()
	return c, nil
}

// Dim returns 2N.
func (c *Continuum) Dim() int { return c.dim }

// Valley returns the valley of c.
func (c *Continuum) Valley() Valley { return c.valley }

// Stack returns the stacking of c.
func (c *Continuum) Stack() lattice.Stack { return c.st }

// At writes H_ξ(k) into dst.
func (c *Continuum) At(dst []complex128, kx, ky float64) {
	n := c.dim
	dst = dst[:n*n]
	clear(dst)
	for i, e := range c.diag {
		dst[i*n+i] = complex(e, 0)
	}
	for _, h := range c.consts {
		dst[h.i*n+h.j] = complex(h.amp, 0)
		dst[h.j*n+h.i] = complex(h.amp, 0)
	}
	xi := float64(c.valley)
	piDag := complex(xi*kx, -ky) // π† = ξ kx − i ky
	for _, h := range c.lin {
		v := complex(h.amp, 0) * piDag
		if h.offset == 2 {
			v = cmplx.Conj(v)
		}
		dst[h.i*n+h.j] = v
		dst[h.j*n+h.i] = cmplx.Conj(v)
	}
}

// FullZone is the tight-binding Bloch Hamiltonian over the whole Brillouin zone with the same
// couplings as [Continuum]: matrix elements -γ0 f(k) (intralayer), -γ3 f or f*, +γ4 f or f*,
// +γ1, +γ2/2, +γ5/2, Delta' and the layer potentials, where
//
//	f(k) = Σ_j exp(i k·δ_j),  δ_1 = (0, a/√3),  δ_2 = (a/2, -a/(2√3)),  δ_3 = (-a/2, -a/(2√3))
//
// are the bond vectors from an A site to its B neighbours. The valley points are
// K_ξ = ξ (4π/(3a), 0); near them -γ0 f(K_ξ + k) = ħv π† + O(k²). Phases follow the actual
// atom positions (the Bloch basis exp(i k·τ)), so H(k+G) is unitarily equivalent to H(k).
type FullZone struct {
	st     lattice.Stack
	dim    int
	a      float64
	diag   []float64
	consts []hop
	lin    []hop // amp·f(k) (offset 1) or amp·f(k)* (offset 2), amp in eV
}

// NewFullZone returns the full-zone Hamiltonian of st with parameters p and layer potentials u
// (eV, nil means zero).
func NewFullZone(st lattice.Stack, p lattice.Params, u []float64) (*FullZone, error) {
	if err := check(st, p); err != nil {
		return nil, err
	}
	d, err := onsite(st, p, u)
	if err != nil {
		return nil, err
	}
	z := &FullZone{st: st, dim: st.Orbitals(), a: p.A, diag: d}
	z.consts, z.lin = hops(st, p, -p.Gamma0, -p.Gamma3, p.Gamma4)
	return z, nil
}

// Dim returns 2N.
func (z *FullZone) Dim() int { return z.dim }

// Stack returns the stacking of z.
func (z *FullZone) Stack() lattice.Stack { return z.st }

// ValleyPoint returns K_ξ = ξ (4π/(3a), 0) in 1/nm.
func (z *FullZone) ValleyPoint(v Valley) (kx, ky float64) {
	return float64(v) * 4 * math.Pi / (3 * z.a), 0
}

// BondSum returns f(k) = Σ_j exp(i k·δ_j) for lattice constant a (nm), k in 1/nm.
func BondSum(a, kx, ky float64) complex128 {
	r := a / math.Sqrt(3)
	s, c := math.Sincos(ky * r)
	f := complex(c, s)
	s, c = math.Sincos(kx*a/2 - ky*r/2)
	f += complex(c, s)
	s, c = math.Sincos(-kx*a/2 - ky*r/2)
	f += complex(c, s)
	return f
}

// At writes H(k) into dst.
func (z *FullZone) At(dst []complex128, kx, ky float64) {
	n := z.dim
	dst = dst[:n*n]
	clear(dst)
	for i, e := range z.diag {
		dst[i*n+i] = complex(e, 0)
	}
	for _, h := range z.consts {
		dst[h.i*n+h.j] = complex(h.amp, 0)
		dst[h.j*n+h.i] = complex(h.amp, 0)
	}
	f := BondSum(z.a, kx, ky)
	for _, h := range z.lin {
		v := complex(h.amp, 0) * f
		if h.offset == 2 {
			v = cmplx.Conj(v)
		}
		dst[h.i*n+h.j] = v
		dst[h.j*n+h.i] = cmplx.Conj(v)
	}
}

// Isotropic reports whether H_ξ(k) depends on the direction of k only through a diagonal unitary
// transformation, so that energies and layer weights depend on |k| alone. That holds when the
// couplings admit a consistent angular-momentum label m_i per orbital (π† raises it by one, π
// lowers it, constants keep it); γ3 spoils it (trigonal warping), as does γ2 in rhombohedral
// stacks (McCann & Koshino, Rep. Prog. Phys. 76, 056503 (2013); Koshino & McCann, PRB 80,
// 165409 (2009)). γ4, γ5, Δ' and layer potentials keep it.
func (c *Continuum) Isotropic() bool { return c.iso }

func (c *Continuum) isotropic() bool {
	m := make([]int, c.dim)
	seen := make([]bool, c.dim)
	type edge struct{ to, d int }
	adj := make([][]edge, c.dim)
	add := func(i, j, d int) {
		adj[i] = append(adj[i], edge{j, d})
		adj[j] = append(adj[j], edge{i, -d})
	}
	for _, h := range c.consts {
		add(h.i, h.j, 0)
	}
	for _, h := range c.lin {
		// H_ij ∝ π† ~ e^{-iφ}: invariance under the phase transformation needs m_j = m_i + 1.
		if h.offset == 1 {
			add(h.i, h.j, 1)
		} else {
			add(h.i, h.j, -1)
		}
	}
	for s := range c.dim {
		if seen[s] {
			continue
		}
		seen[s] = true
		stack := []int{s}
		for len(stack) > 0 {
			i := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, e := range adj[i] {
				if !seen[e.to] {
					seen[e.to] = true
					m[e.to] = m[i] + e.d
					stack = append(stack, e.to)
				} else if m[e.to] != m[i]+e.d {
					return false
				}
			}
		}
	}
	return true
}
