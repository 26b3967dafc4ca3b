package scf

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
)

// Problem is a fixed-point problem x = G(x) on vectors of a fixed length n.
type Problem struct {
	// Update evaluates G at x and writes G(x) into dst; len(dst) ==
	// len(x). It must not modify x or keep either slice after it returns.
	// ctx is the one given to Solve; a long evaluation should return
	// ctx.Err() once ctx is done. A non-nil error stops Solve with
	// [Canceled] if ctx is done, and with [Failed] otherwise. Required.
	Update func(ctx context.Context, dst, x []float64) error

	// Residual, if non-nil, measures the distance from a fixed point given
	// x and gx = G(x); it must return a value >= 0, and should return 0 at
	// a fixed point. Physics code can use it to converge on, say, the
	// largest change in a layer density. nil means the infinity norm
	// max_i |gx_i − x_i|, in the units of x.
	Residual func(x, gx []float64) float64
}

// Result is the outcome of [Solve]. Solve always returns a non-nil Result.
//
// X is the last iterate at which G was evaluated and GX = G(X), so
// Residual = Problem.Residual(X, GX). On convergence X is the accepted
// fixed point: the input x whose residual passed the test, not the output
// G(x) (both are returned; for a contraction G(X) is usually the better
// estimate, but X is the point whose residual was measured). If no
// evaluation completed, X is a copy of x0, GX is nil and Residual is NaN.
// On [Diverged] because G returned NaN or Inf, GX holds those values.
type Result struct {
	X, GX []float64

	// Residual is the residual at X (NaN if G was never evaluated).
	Residual float64

	// History holds the residual of every completed iteration, in order;
	// History[len(History)-1] == Residual.
	History []float64

	// Iterations is the number of completed evaluations of G,
	// len(History). Evaluations is the number of calls to Update,
	// including one that returned an error; it exceeds Iterations by at
	// most 1.
	Iterations, Evaluations int

	// Status says why Solve stopped. Status.Err() is nil only for
	// [Converged].
	Status Status
}

