package quad

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Gauss-Legendre nodes for n = 5 from Abramowitz & Stegun, Table 25.4 (from memory; also
// 0, ±sqrt(5 ∓ 2 sqrt(10/7))/3 in closed form).
func TestGaussLegendre(t *testing.T) {
	r := GaussLegendre(5)
	require.Len(t, r.X, 5)
	x1 := math.Sqrt(5-2*math.Sqrt(10.0/7)) / 3
	x2 := math.Sqrt(5+2*math.Sqrt(10.0/7)) / 3
	assert.InDelta(t, -x2, r.X[0], 1e-15)
	assert.InDelta(t, -x1, r.X[1], 1e-15)
	assert.InDelta(t, 0, r.X[2], 1e-15)
	assert.InDelta(t, 128.0/225, r.W[2], 1e-15)
	// Exact for degree 2n-1 polynomials: ∫ x^8 dx on [-1,1] = 2/9 with n = 5.
	for _, n := range []int{1, 2, 3, 5, 8, 16} {
		r := GaussLegendre(n)
		for deg := 0; deg <= 2*n-1; deg++ {
			s := 0.0
			for i := range r.X {
				s += r.W[i] * math.Pow(r.X[i], float64(deg))
			}
			want := 0.0
			if deg%2 == 0 {
				want = 2 / float64(deg+1)
			}
			assert.InDelta(t, want, s, 1e-14, "n=%d deg=%d", n, deg)
		}
	}
}

func TestBrent(t *testing.T) {
	f := func(x float64) float64 { return math.Cos(x) - x }
	x, err := Brent(f, 0, 1, f(0), f(1), 1e-14, 100)
	require.NoError(t, err)
	assert.InDelta(t, 0.7390851332151607, x, 1e-13) // Dottie number (well known)
	_, err = Brent(f, 0, 0.5, f(0), f(0.5), 1e-14, 100)
	assert.ErrorIs(t, err, ErrNoBracket)
}
