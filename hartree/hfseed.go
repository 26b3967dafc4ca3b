package hartree

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Profile is the layer (or sublattice) pattern of a seed's per-flavour potential.
type Profile int

const (
	// Linear is an outer-layer dipole: potential rising linearly from −1 (layer 1) to +1 (layer N).
	Linear Profile = iota
	// Staggered alternates between layers: +1, −1, +1, ...
	Staggered
	// SublatticeMass is +1 on A sites and −1 on B sites: the only order a single layer can take.
	SublatticeMass
)

func (p Profile) String() string {
	switch p {
	case Linear:
		return "linear"
	case Staggered:
		return "staggered"
	case SublatticeMass:
		return "sublattice"
	}
	return fmt.Sprintf("Profile(%d)", int(p))
}

// Seed is a starting point of the mean-field iteration.
type Seed struct {
	Name string
	// Signs and Profile define a k-independent self-energy s_f·Amplitude·pattern per flavour.
	Signs     [Flavors]float64
	Profile   Profile
	Amplitude float64 // eV; 0 means 0.02
	// Random, if non-zero, seeds a random Hermitian k-independent self-energy per flavour of
	// the given amplitude from this RNG seed (explicit, reproducible).
	Random uint64
	// From, if non-nil, starts from a previous state on the same grid (continuation).
	From *HFState
}

// SymmetricSeed starts from the non-interacting state in the external field.
func SymmetricSeed() Seed { return Seed{Name: "symmetric"} }

// RandomSeed returns a seed with random k-independent self-energies drawn from a PCG generator
// seeded with (seed, 0x1a3b).
func RandomSeed(seed uint64, amplitude float64) Seed {
	return Seed{Name: fmt.Sprintf("random:%d", seed), Random: seed, Amplitude: amplitude}
}

// PatternSeed returns the seed with flavour signs s (ordered (up,K), (up,K'), (down,K),
// (down,K')) and the given profile.
func PatternSeed(s [Flavors]float64, p Profile, amplitude float64) Seed {
	name := p.String() + ":"
	for _, x := range s {
		if x > 0 {
			name += "+"
		} else {
			name += "-"
		}
	}
	return Seed{Name: name, Signs: s, Profile: p, Amplitude: amplitude}
}

func (sd Seed) initial(g *hfGrid) ([]float64, []complex128, error) {
	dim, m := g.dim, len(g.nodes)
	d2 := dim * dim
	if sd.From != nil {
		if !sameGrid(sd.From.grid, g) {
			return nil, nil, fmt.Errorf("hartree: seed %q comes from a different grid or problem", sd.Name)
		}
		return append([]float64(nil), sd.From.U...), append([]complex128(nil), sd.From.Sigma...), nil
	}
	amp := sd.Amplitude
	if amp == 0 {
		amp = 0.02
	}
	if !finite(amp) {
		return nil, nil, fmt.Errorf("hartree: seed amplitude %g is not finite", amp)
	}
	u := append([]float64(nil), g.uExt...)
	sigma := make([]complex128, Flavors*m*d2)
	pattern := make([]complex128, Flavors*d2)
	switch {
	case sd.Random != 0:
		r := rand.New(rand.NewPCG(sd.Random, 0x1a3b))
		for f := range Flavors {
			p := pattern[f*d2 : (f+1)*d2]
			for a := range dim {
				p[a*dim+a] = complex(amp*(2*r.Float64()-1), 0)
				for b := a + 1; b < dim; b++ {
					v := complex(amp*(2*r.Float64()-1)/2, amp*(2*r.Float64()-1)/2)
					p[a*dim+b] = v
					p[b*dim+a] = complex(real(v), -imag(v))
				}
			}
		}
	case sd.Name == "symmetric" || sd.Signs == [Flavors]float64{}:
		// No self-energy.
	default:
		n := g.n
		for f := range Flavors {
			p := pattern[f*d2 : (f+1)*d2]
			for a := range dim {
				l := g.layerOf[a]
				var v float64
				switch sd.Profile {
				case Linear:
					if n > 1 {
						v = -1 + 2*float64(l)/float64(n-1)
					}
				case Staggered:
					v = 1
					if l%2 == 1 {
						v = -1
					}
				case SublatticeMass:
					v = 1
					if a%2 == 1 {
						v = -1
					}
				default:
					return nil, nil, fmt.Errorf("hartree: unknown seed profile %d", int(sd.Profile))
				}
				p[a*dim+a] = complex(sd.Signs[f]*amp*v, 0)
			}
		}
	}
	for f := range Flavors {
		for i := range m {
			copy(sigma[(f*m+i)*d2:(f*m+i+1)*d2], pattern[f*d2:(f+1)*d2])
		}
	}
	if g.kernels == nil {
		clear(sigma) // no exchange: the self-energy stays zero
	}
	return u, sigma, nil
}

// orderFloor is the order-parameter magnitude (1/nm², i.e. 10⁸ cm⁻² per 10⁻⁶) below which a
// state counts as symmetric: far below any order a k-grid resolves, far above the rounding of
// a symmetric solution.
const orderFloor = 1e-7

