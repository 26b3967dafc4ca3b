package lattice

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
)

// ParamFile is the JSON schema of a parameter set. Every numeric field carries its unit in its
// name; absent couplings are zero; a_nm and d_nm default to [DefaultA] and [DefaultD] when absent.
//
//	{
//	  "name": "my-fit",
//	  "source": "where the numbers come from",
//	  "gamma0_eV": 3.16, "gamma1_eV": 0.39, "gamma2_eV": -0.02, "gamma3_eV": 0.315,
//	  "gamma4_eV": 0.044, "gamma5_eV": 0.038, "delta_prime_eV": 0.05,
//	  "a_nm": 0.246, "d_nm": 0.335,
//	  "onsite_eV": [0, 0.003, 0]
//	}
//
// Unknown keys are rejected, so a misspelt field is an error rather than a silent zero.
type ParamFile struct {
	Name       string    `json:"name,omitempty"`
	Source     string    `json:"source,omitempty"`
	Gamma0     *float64  `json:"gamma0_eV"`
	Gamma1     float64   `json:"gamma1_eV"`
	Gamma2     float64   `json:"gamma2_eV"`
	Gamma3     float64   `json:"gamma3_eV"`
	Gamma4     float64   `json:"gamma4_eV"`
	Gamma5     float64   `json:"gamma5_eV"`
	DeltaPrime float64   `json:"delta_prime_eV"`
	A          *float64  `json:"a_nm,omitempty"`
	D          *float64  `json:"d_nm,omitempty"`
	OnSite     []float64 `json:"onsite_eV,omitempty"`
}

// ReadParams decodes one parameter set in the [ParamFile] schema from r and validates it.
func ReadParams(r io.Reader) (Params, error) {
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	var f ParamFile
	if err := dec.Decode(&f); err != nil {
		return Params{}, fmt.Errorf("lattice: reading parameter JSON: %w", err)
	}
	if dec.More() {
		return Params{}, errors.New("lattice: reading parameter JSON: more than one JSON value")
	}
	if f.Gamma0 == nil {
		return Params{}, &ParamError{Field: "gamma0_eV", Reason: "missing (required)"}
	}
	p := Params{
		Name: f.Name, Source: f.Source,
		Gamma0: *f.Gamma0, Gamma1: f.Gamma1, Gamma2: f.Gamma2, Gamma3: f.Gamma3,
		Gamma4: f.Gamma4, Gamma5: f.Gamma5, DeltaPrime: f.DeltaPrime,
		A: DefaultA, D: DefaultD, OnSite: f.OnSite,
	}
	if f.A != nil {
		p.A = *f.A
	}
	if f.D != nil {
		p.D = *f.D
	}
	if err := p.Validate(); err != nil {
		return Params{}, err
	}
	return p, nil
}

// WriteParams encodes p in the [ParamFile] schema, indented, followed by a newline.
func WriteParams(w io.Writer, p Params) error {
	g0, a, d := p.Gamma0, p.A, p.D
	f := ParamFile{
		Name: p.Name, Source: p.Source, Gamma0: &g0, Gamma1: p.Gamma1, Gamma2: p.Gamma2,
		Gamma3: p.Gamma3, Gamma4: p.Gamma4, Gamma5: p.Gamma5, DeltaPrime: p.DeltaPrime,
		A: &a, D: &d, OnSite: p.OnSite,
	}
	b, err := json.MarshalIndent(f, "", "  ")
	if err != nil {
		return fmt.Errorf("lattice: writing parameter JSON: %w", err)
	}
	b = append(b, '\n')
	_, err = w.Write(b)
	return err
}

// LoadParams resolves a command-line style reference: a preset name (see [PresetNames]) or the
// path of a JSON file in the [ParamFile] schema.
func LoadParams(nameOrPath string) (Params, error) {
	if p, err := Preset(nameOrPath); err == nil {
		return p, nil
	}
	if !strings.ContainsAny(nameOrPath, "/\\.") {
		_, err := Preset(nameOrPath)
		return Params{}, err
	}
	b, err := os.ReadFile(nameOrPath)
	if err != nil {
		return Params{}, fmt.Errorf("lattice: parameter set %q is neither a preset (%s) nor a readable file: %w",
			nameOrPath, strings.Join(PresetNames(), ", "), err)
	}
	p, err := ReadParams(bytes.NewReader(b))
	if err != nil {
		return Params{}, fmt.Errorf("%w (in %s)", err, nameOrPath)
	}
	return p, nil
}
