package hartree

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"lamina/bands"
	"lamina/internal/eigh"
	"lamina/internal/par"
	"lamina/internal/quad"
	"lamina/lattice"
)

// LindhardOptions controls [Lindhard], [LindhardTable], [NonInteractingDensity] and
// [NonInteractingMu]. The zero value is ready to use: T = 0, μ = 0, ħvΛ = 3 eV, 128 angular
// nodes, the Dirac tail beyond the cutoff added, GOMAXPROCS workers.
type LindhardOptions struct {
	// Cutoff is ħvΛ in eV. The k-integral covers the ellipse |k| + |k+q| <= 2Λ around the valley
	// point (for q << Λ the disk |k + q/2| <= Λ); beyond it the tail of N decoupled Dirac cones
	// is added in closed form unless OmitTail is set. 0 means 3 eV (Λ ≈ 4.46/nm for
	// γ0 = 3.16 eV). The layer-summed response then no longer depends on it; the interlayer
	// response of multilayers does (see "Cutoff" in [Lindhard]). Negative, NaN or infinite
	// values are errors.
	Cutoff float64
	// Grid is the number of nodes of the angle-like elliptic coordinate ν around the full circle;
	// the radius-like coordinate μ gets the same spacing 2π/Grid, so that the cells are squares
	// (the map is conformal). 0 means 128; otherwise at least 16, rounded up to an even number.
	// The error falls as Grid^-2 (see "Accuracy" in [Lindhard]). Larger than 16384 is an error.
	Grid int
	// T is the temperature in kelvin (>= 0).
	T float64
	// Mu is the chemical potential in eV, on the energy scale of the bands (for the minimal
	// models the neutrality point is 0). Use [NonInteractingMu] to find it for a given density.
	Mu float64
	// Angles is the number of directions of q in [0, π/3] that [LindhardTable] averages over
	// for models that are not isotropic (trigonal warping); 0 means 3. Isotropic models need a
	// single direction.
	Angles int
	// ThermalNodes is the number of Gauss-Legendre nodes on each half of the Maldague energy
	// integral used at T > 0 (see [Lindhard]); 0 means 24 (relative error about 5e-4 for a
	// smooth density of states, up to 1% next to a divergent one). Above 4096 is an error.
	ThermalNodes int
	// OmitTail, if set, leaves out the Dirac tail beyond the cutoff, giving Π of the model
	// restricted to the ellipse (to match a mean-field calculation cut off at the same Λ).
	OmitTail bool
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results are bitwise identical
	// for any value.
	Workers int
}

const (
	lindDefaultCutoff  = 3.0 // eV
	lindDefaultGrid    = 128
	lindMinGrid        = 16
	lindDefaultAngles  = 3
	lindDefaultThermal = 24
	// lindDegeneracy is g = 2 (spin) × 2 (valley).
	lindDegeneracy = 4
	// lindFocusFloor is the focal distance, in units of Λ, used when q is smaller (q = 0 and the
	// density): the elliptic grid then resolves |k| down to about 1e-3 Λ Δ².
	lindFocusFloor = 1e-3
	// lindTaylor is the relative spread of |E_a − E_b| over a triangle below which its mean
	// inverse is taken from a fourth-order Taylor series (truncation below 1e-7).
	lindTaylor = 0.05
	// lindThin is the strip width, in grid cells, below which intraband pairs are integrated
	// with the gradient-corrected δ-function route (see triangle).
	lindThin = 3.0
	// lindBlockBytes bounds the eigenvector storage of one block of grid rows.
	lindBlockBytes = 32 << 20
)

