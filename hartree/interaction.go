package hartree

import (
	"fmt"
	"math"

	"lamina/internal/quad"
	"lamina/lattice"
)

// GateConfig is the metallic environment that screens the Coulomb interaction.
type GateConfig int

const (
	NoGates  GateConfig = iota // G(q) = 1
	OneGate                    // a metal plane at GateDistance: G(q) = 1 − exp(−2 q d_g)
	TwoGates                   // metal planes at ±GateDistance: G(q) = tanh(q d_g)
)

func (g GateConfig) String() string {
	switch g {
	case NoGates:
		return "none"
	case OneGate:
		return "one"
	case TwoGates:
		return "two"
	}
	return fmt.Sprintf("GateConfig(%d)", int(g))
}

// ParseGates converts "none", "one" or "two" to a GateConfig.
func ParseGates(s string) (GateConfig, error) {
	switch s {
	case "none":
		return NoGates, nil
	case "one":
		return OneGate, nil
	case "two":
		return TwoGates, nil
	}
	return 0, fmt.Errorf("hartree: gates %q is not none, one or two", s)
}

// Interaction is the Coulomb interaction between electrons in the layers:
//
//	V_ll'(q) = e²/(2 ε0 ε q) · exp(−q d |l − l'|) · G(q)
//
// with ε the background dielectric constant and G the gate factor of [GateConfig] (image
// charges of one metal plane at distance d_g, or of two planes at ±d_g). Energies in eV, q in
// 1/nm, V in eV nm². The zero value (ε = 1, no gates) is a suspended device.
type Interaction struct {
	// Eps is the background relative permittivity; 0 means 1.
	Eps float64
	// Gates and GateDistance (nm) set the metallic screening.
	Gates        GateConfig
	GateDistance float64
	// Scale multiplies the whole interaction (1 when 0); a convenient knob for interaction-
	// strength scans. Scale = 0 with Off set switches the interaction off entirely.
	Scale float64
	// Off switches both the Hartree and the exchange interaction off (non-interacting bands in
	// the external field).
	Off bool
	// Screening selects the interaction used in the exchange term (the Hartree term always uses
	// the bare layer capacitor; see [Screening]). The zero value is RPA screening.
	Screening Screening
	// QTF is the Thomas-Fermi wave vector (1/nm) for ThomasFermi screening.
	QTF float64
}

// Screening is the choice of interaction in the exchange (Fock) term.
//
// The Hartree term is the electrostatics of the layer densities with the bare interaction (the
// layer capacitor, the q → 0 limit of V): in RPA the screening cloud is itself the Hartree
// response of the electrons, so screening the Hartree term as well would count it twice.
type Screening int

const (
	// RPA (the default) screens with the static random-phase approximation of the
	// non-interacting, neutral, unbiased stack at the problem's temperature:
	// W(q) = [1 + V(q) Π(q)]⁻¹ V(q) as N×N layer matrices, with Π the layer-resolved Lindhard
	// function (see [Lindhard]) tabulated on |q| and angle-averaged. The doping carriers and the
	// field-induced gap do not enter W; the screening is the same for every (n, D) of a map.
	RPA Screening = iota
	// Unscreened uses V itself (the gates and ε still screen).
	Unscreened
	// ThomasFermi multiplies V by q/(q + q_TF) for every layer pair.
	ThomasFermi
)

func (s Screening) String() string {
	switch s {
	case RPA:
		return "rpa"
	case Unscreened:
		return "bare"
	case ThomasFermi:
		return "thomas-fermi"
	}
	return fmt.Sprintf("Screening(%d)", int(s))
}

// ParseScreening converts "rpa", "bare" or "thomas-fermi" to a Screening.
func ParseScreening(s string) (Screening, error) {
	switch s {
	case "rpa":
		return RPA, nil
	case "bare":
		return Unscreened, nil
	case "thomas-fermi", "tf":
		return ThomasFermi, nil
	}
	return 0, fmt.Errorf("hartree: screening %q is not rpa, bare or thomas-fermi", s)
}

func (in Interaction) eps() float64 {
	if in.Eps == 0 {
		return 1
	}
	return in.Eps
}

func (in Interaction) scale() float64 {
	if in.Scale == 0 {
		return 1
	}
	return in.Scale
}

