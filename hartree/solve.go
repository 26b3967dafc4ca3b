package hartree

import (
	"context"
	"errors"
	"fmt"
	"math"

	"lamina/bands"
	"lamina/lattice"
	"lamina/scf"
)

// Device is a graphene stack with its band parameters and the dielectric constant between its
// layers.
type Device struct {
	Stack  lattice.Stack
	Params lattice.Params
	// EpsZ is the relative permittivity between the layers used in the layer capacitor;
	// 0 means 1. Published choices range from 1 to about 2.5 (Slizovskiy et al., Nano Lett. 21,
	// 6678 (2021) argue for 2.5 from the out-of-plane polarisability of a graphene sheet).
	EpsZ float64
}

func (d Device) epsZ() float64 {
	if d.EpsZ == 0 {
		return 1
	}
	return d.EpsZ
}

func (d Device) validate() error {
	if d.Stack.Layers() == 0 {
		return errors.New("hartree: device has an empty stack")
	}
	if err := d.Params.ValidateFor(d.Stack); err != nil {
		return fmt.Errorf("hartree: %w", err)
	}
	if !finite(d.EpsZ) || d.EpsZ < 0 {
		return fmt.Errorf("hartree: interlayer dielectric constant %g must be positive: %w", d.EpsZ, ErrGeometry)
	}
	return nil
}

// Conditions are the external conditions of one self-consistent calculation.
type Conditions struct {
	Field Field   // displacement field and carrier density
	T     float64 // temperature in K (0 allowed)
	// FixedMu, if set, holds the chemical potential at Mu (eV) instead of the density at
	// Field.N; the density then follows and is reported, with Field.D held fixed.
	FixedMu bool
	Mu      float64
}

// Options controls the k-space integration and the iteration. The zero value is ready to use.
type Options struct {
	// Cutoff is ħvΛ in eV for a finite momentum cutoff |k| <= Λ; 0 (default) integrates the
	// continuum model over the whole plane with the high-momentum tail mapped to a finite
	// interval, which removes the slow 1/Λ convergence of the induced layer densities.
	Cutoff float64
	// Angles is the number of directions in one third of the circle for anisotropic models
	// (trigonal warping); 0 means 24. Isotropic models use a single direction.
	Angles int
	// SCF holds the iteration settings; zero Tol means 1e-8 eV on max_l |U_out − U_in|.
	SCF scf.Settings
	// Initial, if it has one entry per layer, starts the iteration from these potentials (eV);
	// otherwise from the unscreened ones. Use it to continue from a neighbouring solution.
	Initial []float64
	// Gap controls the band-gap search on the self-consistent bands.
	Gap bands.GapOptions
	// Model selects the band model; the zero value (Auto) picks the continuum model for
	// isotropic parameter sets and the full-zone model otherwise.
	Model Model
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results do not depend on it.
	Workers int

	forceAngles bool // tests: use the anisotropic quadrature even for isotropic models
}

// Result is a self-consistent Hartree solution. It is returned, with a non-nil error, also when
// the iteration did not converge; Converged tells which.
type Result struct {
	U       []float64 // layer potentials (eV), layer mean zero, bottom first
	Density []float64 // layer electron densities n_l (1/nm²) relative to the neutral unbiased stack
	N       float64   // total density Σ n_l (1/nm²)
	Mu      float64   // chemical potential (eV); midgap when the Fermi level lies in a gap at T = 0
	Gap     bands.Gap // band gap at charge neutrality filling of the self-consistent bands
	// Converged reports whether the iteration met its tolerance; Iterations and Residual (eV)
	// describe it; SCF is the full record.
	Converged  bool
	Iterations int
	Residual   float64
	SCF        *scf.Result
}

// Solve finds the self-consistent layer potentials of dev under cond: the layer densities of the
// occupied states of the continuum model with potentials U_l give, through the layer capacitor
// ([LayerPotentials]), new potentials, iterated to a fixed point with Anderson mixing (package
// scf). The band gap of the converged bands is then searched with [bands.FindGap].
//
// A run that does not converge returns its last iterate with Converged false and an error
// wrapping [scf.ErrNotConverged] (or the cause).
func Solve(ctx context.Context, dev Device, cond Conditions, opt Options) (*Result, error) {
	s, err := NewSolver(dev, cond.T, opt)
	if err != nil {
		return nil, err
	}
	return s.Solve(ctx, cond, opt.Initial)
}

// Solver holds the k-space integration plan and the reference state of one device at one
// temperature, so that many conditions (a sweep in D or n) reuse them. Not safe for concurrent
// use.
type Solver struct {
	dev  Device
	opt  Options
	pl   *polar
	kT   float64
	tK   float64
	init bool
}