// Lindhard returns the static polarization function Π_ll'(q) of the non-interacting stack
// st (parameters p, layer potentials u in eV, nil for none) at the wave vector (qx, qy) in 1/nm,
// summed over spin and both valleys, in 1/(eV nm²), as a row-major N×N matrix.
//
// # Convention
//
// Π is minus the non-interacting density response χ0, so that it is positive for a stable
// system: a small change δU_l'(q) of the electron potential energy of layer l' changes the
// electron density of layer l by
//
//	δn_l(q) = −Σ_l' Π_ll'(q) δU_l'(q),
//
//	Π_ll'(q) = −(g/A) Σ_k Σ_ab [f(E_a(k)) − f(E_b(k+q))]/(E_a(k) − E_b(k+q)) ⟨a,k|P_l|b,k+q⟩⟨b,k+q|P_l'|a,k⟩
//
// (the Lindhard function of the multiband continuum model), with g = 4, f the Fermi function at
// temperature T and chemical potential μ, and P_l the projector on the two orbitals of layer l.
// Degenerate energies take the limit −f'(E), so Π(q → 0) is the layer-resolved density of
// states at the Fermi level plus the interband (layer-mixing) part. The random phase
// approximation (RPA) screened interaction with the Coulomb kernel V_ll'(q) of the design
// notes is then
//
//	W(q) = [1 + V(q) Π(q)]⁻¹ V(q),
//
// which is the same as the W = [1 − VΠ]⁻¹V written with the opposite sign convention Π = χ0.
//
// # Valleys
//
// H_K'(kx, ky) = H_K(−kx, ky), and H_K(kx, −ky) = H_K(kx, ky)* because every coupling is real.
// With the exact identity Π_K(−q) = Π_K(q)ᵀ of the static Lindhard sum these give
// Π_K'(q) = Π_K(q), so the valley sum is twice the valley-K sum (the tests check all three).
// Π_K(q) is Hermitian; it is real when the model is isotropic ([bands.Continuum.Isotropic])
// or q lies along k_x. With trigonal warping and q in other directions it has an imaginary
// part, antisymmetric in l, l' and odd in q_y (a lateral phase between the responses of
// different layers; 13% of Π_13 for ABC graphite parameters at q = 0.25/nm, 23° from k_x).
// Lindhard returns the real part, Re Π = [Π(q_x, q_y) + Π(q_x, −q_y)]/2; [LindhardHermitian]
// returns the whole matrix. The angle average of [LindhardTable] is real.
//
// # Method
//
// The k-integral uses elliptic coordinates with foci at the two Dirac points 0 and −q,
//
//	k + q/2 = (q/2) (cosh μ cos ν, sinh μ sin ν)   (rotated along q),   |k| + |k+q| = q cosh μ,
//
// on a uniform grid in (μ, ν) with step 2π/Grid, cut into triangles. Near the foci the map is
// quadratic, so the cones E ∝ |k| and E ∝ |k+q| are smooth in (μ, ν); far away μ is the
// logarithm of |k|, so every length scale from q to Λ gets the same relative resolution.
// On each triangle E_a(k), E_b(k+q) and the Jacobian times the overlap factor are
// interpolated linearly, and the Lindhard factor is integrated exactly for that
// interpolation: the triangle is clipped to the polygons where one state is occupied and the
// other empty (at T = 0 the Fermi lines are straight inside a triangle), and 1/|E_a − E_b| is
// integrated over them in closed form (divided differences of u ln u − u). This is a
// triangle (two-dimensional tetrahedron) method for the Lindhard function, with no smearing
// at T = 0. Intraband strips thinner than a few cells (q → 0, and q = 0 itself, where the
// limit is −f'(E)) are instead integrated as δ-functions of the band energy whose 1/|∇E|
// comes from Hellmann-Feynman gradients: the slope of the interpolant alone would leave an
// O(Δ) error in the density of states. At T > 0 the Maldague identity
//
//	Π(q; T, μ) = ∫ dε Π(q; 0, ε) / (4 k_B T cosh²((ε − μ)/2k_BT))
//
// (P. F. Maldague, Surf. Sci. 73, 296 (1978), from memory; exact for fixed bands) is
// integrated with ThermalNodes Gauss-Legendre nodes on each side of μ in the variable
// tanh((ε − μ)/2k_BT), so T → 0 is continuous and no grid has to resolve k_B T.
//
// # Cutoff
//
// The integral covers the ellipse |k| + |k+q| <= 2Λ. Outside it, the intrinsic Dirac term of
// each layer, g q/(4πħv) arctan(1/(X + √(X²−1))) with X = 2Λ/q (about g q²/(16πħvΛ), the
// closed form of the monolayer integrand q sin²ν/(2ħv cosh μ) beyond μ_max), is added to the
// diagonal; without it a monolayer would miss q/(πΛ) of Π (7% at q = 1/nm, ħvΛ = 3 eV). This
// makes the layer-summed (charge) response Σ_ll' Π_ll' independent of the cutoff: for the
// doped AB bilayer at q = 0.3/nm it changes by 7e-5 (γ0, γ1 only) and 3e-4 (graphite
// parameters) between ħvΛ = 3 and 24 eV (Grid 96, μ = 0.02 eV). The layer-antisymmetric (interlayer polarization)
// response is different: remote states polarize across the layers, so it keeps a cutoff
// dependence. With γ1 alone it converges as 1/Λ (Π_11 + Π_22 − 2Π_12 = 0.656, 0.673, 0.682,
// 0.687 /(eV nm²) at ħvΛ = 3, 6, 12, 24 eV, q = 0.3/nm); the momentum-dependent couplings γ3
// and γ4 mix the layers at every k, and with them it grows without bound (0.650, 0.689, 0.740,
// 0.828). That polarizability of high-energy states is physically part of the interlayer
// dielectric constant ε_z of the layer electrostatics, so Cutoff should match the cutoff and
// ε_z convention of the calculation that uses Π (OmitTail drops the Dirac term too).
//
// # Accuracy
//
// Against q/(4ħv) for the intrinsic monolayer with the defaults (ħvΛ = 3 eV, Grid = 128):
// relative error −2.0e-4 for 0.05 <= q <= 1/nm; at q = 0.3/nm Grid 32, 64, 128, 256 give
// −3.1e-3, −7.7e-4, −1.9e-4, −4.9e-5 (second order). The doped monolayer (|μ| = 0.1 eV) is
// within 5e-4 of the density of states for q <= 2k_F and of the closed form above 2k_F; the
// undoped bilayer is within 1e-3 of its two-band limit at q = 0.003-0.01/nm. At T > 0 the
// default 24 nodes per side give 5e-4 for smooth densities of states; a divergent density of
// states within about 8 k_B T of μ (the 1/√ edge of a gapped Mexican hat, a van Hove
// singularity) costs up to 1%, and more nodes or a finer Grid reduce it only slowly. See
// polarization_test.go for the measurements.
//
// # Cost
//
// One wave vector costs 2 (rows+1)(Grid/2+1) eigenproblems of order 2N when q is along k_x
// or the model is isotropic (the mirror ν → −ν halves the grid) and twice that otherwise,
// with rows = ⌈acosh(2Λ/q) Grid/2π⌉: about 60 rows at q = 1/nm and 120 at q = 0.05/nm for the
// defaults, i.e. 8k-16k eigenproblems per q (see BenchmarkLindhardTable for times). Rows are
// processed in parallel; memory is bounded by processing the rows in blocks.
//
// Errors (text starting "hartree: ") are returned for an invalid stack, parameters or
// potentials, non-finite input, |q| > Λ, and |μ| + 20 k_B T > ħvΛ/2 (the Fermi level must lie
// well inside the cutoff); a cancelled ctx returns an error wrapping ctx.Err().
func Lindhard(ctx context.Context, st lattice.Stack, p lattice.Params, u []float64, qx, qy float64, opt LindhardOptions) ([]float64, error) {
	ls, fl, q, err := lindAt(ctx, st, p, u, qx, qy, opt)
	if err != nil {
		return nil, err
	}
	return ls.total(fl, q), nil
}

// LindhardHermitian returns the full Hermitian Π_ll'(q) of which [Lindhard] returns the real
// part, row-major N×N. Its imaginary part, antisymmetric in l, l' and odd in q_y, vanishes for
// isotropic models and for q along k_x; with trigonal warping it is of the order of the
// anisotropy of Π (a few percent of the interlayer elements for γ3 = 0.315 eV at q ≈ 0.2/nm).
// The response to δU_l'(q) is δn_l(q) = −Σ_l' Π_ll'(q) δU_l'(q) with this complex Π, and
// Π(−q) = Π(q)*.
func LindhardHermitian(ctx context.Context, st lattice.Stack, p lattice.Params, u []float64, qx, qy float64, opt LindhardOptions) ([]complex128, error) {
	ls, fl, q, err := lindAt(ctx, st, p, u, qx, qy, opt)
	if err != nil {
		return nil, err
	}
	re := ls.total(fl, q)
	out := make([]complex128, len(fl))
	for i, v := range fl {
		out[i] = complex(re[i], lindDegeneracy*imag(v))
	}
	return out, nil
}

// lindAt validates the input and returns the per-flavour Π_K at (qx, qy).
func lindAt(ctx context.Context, st lattice.Stack, p lattice.Params, u []float64, qx, qy float64, opt LindhardOptions) (*lindSetup, []complex128, float64, error) {
	if !lindFinite(qx) || !lindFinite(qy) {
		return nil, nil, 0, fmt.Errorf("hartree: polarization: wave vector (%g, %g) /nm is not finite", qx, qy)
	}
	ls, err := newLindSetup(st, p, u, opt, bands.K)
	if err != nil {
		return nil, nil, 0, err
	}
	q := math.Hypot(qx, qy)
	if err := ls.checkQ(q); err != nil {
		return nil, nil, 0, err
	}
	// Isotropic models depend on |q| only: put q along k_x. Otherwise q along ±k_x still allows
	// the mirror half grid.
	phi, half := 0.0, true
	switch {
	case ls.iso:
	case qy != 0:
		phi, half = math.Atan2(qy, qx), false
	case qx < 0:
		phi = math.Pi
	}
	fl, err := ls.flavor(ctx, q, phi, half)
	if err != nil {
		return nil, nil, 0, err
	}
	return ls, fl, q, nil
}

