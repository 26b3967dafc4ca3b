package bands_test

import (
	"context"
	"fmt"
	"testing"

	"lamina/bands"
	"lamina/lattice"
)

// BenchmarkBands measures k-points per second for eigenvalues, eigenvectors and layer weights
// along a line through K on one goroutine.
func BenchmarkBands(b *testing.B) {
	for _, s := range []string{"AB", "ABC", "ABAB", "ABCABC"} {
		st := mustStack(b, s)
		p := lattice.Graphite()
		u := linearU(st.Layers(), 0.05)
		models := map[string]bands.Hamiltonian{"continuum": mustCont(b, st, p, bands.K, u)}
		z, err := bands.NewFullZone(st, p, u)
		if err != nil {
			b.Fatal(err)
		}
		models["fullzone"] = z
		for _, m := range []string{"continuum", "fullzone"} {
			b.Run(fmt.Sprintf("stacking=%s/model=%s", s, m), func(b *testing.B) {
				path, err := bands.Line(0.3, 0.5, 1000)
				if err != nil {
					b.Fatal(err)
				}
				b.ReportAllocs()
				for b.Loop() {
					if _, err := bands.Compute(context.Background(), models[m], path, bands.Options{Workers: 1}); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(len(path.Points))*float64(b.N)/b.Elapsed().Seconds(), "kpoints/s")
			})
		}
	}
}

// BenchmarkFindGap measures one global gap search with the default grid.
func BenchmarkFindGap(b *testing.B) {
	st := mustStack(b, "ABC")
	h := mustCont(b, st, lattice.Graphite(), bands.K, linearU(3, 0.05))
	for b.Loop() {
		if _, err := bands.FindGap(context.Background(), h, bands.GapOptions{Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