// NewSolver prepares the integration for dev at temperature tK (kelvin).
func NewSolver(dev Device, tK float64, opt Options) (*Solver, error) {
	if err := dev.validate(); err != nil {
		return nil, err
	}
	if !finite(tK) || tK < 0 {
		return nil, fmt.Errorf("hartree: temperature %g K must be zero or positive", tK)
	}
	if !finite(opt.Cutoff) || opt.Cutoff < 0 {
		return nil, fmt.Errorf("hartree: cutoff %g eV must be zero (none) or positive", opt.Cutoff)
	}
	if opt.Angles < 0 {
		return nil, fmt.Errorf("hartree: %d angles", opt.Angles)
	}
	model, err := resolveModel(dev, opt)
	if err != nil {
		return nil, err
	}
	pl, err := newPolar(dev.Stack, dev.Params, model, opt.Cutoff, opt.Angles, opt.Workers, opt.forceAngles)
	if err != nil {
		return nil, err
	}
	return &Solver{dev: dev, opt: opt, pl: pl, kT: lattice.BoltzmannEV * tK, tK: tK}, nil
}

func resolveModel(dev Device, opt Options) (Model, error) {
	h, err := bands.NewContinuum(dev.Stack, dev.Params, bands.K, nil)
	if err != nil {
		return 0, fmt.Errorf("hartree: %w", err)
	}
	switch opt.Model {
	case Auto:
		if h.Isotropic() {
			return Continuum, nil
		}
		return FullZone, nil
	case Continuum:
		if !h.Isotropic() && opt.Cutoff == 0 {
			return 0, fmt.Errorf("hartree: the continuum model of %s with parameters %q is anisotropic (trigonal warping) and its layer densities do not converge without a momentum cutoff: set Options.Cutoff or use the full-zone model", dev.Stack, dev.Params.Name)
		}
		return Continuum, nil
	case FullZone:
		return FullZone, nil
	}
	return 0, fmt.Errorf("hartree: unknown band model %v", opt.Model)
}

// reference computes the neutral unbiased state once.
func (s *Solver) reference(ctx context.Context) error {
	if s.init {
		return nil
	}
	pl := s.pl
	lines, _, err := pl.scan(ctx, nil, true)
	if err != nil {
		return err
	}
	mu, iv, err := pl.solveMu(lines, 0)
	if err != nil {
		return err
	}
	var pk []float64
	if s.kT > 0 {
		var tn *thermalNodes
		mu, tn, err = pl.solveMuThermal(ctx, lines, 0, mu, s.kT)
		if err != nil {
			return err
		}
		pk = tn.densities(mu, pl.dim, pl.nl)
	} else {
		sortIntervals(iv)
		if pk, err = pl.pocketDensities(ctx, lines, iv); err != nil {
			return err
		}
	}
	pl.mu0, pl.refPk = mu, pk
	s.init = true
	return nil
}

// densities returns the layer densities (1/nm²) and μ for potentials u at density n (or at μ
// fixed).
func (s *Solver) densities(ctx context.Context, u []float64, cond Conditions) ([]float64, float64, error) {
	pl := s.pl
	lines, rest, err := pl.scan(ctx, u, false)
	if err != nil {
		return nil, 0, err
	}
	var mu float64
	var pk []float64
	if cond.FixedMu {
		mu = cond.Mu
		if s.kT > 0 {
			tn, err := pl.buildThermal(ctx, lines, mu, mu, s.kT)
			if err != nil {
				return nil, 0, err
			}
			pk = tn.densities(mu, pl.dim, pl.nl)
		} else {
			iv, err := pl.intervals(lines, mu, true)
			if err != nil {
				return nil, 0, err
			}
			sortIntervals(iv)
			if pk, err = pl.pocketDensities(ctx, lines, iv); err != nil {
				return nil, 0, err
			}
		}
	} else {
		var iv []interval
		mu, iv, err = pl.solveMu(lines, cond.Field.N)
		if err != nil {
			return nil, 0, err
		}
		if s.kT > 0 {
			var tn *thermalNodes
			mu, tn, err = pl.solveMuThermal(ctx, lines, cond.Field.N, mu, s.kT)
			if err != nil {
				return nil, 0, err
			}
			pk = tn.densities(mu, pl.dim, pl.nl)
		} else {
			sortIntervals(iv)
			if pk, err = pl.pocketDensities(ctx, lines, iv); err != nil {
				return nil, 0, err
			}
		}
	}
	nl := make([]float64, pl.nl)
	for a := range lines {
		for l := range nl {
			nl[l] += pl.wTheta * lines[a].sea[l]
		}
	}
	for l := range nl {
		nl[l] += pk[l] - pl.refPk[l]
		if rest != nil {
			nl[l] += rest[l]
		}
	}
	return nl, mu, nil
}

