package hartree

import (
	"fmt"
	"math"

	"lamina/bands"
)

// Model selects the band model whose occupied states give the layer densities.
type Model int

const (
	// Auto (the zero value) uses Continuum when the continuum model is isotropic (no γ3 and no
	// other warping, see [bands.Continuum.Isotropic]) and FullZone otherwise.
	Auto Model = iota
	// Continuum is the k·p model around the valleys, integrated over the whole plane with an
	// analytic high-momentum tail (or up to Options.Cutoff). With trigonal warping (γ3 ≠ 0) the
	// continuum's skew coupling ħv3 k grows without bound, unlike the lattice's γ3 f(k), and the
	// induced layer densities then depend logarithmically on the cutoff (measured: 4% per
	// doubling for a bilayer with γ3 = 0.38 eV), so a finite Cutoff is required in that case.
	Continuum
	// FullZone is the tight-binding model over the Brillouin zone: polar integration in disks
	// around K and K' (radius just under half their distance) plus a uniform grid over the
	// rest of the zone. It is the converged reference when remote hoppings are present.
	FullZone
)

func (m Model) String() string {
	switch m {
	case Auto:
		return "auto"
	case Continuum:
		return "continuum"
	case FullZone:
		return "fullzone"
	}
	return fmt.Sprintf("Model(%d)", int(m))
}

// hamiltonian returns the model's Hamiltonian for layer potentials u.
func (pl *polar) hamiltonian(u []float64) (bands.Hamiltonian, error) {
	if pl.model == FullZone {
		return bands.NewFullZone(pl.st, pl.p, u)
	}
	return bands.NewContinuum(pl.st, pl.p, bands.K, u)
}

// restNode is a point of the full zone outside the valley disks, with its weight (including
// spin degeneracy 2 and 1/(2π)²; the zone cell holds both valleys).
type restNode struct {
	k bands.KPoint
	w float64
}

// restGrid is the number of points along each reciprocal-lattice vector of the rest grid.
const restGrid = 64

// restNodes covers the primitive cell of the reciprocal lattice with a restGrid² midpoint grid
// and keeps the points farther than r from every K and K' image.
func restNodes(z *bands.FullZone, r float64) []restNode {
	kx, _ := z.ValleyPoint(bands.K)
	a := 4 * math.Pi / (3 * kx) // lattice constant back from |K| = 4π/(3a)
	b1 := bands.KPoint{X: -2 * math.Pi / a, Y: 2 * math.Pi / (a * math.Sqrt(3))}
	b2 := bands.KPoint{X: 2 * math.Pi / a, Y: 2 * math.Pi / (a * math.Sqrt(3))}
	cell := math.Abs(b1.X*b2.Y - b1.Y*b2.X)
	w := cell / (restGrid * restGrid) * 2 / (4 * math.Pi * math.Pi)
	var out []restNode
	for i := range restGrid {
		for j := range restGrid {
			s, t := (float64(i)+0.5)/restGrid, (float64(j)+0.5)/restGrid
			k := bands.KPoint{X: s*b1.X + t*b2.X, Y: s*b1.Y + t*b2.Y}
			near := false
			for m := -2; m <= 2 && !near; m++ {
				for n := -2; n <= 2 && !near; n++ {
					gx, gy := float64(m)*b1.X+float64(n)*b2.X, float64(m)*b1.Y+float64(n)*b2.Y
					for _, xi := range []float64{1, -1} {
						if math.Hypot(k.X-xi*kx-gx, k.Y-gy) < r {
							near = true
						}
					}
				}
			}
			if !near {
				out = append(out, restNode{k, w})
			}
		}
	}
	return out
}
