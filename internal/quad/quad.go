// Package quad provides Gauss-Legendre rules and a scalar root finder for the k-space integrals.
package quad

import (
	"errors"
	"math"
)

// Rule is a Gauss-Legendre rule on [-1, 1].
type Rule struct {
	X, W []float64
}

// GaussLegendre returns the n-point Gauss-Legendre rule (n >= 1), computed by Newton iteration on
// the Legendre recurrence (Golub & Welsch give the same nodes as eigenvalues; Abramowitz & Stegun
// Table 25.4 lists them). Exact for polynomials of degree 2n-1.
func GaussLegendre(n int) Rule {
	if n < 1 {
		n = 1
	}
	r := Rule{X: make([]float64, n), W: make([]float64, n)}
	for i := 0; i < (n+1)/2; i++ {
		x := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for it := 0; it < 100; it++ {
			p0, p1 := 1.0, x
			if n == 1 {
				p1, p0 = x, 1
			}
			for k := 2; k <= n; k++ {
				p0, p1 = p1, ((2*float64(k)-1)*x*p1-(float64(k)-1)*p0)/float64(k)
			}
			pn := p1
			if n == 1 {
				pn, p0 = x, 1
			}
			dp = float64(n) * (x*pn - p0) / (x*x - 1)
			dx := pn / dp
			x -= dx
			if math.Abs(dx) < 1e-16 {
				break
			}
		}
		r.X[i], r.X[n-1-i] = -x, x
		w := 2 / ((1 - x*x) * dp * dp)
		r.W[i], r.W[n-1-i] = w, w
	}
	return r
}

// Map returns the rule's nodes and weights mapped to [a, b], appended to xs and ws.
func (r Rule) Map(xs, ws []float64, a, b float64) ([]float64, []float64) {
	h, c := (b-a)/2, (a+b)/2
	for i := range r.X {
		xs = append(xs, c+h*r.X[i])
		ws = append(ws, h*r.W[i])
	}
	return xs, ws
}

// ErrNoBracket is returned by Brent when f(a) and f(b) have the same sign.
var ErrNoBracket = errors.New("root not bracketed")

// Brent finds a root of f in [a, b] where f(a) and f(b) differ in sign, to within xtol, by
// Brent's method (Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4). fa and
// fb are f(a) and f(b), passed in to save evaluations.
func Brent(f func(float64) float64, a, b, fa, fb, xtol float64, maxIter int) (float64, error) {
	if fa == 0 {
		return a, nil
	}
	if fb == 0 {
		return b, nil
	}
	if (fa > 0) == (fb > 0) {
		return 0, ErrNoBracket
	}
	c, fc := a, fa
	d := b - a
	e := d
	for it := 0; it < maxIter; it++ {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := 2*1e-16*math.Abs(b) + xtol/2
		m := (c - b) / 2
		if math.Abs(m) <= tol || fb == 0 {
			return b, nil
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p, q = 2*m*s, 1-s
			} else {
				qq, r := fa/fc, fb/fc
				p = s * (2*m*qq*(qq-r) - (b-a)*(r-1))
				q = (qq - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if 2*p < math.Min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e, d = d, p/q
			} else {
				d, e = m, m
			}
		} else {
			d, e = m, m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else {
			b += math.Copysign(tol, m)
		}
		fb = f(b)
	}
	return b, nil
}
