package hartree

import (
	"context"
	"fmt"
	"math"
	"sort"

	"lamina/bands"
	"lamina/internal/par"
	"lamina/internal/quad"
)

// thermalNodes holds, for T > 0 and chemical potentials in [lo, hi], the pocket term split into a
// part independent of μ (k-ranges where f − θ(b<N) is ±1 to double precision) and quadrature
// nodes where the Fermi function is resolved (band energy within fermiTail k_B T of [lo, hi],
// sub-panels spanning at most thermalSpan k_B T).
type thermalNodes struct {
	fixedN  float64   // carrier density of the μ-independent part (1/nm²)
	fixedNl []float64 // its layer densities
	a       []int     // direction per fine node
	band    []int     // band per fine node
	wk      []float64 // weight per fine node (k dk and angular weight)
	e       []float64 // band energy per fine node
	w       []float64 // [node][layer] weights of that band
	lo, hi  float64
	kT      float64
}

const (
	// fermiTail is the number of k_B T beyond which f or 1 − f is below e^-36 ≈ 2e-16.
	fermiTail = 36.0
	// thermalSpan is the largest energy span, in k_B T, of one 8-point Gauss-Legendre sub-panel
	// across the Fermi level (the Fermi function is then integrated to about 1e-9).
	thermalSpan = 3.0
)

type segment struct {
	a, band int
	k1, k2  float64
	sign    float64 // μ-independent part: +1 or −1; 0 marks a fine (Fermi window) segment
	m       int     // sub-panels for a fine segment
}

// buildThermal prepares the T > 0 pocket integration for μ in [lo, hi].
func (pl *polar) buildThermal(ctx context.Context, lines []line, lo, hi, kT float64) (*thermalNodes, error) {
	dim := pl.dim
	l1, l2 := lo-fermiTail*kT, hi+fermiTail*kT
	var segs []segment
	for a := range lines {
		ln := &lines[a]
		for b := range dim {
			p1, below1, err := pl.crossings(ln, a, b, l1, false)
			if err != nil {
				return nil, err
			}
			p2, below2, err := pl.crossings(ln, a, b, l2, false)
			if err != nil {
				return nil, err
			}
			// Merge the toggle points of both levels; classify each piece by its midpoint state.
			type ev struct {
				k     float64
				level int
			}
			var evs []ev
			for _, k := range p1 {
				evs = append(evs, ev{k, 1})
			}
			for _, k := range p2 {
				evs = append(evs, ev{k, 2})
			}
			sort.Slice(evs, func(i, j int) bool { return evs[i].k < evs[j].k })
			in1, in2 := below1, below2 // E < l1, E < l2
			from := 0.0
			emit := func(to float64) {
				if to <= from {
					return
				}
				var sign float64
				fine := false
				switch {
				case in1: // E < l1 <= μ: f = 1
					if b >= dim/2 {
						sign = 1
					}
				case !in2: // E > l2 >= μ: f = 0
					if b < dim/2 {
						sign = -1
					}
				default:
					fine = true
				}
				if fine {
					segs = append(segs, segment{a: a, band: b, k1: from, k2: to, m: pl.subpanels(ln, b, from, to, kT)})
				} else if sign != 0 {
					segs = append(segs, segment{a: a, band: b, k1: from, k2: to, sign: sign})
				}
			}
			for _, e := range evs {
				emit(e.k)
				from = e.k
				if e.level == 1 {
					in1 = !in1
				} else {
					in2 = !in2
				}
			}
			emit(pl.kEnd())
		}
	}
	return pl.integrateSegments(ctx, segs, lo, hi, kT)
}

// subpanels returns how many equal sub-panels of [k1, k2] keep each band's energy span below
// thermalSpan k_B T, from the largest node slope in the range.
func (pl *polar) subpanels(ln *line, b int, k1, k2, kT float64) int {
	dim := pl.dim
	smax := 0.0
	for i := 0; i <= len(pl.k); i++ {
		k := 0.0
		if i > 0 {
			k = pl.k[i-1]
		}
		if i+1 <= len(pl.k) && pl.k[i] < k1 {
			continue
		}
		if k > k2 && i > 0 {
			break
		}
		smax = math.Max(smax, math.Abs(ln.slope[i*dim+b]))
	}
	m := int(math.Ceil(smax * (k2 - k1) / (thermalSpan * kT)))
	return max(1, min(m, 4096))
}

