package scf_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"lamina/scf"
)

// gmresIterates returns the GMRES iterates x^G_0..x^G_kmax for
// (I − M) x = b from x0: x^G_k minimises ‖b − (I−M) x‖₂ over
// x0 + K_k(I−M, r0), r0 = b − (I−M) x0 (Saad & Schultz, SIAM J. Sci. Stat.
// Comput. 7, 856 (1986); from memory). The Krylov basis is built by Arnoldi
// with two passes of Gram-Schmidt; the small least-squares problems are
// solved by QR (mat.VecDense.SolveVec).
func gmresIterates(t *testing.T, g linearMap, x0 []float64, kmax int) [][]float64 {
	t.Helper()
	n := len(x0)
	a := mat.NewDense(n, n, nil)
	a.Scale(-1, g.M)
	for i := range n {
		a.Set(i, i, a.At(i, i)+1)
	}
	r0 := mat.NewVecDense(n, nil)
	r0.MulVec(a, mat.NewVecDense(n, x0))
	r0.SubVec(mat.NewVecDense(n, g.b), r0)

	out := [][]float64{append([]float64(nil), x0...)}
	var basis []*mat.VecDense
	v := mat.VecDenseCopyOf(r0)
	for k := 1; k <= kmax; k++ {
		for range 2 {
			for _, q := range basis {
				v.AddScaledVec(v, -mat.Dot(q, v), q)
			}
		}
		nrm := mat.Norm(v, 2)
		require.Greater(t, nrm, 0.0, "Krylov space of dimension %d is invariant", k)
		v.ScaleVec(1/nrm, v)
		basis = append(basis, v)

		vk := mat.NewDense(n, k, nil)
		for j, q := range basis {
			vk.SetCol(j, q.RawVector().Data)
		}
		var avk mat.Dense
		avk.Mul(a, vk)
		var y mat.VecDense
		require.NoError(t, y.SolveVec(&avk, r0), "GMRES least squares at k=%d", k)
		x := mat.NewVecDense(n, nil)
		x.MulVec(vk, &y)
		x.AddVec(x, mat.NewVecDense(n, x0))
		out = append(out, x.RawVector().Data)

		v = mat.NewVecDense(n, nil)
		v.MulVec(a, basis[k-1])
	}
	return out
}

// TestAndersonLinearProblem checks Anderson mixing against its equivalence
// with GMRES on x = M x + b (Walker & Ni, SIAM J. Numer. Anal. 49, 1715
// (2011), Theorem 2.2 as remembered: for type-II Anderson with β = 1 and
// unlimited history, x^A_{k+1} = G(x^G_k) as long as GMRES does not
// stagnate).
//
// Counting: Result.Iterations is the number of evaluations of G. The
// evaluation at x^A_0 = x0 is the first; x^A_k is evaluated by the
// (k+1)-th. GMRES is exact at k = n at the latest (the Krylov space fills
// Rⁿ), so x^A_{n+1} = G(x*) = x* is the first iterate guaranteed to have
// residual 0: n+1 mixing steps, n+2 evaluations. History depth n suffices,
// since x^A_{n+1} combines the n differences of x^A_0..x^A_n.
func TestAndersonLinearProblem(t *testing.T) {
	for _, n := range []int{5, 10, 20} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			// Spectral radius 0.9: a contraction-like M whose GMRES needs
			// about n steps, so the bound is tested near its limit.
			g := newLinearMap(t, n, 0.9, uint64(n))
			x0 := make([]float64, n)
			var xs [][]float64
			s := scf.Settings{
				Tol: 1e-10,
				// Regularization 1e-30 is no regularisation in effect; the
				// restarts are off because the theorem assumes the full history.
				Mixer: scf.Anderson{Depth: n, Beta: 1, Regularization: 1e-30,
					RestartCond: math.Inf(1), RestartGrowth: math.Inf(1)},
				Recorder: iterates(&xs),
			}
			res, err := scf.Solve(context.Background(), g.problem(), x0, s)
			require.NoError(t, err)
			require.Equal(t, scf.Converged, res.Status)
			assert.LessOrEqual(t, res.Iterations, n+2, "evaluations of G (n+1 mixing steps)")
			require.Len(t, xs, res.Iterations)

			// X is the fixed point: x − x* = −(I−M)⁻¹ (G(x) − x) exactly, so
			// |X − x*|∞ <= ‖(I−M)⁻¹‖∞ · Residual; 1e-13 more for the
			// rounding of the direct solve for x* (n·eps·‖(I−M)⁻¹‖ ≈ 1e-13).
			a := mat.NewDense(n, n, nil)
			a.Scale(-1, g.M)
			for i := range n {
				a.Set(i, i, a.At(i, i)+1)
			}
			var inv mat.Dense
			require.NoError(t, inv.Inverse(a))
			bound := mat.Norm(&inv, math.Inf(1))*res.Residual + 1e-13
			assert.InDeltaSlice(t, g.fixedPoint(t), res.X, bound)

			// x^A_{k+1} = G(x^G_k) for every step taken. The two sides come
			// from different algorithms, so they agree to rounding only:
			// observed at most 1e-14 for these seeds; 1e-11 leaves margin.
			xg := gmresIterates(t, g, x0, min(n, len(xs)-2))
			var worst float64
			for k := 0; k+1 < len(xs) && k < len(xg); k++ {
				want := make([]float64, n)
				g.apply(want, xg[k])
				assert.InDeltaSlicef(t, want, xs[k+1], 1e-11, "x^A_%d vs G(x^GMRES_%d)", k+1, k)
				worst = max(worst, maxAbsDiff(want, xs[k+1]))
			}
			t.Logf("%d evaluations, max |x^A_{k+1} − G(x^GMRES_k)| = %.2g", res.Iterations, worst)
		})
	}
}

