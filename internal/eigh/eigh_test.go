package eigh

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// eps is the unit roundoff of float64.
const eps = 0x1p-53

// residualC is the constant c in the accuracy bound c·n·eps·||A||_F used by checkDecomposition.
// Householder reduction and QL are normwise backward stable with an error bound linear in n.
// Measured worst cases over 2000 random matrices per order (n = 2..64) are 3.0·n·eps·||A||_F
// for the residual (n = 3) and 6.0·n·eps for orthogonality (n = 4; each eigenvector passes
// through about 2.6n plane rotations and n-1 reflectors, each adding about eps); c = 10 keeps
// headroom for other platforms' rounding (FMA) while still catching O(n²) or O(sqrt(eps)) losses.
const residualC = 10

// randHermitian returns a random Hermitian n×n matrix, full row-major storage, with entries of
// real and imaginary parts uniform in [-1, 1).
func randHermitian(rng *rand.Rand, n int) []complex128 {
	a := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < i; j++ {
			c := complex(2*rng.Float64()-1, 2*rng.Float64()-1)
			a[i*n+j] = c
			a[j*n+i] = cmplx.Conj(c)
		}
		a[i*n+i] = complex(2*rng.Float64()-1, 0)
	}
	return a
}

// randUnitary returns a random n×n unitary matrix (row-major) from modified Gram-Schmidt,
// applied twice, on a random complex matrix.
func randUnitary(rng *rand.Rand, n int) []complex128 {
	q := make([]complex128, n*n)
	for i := range q {
		q[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	// Orthonormalise the columns.
	for pass := 0; pass < 2; pass++ {
		for j := 0; j < n; j++ {
			for k := 0; k < j; k++ {
				var s complex128
				for i := 0; i < n; i++ {
					s += cmplx.Conj(q[i*n+k]) * q[i*n+j]
				}
				for i := 0; i < n; i++ {
					q[i*n+j] -= s * q[i*n+k]
				}
			}
			nrm := 0.0
			for i := 0; i < n; i++ {
				nrm += real(q[i*n+j])*real(q[i*n+j]) + imag(q[i*n+j])*imag(q[i*n+j])
			}
			nrm = math.Sqrt(nrm)
			for i := 0; i < n; i++ {
				q[i*n+j] /= complex(nrm, 0)
			}
		}
	}
	return q
}

// fromSpectrum returns Q diag(lambda) Qᴴ, made exactly Hermitian.
func fromSpectrum(q []complex128, lambda []float64) []complex128 {
	n := len(lambda)
	a := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j <= i; j++ {
			var s complex128
			for k := 0; k < n; k++ {
				s += q[i*n+k] * complex(lambda[k], 0) * cmplx.Conj(q[j*n+k])
			}
			a[i*n+j] = s
			a[j*n+i] = cmplx.Conj(s)
		}
		a[i*n+i] = complex(real(a[i*n+i]), 0)
	}
	return a
}

func frobenius(a []complex128) float64 {
	s := 0.0
	for _, c := range a {
		s += real(c)*real(c) + imag(c)*imag(c)
	}
	return math.Sqrt(s)
}

// errs measures a computed decomposition: the largest ||A z_j - w_j z_j||_2 over j and the
// largest entry of |Zᴴ Z - I|.
func errs(a []complex128, w []float64, z []complex128, n int) (res, orth float64) {
	for j := 0; j < n; j++ {
		zj := z[j*n : j*n+n]
		s := 0.0
		for i := 0; i < n; i++ {
			var r complex128
			for k := 0; k < n; k++ {
				r += a[i*n+k] * zj[k]
			}
			r -= complex(w[j], 0) * zj[i]
			s += real(r)*real(r) + imag(r)*imag(r)
		}
		res = max(res, math.Sqrt(s))
		for k := 0; k < n; k++ {
			var g complex128
			for i := 0; i < n; i++ {
				g += cmplx.Conj(z[k*n+i]) * zj[i]
			}
			if j == k {
				g--
			}
			orth = max(orth, cmplx.Abs(g))
		}
	}
	return res, orth
}

// checkDecomposition asserts that w is finite and ascending, and that A z_j = w_j z_j and
// Zᴴ Z = I hold to residualC·n·eps·||A||_F (orthonormality to residualC·n·eps). A and w are
// first divided by a power of two near the largest entry, which is exact and keeps the
// residual sums of squares in range for matrices near the overflow threshold.
func checkDecomposition(t *testing.T, a []complex128, w []float64, z []complex128, n int) {
	t.Helper()
	require.Len(t, w, n)
	require.Len(t, z, n*n)
	for j, x := range w {
		require.Falsef(t, math.IsNaN(x) || math.IsInf(x, 0), "w[%d] = %v", j, x)
	}
	for i, c := range z {
		require.Falsef(t, cmplx.IsNaN(c) || cmplx.IsInf(c), "z[%d] = %v", i, c)
	}
	assert.Truef(t, slices.IsSorted(w), "eigenvalues not ascending: %v", w)
	amax := 0.0
	for _, c := range a {
		amax = max(amax, math.Abs(real(c)), math.Abs(imag(c)))
	}
	if amax > 0 {
		_, e := math.Frexp(amax)
		s := math.Ldexp(1, -e)
		a = slices.Clone(a)
		for i := range a {
			a[i] *= complex(s, 0)
		}
		w = slices.Clone(w)
		for i := range w {
			w[i] *= s
		}
	}
	res, orth := errs(a, w, z, n)
	nrm := frobenius(a)
	bound := residualC * float64(n) * eps
	assert.LessOrEqualf(t, res, bound*nrm, "residual max_j ||A z_j - w_j z_j|| = %g, ||A||_F = %g (after scaling)", res, nrm)
	assert.LessOrEqualf(t, orth, bound, "max |Zᴴ Z - I| = %g", orth)
}

func TestEigenRandom(t *testing.T) {
	for _, n := range []int{1, 2, 3, 4, 5, 8, 12, 16, 20, 32, 64} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(1, uint64(n)))
			ws, err := NewWorkspace(n)
			require.NoError(t, err)
			require.Equal(t, n, ws.N())
			w := make([]float64, n)
			wv := make([]float64, n)
			z := make([]complex128, n*n)
			for trial := 0; trial < 20; trial++ {
				a := randHermitian(rng, n)
				a0 := slices.Clone(a)
				require.NoError(t, ws.Eigen(w, z, a))
				require.Equal(t, a0, a, "Eigen modified a")
				checkDecomposition(t, a, w, z, n)

				// Values (root-free QL) and Eigen (QL with rotations) are each backward stable,
				// so by Weyl's inequality each is within the residual bound of the exact
				// eigenvalues, and they agree to twice that.
				require.NoError(t, ws.Values(wv, a))
				require.Len(t, wv, n)
				assert.InDeltaSlice(t, w, wv, 2*residualC*float64(n)*eps*frobenius(a))
			}
		})
	}
}

