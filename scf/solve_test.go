package scf_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/scf"
)

func maxAbsDiff(a, b []float64) float64 {
	var m float64
	for i := range a {
		m = max(m, math.Abs(a[i]-b[i]))
	}
	return m
}

func TestDottieConstant(t *testing.T) {
	// The remembered constant must be a fixed point of cos to 1 ulp
	// (2^-53·0.74 ≈ 8e-17 < 1.2e-16), else the tests below check nothing.
	assert.InDelta(t, dottie, math.Cos(dottie), 1.2e-16)
}

// TestSolveNonlinear solves two nonlinear problems with known fixed points
// and checks that Anderson mixing needs fewer evaluations than linear
// mixing with the same β (the point of Anderson acceleration: Walker & Ni,
// SIAM J. Numer. Anal. 49, 1715 (2011), Sec. 5 examples; common practice).
func TestSolveNonlinear(t *testing.T) {
	const tol = 1e-12
	tm := newTanhMap(t, 30, -6, 0.5, 42)
	cases := []struct {
		name  string
		p     scf.Problem
		x0    []float64
		want  []float64
		delta float64 // tolerance on |X − want|, with its reason below
		beta  float64 // β for both mixers
	}{
		{
			// Componentwise x = cos x. By the mean value theorem
			// |x − x*| = |cos x − x| / (1 + sin ξ) <= Tol for x near x*
			// (sin ξ > 0); doubled for the rounding of the constant.
			name: "cos", p: cosProblem, x0: []float64{0, 0.5, 1, 1.5, -1},
			want: []float64{dottie, dottie, dottie, dottie, dottie}, delta: 2 * tol, beta: 0.3,
		},
		{
			// Coupled tanh map with Jacobian spectrum in [-6, 0.5] (charge
			// sloshing); fixed point xs by construction. Linear mixing needs
			// β < 2/(1+6) ≈ 0.29 near xs (newTanhMap), so β = 0.2. Measured
			// |X − xs|∞ = 3.7e-13 (Anderson) and 8.6e-13 (linear) for this
			// seed; 1e-9 leaves margin while any other fixed point would be
			// O(1) away.
			name: "tanh", p: tm.problem(), x0: make([]float64, 30), want: tm.xs, delta: 1e-9, beta: 0.2,
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			run := func(m scf.Mixer) *scf.Result {
				res, err := scf.Solve(context.Background(), tc.p, tc.x0, scf.Settings{Tol: tol, MaxIter: 2000, Mixer: m})
				require.NoError(t, err, "%v", m)
				require.Equal(t, scf.Converged, res.Status)
				require.Len(t, res.X, len(tc.want))
				assert.LessOrEqual(t, res.Residual, tol)
				assert.InDeltaSlice(t, tc.want, res.X, tc.delta, "%v", m)
				return res
			}
			ra := run(scf.Anderson{Beta: tc.beta})
			rl := run(scf.Linear{Beta: tc.beta})
			t.Logf("evaluations: Anderson %d, linear %d", ra.Iterations, rl.Iterations)
			assert.Less(t, ra.Iterations, rl.Iterations)
		})
	}
}

// TestSolveResult checks the documented meaning of Result on convergence:
// X is the input whose residual passed, GX = G(X), Residual is the
// residual of that pair and the last entry of History.
func TestSolveResult(t *testing.T) {
	x0 := []float64{0, 0.5, 1}
	orig := append([]float64(nil), x0...)
	res, err := scf.Solve(context.Background(), cosProblem, x0, scf.Settings{Tol: 1e-10})
	require.NoError(t, err)
	require.Equal(t, scf.Converged, res.Status)
	assert.NoError(t, res.Status.Err())
	assert.Equal(t, orig, x0, "x0 must not be modified")

	gx := make([]float64, len(res.X))
	require.NoError(t, cosProblem.Update(context.Background(), gx, res.X))
	assert.Equal(t, gx, res.GX, "GX is G(X), bitwise")
	assert.Equal(t, maxAbsDiff(res.X, res.GX), res.Residual, "default residual is the infinity norm")
	require.Len(t, res.History, res.Iterations)
	assert.Equal(t, res.Residual, res.History[len(res.History)-1])
	assert.Equal(t, res.Iterations, res.Evaluations)
}