// TestAndersonNoHistoryIsLinear checks that Anderson with no history is
// linear mixing, bitwise: with m = 0 the least-squares term vanishes and
// x_{k+1} = x_k + β f_k (Anderson, J. ACM 12, 547 (1965), from memory).
func TestAndersonNoHistoryIsLinear(t *testing.T) {
	g := newTanhMap(t, 12, -3, 0.5, 7)
	x0 := make([]float64, 12)
	cases := []struct {
		name         string
		anderson     scf.Anderson
		linear       scf.Linear
		sameIterates int // number of leading iterates that must agree (0: all)
	}{
		{name: "depth=-1/beta=0.3", anderson: scf.Anderson{Depth: -1, Beta: 0.3}, linear: scf.Linear{Beta: 0.3}},
		{name: "depth=-1/default beta", anderson: scf.Anderson{Depth: -1}, linear: scf.Linear{}},
		{name: "depth=-1/beta=1", anderson: scf.Anderson{Depth: -1, Beta: 1}, linear: scf.Linear{Beta: 1}},
		// Warmup 5 takes five linear steps: x_0..x_5 agree, x_6 is the
		// first extrapolated iterate.
		{name: "warmup=5", anderson: scf.Anderson{Warmup: 5}, linear: scf.Linear{}, sameIterates: 6},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			run := func(m scf.Mixer) ([][]float64, *scf.Result) {
				var xs [][]float64
				res, _ := scf.Solve(context.Background(), g.problem(), x0, scf.Settings{Tol: 1e-12, MaxIter: 40, Mixer: m, Recorder: iterates(&xs)})
				return xs, res
			}
			xa, ra := run(tc.anderson)
			xl, rl := run(tc.linear)
			if tc.sameIterates == 0 {
				assert.Equal(t, xl, xa, "iterates")
				assert.Equal(t, rl.History, ra.History, "residuals")
				assert.Equal(t, rl.X, ra.X)
				return
			}
			require.Greater(t, len(xa), tc.sameIterates)
			require.Greater(t, len(xl), tc.sameIterates)
			assert.Equal(t, xl[:tc.sameIterates], xa[:tc.sameIterates], "warm-up iterates")
			assert.NotEqual(t, xl[tc.sameIterates], xa[tc.sameIterates], "first accelerated iterate")
		})
	}
}

// steps feeds a fresh Mixing a sequence of residuals f_k at random
// integer points x_k (gx = x + f, exact for the small integer f of the
// "repeated residual" case) and returns the history length reported by
// each Next.
func steps(t *testing.T, m scf.Mixer, fs [][]float64) []int {
	t.Helper()
	n := len(fs[0])
	mix, err := m.Start(n)
	require.NoError(t, err)
	rnd := rand.New(rand.NewPCG(3, 4))
	dst, x, gx := make([]float64, n), make([]float64, n), make([]float64, n)
	var used []int
	for _, f := range fs {
		for i := range x {
			x[i] = float64(rnd.IntN(20) - 10)
			gx[i] = x[i] + f[i]
		}
		h, err := mix.Next(dst, x, gx)
		require.NoError(t, err)
		require.Equal(t, -1, firstNonFinite(dst))
		used = append(used, h)
	}
	return used
}

