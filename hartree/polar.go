package hartree

import (
	"context"
	"fmt"
	"math"
	"sort"

	"lamina/bands"
	"lamina/internal/eigh"
	"lamina/internal/par"
	"lamina/internal/quad"
	"lamina/lattice"
)

// polar integrates over the k-plane around one valley of the continuum model in polar
// coordinates: Gauss-Legendre panels in |k| (geometric from the valley point out to some 20 eV,
// then an analytic 1/k³ tail unless a cutoff is set) and a midpoint rule in angle over one third of the circle
// (every stack is C3-symmetric about K). Both valleys give the same integrals because
// H_K'(kx, ky) = H_K(-kx, ky), so valley and spin enter as a degeneracy factor 4.
//
// The layer density is split as
//
//	n_l = g/(2π)² ∫ d²k { Σ_{b<N} [w_bl(k; U) − w⁰_bl(k)]  +  Σ_b [f(E_b − μ) − θ(b<N)] w_bl(k; U) } − c_l
//
// The first (sea) term has no Fermi surface and is integrated on the fixed panels; the second
// (pocket) term lives near the Fermi surface only and is integrated on intervals cut exactly at
// the Fermi-level crossings (T = 0) or on panels refined to resolve k_B T. w⁰ is the neutral,
// unbiased stack and c_l its own pocket term, so that n_l = 0 for it.
type polar struct {
	st        lattice.Stack
	p         lattice.Params
	nl        int
	dim       int
	thetas    []float64
	wTheta    float64 // angular weight per direction, times g/(2π)²
	cutoff    float64 // 1/nm, +Inf for none
	panels    []panel
	k, wk     []float64 // base nodes and weights for ∫ ... k dk
	rule      quad.Rule
	dHx       []complex128 // ∂H/∂kx, ∂H/∂ky when the model is linear in k (continuum), else nil
	dHy       []complex128
	model     Model
	center    bands.KPoint // the valley point of the model (0 for the continuum model)
	rest      []restNode   // full-zone model: nodes of the zone outside the valley disks
	restRef   []float64    // reference Σ_{b<N} w⁰_bl at the rest nodes
	refHam    bands.Hamiltonian
	refBreaks [][]float64 // crossings of the reference bands per direction
	ref       []float64   // [angle][node][layer] Σ_{b<N} w⁰_bl
	refPk     []float64   // c_l
	mu0       float64     // chemical potential of the neutral unbiased stack
	work      []*polarWork
}

type panel struct {
	a, b   float64 // 1/nm
	i0, i1 int     // node range
}

type polarWork struct {
	ws  *eigh.Workspace
	h   []complex128
	w   []float64
	z   []complex128
	wl  []float64
	ham bands.Hamiltonian
	hp  []complex128 // scratch for numerical derivatives
	hm  []complex128
}

// line holds the base-node band data of one direction.
type line struct {
	e     []float64 // [node][band]
	slope []float64 // [node][band], dE/dk along the direction
	sea   []float64 // [layer], ∫ Σ_{b<N}(w − w0) k dk
	// breaks are the |k| where bands N−1 and N cross (see breaks.go).
	breaks []float64
}

const (
	glPoints  = 8
	panelGrow = 1.6
)

