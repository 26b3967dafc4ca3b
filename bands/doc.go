// Package bands evaluates few-layer graphene in k-space: Bloch Hamiltonians, their eigenstates,
// band structures along paths, band gaps, densities of states, Berry fluxes and the Bernal
// bilayer/monolayer decomposition.
//
// # Hamiltonians
//
// [NewContinuum] gives the k·p Hamiltonian H_ξ(k) at valley K (ξ = +1) or K' (ξ = -1), with k
// measured from the valley point; [NewFullZone] gives the tight-binding Hamiltonian over the whole
// Brillouin zone with the same couplings. Both take a [lattice.Stack], a [lattice.Params] and
// optional layer potentials U_l (electron potential energy, eV, bottom layer first), and both
// implement [Hamiltonian], which every analysis routine accepts, so user-defined Hamiltonians
// (for example a mean-field one) work everywhere too.
//
// # Conventions
//
// Basis (A1, B1, A2, B2, ..., AN, BN). Intralayer block [[U_l, ħv π†], [ħv π, U_l]] with
// π = ξ k_x + i k_y and v = √3 a γ0 / (2ħ). Interlayer couplings from the geometry of package
// lattice: +γ1 on dimer pairs, ħv3 π(†) for γ3, -ħv4 π(†) for γ4, γ2/2 and γ5/2 two layers apart,
// Δ' on dimer sites (McCann & Koshino, Rep. Prog. Phys. 76, 056503 (2013) for the bilayer).
// Eigenvalues ascend; eigenvector j of an order-n problem is z[j*n:(j+1)*n].
//
// # Units
//
// Energies in eV, wave vectors in 1/nm, densities of states in 1/(eV nm²), carrier densities in
// 1/nm² (1 nm⁻² = 10¹⁴ cm⁻²).
//
// # Concurrency
//
// Hamiltonians are immutable and safe for concurrent use. A [Solver] is not; each goroutine
// needs its own. Routines that loop over k-points take a worker count and give results that do
// not depend on it (each k-point is computed independently and sums run in a fixed order).
// Long loops take a context.Context and stop early when it is cancelled.
//
// # Usage
//
//	st, _ := lattice.ParseStack("ABCA")
//	h, err := bands.NewContinuum(st, lattice.Graphite(), bands.K, []float64{-0.03, -0.01, 0.01, 0.03})
//	if err != nil { ... }
//	gap, err := bands.FindGap(ctx, h, bands.GapOptions{})
//	fmt.Printf("gap %.1f meV at k = %v\n", 1e3*gap.Gap, gap.KC)
package bands