func firstNonFinite(v []float64) int {
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return i
		}
	}
	return -1
}

func randomVectors(seed uint64, count, n int, norms ...float64) [][]float64 {
	rnd := rand.New(rand.NewPCG(seed, 1))
	out := make([][]float64, count)
	for k := range out {
		out[k] = make([]float64, n)
		for i := range out[k] {
			out[k][i] = rnd.NormFloat64()
		}
		if k < len(norms) {
			floats.Scale(norms[k]/floats.Norm(out[k], 2), out[k])
		}
	}
	return out
}

// TestAndersonRestart checks the documented restart rules by the history
// length each step reports. Step 1 has no previous iterate (0), and each
// later step adds one difference column unless a restart clears them.
func TestAndersonRestart(t *testing.T) {
	inf := math.Inf(1)
	v := []float64{1, -2, 0.5, 3}
	parallel := [][]float64{ // f_k = c_k v: every Δf is parallel to v
		floats.ScaleTo(make([]float64, 4), 1, v),
		floats.ScaleTo(make([]float64, 4), 0.5, v),
		floats.ScaleTo(make([]float64, 4), 0.2, v),
		floats.ScaleTo(make([]float64, 4), 0.1, v),
	}
	cases := []struct {
		name  string
		mixer scf.Mixer
		fs    [][]float64
		want  []int
	}{
		// Random residuals in R^6 give well-conditioned differences.
		{name: "no restart", mixer: scf.Anderson{}, fs: randomVectors(1, 5, 6), want: []int{0, 1, 2, 3, 4}},
		// Depth 2 keeps only the two newest columns.
		{name: "depth=2", mixer: scf.Anderson{Depth: 2}, fs: randomVectors(1, 5, 6), want: []int{0, 1, 2, 2, 2}},
		// Depth above n is capped at n = 3.
		{name: "depth capped at n", mixer: scf.Anderson{Depth: 50}, fs: randomVectors(2, 6, 3), want: []int{0, 1, 2, 3, 3, 3}},
		// Two parallel columns have condition number ~1e16 > 1e8: the
		// third step clears the history and is linear; step 4 starts anew.
		{name: "conditioning", mixer: scf.Anderson{}, fs: parallel, want: []int{0, 1, 0, 1}},
		// With RestartCond = +Inf the singular history is kept, and the
		// Tikhonov filter keeps the step finite (checked in steps).
		{name: "conditioning off", mixer: scf.Anderson{RestartCond: inf}, fs: parallel, want: []int{0, 1, 2, 3}},
		// ‖f‖ = 1, 0.5, then 40 < 100·0.5 keeps the history (default
		// RestartGrowth 100) while 200 > 100·0.5 clears it.
		{name: "growth below factor", mixer: scf.Anderson{}, fs: randomVectors(3, 3, 6, 1, 0.5, 40), want: []int{0, 1, 2}},
		{name: "growth above factor", mixer: scf.Anderson{}, fs: randomVectors(3, 4, 6, 1, 0.5, 200, 150), want: []int{0, 1, 0, 1}},
		{name: "growth off", mixer: scf.Anderson{RestartGrowth: inf}, fs: randomVectors(3, 4, 6, 1, 0.5, 200, 150), want: []int{0, 1, 2, 3}},
		{name: "growth factor 2", mixer: scf.Anderson{RestartGrowth: 2}, fs: randomVectors(3, 4, 6, 1, 0.5, 1.5, 1), want: []int{0, 1, 0, 1}},
		// Warmup 3: three linear steps with no history, then acceleration
		// from the last warm-up iterate.
		{name: "warmup", mixer: scf.Anderson{Warmup: 3}, fs: randomVectors(4, 6, 8), want: []int{0, 0, 0, 1, 2, 3}},
		{name: "no history", mixer: scf.Anderson{Depth: -1}, fs: randomVectors(4, 4, 8), want: []int{0, 0, 0, 0}},
		// A repeated residual gives a zero Δf, which is not stored.
		{name: "repeated residual", mixer: scf.Anderson{}, fs: [][]float64{{1, 2, 3}, {1, 2, 3}, {0, 1, 0}}, want: []int{0, 0, 1}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.want, steps(t, tc.mixer, tc.fs))
		})
	}
}