// LindhardTable returns the angle-averaged Π_ll'(|q|) of [Lindhard] for each |q| in qs
// (1/nm, each in [0, Λ]), one row-major N×N matrix per entry, for building a screened Coulomb
// kernel W(|q|). For an isotropic model Π depends on |q| only and one direction is computed;
// otherwise the average over all directions is taken from opt.Angles directions at the
// midpoints of [0, π/3] (Re Π_K(q) is even in the angle and has period 2π/3 by the C3
// symmetry of every stack, so this is a midpoint rule on a full period; with the default 3
// directions it matches a 12-direction average over the full circle to 5e-6 for the warped
// bilayer at q = 0.3/nm, Grid 48).
//
// Each |q| gets its own grid, built around the foci 0 and −q, so no band data is shared
// between entries: a table costs Q·A times one [Lindhard] evaluation, 2 (rows+1)(Grid/2+1)
// eigenproblems each for isotropic models (7.3k on average for 32 values of q up to 3/nm
// with the defaults) and twice that per direction otherwise. The alternative of one uniform
// k-grid with q on its lattice would diagonalise the grid once, but to reach the same
// accuracy at small q and near the Fermi lines it needs a spacing far below q and k_F over
// the whole disk of radius Λ, millions of points instead of thousands per q; and q would be
// restricted to lattice vectors. Measured with BenchmarkLindhardTable on 2 cores (32 values
// of |q| up to 3/nm, μ = 0.05 eV, defaults): 3 ms per |q| for a monolayer, 9 ms for a bilayer,
// 19 ms for ABC, 38 ms for ABCA (γ0, γ1 only), and 75 ms per |q| for the bilayer with
// graphite parameters (trigonal warping: 3 directions on the full grid).
func LindhardTable(ctx context.Context, st lattice.Stack, p lattice.Params, u []float64, qs []float64, opt LindhardOptions) ([][]float64, error) {
	ls, err := newLindSetup(st, p, u, opt, bands.K)
	if err != nil {
		return nil, err
	}
	for i, q := range qs {
		if !lindFinite(q) || q < 0 {
			return nil, fmt.Errorf("hartree: polarization table: |q| = %g /nm at index %d must be finite and non-negative", q, i)
		}
		if err := ls.checkQ(q); err != nil {
			return nil, fmt.Errorf("hartree: polarization table: index %d: %s", i, lindUnprefix(err))
		}
	}
	angles := opt.Angles
	if angles == 0 {
		angles = lindDefaultAngles
	}
	if angles < 0 {
		return nil, fmt.Errorf("hartree: polarization table: Angles = %d must not be negative", opt.Angles)
	}
	nl := ls.nl
	out := make([][]float64, len(qs))
	for i, q := range qs {
		if ls.iso || q == 0 {
			fl, err := ls.flavor(ctx, q, 0, true)
			if err != nil {
				return out[:i], err
			}
			out[i] = ls.total(fl, q)
			continue
		}
		avg := make([]complex128, nl*nl)
		for j := range angles {
			phi := (float64(j) + 0.5) * math.Pi / 3 / float64(angles)
			fl, err := ls.flavor(ctx, q, phi, false)
			if err != nil {
				return out[:i], err
			}
			for k := range avg {
				avg[k] += fl[k]
			}
		}
		for k := range avg {
			avg[k] /= complex(float64(angles), 0)
		}
		out[i] = ls.total(avg, q)
	}
	return out, nil
}

// NonInteractingDensity returns the electron density n(μ) of the non-interacting stack at
// chemical potential mu (eV) and temperature opt.T, in 1/nm², summed over spin and valleys and
// measured from charge neutrality (the lowest N of the 2N bands filled at every k). It
// integrates the same cutoff ellipse as [Lindhard] with q → 0 (a disk of radius Λ), the
// triangle method at T = 0 and the Maldague identity at T > 0; states outside the cutoff count
// as neutral. opt.Mu is ignored.
func NonInteractingDensity(ctx context.Context, st lattice.Stack, p lattice.Params, u []float64, mu float64, opt LindhardOptions) (float64, error) {
	opt.Mu = mu
	ls, err := newLindSetup(st, p, u, opt, bands.K)
	if err != nil {
		return 0, err
	}
	dg, err := ls.densityGrid(ctx)
	if err != nil {
		return 0, err
	}
	return dg.density(ctx, ls.nodes(mu))
}

// NonInteractingMu returns the chemical potential (eV) at which [NonInteractingDensity] equals n
// (1/nm², electrons positive) at temperature opt.T, to 1e-9 eV, by Brent's method on a
// bracket grown from μ = 0; opt.Mu is ignored. At T = 0 a density inside a band gap is
// reached by a whole interval of μ, and some point of it is returned. An error is returned
// when |μ| would exceed half the cutoff energy.
func NonInteractingMu(ctx context.Context, st lattice.Stack, p lattice.Params, u []float64, n float64, opt LindhardOptions) (float64, error) {
	if !lindFinite(n) {
		return 0, fmt.Errorf("hartree: density %g /nm² is not finite", n)
	}
	opt.Mu = 0
	ls, err := newLindSetup(st, p, u, opt, bands.K)
	if err != nil {
		return 0, err
	}
	dg, err := ls.densityGrid(ctx)
	if err != nil {
		return 0, err
	}
	var ferr error
	f := func(mu float64) float64 {
		if ferr != nil {
			return math.NaN()
		}
		v, err := dg.density(ctx, ls.nodes(mu))
		if err != nil {
			ferr = err
			return math.NaN()
		}
		return v - n
	}
	limit := ls.cutoff/2 - 20*ls.kT
	step := 0.01
	lo, hi := 0.0, 0.0
	flo := f(0)
	if ferr != nil {
		return 0, ferr
	}
	fhi := flo
	switch {
	case flo == 0:
		return 0, nil
	case flo < 0:
		for fhi < 0 {
			lo, flo = hi, fhi
			if hi >= limit {
				return 0, fmt.Errorf("hartree: density %g /nm² needs μ above %g eV, beyond half the cutoff energy; raise Cutoff", n, limit)
			}
			hi = min(limit, max(step, 2*hi))
			fhi = f(hi)
			if ferr != nil {
				return 0, ferr
			}
		}
	default:
		for flo > 0 {
			hi, fhi = lo, flo
			if lo <= -limit {
				return 0, fmt.Errorf("hartree: density %g /nm² needs μ below %g eV, beyond half the cutoff energy; raise Cutoff", n, -limit)
			}
			lo = max(-limit, min(-step, 2*lo))
			flo = f(lo)
			if ferr != nil {
				return 0, ferr
			}
		}
	}
	mu, err := quad.Brent(f, lo, hi, flo, fhi, 1e-9, 200)
	if ferr != nil {
		return 0, ferr
	}
	if err != nil {
		return 0, fmt.Errorf("hartree: chemical potential for density %g /nm²: %w", n, err)
	}
	return mu, nil
}

// lindSetup holds the validated model and options of one polarization or density calculation.
type lindSetup struct {
	h       *bands.Continuum
	nl, dim int
	iso     bool
	hv      float64 // ħv (eV nm)
	cutoff  float64 // ħvΛ (eV)
	lambda  float64 // Λ (1/nm)
	grid    int
	mu, kT  float64
	thermal int
	tail    bool
	workers int
	dhx     []lindEntry // nonzero entries (i > j... all) of ∂H/∂kx
	dhy     []lindEntry // and of ∂H/∂ky (the continuum model is linear in k)
}

// lindEntry is one nonzero matrix element of ∂H/∂k.
type lindEntry struct {
	i, j int
	v    complex128
}

