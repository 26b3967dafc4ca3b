package hartree_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/hartree"
	"lamina/lattice"
)

// Gauss's law between sheets (shared/design.md section 4) and the bilayer form
// U = U_ext − (e² c0/(2ε0 εr))(n1 − n2), U_ext = e c0 D/(ε0 εr) (McCann, PRB 74, 161403(R) (2006);
// shared/references.md 2.4 and 8: e·10¹² cm⁻²/ε0 = 0.180951 V/nm, U_ext = 0.335 eV per V/nm for
// c0 = 0.335 nm, εr = 1). Pure arithmetic: tolerance 1e-12 relative.
func TestLayerPotentialsBilayer(t *testing.T) {
	const d, D = 0.335, 0.7
	n1, n2 := 0.02, -0.005 // 1/nm²
	for _, eps := range []float64{1, 2.5} {
		f := hartree.Field{D: D, N: n1 + n2}
		u := hartree.LayerPotentials(nil, []float64{n1, n2}, f.Below(), d, eps)
		require.Len(t, u, 2)
		uext := 0.335 * D / eps
		// e²c0/(2ε0εr) in eV nm²: e/ε0 = 0.180951 V/nm per 10¹² cm⁻² = 18.0951 V nm.
		want := uext - 18.0951*d/(2*eps)*(n1-n2)
		assert.InEpsilon(t, want, u[1]-u[0], 2e-6) // the 6-digit constant limits this
		assert.InDelta(t, 0, u[0]+u[1], 1e-15, "zero layer mean")
	}
}

// N layers: the potential steps follow the field between sheets layer by layer, and a total
// density n makes D_t = D_b − e n/ε0.
func TestLayerPotentialsGaussLaw(t *testing.T) {
	nl := []float64{0.01, -0.003, 0.002, 0.004, -0.001}
	f := hartree.Field{D: -0.4, N: 0}
	for _, v := range nl {
		f.N += v
	}
	const d, eps = 0.335, 1.7
	u := hartree.LayerPotentials(nil, nl, f.Below(), d, eps)
	field := f.Below()
	for l := 0; l+1 < len(nl); l++ {
		field -= lattice.ChargeOverEps0 * nl[l]
		assert.InDelta(t, d*field/eps, u[l+1]-u[l], 1e-14, "step %d", l)
	}
	field -= lattice.ChargeOverEps0 * nl[len(nl)-1]
	assert.InDelta(t, f.Above(), field, 1e-13, "D_t = D_b − e n/ε0")
	// 10¹² cm⁻² of charge steps D/ε0 by 0.180951 V/nm (references 8).
	g := hartree.FieldFromBoundary(1, 1-0.180951)
	assert.InEpsilon(t, 0.01, g.N, 3e-6)
}

func gate(th, eps, off float64) *hartree.Gate {
	return &hartree.Gate{Thickness: th, Eps: eps, Offset: off}
}

// Dual gates (Zhang et al., Nature 459, 820 (2009), convention from memory):
// D_b/ε0 = ε_b (V_b − V_b⁰)/d_b, D_t/ε0 = −ε_t (V_t − V_t⁰)/d_t, D = (D_b + D_t)/2,
// n = ε0 (D_b − D_t)/e. Checked on numbers worked by hand and by the round trip.
func TestGates(t *testing.T) {
	g := hartree.Gates{Bottom: gate(285, 3.9, 0.5), Top: gate(20, 3.4, -0.1)}
	f, err := g.Field(10.5, 1.9)
	require.NoError(t, err)
	db := 3.9 * 10 / 285
	dt := -3.4 * 2 / 20
	assert.InEpsilon(t, (db+dt)/2, f.D, 1e-14)
	assert.InEpsilon(t, (db-dt)/lattice.ChargeOverEps0, f.N, 1e-14)
	vb, vt, err := g.Voltages(f)
	require.NoError(t, err)
	assert.InDelta(t, 10.5, vb, 1e-12)
	assert.InDelta(t, 1.9, vt, 1e-12)

	// One bottom gate: D_t = 0, so D = e n/(2ε0) only.
	one := hartree.Gates{Bottom: gate(90, 3.9, 0)}
	f, err = one.Field(3, 123)
	require.NoError(t, err)
	assert.InDelta(t, 0, f.Above(), 1e-15)
	_, _, err = one.Voltages(hartree.Field{D: 0.5, N: 0})
	assert.ErrorIs(t, err, hartree.ErrGeometry, "a lone bottom gate cannot make D without n")
	vb, _, err = one.Voltages(f)
	require.NoError(t, err)
	assert.InDelta(t, 3, vb, 1e-12)
}

func TestGateErrors(t *testing.T) {
	cases := map[string]hartree.Gates{
		"none":            {},
		"zero thickness":  {Bottom: gate(0, 3.9, 0)},
		"negative eps":    {Top: gate(10, -1, 0)},
		"nan offset":      {Bottom: gate(10, 3.9, math.NaN())},
		"inf thickness":   {Bottom: gate(math.Inf(1), 3.9, 0)},
		"negative top th": {Bottom: gate(10, 3.9, 0), Top: gate(-5, 3.9, 0)},
	}
	for name, g := range cases {
		t.Run(name, func(t *testing.T) {
			_, err := g.Field(1, 1)
			assert.ErrorIs(t, err, hartree.ErrGeometry)
			_, _, err = g.Voltages(hartree.Field{})
			assert.ErrorIs(t, err, hartree.ErrGeometry)
		})
	}
	_, err := hartree.Gates{Bottom: gate(10, 3, 0)}.Field(math.NaN(), 0)
	assert.Error(t, err)
}
