package lattice_test

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/lattice"
)

// CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)) and the derived values
// listed in shared/references.md section 8 (computed from those constants).
func TestConstants(t *testing.T) {
	assert.InEpsilon(t, 6.582119569e-16, lattice.HbarEVs, 1e-9)
	// e·(10^12 cm^-2)/ε0 = 0.180951 V/nm.
	assert.InEpsilon(t, 0.180951, lattice.ChargeOverEps0*lattice.Per1e12cm2, 3e-6)
	// e^2/(4π ε0) = 1.439964548 eV nm (fine-structure constant times ħc).
	assert.InEpsilon(t, 1.439964548, lattice.CoulombEVnm, 1e-9)
	// ħv for γ0 = 3.16 eV, a = 0.246 nm is 0.6732 eV nm, v = 1.0228e6 m/s (shared/references.md 1.2).
	hv := lattice.HbarV(3.16, 0.246)
	assert.InEpsilon(t, 0.6732, hv, 1e-4)
	assert.InEpsilon(t, 1.0228e6, hv*1e-9/lattice.HbarEVs, 1e-4)
}

func TestPresets(t *testing.T) {
	names := lattice.PresetNames()
	require.Equal(t, []string{"bilayer-ir", "graphite", "minimal", "trilayer-ll"}, names)
	for _, n := range names {
		t.Run(n, func(t *testing.T) {
			p, err := lattice.Preset(n)
			require.NoError(t, err)
			require.NoError(t, p.Validate())
			assert.Equal(t, n, p.Name)
			assert.NotEmpty(t, p.Source)
		})
	}
	m, err := lattice.Preset(" Minimal ")
	require.NoError(t, err)
	assert.Equal(t, lattice.Params{Name: "minimal", Source: m.Source, Gamma0: 3.16, Gamma1: 0.39, A: 0.246, D: 0.335}, m)
	_, err = lattice.Preset("graphene-ish")
	require.Error(t, err)
	assert.Contains(t, err.Error(), "known: bilayer-ir, graphite, minimal, trilayer-ll")
}

func TestValidate(t *testing.T) {
	base := lattice.Graphite()
	cases := []struct {
		name  string
		mod   func(p *lattice.Params)
		field string
	}{
		{"nan gamma3", func(p *lattice.Params) { p.Gamma3 = math.NaN() }, "gamma3_eV"},
		{"inf delta", func(p *lattice.Params) { p.DeltaPrime = math.Inf(1) }, "delta_prime_eV"},
		{"zero gamma0", func(p *lattice.Params) { p.Gamma0 = 0 }, "gamma0_eV"},
		{"negative gamma0", func(p *lattice.Params) { p.Gamma0 = -3 }, "gamma0_eV"},
		{"meV gamma0", func(p *lattice.Params) { p.Gamma0 = 3160 }, "gamma0_eV"},
		{"negative gamma1", func(p *lattice.Params) { p.Gamma1 = -0.39 }, "gamma1_eV"},
		{"zero a", func(p *lattice.Params) { p.A = 0 }, "a_nm"},
		{"angstrom a", func(p *lattice.Params) { p.A = 246 }, "a_nm"},
		{"negative d", func(p *lattice.Params) { p.D = -0.335 }, "d_nm"},
		{"nan onsite", func(p *lattice.Params) { p.OnSite = []float64{0, math.NaN()} }, "onsite_eV"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := base.Clone()
			tc.mod(&p)
			err := p.Validate()
			require.Error(t, err)
			var pe *lattice.ParamError
			require.True(t, errors.As(err, &pe))
			assert.Equal(t, tc.field, pe.Field)
			assert.ErrorIs(t, err, lattice.ErrInvalidParam)
		})
	}
	st, _ := lattice.ParseStack("ABA")
	p := base.Clone()
	p.OnSite = []float64{0, 0.01}
	assert.ErrorIs(t, p.ValidateFor(st), lattice.ErrInvalidParam)
	p.OnSite = []float64{0, 0.01, 0}
	assert.NoError(t, p.ValidateFor(st))
	assert.Error(t, p.ValidateFor(lattice.Stack{}))
}

func TestJSONRoundTrip(t *testing.T) {
	p := lattice.TrilayerLL()
	p.OnSite = []float64{0, 0.0035, 0}
	var buf bytes.Buffer
	require.NoError(t, lattice.WriteParams(&buf, p))
	assert.Contains(t, buf.String(), `"gamma0_eV": 3.1`)
	assert.Contains(t, buf.String(), `"delta_prime_eV": 0.046`)
	q, err := lattice.ReadParams(&buf)
	require.NoError(t, err)
	assert.Equal(t, p, q)
}

func TestReadParamsErrors(t *testing.T) {
	cases := []struct{ name, in, contain string }{
		{"unknown key", `{"gamma0_eV": 3.16, "gamma_1": 0.39}`, "unknown field"},
		{"missing gamma0", `{"gamma1_eV": 0.39}`, "gamma0_eV"},
		{"bad gamma0", `{"gamma0_eV": -1}`, "must be positive"},
		{"string", `{"gamma0_eV": "3.16"}`, "cannot unmarshal"},
		{"two values", `{"gamma0_eV": 3.16}{"gamma0_eV": 3.16}`, "more than one"},
		{"empty", ``, "EOF"},
		{"not json", `gamma0 = 3.16`, "invalid character"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := lattice.ReadParams(strings.NewReader(tc.in))
			require.Error(t, err)
			assert.Contains(t, err.Error(), tc.contain)
		})
	}
	p, err := lattice.ReadParams(strings.NewReader(`{"gamma0_eV": 3.0}`))
	require.NoError(t, err)
	assert.Equal(t, lattice.DefaultA, p.A)
	assert.Equal(t, lattice.DefaultD, p.D)
}

func TestLoadParams(t *testing.T) {
	p, err := lattice.LoadParams("graphite")
	require.NoError(t, err)
	assert.Equal(t, lattice.Graphite(), p)
	dir := t.TempDir()
	path := filepath.Join(dir, "fit.json")
	require.NoError(t, os.WriteFile(path, []byte(`{"name":"fit","gamma0_eV":3.0,"gamma1_eV":0.4}`), 0o644))
	p, err = lattice.LoadParams(path)
	require.NoError(t, err)
	assert.Equal(t, 3.0, p.Gamma0)
	_, err = lattice.LoadParams("nope")
	assert.ErrorContains(t, err, "unknown parameter preset")
	_, err = lattice.LoadParams(filepath.Join(dir, "missing.json"))
	assert.ErrorContains(t, err, "neither a preset")
	bad := filepath.Join(dir, "bad.json")
	require.NoError(t, os.WriteFile(bad, []byte(`{"gamma0_eV":3.0,"a_nm":-1}`), 0o644))
	_, err = lattice.LoadParams(bad)
	assert.ErrorIs(t, err, lattice.ErrInvalidParam)
	assert.ErrorContains(t, err, "bad.json")
}
