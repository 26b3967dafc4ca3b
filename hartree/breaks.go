package hartree

import (
	"context"
	"math"
	"sort"

	"lamina/bands"
	"lamina/internal/par"
)

// Band crossings at the edge of the filled sea. Where the two bands either side of half filling
// (b = N−1 and b = N) cross (or nearly cross) at some |k|, the occupied-state weights Σ_{b<N} w_bl
// jump (or change abruptly) there, because the state that belongs to the filled half changes
// character. A Gauss-Legendre panel across such a point would make the integral, and hence the
// self-consistent map, jump whenever the crossing moves past a node. The crossing points are
// therefore located and every panel that holds one is re-integrated on sub-panels graded
// geometrically towards it.

// breakFrac is the ratio of the gap minimum to its surroundings below which a minimum of
// E_N − E_{N−1} is treated as a crossing.
const breakFrac = 0.02

// gradeLevels and gradeRatio set the geometric grading towards a crossing: sub-panel widths fall
// by gradeRatio per level down to gradeRatio^-gradeLevels of the interval.
const (
	gradeLevels = 7
	gradeRatio  = 4.0
)

// findBreaks returns the |k| of crossings between bands N−1 and N along direction a, from the
// line data, polished by golden-section minimisation of the gap on the true bands.
func (pl *polar) findBreaks(ln *line, a int) []float64 {
	dim, nk := pl.dim, len(pl.k)
	n := dim / 2
	g := func(i int) float64 { return ln.e[i*dim+n] - ln.e[i*dim+n-1] }
	t := func(i int) float64 { return ln.slope[i*dim+n] - ln.slope[i*dim+n-1] }
	kAt := func(i int) float64 {
		if i == 0 {
			return 0
		}
		return pl.k[i-1]
	}
	w := pl.work[0]
	th := pl.thetas[a]
	gap := func(k float64) float64 {
		if err := w.diag(pl.center, k, th, false); err != nil {
			return math.NaN()
		}
		return w.w[n] - w.w[n-1]
	}
	var out []float64
	seen := func(k float64) bool {
		for _, x := range out {
			if math.Abs(x-k) <= 1e-9*math.Max(k, 1e-9) {
				return true
			}
		}
		return false
	}
	for i := 0; i < nk; i++ {
		// A minimum of the gap lies in [k_i, k_{i+1}] if it decreases at the left node and
		// increases at the right one; a kink (true crossing) shows as a slope sign change too.
		if !(t(i) < 0 && t(i+1) > 0) {
			continue
		}
		lo, hi := kAt(i), kAt(i+1)
		km, gm := pl.extremum(gap, lo, hi, true)
		if math.IsNaN(gm) {
			continue
		}
		ref := math.Max(g(i), g(i+1))
		if gm < breakFrac*ref && km > lo && km < hi && !seen(km) {
			out = append(out, km)
		}
	}
	sort.Float64s(out)
	return out
}

// gradedNodes appends Gauss-Legendre nodes and weights (for ∫ ... dk, no k factor) covering
// [a, b], graded towards each cut inside or at the ends of the interval.
func (pl *polar) gradedNodes(ks, ws []float64, a, b float64, cuts []float64) ([]float64, []float64) {
	pts := []float64{a}
	for _, c := range cuts {
		if c > a && c < b {
			pts = append(pts, c)
		}
	}
	pts = append(pts, b)
	isCut := func(x float64) bool {
		for _, c := range cuts {
			if c == x {
				return true
			}
		}
		return false
	}
	for j := 0; j+1 < len(pts); j++ {
		p, q := pts[j], pts[j+1]
		left, right := isCut(p), isCut(q)
		switch {
		case left && right:
			m := (p + q) / 2
			ks, ws = pl.gradeToward(ks, ws, p, m)
			ks, ws = pl.gradeToward(ks, ws, q, m)
		case left:
			ks, ws = pl.gradeToward(ks, ws, p, q)
		case right:
			ks, ws = pl.gradeToward(ks, ws, q, p)
		default:
			ks, ws = pl.rule.Map(ks, ws, p, q)
		}
	}
	return ks, ws
}

