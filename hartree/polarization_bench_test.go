package hartree

import (
	"context"
	"strconv"
	"testing"

	"lamina/lattice"
)

// BenchmarkLindhardTable measures one op = a table of nq angle-averaged Π(|q|) with the default
// options (ħvΛ = 3 eV, Grid 128, T = 0) at μ = 0.05 eV, q evenly spaced up to 3/nm (the range
// an exchange kernel on a 1 eV disk needs). The isotropic minimal model needs one direction per
// q; the warped graphite bilayer three, each on the full (unmirrored) grid.
func BenchmarkLindhardTable(b *testing.B) {
	cases := []struct {
		name   string
		stack  string
		params lattice.Params
		nq     int
	}{
		{"layers=1/q=32", "A", lattice.Minimal(), 32},
		{"layers=2/q=32", "AB", lattice.Minimal(), 32},
		{"layers=3/q=32", "ABC", lattice.Minimal(), 32},
		{"layers=4/q=32", "ABCA", lattice.Minimal(), 32},
		{"layers=2/warped/q=8", "AB", lattice.Graphite(), 8},
	}
	for _, tc := range cases {
		b.Run(tc.name, func(b *testing.B) {
			st, err := lattice.ParseStack(tc.stack)
			if err != nil {
				b.Fatal(err)
			}
			qs := make([]float64, tc.nq)
			for i := range qs {
				qs[i] = 3 * float64(i+1) / float64(tc.nq)
			}
			opt := LindhardOptions{Mu: 0.05}
			// Count the eigenproblems of one table from the grid geometry.
			ls, err := newLindSetup(st, tc.params, nil, opt, 1)
			if err != nil {
				b.Fatal(err)
			}
			eig := 0
			for _, q := range qs {
				dirs, half := 1, true
				if !ls.iso {
					dirs, half = lindDefaultAngles, false
				}
				g := ls.geom(q, 0, half)
				eig += dirs * 2 * (g.rows + 1) * g.cols
			}
			ctx := context.Background()
			for b.Loop() {
				if _, err := LindhardTable(ctx, st, tc.params, nil, qs, opt); err != nil {
					b.Fatal(err)
				}
			}
			perOp := b.Elapsed().Seconds() / float64(b.N)
			b.ReportMetric(perOp/float64(tc.nq), "s/q")
			b.ReportMetric(float64(eig)/perOp, "eigenproblems/s")
			b.ReportMetric(float64(eig), "eigenproblems/op")
		})
	}
}

// BenchmarkLindhard measures one op = one Π(q) of a doped bilayer at q = 0.5/nm with the
// defaults, for the worker counts given.
func BenchmarkLindhard(b *testing.B) {
	st, err := lattice.ParseStack("AB")
	if err != nil {
		b.Fatal(err)
	}
	for _, w := range []int{1, 2} {
		b.Run("layers=2/workers="+strconv.Itoa(w), func(b *testing.B) {
			opt := LindhardOptions{Mu: 0.05, Workers: w}
			ctx := context.Background()
			for b.Loop() {
				if _, err := Lindhard(ctx, st, lattice.Minimal(), nil, 0.5, 0, opt); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
