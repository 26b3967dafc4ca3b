package scf

import (
	"errors"
	"fmt"
	"io"
)

// Iteration describes one evaluation of G, as passed to a [Recorder] or a
// [Converger]. It is passed by value; the slices X and GX alias Solve's
// buffers and are valid only during the call: copy them to keep them.
type Iteration struct {
	// Iter counts evaluations of G so far: 1 for the evaluation at x0.
	Iter int

	// Residual is Problem.Residual(X, GX), in the units of the residual.
	Residual float64

	// Step is max_i |x_next,i - X_i|, the size of the mixing step taken
	// after this evaluation, in the units of x. It is 0 when no step was
	// taken (the iteration converged or stopped).
	Step float64

	// History is the number of earlier iterates the mixing step combined;
	// 0 means a plain linear-mixing step (or no step).
	History int

	// Converged reports whether this iteration passed the stopping test;
	// no step follows it.
	Converged bool

	// Mixer names the mixing scheme, e.g. "anderson(depth=8, beta=0.3)".
	Mixer string

	// X is the iterate at which G was evaluated and GX is G(X).
	X, GX []float64
}

// Recorder observes the progress of [Solve]. Record is called once per
// evaluation of G, in order, from the goroutine that called Solve. If it
// returns an error, Solve stops with Status [Aborted] and an error wrapping
// both [ErrAborted] and the returned error.
type Recorder interface {
	Record(it Iteration) error
}

// RecorderFunc adapts a function to the [Recorder] interface.
type RecorderFunc func(it Iteration) error

// Record calls f(it).
func (f RecorderFunc) Record(it Iteration) error { return f(it) }

var (
	_ Recorder  = RecorderFunc(nil)
	_ Recorder  = (*TableRecorder)(nil)
	_ Converger = ConvergerFunc(nil)
)

// TableRecorder is a [Recorder] that writes one fixed-width text row per
// iteration to W, preceded by a header whenever an iteration with Iter == 1
// arrives (the start of each Solve):
//
//	iter  residual [problem units]  step [problem units]  history
//	   1              1.000000e+00          3.000000e-01        0
//
// Each row is written with a single call to W, so nothing is buffered: an
// interrupted run loses no rows. The residual is in the units of
// Problem.Residual and the step in the units of x. A TableRecorder is not
// safe for concurrent use; give each Solve its own.
type TableRecorder struct {
	// W receives the table. A nil W makes Record return an error.
	W io.Writer

	// Every thins the output: rows are written for iterations 1,
	// 1+Every, 1+2·Every, ... and for the converged iteration. 0 means 1
	// (every row). Negative values make Record return an error.
	Every int
}

// NewTableRecorder returns a TableRecorder writing every row to w.
func NewTableRecorder(w io.Writer) *TableRecorder {
	return &TableRecorder{W: w}
}

const (
	tableHeader = "%6s  %24s  %20s  %7s\n"
	tableRow    = "%6d  %24.6e  %20.6e  %7d\n"
)

// Record writes the header (when it.Iter == 1) and the row for it, unless
// Every skips it. Write errors are returned wrapped.
func (r *TableRecorder) Record(it Iteration) error {
	if r == nil || r.W == nil {
		return errors.New("scf: TableRecorder has no writer")
	}
	every := r.Every
	if every < 0 {
		return fmt.Errorf("scf: TableRecorder.Every = %d, want >= 0", every)
	}
	if every == 0 {
		every = 1
	}
	if it.Iter == 1 {
		if _, err := fmt.Fprintf(r.W, tableHeader, "iter", "residual [problem units]", "step [problem units]", "history"); err != nil {
			return fmt.Errorf("scf: writing table header: %w", err)
		}
	}
	if (it.Iter-1)%every != 0 && !it.Converged {
		return nil
	}
	if _, err := fmt.Fprintf(r.W, tableRow, it.Iter, it.Residual, it.Step, it.History); err != nil {
		return fmt.Errorf("scf: writing table row for iteration %d: %w", it.Iter, err)
	}
	return nil
}
