package eigh

import (
	"fmt"
	"math"
)

const (
	// epsQL is the unit roundoff 2^-53 used in the deflation test.
	epsQL = 0x1p-53
	// maxIterQL is the number of QL iterations allowed per eigenvalue.
	maxIterQL = 50
)

// pythag returns sqrt(a² + b²) without overflow or harmful underflow: the plain formula where
// a² + b² is safely inside the range of float64, math.Hypot otherwise. The QL sweeps write the
// fast path out inline because this function exceeds the compiler's inlining budget.
func pythag(a, b float64) float64 {
	s := a*a + b*b
	if s > 0x1p-900 && s < 0x1p+900 {
		return math.Sqrt(s)
	}
	return hypot(a, b)
}

//go:noinline
func hypot(a, b float64) float64 { return math.Hypot(a, b) }

// tnorm returns max_i(|d_i| + |e_i| + |e_{i-1}|), the ∞-norm of the tridiagonal matrix.
func tnorm(d, e []float64) float64 {
	t := 0.0
	prev := 0.0
	e = e[:len(d)]
	for i, x := range d {
		a := math.Abs(e[i])
		t = max(t, math.Abs(x)+a+prev)
		prev = a
	}
	return t
}

// tqlVectors computes the eigenvalues (into d, unordered) and eigenvectors of the symmetric
// tridiagonal matrix with diagonal d and off-diagonal e (e[i] = T[i][i+1], e[n-1] = 0) by the
// implicit QL method with Wilkinson shifts. The eigenvectors are the columns of q
// (q[k*n+i] = component k of eigenvector i). cs and sn (length n) hold the rotations of one
// sweep, which are applied to q after the sweep. e is destroyed.
func tqlVectors(d, e, q, cs, sn []float64, n int) error {
	d = d[:n]
	e = e[:n]
	q = q[:n*n]
	cs = cs[:n]
	sn = sn[:n]
	clear(q)
	for i := 0; i < n; i++ {
		q[i*n+i] = 1
	}
	// Off-diagonals below small are dropped even when the neighbouring diagonal entries are
	// zero; that changes T by far less than rounding does.
	small := tnorm(d, e) * epsQL * epsQL
	for l := 0; l < n; l++ {
		for iter := 0; ; iter++ {
			m := l
			for ; m < n-1; m++ {
				a := math.Abs(e[m])
				if a <= epsQL*(math.Abs(d[m])+math.Abs(d[m+1])) || a <= small {
					break
				}
			}
			if m == l {
				break
			}
			if iter == maxIterQL {
				return fmt.Errorf("eigh: QL iteration did not converge for eigenvalue %d of %d after %d iterations", l, n, iter)
			}
			// Wilkinson shift from the leading 2×2 block of the unreduced block l..m.
			g := (d[l+1] - d[l]) / (2 * e[l])
			r := pythag(g, 1)
			g = d[m] - d[l] + e[l]/(g+math.Copysign(r, g))
			s, c, p := 1.0, 1.0, 0.0
			i := m - 1
			for ; i >= l; i-- {
				f := s * e[i]
				b := c * e[i]
				// r = pythag(f, g), written out because the call is not inlined.
				r2 := f*f + g*g
				r = math.Sqrt(r2)
				if !(r2 > 0x1p-900 && r2 < 0x1p+900) {
					r = hypot(f, g)
				}
				e[i+1] = r
				if r == 0 {
					// Early deflation: the block splits at i+1.
					d[i+1] -= p
					e[m] = 0
					break
				}
				s = f / r
				c = g / r
				g = d[i+1] - p
				r = (d[i]-g)*s + 2*c*b
				p = s * r
				d[i+1] = g + p
				g = c*r - b
				cs[i], sn[i] = c, s
			}
			rotate(q, cs, sn, n, i+1, m)
			if r == 0 && i >= l {
				continue
			}
			d[l] -= p
			e[l] = g
			e[m] = 0
		}
	}
	return nil
}

