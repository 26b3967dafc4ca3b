package hartree_test

import (
	"context"
	"fmt"
	"slices"

	"lamina/hartree"
	"lamina/lattice"
)

// A bilayer screens a displacement field: the self-consistent interlayer potential is well
// below the unscreened e d D/ε0.
func ExampleSolve() {
	st, _ := lattice.ParseStack("AB")
	dev := hartree.Device{Stack: st, Params: lattice.Minimal()}
	r, err := hartree.Solve(context.Background(), dev, hartree.Conditions{Field: hartree.Field{D: 0.5}}, hartree.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("U2 - U1 = %.1f meV (unscreened %.1f meV), gap %.1f meV\n", 1e3*(r.U[1]-r.U[0]), 1e3*0.335*0.5, 1e3*r.Gap.Gap)
	// Output:
	// U2 - U1 = 69.3 meV (unscreened 167.5 meV), gap 68.2 meV
}

// The competing states of a bilayer with bare exchange, lowest energy first.
func ExampleHFSolver_Search() {
	st, _ := lattice.ParseStack("AB")
	mf := hartree.MeanField{Device: hartree.Device{Stack: st, Params: lattice.Minimal()}, Grid: 16, Cutoff: 0.5,
		Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}}
	s, err := hartree.NewHFSolver(mf, hartree.HFOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := s.Search(context.Background(), hartree.SearchOptions{Profiles: []hartree.Profile{hartree.Linear}, Random: -1})
	if err != nil {
		fmt.Println(err)
		return
	}
	g := res.Ground()
	classes := res.Degenerate(0)
	slices.Sort(classes) // which of the degenerate states sorts first is a matter of rounding
	fmt.Printf("ground state degenerate among %v\n", classes)
	fmt.Printf("gap %.0f meV\n", 1e3*g.GapRefined)
	// Output:
	// ground state degenerate among [anomalous-Hall layer-antiferromagnet spin-Hall]
	// gap 39 meV
}