func TestEigenDegenerate(t *testing.T) {
	cases := []struct {
		name   string
		lambda []float64
	}{
		{"pair", []float64{-1, 0.5, 0.5, 2}},
		{"triple", []float64{-3, 1, 1, 1, 2, 7}},
		{"two-pairs", []float64{-2, -2, 0.25, 3, 3, 4, 5, 6}},
		{"K-point-like", []float64{-1.2, -0.4, 0, 0, 0, 0, 0.4, 1.2}},
		{"all-equal", []float64{1.5, 1.5, 1.5, 1.5, 1.5}},
		{"near-degenerate", []float64{1, 1 + 1e-14, 1 + 2e-14, 2, 3, 3 - 1e-15, 4, 5, 6, 7, 8, 9}},
		{"sixteen-fourfold", []float64{-2, -2, -2, -2, -1, -1, -1, -1, 1, 1, 1, 1, 2, 2, 2, 2}},
	}
	rng := rand.New(rand.NewPCG(7, 11))
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			n := len(tc.lambda)
			q := randUnitary(rng, n)
			a := fromSpectrum(q, tc.lambda)
			ws, err := NewWorkspace(n)
			require.NoError(t, err)
			w := make([]float64, n)
			z := make([]complex128, n*n)
			require.NoError(t, ws.Eigen(w, z, a))
			checkDecomposition(t, a, w, z, n)

			// Eigenvalues: forming A = Q diag(λ) Qᴴ in floating point and the solver's backward
			// error each perturb A by O(n·eps·max|λ|), and by Weyl's inequality the eigenvalues
			// move by no more; the worst measured over 300 such matrices is 2.7·n·eps·max|λ|,
			// so 16·n·eps·max|λ| has ample headroom.
			want := slices.Sorted(slices.Values(tc.lambda))
			lmax := max(math.Abs(want[0]), math.Abs(want[n-1]))
			assert.InDeltaSlice(t, want, w, 16*float64(n)*eps*lmax)
			wv := make([]float64, n)
			require.NoError(t, ws.Values(wv, a))
			require.Len(t, wv, n)
			assert.InDeltaSlice(t, want, wv, 16*float64(n)*eps*lmax)

			// Span: each computed eigenvector lies in the exact eigenspace of its eigenvalue,
			// i.e. its component outside that eigenspace (projector P = Q_S Q_Sᴴ) is small.
			// For a cluster separated by a gap g from the rest, the Davis-Kahan bound gives
			// ~ n·eps·||A||/g; the gaps here are >= 0.4 so 64·n·eps·||A||_F is generous.
			gapTol := 64 * float64(n) * eps * frobenius(a)
			for j := 0; j < n; j++ {
				zj := z[j*n : j*n+n]
				out := 0.0
				// Components along the exact eigenvectors whose eigenvalue is not within
				// 1e-6 of w[j] must vanish.
				for k := 0; k < n; k++ {
					if math.Abs(tc.lambda[k]-w[j]) < 1e-6 {
						continue
					}
					var c complex128
					for i := 0; i < n; i++ {
						c += cmplx.Conj(q[i*n+k]) * zj[i]
					}
					out += real(c)*real(c) + imag(c)*imag(c)
				}
				assert.LessOrEqualf(t, math.Sqrt(out), gapTol, "eigenvector %d leaks out of its eigenspace", j)
			}
		})
	}
}

