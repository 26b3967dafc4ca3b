package lattice_test

import (
	"bytes"
	"errors"
	"strings"
	"testing"

	"lamina/lattice"
)

// FuzzParseStack: any input either parses to a valid stack (letters A, B, C, no equal
// neighbours, re-parsing gives the same stack) or returns an error wrapping ErrStacking; never
// a panic.
func FuzzParseStack(f *testing.F) {
	for _, s := range []string{"AB", "ABA", "ABCA", "ABCB", "", "AAB", "ABX", " abc ", strings.Repeat("AB", 40), "AÖB", "\x00"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		st, err := lattice.ParseStack(s)
		if err != nil {
			if !errors.Is(err, lattice.ErrStacking) {
				t.Fatalf("error %v does not wrap ErrStacking", err)
			}
			return
		}
		seq := st.String()
		if len(seq) == 0 || len(seq) > lattice.MaxLayers {
			t.Fatalf("bad length %d", len(seq))
		}
		for i := range len(seq) {
			if seq[i] != 'A' && seq[i] != 'B' && seq[i] != 'C' || (i > 0 && seq[i] == seq[i-1]) {
				t.Fatalf("invalid stack %q from %q", seq, s)
			}
		}
		again, err := lattice.ParseStack(seq)
		if err != nil || again != st {
			t.Fatalf("re-parse of %q: %v", seq, err)
		}
		_ = st.Couplings()
	})
}

// FuzzReadParams: any input either decodes to a parameter set that passes Validate and writes
// back to JSON that decodes to the same set, or returns an error; never a panic.
func FuzzReadParams(f *testing.F) {
	var b bytes.Buffer
	_ = lattice.WriteParams(&b, lattice.Graphite())
	f.Add(b.String())
	f.Add(`{"gamma0_eV": 3.16}`)
	f.Add(`{"gamma0_eV": -1}`)
	f.Add(`{"gamma0_eV": 3, "onsite_eV": [1e308, -1e308]}`)
	f.Add(`[]`)
	f.Fuzz(func(t *testing.T, s string) {
		p, err := lattice.ReadParams(strings.NewReader(s))
		if err != nil {
			return
		}
		if err := p.Validate(); err != nil {
			t.Fatalf("accepted parameters fail Validate: %v", err)
		}
		var out bytes.Buffer
		if err := lattice.WriteParams(&out, p); err != nil {
			t.Fatal(err)
		}
		q, err := lattice.ReadParams(&out)
		if err != nil {
			t.Fatalf("round trip: %v", err)
		}
		if q.Gamma0 != p.Gamma0 || q.D != p.D || len(q.OnSite) != len(p.OnSite) {
			t.Fatalf("round trip changed the parameters")
		}
	})
}