func newPolar(st lattice.Stack, p lattice.Params, model Model, cutoff float64, angles, workers int, forceAniso bool) (*polar, error) {
	h0, err := bands.NewContinuum(st, p, bands.K, nil)
	if err != nil {
		return nil, err
	}
	pl := &polar{st: st, p: p, nl: st.Layers(), dim: st.Orbitals(), rule: quad.GaussLegendre(glPoints), model: model}
	if angles <= 0 {
		angles = 24
	}
	if model == Continuum && h0.Isotropic() && !forceAniso {
		angles = 1
	}
	pl.thetas = make([]float64, angles)
	for j := range pl.thetas {
		pl.thetas[j] = (float64(j) + 0.5) * (2 * math.Pi / 3) / float64(angles)
	}
	g := 4.0 // spin x valley
	pl.wTheta = (2 * math.Pi / float64(angles)) * g / (4 * math.Pi * math.Pi)

	// Radial panels: geometric from kS·1e-4 up to kS·60, then the tail. kS is the momentum of
	// the largest band scale (γ1 or 50 meV, whichever is larger).
	hv := p.HbarV()
	scale := math.Max(math.Max(math.Abs(p.Gamma1), 0.05), math.Abs(p.DeltaPrime))
	kS := scale / hv
	pl.cutoff = math.Inf(1)
	if cutoff > 0 {
		pl.cutoff = cutoff / hv
	}

	var zone *bands.FullZone
	if model == FullZone {
		// Disks around K and K' up to (just under) half their distance |K| = 4π/(3a); the rest of
		// the zone is covered by restNodes.
		if zone, err = bands.NewFullZone(st, p, nil); err != nil {
			return nil, err
		}
		kx, ky := zone.ValleyPoint(bands.K)
		pl.center = bands.KPoint{X: kx, Y: ky}
		rmax := 0.499 * math.Hypot(kx, ky)
		pl.cutoff = math.Min(pl.cutoff, rmax)
	}
	edges := []float64{0, kS * 1e-4}
	for edges[len(edges)-1] < kS*60 && edges[len(edges)-1] < pl.cutoff {
		edges = append(edges, edges[len(edges)-1]*panelGrow)
	}
	if !math.IsInf(pl.cutoff, 1) {
		for edges[len(edges)-1] > pl.cutoff {
			edges = edges[:len(edges)-1]
		}
		edges = append(edges, pl.cutoff)
	}
	for i := 0; i+1 < len(edges); i++ {
		pl.addPanel(panel{a: edges[i], b: edges[i+1]})
	}
	if math.IsInf(pl.cutoff, 1) {
		// Beyond K = kS·60 (some 20 eV) the sea integrand Σ_{b<N}(w_bl − w⁰_bl) falls as C_l/k³
		// (measured: k³Δw is constant to 1e-3 from k ≈ 10 kS on for every stacking and parameter
		// set), so ∫_K^∞ (C_l/k³) k dk = K² Δw(K): one node at K with weight K². Mapping the tail
		// to a finite interval instead would multiply the rounding noise of Δw at huge k by huge
		// weights.
		kt := edges[len(edges)-1]
		pl.k = append(pl.k, kt)
		pl.wk = append(pl.wk, kt*kt)
	}
	n := pl.dim
	if model == Continuum {
		pl.dHx = make([]complex128, n*n)
		pl.dHy = make([]complex128, n*n)
		m0 := make([]complex128, n*n)
		h0.At(m0, 0, 0)
		h0.At(pl.dHx, 1, 0)
		h0.At(pl.dHy, 0, 1)
		for i := range m0 {
			pl.dHx[i] -= m0[i]
			pl.dHy[i] -= m0[i]
		}
	} else {
		pl.rest = restNodes(zone, pl.cutoff)
	}
	pl.work = make([]*polarWork, par.Workers(workers, angles*len(pl.k)))
	for i := range pl.work {
		ws, err := eigh.NewWorkspace(n)
		if err != nil {
			return nil, err
		}
		pl.work[i] = &polarWork{ws: ws, h: make([]complex128, n*n), w: make([]float64, n), z: make([]complex128, n*n), wl: make([]float64, pl.nl),
			hp: make([]complex128, n*n), hm: make([]complex128, n*n)}
	}
	return pl, nil
}

func (pl *polar) addPanel(pn panel) {
	pn.i0 = len(pl.k)
	for i, x := range pl.rule.X {
		k := (pn.a+pn.b)/2 + (pn.b-pn.a)/2*x
		w := (pn.b - pn.a) / 2 * pl.rule.W[i]
		pl.k = append(pl.k, k)
		pl.wk = append(pl.wk, w*k)
	}
	pn.i1 = len(pl.k)
	pl.panels = append(pl.panels, pn)
}

// diag diagonalises the Hamiltonian of work w at polar point (k, θ) about center, with vectors
// if want.
func (w *polarWork) diag(center bands.KPoint, k, th float64, want bool) error {
	s, c := math.Sincos(th)
	w.ham.At(w.h, center.X+k*c, center.Y+k*s)
	if want {
		return w.ws.Eigen(w.w, w.z, w.h)
	}
	return w.ws.Values(w.w, w.h)
}

