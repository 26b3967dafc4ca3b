package lattice

import "fmt"

// Sublattice labels the two carbon sites of a layer.
type Sublattice int

const (
	SubA Sublattice = 0 // A site, at the in-plane position of the layer's letter
	SubB Sublattice = 1 // B site, one bond δ further
)

func (s Sublattice) String() string {
	switch s {
	case SubA:
		return "A"
	case SubB:
		return "B"
	}
	return fmt.Sprintf("Sublattice(%d)", int(s))
}

// Site returns the basis index of sublattice s of layer l (1-based) in the order
// (A1, B1, A2, B2, ..., AN, BN): 2(l-1) + s.
func Site(l int, s Sublattice) int { return 2*(l-1) + int(s) }

// SiteLayer returns the 1-based layer of basis index i.
func SiteLayer(i int) int { return i/2 + 1 }

// SiteSublattice returns the sublattice of basis index i.
func SiteSublattice(i int) Sublattice { return Sublattice(i % 2) }

// Position returns the in-plane position of basis site i of the stack in units of the bond
// vector δ, reduced modulo 3 (3δ is a lattice vector): 0, 1 or 2.
func (s Stack) Position(i int) int {
	l := SiteLayer(i)
	return (shift(s.seq[l-1]) + int(SiteSublattice(i))) % 3
}

// Class is an SWMcC hopping class.
type Class int

const (
	Gamma0 Class = iota // intralayer nearest neighbours
	Gamma1              // dimer pair of adjacent layers
	Gamma2              // aligned sites two layers apart, no atom between (enters as gamma2/2)
	Gamma3              // non-dimer to non-dimer, adjacent layers
	Gamma4              // dimer to non-dimer, adjacent layers
	Gamma5              // aligned sites two layers apart, atom between (enters as gamma5/2)
)

var classNames = [...]string{"gamma0", "gamma1", "gamma2", "gamma3", "gamma4", "gamma5"}

func (c Class) String() string {
	if c >= 0 && int(c) < len(classNames) {
		return classNames[c]
	}
	return fmt.Sprintf("Class(%d)", int(c))
}

// Coupling is one hopping between two basis sites I < J of a stack.
//
// Offset is the in-plane displacement from site I to site J in units of δ, modulo 3:
// 0 means the sites are vertically aligned (a single partner, directly above);
// 1 means the three nearest partners sit at the three bond vectors δ_1, δ_2, δ_3 of an
// A→B bond, whose Bloch sum is f(k) = Σ_j exp(i k·δ_j);
// 2 means they sit at -δ_1, -δ_2, -δ_3, whose Bloch sum is f(-k) = f(k)*.
type Coupling struct {
	I, J   int
	Class  Class
	Offset int
}

func (c Coupling) String() string {
	return fmt.Sprintf("%s %s%d-%s%d offset %d", c.Class,
		SiteSublattice(c.I), SiteLayer(c.I), SiteSublattice(c.J), SiteLayer(c.J), c.Offset)
}

// Couplings lists every SWMcC hopping of the stack, ordered by (I, J). Derived from geometry
// only (see the package documentation), so any sequence of letters works.
func (s Stack) Couplings() []Coupling {
	n := s.Layers()
	var out []Coupling
	for l := 1; l <= n; l++ {
		// Intralayer: A_l -> B_l is always one bond (offset 1).
		out = append(out, Coupling{I: Site(l, SubA), J: Site(l, SubB), Class: Gamma0, Offset: 1})
		if l+1 <= n {
			dimers := s.dimerSites(l)
			for _, a := range []Sublattice{SubA, SubB} {
				for _, b := range []Sublattice{SubA, SubB} {
					i, j := Site(l, a), Site(l+1, b)
					off := (s.Position(j) - s.Position(i) + 3) % 3
					var c Class
					switch {
					case off == 0:
						c = Gamma1
					case !dimers[i] && !dimers[j]:
						c = Gamma3
					default:
						c = Gamma4
					}
					out = append(out, Coupling{I: i, J: j, Class: c, Offset: off})
				}
			}
		}
		if l+2 <= n {
			for _, a := range []Sublattice{SubA, SubB} {
				for _, b := range []Sublattice{SubA, SubB} {
					i, j := Site(l, a), Site(l+2, b)
					if s.Position(i) != s.Position(j) {
						continue
					}
					c := Gamma2
					mid := Site(l+1, SubA)
					if s.Position(mid) == s.Position(i) || s.Position(mid+1) == s.Position(i) {
						c = Gamma5
					}
					out = append(out, Coupling{I: i, J: j, Class: c, Offset: 0})
				}
			}
		}
	}
	sortCouplings(out)
	return out
}

func sortCouplings(c []Coupling) {
	// Insertion sort: the list is short and nearly sorted.
	for i := 1; i < len(c); i++ {
		for j := i; j > 0 && (c[j].I < c[j-1].I || (c[j].I == c[j-1].I && c[j].J < c[j-1].J)); j-- {
			c[j], c[j-1] = c[j-1], c[j]
		}
	}
}

// dimerSites marks, for the pair of layers (l, l+1), the two basis sites that are vertically
// aligned.
func (s Stack) dimerSites(l int) map[int]bool {
	m := map[int]bool{}
	for _, a := range []Sublattice{SubA, SubB} {
		for _, b := range []Sublattice{SubA, SubB} {
			i, j := Site(l, a), Site(l+1, b)
			if s.Position(i) == s.Position(j) {
				m[i], m[j] = true, true
			}
		}
	}
	return m
}

// DimerPair is the vertically aligned pair of sites of adjacent layers L and L+1.
type DimerPair struct {
	L    int // lower layer (1-based)
	I, J int // basis indices of the lower and upper site
}

// DimerPairs returns the N-1 dimer pairs, bottom first. For adjacent letters (X, Y) the pair is
// (B_l, A_{l+1}) if Y follows X cyclically (A→B, B→C, C→A) and (A_l, B_{l+1}) otherwise.
func (s Stack) DimerPairs() []DimerPair {
	var out []DimerPair
	for _, c := range s.Couplings() {
		if c.Class == Gamma1 {
			out = append(out, DimerPair{L: SiteLayer(c.I), I: c.I, J: c.J})
		}
	}
	return out
}

// DimerSites reports, for each basis index, whether the site belongs to at least one dimer pair.
// These sites carry the on-site energy Delta'.
func (s Stack) DimerSites() []bool {
	out := make([]bool, s.Orbitals())
	for _, p := range s.DimerPairs() {
		out[p.I], out[p.J] = true, true
	}
	return out
}
