package hartree

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"lamina/bands"
)

// SearchOptions controls [HFSolver.Search]. The zero value searches every flavour-sign class with
// every applicable profile, plus the symmetric state and two random seeds.
type SearchOptions struct {
	// Profiles to seed; nil means all that apply (Linear and Staggered need N >= 2 and N >= 3
	// layers respectively; SublatticeMass always applies).
	Profiles []Profile
	// AllAssignments seeds all 16 assignments of polarization signs to the four flavours. By
	// default one representative per class is used: assignments related by exchanging spins or
	// valleys (symmetries of the Hamiltonian without magnetic field) give the same energies, which
	// leaves ++++, −−−−, the valley-, spin- and spin-valley-opposite patterns, and 3:1 with the
	// minority flavour negative or positive (global sign flips stay separate because a field D
	// or an asymmetric stack distinguishes them).
	AllAssignments bool
	// Random is the number of random seeds (0 means 2; negative means none), drawn from explicit
	// PCG seeds RandomSeed, RandomSeed+1, ... (0 means 1).
	Random     int
	RandomSeed uint64
	// Amplitude of the seeds' self-energies in eV; 0 means 0.02.
	Amplitude float64
	// From adds seeds that continue from converged neighbouring states (same solver grid).
	From []*HFState
	// NoFresh keeps only the symmetric seed (the energy zero) and the From seeds.
	NoFresh bool
	// Progress, if non-nil, is called after each seed with the number done and in all.
	Progress func(done, total int, r *HFResult)
}

// SearchResult is the outcome of a competing-state search.
type SearchResult struct {
	// Symmetric is the solution from the symmetric seed (the energy zero of States), or nil if
	// it did not converge.
	Symmetric *HFResult
	// States holds one entry per distinct converged state, lowest energy first; Energy of each is
	// relative to the reference state and RelEnergy relative to Symmetric.
	States []SearchState
	// Failed lists the seeds that did not converge, with their last iterates.
	Failed []*HFResult
	all    []*HFResult // every seed's result, in seed order
	extra  int         // iterations spent before this search at the same point (scans)
}

// SearchState is a distinct converged state of a search.
type SearchState struct {
	*HFResult
	// RelEnergy is the energy per area relative to the symmetric state (eV/nm²); relative to the
	// reference state when the symmetric seed did not converge.
	RelEnergy float64
	// Seeds lists every seed that converged to this state.
	Seeds []string
}

// Degenerate returns the classes of the states whose energy equals that of state i within
// relative 1e-6 (plus 1e-12 eV/nm²), state i's own class first: in this mean-field theory
// without inter-valley interactions the anomalous-Hall, layer-antiferromagnetic and spin-Hall
// states of a stack are degenerate (Zhang, Jung, Fiete, Niu & MacDonald, PRL 106, 156801
// (2011)), and which of them sorts first is then a matter of rounding.
func (r *SearchResult) Degenerate(i int) []string {
	if i < 0 || i >= len(r.States) {
		return nil
	}
	e := r.States[i].Energy
	out := []string{r.States[i].Class}
	for j, s := range r.States {
		if j == i || math.Abs(s.Energy-e) > 1e-6*math.Abs(e)+1e-12 {
			continue
		}
		if !slices.Contains(out, s.Class) {
			out = append(out, s.Class)
		}
	}
	return out
}

// Ground returns the lowest-energy converged state, or nil.
func (r *SearchResult) Ground() *SearchState {
	if len(r.States) == 0 {
		return nil
	}
	return &r.States[0]
}

// Seeds returns the seeds a search with opt uses for a stack of n layers.
func (opt SearchOptions) Seeds(n int) []Seed {
	amp := opt.Amplitude
	seeds := []Seed{SymmetricSeed()}
	if opt.NoFresh {
		for i, st := range opt.From {
			if st != nil {
				seeds = append(seeds, Seed{Name: fmt.Sprintf("continued:%d", i), From: st})
			}
		}
		return seeds
	}
	profiles := opt.Profiles
	if profiles == nil {
		if n >= 2 {
			profiles = append(profiles, Linear)
		}
		if n >= 3 {
			profiles = append(profiles, Staggered)
		}
		profiles = append(profiles, SublatticeMass)
	}
	var assigns [][Flavors]float64
	if opt.AllAssignments {
		for b := range 16 {
			var s [Flavors]float64
			for f := range Flavors {
				s[f] = 1
				if b&(1<<f) != 0 {
					s[f] = -1
				}
			}
			assigns = append(assigns, s)
		}
	} else {
		assigns = [][Flavors]float64{
			{1, 1, 1, 1}, {-1, -1, -1, -1}, // layer polarized, both senses
			{1, -1, 1, -1},  // valleys opposite: anomalous Hall
			{1, 1, -1, -1},  // spins opposite: layer antiferromagnet
			{1, -1, -1, 1},  // spin and valley opposite: spin Hall
			{1, 1, 1, -1},   // 3:1, minority negative
			{-1, -1, -1, 1}, // 3:1, minority positive
		}
	}
	for _, p := range profiles {
		if (p == Linear && n < 2) || (p == Staggered && n < 3) {
			continue
		}
		for _, a := range assigns {
			seeds = append(seeds, PatternSeed(a, p, amp))
		}
	}
	nr := opt.Random
	if nr == 0 {
		nr = 2
	}
	base := opt.RandomSeed
	if base == 0 {
		base = 1
	}
	for i := 0; i < nr; i++ {
		seeds = append(seeds, RandomSeed(base+uint64(i), amp))
	}
	for i, st := range opt.From {
		if st != nil {
			seeds = append(seeds, Seed{Name: fmt.Sprintf("continued:%d", i), From: st})
		}
	}
	return seeds
}

