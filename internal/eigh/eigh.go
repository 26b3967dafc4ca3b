package eigh

import (
	"fmt"
	"math"
)

// Scaling thresholds. The input is multiplied by a power of two when its largest entry falls
// outside [scaleLo, scaleHi], so that plain sums of squares in the reduction and the QL sweeps
// can neither overflow nor lose the matrix to underflow.
const (
	scaleLo = 0x1p-256
	scaleHi = 0x1p+256
)

// Workspace holds scratch space for Hermitian matrices of one order n. A Workspace is not safe
// for concurrent use; give each goroutine its own.
type Workspace struct {
	n int

	// ar, ai hold the real and imaginary parts of the working copy of the matrix (row-major,
	// lower triangle used). The Householder reduction overwrites them; the back-transformation
	// then uses ai for the imaginary parts of the eigenvectors.
	ar, ai []float64
	// vr, vi hold the Householder vectors: row k carries v_k in entries k+1..n-1, v_k[k+1] = 1.
	vr, vi []float64
	// taur, taui are the Householder scalars; H_k = I - tau_k v_k v_kᴴ.
	taur, taui []float64
	// d and e are the diagonal and the off-diagonal of the real tridiagonal matrix T
	// (e[i] = T[i][i+1], e[n-1] = 0); QL overwrites d with the eigenvalues.
	d, e []float64
	// q holds the orthogonal eigenvectors of T as columns (q[k*n+i] = component k of
	// eigenvector i); the back-transformation turns it into the real part of the eigenvectors
	// of A, with ai as the imaginary part.
	q []float64
	// yr, yi are vectors of length n for the reduction and the back-transformation; cs, sn
	// hold the rotations of one QL sweep.
	yr, yi, cs, sn []float64
	// perm maps ascending rank to the index in d.
	perm []int
}

// NewWorkspace returns a Workspace for Hermitian matrices of order n. It returns an error for
// n < 1.
func NewWorkspace(n int) (*Workspace, error) {
	if n < 1 {
		return nil, fmt.Errorf("eigh: order n = %d, want n >= 1", n)
	}
	nn := n * n
	buf := make([]float64, 5*nn+10*n)
	take := func(k int) []float64 {
		s := buf[:k:k]
		buf = buf[k:]
		return s
	}
	ws := &Workspace{n: n}
	ws.ar, ws.ai = take(nn), take(nn)
	ws.vr, ws.vi = take(nn), take(nn)
	ws.q = take(nn)
	ws.taur, ws.taui = take(n), take(n)
	ws.d, ws.e = take(n), take(n)
	ws.yr, ws.yi = take(n), take(n)
	ws.cs, ws.sn = take(n), take(n)
	ws.perm = make([]int, n)
	return ws, nil
}

// N returns the order of the matrices the Workspace is made for, or 0 for a nil or zero Workspace.
func (ws *Workspace) N() int {
	if ws == nil {
		return 0
	}
	return ws.n
}

// Eigen computes all eigenvalues of the n×n Hermitian matrix a in ascending order into w, and,
// if z is non-nil, an orthonormal set of eigenvectors into z.
//
// The matrix is stored row-major, a[i*n+j] = A_ij; only the lower triangle i >= j is read (and
// of the diagonal only the real part is used), the matrix is assumed Hermitian. Eigenvector j is
// stored contiguously: z[j*n+i] is component i of eigenvector j, so that A z_j = w_j z_j. The
// phase of each eigenvector is arbitrary. a is not modified; z may alias a.
//
// Eigen does not allocate. It returns an error, and leaves w and z in an unspecified state, if
// ws was not made by [NewWorkspace], len(w) != n, len(a) != n*n, z is non-nil with
// len(z) != n*n, an entry of the lower triangle (the imaginary part of the diagonal included) is
// NaN or infinite, an eigenvalue overflows float64, or the QL iteration fails to converge.
func (ws *Workspace) Eigen(w []float64, z []complex128, a []complex128) error {
	if err := ws.check(w, a); err != nil {
		return err
	}
	n := ws.n
	if z != nil && len(z) != n*n {
		return fmt.Errorf("eigh: len(z) = %d, want n*n = %d (or nil)", len(z), n*n)
	}
	return ws.solve(w, z, a, z != nil)
}

// Values computes all eigenvalues of the n×n Hermitian matrix a in ascending order into w. It is
// Eigen without eigenvectors and is faster: it uses the root-free QL iteration, so its
// eigenvalues can differ from those of Eigen in the last bits (both are within the accuracy
// stated in the package documentation). Storage conventions and errors are those of Eigen.
func (ws *Workspace) Values(w []float64, a []complex128) error {
	if err := ws.check(w, a); err != nil {
		return err
	}
	return ws.solve(w, nil, a, false)
}

