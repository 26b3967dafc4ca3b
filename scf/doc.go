// Package scf solves fixed-point problems x = G(x) on real vectors by mixed
// iteration, as needed for self-consistent field (SCF) calculations. It knows
// no physics: it sees []float64 vectors, a map G and a residual.
//
// # Usage
//
// Describe G as a [Problem], pick [Settings] (the zero value works) and call
// [Solve]:
//
//	p := scf.Problem{Update: func(ctx context.Context, dst, x []float64) error {
//		for i, v := range x {
//			dst[i] = math.Cos(v)
//		}
//		return nil
//	}}
//	res, err := scf.Solve(ctx, p, x0, scf.Settings{Tol: 1e-10})
//	if err != nil {
//		return err // not converged, diverged, canceled, ...; res is still valid
//	}
//	use(res.X)
//
// # Settings and defaults
//
// [Settings] is passed by value and every zero field means a documented
// default: Tol 1e-8 on the infinity norm max_i |G(x)_i − x_i| (or on
// Problem.Residual), MaxIter 200, no MinIter, DivergeFactor 1e8, [Anderson]
// mixing with depth 8 and β = 0.3, no Converger and no Recorder. Solve fills
// the defaults into its own copy; the caller's value is never modified.
// Invalid values (NaN, negative) are reported as errors wrapping
// [ErrInvalid], never as panics.
//
// # Status and errors
//
// Solve always returns a non-nil [Result] holding the last evaluated iterate
// X, G(X), the residual history and a [Status]. Whenever Status is not
// [Converged] the returned error is non-nil, so a run that did not converge
// cannot be mistaken for one that did:
//
//	IterationLimit  ErrNotConverged
//	Diverged        ErrDiverged      (NaN/Inf, or residual blow-up)
//	Canceled        ErrCanceled      and ctx.Err()
//	Aborted         ErrAborted       and the Recorder's error
//	Failed          ErrFailed        and the error of Update or the mixer
//	Invalid         ErrInvalid       (bad arguments; G never evaluated)
//
// Progress goes to an optional [Recorder], called once per evaluation with an
// [Iteration]; [TableRecorder] writes it as an aligned text table to an
// io.Writer. The package itself never prints.
//
// # Mixing
//
// A [Mixer] turns the current iterate x_k and its image G(x_k) into the next
// iterate. [Linear] is damped linear mixing, x_{k+1} = x_k + β (G(x_k) − x_k).
// [Anderson] is Anderson (type II, Pulay/DIIS) mixing: it extrapolates from
// the last m iterates by a regularised least-squares fit of the residuals,
// restarts its history when that fit becomes ill-conditioned or the residual
// jumps, and can begin with linear warm-up steps. For a linear G, β = 1 and
// full history it is equivalent to GMRES. A Mixer is an immutable
// configuration; [Mixer.Start] creates the per-run state ([Mixing]).
//
// # Concurrency
//
// Solve runs in the calling goroutine and calls Update, Residual, the mixer,
// the Converger and the Recorder from it, in order. Concurrent Solve calls are
// safe when they do not share a Problem, Converger or Recorder with state
// (a [TableRecorder] is not safe for concurrent use); Settings, [Linear] and
// [Anderson] values may be shared freely, since each Solve starts its own
// Mixing. Cancellation is checked before every iteration and passed to
// Update. Results are deterministic: the same inputs give bitwise equal
// results.
package scf