func TestSolveIterationLimit(t *testing.T) {
	var xs [][]float64
	res, err := scf.Solve(context.Background(), cosProblem, []float64{0, 1}, scf.Settings{MaxIter: 5, Mixer: scf.Linear{}, Recorder: iterates(&xs)})
	require.Error(t, err)
	assert.ErrorIs(t, err, scf.ErrNotConverged)
	assert.Equal(t, scf.IterationLimit, res.Status)
	assert.ErrorIs(t, res.Status.Err(), scf.ErrNotConverged)
	assert.Regexp(t, `^scf: not converged after 5 iterations \(residual [0-9.e+-]+ > tol 1e-08\)$`, err.Error())
	assert.Equal(t, 5, res.Iterations)
	assert.Len(t, res.History, 5)
	require.Len(t, xs, 5)
	assert.Equal(t, xs[4], res.X, "X is the last evaluated iterate")
	assert.Equal(t, []float64{math.Cos(xs[4][0]), math.Cos(xs[4][1])}, res.GX)
	assert.Equal(t, res.History[4], res.Residual)
}

func TestSolveCancel(t *testing.T) {
	type run struct {
		res   *scf.Result
		err   error
		xs    [][]float64 // x at each call of Update
		calls int
	}
	// solve cancels the context during the third call of Update; act says
	// what Update then returns.
	solve := func(t *testing.T, act func(ctx context.Context) error) run {
		ctx, cancel := context.WithCancel(context.Background())
		defer cancel()
		var r run
		p := scf.Problem{Update: func(ctx context.Context, dst, x []float64) error {
			r.calls++
			r.xs = append(r.xs, append([]float64(nil), x...))
			for i, v := range x {
				dst[i] = math.Cos(v)
			}
			if r.calls == 3 {
				cancel()
				return act(ctx)
			}
			return nil
		}}
		r.res, r.err = scf.Solve(ctx, p, []float64{0, 1, 2}, scf.Settings{})
		require.NotNil(t, r.res)
		return r
	}
	t.Run("between iterations", func(t *testing.T) {
		r := solve(t, func(context.Context) error { return nil })
		assert.Equal(t, scf.Canceled, r.res.Status)
		assert.ErrorIs(t, r.err, context.Canceled)
		assert.ErrorIs(t, r.err, scf.ErrCanceled)
		assert.NotErrorIs(t, r.err, scf.ErrNotConverged)
		assert.Equal(t, 3, r.res.Iterations, "the third evaluation completed")
		assert.Equal(t, 3, r.res.Evaluations)
		assert.Equal(t, r.xs[2], r.res.X, "last iterate")
		assert.Len(t, r.res.History, 3)
		assert.Contains(t, r.err.Error(), "scf: canceled before iteration 4")
	})
	t.Run("Update returns ctx.Err()", func(t *testing.T) {
		r := solve(t, func(ctx context.Context) error { return ctx.Err() })
		assert.Equal(t, scf.Canceled, r.res.Status)
		assert.ErrorIs(t, r.err, context.Canceled)
		assert.Equal(t, 2, r.res.Iterations, "the third evaluation did not complete")
		assert.Equal(t, 3, r.res.Evaluations)
		assert.Equal(t, r.xs[1], r.res.X)
		assert.Equal(t, []float64{math.Cos(r.xs[1][0]), math.Cos(r.xs[1][1]), math.Cos(r.xs[1][2])}, r.res.GX)
	})
	t.Run("Update returns another error", func(t *testing.T) {
		boom := errors.New("boom")
		r := solve(t, func(context.Context) error { return boom })
		assert.Equal(t, scf.Canceled, r.res.Status)
		assert.ErrorIs(t, r.err, context.Canceled)
		assert.Contains(t, r.err.Error(), "boom")
	})
	t.Run("deadline before start", func(t *testing.T) {
		ctx, cancel := context.WithDeadline(context.Background(), time.Unix(0, 0))
		defer cancel()
		x0 := []float64{1, 2}
		res, err := scf.Solve(ctx, cosProblem, x0, scf.Settings{})
		assert.ErrorIs(t, err, context.DeadlineExceeded)
		assert.Equal(t, scf.Canceled, res.Status)
		assert.Equal(t, 0, res.Iterations)
		assert.Equal(t, x0, res.X)
		assert.Nil(t, res.GX)
		assert.True(t, math.IsNaN(res.Residual), "no residual measured")
	})
}

