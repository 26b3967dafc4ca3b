package bands

import (
	"fmt"
	"math"
	"sync"

	"lamina/lattice"
)

// SectorKind tells whether a Bernal sector behaves like a bilayer or a monolayer.
type SectorKind int

const (
	BilayerLike   SectorKind = iota // four orbitals, effective interlayer coupling λγ1
	MonolayerLike                   // two orbitals, a Dirac cone (odd N only)
)

func (k SectorKind) String() string {
	switch k {
	case BilayerLike:
		return "bilayer-like"
	case MonolayerLike:
		return "monolayer-like"
	}
	return fmt.Sprintf("SectorKind(%d)", int(k))
}

// Sector is one subsystem of the Bernal (ABA...) decomposition: an orthonormal set of real
// orbital combinations that the γ0-γ1 Hamiltonian (and γ3, γ4, Δ') leaves invariant.
type Sector struct {
	Kind SectorKind
	// M is the mode index m of the layer standing wave sin(mπl/(N+1)), 1 <= m <= (N+1)/2.
	M int
	// Lambda is λ_m = 2 cos(mπ/(N+1)): the sector is a bilayer with interlayer coupling λγ1
	// (0 for the monolayer-like sector).
	Lambda float64
	// Basis holds the orthonormal orbital vectors (len 2N each) spanning the sector. For a
	// bilayer-like sector they are ordered like a bilayer's (A1, B1, A2, B2).
	Basis [][]float64
}

// Weight returns the weight of the state v (len 2N) in the sector, Σ_b |<b|v>|².
func (s Sector) Weight(v []complex128) float64 {
	w := 0.0
	for _, b := range s.Basis {
		var c complex128
		for i, x := range b {
			if x != 0 {
				c += complex(x, 0) * v[i]
			}
		}
		w += real(c)*real(c) + imag(c)*imag(c)
	}
	return w
}

// BernalSectors returns the decomposition of a Bernal stack of N layers into ⌊N/2⌋
// bilayer-like sectors with couplings λ_m γ1, λ_m = 2cos(mπ/(N+1)), m = 1..⌊N/2⌋, and, for odd N,
// one monolayer-like sector (Koshino & Ando, PRB 76, 085425 (2007); Min & MacDonald, PRB 77,
// 155416 (2008); Koshino & McCann, PRB 83, 165443 (2011)). The chain of dimer sites is
// diagonalised by the standing waves s_m(l) = sqrt(2/(N+1)) sin(mπl/(N+1)); the intralayer
// coupling alternates between π and π† from layer to layer, which pairs mode m with N+1-m into
// one bilayer. With γ0, γ1, γ3, γ4 and Δ' the sectors are exactly decoupled; γ2, γ5 and layer
// potentials mix them, and then [Sector.Weight] tells how much of a state belongs to each.
// A monolayer (N = 1) is a single monolayer-like sector.
func BernalSectors(st lattice.Stack) ([]Sector, error) {
	n := st.Layers()
	if n == 0 {
		return nil, fmt.Errorf("bands: empty stack")
	}
	if !st.IsBernal() {
		return nil, fmt.Errorf("bands: stack %s is not Bernal (ABAB...): no bilayer/monolayer decomposition", st)
	}
	dim := 2 * n
	if n == 1 {
		return []Sector{{Kind: MonolayerLike, M: 1, Basis: [][]float64{unit(dim, 0), unit(dim, 1)}}}, nil
	}
	dimer := st.DimerSites()
	nd, d := make([]int, n), make([]int, n)
	for l := 1; l <= n; l++ {
		a, b := lattice.Site(l, lattice.SubA), lattice.Site(l, lattice.SubB)
		if dimer[a] {
			d[l-1], nd[l-1] = a, b
		} else {
			d[l-1], nd[l-1] = b, a
		}
	}
	mode := func(m int, sites []int) []float64 {
		v := make([]float64, dim)
		for l := 1; l <= n; l++ {
			v[sites[l-1]] = math.Sqrt(2/float64(n+1)) * math.Sin(float64(m*l)*math.Pi/float64(n+1))
		}
		return v
	}
	comb := func(x, y []float64, sign float64) []float64 {
		v := make([]float64, dim)
		for i := range v {
			v[i] = (x[i] + sign*y[i]) / math.Sqrt2
		}
		return v
	}
	var out []Sector
	for m := 1; 2*m <= n; m++ {
		mb := n + 1 - m
		nm, nmb, dm, dmb := mode(m, nd), mode(mb, nd), mode(m, d), mode(mb, d)
		out = append(out, Sector{
			Kind: BilayerLike, M: m,
			Lambda: 2 * math.Cos(float64(m)*math.Pi/float64(n+1)),
			Basis:  [][]float64{comb(nm, nmb, 1), comb(dm, dmb, 1), comb(dm, dmb, -1), comb(nm, nmb, -1)},
		})
	}
	if n%2 == 1 {
		m := (n + 1) / 2
		out = append(out, Sector{Kind: MonolayerLike, M: m, Basis: [][]float64{mode(m, nd), mode(m, d)}})
	}
	return out, nil
}

func unit(n, i int) []float64 {
	v := make([]float64, n)
	v[i] = 1
	return v
}

// SectorHamiltonian is the projection P† H(k) P of a Hamiltonian onto one sector: exact when the
// sector is decoupled, and otherwise the sector's own bands without the mixing terms. It
// implements [Hamiltonian], so [FindGap] gives a sector's gap.
type SectorHamiltonian struct {
	h    Hamiltonian
	s    Sector
	pool sync.Pool
}

// NewSectorHamiltonian projects h onto sector s.
func NewSectorHamiltonian(h Hamiltonian, s Sector) (*SectorHamiltonian, error) {
	n := h.Dim()
	if len(s.Basis) == 0 {
		return nil, fmt.Errorf("bands: empty sector")
	}
	for _, b := range s.Basis {
		if len(b) != n {
			return nil, fmt.Errorf("bands: sector vectors of length %d do not fit a Hamiltonian of order %d", len(b), n)
		}
	}
	sh := &SectorHamiltonian{h: h, s: s}
	sh.pool.New = func() any { b := make([]complex128, n*n); return &b }
	return sh, nil
}

// Dim returns the number of sector orbitals.
func (sh *SectorHamiltonian) Dim() int { return len(sh.s.Basis) }

// At writes P† H(k) P into dst.
func (sh *SectorHamiltonian) At(dst []complex128, kx, ky float64) {
	n, m := sh.h.Dim(), len(sh.s.Basis)
	bp := sh.pool.Get().(*[]complex128)
	full := *bp
	sh.h.At(full, kx, ky)
	for a, va := range sh.s.Basis {
		for b, vb := range sh.s.Basis {
			var sum complex128
			for i, x := range va {
				if x == 0 {
					continue
				}
				row := full[i*n : (i+1)*n]
				var r complex128
				for j, y := range vb {
					if y != 0 {
						r += row[j] * complex(y, 0)
					}
				}
				sum += complex(x, 0) * r
			}
			dst[a*m+b] = sum
		}
	}
	sh.pool.Put(bp)
}