// Solve runs the self-consistent iteration for cond, starting from initial (eV per layer) if it
// has one entry per layer, else from the unscreened potentials.
func (s *Solver) Solve(ctx context.Context, cond Conditions, initial []float64) (*Result, error) {
	if err := cond.Field.validate(); err != nil {
		return nil, err
	}
	if cond.FixedMu && !finite(cond.Mu) {
		return nil, fmt.Errorf("hartree: chemical potential %g eV is not finite", cond.Mu)
	}
	if finite(cond.T) && cond.T != s.tK {
		return nil, fmt.Errorf("hartree: solver prepared for T = %g K asked for T = %g K", s.tK, cond.T)
	}
	if err := s.reference(ctx); err != nil {
		return nil, err
	}
	nlay := s.pl.nl
	d, eps := s.dev.Params.D, s.dev.epsZ()
	field := cond.Field
	var last struct {
		n  []float64
		mu float64
	}
	update := func(ctx context.Context, dst, u []float64) error {
		nl, mu, err := s.densities(ctx, u, cond)
		if err != nil {
			return err
		}
		tot := 0.0
		for _, v := range nl {
			tot += v
		}
		db := field.Below()
		if cond.FixedMu {
			db = field.D + lattice.ChargeOverEps0*tot/2
		}
		LayerPotentials(dst, nl, db, d, eps)
		last.n, last.mu = nl, mu
		return nil
	}
	x0 := make([]float64, nlay)
	if len(initial) == nlay {
		copy(x0, initial)
	} else {
		even := make([]float64, nlay)
		for l := range even {
			even[l] = field.N / float64(nlay)
		}
		LayerPotentials(x0, even, field.Below(), d, eps)
	}
	set := s.opt.SCF
	if set.Tol == 0 {
		set.Tol = 1e-8
	}
	res, err := scf.Solve(ctx, scf.Problem{Update: update}, x0, set)
	out := &Result{SCF: res, Iterations: res.Iterations, Residual: res.Residual, Converged: res.Status == scf.Converged}
	if res.X != nil {
		out.U = append([]float64(nil), res.X...)
	}
	if last.n != nil {
		out.Density = last.n
		out.Mu = last.mu
		for _, v := range last.n {
			out.N += v
		}
	}
	if err != nil {
		return out, fmt.Errorf("hartree: %s %s at D = %g V/nm, n = %g /nm²: %w", s.dev.Stack, s.dev.Params.Name, field.D, field.N, err)
	}
	// Recompute densities at the converged potentials so that U, n and μ are consistent.
	nl, mu, err := s.densities(ctx, out.U, cond)
	if err != nil {
		return out, err
	}
	out.Density, out.Mu, out.N = nl, mu, 0
	for _, v := range nl {
		out.N += v
	}
	h, err := s.pl.hamiltonian(out.U)
	if err != nil {
		return out, err
	}
	gopt := s.opt.Gap
	if gopt.Workers == 0 {
		gopt.Workers = s.opt.Workers
	}
	if s.pl.model == FullZone && gopt.Centers == nil {
		gopt.Centers = []bands.KPoint{s.pl.center}
		if gopt.KMax == 0 {
			gopt.KMax = 1.5
		}
	}
	g, err := bands.FindGap(ctx, h, gopt)
	if err != nil {
		return out, err
	}
	out.Gap = g
	if math.IsNaN(out.Gap.Gap) {
		return out, errors.New("hartree: gap search returned NaN")
	}
	return out, nil
}

// Point is the outcome of one point of a [Solver.Sweep]: the result (never nil once the point
// was attempted) and the error of that point, if any (non-convergence included).
type Point struct {
	Conditions Conditions
	Result     *Result
	Err        error
}

// Sweep solves a sequence of conditions in order, starting each from the converged potentials of
// the previous point (continuation), or from the unscreened potentials after a failure. A point
// that fails does not stop the sweep; its error is kept in the Point and also returned, joined
// with the others. progress, if non-nil, is called after every point. Cancellation stops the
// sweep and returns the points done so far with an error wrapping ctx.Err().
func (s *Solver) Sweep(ctx context.Context, conds []Conditions, progress func(i int, p Point)) ([]Point, error) {
	var out []Point
	var errs []error
	var prev []float64
	for i, c := range conds {
		if err := ctx.Err(); err != nil {
			return out, fmt.Errorf("hartree: sweep stopped after %d of %d points: %w", i, len(conds), err)
		}
		r, err := s.Solve(ctx, c, prev)
		if err != nil && ctx.Err() != nil {
			return out, fmt.Errorf("hartree: sweep stopped after %d of %d points: %w", i, len(conds), ctx.Err())
		}
		p := Point{Conditions: c, Result: r, Err: err}
		out = append(out, p)
		if err != nil {
			errs = append(errs, fmt.Errorf("point %d: %w", i, err))
			prev = nil
		} else {
			prev = r.U
		}
		if progress != nil {
			progress(i, p)
		}
	}
	return out, errors.Join(errs...)
}

// ForceAngularQuadrature returns o set to integrate over directions even when the model is
// isotropic. It exists for tests that cross-check the isotropic fast path.
func ForceAngularQuadrature(o Options) Options {
	o.forceAngles = true
	return o
}