// nanAt returns a Problem whose G is cos except at evaluation k, where
// component 1 becomes v.
func nanAt(k int, v float64) scf.Problem {
	calls := 0
	return scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		calls++
		for i, xi := range x {
			dst[i] = math.Cos(xi)
		}
		if calls == k {
			dst[1] = v
		}
		return nil
	}}
}

// badMixer is a Mixer whose steps return err or write v into dst[0].
type badMixer struct {
	err error
	v   float64
}

func (m badMixer) Start(int) (scf.Mixing, error) { return m, nil }
func (m badMixer) Next(dst, x, gx []float64) (int, error) {
	if m.err != nil {
		return 0, m.err
	}
	copy(dst, gx)
	dst[0] = m.v
	return 0, nil
}

func TestSolveDiverged(t *testing.T) {
	x0 := []float64{0, 1, 2}
	cases := []struct {
		name    string
		p       scf.Problem
		s       scf.Settings
		x0      []float64
		iters   int
		message string
	}{
		{name: "NaN in G", p: nanAt(3, math.NaN()), x0: x0, iters: 3, message: "scf: diverged at iteration 3: G(x)[1] = NaN"},
		{name: "Inf in G", p: nanAt(2, math.Inf(-1)), x0: x0, iters: 2, message: "G(x)[1] = -Inf"},
		{
			name: "NaN residual", x0: x0, iters: 1, message: "residual = NaN",
			p: scf.Problem{Update: cosProblem.Update, Residual: func(_, _ []float64) float64 { return math.NaN() }},
		},
		{name: "mixer NaN", p: cosProblem, x0: x0, s: scf.Settings{Mixer: badMixer{v: math.NaN()}}, iters: 1, message: "gave x[0] = NaN"},
		{
			// G(x) = -3x from x0 = 1 with β = 1: x_k = (-3)^k and residual
			// r_k = 4·3^k, exact in floating point. r_k > 1e3·r_0 first at
			// k = 7 (3^7 = 2187, 3^6 = 729), the 8th evaluation.
			name: "residual blow-up", x0: []float64{1}, iters: 8, message: "exceeds 1e+03 times the smallest residual 4",
			p: scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
				dst[0] = -3 * x[0]
				return nil
			}},
			s: scf.Settings{Mixer: scf.Linear{Beta: 1}, DivergeFactor: 1e3},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			res, err := scf.Solve(context.Background(), tc.p, tc.x0, tc.s)
			require.Error(t, err)
			assert.ErrorIs(t, err, scf.ErrDiverged)
			assert.Equal(t, scf.Diverged, res.Status)
			assert.Equal(t, tc.iters, res.Iterations)
			assert.Len(t, res.History, tc.iters)
			assert.Contains(t, err.Error(), tc.message)
		})
	}
}

func TestSolveFailed(t *testing.T) {
	boom := errors.New("boom")
	calls := 0
	var xs [][]float64
	p := scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		calls++
		if calls == 2 {
			return boom
		}
		xs = append(xs, append([]float64(nil), x...))
		copy(dst, x)
		dst[0]++
		return nil
	}}
	t.Run("Update error", func(t *testing.T) {
		res, err := scf.Solve(context.Background(), p, []float64{1, 2}, scf.Settings{})
		assert.ErrorIs(t, err, boom)
		assert.ErrorIs(t, err, scf.ErrFailed)
		assert.Equal(t, "scf: failed: evaluating G at iteration 2: boom", err.Error())
		assert.Equal(t, scf.Failed, res.Status)
		assert.Equal(t, 1, res.Iterations)
		assert.Equal(t, 2, res.Evaluations)
		assert.Equal(t, xs[0], res.X)
	})
	t.Run("negative residual", func(t *testing.T) {
		q := scf.Problem{Update: cosProblem.Update, Residual: func(_, _ []float64) float64 { return -1 }}
		res, err := scf.Solve(context.Background(), q, []float64{1}, scf.Settings{})
		assert.ErrorIs(t, err, scf.ErrFailed)
		assert.Contains(t, err.Error(), "Problem.Residual returned -1")
		assert.Equal(t, scf.Failed, res.Status)
	})
	t.Run("mixer error", func(t *testing.T) {
		res, err := scf.Solve(context.Background(), cosProblem, []float64{1}, scf.Settings{Mixer: badMixer{err: boom}})
		assert.ErrorIs(t, err, boom)
		assert.ErrorIs(t, err, scf.ErrFailed)
		assert.Equal(t, scf.Failed, res.Status)
	})
}