func newLindSetup(st lattice.Stack, p lattice.Params, u []float64, opt LindhardOptions, v bands.Valley) (*lindSetup, error) {
	if st.Layers() == 0 {
		return nil, fmt.Errorf("hartree: polarization: empty stack")
	}
	h, err := bands.NewContinuum(st, p, v, u)
	if err != nil {
		return nil, fmt.Errorf("hartree: polarization: %w", err)
	}
	switch {
	case !lindFinite(opt.Cutoff) || opt.Cutoff < 0:
		return nil, fmt.Errorf("hartree: polarization: Cutoff = %g eV must be finite and not negative", opt.Cutoff)
	case opt.Grid < 0:
		return nil, fmt.Errorf("hartree: polarization: Grid = %d must not be negative", opt.Grid)
	case opt.Grid > 0 && opt.Grid < lindMinGrid:
		return nil, fmt.Errorf("hartree: polarization: Grid = %d is below the minimum %d", opt.Grid, lindMinGrid)
	case opt.Grid > 1<<14:
		return nil, fmt.Errorf("hartree: polarization: Grid = %d is unreasonably large", opt.Grid)
	case !lindFinite(opt.T) || opt.T < 0:
		return nil, fmt.Errorf("hartree: polarization: temperature %g K must be finite and not negative", opt.T)
	case !lindFinite(opt.Mu):
		return nil, fmt.Errorf("hartree: polarization: chemical potential %g eV is not finite", opt.Mu)
	case opt.ThermalNodes < 0 || opt.ThermalNodes > 4096:
		return nil, fmt.Errorf("hartree: polarization: ThermalNodes = %d must be in [0, 4096]", opt.ThermalNodes)
	}
	ls := &lindSetup{
		h: h, nl: st.Layers(), dim: st.Orbitals(), iso: h.Isotropic(),
		hv: p.HbarV(), cutoff: opt.Cutoff, grid: opt.Grid,
		mu: opt.Mu, kT: lattice.BoltzmannEV * opt.T, thermal: opt.ThermalNodes,
		tail: !opt.OmitTail, workers: opt.Workers,
	}
	if ls.cutoff == 0 {
		ls.cutoff = lindDefaultCutoff
	}
	if ls.grid == 0 {
		ls.grid = lindDefaultGrid
	}
	ls.grid += ls.grid & 1
	if ls.thermal == 0 {
		ls.thermal = lindDefaultThermal
	}
	ls.lambda = ls.cutoff / ls.hv
	d := ls.dim
	h0, hx, hy := make([]complex128, d*d), make([]complex128, d*d), make([]complex128, d*d)
	h.At(h0, 0, 0)
	h.At(hx, 1, 0)
	h.At(hy, 0, 1)
	for i := range d * d {
		if v := hx[i] - h0[i]; v != 0 {
			ls.dhx = append(ls.dhx, lindEntry{i / d, i % d, v})
		}
		if v := hy[i] - h0[i]; v != 0 {
			ls.dhy = append(ls.dhy, lindEntry{i / d, i % d, v})
		}
	}
	if math.Abs(ls.mu)+20*ls.kT > ls.cutoff/2 {
		return nil, fmt.Errorf("hartree: polarization: |μ| + 20 k_B T = %g eV exceeds half the cutoff energy %g eV; raise Cutoff",
			math.Abs(ls.mu)+20*ls.kT, ls.cutoff)
	}
	return ls, nil
}

func (ls *lindSetup) checkQ(q float64) error {
	if q > ls.lambda {
		return fmt.Errorf("hartree: polarization: |q| = %g /nm exceeds the cutoff Λ = %g /nm (ħvΛ = %g eV); raise Cutoff", q, ls.lambda, ls.cutoff)
	}
	return nil
}

// lindUnprefix drops the leading "hartree: polarization: " of an error made by checkQ, for
// re-wrapping with more context.
func lindUnprefix(err error) string {
	const pre = "hartree: polarization: "
	s := err.Error()
	if len(s) > len(pre) && s[:len(pre)] == pre {
		return s[len(pre):]
	}
	return s
}

func lindFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// nodes returns the energies ε_n (ascending) and weights ω_n (summing to 1) of the Maldague
// integral for chemical potential mu: the single node (mu, 1) at T = 0.
func (ls *lindSetup) nodes(mu float64) lindNodes {
	if ls.kT == 0 {
		return lindNodes{e: []float64{mu}, w: []float64{1}}
	}
	r := quad.GaussLegendre(ls.thermal)
	var ts, ws []float64
	ts, ws = r.Map(ts, ws, -1, 0)
	ts, ws = r.Map(ts, ws, 0, 1)
	idx := make([]int, len(ts))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return ts[idx[a]] < ts[idx[b]] })
	nd := lindNodes{e: make([]float64, len(ts)), w: make([]float64, len(ts))}
	for i, j := range idx {
		nd.e[i] = mu + 2*ls.kT*math.Atanh(ts[j])
		nd.w[i] = ws[j] / 2
	}
	return nd
}

// lindNodes are the energy nodes and weights of the Maldague integral.
type lindNodes struct {
	e, w []float64
}

// total turns the per-flavour response into Π: g Re Π_K plus the Dirac tail on the diagonal.
func (ls *lindSetup) total(fl []complex128, q float64) []float64 {
	nl := ls.nl
	out := make([]float64, nl*nl)
	for i := range out {
		out[i] = lindDegeneracy * real(fl[i])
	}
	if ls.tail {
		t := ls.tailValue(q)
		for l := range nl {
			out[l*nl+l] += t
		}
	}
	return out
}

// tailValue returns the intrinsic Dirac-cone Π (g = 4) from outside the ellipse
// |k| + |k+q| <= 2Λ: in elliptic coordinates the monolayer integrand is q sin²ν/(2ħv cosh μ),
// so the part beyond μ_max = acosh(2Λ/q) is g q/(4πħv) arctan(exp(−μ_max)).
func (ls *lindSetup) tailValue(q float64) float64 {
	if q <= 0 {
		return 0
	}
	x := 2 * ls.lambda / q
	return lindDegeneracy * q / (4 * math.Pi * ls.hv) * math.Atan(1/(x+math.Sqrt(x*x-1)))
}

// lindGeom is the elliptic-coordinate grid of one wave vector.
type lindGeom struct {
	s        float64 // focal distance (1/nm)
	c, sn    float64 // direction of q
	rows     int     // intervals in μ; rows+1 node rows
	cells    int     // intervals in ν
	cols     int     // nodes per row
	periodic bool
	dmu, dnu float64
}

func (ls *lindSetup) geom(q, phi float64, half bool) lindGeom {
	s := max(q, lindFocusFloor*ls.lambda)
	muMax := math.Acosh(2 * ls.lambda / s)
	dnu := 2 * math.Pi / float64(ls.grid)
	rows := max(2, int(math.Ceil(muMax/dnu-1e-9)))
	g := lindGeom{s: s, c: math.Cos(phi), sn: math.Sin(phi), rows: rows, dmu: muMax / float64(rows), dnu: dnu}
	if half {
		g.cells, g.cols = ls.grid/2, ls.grid/2+1
	} else {
		g.cells, g.cols, g.periodic = ls.grid, ls.grid, true
	}
	return g
}

// point returns k at node (i, j) and the Jacobian |∂k/∂(μ, ν)| = (s/2)² (sinh²μ + sin²ν).
func (g *lindGeom) point(i, j int) (kx, ky, jac float64) {
	mu, nu := float64(i)*g.dmu, float64(j)*g.dnu
	sh, ch := math.Sinh(mu), math.Cosh(mu)
	sn, cn := math.Sincos(nu)
	h := g.s / 2
	a, b := h*(ch*cn-1), h*sh*sn
	return g.c*a - g.sn*b, g.sn*a + g.c*b, h * h * (sh*sh + sn*sn)
}