// slope returns dE_b/dk = <z_b| ∂H/∂k |z_b> along the direction (c, s) at radius k (Hellmann-
// Feynman): from the constant derivative matrices of a linear model, or from central differences
// of H for the full-zone model (only used to locate crossings, where O(h²) error is harmless).
func (pl *polar) slope(w *polarWork, z []complex128, k, c, s float64) float64 {
	n := pl.dim
	if pl.dHx == nil {
		const h = 1e-5
		w.ham.At(w.hp, pl.center.X+(k+h)*c, pl.center.Y+(k+h)*s)
		w.ham.At(w.hm, pl.center.X+(k-h)*c, pl.center.Y+(k-h)*s)
		sum := 0.0
		for i := range n {
			var r complex128
			for j := range n {
				r += (w.hp[i*n+j] - w.hm[i*n+j]) * z[j]
			}
			sum += real(complex(real(z[i]), -imag(z[i])) * r)
		}
		return sum / (2 * h)
	}
	sum := 0.0
	for i := range n {
		zi := z[i]
		if zi == 0 {
			continue
		}
		var r complex128
		for j := range n {
			r += complex(c, 0)*pl.dHx[i*n+j]*z[j] + complex(s, 0)*pl.dHy[i*n+j]*z[j]
		}
		sum += real(complex(real(zi), -imag(zi)) * r)
	}
	return sum
}

// scan evaluates the base nodes of every direction for potentials u. If ref is true it records
// the reference weights (and the sea term is then zero by definition).
func (pl *polar) scan(ctx context.Context, u []float64, ref bool) ([]line, []float64, error) {
	ham, err := pl.hamiltonian(u)
	if err != nil {
		return nil, nil, err
	}
	for _, w := range pl.work {
		w.ham = ham
	}
	na, nk, dim, nl := len(pl.thetas), len(pl.k), pl.dim, pl.nl
	lines := make([]line, na)
	for a := range lines {
		lines[a] = line{e: make([]float64, (nk+1)*dim), slope: make([]float64, (nk+1)*dim), sea: make([]float64, nl)}
	}
	if ref {
		pl.ref = make([]float64, na*nk*nl)
	}
	// Per-node sea contributions, summed afterwards in node order (deterministic).
	seaNode := make([]float64, na*nk*nl)
	occ := dim / 2
	err = par.For(ctx, len(pl.work), na*(nk+1), func(wi, idx int) error {
		a, i := idx/(nk+1), idx%(nk+1)
		w := pl.work[wi]
		th := pl.thetas[a]
		k := 0.0
		if i > 0 {
			k = pl.k[i-1]
		}
		if err := w.diag(pl.center, k, th, true); err != nil {
			return fmt.Errorf("hartree: at |k| = %g /nm, angle %g: %w", k, th, err)
		}
		s, c := math.Sincos(th)
		ln := &lines[a]
		copy(ln.e[i*dim:], w.w)
		for b := range dim {
			ln.slope[i*dim+b] = pl.slope(w, w.z[b*dim:(b+1)*dim], k, c, s)
		}
		if i == 0 {
			return nil
		}
		// Σ_{b<N} w_bl at this node.
		acc := seaNode[(a*nk+i-1)*nl : (a*nk+i)*nl]
		for b := range occ {
			wl := bands.LayerWeights(w.wl, w.z[b*dim:(b+1)*dim])
			for l := range nl {
				acc[l] += wl[l]
			}
		}
		if ref {
			copy(pl.ref[(a*nk+i-1)*nl:], acc)
		}
		return nil
	})
	if err != nil {
		return nil, nil, err
	}
	for a := range lines {
		lines[a].breaks = pl.findBreaks(&lines[a], a)
	}
	if ref {
		pl.refHam = ham
		pl.refBreaks = make([][]float64, na)
		for a := range lines {
			pl.refBreaks[a] = lines[a].breaks
		}
	}
	rest, err := pl.scanRest(ctx, ref)
	if err != nil {
		return nil, nil, err
	}
	if !ref {
		for a := range lines {
			for i := range nk {
				base := (a*nk + i) * nl
				// Σ_l Σ_{b<N} w_bl = N exactly for both states, so the sea carries no charge:
				// remove the rounding residue of the sum (it would otherwise be amplified by the
				// large weights of high-k nodes).
				drift := 0.0
				for l := range nl {
					drift += seaNode[base+l] - pl.ref[base+l]
				}
				drift /= float64(nl)
				for l := range nl {
					lines[a].sea[l] += pl.wk[i] * (seaNode[base+l] - pl.ref[base+l] - drift)
				}
			}
		}
		if err := pl.seaCorrections(ctx, lines, seaNode); err != nil {
			return nil, nil, err
		}
	}
	return lines, rest, nil
}