func TestSolveRecorder(t *testing.T) {
	t.Run("error aborts", func(t *testing.T) {
		stop := errors.New("stop here")
		rec := scf.RecorderFunc(func(it scf.Iteration) error {
			if it.Iter == 2 {
				return stop
			}
			return nil
		})
		res, err := scf.Solve(context.Background(), cosProblem, []float64{0}, scf.Settings{Recorder: rec})
		assert.ErrorIs(t, err, scf.ErrAborted)
		assert.ErrorIs(t, err, stop)
		assert.Equal(t, "scf: aborted by recorder at iteration 2: stop here", err.Error())
		assert.Equal(t, scf.Aborted, res.Status)
		assert.Equal(t, 2, res.Iterations)
	})
	t.Run("fields", func(t *testing.T) {
		var its []scf.Iteration
		var xs [][]float64
		rec := scf.RecorderFunc(func(it scf.Iteration) error {
			xs = append(xs, append([]float64(nil), it.X...))
			it.X, it.GX = nil, nil // valid only during the call
			its = append(its, it)
			return nil
		})
		res, err := scf.Solve(context.Background(), cosProblem, []float64{0, 1}, scf.Settings{Recorder: rec})
		require.NoError(t, err)
		require.Len(t, its, res.Iterations)
		for k, it := range its {
			last := k == len(its)-1
			assert.Equal(t, k+1, it.Iter)
			assert.Equal(t, res.History[k], it.Residual)
			assert.Equal(t, last, it.Converged)
			assert.Equal(t, "anderson(depth=8, beta=0.3)", it.Mixer)
			if last {
				assert.Zero(t, it.Step, "no step after convergence")
				continue
			}
			assert.Equal(t, maxAbsDiff(xs[k], xs[k+1]), it.Step, "Step is the infinity norm of the step")
			assert.Equal(t, min(k, 2), it.History, "one difference column per earlier iterate, capped at n = 2")
		}
	})
}

// halving is G(x) = x/2 from x0 = 1 with Linear{Beta: 1}: x_k = 2^-k and
// residual = step = 2^-(k+1), all exact, so the table text is the same on
// every platform.
var halving = scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
	dst[0] = x[0] / 2
	return nil
}}

type failingWriter struct{ err error }

func (w failingWriter) Write([]byte) (int, error) { return 0, w.err }

func TestTableRecorder(t *testing.T) {
	const header = "  iter  residual [problem units]  step [problem units]  history\n"
	rows := []string{
		"     1              5.000000e-01          5.000000e-01        0\n",
		"     2              2.500000e-01          2.500000e-01        0\n",
		"     3              1.250000e-01          1.250000e-01        0\n",
		"     4              6.250000e-02          0.000000e+00        0\n", // converged: 1/16 <= 0.1
	}
	cases := []struct {
		name  string
		every int
		want  string
	}{
		{"every row", 0, header + strings.Join(rows, "")},
		{"every=1", 1, header + strings.Join(rows, "")},
		{"every=2", 2, header + rows[0] + rows[2] + rows[3]},
		{"every=3", 3, header + rows[0] + rows[3]},
		{"every=10", 10, header + rows[0] + rows[3]},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var b strings.Builder
			rec := &scf.TableRecorder{W: &b, Every: tc.every}
			_, err := scf.Solve(context.Background(), halving, []float64{1}, scf.Settings{Tol: 0.1, Mixer: scf.Linear{Beta: 1}, Recorder: rec})
			require.NoError(t, err)
			assert.Equal(t, tc.want, b.String())
		})
	}
	t.Run("header per solve", func(t *testing.T) {
		var b strings.Builder
		rec := scf.NewTableRecorder(&b)
		for range 2 {
			_, err := scf.Solve(context.Background(), halving, []float64{1}, scf.Settings{Tol: 0.1, Mixer: scf.Linear{Beta: 1}, Recorder: rec})
			require.NoError(t, err)
		}
		assert.Equal(t, 2, strings.Count(b.String(), header))
		assert.Equal(t, 10, strings.Count(b.String(), "\n"), "2 headers + 2×4 rows")
	})
	t.Run("write error aborts", func(t *testing.T) {
		disk := errors.New("disk full")
		rec := scf.NewTableRecorder(failingWriter{disk})
		res, err := scf.Solve(context.Background(), halving, []float64{1}, scf.Settings{Recorder: rec})
		assert.ErrorIs(t, err, disk)
		assert.ErrorIs(t, err, scf.ErrAborted)
		assert.Equal(t, scf.Aborted, res.Status)
		assert.Contains(t, err.Error(), "writing table header")
	})
	t.Run("bad recorder", func(t *testing.T) {
		for name, rec := range map[string]*scf.TableRecorder{
			"nil writer":     {},
			"negative every": {W: &strings.Builder{}, Every: -1},
			"nil recorder":   nil,
		} {
			err := rec.Record(scf.Iteration{Iter: 1})
			assert.Error(t, err, name)
			assert.Regexp(t, "^scf: ", err.Error(), name)
		}
	})
}