func (in Interaction) validate() error {
	if !finite(in.Eps) || in.Eps < 0 {
		return fmt.Errorf("hartree: dielectric constant %g must be positive", in.Eps)
	}
	if !finite(in.Scale) || in.Scale < 0 {
		return fmt.Errorf("hartree: interaction scale %g must be positive", in.Scale)
	}
	switch in.Screening {
	case RPA, Unscreened:
	case ThomasFermi:
		if !finite(in.QTF) || in.QTF <= 0 {
			return fmt.Errorf("hartree: Thomas-Fermi wave vector %g /nm must be positive", in.QTF)
		}
	default:
		return fmt.Errorf("hartree: unknown screening %d", int(in.Screening))
	}
	switch in.Gates {
	case NoGates:
	case OneGate, TwoGates:
		if !finite(in.GateDistance) || in.GateDistance <= 0 {
			return fmt.Errorf("hartree: gate distance %g nm must be positive: %w", in.GateDistance, ErrGeometry)
		}
	default:
		return fmt.Errorf("hartree: unknown gate configuration %d", int(in.Gates))
	}
	return nil
}

// coulomb2 is e²/(2ε0) in eV nm (= 2π e²/(4πε0)).
const coulomb2 = lattice.ChargeOverEps0 / 2

// gateFactor returns G(q).
func (in Interaction) gateFactor(q float64) float64 {
	switch in.Gates {
	case OneGate:
		return -math.Expm1(-2 * q * in.GateDistance)
	case TwoGates:
		return math.Tanh(q * in.GateDistance)
	}
	return 1
}

// V returns V_ll'(q) in eV nm² for layers dl = |l − l'| apart at spacing d (nm); q > 0.
func (in Interaction) V(q float64, dl int, d float64) float64 {
	return in.scale() * coulomb2 / (in.eps() * q) * math.Exp(-q*d*float64(dl)) * in.gateFactor(q)
}

// cellIntegral returns ∫ w(|q|) d²q over the square cell of side h centred on (ci, cj)·h: for
// the cell at the origin in polar coordinates, where q·w(q) is smooth (w may diverge as 1/q),
// elsewhere by a tensor Gauss-Legendre rule. Result in eV for w in eV nm².
func cellIntegral(w func(q float64) float64, ci, cj int, h float64) float64 {
	rule := quad.GaussLegendre(12)
	if ci == 0 && cj == 0 {
		// Eight triangles from the centre to the edges; in each, θ ∈ [0, π/4] after symmetry:
		// ∫∫ w q dq dθ with q from 0 to (h/2)/cos θ (the nodes never reach q = 0).
		s := 0.0
		for i, x := range rule.X {
			th := math.Pi / 8 * (1 + x)
			wt := math.Pi / 8 * rule.W[i]
			r := h / 2 / math.Cos(th)
			inner := 0.0
			for j, y := range rule.X {
				q := r / 2 * (1 + y)
				inner += r / 2 * rule.W[j] * q * w(q)
			}
			s += wt * inner
		}
		return 8 * s
	}
	s := 0.0
	for i, x := range rule.X {
		qx := h * (float64(ci) + x/2)
		for j, y := range rule.X {
			qy := h * (float64(cj) + y/2)
			s += rule.W[i] * rule.W[j] / 4 * w(math.Hypot(qx, qy))
		}
	}
	return s * h * h
}

// cellAverageRange is the half-width (in cells) of the block around q = 0 where the kernel is
// averaged over each cell instead of sampled at its centre.
const cellAverageRange = 3

// gridKernel returns the convolution kernel for the exchange self-energy on a square grid of
// spacing h (1/nm) with interaction w(q): K(di, dj) = −(1/(2π)²) ∫_cell w d²q, so that
// Σ_ab(k) = Σ_k' K(k − k') δρ_ab(k'). Cells near q = 0 are integrated (the q = 0 singularity
// exactly), the rest sampled at their centres.
func gridKernel(w func(q float64) float64, h float64) func(di, dj int) float64 {
	cache := map[[2]int]float64{}
	return func(di, dj int) float64 {
		ai, aj := abs(di), abs(dj)
		if ai < aj {
			ai, aj = aj, ai
		}
		key := [2]int{ai, aj}
		if v, ok := cache[key]; ok {
			return v
		}
		var integral float64
		if ai <= cellAverageRange {
			integral = cellIntegral(w, ai, aj, h)
		} else {
			integral = h * h * w(h*math.Hypot(float64(ai), float64(aj)))
		}
		v := -integral / (4 * math.Pi * math.Pi)
		cache[key] = v
		return v
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