// structured returns a Hermitian n×n matrix of the given kind: sparse with entries from
// {±1, ±i}, entries drawn from a set spanning 1e-300..1e300 and zero, banded, the Kronecker
// product B ⊗ I_2 (every eigenvalue exactly double), or graded by 10^-(i+j).
func structured(rng *rand.Rand, kind string, n int) []complex128 {
	extremes := []complex128{0, 1, -1, 1i, -1i, 0.5, complex(1, 1), 1e-300, 1e300, 1e-20}
	a := make([]complex128, n*n)
	set := func(i, j int, c complex128) {
		if i == j {
			c = complex(real(c), 0)
		}
		a[i*n+j], a[j*n+i] = c, cmplx.Conj(c)
	}
	switch kind {
	case "kron":
		m := n / 2
		for i := 0; i < m; i++ {
			for j := 0; j <= i; j++ {
				c := complex(float64(rng.IntN(3)-1), float64(rng.IntN(3)-1))
				set(2*i, 2*j, c)
				set(2*i+1, 2*j+1, c)
			}
		}
		return a
	}
	for i := 0; i < n; i++ {
		for j := 0; j <= i; j++ {
			var c complex128
			switch kind {
			case "sparse":
				if rng.IntN(3) == 0 {
					c = extremes[1+rng.IntN(4)]
				}
			case "extremes":
				c = extremes[rng.IntN(len(extremes))]
			case "banded":
				if i-j <= 2 {
					c = complex(rng.NormFloat64(), rng.NormFloat64())
				}
			case "graded":
				c = complex(rng.NormFloat64(), rng.NormFloat64()) * complex(math.Pow(10, -float64(i+j)), 0)
			default:
				panic("unknown kind " + kind)
			}
			set(i, j, c)
		}
	}
	return a
}

