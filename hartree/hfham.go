package hartree

import (
	"context"
	"math"

	"lamina/bands"
)

// FlavorHamiltonian is the mean-field Hamiltonian H_f(k) = H0_ξ(k) + diag(U) + Σ_f(k) of one
// flavour of a state, with Σ_f interpolated bilinearly between the grid points (exact at them,
// zero outside the disk of the grid). It implements [bands.Hamiltonian], so band structures,
// gaps and Berry fluxes of mean-field states come from package bands.
type FlavorHamiltonian struct {
	h0    *bands.Continuum
	dim   int
	L     int
	step  float64
	sigma []complex128 // L×L grid of dim×dim matrices (zero outside the disk)
}

// Flavor returns the mean-field Hamiltonian of flavour f of state st.
func (st *HFState) Flavor(f int) (*FlavorHamiltonian, error) {
	g := st.grid
	h0, err := bands.NewContinuum(g.mf.Device.Stack, g.mf.Device.Params, FlavorValley(f), st.U)
	if err != nil {
		return nil, err
	}
	d2 := g.dim * g.dim
	fh := &FlavorHamiltonian{h0: h0, dim: g.dim, L: g.L, step: g.h, sigma: make([]complex128, g.L*g.L*d2)}
	m := len(g.nodes)
	if st.Sigma != nil && g.kernels != nil {
		for i, gi := range g.index {
			copy(fh.sigma[gi*d2:(gi+1)*d2], st.Sigma[(f*m+i)*d2:(f*m+i+1)*d2])
		}
	}
	return fh, nil
}

// Dim returns 2N.
func (fh *FlavorHamiltonian) Dim() int { return fh.dim }

// At writes H_f(k) into dst.
func (fh *FlavorHamiltonian) At(dst []complex128, kx, ky float64) {
	fh.h0.At(dst, kx, ky)
	d2 := fh.dim * fh.dim
	// Grid coordinates of the cell-centred nodes: k = (i + 0.5 − L/2) h.
	x := kx/fh.step + float64(fh.L)/2 - 0.5
	y := ky/fh.step + float64(fh.L)/2 - 0.5
	i0, j0 := int(math.Floor(x)), int(math.Floor(y))
	fx, fy := x-float64(i0), y-float64(j0)
	for di := range 2 {
		for dj := range 2 {
			i, j := i0+di, j0+dj
			if i < 0 || j < 0 || i >= fh.L || j >= fh.L {
				continue
			}
			wt := (1 - fx) * (1 - fy)
			switch {
			case di == 1 && dj == 0:
				wt = fx * (1 - fy)
			case di == 0 && dj == 1:
				wt = (1 - fx) * fy
			case di == 1 && dj == 1:
				wt = fx * fy
			}
			if wt == 0 {
				continue
			}
			s := fh.sigma[(i*fh.L+j)*d2 : (i*fh.L+j+1)*d2]
			for q := range d2 {
				dst[q] += complex(wt, 0) * s[q]
			}
		}
	}
}

// minTopoGap is the smallest direct gap (eV) for which a flavour's Berry flux is reported.
const minTopoGap = 1e-6

// topology computes per-flavour Berry fluxes (Chern numbers of the filled bands, through the
// grid's square) and band edges refined between grid points, for a state whose flavours are all
// gapped. Flavours without a gap get NaN.
func (g *hfGrid) topology(ctx context.Context, r *HFResult, workers int) error {
	r.GapRefined = math.NaN()
	for f := range Flavors {
		r.Chern[f] = math.NaN()
	}
	r.SigmaXY = math.NaN()
	if r.State == nil {
		return nil
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	sum := 0.0
	ok := true
	for f := range Flavors {
		nf := r.FilledBands[f]
		if nf == 0 || nf == g.dim || r.FlavorGap[f] <= 0 {
			ok = false
			continue
		}
		fh, err := r.State.Flavor(f)
		if err != nil {
			return err
		}
		gp, err := bands.FindGap(ctx, fh, bands.GapOptions{Occupied: nf, KMax: g.kmax, Workers: workers, Radial: 64, Angular: 96})
		if err != nil {
			return err
		}
		lo, hi = math.Min(lo, gp.EC), math.Max(hi, gp.EV)
		if gp.Direct < minTopoGap {
			ok = false // the filled bands touch the empty ones between grid points
			continue
		}
		c, err := bands.BerryFlux(ctx, fh, bands.BerryOptions{Occupied: nf, KMax: float64(g.L-1) * g.h / 2, Grid: g.L - 1, Workers: workers})
		if err != nil {
			return err
		}
		r.Chern[f] = c
		sum += c
	}
	if ok {
		r.SigmaXY = sum
	}
	if !math.IsInf(lo, 0) && !math.IsInf(hi, 0) {
		r.GapRefined = lo - hi
	}
	return nil
}