func (pl *polar) integrateSegments(ctx context.Context, segs []segment, lo, hi, kT float64) (*thermalNodes, error) {
	nl, dim := pl.nl, pl.dim
	rule := quad.GaussLegendre(glPoints)
	np := len(rule.X)
	// Work items: fixed segments are cut on the base panels; fine segments into m sub-panels.
	type item struct {
		seg    int
		k1, k2 float64
	}
	var items []item
	for si, s := range segs {
		if s.sign != 0 {
			for _, pn := range pl.panels {
				a, b := math.Max(pn.a, s.k1), math.Min(pn.b, s.k2)
				if b > a {
					items = append(items, item{si, a, b})
				}
			}
			continue
		}
		for j := range s.m {
			items = append(items, item{si, s.k1 + (s.k2-s.k1)*float64(j)/float64(s.m), s.k1 + (s.k2-s.k1)*float64(j+1)/float64(s.m)})
		}
	}
	tn := &thermalNodes{lo: lo, hi: hi, kT: kT, fixedNl: make([]float64, nl)}
	nodeN := len(items) * np
	ks, ws := make([]float64, nodeN), make([]float64, nodeN)
	wl := make([]float64, nodeN*nl)
	es := make([]float64, nodeN)
	err := par.For(ctx, len(pl.work), nodeN, func(wi, idx int) error {
		it := items[idx/np]
		q := idx % np
		s := segs[it.seg]
		k := (it.k1+it.k2)/2 + (it.k2-it.k1)/2*rule.X[q]
		w := pl.work[wi]
		if err := w.diag(pl.center, k, pl.thetas[s.a], true); err != nil {
			return err
		}
		ks[idx] = k
		ws[idx] = pl.wTheta * (it.k2 - it.k1) / 2 * rule.W[q] * k
		es[idx] = w.w[s.band]
		copy(wl[idx*nl:], bands.LayerWeights(w.wl, w.z[s.band*dim:(s.band+1)*dim]))
		return nil
	})
	if err != nil {
		return nil, err
	}
	for idx := range nodeN {
		s := segs[items[idx/np].seg]
		if s.sign != 0 {
			tn.fixedN += s.sign * ws[idx]
			for l := range nl {
				tn.fixedNl[l] += s.sign * ws[idx] * wl[idx*nl+l]
			}
			continue
		}
		tn.a = append(tn.a, s.a)
		tn.band = append(tn.band, s.band)
		tn.wk = append(tn.wk, ws[idx])
		tn.e = append(tn.e, es[idx])
		tn.w = append(tn.w, wl[idx*nl:(idx+1)*nl]...)
	}
	_ = ks
	return tn, nil
}

func fermi(x, kT float64) float64 {
	y := x / kT
	if y > 40 {
		return 0
	}
	if y < -40 {
		return 1
	}
	return 1 / (1 + math.Exp(y))
}

func (tn *thermalNodes) occ(i int, mu float64, dim int) float64 {
	o := fermi(tn.e[i]-mu, tn.kT)
	if tn.band[i] < dim/2 {
		o--
	}
	return o
}

// count returns the carrier density at μ (1/nm²).
func (tn *thermalNodes) count(mu float64, dim int) float64 {
	s := tn.fixedN
	for i, wk := range tn.wk {
		s += wk * tn.occ(i, mu, dim)
	}
	return s
}

// densities returns the pocket layer densities at μ (1/nm²).
func (tn *thermalNodes) densities(mu float64, dim, nl int) []float64 {
	out := append([]float64(nil), tn.fixedNl...)
	for i, wk := range tn.wk {
		o := tn.occ(i, mu, dim)
		if o == 0 {
			continue
		}
		for l := range nl {
			out[l] += wk * o * tn.w[i*nl+l]
		}
	}
	return out
}

// solveMuThermal finds μ with count(μ) = n at temperature kT (eV), starting from the T = 0
// solution mu0 and widening the window of resolved energies until it brackets the root.
func (pl *polar) solveMuThermal(ctx context.Context, lines []line, n, mu0, kT float64) (float64, *thermalNodes, error) {
	half := 4 * kT
	for range 8 {
		tn, err := pl.buildThermal(ctx, lines, mu0-half, mu0+half, kT)
		if err != nil {
			return 0, nil, err
		}
		f := func(mu float64) float64 { return tn.count(mu, pl.dim) - n }
		a, b := mu0-half, mu0+half
		fa, fb := f(a), f(b)
		if (fa > 0) != (fb > 0) || fa == 0 || fb == 0 {
			mu, err := quad.Brent(f, a, b, fa, fb, 1e-15*math.Max(1, math.Abs(mu0)), 200)
			if err != nil {
				return 0, nil, err
			}
			return mu, tn, nil
		}
		half *= 4
	}
	return 0, nil, fmt.Errorf("hartree: could not bracket the chemical potential for n = %g /nm² at k_B T = %g eV", n, kT)
}