// scanRest evaluates the sea term on the full-zone nodes outside the valley disks (1/nm² per
// layer), recording the reference there when ref is set. It returns nil for the continuum model.
func (pl *polar) scanRest(ctx context.Context, ref bool) ([]float64, error) {
	if len(pl.rest) == 0 {
		return nil, nil
	}
	nl, dim := pl.nl, pl.dim
	occ := dim / 2
	node := make([]float64, len(pl.rest)*nl)
	err := par.For(ctx, len(pl.work), len(pl.rest), func(wi, i int) error {
		w := pl.work[wi]
		k := pl.rest[i].k
		w.ham.At(w.h, k.X, k.Y)
		if err := w.ws.Eigen(w.w, w.z, w.h); err != nil {
			return fmt.Errorf("hartree: at k = (%g, %g) /nm: %w", k.X, k.Y, err)
		}
		acc := node[i*nl : (i+1)*nl]
		for b := range occ {
			wl := bands.LayerWeights(w.wl, w.z[b*dim:(b+1)*dim])
			for l := range nl {
				acc[l] += wl[l]
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if ref {
		pl.restRef = node
		return nil, nil
	}
	out := make([]float64, nl)
	for i, rn := range pl.rest {
		drift := 0.0
		for l := range nl {
			drift += node[i*nl+l] - pl.restRef[i*nl+l]
		}
		drift /= float64(nl)
		for l := range nl {
			out[l] += rn.w * (node[i*nl+l] - pl.restRef[i*nl+l] - drift)
		}
	}
	return out, nil
}

// interval is a k-range of one band and direction where (f − θ(b<N)) is ±1 at T = 0.
type interval struct {
	a      int // direction index
	band   int
	k1, k2 float64
	sign   float64 // +1 electrons (conduction band below μ), -1 holes
}

// crossings returns, for direction a and band b, the points where E_b(k) − level changes sign,
// in increasing k, and whether E_b < level at k = 0. With exact set, crossing points are refined
// with real diagonalisations; otherwise the cubic Hermite interpolant of the node data (values
// and Hellmann-Feynman slopes) is used (fast, for searches). An extremum between two nodes that
// reaches the level (a Mexican hat, a band edge off the nodes) yields two crossings.
func (pl *polar) crossings(ln *line, a, b int, level float64, exact bool) (pts []float64, below0 bool, err error) {
	dim, nk := pl.dim, len(pl.k)
	w := pl.work[0]
	th := pl.thetas[a]
	kAt := func(i int) float64 {
		if i == 0 {
			return 0
		}
		return pl.k[i-1]
	}
	val := func(i int) float64 { return ln.e[i*dim+b] - level }
	sl := func(i int) float64 { return ln.slope[i*dim+b] }
	f := func(k float64) float64 {
		if err := w.diag(pl.center, k, th, false); err != nil {
			return math.NaN()
		}
		return w.w[b] - level
	}
	for i := 0; i < nk; i++ {
		k0, k1 := kAt(i), kAt(i+1)
		v0, v1 := val(i), val(i+1)
		h := k1 - k0
		herm := func(x float64) float64 { return hermite(x, k0, h, v0, v1, sl(i), sl(i+1)) }
		if (v0 < 0) != (v1 < 0) {
			r, err := pl.root(f, herm, k0, k1, v0, v1, exact)
			if err != nil {
				return nil, false, err
			}
			pts = append(pts, r)
			continue
		}
		// Possible double crossing: an extremum inside the interval that reaches the level.
		if (sl(i) > 0) == (sl(i+1) > 0) || sl(i) == 0 || sl(i+1) == 0 {
			continue
		}
		xe, ve, ok := hermiteExtremum(k0, h, v0, v1, sl(i), sl(i+1))
		if !ok {
			continue
		}
		if exact && (ve < 0) != (v0 < 0) {
			xe, ve = pl.extremum(f, k0, k1, v0 > 0)
		}
		if (ve < 0) == (v0 < 0) {
			continue
		}
		r1, err := pl.root(f, herm, k0, xe, v0, ve, exact)
		if err != nil {
			return nil, false, err
		}
		r2, err := pl.root(f, herm, xe, k1, ve, v1, exact)
		if err != nil {
			return nil, false, err
		}
		pts = append(pts, r1, r2)
	}
	return pts, val(0) < 0, nil
}

// kEnd is the outer end of the radial integration (the last node or the cutoff).
func (pl *polar) kEnd() float64 {
	if !math.IsInf(pl.cutoff, 1) {
		return pl.cutoff
	}
	return pl.k[len(pl.k)-1]
}

// intervals returns the pocket intervals at level mu (T = 0) for every direction and band: the
// k-ranges where a conduction band (b >= N) lies below mu or a valence band above it.
func (pl *polar) intervals(lines []line, mu float64, exact bool) ([]interval, error) {
	var out []interval
	dim := pl.dim
	for a := range lines {
		for b := range dim {
			pts, below, err := pl.crossings(&lines[a], a, b, mu, exact)
			if err != nil {
				return nil, err
			}
			sign, cur := 1.0, below
			if b < dim/2 {
				sign, cur = -1, !below
			}
			from := 0.0
			for _, r := range pts {
				if cur {
					out = append(out, interval{a: a, band: b, k1: from, k2: r, sign: sign})
				}
				from, cur = r, !cur
			}
			if cur {
				out = append(out, interval{a: a, band: b, k1: from, k2: pl.kEnd(), sign: sign})
			}
		}
	}
	return out, nil
}

func (pl *polar) root(f, herm func(float64) float64, a, b, fa, fb float64, exact bool) (float64, error) {
	if !exact {
		return quad.Brent(herm, a, b, fa, fb, 1e-14*math.Max(b, 1e-12), 200)
	}
	r, err := quad.Brent(f, a, b, fa, fb, 1e-13*math.Max(b, 1e-12), 200)
	if err != nil {
		return 0, fmt.Errorf("hartree: Fermi-level crossing in [%g, %g] /nm: %w", a, b, err)
	}
	return r, nil
}

// extremum finds the minimum (isMin) or maximum of f on [a, b] by golden-section search.
func (pl *polar) extremum(f func(float64) float64, a, b float64, isMin bool) (float64, float64) {
	sgn := 1.0
	if !isMin {
		sgn = -1
	}
	g := func(x float64) float64 { return sgn * f(x) }
	const r = 0.6180339887498949
	x1, x2 := b-r*(b-a), a+r*(b-a)
	f1, f2 := g(x1), g(x2)
	for it := 0; it < 80 && b-a > 1e-13*math.Max(b, 1e-12); it++ {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - r*(b-a)
			f1 = g(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + r*(b-a)
			f2 = g(x2)
		}
	}
	if f1 < f2 {
		return x1, sgn * f1
	}
	return x2, sgn * f2
}

// hermite evaluates the cubic Hermite interpolant on [k0, k0+h] at x.
func hermite(x, k0, h, v0, v1, s0, s1 float64) float64 {
	t := (x - k0) / h
	t2, t3 := t*t, t*t*t
	return (2*t3-3*t2+1)*v0 + (t3-2*t2+t)*h*s0 + (-2*t3+3*t2)*v1 + (t3-t2)*h*s1
}

// hermiteExtremum returns the interior extremum of the cubic Hermite interpolant.
func hermiteExtremum(k0, h, v0, v1, s0, s1 float64) (float64, float64, bool) {
	// p(t) = a t³ + b t² + c t + d with p(0)=v0, p(1)=v1, p'(0)=h s0, p'(1)=h s1.
	c := h * s0
	a := 2*(v0-v1) + h*s0 + h*s1
	b := 3*(v1-v0) - 2*h*s0 - h*s1
	// p'(t) = 3a t² + 2b t + c = 0.
	var ts []float64
	if math.Abs(a) < 1e-300 {
		if b != 0 {
			ts = append(ts, -c/(2*b))
		}
	} else {
		disc := 4*b*b - 12*a*c
		if disc < 0 {
			return 0, 0, false
		}
		sq := math.Sqrt(disc)
		ts = append(ts, (-2*b-sq)/(6*a), (-2*b+sq)/(6*a))
	}
	for _, t := range ts {
		if t > 0 && t < 1 {
			x := k0 + t*h
			return x, hermite(x, k0, h, v0, v1, s0, s1), true
		}
	}
	return 0, 0, false
}

// count returns the carrier density (1/nm²) of the pocket intervals: Σ sign (k2² − k1²)/2.
func (pl *polar) count(iv []interval) float64 {
	s := make([]float64, len(pl.thetas))
	for _, v := range iv {
		s[v.a] += v.sign * (v.k2*v.k2 - v.k1*v.k1) / 2
	}
	n := 0.0
	for _, x := range s {
		n += pl.wTheta * x
	}
	return n
}

// pocketDensities integrates Σ sign w_bl k dk over the intervals, on the base panels cut at the
// interval ends and graded towards band crossings inside them: result in 1/nm² per layer.
func (pl *polar) pocketDensities(ctx context.Context, lines []line, iv []interval) ([]float64, error) {
	type seg struct {
		iv     int
		k1, k2 float64
	}
	var segs []seg
	for i, v := range iv {
		for _, pn := range pl.panels {
			lo, hi := math.Max(pn.a, v.k1), math.Min(pn.b, v.k2)
			if hi > lo {
				segs = append(segs, seg{i, lo, hi})
			}
		}
	}
	nl, dim := pl.nl, pl.dim
	part := make([]float64, len(segs)*nl)
	err := par.For(ctx, len(pl.work), len(segs), func(wi, si int) error {
		s := segs[si]
		v := iv[s.iv]
		w := pl.work[wi]
		acc := part[si*nl : (si+1)*nl]
		ks, ws := pl.gradedNodes(nil, nil, s.k1, s.k2, pl.breaksIn(&lines[v.a], v.a, s.k1, s.k2))
		for q, k := range ks {
			if err := w.diag(pl.center, k, pl.thetas[v.a], true); err != nil {
				return err
			}
			wl := bands.LayerWeights(w.wl, w.z[v.band*dim:(v.band+1)*dim])
			for l := range nl {
				acc[l] += v.sign * ws[q] * k * wl[l]
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	out := make([]float64, nl)
	for si := range segs {
		for l := range nl {
			out[l] += pl.wTheta * part[si*nl+l]
		}
	}
	return out, nil
}

// solveMu finds μ with count(μ) = n at T = 0 from the line data: first on the Hermite
// interpolant, then polished with exact crossings. In a gap the midpoint of the interval of
// solutions is returned.
func (pl *polar) solveMu(lines []line, n float64) (float64, []interval, error) {
	lo, hi := math.Inf(1), math.Inf(-1)
	dim := pl.dim
	for _, ln := range lines {
		for i := 0; i < len(ln.e)/dim; i++ {
			lo = math.Min(lo, ln.e[i*dim+dim/2-1])
			hi = math.Max(hi, ln.e[i*dim+dim/2])
		}
	}
	// Bracket: the count is monotone in μ.
	cnt := func(mu float64, exact bool) (float64, []interval, error) {
		iv, err := pl.intervals(lines, mu, exact)
		if err != nil {
			return 0, nil, err
		}
		return pl.count(iv), iv, nil
	}
	span := math.Max(hi-lo, 0.01)
	a, b := math.Min(lo, hi)-span, math.Max(lo, hi)+span
	for range 60 {
		ca, _, err := cnt(a, false)
		if err != nil {
			return 0, nil, err
		}
		if ca <= n {
			break
		}
		a -= span
		span *= 2
	}
	for range 60 {
		cb, _, err := cnt(b, false)
		if err != nil {
			return 0, nil, err
		}
		if cb >= n {
			break
		}
		b += span
		span *= 2
	}
	// Bisection for the lowest μ with count >= n and the highest with count <= n.
	tolN := 1e-13 * math.Max(math.Abs(n), 1e-6)
	bisect := func(a, b float64, upper bool) (float64, error) {
		for range 200 {
			m := (a + b) / 2
			if b-a <= 1e-15*math.Max(1, math.Abs(m)) {
				break
			}
			c, _, err := cnt(m, false)
			if err != nil {
				return 0, err
			}
			if (!upper && c >= n-tolN) || (upper && c > n+tolN) {
				b = m
			} else {
				a = m
			}
		}
		return (a + b) / 2, nil
	}
	m1, err := bisect(a, b, false)
	if err != nil {
		return 0, nil, err
	}
	m2, err := bisect(a, b, true)
	if err != nil {
		return 0, nil, err
	}
	mu := (m1 + m2) / 2
	// Polish with exact crossings (secant on μ), unless μ sits in a gap.
	c, iv, err := cnt(mu, true)
	if err != nil {
		return 0, nil, err
	}
	if m2-m1 < 1e-9 {
		for it := 0; it < 8 && math.Abs(c-n) > tolN; it++ {
			d := 1e-6 * math.Max(span, 1e-3)
			c2, _, err := cnt(mu+d, true)
			if err != nil {
				return 0, nil, err
			}
			if c2 == c {
				break
			}
			mu -= (c - n) * d / (c2 - c)
			if c, iv, err = cnt(mu, true); err != nil {
				return 0, nil, err
			}
		}
	}
	return mu, iv, nil
}

// sortIntervals orders intervals for deterministic summation.
func sortIntervals(iv []interval) {
	sort.SliceStable(iv, func(i, j int) bool {
		if iv[i].a != iv[j].a {
			return iv[i].a < iv[j].a
		}
		if iv[i].band != iv[j].band {
			return iv[i].band < iv[j].band
		}
		return iv[i].k1 < iv[j].k1
	})
}
