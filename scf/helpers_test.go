package scf_test

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"lamina/scf"
)

// linearMap is the affine map G(x) = M x + b.
type linearMap struct {
	M *mat.Dense
	b []float64
}

// newLinearMap returns G(x) = M x + b of dimension n with M a seeded random
// Gaussian matrix rescaled to spectral radius rho, and b uniform in [-1, 1).
func newLinearMap(t testing.TB, n int, rho float64, seed uint64) linearMap {
	t.Helper()
	rnd := rand.New(rand.NewPCG(seed, 0x5cf))
	m := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			m.Set(i, j, rnd.NormFloat64())
		}
	}
	var eig mat.Eigen
	require.True(t, eig.Factorize(m, mat.EigenNone), "eigenvalues of the random matrix")
	var radius float64
	for _, v := range eig.Values(nil) {
		radius = max(radius, cmplx.Abs(v))
	}
	require.Greater(t, radius, 0.0)
	m.Scale(rho/radius, m)
	b := make([]float64, n)
	for i := range b {
		b[i] = 2*rnd.Float64() - 1
	}
	return linearMap{M: m, b: b}
}

func (g linearMap) apply(dst, x []float64) {
	d := mat.NewVecDense(len(dst), dst)
	d.MulVec(g.M, mat.NewVecDense(len(x), x))
	for i := range dst {
		dst[i] += g.b[i]
	}
}

func (g linearMap) problem() scf.Problem {
	return scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		g.apply(dst, x)
		return nil
	}}
}

// fixedPoint solves (I - M) x = b directly.
func (g linearMap) fixedPoint(t testing.TB) []float64 {
	t.Helper()
	n := len(g.b)
	a := mat.NewDense(n, n, nil)
	a.Scale(-1, g.M)
	for i := range n {
		a.Set(i, i, a.At(i, i)+1)
	}
	var x mat.VecDense
	require.NoError(t, x.SolveVec(a, mat.NewVecDense(n, g.b)))
	return x.RawVector().Data
}

// cosProblem is G(x)_i = cos(x_i), whose fixed point in every component is
// the Dottie number.
var cosProblem = scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
	for i, v := range x {
		dst[i] = math.Cos(v)
	}
	return nil
}}

// dottie is the unique real solution of cos(x) = x (a well-known constant,
// e.g. OEIS A003957; from memory, checked below by cos(dottie) == dottie
// within 1 ulp).
const dottie = 0.7390851332151607

// tanhMap is the coupled nonlinear map G(x) = b + tanh(W x), tanh
// elementwise, with a known fixed point xs.
type tanhMap struct {
	W     *mat.Dense
	b, xs []float64
}

// newTanhMap returns a tanhMap of dimension n with W = Q diag(λ) Qᵀ, Q a
// seeded random orthogonal matrix and λ spread evenly over [lo, hi], and
// b = xs − tanh(W xs) for a random xs in [-1, 1)ⁿ, so that xs is a fixed
// point by construction. The Jacobian at xs is S W with S = diag(sech²(W xs))
// in (0, 1], so its eigenvalues lie in [lo, hi] when lo <= 0 <= hi: a
// negative lo mimics the charge sloshing that forces small β in linear
// mixing (linear mixing converges only for β < 2/(1 − lo)), and hi < 1 keeps
// I − S W invertible, so xs is an isolated fixed point.
func newTanhMap(t testing.TB, n int, lo, hi float64, seed uint64) tanhMap {
	t.Helper()
	rnd := rand.New(rand.NewPCG(seed, 0x7a4))
	gauss := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			gauss.Set(i, j, rnd.NormFloat64())
		}
	}
	var qr mat.QR
	qr.Factorize(gauss)
	var q mat.Dense
	qr.QTo(&q)
	lam := mat.NewDiagDense(n, nil)
	for i := range n {
		lam.SetDiag(i, lo+(hi-lo)*float64(i)/float64(max(n-1, 1)))
	}
	w := mat.NewDense(n, n, nil)
	w.Product(&q, lam, q.T())
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = 2*rnd.Float64() - 1
	}
	g := tanhMap{W: w, b: make([]float64, n), xs: xs}
	wx := make([]float64, n)
	mat.NewVecDense(n, wx).MulVec(w, mat.NewVecDense(n, xs))
	for i := range xs {
		g.b[i] = xs[i] - math.Tanh(wx[i])
	}
	return g
}

func (g tanhMap) problem() scf.Problem {
	return scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		d := mat.NewVecDense(len(dst), dst)
		d.MulVec(g.W, mat.NewVecDense(len(x), x))
		for i := range dst {
			dst[i] = g.b[i] + math.Tanh(dst[i])
		}
		return nil
	}}
}

// iterates returns a Recorder that appends a copy of every evaluated x.
func iterates(xs *[][]float64) scf.Recorder {
	return scf.RecorderFunc(func(it scf.Iteration) error {
		*xs = append(*xs, append([]float64(nil), it.X...))
		return nil
	})
}