// energyTol and orderTol decide when two converged seeds found the same state: equal energies
// to 1e-9 eV/nm² (far below the 1e-6 eV convergence of the potentials times the ~1e-3 /nm²
// densities) and equal flavour order parameters to 1e-6 /nm², with the same class name.
const (
	energyTol = 1e-9
	orderTol  = 1e-6
)

// Search solves the mean-field equations from every seed of opt, and returns the distinct
// converged states ranked by energy. Mean-field equations have several self-consistent
// solutions; the lowest one found is the candidate ground state, and the search reports which
// seeds reached it. Seeds that do not converge are listed as such and never ranked.
// Cancellation returns the states found so far with an error wrapping ctx.Err().
func (s *HFSolver) Search(ctx context.Context, opt SearchOptions) (*SearchResult, error) {
	seeds := opt.Seeds(s.g.n)
	out := &SearchResult{}
	var all []*HFResult
	for i, sd := range seeds {
		r, err := s.Solve(ctx, sd)
		if ctx.Err() != nil {
			return out, fmt.Errorf("hartree: search stopped after %d of %d seeds: %w", i, len(seeds), ctx.Err())
		}
		if err != nil && r == nil {
			return out, err
		}
		out.all = append(out.all, r)
		if r.Converged && err == nil {
			all = append(all, r)
			if sd.Name == "symmetric" {
				out.Symmetric = r
			}
		} else {
			out.Failed = append(out.Failed, r)
		}
		if opt.Progress != nil {
			opt.Progress(i+1, len(seeds), r)
		}
	}
	zero := 0.0
	if out.Symmetric != nil {
		zero = out.Symmetric.Energy
	}
	slices.SortStableFunc(all, func(a, b *HFResult) int {
		switch {
		case a.Energy < b.Energy:
			return -1
		case a.Energy > b.Energy:
			return 1
		}
		return 0
	})
	for _, r := range all {
		merged := false
		for i := range out.States {
			if sameState(out.States[i].HFResult, r) {
				out.States[i].Seeds = append(out.States[i].Seeds, r.Seed)
				merged = true
				break
			}
		}
		if !merged {
			out.States = append(out.States, SearchState{HFResult: r, RelEnergy: r.Energy - zero, Seeds: []string{r.Seed}})
		}
	}
	if len(out.States) == 0 {
		return out, errors.New("hartree: no seed converged")
	}
	return out, nil
}

func sameState(a, b *HFResult) bool {
	if a.Class != b.Class || math.Abs(a.Energy-b.Energy) > energyTol*math.Max(1, math.Abs(a.Energy)) {
		return false
	}
	for f := range Flavors {
		pa, pb := a.Order[f], b.Order[f]
		if math.Abs(pa.Dipole-pb.Dipole) > orderTol || math.Abs(pa.Staggered-pb.Staggered) > orderTol || math.Abs(pa.Sublattice-pb.Sublattice) > orderTol {
			return false
		}
	}
	return true
}

// SectorGaps returns, for a Bernal stack, the four-flavour gap of each bilayer-like and
// monolayer-like sector of the state (see [bands.BernalSectors]): each flavour's mean-field
// Hamiltonian is projected onto the sector and its gap at half filling of the sector searched
// between grid points; the sector's gap is the lowest conduction edge minus the highest valence
// edge over the flavours (eV). Sectors are listed as bands.BernalSectors returns them.
func (r *HFResult) SectorGaps(ctx context.Context) ([]bands.Sector, []float64, error) {
	if r.State == nil {
		return nil, nil, errors.New("hartree: no state")
	}
	g := r.State.grid
	secs, err := bands.BernalSectors(g.mf.Device.Stack)
	if err != nil {
		return nil, nil, err
	}
	gaps := make([]float64, len(secs))
	for i, sec := range secs {
		lo, hi := math.Inf(1), math.Inf(-1)
		for f := range Flavors {
			fh, err := r.State.Flavor(f)
			if err != nil {
				return nil, nil, err
			}
			sh, err := bands.NewSectorHamiltonian(fh, sec)
			if err != nil {
				return nil, nil, err
			}
			gp, err := bands.FindGap(ctx, sh, bands.GapOptions{KMax: g.kmax, Radial: 48, Angular: 48})
			if err != nil {
				return nil, nil, err
			}
			lo, hi = math.Min(lo, gp.EC), math.Max(hi, gp.EV)
		}
		gaps[i] = lo - hi
	}
	return secs, gaps, nil
}