// tangents returns ∂k/∂μ = (mx, my) and ∂k/∂ν = (nx, ny) at node (i, j).
func (g *lindGeom) tangents(i, j int) (mx, my, nx, ny float64) {
	mu, nu := float64(i)*g.dmu, float64(j)*g.dnu
	sh, ch := math.Sinh(mu), math.Cosh(mu)
	sn, cn := math.Sincos(nu)
	h := g.s / 2
	am, bm := h*sh*cn, h*ch*sn  // ∂(a, b)/∂μ
	an, bn := -h*ch*sn, h*sh*cn // ∂(a, b)/∂ν
	return g.c*am - g.sn*bm, g.sn*am + g.c*bm, g.c*an - g.sn*bn, g.sn*an + g.c*bn
}

// lindRow holds the band data of one row of grid nodes.
type lindRow struct {
	ek, eq []float64    // [col][dim] energies at k and at k+q
	zk, zq []complex128 // [col][dim*dim] eigenvectors at k and at k+q (vector j contiguous)
	gk, gq []float64    // [col][dim][2] gradients (∂E/∂μ, ∂E/∂ν) at k and at k+q
	jac    []float64    // [col]
}

type lindWork struct {
	ws  *eigh.Workspace
	h   []complex128
	wgt []float64    // [2][cols][dim*dim] triangle weights of the strip's two rows
	acc []complex128 // [nl*nl]
	amp []complex128 // [nl]
	xs  []float64    // [3][dim]
	ys  []float64    // [3][dim]
}

func (ls *lindSetup) newWork(cols int) (*lindWork, error) {
	ws, err := eigh.NewWorkspace(ls.dim)
	if err != nil {
		return nil, fmt.Errorf("hartree: polarization: %w", err)
	}
	d := ls.dim
	return &lindWork{
		ws: ws, h: make([]complex128, d*d), wgt: make([]float64, 2*cols*d*d),
		acc: make([]complex128, ls.nl*ls.nl), amp: make([]complex128, ls.nl),
		xs: make([]float64, 3*d), ys: make([]float64, 3*d),
	}, nil
}

// flavor returns the per-flavour (valley of ls.h, one spin) response Π_ll'(q) in 1/(eV nm²),
// Hermitian, for |q| = q along the angle phi, without the tail. half uses the mirror
// ν → −ν (valid when q lies along k_x in the frame of H) and returns the real part.
func (ls *lindSetup) flavor(ctx context.Context, q, phi float64, half bool) ([]complex128, error) {
	g := ls.geom(q, phi, half)
	nodes := ls.nodes(ls.mu)
	qx, qy := q*math.Cos(phi), q*math.Sin(phi)
	zero := q == 0
	d, nl := ls.dim, ls.nl
	nn := nl * nl

	rowBytes := g.cols * (2*d*d*16 + 2*d*8 + 8)
	block := max(2, min(g.rows+1, lindBlockBytes/max(1, rowBytes)))
	nw := par.Workers(ls.workers, g.rows+1)
	works := make([]*lindWork, nw)
	for w := range works {
		wk, err := ls.newWork(g.cols)
		if err != nil {
			return nil, err
		}
		works[w] = wk
	}
	rows := make([]lindRow, block)
	for i := range rows {
		r := &rows[i]
		r.ek, r.zk = make([]float64, g.cols*d), make([]complex128, g.cols*d*d)
		r.gk = make([]float64, 2*g.cols*d)
		if zero {
			r.eq, r.zq, r.gq = r.ek, r.zk, r.gk
		} else {
			r.eq, r.zq = make([]float64, g.cols*d), make([]complex128, g.cols*d*d)
			r.gq = make([]float64, 2*g.cols*d)
		}
		r.jac = make([]float64, g.cols)
	}
	partial := make([]complex128, g.rows*nn)
	for r0 := 0; r0 < g.rows; {
		r1 := min(g.rows, r0+block-1)
		err := par.For(ctx, ls.workers, r1-r0+1, func(w, i int) error {
			return ls.fillRow(works[w], &rows[i], &g, r0+i, qx, qy, zero)
		})
		if err != nil {
			return nil, lindWrap(err)
		}
		err = par.For(ctx, ls.workers, r1-r0, func(w, i int) error {
			ls.strip(works[w], &rows[i], &rows[i+1], &g, q, nodes, partial[(r0+i)*nn:(r0+i+1)*nn])
			return nil
		})
		if err != nil {
			return nil, lindWrap(err)
		}
		r0 = r1
	}
	res := make([]complex128, nn)
	for s := range g.rows {
		for k := range nn {
			res[k] += partial[s*nn+k]
		}
	}
	pref := 1 / (4 * math.Pi * math.Pi)
	for l := range nl {
		for m := l; m < nl; m++ {
			v := res[l*nl+m] * complex(pref, 0)
			if half {
				v = complex(2*real(v), 0)
			}
			if l == m {
				v = complex(real(v), 0)
			}
			res[l*nl+m], res[m*nl+l] = v, cmplx.Conj(v)
		}
	}
	return res, nil
}

func lindWrap(err error) error {
	if err == nil {
		return nil
	}
	return fmt.Errorf("hartree: polarization: %w", err)
}

// fillRow diagonalises H at the nodes of row i and at the nodes shifted by q.
func (ls *lindSetup) fillRow(wk *lindWork, r *lindRow, g *lindGeom, i int, qx, qy float64, zero bool) error {
	d := ls.dim
	for j := range g.cols {
		kx, ky, jac := g.point(i, j)
		mx, my, nx, ny := g.tangents(i, j)
		r.jac[j] = jac
		ls.h.At(wk.h, kx, ky)
		if err := wk.ws.Eigen(r.ek[j*d:(j+1)*d], r.zk[j*d*d:(j+1)*d*d], wk.h); err != nil {
			return err
		}
		ls.gradients(r.gk[2*j*d:2*(j+1)*d], r.zk[j*d*d:(j+1)*d*d], mx, my, nx, ny)
		if zero {
			continue
		}
		ls.h.At(wk.h, kx+qx, ky+qy)
		if err := wk.ws.Eigen(r.eq[j*d:(j+1)*d], r.zq[j*d*d:(j+1)*d*d], wk.h); err != nil {
			return err
		}
		ls.gradients(r.gq[2*j*d:2*(j+1)*d], r.zq[j*d*d:(j+1)*d*d], mx, my, nx, ny)
	}
	return nil
}

// gradients writes (∂E_a/∂μ, ∂E_a/∂ν) for every band a of the eigenvectors z by the
// Hellmann-Feynman theorem, ∇_k E_a = ⟨a|∇_k H|a⟩, and the chain rule with the tangents
// ∂k/∂μ = (mx, my), ∂k/∂ν = (nx, ny).
func (ls *lindSetup) gradients(dst []float64, z []complex128, mx, my, nx, ny float64) {
	d := ls.dim
	for a := range d {
		v := z[a*d : (a+1)*d]
		gx, gy := 0.0, 0.0
		for _, e := range ls.dhx {
			gx += real(cmplx.Conj(v[e.i]) * e.v * v[e.j])
		}
		for _, e := range ls.dhy {
			gy += real(cmplx.Conj(v[e.i]) * e.v * v[e.j])
		}
		dst[2*a], dst[2*a+1] = gx*mx+gy*my, gx*nx+gy*ny
	}
}

