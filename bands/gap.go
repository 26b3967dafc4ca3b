package bands

import (
	"context"
	"fmt"
	"math"

	"lamina/internal/par"
)

// GapOptions controls [FindGap]. The zero value searches the charge-neutral gap of a continuum
// Hamiltonian within |k| <= 1.5/nm of the valley point.
type GapOptions struct {
	// Occupied is the number of filled bands (per flavour); the gap is between band Occupied-1
	// and band Occupied (0-based, ascending). 0 means N = Dim/2, charge neutrality.
	Occupied int
	// Centers are the points around which to search (1/nm). Nil means the origin, which is the
	// valley point of a [Continuum]; for a [FullZone] pass its two valley points.
	Centers []KPoint
	// KMax is the search radius around each center (1/nm). 0 means 1.5/nm (ħvk ≈ 1 eV for
	// γ0 ≈ 3 eV), which holds every low-energy band extremum of few-layer graphene.
	KMax float64
	// Radial and Angular set the global polar grid (nodes crowd towards the center, where the
	// low-energy structure is: r_i = KMax (i/Radial)²). 0 means 96 and 120.
	Radial, Angular int
	// Refine is how many of the best grid candidates are polished by a local simplex search.
	// 0 means 6.
	Refine int
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results do not depend on it.
	Workers int
}

// Gap is the result of [FindGap]. Energies in eV, positions in 1/nm.
type Gap struct {
	// Indirect is min_k E_c(k) − max_k E_v(k): positive for an insulator, negative when the
	// bands overlap (semimetal), where -Indirect is the overlap.
	Indirect float64
	// Gap is max(Indirect, 0).
	Gap float64
	// Direct is min_k [E_c(k) − E_v(k)].
	Direct float64
	// EV and EC are the valence-band maximum and conduction-band minimum.
	EV, EC float64
	// KV, KC and KDirect are where EV, EC and Direct occur.
	KV, KC, KDirect KPoint
}

// Semimetal reports whether the bands overlap (Indirect < 0).
func (g Gap) Semimetal() bool { return g.Indirect < 0 }

// Overlap returns the band overlap max(-Indirect, 0).
func (g Gap) Overlap() float64 { return math.Max(-g.Indirect, 0) }

