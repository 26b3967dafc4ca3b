package hartree

import (
	"context"
	"errors"
	"fmt"
	"math"

	"lamina/lattice"
)

// WithTemperature returns a solver for the same problem at temperature tK (kelvin): grid,
// reference and exchange kernels are shared (so the screened interaction stays the one of the
// original temperature), and states of either solver seed the other. The two solvers share
// scratch space: do not use them concurrently.
func (s *HFSolver) WithTemperature(tK float64) (*HFSolver, error) {
	if !finite(tK) || tK < 0 {
		return nil, fmt.Errorf("hartree: temperature %g K must be zero or positive", tK)
	}
	g := *s.g
	g.mf.T = tK
	return &HFSolver{g: &g, opt: s.opt}, nil
}

// TcOptions controls [HFSolver.CriticalTemperature]. The zero value is ready to use.
type TcOptions struct {
	// Tol is the bracket width (K) at which the bisection stops; 0 means 1% of the upper end of
	// the bracket, at least 0.01 K.
	Tol float64
	// Vanish is the fraction of the zero-temperature order parameter below which the order
	// counts as gone; 0 means 0.01 (mean-field order vanishes as sqrt(Tc − T), so this places the
	// found Tc within 1e-4 Tc of the mean-field value on top of Tol).
	Vanish float64
	// TMax is the highest temperature tried (K); 0 means 2000.
	TMax float64
	// Progress, if non-nil, is called after every temperature solved.
	Progress func(p TcPoint)
}

// TcPoint is the state at one temperature of a Tc search.
type TcPoint struct {
	T         float64 // K
	Gap       float64 // four-flavour gap on the grid (eV)
	Order     float64 // order parameter relative to its T = 0 value
	Converged bool
	Class     string
}

// TcResult is the outcome of [HFSolver.CriticalTemperature].
type TcResult struct {
	// Tc is the midpoint of the final bracket (K): ordered at Tc − Tol/2, disordered at Tc + Tol/2.
	Tc, Tol float64
	// Gap0 is the T = 0 gap (eV) and Ratio = Gap0/(k_B Tc), the analogue of the BCS ratio
	// 2Δ(0)/(k_B Tc) = 3.53 of weak-coupling mean-field theory (common practice).
	Gap0, Ratio float64
	Curve       []TcPoint // every temperature solved, in the order solved
}

// orderMagnitude is the largest magnitude, over the flavours, of the state's dominant pattern.
func orderMagnitude(r *HFResult) float64 {
	m := 0.0
	for _, p := range r.Order {
		for _, v := range []float64{p.Dipole, p.Staggered, p.Sublattice} {
			m = math.Max(m, math.Abs(v))
		}
	}
	return m
}

// CriticalTemperature finds the mean-field transition temperature of the ordered state from:
// the temperature is raised (continuation: each temperature starts from the ordered state of the
// highest temperature known to be ordered) until the order vanishes, then the transition is
// bracketed by bisection to opt.Tol. Every point must converge; a point that does not is
// reported with an error (and kept in the curve), never taken as ordered or disordered.
func (s *HFSolver) CriticalTemperature(ctx context.Context, from *HFResult, opt TcOptions) (*TcResult, error) {
	if from == nil || from.State == nil || !from.Converged {
		return nil, errors.New("hartree: Tc search needs a converged ordered state")
	}
	o0 := orderMagnitude(from)
	if o0 < orderFloor || from.Class == "symmetric" {
		return nil, errors.New("hartree: Tc search needs an ordered state (this one is symmetric)")
	}
	vanish := opt.Vanish
	if vanish == 0 {
		vanish = 0.01
	}
	tmax := opt.TMax
	if tmax == 0 {
		tmax = 2000
	}
	if !(vanish > 0 && vanish < 1) || !(tmax > 0) || math.IsNaN(opt.Tol) || opt.Tol < 0 {
		return nil, fmt.Errorf("hartree: bad Tc options %+v", opt)
	}
	res := &TcResult{Gap0: from.Gap}
	solveAt := func(tK float64, seed *HFState) (*HFResult, bool, error) {
		st, err := s.WithTemperature(tK)
		if err != nil {
			return nil, false, err
		}
		r, err := st.Solve(ctx, Seed{Name: fmt.Sprintf("T=%g", tK), From: seed})
		p := TcPoint{T: tK}
		if r != nil {
			p.Gap, p.Order, p.Converged, p.Class = r.Gap, orderMagnitude(r)/o0, r.Converged, r.Class
		}
		res.Curve = append(res.Curve, p)
		if opt.Progress != nil {
			opt.Progress(p)
		}
		if err != nil {
			return r, false, fmt.Errorf("hartree: Tc search at %g K: %w", tK, err)
		}
		return r, p.Order > vanish, nil
	}
	// Bracket: start from the weak-coupling estimate Tc ≈ gap/(3.53 k_B), climb by factors of 2.
	lo, loState := 0.0, from.State
	hi := math.Max(from.Gap/(3.53*lattice.BoltzmannEV), 0.01)
	for {
		r, ordered, err := solveAt(hi, loState)
		if err != nil {
			return res, err
		}
		if !ordered {
			break
		}
		lo, loState = hi, r.State
		hi *= 2
		if hi > tmax {
			return res, fmt.Errorf("hartree: still ordered at %g K (TMax)", lo)
		}
	}
	for {
		tol := opt.Tol
		if tol == 0 {
			tol = math.Max(0.01*hi, 0.01)
		}
		if hi-lo <= tol {
			res.Tc, res.Tol = (lo+hi)/2, hi-lo
			break
		}
		mid := (lo + hi) / 2
		r, ordered, err := solveAt(mid, loState)
		if err != nil {
			return res, err
		}
		if ordered {
			lo, loState = mid, r.State
		} else {
			hi = mid
		}
	}
	if res.Tc > 0 {
		res.Ratio = res.Gap0 / (lattice.BoltzmannEV * res.Tc)
	}
	return res, nil
}

// TemperatureSweep follows a converged state through the temperatures temps (K, in the order
// given, usually ascending): each temperature starts from the previous temperature's state
// (continuation in T). It returns the state at every temperature; a temperature that does not
// converge is kept (Converged false) and the next one starts from the last converged state.
// Cancellation returns the points done so far with an error wrapping ctx.Err().
func (s *HFSolver) TemperatureSweep(ctx context.Context, from *HFResult, temps []float64) ([]*HFResult, error) {
	if from == nil || from.State == nil {
		return nil, errors.New("hartree: temperature sweep needs a starting state")
	}
	var out []*HFResult
	var errs []error
	seed := from.State
	for _, tK := range temps {
		st, err := s.WithTemperature(tK)
		if err != nil {
			return out, err
		}
		r, err := st.Solve(ctx, Seed{Name: fmt.Sprintf("T=%g", tK), From: seed})
		if ctx.Err() != nil {
			return out, fmt.Errorf("hartree: temperature sweep stopped: %w", ctx.Err())
		}
		if r == nil {
			return out, err
		}
		out = append(out, r)
		if err != nil {
			errs = append(errs, err)
			continue
		}
		seed = r.State
	}
	return out, errors.Join(errs...)
}