// check validates the Workspace and the lengths of w and a.
func (ws *Workspace) check(w []float64, a []complex128) error {
	if ws == nil || ws.n < 1 || len(ws.ar) != ws.n*ws.n {
		return fmt.Errorf("eigh: Workspace not initialised, use NewWorkspace")
	}
	n := ws.n
	if len(a) != n*n {
		return fmt.Errorf("eigh: len(a) = %d, want n*n = %d", len(a), n*n)
	}
	if len(w) != n {
		return fmt.Errorf("eigh: len(w) = %d, want n = %d", len(w), n)
	}
	return nil
}

// solve does the work after the lengths have been checked.
func (ws *Workspace) solve(w []float64, z []complex128, a []complex128, wantz bool) error {
	n := ws.n
	amax, err := ws.load(a)
	if err != nil {
		return err
	}
	if amax == 0 || n == 1 {
		// Zero or 1×1 matrix: the diagonal is the spectrum, the identity the eigenvectors.
		if n == 1 {
			w[0] = real(a[0])
		} else {
			clear(w)
		}
		if wantz {
			clear(z)
			for i := 0; i < n; i++ {
				z[i*n+i] = 1
			}
		}
		return nil
	}
	scale := 1.0
	if amax < scaleLo || amax > scaleHi {
		// A power of two near 1/amax: the scaling is exact.
		_, exp := math.Frexp(amax)
		scale = math.Ldexp(1, -exp)
		ws.scaleLower(scale)
	}

	ws.tridiag()

	if wantz {
		if err := tqlVectors(ws.d, ws.e, ws.q, ws.cs, ws.sn, n); err != nil {
			return err
		}
	} else {
		if err := tqlValues(ws.d, ws.e, n); err != nil {
			return err
		}
	}

	// Sort ascending (insertion sort on a permutation; n is small and d is often nearly sorted).
	d, perm := ws.d, ws.perm[:n]
	for i := range perm {
		perm[i] = i
	}
	for i := 1; i < n; i++ {
		p := perm[i]
		v := d[p]
		j := i - 1
		for ; j >= 0 && d[perm[j]] > v; j-- {
			perm[j+1] = perm[j]
		}
		perm[j+1] = p
	}
	inv := 1 / scale
	for j, p := range perm {
		w[j] = d[p] * inv
		if math.IsInf(w[j], 0) {
			return fmt.Errorf("eigh: eigenvalue %d overflows float64 (largest entry of a is %g)", j, amax)
		}
	}
	if wantz {
		ws.backTransform(z)
	}
	return nil
}

// load copies the lower triangle of a into ar, ai, checks that it is finite (the imaginary
// part of the diagonal included) and returns the largest absolute real or imaginary part of
// an entry that is used (the imaginary part of the diagonal is not).
func (ws *Workspace) load(a []complex128) (float64, error) {
	n := ws.n
	ar, ai := ws.ar[:n*n], ws.ai[:n*n]
	amax := 0.0
	nan := 0.0 // x-x is 0 for finite x and NaN otherwise; the sum stays 0 only if all are finite.
	for i := 0; i < n; i++ {
		src := a[i*n : i*n+i]
		dr := ar[i*n : i*n+len(src)]
		di := ai[i*n : i*n+len(src)]
		for j, c := range src {
			re, im := real(c), imag(c)
			dr[j], di[j] = re, im
			nan += (re - re) + (im - im)
			if x := math.Abs(re); x > amax {
				amax = x
			}
			if x := math.Abs(im); x > amax {
				amax = x
			}
		}
		c := a[i*n+i]
		re, im := real(c), imag(c)
		ar[i*n+i], ai[i*n+i] = re, 0
		nan += (re - re) + (im - im)
		if x := math.Abs(re); x > amax {
			amax = x
		}
	}
	if nan != 0 { // also true for NaN
		for i := 0; i < n; i++ {
			for j := 0; j <= i; j++ {
				c := a[i*n+j]
				if !isFinite(real(c)) || !isFinite(imag(c)) {
					return 0, fmt.Errorf("eigh: a[%d] = A[%d][%d] = %v is not finite", i*n+j, i, j, c)
				}
			}
		}
		panic("eigh: internal error: non-finite input not located")
	}
	return amax, nil
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// scaleLower multiplies the lower triangle of the working matrix by s.
func (ws *Workspace) scaleLower(s float64) {
	n := ws.n
	for i := 0; i < n; i++ {
		r := ws.ar[i*n : i*n+i+1]
		m := ws.ai[i*n : i*n+len(r)]
		for j := range r {
			r[j] *= s
			m[j] *= s
		}
	}
}