// gradeToward covers the interval between c and e with sub-panels shrinking geometrically
// towards c.
func (pl *polar) gradeToward(ks, ws []float64, c, e float64) ([]float64, []float64) {
	h := e - c
	for j := 0; j < gradeLevels; j++ {
		x1 := c + h*math.Pow(gradeRatio, -float64(j+1))
		x2 := c + h*math.Pow(gradeRatio, -float64(j))
		ks, ws = pl.rule.Map(ks, ws, math.Min(x1, x2), math.Max(x1, x2))
	}
	x := c + h*math.Pow(gradeRatio, -gradeLevels)
	return pl.rule.Map(ks, ws, math.Min(c, x), math.Max(c, x))
}

// seaPanels recomputes the sea term of every panel of direction a that contains a crossing of
// the current or the reference bands, and returns the correction to add to the base-node sum:
// minus the base nodes' share of those panels plus the graded integral.
func (pl *polar) seaCorrections(ctx context.Context, lines []line, seaNode []float64) error {
	type job struct {
		a, panel int
		cuts     []float64
	}
	var jobs []job
	for a := range lines {
		all := append(append([]float64(nil), lines[a].breaks...), pl.refBreaks[a]...)
		sort.Float64s(all)
		for pi, pn := range pl.panels {
			var cuts []float64
			for _, c := range all {
				if c > pn.a && c < pn.b {
					cuts = append(cuts, c)
				}
			}
			if len(cuts) > 0 {
				jobs = append(jobs, job{a, pi, cuts})
			}
		}
	}
	if len(jobs) == 0 {
		return nil
	}
	nl, nk, dim := pl.nl, len(pl.k), pl.dim
	occ := dim / 2
	res := make([][]float64, len(jobs))
	err := par.For(ctx, len(pl.work), len(jobs), func(wi, ji int) error {
		jb := jobs[ji]
		pn := pl.panels[jb.panel]
		w := pl.work[wi]
		ks, ws := pl.gradedNodes(nil, nil, pn.a, pn.b, jb.cuts)
		acc := make([]float64, nl)
		th := pl.thetas[jb.a]
		cur := make([]float64, nl)
		for q, k := range ks {
			clear(cur)
			if err := w.diag(pl.center, k, th, true); err != nil {
				return err
			}
			for b := range occ {
				wl := bands.LayerWeights(w.wl, w.z[b*dim:(b+1)*dim])
				for l := range nl {
					cur[l] += wl[l]
				}
			}
			saved := w.ham
			w.ham = pl.refHam
			err := w.diag(pl.center, k, th, true)
			w.ham = saved
			if err != nil {
				return err
			}
			drift := 0.0
			for b := range occ {
				wl := bands.LayerWeights(w.wl, w.z[b*dim:(b+1)*dim])
				for l := range nl {
					cur[l] -= wl[l]
				}
			}
			for l := range nl {
				drift += cur[l]
			}
			drift /= float64(nl)
			for l := range nl {
				acc[l] += ws[q] * k * (cur[l] - drift)
			}
		}
		res[ji] = acc
		return nil
	})
	if err != nil {
		return err
	}
	for ji, jb := range jobs {
		pn := pl.panels[jb.panel]
		ln := &lines[jb.a]
		for l := range nl {
			base := 0.0
			for i := pn.i0; i < pn.i1; i++ {
				b := (jb.a*nk + i) * nl
				d := 0.0
				for m := range nl {
					d += seaNode[b+m] - pl.ref[b+m]
				}
				d /= float64(nl)
				base += pl.wk[i] * (seaNode[b+l] - pl.ref[b+l] - d)
			}
			ln.sea[l] += res[ji][l] - base
		}
	}
	return nil
}

// breaksIn returns the crossings of direction a (current and reference) inside (k1, k2).
func (pl *polar) breaksIn(ln *line, a int, k1, k2 float64) []float64 {
	var out []float64
	for _, set := range [][]float64{ln.breaks, pl.refBreaks[a]} {
		for _, c := range set {
			if c > k1 && c < k2 {
				out = append(out, c)
			}
		}
	}
	sort.Float64s(out)
	// Drop duplicates (the reference and the current bands may cross at the same point).
	j := 0
	for i, c := range out {
		if i == 0 || c-out[j-1] > 1e-12*c {
			out[j] = c
			j++
		}
	}
	return out[:j]
}