func TestEigenStructured(t *testing.T) {
	// Zeros, exact degeneracies, subnormal intermediate values and wildly mixed magnitudes
	// exercise the special cases of the reduction (identity and phase-only reflectors,
	// negligible columns) and of QL (early splits). One of the "extremes" matrices once
	// produced a NaN from the reciprocal of a subnormal column norm.
	for _, kind := range []string{"sparse", "extremes", "banded", "kron", "graded"} {
		t.Run(kind, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(99, 1))
			for trial := 0; trial < 150; trial++ {
				n := 2 * (1 + rng.IntN(12))
				a := structured(rng, kind, n)
				ws, err := NewWorkspace(n)
				require.NoError(t, err)
				w := make([]float64, n)
				z := make([]complex128, n*n)
				require.NoErrorf(t, ws.Eigen(w, z, a), "trial %d", trial)
				checkDecomposition(t, a, w, z, n)
				wv := make([]float64, n)
				require.NoErrorf(t, ws.Values(wv, a), "trial %d", trial)
				// Both within the backward-error bound of the exact eigenvalues (Weyl).
				tol := 2 * residualC * float64(n) * eps * frobenius(a)
				for j := range w {
					require.Falsef(t, math.IsNaN(wv[j]) || math.IsInf(wv[j], 0), "wv[%d] = %v", j, wv[j])
					assert.InDeltaf(t, w[j], wv[j], tol, "trial %d eigenvalue %d", trial, j)
				}
				if kind == "kron" {
					// Every eigenvalue appears twice; the pairs agree to the same tolerance.
					for j := 0; j < n; j += 2 {
						assert.InDeltaf(t, w[j], w[j+1], tol, "trial %d pair %d", trial, j/2)
					}
				}
			}
		})
	}
}

func TestEigenImaginaryDiagonalIgnored(t *testing.T) {
	// Only the real part of the diagonal is used: a huge imaginary part must neither change
	// the result nor trigger scaling. Same arithmetic on the same numbers, so bitwise equal.
	n := 5
	a := randHermitian(rand.New(rand.NewPCG(8, 8)), n)
	b := slices.Clone(a)
	for i := 0; i < n; i++ {
		b[i*n+i] += complex(0, 1e300)
	}
	ws, err := NewWorkspace(n)
	require.NoError(t, err)
	wa, wb := make([]float64, n), make([]float64, n)
	za, zb := make([]complex128, n*n), make([]complex128, n*n)
	require.NoError(t, ws.Eigen(wa, za, a))
	require.NoError(t, ws.Eigen(wb, zb, b))
	assert.Equal(t, wa, wb)
	assert.Equal(t, za, zb)
}

func TestEigenAgainstGonum(t *testing.T) {
	for _, n := range []int{2, 3, 6, 10, 17, 40} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(3, uint64(n)))
			sym := mat.NewSymDense(n, nil)
			a := make([]complex128, n*n)
			for i := 0; i < n; i++ {
				for j := 0; j <= i; j++ {
					x := 2*rng.Float64() - 1
					sym.SetSym(i, j, x)
					a[i*n+j] = complex(x, 0)
					a[j*n+i] = complex(x, 0)
				}
			}
			var es mat.EigenSym
			require.True(t, es.Factorize(sym, false), "gonum EigenSym failed")
			want := es.Values(nil)

			ws, err := NewWorkspace(n)
			require.NoError(t, err)
			w := make([]float64, n)
			z := make([]complex128, n*n)
			require.NoError(t, ws.Eigen(w, z, a))
			checkDecomposition(t, a, w, z, n)
			// Two backward-stable solvers agree to their combined backward error, a few
			// n·eps·||A||; 1e-12·||A||_F is the required relative-scale agreement.
			tol := 1e-12 * frobenius(a)
			require.Len(t, want, n)
			assert.InDeltaSlice(t, want, w, tol)
			wv := make([]float64, n)
			require.NoError(t, ws.Values(wv, a))
			assert.InDeltaSlice(t, want, wv, tol)
		})
	}
}

