// Package lattice describes few-layer graphene stacks in real space: the stacking sequence,
// the positions of the carbon sites, the Slonczewski-Weiss-McClure (SWMcC) hopping classes
// that follow from that geometry, and the parameter sets that give those hoppings their values.
// It knows nothing of wave vectors; package bands builds Hamiltonians from what is defined here.
//
// # Stacking and geometry
//
// A stack is a string of the letters A, B and C, one per layer from the bottom (layer 1) to the
// top (layer N), with no two neighbours equal. Layer l sits at height z_l = (l-1) d. Its
// A-sublattice site lies at the in-plane position of its letter (A: 0, B: δ, C: 2δ, with δ one
// carbon-carbon bond along a fixed direction) and its B site one bond further, so positions are
// integers modulo 3 in units of δ. For adjacent layers the vertically stacked pair is
// (B_l, A_{l+1}) when the upper letter follows the lower one cyclically (A→B, B→C, C→A) and
// (A_l, B_{l+1}) otherwise. Bernal stacks alternate ABAB..., rhombohedral stacks cycle ABCABC...;
// any other sequence (ABCB, ABAC, ...) is handled by the same rules.
//
// # Hopping classes
//
// Couplings are assigned from geometry alone:
//
//	gamma0  nearest neighbours within a layer
//	gamma1  vertically aligned ("dimer") sites of adjacent layers
//	gamma3  between the two non-dimer sites of adjacent layers
//	gamma4  between a dimer and a non-dimer site of adjacent layers
//	gamma2  vertically aligned sites two layers apart with no atom of the layer between on that line
//	gamma5  vertically aligned sites two layers apart with an atom of the layer between on that line
//	Delta'  on-site energy of every site that belongs to at least one dimer pair
//
// gamma2 and gamma5 enter as hoppings gamma2/2 and gamma5/2 as in the few-layer literature
// (Koshino & McCann, PRB 79, 125443 (2009)): bulk graphite's gamma2 sums the couplings to the
// layers above and below. The signs of the hopping amplitudes are fixed in package bands.
//
// # Basis order
//
// One flavour (spin and valley) of an N-layer stack has 2N orbitals ordered
// (A1, B1, A2, B2, ..., AN, BN); [Site] gives the index of a site in that order.
//
// # Units
//
// Energies in eV, lengths in nm. Physical constants are CODATA 2018 and are defined once in
// this package (see constants.go).
//
// # Usage
//
//	st, err := lattice.ParseStack("ABCA")
//	if err != nil { ... }
//	p, err := lattice.Preset("graphite-dd")
//	if err != nil { ... }
//	for _, c := range st.Couplings() { fmt.Println(c) }
//
// # Errors
//
// Bad input never panics: [ParseStack], [NewBernal] and [NewRhombohedral] return a
// [*StackError] (errors.Is(err, ErrStacking)); [Params.Validate] returns a [*ParamError]
// (errors.Is(err, ErrInvalidParam)) that names the offending field.
package lattice
