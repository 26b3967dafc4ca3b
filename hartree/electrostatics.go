package hartree

import (
	"errors"
	"fmt"
	"math"

	"lamina/lattice"
)

// ErrGeometry is wrapped by errors about impossible device geometry or dielectric data.
var ErrGeometry = errors.New("invalid device geometry")

// Field is the electrostatic boundary condition on the stack: the average displacement field
// D = (D_b + D_t)/2 and the carrier density n = ε0 (D_b − D_t)/e, where D_b and D_t are the
// fields just below and just above the stack (shared design, section 4).
type Field struct {
	D float64 // D/ε0 in V/nm, positive from layer 1 towards layer N
	N float64 // electron density in 1/nm² (electrons positive)
}

// Below returns D_b/ε0 = D + e n/(2ε0) in V/nm.
func (f Field) Below() float64 { return f.D + lattice.ChargeOverEps0*f.N/2 }

// Above returns D_t/ε0 = D − e n/(2ε0) in V/nm.
func (f Field) Above() float64 { return f.D - lattice.ChargeOverEps0*f.N/2 }

// FieldFromBoundary returns the Field for given D_b and D_t (V/nm).
func FieldFromBoundary(db, dt float64) Field {
	return Field{D: (db + dt) / 2, N: (db - dt) / lattice.ChargeOverEps0}
}

func (f Field) validate() error {
	if !finite(f.D) || !finite(f.N) {
		return fmt.Errorf("hartree: field D = %g V/nm, n = %g /nm² is not finite", f.D, f.N)
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// LayerPotentials solves the layer capacitor of a stack of N = len(nl) sheets at spacing d (nm)
// with interlayer dielectric constant epsZ: with D_{l,l+1} = D_b − (e/ε0) Σ_{m<=l} n_m,
//
//	U_{l+1} − U_l = e d D_{l,l+1} / (ε0 ε_z)
//
// (Gauss's law between sheets; U is the electron potential energy, so a field pointing from layer
// 1 to layer N raises the upper layers). nl are the layer electron densities in 1/nm², db is
// D_b/ε0 in V/nm; the result (eV) has zero layer mean and is written into dst (grown if needed).
func LayerPotentials(dst, nl []float64, db, d, epsZ float64) []float64 {
	n := len(nl)
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	if n == 0 {
		return dst
	}
	dst[0] = 0
	field := db
	for l := 0; l+1 < n; l++ {
		field -= lattice.ChargeOverEps0 * nl[l]
		dst[l+1] = dst[l] + d*field/epsZ
	}
	mean := 0.0
	for _, u := range dst {
		mean += u
	}
	mean /= float64(n)
	for i := range dst {
		dst[i] -= mean
	}
	return dst
}

// Gate is one gate electrode: a metal plate at distance Thickness (nm) from the stack through a
// dielectric of relative permittivity Eps, whose voltage Offset (V) leaves the stack neutral and
// unbiased when applied alone (the charge-neutrality offset of the gate).
type Gate struct {
	Thickness float64 // nm, > 0
	Eps       float64 // relative permittivity, > 0
	Offset    float64 // V
}

func (g Gate) validate(name string) error {
	switch {
	case !finite(g.Thickness) || g.Thickness <= 0:
		return fmt.Errorf("hartree: %s gate dielectric thickness %g nm must be positive: %w", name, g.Thickness, ErrGeometry)
	case !finite(g.Eps) || g.Eps <= 0:
		return fmt.Errorf("hartree: %s gate dielectric constant %g must be positive: %w", name, g.Eps, ErrGeometry)
	case !finite(g.Offset):
		return fmt.Errorf("hartree: %s gate offset %g V is not finite: %w", name, g.Offset, ErrGeometry)
	}
	return nil
}

// Gates is a device's gate geometry; a nil gate is absent. The stack is taken as grounded and
// its own (quantum) capacitance is neglected, so each gate sets the field between it and the
// stack (Zhang et al., Nature 459, 820 (2009), convention from memory):
//
//	D_b/ε0 = ε_b (V_b − V_b⁰) / d_b,     D_t/ε0 = −ε_t (V_t − V_t⁰) / d_t
//
// so that positive voltages on either gate add electrons. Units: V, nm, V/nm.
type Gates struct {
	Bottom, Top *Gate
}

// Field returns (D, n) for gate voltages vb and vt (V). An absent gate contributes no field
// (its voltage is ignored).
func (g Gates) Field(vb, vt float64) (Field, error) {
	if err := g.validate(); err != nil {
		return Field{}, err
	}
	if !finite(vb) || !finite(vt) {
		return Field{}, fmt.Errorf("hartree: gate voltages %g V, %g V are not finite", vb, vt)
	}
	var db, dt float64
	if g.Bottom != nil {
		db = g.Bottom.Eps * (vb - g.Bottom.Offset) / g.Bottom.Thickness
	}
	if g.Top != nil {
		dt = -g.Top.Eps * (vt - g.Top.Offset) / g.Top.Thickness
	}
	return FieldFromBoundary(db, dt), nil
}

// Voltages returns the gate voltages (V) that produce field f. With both gates any (D, n) is
// reachable; with one gate the other field must vanish (D_t = 0 for a bottom gate alone, so
// D = e n/(2ε0)), otherwise the error says which combination is possible.
func (g Gates) Voltages(f Field) (vb, vt float64, err error) {
	if err := g.validate(); err != nil {
		return 0, 0, err
	}
	if err := f.validate(); err != nil {
		return 0, 0, err
	}
	db, dt := f.Below(), f.Above()
	const tol = 1e-12
	if g.Bottom == nil && math.Abs(db) > tol*(1+math.Abs(dt)) {
		return 0, 0, fmt.Errorf("hartree: without a bottom gate D_b must vanish, but D = %g V/nm and n = %g /nm² need D_b = %g V/nm: %w", f.D, f.N, db, ErrGeometry)
	}
	if g.Top == nil && math.Abs(dt) > tol*(1+math.Abs(db)) {
		return 0, 0, fmt.Errorf("hartree: without a top gate D_t must vanish, but D = %g V/nm and n = %g /nm² need D_t = %g V/nm: %w", f.D, f.N, dt, ErrGeometry)
	}
	if g.Bottom != nil {
		vb = g.Bottom.Offset + db*g.Bottom.Thickness/g.Bottom.Eps
	}
	if g.Top != nil {
		vt = g.Top.Offset - dt*g.Top.Thickness/g.Top.Eps
	}
	return vb, vt, nil
}

func (g Gates) validate() error {
	if g.Bottom == nil && g.Top == nil {
		return fmt.Errorf("hartree: no gates: %w", ErrGeometry)
	}
	if g.Bottom != nil {
		if err := g.Bottom.validate("bottom"); err != nil {
			return err
		}
	}
	if g.Top != nil {
		if err := g.Top.validate("top"); err != nil {
			return err
		}
	}
	return nil
}