// TestAndersonAliasing checks the documented promise that dst may alias x
// or gx: the step must equal the one into a separate dst, bitwise.
func TestAndersonAliasing(t *testing.T) {
	const n = 7
	fs := randomVectors(9, 6, n)
	xs := randomVectors(10, 6, n)
	for _, alias := range []string{"x", "gx"} {
		t.Run("dst="+alias, func(t *testing.T) {
			ref, err := scf.Anderson{}.Start(n)
			require.NoError(t, err)
			got, err := scf.Anderson{}.Start(n)
			require.NoError(t, err)
			for k := range fs {
				x := xs[k]
				gx := floats.AddTo(make([]float64, n), x, fs[k])
				want := make([]float64, n)
				_, err := ref.Next(want, x, gx)
				require.NoError(t, err)

				x2, gx2 := append([]float64(nil), x...), append([]float64(nil), gx...)
				dst := x2
				if alias == "gx" {
					dst = gx2
				}
				_, err = got.Next(dst, x2, gx2)
				require.NoError(t, err)
				assert.Equal(t, want, dst, "step %d", k+1)
			}
		})
	}
}

func TestAndersonErrors(t *testing.T) {
	t.Run("Start", func(t *testing.T) {
		cases := []struct {
			name  string
			mixer scf.Mixer
			n     int
			field string
		}{
			{"n=0", scf.Anderson{}, 0, "vector length 0"},
			{"NaN beta", scf.Anderson{Beta: math.NaN()}, 3, "Anderson.Beta"},
			{"negative beta", scf.Anderson{Beta: -0.1}, 3, "Anderson.Beta"},
			{"infinite beta", scf.Anderson{Beta: math.Inf(1)}, 3, "Anderson.Beta"},
			{"negative regularization", scf.Anderson{Regularization: -1}, 3, "Anderson.Regularization"},
			{"NaN regularization", scf.Anderson{Regularization: math.NaN()}, 3, "Anderson.Regularization"},
			{"negative warmup", scf.Anderson{Warmup: -1}, 3, "Anderson.Warmup"},
			{"RestartCond below 1", scf.Anderson{RestartCond: 0.5}, 3, "Anderson.RestartCond"},
			{"NaN RestartGrowth", scf.Anderson{RestartGrowth: math.NaN()}, 3, "Anderson.RestartGrowth"},
			{"linear n=-1", scf.Linear{}, -1, "vector length -1"},
			{"linear NaN beta", scf.Linear{Beta: math.NaN()}, 3, "Linear.Beta"},
			{"linear negative beta", scf.Linear{Beta: -1}, 3, "Linear.Beta"},
		}
		for _, tc := range cases {
			t.Run(tc.name, func(t *testing.T) {
				mix, err := tc.mixer.Start(tc.n)
				require.Error(t, err)
				assert.Nil(t, mix)
				assert.ErrorIs(t, err, scf.ErrInvalid)
				assert.Contains(t, err.Error(), tc.field)
				assert.Regexp(t, "^scf: ", err.Error())
			})
		}
	})
	t.Run("Next", func(t *testing.T) {
		for _, m := range []scf.Mixer{scf.Anderson{}, scf.Linear{}} {
			mix, err := m.Start(3)
			require.NoError(t, err)
			_, err = mix.Next(make([]float64, 2), make([]float64, 3), make([]float64, 3))
			assert.ErrorContains(t, err, "lengths dst 2, x 3, gx 3, want 3", "%v", m)
		}
		mix, err := scf.Anderson{}.Start(2)
		require.NoError(t, err)
		_, err = mix.Next(make([]float64, 2), []float64{0, 0}, []float64{1, math.NaN()})
		assert.ErrorContains(t, err, "residual norm")
		// The failed call left no state: the next step is the first one.
		h, err := mix.Next(make([]float64, 2), []float64{0, 0}, []float64{1, 1})
		require.NoError(t, err)
		assert.Equal(t, 0, h)
	})
}

func TestMixerString(t *testing.T) {
	cases := []struct {
		mixer fmt.Stringer
		want  string
	}{
		{scf.Linear{}, "linear(beta=0.3)"},
		{scf.Linear{Beta: 0.5}, "linear(beta=0.5)"},
		{scf.Anderson{}, "anderson(depth=8, beta=0.3)"},
		{scf.Anderson{Depth: -1, Beta: 1, Warmup: 4}, "anderson(depth=0, beta=1, warmup=4)"},
		{scf.Anderson{Beta: math.NaN()}, "anderson(depth=0, beta=NaN, regularization=0, warmup=0, restartCond=0, restartGrowth=0)"},
	}
	for _, tc := range cases {
		t.Run(tc.want, func(t *testing.T) {
			assert.Equal(t, tc.want, tc.mixer.String())
		})
	}
}

