package lattice

import (
	"errors"
	"fmt"
	"math"
)

// ErrInvalidParam is the sentinel wrapped by every [*ParamError].
var ErrInvalidParam = errors.New("invalid parameter")

// ParamError reports a parameter that cannot be used. Field is the name used in the JSON schema
// (for example "gamma0_eV"); Index is the layer index (1-based) for per-layer values, else 0.
type ParamError struct {
	Field  string
	Index  int
	Value  float64
	Reason string
}

func (e *ParamError) Error() string {
	if e.Index > 0 {
		return fmt.Sprintf("lattice: parameter %s[%d] = %g: %s", e.Field, e.Index, e.Value, e.Reason)
	}
	return fmt.Sprintf("lattice: parameter %s = %g: %s", e.Field, e.Value, e.Reason)
}

// Unwrap returns [ErrInvalidParam].
func (e *ParamError) Unwrap() error { return ErrInvalidParam }

// Params is a Slonczewski-Weiss-McClure parameter set with the lattice geometry. Energies in eV,
// lengths in nm. The zero value is not valid (Gamma0, A and D must be positive); start from a
// [Preset] or fill every field.
//
// Sign convention (shared with package bands; McCann & Koshino, Rep. Prog. Phys. 76, 056503
// (2013), bilayer Hamiltonian): Gamma0, Gamma1, Gamma3 and Gamma4 are given as positive numbers
// in the usual parameter tables; the Bloch matrix elements are -Gamma0 f(k), +Gamma1,
// -Gamma3 f(k) or f(k)*, +Gamma4 f(k) or f(k)*, +Gamma2/2 and +Gamma5/2, so that near valley K
// the intralayer block is ħv π† with v = √3 a γ0/(2ħ).
type Params struct {
	Name   string // short name (a preset name, or empty)
	Source string // citation of the values

	Gamma0     float64 // intralayer nearest-neighbour hopping (eV), > 0
	Gamma1     float64 // dimer-pair interlayer hopping (eV)
	Gamma2     float64 // next-nearest-layer hopping between non-dimer sites (eV); enters as Gamma2/2
	Gamma3     float64 // skew hopping between non-dimer sites of adjacent layers (eV), trigonal warping
	Gamma4     float64 // skew hopping between dimer and non-dimer sites (eV), electron-hole asymmetry
	Gamma5     float64 // next-nearest-layer hopping between dimer sites (eV); enters as Gamma5/2
	DeltaPrime float64 // on-site energy of dimer sites relative to non-dimer sites (eV)

	A float64 // in-plane lattice constant (nm), > 0
	D float64 // interlayer spacing (nm), > 0

	// OnSite holds optional per-layer on-site energies (eV), bottom layer first; nil means zero.
	// When set, its length must equal the number of layers of the stack it is used with.
	OnSite []float64
}

// HbarV returns ħv = √3 a γ0/2 in eV nm.
func (p Params) HbarV() float64 { return HbarV(p.Gamma0, p.A) }

// Validate checks that every value is finite, that Gamma0, A and D are positive and that
// Gamma1 is not negative. It returns a [*ParamError] naming the first bad field.
func (p Params) Validate() error {
	fields := []struct {
		name string
		v    float64
	}{
		{"gamma0_eV", p.Gamma0}, {"gamma1_eV", p.Gamma1}, {"gamma2_eV", p.Gamma2},
		{"gamma3_eV", p.Gamma3}, {"gamma4_eV", p.Gamma4}, {"gamma5_eV", p.Gamma5},
		{"delta_prime_eV", p.DeltaPrime}, {"a_nm", p.A}, {"d_nm", p.D},
	}
	for _, f := range fields {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) {
			return &ParamError{Field: f.name, Value: f.v, Reason: "not a finite number"}
		}
	}
	for i, v := range p.OnSite {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return &ParamError{Field: "onsite_eV", Index: i + 1, Value: v, Reason: "not a finite number"}
		}
	}
	switch {
	case p.Gamma0 <= 0:
		return &ParamError{Field: "gamma0_eV", Value: p.Gamma0, Reason: "must be positive"}
	case p.Gamma1 < 0:
		return &ParamError{Field: "gamma1_eV", Value: p.Gamma1, Reason: "must not be negative (the sign is fixed by the convention of package bands)"}
	case p.A <= 0:
		return &ParamError{Field: "a_nm", Value: p.A, Reason: "must be positive"}
	case p.D <= 0:
		return &ParamError{Field: "d_nm", Value: p.D, Reason: "must be positive"}
	}
	// Guard against unit slips (meV or Å typed for eV or nm): these bounds are far outside any
	// published graphene value but catch factors of 10-1000.
	switch {
	case p.Gamma0 > 50:
		return &ParamError{Field: "gamma0_eV", Value: p.Gamma0, Reason: "implausibly large for an energy in eV (meV given?)"}
	case p.A > 10:
		return &ParamError{Field: "a_nm", Value: p.A, Reason: "implausibly large for a length in nm (Å or pm given?)"}
	case p.D > 100:
		return &ParamError{Field: "d_nm", Value: p.D, Reason: "implausibly large for a length in nm"}
	}
	return nil
}

// ValidateFor checks p and, in addition, that OnSite (if set) has one entry per layer of st.
func (p Params) ValidateFor(st Stack) error {
	if err := p.Validate(); err != nil {
		return err
	}
	if st.Layers() == 0 {
		return &StackError{Input: "", Reason: "empty stack (use ParseStack, NewBernal or NewRhombohedral)"}
	}
	if p.OnSite != nil && len(p.OnSite) != st.Layers() {
		return &ParamError{Field: "onsite_eV", Value: float64(len(p.OnSite)),
			Reason: fmt.Sprintf("has %d entries but the stack %s has %d layers", len(p.OnSite), st, st.Layers())}
	}
	return nil
}

// Clone returns a deep copy of p.
func (p Params) Clone() Params {
	if p.OnSite != nil {
		p.OnSite = append([]float64(nil), p.OnSite...)
	}
	return p
}