func TestEigen2x2ClosedForm(t *testing.T) {
	cases := []struct {
		name string
		a, c float64 // diagonal
		b    complex128
	}{
		{name: "generic", a: 1, c: -2, b: complex(0.3, -1.7)},
		{name: "equal-diagonal", a: 0.5, c: 0.5, b: complex(0, 2)},
		{name: "tiny-offdiagonal", a: 1, c: 3, b: complex(1e-200, 1e-200)},
		{name: "degenerate", a: 2, c: 2, b: 0},
		{name: "large", a: 1e200, c: -3e200, b: complex(2e200, 1e200)},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			// A = [[a, conj(b)], [b, c]]; λ = (a+c)/2 ∓ sqrt(((a-c)/2)² + |b|²).
			a := []complex128{complex(tc.a, 0), cmplx.Conj(tc.b), tc.b, complex(tc.c, 0)}
			mid := (tc.a + tc.c) / 2
			rad := math.Hypot((tc.a-tc.c)/2, cmplx.Abs(tc.b))
			want := []float64{mid - rad, mid + rad}
			ws, err := NewWorkspace(2)
			require.NoError(t, err)
			w := make([]float64, 2)
			z := make([]complex128, 4)
			require.NoError(t, ws.Eigen(w, z, a))
			for j := range w {
				require.False(t, math.IsNaN(w[j]) || math.IsInf(w[j], 0))
			}
			// Closed form and solver each carry a few ulps of the matrix scale.
			scale := max(math.Abs(tc.a), math.Abs(tc.c), cmplx.Abs(tc.b))
			require.Len(t, w, 2)
			assert.InDeltaSlice(t, want, w, 8*eps*scale)
			checkDecomposition(t, a, w, z, 2)
			if tc.b == 0 {
				return // degenerate: any orthonormal basis is right
			}
			// Exact eigenvector for λ: (conj(b), λ-a) or, equivalently, (λ-c, b); take the
			// better conditioned one. z_j must equal it up to a phase: |<v, z_j>| = 1 to a few
			// eps of rounding in the normalisation and the inner product (the eigenvalues are
			// well separated, so the angle error eps·scale/gap is of the same order).
			for j, lam := range want {
				v1 := []complex128{cmplx.Conj(tc.b), complex(lam-tc.a, 0)}
				v2 := []complex128{complex(lam-tc.c, 0), tc.b}
				v := v1
				if math.Hypot(cmplx.Abs(v2[0]), cmplx.Abs(v2[1])) > math.Hypot(cmplx.Abs(v1[0]), cmplx.Abs(v1[1])) {
					v = v2
				}
				nv := math.Hypot(cmplx.Abs(v[0]), cmplx.Abs(v[1]))
				ip := (cmplx.Conj(v[0])*z[2*j] + cmplx.Conj(v[1])*z[2*j+1]) / complex(nv, 0)
				assert.InDeltaf(t, 1, cmplx.Abs(ip), 16*eps, "eigenvector %d", j)
			}
		})
	}
}

func TestEigenDiagonal(t *testing.T) {
	diag := []float64{3, -1, 0, 7.5, -1, 2, 1e-3, -4e5}
	n := len(diag)
	a := make([]complex128, n*n)
	for i, x := range diag {
		a[i*n+i] = complex(x, 0)
	}
	ws, err := NewWorkspace(n)
	require.NoError(t, err)
	w := make([]float64, n)
	z := make([]complex128, n*n)
	require.NoError(t, ws.Eigen(w, z, a))
	// A diagonal matrix needs no arithmetic: the eigenvalues are the sorted diagonal exactly
	// and each eigenvector is a unit vector up to phase.
	assert.Equal(t, slices.Sorted(slices.Values(diag)), w)
	wv := make([]float64, n)
	require.NoError(t, ws.Values(wv, a))
	assert.Equal(t, slices.Sorted(slices.Values(diag)), wv)
	for j := 0; j < n; j++ {
		big := 0
		for i := 0; i < n; i++ {
			if cmplx.Abs(z[j*n+i]) > cmplx.Abs(z[j*n+big]) {
				big = i
			}
		}
		assert.InDeltaf(t, 1, cmplx.Abs(z[j*n+big]), 0, "eigenvector %d is not a unit vector", j)
		assert.Equalf(t, diag[big], w[j], "eigenvector %d points at the wrong diagonal entry", j)
	}
	checkDecomposition(t, a, w, z, n)
}