// strip integrates the cells between two node rows and contracts the weights with the overlap
// factors, adding Σ_v W_v J_v M_v into out (N×N, upper triangle).
func (ls *lindSetup) strip(wk *lindWork, lo, hi *lindRow, g *lindGeom, q float64, nodes lindNodes, out []complex128) {
	d := ls.dim
	dd := d * d
	cols := g.cols
	wgt := wk.wgt[:2*cols*dd]
	clear(wgt)
	area := g.dmu * g.dnu / 2
	for j := range g.cells {
		j1 := j + 1
		if j1 == cols {
			j1 = 0
		}
		// Triangles (lo j, hi j, hi j1) and (lo j, hi j1, lo j1), with parameter-space vertex
		// positions relative to (lo j).
		ls.triangle(wk, wgt, cols, [3]*lindRow{lo, hi, hi}, [3]int{0, 1, 1}, [3]int{j, j, j1},
			[3][2]float64{{0, 0}, {g.dmu, 0}, {g.dmu, g.dnu}}, area, g, q, nodes)
		ls.triangle(wk, wgt, cols, [3]*lindRow{lo, hi, lo}, [3]int{0, 1, 0}, [3]int{j, j1, j1},
			[3][2]float64{{0, 0}, {g.dmu, g.dnu}, {0, g.dnu}}, area, g, q, nodes)
	}
	nl := ls.nl
	acc := wk.acc
	clear(acc)
	amp := wk.amp
	for rr, row := range [2]*lindRow{lo, hi} {
		for c := range cols {
			base := wgt[(rr*cols+c)*dd : (rr*cols+c+1)*dd]
			jac := row.jac[c]
			zk := row.zk[c*dd : (c+1)*dd]
			zq := row.zq[c*dd : (c+1)*dd]
			for a := range d {
				pa := zk[a*d : (a+1)*d]
				for b := range d {
					w := base[a*d+b]
					if w == 0 {
						continue
					}
					pb := zq[b*d : (b+1)*d]
					for l := range nl {
						amp[l] = cmplx.Conj(pa[2*l])*pb[2*l] + cmplx.Conj(pa[2*l+1])*pb[2*l+1]
					}
					wj := complex(w*jac, 0)
					for l := range nl {
						al := wj * amp[l]
						for m := l; m < nl; m++ {
							acc[l*nl+m] += al * cmplx.Conj(amp[m])
						}
					}
				}
			}
		}
	}
	copy(out, acc)
}

// triangle adds the weights of one triangle (vertices rows[v], column cs[v], strip-local row
// index rs[v], parameter-space position pos[v]) for every band pair to wgt.
//
// Intraband pairs whose occupied-empty strip is thinner than lindThin cells (q below lindThin
// times the local grid spacing √J Δ; always at q = 0) are not clipped: a strip thinner than a
// cell inherits the O(Δ) error of the interpolated slope. Instead the identity
//
//	[f(x) − f(y)]/(x − y) = ∫_0^1 ds f'(s x + (1 − s) y)
//
// is used with lindSNodes Gauss-Legendre nodes in s, each a triangle δ-function integral whose
// 1/|∇E| comes from the Hellmann-Feynman gradients at the vertices (error O(Δ²) + O((q/k_F)^6)).
func (ls *lindSetup) triangle(wk *lindWork, wgt []float64, cols int, rows [3]*lindRow, rs, cs [3]int, pos [3][2]float64, area float64, g *lindGeom, q float64, nodes lindNodes) {
	d := ls.dim
	dd := d * d
	xs, ys := wk.xs, wk.ys
	for v := range 3 {
		copy(xs[v*d:(v+1)*d], rows[v].ek[cs[v]*d:(cs[v]+1)*d])
		copy(ys[v*d:(v+1)*d], rows[v].eq[cs[v]*d:(cs[v]+1)*d])
	}
	eLo, eHi := nodes.e[0], nodes.e[len(nodes.e)-1]
	off := [3]int{(rs[0]*cols + cs[0]) * dd, (rs[1]*cols + cs[1]) * dd, (rs[2]*cols + cs[2]) * dd}
	jc := (rows[0].jac[cs[0]] + rows[1].jac[cs[1]] + rows[2].jac[cs[2]]) / 3
	thin := q < lindThin*math.Sqrt(jc)*g.dnu
	for a := range d {
		x := [3]float64{xs[a], xs[d+a], xs[2*d+a]}
		xmin, xmax := min(x[0], x[1], x[2]), max(x[0], x[1], x[2])
		for b := range d {
			y := [3]float64{ys[b], ys[d+b], ys[2*d+b]}
			ymin, ymax := min(y[0], y[1], y[2]), max(y[0], y[1], y[2])
			if max(xmax, ymax) <= eLo || min(xmin, ymin) >= eHi {
				continue // both occupied or both empty at every node
			}
			var w [3]float64
			if a == b && thin {
				var gx, gy [3][2]float64
				for v := range 3 {
					o := 2 * (cs[v]*d + a)
					gx[v] = [2]float64{rows[v].gk[o], rows[v].gk[o+1]}
					gy[v] = [2]float64{rows[v].gq[o], rows[v].gq[o+1]}
				}
				w = lindThinPair(x, y, gx, gy, pos, nodes, q == 0)
			} else {
				w = lindPair(x, y, xmin, xmax, ymin, ymax, area, nodes)
			}
			for v := range 3 {
				wgt[off[v]+a*d+b] += w[v]
			}
		}
	}
}

// lindSNodes are the 3-point Gauss-Legendre nodes and weights on [0, 1] for the s-integral of
// thin intraband strips.
var lindSNodes = [3][2]float64{
	{0.5 - 0.5*0.7745966692414834, 5.0 / 18},
	{0.5, 8.0 / 18},
	{0.5 + 0.5*0.7745966692414834, 5.0 / 18},
}

// lindThinPair returns the weights of an intraband pair on a triangle by the s-integral of
// δ-function integrals (see triangle); same is set at q = 0, where x = y and one s suffices.
func lindThinPair(x, y [3]float64, gx, gy [3][2]float64, pos [3][2]float64, nodes lindNodes, same bool) [3]float64 {
	if same {
		return lindDelta(x, gx, pos, nodes)
	}
	var w [3]float64
	for _, sn := range lindSNodes {
		s, ws := sn[0], sn[1]
		var e [3]float64
		var gr [3][2]float64
		for v := range 3 {
			e[v] = s*x[v] + (1-s)*y[v]
			gr[v] = [2]float64{s*gx[v][0] + (1-s)*gy[v][0], s*gx[v][1] + (1-s)*gy[v][1]}
		}
		ws3 := lindDelta(e, gr, pos, nodes)
		for v := range 3 {
			w[v] += ws * ws3[v]
		}
	}
	return w
}