// FindGap searches for the band gap of h between bands Occupied-1 and Occupied: a global
// search on a polar grid around each center (trigonal warping moves extrema off the high-symmetry
// lines, so the search is two-dimensional), then a Nelder-Mead refinement of the best candidates
// confined to the search disks. The refined extrema are accurate to about 1e-9 of the grid
// spacing in position, hence far better in energy near a smooth extremum; a degenerate ring of
// extrema (isotropic Mexican hat) is handled since any point of the ring is a valid answer.
func FindGap(ctx context.Context, h Hamiltonian, opt GapOptions) (Gap, error) {
	dim := h.Dim()
	occ := opt.Occupied
	if occ == 0 {
		occ = dim / 2
	}
	if occ < 1 || occ >= dim {
		return Gap{}, fmt.Errorf("bands: %d occupied bands is not between 1 and %d", occ, dim-1)
	}
	kmax := opt.KMax
	if kmax == 0 {
		kmax = 1.5
	}
	if err := finitePositive("KMax", kmax); err != nil {
		return Gap{}, err
	}
	centers := opt.Centers
	if len(centers) == 0 {
		centers = []KPoint{{}}
	}
	for _, c := range centers {
		if math.IsNaN(c.X+c.Y) || math.IsInf(c.X+c.Y, 0) {
			return Gap{}, fmt.Errorf("bands: search center (%g, %g) is not finite", c.X, c.Y)
		}
	}
	nr, na, nref := opt.Radial, opt.Angular, opt.Refine
	if nr == 0 {
		nr = 96
	}
	if na == 0 {
		na = 120
	}
	if nref == 0 {
		nref = 6
	}
	if nr < 2 || na < 3 || nref < 1 {
		return Gap{}, fmt.Errorf("bands: gap grid %d x %d with %d refinements is too small", nr, na, nref)
	}
	// An isotropic Hamiltonian (bands depending on |k| only) needs one direction.
	if iso, ok := h.(interface{ Isotropic() bool }); ok && iso.Isotropic() && opt.Angular == 0 {
		na = 1
	}

	// Grid: the center plus nr rings of na points, per center.
	perCenter := 1 + nr*na
	pts := make([]KPoint, 0, perCenter*len(centers))
	for _, c := range centers {
		pts = append(pts, c)
		for i := 1; i <= nr; i++ {
			r := kmax * math.Pow(float64(i)/float64(nr), 2)
			for j := range na {
				s, co := math.Sincos(2 * math.Pi * (float64(j) + 0.5*float64(i%2)) / float64(na))
				pts = append(pts, KPoint{c.X + r*co, c.Y + r*s})
			}
		}
	}
	ev := make([]float64, len(pts))
	ec := make([]float64, len(pts))
	workers := par.Workers(opt.Workers, len(pts))
	solvers := make([]*Solver, workers)
	for i := range solvers {
		var err error
		if solvers[i], err = NewSolver(dim); err != nil {
			return Gap{}, err
		}
	}
	err := par.For(ctx, workers, len(pts), func(w, i int) error {
		e, err := solvers[w].Values(h, pts[i].X, pts[i].Y)
		if err != nil {
			return err
		}
		ev[i], ec[i] = e[occ-1], e[occ]
		return nil
	})
	if err != nil {
		return Gap{}, err
	}

	// Candidates: the best grid points for each objective, at least a few grid cells apart.
	pick := func(score func(i int) float64) []int {
		// Repeatedly take the best remaining point that is at least three grid cells from those
		// already taken (a partial selection: nref is small).
		var out []int
		taken := make([]bool, len(pts))
		for len(out) < nref {
			best, bi := math.Inf(1), -1
			for i := range pts {
				if taken[i] {
					continue
				}
				if v := score(i); v < best || (v == best && bi < 0) {
					far := true
					for _, j := range out {
						if math.Hypot(pts[i].X-pts[j].X, pts[i].Y-pts[j].Y) < 3*spacing(pts[i], centers, kmax, nr, na) {
							far = false
							break
						}
					}
					if !far {
						taken[i] = true
						continue
					}
					best, bi = v, i
				}
			}
			if bi < 0 {
				break
			}
			taken[bi] = true
			out = append(out, bi)
		}
		return out
	}
	vC := pick(func(i int) float64 { return -ev[i] })
	cC := pick(func(i int) float64 { return ec[i] })
	dC := pick(func(i int) float64 { return ec[i] - ev[i] })

	// Local refinement, confined to the union of the search disks by a penalty.
	s := solvers[0]
	inside := func(x, y float64) float64 {
		best := math.Inf(1)
		for _, c := range centers {
			best = math.Min(best, math.Hypot(x-c.X, y-c.Y)-kmax)
		}
		return math.Max(best, 0)
	}
	var evalErr error
	band := func(x, y float64, b int) float64 {
		e, err := s.Values(h, x, y)
		if err != nil {
			evalErr = err
			return math.NaN()
		}
		return e[b]
	}
	const big = 1e3 // eV per 1/nm outside the disk: far steeper than any band
	refine := func(cands []int, f func(x, y float64) float64) (KPoint, float64) {
		bestK, bestF := KPoint{}, math.Inf(1)
		for _, i := range cands {
			p := pts[i]
			step := spacing(p, centers, kmax, nr, na)
			x, y, v := minimize2(func(x, y float64) float64 { return f(x, y) + big*inside(x, y) },
				p.X, p.Y, step, 1e-9*step, 400)
			if v < bestF {
				bestK, bestF = KPoint{x, y}, v
			}
		}
		return bestK, bestF
	}
	var g Gap
	var fv float64
	g.KV, fv = refine(vC, func(x, y float64) float64 { return -band(x, y, occ-1) })
	g.EV = -fv
	g.KC, g.EC = refine(cC, func(x, y float64) float64 { return band(x, y, occ) })
	g.KDirect, g.Direct = refine(dC, func(x, y float64) float64 {
		e, err := s.Values(h, x, y)
		if err != nil {
			evalErr = err
			return math.NaN()
		}
		return e[occ] - e[occ-1]
	})
	if evalErr != nil {
		return Gap{}, evalErr
	}
	// The refined points are never worse than the grid (the grid point starts the simplex), but
	// keep the bookkeeping consistent if a penalty made them so.
	g.Indirect = g.EC - g.EV
	g.Gap = math.Max(g.Indirect, 0)
	return g, ctx.Err()
}

// spacing estimates the local grid spacing at p (1/nm), used as the initial simplex size.
func spacing(p KPoint, centers []KPoint, kmax float64, nr, na int) float64 {
	r := math.Inf(1)
	for _, c := range centers {
		r = math.Min(r, math.Hypot(p.X-c.X, p.Y-c.Y))
	}
	dr := kmax * 2 * math.Max(math.Sqrt(r/kmax), 1/float64(nr)) / float64(nr)
	da := 2 * math.Pi * r / float64(na)
	return math.Max(math.Max(dr, da), kmax/float64(nr*nr))
}