func TestEigenZero(t *testing.T) {
	for _, n := range []int{1, 2, 5} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			ws, err := NewWorkspace(n)
			require.NoError(t, err)
			a := make([]complex128, n*n)
			w := make([]float64, n)
			for i := range w {
				w[i] = 99
			}
			z := make([]complex128, n*n)
			require.NoError(t, ws.Eigen(w, z, a))
			// Exact: no arithmetic is done on a zero matrix.
			assert.Equal(t, make([]float64, n), w)
			checkDecomposition(t, a, w, z, n)
			w[0] = 99
			require.NoError(t, ws.Values(w, a))
			assert.Equal(t, make([]float64, n), w)
		})
	}
}

func TestEigenScale(t *testing.T) {
	// Scaling by a power of two is exact, so the results for s·A are s times those for A up to
	// the rounding of the solver itself: compare with the same residual bound.
	rng := rand.New(rand.NewPCG(5, 5))
	n := 9
	base := randHermitian(rng, n)
	ws, err := NewWorkspace(n)
	require.NoError(t, err)
	for _, s := range []float64{0x1p-1000, 0x1p-600, 0x1p-300, 0x1p+300, 0x1p+600, 0x1p+1000} {
		t.Run(fmt.Sprintf("scale=%g", s), func(t *testing.T) {
			a := make([]complex128, n*n)
			for i, c := range base {
				a[i] = c * complex(s, 0)
			}
			w := make([]float64, n)
			z := make([]complex128, n*n)
			require.NoError(t, ws.Eigen(w, z, a))
			checkDecomposition(t, a, w, z, n)
			// Values must see the same scaled spectrum: relative to the scale, the two are
			// within twice the residual bound of each other (see TestEigenRandom).
			wv := make([]float64, n)
			require.NoError(t, ws.Values(wv, a))
			for j := range wv {
				require.Falsef(t, math.IsNaN(wv[j]) || math.IsInf(wv[j], 0), "wv[%d] = %v", j, wv[j])
				assert.InDeltaf(t, w[j]/s, wv[j]/s, 2*residualC*float64(n)*eps*frobenius(base), "eigenvalue %d", j)
			}
		})
	}
	t.Run("graded", func(t *testing.T) {
		// Rows and columns scaled by 1, 1e-100, 1e-200: tiny blocks must not break the reduction.
		a := slices.Clone(base)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				a[i*n+j] *= complex(math.Pow(1e-100, float64(i%3))*math.Pow(1e-100, float64(j%3)), 0)
			}
		}
		w := make([]float64, n)
		z := make([]complex128, n*n)
		require.NoError(t, ws.Eigen(w, z, a))
		checkDecomposition(t, a, w, z, n)
	})
}

func TestEigenErrors(t *testing.T) {
	t.Run("n<1", func(t *testing.T) {
		for _, n := range []int{0, -3} {
			ws, err := NewWorkspace(n)
			assert.Error(t, err)
			assert.Nil(t, ws)
			assert.Contains(t, err.Error(), "eigh: ")
		}
	})
	n := 3
	ws, err := NewWorkspace(n)
	require.NoError(t, err)
	good := randHermitian(rand.New(rand.NewPCG(9, 9)), n)
	cases := []struct {
		name string
		w    []float64
		z    []complex128
		a    []complex128
	}{
		{"short a", make([]float64, n), nil, good[:n*n-1]},
		{"long a", make([]float64, n), nil, append(slices.Clone(good), 0)},
		{"nil a", make([]float64, n), nil, nil},
		{"short w", make([]float64, n-1), nil, good},
		{"nil w", nil, nil, good},
		{"short z", make([]float64, n), make([]complex128, n*n-1), good},
		{"NaN real", make([]float64, n), make([]complex128, n*n), withEntry(good, n, 2, 1, complex(math.NaN(), 0))},
		{"NaN imag", make([]float64, n), make([]complex128, n*n), withEntry(good, n, 1, 0, complex(0, math.NaN()))},
		{"NaN imaginary diagonal", make([]float64, n), make([]complex128, n*n), withEntry(good, n, 1, 1, complex(1, math.NaN()))},
		{"Inf diagonal", make([]float64, n), make([]complex128, n*n), withEntry(good, n, 2, 2, complex(math.Inf(-1), 0))},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var err error
			require.NotPanics(t, func() { err = ws.Eigen(tc.w, tc.z, tc.a) })
			require.Error(t, err)
			assert.Contains(t, err.Error(), "eigh: ")
			if tc.z == nil {
				require.NotPanics(t, func() { err = ws.Values(tc.w, tc.a) })
				require.Error(t, err)
				assert.Contains(t, err.Error(), "eigh: ")
			}
		})
	}
	t.Run("NaN in upper triangle is not read", func(t *testing.T) {
		a := withEntry(good, n, 0, 2, complex(math.NaN(), 0))
		w := make([]float64, n)
		assert.NoError(t, ws.Values(w, a))
	})
	t.Run("nil workspace", func(t *testing.T) {
		var nilWS *Workspace
		assert.Equal(t, 0, nilWS.N())
		err := nilWS.Eigen(make([]float64, n), nil, good)
		require.Error(t, err)
		assert.Contains(t, err.Error(), "eigh: ")
		err = (&Workspace{}).Values(make([]float64, n), good)
		require.Error(t, err)
		assert.Contains(t, err.Error(), "eigh: ")
	})
}

