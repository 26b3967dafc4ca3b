package bands

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"lamina/internal/par"
)

// BerryOptions controls [BerryFlux].
type BerryOptions struct {
	// Occupied is the number of lowest bands whose joint Berry flux is computed; 0 means Dim/2.
	Occupied int
	// Center and KMax define the square [Center-KMax, Center+KMax]² (1/nm). KMax 0 means 1.5.
	Center KPoint
	KMax   float64
	// Grid is the number of plaquettes along each side; 0 means 400.
	Grid int
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results do not depend on it.
	Workers int
}

// BerryFlux returns the Berry flux of the lowest Occupied bands of h through the square region
// of opt, in units of 2π, by the lattice method of Fukui, Hatsugai & Suzuki, J. Phys. Soc. Jpn.
// 74, 1674 (2005): link variables U_μ(k) = det <u_i(k)|u_j(k+μ)> over the occupied bands
// (so degeneracies among them are harmless) and plaquette fluxes F = arg(U_x U_y U_x'* U_y'*),
// F ∈ (-π, π]. With the links taken in the counter-clockwise order (kx, ky) this is the flux
// of Ω = 2 Im <∂x u|∂y u>, the curvature of the connection a = -i<u|∇u> used by Fukui et al. and
// by the TKNN formula σ_xy = (e²/h) Σ C.
//
// Over a whole Brillouin zone (a closed torus, with a periodic gauge) the result is the integer
// Chern number. Over a square around one valley of a continuum model it is the valley's Berry
// flux, which approaches the published half-integers (for example ±N/2 for a gapped chiral
// N-layer) as the square grows past the energy scale of the gap; the occupied bands must be
// separated from the empty ones everywhere in the square.
func BerryFlux(ctx context.Context, h Hamiltonian, opt BerryOptions) (float64, error) {
	dim := h.Dim()
	occ := opt.Occupied
	if occ == 0 {
		occ = dim / 2
	}
	if occ < 1 || occ >= dim {
		return 0, fmt.Errorf("bands: %d occupied bands is not between 1 and %d", occ, dim-1)
	}
	kmax := opt.KMax
	if kmax == 0 {
		kmax = 1.5
	}
	if err := finitePositive("KMax", kmax); err != nil {
		return 0, err
	}
	if math.IsNaN(opt.Center.X+opt.Center.Y) || math.IsInf(opt.Center.X+opt.Center.Y, 0) {
		return 0, fmt.Errorf("bands: Berry flux center is not finite")
	}
	m := opt.Grid
	if m == 0 {
		m = 400
	}
	if m < 2 {
		return 0, fmt.Errorf("bands: Berry grid of %d plaquettes is too small", m)
	}
	step := 2 * kmax / float64(m)
	nodes := m + 1
	workers := par.Workers(opt.Workers, nodes)
	solvers := make([]*Solver, workers)
	dets := make([]*cdet, workers)
	for i := range solvers {
		var err error
		if solvers[i], err = NewSolver(dim); err != nil {
			return 0, err
		}
		dets[i] = newCdet(occ)
	}
	// rows[r][j] holds the occ occupied eigenvectors (occ*dim) at node (row r, column j).
	newRow := func() [][]complex128 {
		r := make([][]complex128, nodes)
		for j := range r {
			r[j] = make([]complex128, occ*dim)
		}
		return r
	}
	prev, cur := newRow(), newRow()
	fill := func(row [][]complex128, i int) error {
		kx := opt.Center.X - kmax + float64(i)*step
		return par.For(ctx, workers, nodes, func(w, j int) error {
			ky := opt.Center.Y - kmax + float64(j)*step
			_, z, err := solvers[w].Vectors(h, kx, ky)
			if err != nil {
				return err
			}
			copy(row[j], z[:occ*dim])
			return nil
		})
	}
	if err := fill(prev, 0); err != nil {
		return 0, err
	}
	flux := make([]float64, m) // per plaquette column of the current strip
	total := 0.0
	for i := 1; i <= m; i++ {
		if err := fill(cur, i); err != nil {
			return 0, err
		}
		err := par.For(ctx, workers, m, func(w, j int) error {
			d := dets[w]
			// Corners: (i-1, j) -> (i, j) -> (i, j+1) -> (i-1, j+1), counter-clockwise in (kx, ky).
			u1 := d.link(prev[j], cur[j], dim)
			u2 := d.link(cur[j], cur[j+1], dim)
			u3 := d.link(cur[j+1], prev[j+1], dim)
			u4 := d.link(prev[j+1], prev[j], dim)
			flux[j] = cmplx.Phase(u1 * u2 * u3 * u4)
			return nil
		})
		if err != nil {
			return 0, err
		}
		for _, f := range flux { // serial sum in fixed order
			total += f
		}
		prev, cur = cur, prev
	}
	return total / (2 * math.Pi), nil
}

// cdet computes determinants of overlap matrices without allocating.
type cdet struct {
	n int
	a []complex128
}

func newCdet(n int) *cdet { return &cdet{n: n, a: make([]complex128, n*n)} }

// link returns det <u_i|v_j> for the n vectors stored contiguously in u and v (each of length
// dim), normalised to unit modulus (0 if the overlap is singular).
func (d *cdet) link(u, v []complex128, dim int) complex128 {
	n := d.n
	for i := range n {
		ui := u[i*dim : (i+1)*dim]
		for j := range n {
			vj := v[j*dim : (j+1)*dim]
			var s complex128
			for x := range dim {
				s += cmplx.Conj(ui[x]) * vj[x]
			}
			d.a[i*n+j] = s
		}
	}
	det := luDet(d.a, n)
	if a := cmplx.Abs(det); a > 0 {
		return det / complex(a, 0)
	}
	return 0
}

// luDet returns the determinant of the n×n row-major matrix a, overwriting a (Gaussian
// elimination with partial pivoting).
func luDet(a []complex128, n int) complex128 {
	det := complex(1, 0)
	for c := range n {
		p, best := c, cmplx.Abs(a[c*n+c])
		for r := c + 1; r < n; r++ {
			if v := cmplx.Abs(a[r*n+c]); v > best {
				p, best = r, v
			}
		}
		if best == 0 {
			return 0
		}
		if p != c {
			for x := range n {
				a[c*n+x], a[p*n+x] = a[p*n+x], a[c*n+x]
			}
			det = -det
		}
		piv := a[c*n+c]
		det *= piv
		for r := c + 1; r < n; r++ {
			f := a[r*n+c] / piv
			if f == 0 {
				continue
			}
			for x := c; x < n; x++ {
				a[r*n+x] -= f * a[c*n+x]
			}
		}
	}
	return det
}