// rotate applies the plane rotations G_i of one QL sweep, i = hi-1 down to lo, to the columns
// of q: (x, y) = (q[k][i], q[k][i+1]) becomes (c x - s y, s x + c y). Each row is processed
// with the rotated column carried in a register; four rows at a time for instruction-level
// parallelism.
func rotate(q, cs, sn []float64, n, lo, hi int) {
	if lo >= hi {
		return
	}
	cs = cs[lo:hi]
	sn = sn[lo:hi]
	sn = sn[:len(cs)]
	w := hi + 1 - lo
	k := 0
	for ; k+3 < n; k += 4 {
		qa := q[k*n+lo : k*n+lo+w]
		qb := q[(k+1)*n+lo : (k+1)*n+lo+w]
		qc := q[(k+2)*n+lo : (k+2)*n+lo+w]
		qd := q[(k+3)*n+lo : (k+3)*n+lo+w]
		qb = qb[:len(qa)]
		qc = qc[:len(qa)]
		qd = qd[:len(qa)]
		j := len(cs)
		ya, yb, yc, yd := qa[j], qb[j], qc[j], qd[j]
		for i := j - 1; i >= 0; i-- {
			c, s := cs[i], sn[i]
			xa, xb, xc, xd := qa[i], qb[i], qc[i], qd[i]
			qa[i+1] = s*xa + c*ya
			qb[i+1] = s*xb + c*yb
			qc[i+1] = s*xc + c*yc
			qd[i+1] = s*xd + c*yd
			ya = c*xa - s*ya
			yb = c*xb - s*yb
			yc = c*xc - s*yc
			yd = c*xd - s*yd
		}
		qa[0], qb[0], qc[0], qd[0] = ya, yb, yc, yd
	}
	for ; k < n; k++ {
		qa := q[k*n+lo : k*n+lo+w]
		ya := qa[len(cs)]
		for i := len(cs) - 1; i >= 0; i-- {
			c, s := cs[i], sn[i]
			xa := qa[i]
			qa[i+1] = s*xa + c*ya
			ya = c*xa - s*ya
		}
		qa[0] = ya
	}
}

// tqlValues computes the eigenvalues (into d, unordered) of the symmetric tridiagonal matrix
// with diagonal d and off-diagonal e by the root-free QL method of Pal, Walker and Kahan with
// Wilkinson shifts, which works on the squares of the off-diagonal. e is destroyed.
//
// The matrix is first scaled by a power of two to norm about 1, so that the cubes and squares
// formed below stay in range.
func tqlValues(d, e []float64, n int) error {
	d = d[:n]
	e = e[:n]
	nrm := tnorm(d, e)
	if nrm == 0 {
		return nil
	}
	_, exp := math.Frexp(nrm)
	sc := math.Ldexp(1, -exp)
	for i := range d {
		d[i] *= sc
		x := e[i] * sc
		e[i] = x * x
	}
	const eps2 = epsQL * epsQL
	// Squared off-diagonals below small2 (that is, |e| < 2^-106·||T||) are dropped.
	const small2 = eps2 * eps2
	for l := 0; l < n; l++ {
		for iter := 0; ; iter++ {
			m := l
			for ; m < n-1; m++ {
				a := e[m]
				if a <= eps2*math.Abs(d[m])*math.Abs(d[m+1]) || a <= small2 {
					break
				}
			}
			if m == l {
				break
			}
			if iter == maxIterQL {
				return fmt.Errorf("eigh: QL iteration did not converge for eigenvalue %d of %d after %d iterations", l, n, iter)
			}
			rte := math.Sqrt(e[l])
			p := d[l]
			sigma := (d[l+1] - p) / (2 * rte)
			r := pythag(sigma, 1)
			sigma = p - rte/(sigma+math.Copysign(r, sigma))
			c, s := 1.0, 0.0
			gamma := d[m] - sigma
			p = gamma * gamma
			for i := m - 1; i >= l; i-- {
				bb := e[i]
				r := p + bb
				if i != m-1 {
					e[i+1] = s * r
				}
				oldc := c
				c = p / r
				s = bb / r
				oldgam := gamma
				alpha := d[i]
				// gamma = c (alpha - sigma) - s oldgam and p = gamma²/c, rearranged so that
				// only one division lies on the dependency chain from one step to the next.
				num := p*(alpha-sigma) - bb*oldgam
				gamma = num / r
				d[i+1] = oldgam + (alpha - gamma)
				if den := r * p; den > 0x1p-900 {
					p = num * num / den
				} else if c != 0 {
					p = gamma * gamma / c
				} else {
					p = oldc * bb
				}
			}
			e[l] = s * p
			d[l] = sigma + gamma
			e[m] = 0
		}
	}
	inv := 1 / sc
	for i := range d {
		d[i] *= inv
	}
	return nil
}