// lindPair returns, for one triangle of parameter-space area `area` with linearly
// interpolated energies x (band a at k) and y (band b at k+q), the weights
//
//	w_v = Σ_n ω_n ∫ λ_v(c) |x − y|⁻¹ dA   over the region where one of the two states is
//	                                       occupied and the other empty at energy ε_n,
//
// with λ_v(c) the barycentric coordinates of the centroid of each piece (the overlap factor is
// taken at that centroid). Π gets +Σ_v w_v J_v M_v.
func lindPair(x, y [3]float64, xmin, xmax, ymin, ymax, area float64, nodes lindNodes) [3]float64 {
	var w [3]float64
	sepLo, sepHi := math.Inf(1), math.Inf(-1)
	switch {
	case xmax <= ymin:
		sepLo, sepHi = xmax, ymin
	case ymax <= xmin:
		sepLo, sepHi = ymax, xmin
	}
	lo, hi := min(xmin, ymin), max(xmax, ymax)
	iSep, haveSep := 0.0, false
	sep := func() float64 {
		if !haveSep {
			iSep = area * lindMeanInv(math.Abs(y[0]-x[0]), math.Abs(y[1]-x[1]), math.Abs(y[2]-x[2]))
			haveSep = true
		}
		return iSep
	}
	e := nodes.e
	if e[0] >= sepLo && e[len(e)-1] <= sepHi {
		s := sep() / 3
		return [3]float64{s, s, s}
	}
	for n, eps := range e {
		if eps >= hi || eps <= lo {
			continue
		}
		om := nodes.w[n]
		if eps >= sepLo && eps <= sepHi {
			s := om * sep() / 3
			w[0] += s
			w[1] += s
			w[2] += s
			continue
		}
		lindClipPair(&w, x, y, eps, om, area)
	}
	return w
}

// lindVert is a polygon vertex in barycentric coordinates (b1, b2; b0 = 1 − b1 − b2) with the
// interpolated energies x and y.
type lindVert struct{ b1, b2, x, y float64 }

// lindClip keeps the part of the convex polygon src where sx·x + sy·y + c <= 0, writing it to
// dst (capacity >= len(src)+1). New vertices lie on the line and get the exact value there.
func lindClip(dst, src []lindVert, sx, sy, c float64) []lindVert {
	dst = dst[:0]
	n := len(src)
	for i := range n {
		p, q := src[i], src[(i+1)%n]
		fp, fq := sx*p.x+sy*p.y+c, sx*q.x+sy*q.y+c
		if fp <= 0 {
			dst = append(dst, p)
		}
		if (fp < 0 && fq > 0) || (fp > 0 && fq < 0) {
			t := fp / (fp - fq)
			v := lindVert{
				b1: p.b1 + t*(q.b1-p.b1), b2: p.b2 + t*(q.b2-p.b2),
				x: p.x + t*(q.x-p.x), y: p.y + t*(q.y-p.y),
			}
			if sy == 0 {
				v.x = -c / sx
			} else if sx == 0 {
				v.y = -c / sy
			}
			dst = append(dst, v)
		}
	}
	return dst
}

// lindClipPair adds om × the weights of the two regions {x <= ε <= y} and {y <= ε <= x}.
func lindClipPair(w *[3]float64, x, y [3]float64, eps, om, area float64) {
	var b0, b1, b2 [8]lindVert
	tri := [3]lindVert{{0, 0, x[0], y[0]}, {1, 0, x[1], y[1]}, {0, 1, x[2], y[2]}}
	copy(b0[:], tri[:])
	// Region A: x <= ε (x − ε <= 0) and y >= ε (ε − y <= 0).
	pa := lindClip(b1[:0], b0[:3], 1, 0, -eps)
	if len(pa) >= 3 {
		pa = lindClip(b2[:0], pa, 0, -1, eps)
		lindFan(w, pa, om, area)
	}
	// Region B: x >= ε and y <= ε.
	pb := lindClip(b1[:0], b0[:3], -1, 0, eps)
	if len(pb) >= 3 {
		pb = lindClip(b2[:0], pb, 0, 1, -eps)
		lindFan(w, pb, om, area)
	}
}

// lindFan integrates |x − y|⁻¹ over the convex polygon p (fan triangulation).
func lindFan(w *[3]float64, p []lindVert, om, area float64) {
	if len(p) < 3 {
		return
	}
	p0 := p[0]
	d0 := math.Abs(p0.y - p0.x)
	for k := 1; k+1 < len(p); k++ {
		pk, pk1 := p[k], p[k+1]
		ab := math.Abs((pk.b1-p0.b1)*(pk1.b2-p0.b2)-(pk.b2-p0.b2)*(pk1.b1-p0.b1)) * area // = real area (full triangle: 1/2 in b-coords)
		if ab == 0 {
			continue
		}
		in := om * ab * lindMeanInv(d0, math.Abs(pk.y-pk.x), math.Abs(pk1.y-pk1.x))
		c1 := (p0.b1 + pk.b1 + pk1.b1) / 3
		c2 := (p0.b2 + pk.b2 + pk1.b2) / 3
		w[0] += in * (1 - c1 - c2)
		w[1] += in * c1
		w[2] += in * c2
	}
}

// lindMeanInv returns the mean of 1/d over a triangle on which d >= 0 is linear with vertex
// values d0, d1, d2: twice the second divided difference of Φ(u) = u ln u − u (Φ” = 1/u;
// Hermite-Genocchi formula), or a fourth-order Taylor series about the mean when the spread
// is below lindTaylor of the mean (moments of a linear function on a triangle:
// E[δ²] = Σδ²/12, E[δ³] = δ0δ1δ2/10, E[δ⁴] = (Σδ²)²/60 for centred vertex values δ).
func lindMeanInv(d0, d1, d2 float64) float64 {
	a, b, c := d0, d1, d2
	if a > b {
		a, b = b, a
	}
	if b > c {
		b, c = c, b
	}
	if a > b {
		a, b = b, a
	}
	if c <= 0 {
		return 0
	}
	m := (a + b + c) / 3
	if c-a <= lindTaylor*m {
		e0, e1, e2 := d0-m, d1-m, d2-m
		s2 := e0*e0 + e1*e1 + e2*e2
		p3 := e0 * e1 * e2
		m2 := m * m
		return (1 + s2/(12*m2) - p3/(10*m2*m) + s2*s2/(60*m2*m2)) / m
	}
	if b < 1e-14*c {
		b = 1e-14 * c // two vertices at d = 0: log-divergent and non-generic; keep finite
	}
	return 2 * (lindPhi1(b, c) - lindPhi1(a, b)) / (c - a)
}

// lindPhi1 returns the divided difference Φ[a, b] = (Φ(b) − Φ(a))/(b − a) of Φ(u) = u ln u − u
// for 0 <= a <= b, b > 0, stable for b close to a.
func lindPhi1(a, b float64) float64 {
	if a <= 0 {
		return math.Log(b) - 1
	}
	r := (b - a) / a
	if r == 0 {
		return math.Log(a)
	}
	return math.Log(a) + (1+r)*math.Log1p(r)/r - 1
}

