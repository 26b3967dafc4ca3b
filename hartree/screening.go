package hartree

import (
	"context"
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/mat"

	"lamina/lattice"
)

// rpaTable is the angle-averaged Lindhard function of a stack tabulated on |q|.
type rpaTable struct {
	q  []float64   // ascending, q[0] = 0
	pi [][]float64 // N×N row-major per q, 1/(eV nm²)
	n  int
}

// at returns Π(q) by linear interpolation (constant beyond the last point).
func (t *rpaTable) at(dst []float64, q float64) {
	i := 0
	for i+1 < len(t.q) && t.q[i+1] < q {
		i++
	}
	if i+1 >= len(t.q) {
		copy(dst, t.pi[len(t.q)-1])
		return
	}
	f := (q - t.q[i]) / (t.q[i+1] - t.q[i])
	f = math.Max(0, math.Min(1, f))
	for x := range dst {
		dst[x] = (1-f)*t.pi[i][x] + f*t.pi[i+1][x]
	}
}

var rpaCache = struct {
	sync.Mutex
	m map[string]*rpaTable
}{m: map[string]*rpaTable{}}

// rpaTableFor tabulates Π of the neutral, unbiased, non-interacting stack at temperature tK on
// |q| from 0 to qmax (geometric spacing from qmax/2000, 48 points), cached per problem.
func rpaTableFor(ctx context.Context, st lattice.Stack, p lattice.Params, tK, qmax float64, workers int) (*rpaTable, error) {
	key := fmt.Sprintf("%s|%+v|%g|%g", st, p, tK, qmax)
	rpaCache.Lock()
	t, ok := rpaCache.m[key]
	rpaCache.Unlock()
	if ok {
		return t, nil
	}
	const nq = 48
	qs := []float64{0}
	q0 := qmax / 2000
	r := math.Pow(qmax/q0, 1/float64(nq-2))
	for i := range nq - 1 {
		qs = append(qs, q0*math.Pow(r, float64(i)))
	}
	qs[len(qs)-1] = qmax
	hv := p.HbarV()
	mu, err := NonInteractingMu(ctx, st, p, nil, 0, LindhardOptions{T: tK, Cutoff: math.Max(3, 1.05*qmax*hv), Workers: workers})
	if err != nil {
		return nil, fmt.Errorf("hartree: RPA screening: %w", err)
	}
	pis, err := LindhardTable(ctx, st, p, nil, qs, LindhardOptions{T: tK, Mu: mu, Cutoff: math.Max(3, 1.05*qmax*hv), Workers: workers})
	if err != nil {
		return nil, fmt.Errorf("hartree: RPA screening: %w", err)
	}
	t = &rpaTable{q: qs, pi: pis, n: st.Layers()}
	rpaCache.Lock()
	rpaCache.m[key] = t
	rpaCache.Unlock()
	return t, nil
}

// screenedPair returns W_ll'(q) in eV nm² for q > 0: V for Unscreened, V q/(q + q_TF) for
// ThomasFermi, and [1 + V Π]⁻¹ V (N×N) for RPA.
func (g *hfGrid) screenedPair(l, lp int) func(q float64) float64 {
	in := g.mf.Interaction
	d := g.mf.Device.Params.D
	dl := abs(l - lp)
	switch in.Screening {
	case Unscreened:
		return func(q float64) float64 { return in.V(q, dl, d) }
	case ThomasFermi:
		return func(q float64) float64 { return in.V(q, dl, d) * q / (q + in.QTF) }
	}
	n := g.n
	pi := make([]float64, n*n)
	v := mat.NewDense(n, n, nil)
	a := mat.NewDense(n, n, nil)
	var w mat.Dense
	return func(q float64) float64 {
		g.rpa.at(pi, q)
		for i := range n {
			for j := range n {
				v.Set(i, j, in.V(q, abs(i-j), d))
			}
		}
		// a = 1 + V Π
		a.Mul(v, mat.NewDense(n, n, pi))
		for i := range n {
			a.Set(i, i, a.At(i, i)+1)
		}
		if err := w.Solve(a, v); err != nil {
			return math.NaN() // reported by the kernel check (non-finite values are rejected)
		}
		return w.At(l, lp)
	}
}
