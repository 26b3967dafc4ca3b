package hartree

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"time"
)

// Scan is a map of mean-field ground states over a grid of carrier densities n and displacement
// fields D (and, through Base, any other fixed setting).
//
// The points are walked in a serpentine order (D up in one row of n, down in the next), so that
// every point follows a neighbour. Each point is solved from the search's fresh seeds and, with
// Continuation, also from the ground state of the previous point; the lowest converged state is
// the point's ground state. Fresh seeds make a first-order switch between states visible where
// it happens instead of following the old state past its stability; continuation keeps smooth
// stretches cheap and finds states that fresh seeds miss.
type Scan struct {
	// Base is the problem at every point; its Field is replaced by the point's (n, D).
	Base MeanField
	// Ns are the densities (1/nm²) and Ds the fields D/ε0 (V/nm) of the grid.
	Ns, Ds []float64
	// Search controls the fresh seeds at every point.
	Search SearchOptions
	// Continuation seeds each point from the previous point's ground state as well.
	Continuation bool
	// FreshEvery, when larger than 1 (with Continuation), runs the fresh seeds only at every
	// FreshEvery-th point of the walk and wherever the continued ground state changes class from
	// the previous point's; the other points try only the symmetric state and the continuation.
	// This is much faster on large maps, at the risk of following a state past a first-order
	// switch inside a stretch of FreshEvery points (a switch to a flavour-polarized state at
	// finite density, for example, can be missed until the next fresh point). 0 or 1 means fresh
	// seeds everywhere, the safe default. A resumed scan repeats the uninterrupted one exactly
	// only with fresh seeds everywhere.
	FreshEvery int
	// Options are the iteration options of every solve.
	Options HFOptions
}

// ScanPoint is one point of a scan's grid: index i of n, index j of D, and its place Index in
// the walk (the order of the output).
type ScanPoint struct {
	Index, I, J int
	N, D        float64 // 1/nm², V/nm
}

// Points returns the grid points in walk order.
func (sc Scan) Points() []ScanPoint {
	var out []ScanPoint
	for i, n := range sc.Ns {
		for jj := range sc.Ds {
			j := jj
			if i%2 == 1 {
				j = len(sc.Ds) - 1 - jj
			}
			out = append(out, ScanPoint{Index: len(out), I: i, J: j, N: n, D: sc.Ds[j]})
		}
	}
	return out
}

// Shard returns the contiguous block of the walk that shard k of m (0 <= k < m) owns: the
// points [k·P/m, (k+1)·P/m). Contiguous blocks keep continuation intact inside a shard.
func (sc Scan) Shard(k, m int) ([]ScanPoint, error) {
	if m < 1 || k < 0 || k >= m {
		return nil, fmt.Errorf("hartree: shard %d of %d does not exist (want 0 <= k < m)", k, m)
	}
	pts := sc.Points()
	p := len(pts)
	return pts[k*p/m : (k+1)*p/m], nil
}

func (sc Scan) validate() error {
	if len(sc.Ns) == 0 || len(sc.Ds) == 0 {
		return errors.New("hartree: scan needs at least one density and one field")
	}
	for _, v := range append(append([]float64(nil), sc.Ns...), sc.Ds...) {
		if !finite(v) {
			return fmt.Errorf("hartree: scan axis value %g is not finite", v)
		}
	}
	return sc.Base.Validate()
}

// ScanRecord is the result at one point.
type ScanRecord struct {
	ScanPoint
	// Ground is the lowest converged state (nil if no seed converged); Degenerate the classes at
	// its energy; RelEnergy its energy relative to the symmetric state (eV/nm²).
	Ground     *HFResult
	Degenerate []string
	RelEnergy  float64
	// States is the number of distinct converged states; Failed the seeds that did not converge.
	States, Failed int
	// Iterations is the total number of mean-field iterations spent at the point; Continued is
	// the part spent by the continuation seed (0 without one).
	Iterations, Continued int
	// Seed is the seed that reached the ground state ("continued" for continuation).
	Seed string
}

