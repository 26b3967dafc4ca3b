// Package hartree holds the interaction physics of few-layer graphene devices: the layer
// electrostatics of gated stacks, the self-consistent Hartree screening of a displacement field,
// the Coulomb kernels and the layer-resolved polarization (Lindhard) function, and the
// flavour-resolved Hartree-Fock problem of competing interaction-driven states, with their
// transition temperatures and maps over (n, D).
//
// # Electrostatics
//
// Layers l = 1..N from the bottom at spacing d. U_l is the electron potential energy of layer l
// (eV), reported with zero layer mean. n_l is the electron density of layer l relative to the
// neutral, unbiased stack (1/nm², electrons positive, spin and valley counted). The displacement
// field D (given as D/ε0 in V/nm) points from layer 1 to layer N when positive; D_b and D_t are
// the fields just below and above the stack, D = (D_b + D_t)/2, n = ε0 (D_b − D_t)/e. Between
// sheets Gauss's law gives
//
//	U_{l+1} − U_l = e d D_{l,l+1} / (ε0 ε_z),   D_{l,l+1} = D_b − (e/ε0) Σ_{m<=l} n_m
//
// with ε_z the interlayer dielectric constant ([Device.EpsZ], default 1). [Gates] converts gate
// voltages and dielectric thicknesses to (D, n) and back.
//
// # Self-consistent Hartree screening
//
// [Solve] iterates U → bands → n_l → U with Anderson mixing (package scf) until the potentials
// stop changing, at fixed density or fixed chemical potential and at any temperature (T = 0 is
// handled exactly: Fermi-level crossings are located and the k-integrals cut there). The
// k-integration is converged by construction: for the continuum model, Gauss-Legendre panels out
// to some 20 eV and an analytic 1/k³ tail (the induced density of high-momentum states decays
// only as a power, so a hard 1 eV cutoff would be 10% off for a bilayer); for anisotropic
// parameter sets (trigonal warping) the full-zone tight-binding model, whose high-energy states
// are physical. [Result] carries the potentials, layer densities, chemical potential, the band
// gap of the self-consistent bands and the iteration record; a non-converged run is returned
// with Converged false and an error.
//
// # Hartree-Fock
//
// [MeanField] describes the problem: per flavour (spin × valley) H_f(k) = H0 + U + Σ_f(k), the
// exchange self-energy measured from the non-interacting neutral stack (no double counting of
// the fitted bands), computed as an FFT convolution on a square k-grid in a disk around each
// valley, with the q = 0 singularity integrated over its cell. The interaction is V_ll'(q) with
// ε and gates, screened in the exchange term according to [Screening]; the Hartree term is the
// layer capacitor. [HFSolver.Solve] iterates a [Seed] to self-consistency (Anderson mixing of
// the potentials after damped steps); [HFSolver.Search] solves every seed class and ranks the
// distinct converged states by energy ([SearchResult]); each [HFResult] carries energy, gap,
// per-flavour layer densities and order parameters, its class ([Classify]), per-flavour Chern
// numbers and σ_xy. [HFSolver.CriticalTemperature] follows a state in temperature to its
// mean-field Tc. [Scan] maps ground states over (n, D) with continuation, streaming output
// ([OpenScanOutput]), resume, shards ([Scan.Shard], [MergeScans]) and checkpoints ([SaveState]).
//
// Mean-field equations have several solutions: a state is only called the ground state after
// every seed (and continuation from neighbours) has been tried and the energies compared, and a
// seed that does not converge is reported as such, never as a result.
//
// # Usage
//
//	st, _ := lattice.ParseStack("AB")
//	dev := hartree.Device{Stack: st, Params: lattice.BilayerIR(), EpsZ: 1}
//	r, err := hartree.Solve(ctx, dev, hartree.Conditions{Field: hartree.Field{D: 1.5}}, hartree.Options{})
//	if err != nil { ... }
//	fmt.Printf("gap %.1f meV\n", 1e3*r.Gap.Gap)
//
// # Concurrency
//
// A [Solver] is not safe for concurrent use; package-level functions are. Results do not depend
// on Options.Workers.
package hartree