// Classify names the ordered state from the signs of the flavours' order parameters.
//
// Each flavour's polarization of the dominant pattern (outer-layer dipole, layer-staggered or
// sublattice; see below) is compared with the largest; flavours below rel·largest count as
// unpolarised. Names follow Zhang, Jung, Fiete, Niu & MacDonald, PRL 106, 156801 (2011): all
// alike "layer-polarized" ("sublattice-polarized" for the sublattice pattern), opposite valleys
// "anomalous-Hall", opposite spins "layer-antiferromagnet", opposite spin and valley
// "spin-Hall", three against one "ALL (3:1)"; no order "symmetric". A flavour imbalance of the
// densities (a flavour-polarized metal away from neutrality) is appended: "spin-polarized",
// "valley-polarized", "spin-valley-polarized" for 2:2 splits, "flavour-polarized (3:1)".
func Classify(order [Flavors]Polarization, rel float64) (name, pattern string) {
	name, pattern = classifyLayers(order, rel)
	if fp := flavourImbalance(order); fp != "" {
		if name == "symmetric" {
			return fp, pattern
		}
		return name + ", " + fp, pattern
	}
	return name, pattern
}

// flavourImbalance names an imbalance of the flavours' total densities above orderFloor and
// above 1% of the largest flavour density.
func flavourImbalance(order [Flavors]Polarization) string {
	mean, big := 0.0, 0.0
	for _, p := range order {
		mean += p.Density / Flavors
		big = math.Max(big, math.Abs(p.Density))
	}
	var d [Flavors]float64
	spread := 0.0
	for f, p := range order {
		d[f] = p.Density - mean
		spread = math.Max(spread, math.Abs(d[f]))
	}
	if spread < orderFloor || spread < 0.01*big {
		return ""
	}
	tol := 0.1 * spread
	var s [Flavors]int
	plus, minus := 0, 0
	for f, v := range d {
		switch {
		case v > tol:
			s[f] = 1
			plus++
		case v < -tol:
			s[f] = -1
			minus++
		}
	}
	switch {
	case plus == 2 && minus == 2 && s[0] == s[1]:
		return "spin-polarized"
	case plus == 2 && minus == 2 && s[0] == s[2]:
		return "valley-polarized"
	case plus == 2 && minus == 2:
		return "spin-valley-polarized"
	case plus+minus >= 1 && (plus == 1 || minus == 1):
		return "flavour-polarized (3:1)"
	}
	return "flavour-polarized"
}

func classifyLayers(order [Flavors]Polarization, rel float64) (name, pattern string) {
	pick := func(p Polarization, k int) float64 {
		switch k {
		case 0:
			return p.Dipole
		case 1:
			return p.Staggered
		}
		return p.Sublattice
	}
	// The largest magnitude of each pattern over the flavours. Layer patterns take precedence:
	// a layer dipole (or, failing that, a staggered layer pattern) counts if it reaches 10% of
	// the largest pattern; the sublattice pattern names the state only when the layers are
	// balanced (a monolayer, or sublattice order in a stack). In a bilayer the low-energy sites
	// are A1 and B2, so layer and sublattice polarization come together.
	var mags [3]float64
	for k := range 3 {
		for _, p := range order {
			mags[k] = math.Max(mags[k], math.Abs(pick(p, k)))
		}
	}
	top := math.Max(mags[0], math.Max(mags[1], mags[2]))
	bk := 2
	switch {
	case mags[0] >= 0.1*top:
		bk = 0
	case mags[1] >= 0.1*top:
		bk = 1
	}
	best := mags[bk]
	pattern = []string{"dipole", "staggered", "sublattice"}[bk]
	if top < orderFloor {
		return "symmetric", "none"
	}
	var s [Flavors]int
	zero := 0
	for f, p := range order {
		v := pick(p, bk)
		switch {
		case math.Abs(v) < rel*best:
			zero++
		case v > 0:
			s[f] = 1
		default:
			s[f] = -1
		}
	}
	if zero > 0 {
		return fmt.Sprintf("partially ordered (%d of 4 flavours)", Flavors-zero), pattern
	}
	plus := 0
	for _, x := range s {
		if x > 0 {
			plus++
		}
	}
	switch {
	case plus == 4 || plus == 0:
		if bk == 2 {
			return "sublattice-polarized", pattern
		}
		return "layer-polarized", pattern
	case plus == 1 || plus == 3:
		return "ALL (3:1)", pattern
	case s[0] == s[2] && s[1] == s[3]: // same within spin, opposite between valleys
		return "anomalous-Hall", pattern
	case s[0] == s[1] && s[2] == s[3]: // opposite between spins
		return "layer-antiferromagnet", pattern
	default: // s[0] == s[3]: opposite in spin and valley
		return "spin-Hall", pattern
	}
}

// sameGrid reports whether states of a can seed b: the same stack, parameters and k-grid.
func sameGrid(a, b *hfGrid) bool {
	if a == b {
		return true
	}
	if a == nil || b == nil {
		return false
	}
	return a.L == b.L && a.kmax == b.kmax && a.mf.Device.Stack == b.mf.Device.Stack &&
		a.mf.Device.Params.Gamma0 == b.mf.Device.Params.Gamma0 && len(a.nodes) == len(b.nodes) && a.dim == b.dim
}