// stringMixer is a Mixer without a String method, whose Start fails or
// returns a nil Mixing.
type stringMixer struct{ err error }

func (m stringMixer) Start(int) (scf.Mixing, error) { return nil, m.err }

func TestSolveInvalid(t *testing.T) {
	good := cosProblem
	var nilCtx context.Context
	cases := []struct {
		name    string
		ctx     context.Context
		p       scf.Problem
		x0      []float64
		s       scf.Settings
		message string
	}{
		{name: "nil context", ctx: nilCtx, p: good, x0: []float64{1}, message: "nil context"},
		{name: "nil Update", p: scf.Problem{}, x0: []float64{1}, message: "Problem.Update is nil"},
		{name: "nil x0", p: good, message: "x0 is empty"},
		{name: "empty x0", p: good, x0: []float64{}, message: "x0 is empty"},
		{name: "NaN in x0", p: good, x0: []float64{1, 2, math.NaN()}, message: "scf: invalid input: starting point x0[2] = NaN, want a finite value"},
		{name: "Inf in x0", p: good, x0: []float64{math.Inf(1)}, message: "x0[0] = +Inf"},
		{name: "negative Tol", p: good, x0: []float64{1}, s: scf.Settings{Tol: -1e-8}, message: "Settings.Tol = -1e-08"},
		{name: "NaN Tol", p: good, x0: []float64{1}, s: scf.Settings{Tol: math.NaN()}, message: "Settings.Tol = NaN"},
		{name: "Inf Tol", p: good, x0: []float64{1}, s: scf.Settings{Tol: math.Inf(1)}, message: "Settings.Tol = +Inf"},
		{name: "negative MaxIter", p: good, x0: []float64{1}, s: scf.Settings{MaxIter: -1}, message: "Settings.MaxIter = -1"},
		{name: "negative MinIter", p: good, x0: []float64{1}, s: scf.Settings{MinIter: -2}, message: "Settings.MinIter = -2"},
		{name: "MinIter above MaxIter", p: good, x0: []float64{1}, s: scf.Settings{MinIter: 300}, message: "Settings.MinIter = 300 exceeds MaxIter = 200"},
		{name: "DivergeFactor below 1", p: good, x0: []float64{1}, s: scf.Settings{DivergeFactor: 0.5}, message: "Settings.DivergeFactor = 0.5"},
		{name: "NaN DivergeFactor", p: good, x0: []float64{1}, s: scf.Settings{DivergeFactor: math.NaN()}, message: "Settings.DivergeFactor = NaN"},
		{name: "NaN Anderson beta", p: good, x0: []float64{1}, s: scf.Settings{Mixer: scf.Anderson{Beta: math.NaN()}}, message: "Anderson.Beta = NaN"},
		{name: "negative Linear beta", p: good, x0: []float64{1}, s: scf.Settings{Mixer: scf.Linear{Beta: -1}}, message: "Linear.Beta = -1"},
		{name: "mixer Start error", p: good, x0: []float64{1}, s: scf.Settings{Mixer: stringMixer{errors.New("no memory")}}, message: "starting mixer scf_test.stringMixer: no memory"},
		{name: "nil Mixing", p: good, x0: []float64{1}, s: scf.Settings{Mixer: stringMixer{}}, message: "returned a nil Mixing"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ctx := tc.ctx
			if ctx == nil && tc.name != "nil context" {
				ctx = context.Background()
			}
			var res *scf.Result
			var err error
			require.NotPanics(t, func() { res, err = scf.Solve(ctx, tc.p, tc.x0, tc.s) })
			require.Error(t, err)
			assert.ErrorIs(t, err, scf.ErrInvalid)
			assert.Regexp(t, "^scf: ", err.Error())
			assert.Contains(t, err.Error(), tc.message)
			require.NotNil(t, res)
			assert.Equal(t, scf.Invalid, res.Status)
			assert.Zero(t, res.Evaluations)
		})
	}
}