// TestAndersonStep checks single steps against the type-II formula written
// out with dense linear algebra (Walker & Ni 2011, Algorithm AA, from
// memory; Fang & Saad 2009 for the type-II form):
//
//	γ = argmin ‖f_k − ΔF γ‖₂,  x_{k+1} = x_k + β f_k − (ΔX + β ΔF) γ.
func TestAndersonStep(t *testing.T) {
	const n, steps = 6, 5
	for _, beta := range []float64{0.3, 1} {
		t.Run(fmt.Sprintf("beta=%g", beta), func(t *testing.T) {
			rnd := rand.New(rand.NewPCG(11, 12))
			// Regularisation 1e-30 makes the reference unregularised.
			mix, err := scf.Anderson{Beta: beta, Regularization: 1e-30}.Start(n)
			require.NoError(t, err)
			var xs, fs [][]float64
			for k := range steps {
				x, f := make([]float64, n), make([]float64, n)
				for i := range n {
					x[i], f[i] = rnd.NormFloat64(), rnd.NormFloat64()
				}
				gx := floats.AddTo(make([]float64, n), x, f)
				floats.SubTo(f, gx, x) // f exactly as the mixer computes it
				xs, fs = append(xs, x), append(fs, f)

				got := make([]float64, n)
				h, err := mix.Next(got, x, gx)
				require.NoError(t, err)
				require.Equal(t, k, h, "random differences are well conditioned: no restart")

				want := floats.AddScaledTo(make([]float64, n), x, beta, f)
				if k > 0 {
					dX, dF := mat.NewDense(n, k, nil), mat.NewDense(n, k, nil)
					for j := range k {
						for i := range n {
							dX.Set(i, j, xs[j+1][i]-xs[j][i])
							dF.Set(i, j, fs[j+1][i]-fs[j][i])
						}
					}
					var gamma mat.VecDense
					require.NoError(t, gamma.SolveVec(dF, mat.NewVecDense(n, f)))
					var corr mat.VecDense
					dG := mat.NewDense(n, k, nil)
					dG.Scale(beta, dF)
					dG.Add(dX, dG)
					corr.MulVec(dG, &gamma)
					floats.Sub(want, corr.RawVector().Data)
				}
				// Both sides solve the same small, well-conditioned (random)
				// least-squares problem by different factorisations: agreement
				// to rounding, 1e-12 for O(1) data.
				assert.InDeltaSlicef(t, want, got, 1e-12, "step %d", k+1)
			}
		})
	}
}

// TestAndersonNormalEquations checks the normal-equations mode against the QR mode: the same
// least-squares problem in exact arithmetic (Walker & Ni, SIAM J. Numer. Anal. 49, 1715 (2011),
// for the equivalence with GMRES), so on a well-conditioned linear problem the iterates agree to
// rounding amplified by cond(ΔF_s)² (observed below 1e-9 here), both converge in at most n+2
// evaluations, and on the nonlinear cos problem the mode converges to the Dottie number.
func TestAndersonNormalEquations(t *testing.T) {
	n := 8
	g := newLinearMap(t, n, 0.5, 42)
	x0 := make([]float64, n)
	var xq, xn [][]float64
	base := scf.Anderson{Depth: n, Beta: 1, Regularization: 1e-30, RestartCond: math.Inf(1), RestartGrowth: math.Inf(1)}
	_, err := scf.Solve(context.Background(), g.problem(), x0, scf.Settings{Tol: 1e-10, Mixer: base, Recorder: iterates(&xq)})
	require.NoError(t, err)
	normal := base
	normal.Normal = true
	rn, err := scf.Solve(context.Background(), g.problem(), x0, scf.Settings{Tol: 1e-10, Mixer: normal, Recorder: iterates(&xn)})
	require.NoError(t, err)
	assert.LessOrEqual(t, rn.Iterations, n+2)
	require.Len(t, xn, len(xq))
	for k := range xq {
		assert.InDeltaSlicef(t, xq[k], xn[k], 1e-7, "iterate %d", k)
	}
	assert.InDeltaSlice(t, g.fixedPoint(t), rn.X, 1e-9)

	x1 := []float64{0, 1, 2, -1}
	r, err := scf.Solve(context.Background(), cosProblem, x1, scf.Settings{Tol: 1e-12, Mixer: scf.Anderson{Normal: true}})
	require.NoError(t, err)
	for _, v := range r.X {
		assert.InDelta(t, 0.7390851332151607, v, 1e-11)
	}
}