func TestEigenOverflow(t *testing.T) {
	// [[m, m], [m, m]] with m = MaxFloat64 has eigenvalues 0 and 2m; 2m is not representable.
	m := math.MaxFloat64
	a := []complex128{complex(m, 0), complex(m, 0), complex(m, 0), complex(m, 0)}
	ws, err := NewWorkspace(2)
	require.NoError(t, err)
	w := make([]float64, 2)
	err = ws.Eigen(w, make([]complex128, 4), a)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "eigh: ")
	err = ws.Values(w, a)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "eigh: ")

	// Half of that is representable: eigenvalues 0 and m, to the accuracy of the solver
	// (an ulp-level multiple of the scale; 4 ulps leaves room for rounding in the reduction).
	h := complex(m/2, 0)
	require.NoError(t, ws.Eigen(w, make([]complex128, 4), []complex128{h, h, h, h}))
	assert.InDelta(t, 0, w[0], 4*eps*m)
	assert.InDelta(t, m, w[1], 4*eps*m)
}

func TestEigenAlias(t *testing.T) {
	// z may share memory with a: a is read completely before z is written.
	n := 6
	a := randHermitian(rand.New(rand.NewPCG(4, 4)), n)
	buf := slices.Clone(a)
	ws, err := NewWorkspace(n)
	require.NoError(t, err)
	w := make([]float64, n)
	require.NoError(t, ws.Eigen(w, buf, buf))
	checkDecomposition(t, a, w, buf, n)
}

func withEntry(a []complex128, n, i, j int, c complex128) []complex128 {
	b := slices.Clone(a)
	b[i*n+j] = c
	return b
}

func TestEigenAllocs(t *testing.T) {
	for _, n := range []int{1, 2, 8, 16} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(2, 2))
			a := randHermitian(rng, n)
			ws, err := NewWorkspace(n)
			require.NoError(t, err)
			w := make([]float64, n)
			z := make([]complex128, n*n)
			var errE, errV error
			allocsE := testing.AllocsPerRun(20, func() { errE = ws.Eigen(w, z, a) })
			allocsV := testing.AllocsPerRun(20, func() { errV = ws.Values(w, a) })
			require.NoError(t, errE)
			require.NoError(t, errV)
			assert.Zero(t, allocsE, "Eigen allocates")
			assert.Zero(t, allocsV, "Values allocates")
		})
	}
}

func TestQLNoConvergence(t *testing.T) {
	// A NaN on the diagonal defeats every deflation test, so the iteration limit is reached;
	// the public API never gets here (it rejects non-finite input), but the error path must
	// report instead of looping or panicking.
	n := 4
	d := []float64{1, math.NaN(), 2, 3}
	e := []float64{1, 1, 1, 0}
	err := tqlVectors(d, e, make([]float64, n*n), make([]float64, n), make([]float64, n), n)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "eigh: QL iteration did not converge")
	d = []float64{1, math.NaN(), 2, 3}
	e = []float64{1, 1, 1, 0}
	err = tqlValues(d, e, n)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "eigh: QL iteration did not converge")
}