// lindDelta returns the weights Σ_n ω_n ∫ δ(ε_n − E) λ_v dA of a triangle with vertex
// energies e, gradients gr (∂E/∂μ, ∂E/∂ν) and parameter-space positions pos: the Fermi
// segment is that of the linear interpolant (position error O(Δ²)), and 1/|∇E| along it is
// taken from the gradients interpolated to its end points (trapezoid rule), which removes the
// O(Δ) error of the interpolant's slope. Where the interpolated gradient differs from the
// slope by more than a factor 2 (band extrema and saddle points, where |∇E| → 0) the slope is
// used, as in the plain triangle method.
func lindDelta(e [3]float64, gr [3][2]float64, pos [3][2]float64, nodes lindNodes) [3]float64 {
	var w [3]float64
	o := [3]int{0, 1, 2}
	if e[o[0]] > e[o[1]] {
		o[0], o[1] = o[1], o[0]
	}
	if e[o[1]] > e[o[2]] {
		o[1], o[2] = o[2], o[1]
	}
	if e[o[0]] > e[o[1]] {
		o[0], o[1] = o[1], o[0]
	}
	e0, e1, e2 := e[o[0]], e[o[1]], e[o[2]]
	if e2 <= nodes.e[0] || e0 >= nodes.e[len(nodes.e)-1] || e0 == e2 {
		return w
	}
	// Slope of the linear interpolant: solve G·(p_v − p_0) = e_v − e_0 for v = 1, 2.
	ax, ay := pos[1][0]-pos[0][0], pos[1][1]-pos[0][1]
	bx, by := pos[2][0]-pos[0][0], pos[2][1]-pos[0][1]
	det := ax*by - ay*bx
	de1, de2 := e[1]-e[0], e[2]-e[0]
	slope := math.Hypot((de1*by-de2*ay)/det, (ax*de2-bx*de1)/det)
	invGrad := func(l [3]float64) float64 {
		gx := l[0]*gr[0][0] + l[1]*gr[1][0] + l[2]*gr[2][0]
		gy := l[0]*gr[0][1] + l[1]*gr[1][1] + l[2]*gr[2][1]
		gm := math.Hypot(gx, gy)
		if gm < slope/2 || gm > 2*slope {
			gm = slope
		}
		return 1 / gm
	}
	for n, eps := range nodes.e {
		if eps <= e0 || eps >= e2 {
			continue
		}
		// End points P, Q of the Fermi segment in barycentric coordinates.
		var lp, lq [3]float64
		if eps < e1 {
			t1, t2 := (eps-e0)/(e1-e0), (eps-e0)/(e2-e0)
			lp[o[0]], lp[o[1]] = 1-t1, t1
			lq[o[0]], lq[o[2]] = 1-t2, t2
		} else {
			u0, u1 := (e2-eps)/(e2-e0), (e2-eps)/(e2-e1)
			lp[o[2]], lp[o[0]] = 1-u0, u0
			lq[o[2]], lq[o[1]] = 1-u1, u1
		}
		px := lp[0]*pos[0][0] + lp[1]*pos[1][0] + lp[2]*pos[2][0]
		py := lp[0]*pos[0][1] + lp[1]*pos[1][1] + lp[2]*pos[2][1]
		qx := lq[0]*pos[0][0] + lq[1]*pos[1][0] + lq[2]*pos[2][0]
		qy := lq[0]*pos[0][1] + lq[1]*pos[1][1] + lq[2]*pos[2][1]
		half := nodes.w[n] * math.Hypot(px-qx, py-qy) / 2
		ip, iq := half*invGrad(lp), half*invGrad(lq)
		for v := range 3 {
			w[v] += ip*lp[v] + iq*lq[v]
		}
	}
	return w
}

// lindDensity holds the band energies on the q = 0 grid for density integrals.
type lindDensity struct {
	ls   *lindSetup
	g    lindGeom
	e    []float64 // [row][col][dim]
	jac  []float64 // [row][col]
	part []float64 // per strip
}

func (ls *lindSetup) densityGrid(ctx context.Context) (*lindDensity, error) {
	g := ls.geom(0, 0, true)
	d := ls.dim
	dg := &lindDensity{ls: ls, g: g, e: make([]float64, (g.rows+1)*g.cols*d), jac: make([]float64, (g.rows+1)*g.cols), part: make([]float64, g.rows)}
	nw := par.Workers(ls.workers, g.rows+1)
	works := make([]*lindWork, nw)
	for w := range works {
		wk, err := ls.newWork(1)
		if err != nil {
			return nil, err
		}
		works[w] = wk
	}
	err := par.For(ctx, ls.workers, g.rows+1, func(w, i int) error {
		wk := works[w]
		for j := range g.cols {
			kx, ky, jac := g.point(i, j)
			dg.jac[i*g.cols+j] = jac
			ls.h.At(wk.h, kx, ky)
			o := (i*g.cols + j) * d
			if err := wk.ws.Values(dg.e[o:o+d], wk.h); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return nil, lindWrap(err)
	}
	return dg, nil
}

// density returns n = g/(2π)² ∫ Σ_a [f(E_a) − θ(a < N)] d²k (both halves of the mirror-symmetric
// grid) for the Maldague nodes nd.
func (dg *lindDensity) density(ctx context.Context, nd lindNodes) (float64, error) {
	g := &dg.g
	d := dg.ls.dim
	half := d / 2
	area := g.dmu * g.dnu / 2
	// cum[n] = Σ_{m >= n} ω_m: the weight of nodes at or above index n.
	cum := make([]float64, len(nd.e)+1)
	for n := len(nd.e) - 1; n >= 0; n-- {
		cum[n] = cum[n+1] + nd.w[n]
	}
	err := par.For(ctx, dg.ls.workers, g.rows, func(_, i int) error {
		sum := 0.0
		for j := range g.cells {
			j1 := j + 1
			for t := range 2 {
				var ri, ci [3]int
				if t == 0 {
					ri, ci = [3]int{i, i + 1, i + 1}, [3]int{j, j, j1}
				} else {
					ri, ci = [3]int{i, i + 1, i}, [3]int{j, j1, j1}
				}
				var jv [3]float64
				for v := range 3 {
					jv[v] = dg.jac[ri[v]*g.cols+ci[v]]
				}
				jarea := area * (jv[0] + jv[1] + jv[2]) / 3
				for a := range d {
					var e [3]float64
					for v := range 3 {
						e[v] = dg.e[(ri[v]*g.cols+ci[v])*d+a]
					}
					emin, emax := min(e[0], e[1], e[2]), max(e[0], e[1], e[2])
					// Nodes with ε >= emax see the triangle full.
					nFull := sort.SearchFloat64s(nd.e, emax)
					filled := jarea * cum[nFull]
					for n := sort.SearchFloat64s(nd.e, emin); n < nFull; n++ {
						if nd.e[n] <= emin {
							continue
						}
						filled += nd.w[n] * lindFilled(e, jv, area, nd.e[n])
					}
					if a < half {
						filled -= jarea
					}
					sum += filled
				}
			}
		}
		dg.part[i] = sum
		return nil
	})
	if err != nil {
		return 0, lindWrap(err)
	}
	n := 0.0
	for _, v := range dg.part {
		n += v
	}
	return 2 * lindDegeneracy * n / (4 * math.Pi * math.Pi), nil
}

// lindFilled returns ∫ θ(ε − E) J dA over a triangle of area `area` with E and J linear
// (vertex values e and jv).
func lindFilled(e, jv [3]float64, area, eps float64) float64 {
	var b0, b1 [8]lindVert
	b0[0], b0[1], b0[2] = lindVert{0, 0, e[0], 0}, lindVert{1, 0, e[1], 0}, lindVert{0, 1, e[2], 0}
	p := lindClip(b1[:0], b0[:3], 1, 0, -eps)
	s := 0.0
	for k := 1; k+1 < len(p); k++ {
		p0, pk, pk1 := p[0], p[k], p[k+1]
		ab := math.Abs((pk.b1-p0.b1)*(pk1.b2-p0.b2)-(pk.b2-p0.b2)*(pk1.b1-p0.b1)) * area
		c1 := (p0.b1 + pk.b1 + pk1.b1) / 3
		c2 := (p0.b2 + pk.b2 + pk1.b2) / 3
		s += ab * ((1-c1-c2)*jv[0] + c1*jv[1] + c2*jv[2])
	}
	return s
}