func TestSolveMinIterAndConverger(t *testing.T) {
	zero := []float64{0}
	t.Run("fixed point at x0", func(t *testing.T) {
		res, err := scf.Solve(context.Background(), halving, zero, scf.Settings{})
		require.NoError(t, err)
		assert.Equal(t, 1, res.Iterations)
	})
	t.Run("MinIter", func(t *testing.T) {
		res, err := scf.Solve(context.Background(), halving, zero, scf.Settings{MinIter: 7})
		require.NoError(t, err)
		assert.Equal(t, 7, res.Iterations)
	})
	t.Run("Converger", func(t *testing.T) {
		const tol = 1e-3
		var seen []float64
		conv := scf.ConvergerFunc(func(it scf.Iteration) bool {
			seen = append(seen, it.Residual)
			return it.Iter >= 12
		})
		res, err := scf.Solve(context.Background(), cosProblem, []float64{0}, scf.Settings{Tol: tol, Converger: conv})
		require.NoError(t, err)
		assert.Equal(t, 12, res.Iterations)
		require.NotEmpty(t, seen)
		for _, r := range seen {
			assert.LessOrEqual(t, r, tol, "Converger is called only after the Tol test passed")
		}
		assert.Less(t, len(seen), 12, "the Tol test passes only after a few iterations")
	})
}

// TestSolveDeterminism runs the same problem repeatedly, sequentially and
// from concurrent goroutines sharing one Settings value, and requires
// bitwise equal Results (compare optimize/unconstrained_test.go in gonum).
func TestSolveDeterminism(t *testing.T) {
	tm := newTanhMap(t, 40, -10, 0.5, 99)
	s := scf.Settings{Tol: 1e-12, Mixer: scf.Anderson{Depth: 6, Warmup: 2}}
	solve := func() *scf.Result {
		res, err := scf.Solve(context.Background(), tm.problem(), make([]float64, 40), s)
		require.NoError(t, err)
		return res
	}
	want := solve()
	t.Run("sequential", func(t *testing.T) {
		assert.Equal(t, want, solve())
	})
	t.Run("concurrent", func(t *testing.T) {
		const workers = 4
		got := make([]*scf.Result, workers)
		var wg sync.WaitGroup
		for w := range workers {
			wg.Go(func() {
				res, err := scf.Solve(context.Background(), tm.problem(), make([]float64, 40), s)
				if err == nil {
					got[w] = res
				}
			})
		}
		wg.Wait()
		for w := range workers {
			assert.Equal(t, want, got[w], "worker %d", w)
		}
	})
}

func TestStatus(t *testing.T) {
	cases := []struct {
		s    scf.Status
		name string
		err  error
	}{
		{scf.Converged, "Converged", nil},
		{scf.IterationLimit, "IterationLimit", scf.ErrNotConverged},
		{scf.Diverged, "Diverged", scf.ErrDiverged},
		{scf.Canceled, "Canceled", scf.ErrCanceled},
		{scf.Aborted, "Aborted", scf.ErrAborted},
		{scf.Failed, "Failed", scf.ErrFailed},
		{scf.Invalid, "Invalid", scf.ErrInvalid},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.name, tc.s.String())
			assert.Equal(t, tc.err, tc.s.Err())
		})
	}
	for _, s := range []scf.Status{0, -1, 8, 1000} {
		t.Run(fmt.Sprintf("Status(%d)", int(s)), func(t *testing.T) {
			require.NotPanics(t, func() { _ = s.String() })
			assert.Equal(t, fmt.Sprintf("Status(%d)", int(s)), s.String())
			assert.EqualError(t, s.Err(), fmt.Sprintf("scf: unknown Status(%d)", int(s)))
		})
	}
}
