package lattice_test

import (
	"fmt"

	"lamina/lattice"
)

// The couplings of a rhombohedral trilayer follow from its letters alone.
func ExampleStack_Couplings() {
	st, err := lattice.ParseStack("ABC")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range st.Couplings() {
		if c.Class == lattice.Gamma1 || c.Class == lattice.Gamma2 {
			fmt.Println(c)
		}
	}
	_, err = lattice.ParseStack("ABBA")
	fmt.Println(err)
	// Output:
	// gamma2 A1-B3 offset 0
	// gamma1 B1-A2 offset 0
	// gamma1 B2-A3 offset 0
	// lattice: stacking "ABBA": layer 3 repeats the letter B of the layer below (neighbours must differ) at position 3
}