// ScanProgress reports the state of a running scan.
type ScanProgress struct {
	Done, Total  int           // points finished (including ones skipped as already done) and in all
	Elapsed      time.Duration // since Run started
	PerMinute    float64       // points solved per minute in this run
	Remaining    time.Duration // estimate for the points left
	Last         ScanRecord
	SkippedFirst int // points found already done when Run started
}

// Run solves the given points (from [Scan.Points] or [Scan.Shard]) in order, skipping those whose
// Index is in done. Every finished point goes to sink at once (which should write and flush it);
// progress, if non-nil, follows each point. If state is non-nil, Run starts the continuation
// chain from it, and after every point it calls checkpoint (if non-nil) with the point and its
// ground state, so that an interrupted scan can resume with the same chain. A point where no
// seed converges is recorded with a nil Ground and does not stop the scan. Cancellation returns
// ctx.Err() wrapped; everything passed to sink before stays valid.
func (sc Scan) Run(ctx context.Context, pts []ScanPoint, done map[int]bool, state *HFState,
	sink func(ScanRecord) error, checkpoint func(ScanPoint, *HFState) error, progress func(ScanProgress)) error {
	if err := sc.validate(); err != nil {
		return err
	}
	base, err := NewHFSolver(sc.Base, sc.Options)
	if err != nil {
		return err
	}
	start := time.Now()
	total, skipped, solved := len(pts), 0, 0
	prev := state
	prevClass := ""
	if state != nil {
		prevClass = "?" // unknown: the first continued point gets every seed
	}
	for _, p := range pts {
		if done[p.Index] {
			skipped++
			continue
		}
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("hartree: scan stopped: %w", err)
		}
		s, err := base.WithField(Field{D: p.D, N: p.N})
		if err != nil {
			return err
		}
		opt := sc.Search
		if sc.Continuation && prev != nil {
			opt.From = []*HFState{prev}
		}
		light := sc.Continuation && sc.FreshEvery > 1 && prev != nil && p.Index%sc.FreshEvery != 0
		if light {
			opt.NoFresh = true
		}
		res, err := s.Search(ctx, opt)
		if light && ctx.Err() == nil && (err != nil || len(res.States) == 0 || res.States[0].Class != prevClass) {
			// The continued state changed class (or failed): look at this point with every seed.
			spent := res.Iterations()
			opt.NoFresh = false
			res, err = s.Search(ctx, opt)
			res.extra = spent
		}
		if ctx.Err() != nil {
			return fmt.Errorf("hartree: scan stopped: %w", ctx.Err())
		}
		rec := ScanRecord{ScanPoint: p, RelEnergy: math.NaN(), Failed: len(res.Failed), States: len(res.States)}
		rec.Iterations = res.Iterations()
		for _, r := range res.all {
			if strings.HasPrefix(r.Seed, "continued:") {
				rec.Continued += r.Iterations
			}
		}
		if err == nil && len(res.States) > 0 {
			g := res.States[0]
			rec.Ground, rec.RelEnergy, rec.Degenerate, rec.Seed = g.HFResult, g.RelEnergy, res.Degenerate(0), g.Seeds[0]
			prev, prevClass = g.State, g.Class
		} else {
			prev, prevClass = nil, ""
		}
		if err := sink(rec); err != nil {
			return fmt.Errorf("hartree: scan output: %w", err)
		}
		if checkpoint != nil && prev != nil {
			if err := checkpoint(p, prev); err != nil {
				return err
			}
		}
		solved++
		if progress != nil {
			el := time.Since(start)
			pr := ScanProgress{Done: skipped + solved, Total: total, Elapsed: el, Last: rec, SkippedFirst: skipped}
			if el > 0 {
				pr.PerMinute = float64(solved) / el.Minutes()
			}
			if solved > 0 {
				pr.Remaining = time.Duration(float64(el) / float64(solved) * float64(total-skipped-solved))
			}
			progress(pr)
		}
	}
	return nil
}

// Iterations returns the total number of iterations of every seed of the search.
func (r *SearchResult) Iterations() int {
	n := r.extra
	for _, s := range r.all {
		n += s.Iterations
	}
	return n
}
