package hartree_test

import (
	"context"
	"fmt"
	"testing"

	"lamina/hartree"
	"lamina/lattice"
)

// BenchmarkHFIteration measures one evaluation of the mean-field map (diagonalisation of every
// k-point and flavour, occupations, density matrices, Hartree and the FFT exchange) of a Bernal
// tetralayer, for growing grids and both screening settings. One op is one iteration.
func BenchmarkHFIteration(b *testing.B) {
	for _, scr := range []hartree.Screening{hartree.Unscreened, hartree.RPA} {
		for _, L := range []int{48, 96, 192} {
			b.Run(fmt.Sprintf("screening=%v/grid=%d", scr, L), func(b *testing.B) {
				mf := hartree.MeanField{Device: hartree.Device{Stack: stack(b, "ABAB"), Params: lattice.Minimal()}, Grid: L, Cutoff: 0.5,
					Interaction: hartree.Interaction{Eps: 6, Screening: scr}}
				s, err := hartree.NewHFSolver(mf, hartree.HFOptions{})
				if err != nil {
					b.Fatal(err)
				}
				if err := hartree.EvaluateOnce(context.Background(), s); err != nil { // allocate the buffers
					b.Fatal(err)
				}
				for b.Loop() {
					if err := hartree.EvaluateOnce(context.Background(), s); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(s.Nodes()), "kpoints")
			})
		}
	}
}

// BenchmarkHFSolve converges a Bernal tetralayer (four flavours, 96 points across) from a
// layer-antiferromagnetic seed. One op is one converged solve.
func BenchmarkHFSolve(b *testing.B) {
	mf := hartree.MeanField{Device: hartree.Device{Stack: stack(b, "ABAB"), Params: lattice.Minimal()}, Grid: 96, Cutoff: 0.5,
		Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}}
	s, err := hartree.NewHFSolver(mf, hartree.HFOptions{})
	if err != nil {
		b.Fatal(err)
	}
	iters := 0
	for b.Loop() {
		r, err := s.Solve(context.Background(), hartree.PatternSeed(laf, hartree.Staggered, 0))
		if err != nil {
			b.Fatal(err)
		}
		iters += r.Iterations
	}
	b.ReportMetric(float64(iters)/float64(b.N), "iterations")
}

// BenchmarkTc finds the mean-field Tc of a Bernal tetralayer (bare exchange, ε = 6, 32 points).
func BenchmarkTc(b *testing.B) {
	mf := hartree.MeanField{Device: hartree.Device{Stack: stack(b, "ABAB"), Params: lattice.Minimal()}, Grid: 32, Cutoff: 0.5,
		Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}}
	s, err := hartree.NewHFSolver(mf, hartree.HFOptions{})
	if err != nil {
		b.Fatal(err)
	}
	r, err := s.Solve(context.Background(), hartree.PatternSeed(laf, hartree.Staggered, 0))
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		tc, err := s.CriticalTemperature(context.Background(), r, hartree.TcOptions{})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(tc.Tc, "Tc_K")
	}
}

// BenchmarkScan maps a 20 × 20 (n, D) grid of a bilayer with exchange (bare, ε = 6, 24 points
// across), with and without continuation, and reports points per minute and iterations per
// point.
func BenchmarkScan(b *testing.B) {
	for _, mode := range []struct {
		cont  bool
		every int
	}{{true, 0}, {false, 0}, {true, 10}} {
		cont := mode.cont
		b.Run(fmt.Sprintf("continuation=%t/fresh-every=%d", cont, mode.every), func(b *testing.B) {
			ns, ds := make([]float64, 20), make([]float64, 20)
			for i := range 20 {
				ns[i] = -0.01 + 0.02*float64(i)/19
				ds[i] = 0.6 * float64(i) / 19
			}
			sc := hartree.Scan{
				Base: hartree.MeanField{Device: hartree.Device{Stack: stack(b, "AB"), Params: lattice.Minimal()}, Grid: 24, Cutoff: 0.5,
					Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}},
				Ns: ns, Ds: ds, Search: hartree.SearchOptions{Random: -1}, Continuation: cont, FreshEvery: mode.every,
			}
			iters, cont, pts, seeds := 0, 0, 0, len(sc.Search.Seeds(2))
			for b.Loop() {
				err := sc.Run(context.Background(), sc.Points(), nil, nil, func(r hartree.ScanRecord) error {
					iters += r.Iterations
					cont += r.Continued
					pts++
					return nil
				}, nil, nil)
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(pts)/b.Elapsed().Minutes(), "points/min")
			b.ReportMetric(float64(iters)/float64(pts), "iterations/point")
			// Iterations of the continuation seed per point, against those of a fresh seed.
			if cont > 0 {
				b.ReportMetric(float64(cont)/float64(pts), "continued-iterations/point")
				b.ReportMetric(float64(iters-cont)/float64(pts*seeds), "fresh-iterations/seed")
			} else {
				b.ReportMetric(float64(iters)/float64(pts*seeds), "fresh-iterations/seed")
			}
		})
	}
}