// Solve iterates x_{k+1} = mix(x_k, G(x_k)) from x0 until the residual of
// G at x_k is at most s.Tol, and returns the last iterate. x0 is not
// modified.
//
// Each iteration checks ctx, evaluates G once, measures the residual,
// checks for divergence and convergence, takes one mixing step and calls
// the Recorder. Whenever Result.Status is not [Converged], err is non-nil
// and wraps the sentinel of the status ([ErrNotConverged], [ErrDiverged],
// [ErrCanceled] together with ctx.Err(), [ErrAborted] together with the
// Recorder's error, [ErrFailed] together with the cause, or [ErrInvalid]
// for bad arguments such as a nil Update, an empty or non-finite x0 or
// invalid Settings). Solve never panics on bad input.
func Solve(ctx context.Context, p Problem, x0 []float64, s Settings) (*Result, error) {
	res := &Result{X: slices.Clone(x0), Residual: math.NaN()}
	invalid := func(err error) (*Result, error) {
		res.Status = Invalid
		return res, err
	}
	switch {
	case ctx == nil:
		return invalid(fmt.Errorf("%w: nil context", ErrInvalid))
	case p.Update == nil:
		return invalid(fmt.Errorf("%w: Problem.Update is nil", ErrInvalid))
	case len(x0) == 0:
		return invalid(fmt.Errorf("%w: starting point x0 is empty", ErrInvalid))
	}
	if i := nonFinite(x0); i >= 0 {
		return invalid(fmt.Errorf("%w: starting point x0[%d] = %v, want a finite value", ErrInvalid, i, x0[i]))
	}
	s, err := s.withDefaults()
	if err != nil {
		return invalid(err)
	}
	n := len(x0)
	mixing, err := s.Mixer.Start(n)
	switch {
	case err != nil && errors.Is(err, ErrInvalid):
		return invalid(err)
	case err != nil:
		return invalid(fmt.Errorf("%w: starting mixer %s: %w", ErrInvalid, mixerName(s.Mixer), err))
	case mixing == nil:
		return invalid(fmt.Errorf("%w: mixer %s returned a nil Mixing", ErrInvalid, mixerName(s.Mixer)))
	}
	residual := p.Residual
	if residual == nil {
		residual = maxAbsDiff
	}
	name := mixerName(s.Mixer)

	// Two buffers each for x and G(x): the pair in res stays intact while
	// the next iterate is mixed and evaluated.
	x, next := res.X, make([]float64, n)
	gx, gspare := make([]float64, n), make([]float64, n)
	res.History = make([]float64, 0, min(s.MaxIter, 256))
	rmin := math.Inf(1)

	finish := func(st Status, err error) (*Result, error) {
		res.Status = st
		return res, err
	}
	for {
		if err := ctx.Err(); err != nil {
			return finish(Canceled, fmt.Errorf("%w before iteration %d (residual %.3g): %w", ErrCanceled, res.Iterations+1, res.Residual, err))
		}
		if res.Iterations == s.MaxIter {
			return finish(IterationLimit, fmt.Errorf("%w after %d iterations (residual %.3g > tol %.3g)", ErrNotConverged, res.Iterations, res.Residual, s.Tol))
		}
		k := res.Iterations + 1
		res.Evaluations++
		if err := p.Update(ctx, gx, x); err != nil {
			if cerr := ctx.Err(); cerr != nil {
				if !errors.Is(err, cerr) {
					err = fmt.Errorf("%w (Update returned: %v)", cerr, err)
				}
				return finish(Canceled, fmt.Errorf("%w during iteration %d: %w", ErrCanceled, k, err))
			}
			return finish(Failed, fmt.Errorf("%w: evaluating G at iteration %d: %w", ErrFailed, k, err))
		}
		// The pair (x, gx) is now the last evaluation.
		res.Iterations = k
		res.X, res.GX = x, gx
		r, bad := math.NaN(), nonFinite(gx)
		if bad < 0 {
			r = residual(x, gx)
		}
		res.Residual = r
		res.History = append(res.History, r)
		it := Iteration{Iter: k, Residual: r, Mixer: name, X: x, GX: gx}

		var (
			stop    Status
			stopErr error
		)
		switch {
		case bad >= 0:
			stop, stopErr = Diverged, fmt.Errorf("%w at iteration %d: G(x)[%d] = %v", ErrDiverged, k, bad, gx[bad])
		case math.IsNaN(r) || math.IsInf(r, 0):
			stop, stopErr = Diverged, fmt.Errorf("%w at iteration %d: residual = %v", ErrDiverged, k, r)
		case r < 0:
			stop, stopErr = Failed, fmt.Errorf("%w: Problem.Residual returned %v at iteration %d, want >= 0", ErrFailed, r, k)
		case r > s.Tol && r > s.DivergeFactor*rmin:
			stop, stopErr = Diverged, fmt.Errorf("%w at iteration %d: residual %.3g exceeds %.3g times the smallest residual %.3g", ErrDiverged, k, r, s.DivergeFactor, rmin)
		case r <= s.Tol && k >= s.MinIter && (s.Converger == nil || s.Converger.Converged(it)):
			stop, it.Converged = Converged, true
		default:
			used, err := mixing.Next(next, x, gx)
			switch {
			case err != nil:
				stop, stopErr = Failed, fmt.Errorf("%w: mixing step %s at iteration %d: %w", ErrFailed, name, k, err)
			case nonFinite(next) >= 0:
				i := nonFinite(next)
				stop, stopErr = Diverged, fmt.Errorf("%w at iteration %d: mixer %s gave x[%d] = %v", ErrDiverged, k, name, i, next[i])
			default:
				it.History = used
				it.Step = maxAbsDiff(x, next)
			}
		}
		rmin = min(rmin, r)
		if s.Recorder != nil {
			if err := s.Recorder.Record(it); err != nil {
				return finish(Aborted, fmt.Errorf("%w by recorder at iteration %d: %w", ErrAborted, k, err))
			}
		}
		if stop != 0 {
			return finish(stop, stopErr)
		}
		// res keeps (x, gx); the other buffers take the next iterate.
		x, next = next, x
		gx, gspare = gspare, gx
	}
}

// maxAbsDiff returns max_i |b_i − a_i|. It is the default residual.
func maxAbsDiff(a, b []float64) float64 {
	var m float64
	for i, v := range a {
		m = max(m, math.Abs(b[i]-v))
	}
	return m
}

// nonFinite returns the index of the first NaN or infinite element of v, or
// -1 if there is none.
func nonFinite(v []float64) int {
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return i
		}
	}
	return -1
}
