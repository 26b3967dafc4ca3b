package hartree_test

import (
	"context"
	"fmt"
	"testing"

	"lamina/hartree"
	"lamina/lattice"
)

// BenchmarkSweep runs a 50-point D sweep (0.02 to 1 V/nm at neutrality) with continuation and
// reports the time and the SCF iterations per point.
func BenchmarkSweep(b *testing.B) {
	for _, tc := range []struct {
		stack string
		p     lattice.Params
	}{{"ABC", lattice.Minimal()}, {"ABC", lattice.Graphite()}, {"AB", lattice.Minimal()}} {
		b.Run(fmt.Sprintf("stacking=%s/params=%s", tc.stack, tc.p.Name), func(b *testing.B) {
			dev := hartree.Device{Stack: stack(b, tc.stack), Params: tc.p}
			conds := make([]hartree.Conditions, 50)
			for i := range conds {
				conds[i] = hartree.Conditions{Field: hartree.Field{D: 0.02 * float64(i+1)}}
			}
			iters := 0
			for b.Loop() {
				s, err := hartree.NewSolver(dev, 0, hartree.Options{})
				if err != nil {
					b.Fatal(err)
				}
				pts, err := s.Sweep(context.Background(), conds, nil)
				if err != nil {
					b.Fatal(err)
				}
				for _, p := range pts {
					iters += p.Result.Iterations
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N*len(conds)), "ms/point")
			b.ReportMetric(float64(iters)/float64(b.N*len(conds)), "iterations/point")
		})
	}
}
